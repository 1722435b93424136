"""Walking routes through an arrangement, and the daily routine's walking cost.

A person of body width ``b`` (the rule set's ``route.width``) walks with their centre at least
``b / 2`` from every wall, fitting and piece of furniture. The floor their centre may use is
the *walkway*: each room's free floor (its polygon less fittings and furniture footprints)
shrunk by ``b / 2`` with mitred corners, joined to the next room through each doorway. A
doorway at least ``b`` wide adds a corridor ``door width - b`` wide through the opening (and
through a thick wall); a narrower doorway still lets a person squeeze through, along a thin
spine through its centre, and is recorded as a narrow point of the width of the door.

Shortest routes are exact Euclidean shortest paths inside the walkway, a polygon with holes:
such a path bends only at reflex vertices of the polygon, so a visibility graph on those
vertices plus the two end points, searched with Dijkstra's algorithm, finds it
(Lozano-Perez and Wesley 1979, "An algorithm for planning collision-free paths among
polyhedral obstacles", CACM 22(10); de Berg et al., *Computational Geometry*, 3rd ed.,
ch. 15). ``docs/routes.md`` says why we chose this over a grid.

The width of a route at a point is the shortest chord through that point between two
blockers (walls, fittings, furniture), searched in 5 degree steps: in a gap between two
parallel faces it is the gap, whichever way the route crosses it. Chords that only cut
across a corner (their ends lie close together along the boundary) are not passages and are
skipped. The narrowest width of a route is the least such width along it, sampled every
50 mm or less, and never more than the width of a doorway it passes.

Places a trip can start or end at: ``"entrance"`` (the centre of the entrance door), a door
id (the centre of the doorway), a room id (the centre of the largest circle in the room's
free floor), a fitting id (the centre of its use zone, or the nearest walkway point beside
it), a piece id (the centre of each of its use zones: the trip takes the nearest one a route
reaches, say either side of a bed; without zones, the nearest walkway point beside it).
A place off the walkway (the middle of a bed-side zone narrower than the body) is reached by
a last straight step from the nearest walkway point that crosses nothing. Where the rule set
allows a short stretch at ``route.pinch_width``, a trip with no way at the full width is
routed at the pinch width and flagged.

Worked example, checked by hand: in an empty 4000 x 3000 mm room, the route from
(1000, 1000) to (3000, 2000) is the straight line, sqrt(2000**2 + 1000**2) = 2236.1 mm.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field

import networkx as nx
import numpy as np
import shapely
from shapely import LineString, Point, Polygon
from shapely.geometry.base import BaseGeometry
from shapely.geometry.polygon import orient
from shapely.ops import nearest_points, unary_union

from roomfit.audit.geometry import (
    door_shape,
    fixture_polygon,
    fixture_zone,
    footprint,
    lies_flat,
    use_zones,
)
from roomfit.audit.marks import Path
from roomfit.plan.data import OUTSIDE, Plan, Trip
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = [
    "NIGHT_LONG_MM",
    "SAMPLE_STEP_MM",
    "WIDTH_CAP_MM",
    "TURN_DEGREES",
    "TripScore",
    "RouteScores",
    "default_routines",
    "routines_for",
    "route",
    "score_routes",
]

#: A night route longer than this (mm) is flagged. Common practice: 10 m.
NIGHT_LONG_MM = 10_000

#: Widths along a route are sampled at least this often (mm).
SAMPLE_STEP_MM = 50

#: Widths are measured up to this much (mm); wider is reported as this value.
WIDTH_CAP_MM = 3_000

#: A change of direction by more than this many degrees counts as a turn.
TURN_DEGREES = 30

_TOL = 0.5          # mm: segments within this of the walkway count as inside it
_EXACT = 0.05       # mm: a gap exactly as wide as the body passes (shrink by half less this)
_SPINE = 1.0        # mm: half-width of the spine through a doorway narrower than the body
_CHORD_STEP = 5     # degrees between chord directions when measuring width
_MERGE = 5.0        # mm: path points closer than this are merged before counting turns
_MIN_WAY = 20       # mm: narrowest way and precision searched when explaining a gap
_POCKET = 2.0       # a chord cutting off less boundary than this many times its length is a corner
_RING_TOL = 2.0     # mm: a chord end this close to a boundary ring lies on it
_DOORWAY = 50       # mm: furniture this close to a doorway's wall line blocks the doorway

XY = tuple[float, float]


@dataclass(frozen=True)
class TripScore:
    """One trip's route.

    ``length_mm``: walking length (None when unreachable); ``points``: the route from origin
    to target; ``narrowest_mm``/``narrowest_at``: least clear width along the route and where
    (a doorway's width counts), ``narrowest_between``: ids of the blockers on either side
    (``"wall"`` for a wall); ``turns``: changes of direction over :data:`TURN_DEGREES`;
    ``doors``: doorways passed, in order; ``reason``: why it is unreachable; ``flags``:
    plain sentences for a long or narrow night route.
    """

    origin: str
    target: str
    label: str
    per_day: float
    night: bool
    reachable: bool
    length_mm: float | None = None
    points: tuple[XY, ...] = ()
    narrowest_mm: float | None = None
    narrowest_at: XY | None = None
    narrowest_between: tuple[str, ...] = ()
    turns: int = 0
    doors: tuple[str, ...] = ()
    reason: str = ""
    flags: tuple[str, ...] = ()

    @property
    def metres_per_day(self) -> float:
        """Walking metres a day on this trip: ``per_day * length`` (0 when unreachable)."""
        return self.per_day * self.length_mm / 1000 if self.length_mm is not None else 0.0

    @property
    def name(self) -> str:
        return self.label or f"{self.origin} to {self.target}"


@dataclass(frozen=True)
class RouteScores:
    """The routine's routes for one arrangement.

    ``walking_m_per_day`` sums ``per_day * length`` over the reachable trips (the single
    scalar a solver minimises; rank first by ``len(unreachable)``). ``narrowest_mm`` is the
    least width on any reachable routine route. ``defaults`` is True when the plan had no
    routine and :func:`default_routines` stood in.
    """

    trips: tuple[TripScore, ...]
    route_width: int
    walking_m_per_day: float
    narrowest_mm: float | None
    narrowest_at: XY | None
    narrowest_trip: str | None
    flags: tuple[str, ...]
    defaults: bool = False

    @property
    def unreachable(self) -> tuple[TripScore, ...]:
        return tuple(t for t in self.trips if not t.reachable)

    @property
    def rank_key(self) -> tuple[int, float]:
        """Sort key for ranking arrangements: fewer unreachable trips, then fewer metres."""
        return (len(self.unreachable), self.walking_m_per_day)

    def paths(self) -> tuple:
        """The reachable routes as ``roomfit.audit.marks.Path`` objects for drawing."""

        return tuple(Path(t.name, t.points, t.night) for t in self.trips if t.reachable)


# --- the walkway ---------------------------------------------------------------------------


@dataclass(frozen=True)
class _Doorway:
    """A door's frame: centre ``at``, unit ``u`` along the wall, ``n`` into ``rooms[0]``,
    half width ``h``, wall gap ``g`` to the other room (0 for a shared wall line)."""

    id: str
    width: int
    at: XY
    u: XY
    n: XY
    h: float
    g: float
    outside: bool


@dataclass
class _Base:
    """Shapes of one arrangement that do not depend on the body width (private)."""

    rules: RuleSet
    specs: dict[str, PieceSpec]
    rooms: dict[str, Polygon]
    room_free: dict[str, BaseGeometry]
    taken: BaseGeometry                      # fittings and furniture footprints
    floor: BaseGeometry                      # rooms and the doorways through thick walls
    floor_tol: BaseGeometry                  # free floor grown by _TOL, for straight steps
    doors: list[_Doorway]
    openings: list[tuple[str, int, Polygon]]  # door id, width, the opening (crossing test)
    doorways: list[tuple[str, Polygon]]      # door id, the floor of the doorway itself
    blockers: list[tuple[str, BaseGeometry]]  # walls, fittings, furniture with ids
    blocker_union: BaseGeometry
    edges: np.ndarray                        # straight edges of the blockers (x0, y0, x1, y1)
    rings: list[LineString]                  # boundary rings of the free floor, walls carved


@dataclass
class _Space:
    """The walkway for one body width and its visibility graph (private, mutable)."""

    base: _Base
    width: float
    walk: BaseGeometry                       # where the centre of the body may be
    walk_tol: BaseGeometry                   # walkway grown by _TOL, for containment tests
    parts: list[Polygon]                     # walkway components
    graph: nx.Graph = field(default_factory=nx.Graph)
    nodes: list[XY] = field(default_factory=list)
    node_part: list[int] = field(default_factory=list)
    pinch: _Space | None = None              # walkway at the rule set's pinch width, if any


def _frame(at: XY, u: XY, n: XY, u0: float, u1: float, n0: float, n1: float) -> Polygon:
    """Rectangle ``u0..u1`` along ``u`` and ``n0..n1`` along ``n`` from ``at``."""
    pts = [(at[0] + u[0] * a + n[0] * b, at[1] + u[1] * a + n[1] * b)
           for a, b in ((u0, n0), (u1, n0), (u1, n1), (u0, n1))]
    return Polygon(pts)


def _build_base(plan: Plan, rules: RuleSet) -> _Base:
    rooms = {rm.id: Polygon(rm.outline) for rm in plan.rooms}
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    obstacles: list[tuple[str, BaseGeometry]] = [(f.id, fixture_polygon(f)) for f in plan.fixtures]
    obstacles += [(pid, footprint(specs[pid], pl)) for pid, pl in plan.layout
                  if not lies_flat(specs[pid])]  # people walk over a rug
    taken = unary_union([g for _, g in obstacles]) if obstacles else Polygon()

    doors: list[_Doorway] = []
    cuts, gaps, jambs = [], [], []
    openings: list[tuple[str, int, Polygon]] = []
    doorways: list[tuple[str, Polygon]] = []
    for door in plan.doors:
        shape = door_shape(plan, door, rules)
        a, b = shape.opening.coords[0], shape.opening.coords[-1]
        at = ((a[0] + b[0]) / 2, (a[1] + b[1]) / 2)
        u = ((b[0] - a[0]) / door.width, (b[1] - a[1]) / door.width)
        n = shape.inward[door.rooms[0]]
        h = door.width / 2
        outside = door.rooms[1] == OUTSIDE
        g = 0.0 if outside else rooms[door.rooms[1]].distance(Point(at))
        g = g if g > _TOL else 0.0
        doors.append(_Doorway(door.id, door.width, at, u, n, h, g, outside))
        cuts.append(_frame(at, u, n, -h, h, -g - 1, 1))
        openings.append((door.id, door.width, _frame(at, u, n, -h, h, -g - _TOL, _TOL)))
        doorways.append((door.id, _frame(at, u, n, -h, h, -g - _DOORWAY, _DOORWAY)))
        if g:
            gaps.append(_frame(at, u, n, -h, h, -g, 0))
            for s in (-h, h):
                p0 = (at[0] + u[0] * s, at[1] + u[1] * s)
                jambs.append(LineString([p0, (p0[0] - n[0] * g, p0[1] - n[1] * g)]))

    floor = unary_union(list(rooms.values()) + gaps)
    free = floor.difference(taken) if obstacles else floor
    room_free = {rid: poly.difference(taken) if obstacles else poly for rid, poly in rooms.items()}
    walls = unary_union([poly.exterior for poly in rooms.values()])
    if cuts:
        walls = walls.difference(unary_union(cuts))
    walls = unary_union([walls, *jambs]) if jambs else walls
    blockers = [("wall", walls), *obstacles]
    floor_tol = free.buffer(_TOL, join_style="mitre")
    shapely.prepare(floor_tol)
    carved = free.difference(walls.buffer(_TOL, join_style="mitre"))
    rings = [LineString(ring.coords) for poly in shapely.get_parts(carved)
             if isinstance(poly, Polygon) for ring in [poly.exterior, *poly.interiors]]
    return _Base(rules, specs, rooms, room_free, taken, floor, floor_tol, doors, openings,
                 doorways, blockers, unary_union([g for _, g in blockers]),
                 _segments([g for _, g in blockers]), rings)


def _build_space(base: _Base, width: float) -> _Space:
    """The walkway for body ``width``: rooms shrunk by half of it, joined through doorways."""
    r = width / 2
    walk_parts = [g.buffer(_EXACT - r, join_style="mitre") for g in base.room_free.values()]
    for d in base.doors:
        half = d.h - r if d.h - r > _SPINE else _SPINE
        back = 1.0 if d.outside else d.g + r + 1
        keep = _frame(d.at, d.u, d.n, -half, half, -back, r + 1).intersection(base.floor)
        if not base.taken.is_empty:
            keep = keep.difference(base.taken.buffer(min(r, d.h), join_style="mitre"))
        walk_parts.append(keep)
    walk = unary_union([g for g in walk_parts if not g.is_empty])
    walk = shapely.make_valid(walk) if not walk.is_valid else walk
    parts = [g for g in getattr(walk, "geoms", [walk]) if isinstance(g, Polygon) and g.area > 1]
    space = _Space(base, width, walk, walk.buffer(_TOL, join_style="mitre"), parts)
    shapely.prepare(space.walk_tol)
    _visibility_graph(space)
    return space


def _reflex_vertices(poly: Polygon) -> list[XY]:
    """Vertices where the polygon's interior angle exceeds 180 degrees."""
    poly = orient(poly, 1.0)  # interior on the left of every ring
    out = []
    for ring in [poly.exterior, *poly.interiors]:
        pts = list(ring.coords)[:-1]
        k = len(pts)
        for i in range(k):
            (ax, ay), (vx, vy), (bx, by) = pts[i - 1], pts[i], pts[(i + 1) % k]
            if (vx - ax) * (by - vy) - (vy - ay) * (bx - vx) < -1e-9:
                out.append((vx, vy))
    return out


def _visibility_graph(space: _Space) -> None:
    """Nodes: reflex vertices of each walkway part; edges: segments inside the walkway."""
    g = space.graph
    for pi, part in enumerate(space.parts):
        verts = _reflex_vertices(part)
        base = len(space.nodes)
        space.nodes.extend(verts)
        space.node_part.extend([pi] * len(verts))
        g.add_nodes_from(range(base, base + len(verts)))
        if len(verts) < 2:
            continue
        ii, jj = np.triu_indices(len(verts), k=1)
        arr = np.asarray(verts)
        segs = shapely.linestrings(np.stack([arr[ii], arr[jj]], axis=1))
        ok = shapely.covers(space.walk_tol, segs)
        lengths = np.hypot(*(arr[ii] - arr[jj]).T)
        g.add_weighted_edges_from(
            (base + int(a), base + int(b), float(w))
            for a, b, w, keep in zip(ii, jj, lengths, ok, strict=True) if keep
        )


def _part_of(space: _Space, p: XY) -> int | None:
    pt = Point(p)
    for i, part in enumerate(space.parts):
        if part.distance(pt) <= _TOL:
            return i
    return None


# --- places ---------------------------------------------------------------------------------


@dataclass(frozen=True)
class _Place:
    """Where a trip ends: ``point`` on the walkway, and ``step`` beyond it off the walkway."""

    point: XY
    step: XY | None
    part: int


class _Unreachable(Exception):
    pass


def _snap(space: _Space, p: XY, what: str) -> _Place:
    """The place at ``p``: on the walkway, or reached by one straight step from it."""
    part = _part_of(space, p)
    if part is not None:
        return _Place(p, None, part)
    best: tuple[float, XY, int] | None = None
    pt = Point(p)
    for i, poly in enumerate(space.parts):
        q = nearest_points(poly, pt)[0]
        d = q.distance(pt)
        if (best is None or d < best[0]) and space.base.floor_tol.covers(LineString([q, pt])):
            best = (d, (q.x, q.y), i)
    if best is None:
        raise _Unreachable(f"{what} lies in a pocket where no way {space.width:.0f} mm wide "
                           "reaches it")
    return _Place(best[1], p, best[2])


def _beside(space: _Space, shape: BaseGeometry, what: str) -> _Place:
    """The walkway point nearest a piece or fitting without a use zone."""
    best: tuple[float, XY, int] | None = None
    for i, poly in enumerate(space.parts):
        q, s = nearest_points(poly, shape)
        d = q.distance(s)
        if (best is None or d < best[0]) and space.base.floor_tol.covers(LineString([q, s])):
            best = (d, (q.x, q.y), i)
    if best is None:
        raise _Unreachable(f"no way {space.width:.0f} mm wide reaches {what}")
    return _Place(best[1], None, best[2])


def _zone_point(zone: BaseGeometry) -> XY:
    c = zone.centroid
    if not zone.covers(c):
        c = zone.representative_point()
    return (c.x, c.y)


def _place(plan: Plan, space: _Space, name: str | XY) -> list[_Place]:
    """Resolve a place name (or a plan point) to the walkway places that serve it.

    A piece with several use zones gives one place per zone that a route reaches (a bed
    used from either side, a table from either long side); the trip takes the nearest.
    """
    if not isinstance(name, str):
        return [_snap(space, (float(name[0]), float(name[1])), f"point {name}")]
    doors = {d.id: d for d in plan.doors}
    if name == "entrance":
        entries = [d for d in plan.doors if d.is_entrance]
        if not entries:
            raise _Unreachable("the plan has no entrance door")
        return [_snap(space, _door_centre(entries[0]), "the entrance")]
    if name in doors:
        return [_snap(space, _door_centre(doors[name]), f"door {name!r}")]
    for rm in plan.rooms:
        if rm.id == name:
            free = space.base.room_free[name]
            if free.is_empty:
                raise _Unreachable(f"room {name!r} has no free floor")
            big = max(getattr(free, "geoms", [free]), key=lambda g: g.area)
            centre = shapely.maximum_inscribed_circle(big, 1.0).coords[0]
            return [_snap(space, centre, f"room {name!r}")]
    for fx in plan.fixtures:
        if fx.id == name:
            zone = fixture_zone(fx)
            if zone is not None:
                return [_snap(space, _zone_point(zone), f"the use zone of {name!r}")]
            return [_beside(space, fixture_polygon(fx), f"fitting {name!r}")]
    for piece in plan.furniture:
        if piece.id == name:
            if piece.placement is None:
                raise _Unreachable(f"piece {name!r} has no placement")
            spec = space.base.specs[name]
            room = Polygon(plan.room(piece.placement.room).outline)
            zones = [z.intersection(room) for _, z in use_zones(spec, piece.placement)]
            zones = [z for z in zones if z.area > 0]
            if not zones:
                return [_beside(space, footprint(spec, piece.placement), f"piece {name!r}")]
            found, first = [], None
            for z in zones:
                try:
                    found.append(_snap(space, _zone_point(z), f"every use zone of {name!r}"))
                except _Unreachable as e:
                    first = first or e
            if not found:
                raise first  # type: ignore[misc]
            return found
    raise _Unreachable(f"no place named {name!r} in the plan")


def _door_centre(door) -> XY:  # noqa: ANN001 - a plan Door
    return (float(door.at[0]), float(door.at[1]))


# --- routing and measuring -------------------------------------------------------------------


def _shortest(space: _Space, a: _Place, b: _Place) -> list[XY]:
    """Exact shortest path between two walkway points (Dijkstra on the visibility graph)."""
    if Point(a.point).distance(Point(b.point)) < 1e-9:
        return [a.point, b.point]
    if space.walk_tol.covers(LineString([a.point, b.point])):
        return [a.point, b.point]
    g = space.graph
    idx = [i for i, p in enumerate(space.node_part) if p == a.part]
    arr = np.asarray([space.nodes[i] for i in idx]).reshape(-1, 2)
    ends = {"a": a.point, "b": b.point}
    for key, p in ends.items():
        if not len(idx):
            break
        segs = shapely.linestrings(np.stack([np.broadcast_to(p, arr.shape), arr], axis=1))
        ok = shapely.covers(space.walk_tol, segs)
        d = np.hypot(*(arr - np.asarray(p)).T)
        g.add_weighted_edges_from((key, idx[k], float(d[k])) for k in np.flatnonzero(ok))
    try:
        nodes = nx.dijkstra_path(g, "a", "b") if "a" in g and "b" in g else None
    except nx.NetworkXNoPath:
        nodes = None
    finally:
        g.remove_nodes_from(["a", "b"])
    if nodes is None:
        raise _Unreachable("the walkway does not join them")
    return [ends[k] if isinstance(k, str) else space.nodes[k] for k in nodes]


def _samples(points: Sequence[XY], step: float) -> np.ndarray:
    """Points along a polyline at most ``step`` apart, ends included."""
    out = [points[0]]
    for (x0, y0), (x1, y1) in zip(points, points[1:], strict=False):
        k = max(1, math.ceil(math.hypot(x1 - x0, y1 - y0) / step))
        out += [(x0 + (x1 - x0) * t / k, y0 + (y1 - y0) * t / k) for t in range(1, k + 1)]
    return np.asarray(out, dtype=float)


def _segments(geoms: Sequence[BaseGeometry]) -> np.ndarray:
    """Every straight edge of the given lines and polygon boundaries, as rows x0, y0, x1, y1."""
    rows = []
    for g in geoms:
        lines = shapely.get_parts(shapely.boundary(g) if g.geom_type.endswith("Polygon") else g)
        for line in shapely.get_parts(lines):
            c = shapely.get_coordinates(line)
            if len(c) > 1:
                rows.append(np.hstack([c[:-1], c[1:]]))
    return np.vstack(rows) if rows else np.zeros((0, 4))


def _chords(segs: np.ndarray, p: np.ndarray, cap: float) -> tuple[np.ndarray, np.ndarray]:
    """Chords through ``p`` between blockers in 5 degree steps: lengths and end points.

    Rays are cast against the blockers' straight edges (``segs``) in closed form; a chord
    with a half that meets nothing within ``cap`` counts as ``2 * cap`` long.
    """
    ang = np.radians(np.arange(0, 360, _CHORD_STEP))
    d = np.stack([np.cos(ang), np.sin(ang)], axis=1)              # rays x 2
    lo, hi = np.minimum(segs[:, :2], segs[:, 2:]), np.maximum(segs[:, :2], segs[:, 2:])
    segs = segs[np.all((lo <= p + cap) & (hi >= p - cap), axis=1)]  # edges a ray can reach
    a, e = segs[:, :2], segs[:, 2:] - segs[:, :2]                 # edges x 2
    ap = a - p
    den = d[:, None, 0] * e[None, :, 1] - d[:, None, 1] * e[None, :, 0]
    with np.errstate(divide="ignore", invalid="ignore"):
        t = (ap[None, :, 0] * e[None, :, 1] - ap[None, :, 1] * e[None, :, 0]) / den
        s = (ap[None, :, 0] * d[:, None, 1] - ap[None, :, 1] * d[:, None, 0]) / den
    hit = (np.abs(den) > 1e-12) & (t >= 0) & (s >= -1e-9) & (s <= 1 + 1e-9)
    dist = np.where(hit, t, np.inf).min(axis=1, initial=np.inf)
    dist[dist > cap] = np.inf
    ends = p + d * np.minimum(dist, cap)[:, None]
    half = len(ang) // 2
    lengths = np.minimum(dist[:half] + dist[half:], 2 * cap)
    return lengths, np.stack([ends[:half], ends[half:]], axis=1)


def _ring_at(base: _Base, q: np.ndarray) -> tuple[int, float] | None:
    """The free-floor boundary ring through ``q`` and the distance along it, if any."""
    pt = Point(q)
    for i, ring in enumerate(base.rings):
        if ring.distance(pt) <= _RING_TOL:
            return i, ring.project(pt)
    return None


def _passage_width(base: _Base, p: np.ndarray, cap: float) -> float:
    """Width of the passage at ``p``: the shortest chord through it that is a constriction.

    A chord whose ends lie on the same boundary ring, less than :data:`_POCKET` times its own
    length apart along that ring, only cuts across a corner (a room corner gives at most
    sqrt 2) and is skipped; a chord between two pieces, or across a corridor, has ends far
    apart along the boundary or on different rings.
    """
    lengths, ends = _chords(base.edges, p, cap)
    for k in np.argsort(lengths):
        a, b = _ring_at(base, ends[k][0]), _ring_at(base, ends[k][1])
        if a is None or b is None or a[0] != b[0]:
            return float(lengths[k])
        along = abs(a[1] - b[1])
        along = min(along, base.rings[a[0]].length - along)
        if along >= _POCKET * lengths[k]:
            return float(lengths[k])
    return float(2 * cap)


def _half_plane_bound(segs: np.ndarray, p: np.ndarray, q: np.ndarray, reach: float) -> float:
    """A lower bound on the passage width at ``p``: ``d + d_h``, with ``d`` the distance to
    the nearest blocker point ``q`` and ``d_h`` the distance to the blockers' edges (``segs``)
    in the half-plane facing away from ``q`` (every chord has one half in that half-plane).
    Edges farther than ``reach`` are not looked at (the bound is then at least ``reach``)."""
    d = float(np.hypot(*(q - p)))
    lo, hi = np.minimum(segs[:, :2], segs[:, 2:]), np.maximum(segs[:, :2], segs[:, 2:])
    segs = segs[np.all((lo <= p + reach) & (hi >= p - reach), axis=1)]
    if d < 1e-6:
        return 0.0
    if not len(segs):
        return d + reach
    n = (p - q) / d                                   # away from the nearest blocker
    a, b = segs[:, :2], segs[:, 2:]
    sa, sb = (a - p) @ n, (b - p) @ n
    keep = (sa >= 0) | (sb >= 0)
    a, b, sa, sb = a[keep], b[keep], sa[keep], sb[keep]
    with np.errstate(divide="ignore", invalid="ignore"):
        t = np.where(sa != sb, sa / (sa - sb), 0.0)[:, None]
    cut = a + t * (b - a)
    a = np.where((sa < 0)[:, None], cut, a)
    b = np.where((sb < 0)[:, None], cut, b)
    e = b - a
    ee = np.einsum("ij,ij->i", e, e)
    with np.errstate(divide="ignore", invalid="ignore"):
        s = np.clip(np.where(ee > 0, np.einsum("ij,ij->i", p - a, e) / ee, 0.0), 0.0, 1.0)
    dist = np.hypot(*(a + s[:, None] * e - p).T)
    return d + (min(float(dist.min()), reach) if len(dist) else reach)


def _narrowest(space: _Space, points: Sequence[XY],
               known: tuple[float, XY] | None = None) -> tuple[float, XY]:
    """Least passage width along the route, or ``known`` (a doorway's width) if narrower.

    Branch and bound: the width at a point is at least twice its distance to the nearest
    blocker, so points whose bound reaches the best width so far are not measured.
    """
    pts = _samples(points, SAMPLE_STEP_MM)
    blockers = space.base.blocker_union
    near = shapely.shortest_line(shapely.points(pts), blockers)
    lower = 2 * shapely.length(near)
    ends = shapely.get_coordinates(shapely.get_point(near, 1))
    best, where = known if known is not None else (float(WIDTH_CAP_MM), tuple(pts[0]))
    for k in np.argsort(lower):
        if lower[k] >= best:
            break
        if _half_plane_bound(space.base.edges, pts[k], ends[k], best) >= best:
            continue
        w = _passage_width(space.base, pts[k], WIDTH_CAP_MM / 2)
        if w < best:
            best, where = w, (float(pts[k][0]), float(pts[k][1]))
    return best, where


def _doors_passed(space: _Space, points: Sequence[XY]) -> list[tuple[str, int, XY]]:
    """Doorways the route crosses, in order along it, with their widths and centres."""
    if len(points) < 2:
        return []
    line = LineString(points)
    found = []
    for did, w, rect in space.base.openings:
        if line.intersects(rect):
            c = rect.centroid
            found.append((line.project(c), did, w, (c.x, c.y)))
    return [(did, w, c) for _, did, w, c in sorted(found)]


def _turns(points: Sequence[XY]) -> int:
    pts: list[XY] = []
    for p in points:
        if not pts or math.dist(pts[-1], p) > _MERGE:
            pts.append(p)
    count = 0
    for a, b, c in zip(pts, pts[1:], pts[2:], strict=False):
        h0 = math.atan2(b[1] - a[1], b[0] - a[0])
        h1 = math.atan2(c[1] - b[1], c[0] - b[0])
        turn = abs((h1 - h0 + math.pi) % (2 * math.pi) - math.pi)
        count += math.degrees(turn) > TURN_DEGREES
    return count


def _between(space: _Space, where: XY) -> tuple[str, ...]:
    """Ids of the two blockers nearest ``where`` (the sides of a narrow point)."""
    pt = Point(where)
    ranked = sorted((g.distance(pt), bid) for bid, g in space.base.blockers)
    out: list[str] = []
    for _, bid in ranked:
        if bid not in out:
            out.append(bid)
        if len(out) == 2:
            break
    return tuple(out)


def _length(points: Sequence[XY]) -> float:
    return sum(math.dist(a, b) for a, b in zip(points, points[1:], strict=False))


def _best_route(plan: Plan, space: _Space, origin: str | XY, target: str | XY,
                explain: bool = True) -> tuple[list[XY], list[XY]]:
    """The shortest route between two places: (walkway part, full route with end steps)."""
    starts, ends = _place(plan, space, origin), _place(plan, space, target)
    best: tuple[float, list[XY], list[XY]] | None = None
    for a in starts:
        for b in ends:
            if a.part != b.part:
                continue
            core = _shortest(space, a, b)
            full = ([a.step] if a.step else []) + core + ([b.step] if b.step else [])
            length = _length(full)
            if best is None or length < best[0]:
                best = (length, core, full)
    if best is None:
        raise _Unreachable(_why_apart(plan, space, origin, target) if explain else "")
    return best[1], best[2]


def _pinch_space(space: _Space) -> _Space | None:
    """The walkway at ``route.pinch_width`` when the rule set allows a short narrower stretch
    (2010 ADA §403.5.1: 32 in for at most 24 in), built once; None when it allows none."""
    rules = space.base.rules
    if not (rules.has("route.pinch_width") and rules.has("route.pinch_length")):
        return None
    pinch, length = rules.mm("route.pinch_width"), rules.mm("route.pinch_length")
    if pinch >= space.width or length <= 0:
        return None
    if space.pinch is None:
        space.pinch = _build_space(space.base, float(pinch))
    return space.pinch


def _trip(plan: Plan, space: _Space, trip: Trip, origin: str | XY,
          target: str | XY) -> TripScore:
    base = {"origin": trip.origin, "target": trip.target, "label": trip.label,
            "per_day": trip.per_day, "night": trip.night}
    name = trip.label or f"{trip.origin} to {trip.target}"
    flags: list[str] = []
    route_width = space.width
    try:
        core, points = _best_route(plan, space, origin, target)
    except _Unreachable as e:
        narrower = _pinch_space(space)
        try:
            if narrower is None:
                raise
            core, points = _best_route(plan, narrower, origin, target, explain=False)
        except _Unreachable:
            night = (f"night route {name}: unreachable ({e})",) if trip.night else ()
            return TripScore(**base, reachable=False, reason=str(e), flags=night)
        length = space.base.rules.mm("route.pinch_length")
        flags.append(f"{name}: only passable at the {narrower.width:.0f} mm pinch width, "
                     f"allowed for at most {length} mm (the audit checks the length)")
        space = narrower
    doors = _doors_passed(space, points)
    door = min(((float(dw), c) for _, dw, c in doors), default=None)
    width, where = _narrowest(space, core, door)
    length = _length(points)
    if trip.night and length > NIGHT_LONG_MM:
        flags.append(f"night route {name}: {length / 1000:.1f} m, longer than "
                     f"{NIGHT_LONG_MM / 1000:.0f} m (common practice)")
    if trip.night and width < route_width:
        flags.append(f"night route {name}: narrows to {width:.0f} mm, under the "
                     f"{route_width:.0f} mm route width")
    return TripScore(
        **base, reachable=True, length_mm=length, points=tuple(points),
        narrowest_mm=width, narrowest_at=where, narrowest_between=_between(space, where),
        turns=_turns(points), doors=tuple(d for d, _, _ in doors), flags=tuple(flags),
    )


def _blocked_doors(space: _Space) -> list[str]:
    """Sentences naming the doorways furniture or fittings stand in."""
    out = []
    for did, rect in space.base.doorways:
        ids = [bid for bid, g in space.base.blockers[1:] if g.intersection(rect).area > 1]
        if ids:
            out.append(f"door {did!r} is blocked by {' and '.join(ids)}")
    return out


def _why_apart(plan: Plan, space: _Space, origin: str | XY, target: str | XY) -> str:
    """Plain words for two places the walkway does not join: the widest way that does
    (found by bisection on the body width to within 20 mm), or the doorways that are shut."""

    def way(width: float) -> list[XY] | None:
        try:
            core, _ = _best_route(plan, _build_space(space.base, width), origin, target,
                                  explain=False)
        except _Unreachable:
            return None
        return core

    head = f"no way {space.width:.0f} mm wide joins them"
    lo, hi = _MIN_WAY, space.width
    found = way(lo)
    if found is None:
        blocked = _blocked_doors(space)
        return head + ("; " + "; ".join(blocked) if blocked else "; they are walled apart")
    while hi - lo > _MIN_WAY:
        mid = (lo + hi) / 2
        better = way(mid)
        lo, hi, found = (mid, hi, better) if better else (lo, mid, found)
    width, where = _narrowest(space, found)
    sides = " and ".join(_between(space, where))
    return (f"{head}; the widest way is about {width:.0f} mm, at "
            f"({where[0]:.0f}, {where[1]:.0f}) between {sides}")


# --- routines -------------------------------------------------------------------------------


def default_routines(plan: Plan) -> tuple[Trip, ...]:
    """Trips assumed when a plan has no routine, where their places exist (common practice).

    Bed to WC at night once a day; kitchen to dining table 6 times; entrance to kitchen once;
    sofa to kitchen 4 times. The kitchen is the first ``kitchen_run`` fitting, else the first
    room used as a kitchen; bed, sofa and dining table the first placed piece of that
    catalogue category.
    """
    categories: dict[str, str] = {}
    try:
        from roomfit.rules.catalog import load_catalog

        catalog = load_catalog()
    except Exception:  # noqa: BLE001 - a broken catalogue only loses the defaults
        catalog = {}
    for p in plan.furniture:
        cat = catalog[p.type].category if p.type in catalog else p.type
        if p.placement is not None and cat not in categories:
            categories[cat] = p.id
    wc = next((f.id for f in plan.fixtures if f.kind == "wc"), None)
    kitchen = next((f.id for f in plan.fixtures if f.kind == "kitchen_run"), None)
    kitchen = kitchen or next((r.id for r in plan.rooms if r.use == "kitchen"), None)
    entrance = "entrance" if any(d.is_entrance for d in plan.doors) else None
    bed, sofa, table = (categories.get(c) for c in ("bed", "sofa", "dining_table"))
    wanted = [
        (bed, wc, 1.0, "Bed to WC at night", True),
        (kitchen, table, 6.0, "Kitchen to table", False),
        (entrance, kitchen, 1.0, "Entrance to kitchen", False),
        (sofa, kitchen, 4.0, "Sofa to kitchen", False),
    ]
    return tuple(Trip(a, b, n, label, night) for a, b, n, label, night in wanted if a and b)


def routines_for(plan: Plan) -> tuple[tuple[Trip, ...], bool]:
    """The plan's routine, or the defaults; the flag says whether defaults were used."""
    return (plan.routines, False) if plan.routines else (default_routines(plan), True)


def route(plan: Plan, rules: RuleSet, origin: str | XY, target: str | XY,
          width: float | None = None) -> TripScore:
    """The shortest route between two places (names or plan points) of the as-is layout.

    ``width`` is the body width (mm), by default the rule set's ``route.width``.

    >>> from roomfit.plan.data import Room, Plan
    >>> from roomfit.rules.sets import load_ruleset
    >>> plan = Plan("empty", (Room("r", "R", "living", ((0, 0), (4000, 0), (4000, 3000), (0, 3000))),))
    >>> round(route(plan, load_ruleset("everyday"), (1000, 1000), (3000, 2000)).length_mm, 1)
    2236.1
    """
    space = _build_space(_build_base(plan, rules), float(width or rules.mm("route.width")))
    trip = Trip(_name(origin), _name(target), 1.0)
    return _trip(plan, space, trip, origin, target)


def _name(place: str | XY) -> str:
    return place if isinstance(place, str) else f"({place[0]:.0f}, {place[1]:.0f})"


def score_routes(plan: Plan, rules: RuleSet) -> RouteScores:
    """Route every routine trip of ``plan``'s as-is layout and total the walking.

    Pieces without a placement are not on the floor; a trip to one is unreachable.
    """
    width = rules.mm("route.width")
    space = _build_space(_build_base(plan, rules), float(width))
    trips, defaults = routines_for(plan)
    scored = tuple(_trip(plan, space, t, t.origin, t.target) for t in trips)
    reach = [t for t in scored if t.reachable]
    narrow = min(reach, key=lambda t: t.narrowest_mm or 0.0, default=None)
    flags = tuple(f for t in scored for f in t.flags)
    return RouteScores(
        trips=scored,
        route_width=width,
        walking_m_per_day=sum(t.metres_per_day for t in reach),
        narrowest_mm=narrow.narrowest_mm if narrow else None,
        narrowest_at=narrow.narrowest_at if narrow else None,
        narrowest_trip=narrow.name if narrow else None,
        flags=flags,
        defaults=defaults,
    )
