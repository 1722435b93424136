"""The walkway engine: the one judge of "can a person get there?".

Every verdict about circulation (the audit's ``route.reach``, ``route.width`` and
``route.trip``, the route scorer's reachable trips, the solver's ranking) comes from here.

- **Free floor**: each room's polygon less fittings and the footprints of standing pieces
  (a rug is walked over). Door swings and use zones are walkable floor.
- **Shrinking at a width**: a person of route width ``w`` is a disc of radius ``w / 2``; the
  body centre may go wherever the free floor shrunk by the radius reaches (morphological
  erosion by a disc: a negative buffer with *round* joins). Round joins are the physically
  right model of a body of that width: a disc passes a convex corner of an obstacle at its
  radius, so a diagonal gap between two corners is as wide as the distance between them.
  Mitre joins would treat every corner as a square post and wrongly close a 990 mm diagonal
  gap at 762 mm. Arcs are drawn with :data:`QUAD_SEGS` segments per quarter circle; a
  chord lies inside its arc, so the shrunk floor is at most ``r (1 - cos(pi / 32))``
  (0.5 % of the radius, 1.8 mm at 381 mm) larger than the exact one, in diagonal gaps only;
  walls parallel to each other are exact.
- **Slack**: the floor is shrunk by ``(w - WIDTH_TOL) / 2``, so a passage exactly as wide as
  the route passes (its exact shrunk floor is a bare line) and one a millimetre narrower
  fails. Plans are in whole millimetres; a width given in inches (36 in = 914.4 mm) is met
  by 914 mm, the nearest whole millimetre, and failed by 913 mm.
- **Parts joined through doorways**: the connected parts of the shrunk floor of each room;
  a door joins every part on either side that comes within ``max(0, r - d/2) + 1`` mm of
  the door's *mouth* (the point a radius in front of the door's centre; ``d`` its width),
  so a piece may stand up to the jamb but not in front of the opening.
- **Places** (:class:`Target`): a door side is served by the parts near its mouth; a use
  zone or fitting zone by the parts whose bodies adjoin one full side of it, or by the
  parts serving another clear zone one full side of it adjoins (2010 ADA §305.6: "one full
  unobstructed side of the clear floor space shall adjoin or overlap an accessible route
  or adjoin another clear floor space"); a point (a turning space's centres, a room's
  centre) by the parts within ``max(0, r - depth) + 1`` mm of it. A side adjoins the route
  when every point of it lies within ``r * sqrt(2)`` of a body centre: a person of the
  route width standing square to the side covers it out to a square corner, where a disc
  would leave the corner itself untouched.
- **Width along a path**: the widest way between two places is the largest width at which
- **Places** and how they are served are in :mod:`roomfit.audit.places`; the widest way
  between two places and where it breaks in :mod:`roomfit.audit.bottleneck`.

References: T. Lozano-Perez, "Spatial planning: a configuration space approach", IEEE
Trans. Computers C-32 (1983); J. Serra, *Image Analysis and Mathematical Morphology*
(1982) for erosion and opening; 2010 ADA Standards §403.5.1.

Worked example (checked by hand): an empty 3000 x 3000 mm room shrunk for a 760 mm route
is the square inset by (760 - 0.5) / 2 = 379.75 mm, 2240.5 mm a side:

>>> from shapely import box
>>> round(shrink(box(0, 0, 3000, 3000), 760).area / 1e6, 3)
5.02
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from typing import TYPE_CHECKING

import shapely
from shapely import LineString, Point, Polygon
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit import geometry as geo
from roomfit.plan.data import OUTSIDE, Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet

if TYPE_CHECKING:  # the floor caches its places (built by roomfit.audit.places)
    from roomfit.audit.places import Target

__all__ = [
    "QUAD_SEGS",
    "MAX_VERTICES",
    "TOUCH_MM",
    "TOUCH_MM2",
    "WIDTH_STEP",
    "WIDTH_TOL",
    "Floor",
    "Placed",
    "Walkway",
    "polys",
    "floor_of",
    "standing",
    "erosion",
    "shrink",
    "mouth",
    "walkway",
    "room_at",
]

#: Distance (mm) within which two shapes count as touching / a point as on a line.
TOUCH_MM = 1.0
#: Overlap area (mm2) below which two shapes only touch.
TOUCH_MM2 = 1.0
#: Precision (mm) of the widest-way search.
WIDTH_STEP = 5.0
#: A passage this much narrower (mm) than asked still counts as wide enough, so that a hall
#: exactly as wide as the route passes (its shrunk floor would otherwise be a bare line).
WIDTH_TOL = 0.5
#: Segments per quarter circle in the round joins of the shrinking.
QUAD_SEGS = 8
#: Most vertices of one room's free floor the engine works on: a floor with more (a wall
#: drawn with thousands of teeth) is first shrunk by a small tolerance and simplified by
#: it (doubling from 1 mm until it has at most this many), which never widens a passage
#: and narrows one by at most twice the tolerance (:attr:`Floor.simplified_mm`). This is
#: the declared bound that keeps shrinking and route scoring near-linear in the vertices.
#: 1000, the most corners a plan file's outline may have: the work peaked just under an
#: earlier 2000 (an audit of 50 s at 1990 corners, docs/benchmarks.md), 2.4 s at 1000.
MAX_VERTICES = 1000


def polys(g: BaseGeometry) -> list[Polygon]:
    """The polygons of ``g`` with more than a touch of area."""
    if g.is_empty:
        return []
    if isinstance(g, Polygon):
        return [g] if g.area > TOUCH_MM2 else []
    return [p for q in getattr(g, "geoms", []) for p in polys(q)]


@dataclass(frozen=True)
class Placed:
    """A placed piece: its catalogue spec, placement and footprint."""

    spec: PieceSpec
    placement: Placement
    shape: Polygon



@dataclass
class Floor:
    """The shapes of one arrangement that do not depend on the body width, and the
    walkways built from them (cached by width)."""

    plan: Plan
    rules: RuleSet
    placed: dict[str, Placed]
    rooms: dict[str, Polygon]
    fixtures: dict[str, Polygon]
    free: dict[str, BaseGeometry]
    doors: list[geo.DoorShape]
    cache: dict[tuple[float, str], Walkway] = field(default_factory=dict)
    bases: dict[tuple[str, str], tuple[float, float]] = field(default_factory=dict)
    pinch_longest: float = 0.0   # longest narrow stretch kept by the pinch walkway (mm)
    simplified_mm: float = 0.0   # largest tolerance a free floor was simplified by (mm)
    zones: list[Target] | None = None   # the use and fitting zones (roomfit.audit.places)
    zone_links: tuple[list[list[LineString]], list[tuple[int, int]]] | None = None


def floor_of(plan: Plan, rules: RuleSet) -> Floor:
    """The free floor of ``plan``'s placed pieces under ``rules``."""
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    placed = {pid: Placed(specs[pid], pl, geo.footprint(specs[pid], pl)) for pid, pl in plan.layout}
    rooms = geo.room_polygons(plan)
    fixtures = {f.id: geo.fixture_polygon(f) for f in plan.fixtures}
    taken = unary_union([p.shape for p in placed.values() if not geo.lies_flat(p.spec)]
                        + list(fixtures.values()))
    free = {rid: poly.difference(taken) if not taken.is_empty else poly
            for rid, poly in rooms.items()}
    tol = {rid: 0.0 for rid in free}
    for rid, g in free.items():
        free[rid], tol[rid] = _bounded(g)
    return Floor(plan, rules, placed, rooms, fixtures, free, geo.door_shapes(plan, rules),
                 simplified_mm=max(tol.values(), default=0.0))


def _bounded(g: BaseGeometry) -> tuple[BaseGeometry, float]:
    """``g`` with at most :data:`MAX_VERTICES` vertices, never larger than ``g``: shrunk by a
    tolerance (mitre joins, which shrink at least as much as round ones) and simplified by
    it (Douglas-Peucker moves the outline by at most the tolerance); the tolerance used."""
    tol = 0.0
    out = g
    while shapely.get_num_coordinates(out) > MAX_VERTICES:
        tol = tol * 2 if tol else 1.0
        out = g.buffer(-tol, join_style="mitre").simplify(tol, preserve_topology=True)
    return out, tol


def standing(floor: Floor) -> list[tuple[str, Placed]]:
    """Placed pieces that stand on the floor, leaving out rugs (:func:`geometry.lies_flat`)."""
    return [(pid, pc) for pid, pc in floor.placed.items() if not geo.lies_flat(pc.spec)]


def erosion(width: float) -> float:
    """How far the floor is shrunk for a route ``width`` wide: half of it, less the slack."""
    return max(width - WIDTH_TOL, 0.0) / 2


def shrink(free: BaseGeometry, width: float) -> BaseGeometry:
    """Where the centre of a body ``width`` wide may be in ``free`` (round joins)."""
    e = erosion(width)
    return free.buffer(-e, quad_segs=QUAD_SEGS) if e > 0 else free


def room_at(floor: Floor, p: Point) -> str | None:
    """The room containing ``p``, or the nearest one within a route width."""
    best: tuple[float, str] | None = None
    for rid, poly in floor.rooms.items():
        d = poly.distance(p)
        if d == 0:
            return rid
        if best is None or d < best[0]:
            best = (d, rid)
    return best[1] if best and best[0] <= floor.rules.get("route.width").exact_mm else None


@dataclass
class Walkway:
    """The shrunk floor at one route width, split into connected parts joined by doors.

    ``comps``: (room, part); ``root``: the union-find root of each part (parts with one
    root are joined); ``start``: roots the entrance reaches; ``mouths``: (door, room) ->
    the mouth point and the parts near it.
    """

    width: float
    comps: list[tuple[str, Polygon]]
    root: list[int]
    start: set[int]
    mouths: dict[tuple[str, str], tuple[Point, list[int]]]
    slack: float = 0.0   # the floor's simplification allowance (mm): see MAX_VERTICES
    _swept: dict[tuple[str, int], BaseGeometry] = field(default_factory=dict)
    # per room, per zone of it, the roots serving it (roomfit.audit.places)
    zone_roots: dict[str, dict[int, set[int]]] = field(default_factory=dict)

    def tol(self, depth: float) -> float:
        return max(0.0, self.width / 2 - depth) + TOUCH_MM + self.slack

    def near(self, room: str, g: BaseGeometry, depth: float) -> list[int]:
        """Parts of ``room`` whose centres reach ``depth`` mm into ``g``."""
        return self.within(room, g, self.tol(depth))

    def within(self, room: str, g: BaseGeometry, d: float) -> list[int]:
        """Parts of ``room`` within ``d`` mm of ``g``."""
        return [i for i, (rid, p) in enumerate(self.comps) if rid == room and p.distance(g) <= d]

    def side_reach(self) -> float:
        """How far (mm) from a body centre a side counts as adjoined: ``r * sqrt(2)``."""
        return erosion(self.width) * math.sqrt(2) + TOUCH_MM + self.slack

    def reach(self, room: str, root: int) -> BaseGeometry:
        """Floor within ``r * sqrt(2)`` of the body centres of one joined set in ``room``
        (what a square body of the route width standing there covers)."""
        key = (room, root)
        if key not in self._swept:
            mine = [p for i, (rid, p) in enumerate(self.comps)
                    if rid == room and self.root[i] == root]
            self._swept[key] = unary_union(mine).buffer(self.side_reach(), quad_segs=QUAD_SEGS)
        return self._swept[key]


def _find(parent: list[int], i: int) -> int:
    while parent[i] != i:
        parent[i] = parent[parent[i]]
        i = parent[i]
    return i


def mouth(floor: Floor, ds: geo.DoorShape, room: str, r: float) -> Point:
    """The point ``r`` in front of the door's centre, in ``room`` (the walkway puts it where
    a body centre stands in front of the door: ``r = erosion(width)``).

    The door's centre lies on the wall of ``door.rooms[0]``; on the other side it is taken
    at the nearest point of that room's outline, so walls drawn with a thickness work too.
    """
    n = ds.inward[room]
    key = (ds.door.id, room)
    if key not in floor.bases:
        ring = floor.rooms[room].exterior
        p = ring.interpolate(ring.project(Point(ds.door.at)))
        floor.bases[key] = (p.x, p.y)
    bx, by = floor.bases[key]
    return Point(bx + n[0] * r, by + n[1] * r)


def walkway(floor: Floor, width: float, floors: dict[str, BaseGeometry] | None = None,
            key: str = "") -> Walkway:
    """The walkway at ``width``: connected parts of the shrunk floor joined through doors,
    and which of them the entrance reaches. ``floors`` replaces the shrunk floors (the
    pinch test passes its own, under its own cache ``key``)."""
    ck = (round(width, 3), key)
    if ck in floor.cache:
        return floor.cache[ck]
    r = erosion(width)
    comps: list[tuple[str, Polygon]] = []
    for rid, free in floor.free.items():
        shrunk = floors[rid] if floors is not None else shrink(free, width)
        comps += [(rid, p) for p in polys(shrunk)]
    parent = list(range(len(comps)))
    state = Walkway(width, comps, parent, set(), {}, slack=2 * floor.simplified_mm)
    start: list[int] = []
    for ds in floor.doors:
        near: list[int] = []
        for rid in ds.door.rooms:
            if rid == OUTSIDE or rid not in floor.rooms:
                continue
            p = mouth(floor, ds, rid, r)
            idx = state.near(rid, p, ds.door.width / 2)
            state.mouths[(ds.door.id, rid)] = (p, idx)
            near += idx
        if ds.door.is_entrance:
            start += near
        for i in near[1:]:
            a, b = _find(parent, near[0]), _find(parent, i)
            parent[a] = b
    state.root = [_find(parent, i) for i in range(len(comps))]
    state.start = {state.root[i] for i in start}
    floor.cache[ck] = state
    return state
