"""Cuts that the audit's verdict justifies: after a layout fails, which other layouts must fail.

A *sound* cut removes only layouts that fail the audit. Two facts about the audit make cuts
larger than the one failed layout and still sound:

1. **Monotone in obstacles.** Adding a piece never makes a route wider, a turning space
   larger or a clear floor clearer; it only adds its own targets. So when the plan holding
   only some of the pieces (and the locked ones) already fails, every layout that keeps those
   pieces where they are fails too, wherever the others go. ``sound_cut`` re-audits the
   pieces the failures name on their own to find such a set.
2. **Lipschitz in positions.** Moving pieces by at most d mm (Euclidean) changes a clearance
   by at most d, the widest route to a target (which moves with its piece) or between the
   two places of a routine trip (``route.trip``, the same walkway measure) by at most 4 d,
   and the largest turning circle by at most 2 d. A route or turning failure with
   ``measured`` short of ``required`` by s mm therefore stays failed under moves below
   s / 4 mm; a move of m mm along x and y is at most m * sqrt(2) mm, so the cut asks a move of
   at least (s - ``MARGIN``) / ``DIVISOR`` along x or y (``DIVISOR`` = 6 > 4 sqrt 2).
   Failures without a length (overlaps, areas) give a move of 1 mm: that layout only.

``MARGIN`` (per rule) covers the audit's own rounding (polygonal discs, a 10 mm raster for turning
spaces, widths found to ``WIDTH_TOL``). Where a route may narrow for a short stretch
(``route.pinch_width``), the shortfall is counted from the pinch width. A T-shaped turning
space has no measure of its own, so a ``circle-or-t`` turning failure gives 1 mm.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

from roomfit.plan.data import Placement

__all__ = ["SoundCut", "sound_cut", "MARGIN", "DIVISOR"]

#: mm taken off a shortfall before it becomes a move, per rule (the audit's rounding: routes
#: are found to 0.5 mm with discs of 8 segments a quarter, at most 0.5 % short of round, some
#: 2.3 mm at a 914 mm route; turning spaces on a 10 mm raster, up to 2 cells across).
MARGIN = {"route.reach": 10, "route.width": 10, "route.trip": 10, "turning.space": 30}
#: A shortfall of s mm allows moves below s / DIVISOR mm along x and y (see the docstring).
DIVISOR = 6
#: Rules whose ``measured`` and ``required`` are lengths that move with the pieces as above.
_LIPSCHITZ = ("route.reach", "route.width", "route.trip", "turning.space")


@dataclass(frozen=True)
class SoundCut:
    """At least one of ``pieces`` must change room or turn or move ``move`` mm along x or y."""

    pieces: tuple[str, ...]
    move: int


def _move(failures, pinch: float, shape: str) -> int:
    """The largest move (mm) under which one of ``failures`` surely stays failed (at least 1)."""
    best = 1
    for f in failures:
        if f.rule not in _LIPSCHITZ or f.measured is None or f.required is None:
            continue
        if f.rule == "turning.space" and shape not in ("circle", "square"):
            continue
        need = f.required if f.rule == "turning.space" or pinch <= 0 else min(f.required, pinch)
        short = need - f.measured - MARGIN[f.rule]
        if short > 0:
            best = max(best, math.floor(short / DIVISOR))
    return best


def sound_cut(movable: list[str], where: dict[str, Placement], failures,
              judge_only: Callable[[set[str]], object], pinch: float, shape: str) -> SoundCut:
    """The cut a failed layout ``where`` justifies.

    ``failures`` are the audit's failed findings; ``judge_only(ids)`` audits the plan with the
    movable pieces ``ids`` alone (the locked ones stay) and returns the audit. When the named
    movable pieces fail on their own, the cut concerns them only, else every movable piece.
    """
    named = {p for f in failures for p in f.pieces} & set(movable)
    if named and len(named) < len(movable):
        alone = judge_only(named)
        if not alone.passed:  # type: ignore[attr-defined]
            return SoundCut(tuple(sorted(named)), _move(alone.failures, pinch, shape))  # type: ignore[attr-defined]
    return SoundCut(tuple(movable), _move(failures, pinch, shape))
