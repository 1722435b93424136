"""Rugs in the placement model: a rug is floor to the other pieces (they stand on it, zones,
turning spaces and door swings lie over it) but stays inside its room and off the fittings,
as in the audit; and the solver lays it under its group's centre piece (``group.rug``).

Outside checks: shares and overlaps are measured by the audit with shapely (a library
independent of the model); the share asked is ``rug.under`` of data/groups.toml, 50 %
(common practice, no published source). Turning space: 2010 ADA §304.3.1, 60 in circle.
"""

from __future__ import annotations

import math

import pytest
from ortools.sat.python import cp_model
from shapely import box

from roomfit.audit.check import audit
from roomfit.audit.quality import quality
from roomfit.plan.data import Door, Fixture, Leaf, Piece, Placement, Plan, Room, RuleChoice
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.groups import param
from roomfit.rules.sets import rules_for
from roomfit.solve.construct import units
from roomfit.solve.explain import precheck
from roomfit.solve.groups import rug_overlap
from roomfit.solve.hard_rules import Form, rule_literal
from roomfit.solve.model import build_model
from roomfit.solve.search import SolveOptions, solve

_NEED = param("rug.under").value


def _plan(w: int, h: int, pieces: list[tuple[str, str]], *, outline=None, fixtures=(),
          rules: str = "everyday", placed: dict[str, Placement] | None = None) -> Plan:
    room = Room("r", "Room", "living", outline or ((0, 0), (w, 0), (w, h), (0, h)))
    door = Door("d", ("r", "outside"), (w // 2, 0), 1000, Leaf.SLIDING)
    placed = placed or {}
    return Plan("rug", (room,), doors=(door,), fixtures=tuple(fixtures),
                furniture=tuple(Piece(pid, t, ("r",), placement=placed.get(pid))
                                for pid, t in pieces),
                rules=RuleChoice(rules))


def _solve_first(plan: Plan):
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=60.0, seed=0, workers=1))
    assert result.candidates, (result.status, result.notes)
    done = plan.with_layout(result.candidates[0].layout)
    return done, rules


def _rug_checks(done: Plan, rules) -> list:
    return [c for c in quality(done, rules) if c.rule == "group.rug"]


@pytest.mark.parametrize("pieces, centre", [
    ([("sofa", "sofa-3"), ("tv", "tv-unit"), ("coffee", "coffee-table"), ("rug", "rug")], "coffee"),
    ([("table", "dining-table-4"), ("shelf", "bookcase"), ("rug", "rug")], "table"),
])
def test_solver_lays_the_rug_under_the_group_centre(pieces, centre) -> None:
    done, rules = _solve_first(_plan(5000, 4500, pieces))
    assert audit(done, rules).passed
    checks = _rug_checks(done, rules)
    assert len(checks) == 1 and checks[0].ok, [c.text for c in checks]
    assert checks[0].pieces == ("rug", centre)
    # the share measured by shapely on the returned geometry, not the solver's word for it
    rug, mid = (next(p for p in done.furniture if p.id == i) for i in ("rug", centre))
    specs = {s.id: s for s in resolve_pieces(done, rules)}
    boxes = {}
    for p in (rug, mid):
        s, at = specs[p.id], p.placement
        w, d = (s.width, s.depth) if at.rotation in (0, 180) else (s.depth, s.width)
        boxes[p.id] = box(at.x, at.y, at.x + w, at.y + d)
    share = boxes[centre].intersection(boxes["rug"]).area / boxes[centre].area
    assert share >= _NEED
    assert checks[0].measured == pytest.approx(100 * share, abs=0.05)  # rounded to 0.1 %


def _feasible(plan: Plan, fix: dict[str, tuple[int, int, int]], relaxed: bool = False) -> bool:
    """Whether the plain (or relaxed) model of ``plan`` has a layout with the pieces of ``fix``
    at (x, y, rotation)."""
    rules = rules_for(plan)
    built = build_model(plan, rules, list(resolve_pieces(plan, rules)), ["r"], 50,
                        strengthen=not relaxed, relaxed=relaxed, objective=False)
    for pv in built.pieces:
        if pv.spec.id in fix:
            x, y, rot = fix[pv.spec.id]
            built.model.add(pv.x == x)
            built.model.add(pv.y == y)
            built.model.add(pv.alts[("r", rot)] == 1)
    solver = cp_model.CpSolver()
    solver.parameters.num_workers = 1
    solver.parameters.max_time_in_seconds = 30.0
    return solver.solve(built.model) in (cp_model.OPTIMAL, cp_model.FEASIBLE)


def test_a_coffee_table_may_stand_on_a_rug_in_the_plain_model() -> None:
    plan = _plan(4000, 4000, [("coffee", "coffee-table"), ("rug", "rug"), ("box", "nightstand")])
    # rug 2000 x 1400 at (1000, 1300); the coffee table in its middle
    assert _feasible(plan, {"rug": (1000, 1300, 0), "coffee": (1500, 1700, 0)})
    # the same spot is refused to a piece that stands (the model can say no)
    assert not _feasible(plan, {"box": (1000, 1300, 0), "coffee": (1000, 1300, 0)})
    # and the audit agrees on the first: a table on a rug is no overlap
    placed = {"rug": Placement(1000, 1300, 0, "r"), "coffee": Placement(1500, 1700, 0, "r"),
              "box": Placement(3400, 3400, 0, "r")}
    done = _plan(4000, 4000, [("coffee", "coffee-table"), ("rug", "rug"), ("box", "nightstand")],
                 placed=placed)
    overlap = [f for f in audit(done, rules_for(done)).findings if f.rule == "piece.overlap"]
    assert overlap and all(f.ok for f in overlap)


_RUN = Fixture("run", "r", "kitchen_run", "Kitchen run", ((0, 3400), (3000, 3400), (3000, 4000),
                                                          (0, 4000)), 900)


def test_a_rug_stays_off_fittings_and_outside_floor() -> None:
    plan = _plan(4000, 4000, [("rug", "rug")], fixtures=[_RUN])
    assert _feasible(plan, {"rug": (500, 1000, 0)})
    assert not _feasible(plan, {"rug": (500, 2200, 0)})  # 200 mm under the kitchen run
    assert not _feasible(plan, {"rug": (500, 2200, 0)}, relaxed=True)
    # the audit refuses it too (piece.overlap names the rug and the fitting)
    done = _plan(4000, 4000, [("rug", "rug")], fixtures=[_RUN],
                 placed={"rug": Placement(500, 2200, 0, "r")})
    bad = [f for f in audit(done, rules_for(done)).failures if f.rule == "piece.overlap"]
    assert [f.pieces for f in bad] == [("rug", "run")]
    # an L-shaped room: the rug may not reach into the missing corner
    ell = ((0, 0), (4000, 0), (4000, 2000), (2000, 2000), (2000, 4000), (0, 4000))
    plan = _plan(4000, 4000, [("rug", "rug")], outline=ell)
    assert _feasible(plan, {"rug": (0, 0, 0)})
    assert not _feasible(plan, {"rug": (1000, 1000, 0)})


def test_a_rug_may_lie_in_a_door_swing_as_in_the_audit() -> None:
    # the audit keeps door swings clear of standing pieces only; the model does the same
    room = Room("r", "Room", "living", ((0, 0), (4000, 0), (4000, 4000), (0, 4000)))
    door = Door("d", ("r", "outside"), (2000, 0), 900, Leaf.HINGED, swings_into="r")
    plan = Plan("swing", (room,), doors=(door,), furniture=(Piece("rug", "rug", ("r",)),))
    rules = rules_for(plan)
    built = build_model(plan, rules, list(resolve_pieces(plan, rules)), ["r"], 50,
                        objective=False)
    rug = built.pieces[0]
    for c in (rug.x == 1000, rug.y == 0, rug.alts[("r", 0)] == 1):
        built.model.add(c)
    assert cp_model.CpSolver().solve(built.model) in (cp_model.OPTIMAL, cp_model.FEASIBLE)
    done = plan.with_layout((("rug", Placement(1000, 0, 0, "r")),))
    swing = [f for f in audit(done, rules).findings if f.rule == "door.swing_clear"]
    assert swing and all(f.ok for f in swing)


def test_a_rug_does_not_take_the_turning_space() -> None:
    # 3200 x 2600 room with a 3000 x 2000 rug: a solid rug would leave no 60 in (1524 mm)
    # circle (2010 ADA 304.3.1); as floor, the turning space lies over it
    plan = _plan(3200, 2600, [("rug", "rug-large"), ("chair", "armchair")], rules="ada-2010")
    rules = rules_for(plan)
    assert precheck(plan, rules, resolve_pieces(plan, rules)) is None
    done, rules = _solve_first(plan)
    result = audit(done, rules)
    assert result.passed, [f.message for f in result.failures]
    assert any(f.rule == "turning.space" and f.ok for f in result.findings)


def test_overlap_forms_against_shapely() -> None:
    # sufficient: the asked overlap covers the share (shapely area); necessary: an overlap
    # of exactly the share (all of the width, half the depth) meets it
    for w, d in ((1200, 600), (1070, 1070), (1220, 760), (999, 333)):
        a, b = rug_overlap(w, d)
        assert box(0, 0, a, b).area / box(0, 0, w, d).area >= _NEED
        assert a <= w and b <= d
        na, nb = rug_overlap(w, d, necessary=True)
        assert na <= w and nb <= math.ceil(_NEED * d)
        assert w >= na and math.ceil(_NEED * d) >= nb  # the exact-share overlap w x d/2


def test_rug_rule_as_a_hard_form() -> None:
    # coffee table locked in one corner, rug locked in the other: no form can be met; with
    # the rug free both are
    placed = {"coffee": Placement(200, 200, 0, "r"), "rug": Placement(1800, 2400, 0, "r")}
    pieces = [("coffee", "coffee-table"), ("rug", "rug")]
    for locked, can in ((True, False), (False, True)):
        base = _plan(4000, 4000, pieces, placed=placed)
        plan = Plan(base.name, base.rooms, base.doors, furniture=tuple(
            Piece(p.id, p.type, p.rooms, placement=p.placement,
                  locked=p.id == "coffee" or locked) for p in base.furniture))
        rules = rules_for(plan)
        for form in Form:
            built = build_model(plan, rules, list(resolve_pieces(plan, rules)), ["r"], 50,
                                strengthen=False, relaxed=True, objective=False)
            got = rule_literal(built.model, built.pieces, built.rooms, "group.rug", "rug", form)
            assert got is not None and got[1]
            built.model.add(got[0] == 1)
            status = cp_model.CpSolver().solve(built.model)
            assert (status in (cp_model.OPTIMAL, cp_model.FEASIBLE)) == can, (locked, form)


def test_construction_lays_rugs_last() -> None:
    plan = _plan(5000, 4500, [("rug", "rug-large"), ("sofa", "sofa-3"), ("coffee", "coffee-table"),
                              ("shelf", "bookcase")])
    order = [[s.id for s in u] for u in units(list(resolve_pieces(plan, rules_for(plan))))]
    assert order[-1] == ["rug"]


def test_a_rug_that_cannot_reach_its_group_is_proven_so() -> None:
    # the coffee table (1100 x 600) is locked at the back of a 1300 mm wide alcove: a rug
    # whose shorter side is 1400 mm cannot enter it, so no arrangement has the table on it
    # (worked by hand: the table starts 700 mm inside the alcove)
    outline = ((0, 0), (4000, 0), (4000, 3000), (2300, 3000), (2300, 4500), (1000, 4500),
               (1000, 3000), (0, 3000))
    plan = Plan("alcove", (Room("r", "Room", "living", outline),),
                doors=(Door("d", ("r", "outside"), (2000, 0), 1000, Leaf.SLIDING),),
                furniture=(Piece("coffee", "coffee-table", ("r",),
                                 placement=Placement(1100, 3700, 0, "r"), locked=True),
                           Piece("rug", "rug", ("r",))))
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=60.0, seed=0, workers=1))
    assert result.candidates
    done = plan.with_layout(result.candidates[0].layout)
    assert audit(done, rules).passed
    assert [c.measured for c in _rug_checks(done, rules)] == [0.0]
    verdicts = [(p.rules, p.reach.value) for p in result.possible]
    assert verdicts == [(("group.rug",), "impossible")]


def _forms(placed: dict[str, Placement], pieces: list[tuple[str, str]]) -> tuple[bool, bool, bool]:
    """(audit's group.rug passes, necessary form holds, sufficient form holds) for ``pieces``
    locked at ``placed`` in a 5 x 5 m room."""
    base = _plan(5000, 5000, pieces, placed=placed)
    plan = Plan(base.name, base.rooms, base.doors, furniture=tuple(
        Piece(p.id, p.type, p.rooms, placement=p.placement, locked=True) for p in base.furniture))
    rules = rules_for(plan)
    checks = _rug_checks(plan, rules)
    assert len(checks) == 1
    held = []
    for form in (None, Form.NECESSARY, Form.SUFFICIENT):
        built = build_model(plan, rules, list(resolve_pieces(plan, rules)), ["r"], 50,
                            strengthen=False, relaxed=True, objective=False)
        if form is not None:
            got = rule_literal(built.model, built.pieces, built.rooms, "group.rug", "rug", form)
            assert got is not None
            built.model.add(got[0] == 1)
        held.append(cp_model.CpSolver().solve(built.model) in (cp_model.OPTIMAL, cp_model.FEASIBLE))
    assert held[0], "the placements break a clearance rule of the relaxed model"
    return checks[0].ok, held[1], held[2]


@pytest.mark.parametrize("x, y, expect", [
    # coffee table 1100 x 600 and a 2000 x 1400 rug at (1000, 1000); overlaps by hand:
    (1500, 1400, (True, True, True)),    # wholly on the rug: 100 %
    (2222, 1975, (True, True, True)),    # 778 x 425 on it: 50.1 %, the sufficient form's least
    (1500, 2100, (True, True, False)),   # 1100 x 300: exactly 50 %, passes, not sufficient
    (1500, 2101, (False, False, False)), # 1100 x 299: 49.8 %
    (2451, 1400, (False, False, False)), # 549 x 600: 49.9 %
    (2223, 1400, (True, True, False)),   # 777 x 600: 70.6 %, sufficient asks 778 along x
])
def test_rug_forms_around_the_share(x, y, expect) -> None:
    # the audit passes wherever the sufficient form holds, and the necessary form holds
    # wherever the audit passes (shares by hand, rug.under 50 %, common practice)
    placed = {"rug": Placement(1000, 1000, 0, "r"), "coffee": Placement(x, y, 0, "r")}
    ok, nec, suf = _forms(placed, [("rug", "rug"), ("coffee", "coffee-table")])
    assert (ok, nec, suf) == expect
    assert (not suf or ok) and (not ok or nec)


def test_rug_forms_aim_at_the_audits_centre_piece() -> None:
    # a dining table wholly on a 3000 x 2000 rug does not count while a coffee table stands
    # in the room off it: the audit measures the coffee table first (and so does each form)
    placed = {"rug": Placement(1000, 1000, 0, "r"), "table": Placement(1200, 2000, 0, "r"),
              "coffee": Placement(3500, 4000, 0, "r")}
    pieces = [("rug", "rug-large"), ("table", "dining-table-4"), ("coffee", "coffee-table")]
    assert _forms(placed, pieces) == (False, False, False)
    placed["coffee"] = Placement(2800, 2000, 0, "r")  # wholly on the rug
    assert _forms(placed, pieces) == (True, True, True)
