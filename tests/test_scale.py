"""Large rooms (``roomfit.solve.construct``) and symmetry breaking among equal pieces
(``roomfit.solve.symmetry``): outcomes, not times.

- A generated open-plan room of 30 pieces (benchmark generator, loose, seed 0) is built up
  unit by unit into a layout that the checker passes (the checker is the judge), and CP-SAT
  takes that layout as its first solution of the full first-stage model.
- Ordering equal pieces loses no arrangement: any layout of the unordered model, renamed by
  ``canonical``, is a solution of the ordered model; and a room whose only layouts put two
  equal pieces in mirrored spots stays solvable.
- Pieces the objective tells apart (named by a daily trip, targets of a relation) are never
  ordered.
"""

from __future__ import annotations

import time
from functools import cache

import pytest
from ortools.sat.python import cp_model

from roomfit.audit.check import audit
from roomfit.bench.instances import InstanceSpec, generate
from roomfit.plan.data import Plan, Trip
from roomfit.plan.read import loads_plan
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import load_ruleset, rules_for
from roomfit.solve.construct import construct, units
from roomfit.solve.group import routines_of
from roomfit.solve.model import build_model
from roomfit.solve.rooms import room_geometry
from roomfit.solve.search import SolveOptions, solve
from roomfit.solve.solution import decode, hint, pin
from roomfit.solve.symmetry import canonical, equal_classes


@cache
def _big() -> Plan:
    return generate(InstanceSpec(rooms=1, pieces=30, seed=0))


def _parts(plan: Plan):
    rules = load_ruleset(plan.rules.set, plan.rules.override_map())
    specs = list(resolve_pieces(plan, rules))
    rooms = [r.id for r in plan.rooms]
    geo = {r: room_geometry(plan, rules, plan.room(r), 50) for r in rooms}
    return rules, specs, rooms, geo


def _solve(model: cp_model.CpModel, seconds: float = 60.0, first: bool = False):
    solver = cp_model.CpSolver()
    solver.parameters.num_workers = 1
    solver.parameters.max_time_in_seconds = seconds
    solver.parameters.stop_after_first_solution = first
    return solver, solver.solve(model)


def test_units_keep_functional_groups_together() -> None:
    _, specs, _, _ = _parts(_big())
    got = [{s.id for s in u} for u in units(specs)]
    assert {"bed-double-160-1", "nightstand-1"} in got  # the sleeping group
    assert {"sofa-3-1", "tv-unit-1"} in got  # viewing: the sofa faces the TV
    assert sorted(i for u in got for i in u) == sorted(s.id for s in specs)  # each piece once
    # interchangeable pieces outside groups go in a few at a time, all stools alike
    stools = [u for u in got if any(i.startswith("stool") for i in u)]
    assert all(all(i.startswith("stool") for i in u) for u in stools)


def test_thirty_piece_room_is_built_into_a_layout_the_checker_passes() -> None:
    plan = _big()
    rules, specs, rooms, geo = _parts(plan)
    routines = routines_of(plan)
    # no wall-clock limit matters here: every step ends by a proof of optimality
    got = construct(plan, rules, specs, rooms, 50, geo, routines, time.monotonic() + 600)
    assert got.complete and len(got.placements) == 30
    furnished = plan.with_layout(tuple(got.placements.items()))
    assert audit(furnished, rules, widths=False).passed
    # the full first-stage model (30 pieces, gap rules, equal pieces ordered) starts from it
    built = build_model(plan, rules, specs, rooms, 50, geo=geo, routines=routines)
    hint(built, got.placements)
    solver, status = _solve(built.model, first=True)
    assert status in (cp_model.FEASIBLE, cp_model.OPTIMAL)
    assert decode(built, solver) == canonical(got.placements, built.classes)


def test_a_thirty_piece_room_is_furnished_by_solve() -> None:
    plan = _big()
    rules = load_ruleset(plan.rules.set, plan.rules.override_map())
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=60))
    assert result.candidates, result.notes
    assert audit(plan.with_layout(result.candidates[0].layout), rules).passed


def test_ordering_equal_pieces_loses_no_layout() -> None:
    # the unordered model's layouts, renamed, are layouts of the ordered one
    plan = generate(InstanceSpec(rooms=1, pieces=14, seed=2))
    rules, specs, rooms, geo = _parts(plan)
    import roomfit.solve.model as model_module

    ordered = build_model(plan, rules, specs, rooms, 50, geo=geo, routines=routines_of(plan),
                          objective=False)
    assert ordered.classes  # the instance has equal pieces that may be ordered
    keep = model_module.order_equal
    try:
        model_module.order_equal = lambda *_: None  # the model without the ordering
        free = build_model(plan, rules, specs, rooms, 50, geo=geo, routines=routines_of(plan),
                           objective=False)
    finally:
        model_module.order_equal = keep
    for seed in range(3):
        solver = cp_model.CpSolver()
        solver.parameters.num_workers = 1
        solver.parameters.random_seed = seed
        solver.parameters.max_time_in_seconds = 60
        assert solver.solve(free.model) in (cp_model.FEASIBLE, cp_model.OPTIMAL)
        where = decode(free, solver)
        check = ordered.model.clone()
        pin(check, ordered, where)
        assert _solve(check)[1] in (cp_model.FEASIBLE, cp_model.OPTIMAL)


_PAIR = """
roomfit_plan = 1
name = "Two equal chests (invented)"
[rules]
set = "everyday"
[[rooms]]
id = "r"
use = "bedroom"
outline = [[0, 0], [2000, 0], [2000, 2000], [0, 2000]]
[[doors]]
id = "d"
rooms = ["r", "outside"]
at = [1000, 0]
width = 900
leaf = "sliding"
[[furniture]]
id = "c1"
type = "custom"
room = "r"
width = 1900
depth = 400
height = 900
[[furniture]]
id = "c2"
type = "custom"
room = "r"
width = 1900
depth = 400
height = 900
"""


def test_a_room_that_fits_equal_pieces_one_way_only_stays_solvable(
        monkeypatch: pytest.MonkeyPatch) -> None:
    # Two 1900 x 400 chests in a 2 m square room with its door in the south wall: only the
    # north strip and the east and west walls hold them clear of the door; the ordered model
    # must still find a layout the checker passes.
    import roomfit.solve.model as model_module

    monkeypatch.setattr(model_module, "ORDER_FROM", 2)  # order them though the room is small
    plan = loads_plan(_PAIR)
    rules = rules_for(plan)
    specs = list(resolve_pieces(plan, rules))
    built = build_model(plan, rules, specs, ["r"], 50, objective=False)
    assert [[pv.spec.id for pv in c] for c in built.classes] == [["c1", "c2"]]
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=30))
    assert result.candidates
    assert audit(plan.with_layout(result.candidates[0].layout), rules).passed


def test_pieces_the_objective_tells_apart_are_not_ordered() -> None:
    plan = _big()
    rules, specs, rooms, geo = _parts(plan)
    stools = [s.id for s in specs if s.id.startswith("stool")]
    trips = (Trip("entrance", stools[0], 2.0, "to the first stool"),)
    built = build_model(plan, rules, specs, rooms, 50, geo=geo, routines=trips, objective=False)
    ordered = {pv.spec.id for c in built.classes for pv in c}
    assert stools[0] not in ordered and set(stools[1:]) <= ordered
    # relation targets (the first bed, sofa, TV...) are never ordered either
    targets = {t for s in specs for _, t in s.relations}
    assert not any(pv.spec.category in targets for c in equal_classes(built.pieces, trips)
                   for pv in c)
