"""A first layout of a large group of rooms, built unit by unit: a warm start for the search.

CP-SAT on the whole model of a room with 30 pieces can take longer than the user's limit to
find any layout at all (measured: none in 20 s for the 30-piece room of the benchmark), while
the same room built up a few pieces at a time takes one small model per step, each solved to
optimality in some 0.05 s. ``construct`` places the pieces in *units*, largest floor demand
first: the pieces of a functional group (catalogue ``groups``: a bed with its nightstands, a
sofa with its TV and coffee table, a dining table with its chairs) go in together, so the
relations between them are optimised in one step; other pieces go in alone, or up to
``BATCH`` interchangeable ones together. Each step solves the strengthened model
(``roomfit.solve.model``, objective included) of the pieces placed so far, locked where the
earlier steps put them, plus the unit. When a step has no layout, the unit is merged with the
one placed before it and both are placed again (up to ``RETRIES`` times), else the
construction stops.

It is a heuristic: the result is only given to the complete search as its starting point
(a CP-SAT hint), audited there like any other layout, and the staged search with its proof
of impossibility follows unchanged. A complete result is a solution of the first stage's
model (every step kept all its constraints among the pieces placed), so CP-SAT takes it as
its first solution at once.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, replace

from ortools.sat.python import cp_model

from roomfit.audit.geometry import lies_flat
from roomfit.plan.data import Placement, Plan, Trip
from roomfit.rules.catalog import PieceSpec
from roomfit.rules.sets import RuleSet
from roomfit.solve.model import build_model, tune
from roomfit.solve.rooms import RoomGeo
from roomfit.solve.solution import decode
from roomfit.solve.symmetry import interchangeable

__all__ = ["units", "construct", "Construction", "BATCH", "RETRIES", "FROM_PIECES", "STEP_WORK"]

#: Interchangeable pieces placed in one step at most.
BATCH = 3

#: Times a step that finds no layout merges with the unit placed before it.
RETRIES = 2

#: CP-SAT deterministic time units one step may use (steps measured: 0.002 to 0.04 on the
#: benchmark's 30- and 40-piece rooms, each proven optimal; the cap only stops a runaway).
STEP_WORK = 1.0

#: Groups with at least this many movable pieces start from a constructed layout. Measured on
#: the benchmark's one-room flats (loose, seeds 0 to 2): with 10 pieces the whole model finds
#: a first layout in about 0.2 s, as fast as the construction; from 20 pieces on the whole
#: model takes seconds to minutes and the construction about 0.1 s per step.
FROM_PIECES = 14


def _demand(spec: PieceSpec) -> int:
    """Floor (mm2) of a piece's footprint and use zones: the order of placement. A rug takes
    no floor from the others (:func:`~roomfit.audit.geometry.lies_flat`): it goes in last,
    under the group already placed."""
    if lies_flat(spec):
        return 0
    return spec.width * spec.depth + sum(
        (spec.width if z.side in ("front", "back") else spec.depth) * z.depth for z in spec.zones)


def units(specs: list[PieceSpec]) -> list[list[PieceSpec]]:
    """The movable pieces of ``specs`` in placing order: pieces that share a functional group
    and a room form one unit; interchangeable pieces outside groups go in ``BATCH`` at a time;
    units with the larger floor demand first (ties in plan order)."""
    out: list[list[PieceSpec]] = []
    taken: set[str] = set()
    for s in specs:
        if s.id in taken or not s.groups:
            continue
        unit = [t for t in specs if t.id not in taken and set(t.groups) & set(s.groups)
                and set(t.rooms) & set(s.rooms)]
        taken |= {t.id for t in unit}
        out.append(unit)
    alone: dict[PieceSpec, list[PieceSpec]] = {}
    for s in specs:
        if s.id not in taken:
            alone.setdefault(interchangeable(s), []).append(s)
    for same in alone.values():
        out += [same[i:i + BATCH] for i in range(0, len(same), BATCH)]
    order = {s.id: i for i, s in enumerate(specs)}
    out.sort(key=lambda u: (-sum(_demand(s) for s in u), order[u[0].id]))
    return out


@dataclass(frozen=True)
class Construction:
    """What :func:`construct` made: the placements of the pieces it placed, whether every
    piece is placed, and the steps it solved."""

    placements: dict[str, Placement]
    complete: bool
    steps: int


def _step(plan: Plan, rules: RuleSet, specs: list[PieceSpec], rooms: list[str], grid: int,
          geo: dict[str, RoomGeo], routines: tuple[Trip, ...], no_turning: frozenset[str],
          placed: dict[str, Placement], unit: list[PieceSpec], seed: int,
          seconds: float) -> dict[str, Placement] | None:
    """Place ``unit`` with the ``placed`` pieces locked: the unit's placements, or None."""
    ids = set(placed) | {s.id for s in unit}
    furniture = tuple(replace(p, locked=True, placement=placed[p.id]) if p.id in placed else p
                      for p in plan.furniture if p.id in ids or p.locked)
    sub = replace(plan, furniture=furniture)
    here = {p.id for p in furniture}
    keep = [s for s in specs if s.id in here]
    built = build_model(sub, rules, keep, rooms, grid, strengthen=True, geo=geo,
                        routines=routines, no_turning=no_turning)
    solver = cp_model.CpSolver()
    p = solver.parameters
    p.num_workers, p.random_seed, p.max_time_in_seconds = 1, seed, max(0.01, seconds)
    p.max_deterministic_time = STEP_WORK  # a step's end repeats with the seed, not the load
    tune(p)
    if solver.solve(built.model) not in (cp_model.OPTIMAL, cp_model.FEASIBLE):
        return None
    where = decode(built, solver)
    return {s.id: where[s.id] for s in unit}


# long: one loop over the units with its retry bookkeeping; split, it reads worse
def construct(plan: Plan, rules: RuleSet, specs: list[PieceSpec], rooms: list[str], grid: int,
              geo: dict[str, RoomGeo], routines: tuple[Trip, ...], deadline: float,
              no_turning: frozenset[str] = frozenset(), seed: int = 0) -> Construction:
    """Place the movable pieces of ``specs`` in ``rooms`` unit by unit (module docstring)
    until done, stuck or ``deadline`` (``time.monotonic()``). Locked pieces stay put."""
    movable = [s for s in specs if not plan.piece(s.id).locked]
    todo = units(movable)
    placed: dict[str, Placement] = {}
    done: list[list[PieceSpec]] = []  # units placed, in order (for merging back)
    retries, steps = 0, 0
    while todo:
        left = deadline - time.monotonic()
        if left <= 0.02:
            break
        unit = todo.pop(0)
        got = _step(plan, rules, specs, rooms, grid, geo, routines, no_turning, placed, unit,
                    seed, max(0.05, 2 * left / (len(todo) + 1)))
        steps += 1
        if got is not None:
            placed.update(got)
            done.append(unit)
            continue
        if retries >= RETRIES or not done:
            todo.insert(0, unit)
            break
        retries += 1
        before = done.pop()
        for s in before:
            del placed[s.id]
        todo.insert(0, before + unit)
    return Construction(placed, not todo and len(placed) == len(movable), steps)
