"""The verify-and-cut search of one group of rooms (rooms that share no piece).

``GroupSearch.run`` builds the group's placement model (``roomfit.solve.model``), solves it with
one CP-SAT worker, audits every layout with the cheap audit and cuts off the ones that fail,
in stages that end in the relaxed model with sound cuts only (``roomfit.solve.cuts``; see
``docs/solver.md``). ``roomfit.solve.search`` runs the groups side by side and combines them.
"""

from __future__ import annotations

import math
import time
from collections.abc import Callable
from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

from ortools.sat.python import cp_model

from roomfit.audit.routes import default_routines
from roomfit.errors import Problem, RoomfitError
from roomfit.plan.data import Placement, Plan, Trip
from roomfit.rules.catalog import PieceSpec
from roomfit.rules.sets import RuleSet
from roomfit.solve.bound import lower_bound
from roomfit.solve.building import BuildingFinding, key, no_turning
from roomfit.solve.construct import FROM_PIECES, construct
from roomfit.solve.cuts import SoundCut, sound_cut
from roomfit.solve.explain import Explanation
from roomfit.solve.groups import main_differs
from roomfit.solve.model import build_model, tune
from roomfit.solve.rooms import room_geometry
from roomfit.solve.solution import decode, differs, evaluate, hint
from roomfit.solve.symmetry import interchangeable
from roomfit.solve.tally import Clock, Counters
from roomfit.solve.vars import Built

if TYPE_CHECKING:
    from roomfit.audit.check import Audit
    from roomfit.solve.search import SolveOptions

__all__ = ["GroupSearch", "Found", "routines_of", "judge", "DIFFER_PIECES",
           "MOVE"]

#: A later candidate must differ from every earlier one in at least this many pieces
#: (fewer when the group has fewer movable pieces): another room, another turn (a
#: 180-degree turn of a symmetric piece does not count), or a move of at least
#: ``MOVE`` mm along x or y.
DIFFER_PIECES = 2
MOVE = 300

#: CP-SAT deterministic time units granted per second of the time limit. Measured on this
#: 2-core machine: one worker does some 0.2 units per second on a 10-piece living room and
#: bedroom, so a run may use about half its wall-clock share for improving (0.04 ended runs
#: after a fifth and left candidates at large gaps) while the deterministic limit still ends
#: most runs first, so they repeat exactly.
_WORK_PER_SECOND = 0.12

#: Share of the time left that each stage before the last (quick cuts) gets to find a group's
#: first layout before the next stage takes over; the relaxed model with sound cuts gets the
#: rest (at least 0.7 ** 5 = 17 % of the time, more when stages end by running out of layouts).
_STAGE_SHARE = 0.3

#: Share of a large group's time for its first layout that building one up unit by unit
#: may take (``roomfit.solve.construct``); the whole model gets the rest.
_WARM_SHARE = 0.6

#: Improving solutions of one CP-SAT run audited at most (best first).
_AUDITS_PER_SOLVE = 4

#: A run whose first layouts all fail the audit stops after this many, so that they are cut
#: off at once rather than at the end of the run.
_FAILS_BEFORE_CUT = 2

@dataclass
class Found:
    """A layout that passed the audit: placements, objective, proven bound, optimal."""

    placements: dict[str, Placement]
    objective: float
    bound: float
    optimal: bool


def _params(solver: cp_model.CpSolver, options: SolveOptions, seconds: float, work: float) -> None:
    """Seed, workers, and two limits: ``work`` in CP-SAT's deterministic time units (fixed by
    the options, so that the same seed gives the same answer) and ``seconds`` of wall clock
    (the safety net that keeps the time limit)."""
    p = solver.parameters
    p.num_workers = 1
    p.random_seed = options.seed
    p.max_time_in_seconds = max(0.01, seconds)
    p.max_deterministic_time = max(0.001, work)
    tune(p)


def routines_of(plan: Plan) -> tuple[Trip, ...]:
    """The plan's daily routine, or the default trips of ``routes.default_routines`` (which
    name only placed pieces, so every unplaced piece gets a stand-in placement first): the
    trips the model's routine term shortens."""
    if plan.routines or not plan.rooms:
        return plan.routines
    stand_in = Placement(0, 0, 0, plan.rooms[0].id)
    placed = tuple(p if p.placement is not None else replace(p, placement=stand_in)
                   for p in plan.furniture)
    return default_routines(replace(plan, furniture=placed))


def judge(plan: Plan, rules: RuleSet, widths: bool = False,
           building: tuple[BuildingFinding, ...] = ()) -> Audit:
    """The judge (imported here to keep the import graph one-way). ``widths=False`` is the
    cheap audit: every verdict the same, the widths of passing routes not measured. Failures
    that are ``building`` findings are left out (the layout is judged around them)."""
    from roomfit.audit.check import Audit, audit

    result = audit(plan, rules, widths=widths)
    if not building or result.passed:
        return result
    keys = {key(b.finding) for b in building}
    return Audit(tuple(f for f in result.findings if f.ok or key(f) not in keys))


@dataclass(frozen=True)
class _Cut:
    """A failed layout ``where``: its sound cut, and the pieces its failures name (all the
    movable ones when none is named) for the quick cuts."""

    cut: SoundCut
    named: tuple[str, ...]
    where: dict[str, Placement]


def _only(plan: Plan, ids: set[str], where: dict[str, Placement]) -> Plan:
    """``plan`` with just the pieces ``ids``, placed as ``where`` says."""
    pieces = tuple(replace(p, placement=where[p.id]) for p in plan.furniture if p.id in ids)
    return replace(plan, furniture=pieces)


class _Collect(cp_model.CpSolverSolutionCallback):
    """Keeps every improving solution; audits them as they come until one passes (at most
    ``_AUDITS_PER_SOLVE``), so the time to the first valid layout is known early."""

    def __init__(self, search: GroupSearch, built: Built) -> None:
        super().__init__()
        self.search, self.built = search, built
        self.solutions: list[tuple[float, dict[str, Placement]]] = []
        self.verdicts: dict[int, Audit] = {}
        self.passed = False

    def on_solution_callback(self) -> None:
        where = decode(self.built, self)
        obj = self.objective_value if self.built.has_objective else 0.0
        self.solutions.append((obj, where))
        if not self.passed and len(self.verdicts) < _AUDITS_PER_SOLVE:
            verdict = self.search._judge(where)
            self.passed = verdict.passed
            self.verdicts[id(where)] = verdict
            if verdict.passed:
                self.search.valid_at(self.search.clock.elapsed())
                if self.search.quick:
                    self.stop_search()  # other groups wait for this lane: improve later
            elif len(self.verdicts) >= _FAILS_BEFORE_CUT:
                self.stop_search()  # cut these layouts off and search again


class GroupSearch:
    """The verify-and-cut loop for one group of rooms."""

    def __init__(self, plan: Plan, rules: RuleSet, rooms: list[str], specs: list[PieceSpec],
                 options: SolveOptions, clock: Clock, progress: Callable[[str], None] | None,
                 counters: Counters, building: tuple[BuildingFinding, ...] = ()) -> None:
        self.plan, self.rules, self.rooms, self.specs = plan, rules, rooms, specs
        self.options, self.clock, self.progress, self.counters = options, clock, progress, counters
        self.ids = {s.id for s in specs}
        self.geo = {r: room_geometry(plan, rules, plan.room(r), options.grid) for r in rooms}
        self.found: list[Found] = []
        self.impossible = False
        self.work_share = 1.0
        self.first: float | None = None  # seconds to this group's first valid layout
        self.built: Built | None = None
        self.building = building
        self.stage = 0
        self.stages = self._stages()
        self.sound: list[_Cut] = []  # every sound cut so far, for the last stage
        self.failed_rules: set[str] = set()
        self.locked = {p.id for p in plan.furniture if p.id in self.ids and p.locked}
        self.pinch = rules.mm("route.pinch_width") if rules.has("route.pinch_width") else 0
        self.exhausted = False
        self.quick = False  # stop a run at its first valid layout
        # layouts taken at once (quick), not yet improved (:meth:`improve`)
        self.unimproved: list[Found] = []
        self.stale = False  # the model holds a diversity rule of a layout no longer found
        self.hinted = False  # the model holds the warm start's hint
        self.floor: float | None = None  # proven lower bound of the objective (pieces apart)
        self.warm: dict[str, Placement] = {}  # the layout built up unit by unit

    def valid_at(self, seconds: float) -> None:
        if self.first is None:
            self.first = seconds

    def _say(self, text: str) -> None:
        if self.progress is not None:
            self.progress(f"[{self.clock.elapsed():6.2f} s] round {int(self.counters['solves'])}: {text}")

    def run(self, wanted: int, budget_end: float) -> None:
        """Search until ``wanted`` layouts are found or ``budget_end``; may be called again
        with a larger ``wanted`` to resume with the same model (and its cuts).

        Stages (see :meth:`_stages`), each taking over when the one before has no further
        layout or has used its share of the time: quick cuts first, shrinking stage by stage,
        then the relaxed model with sound cuts only (``roomfit.solve.cuts``), which runs until
        the time is up or proves that no further layout passes."""
        if self.exhausted or len(self.found) >= wanted:
            return
        if self.stale:
            self._start(self.stage, again=True)
        last = len(self.stages) - 1
        while len(self.found) < wanted and not self.exhausted:
            if self.built is None:
                self._start(0)
                if self._warm_start(budget_end) and not self.quick:
                    self.improve(budget_end)
                    continue
            left = max(0.0, budget_end - time.monotonic())
            stage_end = budget_end if self.stage == last else (
                time.monotonic() + _STAGE_SHARE * left)
            outcome = self._loop(wanted, budget_end, stage_end if not self.found else budget_end)
            if outcome == "done":
                return
            if outcome == "infeasible" and self.stage == last:
                self.exhausted = True
                self.impossible = not self.found
                return
            if self.stage == last or time.monotonic() >= budget_end - 0.05:
                return
            if outcome == "time" and self.found:
                return
            self._start(self.stage + 1)

    def _stages(self) -> list[tuple[bool, bool, int]]:
        """(strengthened, relaxed, quick move in mm) per stage: the strengthened model with
        quick cuts of half a route width, the plain model with quick cuts of half a route
        width, a quarter, an eighth, a sixteenth (a failed layout's neighbourhood shrinks
        until the layouts that pass near it are in reach), then the relaxed model with the
        sound cuts alone (move 0)."""
        step = max(self.options.grid, math.ceil(self.rules.get("route.width").exact_mm) // 2)
        return ([(True, False, step)] + [(False, False, step >> k) for k in range(4)]
                + [(False, True, 0)])

    def explain_exhausted(self) -> Explanation:
        """Why nothing fits when every layout of the relaxed model failed the audit."""
        rooms = ", ".join(self.plan.room(r).label for r in self.rooms)
        pieces = tuple(dict.fromkeys(p for c in self.sound for p in c.cut.pieces))
        rules = tuple(sorted(self.failed_rules))
        return Explanation(
            f"Every arrangement of the {rooms} that keeps the pieces apart and their clear "
            f"floor free was tried against the rules and fails ({len(self.sound)} checked, each "
            f"cut off with the layouts that fail for the same reason): {', '.join(rules)}. "
            f"(Positions in whole millimetres; angled walls covered on a {self.options.grid} mm "
            "grid.)", pieces, rules, ())

    def _warm_start(self, budget_end: float) -> bool:
        """A large group starts from a layout built unit by unit (``roomfit.solve.construct``,
        at most ``_WARM_SHARE`` of the time left). When it passes the audit it is the group's
        first layout at once (taken at once: :meth:`improve` improves on it); either way it is the
        hint of the first run of every stage until a layout is found, and the complete
        search follows as before. True when it passed."""
        if len(self.ids - self.locked) < FROM_PIECES:
            return False
        deadline = time.monotonic() + _WARM_SHARE * max(0.0, budget_end - time.monotonic())
        got = construct(self.plan, self.rules, self.specs, self.rooms, self.options.grid,
                        self.geo, routines_of(self.plan), deadline, self._no_turning(),
                        self.options.seed)
        self.counters.add("solves", got.steps)
        self._say(f"rooms {', '.join(self.rooms)}: built up {len(got.placements)} of "
                  f"{len(self.ids - self.locked)} pieces unit by unit in {got.steps} steps"
                  + ("" if got.complete else " (stuck; the whole model takes over)"))
        self.warm = got.placements
        self._rehint()
        if not got.complete or not self._judge(got.placements).passed:
            return False
        assert self.built is not None
        objective = evaluate(self.built, got.placements)
        if objective is None:  # not a solution of this model after all: the hint stays
            return False
        taken = Found(got.placements, objective, 0.0, False)
        self.found.append(taken)
        self.unimproved.append(taken)
        self._forbid_near(self.built, [pv for pv in self.built.pieces if not pv.locked],
                          taken.placements)
        self.valid_at(self.clock.elapsed())
        self._say(f"rooms {', '.join(self.rooms)}: candidate {len(self.found)} (built up, "
                  f"objective {objective:g}); improving")
        return True

    def _rehint(self) -> None:
        """Give the built model the warm start as its hint while no layout is found."""
        if self.warm and not self.found and self.built is not None:
            hint(self.built, self.warm)
            self.hinted = True

    def _no_turning(self) -> frozenset[str]:
        return no_turning(self.building)

    def prove_bound(self, end: float) -> None:
        """Prove a lower bound of the group's objective with pieces apart
        (``roomfit.solve.bound``) by ``end``, and raise every layout's bound to it (a layout
        at the bound is optimal)."""
        if not self.found or self.floor is not None or all(f.optimal for f in self.found):
            return
        floor = lower_bound(self.plan, self.rules, self.specs, self.rooms, self.options.grid,
                            self.geo, routines_of(self.plan), end - time.monotonic(),
                            self._no_turning(), self.options.seed)
        self.counters.add("solves")
        if floor is None:
            return
        self.floor = floor
        for f in self.found:
            f.bound = max(f.bound, floor)
            f.optimal = f.optimal or f.objective <= floor

    def improve(self, budget_end: float) -> None:
        """Improve the layouts taken at once (``quick``), oldest first, each with a fair share
        of the time left: each is searched again from itself (every variable hinted) in a
        model that asks it to differ from the other layouts only; the best checker-passing
        layout of that run replaces it (it stays when none is better)."""
        while self.unimproved:
            left = budget_end - time.monotonic()
            if left <= 0.1:
                return
            taken = self.unimproved.pop(0)
            self._improve_one(taken, time.monotonic() + left / (len(self.unimproved) + 1))

    def _improve_one(self, taken: Found, end: float) -> None:
        """One layout of :meth:`improve`, until ``end``."""
        at = self.found.index(taken)
        self.found.remove(taken)
        self._start(self.stage, again=True)  # without the diversity rule of ``taken``
        built = self.built
        assert built is not None
        if evaluate(built, taken.placements) is None:  # evaluate hints the whole solution
            hint(built, taken.placements)
        before, quick = len(self.found), self.quick
        self.quick = False
        try:
            self._loop(before + 1, end, end, share_of=1)
        finally:
            self.quick = quick
        built.model.clear_hints()
        got = self.found[before] if len(self.found) > before else None
        better = got is not None and got.objective <= taken.objective
        del self.found[before:]
        self.found.insert(at, got if better and got is not None else taken)
        # the model now forbids the run's layout; without it, it must forbid ``taken``
        self.stale = not better

    def _start(self, stage: int, again: bool = False) -> None:
        """Build the model of ``stage`` (:meth:`_stages`; ``again``: the same stage once
        more) with the diversity rules of the layouts found so far and the cuts of every
        failed layout, as this stage takes them."""
        if stage > 0 and not again:
            self.counters.add("fallback")
        self.stale = False
        self.stage = stage
        strengthen, relaxed, _ = self.stages[stage]
        self.built = build_model(self.plan, self.rules, self.specs, self.rooms, self.options.grid,
                                 strengthen=strengthen, relaxed=relaxed, geo=self.geo,
                                 routines=routines_of(self.plan), no_turning=self._no_turning())
        movable = [pv for pv in self.built.pieces if not pv.locked]
        for f in self.found:
            self._forbid_near(self.built, movable, f.placements)
        for c in self.sound:
            self._add_cut(self.built, c)
        self._rehint()

    def _loop(self, wanted: int, budget_end: float, first_end: float, share_of: int = 0) -> str:
        """Solve, audit and cut until ``wanted`` layouts are found. A run gets the time left
        divided among the layouts still wanted (``share_of`` of them when given); the first
        layout of the group may take all its time."""
        built = self.built
        assert built is not None
        movable = [pv for pv in built.pieces if not pv.locked]
        work_total = self.options.time_limit * _WORK_PER_SECOND * self.work_share
        while len(self.found) < wanted:
            left = (budget_end if self.found else first_end) - time.monotonic()
            if left <= 0.05:
                return "time"
            # the first layout may take all the time it has; later ones share what is left
            parts = share_of or (wanted - len(self.found) if self.found else 1)
            share = left / parts
            work = work_total / self.options.candidates if (self.found or share_of) else work_total
            solver = cp_model.CpSolver()
            _params(solver, self.options, share, work)
            seen = _Collect(self, built)
            status = solver.solve(built.model, seen)
            self.counters.add("solves")
            if self.hinted:  # the warm start served its run; later runs differ from it
                built.model.clear_hints()
                self.hinted = False
            if status == cp_model.MODEL_INVALID:
                why = built.model.validate().splitlines()[0][:120]
                raise RoomfitError(Problem(
                    "plan", f"the placement model of {', '.join(self.rooms)} is invalid for the "
                    f"solver ({why})", "a number of the plan is beyond what the solver can "
                    "represent: look at the routine's trips a day and the lengths"),
                    self.plan.name)
            if status == cp_model.INFEASIBLE:
                return "infeasible"
            if status not in (cp_model.OPTIMAL, cp_model.FEASIBLE):
                return "time"  # a restart would lose the search done so far
            optimal = status == cp_model.OPTIMAL
            bound = solver.best_objective_bound if built.has_objective else 0.0
            bound = max(bound, self.floor or 0.0)
            accepted = None
            # best first; the last (best) solution may be proven optimal
            for k, (obj, where) in enumerate(list(reversed(seen.solutions))[:_AUDITS_PER_SOLVE]):
                result = seen.verdicts.get(id(where)) or self._judge(where)
                if result.passed:
                    accepted = Found(where, obj, bound, (optimal and k == 0) or obj <= bound)
                    break
                self._cut(built, movable, where, result)
            if accepted is None:  # a layout the callback saw pass, before the best ones
                accepted = next((Found(w, o, bound, False) for o, w in reversed(seen.solutions)
                                 if (v := seen.verdicts.get(id(w))) is not None and v.passed),
                                None)
            if accepted is None:
                continue
            self.found.append(accepted)
            self.valid_at(self.clock.elapsed())
            self._say(f"rooms {', '.join(self.rooms)}: candidate {len(self.found)} "
                      f"(objective {accepted.objective:g}{', optimal' if accepted.optimal else ''})")
            self._forbid_near(built, movable, accepted.placements)
            if self.quick and not accepted.optimal:
                self.unimproved.append(accepted)  # improved later (:meth:`improve`)
        return "done"

    def _judge(self, where: dict[str, Placement], keep: set[str] | None = None):
        """The cheap audit (``widths=False``) of this group's pieces placed as ``where`` says
        (with ``keep``: only those movable pieces, and the locked ones)."""
        self.counters.add("audits")
        ids = self.ids if keep is None else {i for i in self.ids if i in keep or i in self.locked}
        return judge(_only(self.plan, ids, where), self.rules, building=self.building)

    def _cut(self, built: Built, movable: list, where: dict[str, Placement], result) -> None:
        """Forbid ``where`` and the layouts the audit's verdict on it settles (a sound cut,
        kept for every later stage); before the last stage the cut is widened to the stage's
        quick move around the pieces next to a failure (or every movable piece when no
        failure names one)."""
        self.counters.add("cuts")
        ids = [pv.spec.id for pv in movable]
        cut = sound_cut(ids, where, result.failures, lambda keep: self._judge(where, keep),
                        self.pinch, self.rules.text("turning.shape"))
        named = tuple(pid for pid in ids if pid in {p for f in result.failures for p in f.pieces})
        self.sound.append(_Cut(cut, named or tuple(ids), dict(where)))
        self.failed_rules.update(f.rule for f in result.failures)
        pieces, move = self._add_cut(built, self.sound[-1])
        failed = sorted({f.rule for f in result.failures})
        self._say(f"rooms {', '.join(self.rooms)}: layout failed {', '.join(failed)}; one of "
                  f"{', '.join(pieces)} must move {move} mm or turn")

    def _add_cut(self, built: Built, c: _Cut) -> tuple[tuple[str, ...], int]:
        """Add cut ``c`` as this stage takes it; returns its pieces and move (mm)."""
        quick = self.stages[self.stage][2]
        pieces, move = (c.named, max(quick, c.cut.move)) if quick else (c.cut.pieces, c.cut.move)
        by_id = {pv.spec.id: pv for pv in built.pieces}
        built.model.add_bool_or([lit for p in pieces
                               for lit in differs(built.model, by_id[p], c.where[p], move)])
        return pieces, move

    def _forbid_near(self, built: Built, movable: list, where: dict[str, Placement]) -> None:
        """The next layout must move at least ``DIFFER_PIECES`` pieces away from ``where``.
        Interchangeable pieces (two equal nightstands) count as moved only when they stand on
        none of their class's earlier spots, so swapping them is no new arrangement. Some main
        piece must also stand visibly elsewhere (``groups.main_differs``: another wall, part
        of the room, facing or room), so candidates differ in ways a client sees."""
        if not movable:
            return
        m = built.model
        need = min(DIFFER_PIECES, len(movable))
        classes: dict[PieceSpec, list[str]] = {}
        for pv in movable:
            classes.setdefault(interchangeable(pv.spec), []).append(pv.spec.id)
        flags = []
        for pv in movable:
            d = m.new_bool_var("")
            for other in classes[interchangeable(pv.spec)]:
                m.add_bool_or([*differs(m, pv, where[other], MOVE), d.negated()])
            flags.append(d)
        m.add(sum(flags) >= need)
        visible = main_differs(m, movable, where, self.plan)  # a change a client sees
        if visible:
            m.add_bool_or(visible)




