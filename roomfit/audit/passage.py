"""How wide a walking route is where it runs: chords between the blockers (walls, fittings,
furniture) through points of the route.

The width of a route at a point is the shortest chord through that point between two
blockers, searched in 5 degree steps: in a gap between two parallel faces it is the gap,
whichever way the route crosses it. Chords that only cut across a corner (their ends lie
close together along the boundary) are not passages and are skipped. The narrowest width
of a route is the least such width along it, sampled every 50 mm or less, and never more
than the width of a doorway it passes. This measures a route already found; whether a way
exists at all is the walkway engine's verdict (:mod:`roomfit.audit.walkway`).
"""

from __future__ import annotations

import math
from collections.abc import Sequence
from dataclasses import dataclass

import numpy as np
import shapely
from shapely import LineString, Point, Polygon
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit.walkway import Floor

__all__ = ["SAMPLE_STEP_MM", "WIDTH_CAP_MM", "Passages", "passages", "narrowest", "between",
           "doors_passed", "samples"]

#: Widths along a route are sampled at least this often (mm).
SAMPLE_STEP_MM = 50

#: Widths are measured up to this much (mm); wider is reported as this value.
WIDTH_CAP_MM = 3_000

_TOL = 0.5          # mm: the free floor's boundary is carved this far from the walls
_CHORD_STEP = 5     # degrees between chord directions when measuring width
_POCKET = 2.0       # a chord cutting off less boundary than this many times its length is a corner
_RING_TOL = 2.0     # mm: a chord end this close to a boundary ring lies on it

XY = tuple[float, float]


@dataclass
class Passages:
    """The blockers of one arrangement, ready for width measures (private fields)."""

    blockers: list[tuple[str, BaseGeometry]]  # walls, fittings, furniture with ids
    blocker_union: BaseGeometry
    edges: np.ndarray                         # straight edges of the blockers (x0, y0, x1, y1)
    rings: list[LineString]                   # boundary rings of the free floor, walls carved
    openings: list[tuple[str, int, Polygon]]  # door id, width, the opening (crossing test)


def _frame(at: XY, u: XY, n: XY, u0: float, u1: float, n0: float, n1: float) -> Polygon:
    """Rectangle ``u0..u1`` along ``u`` and ``n0..n1`` along ``n`` from ``at``."""
    pts = [(at[0] + u[0] * a + n[0] * b, at[1] + u[1] * a + n[1] * b)
           for a, b in ((u0, n0), (u1, n0), (u1, n1), (u0, n1))]
    return Polygon(pts)


def passages(floor: Floor) -> Passages:
    """Walls (with the door openings cut out and the jambs of thick walls added), fittings
    and standing furniture of ``floor``."""
    obstacles: list[tuple[str, BaseGeometry]] = list(floor.fixtures.items())
    obstacles += [(pid, pc.shape) for pid, pc in floor.placed.items() if pc.spec.height != 0]
    cuts, gaps, jambs = [], [], []
    openings: list[tuple[str, int, Polygon]] = []
    for ds in floor.doors:
        door = ds.door
        a, b = ds.opening.coords[0], ds.opening.coords[-1]
        at = ((a[0] + b[0]) / 2, (a[1] + b[1]) / 2)
        u = ((b[0] - a[0]) / door.width, (b[1] - a[1]) / door.width)
        n = ds.inward[door.rooms[0]]
        h = door.width / 2
        g = 0.0 if door.rooms[1] not in floor.rooms else floor.rooms[door.rooms[1]].distance(
            Point(at))
        g = g if g > _TOL else 0.0
        cuts.append(_frame(at, u, n, -h, h, -g - 1, 1))
        openings.append((door.id, door.width, _frame(at, u, n, -h, h, -g - _TOL, _TOL)))
        if g:
            gaps.append(_frame(at, u, n, -h, h, -g, 0))
            for s in (-h, h):
                p0 = (at[0] + u[0] * s, at[1] + u[1] * s)
                jambs.append(LineString([p0, (p0[0] - n[0] * g, p0[1] - n[1] * g)]))
    taken = unary_union([g for _, g in obstacles]) if obstacles else Polygon()
    room_floor = unary_union(list(floor.rooms.values()) + gaps)
    free = room_floor.difference(taken) if obstacles else room_floor
    walls = unary_union([poly.exterior for poly in floor.rooms.values()])
    if cuts:
        walls = walls.difference(unary_union(cuts))
    walls = unary_union([walls, *jambs]) if jambs else walls
    blockers = [("wall", walls), *obstacles]
    carved = free.difference(walls.buffer(_TOL, join_style="mitre"))
    rings = [LineString(ring.coords) for poly in shapely.get_parts(carved)
             if isinstance(poly, Polygon) for ring in [poly.exterior, *poly.interiors]]
    return Passages(blockers, unary_union([g for _, g in blockers]),
                    _segments([g for _, g in blockers]), rings, openings)


def samples(points: Sequence[XY], step: float) -> np.ndarray:
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


def _ring_at(base: Passages, q: np.ndarray) -> tuple[int, float] | None:
    """The free-floor boundary ring through ``q`` and the distance along it, if any."""
    pt = Point(q)
    for i, ring in enumerate(base.rings):
        if ring.distance(pt) <= _RING_TOL:
            return i, ring.project(pt)
    return None


def _passage_width(base: Passages, p: np.ndarray, cap: float) -> float:
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


def narrowest(space: Passages, points: Sequence[XY],
               known: tuple[float, XY] | None = None) -> tuple[float, XY]:
    """Least passage width along the route, or ``known`` (a doorway's width) if narrower.

    Branch and bound: the width at a point is at least twice its distance to the nearest
    blocker, so points whose bound reaches the best width so far are not measured.
    """
    pts = samples(points, SAMPLE_STEP_MM)
    blockers = space.blocker_union
    near = shapely.shortest_line(shapely.points(pts), blockers)
    lower = 2 * np.asarray(shapely.length(near), dtype=float)
    ends = shapely.get_coordinates(shapely.get_point(near, 1))
    best, where = known if known is not None else (float(WIDTH_CAP_MM), tuple(pts[0]))
    for k in np.argsort(lower):
        if lower[k] >= best:
            break
        if _half_plane_bound(space.edges, pts[k], ends[k], best) >= best:
            continue
        w = _passage_width(space, pts[k], WIDTH_CAP_MM / 2)
        if w < best:
            best, where = w, (float(pts[k][0]), float(pts[k][1]))
    return best, where


def doors_passed(space: Passages, points: Sequence[XY]) -> list[tuple[str, int, XY]]:
    """Doorways the route crosses, in order along it, with their widths and centres."""
    if len(points) < 2:
        return []
    line = LineString(points)
    found = []
    for did, w, rect in space.openings:
        if line.intersects(rect):
            c = rect.centroid
            found.append((line.project(c), did, w, (c.x, c.y)))
    return [(did, w, c) for _, did, w, c in sorted(found)]



def between(space: Passages, where: XY) -> tuple[str, ...]:
    """Ids of the two blockers nearest ``where`` (the sides of a narrow point)."""
    pt = Point(where)
    ranked = sorted((g.distance(pt), bid) for bid, g in space.blockers)
    out: list[str] = []
    for _, bid in ranked:
        if bid not in out:
            out.append(bid)
        if len(out) == 2:
            break
    return tuple(out)

