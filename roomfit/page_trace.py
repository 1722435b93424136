"""Tracing a plan over a scan: most clients hold a PDF or a photo of their plan.

The page loads the image (PNG, JPEG, or the first page of a PDF), the user clicks the two
ends of one wall whose length they know and types it (the scale), then clicks each room's
corners in turn. These functions turn those clicks into a :class:`~roomfit.plan.data.Plan`
in whole millimetres, validated like a plan file, and draw the faint underlay with what is
traced so far. Image pixels have y down; the plan's y axis points up (north), so y is
flipped about the image's bottom edge.

>>> s = mm_per_pixel((100, 100), (400, 100), 3000)
>>> s
10.0
>>> to_plan((400, 50), s, height_px=200)
(4000, 1500)
"""

from __future__ import annotations

import io
import math
import re
from collections.abc import Sequence
from dataclasses import dataclass

from PIL import Image, ImageDraw, ImageOps

from roomfit.errors import PlanError, Problem
from roomfit.page import EDITED_SOURCE, validated
from roomfit.plan.data import Plan, Room, RuleChoice

__all__ = ["TracedRoom", "MAX_SCAN_PIXELS", "load_scan", "mm_per_pixel", "to_plan",
           "plan_from_trace", "underlay"]

#: Largest scan accepted, in pixels (a 300 dpi A3 page is about 17 million).
MAX_SCAN_PIXELS = 40_000_000

XY = tuple[float, float]


@dataclass(frozen=True)
class TracedRoom:
    """One room clicked over the scan: its name, use and corners in image pixels."""

    label: str
    use: str
    corners: tuple[XY, ...]


def load_scan(name: str, data: bytes) -> Image.Image:
    """The scan as an RGB image: a PNG or JPEG as it is, a PDF's first page rendered at
    150 dpi (with ``pypdfium2``). Raises :class:`PlanError` naming the file for anything else."""
    if data[:5] == b"%PDF-":
        try:
            import pypdfium2 as pdfium
        except ImportError:
            raise PlanError(Problem("", "reading a PDF needs the pypdfium2 package",
                                    "install roomfit with the page extra, or save the page as PNG"),
                            name) from None
        try:
            pdf = pdfium.PdfDocument(data)
            image = pdf[0].render(scale=150 / 72).to_pil()
        except Exception as e:  # noqa: BLE001 - any failure of the PDF library is a bad file
            raise PlanError(Problem("", f"cannot read the PDF's first page ({e})"), name) from None
        return image.convert("RGB")
    Image.MAX_IMAGE_PIXELS = MAX_SCAN_PIXELS
    try:
        image = Image.open(io.BytesIO(data))
        image.load()
    except Exception as e:  # noqa: BLE001 - PIL raises many kinds for a bad image
        raise PlanError(Problem("", f"not a PNG, JPEG or PDF image ({type(e).__name__})",
                                "upload a scan or photo of the plan as PNG, JPEG or PDF"),
                        name) from None
    return ImageOps.exif_transpose(image).convert("RGB")


def mm_per_pixel(a: XY, b: XY, known_mm: float) -> float:
    """Scale from two clicked points ``known_mm`` apart on the plan."""
    d = math.dist(a, b)
    if d < 5:
        raise PlanError(Problem("scale", "the two points of the known length are too close",
                                "click the two ends of a long wall"), EDITED_SOURCE)
    if not 0 < known_mm < 1e6:
        raise PlanError(Problem("scale", f"a known length of {known_mm} mm cannot be right",
                                "type the wall's length in millimetres"), EDITED_SOURCE)
    return known_mm / d


def to_plan(p: XY, scale: float, height_px: float) -> tuple[int, int]:
    """An image pixel as plan millimetres (y flipped about the image's bottom edge)."""
    return round(p[0] * scale), round((height_px - p[1]) * scale)


def _room_id(label: str, used: set[str]) -> str:
    base = re.sub(r"[^a-z0-9]+", "-", label.lower()).strip("-") or "room"
    rid, n = base, 2
    while rid in used:
        rid, n = f"{base}-{n}", n + 1
    used.add(rid)
    return rid


def plan_from_trace(name: str, rooms: Sequence[TracedRoom], scale: float, height_px: float,
                    rule_set: str = "everyday") -> Plan:
    """A plan of the traced rooms (no doors yet: add them on the building tab).

    Raises :class:`PlanError` at the room's field for a room with fewer than three corners
    or an outline that crosses itself."""
    if not rooms:
        raise PlanError(Problem("rooms", "trace at least one room"), EDITED_SOURCE)
    used: set[str] = set()
    out = []
    for i, r in enumerate(rooms):
        if len(r.corners) < 3:
            raise PlanError(Problem(f"rooms[{i}].outline", f"{r.label or 'the room'} has "
                                    f"{len(r.corners)} corners; click at least three"),
                            EDITED_SOURCE)
        outline = tuple(to_plan(p, scale, height_px) for p in r.corners)
        out.append(Room(_room_id(r.label, used), r.label or f"Room {i + 1}", r.use, outline))
    return validated(Plan(name or "Traced plan", tuple(out), rules=RuleChoice(rule_set)))


def underlay(scan: Image.Image, rooms: Sequence[TracedRoom], current: Sequence[XY],
             scale_points: Sequence[XY] = (), fade: float = 0.55) -> Image.Image:
    """The scan faded towards white by ``fade`` with the traced rooms outlined, the room
    being traced as a line with its corners, and the scale's two points."""
    white = Image.new("RGB", scan.size, "white")
    img = Image.blend(scan.convert("RGB"), white, fade)
    draw = ImageDraw.Draw(img)
    r = max(3, round(max(scan.size) / 300))
    for room in rooms:
        draw.polygon(list(room.corners), outline=(43, 99, 166), width=max(2, r // 2))
    if current:
        pts = list(current)
        if len(pts) > 1:
            draw.line(pts, fill=(207, 58, 44), width=max(2, r // 2))
        for x, y in pts:
            draw.ellipse((x - r, y - r, x + r, y + r), fill=(207, 58, 44))
    for x, y in scale_points:
        draw.rectangle((x - r, y - r, x + r, y + r), outline=(31, 122, 140), width=2)
    return img
