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
  they are joined (bisection to :data:`WIDTH_STEP`); the bottleneck is where the two sides
  come closest at the first width that parts them. It is always below the width asked
  when the way is missing.

References: T. Lozano-Perez, "Spatial planning: a configuration space approach", IEEE
Trans. Computers C-32 (1983); J. Serra, *Image Analysis and Mathematical Morphology*
(1982) for erosion and opening; 2010 ADA Standards §305.6, §403.5.1.

Worked example (checked by hand): an empty 3000 x 3000 mm room shrunk for a 760 mm route
is the square inset by (760 - 0.5) / 2 = 379.75 mm, 2240.5 mm a side:

>>> from shapely import box
>>> round(shrink(box(0, 0, 3000, 3000), 760).area / 1e6, 3)
5.02
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass, field
from enum import StrEnum

import shapely
from shapely import LineString, Point, Polygon
from shapely.geometry.base import BaseGeometry
from shapely.ops import nearest_points, unary_union

from roomfit.audit import geometry as geo
from roomfit.plan.data import OUTSIDE, Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = [
    "QUAD_SEGS",
    "MAX_VERTICES",
    "TOUCH_MM",
    "TOUCH_MM2",
    "WIDTH_STEP",
    "WIDTH_TOL",
    "Floor",
    "Placed",
    "PlaceKind",
    "Target",
    "Walkway",
    "polys",
    "floor_of",
    "standing",
    "erosion",
    "shrink",
    "mouth",
    "walkway",
    "targets",
    "place_target",
    "roots_in",
    "reached",
    "joined",
    "widest",
    "bottleneck",
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
MAX_VERTICES = 2000


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


class PlaceKind(StrEnum):
    """How a place is served by the walkway (see the module docstring)."""

    DOOR = "door"
    ZONE = "zone"
    POINT = "point"
    BESIDE = "beside"   # a piece or fitting without a zone: served by the parts beside it


@dataclass(frozen=True)
class Target:
    """A place a person must get to: ``geom`` in ``room``.

    ``depth``: how far (mm) a body centre can go into it (half a door's width, a turning
    space's clearance, 0 for a point); ``door``: the door of a door side; ``kind``: how it
    is served; ``ids``: the pieces, fittings or doors it belongs to.
    """

    label: str
    room: str
    geom: BaseGeometry
    depth: float
    ids: tuple[str, ...]
    door: str | None = None
    kind: PlaceKind = PlaceKind.POINT
    key: int = -1   # a plan zone's index into the floor's zones, -1 for any other place


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
    _zones: list[Target] | None = None
    _links: tuple[list[list[LineString]], list[tuple[int, int]]] | None = None


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
    _zone_roots: dict[int, set[int]] | None = None

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


def _zone_target(label: str, room: str, zone: BaseGeometry, ids: tuple[str, ...],
                 key: int) -> Target:
    return Target(label, room, zone, 0.0, ids, kind=PlaceKind.ZONE, key=key)


def targets(floor: Floor) -> list[Target]:
    """Every place the audit asks to reach: both sides of each door, each use zone (the
    part inside its room) and each fitting's zone."""
    out: list[Target] = []
    for ds in floor.doors:
        for rid in ds.door.rooms:
            if rid == OUTSIDE or rid not in floor.rooms:
                continue
            out.append(Target(f"the {rid} side of door {ds.door.id}", rid, Point(ds.door.at),
                              ds.door.width / 2, (ds.door.id,), ds.door.id, PlaceKind.DOOR))
    return out + _zones(floor)


def _zones(floor: Floor) -> list[Target]:
    if floor._zones is not None:
        return floor._zones
    out: list[Target] = []
    for pid, pc in floor.placed.items():
        room = floor.rooms.get(pc.placement.room)
        if room is None:
            continue
        for z, zp in geo.use_zones(pc.spec, pc.placement):
            g = zp.intersection(room)
            out.append(_zone_target(f"the {z.side} zone of {pid}", pc.placement.room,
                                    g if polys(g) else zp, (pid,), len(out)))
    for f in floor.plan.fixtures:
        fz = geo.fixture_zone(f)
        if fz is not None and f.room in floor.rooms:
            out.append(_zone_target(f"the zone of fitting {f.id}", f.room, fz, (f.id,),
                                    len(out)))
    floor._zones = out
    return out


def _sides(g: BaseGeometry) -> list[LineString]:
    """The straight sides of a zone's outline (of its largest polygon)."""
    ps = polys(g)
    if not ps:
        return []
    ring = list(max(ps, key=lambda q: q.area).exterior.coords)
    return [LineString([a, b]) for a, b in zip(ring, ring[1:], strict=False)
            if math.dist(a, b) > TOUCH_MM]


def _clear(floor: Floor, t: Target) -> bool:
    """A zone free at its own size: inside its room and free of footprints and fittings
    other than its owner's."""
    room = floor.rooms.get(t.room)
    if room is None or t.geom.difference(room).area > TOUCH_MM2:
        return False
    solid = [pc.shape for pid, pc in standing(floor) if pid not in t.ids]
    solid += [g for fid, g in floor.fixtures.items() if fid not in t.ids]
    return all(t.geom.intersection(s).area <= TOUCH_MM2 for s in solid if t.geom.intersects(s))


def _zone_links(floor: Floor) -> tuple[list[list[LineString]], list[tuple[int, int]]]:
    """The sides of each zone, and the pairs (k, m) where one full side of zone k adjoins
    the clear zone m (the same for every width: computed once per floor)."""
    if floor._links is None:
        zones = _zones(floor)
        sides = [_sides(z.geom) for z in zones]
        clear = [k for k, z in enumerate(zones) if _clear(floor, z)]
        grown = {k: zones[k].geom.buffer(TOUCH_MM) for k in clear}
        links = [(k, m) for k, z in enumerate(zones) for m in clear
                 if m != k and zones[m].room == z.room
                 and any(grown[m].covers(s) for s in sides[k])]
        floor._links = (sides, links)
    return floor._links


def _zone_roots(floor: Floor, st: Walkway) -> dict[int, set[int]]:
    """For each zone (index into :func:`_zones`), the roots of the joined parts that serve
    it: directly (one full side adjoins their bodies) or through a chain of clear zones,
    each adjoining the next by one full side."""
    if st._zone_roots is not None:
        return st._zone_roots
    zones = _zones(floor)
    sides, links = _zone_links(floor)
    served: dict[int, set[int]] = {k: _adjoined(st, z, sides[k]) for k, z in enumerate(zones)}
    changed = True
    while changed:  # adjoining clear zones pass on the parts that serve them
        changed = False
        for k, m in links:
            if served[m] - served[k]:
                served[k] |= served[m]
                changed = True
    st._zone_roots = served
    return served


def roots_in(floor: Floor, st: Walkway, t: Target) -> set[int]:
    """Roots of the joined parts that serve ``t`` in walkway ``st``."""
    if t.kind is PlaceKind.DOOR and t.door is not None:
        _, idx = st.mouths.get((t.door, t.room), (None, []))
        return {st.root[i] for i in idx}
    if t.kind is PlaceKind.ZONE:
        if t.key >= 0:
            return _zone_roots(floor, st)[t.key]
        return _adjoined(st, t, _sides(t.geom))
    return {st.root[i] for i in st.near(t.room, t.geom, t.depth)}


def _adjoined(st: Walkway, z: Target, sides: list[LineString]) -> set[int]:
    """Roots of the joined parts whose bodies adjoin one full side of zone ``z``."""
    roots = {st.root[i] for i in st.within(z.room, z.geom, st.side_reach())}
    return {rt for rt in roots if any(st.reach(z.room, rt).covers(s) for s in sides)}


def reached(floor: Floor, t: Target, width: float, st: Walkway | None = None) -> bool:
    """Is ``t`` reached from the entrance at ``width`` (or in walkway ``st``)?"""
    st = st if st is not None else walkway(floor, width)
    return bool(roots_in(floor, st, t) & st.start)


def joined(floor: Floor, a: Target, b: Target, width: float, st: Walkway | None = None
           ) -> bool:
    """Are the places ``a`` and ``b`` joined by a way ``width`` wide (or in walkway ``st``)?"""
    st = st if st is not None else walkway(floor, width)
    return bool(roots_in(floor, st, a) & roots_in(floor, st, b))


def place_target(floor: Floor, name: str) -> list[Target]:
    """The targets that serve a named place of a trip: ``"entrance"``, a door, a room (its
    free floor), a fitting (its zone, else its outline), or a piece (each use zone, else
    its footprint). Empty when there is no such place (or the piece is not placed)."""
    plan = floor.plan
    entries = [ds for ds in floor.doors if ds.door.is_entrance]
    if name == "entrance" and entries:
        name = entries[0].door.id
    for t in targets(floor):
        if t.kind is PlaceKind.DOOR and t.door == name:
            return [t]
    if name in floor.rooms:
        return [Target(f"room {name}", name, floor.free[name], 0.0, (), kind=PlaceKind.POINT)]
    for f in plan.fixtures:
        if f.id == name and f.room in floor.rooms:
            zs = [z for z in _zones(floor) if z.ids == (f.id,)]
            return zs or [Target(f"fitting {f.id}", f.room, floor.fixtures[f.id], 0.0, (f.id,),
                                 kind=PlaceKind.BESIDE)]
    if name in floor.placed:
        pc = floor.placed[name]
        zs = [z for z in _zones(floor) if z.ids == (name,)]
        return zs or [Target(f"piece {name}", pc.placement.room, pc.shape, 0.0, (name,),
                             kind=PlaceKind.BESIDE)]
    return []


def widest(pred: Callable[[float], bool], lo: float, hi: float) -> tuple[float, float]:
    """Bisection: ``pred(lo)`` holds and ``pred(hi)`` fails; the last width that holds and
    the first that fails, ``WIDTH_STEP`` apart at most (so the widest is below ``hi``)."""
    while hi - lo > WIDTH_STEP:
        mid = (lo + hi) / 2
        if pred(mid):
            lo = mid
        else:
            hi = mid
    return lo, hi


def _near_geom(floor: Floor, st: Walkway, t: Target) -> tuple[list[int], BaseGeometry]:
    if t.kind is PlaceKind.DOOR and t.door is not None:
        p, idx = st.mouths[(t.door, t.room)]
        return idx, p
    if t.kind is PlaceKind.ZONE:
        return st.within(t.room, t.geom, st.side_reach()), t.geom
    return st.near(t.room, t.geom, t.depth), t.geom


def bottleneck(floor: Floor, t: Target, width: float, origin: Target | None = None
               ) -> tuple[tuple[float, float], tuple[str, ...]]:
    """Where the way to ``t`` (from ``origin``, by default the entrance) breaks at
    ``width``, and the pieces and fittings of that room within a route width of it.

    The nearest points between the side ``origin`` reaches and the side around the target
    (in one room, or across a door whose mouth one of them misses); the midpoint is the
    bottleneck.
    """
    st = walkway(floor, width)
    if origin is None:
        start = st.start
    else:
        start = roots_in(floor, st, origin)
    t_idx, t_geom = _near_geom(floor, st, t)
    t_roots = {st.root[i] for i in t_idx}
    start_by = _by_room(st, start)
    if not start_by:
        for ds in floor.doors:
            if ds.door.is_entrance if origin is None else ds.door.id == origin.door:
                for rid in ds.door.rooms:
                    if rid in floor.rooms:
                        start_by.setdefault(rid, []).append(mouth(floor, ds, rid, erosion(width)))
        if origin is not None and not start_by:
            start_by[origin.room] = [origin.geom]
    targ_by = _by_room(st, t_roots - start)
    if not targ_by:
        targ_by[t.room] = [t_geom]
    best = min(_pairs(floor, st, start, t_roots, start_by, targ_by, width),
               key=lambda ab: ab[0].distance(ab[1]))
    pa, pb = nearest_points(best[0], best[1])
    where = Point((pa.x + pb.x) / 2, (pa.y + pb.y) / 2)
    return (round(where.x, 1), round(where.y, 1)), _next_to(floor, where)


def _by_room(st: Walkway, roots: set[int]) -> dict[str, list[BaseGeometry]]:
    out: dict[str, list[BaseGeometry]] = {}
    for i, (rid, p) in enumerate(st.comps):
        if st.root[i] in roots:
            out.setdefault(rid, []).append(p)
    return out


def _pairs(floor: Floor, st: Walkway, start: set[int], t_roots: set[int],
           start_by: dict[str, list[BaseGeometry]], targ_by: dict[str, list[BaseGeometry]],
           width: float) -> list[tuple[BaseGeometry, BaseGeometry]]:
    """Candidate (start side, target side) shapes between which the way breaks."""
    pairs = [(unary_union(start_by[rid]), unary_union(targ_by[rid]))
             for rid in start_by.keys() & targ_by.keys()]
    for ds in floor.doors:
        a, b = ds.door.rooms
        for ra, rb in ((a, b), (b, a)):
            if ra not in start_by or rb not in targ_by or rb in start_by:
                continue
            _, near_a = st.mouths.get((ds.door.id, ra), (None, []))
            _, near_b = st.mouths.get((ds.door.id, rb), (None, []))
            if any(st.root[i] in start for i in near_a):  # blocked on the target's side
                pairs.append((mouth(floor, ds, rb, erosion(width)), unary_union(targ_by[rb])))
            elif any(st.root[i] in t_roots for i in near_b):  # blocked on the start's side
                pairs.append((unary_union(start_by[ra]), mouth(floor, ds, ra, erosion(width))))
    if not pairs:
        pairs.append((unary_union([g for v in start_by.values() for g in v]),
                      unary_union([g for v in targ_by.values() for g in v])))
    return pairs


def _next_to(floor: Floor, where: Point) -> tuple[str, ...]:
    """Pieces and fittings within a route width of ``where``, nearest first: the blockers to
    name. Only those of the room at ``where``, and those standing in a doorway near it
    (within 50 mm of its opening); pieces behind a wall are left out."""
    route = floor.rules.get("route.width").exact_mm
    room = room_at(floor, where)
    doorways = [ds.opening.buffer(50.0) for ds in floor.doors
                if ds.opening.distance(where) <= route]
    near: list[tuple[float, str]] = []
    solid = [(pid, pc.placement.room, pc.shape) for pid, pc in standing(floor)]
    solid += [(f.id, f.room, floor.fixtures[f.id]) for f in floor.plan.fixtures]
    for sid, rid, shape in solid:
        if rid == room or any(shape.intersects(d) for d in doorways):
            near.append((shape.distance(where), sid))
    return tuple(i for d, i in sorted(near) if d <= route)
