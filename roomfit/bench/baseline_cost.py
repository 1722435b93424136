"""The cost of an arrangement under the baseline's terms, kept up to date move by move.

The annealing baseline (:mod:`roomfit.bench.baseline`) adapts each cost term of Yu et al.
(2011) to our rule sets:

- accessibility -> use-zone intrusions (a piece on another piece's use zone, a zone outside
  its room or on a fitting) and door swing / door approach intrusions;
- visibility -> tall pieces in a window band (``window.band``), and the sofa facing the TV;
- pathway -> on a 100 mm grid of each room, the free floor at least half the route width
  (``route.width``) from any obstacle must join every door and use zone, and, where the rule
  set asks for one, hold a turning space (``turning.size``);
- prior terms -> overlap between pieces, floor outside the room, the distance from an
  against-wall piece's back to the nearest wall; pairwise relations from the catalogue.

Hard terms must all be zero for a state to be worth judging; soft terms (the relations) only
rank arrangements. Areas are in m2, lengths in m (see :data:`WEIGHTS`).

Reference: Lap-Fai Yu, Sai-Kit Yeung, Chi-Keung Tang, Demetri Terzopoulos, Tony F. Chan and
Stanley J. Osher, "Make it Home: Automatic Optimization of Furniture Arrangement", ACM
Transactions on Graphics 30(4), article 86, 2011.
"""

from __future__ import annotations

import math

import numpy as np
from scipy import ndimage
from shapely import box, prepared
from shapely.geometry import Point
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit.geometry import (
    door_shapes,
    fixture_polygon,
    fixture_zone,
    room_polygons,
    side_direction,
    turned_size,
    window_band,
    zone_polygon,
)
from roomfit.plan.data import Layout, Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet

__all__ = ["WEIGHTS", "Box", "RoomFrame", "State", "layout_cost"]

#: Cost weights: areas in m2, lengths in m, counts as they are. Hard terms must all be zero for
#: a state to be worth judging; soft terms only rank arrangements.
WEIGHTS = {
    "overlap": 20.0,        # per m2 of two footprints overlapping
    "outside": 20.0,        # per m2 of footprint outside its room
    "keepout": 10.0,        # per m2 on a door swing, door approach, fitting or its zone
    "zone": 5.0,            # per m2 of a use zone on a footprint, a fitting or outside the room
    "window": 5.0,          # per m2 of a tall piece within the window band
    "wall": 4.0,            # per m from an against-wall piece's back to the nearest wall
    "path": 1.0,            # per door or use zone not joined to the room's first door
    "turning": 3.0,         # per m the largest free circle falls short of the turning space
    "relation": 0.3,        # per m from a related piece's ideal spot (soft)
}

_GRID = 100  # mm, cell of the pathway grid
_VIEW = 2500  # mm, sofa to TV distance the soft term aims at (common practice)

Box = tuple[float, float, float, float]


def _bounds(geom: BaseGeometry) -> Box:
    x0, y0, x1, y1 = geom.bounds
    return x0, y0, x1, y1


def _overlap(a: Box, b: Box) -> float:
    w = min(a[2], b[2]) - max(a[0], b[0])
    h = min(a[3], b[3]) - max(a[1], b[1])
    return w * h if w > 0 and h > 0 else 0.0


class RoomFrame:
    """Fixed geometry of one room, prepared for fast queries."""

    def __init__(self, plan: Plan, rules: RuleSet, rid: str, poly, doors) -> None:
        self.id = rid
        self.poly = poly
        self.prep = prepared.prep(poly)
        self.boundary = poly.exterior
        x0, y0, x1, y1 = poly.bounds
        self.bounds = (x0, y0, x1, y1)
        keep = []
        self.door_points: list[tuple[float, float]] = []
        for ds in doors:
            if rid in ds.approach:
                keep.append(ds.approach[rid])
            if ds.swing is not None and ds.door.swings_into == rid:
                keep.append(ds.swing)
            if rid in ds.inward:
                n = ds.inward[rid]
                c = ds.opening.interpolate(0.5, normalized=True)
                self.door_points.append((c.x + n[0] * 150, c.y + n[1] * 150))
        fixtures = [f for f in plan.fixtures if f.room == rid]
        fx = [fixture_polygon(f) for f in fixtures]
        keep += fx + [z for z in (fixture_zone(f) for f in fixtures) if z is not None]
        self.keepout = unary_union(keep) if keep else None
        self.keep_prep = prepared.prep(self.keepout) if self.keepout is not None else None
        self.fixtures = unary_union(fx) if fx else None
        band = rules.mm("window.band")
        bands = [window_band(plan, w, band) for w in plan.windows if w.room == rid and band > 0]
        self.windows = unary_union(bands) if bands else None
        self.walls = self._axis_walls(poly)
        self.route_r = rules.mm("route.width") / 2
        self.turn_r = rules.mm("turning.size") / 2
        # pathway grid: cells whose centre is on the room's floor, less fittings
        self.gx, self.gy = x0, y0
        nx, ny = int(math.ceil((x1 - x0) / _GRID)), int(math.ceil((y1 - y0) / _GRID))
        base = np.zeros((nx, ny), dtype=bool)
        floor = poly.difference(self.fixtures) if self.fixtures is not None else poly
        fprep = prepared.prep(floor)
        for i in range(nx):
            for j in range(ny):
                base[i, j] = fprep.contains(Point(x0 + (i + 0.5) * _GRID, y0 + (j + 0.5) * _GRID))
        self.base = base

    @staticmethod
    def _axis_walls(poly) -> list[tuple[tuple[float, float], tuple[float, float], tuple[int, int]]]:
        """Axis-aligned edges with the outward normal (the way a piece's back faces)."""
        pts = list(poly.exterior.coords)[:-1]
        out = []
        for k in range(len(pts)):
            a, b = pts[k], pts[(k + 1) % len(pts)]
            if a[0] != b[0] and a[1] != b[1]:
                continue
            ux, uy = (b[0] - a[0]), (b[1] - a[1])
            ln = math.hypot(ux, uy)
            nx, ny = -uy / ln, ux / ln  # left normal
            mid = ((a[0] + b[0]) / 2 + nx * 5, (a[1] + b[1]) / 2 + ny * 5)
            inward = poly.contains(Point(mid))
            out_n = (int(round(-nx)), int(round(-ny))) if inward else (int(round(nx)), int(round(ny)))
            out.append((a, b, out_n))
        return out

    def area_outside(self, b: Box) -> float:
        g = box(*b)
        if self.prep.contains(g):
            return 0.0
        return g.area - g.intersection(self.poly).area

    def area_on(self, geom, prep, b: Box) -> float:
        if geom is None:
            return 0.0
        g = box(*b)
        if not prep.intersects(g):
            return 0.0
        return g.intersection(geom).area

    def wall_distance(self, spec: PieceSpec, pl: Placement, fb: Box) -> float:
        dx, dy = side_direction("back", pl.rotation)
        cx, cy = (fb[0] + fb[2]) / 2, (fb[1] + fb[3]) / 2
        hx, hy = (fb[2] - fb[0]) / 2, (fb[3] - fb[1]) / 2
        return self.boundary.distance(Point(cx + dx * hx, cy + dy * hy))


def _cells(room: RoomFrame, b: Box) -> tuple[int, int, int, int]:
    i0 = max(0, int(math.floor((b[0] - room.gx) / _GRID)))
    j0 = max(0, int(math.floor((b[1] - room.gy) / _GRID)))
    i1 = min(room.base.shape[0], int(math.ceil((b[2] - room.gx) / _GRID)))
    j1 = min(room.base.shape[1], int(math.ceil((b[3] - room.gy) / _GRID)))
    return i0, j0, i1, j1


def _path_cost(room: RoomFrame, foots: list[Box], zones: list[Box]) -> tuple[float, float]:
    """(unjoined targets, turning shortfall in m) on the room's pathway grid."""
    free = room.base.copy()
    for b in foots:
        i0, j0, i1, j1 = _cells(room, b)
        free[i0:i1, j0:j1] = False
    dist = ndimage.distance_transform_edt(np.pad(free, 1))[1:-1, 1:-1] * _GRID
    walk = dist >= room.route_r
    labels, n = ndimage.label(walk)
    if n == 0:
        return float(len(room.door_points) + len(zones)), room.turn_r / 1000

    def comps_near(x: float, y: float, reach: float) -> set[int]:
        b = (x - reach, y - reach, x + reach, y + reach)
        i0, j0, i1, j1 = _cells(room, b)
        return set(np.unique(labels[i0:i1, j0:j1]).tolist()) - {0}

    near = [comps_near(x, y, room.route_r + _GRID) for x, y in room.door_points]
    main = next(iter(near[0]), None) if near and near[0] else None
    if main is None:
        counts = np.bincount(labels.ravel())
        counts[0] = 0
        main = int(counts.argmax())
    missing = sum(1 for s in near if main not in s)
    joined = labels == main
    half = room.route_r / 2
    for z in zones:
        i0, j0, i1, j1 = _cells(room, (z[0] - half, z[1] - half, z[2] + half, z[3] + half))
        if not joined[i0:i1, j0:j1].any():
            missing += 1
    short = 0.0
    if room.turn_r > 0:
        best = float(dist[joined].max()) if joined.any() else 0.0
        short = max(0.0, room.turn_r - best) / 1000
    return float(missing), short


class State:
    """The search state and its cost, kept up to date move by move."""

    def __init__(self, plan: Plan, rules: RuleSet, specs: tuple[PieceSpec, ...]) -> None:
        polys = room_polygons(plan)
        doors = door_shapes(plan, rules)
        self.rooms = {rid: RoomFrame(plan, rules, rid, p, doors) for rid, p in polys.items()}
        self.specs = specs
        self.n = len(specs)
        self.place: list[Placement] = [Placement(0, 0, 0, s.rooms[0]) for s in specs]
        self.cat = [s.category for s in specs]
        self.unary = [0.0] * self.n
        self.pair = np.zeros((self.n, self.n))
        self.path = {rid: 0.0 for rid in self.rooms}
        self.soft = 0.0
        self._cache: dict[int, tuple[Placement, tuple[Box, list[Box]]]] = {}

    # geometry of one piece -------------------------------------------------------------
    def boxes(self, i: int) -> tuple[Box, list[Box]]:
        """Footprint and use-zone boxes of piece ``i`` where it stands now (cached)."""
        pl = self.place[i]
        hit = self._cache.get(i)
        if hit is not None and hit[0] == pl:
            return hit[1]
        s = self.specs[i]
        w, d = turned_size(s.width, s.depth, pl.rotation)
        fb: Box = (pl.x, pl.y, pl.x + w, pl.y + d)
        zs = [_bounds(zone_polygon(s, pl, z)) for z in s.zones if z.depth > 0]
        self._cache[i] = (pl, (fb, zs))
        return fb, zs

    def unary_cost(self, i: int) -> float:
        s, pl = self.specs[i], self.place[i]
        room = self.rooms[pl.room]
        fb, zs = self.boxes(i)
        c = WEIGHTS["outside"] * room.area_outside(fb) / 1e6
        c += WEIGHTS["keepout"] * room.area_on(room.keepout, room.keep_prep, fb) / 1e6
        for z in zs:
            zone_bad = room.area_outside(z)
            if room.fixtures is not None:
                zone_bad += box(*z).intersection(room.fixtures).area
            c += WEIGHTS["zone"] * zone_bad / 1e6
        if s.tall and room.windows is not None:
            c += WEIGHTS["window"] * box(*fb).intersection(room.windows).area / 1e6
        if s.against_wall:
            c += WEIGHTS["wall"] * room.wall_distance(s, pl, fb) / 1000
        return c

    def pair_cost(self, i: int, j: int) -> float:
        if self.place[i].room != self.place[j].room:
            return 0.0
        fi, zi = self.boxes(i)
        fj, zj = self.boxes(j)
        c = WEIGHTS["overlap"] * _overlap(fi, fj) / 1e6
        c += WEIGHTS["zone"] * (sum(_overlap(z, fj) for z in zi) + sum(_overlap(z, fi) for z in zj)) / 1e6
        return c

    def room_path(self, rid: str) -> float:
        ids = [k for k in range(self.n) if self.place[k].room == rid]
        foots, zones = [], []
        for k in ids:
            fb, zs = self.boxes(k)
            foots.append(fb)
            zones += zs
        missing, short = _path_cost(self.rooms[rid], foots, zones)
        return WEIGHTS["path"] * missing + WEIGHTS["turning"] * short

    def relation_cost(self) -> float:
        """Soft pairwise relations (catalogue): nightstand beside the bed head, a piece in front
        of its target, the sofa facing the TV at a viewing distance."""
        total = 0.0
        for i, s in enumerate(self.specs):
            for rel, target in s.relations:
                js = [j for j in range(self.n) if self.cat[j] == target
                      and self.place[j].room == self.place[i].room and j != i]
                if js:
                    total += min(self._relation(rel, i, j) for j in js)
        return WEIGHTS["relation"] * total / 1000

    def centre(self, i: int) -> tuple[float, float]:
        fb, _ = self.boxes(i)
        return (fb[0] + fb[2]) / 2, (fb[1] + fb[3]) / 2

    def _relation(self, rel: str, i: int, j: int) -> float:
        ci, cj = self.centre(i), self.centre(j)
        sj, pj = self.specs[j], self.place[j]
        if rel == "beside_head":
            bx, by = side_direction("back", pj.rotation)
            lx, ly = side_direction("left", pj.rotation)
            head = (cj[0] + bx * sj.depth / 2, cj[1] + by * sj.depth / 2)
            off = sj.width / 2 + self.specs[i].width / 2
            d2 = self.specs[i].depth / 2
            spots = [(head[0] + sg * lx * off - bx * d2, head[1] + sg * ly * off - by * d2)
                     for sg in (1, -1)]
            return min(math.dist(ci, p) for p in spots)
        if rel == "in_front":
            fx, fy = side_direction("front", pj.rotation)
            gap = sj.depth / 2 + 450 + self.specs[i].depth / 2
            return math.dist(ci, (cj[0] + fx * gap, cj[1] + fy * gap))
        if rel == "facing":
            fx, fy = side_direction("front", self.place[i].rotation)
            vx, vy = cj[0] - ci[0], cj[1] - ci[1]
            dist = math.hypot(vx, vy) or 1.0
            return 1000 * (1 - (fx * vx + fy * vy) / dist) + abs(dist - _VIEW)
        return 0.0

    # whole-state cost ------------------------------------------------------------------
    def full(self) -> None:
        self.unary = [self.unary_cost(i) for i in range(self.n)]
        self.pair = np.zeros((self.n, self.n))
        for i in range(self.n):
            for j in range(i + 1, self.n):
                self.pair[i, j] = self.pair[j, i] = self.pair_cost(i, j)
        self.path = {rid: self.room_path(rid) for rid in self.rooms}
        self.soft = self.relation_cost()

    @property
    def hard(self) -> float:
        return sum(self.unary) + float(self.pair.sum()) / 2 + sum(self.path.values())

    @property
    def cost(self) -> float:
        return self.hard + self.soft

    def layout(self) -> Layout:
        return tuple((s.id, p) for s, p in zip(self.specs, self.place, strict=True))


def layout_cost(plan: Plan, rules: RuleSet, layout: Layout) -> tuple[float, float]:
    """(hard, soft) cost of an arrangement under the baseline's terms and :data:`WEIGHTS`.

    Every piece of ``plan`` needs a placement, in ``layout`` or in the plan.
    """
    specs = resolve_pieces(plan, rules)
    st = State(plan, rules, specs)
    where = dict(plan.with_layout(layout).layout)
    st.place = [where[s.id] for s in specs]
    st.full()
    return st.hard, st.soft

