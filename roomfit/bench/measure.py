"""Measuring one instance: the solver, the annealing baseline and the audit and route-scoring
time of every arrangement, as plain JSON data."""

from __future__ import annotations

import time
import traceback
from collections.abc import Callable
from typing import Any

from shapely.geometry import Polygon

from roomfit.bench.baseline import AnnealOptions, anneal, layout_cost
from roomfit.bench.instances import Instance, floor_demand
from roomfit.bench.machine import peak_mb, reset_peak
from roomfit.bench.suite import BenchConfig
from roomfit.plan.data import Layout, Plan
from roomfit.rules.sets import RuleSet, rules_for

__all__ = ["run_instance", "time_arrangement", "audit_judge", "error_text"]


def error_text(e: BaseException) -> str:
    last = traceback.format_exception_only(type(e), e)[-1].strip()
    return last[:300]



def audit_judge(plan: Plan, rules: RuleSet) -> Callable[[Layout], bool]:
    from roomfit.audit.check import audit

    def judge(layout: Layout) -> bool:
        return audit(plan.with_layout(layout), rules).passed
    return judge


def time_arrangement(plan: Plan, rules: RuleSet, layout: Layout,
                     building: tuple = ()) -> dict[str, Any]:
    """Audit and route-scoring time of one arrangement, its verdict and walking metres.
    ``passed``: every rule passes but the ``building`` findings (the bare flat's own
    failures, which a solve furnishes around and reports; ``building_failures`` counts
    them)."""
    from roomfit.audit.check import audit
    from roomfit.solve.building import excused
    row: dict[str, Any] = {}
    furnished = plan.with_layout(layout)
    t = time.perf_counter()
    result = audit(furnished, rules)
    row["audit_s"] = round(time.perf_counter() - t, 4)
    row["passed"] = result.passed or excused(result, building)
    row["building_failures"] = len(result.failures) if building and row["passed"] else 0
    row["failed_rules"] = sorted({f.rule for f in result.failures})
    try:
        from roomfit.audit.routes import score_routes
        t = time.perf_counter()
        scores = score_routes(furnished, rules)
        row["routes_s"] = round(time.perf_counter() - t, 4)
        row["walking_m_per_day"] = round(scores.walking_m_per_day, 2)
    except Exception as e:  # a stage still being written must not stop the benchmark
        row["routes_error"] = error_text(e)
    try:
        from roomfit.audit.quality import group_summary
        row.update(group_summary(furnished, rules))
    except Exception as e:
        row["groups_error"] = error_text(e)
    try:
        row["baseline_soft_cost"] = round(layout_cost(plan, rules, layout)[1], 4)
    except Exception as e:
        row["baseline_cost_error"] = error_text(e)
    return row


def _run_solver(inst: Instance, rules: RuleSet, config: BenchConfig, say: Callable[[str], None]
                ) -> dict[str, Any]:
    from roomfit.solve.search import SolveOptions, solve
    limit = config.time_budget
    if "three-rooms" in inst.tags:
        limit = max(limit, 12.0)
    opts = SolveOptions(candidates=config.candidates, time_limit=limit, seed=config.seed, workers=2)
    rss0 = reset_peak()
    t = time.perf_counter()
    res = solve(inst.plan, rules, opts)
    elapsed = time.perf_counter() - t
    st = res.stats
    row: dict[str, Any] = {
        "status": res.status,
        "time_limit_s": limit,
        "elapsed_s": round(elapsed, 4),
        # a group of rooms solved while another timed out is no valid arrangement of the flat
        "time_first_valid_s": (round(st.time_to_first, 4)
                               if st.time_to_first is not None and res.candidates else None),
        "time_all_s": round(elapsed, 4) if res.candidates else None,
        "candidates": len(res.candidates),
        "peak_mb": peak_mb(),
        "rss_before_mb": rss0,
        "stats": {k: getattr(st, k) for k in getattr(st, "__dataclass_fields__", {})},
        "rounds": getattr(st, "cuts", None),
    }
    if res.explanation is not None:
        row["explanation"] = res.explanation.summary
        row["explanation_fixes"] = list(res.explanation.fixes)
    if res.candidates:
        best = res.candidates[0]
        row["objective"] = best.objective
        row["bound"] = best.bound
        gap = abs(best.objective - best.bound) / abs(best.objective) if best.objective else 0.0
        row["gap"] = round(gap, 4)
        row["optimal"] = [c.optimal for c in res.candidates]
        arrangements = [time_arrangement(inst.plan, rules, c.layout, res.building)
                        for c in res.candidates]
        row["arrangements"] = arrangements
        row["pass_rate"] = sum(a["passed"] for a in arrangements) / len(arrangements)
        # what the solve said of each group rule its first candidate misses
        row["possible"] = [{"label": p.label, "rules": list(p.rules), "reach": str(p.reach)}
                           for p in res.possible]
    first = row["time_first_valid_s"]
    say(f"solver {res.status}: {len(res.candidates)} candidate(s) in {elapsed:.2f} s"
        + (f", first valid after {first:.2f} s" if first is not None else "")
        + (f", checker pass rate {row['pass_rate']:.0%}" if res.candidates else ""))
    return row


def _run_baseline(inst: Instance, rules: RuleSet, config: BenchConfig, budget: float,
                  say: Callable[[str], None]) -> dict[str, Any]:
    rss0 = reset_peak()
    res = anneal(inst.plan, rules, AnnealOptions(time_limit=budget, seed=config.seed),
                 judge=audit_judge(inst.plan, rules))
    row: dict[str, Any] = {
        "time_limit_s": budget,
        "elapsed_s": round(res.elapsed, 4),
        "time_first_valid_s": None if res.time_to_valid is None else round(res.time_to_valid, 4),
        "iterations": res.iterations,
        "accepted": res.accepted,
        "judged": res.judged,
        "hard_cost": round(res.hard, 4),
        "soft_cost": round(res.soft, 4),
        "peak_mb": peak_mb(),
        "rss_before_mb": rss0,
    }
    # judged again here, independently of what the search was told
    arrangement = time_arrangement(inst.plan, rules, res.layout)
    row["arrangement"] = arrangement
    row["success"] = bool(arrangement["passed"])
    say(f"baseline {'valid' if row['success'] else 'no valid arrangement'} after "
        f"{res.elapsed:.2f} s ({res.iterations} moves"
        + (f", first valid after {res.time_to_valid:.2f} s)" if res.time_to_valid is not None else ")"))
    return row


def _ratio(a: float | None, b: float | None) -> float | None:
    if a is None or b is None or b == 0:
        return None
    return round(a / b, 4)


def run_instance(inst: Instance, config: BenchConfig, say: Callable[[str], None]) -> dict[str, Any]:
    """Measure one instance: solver, baseline and audit timings, as plain JSON data."""
    plan = inst.plan
    rules = rules_for(plan)
    area = sum(Polygon(r.outline).area for r in plan.rooms)
    row: dict[str, Any] = {
        "name": inst.name,
        "tags": list(inst.tags),
        "rooms": len(plan.rooms),
        "pieces": len(plan.furniture),
        "rule_set": rules.id,
        "floor_m2": round(area / 1e6, 2),
        "floor_share": round(sum(floor_demand(plan, r.id) for r in plan.rooms) / area, 3),
    }
    if inst.spec is not None:
        row["spec"] = {"rooms": inst.spec.rooms, "pieces": inst.spec.pieces, "shape": inst.spec.shape,
                       "rules": inst.spec.rules, "tightness": inst.spec.tightness, "seed": inst.spec.seed}
    only = config.only
    if only in (None, "audit") and plan.layout:
        try:
            row["as_is"] = time_arrangement(plan, rules, plan.layout)
            say(f"as-is arrangement audited in {row['as_is']['audit_s']:.3f} s")
        except Exception as e:
            row["as_is"] = {"error": error_text(e)}
    if only in (None, "solver"):
        try:
            row["solver"] = _run_solver(inst, rules, config, say)
        except Exception as e:
            row["solver"] = {"error": error_text(e)}
            say(f"solver failed: {row['solver']['error']}")
    skip = "impossible" in inst.tags or (config.quick and "sample" in inst.tags)
    if only in (None, "baseline") and not skip:
        solver = row.get("solver", {})
        budget = float(solver.get("time_limit_s", config.time_budget))
        try:
            row["baseline"] = _run_baseline(inst, rules, config, budget, say)
        except Exception as e:
            row["baseline"] = {"error": error_text(e)}
            say(f"baseline failed: {row['baseline']['error']}")
    s, b = row.get("solver", {}), row.get("baseline", {})
    if s.get("arrangements") and b.get("success"):
        best = s["arrangements"][0]
        row["compare"] = {
            "time_to_valid_ratio": _ratio(b.get("time_first_valid_s"), s.get("time_first_valid_s")),
            "walking_ratio": _ratio(b["arrangement"].get("walking_m_per_day"), best.get("walking_m_per_day")),
            "preference_ratio": _ratio(b["arrangement"].get("baseline_soft_cost"),
                                       best.get("baseline_soft_cost")),
        }
    return row

