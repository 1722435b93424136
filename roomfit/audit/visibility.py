"""Shortest routes inside the walkway: a visibility graph searched with Dijkstra's algorithm.

Shortest routes are Euclidean shortest paths inside each walkway part (a polygon with
holes): such a path bends only at reflex vertices of the polygon, so a visibility graph on
those vertices, the door mouths and the two end points, searched with Dijkstra's algorithm,
finds it (Lozano-Perez and Wesley 1979, "An algorithm for planning collision-free paths
among polyhedral obstacles", CACM 22(10); de Berg et al., *Computational Geometry*, 3rd
ed., ch. 15). Its size is bounded: a part with more than :data:`MAX_CORNERS` reflex
vertices is simplified first (Douglas-Peucker, tolerance doubled from 2 mm until it has at
most that many), so a graph costs at most ``MAX_CORNERS ** 2`` segment tests per part
however many vertices the room has; routes then stay within the tolerance of the walkway.

A route passes a doorway straight through its mouths (the points half a route width in
front of the door on either side: its centre, and where the doorway is wider than the body
its two ends less a radius). It ends at the place's aim (:attr:`Target.aim`, the one rule
of :mod:`roomfit.audit.places`) with a last step off the walkway when the aim lies on the
place's free floor, else at the walkway's nearest point to it.

Which places the walkway joins is not decided here: a route is sought only between places
the walkway engine already joins.
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

from roomfit.audit.geometry import DoorShape
from roomfit.audit.places import PlaceKind, Target, roots_in
from roomfit.audit.walkway import Floor, Walkway, erosion

__all__ = ["MAX_CORNERS", "Way", "Space", "build_space", "route_in", "path_length"]

#: Most reflex vertices of one walkway part in the visibility graph (the declared bound on
#: route scoring: a part with more is simplified first).
MAX_CORNERS = 300

_TOL = 0.5          # mm: segments within this of a walkway part count as inside it
_SIMPLIFY = 2.0     # mm: first simplification tolerance for a part with too many corners

XY = tuple[float, float]


@dataclass(frozen=True)
class Way:
    """A route from place to place: ``points`` from one end to the other, ``walked`` the part
    of it on the walkway (without the last steps off it: onto a door's centre, into a clear
    floor space's middle, which the audit judges at its own size)."""

    points: tuple[XY, ...]
    walked: tuple[XY, ...]

    @property
    def length(self) -> float:
        return path_length(self.points)


@dataclass
class Space:
    """One walkway and its visibility graph (mutable: a route's two ends are added while it
    is sought and taken out after). ``cover``: per part, the floor a segment must stay in;
    ``simplified``: the largest simplification tolerance used (mm, 0 when none)."""

    floor: Floor
    st: Walkway
    graph: nx.Graph = field(default_factory=nx.Graph)
    nodes: dict[object, XY] = field(default_factory=dict)
    part_nodes: dict[int, list[object]] = field(default_factory=dict)
    cover: dict[int, BaseGeometry] = field(default_factory=dict)
    simplified: float = 0.0

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


def _link(space: Space, key: object, p: XY, part: int, weight0: float = 0.0) -> None:
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


def build_space(floor: Floor, st: Walkway) -> Space:
    """The visibility graph of walkway ``st``: reflex corners of each part, and each door's
    two mouths joined to the parts near them and to each other."""
    space = Space(floor, st)
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


def _door_links(space: Space, ds: DoorShape) -> None:
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


def _ends(space: Space, t: Target, roots: set[int]) -> list[tuple[int, XY, XY | None]]:
    """Where a route to ``t`` may end in the walkway: (part, point on it, last step off it)
    for every part of the joined sets ``roots`` that serves ``t``: a door side at the
    walkway's point nearest its mouth, then a step to the door's centre; a piece without
    zones beside it; any other place at the walkway's point nearest its aim, then a step to
    the aim when it lies on the place's own floor."""
    st = space.st
    aim = _aim(t)
    if t.kind is PlaceKind.DOOR and t.door is not None:
        m, idx = st.mouths[(t.door, t.room)]
        return [(i, _nearest(st, i, m), aim) for i in idx if st.root[i] in roots]
    if t.kind is PlaceKind.BESIDE:
        return [(i, _nearest(st, i, t.geom), None) for i in st.near(t.room, t.geom, t.depth)
                if st.root[i] in roots]
    if t.kind is PlaceKind.ZONE:
        idx = st.within(t.room, t.geom, st.side_reach())
    else:
        idx = st.near(t.room, t.geom, t.depth)
    step = aim if t.geom.covers(Point(aim)) else None
    out: list[tuple[int, XY, XY | None]] = []
    for i in idx:
        if st.root[i] in roots:
            q = _nearest(st, i, Point(aim))
            out.append((i, q, step if step and math.dist(q, step) > 1e-6 else None))
    return out


def _nearest(st: Walkway, part: int, g: BaseGeometry) -> XY:
    """The point of walkway part ``part`` nearest ``g``."""
    q = nearest_points(st.comps[part][1], g)[0]
    return (q.x, q.y)


def _aim(t: Target) -> XY:
    """Where a route to ``t`` ends: its aim (:attr:`Target.aim`), else the point itself,
    else a point of its shape."""
    if t.aim is not None:
        return t.aim
    c = t.geom if isinstance(t.geom, Point) else t.geom.representative_point()
    return (c.x, c.y)


def _shortest(space: Space, a: Target, b: Target) -> Way | None:
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
    return Way(tuple(([first[2]] if first[2] else []) + core + ([last[2]] if last[2] else [])),
               tuple(core))


def path_length(points: Sequence[XY]) -> float:
    """Length (mm) of a polyline."""
    return sum(math.dist(a, b) for a, b in zip(points, points[1:], strict=False))


def route_in(space: Space, a: list[Target], b: list[Target]) -> Way | None:
    """The shortest route between any place of ``a`` and any of ``b`` in this walkway."""
    best: Way | None = None
    for x in a:
        for y in b:
            way = _shortest(space, x, y)
            if way is not None and (best is None or way.length < best.length):
                best = way
    return best

