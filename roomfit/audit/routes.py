"""Walking routes through an arrangement, and the daily routine's walking cost.

Whether a trip can be made at all is the walkway engine's verdict
(:mod:`roomfit.audit.walkway`, the same one the audit's ``route.trip`` gives): a person of
the rule set's ``route.width`` is a disc; its centre may go where the free floor shrunk by
the radius (round joins) reaches, and doorways join the parts of two rooms. This module
finds the shortest route inside those parts and measures it.

Shortest routes are Euclidean shortest paths inside each part, a polygon with holes: such a
path bends only at reflex vertices of the polygon, so a visibility graph on those vertices,
the door mouths and the two end points, searched with Dijkstra's algorithm, finds it
(Lozano-Perez and Wesley 1979, "An algorithm for planning collision-free paths among
polyhedral obstacles", CACM 22(10); de Berg et al., *Computational Geometry*, 3rd ed.,
ch. 15). Its size is bounded: a part with more than :data:`MAX_CORNERS` reflex vertices is
simplified first (Douglas-Peucker, tolerance doubled from 2 mm until it has at most that
many), so scoring costs at most ``MAX_CORNERS ** 2`` segment tests per part however many
vertices the room has; routes then stay within the tolerance of the walkway (reported by
:func:`scoring_detail`). ``docs/routes.md`` says why we chose this over a grid.

A route passes a doorway straight through its mouths (the points half a route width in
front of the door on either side). Its narrowest width is measured along it by chords
(:mod:`roomfit.audit.passage`), never more than the width of a doorway it passes.

Places a trip can start or end at: ``"entrance"``, a door id, a room id (the centre of
the largest circle in its free floor), a fitting id (its zone, else beside it), a piece id
(each of its use zones: the trip takes the nearest one; without zones, beside it), or a plan
point. A use zone is served as the audit serves it (one full side adjoins the walkway, or
another clear zone that does), and the route ends with a last step to the zone's middle.
Where the rule set allows a short stretch at ``route.pinch_width``, a trip with no way at
the full width is routed through the pinch walkway and flagged.

Worked example, checked by hand: in an empty 4000 x 3000 mm room, the route from
(1000, 1000) to (3000, 2000) is the straight line, sqrt(2000**2 + 1000**2) = 2236.1 mm.
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass, field
from typing import Any

import networkx as nx
import numpy as np
import shapely
from shapely import LineString, Point, Polygon
from shapely.geometry.base import BaseGeometry
from shapely.geometry.polygon import orient
from shapely.ops import nearest_points

from roomfit.audit.circulation import trip_finding
from roomfit.audit.geometry import DoorShape
from roomfit.audit.marks import Path
from roomfit.audit.passage import SAMPLE_STEP_MM, WIDTH_CAP_MM, Passages, between, doors_passed
from roomfit.audit.passage import narrowest as _narrowest
from roomfit.audit.passage import passages as _passages
from roomfit.audit.pinch import pinch_walkway
from roomfit.audit.routines import default_routines, routines_for
from roomfit.audit.walkway import (
    Floor,
    PlaceKind,
    Target,
    Walkway,
    erosion,
    floor_of,
    place_target,
    room_at,
    roots_in,
    walkway,
)
from roomfit.plan.data import Plan, Trip
from roomfit.rules.sets import RuleSet

__all__ = [
    "NIGHT_LONG_MM",
    "SAMPLE_STEP_MM",
    "WIDTH_CAP_MM",
    "TURN_DEGREES",
    "MAX_CORNERS",
    "TripScore",
    "RouteScores",
    "default_routines",
    "routines_for",
    "route",
    "score_routes",
    "scoring_detail",
]

#: A night route longer than this (mm) is flagged. Common practice: 10 m.
NIGHT_LONG_MM = 10_000

#: A change of direction by more than this many degrees counts as a turn.
TURN_DEGREES = 30

#: Most reflex vertices of one walkway part in the visibility graph (the declared bound on
#: route scoring: a part with more is simplified first).
MAX_CORNERS = 300

_TOL = 0.5          # mm: segments within this of a walkway part count as inside it
_MERGE = 5.0        # mm: path points closer than this are merged before counting turns
_BEND = 100.0       # mm: a route is simplified to within this before counting turns, so a
                    # bend round the arc of a corner counts once
_SIMPLIFY = 2.0     # mm: first simplification tolerance for a part with too many corners

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


@dataclass
class _Space:
    """One walkway and its visibility graph (private, mutable)."""

    floor: Floor
    st: Walkway
    passages: Passages
    graph: nx.Graph = field(default_factory=nx.Graph)
    nodes: dict[object, XY] = field(default_factory=dict)
    part_nodes: dict[int, list[object]] = field(default_factory=dict)
    cover: dict[int, BaseGeometry] = field(default_factory=dict)
    simplified: float = 0.0   # largest simplification tolerance used (mm)

    @property
    def width(self) -> float:
        return self.st.width


def _reflex_vertices(poly: BaseGeometry) -> list[XY]:
    """Vertices where the polygon's interior angle exceeds 180 degrees."""
    out: list[XY] = []
    for p in getattr(poly, "geoms", [poly]):
        if not isinstance(p, Polygon) or p.is_empty:
            continue
        p = orient(p, 1.0)  # interior on the left of every ring
        for ring in [p.exterior, *p.interiors]:
            pts = list(ring.coords)[:-1]
            k = len(pts)
            for i in range(k):
                (ax, ay), (vx, vy), (bx, by) = pts[i - 1], pts[i], pts[(i + 1) % k]
                if (vx - ax) * (by - vy) - (vy - ay) * (bx - vx) < -1e-9:
                    out.append((vx, vy))
    return out


def _corners(part: Polygon, slack: float) -> tuple[list[XY], BaseGeometry, float]:
    """The part's reflex vertices (at most :data:`MAX_CORNERS`, simplifying as needed), the
    floor a segment must stay in, and the simplification tolerance used (0 when none)."""
    verts, tol = _reflex_vertices(part), 0.0
    shape: BaseGeometry = part
    while len(verts) > MAX_CORNERS:
        tol = tol * 2 if tol else _SIMPLIFY
        shape = part.simplify(tol, preserve_topology=True)
        verts = _reflex_vertices(shape)
    return verts, shape.buffer(tol + _TOL + slack, join_style="mitre"), tol


def _link(space: _Space, key: object, p: XY, part: int, weight0: float = 0.0) -> None:
    """Add node ``key`` at ``p`` in walkway part ``part``, with edges to every node of the
    part it sees."""
    g = space.graph
    space.nodes[key] = p
    g.add_node(key)
    others = space.part_nodes.setdefault(part, [])
    if others:
        arr = np.asarray([space.nodes[o] for o in others], dtype=float).reshape(-1, 2)
        segs = shapely.linestrings(np.stack([np.broadcast_to(p, arr.shape), arr], axis=1))
        ok = shapely.covers(space.cover[part], segs)
        d = np.hypot(*(arr - np.asarray(p)).T)
        g.add_weighted_edges_from((key, others[k], float(d[k]) + weight0)
                                  for k in np.flatnonzero(ok))
    others.append(key)


def _build_space(floor: Floor, st: Walkway, pas: Passages) -> _Space:
    """The visibility graph of walkway ``st``: reflex corners of each part, and each door's
    two mouths joined to the parts near them and to each other."""
    space = _Space(floor, st, pas)
    g = space.graph
    for i, (_, part) in enumerate(st.comps):
        verts, space.cover[i], tol = _corners(part, st.slack)
        space.simplified = max(space.simplified, tol)
        shapely.prepare(space.cover[i])
        keys = [("v", i, k) for k in range(len(verts))]
        space.nodes.update(zip(keys, verts, strict=True))
        space.part_nodes[i] = list(keys)
        g.add_nodes_from(keys)
        if len(verts) >= 2:
            arr = np.asarray(verts)
            ii, jj = np.triu_indices(len(verts), k=1)
            ok = np.asarray(shapely.covers(
                space.cover[i], shapely.linestrings(np.stack([arr[ii], arr[jj]], axis=1))),
                dtype=bool)
            lengths = np.hypot(*(arr[ii] - arr[jj]).T)
            g.add_weighted_edges_from((keys[a], keys[b], float(w)) for a, b, w, keep
                                      in zip(ii, jj, lengths, ok, strict=True) if keep)
    for ds in floor.doors:
        _door_links(space, ds)
    return space


def _door_links(space: _Space, ds: DoorShape) -> None:
    """Join a door's two sides in the graph: mouth points across the opening (its centre,
    and where the doorway is wider than the body its two ends less a radius), each linked
    to the walkway parts near the door's mouth on its side and to its twin on the other."""
    st, d = space.st, ds.door
    a, b = ds.opening.coords[0], ds.opening.coords[-1]
    u = ((b[0] - a[0]) / d.width, (b[1] - a[1]) / d.width)
    slide = d.width / 2 - erosion(st.width)
    offsets = [0.0] + ([-slide, slide] if slide > 1.0 else [])
    sides = [rid for rid in d.rooms if (d.id, rid) in st.mouths]
    for rid in sides:
        m, idx = st.mouths[(d.id, rid)]
        for k, s in enumerate(offsets):
            key = ("m", d.id, rid, k)
            space.nodes[key] = (m.x + u[0] * s, m.y + u[1] * s)
            space.graph.add_node(key)
            for i in idx:
                q = nearest_points(st.comps[i][1], Point(space.nodes[key]))[0]
                _link(space, ("q", d.id, rid, k, i), (q.x, q.y), i)
                space.graph.add_edge(("q", d.id, rid, k, i), key,
                                     weight=math.dist((q.x, q.y), space.nodes[key]))
    if len(sides) == 2:
        for k in range(len(offsets)):
            one, two = ("m", d.id, sides[0], k), ("m", d.id, sides[1], k)
            space.graph.add_edge(one, two, weight=math.dist(space.nodes[one], space.nodes[two]))


def _zone_point(zone: BaseGeometry) -> XY:
    c = zone.centroid
    if not zone.covers(c):
        c = zone.representative_point()
    return (c.x, c.y)


def _ends(space: _Space, t: Target, roots: set[int]) -> list[tuple[int, XY, XY | None]]:
    """Where a route to ``t`` may end in the walkway: (part, point on it, last step off it)
    for every part of the joined sets ``roots`` that serves ``t``."""
    st = space.st
    if t.kind is PlaceKind.DOOR and t.door is not None:
        m, idx = st.mouths[(t.door, t.room)]
        centre = (t.geom.x, t.geom.y) if isinstance(t.geom, Point) else None
        ends = []
        for i in idx:
            if st.root[i] in roots:
                q = nearest_points(st.comps[i][1], m)[0]
                ends.append((i, (q.x, q.y), centre))
        return ends
    out: list[tuple[int, XY, XY | None]] = []
    if t.kind is PlaceKind.BESIDE:
        for i in st.near(t.room, t.geom, t.depth):
            if st.root[i] in roots:
                q = nearest_points(st.comps[i][1], t.geom)[0]
                out.append((i, (q.x, q.y), None))
        return out
    if t.kind is PlaceKind.ZONE:
        idx = st.within(t.room, t.geom, st.side_reach())
        aim = _zone_point(t.geom)
    else:
        idx = st.near(t.room, t.geom, t.depth)
        aim = _aim(space, t)
    for i in idx:
        if st.root[i] in roots:
            q = nearest_points(st.comps[i][1], Point(aim))[0]
            out.append((i, (q.x, q.y), aim if q.distance(Point(aim)) > 1e-6 else None))
    return out


def _aim(space: _Space, t: Target) -> XY:
    """The point a route to a point-like place aims at: the point itself, or for a room
    the centre of the largest circle in its free floor."""
    if isinstance(t.geom, Point):
        return (t.geom.x, t.geom.y)
    big = max(getattr(t.geom, "geoms", [t.geom]), key=lambda g: g.area)
    return shapely.maximum_inscribed_circle(big, 1.0).coords[0]


def _shortest(space: _Space, a: Target, b: Target) -> list[XY] | None:
    """The shortest route from ``a`` to ``b`` in this walkway, with its end steps; None
    when the walkway does not join them."""
    common = roots_in(space.floor, space.st, a) & roots_in(space.floor, space.st, b)
    if not common:
        return None
    starts, ends = _ends(space, a, common), _ends(space, b, common)
    g = space.graph
    added: list[Any] = ["A", "B"]
    try:
        g.add_nodes_from(["A", "B"])
        for tag, pts, hub in (("s", starts, "A"), ("e", ends, "B")):
            for n, (i, p, step) in enumerate(pts):
                key = (tag, n)
                added.append(key)
                _link(space, key, p, i)
                off = math.dist(p, step) if step else 0.0
                g.add_edge(hub, key, weight=off)
        for n, (i, p, _) in enumerate(starts):
            for m, (j, q, _) in enumerate(ends):
                if i == j and shapely.covers(space.cover[i], LineString([p, q])):
                    g.add_edge(("s", n), ("e", m), weight=math.dist(p, q))
        path = nx.dijkstra_path(g, "A", "B")
        core = [space.nodes[k] for k in path[1:-1]]
    except nx.NetworkXNoPath:
        # the walkway joins them (its verdict stands), but a numerical sliver parts the
        # graph: take the straight line between the nearest ends as the route
        if not starts or not ends:
            return None
        core = [starts[0][1], ends[0][1]]
        path = ["A", ("s", 0), ("e", 0), "B"]
    finally:
        for key in added:
            if isinstance(key, tuple) and key in space.nodes:
                for nodes in space.part_nodes.values():
                    if key in nodes:
                        nodes.remove(key)
                del space.nodes[key]
        g.remove_nodes_from(added)
    first, last = starts[path[1][1]], ends[path[-2][1]]
    return ([first[2]] if first[2] else []) + core + ([last[2]] if last[2] else [])


def _length(points: Sequence[XY]) -> float:
    return sum(math.dist(a, b) for a, b in zip(points, points[1:], strict=False))


def _turns(points: Sequence[XY]) -> int:
    """Changes of heading by more than :data:`TURN_DEGREES` along the route, simplified to
    within :data:`_BEND` first (Douglas-Peucker)."""
    if len(points) > 2:
        points = [(float(c[0]), float(c[1])) for c in LineString(points).simplify(_BEND).coords]
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


def _targets_of(floor: Floor, place: str | XY) -> list[Target]:
    if isinstance(place, str):
        return place_target(floor, place)
    p = Point(float(place[0]), float(place[1]))
    room = room_at(floor, p)
    return [Target(f"point {_name(place)}", room, p, 0.0, ())] if room else []


def _route_in(space: _Space, a: list[Target], b: list[Target]) -> list[XY] | None:
    """The shortest route between any place of ``a`` and any of ``b`` in this walkway."""
    best: list[XY] | None = None
    for x in a:
        for y in b:
            pts = _shortest(space, x, y)
            if pts is not None and (best is None or _length(pts) < _length(best)):
                best = pts
    return best


@dataclass
class _Scorer:
    """The walkways of one arrangement, built when first asked for."""

    floor: Floor
    passages: Passages
    spaces: dict[str, _Space] = field(default_factory=dict)

    def space(self, which: str) -> _Space | None:
        if which not in self.spaces:
            if which == "full":
                st = walkway(self.floor, self.floor.rules.get("route.width").exact_mm)
            else:
                narrow = pinch_walkway(self.floor)
                if narrow is None:
                    return None
                st = narrow[0]
            self.spaces[which] = _build_space(self.floor, st, self.passages)
        return self.spaces[which]


def _trip(sc: _Scorer, trip: Trip, origin: str | XY, target: str | XY) -> TripScore:
    base: dict[str, Any] = {"origin": trip.origin, "target": trip.target, "label": trip.label,
                            "per_day": trip.per_day, "night": trip.night}
    name = trip.label or f"{trip.origin} to {trip.target}"
    a, b = _targets_of(sc.floor, origin), _targets_of(sc.floor, target)
    space = sc.space("full")
    assert space is not None
    route_width = space.width
    points = _route_in(space, a, b) if a and b else None
    flags: list[str] = []
    if points is None:
        narrow = sc.space("pinch") if a and b else None
        points = _route_in(narrow, a, b) if narrow is not None else None
        if points is None or narrow is None:
            why = _why(sc.floor, trip, origin, target, a, b)
            night = (f"night route {name}: unreachable ({why})",) if trip.night else ()
            return TripScore(**base, reachable=False, reason=why, flags=night)
        flags.append(f"{name}: only passable through narrow stretches of at least "
                     f"{narrow.width:.0f} mm, as long as the rule set allows")
        space = narrow
    doors = doors_passed(sc.passages, points)
    door = min(((float(dw), c) for _, dw, c in doors), default=None)
    width, where = _narrowest(sc.passages, points, door)
    length = _length(points)
    if trip.night and length > NIGHT_LONG_MM:
        flags.append(f"night route {name}: {length / 1000:.1f} m, longer than "
                     f"{NIGHT_LONG_MM / 1000:.0f} m (common practice)")
    if trip.night and width < route_width - 1:
        flags.append(f"night route {name}: narrows to {width:.0f} mm, under the "
                     f"{route_width:.0f} mm route width")
    return TripScore(
        **base, reachable=True, length_mm=length, points=tuple(points),
        narrowest_mm=width, narrowest_at=where, narrowest_between=between(sc.passages, where),
        turns=_turns(points), doors=tuple(d for d, _, _ in doors), flags=tuple(flags),
    )


def _why(floor: Floor, trip: Trip, origin: str | XY, target: str | XY, a: list[Target],
         b: list[Target]) -> str:
    """Plain words for a trip that cannot be made: the audit's own ``route.trip`` wording."""
    if not a or not b:
        missing = origin if not a else target
        if isinstance(missing, str) and missing == "entrance":
            return "the plan has no entrance door"
        if isinstance(missing, str) and any(p.id == missing for p in floor.plan.furniture):
            return f"piece {missing!r} has no placement"
        return f"no place named {missing!r} in the plan"
    found = trip_finding(floor, Trip(_name(origin), _name(target), trip.per_day, trip.label,
                                     trip.night), floor.rules.get("route.width").exact_mm, a, b)
    return found.message.split(": ", 1)[-1]


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
    floor = floor_of(plan, rules)
    sc = _Scorer(floor, _passages(floor))
    if width is not None and not math.isclose(width, rules.get("route.width").exact_mm):
        st = walkway(floor, float(width))
        sc.spaces["full"] = _build_space(floor, st, sc.passages)
    return _trip(sc, Trip(_name(origin), _name(target), 1.0), origin, target)


def _name(place: str | XY) -> str:
    return place if isinstance(place, str) else f"({place[0]:.0f}, {place[1]:.0f})"


def scoring_detail(plan: Plan, rules: RuleSet) -> dict[str, float]:
    """What route scoring builds for ``plan`` (for the benchmark): walkway parts, graph
    nodes and edges, the most reflex corners in one part and the simplification tolerance
    used (mm, 0 when none)."""
    floor = floor_of(plan, rules)
    sc = _Scorer(floor, _passages(floor))
    space = sc.space("full")
    assert space is not None
    return {"parts": float(len(space.st.comps)), "nodes": float(space.graph.number_of_nodes()),
            "edges": float(space.graph.number_of_edges()),
            "simplified_mm": max(space.simplified, floor.simplified_mm)}


def score_routes(plan: Plan, rules: RuleSet) -> RouteScores:
    """Route every routine trip of ``plan``'s as-is layout and total the walking.

    Pieces without a placement are not on the floor; a trip to one is unreachable.
    """
    floor = floor_of(plan, rules)
    sc = _Scorer(floor, _passages(floor))
    trips, defaults = routines_for(plan)
    scored = tuple(_trip(sc, t, t.origin, t.target) for t in trips)
    reach = [t for t in scored if t.reachable]
    narrow = min(reach, key=lambda t: t.narrowest_mm or 0.0, default=None)
    flags = tuple(f for t in scored for f in t.flags)
    return RouteScores(
        trips=scored,
        route_width=rules.mm("route.width"),
        walking_m_per_day=sum(t.metres_per_day for t in reach),
        narrowest_mm=narrow.narrowest_mm if narrow else None,
        narrowest_at=narrow.narrowest_at if narrow else None,
        narrowest_trip=narrow.name if narrow else None,
        flags=flags,
        defaults=defaults,
    )
