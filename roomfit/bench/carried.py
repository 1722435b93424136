"""From a solve to the command line's summary table: carried results against recomputed ones.

The ``solve`` command prints one row per candidate: the checker's verdict (rules passed of
rules judged) and the walking metres per day. Before candidates carried their results, the
command audited (``roomfit.audit.check.audit``) and route-scored
(``roomfit.audit.routes.score_routes``) every furnished candidate again after the solve; now
it reads ``Candidate.audit`` and ``Candidate.routes``, which the solver computed once.

:func:`measure` times both ways of making the table's cells for the same solve result, and
checks that they agree: a carried result must equal the recomputed one (same verdict, same
findings passed, same walking). Drawing and writing the candidates' files is the same work
either way; its time is reported beside (``draw_s``) so the saving can be read against the
whole step.
"""

from __future__ import annotations

import time
from collections.abc import Callable
from typing import Any

from roomfit.audit.check import audit
from roomfit.audit.routes import score_routes
from roomfit.plan.data import Plan
from roomfit.rules.sets import RuleSet
from roomfit.solve.search import Candidate, SolveOptions, solve

__all__ = ["cells", "measure"]


def cells(plan: Plan, rules: RuleSet, c: Candidate, recompute: bool) -> tuple[bool, int, int, float]:
    """One summary row's facts: (passed, findings passed, findings, walking metres per day),
    read from the candidate or, with ``recompute``, judged again as the command once did."""
    if recompute:
        furnished = plan.with_layout(c.layout)
        verdict, routes = audit(furnished, rules), score_routes(furnished, rules)
    else:
        verdict, routes = c.audit, c.routes
    ok = sum(f.ok for f in verdict.findings)
    return verdict.passed, ok, len(verdict.findings), round(routes.walking_m_per_day, 3)


def _timed(plan: Plan, rules: RuleSet, candidates: tuple[Candidate, ...],
           recompute: bool) -> tuple[float, list[tuple[bool, int, int, float]]]:
    t = time.perf_counter()
    rows = [cells(plan, rules, c, recompute) for c in candidates]
    return time.perf_counter() - t, rows


def measure(name: str, plan: Plan, rules: RuleSet, time_limit: float, seed: int = 0,
            say: Callable[[str], None] = lambda _: None) -> dict[str, Any]:
    """Solve ``plan`` for three candidates, then time the summary table's cells both ways
    (seconds, all candidates together) and the drawing of every candidate."""
    from roomfit.present.draw import draw_svg

    result = solve(plan, rules, SolveOptions(candidates=3, time_limit=time_limit, seed=seed))
    cands = result.candidates
    row: dict[str, Any] = {"name": name, "status": str(result.status), "candidates": len(cands)}
    if not cands:
        say(f"summary table, {name}: no candidates ({result.status})")
        return row
    before_s, before = _timed(plan, rules, cands, recompute=True)
    after_s, after = _timed(plan, rules, cands, recompute=False)
    t = time.perf_counter()
    for c in cands:
        draw_svg(plan.with_layout(c.layout), rules, title=f"{plan.name}: candidate {c.rank + 1}")
    draw_s = time.perf_counter() - t
    row.update({"before_s": round(before_s, 4), "after_s": round(after_s, 6),
                "draw_s": round(draw_s, 4), "same_cells": before == after})
    say(f"summary table, {name}: {len(cands)} candidates, recomputed {before_s:.3f} s, "
        f"carried {after_s:.6f} s (drawing {draw_s:.3f} s either way); same cells: {before == after}")
    return row
