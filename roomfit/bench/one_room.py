"""How the search grows with the pieces of one room: a generated room of 10, 20, 30 and 40
pieces (rectangle, everyday set, loose, the master seed), one candidate asked, the time to
its first valid layout or "none in T s".

Rooms are solved apart, so a flat scales with its largest room; open-plan living, dining and
kitchen rooms and lofts hold 30 to 40 pieces, which is what this series measures.
"""

from __future__ import annotations

import time
from collections.abc import Callable, Sequence
from typing import Any

from roomfit.bench.instances import InstanceSpec, generate
from roomfit.rules.sets import rules_for
from roomfit.solve.search import SolveOptions, solve

__all__ = ["SIZES", "series", "words"]

#: Pieces in the one room.
SIZES = (10, 20, 30, 40)


def series(sizes: Sequence[int], time_limit: float, seed: int,
           say: Callable[[str], None]) -> list[dict[str, Any]]:
    """One row per size: status, seconds to the first valid layout (None when none came
    within ``time_limit``) and the whole solve's seconds."""
    rows = []
    for n in sizes:
        spec = InstanceSpec(rooms=1, pieces=n, shape="rect", rules="everyday", tightness="loose",
                            seed=seed)
        plan = generate(spec)
        t = time.perf_counter()
        result = solve(plan, rules_for(plan), SolveOptions(candidates=1, time_limit=time_limit,
                                                           seed=seed))
        elapsed = time.perf_counter() - t
        first = result.stats.time_to_first if result.candidates else None
        row = {"name": spec.name, "pieces": len(plan.furniture), "time_limit_s": time_limit,
               "status": str(result.status), "first_valid_s": None if first is None else round(first, 3),
               "elapsed_s": round(elapsed, 3), "cuts": result.stats.cuts}
        say(f"one room, {n} pieces: {words(row)}")
        rows.append(row)
    return rows


def words(row: dict[str, Any]) -> str:
    """A row's result in words: "first valid 0.41 s" or "none in 30 s (timeout)"."""
    if row["first_valid_s"] is not None:
        return f"first valid {row['first_valid_s']:.2f} s"
    return f"none in {row['time_limit_s']:g} s ({row['status']})"
