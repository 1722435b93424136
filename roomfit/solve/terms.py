"""The soft preferences of the placement model: relations between pieces, walls, windows,
the daily routine and alignment (weights in ``roomfit/data/preferences.toml``).

Every term is linear in the model's variables: a relation is a literal that holds only when
the relation holds exactly, with a fixed penalty when it does not plus a distance gradient;
distances are L1, in whole units of a stated number of millimetres. See ``docs/solver.md``
(Objective) for each term and why it weighs what it weighs.

A later module for functional groups (``roomfit.solve.groups``) adds its terms through
:func:`add_objective`'s ``extra`` argument: a list of linear terms added to the sum.
"""

from __future__ import annotations

import math

from ortools.sat.python import cp_model

from roomfit.audit.geometry import footprint_box, side_direction
from roomfit.audit.places import end_point
from roomfit.plan.data import Plan, Trip
from roomfit.rules.catalog import PieceSpec
from roomfit.rules.groups import param
from roomfit.solve.groups import conversation_terms, relation_group_terms, rug_terms, unmet_terms
from roomfit.solve.hard_rules import any_of, axis_sign, bed_window_literal, view_literal
from roomfit.solve.rooms import RoomGeo
from roomfit.solve.vars import PieceVars

__all__ = ["add_objective", "facing_range"]


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


def facing_range(seat: PieceSpec, tv: PieceSpec) -> tuple[int, int]:
    """Distance (mm) from a seat's front to a facing TV's front: ``view_min`` to ``view_max``
    screen diagonals (catalogue data, with its sources); (0, 0) when either is not given."""
    if not tv.screen or not seat.view_max:
        return 0, 0
    return math.ceil(seat.view_min * tv.screen), math.floor(seat.view_max * tv.screen)


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
        axis, sign = axis_sign(side_direction("front", rot))
        _gap_in(m, seat, table, axis, sign, lo, hi, p)
        _on_axis(m, seat, table, 1 - axis, tol, p)
        options.append(p)
    return any_of(m, options)


def _beside_head(m: cp_model.CpModel, stand: PieceVars, bed: PieceVars) -> cp_model.IntVar:
    """A literal that implies: ``stand`` stands beside one long side of ``bed`` (gap_min to
    gap_max mm from it), its centre on the head half of that side."""
    options = []
    for (r, rot), lit in bed.alts.items():
        slits = [t for (sr, _), t in stand.alts.items() if sr == r]
        if not slits:
            continue
        head_axis, head_sign = axis_sign(side_direction("back", rot))
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
    return any_of(m, options)


def _relation_terms(m: cp_model.CpModel, pv: PieceVars, t: PieceVars, relation: str,
                    w: dict, pieces: list[PieceVars]) -> list:
    """Penalty terms of one relation: a fixed penalty when it is not met, plus per cm from the
    related piece's spot (a gradient towards it); ``pieces``: every piece of the model (the
    floor between a seat and its screen is kept clear of the tall ones)."""
    if relation == "beside_head":
        met = _beside_head(m, pv, t)
        tx, ty = _point2(t, "back", 0)
        sx, sy = _centre2(pv)
        weight = int(w["beside_head"])
    elif relation == "in_front":
        met = _in_front(m, pv, t, param("reach.off_axis").mm)
        gap = max(pv.spec.gap_min, max((z.depth for z in t.spec.zones if z.side == "front"), default=0))
        gap += min(pv.spec.width, pv.spec.depth) // 2
        tx, ty = _point2(t, "front", gap)
        sx, sy = _centre2(pv)
        weight = int(w["in_front"])
    elif relation == "facing":
        lo, hi = facing_range(pv.spec, t.spec)
        if hi <= 0:
            return []
        met = view_literal(m, pv, t, pieces)
        tx, ty = _point2(pv, "front", (lo + hi) // 2 + t.spec.depth // 2)
        sx, sy = _centre2(t)
        weight = int(w["facing"])
    else:
        return []
    return [weight * (1 - met), int(w["relation"]) * _l1(m, tx, ty, sx, sy, 10),
            *relation_group_terms(m, pv, t, relation, met)]


def add_objective(m: cp_model.CpModel, pieces: list[PieceVars], geo: dict[str, RoomGeo], prefs: dict,
               kitchen_runs: tuple = (), plan: Plan | None = None,
               routines: tuple[Trip, ...] = (), extra: list | None = None) -> bool:
    """Soft preferences (weights in ``data/preferences.toml``); ``kitchen_runs`` are the
    plan's fittings of kind ``kitchen_run`` (a dining table is drawn towards them); ``routines``
    are the daily trips between places of ``plan`` (no routine term without a plan); ``extra``
    are more linear terms to add (functional groups)."""
    w = prefs["weights"]
    terms = []
    by_cat: dict[str, list[PieceVars]] = {}
    for pv in pieces:
        by_cat.setdefault(pv.spec.category, []).append(pv)
    for pv in pieces:
        for relation, target in pv.spec.relations:
            cands = [t for t in by_cat.get(target, []) if set(t.spec.rooms) & set(pv.spec.rooms)]
            if not cands or (pv.locked and cands[0].locked):
                continue
            terms += _relation_terms(m, pv, cands[0], relation, w, pieces)
        if pv.locked:
            continue
        # wall-loving pieces not against a wall
        if not pv.spec.against_wall and pv.walls:
            on = sum(sum(c) for c in pv.walls.values())
            off = m.new_bool_var("")
            m.add(on == 0).only_enforce_if(off)
            m.add(on >= 1).only_enforce_if(off.negated())
            terms.append(int(w["wall"]) * off)
        if pv.spec.category == "bed" and pv.walls:
            clear = bed_window_literal(m, pv, geo)
            terms += [int(w["bed_under_window"]) * (1 - clear),
                      *unmet_terms(1 - clear, "group.bed_window")]
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
    terms += conversation_terms(m, pieces)
    terms += rug_terms(m, pieces)
    terms += extra or []
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
    """A trip end that does not move: its point (whole mm) and the rooms it can be reached
    from directly, by the route scorer's own rule (``roomfit.audit.places.end_point``)."""
    got = end_point(plan, name)
    if got is None:
        return None
    (x, y), rooms = got
    return (round(x), round(y)), rooms


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
            pt: tuple[int, int] = (px, py)
            if r not in reach:
                way = doors.setdefault(r, _first_doors(plan, r))
                pt = next((way[t] for t in reach if t in way), pt)
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
