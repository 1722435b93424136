"""The lower bound a candidate's gap is measured against (``roomfit.solve.bound``) is a real
bound: never above the objective of any layout a longer search finds, and above zero where
the room forces some distance (not the trivial bound). Outcomes, not times.
"""

from __future__ import annotations

from roomfit.bench.instances import InstanceSpec, generate
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import load_ruleset
from roomfit.solve.bound import lower_bound
from roomfit.solve.group import routines_of
from roomfit.solve.outcome import GAP_WORDS, describe
from roomfit.solve.rooms import room_geometry
from roomfit.solve.search import SolveOptions, solve


def _bound(plan, rules) -> float | None:
    specs = list(resolve_pieces(plan, rules))
    rooms = sorted({r for s in specs for r in s.rooms})
    geo = {r: room_geometry(plan, rules, plan.room(r), 50) for r in rooms}
    return lower_bound(plan, rules, specs, rooms, 50, geo, routines_of(plan), 120.0)


def test_the_bound_is_at_most_every_layout_a_longer_run_finds() -> None:
    plan = generate(InstanceSpec(rooms=1, pieces=10, seed=2))
    rules = load_ruleset(plan.rules.set, plan.rules.override_map())
    floor = _bound(plan, rules)
    assert floor is not None and floor > 0  # the room forces some distance: not a 0 bound
    result = solve(plan, rules, SolveOptions(candidates=3, time_limit=30))
    assert result.candidates
    for c in result.candidates:
        assert floor <= c.objective
        assert c.bound <= c.objective  # the reported bound too
    if not all(c.optimal for c in result.candidates):
        assert GAP_WORDS in describe(result, 30).details  # the figure is explained
