"""Shapely geometry derived from the data model: rooms, pieces, use zones, door swings.

Everything here is a pure function of frozen plan data. Lengths in mm, plan coordinates
(y up). The checker, the solver, the route scorer and the drawings all take their shapes from
these functions, so that they agree on what a door swing or a use zone is.

Worked example, checked by hand: a 900 mm hinged door sweeps a quarter disc of radius 900,
area pi * 900**2 / 4 = 636 173 mm2 (our polygon approximates the arc with 64 segments).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

from shapely import Polygon, box
from shapely.geometry import LineString, Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.plan.data import OUTSIDE, Door, Fixture, Leaf, Placement, Plan, Room, Window
from roomfit.rules.catalog import PieceSpec, ZoneReq
from roomfit.rules.sets import RuleSet

__all__ = [
    "ARC_SEGMENTS",
    "DoorShape",
    "polygon",
    "room_polygon",
    "room_polygons",
    "nearest_edge",
    "turned_size",
    "side_direction",
    "footprint",
    "footprint_box",
    "lies_flat",
    "zone_polygon",
    "use_zones",
    "wall_direction",
    "door_leaf",
    "door_shape",
    "door_shapes",
    "window_segment",
    "window_band",
    "fixture_polygon",
    "fixture_zone",
    "free_floor",
]

#: Segments used to draw a quarter circle (door swing arcs).
ARC_SEGMENTS = 64

_LOCAL_DIRECTION = {"front": (0, 1), "back": (0, -1), "left": (-1, 0), "right": (1, 0)}


def polygon(points: tuple[tuple[int, int], ...]) -> Polygon:
    """A shapely polygon from integer vertices (the closing vertex is implied)."""
    return Polygon(points)


def room_polygon(room: Room) -> Polygon:
    return Polygon(room.outline)


def room_polygons(plan: Plan) -> dict[str, Polygon]:
    return {r.id: Polygon(r.outline) for r in plan.rooms}


def nearest_edge(outline: tuple[tuple[int, int], ...], point: tuple[int, int]) -> tuple[int, float]:
    """Index of the outline edge nearest ``point`` and the distance to it (mm).

    Edge ``i`` runs from vertex ``i`` to vertex ``i + 1`` (wrapping).
    """
    p = Point(point)
    best = (0, math.inf)
    n = len(outline)
    for i in range(n):
        d = LineString([outline[i], outline[(i + 1) % n]]).distance(p)
        if d < best[1]:
            best = (i, d)
    return best


def turned_size(width: int, depth: int, rotation: int) -> tuple[int, int]:
    """Footprint size along x and y after turning by ``rotation`` degrees."""
    return (width, depth) if rotation in (0, 180) else (depth, width)


def side_direction(side: str, rotation: int) -> tuple[int, int]:
    """Outward unit vector of a piece's ``side`` after turning it by ``rotation`` (CCW).

    >>> side_direction("front", 0), side_direction("front", 90), side_direction("left", 180)
    ((0, 1), (-1, 0), (1, 0))
    """
    dx, dy = _LOCAL_DIRECTION[side]
    for _ in range(rotation // 90):
        dx, dy = -dy, dx
    return dx, dy


def footprint_box(spec: PieceSpec, placement: Placement) -> tuple[int, int, int, int]:
    """``(x0, y0, x1, y1)`` of a placed piece's footprint."""
    w, d = turned_size(spec.width, spec.depth, placement.rotation)
    return placement.x, placement.y, placement.x + w, placement.y + d


def lies_flat(spec: PieceSpec) -> bool:
    """True for a piece of height 0 (a rug): other pieces may stand on it and people walk
    over it, so it is no obstacle; it must still lie inside its room."""
    return spec.height == 0


def footprint(spec: PieceSpec, placement: Placement) -> Polygon:
    return box(*footprint_box(spec, placement))


def zone_polygon(spec: PieceSpec, placement: Placement, zone: ZoneReq) -> Polygon:
    """The use zone on ``zone.side``: ``zone.depth`` out from that side, along all of it but
    ``zone.inset`` at the piece's back end (a bed's head, where nightstands stand)."""
    x0, y0, x1, y1 = footprint_box(spec, placement)
    dx, dy = side_direction(zone.side, placement.rotation)
    bx, by = side_direction("back", placement.rotation)
    t, cut = zone.depth, zone.inset
    if dx != 0:  # zone beside a vertical side: trim along y at the back end
        ya, yb = (y0 + cut, y1) if by == -1 else (y0, y1 - cut) if by == 1 else (y0, y1)
        return box(x1, ya, x1 + t, yb) if dx == 1 else box(x0 - t, ya, x0, yb)
    xa, xb = (x0 + cut, x1) if bx == -1 else (x0, x1 - cut) if bx == 1 else (x0, x1)
    return box(xa, y1, xb, y1 + t) if dy == 1 else box(xa, y0 - t, xb, y0)


def use_zones(spec: PieceSpec, placement: Placement) -> list[tuple[ZoneReq, Polygon]]:
    """Every use zone of a placed piece with its polygon (zones of depth 0 are skipped)."""
    return [(z, zone_polygon(spec, placement, z)) for z in spec.zones if z.depth > 0]


@dataclass(frozen=True)
class DoorShape:
    """A door's derived geometry.

    ``opening``: the clear opening on the wall of ``door.rooms[0]``; ``inward``: room id ->
    unit normal pointing into that room; ``swing``: the floor the leaf sweeps (None for
    sliding leaves, doorways, and leaves swinging outside); ``approach``: room id -> the clear
    floor kept in front of the door in that room (swing included), clipped to the room;
    ``asked``: room id -> the rectangle of clear floor the rule set asks for there, not
    clipped (drawn from the wall line of ``door.rooms[0]``), so the audit can tell when walls
    cut it short.
    """

    door: Door
    opening: LineString
    inward: dict[str, tuple[float, float]]
    swing: Polygon | None
    approach: dict[str, BaseGeometry]
    asked: dict[str, Polygon] = field(default_factory=dict)


def _inward_normal(poly: Polygon, at: tuple[float, float], u: tuple[float, float]) -> tuple[float, float]:
    n = (-u[1], u[0])
    probe = Point(at[0] + n[0] * 5, at[1] + n[1] * 5)
    return n if poly.contains(probe) else (-n[0], -n[1])


def _quarter_disc(hinge: tuple[float, float], closed_dir: tuple[float, float],
                  open_dir: tuple[float, float], radius: float) -> Polygon:
    a0 = math.atan2(closed_dir[1], closed_dir[0])
    a1 = math.atan2(open_dir[1], open_dir[0])
    sweep = (a1 - a0 + math.pi) % (2 * math.pi) - math.pi  # +-pi/2
    pts = [hinge]
    for k in range(ARC_SEGMENTS + 1):
        a = a0 + sweep * k / ARC_SEGMENTS
        pts.append((hinge[0] + radius * math.cos(a), hinge[1] + radius * math.sin(a)))
    return Polygon(pts)


def _rect_from(at: tuple[float, float], u: tuple[float, float], n: tuple[float, float],
               left: float, right: float, depth: float) -> Polygon:
    """Rectangle from the wall at ``at`` spanning ``-left..right`` along ``u``, ``depth`` along n."""
    a = (at[0] - u[0] * left, at[1] - u[1] * left)
    b = (at[0] + u[0] * right, at[1] + u[1] * right)
    return Polygon([a, b, (b[0] + n[0] * depth, b[1] + n[1] * depth),
                    (a[0] + n[0] * depth, a[1] + n[1] * depth)])


def wall_direction(outline: tuple[tuple[int, int], ...], point: tuple[int, int]) -> tuple[float, float]:
    """Unit vector along the outline edge nearest ``point``, in the outline's vertex order.

    >>> wall_direction(((0, 0), (4000, 0), (4000, 3000), (0, 3000)), (2000, 0))
    (1.0, 0.0)
    """
    i, _ = nearest_edge(outline, point)
    (x0, y0), (x1, y1) = outline[i], outline[(i + 1) % len(outline)]
    length = math.hypot(x1 - x0, y1 - y0)
    return ((x1 - x0) / length, (y1 - y0) / length)


def _door_frame(plan: Plan, door: Door) -> tuple[tuple[float, float], tuple[float, float],
                                                  tuple[float, float]]:
    """Centre of the opening, unit vector along its wall and unit normal into ``rooms[0]``."""
    host = plan.room(door.rooms[0])
    u = wall_direction(host.outline, door.at)
    at = (float(door.at[0]), float(door.at[1]))
    return at, u, _inward_normal(Polygon(host.outline), at, u)


def _hinge(door: Door, at: tuple[float, float],
           n: tuple[float, float]) -> tuple[tuple[float, float], tuple[float, float]]:
    """Hinge point and the closed leaf's direction from it, for a leaf swinging along ``n``.

    ``door.hinge`` is seen standing on the swing side facing the door (facing ``-n``).
    """
    half = door.width / 2
    f = (-n[0], -n[1])  # facing the door from the side it swings into
    left = (-f[1], f[0])
    sign = 1 if door.hinge == "left" else -1
    hinge = (at[0] + sign * left[0] * half, at[1] + sign * left[1] * half)
    return hinge, (-sign * left[0], -sign * left[1])


def door_leaf(plan: Plan, door: Door) -> tuple[tuple[float, float],
                                               tuple[tuple[float, float], ...]] | None:
    """Hinge point and the arc the free edge of a hinged leaf sweeps, closed to open (90 deg).

    Unlike :func:`door_shape` this works on whichever side the leaf swings, outside
    included (drawings and exports show every leaf). ``Polygon([hinge, *arc])`` is the swept
    quarter disc. None for sliding leaves and doorways.

    >>> p = Plan("t", (Room("r", "R", "hall", ((0, 0), (2000, 0), (2000, 2000), (0, 2000))),),
    ...          (Door("d", ("r", OUTSIDE), (1000, 0), 900, Leaf.HINGED, "r", "left"),))
    >>> hinge, arc = door_leaf(p, p.doors[0])
    >>> hinge, [tuple(round(c) for c in arc[k]) for k in (0, -1)]  # facing south, left is east
    ((1450.0, 0.0), [(550, 0), (1450, 900)])
    """
    if door.leaf != Leaf.HINGED:
        return None
    at, _, n0 = _door_frame(plan, door)
    n = n0 if door.swings_into == door.rooms[0] else (-n0[0], -n0[1])
    hinge, closed = _hinge(door, at, n)
    disc = _quarter_disc(hinge, closed, n, door.width)
    return hinge, tuple((x, y) for x, y in disc.exterior.coords[1:-1])


def door_shape(plan: Plan, door: Door, rules: RuleSet) -> DoorShape:
    """Opening, swing sector and approach floor of ``door`` under ``rules``.

    The leaf is taken as wide as the clear opening (conservative). On the side the leaf swings
    into, the approach floor is ``door.approach_swing`` deep (at least the leaf width) and
    reaches ``door.approach_latch`` beyond the latch jamb; on the other side it is
    ``door.approach_other`` deep. Sliding leaves and doorways use ``door.approach_other`` on
    both sides (2010 ADA Table 404.2.4.2 asks the same depth on both sides of a sliding door).
    """
    at, u, n0 = _door_frame(plan, door)
    half = door.width / 2
    opening = LineString([(at[0] - u[0] * half, at[1] - u[1] * half),
                          (at[0] + u[0] * half, at[1] + u[1] * half)])
    inward = {door.rooms[0]: n0}
    if door.rooms[1] != OUTSIDE:
        inward[door.rooms[1]] = (-n0[0], -n0[1])
    swing = None
    approach: dict[str, BaseGeometry] = {}
    asked: dict[str, Polygon] = {}
    other_depth = rules.mm("door.approach_other")
    for rid, n in inward.items():
        if door.leaf == Leaf.HINGED and door.swings_into == rid:
            hinge, closed = _hinge(door, at, n)
            swing = _quarter_disc(hinge, closed, n, door.width)
            depth = max(rules.mm("door.approach_swing"), door.width)
            latch = rules.mm("door.approach_latch")
            # the latch jamb lies opposite the hinge: towards `closed` from the hinge
            along_latch = closed
            sgn = 1 if (along_latch[0] * u[0] + along_latch[1] * u[1]) > 0 else -1
            lo, hi = (half, half + latch) if sgn > 0 else (half + latch, half)
            asked[rid] = _rect_from(at, u, n, lo, hi, depth)
            zone = asked[rid].union(swing)
        else:
            if other_depth == 0:
                continue
            zone = asked[rid] = _rect_from(at, u, n, half, half, other_depth)
        approach[rid] = zone.intersection(room_polygon(plan.room(rid)))  # its own rooms only
    return DoorShape(door, opening, inward, swing, approach, asked)


def door_shapes(plan: Plan, rules: RuleSet) -> list[DoorShape]:
    return [door_shape(plan, d, rules) for d in plan.doors]


def window_segment(plan: Plan, window: Window) -> LineString:
    """The window opening on its wall."""
    u = wall_direction(plan.room(window.room).outline, window.at)
    h = window.width / 2
    return LineString([(window.at[0] - u[0] * h, window.at[1] - u[1] * h),
                       (window.at[0] + u[0] * h, window.at[1] + u[1] * h)])


def window_band(plan: Plan, window: Window, depth: int) -> BaseGeometry:
    """Floor within ``depth`` of the window opening, inside its room: tall pieces stay out."""
    seg = window_segment(plan, window)
    return seg.buffer(depth, cap_style="flat").intersection(room_polygon(plan.room(window.room)))


def fixture_polygon(fixture: Fixture) -> Polygon:
    return Polygon(fixture.outline)


def fixture_zone(fixture: Fixture) -> Polygon | None:
    return Polygon(fixture.zone) if fixture.zone else None


def free_floor(room: Room, plan: Plan, obstacles: list[BaseGeometry] | None = None) -> BaseGeometry:
    """The room's floor less its fixtures and the given obstacles (furniture footprints)."""
    taken: list[BaseGeometry] = [fixture_polygon(f) for f in plan.fixtures if f.room == room.id]
    taken += obstacles or []
    return room_polygon(room).difference(unary_union(taken)) if taken else room_polygon(room)
