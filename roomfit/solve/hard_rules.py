"""A missed functional-group rule as a hard constraint of the placement model, in two forms.

The layout-quality audit (``roomfit.audit.quality``) judges a finished arrangement with exact
geometry; the placement model speaks in linear constraints. To ask "can this room have the
rule at all?" (:mod:`roomfit.solve.possible`) a rule is written twice:

- **necessary** (``Form.NECESSARY``): every arrangement the audit passes for the rule meets
  it. Added to the *relaxed* model (every arrangement the clearance audit passes is one of
  its solutions), a proof of infeasibility proves that no arrangement of those rooms passes
  the clearance audit and meets the rule: "not possible in this room".
- **sufficient** (``Form.SUFFICIENT``): every arrangement that meets it passes the audit's
  rule for that pair of pieces (the audit still judges the whole arrangement). Added to the
  search, it looks for an arrangement that has the rule.

Each form is a literal made true (``model.add(lit == 1)``) by the caller. The rules, by the
audit's ids (pairs the audit measures on one pair of pieces go together):

- ``group.view`` + ``group.view_angle``: some seat of the viewing group and the screen stand
  front to front in one room (with turns in steps of 90 degrees, two fronts each within
  15 degrees of the line between them face each other exactly). With ``A`` the distance
  between the fronts and ``L`` the offset of the centre lines, the audit asks
  ``lo <= sqrt(A^2 + L^2) <= hi`` and ``atan(L / A) <= 15 deg``. Necessary:
  ``lo cos 15 <= A <= hi`` and ``L <= A tan 15`` (tangent rounded up). Sufficient:
  ``lo <= A <= hi cos 15`` and ``L <= A tan 15`` (rounded down).
- ``group.reach`` + ``group.reach_axis``: the coffee table beyond the front of some seat of
  the related category, the gap within :func:`~roomfit.audit.group_measures.reach_range`
  and the centres within ``reach.off_axis``: the audit's own measure (both forms alike).
- ``group.bedside``: necessary, the nightstand's box within ``gap_max`` (along x and along y,
  which the straight-line distance bounds) of the head half of a used long side of a bed of
  the related category; sufficient, beyond that side ``gap_min`` to ``gap_max`` with its
  centre on the head half.
- ``group.bed_window``: where the bed's head is flush with a wall, the head's span clear of
  every window on that wall (both forms).
- ``group.talk`` + ``group.talk_turn``: some other seat of the conversation group in the
  room, its front middle within speaking distance of this seat's (necessary: along x and
  along y; sufficient: the L1 distance) and not behind this seat's back (exact).
- ``group.rug``: the piece the audit measures on the rug (:func:`~roomfit.solve.groups.rug_literal`)
  overlaps it along x and along y by :func:`~roomfit.solve.groups.rug_overlap` in either
  form, or the rug's room holds no such piece.

A piece whose front matters (seats, screens) and that the model turns only in half turns
(symmetric pieces) makes the necessary form unsound: :func:`rule_literal` then says so.
"""

from __future__ import annotations

import math
from enum import StrEnum

from ortools.sat.python import cp_model

from roomfit.audit.geometry import side_direction
from roomfit.audit.group_measures import reach_range, used_long_sides, view_range
from roomfit.rules.groups import param
from roomfit.solve.groups import dot, doubled_mid, rug_literal
from roomfit.solve.rooms import RoomGeo
from roomfit.solve.symmetry import interchangeable
from roomfit.solve.vars import PieceVars

__all__ = ["Form", "FAMILIES", "family", "rule_literal", "require", "view_literal", "bed_window_literal",
           "any_of", "axis_sign"]

_SCALE = 10_000  # tangents as whole ten-thousandths


class Form(StrEnum):
    """Which side of the audit's rule a constraint lies on (see the module text)."""

    NECESSARY = "necessary"
    SUFFICIENT = "sufficient"


#: The audit rules measured on one pair of pieces, taken together, by their first rule.
FAMILIES: dict[str, tuple[str, ...]] = {
    "group.view": ("group.view", "group.view_angle", "group.view_clear"),
    "group.reach": ("group.reach", "group.reach_axis"),
    "group.bedside": ("group.bedside",),
    "group.bed_window": ("group.bed_window",),
    "group.talk": ("group.talk", "group.talk_turn"),
    "group.rug": ("group.rug",),
}


def family(rule: str) -> str | None:
    """The family (:data:`FAMILIES` key) an audit rule belongs to; None when the model cannot
    state it."""
    return next((k for k, rules in FAMILIES.items() if rule in rules), None)


def _lo(pv: PieceVars, axis: int) -> cp_model.IntVar:
    return pv.x if axis == 0 else pv.y


def axis_sign(direction: tuple[int, int]) -> tuple[int, int]:
    """(axis, sign) of a unit direction: axis 0 is x, 1 is y."""
    return (0, direction[0]) if direction[0] else (1, direction[1])


def any_of(m: cp_model.CpModel, options: list[cp_model.IntVar]) -> cp_model.IntVar:
    """A literal that implies one of ``options`` (false when there are none)."""
    ok = m.new_bool_var("")
    if options:
        m.add_bool_or(options).only_enforce_if(ok)
    else:
        m.add(ok == 0)
    return ok


def _option(m: cp_model.CpModel, *lits: cp_model.IntVar | list[cp_model.IntVar]) -> cp_model.IntVar:
    """A new literal implying each literal of ``lits`` (a list: one of its literals)."""
    p = m.new_bool_var("")
    for lit in lits:
        if isinstance(lit, list):
            m.add_bool_or(lit).only_enforce_if(p)
        else:
            m.add_implication(p, lit)
    return p


def _in(pv: PieceVars, room: str) -> list[cp_model.IntVar]:
    return [lit for (r, _), lit in pv.alts.items() if r == room]


def _turns_fully(pv: PieceVars) -> bool:
    """True when the model tries every quarter turn of the piece (or it is locked)."""
    return pv.locked or len({rot for _, rot in pv.alts}) == 4


def _clear_between(m: cp_model.CpModel, p: cp_model.IntVar, room: str, axis: int,
                   band: tuple[cp_model.LinearExprT, cp_model.LinearExprT],
                   sides: tuple[PieceVars, int, PieceVars, int], others: list[PieceVars]) -> None:
    """When ``p`` holds: every piece of ``others`` taller than ``view.clear_height`` that
    stands in ``room`` keeps out of the box between the two fronts (along ``axis`` the
    ``band`` from one front line to the other; across it, the span of both pieces), which
    holds the convex hull the audit's ``group.view_clear`` measures."""
    limit = param("view.clear_height").mm
    seat, rot, screen, srot = sides
    b = 1 - axis
    for q in others:
        if q.spec.height <= limit or q.spec.height == 0:
            continue
        for (r, qrot), qlit in q.alts.items():
            if r != room:
                continue
            q_hi = [_lo(q, a) + q.size(qrot)[a] for a in (0, 1)]
            opts = [m.new_bool_var("") for _ in range(4)]
            m.add(q_hi[axis] <= band[0]).only_enforce_if(opts[0])
            m.add(_lo(q, axis) >= band[1]).only_enforce_if(opts[1])
            for me, turn in ((seat, rot), (screen, srot)):
                m.add(q_hi[b] <= _lo(me, b)).only_enforce_if(opts[2])
                m.add(_lo(q, b) >= _lo(me, b) + me.size(turn)[b]).only_enforce_if(opts[3])
            m.add_bool_or(opts).only_enforce_if([p, qlit])


def _view(m: cp_model.CpModel, seat: PieceVars, screen: PieceVars, form: Form,
          others: list[PieceVars] | None = None) -> cp_model.IntVar:
    lo, hi = view_range(seat.spec, screen.spec)
    if hi <= 0:
        return any_of(m, [])
    theta = math.radians(param("view.off_axis").value)
    if form == Form.NECESSARY:
        a_min, a_max = math.floor(lo * math.cos(theta)), hi
        tan = math.ceil(math.tan(theta) * _SCALE)
    else:
        a_min, a_max = lo, math.floor(hi * math.cos(theta))
        tan = math.floor(math.tan(theta) * _SCALE)
    options = []
    for (r, rot), lit in seat.alts.items():
        srot = (rot + 180) % 360
        tlit = screen.alts.get((r, srot))
        if tlit is None:
            continue
        p = _option(m, lit, tlit)
        axis, sign = axis_sign(side_direction("front", rot))
        seat_hi = _lo(seat, axis) + seat.size(rot)[axis]
        screen_hi = _lo(screen, axis) + screen.size(srot)[axis]
        gap = (_lo(screen, axis) - seat_hi) if sign > 0 else (_lo(seat, axis) - screen_hi)
        b = 1 - axis
        across2 = (2 * _lo(seat, b) + seat.size(rot)[b]) - (2 * _lo(screen, b) + screen.size(srot)[b])
        m.add(gap >= max(1, a_min)).only_enforce_if(p)
        m.add(gap <= a_max).only_enforce_if(p)
        m.add(_SCALE * across2 <= 2 * tan * gap).only_enforce_if(p)
        m.add(-_SCALE * across2 <= 2 * tan * gap).only_enforce_if(p)
        if form == Form.SUFFICIENT and others:
            band = (seat_hi, _lo(screen, axis)) if sign > 0 else (screen_hi, _lo(seat, axis))
            _clear_between(m, p, r, axis, band, (seat, rot, screen, srot), others)
        options.append(p)
    return any_of(m, options)


def view_literal(m: cp_model.CpModel, seat: PieceVars, screen: PieceVars,
                 pieces: list[PieceVars]) -> cp_model.IntVar:
    """A literal that implies: ``seat`` and ``screen`` meet the audit's ``group.view``,
    ``group.view_angle`` and ``group.view_clear`` (the sufficient form; ``pieces``: every
    piece of the model): the solver's ``facing`` relation."""
    return _view(m, seat, screen, Form.SUFFICIENT,
                 [pv for pv in pieces if pv is not seat and pv is not screen])


def _reach(m: cp_model.CpModel, table: PieceVars, seat: PieceVars) -> cp_model.IntVar:
    lo, hi = reach_range(table.spec, seat.spec)
    tol = param("reach.off_axis").mm
    ends = table.ends(m)
    options = []
    for (r, rot), lit in seat.alts.items():
        tlits = _in(table, r)
        if not tlits:
            continue
        p = _option(m, lit, tlits)
        axis, sign = axis_sign(side_direction("front", rot))
        seat_hi = _lo(seat, axis) + seat.size(rot)[axis]
        gap = (_lo(table, axis) - seat_hi) if sign > 0 else (_lo(seat, axis) - ends[axis])
        b = 1 - axis
        t2 = 2 * _lo(table, b) + (table.width_expr() if b == 0 else table.depth_expr())
        across2 = (2 * _lo(seat, b) + seat.size(rot)[b]) - t2
        for c in (gap >= lo, gap <= hi, across2 <= 2 * tol, -across2 <= 2 * tol):
            m.add(c).only_enforce_if(p)
        options.append(p)
    return any_of(m, options)


def _bedside(m: cp_model.CpModel, stand: PieceVars, bed: PieceVars, form: Form) -> cp_model.IntVar:
    g_lo, g_hi = stand.spec.gap_min, stand.spec.gap_max
    s_ends = stand.ends(m)
    options = []
    for (r, rot), lit in bed.alts.items():
        slits = _in(stand, r)
        if not slits:
            continue
        ha, hsign = axis_sign(side_direction("back", rot))
        length = bed.size(rot)[ha]
        for side in used_long_sides(bed.spec):
            p = _option(m, lit, slits)
            sa, ssign = axis_sign(side_direction(side, rot))
            bed_hi = {a: _lo(bed, a) + bed.size(rot)[a] for a in (0, 1)}
            line = bed_hi[sa] if ssign > 0 else _lo(bed, sa)
            if form == Form.SUFFICIENT:
                gap = (_lo(stand, sa) - line) if ssign > 0 else (line - s_ends[sa])
                mid2 = 2 * _lo(stand, ha) + (stand.width_expr() if ha == 0 else stand.depth_expr())
                head = 2 * _lo(bed, ha) if hsign < 0 else 2 * bed_hi[ha] - length
                cons = [gap >= g_lo, gap <= g_hi, mid2 >= head, mid2 <= head + length]
            else:  # the box within g_hi of the head half, along each axis
                h0 = _lo(bed, ha) if hsign < 0 else bed_hi[ha] - length // 2 - 1
                h1 = _lo(bed, ha) + (length + 1) // 2 if hsign < 0 else bed_hi[ha]
                cons = [_lo(stand, sa) <= line + g_hi, s_ends[sa] >= line - g_hi,
                        _lo(stand, ha) <= h1 + g_hi, s_ends[ha] >= h0 - g_hi]
            for c in cons:
                m.add(c).only_enforce_if(p)
            options.append(p)
    return any_of(m, options)


def bed_window_literal(m: cp_model.CpModel, bed: PieceVars,
                       geo: dict[str, RoomGeo]) -> cp_model.IntVar:
    """A literal that implies the audit's ``group.bed_window`` (both forms alike): where the
    bed's head is flush with a wall, its span clear of every window on that wall."""
    ok = m.new_bool_var("")
    for (r, rot), choices in bed.walls.items():
        walls = [w for w in geo[r].walls if w.outward == side_direction("back", rot)]
        for on, wall in zip(choices, walls, strict=True):
            for w, lo, hi, _, _ in geo[r].windows:
                if w != wall:
                    continue
                along = bed.x if wall.axis == "y" else bed.y
                span = bed.size(rot)[0] if wall.axis == "y" else bed.size(rot)[1]
                left, right = m.new_bool_var(""), m.new_bool_var("")
                m.add(along + span <= lo).only_enforce_if(left)
                m.add(along >= hi).only_enforce_if(right)
                m.add_bool_or([left, right, on.negated(), ok.negated()])
    return ok


def _talk(m: cp_model.CpModel, seat: PieceVars, other: PieceVars, far: int,
          form: Form) -> cp_model.IntVar:
    fo = doubled_mid(other, "front")
    options = []
    for (r, rot), lit in seat.alts.items():
        olits = _in(other, r)
        if not olits:
            continue
        p = _option(m, lit, olits)
        u = side_direction("front", rot)
        w, d = seat.size(rot)
        c2 = (2 * seat.x + w, 2 * seat.y + d)
        fa = (c2[0] + u[0] * seat.spec.depth, c2[1] + u[1] * seat.spec.depth)
        back = (c2[0] - u[0] * seat.spec.depth, c2[1] - u[1] * seat.spec.depth)
        dx, dy = fo[0] - fa[0], fo[1] - fa[1]
        if form == Form.NECESSARY:
            cons = [dx <= 2 * far, -dx <= 2 * far, dy <= 2 * far, -dy <= 2 * far]
        else:
            cons = [s * dx + t * dy <= 2 * far for s in (1, -1) for t in (1, -1)]
        cons.append(dot(u, fo, back) >= 0)
        for c in cons:
            m.add(c).only_enforce_if(p)
        options.append(p)
    return any_of(m, options)


def rule_literal(m: cp_model.CpModel, pieces: list[PieceVars], geo: dict[str, RoomGeo],
                 rule: str, subject: str, form: Form) -> tuple[cp_model.IntVar, bool] | None:
    """A literal that implies the rule family of ``rule`` (an audit rule id) for the piece
    ``subject`` (the first piece the audit's record names: the seat of a viewing or talking
    pair, the coffee table, the nightstand, the bed) or a piece interchangeable with it (the
    model orders equal pieces, so which of two equal nightstands stands where is not
    ``subject``'s to choose), in ``form``; with whether a proof from it is sound (the pieces
    whose fronts matter are turned every way). None when the model cannot state the rule or
    ``subject`` is not among ``pieces``."""
    me = next((pv for pv in pieces if pv.spec.id == subject), None)
    fam = family(rule)
    if me is None or fam is None:
        return None
    got = [_subject_literal(m, pieces, geo, fam, pv, form) for pv in _twins(pieces, me)]
    return any_of(m, [lit for lit, _ in got]), all(sound for _, sound in got)


def _twins(pieces: list[PieceVars], me: PieceVars) -> list[PieceVars]:
    """``me`` and the movable pieces interchangeable with it (``me`` alone when locked)."""
    return [me] if me.locked else [pv for pv in pieces if not pv.locked
                                   and interchangeable(pv.spec) == interchangeable(me.spec)]


def require(m: cp_model.CpModel, pieces: list[PieceVars], geo: dict[str, RoomGeo],
            wanted: tuple[tuple[str, str], ...], form: Form) -> int:
    """Make the rules ``wanted`` ((audit rule, subject piece) pairs) hold in ``form``,
    all together. Interchangeable subjects count as one class: with the rule of one family
    wanted for n pieces of a class, at least n pieces of the class meet it (the model
    orders equal pieces, so which nightstand stands where is its own choice, but two
    nightstands wanted by the bed are two beside it, not one). Returns how many of the
    rules the model could state."""
    classes: dict[tuple[str, tuple[str, ...]], set[str]] = {}
    for rule, subject in wanted:
        me = next((pv for pv in pieces if pv.spec.id == subject), None)
        fam = family(rule)
        if me is not None and fam is not None:
            ids = tuple(pv.spec.id for pv in _twins(pieces, me))
            classes.setdefault((fam, ids), set()).add(subject)
    by_id = {pv.spec.id: pv for pv in pieces}
    for (fam, ids), subjects in classes.items():
        lits = [_subject_literal(m, pieces, geo, fam, by_id[i], form)[0] for i in ids]
        m.add(sum(lits) >= min(len(subjects), len(lits)))
    return sum(len(s) for s in classes.values())


def _subject_literal(m: cp_model.CpModel, pieces: list[PieceVars], geo: dict[str, RoomGeo],
                     fam: str, me: PieceVars, form: Form) -> tuple[cp_model.IntVar, bool]:
    """:func:`rule_literal` for one subject piece ``me``."""
    others = [pv for pv in pieces if pv is not me]
    if fam == "group.view":
        screens = [pv for pv in others if "viewing" in pv.spec.groups and pv.spec.screen]
        seats = [pv for pv in pieces if "viewing" in pv.spec.groups and pv.spec.view_max > 0]
        lits = [_view(m, s, t, form, [pv for pv in pieces if pv is not s and pv is not t])
                for t in screens for s in seats if me in (s, t)]
        sound = all(_turns_fully(pv) for pv in screens + seats)
    elif fam == "group.reach":
        cats = {cat for rel, cat in me.spec.relations if rel == "in_front"}
        seats = [pv for pv in others if pv.spec.category in cats]
        lits, sound = [_reach(m, me, s) for s in seats], all(_turns_fully(s) for s in seats)
    elif fam == "group.bedside":
        cats = {cat for rel, cat in me.spec.relations if rel == "beside_head"}
        lits = [_bedside(m, me, b, form) for b in others if b.spec.category in cats]
        sound = True
    elif fam == "group.bed_window":
        lits, sound = [bed_window_literal(m, me, geo)], True
    elif fam == "group.rug":
        lit = rug_literal(m, me, pieces, necessary=form == Form.NECESSARY)
        lits, sound = [] if lit is None else [lit], True
    else:
        far = param("talk.distance").mm
        seats = [pv for pv in others if "conversation" in pv.spec.groups]
        lits = [_talk(m, me, s, far, form) for s in seats]
        sound = _turns_fully(me)
    return any_of(m, lits), sound
