"""Functional groups in the placement model: strongly weighted terms that make the solver
arrange pieces the way the layout-quality audit (``roomfit.audit.quality``) measures them.

The model's terms (``roomfit.solve.terms``) build one literal per relation (seat facing the TV,
coffee table in front of the seat, nightstand beside the bed head) and a penalty literal for
a bed head under a window; this module weighs each unmet group rule by its weight in
``data/groups.toml`` (far above every other preference, so any arrangement that meets a
group rule the room allows beats one that does not; a rule whose miss leaves the group
usable, such as a bed head under a window, at half of it, so where a room cannot have both
the one that makes a group work wins), and adds what the relations alone do not say:

- a nightstand stands on a side the bed is used from (:func:`roomfit.audit.group_measures.used_long_sides`);
- seats of a conversation group stand within speaking distance of another seat (L1 between
  front middles, which bounds the audit's straight-line distance from above) and neither
  behind the other's back (the audit's ``group.talk_turn``);
- a rug has its group's centre piece on it (:func:`rug_terms`, the audit's ``group.rug``).

:func:`main_differs` gives the search the "must differ in a way a client sees" rule between
candidates (the measure is ``roomfit.audit.ideas``).

Soft, not hard: a group rule the room cannot meet must not make the whole flat "impossible";
the weight makes it as good as hard wherever the room allows it.
"""

from __future__ import annotations

import math
from typing import TYPE_CHECKING

from ortools.sat.python import cp_model

from roomfit.audit.geometry import room_polygon, side_direction
from roomfit.audit.group_measures import used_long_sides
from roomfit.audit.group_rules import RUG_CENTRES
from roomfit.audit.ideas import is_main
from roomfit.plan.data import Placement, Plan
from roomfit.rules.groups import param, rule_weight

if TYPE_CHECKING:
    from roomfit.solve.vars import PieceVars

__all__ = ["unmet_terms", "relation_group_terms", "conversation_terms", "rug_overlap",
           "rug_literal", "rug_terms", "main_differs", "doubled_mid", "dot"]


def unmet_terms(unmet: cp_model.LinearExprT, rule: str) -> list[cp_model.LinearExprT]:
    """The weight of the group rule ``rule`` (an audit rule id,
    :func:`roomfit.rules.groups.rule_weight`) on an expression that is 1 when it is not met."""
    return [rule_weight(rule) * unmet]


#: The audit's rule of each catalogue relation.
_RELATION_RULE = {"facing": "group.view", "in_front": "group.reach", "beside_head": "group.bedside"}


def _centre2(pv: PieceVars) -> tuple[cp_model.LinearExpr, cp_model.LinearExpr]:
    """Twice the footprint centre, as linear expressions (x, y)."""
    return (cp_model.LinearExpr.weighted_sum([pv.x, pv.width_expr()], [2, 1]),
            cp_model.LinearExpr.weighted_sum([pv.y, pv.depth_expr()], [2, 1]))


def doubled_mid(pv: PieceVars, side: str) -> tuple[cp_model.LinearExpr, cp_model.LinearExpr]:
    """Twice the middle of ``side`` of the piece, as linear expressions (x, y)."""
    cx, cy = _centre2(pv)
    ext = pv.spec.depth if side in ("front", "back") else pv.spec.width
    lits = list(pv.alts.values())
    ex = [side_direction(side, rot)[0] * ext for _, rot in pv.alts]
    ey = [side_direction(side, rot)[1] * ext for _, rot in pv.alts]
    return (cp_model.LinearExpr.weighted_sum([cx, *lits], [1, *ex]),
            cp_model.LinearExpr.weighted_sum([cy, *lits], [1, *ey]))


def dot(u: tuple[int, int], a: tuple[cp_model.LinearExpr, cp_model.LinearExpr],
         b: tuple[cp_model.LinearExpr, cp_model.LinearExpr]) -> cp_model.LinearExpr:
    """``u . (a - b)`` for doubled points ``a`` and ``b``."""
    return cp_model.LinearExpr.weighted_sum([a[0], b[0], a[1], b[1]], [u[0], -u[0], u[1], -u[1]])


def _on_used_side(m: cp_model.CpModel, stand: PieceVars, bed: PieceVars) -> cp_model.IntVar:
    """A literal that implies: the nightstand's centre lies on a used long side of the bed
    (always true for a bed used from both sides)."""
    used = used_long_sides(bed.spec)
    ok = m.new_bool_var("")
    if len(used) == 2:
        m.add(ok == 1)
        return ok
    stand_c, bed_c = _centre2(stand), _centre2(bed)
    options = []
    for (_, rot), lit in bed.alts.items():
        p = m.new_bool_var("")
        m.add_implication(p, lit)
        m.add(dot(side_direction(used[0], rot), stand_c, bed_c) >= 1).only_enforce_if(p)
        options.append(p)
    m.add_bool_or(options).only_enforce_if(ok)
    return ok


def relation_group_terms(m: cp_model.CpModel, pv: PieceVars, target: PieceVars, relation: str,
                         met: cp_model.IntVar) -> list[cp_model.LinearExprT]:
    """Group terms of one catalogue relation whose literal ``met`` the model built: the
    group weight when it is not met, and for a nightstand the same weight when it is not on
    a side the bed is used from."""
    terms = unmet_terms(1 - met, _RELATION_RULE[relation])
    if relation == "beside_head":
        terms += unmet_terms(1 - _on_used_side(m, pv, target), "group.bedside")
    return terms


def _assigned(pv: PieceVars) -> str | None:
    rooms = {r for r, _ in pv.alts}
    return next(iter(rooms)) if len(rooms) == 1 else None


def _talk_pair(m: cp_model.CpModel, a: PieceVars, b: PieceVars, far: int) -> cp_model.IntVar:
    """A literal that implies: the front middles of ``a`` and ``b`` are within ``far`` mm
    (L1) and neither seat stands behind the other's back."""
    ok = m.new_bool_var("")
    fa, fb = doubled_mid(a, "front"), doubled_mid(b, "front")
    dx, dy = m.new_int_var(0, 10_000_000, ""), m.new_int_var(0, 10_000_000, "")
    m.add_abs_equality(dx, dot((1, 0), fa, fb))
    m.add_abs_equality(dy, dot((0, 1), fa, fb))
    m.add(dx + dy <= 2 * far).only_enforce_if(ok)
    for me, other in ((a, fb), (b, fa)):
        back = doubled_mid(me, "back")
        for (_, rot), lit in me.alts.items():
            m.add(dot(side_direction("front", rot), other, back) >= 0).only_enforce_if([ok, lit])
    return ok


def conversation_terms(m: cp_model.CpModel, pieces: list[PieceVars]) -> list[cp_model.LinearExprT]:
    """The group weight for each seat of a conversation group (two or more seats assigned to
    one room) that has no other seat within speaking distance, turned towards it."""
    far = param("talk.distance").mm
    by_room: dict[str, list[PieceVars]] = {}
    for pv in pieces:
        room = _assigned(pv)
        if room is not None and "conversation" in pv.spec.groups:
            by_room.setdefault(room, []).append(pv)
    terms: list[cp_model.LinearExprT] = []
    for seats in by_room.values():
        if len(seats) < 2 or all(s.locked for s in seats):
            continue
        pair = {(i, j): _talk_pair(m, seats[i], seats[j], far)
                for i in range(len(seats)) for j in range(i + 1, len(seats))}
        for i in range(len(seats)):
            near = m.new_bool_var("")
            m.add_bool_or([lit for (a, b), lit in pair.items() if i in (a, b)]).only_enforce_if(near)
            terms += unmet_terms(1 - near, "group.talk")
    return terms


def rug_overlap(w: int, d: int, necessary: bool = False) -> tuple[int, int]:
    """The overlap with its rug (mm along x, along y) asked of a centre piece turned to
    ``w`` x ``d``: enough for ``rug.under`` (share s) of its area, ``ceil(sqrt(s) w)`` by
    ``ceil(sqrt(s) d)``; with ``necessary``, what every overlap of that share has: an
    ``a`` x ``b`` overlap with ``a b >= s w d``, ``a <= w`` and ``b <= d`` has ``a >= s w``
    and ``b >= s d`` (rounded down).

    >>> rug_overlap(1200, 600), rug_overlap(1200, 600, necessary=True)
    ((849, 425), (600, 300))
    """
    s = param("rug.under").value
    if necessary:
        return math.floor(s * w), math.floor(s * d)
    return math.ceil(math.sqrt(s) * w), math.ceil(math.sqrt(s) * d)


def _on_rug(m: cp_model.CpModel, rug: PieceVars, c: PieceVars | None, room: str,
            before: list[PieceVars], necessary: bool) -> cp_model.IntVar:
    """A literal that implies: ``rug`` lies in ``room``, none of ``before`` stands there, and
    ``c`` (unless None) stands there with its footprint over the rug by at least
    :func:`rug_overlap` along x and y. An overlap of at least k along x is ``c.x + w - rug.x
    >= k`` and ``rug.x + w_rug - c.x >= k`` with k at most both widths (k <= w holds by
    :func:`rug_overlap`, k <= w_rug is asked)."""
    on = m.new_bool_var("")
    cons = [rug.in_room(room) >= 1, *(pv.in_room(room) == 0 for pv in before)]
    if c is not None:
        here = [(lit, rug_overlap(*c.size(rot), necessary)) for (r, rot), lit in c.alts.items() if r == room]
        kx = cp_model.LinearExpr.weighted_sum([lit for lit, _ in here], [k[0] for _, k in here])
        ky = cp_model.LinearExpr.weighted_sum([lit for lit, _ in here], [k[1] for _, k in here])
        (cxe, cye), (rxe, rye) = c.ends(m), rug.ends(m)
        cons += [c.in_room(room) >= 1, cxe - rug.x >= kx, rxe - c.x >= kx, cye - rug.y >= ky,
                 rye - c.y >= ky, rug.width_expr() >= kx, rug.depth_expr() >= ky]
    for con in cons:
        m.add(con).only_enforce_if(on)
    return on


def rug_literal(m: cp_model.CpModel, rug: PieceVars, pieces: list[PieceVars],
                necessary: bool = False) -> cp_model.IntVar | None:
    """A literal that implies, wherever ``rug`` lies: the piece the audit measures on it
    (of the first kind in :data:`~roomfit.audit.group_rules.RUG_CENTRES` with a piece in the
    rug's room: a coffee table, else a dining table, a bed, a seat) overlaps it by
    :func:`rug_overlap` (``necessary`` or sufficient) along x and y, or the room holds no
    such piece (the audit then measures nothing). None when there is no such piece at all."""
    if not any(pred(pv.spec) for pred in RUG_CENTRES for pv in pieces):
        return None
    options = []
    for room in dict.fromkeys(r for r, _ in rug.alts):
        before: list[PieceVars] = []  # pieces of the kinds that come first
        for pred in RUG_CENTRES:
            kind = [pv for pv in pieces if pred(pv.spec) and any(r == room for r, _ in pv.alts)]
            options += [_on_rug(m, rug, c, room, before, necessary) for c in kind]
            before += kind
            if any({r for r, _ in pv.alts} == {room} for pv in kind):
                break  # always one of this kind there: the later kinds, or none, never count
        else:
            options.append(_on_rug(m, rug, None, room, before, necessary))
    ok = m.new_bool_var("")
    m.add_bool_or(options).only_enforce_if(ok)
    return ok


def rug_terms(m: cp_model.CpModel, pieces: list[PieceVars]) -> list[cp_model.LinearExprT]:
    """The group weight for each rug (group ``rug``) whose group's centre piece does not
    stand on it with ``rug.under`` of its area (data/groups.toml), asked in the sufficient
    form of :func:`rug_overlap`."""
    terms: list[cp_model.LinearExprT] = []
    for rug in pieces:
        if "rug" not in rug.spec.groups:
            continue
        ok = rug_literal(m, rug, pieces)
        if ok is not None:
            terms += unmet_terms(1 - ok, "group.rug")
    return terms


def main_differs(m: cp_model.CpModel, pieces: list[PieceVars], where: dict[str, Placement],
                 plan: Plan) -> list[cp_model.IntVar]:
    """Literals whose disjunction says some main piece (:func:`roomfit.audit.ideas.is_main`)
    stands visibly elsewhere than in ``where``: another room; for a bed another turn (its
    head on another wall); for a sofa or desk another turn (it faces elsewhere); for any main
    piece a move of a third of its room's extent along x or y (another part of the room).
    Empty when no movable main piece is in ``where``."""
    out: list[cp_model.IntVar] = []
    for pv in pieces:
        at = where.get(pv.spec.id)
        if pv.locked or at is None or not is_main(pv.spec):
            continue
        turns = pv.spec.category in ("bed", "sofa", "desk")
        out += [lit for (r, rot), lit in pv.alts.items()
                if r != at.room or (turns and rot != at.rotation)]
        x0, y0, x1, y1 = room_polygon(plan.room(at.room)).bounds
        for var, v, third in ((pv.x, at.x, (x1 - x0) / 3), (pv.y, at.y, (y1 - y0) / 3)):
            step = max(1, int(third))
            a, b = m.new_bool_var(""), m.new_bool_var("")
            m.add(var >= v + step).only_enforce_if(a)
            m.add(var <= v - step).only_enforce_if(b)
            out += [a, b]
    return out
