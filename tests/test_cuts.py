"""Completeness of the search against its checker (``roomfit.solve.cuts`` and the staged
search of ``roomfit.solve.search``): a room at the edge of feasibility whose hand-placed
layout passes the audit is matched by a solve that finds one; every cut removes only layouts
the audit fails; the relaxed turning shapes lie inside the turning space (shapely as the
independent judge); honest outcomes for huge and invalid input.

The rooms are the kind a new user tries: one bedroom of 3600 x 3600 mm with a 160 x 200 cm
bed (a common European double; footprint given as 1600 x 2000 mm) under the 2010 ADA
Standards (60 in turning space, §304.3; 36 in routes, §403.5.1; the bed's clear floor from the
rule set), and the same bed under ISO 21542:2021 (1500 mm turning circle) in a room exactly as
wide as the bed and its two side zones.
"""

from __future__ import annotations

import math
from dataclasses import replace

import pytest
from shapely import box
from shapely.geometry import Point

from roomfit.audit.check import audit
from roomfit.errors import RoomfitError
from roomfit.plan.data import Placement, Trip
from roomfit.plan.read import loads_plan, read_plan
from roomfit.rules.sets import rules_for
from roomfit.solve.cuts import DIVISOR, MARGIN, sound_cut
from roomfit.solve.model import inscribed
from roomfit.solve.outcome import describe
from roomfit.solve.search import SolveOptions, solve


def _bedroom(width: int, rule_set: str, wardrobe: bool = False) -> str:
    text = f"""
roomfit_plan = 1
name = "Edge bedroom (invented)"
[rules]
set = "{rule_set}"
[[rooms]]
id = "bed"
use = "bedroom"
outline = [[0, 0], [{width}, 0], [{width}, 3600], [0, 3600]]
[[doors]]
id = "d-in"
rooms = ["bed", "outside"]
at = [1700, 0]
width = 915
leaf = "hinged"
swings_into = "bed"
hinge = "left"
[[furniture]]
id = "bed1"
type = "bed-double-160"
room = "bed"
width = 1600
depth = 2000
"""
    if wardrobe:
        text += '[[furniture]]\nid = "wr"\ntype = "wardrobe-hinged"\nroom = "bed"\n'
    return text


def _passes_by_hand(text: str, layout: dict[str, Placement]) -> None:
    plan = loads_plan(text, "edge.toml")
    verdict = audit(plan.with_layout(tuple(layout.items())), rules_for(plan))
    assert verdict.passed, [f.message for f in verdict.failures]


def _solves(text: str, time_limit: float = 40.0):
    plan = loads_plan(text, "edge.toml")
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=time_limit, seed=0))
    assert result.status in ("found", "optimal"), (result.status, result.notes)
    for c in result.candidates:
        assert audit(plan.with_layout(c.layout), rules).passed
    return result


# a hand-placed bed, head to the north wall, 931 mm from the west wall: the strip beside it
# is wider than the 36 in (914 mm) route, the floor south of it holds the 60 in circle
ADA_BED = {"bed1": Placement(931, 1600, 180, "bed")}


def test_ada_bedroom_with_bed_alone_is_furnished() -> None:
    # the quick cuts around two near misses (beds 762 and 1219 mm from the west wall) used
    # to rule out every bed position between them, and the search gave up after 0.2 s
    _passes_by_hand(_bedroom(3600, "ada-2010"), ADA_BED)
    _solves(_bedroom(3600, "ada-2010"))


def test_ada_bedroom_with_bed_and_wardrobe_is_furnished() -> None:
    layout = {**ADA_BED, "wr": Placement(2531, 0, 0, "bed")}
    _passes_by_hand(_bedroom(3600, "ada-2010", wardrobe=True), layout)
    _solves(_bedroom(3600, "ada-2010", wardrobe=True))


def test_iso_bedroom_exactly_as_wide_as_bed_and_zones_is_furnished() -> None:
    # 900 (right side zone) + 1600 (bed) + 1500 (left side zone, the wheelchair side) = 4000
    _passes_by_hand(_bedroom(4000, "iso-21542"), {"bed1": Placement(900, 1600, 180, "bed")})
    _solves(_bedroom(4000, "iso-21542"))


def test_a_sound_cut_removes_only_layouts_the_audit_fails() -> None:
    # a bed 600 mm from the south wall, in front of the door, leaves a passage far narrower
    # than the route on the way in (a strip beside a bed is not itself a route: its use
    # zone needs only to adjoin one, 2010 ADA §305.6): the cut may rule out moves below
    # (shortfall - margin) / DIVISOR, and every such move fails too
    text = _bedroom(3600, "ada-2010")
    plan = loads_plan(text, "edge.toml")
    rules = rules_for(plan)
    where = {"bed1": Placement(300, 600, 180, "bed")}
    verdict = audit(plan.with_layout(tuple(where.items())), rules, widths=False)
    assert not verdict.passed
    cut = sound_cut(["bed1"], where, verdict.failures, lambda keep: verdict,
                    rules.mm("route.pinch_width"), rules.text("turning.shape"))
    assert cut.pieces == ("bed1",) and cut.move > 20
    step = max(1, (cut.move - 1) // 3)
    for dx in range(-(cut.move - 1), cut.move, step):
        for dy in (-(cut.move - 1), 0):
            moved = {"bed1": Placement(300 + dx, 600 + dy, 180, "bed")}
            assert not audit(plan.with_layout(tuple(moved.items())), rules, widths=False).passed
    short = rules.mm("route.pinch_width") - min(f.measured for f in verdict.failures
                                                 if f.rule == "route.reach")
    assert cut.move == math.floor((short - MARGIN["route.reach"]) / DIVISOR)


@pytest.mark.parametrize("shape", ["circle", "square", "circle-or-t"])
@pytest.mark.parametrize("size", [1500, 1524, 1702])
def test_relaxed_turning_shapes_lie_inside_the_turning_space(shape: str, size: int) -> None:
    rects = inscribed(size, shape)
    union = box(*rects[0]).union(box(*rects[0]))
    for r in rects:
        assert r[0] < r[2] and r[1] < r[3]
        for other in rects:  # disjoint (they share one NoOverlap2D with the furniture)
            if other is not r:
                assert box(*r).intersection(box(*other)).area == 0
        union = union.union(box(*r))
    if shape == "square":
        space = box(-size / 2, -size / 2, size / 2, size / 2)
    else:  # the circle, and for circle-or-t also the T's 0.6 D deep bar (2010 ADA §304.3.2)
        space = Point(0, 0).buffer(size / 2, quad_segs=256)
    assert space.buffer(1e-6).contains(union)
    if shape == "circle-or-t":
        bar = box(-size / 2, -0.3 * size, size / 2, 0.3 * size)
        assert bar.contains(union) and bar.intersection(union).area == union.area


def test_a_room_a_thousand_kilometres_long_is_refused_before_any_model() -> None:
    plan = read_plan("tests/plans_unseen/tiny-bed.toml")
    huge = replace(plan.rooms[0], outline=((0, 0), (10**13, 0), (10**13, 2600), (0, 2600)))
    plan = replace(plan, rooms=(huge,))
    with pytest.raises(RoomfitError, match="reaches .* from the plan's origin"):
        solve(plan, rules_for(plan), SolveOptions(candidates=1, time_limit=5))


def test_an_invalid_model_is_an_error_naming_the_plan_not_a_timeout() -> None:
    plan = read_plan("plans/one-bed.toml")
    plan = replace(plan, furniture=tuple(replace(p, placement=None) for p in plan.furniture),
                   routines=(Trip("bed", "entrance", 1e12),))
    with pytest.raises(RoomfitError, match="invalid for the solver") as err:
        solve(plan, rules_for(plan), SolveOptions(candidates=1, time_limit=10))
    assert plan.name in err.value.render()


def test_fewer_candidates_than_asked_come_with_the_reason() -> None:
    plan = loads_plan(_bedroom(3600, "ada-2010"), "edge.toml")
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=20, time_limit=40, seed=0))
    assert 1 <= len(result.candidates) < 20
    words = describe(result, 40)
    assert words.level == "success" and any("of the 20" in d for d in words.details)
    assert any("proven" in d or "time limit" in d for d in words.details)
    for c in result.candidates:  # the results travel with the candidate, judged once
        fresh = audit(plan.with_layout(c.layout), rules)
        assert c.audit is not None and c.audit.findings == fresh.findings
        assert c.routes is not None and c.routes.rank_key == c.route_key


def test_every_fix_shown_is_confirmed_by_a_solve_and_a_false_one_is_dropped() -> None:
    # ISO 21542 asks 1500 mm of clear floor beside the bed: a 1600 mm bed with 1500 + 900 mm
    # side zones needs 4000 mm, the room is 3600 mm wide: provably impossible
    from roomfit.solve.explain import Explanation, Fix
    from roomfit.solve.group import Clock as _Clock
    from roomfit.solve.search import _confirmed

    text = _bedroom(3600, "iso-21542", wardrobe=True)
    plan = loads_plan(text, "edge.toml")
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=20, seed=0))
    assert result.status == "impossible" and result.explanation is not None
    assert result.explanation.fixes and not result.explanation.trials
    for fix in result.explanation.fixes:  # a re-run with the fix made finds an arrangement
        if fix.startswith("without the Double bed"):
            fixed = replace(plan, furniture=tuple(p for p in plan.furniture if p.id != "bed1"))
            again = solve(fixed, rules, SolveOptions(candidates=1, time_limit=20, seed=0))
            assert again.candidates
    # leaving out the wardrobe does not make the bed fit: that fix is never shown
    wrong = Explanation("x", ("wr",), (), (), (Fix("without the wardrobe it fits", "wr"),))
    checked = _confirmed(plan, rules, SolveOptions(candidates=1, time_limit=5), wrong, _Clock(5))
    assert checked.fixes == () and checked.trials == ()


def test_a_sound_cut_from_a_routine_trip_removes_only_failing_layouts() -> None:
    # A trip to a shelf (a piece without use zones, so no route.reach target of its own)
    # through a 500 mm gap between two blocks 1000 mm deep: the everyday route is 30 in
    # (762 mm) with no narrower stretch allowed, so only route.trip fails. Its measured
    # widest way makes the cut larger than the single layout (the same walkway measure as
    # route.reach), and every layout with the blocks moved less than the cut also fails.
    from roomfit.plan.data import OUTSIDE, Door, Leaf, Piece, Plan, Room, RuleChoice

    def block(pid: str, x: int, y: int, w: int, d: int) -> Piece:
        return Piece(pid, "custom", ("r",), width=w, depth=d, height=800,
                     placement=Placement(x, y, 0, "r"))

    room = Room("r", "Room", "living", ((0, 0), (4000, 0), (4000, 5000), (0, 5000)))
    door = Door("entry", ("r", OUTSIDE), (2000, 0), 1000, Leaf.NONE)
    shelf = block("shelf", 1500, 4600, 1000, 400)
    plan = Plan("gap", (room,), (door,), (), (), (shelf,), RuleChoice("everyday", ()),
                (Trip("entrance", "shelf", 1.0, "To the shelf"),))
    rules = rules_for(plan)
    where = {"a": Placement(0, 2000, 0, "r"), "b": Placement(2000, 2000, 0, "r")}

    def judged(at: dict[str, Placement]):
        pieces = (shelf, block("a", 0, 0, 1500, 1000), block("b", 0, 0, 2000, 1000))
        return audit(replace(plan, furniture=pieces).with_layout(
            (("shelf", shelf.placement), *at.items())), rules, widths=False)

    verdict = judged(where)
    assert [f.rule for f in verdict.failures] == ["route.trip"]
    trip = verdict.failures[0]
    # the widest way is the gap, within the walkway's 0.5 mm slack (docs/audit.md)
    assert trip.measured is not None and 495 <= trip.measured <= 500.5
    cut = sound_cut(["a", "b"], where, verdict.failures, lambda keep: verdict,
                    rules.mm("route.pinch_width"), rules.text("turning.shape"))
    assert cut.move == math.floor((762 - trip.measured - MARGIN["route.trip"]) / DIVISOR)
    assert cut.move > 30
    near = cut.move - 1
    for da in (-near, 0, near):   # the gap widens most when a goes west and b goes east
        for db in (-near, 0, near):
            for dy in (-near, near):
                moved = {"a": Placement(0 + min(da, 0), 2000 + dy, 0, "r"),
                         "b": Placement(2000 + max(db, 0), 2000 - dy, 0, "r")}
                assert not judged(moved).passed, moved


def test_advice_on_a_timeout_is_confirmed_by_a_solve_of_the_changed_plan() -> None:
    """On a search the time limit ended, a piece allowed in several rooms gets the advice to
    stand in one of them only if a solve of that changed plan finds an arrangement: the
    closet (900 mm square) cannot hold the desk, the study can."""
    from types import SimpleNamespace

    from roomfit.rules.catalog import resolve_pieces
    from roomfit.solve.search import _advice
    from roomfit.solve.tally import Clock

    plan = loads_plan("""
roomfit_plan = 1
name = "Study with a closet (invented)"
[[rooms]]
id = "study"
use = "study"
outline = [[0, 0], [3000, 0], [3000, 3000], [0, 3000]]
[[rooms]]
id = "closet"
use = "storage"
outline = [[3000, 0], [3900, 0], [3900, 900], [3000, 900]]
[[doors]]
id = "d-in"
rooms = ["study", "outside"]
at = [1500, 0]
width = 900
leaf = "none"
[[doors]]
id = "d-closet"
rooms = ["closet", "study"]
at = [3000, 450]
width = 800
leaf = "none"
[[furniture]]
id = "desk"
type = "desk"
rooms = ["closet", "study"]
""", "study.toml")
    rules = rules_for(plan)
    stuck = SimpleNamespace(found=(), locked=frozenset(), specs=resolve_pieces(plan, rules))
    advice = _advice(plan, rules, SolveOptions(candidates=1, time_limit=20), Clock(20), [stuck])
    assert len(advice) == 1 and "in the study only" in advice[0], advice
    assert "closet" not in advice[0]
