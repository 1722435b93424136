"""Doors of an imported floor: rooms joined, swing room, hinge side, open links, entrance.

ISO 16739 (IfcDoorTypeOperationEnum; IfcDoorStyleOperationEnum in IFC2x3): a leaf opens
towards the door's local +y, and a ``SINGLE_SWING_LEFT`` door has its hinges on the left as
seen looking along local +y, i.e. on the local -x jamb (``SINGLE_SWING_RIGHT``: +x jamb).
The hinge is computed as a point of the door's frame turned into plan coordinates, so a
mirrored placement carries its mirror into the result without a special case.

A plan file names the hinge side as seen standing in the room the door swings into, facing
the door (``docs/plan-format.md``): :func:`hinge_side` converts.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from shapely import LineString, Point, Polygon
from shapely.geometry.base import BaseGeometry

from roomfit.plan.data import OUTSIDE, Door, Leaf, Room
from roomfit.plan.floor_base import Note
from roomfit.plan.floordata import Frame

__all__ = [
    "SWING_OPS",
    "hinge_side",
    "side_rooms",
    "door_leaf_from_operation",
    "spot_on_edge",
    "spot_between",
    "DoorIn",
    "make_door",
    "open_links",
    "stair_arrival",
]

#: Operation types with one hinged leaf whose hinge side the type states.
SWING_OPS = {"SINGLE_SWING_LEFT": "left", "SINGLE_SWING_RIGHT": "right",
             "SWING_FIXED_LEFT": "left", "SWING_FIXED_RIGHT": "right"}

#: How far (mm) beyond the wall's faces the rooms on either side of an opening are sought.
PROBE_MM = (60, 150, 300, 450, 650)


def hinge_side(hinge: tuple[float, float], centre: tuple[float, float],
               swing_dir: tuple[float, float]) -> str:
    """``left`` or ``right``: the hinge as seen from the swing room, facing the door.

    A person in the swing room faces against ``swing_dir``; their left hand points along
    ``swing_dir`` turned 90 degrees clockwise. Example (the plan-format docs' own): a door in
    a bedroom's south wall swinging north into it, hinge to the east -> ``left``.

    >>> hinge_side((450, 0), (0, 0), (0, 1))
    'left'
    """
    left = (swing_dir[1], -swing_dir[0])
    d = (hinge[0] - centre[0]) * left[0] + (hinge[1] - centre[1]) * left[1]
    return "left" if d > 0 else "right"


def side_rooms(centre: tuple[float, float], normal: tuple[float, float], half_depth: float,
               rooms: dict[str, Polygon]) -> tuple[str | None, str | None]:
    """The rooms on the -normal and +normal sides of an opening (None: no room there)."""
    out: list[str | None] = []
    for sign in (-1, 1):
        found = None
        for k in PROBE_MM:
            p = Point(centre[0] + sign * normal[0] * (half_depth + k),
                      centre[1] + sign * normal[1] * (half_depth + k))
            found = next((rid for rid, poly in rooms.items() if poly.contains(p)), None)
            if found:
                break
        out.append(found)
    return out[0], out[1]


def door_leaf_from_operation(op: str, name: str) -> tuple[Leaf, str | None, str]:
    """Leaf kind, the operation's hinge side (local, or None) and why, for an operation type.

    The third item is empty when the type states everything; otherwise it is the reason a
    person must check (double, sliding, folding, undefined...).
    """
    if op in SWING_OPS:
        return Leaf.HINGED, SWING_OPS[op], ""
    if "SLIDING" in op:
        return Leaf.SLIDING, None, f"operation {op}: drawn as a sliding leaf (the side it " \
                                   "slides to is not kept)"
    if op.startswith("DOUBLE_DOOR") or op.startswith("DOUBLE_SWING") or "FOLDING" in op:
        return Leaf.HINGED, "left", f"operation {op}: drawn as one leaf as wide as the opening " \
                                    "(conservative), swinging to the door's +y side, hinge guessed"
    if op in ("REVOLVING", "ROLLINGUP"):
        return Leaf.NONE, None, f"operation {op}: drawn as an open doorway"
    low = name.casefold()
    if any(w in low for w in ("slid", "schieb", "pocket")):
        return Leaf.SLIDING, None, f"operation {op}: sliding guessed from the name {name!r}"
    if any(w in low for w in ("overhead", "sectional", "garage", "roll", "tor")):
        return Leaf.NONE, None, f"operation {op}: open doorway guessed from the name {name!r}"
    return Leaf.HINGED, "left", f"operation {op}: a single hinged leaf guessed, swinging to the " \
                                "door's +y side with its hinge on the -x jamb"


def spot_on_edge(outline: tuple[tuple[int, int], ...], centre: tuple[float, float], width: float,
                 reach: tuple[float, float] | None = None) -> tuple[tuple[int, int], int, int, float]:
    """Centre (on the edge), width and edge index of an opening moved onto the room's nearest
    edge, kept within that edge (and within ``reach``, a span along it); plus its distance.

    The width shrinks when the edge is shorter than the opening.
    """
    n = len(outline)
    best = min(range(n), key=lambda i: LineString([outline[i], outline[(i + 1) % n]])
               .distance(Point(centre)))
    a, b = outline[best], outline[(best + 1) % n]
    edge = LineString([a, b])
    dist = edge.distance(Point(centre))
    length = edge.length
    lo, hi = 0.0, length
    if reach is not None:
        lo, hi = max(lo, reach[0]), min(hi, reach[1])
    w = min(width, max(hi - lo, 0.0))
    t = edge.project(Point(centre))
    t = min(max(t, lo + w / 2), hi - w / 2)
    ux, uy = (b[0] - a[0]) / length, (b[1] - a[1]) / length
    at = (round(a[0] + ux * t), round(a[1] + uy * t))
    if abs(ux) < 1e-9 or abs(uy) < 1e-9:  # an axis edge: keep the point exactly on it
        at = (a[0], at[1]) if abs(ux) < 1e-9 else (at[0], a[1])
    return at, int(math.floor(w)), best, dist


def _reach(host: tuple[tuple[int, int], ...], edge_i: int, other: Polygon,
           across: float | None = None) -> tuple[float, float]:
    """The span along the host's edge ``edge_i`` whose crossing lands on the other room.

    As the plan reader checks it: a point of the opening carried straight across the wall
    by ``across`` mm (the wall's thickness at the opening's centre, plus 5 mm; None: each
    point's own distance to the other room) must land within 5 mm of the other room.
    """
    a, b = host[edge_i], host[(edge_i + 1) % len(host)]
    edge = LineString([a, b])
    length = edge.length
    ux, uy = (b[0] - a[0]) / length, (b[1] - a[1]) / length
    n = (-uy, ux)
    mid = (a[0] + ux * length / 2, a[1] + uy * length / 2)
    if Polygon(host).contains(Point(mid[0] + n[0] * 5, mid[1] + n[1] * 5)):
        n = (uy, -ux)  # point away from the host room
    near = other.buffer(5)
    inside = []
    for t in _steps(0.0, length):
        p = (a[0] + ux * t, a[1] + uy * t)
        step = across if across is not None else other.distance(Point(p)) + 5
        if step <= 600 + 5 and near.contains(Point(p[0] + n[0] * step, p[1] + n[1] * step)):
            inside.append(t)
    return (min(inside), max(inside)) if inside else (0.0, 0.0)


def spot_between(host: tuple[tuple[int, int], ...], centre: tuple[float, float], width: float,
                 other: Polygon) -> tuple[tuple[int, int], int, int, float]:
    """:func:`spot_on_edge` for an opening that must lead into ``other`` across one wall.

    Two passes: the span is first found with each point's own distance across, then
    checked again with the distance at the opening's centre, as the plan reader does.
    """
    _, _, edge_i, _ = spot_on_edge(host, centre, width)
    spot = spot_on_edge(host, centre, width, _reach(host, edge_i, other))
    across = other.distance(Point(spot[0])) + 5
    return spot_on_edge(host, centre, width, _reach(host, edge_i, other, across))


def _steps(lo: float, hi: float, step: float = 10.0) -> list[float]:
    k = max(int((hi - lo) // step), 1)
    return [lo + (hi - lo) * i / k for i in range(k + 1)]


@dataclass(frozen=True)
class DoorIn:
    """A door as read: plan-coordinate frame, names, width, lining, operation, wall depth."""

    gid: str
    name: str
    frame: Frame
    overall_width: float
    operation: str
    lining: float | None
    wall: float
    mirrored_x: bool = False
    mirrored_y: bool = False


def make_door(d: DoorIn, did: str, rooms: dict[str, Room], polys: dict[str, Polygon],
              notes: list[Note]) -> Door | None:
    """One plan door from an IFC door, with its report lines; None (reported) when skipped."""
    f = d.frame
    centre = f.centre
    minus, plus = side_rooms(centre, f.y_axis, d.wall / 2, polys)
    if d.mirrored_y:  # the body is drawn mirrored across local x: it opens towards local -y
        minus, plus = plus, minus
    if minus is None and plus is None:
        notes.append(Note("skipped", d.gid, f"door {d.name!r}: no imported room on either side"))
        return None
    if minus == plus:
        notes.append(Note("skipped", d.gid, f"door {d.name!r}: the same room on both sides"))
        return None
    host = minus if minus is not None else plus
    other = plus if host == minus else minus
    assert host is not None
    clear = d.overall_width - 2 * d.lining if d.lining else d.overall_width
    hint = (f"overall {d.overall_width:.0f} mm less 2 x {d.lining:.0f} mm lining" if d.lining
            else f"overall width {d.overall_width:.0f} mm (the model gives no lining)")
    if other is not None:
        at, width, _, dist = spot_between(rooms[host].outline, centre, clear, polys[other])
    else:
        at, width, _, dist = spot_on_edge(rooms[host].outline, centre, clear)
    if width < 300:
        notes.append(Note("skipped", d.gid, f"door {d.name!r}: no stretch of wall of "
                          f"{rooms[host].id!r} holds its opening"))
        return None
    notes.append(Note("confirm", d.gid, f"door {did}: clear width {width} mm from the {hint}",
                      did))
    if width < math.floor(clear) - 1:
        notes.append(Note("assumed", d.gid, f"door {did}: narrowed from {clear:.0f} to {width} mm "
                          "to fit its wall", did))
    leaf, side, why = door_leaf_from_operation(d.operation, d.name)
    swings, hinge = None, None
    if leaf == Leaf.HINGED:
        u = f.x_range[0] if (side == "left") != d.mirrored_x else f.x_range[1]
        hinge_pt = f.point(u, sum(f.y_range) / 2)
        swings = plus if plus is not None else OUTSIDE
        opens = (-f.y_axis[0], -f.y_axis[1]) if d.mirrored_y else f.y_axis
        hinge = hinge_side(hinge_pt, centre, opens)
        if d.mirrored_x or d.mirrored_y:
            notes.append(Note("info", d.gid, f"door {did}: its body is drawn mirrored; hinge and "
                              "swing follow the mirror", did))
    if why:
        notes.append(Note("guessed", d.gid, f"door {did}: {why}", did))
    elif dist > 400:
        notes.append(Note("assumed", d.gid, f"door {did}: {dist:.0f} mm from the wall of "
                          f"{rooms[host].id!r}; moved onto it", did))
    pair = (host, other if other is not None else OUTSIDE)
    return Door(did, pair, at, width, leaf, swings, hinge)


def open_links(rooms: list[Room], polys: dict[str, Polygon], walls: BaseGeometry | None,
               notes: list[Note], gids: dict[str, str], gap: float = 150.0) -> list[Door]:
    """Open doorways (leaf ``none``) where two spaces meet with no wall between them.

    Two rooms are linked where their outlines run within ``gap`` mm of each other for at
    least 600 mm and walls cover under a fifth of the strip between them. Without any wall
    in the model nothing is linked (touching rooms could be separated by walls not drawn).
    """
    out: list[Door] = []
    if walls is None or walls.is_empty:
        return out
    for i, a in enumerate(rooms):
        for b in rooms[i + 1:]:
            pa, pb = polys[a.id], polys[b.id]
            if pa.distance(pb) > gap:
                continue
            strip = pa.buffer(gap / 2 + 1).intersection(pb.buffer(gap / 2 + 1))
            if strip.is_empty or walls.intersection(strip).area > 0.2 * strip.area:
                continue
            line = pa.exterior.intersection(pb.buffer(gap + 1))
            pieces = [g for g in getattr(line, "geoms", [line]) if g.geom_type == "LineString"]
            if not pieces:
                continue
            piece = max(pieces, key=lambda g: g.length)
            if piece.length < 600:
                continue
            mid = piece.interpolate(0.5, normalized=True)
            at, width, _, _ = spot_between(a.outline, (mid.x, mid.y), piece.length - 20, pb)
            if width < 600:
                continue
            did = f"open-{a.id}-{b.id}"
            out.append(Door(did, (a.id, b.id), at, width, Leaf.NONE))
            notes.append(Note("assumed", f"{gids.get(a.id, '')}", f"open link {did}: spaces "
                              f"{a.label!r} and {b.label!r} meet over {width} mm with no wall "
                              "between", did))
    return out


def stair_arrival(gid: str, stair: Polygon, rooms: list[Room], polys: dict[str, Polygon],
                  notes: list[Note], width: int = 800) -> Door | None:
    """A flagged arrival from the storey below: an open doorway to ``outside`` on the wall
    of the room over the stair that lies nearest the stair."""
    if not rooms:
        return None
    room = max(rooms, key=lambda r: (polys[r.id].intersection(stair).area,
                                     -polys[r.id].distance(stair)))
    c = stair.centroid
    at, w, _, _ = spot_on_edge(room.outline, (c.x, c.y), width)
    if w < 300:
        return None
    notes.append(Note("assumed", gid, f"stair arrival stair-arrival: the stair from the storey "
                      f"below reaches room {room.id!r}; drawn as a {w} mm opening to 'outside' on "
                      "its wall nearest the stair (where the stair lands is not read)",
                      "stair-arrival"))
    return Door("stair-arrival", (room.id, OUTSIDE), at, w, Leaf.NONE)
