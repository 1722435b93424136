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
- A piece that lies flat (a rug, :func:`~roomfit.audit.geometry.lies_flat`) is floor to
  everything else, as in the audit: it is in none of the above, nor in the gap rules; its own
  ``NoOverlap2D`` keeps it off the outside floor and the fittings only.
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
from collections.abc import Callable
from dataclasses import dataclass, field

import shapely
from ortools.sat.python import cp_model
from shapely import box

from roomfit.audit.geometry import lies_flat, side_direction
from roomfit.plan.data import Plan, Trip
from roomfit.rules.catalog import PieceSpec, ZoneReq
from roomfit.rules.sets import RuleSet
from roomfit.solve.rooms import Rect, RoomGeo, cover_rects, cross_thickness, room_geometry
from roomfit.solve.symmetry import equal_classes, order_equal
from roomfit.solve.terms import add_objective
from roomfit.solve.vars import Built, PieceVars, load_preferences, symmetric, wall_lovers

__all__ = [
    "tune",
    "build_model",
    "ROUTE_MARGIN",
    "ORDER_FROM",
    "inscribed",
]


def tune(params) -> None:
    """CP-SAT settings that suit these small placement models: one round of presolve, no
    symmetry detection, no probing. Measured on a 10-piece room: median time to a first
    layout 0.18 s against 1.09 s with the defaults, and equal or better objectives."""
    params.max_presolve_iterations = 1
    params.symmetry_level = 0
    params.cp_model_probing_level = 0


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

def _no_overlap(m: cp_model.CpModel, boxes: list) -> None:
    if len(boxes) > 1:
        m.add_no_overlap_2d([b[0] for b in boxes], [b[1] for b in boxes])


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


@dataclass
class _Ctx:
    """What every step of building one model shares: the model, the rooms' geometry, the
    grid, and the assumption literals of the rule groups (made on first use when ``assume``)."""

    m: cp_model.CpModel
    plan: Plan
    rules: RuleSet
    geo: dict[str, RoomGeo]
    grid: int
    assume: bool
    relaxed: bool
    no_turning: frozenset[str]
    apart: bool = False
    groups: dict[str, cp_model.IntVar] = field(default_factory=dict)

    def group(self, name: str) -> cp_model.IntVar | None:
        if not self.assume:
            return None
        if name not in self.groups:
            self.groups[name] = self.m.new_bool_var(name)
        return self.groups[name]


#: Movable pieces from which equal ones are kept in (x, y) order (``solve.symmetry``): in a
#: smaller group the search is quick and the ordering only changes which layouts CP-SAT
#: meets first, for the worse on the one-bed sample (two nightstands: no layout in 4 s in
#: 6 runs with it, one in 3.7 s in 3 of 3 without); large rooms, where equal pieces multiply
#: the search, keep it (the same size from which a first layout is built unit by unit).
ORDER_FROM = 14


def build_model(
    plan: Plan,
    rules: RuleSet,
    specs: list[PieceSpec],
    rooms: list[str],
    grid: int = 50,
    *,
    strengthen: bool = True,
    relaxed: bool = False,
    assume: bool = False,
    objective: bool = True,
    geo: dict[str, RoomGeo] | None = None,
    routines: tuple[Trip, ...] | None = None,
    extra_terms: Callable[[cp_model.CpModel, list[PieceVars]], list] | None = None,
    no_turning: frozenset[str] = frozenset(),
    apart: bool = False,
) -> Built:
    """Build the placement model for ``specs`` in ``rooms``.

    ``strengthen`` adds the pairwise gap rules and door walkways (a restriction that steers
    the search); ``relaxed`` makes the model a relaxation of the audit where the plain model
    is stricter than it (the turning space as shapes inside the circle, floor kept clear covered
    by the grid cells inside it): every layout the audit passes is then a solution, which is
    what a proof of impossibility needs. ``assume`` puts every rule group behind an assumption
    literal (for explaining infeasibility); ``objective`` adds the soft preferences, and
    ``extra_terms(model, pieces)`` (functional groups) more linear terms to minimise. Locked
    pieces keep their plan placement. ``routines`` are the daily trips the routine term uses
    (default: the plan's own). Rooms in ``no_turning`` get no turning space (the bare room
    cannot hold one: a building finding, furnished around). ``apart`` lets pieces overlap
    each other and drops the turning space (each piece keeps to the room, the fittings and
    the floor kept clear on its own): with ``relaxed``, a relaxation whose optimum bounds
    the objective of every layout the audit passes (``roomfit.solve.bound``).
    """
    m = cp_model.CpModel()
    geo = geo or {r: room_geometry(plan, rules, plan.room(r), grid) for r in rooms}
    ctx = _Ctx(m, plan, rules, geo, grid, assume, relaxed, no_turning, apart)
    route = math.ceil(rules.get("route.width").exact_mm) + ROUTE_MARGIN
    pieces = [_piece_vars(ctx, spec) for spec in specs]
    prefs = load_preferences()
    _against_walls(ctx, pieces, set(prefs["wall"]["categories"]))
    # footprints of standing pieces, and of pieces that lie flat (rugs: floor to the rest)
    fp: dict[str, list[tuple[PieceVars, int, object, object]]] = {r: [] for r in geo}
    flat: dict[str, list[tuple[PieceVars, int, object, object]]] = {r: [] for r in geo}
    for pv in pieces:
        for (r, rot), lit in pv.alts.items():
            w, d = pv.size(rot)
            (flat if lies_flat(pv.spec) else fp)[r].append(
                (pv, rot, m.new_optional_fixed_size_interval_var(pv.x, w, lit, ""),
                 m.new_optional_fixed_size_interval_var(pv.y, d, lit, "")))
    standing = [pv for pv in pieces if not lies_flat(pv.spec)]
    related = _related_pairs(pieces)
    for r, g in geo.items():
        for own in ([[f for f in fp[r] if f[0] is pv] for pv in standing] if apart else [fp[r]]):
            if own or not apart:
                _floor_rules(ctx, g, own, strengthen)
        for pv in pieces:  # a rug keeps off the outside floor and the fittings, nothing else
            if rug := [(ix, iy) for q, _, ix, iy in flat[r] if q is pv]:
                _no_overlap(m, rug + [_fixed_box(m, rect) for rect in g.hard])
        _zone_rules(ctx, g, pieces, fp[r])
        if strengthen:
            _gap_rules(m, standing, g, route, grid, related)
    terms = extra_terms(m, pieces) if extra_terms is not None and objective else []
    routines = plan.routines if routines is None else routines
    movable = sum(not pv.locked for pv in pieces)
    classes = [] if assume or movable < ORDER_FROM else equal_classes(pieces, routines)
    order_equal(m, classes, max(g.bbox[3] for g in geo.values())
                - min(g.bbox[1] for g in geo.values()) + 1)
    has_obj = False
    if objective:
        runs = tuple(f for f in plan.fixtures if f.kind == "kitchen_run" and f.room in geo)
        has_obj = add_objective(m, pieces, geo, prefs, runs, plan, routines, terms)
    return Built(m, pieces, geo, ctx.groups, has_obj, route, classes)


def _piece_vars(ctx: _Ctx, spec: PieceSpec) -> PieceVars:
    """One piece's position and its (room, rotation) literals, exactly one on (or, behind an
    assumption, at most one), each keeping the footprint inside the room's bounding box."""
    m, geo = ctx.m, ctx.geo
    piece = ctx.plan.piece(spec.id)
    where = piece.placement if piece.locked else None
    # a half turn changes nothing for a piece whose zones are symmetric and that needs no
    # wall (a table, a lamp): two rotations suffice
    rots = [0, 90] if symmetric(spec) and spec.category not in wall_lovers() else [0, 90, 180, 270]
    allowed = [r for r in spec.rooms if r in geo]
    if where is not None:
        allowed, rots = [where.room], [where.rotation]
    alt_keys = []
    for r in allowed:
        bx0, by0, bx1, by1 = geo[r].bbox
        for rot in rots:
            w, d = (spec.width, spec.depth) if rot in (0, 180) else (spec.depth, spec.width)
            if w <= bx1 - bx0 and d <= by1 - by0:
                alt_keys.append((r, rot))
    if where is not None:
        x, y = m.new_constant(where.x), m.new_constant(where.y)
    elif alt_keys:
        x = m.new_int_var(min(geo[r].bbox[0] for r, _ in alt_keys),
                        max(geo[r].bbox[2] for r, _ in alt_keys), f"x_{spec.id}")
        y = m.new_int_var(min(geo[r].bbox[1] for r, _ in alt_keys),
                        max(geo[r].bbox[3] for r, _ in alt_keys), f"y_{spec.id}")
    else:
        x, y = m.new_constant(0), m.new_constant(0)
    alts = {k: m.new_bool_var(f"a_{spec.id}_{k[0]}_{k[1]}") for k in alt_keys}
    pv = PieceVars(spec, x, y, alts, where is not None)
    present = ctx.group(f"piece.{spec.id}")
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
    return pv


def _against_walls(ctx: _Ctx, pieces: list[PieceVars], lovers: set[str]) -> None:
    """Pieces that must stand against a wall (``against_wall``) have their back flush with one
    of the room's axis-aligned walls facing the right way; wall-loving pieces may (the
    objective rewards it). ``pv.walls`` keeps the choice literals per (room, rotation)."""
    m = ctx.m
    for pv in pieces:
        need = pv.spec.against_wall
        if not (need or pv.spec.category in lovers) or pv.locked:
            continue
        wall_grp = ctx.group(f"wall.{pv.spec.id}") if need else None
        for (r, rot), lit in pv.alts.items():
            w, d = pv.size(rot)
            back = side_direction("back", rot)
            choices = []
            for wl in ctx.geo[r].walls:
                if wl.outward != back:
                    continue
                c = m.new_bool_var("")
                if wl.axis == "x":
                    m.add(pv.x == (wl.at if back[0] == -1 else wl.at - w)).only_enforce_if(c)
                    m.add(pv.y >= wl.lo).only_enforce_if(c)
                    m.add(pv.y + d <= wl.hi).only_enforce_if(c)
                else:
                    m.add(pv.y == (wl.at if back[1] == -1 else wl.at - d)).only_enforce_if(c)
                    m.add(pv.x >= wl.lo).only_enforce_if(c)
                    m.add(pv.x + w <= wl.hi).only_enforce_if(c)
                m.add_implication(c, lit)
                choices.append(c)
            pv.walls[(r, rot)] = choices
            if need and wall_grp is None:
                m.add(sum(choices) == lit)
            elif need:
                m.add(sum(choices) == lit).only_enforce_if(wall_grp)
                m.add(sum(choices) <= lit)
            else:
                m.add(sum(choices) <= lit)


def _floor_rules(ctx: _Ctx, g: RoomGeo, fp: list, strengthen: bool) -> None:
    """One room's footprints keep off each other, the hard obstacles and the turning space;
    the floor kept clear (door approach, fitting zones, and door walkways when strengthened)
    holds no footprint; tall pieces keep off the window bands."""
    m = ctx.m
    feet = [(ix, iy) for _, _, ix, iy in fp]
    boxes = feet + [_fixed_box(m, rect) for rect in g.hard]
    turning = 0 if ctx.apart else ctx.rules.mm("turning.size")
    if turning > 0 and g.room.id not in ctx.no_turning:
        boxes += _turning_boxes(m, g, turning, ctx.rules.text("turning.shape"), ctx.relaxed,
                                ctx.group(f"turning.{g.room.id}"))
    _no_overlap(m, boxes)
    # floor kept clear of furniture (it may overlap zones and the turning space)
    if ctx.assume:
        for gid, rects in (g.inner_clear if ctx.relaxed else g.clear):
            lit = ctx.group(gid)
            _no_overlap(m, feet + [_fixed_box(m, rect, lit) for rect in rects])
    else:
        keep = [box(*rect) for _, rects in (g.inner_clear if ctx.relaxed else g.clear)
                for rect in rects]
        keep += [box(*rect) for rect in g.walkways] if strengthen else []
        if keep:
            _no_overlap(m, feet + [_fixed_box(m, rect)
                                   for rect in cover_rects(shapely.union_all(keep), ctx.grid)])
    # window bands keep tall pieces away
    for wid, sill, rects in g.bands:
        tall = [(ix, iy) for q, _, ix, iy in fp if q.spec.height > sill or q.spec.tall]
        if tall and rects:
            lit = ctx.group(f"window.{wid}")
            _no_overlap(m, tall + [_fixed_box(m, rect, lit) for rect in rects])


def _zone_rules(ctx: _Ctx, g: RoomGeo, pieces: list[PieceVars], fp: list) -> None:
    """Use zones stay inside the room's box and free of other footprints and of the hard
    obstacles (one ``NoOverlap2D`` per piece); they may overlap other zones."""
    m, r = ctx.m, g.room.id
    hard_boxes = [_fixed_box(m, rect) for rect in g.hard]
    bx0, by0, bx1, by1 = g.bbox
    for pv in pieces:
        if not pv.spec.zones or not any(k[0] == r for k in pv.alts):
            continue
        zlit = ctx.group(f"zone.{pv.spec.id}")
        zb = []
        for (rr, rot), lit in pv.alts.items():
            if rr != r:
                continue
            pres = lit
            if zlit is not None:
                pres = m.new_bool_var("")
                m.add_bool_and([lit, zlit]).only_enforce_if(pres)
                m.add_bool_or([lit.negated(), zlit.negated()]).only_enforce_if(pres.negated())
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
        if zb:
            others = [(ix, iy) for q, _, ix, iy in fp if q is not pv and not ctx.apart]
            _no_overlap(m, zb + others + hard_boxes)


def _turning_boxes(m: cp_model.CpModel, g: RoomGeo, size: int, shape: str, relaxed: bool,
                   lit: cp_model.IntVar | None) -> list:
    """Disjoint rectangles of one room's turning space, placed anywhere in its box.

    Plain model: shapes that hold the turning space (a ``square`` D x D; for a circle, the
    cross of :func:`~roomfit.solve.rooms.cross_thickness`), so every solution has one.
    Relaxed model: shapes *inside* it (:func:`inscribed`), so every layout the audit accepts
    is a solution. ``circle-or-t`` counts as the circle in the plain model."""
    bx0, by0, bx1, by1 = g.bbox
    if size > bx1 - bx0 or size > by1 - by0:
        m.add_bool_or([] if lit is None else [lit.negated()])  # no room for a turning space at all
        return []
    tx = m.new_int_var(bx0 - 1, bx1 - size + 1, "turn_x")
    ty = m.new_int_var(by0 - 1, by1 - size + 1, "turn_y")

    def iv(start, length):
        if lit is None:
            return m.new_fixed_size_interval_var(start, length, "")
        return m.new_optional_fixed_size_interval_var(start, length, lit, "")

    if relaxed:
        h = size // 2
        return [(iv(tx + h + x0, x1 - x0), iv(ty + h + y0, y1 - y0))
                for x0, y0, x1, y1 in inscribed(size, shape)]
    m.add(tx >= bx0)
    m.add(ty >= by0)
    m.add(tx + size <= bx1)
    m.add(ty + size <= by1)
    if shape == "square":
        return [(iv(tx, size), iv(ty, size))]
    t = cross_thickness(size)
    o = (size - t) // 2
    return [
        (iv(tx, size), iv(ty + o, t)),
        (iv(tx + o, t), iv(ty, o)),
        (iv(tx + o, t), iv(ty + o + t, size - o - t)),
    ]


def inscribed(size: int, shape: str) -> list[Rect]:
    """Disjoint rectangles around a centre (0, 0) whose union lies inside every turning space
    of ``shape`` and ``size`` D centred there, 1 mm in from its edge (for a centre rounded
    to the millimetre).

    ``circle``: a square of side 0.705 D and two bars 0.93 D x 0.33 D across it (each
    rectangle's diagonal at most D: 0.705**2 * 2 = 0.994 and 0.93**2 + 0.33**2 = 0.974);
    ``square``: the square itself; ``circle-or-t``: a 0.6 D square, which lies inside the
    circle (diagonal 0.85 D) and inside the T-shaped space's 0.6 D deep bar in any of its
    four turns (2010 ADA §304.3.2: 36 in of 60 in).

    >>> inscribed(1000, "square")
    [(-499, -499, 499, 499)]
    >>> len(inscribed(1524, "circle"))
    5
    """
    if shape == "square":
        h = size // 2 - 1
        return [(-h, -h, h, h)]
    if shape != "circle":
        h = int(0.3 * size) - 1
        return [(-h, -h, h, h)]
    hl, ht, hs = int(0.465 * size) - 1, int(0.165 * size) - 1, int(0.3525 * size) - 1
    return [(-hl, -ht, hl, ht), (-hs, ht, hs, hs), (-hs, -hs, hs, -ht),
            (-ht, hs, ht, hl), (-ht, -hl, ht, -hs)]


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
               skip: frozenset[frozenset[str]] | set[frozenset[str]] = frozenset()) -> None:
    """Two footprints in one room nearly touch (gaps at most ``grid`` both ways) or stand
    ``route`` apart on one axis; the same between a piece and the room's walls and fittings.
    Pairs in ``skip`` (related pieces) may stand at any distance; locked pieces are not held
    to these rules among themselves nor against the walls (nothing is left to steer there)."""
    r = g.room.id
    here = [pv for pv in pieces if any(k[0] == r for k in pv.alts)]
    near = grid
    for i, p in enumerate(here):
        pxe, pye = p.ends(m)
        for q in here[i + 1:]:
            if frozenset((p.spec.id, q.spec.id)) in skip or (p.locked and q.locked):
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
        if p.locked or any(rel == "beside_head" for rel, _ in p.spec.relations):
            continue  # fixed, or a nightstand's nook between the bed and a wall (no walkway)
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
