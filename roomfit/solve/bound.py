"""A lower bound on the objective that means something: the same preferences, pieces apart.

CP-SAT's own bound after a short run is its linear relaxation's, where a relation's
"met" literal may be a fraction and every fixed penalty melts away: gaps of 68 to 98 % were
reported for layouts that were in fact close to the best. ``lower_bound`` solves instead a
*relaxation of the audit* with the full objective: the relaxed model (turning space left out,
floor kept clear by the grid cells inside it) in which pieces may overlap one another, each
keeping only to the room, the fittings and the floor kept clear on its own, and its use zones
to the room and the fittings. Every layout the audit passes is a solution of it, so its
optimum (or, when the run ends early, CP-SAT's bound of it) is at most the objective of every
layout the search can return, diversity rules or not. Without the coupling between pieces
the model is small and is usually solved to optimality in a fraction of a second.
"""

from __future__ import annotations

from ortools.sat.python import cp_model

from roomfit.plan.data import Plan, Trip
from roomfit.rules.catalog import PieceSpec
from roomfit.rules.sets import RuleSet
from roomfit.solve.model import build_model, tune
from roomfit.solve.rooms import RoomGeo

__all__ = ["lower_bound", "BOUND_WORK"]

#: CP-SAT deterministic time units the bound's run may use (it repeats with the seed).
BOUND_WORK = 0.5


def lower_bound(plan: Plan, rules: RuleSet, specs: list[PieceSpec], rooms: list[str], grid: int,
                geo: dict[str, RoomGeo], routines: tuple[Trip, ...], seconds: float,
                no_turning: frozenset[str] = frozenset(), seed: int = 0) -> float | None:
    """A proven lower bound on the objective of every layout of ``specs`` in ``rooms`` that
    the audit passes (module docstring); None when no bound was proven in ``seconds``."""
    built = build_model(plan, rules, specs, rooms, grid, strengthen=False, relaxed=True,
                        apart=True, geo=geo, routines=routines, no_turning=no_turning)
    if not built.has_objective:
        return 0.0
    solver = cp_model.CpSolver()
    p = solver.parameters
    p.num_workers, p.random_seed = 1, seed
    p.max_time_in_seconds, p.max_deterministic_time = max(0.01, seconds), BOUND_WORK
    tune(p)
    status = solver.solve(built.model)
    if status == cp_model.OPTIMAL:
        return solver.objective_value
    if status in (cp_model.FEASIBLE, cp_model.UNKNOWN):
        return solver.best_objective_bound
    return None
