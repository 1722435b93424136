"""One wording of a solve's outcome, for every shell (the CLI summary and the page).

The three outcomes stay distinct: arrangements found; proven impossible (with the reason in
plain words and the fixes that were tested); nothing found within the time limit, which is
*not* a proof. When fewer candidates come back than were asked, the reason the search gives
(``SolveResult.notes``) is part of the wording. Arrangements furnished around building
findings (``SolveResult.building``) are worded as *not* compliant, each finding with its change.
"""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

from roomfit.solve.search import SolveResult, Status

__all__ = ["Level", "Outcome", "describe", "GAP_WORDS"]

#: What a candidate's gap means (the CLI's "gap" column and the page's figure).
GAP_WORDS = ("Gap: the objective (lower is better) of an arrangement that is not proven the "
             "best may be lowered by at most that share of it. The bound it is measured against "
             "is proven: the same preferences scored with the pieces allowed to overlap each "
             "other (or the solver's own bound when that is higher), so the best arrangement "
             "lies between the bound and the objective; a large gap often means an unmet "
             "preference (a functional group, a relation) that a longer search may still meet.")


class Level(StrEnum):
    """How the words should be shown: good news, a caution, or a refusal."""

    SUCCESS = "success"
    WARNING = "warning"
    ERROR = "error"


@dataclass(frozen=True)
class Outcome:
    """How a solve ended, in words: a :class:`Level`; the ``headline`` is one sentence,
    ``details`` the tested fixes and notes."""

    level: Level
    headline: str
    details: tuple[str, ...] = ()


def describe(result: SolveResult, time_limit: float) -> Outcome:
    """Plain words for a solve's result (``time_limit`` in s, as granted).

    >>> from roomfit.solve.search import SolveStats
    >>> describe(SolveResult(Status.TIMEOUT, (), None, SolveStats()), 20).headline[:40]
    'No arrangement that passes every rule wa'
    """
    n = len(result.candidates)
    ex = result.explanation
    notes = result.notes
    building = result.building
    notes = tuple(f"Building finding: {b.finding.message}" + (f". Change: {b.change}" if b.change
                                                              else "") for b in building) + notes
    fixes = tuple(f"Try: {f}" for f in ex.fixes) if ex is not None else ()
    fixes += tuple(f"Advice: {a}" for a in ex.advice) if ex is not None else ()
    plural = "s" if n != 1 else ""
    if n and not all(c.optimal for c in result.candidates):
        notes += (GAP_WORDS,)
    if result.status in (Status.FOUND, Status.OPTIMAL) and n and building:
        return Outcome(Level.WARNING, f"{n} arrangement{plural} found around {len(building)} building "
                       f"finding{'s' if len(building) != 1 else ''} that no furniture can cure: "
                       "NOT a compliant flat. Every other rule passes.", notes)
    if result.status in (Status.FOUND, Status.OPTIMAL) and n:
        best = (" (each the best possible for the scoring used, among arrangements that differ "
                "enough from the ones before)" if result.status == Status.OPTIMAL else "")
        return Outcome(Level.SUCCESS, f"{n} arrangement{plural} found{best}.", notes)
    if result.status == Status.IMPOSSIBLE:
        summary = ex.summary if ex is not None else "The furniture cannot fit under these rules."
        return Outcome(Level.ERROR, f"No arrangement exists: {summary}", fixes + notes)
    return Outcome(Level.WARNING, f"No arrangement that passes every rule was found within "
                   f"{time_limit:g} s. This is NOT proven impossible: allow more time, or "
                   "remove or lock a piece and try again.", fixes + notes)
