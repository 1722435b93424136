"""Can the room have a missed group rule? The proof (relaxed model with the rule's necessary
form) and the second search (sufficient form), judged by the layout-quality audit, which
measures the geometry with shapely and does not trust the model."""

from __future__ import annotations

import math
import time
from pathlib import Path

import pytest
from ortools.sat.python import cp_model

from roomfit.audit.check import audit
from roomfit.audit.quality import Kind, quality
from roomfit.plan.data import Door, Leaf, Piece, Placement, Plan, Room
from roomfit.plan.read import read_plan
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import rules_for
from roomfit.solve.hard_rules import Form, require, rule_literal
from roomfit.solve.model import build_model
from roomfit.solve.possible import Reach, settle
from roomfit.solve.search import SolveOptions, components, solve
from roomfit.solve.solution import decode


def _room(width: int, depth: int, pieces: list[Piece]) -> Plan:
    room = Room("r", "Room", "living", ((0, 0), (width, 0), (width, depth), (0, depth)))
    door = Door("d", ("r", "outside"), (width - 500, 0), 900, Leaf.SLIDING)
    return Plan("possible", (room,), doors=(door,), furniture=tuple(pieces))


def _view_ok(plan: Plan) -> bool:
    rules = rules_for(plan)
    return all(c.ok for c in quality(plan, rules)
               if c.rule in ("group.view", "group.view_angle", "group.view_clear"))


def _form_holds(plan: Plan, form: Form) -> bool:
    """Whether the model, with every piece locked where ``plan`` puts it, allows ``form`` of
    the sofa's viewing rule."""
    rules = rules_for(plan)
    specs = list(resolve_pieces(plan, rules))
    built = build_model(plan, rules, specs, ["r"], strengthen=False, relaxed=True, objective=False)
    got = rule_literal(built.model, built.pieces, built.rooms, "group.view", "sofa", form)
    assert got is not None and got[1]
    built.model.add(got[0] == 1)
    solver = cp_model.CpSolver()
    solver.parameters.num_workers = 1
    return solver.solve(built.model) in (cp_model.OPTIMAL, cp_model.FEASIBLE)


# The viewing range of a three-seat sofa and a 55 in (1397 mm) screen: 1.19 x the diagonal
# (THX, a 40 degree field; common practice) to 2.5 x (rule of thumb, common practice), and
# seats within 15 degrees of the screen's axis (SMPTE 196M-2003 section 9).
LO, HI = math.ceil(1.19 * 1397), math.floor(2.5 * 1397)  # 1663, 3492 mm
TAN15 = math.tan(math.radians(15))


@pytest.mark.parametrize(("gap", "across"), [
    (LO, 0), (LO - 1, 0), (HI, 0), (HI + 1, 0), (3000, 0),
    (2000, math.floor(2000 * TAN15)), (2000, math.ceil(2000 * TAN15) + 1),
    (round(HI * math.cos(math.radians(15))) - 5, 900), (1700, 440), (1700, 460),
])
def test_view_forms_bracket_the_audit(gap: int, across: int) -> None:
    # sofa (2135 x 890) facing north, the TV unit (1600 x 400) facing south, fronts ``gap``
    # apart, centre lines ``across`` apart: the necessary form holds wherever the audit
    # passes, and where the sufficient form holds the audit passes
    sofa_x = 600
    tv_x = sofa_x + (2135 - 1600) // 2 + across
    pieces = [Piece("sofa", "sofa-3", ("r",), placement=Placement(sofa_x, 500, 0, "r"), locked=True),
              Piece("tv", "tv-unit", ("r",), placement=Placement(tv_x, 500 + 890 + gap, 180, "r"),
                    locked=True)]
    plan = _room(6000, 6000, pieces)
    ok = _view_ok(plan)
    if ok:
        assert _form_holds(plan, Form.NECESSARY)
    if _form_holds(plan, Form.SUFFICIENT):
        assert ok


@pytest.mark.parametrize(("type_", "x", "clear"), [
    ("dining-table-4", 1000, False), ("coffee-table", 1100, True), ("dining-table-4", 3500, True)])
def test_the_floor_between_seat_and_screen_is_kept_clear(type_: str, x: int, clear: bool) -> None:
    # sofa facing north, TV 2400 mm beyond; a third piece between them or beside them: a
    # dining table (740 mm high) in between is in the way, a coffee table (450 mm) is not
    # (view.clear_height 600 mm, common practice); the sufficient form holds only where the
    # audit passes, the necessary form wherever it does
    pieces = [Piece("sofa", "sofa-3", ("r",), placement=Placement(600, 500, 0, "r"), locked=True),
              Piece("tv", "tv-unit", ("r",), placement=Placement(867, 3790, 180, "r"), locked=True),
              Piece("x", type_, ("r",), placement=Placement(x, 1900, 90, "r"), locked=True)]
    plan = _room(6000, 6000, pieces)
    assert _view_ok(plan) is clear
    assert _form_holds(plan, Form.SUFFICIENT) is clear
    assert _form_holds(plan, Form.NECESSARY)


def test_a_room_too_small_for_the_viewing_range_is_proven_impossible() -> None:
    # 2600 x 2500 mm: fronts 1.19 x 1397 x cos 15 = 1606 mm apart (the least the audit can
    # pass, THX 1.19 x diagonal, SMPTE 196M 15 degrees) plus the sofa's 890 mm and the TV
    # unit's 400 mm make 2896 mm, more than either side of the room
    assert 890 + math.floor(LO * math.cos(math.radians(15))) + 400 > 2600
    plan = _room(2600, 2500, [Piece("sofa", "sofa-3", ("r",)), Piece("tv", "tv-unit", ("r",))])
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=20.0, workers=1))
    assert result.candidates, result.status
    first = plan.with_layout(result.candidates[0].layout)
    assert not _view_ok(first)
    verdicts = [p for p in result.possible if "group.view" in p.rules]
    assert verdicts and verdicts[0].reach == Reach.IMPOSSIBLE, [p.text for p in result.possible]
    assert verdicts[0].text.startswith("not possible in this room: ")


def test_a_turned_away_sofa_is_rearranged_when_the_room_allows_it() -> None:
    # the sofa with its back to the TV, in a room with space for both to face each other
    pieces = [Piece("sofa", "sofa-3", ("r",), placement=Placement(1000, 2700, 180, "r")),
              Piece("tv", "tv-unit", ("r",), placement=Placement(1300, 4600, 180, "r"))]
    plan = _room(4500, 5000, pieces)
    rules = rules_for(plan)
    assert audit(plan, rules).passed and not _view_ok(plan)
    specs = resolve_pieces(plan, rules)
    better, verdicts = settle(plan, rules, components(plan, specs), plan.layout,
                              SolveOptions(seed=0), time.monotonic() + 30)
    assert verdicts and verdicts[0].reach == Reach.MET, [v.text for v in verdicts]
    assert better is not None
    done = plan.with_layout(better)
    assert _view_ok(done) and audit(done, rules).passed


def test_a_desk_too_high_is_impossible_without_a_search() -> None:
    # 2010 ADA Standards 902.3: work surfaces 28 to 34 in high; a 36 in desk cannot be
    # arranged into knee space
    desk = Piece("desk", "desk", ("r",), height=914, placement=Placement(500, 2000, 0, "r"))
    plan = _room(4000, 4000, [desk])
    rules = rules_for(plan)
    specs = resolve_pieces(plan, rules)
    better, verdicts = settle(plan, rules, components(plan, specs), plan.layout,
                              SolveOptions(), time.monotonic() + 5)
    assert better is None
    assert [v.reach for v in verdicts if "group.desk_height" in v.rules] == [Reach.IMPOSSIBLE]


def test_a_rearranged_first_candidate_is_judged_again(monkeypatch: pytest.MonkeyPatch) -> None:
    # the solve takes the check's arrangement as its first candidate, with the audit and the
    # route scores of that arrangement (not the search's), and no claim of optimality
    import roomfit.solve.possible as possible

    plan = _room(4500, 5000, [Piece("sofa", "sofa-3", ("r",)), Piece("tv", "tv-unit", ("r",))])
    rules = rules_for(plan)
    moved = (("sofa", Placement(1000, 2700, 180, "r")), ("tv", Placement(1300, 4600, 180, "r")))
    monkeypatch.setattr(possible, "settle", lambda *args: (moved, ()))
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=10.0, workers=1))
    first = result.candidates[0]
    assert first.layout == moved and not first.optimal
    assert first.audit.passed == audit(plan.with_layout(moved), rules, widths=True).passed
    assert first.routes is not None


def test_two_nightstands_wanted_by_the_bed_are_two_beside_it() -> None:
    # with the bedside rule wanted for both of two equal nightstands, both stand beside the
    # head half of the bed (the audit's group.bedside, measured with shapely), not one
    pieces = [Piece("bed", "bed-double-160", ("r",)), Piece("n1", "nightstand", ("r",)),
              Piece("n2", "nightstand", ("r",))]
    plan = _room(4200, 4200, pieces)
    rules = rules_for(plan)
    specs = list(resolve_pieces(plan, rules))
    built = build_model(plan, rules, specs, ["r"], strengthen=False, objective=False)
    wanted = (("group.bedside", "n1"), ("group.bedside", "n2"))
    assert require(built.model, built.pieces, built.rooms, wanted, Form.SUFFICIENT) == 2
    solver = cp_model.CpSolver()
    solver.parameters.num_workers = 1
    assert solver.solve(built.model) in (cp_model.OPTIMAL, cp_model.FEASIBLE)
    done = plan.with_layout(tuple(decode(built, solver).items()))
    checks = [c for c in quality(done, rules) if c.rule == "group.bedside"]
    assert len(checks) == 2 and all(c.ok for c in checks), [c.shown for c in checks]


# A first candidate of the one-bed sample found by an earlier search: it passes the audit,
# with its bed's head under the bedroom window and the armchair between the sofa and the TV
# (the group rules it misses).
_ONE_BED = {"bed": (1328, 4500, 180, "bedroom"), "ns-left": (868, 6145, 180, "bedroom"),
            "ns-right": (3028, 6145, 180, "bedroom"), "wardrobe": (1128, 2800, 0, "bedroom"),
            "sofa": (6596, 3691, 90, "living"), "tv": (3800, 4101, 270, "living"),
            "table": (3808, 2408, 0, "living"), "desk": (8400, 4100, 90, "living"),
            "bookcase": (3800, 5750, 270, "living"), "armchair": (4972, 5750, 180, "living")}


def _sample_at(name: str, where: dict[str, tuple[int, int, int, str]]) -> Plan:
    plan = read_plan(Path(__file__).parent.parent / "plans" / f"{name}.toml")
    return plan.with_layout(tuple((pid, Placement(*at)) for pid, at in where.items()))


def _missed(plan: Plan) -> set[str]:
    return {c.rule for c in quality(plan, rules_for(plan)) if c.kind == Kind.GROUP and not c.ok}


def _settled(plan: Plan, seconds: float) -> tuple[Plan, list]:
    """The arrangement the check takes for ``plan`` (audited: it passes) and its verdicts."""
    rules = rules_for(plan)
    assert audit(plan, rules, widths=True).passed
    better, verdicts = settle(plan, rules, components(plan, resolve_pieces(plan, rules)),
                              plan.layout, SolveOptions(seed=0), time.monotonic() + seconds)
    assert better is not None, [v.text for v in verdicts]
    done = plan.with_layout(better)
    assert audit(done, rules, widths=True).passed
    return done, list(verdicts)


def test_the_one_bed_sample_is_rearranged_to_meet_every_group_rule() -> None:
    # the bedroom allows the head on its east wall with both nightstands beside it; the
    # search with every group rule hard at once finds it, where one rule at a time had
    # traded the window for a nightstand
    plan = _sample_at("one-bed", _ONE_BED)
    assert _missed(plan) == {"group.bed_window", "group.view_clear"}
    done, verdicts = _settled(plan, 40)
    assert not _missed(done)
    assert [v.reach for v in verdicts] == [Reach.MET, Reach.MET]


# A first candidate of the studio sample found by an earlier search: the bed's head on the
# south wall (the one wall where it is neither under a window nor in the door's way), the
# sofa on the north wall with the TV beside it, off its axis.
_STUDIO = {"bed": (800, 2000, 0, "main"), "ns-1": (345, 2000, 0, "main"),
           "wardrobe": (4800, 2000, 90, "main"), "sofa": (1172, 5710, 180, "main"),
           "tv": (0, 4950, 270, "main"), "table": (2550, 4119, 90, "main")}


def test_a_comfort_rule_is_given_up_for_a_rule_that_makes_a_group_work() -> None:
    # in the studio the sofa can face the TV only when the bed's head is under a window:
    # the bed head clear of a window is a comfort rule (half weight, groups.toml), so the
    # check takes the arrangement where the sofa faces the TV and the nightstand stays
    plan = _sample_at("studio", _STUDIO)
    assert not _view_ok(plan)
    done, verdicts = _settled(plan, 30)
    assert _view_ok(done)
    missed = _missed(done)
    assert missed <= {"group.bed_window"}
    assert "comfort rule given up" in verdicts[0].detail or not missed
