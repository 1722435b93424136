"""Find furniture arrangements: CP-SAT search, verified by the checker, several alternatives.

``solve(plan, rules, options)`` splits the plan into groups of rooms that share no piece
(rooms whose pieces are all assigned stand alone) and runs a verify-and-cut loop per group:
every layout CP-SAT returns is audited with exact geometry (``roomfit.audit.check.audit``);
a layout that fails is cut off and the model solved again. Only layouts that pass the audit
are returned.

Candidates are ranked by the functional-group rules they miss, by weight
(``roomfit.audit.quality.group_cost``), then as ``roomfit compare`` ranks plans: by the
route scorer's rank key (``roomfit.audit.routes.score_routes``: unreachable trips, then
walking metres per day), the objective breaking ties.

Outcomes (``SolveResult.status``): ``optimal`` (every candidate is proven optimal for the
soft preferences), ``found`` (candidates found, not all proven optimal), ``impossible`` (no
arrangement exists in the model, with an :class:`Explanation`), ``timeout`` (nothing
checker-passing found in time; not proven impossible).

Each group searches in stages that end in a complete one (``roomfit.solve.group``): the
first layout of every group, then the alternatives, each taken at once, then the lower
bounds (``roomfit.solve.bound``) and the layouts improved with the time left.

Reproducible and bounded: each search runs one CP-SAT worker (on our models one worker finds
a first layout sooner than two, interleaved or not) under a deterministic work limit fixed by
the options, so the same seed gives the same candidates whenever that limit or a proof of
optimality ends each run; the wall-clock limit is the safety net on top. ``workers`` groups
of rooms are searched side by side, which is where a second core helps.
"""

from __future__ import annotations

import threading
import time
from collections.abc import Callable
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass, replace
from enum import StrEnum
from typing import TYPE_CHECKING

from roomfit.audit.quality import group_cost
from roomfit.audit.routes import RouteScores, score_routes
from roomfit.errors import Problem, RoomfitError
from roomfit.plan.data import Layout, Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet
from roomfit.solve.building import BuildingFinding, building_findings, excused
from roomfit.solve.explain import Explanation, Fix, explain, precheck
from roomfit.solve.group import (
    GroupSearch,
    judge,
    routines_of,
)
from roomfit.solve.notes import fewer, held_up, several_rooms
from roomfit.solve.possible import Possibility, settle_first, share
from roomfit.solve.tally import Clock, Counters

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

#: Share of the time limit for finding one layout per group before more are searched.
_FIRST_PHASE_SHARE = 0.6

#: Share of the time left that the last search phase takes; the rest proves a lower bound of
#: each group's objective with pieces apart (``roomfit.solve.bound``: some 0.2 s of CPU for a
#: 10-piece room), so the gap a candidate reports means something.
_SEARCH_SHARE = 0.9

#: Share of a group's last phase that proving the bound takes when layouts taken at once
#: wait to be improved (all of it otherwise).
_BOUND_SHARE = 0.25



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
    ``rank`` (0 = best by ``route_key``, then objective).

    ``audit`` (``roomfit.audit.check.Audit``, route widths measured) and ``routes``
    (``roomfit.audit.routes.RouteScores``) are the results for the whole furnished plan,
    computed once here: shells read them instead of judging the arrangement again."""

    layout: Layout
    objective: float
    bound: float
    optimal: bool
    rank: int
    audit: Audit
    routes: RouteScores

    @property
    def route_key(self) -> tuple[int, float]:
        """The route scorer's rank key: unreachable trips, walking metres per day."""
        return self.routes.rank_key

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

    status: Status
    candidates: tuple[Candidate, ...]
    explanation: Explanation | None
    stats: SolveStats
    notes: tuple[str, ...] = ()
    building: tuple[BuildingFinding, ...] = ()
    possible: tuple[Possibility, ...] = ()

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


def solve(plan: Plan, rules: RuleSet, options: SolveOptions | None = None,
          progress: Callable[[str], None] | None = None, *, confirm: bool = True) -> SolveResult:
    """Find up to ``options.candidates`` checker-passing arrangements of ``plan``'s furniture.

    ``progress``, when given, receives one line per event (candidate found, cut added).
    With ``confirm``, every fix an explanation proposes is solved (``_confirmed``) before it
    is shown; the solves that confirm fixes run with ``confirm=False``.
    """
    options = options or SolveOptions()
    _within_reach(plan)
    # the final audits (widths measured), route scores and group checks of the combined
    # candidates take some 0.2 s each on the samples, and up to 1.3 s each on a generated
    # three-room flat on a loaded machine (the 20 s solve ended at 21.4 s with 0.25 s each)
    specs = resolve_pieces(plan, rules)
    audit_reserve = min(0.2 * options.time_limit, 0.6 * options.candidates)
    settling = share(options.time_limit, specs) if confirm else 0.0  # roomfit.solve.possible
    clock = Clock(options.time_limit, audit_reserve)
    counters = Counters()
    # small groups first: they finish early and leave their unused time to the larger ones
    groups = sorted(components(plan, specs), key=lambda g: len(g[1]))

    searches: list[GroupSearch] = []

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
    bare = judge(replace(plan, furniture=kept), rules)
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
        return SolveResult(Status.OPTIMAL, (Candidate(plan.layout, 0.0, 0.0, True, 0, bare,
                                                       score_routes(plan, rules)),),
                           None, stats())
    searches += [GroupSearch(plan, rules, rooms, group_specs, options, clock, progress, counters,
                             building) for rooms, group_specs in groups]
    _search(searches, options, clock, _ADVICE_SHARE if confirm else 0.0, settling)
    for s, (rooms, group_specs) in zip(searches, groups, strict=True):
        if s.impossible:
            expl = (s.explain_exhausted() if s.sound else
                    explain(plan, rules, group_specs, rooms, options, clock.deadline))
            expl = _confirmed(plan, rules, options, expl, clock) if confirm else expl
            return SolveResult(Status.IMPOSSIBLE, (), expl, stats(), building=building)
    if not all(s.found for s in searches):
        advice = _advice(plan, rules, options, clock, searches) if confirm else ()
        return SolveResult(Status.TIMEOUT, (), None, stats(), held_up(plan, searches) + advice,
                           building)
    candidates = _combine(plan, rules, searches, options.candidates, counters, building)
    if not candidates:
        return SolveResult(Status.TIMEOUT, (), None, stats(),
                           ("every combined arrangement failed the audit of the whole flat",),
                           building)
    possible = settle_first(plan, rules, groups, candidates, options, clock, settling, building)
    # "optimal" when every candidate is proven optimal (under the diversity rules)
    status = Status.OPTIMAL if all(c.optimal for c in candidates) else Status.FOUND
    return SolveResult(status, tuple(candidates), None, stats(),
                       fewer(plan, searches, options.candidates, len(candidates)), building, possible)


def _search(searches: list[GroupSearch], options: SolveOptions, clock: Clock,
            keep: float, settling: float = 0.0) -> None:
    """The phases of the search over every group: first one layout for every group (a valid
    arrangement of the whole flat), then the alternatives, each taken at once; then the
    lower bounds, and every layout taken at once improved with the time left. A group
    still without a layout after its share searches on, leaving ``keep`` of the time left
    for confirming advice when it holds pieces allowed in several rooms (``_advice``); once
    the flat has a valid arrangement, ``settling`` s are kept for the group-rule check."""
    lanes = max(1, options.workers)
    for s in searches:
        s.work_share = min(1.0, lanes / len(searches))
    more = options.candidates > 1
    for s in searches:
        s.quick = more
    _phase(searches, lanes, clock, 1, _FIRST_PHASE_SHARE if more else _SEARCH_SHARE)
    if not all(s.found or s.exhausted for s in searches):  # a group without a layout
        _phase(searches, lanes, clock, 1, 1.0 - (keep if several_rooms(searches) else 0.0))
    clock.reserve += settling if all(s.found for s in searches) else 0.0  # the group-rule check
    if more and all(s.found for s in searches):
        _phase(searches, lanes, clock, options.candidates, 1.0)
    for s in searches:
        s.quick = False
    if all(s.found for s in searches):
        _phase(searches, lanes, clock, 0, 1.0)


def _phase(searches: list[GroupSearch], lanes: int, clock: Clock, wanted: int,
           portion: float) -> None:
    """Every group searches up to ``wanted`` layouts (proves the lower bound of its
    objective when ``wanted`` is 0), ``lanes`` groups at a time, each with a fair share
    of ``portion`` of the time left among the groups still waiting."""
    lock = threading.Lock()
    done = [0]
    pool_end = time.monotonic() + portion * clock.left()

    def run(s: GroupSearch) -> None:
        with lock:
            waiting = len(searches) - done[0]
        left = max(0.0, pool_end - time.monotonic())
        end = time.monotonic() + min(1.0, lanes / waiting) * left
        if wanted:
            s.run(wanted, end)
        else:  # the bound first (it may prove a layout optimal), then improving
            share = _BOUND_SHARE if s.unimproved else 1.0
            s.prove_bound(time.monotonic() + share * (end - time.monotonic()))
            s.improve(end)
        with lock:
            done[0] += 1

    # groups share no piece and no room: they are searched side by side, one CP-SAT
    # worker each (one worker also keeps each search deterministic)
    with ThreadPoolExecutor(max_workers=lanes) as pool:
        list(pool.map(run, searches))


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


def _combine(plan: Plan, rules: RuleSet, searches: list[GroupSearch], wanted: int,
             counters: Counters, building: tuple[BuildingFinding, ...]) -> list[Candidate]:
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
        verdict = judge(furnished, rules, widths=True)
        if not (verdict.passed or excused(verdict, building)):
            continue
        routes = score_routes(furnished, rules)
        out.append(Candidate(layout, sum(f.objective for f in picks), sum(f.bound for f in picks),
                             all(f.optimal for f in picks), len(out), verdict, routes))
    # fewer unmet functional-group rules first, by weight (a layout a designer would sign), then ranked
    # as `roomfit compare` ranks plans: fewer unreachable trips, then fewer walking metres
    # per day; the objective breaks ties
    out.sort(key=lambda c: (group_cost(plan.with_layout(c.layout), rules), c.route_key,
                            c.objective))
    return [replace(c, rank=i) for i, c in enumerate(out)]



#: Share of the time left that a search without a layout keeps for confirming advice.
_ADVICE_SHARE = 0.25


def _advice(plan: Plan, rules: RuleSet, options: SolveOptions, clock: Clock,
            searches: list[GroupSearch]) -> tuple[str, ...]:
    """Advice on a search the time limit ended, each line confirmed by a solve of the changed
    plan in the time kept for it: a piece allowed in several rooms joins those rooms into
    one larger search, so it is given one of them (up to ``_TRIALS`` solves; one line per
    piece, for the first room that gives an arrangement passing every rule)."""
    trials = [(sp, room) for sp in several_rooms(searches) for room in sp.rooms][:_TRIALS]
    out: list[str] = []
    done: set[str] = set()
    for i, (sp, room) in enumerate(trials):
        left = clock.deadline - time.monotonic()
        if left < 0.5 or sp.id in done:
            continue
        furniture = tuple(replace(p, rooms=(room,)) if p.id == sp.id else p
                          for p in plan.furniture)
        got = solve(replace(plan, furniture=furniture), rules,
                    replace(options, candidates=1, time_limit=left / (len(trials) - i)),
                    confirm=False)
        if got.candidates and got.compliant:
            done.add(sp.id)
            out.append(f"Advice: allow {sp.label or sp.id} in the {plan.room(room).label} only: "
                       f"a solve of that change found an arrangement that passes every rule "
                       f"in {got.stats.elapsed:.1f} s; run again with it.")
    return tuple(out)


#: Fixes an explanation proposes that are solved at most, and seconds each solve may take.
_TRIALS = 4
_TRIAL_SECONDS = 5.0


def _confirmed(plan: Plan, rules: RuleSet, options: SolveOptions, expl: Explanation,
               clock: Clock) -> Explanation:
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
