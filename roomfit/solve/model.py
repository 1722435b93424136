"""The CP-SAT placement model: rooms as rectangles and obstacles, pieces as optional intervals.

This module builds the model for one group of rooms and decodes solutions; ``solver.py`` runs
it, verifies every layout with the checker and collects candidates. All lengths are integer
millimetres in plan coordinates (y up).

How the plan becomes a model (see ``docs/solver.md``):

- A room is its bounding box plus fixed obstacles covering the parts of the box outside the
  room. The cover is exact for axis-aligned walls; for an angled wall every grid cell the
  wall cuts is blocked, so the model is conservative there.
- Each piece has one position ``(x, y)`` (the lower-left corner of its turned footprint) and
  one presence literal per allowed (room, rotation); exactly one is on. Positions lie on the
  grid (``grid`` mm, absolute multiples) or flush against an axis-aligned wall.
- Per room, one ``NoOverlap2D`` holds every footprint, the obstacles (outside floor,
  fittings, door approach floor, fitting use zones) and the turning space. Per piece and room,
  a second ``NoOverlap2D`` holds the piece's use zones with every other footprint and the hard
  obstacles (outside floor and fittings): zones may overlap zones, door approach floor and the
  turning space, but no furniture. Tall pieces share one more ``NoOverlap2D`` with the window
  bands.
- A wheelchair turning circle of diameter D fits inside two crossing D x 0.71 D rectangles
  (a point of the circle outside both would need cos and sin above 0.71 at once); we keep that
  cross (as three disjoint rectangles) free of furniture. A square turning space is a D x D box.
- The optional *strengthening* (pairwise gap rules and door walkways) is not needed for a
  layout to be valid; it steers the search away from pinch points the checker would reject.
  An "impossible" answer is only ever taken from the model without it.

References: Google OR-Tools CP-SAT, ``AddNoOverlap2D`` with optional intervals and
``SufficientAssumptionsForInfeasibility``.
"""

from __future__ import annotations

import math
import tomllib
from dataclasses import dataclass, field
from importlib import resources

import numpy as np
import shapely
from ortools.sat.python import cp_model
from shapely import box
from shapely.geometry import Polygon
from shapely.geometry.base import BaseGeometry

from roomfit.audit.geometry import (
    door_shapes,
    fixture_polygon,
    fixture_zone,
    footprint_box,
    room_polygon,
    side_direction,
    window_band,
)
from roomfit.plan.data import Placement, Plan, Room, Trip
from roomfit.rules.catalog import PieceSpec, ZoneReq
from roomfit.rules.sets import RuleSet

__all__ = [
    "Rect",
    "Wall",
    "RoomGeo",
    "PieceVars",
    "Built",
    "load_preferences",
    "tune",
    "cover_rects",
    "room_geometry",
    "build_model",
    "decode",
    "differs",
    "cross_thickness",
    "ROUTE_MARGIN",
    "GRID_DOMAINS",
    "facing_range",
    "hint",
]

Rect = tuple[int, int, int, int]
"""``(x0, y0, x1, y1)`` in mm, x0 < x1 and y0 < y1."""


@dataclass(frozen=True)
class Wall:
    """An axis-aligned wall segment of a room: ``axis`` is ``"x"`` for a wall at x = ``at``
    (running along y from ``lo`` to ``hi``) or ``"y"`` for a wall at y = ``at``; ``outward``
    is the unit normal pointing out of the room."""

    axis: str
    at: int
    lo: int
    hi: int
    outward: tuple[int, int]


@dataclass(frozen=True)
class RoomGeo:
    """A room as the model sees it.

    ``hard``: floor nothing may use (outside the room, fittings); ``clear``: floor kept free of
    furniture but usable by zones (door approach, fitting use zones), by door id / fitting id;
    ``walkways``: door walkways (strengthening only); ``bands``: window bands with the sill.
    """

    room: Room
    bbox: Rect
    hard: tuple[Rect, ...]
    clear: tuple[tuple[str, tuple[Rect, ...]], ...]
    walkways: tuple[Rect, ...]
    bands: tuple[tuple[str, int, tuple[Rect, ...]], ...]
    walls: tuple[Wall, ...]
    windows: tuple[tuple[Wall, int, int, int, int], ...]  # wall, lo, hi, centre x, centre y
    fittings: tuple[Rect, ...]


def tune(params) -> None:
    """CP-SAT settings that suit these small placement models: one round of presolve, no
    symmetry detection, no probing. Measured on a 10-piece room: median time to a first
    layout 0.18 s against 1.09 s with the defaults, and equal or better objectives."""
    params.max_presolve_iterations = 1
    params.symmetry_level = 0
    params.cp_model_probing_level = 0


def load_preferences() -> dict:
    """The objective's weights from ``roomfit/data/preferences.toml``."""
    path = resources.files("roomfit") / "data" / "preferences.toml"
    return tomllib.loads(path.read_text(encoding="utf-8"))


def _is_rectilinear(geom: BaseGeometry) -> bool:
    polys = getattr(geom, "geoms", [geom])
    for p in polys:
        if not isinstance(p, Polygon):
            return False
        for ring in (p.exterior, *p.interiors):
            c = list(ring.coords)
            for (ax, ay), (bx, by) in zip(c, c[1:], strict=False):
                if ax != bx and ay != by:
                    return False
                if ax != int(ax) or ay != int(ay):
                    return False
    return True


def _merge(mask: np.ndarray, xs: list[int], ys: list[int]) -> list[Rect]:
    """Greedy merge of marked cells ``mask[i, j]`` (cell i along x, j along y) into rectangles."""
    used = np.zeros_like(mask)
    out: list[Rect] = []
    nx, ny = mask.shape
    for j in range(ny):
        for i in range(nx):
            if not mask[i, j] or used[i, j]:
                continue
            i1 = i
            while i1 + 1 < nx and mask[i1 + 1, j] and not used[i1 + 1, j]:
                i1 += 1
            j1 = j
            while j1 + 1 < ny and all(mask[k, j1 + 1] and not used[k, j1 + 1] for k in range(i, i1 + 1)):
                j1 += 1
            used[i:i1 + 1, j:j1 + 1] = True
            out.append((xs[i], ys[j], xs[i1 + 1], ys[j1 + 1]))
    return out


def cover_rects(geom: BaseGeometry, step: int) -> list[Rect]:
    """Axis-aligned integer rectangles whose union covers ``geom`` (conservatively).

    Rectilinear shapes with integer corners are covered exactly; other shapes (arcs, angled
    walls) are covered by every ``step``-mm grid cell their interior touches.

    >>> cover_rects(box(0, 0, 100, 50), 50)
    [(0, 0, 100, 50)]
    """
    if geom.is_empty or geom.area <= 1e-6:
        return []
    x0, y0, x1, y1 = geom.bounds
    if _is_rectilinear(geom):
        xs = sorted({int(c[0]) for p in getattr(geom, "geoms", [geom]) for c in p.exterior.coords}
                    | {int(c[0]) for p in getattr(geom, "geoms", [geom]) for r in p.interiors
                       for c in r.coords})
        ys = sorted({int(c[1]) for p in getattr(geom, "geoms", [geom]) for c in p.exterior.coords}
                    | {int(c[1]) for p in getattr(geom, "geoms", [geom]) for r in p.interiors
                       for c in r.coords})
    else:
        lo_x, hi_x = math.floor(x0), math.ceil(x1)
        lo_y, hi_y = math.floor(y0), math.ceil(y1)
        xs = sorted({lo_x, hi_x} | set(range((lo_x // step + 1) * step, hi_x, step)))
        ys = sorted({lo_y, hi_y} | set(range((lo_y // step + 1) * step, hi_y, step)))
    nx, ny = len(xs) - 1, len(ys) - 1
    gx0 = np.repeat(np.array(xs[:-1]), ny)
    gx1 = np.repeat(np.array(xs[1:]), ny)
    gy0 = np.tile(np.array(ys[:-1]), nx)
    gy1 = np.tile(np.array(ys[1:]), nx)
    cells = shapely.box(gx0, gy0, gx1, gy1)
    area = shapely.area(shapely.intersection(cells, geom))
    mask = (area > 1e-3).reshape(nx, ny)
    return _merge(mask, xs, ys)


def _walls(room: Room) -> list[Wall]:
    poly = room_polygon(room)
    pts = list(room.outline)
    out = []
    for i, (a, b) in enumerate(zip(pts, pts[1:] + pts[:1], strict=True)):
        del i
        if a[0] == b[0]:
            lo, hi = sorted((a[1], b[1]))
            mid = (a[0], (lo + hi) / 2)
            inside_right = poly.contains(shapely.Point(mid[0] + 1, mid[1]))
            out.append(Wall("x", a[0], lo, hi, (-1, 0) if inside_right else (1, 0)))
        elif a[1] == b[1]:
            lo, hi = sorted((a[0], b[0]))
            mid = ((lo + hi) / 2, a[1])
            inside_up = poly.contains(shapely.Point(mid[0], mid[1] + 1))
            out.append(Wall("y", a[1], lo, hi, (0, -1) if inside_up else (0, 1)))
    return out


def room_geometry(plan: Plan, rules: RuleSet, room: Room, grid: int) -> RoomGeo:
    """Derive a room's model geometry from the plan and the rule set."""
    poly = room_polygon(room)
    bx0, by0, bx1, by1 = (int(math.floor(v)) for v in poly.bounds)
    bbox = (bx0, by0, bx1, by1)
    fittings = []
    clear: list[tuple[str, tuple[Rect, ...]]] = []
    solid = [box(*bbox).difference(poly)]
    for f in plan.fixtures:
        if f.room != room.id:
            continue
        shape = fixture_polygon(f).intersection(poly)
        solid.append(shape)
        fittings += cover_rects(shape, grid)
        z = fixture_zone(f)
        if z is not None:
            clear.append((f"fixture.{f.id}", tuple(cover_rects(z.intersection(poly), grid))))
    hard = cover_rects(shapely.union_all(solid), grid)
    route = rules.mm("route.width")
    walkways: list[Rect] = []
    for ds in door_shapes(plan, rules):
        if room.id not in ds.inward:
            continue
        if room.id in ds.approach:
            clear.append((f"door.{ds.door.id}", tuple(cover_rects(ds.approach[room.id], grid))))
        n = ds.inward[room.id]
        (ax, ay), (bx, by) = ds.opening.coords
        half = max(ds.door.width, route) / 2
        cx, cy = (ax + bx) / 2, (ay + by) / 2
        ux, uy = (bx - ax) / ds.door.width, (by - ay) / ds.door.width
        depth = 2 * route
        corners = [(cx - ux * half, cy - uy * half), (cx + ux * half, cy + uy * half)]
        corners += [(px + n[0] * depth, py + n[1] * depth) for px, py in reversed(corners)]
        walkways += cover_rects(Polygon(corners).intersection(poly), grid)
    band_depth = rules.mm("window.band")
    walls = _walls(room)
    bands = []
    windows = []
    for w in plan.windows:
        if w.room != room.id:
            continue
        if band_depth > 0:
            bands.append((w.id, w.sill, tuple(cover_rects(window_band(plan, w, band_depth), grid))))
        for wall in walls:
            along = w.at[1] if wall.axis == "x" else w.at[0]
            across = w.at[0] if wall.axis == "x" else w.at[1]
            if across == wall.at and wall.lo <= along <= wall.hi:
                windows.append((wall, along - w.width // 2, along + (w.width + 1) // 2, w.at[0], w.at[1]))
    return RoomGeo(room, bbox, tuple(hard), tuple(clear), tuple(walkways), tuple(bands),
                   tuple(walls), tuple(windows), tuple(fittings))


def cross_thickness(diameter: int) -> int:
    """Thickness of each bar of the cross that holds a turning circle of ``diameter`` (mm).

    A circle of radius r lies inside the union of the bars |x| <= t/2 and |y| <= t/2 (each r
    long either way) when t/2 >= r sin 45 deg = 0.7071 r; we round 0.71 D up and add 1 mm for
    the integer centre.

    >>> cross_thickness(1500)
    1066
    """
    return math.ceil(0.71 * diameter) + 1


@dataclass
class PieceVars:
    """Variables of one piece: position, one literal per (room, rotation), sizes per rotation."""

    spec: PieceSpec
    x: cp_model.IntVar
    y: cp_model.IntVar
    alts: dict[tuple[str, int], cp_model.IntVar]
    locked: bool
    walls: dict[tuple[str, int], list[cp_model.IntVar]] = field(default_factory=dict)
    _ends: tuple[cp_model.IntVar, cp_model.IntVar] | None = None

    def size(self, rot: int) -> tuple[int, int]:
        return (self.spec.width, self.spec.depth) if rot in (0, 180) else (self.spec.depth, self.spec.width)

    def width_expr(self) -> cp_model.LinearExpr:
        return sum(lit * self.size(rot)[0] for (_, rot), lit in self.alts.items())

    def depth_expr(self) -> cp_model.LinearExpr:
        return sum(lit * self.size(rot)[1] for (_, rot), lit in self.alts.items())

    def ends(self, m: cp_model.CpModel) -> tuple[cp_model.IntVar, cp_model.IntVar]:
        """Variables for the footprint's right and top edges (made once, then reused)."""
        if self._ends is None:
            xe = m.new_int_var(-10_000_000, 10_000_000, f"xe_{self.spec.id}")
            ye = m.new_int_var(-10_000_000, 10_000_000, f"ye_{self.spec.id}")
            m.add(xe == self.x + self.width_expr())
            m.add(ye == self.y + self.depth_expr())
            self._ends = (xe, ye)
        return self._ends

    def in_room(self, room: str) -> cp_model.LinearExpr:
        return sum(lit for (r, _), lit in self.alts.items() if r == room)


@dataclass
class Built:
    """A built model with the index that maps variables back to pieces.

    ``groups`` maps a rule-group id (``piece.<id>``, ``zone.<id>``, ``wall.<id>``,
    ``turning.<room>``, ``door.<id>``, ``window.<id>``, ``fixture.<id>``) to its assumption
    literal; empty unless built with ``assume=True``.
    """

    model: cp_model.CpModel
    pieces: list[PieceVars]
    rooms: dict[str, RoomGeo]
    groups: dict[str, cp_model.IntVar]
    has_objective: bool
    route: int


def _fixed_box(m: cp_model.CpModel, r: Rect, lit: cp_model.IntVar | None = None):
    x0, y0, x1, y1 = r
    if lit is None:
        return (m.new_fixed_size_interval_var(x0, x1 - x0, ""),
                m.new_fixed_size_interval_var(y0, y1 - y0, ""))
    return (m.new_optional_fixed_size_interval_var(x0, x1 - x0, lit, ""),
            m.new_optional_fixed_size_interval_var(y0, y1 - y0, lit, ""))


#: Added to the route width in the gap rules (mm): a gap exactly as wide as the route closes
#: up when the checker shrinks the floor with a polygonal disc.
ROUTE_MARGIN = 10

#: When True, positions are restricted to the grid and flush positions; when False, only to
#: their range (CP-SAT's presolve is far slower on long lists of single values).
GRID_DOMAINS = False


def _pos_var(m: cp_model.CpModel, values: set[int], name: str) -> cp_model.IntVar:
    if GRID_DOMAINS or len(values) == 1:
        return m.new_int_var_from_domain(cp_model.Domain.from_values(sorted(values)), name)
    return m.new_int_var(min(values), max(values), name)


def _no_overlap(m: cp_model.CpModel, boxes: list) -> None:
    if len(boxes) > 1:
        m.add_no_overlap_2d([b[0] for b in boxes], [b[1] for b in boxes])


def _positions(lo: int, hi: int, grid: int, extra: set[int]) -> set[int]:
    """Grid multiples in [lo, hi] plus the ``extra`` positions inside it."""
    if hi < lo:
        return set()
    vals = set(range(-(-lo // grid) * grid, hi + 1, grid)) | {lo, hi}
    return vals | {v for v in extra if lo <= v <= hi}


def _zone_rect_expr(pv: PieceVars, rot: int, z: ZoneReq):
    """Zone ``z`` of ``pv`` at ``rot`` as (x start expr, x size, y start expr, y size); a side
    zone leaves out ``z.inset`` at the piece's back end, as ``geometry.zone_polygon`` does."""
    w, d = pv.size(rot)
    dx, dy = side_direction(z.side, rot)
    bx, by = side_direction("back", rot)
    depth, cut = z.depth, z.inset
    if dx != 0:
        y0 = pv.y + cut if by == -1 else pv.y
        ylen = d - cut if by != 0 else d
        return (pv.x + w if dx == 1 else pv.x - depth), depth, y0, ylen
    x0 = pv.x + cut if bx == -1 else pv.x
    xlen = w - cut if bx != 0 else w
    return x0, xlen, (pv.y + d if dy == 1 else pv.y - depth), depth


def build_model(
    plan: Plan,
    rules: RuleSet,
    specs: list[PieceSpec],
    rooms: list[str],
    grid: int = 50,
    *,
    strengthen: bool = True,
    assume: bool = False,
    objective: bool = True,
    geo: dict[str, RoomGeo] | None = None,
    routines: tuple[Trip, ...] | None = None,
) -> Built:
    """Build the placement model for ``specs`` in ``rooms``.

    ``strengthen`` adds the pairwise gap rules and door walkways; ``assume`` puts every rule
    group behind an assumption literal (for explaining infeasibility); ``objective`` adds the
    soft preferences. Locked pieces keep their plan placement. ``routines`` are the daily
    trips the routine term uses (default: the plan's own).
    """
    m = cp_model.CpModel()
    geo = geo or {r: room_geometry(plan, rules, plan.room(r), grid) for r in rooms}
    groups: dict[str, cp_model.IntVar] = {}
    route = math.ceil(rules.get("route.width").exact_mm) + ROUTE_MARGIN

    def group(name: str) -> cp_model.IntVar | None:
        if not assume:
            return None
        if name not in groups:
            groups[name] = m.new_bool_var(name)
        return groups[name]

    pieces: list[PieceVars] = []
    for spec in specs:
        piece = plan.piece(spec.id)
        locked = piece.locked and piece.placement is not None
        allowed = [r for r in spec.rooms if r in geo]
        # a half turn changes nothing for a piece whose zones are symmetric and that needs no
        # wall (a table, a lamp): two rotations suffice
        rots = [0, 90] if _symmetric(spec) and spec.category not in _wall_lovers() else [0, 90, 180, 270]
        if locked:
            assert piece.placement is not None
            allowed, rots = [piece.placement.room], [piece.placement.rotation]
        xs: set[int] = set()
        ys: set[int] = set()
        alt_keys = []
        for r in allowed:
            g = geo[r]
            bx0, by0, bx1, by1 = g.bbox
            for rot in rots:
                w, d = (spec.width, spec.depth) if rot in (0, 180) else (spec.depth, spec.width)
                if w > bx1 - bx0 or d > by1 - by0:
                    continue
                alt_keys.append((r, rot))
                wx = {wl.at for wl in g.walls if wl.axis == "x"}
                wy = {wl.at for wl in g.walls if wl.axis == "y"}
                xs |= _positions(bx0, bx1 - w, grid, wx | {v - w for v in wx})
                ys |= _positions(by0, by1 - d, grid, wy | {v - d for v in wy})
        if locked:
            assert piece.placement is not None
            xs, ys = {piece.placement.x}, {piece.placement.y}
        if not alt_keys:
            xs, ys = {0}, {0}
        x = _pos_var(m, xs, f"x_{spec.id}")
        y = _pos_var(m, ys, f"y_{spec.id}")
        alts = {k: m.new_bool_var(f"a_{spec.id}_{k[0]}_{k[1]}") for k in alt_keys}
        pv = PieceVars(spec, x, y, alts, locked)
        present = group(f"piece.{spec.id}")
        if present is None:
            m.add_exactly_one(alts.values())
        else:
            m.add(sum(alts.values()) <= 1)
            m.add(sum(alts.values()) >= 1).only_enforce_if(present)
        for (r, rot), lit in alts.items():
            bx0, by0, bx1, by1 = geo[r].bbox
            w, d = pv.size(rot)
            m.add(x >= bx0).only_enforce_if(lit)
            m.add(x + w <= bx1).only_enforce_if(lit)
            m.add(y >= by0).only_enforce_if(lit)
            m.add(y + d <= by1).only_enforce_if(lit)
        pieces.append(pv)

    prefs = load_preferences()
    wall_lovers = set(prefs["wall"]["categories"])
    for pv in pieces:
        need = pv.spec.against_wall
        if not (need or pv.spec.category in wall_lovers) or pv.locked:
            continue
        wall_grp = group(f"wall.{pv.spec.id}") if need else None
        for (r, rot), lit in pv.alts.items():
            w, d = pv.size(rot)
            back = side_direction("back", rot)
            choices = []
            for wl in geo[r].walls:
                if wl.outward != back:
                    continue
                c = m.new_bool_var("")
                if wl.axis == "x":
                    span = d
                    m.add(pv.x == (wl.at if back[0] == -1 else wl.at - w)).only_enforce_if(c)
                    m.add(pv.y >= wl.lo).only_enforce_if(c)
                    m.add(pv.y + span <= wl.hi).only_enforce_if(c)
                else:
                    span = w
                    m.add(pv.y == (wl.at if back[1] == -1 else wl.at - d)).only_enforce_if(c)
                    m.add(pv.x >= wl.lo).only_enforce_if(c)
                    m.add(pv.x + span <= wl.hi).only_enforce_if(c)
                m.add_implication(c, lit)
                choices.append(c)
            pv.walls[(r, rot)] = choices
            if need:
                if wall_grp is None:
                    m.add(sum(choices) == lit)
                else:
                    m.add(sum(choices) == lit).only_enforce_if(wall_grp)
                    m.add(sum(choices) <= lit)
            else:
                m.add(sum(choices) <= lit)

    # footprints per room
    fp: dict[str, list[tuple[PieceVars, int, object, object]]] = {r: [] for r in geo}
    for pv in pieces:
        for (r, rot), lit in pv.alts.items():
            w, d = pv.size(rot)
            ix = m.new_optional_fixed_size_interval_var(pv.x, w, lit, "")
            iy = m.new_optional_fixed_size_interval_var(pv.y, d, lit, "")
            fp[r].append((pv, rot, ix, iy))

    turning = rules.mm("turning.size")
    shape = rules.text("turning.shape")
    for r, g in geo.items():
        boxes = [(ix, iy) for _, _, ix, iy in fp[r]]
        boxes += [_fixed_box(m, rect) for rect in g.hard]
        if turning > 0:
            boxes += _turning_boxes(m, g, turning, shape, grid, group(f"turning.{r}"))
        _no_overlap(m, boxes)
        # floor kept clear of furniture (it may overlap zones and the turning space)
        feet = [(ix, iy) for _, _, ix, iy in fp[r]]
        if assume:
            for gid, rects in g.clear:
                lit = group(gid)
                _no_overlap(m, feet + [_fixed_box(m, rect, lit) for rect in rects])
        else:
            keep = [box(*rect) for _, rects in g.clear for rect in rects]
            keep += [box(*rect) for rect in g.walkways] if strengthen else []
            if keep:
                rects = cover_rects(shapely.union_all(keep), grid)
                _no_overlap(m, feet + [_fixed_box(m, rect) for rect in rects])

        # use zones: free of other footprints and of the hard obstacles
        hard_boxes = [_fixed_box(m, rect) for rect in g.hard]
        for pv in pieces:
            if not pv.spec.zones or not any(k[0] == r for k in pv.alts):
                continue
            zlit = group(f"zone.{pv.spec.id}")
            zb = []
            for (rr, rot), lit in pv.alts.items():
                if rr != r:
                    continue
                pres = lit
                if zlit is not None:
                    pres = m.new_bool_var("")
                    m.add_bool_and([lit, zlit]).only_enforce_if(pres)
                    m.add_bool_or([lit.negated(), zlit.negated()]).only_enforce_if(pres.negated())
                bx0, by0, bx1, by1 = g.bbox
                for z in pv.spec.zones:
                    if z.depth <= 0:
                        continue
                    sx, wx, sy, wy = _zone_rect_expr(pv, rot, z)
                    m.add(sx >= bx0).only_enforce_if(pres)
                    m.add(sx + wx <= bx1).only_enforce_if(pres)
                    m.add(sy >= by0).only_enforce_if(pres)
                    m.add(sy + wy <= by1).only_enforce_if(pres)
                    zb.append((m.new_optional_fixed_size_interval_var(sx, wx, pres, ""),
                               m.new_optional_fixed_size_interval_var(sy, wy, pres, "")))
            if not zb:
                continue
            others = [(ix, iy) for q, _, ix, iy in fp[r] if q is not pv]
            _no_overlap(m, zb + others + hard_boxes)

        # window bands keep tall pieces away
        for wid, sill, rects in g.bands:
            tall = [(ix, iy) for q, _, ix, iy in fp[r] if q.spec.height > sill or q.spec.tall]
            if not tall or not rects:
                continue
            lit = group(f"window.{wid}")
            _no_overlap(m, tall + [_fixed_box(m, rect, lit) for rect in rects])

        if strengthen:
            _gap_rules(m, pieces, g, route, grid, _related_pairs(pieces))

    has_obj = False
    if objective:
        runs = tuple(f for f in plan.fixtures if f.kind == "kitchen_run" and f.room in geo)
        has_obj = _objective(m, pieces, geo, prefs, runs, plan,
                             plan.routines if routines is None else routines)
    return Built(m, pieces, geo, groups, has_obj, route)


def _turning_boxes(m: cp_model.CpModel, g: RoomGeo, size: int, shape: str, grid: int,
                   lit: cp_model.IntVar | None) -> list:
    bx0, by0, bx1, by1 = g.bbox
    if size > bx1 - bx0 or size > by1 - by0:
        if lit is None:
            m.add_bool_or([])  # no room for a turning space at all: infeasible
        else:
            m.add_bool_or([lit.negated()])
        return []
    tx = _pos_var(m, _positions(bx0, bx1 - size, grid, set()), "turn_x")
    ty = _pos_var(m, _positions(by0, by1 - size, grid, set()), "turn_y")

    def iv(start, length):
        if lit is None:
            return m.new_fixed_size_interval_var(start, length, "")
        return m.new_optional_fixed_size_interval_var(start, length, lit, "")

    if shape == "square":
        return [(iv(tx, size), iv(ty, size))]
    t = cross_thickness(size)
    o = (size - t) // 2
    return [
        (iv(tx, size), iv(ty + o, t)),
        (iv(tx + o, t), iv(ty, o)),
        (iv(tx + o, t), iv(ty + o + t, size - o - t)),
    ]


def _related_pairs(pieces: list[PieceVars]) -> set[frozenset[str]]:
    """Pairs of piece ids tied by an ``in_front`` or ``beside_head`` relation: the gap between
    them is the relation's (a coffee table's reach from the seat), not a walkway."""
    out = set()
    for pv in pieces:
        for relation, target in pv.spec.relations:
            if relation in ("in_front", "beside_head"):
                out |= {frozenset((pv.spec.id, t.spec.id)) for t in pieces if t.spec.category == target}
    return out


def _gap_rules(m: cp_model.CpModel, pieces: list[PieceVars], g: RoomGeo, route: int, grid: int,
               skip: set[frozenset[str]] = frozenset()) -> None:
    """Two footprints in one room nearly touch (gaps at most ``grid`` both ways) or stand
    ``route`` apart on one axis; the same between a piece and the room's walls and fittings.
    Pairs in ``skip`` (related pieces) may stand at any distance."""
    r = g.room.id
    here = [pv for pv in pieces if any(k[0] == r for k in pv.alts)]
    near = grid
    for i, p in enumerate(here):
        pxe, pye = p.ends(m)
        for q in here[i + 1:]:
            if frozenset((p.spec.id, q.spec.id)) in skip:
                continue
            qxe, qye = q.ends(m)
            opts = [m.new_bool_var("") for _ in range(5)]
            m.add(qxe + route <= p.x).only_enforce_if(opts[0])
            m.add(pxe + route <= q.x).only_enforce_if(opts[1])
            m.add(qye + route <= p.y).only_enforce_if(opts[2])
            m.add(pye + route <= q.y).only_enforce_if(opts[3])
            m.add(q.x <= pxe + near).only_enforce_if(opts[4])
            m.add(p.x <= qxe + near).only_enforce_if(opts[4])
            m.add(q.y <= pye + near).only_enforce_if(opts[4])
            m.add(p.y <= qye + near).only_enforce_if(opts[4])
            enf = [_in_room_lit(m, p, r), _in_room_lit(m, q, r)]
            m.add_bool_or(opts).only_enforce_if(enf)
        if any(rel == "beside_head" for rel, _ in p.spec.relations):
            continue  # a nightstand's nook between the bed and a wall is no walkway
        bx0, by0, bx1, by1 = g.bbox
        inr = _in_room_lit(m, p, r)
        for rect in (*g.fittings, *g.hard, (bx0 - 1, by0, bx0, by1), (bx1, by0, bx1 + 1, by1),
                     (bx0, by0 - 1, bx1, by0), (bx0, by1, bx1, by1 + 1)):
            x0, y0, x1, y1 = rect
            opts = [m.new_bool_var("") for _ in range(5)]
            m.add(x1 + route <= p.x).only_enforce_if(opts[0])
            m.add(pxe + route <= x0).only_enforce_if(opts[1])
            m.add(y1 + route <= p.y).only_enforce_if(opts[2])
            m.add(pye + route <= y0).only_enforce_if(opts[3])
            m.add(x0 <= pxe + near).only_enforce_if(opts[4])
            m.add(p.x <= x1 + near).only_enforce_if(opts[4])
            m.add(y0 <= pye + near).only_enforce_if(opts[4])
            m.add(p.y <= y1 + near).only_enforce_if(opts[4])
            m.add_bool_or(opts).only_enforce_if(inr)


def _in_room_lit(m: cp_model.CpModel, pv: PieceVars, room: str) -> cp_model.IntVar:
    """A literal true exactly when ``pv`` stands in ``room`` (the literal itself for one alt)."""
    lits = [lit for (r, _), lit in pv.alts.items() if r == room]
    if len(lits) == len(pv.alts):
        return m.new_constant(1)
    b = m.new_bool_var("")
    m.add_bool_or(lits).only_enforce_if(b)
    m.add_bool_and([lit.negated() for lit in lits]).only_enforce_if(b.negated())
    return b


def _centre2(pv: PieceVars):
    """Twice the footprint centre, as linear expressions (x, y)."""
    return 2 * pv.x + pv.width_expr(), 2 * pv.y + pv.depth_expr()


def _point2(pv: PieceVars, side: str, offset: int):
    """Twice the point ``offset`` mm out from the middle of ``side`` (offset 0: on the side)."""
    cx, cy = _centre2(pv)
    ex = sum(lit * side_direction(side, rot)[0] * (_extent(pv, side) + 2 * offset)
             for (_, rot), lit in pv.alts.items())
    ey = sum(lit * side_direction(side, rot)[1] * (_extent(pv, side) + 2 * offset)
             for (_, rot), lit in pv.alts.items())
    return cx + ex, cy + ey


def _extent(pv: PieceVars, side: str) -> int:
    return pv.spec.depth if side in ("front", "back") else pv.spec.width


def _l1(m: cp_model.CpModel, ax, ay, bx, by, scale: int) -> cp_model.IntVar:
    """A variable at least the L1 distance between two doubled points, in units of ``scale`` mm."""
    big = 10_000_000
    dx = m.new_int_var(0, big, "")
    dy = m.new_int_var(0, big, "")
    m.add_abs_equality(dx, ax - bx)
    m.add_abs_equality(dy, ay - by)
    d = m.new_int_var(0, big, "")
    m.add(d * 2 * scale >= dx + dy)
    return d


def _lo(pv: PieceVars, axis: int):
    """The footprint's low edge along ``axis`` (0: x, 1: y)."""
    return pv.x if axis == 0 else pv.y


def _hi(m: cp_model.CpModel, pv: PieceVars, axis: int):
    """The footprint's high edge along ``axis`` (0: x, 1: y)."""
    return pv.ends(m)[axis]


def _mid2(pv: PieceVars, axis: int):
    """Twice the footprint's centre along ``axis``."""
    return _centre2(pv)[axis]


def _gap_in(m: cp_model.CpModel, near: PieceVars, far: PieceVars, axis: int, sign: int,
            lo: int, hi: int, lit: cp_model.IntVar) -> None:
    """Under ``lit``: ``far`` stands beyond ``near``'s side facing ``sign`` along ``axis``,
    ``lo`` to ``hi`` mm from it."""
    gap = (_lo(far, axis) - _hi(m, near, axis)) if sign > 0 else (_lo(near, axis) - _hi(m, far, axis))
    m.add(gap >= lo).only_enforce_if(lit)
    m.add(gap <= hi).only_enforce_if(lit)


def _on_axis(m: cp_model.CpModel, a: PieceVars, b: PieceVars, axis: int, tol: int,
             lit: cp_model.IntVar) -> None:
    """Under ``lit``: the centres of ``a`` and ``b`` lie within ``tol`` mm along ``axis``."""
    m.add(_mid2(a, axis) - _mid2(b, axis) <= 2 * tol).only_enforce_if(lit)
    m.add(_mid2(b, axis) - _mid2(a, axis) <= 2 * tol).only_enforce_if(lit)


def _either(m: cp_model.CpModel, options: list[cp_model.IntVar]) -> cp_model.IntVar:
    """A literal that may be true only when one of ``options`` is (false when there is none)."""
    ok = m.new_bool_var("")
    if options:
        m.add_bool_or(options).only_enforce_if(ok)
    else:
        m.add(ok == 0)
    return ok


def _axis_sign(d: tuple[int, int]) -> tuple[int, int]:
    return (0, d[0]) if d[0] != 0 else (1, d[1])


def facing_range(seat: PieceSpec, tv: PieceSpec) -> tuple[int, int]:
    """Distance (mm) from a seat's front to a facing TV's front: ``view_min`` to ``view_max``
    screen diagonals (catalogue data, with its sources); (0, 0) when either is not given."""
    if not tv.screen or not seat.view_max:
        return 0, 0
    return math.ceil(seat.view_min * tv.screen), math.floor(seat.view_max * tv.screen)


def _facing(m: cp_model.CpModel, seat: PieceVars, tv: PieceVars, tol: int) -> cp_model.IntVar | None:
    """A literal that implies: the seat's front faces the TV's front (opposite turns, one room),
    their centre lines within ``tol`` mm, the fronts the viewing range apart."""
    lo, hi = facing_range(seat.spec, tv.spec)
    if hi <= 0:
        return None
    options = []
    for (r, rot), lit in seat.alts.items():
        tlit = tv.alts.get((r, (rot + 180) % 360))
        if tlit is None:
            continue
        p = m.new_bool_var("")
        m.add_implication(p, lit)
        m.add_implication(p, tlit)
        axis, sign = _axis_sign(side_direction("front", rot))
        _gap_in(m, seat, tv, axis, sign, lo, hi, p)
        _on_axis(m, seat, tv, 1 - axis, tol, p)
        options.append(p)
    return _either(m, options)


def _in_front(m: cp_model.CpModel, table: PieceVars, seat: PieceVars, tol: int) -> cp_model.IntVar:
    """A literal that implies: ``table`` stands in front of ``seat`` on its centre line, its
    gap from the seat's front within the catalogue's gap_min..gap_max, moved out to the seat's
    front use zone when the rule set asks more (the zone is kept free of furniture)."""
    zone = max((z.depth for z in seat.spec.zones if z.side == "front"), default=0)
    lo = max(table.spec.gap_min, zone)
    hi = max(table.spec.gap_max, lo + 100)
    options = []
    for (r, rot), lit in seat.alts.items():
        tlits = [t for (tr, _), t in table.alts.items() if tr == r]
        if not tlits:
            continue
        p = m.new_bool_var("")
        m.add_implication(p, lit)
        m.add_bool_or(tlits).only_enforce_if(p)
        axis, sign = _axis_sign(side_direction("front", rot))
        _gap_in(m, seat, table, axis, sign, lo, hi, p)
        _on_axis(m, seat, table, 1 - axis, tol, p)
        options.append(p)
    return _either(m, options)


def _beside_head(m: cp_model.CpModel, stand: PieceVars, bed: PieceVars) -> cp_model.IntVar:
    """A literal that implies: ``stand`` stands beside one long side of ``bed`` (gap_min to
    gap_max mm from it), its centre on the head half of that side."""
    options = []
    for (r, rot), lit in bed.alts.items():
        slits = [t for (sr, _), t in stand.alts.items() if sr == r]
        if not slits:
            continue
        head_axis, head_sign = _axis_sign(side_direction("back", rot))
        length = bed.size(rot)[head_axis]
        for sign in (1, -1):
            p = m.new_bool_var("")
            m.add_implication(p, lit)
            m.add_bool_or(slits).only_enforce_if(p)
            _gap_in(m, bed, stand, 1 - head_axis, sign, stand.spec.gap_min, stand.spec.gap_max, p)
            mid = _mid2(stand, head_axis)
            if head_sign < 0:
                m.add(mid >= 2 * _lo(bed, head_axis)).only_enforce_if(p)
                m.add(mid <= 2 * _lo(bed, head_axis) + length).only_enforce_if(p)
            else:
                m.add(mid <= 2 * _hi(m, bed, head_axis)).only_enforce_if(p)
                m.add(mid >= 2 * _hi(m, bed, head_axis) - length).only_enforce_if(p)
            options.append(p)
    return _either(m, options)


def _relation_terms(m: cp_model.CpModel, pv: PieceVars, t: PieceVars, relation: str,
                    w: dict, rel: dict) -> list:
    """Penalty terms of one relation: a fixed penalty when it is not met, plus per cm from the
    related piece's spot (a gradient towards it)."""
    tol = int(rel["axis_tolerance"])
    if relation == "beside_head":
        met = _beside_head(m, pv, t)
        tx, ty = _point2(t, "back", 0)
        sx, sy = _centre2(pv)
        weight = int(w["beside_head"])
    elif relation == "in_front":
        met = _in_front(m, pv, t, tol)
        gap = max(pv.spec.gap_min, max((z.depth for z in t.spec.zones if z.side == "front"), default=0))
        gap += min(pv.spec.width, pv.spec.depth) // 2
        tx, ty = _point2(t, "front", gap)
        sx, sy = _centre2(pv)
        weight = int(w["in_front"])
    elif relation == "facing":
        got = _facing(m, pv, t, tol)
        if got is None:
            return []
        met = got
        lo, hi = facing_range(pv.spec, t.spec)
        tx, ty = _point2(pv, "front", (lo + hi) // 2 + t.spec.depth // 2)
        sx, sy = _centre2(t)
        weight = int(w["facing"])
    else:
        return []
    return [weight * (1 - met), int(w["relation"]) * _l1(m, tx, ty, sx, sy, 10)]


def _objective(m: cp_model.CpModel, pieces: list[PieceVars], geo: dict[str, RoomGeo], prefs: dict,
               kitchen_runs: tuple = (), plan: Plan | None = None,
               routines: tuple[Trip, ...] = ()) -> bool:
    """Soft preferences (weights in ``data/preferences.toml``); ``kitchen_runs`` are the
    plan's fittings of kind ``kitchen_run`` (a dining table is drawn towards them); ``routines``
    are the daily trips between places of ``plan`` (no routine term without a plan)."""
    w = prefs["weights"]
    rel = prefs["relations"]
    terms = []
    by_cat: dict[str, list[PieceVars]] = {}
    for pv in pieces:
        by_cat.setdefault(pv.spec.category, []).append(pv)
    for pv in pieces:
        for relation, target in pv.spec.relations:
            cands = [t for t in by_cat.get(target, []) if set(t.spec.rooms) & set(pv.spec.rooms)]
            if not cands or (pv.locked and cands[0].locked):
                continue
            terms += _relation_terms(m, pv, cands[0], relation, w, rel)
        if pv.locked:
            continue
        # wall-loving pieces not against a wall
        if not pv.spec.against_wall and pv.walls:
            on = sum(sum(c) for c in pv.walls.values())
            off = m.new_bool_var("")
            m.add(on == 0).only_enforce_if(off)
            m.add(on >= 1).only_enforce_if(off.negated())
            terms.append(int(w["wall"]) * off)
        if pv.spec.category == "bed":
            for (r, rot), choices in pv.walls.items():
                for wl_lit, wl in zip(choices, [x for x in geo[r].walls
                                                if x.outward == side_direction("back", rot)], strict=True):
                    for wall, lo, hi, _, _ in geo[r].windows:
                        if wall != wl:
                            continue
                        along = pv.x if wall.axis == "y" else pv.y
                        span = pv.size(rot)[0] if wall.axis == "y" else pv.size(rot)[1]
                        left, right, pen = m.new_bool_var(""), m.new_bool_var(""), m.new_bool_var("")
                        m.add(along + span <= lo).only_enforce_if(left)
                        m.add(along >= hi).only_enforce_if(right)
                        m.add_bool_or([left, right, pen, wl_lit.negated()])
                        terms.append(int(w["bed_under_window"]) * pen)
        if pv.spec.category == "dining_table":
            runs = [(sum(px for px, _ in f.zone or f.outline) / len(f.zone or f.outline),
                     sum(py for _, py in f.zone or f.outline) / len(f.zone or f.outline))
                    for f in kitchen_runs if f.room in pv.spec.rooms]
            if runs:
                sx, sy = _centre2(pv)
                ds = [_l1(m, sx, sy, round(2 * cx), round(2 * cy), 10) for cx, cy in runs]
                best = m.new_int_var(0, 10_000_000, "")
                m.add_min_equality(best, ds)
                terms.append(int(w["kitchen"]) * best)
        if pv.spec.category == "desk":
            wins = [(cx, cy) for r in pv.spec.rooms if r in geo for *_, cx, cy in geo[r].windows]
            if wins:
                sx, sy = _centre2(pv)
                ds = [_l1(m, sx, sy, 2 * cx, 2 * cy, 10) for cx, cy in wins]
                best = m.new_int_var(0, 10_000_000, "")
                m.add_min_equality(best, ds)
                terms.append(int(w["daylight"]) * best)
    terms += _routine_terms(m, pieces, plan, routines, prefs) if plan is not None else []
    terms += _align_terms(m, pieces, prefs)
    if not terms:
        return False
    m.minimize(sum(terms))
    return True


def _first_doors(plan: Plan, start: str) -> dict[str, tuple[int, int]]:
    """For every room reachable from ``start`` through the plan's doors, the centre of the
    door of ``start`` on a shortest (fewest doors) way there."""
    out: dict[str, tuple[int, int]] = {}
    frontier = []
    for d in plan.doors:
        if start in d.rooms:
            other = d.rooms[1] if d.rooms[0] == start else d.rooms[0]
            if other not in out and other != start:
                out[other] = (round(d.at[0]), round(d.at[1]))
                frontier.append(other)
    while frontier:
        nxt = []
        for r in frontier:
            for d in plan.doors:
                if r in d.rooms:
                    other = d.rooms[1] if d.rooms[0] == r else d.rooms[0]
                    if other not in out and other != start:
                        out[other] = out[r]
                        nxt.append(other)
        frontier = nxt
    return out


def _fixed_place(plan: Plan, name: str) -> tuple[tuple[int, int], tuple[str, ...]] | None:
    """A trip end that does not move: its point (mm) and the rooms it can be reached from
    directly (a door joins two). Fittings: the centre of their use zone (else of the fitting);
    rooms: the centre of their outline; ``"entrance"``: the entrance door's centre."""
    if name == "entrance":
        d = next((d for d in plan.doors if d.is_entrance), None)
        return ((round(d.at[0]), round(d.at[1])), d.rooms) if d is not None else None
    for d in plan.doors:
        if d.id == name:
            return (round(d.at[0]), round(d.at[1])), d.rooms
    for f in plan.fixtures:
        if f.id == name:
            shape = fixture_zone(f) or fixture_polygon(f)
            c = shape.centroid
            return (round(c.x), round(c.y)), (f.room,)
    for r in plan.rooms:
        if r.id == name:
            c = room_polygon(r).centroid
            return (round(c.x), round(c.y)), (r.id,)
    return None


#: The routine term counts distance in units of this many mm (a metre: the term only breaks
#: ties between otherwise equal spots; a stronger pull towards doors crowds them and the
#: checker then rejects more layouts).
_ROUTINE_MM = 1000


def _routine_terms(m: cp_model.CpModel, pieces: list[PieceVars], plan: Plan,
                   routines: tuple[Trip, ...], prefs: dict) -> list:
    """Per daily trip with a movable piece at one end: ``routine`` x trips a day x the L1
    distance (in metres) from the piece's centre to the other end, or, when that end lies in
    another room, to the door of the piece's room on the way there. Trips between two
    movable pieces of the model use both centres when the pieces share their only room and
    are left out otherwise; ends the model cannot place (pieces of other groups) too."""
    weight = int(prefs["weights"].get("routine", 0))
    if weight <= 0:
        return []
    by_id = {pv.spec.id: pv for pv in pieces}
    terms = []
    doors: dict[str, dict[str, tuple[int, int]]] = {}
    for trip in routines:
        coef = max(1, round(weight * trip.per_day))
        ends = [by_id.get(trip.origin), by_id.get(trip.target)]
        movable = [pv for pv in ends if pv is not None and not pv.locked]
        if not movable:
            continue
        if len(movable) == 2:
            a, b = movable
            if a.spec.rooms != b.spec.rooms or len(a.spec.rooms) != 1:
                continue
            ax, ay = _centre2(a)
            bx, by = _centre2(b)
            terms.append(coef * _l1(m, ax, ay, bx, by, _ROUTINE_MM))
            continue
        pv = movable[0]
        other = trip.target if pv is ends[0] else trip.origin
        if other in by_id:  # a locked piece of the model: its centre, when in pv's only room
            where = plan.piece(other).placement
            if where is None or any(r != where.room for r, _ in pv.alts):
                continue
            x0, y0, x1, y1 = footprint_box(by_id[other].spec, where)
            sx, sy = _centre2(pv)
            terms.append(coef * _l1(m, sx, sy, x0 + x1, y0 + y1, _ROUTINE_MM))
            continue
        got = _fixed_place(plan, other)
        if got is None:
            continue
        (px, py), reach = got
        tx_parts, ty_parts = [], []
        for (r, _), lit in pv.alts.items():
            if r in reach:
                pt = (px, py)
            else:
                way = doors.setdefault(r, _first_doors(plan, r))
                pt = next((way[t] for t in reach if t in way), None)
                if pt is None:
                    pt = (px, py)
            tx_parts.append(lit * (2 * pt[0]))
            ty_parts.append(lit * (2 * pt[1]))
        sx, sy = _centre2(pv)
        terms.append(coef * _l1(m, sx, sy, sum(tx_parts), sum(ty_parts), _ROUTINE_MM))
    return terms


def _align_terms(m: cp_model.CpModel, pieces: list[PieceVars], prefs: dict) -> list:
    """A penalty ``align`` for each pair of free-standing pieces of one room (movable, of no
    wall-loving category, not made to stand against a wall, allowed in that room only) whose
    footprint centres share neither x nor y. Only the ``align_pieces`` largest such pieces
    per room take part, so the pairs stay few."""
    w = int(prefs["weights"].get("align", 0))
    k = int(prefs.get("align", {}).get("pieces", 3))
    if w <= 0 or k < 2:
        return []
    lovers = set(prefs["wall"]["categories"])
    by_room: dict[str, list[PieceVars]] = {}
    for pv in pieces:
        rooms = {r for r, _ in pv.alts}
        if (pv.locked or pv.spec.against_wall or pv.spec.category in lovers or len(rooms) != 1):
            continue
        by_room.setdefault(rooms.pop(), []).append(pv)
    terms = []
    for group in by_room.values():
        group.sort(key=lambda pv: -pv.spec.width * pv.spec.depth)
        chosen = group[:k]
        for i, a in enumerate(chosen):
            for b in chosen[i + 1:]:
                ok = m.new_bool_var("")
                ex, ey = m.new_bool_var(""), m.new_bool_var("")
                m.add(_mid2(a, 0) == _mid2(b, 0)).only_enforce_if(ex)
                m.add(_mid2(a, 1) == _mid2(b, 1)).only_enforce_if(ey)
                m.add_bool_or([ex, ey]).only_enforce_if(ok)
                terms.append(w * (1 - ok))
    return terms


def decode(built: Built, solver: cp_model.CpSolver) -> dict[str, Placement]:
    """Placements of the built model's pieces in the solver's current solution."""
    out = {}
    for pv in built.pieces:
        for (r, rot), lit in pv.alts.items():
            if solver.value(lit):
                out[pv.spec.id] = Placement(solver.value(pv.x), solver.value(pv.y), rot, r)
    return out


def _wall_lovers() -> set[str]:
    return set(load_preferences()["wall"]["categories"])


def _symmetric(spec: PieceSpec) -> bool:
    """True when turning the piece by 180 degrees leaves its footprint and zones the same."""
    flip = {"front": "back", "back": "front", "left": "right", "right": "left"}
    zs = {(z.side, z.depth) for z in spec.zones}
    return zs == {(flip[s], d) for s, d in zs} and not spec.against_wall


def hint(built: Built, where: dict[str, Placement]) -> None:
    """Give CP-SAT ``where`` as the starting solution of the next run (positions and turns of
    the pieces it names)."""
    m = built.model
    m.clear_hints()
    for pv in built.pieces:
        p = where.get(pv.spec.id)
        if p is None:
            continue
        m.add_hint(pv.x, p.x)
        m.add_hint(pv.y, p.y)
        for (r, rot), lit in pv.alts.items():
            m.add_hint(lit, int(r == p.room and rot == p.rotation))


def differs(m: cp_model.CpModel, pv: PieceVars, where: Placement, move: int) -> list[cp_model.IntVar]:
    """Literals whose disjunction says ``pv`` no longer stands as ``where`` says: another room
    or turn (180-degree turns of symmetric pieces do not count), or moved ``move`` mm or more."""
    out = []
    same = [lit for (r, rot), lit in pv.alts.items()
            if r == where.room and (rot == where.rotation or
                                    (_symmetric(pv.spec) and rot % 180 == where.rotation % 180))]
    other = [lit for lit in pv.alts.values() if all(lit is not s for s in same)]
    out += other
    for var, v in ((pv.x, where.x), (pv.y, where.y)):
        a, b = m.new_bool_var(""), m.new_bool_var("")
        m.add(var >= v + move).only_enforce_if(a)
        m.add(var <= v - move).only_enforce_if(b)
        out += [a, b]
    return out
