"""Shared pieces of the IFC import's pure-shapely steps: report lines, the storey's turn,
room outlines (snapped to 1 mm, near-axis edges made straight), rooms from walls, ids.

No ifcopenshell here: :mod:`roomfit.plan.floor` runs these with
:mod:`roomfit.plan.floor_doors` and :mod:`roomfit.plan.floor_items`.
"""

from __future__ import annotations

import math
import re
import unicodedata
from collections import Counter
from dataclasses import dataclass

from shapely import Polygon, affinity, make_valid, set_precision, union_all
from shapely.geometry.base import BaseGeometry

from roomfit.plan.data import Room
from roomfit.plan.floordata import Frame

__all__ = [
    "SNAP_MM",
    "Note",
    "Placed",
    "main_angle",
    "slug",
    "room_use",
    "clean_outline",
    "rooms_from_walls",
    "plan_unit",
    "make_rooms",
    "largest_polygon",
    "unique_id",
    "turn",
]

#: Coordinates are snapped to this grid (mm).
SNAP_MM = 1

#: Edges within this many millimetres of running along an axis are made exactly straight.
STRAIGHTEN_MM = 6

@dataclass(frozen=True)
class Note:
    """One line of the import report.

    ``kind`` is ``guessed`` (a value the model does not give, chosen by a stated rule),
    ``assumed`` (a reading of the model that may be wrong), ``confirm`` (a value taken from
    the model that a person should check on site), ``skipped`` (an entity left out) or
    ``info``. ``gid`` is the IFC GlobalId ("" when none applies), ``about`` the plan id
    concerned ("" when none).
    """

    kind: str
    gid: str
    text: str
    about: str = ""

    def line(self) -> str:
        gid = self.gid or "-"
        return f"{self.kind:<8} {gid:<22}  {self.text}"


@dataclass(frozen=True)
class Placed:
    """The storey's turn: rotate by ``-angle`` degrees about (0, 0), then shift by ``shift``."""

    angle: float
    shift: tuple[float, float]

    def pt(self, p: tuple[float, float]) -> tuple[float, float]:
        a = math.radians(-self.angle)
        c, s = math.cos(a), math.sin(a)
        return (p[0] * c - p[1] * s + self.shift[0], p[0] * s + p[1] * c + self.shift[1])

    def vec(self, v: tuple[float, float]) -> tuple[float, float]:
        a = math.radians(-self.angle)
        c, s = math.cos(a), math.sin(a)
        return (v[0] * c - v[1] * s, v[0] * s + v[1] * c)

    def poly(self, outline: tuple[tuple[float, float], ...]) -> Polygon:
        return Polygon([self.pt(p) for p in outline])

    def frame(self, f: Frame) -> Frame:
        return Frame(self.pt(f.origin), self.vec(f.x_axis), self.vec(f.y_axis), f.x_range,
                     f.y_range)


def main_angle(outlines: list[tuple[tuple[float, float], ...]]) -> float:
    """The direction (degrees, in [-45, 45)) the longest share of wall edges runs along.

    Each edge votes with its length for its direction modulo 90 degrees, in 0.05-degree
    bins; neighbouring bins are pooled so a direction split across a bin edge still wins.
    Example: a square turned by 10 degrees gives 10.0.
    """
    votes: Counter[int] = Counter()  # bin -> length (mm) voting for it
    sums: dict[int, float] = {}
    for outline in outlines:
        n = len(outline)
        for i in range(n):
            (x0, y0), (x1, y1) = outline[i], outline[(i + 1) % n]
            length = math.hypot(x1 - x0, y1 - y0)
            if length < 50:
                continue
            deg = (math.degrees(math.atan2(y1 - y0, x1 - x0)) + 45) % 90 - 45
            b = round(deg / 0.05)
            votes[b] += round(length)
            sums[b] = sums.get(b, 0.0) + deg * length
    if not votes:
        return 0.0
    best = max(votes, key=lambda b: votes[b] + votes.get(b - 1, 0) + votes.get(b + 1, 0))
    pool = [b for b in (best - 1, best, best + 1) if b in votes]
    angle = sum(sums[b] for b in pool) / sum(votes[b] for b in pool)
    return 0.0 if abs(angle) < 0.02 else round(angle, 3)


def slug(text: str, prefix: str = "") -> str:
    """A plan id from a name: ASCII letters, digits and dashes (``"Küche 1"`` -> ``kuche-1``)."""
    ascii_ = unicodedata.normalize("NFKD", text).encode("ascii", "ignore").decode()
    s = re.sub(r"[^A-Za-z0-9]+", "-", ascii_).strip("-").lower()
    s = f"{prefix}{s}" if s else prefix.rstrip("-") or "x"
    return s if s[0].isalnum() else f"x{s}"


_USES = (("bath", r"bad|bath|wc|toilet|shower|dusch|wasch|lavatory|restroom"),
         ("bedroom", r"schlaf|bed|kinder|child|guest|gast"),
         ("kitchen", r"k(u|ü|ue)che|kitchen|cook|pantry"),
         ("living", r"wohn|living|lounge|sitting|family|dining|ess|galerie|gallery"),
         ("hall", r"flur|diele|hall|corridor|entry|foyer|landing|gang|vestibule"),
         ("study", r"b(u|ü|ue)ro|office|study|arbeit"),
         ("storage", r"abstell|store|storage|closet|utility|laundry|hausarbeit"))


def room_use(*names: str) -> str:
    """A room's use from its names (German and English words; ``"room"`` when none fits)."""
    text = " ".join(names).casefold()
    for use, pattern in _USES:
        if re.search(pattern, text):
            return use
    return "room"


def _straighten(coords: list[list[float]]) -> None:
    """Make edges that run within :data:`STRAIGHTEN_MM` of an axis run exactly along it."""
    n = len(coords)
    for i in range(n):
        a, b = coords[i], coords[(i + 1) % n]
        dx, dy = b[0] - a[0], b[1] - a[1]
        if abs(dx) <= STRAIGHTEN_MM < abs(dy):
            a[0] = b[0] = round((a[0] + b[0]) / 2)
        elif abs(dy) <= STRAIGHTEN_MM < abs(dx):
            a[1] = b[1] = round((a[1] + b[1]) / 2)


def largest_polygon(geom: BaseGeometry) -> Polygon | None:
    """The largest polygon (over 1 mm2) of a polygon or collection, or None."""
    parts = [geom] if isinstance(geom, Polygon) else list(getattr(geom, "geoms", []))
    polys = [p for p in parts if isinstance(p, Polygon) and p.area > 1.0]
    return max(polys, key=lambda p: p.area) if polys else None


def unique_id(base: str, used: set[str]) -> str:
    """``base``, or ``base-2``, ``base-3``... whichever is not in ``used`` yet (then added)."""
    out, i = base, 2
    while out in used or out in ("outside", "entrance"):
        out, i = f"{base}-{i}", i + 1
    used.add(out)
    return out


def clean_outline(geom: BaseGeometry) -> tuple[tuple[int, int], ...] | None:
    """The largest polygon of ``geom`` as a simple outline on the 1 mm grid, or None.

    Near-axis edges are straightened, collinear corners dropped and holes ignored (a room
    is a simple polygon in a plan file). Example: a 4000 x 3000 rectangle off by 2 mm at
    one corner comes back as an exact rectangle.
    """
    big = largest_polygon(geom)
    if big is None:
        return None
    coords: list[list[float]] = [[round(x), round(y)] for x, y in big.exterior.coords[:-1]]
    _straighten(coords)
    shape = Polygon(coords)
    if not shape.is_valid:
        shape = Polygon([(round(x), round(y)) for x, y in big.exterior.coords[:-1]])
    snapped = largest_polygon(set_precision(make_valid(shape).buffer(0).simplify(0.5), SNAP_MM))
    if snapped is None:
        return None
    final = largest_polygon(Polygon(snapped.exterior).simplify(0.5))
    if final is None:
        return None
    out = tuple((int(x), int(y)) for x, y in final.exterior.coords[:-1])
    return out if len(out) >= 3 and Polygon(out).is_valid else None


def rooms_from_walls(walls: list[Polygon], closing: float = 60.0,
                     min_area: float = 1.0e6) -> list[Polygon]:
    """Floor areas enclosed by wall footprints: the holes of their union (mm, mm2).

    Wall ends that do not quite meet are closed by ``closing`` mm first; holes smaller than
    ``min_area`` (1 m2: shafts, wall cavities) are left out. Example: four 100 mm walls
    round a 3 x 4 m room give one 12 m2 room.
    """
    if not walls:
        return []
    body = union_all([w.buffer(0) for w in walls])
    body = body.buffer(closing / 2, join_style="mitre").buffer(-closing / 2, join_style="mitre")
    parts = [body] if body.geom_type == "Polygon" else list(getattr(body, "geoms", []))
    holes = [Polygon(ring) for p in parts if p.geom_type == "Polygon" for ring in p.interiors]
    return sorted((h for h in holes if h.area >= min_area), key=lambda h: -h.area)


def plan_unit(model_unit: str) -> str:
    """The plan file's unit for a model's length unit (metre models are written in mm)."""
    return {"metre": "mm", "millimetre": "mm", "foot": "ft", "inch": "in",
            "centimetre": "cm"}.get(model_unit, "mm")


def make_rooms(spaces: list[tuple[str, str, str, Polygon]], used: set[str],
               notes: list[Note]) -> list[tuple[Room, str]]:
    """Rooms from (gid, name, long name, polygon); overlaps go to the room listed first."""
    out: list[tuple[Room, str]] = []
    taken: list[Polygon] = []
    for gid, name, long_name, poly in spaces:
        shape: BaseGeometry = poly
        for other in taken:
            if shape.intersection(other).area > 1.0:
                shape = shape.difference(other)
                notes.append(Note("assumed", gid, f"space {long_name or name!r} overlaps an "
                                  "earlier space; the overlap is left to the earlier one"))
        outline = clean_outline(shape)
        if outline is None:
            notes.append(Note("skipped", gid, f"space {long_name or name!r}: no usable floor "
                              "outline"))
            continue
        label = long_name or name or gid
        rid = unique_id(slug(long_name or name or "room"), used)
        out.append((Room(rid, label, room_use(long_name, name), outline), gid))
        taken.append(Polygon(outline))
    return out


def turn(angle: float, polys: list[Polygon]) -> Placed:
    """The storey's turn: rotate by -angle, then shift the union's lower-left corner to 0, 0."""
    if not polys:
        return Placed(angle, (0.0, 0.0))
    turned = affinity.rotate(union_all(polys), -angle, origin=(0, 0))
    x0, y0, _, _ = turned.bounds
    return Placed(angle, (-x0, -y0))
