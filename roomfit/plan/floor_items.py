"""Windows, fittings and furniture of an imported floor (pure shapely; see ``floor.py``).

Windows are put on the nearest wall of the room on their inner side; windows that touch or
overlap on one wall (a window assembly split into parts, a mullion between two casements)
are merged into one, reported. Fittings take their kind from the IFC class and the names;
furniture becomes pieces placed as they stand, catalogue types where the name makes the
type clear, custom pieces otherwise.
"""

from __future__ import annotations

import math
import re
from dataclasses import dataclass

from shapely import Polygon

from roomfit.plan.data import Fixture, Piece, Placement, Room, Window
from roomfit.plan.floor_base import Note, clean_outline, unique_id
from roomfit.plan.floor_doors import side_rooms, spot_on_edge
from roomfit.plan.floordata import Frame

__all__ = ["WindowIn", "ThingIn", "MERGE_GAP_MM", "make_windows", "fitting_kind",
           "catalogue_type", "make_things"]

#: Window openings on one wall closer than this (mm) are merged into one window.
MERGE_GAP_MM = 100


@dataclass(frozen=True)
class WindowIn:
    gid: str
    name: str
    frame: Frame
    overall_width: float
    sill: float
    wall: float


@dataclass(frozen=True)
class ThingIn:
    gid: str
    ifc_class: str
    name: str
    type_name: str
    outline: Polygon
    height: float
    frame: Frame


def make_windows(wins: list[WindowIn], rooms: dict[str, Room], polys: dict[str, Polygon],
                 notes: list[Note]) -> list[Window]:
    """Plan windows: one per run of touching openings on one wall of one room."""
    spans: dict[tuple[str, int], list[tuple[float, float, float, str, str]]] = {}
    for w in wins:
        c = w.frame.centre
        minus, plus = side_rooms(c, w.frame.y_axis, w.wall / 2, polys)
        room = minus or plus
        if room is None:
            notes.append(Note("skipped", w.gid, f"window {w.name!r}: no imported room beside it"))
            continue
        if minus and plus and minus != plus:
            notes.append(Note("assumed", w.gid, f"window {w.name!r} between rooms {minus!r} and "
                              f"{plus!r}: kept on {minus!r}"))
        outline = rooms[room].outline
        at, width, edge_i, dist = spot_on_edge(outline, c, w.overall_width)
        if dist > 600 or width < 100:
            notes.append(Note("skipped", w.gid, f"window {w.name!r}: not on a wall of {room!r}"))
            continue
        a, b = outline[edge_i], outline[(edge_i + 1) % len(outline)]
        length = math.dist(a, b)
        t = ((at[0] - a[0]) * (b[0] - a[0]) + (at[1] - a[1]) * (b[1] - a[1])) / length
        spans.setdefault((room, edge_i), []).append((t - width / 2, t + width / 2,
                                                     max(w.sill, 0.0), w.gid, w.name))
        if w.sill < 0:
            notes.append(Note("assumed", w.gid, f"window {w.name!r}: sill below the floor; "
                              "taken as 0"))
    out: list[Window] = []
    for (room, edge_i), items in sorted(spans.items()):
        items.sort()
        runs: list[list[tuple[float, float, float, str, str]]] = []
        for it in items:
            if runs and it[0] <= max(x[1] for x in runs[-1]) + MERGE_GAP_MM:
                runs[-1].append(it)
            else:
                runs.append([it])
        outline = rooms[room].outline
        a, b = outline[edge_i], outline[(edge_i + 1) % len(outline)]
        length = math.dist(a, b)
        for run in runs:
            lo, hi = max(min(x[0] for x in run), 0.0), min(max(x[1] for x in run), length)
            t = (lo + hi) / 2
            at = (round(a[0] + (b[0] - a[0]) * t / length), round(a[1] + (b[1] - a[1]) * t / length))
            at = _on_axis_edge(at, a, b)
            wid = f"w-{room}-{len([x for x in out if x.room == room]) + 1}"
            sill = round(min(x[2] for x in run))
            out.append(Window(wid, room, at, int(math.floor(hi - lo)), sill))
            if len(run) > 1:
                notes.append(Note("assumed", run[0][3], f"window {wid}: {len(run)} windows side by "
                                  f"side on one wall merged into one ({', '.join(x[3] for x in run)})"
                                  f"; lowest sill {sill} mm", wid))
    return out


def _on_axis_edge(at: tuple[int, int], a: tuple[int, int], b: tuple[int, int]) -> tuple[int, int]:
    if a[0] == b[0]:
        return (a[0], at[1])
    if a[1] == b[1]:
        return (at[0], a[1])
    return at


_KINDS = (("wc", r"\bwc\b|toilet|water closet|closet bowl|klosett"),
          ("basin", r"basin|lavatory|waschbecken|waschtisch|\bsink\b"),
          ("bath", r"bath ?tub|\bbath\b|badewanne|wanne"),
          ("shower", r"shower|dusche"),
          ("kitchen_run", r"kitchen|k(u|ü|ue)che|counter|worktop|base cabinet|herd|stove|cooker"),
          ("radiator", r"radiator|heizk(o|ö|oe)rper"),
          ("column", r"column|st(u|ü|ue)tze|pillar"))


def fitting_kind(ifc_class: str, *names: str) -> str | None:
    """A fitting's kind from its class and names, or None when it is not a fitting we keep."""
    text = " ".join(names).casefold()
    if ifc_class == "IfcColumn":
        return "column"
    for kind, pattern in _KINDS:
        if re.search(pattern, text):
            return kind
    return None


_TYPES = ((r"\bbed\b|bett", None), (r"sofa|couch", None), (r"armchair|sessel", "armchair"),
          (r"wardrobe|kleiderschrank|closet", "wardrobe-hinged"), (r"desk|schreibtisch", "desk"),
          (r"nightstand|night stand|bedside|nachttisch", "nightstand"),
          (r"bookcase|book shelf|bookshelf|regal", "bookcase"),
          (r"chest of drawers|kommode|dresser", "chest-of-drawers"),
          (r"dining table|esstisch|\btable\b|\btisch\b", "dining-table-4"),
          (r"sideboard", "sideboard"), (r"tv", "tv-unit"))


def catalogue_type(width: float, *names: str) -> str | None:
    """The catalogue type a furniture element's names make clear, or None (a custom piece)."""
    text = " ".join(names).casefold()
    for pattern, t in _TYPES:
        if re.search(pattern, text):
            if t is not None:
                return t
            if "sofa" in pattern:
                return "sofa-2" if width < 1800 else "sofa-3"
            return ("bed-single-90" if width < 1200 else
                    min(("bed-double-140", 1400), ("bed-double-160", 1600), ("bed-double-180", 1800),
                        key=lambda x: abs(x[1] - width))[0])
    return None


def _room_of(shape: Polygon, rooms: dict[str, Room], polys: dict[str, Polygon]) -> str | None:
    best = max(polys, key=lambda r: polys[r].intersection(shape).area, default=None)
    if best is None or polys[best].intersection(shape).area < 0.5 * shape.area:
        return None
    return best


def make_things(things: list[ThingIn], rooms: dict[str, Room], polys: dict[str, Polygon],
                used: set[str], notes: list[Note]) -> tuple[list[Fixture], list[Piece]]:
    """Fittings (with their kinds) and furniture pieces placed as they stand."""
    fixtures: list[Fixture] = []
    pieces: list[Piece] = []
    for t in things:
        room = _room_of(t.outline, rooms, polys)
        label = t.name or t.type_name or t.ifc_class
        if room is None:
            notes.append(Note("skipped", t.gid, f"{t.ifc_class} {label!r}: not inside an imported "
                              "room (in a wall, outside, or in a room left out)"))
            continue
        kind = fitting_kind(t.ifc_class, t.name, t.type_name)
        furniture = t.ifc_class in ("IfcFurnishingElement", "IfcFurniture",
                                    "IfcSystemFurnitureElement") and kind not in ("kitchen_run",)
        if furniture:
            piece = _piece(t, room, used, notes)
            if piece is not None:
                pieces.append(piece)
            continue
        if kind is None:
            notes.append(Note("skipped", t.gid, f"{t.ifc_class} {label!r}: not a fitting of a "
                              "known kind (WC, basin, bath, shower, kitchen, radiator, column)"))
            continue
        shape = t.outline.minimum_rotated_rectangle.intersection(polys[room])
        outline = clean_outline(shape)
        if outline is None:
            notes.append(Note("skipped", t.gid, f"{label!r}: no usable footprint"))
            continue
        fid = unique_id(kind.replace("_", "-"), used)
        fixtures.append(Fixture(fid, room, kind, label[:60], outline, max(round(t.height), 1)))
        notes.append(Note("assumed", t.gid, f"fitting {fid}: kind {kind!r} from its class and name "
                          f"{label!r}; no use zone (add one by hand)", fid))
    return fixtures, pieces


def _piece(t: ThingIn, room: str, used: set[str], notes: list[Note]) -> Piece | None:
    f = t.frame
    width = round(f.x_range[1] - f.x_range[0])
    depth = round(f.y_range[1] - f.y_range[0])
    if width <= 0 or depth <= 0:
        notes.append(Note("skipped", t.gid, f"furniture {t.name!r}: no size"))
        return None
    angle = math.degrees(math.atan2(f.x_axis[1], f.x_axis[0])) % 360
    rotation = int(round(angle / 90.0)) % 4 * 90
    x0, y0, _, _ = t.outline.bounds
    pid = unique_id(f"p-{re.sub(r'[^a-z0-9]+', '-', (t.name or 'piece').casefold()).strip('-')}",
                     used)
    ctype = catalogue_type(width, t.name, t.type_name)
    label = (t.name or t.type_name or "piece")[:60]
    notes.append(Note("assumed", t.gid, f"piece {pid}: {ctype or 'custom'} "
                      f"{width} x {depth} mm placed as it stands; its front taken as its local +y "
                      "side", pid))
    if abs((angle - rotation + 180) % 360 - 180) > 1.0:
        notes.append(Note("assumed", t.gid, f"piece {pid}: turned {angle:.1f} degrees, placed at "
                          f"{rotation}", pid))
    return Piece(pid, ctype or "custom", (room,), label, width, depth, max(round(t.height), 1),
                 Placement(round(x0), round(y0), rotation, room))
