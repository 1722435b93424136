"""Find furniture arrangements: CP-SAT search, verified by the checker, several alternatives.

``solve(plan, rules, options)`` splits the plan into groups of rooms that share no piece
(rooms whose pieces are all assigned stand alone), builds the placement model of each group
(``roomfit.solve.model``), and runs a verify-and-cut loop: every layout CP-SAT returns is audited
with exact geometry (``roomfit.audit.check.audit``); a layout that fails is cut off (one of the
pieces the failed finding names must move or turn) and the model is solved again. Only
layouts that pass the audit are returned.

Candidates are ranked by the functional-group rules they miss
(``roomfit.audit.quality.group_failures``), then as ``roomfit compare`` ranks plans: by the
route scorer's rank key (``roomfit.audit.routes.score_routes``: unreachable trips, then
walking metres per day), the objective breaking ties.

Outcomes (``SolveResult.status``): ``optimal`` (every candidate is proven optimal for the
soft preferences), ``found`` (candidates found, not all proven optimal), ``impossible`` (no
arrangement exists in the model, with an :class:`Explanation`), ``timeout`` (nothing
checker-passing found in time; not proven impossible).

The search first runs a *strengthened* model (pairwise gap rules and door walkways, see
``roomfit.solve.model``) that avoids most circulation failures; if that model has no valid layout
it falls back to the plain model. "Impossible" is only said of the plain model, never of the
strengthened one nor after a cut.

Reproducible and bounded: each search runs one CP-SAT worker (on our models one worker finds
a first layout sooner than two, interleaved or not) under a deterministic work limit fixed by
the options, so the same seed gives the same candidates whenever that limit or a proof of
optimality ends each run; the wall-clock limit is the safety net on top. ``workers`` groups
of rooms are searched side by side, which is where a second core helps.
"""

from __future__ import annotations

import math
import threading
import time
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, replace
from enum import StrEnum
from typing import TYPE_CHECKING

from ortools.sat.python import cp_model

from roomfit.audit.quality import group_failures
from roomfit.audit.routes import RouteScores, default_routines, score_routes
from roomfit.errors import Problem, RoomfitError
from roomfit.plan.data import Layout, Placement, Plan, Trip
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet
from roomfit.solve.building import BuildingFinding, building_findings, excused, key
from roomfit.solve.cuts import SoundCut, sound_cut
from roomfit.solve.explain import Explanation, Fix, explain, precheck
from roomfit.solve.groups import main_differs
from roomfit.solve.model import build_model, decode, differs, hint, tune
from roomfit.solve.rooms import room_geometry
from roomfit.solve.vars import Built

if TYPE_CHECKING:
    from roomfit.audit.check import Audit

__all__ = [
    "SolveOptions",
    "Candidate",
    "Explanation",
    "SolveStats",
    "SolveResult",
    "STATUSES",
    "Status",
    "solve",
    "MAX_REACH_MM",
    "components",
    "routines_of",
]

class Status(StrEnum):
    """How a solve ended: candidates ``found`` (``optimal`` when every one is proven optimal),
    proven ``impossible`` (with an explanation), or nothing found in time (``timeout``, not a
    proof). A ``StrEnum``: each compares equal to its value."""

    FOUND = "found"
    OPTIMAL = "optimal"
    IMPOSSIBLE = "impossible"
    TIMEOUT = "timeout"


STATUSES = tuple(Status)

#: A later candidate must differ from every earlier one in at least this many pieces
#: (fewer when the group has fewer movable pieces): another room, another turn (a
#: 180-degree turn of a symmetric piece does not count), or a move of at least
#: ``_MOVE`` mm along x or y.
_DIFFER_PIECES = 2
_MOVE = 300

#: CP-SAT deterministic time units granted per second of the time limit. Measured on this
#: 2-core machine: one worker does some 0.2 units per second on a 10-piece living room and
#: bedroom, so a run may use about half its wall-clock share for improving (0.04 ended runs
#: after a fifth and left candidates at large gaps) while the deterministic limit still ends
#: most runs first, so they repeat exactly.
_WORK_PER_SECOND = 0.12

#: Share of the time limit for finding one layout per group before more are searched.
_FIRST_PHASE_SHARE = 0.6

#: Share of the time left that each stage before the last (quick cuts) gets to find a group's
#: first layout before the next stage takes over; the relaxed model with sound cuts gets the
#: rest (at least 0.7 ** 5 = 17 % of the time, more when stages end by running out of layouts).
_STAGE_SHARE = 0.3

#: Improving solutions of one CP-SAT run audited at most (best first).
_AUDITS_PER_SOLVE = 4

#: A run whose first layouts all fail the audit stops after this many, so that they are cut
#: off at once rather than at the end of the run.
_FAILS_BEFORE_CUT = 2


@dataclass(frozen=True)
class SolveOptions:
    """How to search: number of candidates, wall-clock limit (s) over all rounds, seed,
    ``workers`` (groups of rooms searched side by side, one CP-SAT worker each), and the grid
    (mm) for angled walls, door arcs and the turning space. ``strict``: a bare apartment that
    fails a rule is impossible to furnish (no furnishing around building findings)."""

    candidates: int = 3
    time_limit: float = 20.0
    seed: int = 0
    workers: int = 2
    grid: int = 50
    strict: bool = False


@dataclass(frozen=True)
class Candidate:
    """One verified arrangement: ``objective`` (lower is better), the proven ``bound``,
    whether it is proven ``optimal`` (under the diversity rules of earlier candidates), its
    ``rank`` (0 = best by ``route_key``, then objective) and ``route_key``, the route scorer's
    rank key (unreachable trips, walking metres per day; ``roomfit.audit.routes``).

    ``audit`` (``roomfit.audit.check.Audit``, route widths measured) and ``routes``
    (``roomfit.audit.routes.RouteScores``) are the results for the whole furnished plan,
    computed once here: shells read them instead of judging the arrangement again."""

    layout: Layout
    objective: float
    bound: float
    optimal: bool
    rank: int
    route_key: tuple[int, float] | None = None
    audit: Audit | None = None
    routes: RouteScores | None = None

    @property
    def gap(self) -> float:
        """Relative gap between objective and bound (0 when proven optimal)."""
        if self.optimal or self.objective == 0:
            return 0.0
        return abs(self.objective - self.bound) / abs(self.objective)


@dataclass(frozen=True)
class SolveStats:
    """What the search did: wall-clock seconds in all, seconds until every room group had a
    checker-passing layout (a valid arrangement of the whole flat), CP-SAT solves, audits run,
    audits failed (each added a cut), whether the plain model was needed, and the number of
    independent room groups."""

    elapsed: float = 0.0
    time_to_first: float | None = None
    solves: int = 0
    audits: int = 0
    cuts: int = 0
    fallback: bool = False
    groups: int = 0


@dataclass(frozen=True)
class SolveResult:
    """The outcome: a :class:`Status`, the candidates (best first), the explanation when
    impossible, what the search did, ``notes`` saying why fewer candidates came back than
    were asked (or why none), and the ``building`` findings the candidates were furnished
    around (the bare apartment fails them; such a result is not a compliant flat)."""

    status: Status | str
    candidates: tuple[Candidate, ...]
    explanation: Explanation | None
    stats: SolveStats
    notes: tuple[str, ...] = ()
    building: tuple[BuildingFinding, ...] = ()

    @property
    def compliant(self) -> bool:
        """False when the candidates were furnished around building findings."""
        return not self.building

    @property
    def found(self) -> bool:
        return bool(self.candidates)


def components(plan: Plan, specs: tuple[PieceSpec, ...]) -> list[tuple[list[str], list[PieceSpec]]]:
    """Groups of rooms that share no piece, each with its pieces, in plan order.

    Rooms without furniture are left out (nothing to place there).
    """
    parent: dict[str, str] = {r.id: r.id for r in plan.rooms}

    def find(a: str) -> str:
        while parent[a] != a:
            parent[a] = parent[parent[a]]
            a = parent[a]
        return a

    for s in specs:
        rooms = _rooms_of(plan, s)
        for r in rooms[1:]:
            parent[find(r)] = find(rooms[0])
    out: dict[str, tuple[list[str], list[PieceSpec]]] = {}
    for s in specs:
        root = find(_rooms_of(plan, s)[0])
        out.setdefault(root, ([], []))[1].append(s)
    for room in plan.rooms:
        root = find(room.id)
        if root in out:
            out[root][0].append(room.id)
    return list(out.values())


def _rooms_of(plan: Plan, spec: PieceSpec) -> tuple[str, ...]:
    p = plan.piece(spec.id)
    if p.locked and p.placement is not None:
        return (p.placement.room,)
    return spec.rooms


@dataclass
class _Found:
    placements: dict[str, Placement]
    objective: float
    bound: float
    optimal: bool


class _Counters:
    """What the search did, counted from several threads at once."""

    def __init__(self) -> None:
        self._lock = threading.Lock()
        self.values: dict[str, float] = {"solves": 0, "audits": 0, "cuts": 0, "fallback": 0}

    def add(self, key: str, n: float = 1) -> None:
        with self._lock:
            self.values[key] += n

    def __getitem__(self, key: str) -> float:
        return self.values[key]


class _Clock:
    """Wall clock of one solve. ``left()`` is the time left for searching: the limit less a
    reserve for auditing the combined candidates at the end (``reserve`` seconds)."""

    def __init__(self, limit: float, reserve: float = 0.0) -> None:
        self.start = time.monotonic()
        self.deadline = self.start + limit
        self.reserve = reserve

    def left(self) -> float:
        return max(0.0, self.deadline - self.reserve - time.monotonic())

    def elapsed(self) -> float:
        return time.monotonic() - self.start


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


def _audit(plan: Plan, rules: RuleSet, widths: bool = False,
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

    def __init__(self, search: _Search, built: Built) -> None:
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


class _Search:
    """The verify-and-cut loop for one group of rooms."""

    def __init__(self, plan: Plan, rules: RuleSet, rooms: list[str], specs: list[PieceSpec],
                 options: SolveOptions, clock: _Clock, progress: Callable[[str], None] | None,
                 counters: _Counters, building: tuple[BuildingFinding, ...] = ()) -> None:
        self.plan, self.rules, self.rooms, self.specs = plan, rules, rooms, specs
        self.options, self.clock, self.progress, self.counters = options, clock, progress, counters
        self.ids = {s.id for s in specs}
        self.geo = {r: room_geometry(plan, rules, plan.room(r), options.grid) for r in rooms}
        self.found: list[_Found] = []
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
        # a layout taken at once (quick) and not yet improved: the next run starts from it
        self.provisional: _Found | None = None

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
        if self.built is not None and self.provisional is not None:
            self._improve(wanted, budget_end)
        last = len(self.stages) - 1
        while len(self.found) < wanted and not self.exhausted:
            if self.built is None:
                self._start(0)
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

    def _improve(self, wanted: int, budget_end: float) -> None:
        """Search again from the layout taken at once in the first phase, with its fair share
        of the time (one of ``wanted``); the best checker-passing layout replaces it. If the
        run finds none or only worse ones, the first layout stays."""
        prov, built = self.provisional, self.built
        assert prov is not None and built is not None
        self.provisional = None
        self.found.remove(prov)
        before = len(self.found)
        hint(built, prov.placements)
        self._loop(before + 1, budget_end, budget_end, share_of=max(1, wanted - before))
        built.model.clear_hints()
        if len(self.found) > before and self.found[-1].objective <= prov.objective:
            return
        del self.found[before:]
        self.found.append(prov)
        self._forbid_near(built, [pv for pv in built.pieces if not pv.locked], prov.placements)

    def _start(self, stage: int) -> None:
        """Build the model of ``stage`` (:meth:`_stages`) with the diversity rules of the
        layouts found so far and the cuts of every failed layout, as this stage takes them."""
        if stage > 0:
            self.counters.add("fallback")
        self.stage = stage
        strengthen, relaxed, _ = self.stages[stage]
        self.built = build_model(self.plan, self.rules, self.specs, self.rooms, self.options.grid,
                                 strengthen=strengthen, relaxed=relaxed, geo=self.geo,
                                 routines=routines_of(self.plan), no_turning=frozenset(
                                     b.finding.room for b in self.building
                                     if b.finding.rule == "turning.space" and b.finding.room))
        movable = [pv for pv in self.built.pieces if not pv.locked]
        for f in self.found:
            self._forbid_near(self.built, movable, f.placements)
        for c in self.sound:
            self._add_cut(self.built, c)

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
            accepted = None
            # best first; the last (best) solution may be proven optimal
            for k, (obj, where) in enumerate(list(reversed(seen.solutions))[:_AUDITS_PER_SOLVE]):
                result = seen.verdicts.get(id(where)) or self._judge(where)
                if result.passed:
                    accepted = _Found(where, obj, bound, optimal and k == 0)
                    break
                self._cut(built, movable, where, result)
            if accepted is None:  # a layout the callback saw pass, before the best ones
                accepted = next((_Found(w, o, bound, False) for o, w in reversed(seen.solutions)
                                 if (v := seen.verdicts.get(id(w))) is not None and v.passed),
                                None)
            if accepted is None:
                continue
            self.found.append(accepted)
            self.valid_at(self.clock.elapsed())
            self._say(f"rooms {', '.join(self.rooms)}: candidate {len(self.found)} "
                      f"(objective {accepted.objective:g}{', optimal' if accepted.optimal else ''})")
            if self.quick and not accepted.optimal:
                self.provisional = accepted  # improved before the diversity rule is added
            else:
                self._forbid_near(built, movable, accepted.placements)
        return "done"

    def _judge(self, where: dict[str, Placement], keep: set[str] | None = None):
        """The cheap audit (``widths=False``) of this group's pieces placed as ``where`` says
        (with ``keep``: only those movable pieces, and the locked ones)."""
        self.counters.add("audits")
        ids = self.ids if keep is None else {i for i in self.ids if i in keep or i in self.locked}
        return _audit(_only(self.plan, ids, where), self.rules, building=self.building)

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
        """The next layout must move at least ``_DIFFER_PIECES`` pieces away from ``where``.
        Interchangeable pieces (two equal nightstands) count as moved only when they stand on
        none of their class's earlier spots, so swapping them is no new arrangement. Some main
        piece must also stand visibly elsewhere (``groups.main_differs``: another wall, part
        of the room, facing or room), so candidates differ in ways a client sees."""
        if not movable:
            return
        m = built.model
        need = min(_DIFFER_PIECES, len(movable))
        classes: dict[PieceSpec, list[str]] = {}
        for pv in movable:
            classes.setdefault(_interchangeable(pv.spec), []).append(pv.spec.id)
        flags = []
        for pv in movable:
            d = m.new_bool_var("")
            for other in classes[_interchangeable(pv.spec)]:
                m.add_bool_or([*differs(m, pv, where[other], _MOVE), d.negated()])
            flags.append(d)
        m.add(sum(flags) >= need)
        visible = main_differs(m, movable, where, self.plan)  # a change a client sees
        if visible:
            m.add_bool_or(visible)


def _interchangeable(spec: PieceSpec) -> PieceSpec:
    """``spec`` without its name: pieces with equal results are interchangeable."""
    return replace(spec, id="", label="")


def solve(plan: Plan, rules: RuleSet, options: SolveOptions | None = None,
          progress: Callable[[str], None] | None = None, *, confirm: bool = True) -> SolveResult:
    """Find up to ``options.candidates`` checker-passing arrangements of ``plan``'s furniture.

    ``progress``, when given, receives one line per event (candidate found, cut added).
    With ``confirm``, every fix an explanation proposes is solved (``_confirmed``) before it
    is shown; the solves that confirm fixes run with ``confirm=False``.
    """
    options = options or SolveOptions()
    _within_reach(plan)
    # the final audits of the combined candidates take some 0.2 s each on the samples
    clock = _Clock(options.time_limit, min(0.15 * options.time_limit, 0.25 * options.candidates))
    specs = resolve_pieces(plan, rules)
    counters = _Counters()
    # small groups first: they finish early and leave their unused time to the larger ones
    groups = sorted(components(plan, specs), key=lambda g: len(g[1]))

    searches: list[_Search] = []

    def stats() -> SolveStats:
        # the whole flat has a valid arrangement once every group has one
        firsts = [s.first for s in searches]
        first = max(firsts) if searches and None not in firsts else None  # type: ignore[type-var]
        return SolveStats(clock.elapsed(), first, int(counters["solves"]),
                          int(counters["audits"]), int(counters["cuts"]), bool(counters["fallback"]),
                          len(groups))

    early = precheck(plan, rules, specs)
    if early is not None:
        early = _confirmed(plan, rules, options, early, clock) if confirm else early
        return SolveResult(Status.IMPOSSIBLE, (), early, stats())
    counters.add("audits")
    kept = tuple(p for p in plan.furniture if p.locked and p.placement is not None)
    bare = _audit(replace(plan, furniture=kept), rules)
    building: tuple[BuildingFinding, ...] = ()
    if not bare.passed:
        around = None if options.strict else building_findings(plan, rules, bare)
        if around is None:
            expl = _bare_faults(plan, rules, bare)
            expl = _confirmed(plan, rules, options, expl, clock) if confirm else expl
            return SolveResult(Status.IMPOSSIBLE, (), expl, stats())
        building = around
        if progress is not None:
            progress(f"furnishing around {len(building)} building finding(s): "
                     + "; ".join(b.finding.message for b in building))

    if not groups and building:  # nothing to furnish around the findings: say what fails
        return SolveResult(Status.IMPOSSIBLE, (), _bare_faults(plan, rules, bare), stats(),
                           building=building)
    if not groups:  # nothing to place: the bare apartment (with its locked pieces) passed
        return SolveResult(Status.OPTIMAL, (Candidate(plan.layout, 0.0, 0.0, True, 0, None, bare),),
                           None, stats())
    lanes = max(1, options.workers)
    searches += [_Search(plan, rules, rooms, group_specs, options, clock, progress, counters,
                         building) for rooms, group_specs in groups]
    for s in searches:
        s.work_share = min(1.0, lanes / len(groups))

    def phase(wanted: int, portion: float) -> None:
        """Every group searches up to ``wanted`` layouts, ``lanes`` groups at a time, each
        with a fair share of ``portion`` of the time left among the groups still waiting."""
        lock = threading.Lock()
        done = [0]
        pool_end = time.monotonic() + portion * clock.left()

        def run(s: _Search) -> None:
            with lock:
                waiting = len(searches) - done[0]
            left = max(0.0, pool_end - time.monotonic())
            s.run(wanted, time.monotonic() + min(1.0, lanes / waiting) * left)
            with lock:
                done[0] += 1

        # groups share no piece and no room: they are searched side by side, one CP-SAT
        # worker each (one worker also keeps each search deterministic)
        with ThreadPoolExecutor(max_workers=lanes) as pool:
            list(pool.map(run, searches))

    # first one layout for every group (a valid arrangement of the whole flat), then more
    more = options.candidates > 1
    for s in searches:  # more groups than lanes: take the first valid layout and move on
        s.quick = more and len(searches) > lanes
    phase(1, _FIRST_PHASE_SHARE if more else 1.0)
    if not all(s.found or s.exhausted for s in searches):
        phase(1, 1.0)  # a group without a layout yet keeps searching until the time is up
    if more and all(s.found for s in searches):
        for s in searches:
            s.quick = False
        phase(options.candidates, 1.0)
    for s, (rooms, group_specs) in zip(searches, groups, strict=True):
        if s.impossible:
            expl = (_exhausted(plan, s) if s.sound else
                    explain(plan, rules, group_specs, rooms, options, clock.deadline))
            expl = _confirmed(plan, rules, options, expl, clock) if confirm else expl
            return SolveResult(Status.IMPOSSIBLE, (), expl, stats(), building=building)
    if not all(s.found for s in searches):
        return SolveResult(Status.TIMEOUT, (), None, stats(), _held_up(plan, searches), building)
    candidates = _combine(plan, rules, searches, options.candidates, counters, building)
    if not candidates:
        return SolveResult(Status.TIMEOUT, (), None, stats(),
                           ("every combined arrangement failed the audit of the whole flat",),
                           building)
    # "optimal" when every candidate is proven optimal (under the diversity rules)
    status = Status.OPTIMAL if all(c.optimal for c in candidates) else Status.FOUND
    return SolveResult(status, tuple(candidates), None, stats(),
                       _fewer(plan, searches, options.candidates, len(candidates)), building)


#: The solver places furniture only within this many mm of the plan's origin (1 km): the
#: model's distance terms are bounded so, and a larger flat is a plan in the wrong unit.
MAX_REACH_MM = 1_000_000


def _within_reach(plan: Plan) -> None:
    """Refuse, before any model is built, a plan whose rooms reach beyond ``MAX_REACH_MM``
    (time and memory of building a model grow with the rooms' size)."""
    for room in plan.rooms:
        far = max(max(abs(x), abs(y)) for x, y in room.outline)
        if far > MAX_REACH_MM:
            raise RoomfitError(Problem(
                f"rooms.{room.id}.outline", f"the room reaches {far / 1000:.4g} m from the "
                f"plan's origin; the solver furnishes rooms within {MAX_REACH_MM // 1000} m of it",
                "check the plan's unit (a length in mm read as m is 1000 times too long)"),
                plan.name)


def _held_up(plan: Plan, searches: list[_Search]) -> tuple[str, ...]:
    """What held up each group of rooms that found no layout in time: its rooms and pieces,
    the rules its failed layouts broke and the pieces named most often next to a failure,
    and the pieces allowed in several rooms (they join rooms into one larger search)."""
    out = []
    for s in searches:
        if s.found:
            continue
        rooms = ", ".join(plan.room(r).label for r in s.rooms)
        named: dict[str, int] = {}
        for c in s.sound:
            for p in c.named:
                named[p] = named.get(p, 0) + 1
        top = sorted(named, key=lambda p: -named[p])[:3]
        line = (f"The search in the {rooms} ({len(s.specs)} pieces) found no layout that passes "
                f"in time")
        if s.sound:
            line += (f": {len(s.sound)} layouts failed the audit ({', '.join(sorted(s.failed_rules))}), "
                     f"most often next to {', '.join(top)}")
        multi = [f"{sp.label or sp.id} ({' or '.join(plan.room(r).label for r in sp.rooms)})"
                 for sp in s.specs if len(sp.rooms) > 1 and sp.id not in s.locked]
        if multi:
            line += f"; allowed in several rooms, these join the rooms into one search: {', '.join(multi)}"
        out.append(line + ".")
    return tuple(out)


def _fewer(plan: Plan, searches: list[_Search], wanted: int, got: int) -> tuple[str, ...]:
    """Why fewer than ``wanted`` candidates came back (empty when all did)."""
    if got >= wanted:
        return ()
    out = [f"{got} of the {wanted} arrangements asked for:"]
    for s in searches:
        if len(s.found) >= wanted:
            continue
        rooms = ", ".join(plan.room(r).label for r in s.rooms)
        if s.exhausted:
            need = min(_DIFFER_PIECES, len([p for p in s.specs if p.id not in s.locked]))
            out.append(f"the {rooms} {'has' if len(s.rooms) == 1 else 'have'} no further "
                       f"arrangement that passes every rule and differs from the earlier ones in "
                       f"at least {need} piece{'s' if need != 1 else ''} (moved {_MOVE} mm or "
                       f"more, turned, or in another room): proven, the search ran out of layouts")
        else:
            out.append(f"the time limit ended the search for more in the {rooms} "
                       f"({len(s.found)} found there)")
    return tuple(out)


def _combine(plan: Plan, rules: RuleSet, searches: list[_Search], wanted: int,
             counters: _Counters, building: tuple[BuildingFinding, ...]) -> list[Candidate]:
    """Candidate i takes the i-th layout of every group (the last one where a group has fewer);
    every combined layout is audited once more on the whole plan (and must pass every rule
    but the ``building`` findings)."""
    out: list[Candidate] = []
    most = max(len(s.found) for s in searches)
    for i in range(min(wanted, most)):
        picks = [s.found[min(i, len(s.found) - 1)] for s in searches]
        where: dict[str, Placement] = {}
        for f in picks:
            where.update(f.placements)
        layout = tuple((p.id, at) for p in plan.furniture
                       if (at := where.get(p.id, p.placement)) is not None)
        counters.add("audits")
        furnished = plan.with_layout(layout)
        verdict = _audit(furnished, rules, widths=True)
        if not (verdict.passed or excused(verdict, building)):
            continue
        routes = score_routes(furnished, rules)
        out.append(Candidate(layout, sum(f.objective for f in picks), sum(f.bound for f in picks),
                             all(f.optimal for f in picks), len(out), routes.rank_key, verdict,
                             routes))
    # fewer unmet functional-group rules first (a layout a designer would sign), then ranked
    # as `roomfit compare` ranks plans: fewer unreachable trips, then fewer walking metres
    # per day; the objective breaks ties
    out.sort(key=lambda c: (group_failures(plan.with_layout(c.layout), rules), c.route_key,
                            c.objective))
    return [replace(c, rank=i) for i, c in enumerate(out)]



def _exhausted(plan: Plan, s: _Search) -> Explanation:
    """Why nothing fits when every layout of the relaxed model failed the audit."""
    rooms = ", ".join(plan.room(r).label for r in s.rooms)
    pieces = tuple(dict.fromkeys(p for c in s.sound for p in c.cut.pieces))
    rules = tuple(sorted(s.failed_rules))
    return Explanation(
        f"Every arrangement of the {rooms} that keeps the pieces apart and their clear floor "
        f"free was tried against the rules and fails ({len(s.sound)} checked, each cut off with "
        f"the layouts that fail for the same reason): {', '.join(rules)}. (Positions in whole "
        f"millimetres; angled walls covered on a {s.options.grid} mm grid.)",
        pieces, rules, ())


#: Fixes an explanation proposes that are solved at most, and seconds each solve may take.
_TRIALS = 4
_TRIAL_SECONDS = 5.0


def _confirmed(plan: Plan, rules: RuleSet, options: SolveOptions, expl: Explanation,
               clock: _Clock) -> Explanation:
    """``expl`` with only the fixes an actual solve confirms (an arrangement that passes the
    audit), each solved with the change made to the plan: the piece left out, or given the
    smaller catalogue type; up to ``_TRIALS`` solves, within the time limit (a fix there was
    no time left to confirm is not shown; the advice says how many)."""
    out: list[str] = []
    untried = 0
    for fix in expl.trials[:_TRIALS]:
        left = clock.deadline - time.monotonic()
        if left < 0.5:  # the time limit holds: a fix not confirmed in time is not shown
            untried += 1
            continue
        if fix.unlock:
            furniture = tuple(replace(p, locked=False) if p.id == fix.piece else p
                              for p in plan.furniture)
        elif fix.swap is None:
            furniture = tuple(p for p in plan.furniture if p.id != fix.piece)
        else:
            furniture = tuple(replace(p, type=fix.swap, width=None, depth=None, height=None)
                              if p.id == fix.piece else p for p in plan.furniture)
        trial = replace(plan, furniture=furniture,
                        routines=tuple(t for t in plan.routines if fix.swap is not None or fix.unlock
                                       or fix.piece not in (t.origin, t.target)))
        seconds = min(_TRIAL_SECONDS, options.time_limit, left)
        got = solve(trial, rules, replace(options, candidates=1, time_limit=seconds), confirm=False)
        if got.candidates and got.compliant:
            out.append(f"{fix.text} (solved: an arrangement then passes every rule)")
    advice = expl.advice + ((f"{untried} possible fix{'es' if untried > 1 else ''} not shown: no "
                             "time left to confirm by a solve (allow more time)",) if untried else ())
    return replace(expl, fixes=tuple(out), trials=(), advice=advice)


def _bare_faults(plan: Plan, rules: RuleSet, result: Audit) -> Explanation:
    """The apartment without its movable furniture already fails the audit ``result``: no
    arrangement can pass, so say so (locked pieces stay, they cannot be moved)."""
    kept = tuple(p for p in plan.furniture if p.locked and p.placement is not None)
    fails = result.failures
    ids = tuple(dict.fromkeys(i for f in fails for i in f.pieces))
    rule_ids = tuple(dict.fromkeys(f.rule for f in fails))
    listed = "; ".join(f.message for f in fails[:5]) + ("; ..." if len(fails) > 5 else "")
    locked = [p.id for p in kept if p.id in ids]  # a locked piece in the clash can be freed
    where = (f" (with the locked {', '.join(locked)} where the plan puts "
             f"{'it' if len(locked) == 1 else 'them'})" if locked else "")
    return Explanation(
        f"The apartment does not pass the {rules.label} rules even before the furniture is "
        f"placed{where}, so no arrangement can: {listed}.",
        ids, rule_ids, (), tuple(Fix(f"unlock or move {p}", p, unlock=True) for p in locked),
        ("change the plan (doors, fittings) or choose the rule set that governs this home",))
