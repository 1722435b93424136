"""Can the room have a group rule the first candidate misses? A proof, or a second search.

The search weighs the functional-group rules strongly but keeps them soft
(:mod:`roomfit.solve.groups`), so a candidate that misses one may do so because the room
cannot have it or because the search did not reach it. :func:`settle` tells these apart for
every group rule the first candidate misses, within a declared share of the time limit
(:data:`SHARE`):

0. **All at once.** First, in each group of rooms with a miss, one search with every
   group rule the model can state there made hard together (:data:`JOINT` of the time): where the
   room allows them all, this finds the arrangement that has them all, which searches for
   one rule at a time, each trading it for another, may not reach. Then, for each miss
   still open:
1. **Proof.** The relaxed placement model of the rule's rooms (every arrangement the
   clearance audit passes is one of its solutions; ``roomfit.solve.model``) with the rule's
   *necessary* form made hard (:mod:`roomfit.solve.hard_rules`). Infeasible: no arrangement
   that passes the clearance rules meets the rule, "not possible in this room".
2. **Second search.** Otherwise the verify-and-cut search of those rooms runs once more with
   the rule's *sufficient* form made hard, and with it every group rule the arrangement
   already meets there (so the search looks for the arrangement with one more rule met);
   for a rule that makes a group work, then with only the kept rules that do too (a comfort
   rule may be given up for it). An arrangement it finds replaces the rooms' part of the
   candidate when the whole flat still passes the audit and misses less, by weight; one
   that meets the rule only by missing more is reported, not taken. A rearranged candidate
   goes first and the other candidates follow while visibly different
   (:func:`settle_first`).
3. Otherwise the miss is stated plainly: not proven impossible, not reached in the time.

Why the rules stay soft in the main search: a rule proven possible for its rooms on its own
is not proven possible together with the other rules there, nor with the audit's circulation
checks that the model only approximates; made hard in the main search it could turn a
furnishable flat into "impossible" or "not found". Here the hard rules live only in side
searches whose result is taken when the audit passes it, so the main result stands whatever
they find (completeness kept).
"""

from __future__ import annotations

import time
from dataclasses import dataclass, replace
from enum import StrEnum
from typing import TYPE_CHECKING

from ortools.sat.python import cp_model

from roomfit.audit.ideas import spots, visible_changes
from roomfit.audit.quality import GroupCheck, Kind, group_cost, quality
from roomfit.audit.routes import score_routes
from roomfit.plan.data import Layout, Placement, Plan
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.groups import is_comfort
from roomfit.rules.sets import RuleSet
from roomfit.solve.building import BuildingFinding, excused, no_turning
from roomfit.solve.group import GroupSearch, judge, routines_of
from roomfit.solve.hard_rules import FAMILIES, Form, family, require, rule_literal
from roomfit.solve.model import build_model, tune
from roomfit.solve.solution import evaluate
from roomfit.solve.symmetry import interchangeable
from roomfit.solve.tally import Clock, Counters

if TYPE_CHECKING:
    from roomfit.solve.search import Candidate, SolveOptions

__all__ = ["SHARE", "Reach", "Possibility", "settle", "settle_first", "share"]

#: Share of the solve's time limit kept for settling the first candidate's missed group rules
#: (proofs and second searches; unused when it misses none). Measured: on the one-bed
#: sample the search with every group rule hard finds its arrangement in 1.5-1.9 s from
#: the candidate's arrangement (4.9-5.2 s from nothing); on the studio the search with the
#: rules that make its groups work needs 1.7-2.9 s; stages share the time a search is given.
SHARE = 0.4

#: Share of that time for the search with every group rule hard at once (the rest settles
#: the rules it left missed, one by one).
JOINT = 1 / 2


class Reach(StrEnum):
    """What a missed group rule turned out to be."""

    IMPOSSIBLE = "impossible"  # proven: no arrangement passing the clearance rules has it
    MET = "met"  # a second search met it, and its arrangement was taken
    POSSIBLE = "possible"  # an arrangement has it, but misses other group rules: not taken
    OPEN = "open"  # neither proven impossible nor reached in the time


@dataclass(frozen=True)
class Possibility:
    """The verdict on one missed group rule of the first candidate: the audit's ``rules``
    (a family measured on one pair), its ``label``, pieces and room, and ``detail`` in words."""

    rules: tuple[str, ...]
    label: str
    pieces: tuple[str, ...]
    room: str
    reach: Reach
    detail: str

    @property
    def text(self) -> str:
        """One line for a summary: ``"not possible in this room: sofa to tv (...)"``."""
        lead = {Reach.IMPOSSIBLE: "not possible in this room",
                Reach.MET: "met by a second search",
                Reach.POSSIBLE: "possible in this room, but not taken",
                Reach.OPEN: "not reached by the search (not proven impossible)"}[self.reach]
        return f"{lead}: {self.label} ({self.detail})"


def share(time_limit: float, specs: tuple[PieceSpec, ...] | list[PieceSpec]) -> float:
    """Seconds of a solve's ``time_limit`` kept for the check (:data:`SHARE`), once the flat
    has a valid arrangement (never from the first one); 0 when no piece of ``specs`` takes
    part in a functional group."""
    return SHARE * time_limit if any(s.groups for s in specs) else 0.0


def settle_first(plan: Plan, rules: RuleSet, groups: list[tuple[list[str], list[PieceSpec]]],
                 candidates: list[Candidate], options: SolveOptions, clock: Clock,
                 settling: float, building: tuple[BuildingFinding, ...] = ()
                 ) -> tuple[Possibility, ...]:
    """:func:`settle` on the first of ``candidates`` with the time left but one candidate's
    share of the clock's audit reserve (the reserve less the ``settling`` s the search kept
    for it; more when the search ended early; no check when ``settling`` is 0). A rearranged
    first candidate, judged and scored again
    (not proven optimal; the objective stays the search's), goes first; the others follow
    in their order while each stays visibly different from those before it (the list keeps
    its length or loses one)."""
    if not settling:
        return ()
    audits = (clock.reserve - settling) / options.candidates
    deadline = clock.deadline - audits  # at least ``settling``; more when the search ended early
    better, out = settle(plan, rules, groups, candidates[0].layout, options, deadline, building)
    if better is not None:
        done = plan.with_layout(better)
        first = replace(candidates[0], layout=better, optimal=False,
                        objective=_objective(plan, rules, groups, better, options.grid, building),
                        audit=judge(done, rules, widths=True), routes=score_routes(done, rules))
        kept = [first]
        for c in candidates:
            seen = spots(plan.with_layout(c.layout), rules)
            if all(visible_changes(spots(plan.with_layout(k.layout), rules), seen) for k in kept):
                kept.append(c)
        candidates[:] = [replace(c, rank=i) for i, c in enumerate(kept[:len(candidates)])]
    return out


def _misses(plan: Plan, rules: RuleSet) -> list[GroupCheck]:
    """The missed group rules, one per rule family and subject piece."""
    seen: set[tuple[str, str]] = set()
    out = []
    for c in quality(plan, rules):
        key = (family(c.rule) or c.rule, c.pieces[0] if c.pieces else "")
        if c.kind == Kind.GROUP and not c.ok and key not in seen:
            seen.add(key)
            out.append(c)
    return out


def _twins(plan: Plan, rules: RuleSet, piece: str) -> set[str]:
    """``piece`` and the movable pieces interchangeable with it (equal nightstands): which of
    them meets a rule is no matter."""
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    if piece not in specs or plan.piece(piece).locked:
        return {piece}
    me = interchangeable(specs[piece])
    return {pid for pid, s in specs.items() if not plan.piece(pid).locked
            and interchangeable(s) == me}


def _fails(plan: Plan, rules: RuleSet, miss: GroupCheck) -> int:
    """How many checks of ``miss``'s rule family ``plan`` fails for its subject piece and the
    pieces interchangeable with it."""
    fam = FAMILIES.get(family(miss.rule) or "", (miss.rule,))
    ids = _twins(plan, rules, miss.pieces[0]) if miss.pieces else set()
    return sum(not c.ok for c in quality(plan, rules)
               if c.rule in fam and c.pieces[:1] and c.pieces[0] in ids)




def _kept(plan: Plan, rules: RuleSet, group: tuple[list[str], list[PieceSpec]],
          missed: bool = False) -> list[tuple[str, str]]:
    """The group rules ``plan`` meets in ``group``'s pieces that the model can state, as
    (rule, subject): a second search keeps them. With ``missed``, the ones it misses too
    (every group rule the model can state there)."""
    ids = {s.id for s in group[1]}
    out: dict[tuple[str, str], tuple[str, str]] = {}
    for c in quality(plan, rules):
        fam = family(c.rule)
        if c.kind == Kind.GROUP and fam and c.pieces and c.pieces[0] in ids:
            key = (fam, c.pieces[0])
            if not c.ok and not missed:
                out[key] = ("", "")
            out.setdefault(key, (c.rule, c.pieces[0]))
    return [v for v in out.values() if v[0]]


def _group_of(groups: list[tuple[list[str], list[PieceSpec]]],
              piece: str) -> tuple[list[str], list[PieceSpec]] | None:
    return next((g for g in groups if any(s.id == piece for s in g[1])), None)


def _proof(plan: Plan, rules: RuleSet, group: tuple[list[str], list[PieceSpec]], miss: GroupCheck,
           grid: int, seconds: float, no_turning: frozenset[str]) -> bool:
    """True when the relaxed model of ``group`` with the necessary form of ``miss`` is proven
    infeasible within ``seconds`` (one worker, no objective) and the proof is sound."""
    rooms, specs = group
    built = build_model(plan, rules, specs, rooms, grid, strengthen=False, relaxed=True,
                        objective=False, no_turning=no_turning)
    got = rule_literal(built.model, built.pieces, built.rooms, miss.rule, miss.pieces[0],
                       Form.NECESSARY)
    if got is None or not got[1]:
        return False
    built.model.add(got[0] == 1)
    solver = cp_model.CpSolver()
    solver.parameters.num_workers = 1
    solver.parameters.max_time_in_seconds = max(0.05, seconds)
    tune(solver.parameters)
    return solver.solve(built.model) == cp_model.INFEASIBLE


class _HardSearch(GroupSearch):
    """The search of one group of rooms with some group rules made hard (sufficient form)."""

    hard: tuple[tuple[str, str], ...] = ()

    def _start(self, stage: int, again: bool = False) -> None:
        super()._start(stage, again)
        built = self.built
        assert built is not None
        require(built.model, built.pieces, built.rooms, self.hard, Form.SUFFICIENT)


def _objective(plan: Plan, rules: RuleSet, groups: list[tuple[list[str], list[PieceSpec]]],
               layout: Layout, grid: int, building: tuple[BuildingFinding, ...]) -> float:
    """The search's objective of ``layout``: each group of rooms scored in its placement model
    (without the strengthening, of which a rearranged layout need not be a solution)."""
    where = dict(layout)
    total = 0.0
    for rooms, specs in groups:
        built = build_model(plan, rules, specs, rooms, grid, strengthen=False,
                            routines=routines_of(plan), no_turning=no_turning(building))
        total += evaluate(built, {s.id: where[s.id] for s in specs}) or 0.0
    return total


def settle(plan: Plan, rules: RuleSet, groups: list[tuple[list[str], list[PieceSpec]]],
           layout: Layout, options, deadline: float,
           building: tuple[BuildingFinding, ...] = ()) -> tuple[Layout | None, tuple[Possibility, ...]]:
    """Settle every group rule the arrangement ``layout`` misses (see the module text), by
    ``deadline`` (``time.monotonic()``). ``groups`` are the solve's groups of rooms (rooms
    and pieces), ``options`` the solve's options (grid, seed).

    Returns the improved layout (None when none was taken) and one verdict per missed rule
    family of the arrangement the check began with."""
    rooms_bare = no_turning(building)
    current = plan.with_layout(layout)
    misses = _misses(current, rules)
    joint, tried = _all_at_once(plan, rules, groups, current, misses, options, deadline,
                                building)
    current, taken = joint or current, joint is not None
    won = ("every group rule of its rooms made hard at once; the candidate was rearranged"
           if taken else "met once another rule was won")
    out: list[Possibility] = []
    for k, miss in enumerate(misses):
        fam = family(miss.rule)
        rules_of = FAMILIES.get(fam or "", (miss.rule,))

        def verdict(reach: Reach, detail: str, m: GroupCheck = miss,
                    r: tuple[str, ...] = rules_of) -> None:
            out.append(Possibility(r, m.label, m.pieces, m.room, reach, detail))

        if _fails(current, rules, miss) < _fails(plan.with_layout(layout), rules, miss):
            verdict(Reach.MET, won)
            continue
        if miss.rule == "group.desk_height":
            verdict(Reach.IMPOSSIBLE, f"the desk's own top height, {miss.shown}: another desk "
                    "or a height-adjustable one")
            continue
        group = _group_of(groups, miss.pieces[0]) if miss.pieces else None
        if fam is None or group is None:
            verdict(Reach.OPEN, "the placement model has no form of this rule; measured by the "
                    "audit only")
            continue
        seconds = (deadline - time.monotonic()) / (len(misses) - k)
        if seconds < 0.2:
            verdict(Reach.OPEN, "no time left in the time limit to check")
            continue
        if _proof(plan, rules, group, miss, options.grid, seconds / 2, rooms_bare):
            verdict(Reach.IMPOSSIBLE, "proven: no arrangement that passes the clearance rules "
                    "has it")
            continue
        end = time.monotonic() + max(0.1, deadline - time.monotonic()) / (len(misses) - k)
        reach, detail, better = _second(plan, rules, group, miss, current, options, end,
                                        building, tried)
        verdict(reach, detail)
        if better is not None:
            current, taken = better, True
    return (current.layout if taken else None), tuple(out)


def _second(plan: Plan, rules: RuleSet, group: tuple[list[str], list[PieceSpec]],
            miss: GroupCheck, current: Plan, options, end: float,
            building: tuple[BuildingFinding, ...], tried: frozenset[frozenset[tuple[str, str]]]
            ) -> tuple[Reach, str, Plan | None]:
    """The second search for ``miss`` (until ``end``): first with every group rule
    ``current`` meets in the group kept and apart from the other candidates (its arrangement
    may be taken: returned third); then, for a rule that makes a group work, with only the
    kept rules that do too (a comfort rule such as a bed head clear of a window may be given
    up for it; taken when the candidate then misses less by weight); then, when neither is
    taken, with the rule alone (to say what meeting it costs). Each search starts from the
    current arrangement (a hint); a set of rules the search with every rule hard (``tried``)
    already failed to meet is not searched again. Returns the verdict and its detail."""
    rule = (miss.rule, miss.pieces[0])
    kept = _kept(current, rules, group)
    essential = [k for k in kept if not is_comfort(k[0])]
    ladder = [kept] + ([essential] if len(essential) < len(kept) and not is_comfort(rule[0]) else [])
    ladder = [hard for hard in ladder if _by_family((*hard, rule)) not in tried]
    base = _fails(current, rules, miss)
    start = dict(current.layout)
    for hard in ladder:
        step = time.monotonic() + 2 / 3 * (end - time.monotonic())
        where = _second_search(plan, rules, group, (*hard, rule), options, step,
                               building, start)
        trial = (plan.with_layout(tuple((pid, where.get(pid, at)) for pid, at in current.layout))
                 if where is not None else None)
        if (trial is not None and _fails(trial, rules, miss) < base
                and _takes(rules, trial, current, building)):
            given = "" if len(hard) == len(kept) else ", a comfort rule given up for it"
            return (Reach.MET, f"the rule made hard{given}; the candidate was rearranged to meet "
                    "it", trial)
    where = _second_search(plan, rules, group, (rule,), options, end, building, start)
    if where is None:
        return (Reach.OPEN, "no arrangement that passes the audit and meets it was found in the "
                "time; the placement model alone allows it", None)
    trial = plan.with_layout(tuple((pid, where.get(pid, at)) for pid, at in current.layout))
    if _fails(trial, rules, miss) >= base:
        return Reach.OPEN, "the arrangement found still misses it on the audit's measure", None
    cost = sorted({c.label for c in quality(trial, rules) if c.kind == Kind.GROUP and not c.ok})
    return (Reach.POSSIBLE, "an arrangement that meets it was found, but it misses "
            + ("; ".join(cost) if cost else "nothing more; it repeats another candidate"), None)


def _by_family(hard: tuple[tuple[str, str], ...]) -> frozenset[tuple[str, str]]:
    """A set of (rule, subject) pairs as (rule family, subject): the same rules to a search."""
    return frozenset((family(rule) or rule, subject) for rule, subject in hard)


def _takes(rules: RuleSet, trial: Plan, current: Plan,
           building: tuple[BuildingFinding, ...]) -> bool:
    """True when the arrangement ``trial`` may replace ``current``: it misses less of the
    group rules (by weight), the whole flat passes the audit (but the ``building``
    findings)."""
    if group_cost(trial, rules) >= group_cost(current, rules):
        return False
    verdict = judge(trial, rules, widths=True)
    return verdict.passed or excused(verdict, building)


def _all_at_once(plan: Plan, rules: RuleSet, groups: list[tuple[list[str], list[PieceSpec]]],
                 current: Plan, misses: list[GroupCheck], options, deadline: float,
                 building: tuple[BuildingFinding, ...]
                 ) -> tuple[Plan | None, frozenset[frozenset[tuple[str, str]]]]:
    """One search per group of rooms with a miss, every group rule the model can state there
    made hard at once (sufficient forms, :func:`roomfit.solve.hard_rules.require`), within
    :data:`JOINT` of the time to ``deadline``: where the room allows every rule together, this finds the
    arrangement that has them all, which single-rule searches trading one rule for another
    may not. It need not stand apart from the other candidates: it goes first and they
    follow it while visibly different (:func:`settle_first`).
    Returns the improved arrangement (taken as :func:`_takes` says) or None, and the sets of
    rules searched without a result."""
    todo = [g for g in groups if any(m.pieces and _group_of(groups, m.pieces[0]) is g
                                     for m in misses)]
    end = time.monotonic() + JOINT * max(0.0, deadline - time.monotonic())
    best, tried = None, set()
    for k, group in enumerate(todo):
        stop = time.monotonic() + max(0.0, end - time.monotonic()) / (len(todo) - k)
        if stop - time.monotonic() < 0.2:
            break
        base = best or current
        hard = tuple(_kept(base, rules, group, missed=True))
        where = _second_search(plan, rules, group, hard, options, stop, building,
                               dict(base.layout))
        if where is None:
            tried.add(_by_family(hard))
            continue
        trial = plan.with_layout(tuple((pid, where.get(pid, at)) for pid, at in base.layout))
        if _takes(rules, trial, base, building):
            best = trial
    return best, frozenset(tried)


def _second_search(plan: Plan, rules: RuleSet, group: tuple[list[str], list[PieceSpec]],
                   hard: tuple[tuple[str, str], ...], options, end: float,
                   building: tuple[BuildingFinding, ...],
                   start: dict[str, Placement] | None = None) -> dict[str, Placement] | None:
    """The first checker-passing layout of ``group`` with the rules ``hard`` (rule, subject)
    in their sufficient form, searched until ``end``, from the hint ``start`` (the arrangement being
    improved); None when there is none in time."""
    seconds = max(0.1, end - time.monotonic())
    rooms, specs = group
    sub = replace(options, candidates=1, time_limit=seconds)
    search = _HardSearch(plan, rules, rooms, specs, sub, Clock(seconds), None, Counters(), building)
    search.hard = hard
    search.warm = {pid: at for pid, at in (start or {}).items() if pid in search.ids}
    search.run(1, end)
    return search.found[0].placements if search.found else None
