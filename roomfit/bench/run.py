"""The benchmark harness: solver and baseline side by side, timings, scaling, targets.

``python -m roomfit.bench [--quick] [--seed K] [--out results.json] [--time-budget S]
[--only solver|baseline|audit]`` runs a suite of instances (generated flats and the sample
plans), writes the results as JSON with the machine recorded, a scaling plot as SVG next to
it, and prints a summary table. Progress goes to stderr. See ``docs/benchmarks.md``.

Peak memory is the process's peak resident set size (``VmHWM`` in ``/proc/self/status``),
reset before each measured step by writing ``5`` to ``/proc/self/clear_refs`` (Linux 4.0+);
where that is not possible, ``resource.getrusage(RUSAGE_SELF).ru_maxrss`` (the peak over the
whole process, never reset). The JSON says which was used.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import platform
import re
import resource
import statistics
import subprocess
import sys
import time
import traceback
from collections.abc import Callable, Sequence
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from shapely.geometry import Polygon

from roomfit.bench.baseline import AnnealOptions, anneal, layout_cost
from roomfit.bench.instances import Instance, InstanceSpec, floor_demand, generate, sample_instances
from roomfit.files import atomic_write
from roomfit.plan.data import Layout, Plan
from roomfit.rules.sets import RuleSet, rules_for

__all__ = [
    "BenchConfig",
    "TARGETS",
    "suite",
    "machine",
    "run_instance",
    "summarize",
    "group_rules_summary",
    "group_rules_line",
    "scaling_rows",
    "scaling_svg",
    "table",
    "markdown",
    "run",
    "main",
]

#: Speed and quality targets (seconds) from the solver and benchmark issues.
TARGETS = {
    "first_valid_1room_10": 0.5,   # median time to the first valid arrangement
    "three_rooms_25_3cand": 10.0,  # time to three candidates
    "impossible_explained": 3.0,   # time to a proven-impossible answer with its explanation
}

PLANS = Path(__file__).resolve().parent.parent.parent / "plans"
DOCS = Path(__file__).resolve().parent.parent.parent / "docs"


@dataclass(frozen=True)
class BenchConfig:
    """What to run: ``quick`` suite or the full one, master ``seed`` (added to every
    instance seed and to the solver's and baseline's seeds), ``time_budget`` in seconds per
    instance for the solver and for the baseline alike (the three-room target instances give
    the solver at least 12 s so the 10 s target can be met), ``only`` one part, and the
    number of ``candidates``. ``instances``, when given, replaces the generated suite (each
    is tagged ``scaling``); ``samples`` adds the sample plans."""

    quick: bool = True
    seed: int = 0
    time_budget: float = 4.0
    only: str | None = None
    candidates: int = 3
    samples: bool = True
    instances: tuple[InstanceSpec, ...] | None = None


# -- machine and memory --------------------------------------------------------------------

def _version(module: str) -> str | None:
    try:
        mod = __import__(module)
    except ImportError:
        return None
    return str(getattr(mod, "__version__", "unknown"))


def _memory_method() -> str:
    try:
        with open("/proc/self/clear_refs", "w") as fh:
            fh.write("5")
        with open("/proc/self/status") as fh:
            if "VmHWM" in fh.read():
                return "VmHWM"
    except OSError:
        pass
    return "ru_maxrss"


_MEMORY = _memory_method()


def machine() -> dict[str, Any]:
    """Platform, CPU count, Python and library versions, the memory method, and the load
    average (1, 5, 15 min) when asked: other work on the machine slows every timing."""
    cpu = platform.processor() or ""
    try:
        with open("/proc/cpuinfo") as fh:
            m = re.search(r"model name\s*:\s*(.+)", fh.read())
            cpu = m.group(1).strip() if m else cpu
    except OSError:
        pass
    return {
        "platform": platform.platform(),
        "machine": platform.machine(),
        "cpu": cpu,
        "cpu_count": os.cpu_count(),
        "python": platform.python_version(),
        "ortools": _version("ortools"),
        "shapely": _version("shapely"),
        "numpy": _version("numpy"),
        "scipy": _version("scipy"),
        "networkx": _version("networkx"),
        "memory_method": _MEMORY,
        "load_average": [round(x, 2) for x in os.getloadavg()],
    }


def _rss_mb() -> float | None:
    try:
        with open("/proc/self/status") as fh:
            m = re.search(r"VmRSS:\s+(\d+)\s+kB", fh.read())
    except OSError:
        return None
    return round(int(m.group(1)) / 1024, 1) if m else None


def _code_version() -> dict[str, Any]:
    """The git commit the benchmark ran on, and whether the tree had uncommitted changes."""
    root = Path(__file__).resolve().parent.parent.parent
    try:
        head = subprocess.run(["git", "rev-parse", "HEAD"], cwd=root, capture_output=True,
                              text=True, timeout=10).stdout.strip()
        dirty = subprocess.run(["git", "status", "--porcelain", "--untracked-files=no"], cwd=root,
                               capture_output=True, text=True, timeout=10).stdout.strip()
    except (OSError, subprocess.SubprocessError):
        return {"commit": None, "dirty": None}
    return {"commit": head or None, "dirty": bool(dirty)}


def _reset_peak() -> float | None:
    """Reset the peak (where possible); the resident size now, in MB."""
    if _MEMORY == "VmHWM":
        with open("/proc/self/clear_refs", "w") as fh:
            fh.write("5")
    return _rss_mb()


def _peak_mb() -> float:
    if _MEMORY == "VmHWM":
        with open("/proc/self/status") as fh:
            m = re.search(r"VmHWM:\s+(\d+)\s+kB", fh.read())
        if m:
            return round(int(m.group(1)) / 1024, 1)
    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024, 1)


def _error(e: BaseException) -> str:
    last = traceback.format_exception_only(type(e), e)[-1].strip()
    return last[:300]


# -- the suite -----------------------------------------------------------------------------

def _gen(spec: InstanceSpec, *tags: str) -> Instance:
    return Instance(spec.name, generate(spec), ("generated", spec.tightness, spec.rules, *tags), spec)


def suite(config: BenchConfig) -> list[Instance]:
    """The instances to run, each tagged with what it measures:

    ``first-valid`` (one room, 10 pieces), ``three-rooms`` (25 pieces, 3 candidates),
    ``impossible``, ``tight``/``loose`` (the baseline comparison), ``scaling``, ``sample``.
    The quick suite runs no baseline on the sample plans (time), the full one does.
    """
    s = config.seed
    if config.instances is not None:
        own = [_gen(spec, "scaling") for spec in config.instances]
        return own + (sample_instances(PLANS) if config.samples else [])
    out: dict[str, Instance] = {}

    def add(inst: Instance) -> None:
        if inst.name in out:  # merge tags of an instance asked for twice
            old = out[inst.name]
            inst = Instance(old.name, old.plan, tuple(dict.fromkeys(old.tags + inst.tags)), old.spec)
        out[inst.name] = inst

    n_first = 3 if config.quick else 5
    for k in range(n_first):
        add(_gen(InstanceSpec(1, 10, "rect", "everyday", "loose", s + k), "first-valid"))
    n_three = 1 if config.quick else 3
    for k in range(n_three):
        add(_gen(InstanceSpec(3, 25, "mixed", "everyday", "loose", s + k), "three-rooms"))
    add(_gen(InstanceSpec(1, 5, "rect", "everyday", "impossible", s), "impossible"))
    if config.quick:
        add(_gen(InstanceSpec(1, 10, "rect", "everyday", "tight", s), "compare"))
        add(_gen(InstanceSpec(2, 12, "L", "wheelchair", "tight", s), "compare"))
        scaling = [(1, 4), (1, 10), (3, 25)]
    else:
        add(_gen(InstanceSpec(1, 6, "angled", "wheelchair", "impossible", s), "impossible"))
        for k in range(3):
            add(_gen(InstanceSpec(1, 10, "rect", "wheelchair", "loose", s + k), "first-valid"))
        for k in range(5):
            add(_gen(InstanceSpec(1, 10, "rect", "everyday", "tight", s + k), "compare"))
            add(_gen(InstanceSpec(2, 12, "mixed", "wheelchair", "tight", s + k), "compare"))
            add(_gen(InstanceSpec(2, 12, "mixed", "wheelchair", "loose", s + k), "compare"))
        add(_gen(InstanceSpec(3, 25, "mixed", "everyday", "tight", s), "compare"))
        add(_gen(InstanceSpec(3, 25, "mixed", "wheelchair", "loose", s), "three-rooms"))
        scaling = [(1, 4), (1, 10), (2, 16), (3, 25), (4, 32), (5, 40), (6, 48), (8, 60)]
    for rooms, pieces in scaling:
        add(_gen(InstanceSpec(rooms, pieces, "mixed" if rooms > 1 else "rect", "everyday", "loose", s),
                 "scaling"))
    insts = list(out.values())
    if config.samples:
        insts += sample_instances(PLANS)
    return insts


# -- measuring -----------------------------------------------------------------------------

def _audit_passes(plan: Plan, rules: RuleSet) -> Callable[[Layout], bool]:
    from roomfit.audit.check import audit

    def judge(layout: Layout) -> bool:
        return audit(plan.with_layout(layout), rules).passed
    return judge


def _time_arrangement(plan: Plan, rules: RuleSet, layout: Layout) -> dict[str, Any]:
    """Audit and route-scoring time of one arrangement, its verdict and walking metres."""
    from roomfit.audit.check import audit
    row: dict[str, Any] = {}
    furnished = plan.with_layout(layout)
    t = time.perf_counter()
    result = audit(furnished, rules)
    row["audit_s"] = round(time.perf_counter() - t, 4)
    row["passed"] = result.passed
    row["failed_rules"] = sorted({f.rule for f in result.failures})
    try:
        from roomfit.audit.routes import score_routes
        t = time.perf_counter()
        scores = score_routes(furnished, rules)
        row["routes_s"] = round(time.perf_counter() - t, 4)
        row["walking_m_per_day"] = round(scores.walking_m_per_day, 2)
    except Exception as e:  # a stage still being written must not stop the benchmark
        row["routes_error"] = _error(e)
    try:
        from roomfit.audit.quality import group_summary
        row.update(group_summary(furnished, rules))
    except Exception as e:
        row["groups_error"] = _error(e)
    try:
        row["baseline_soft_cost"] = round(layout_cost(plan, rules, layout)[1], 4)
    except Exception as e:
        row["baseline_cost_error"] = _error(e)
    return row


def _run_solver(inst: Instance, rules: RuleSet, config: BenchConfig, say: Callable[[str], None]
                ) -> dict[str, Any]:
    from roomfit.solve.search import SolveOptions, solve
    limit = config.time_budget
    if "three-rooms" in inst.tags:
        limit = max(limit, 12.0)
    opts = SolveOptions(candidates=config.candidates, time_limit=limit, seed=config.seed, workers=2)
    rss0 = _reset_peak()
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
        "peak_mb": _peak_mb(),
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
        arrangements = [_time_arrangement(inst.plan, rules, c.layout) for c in res.candidates]
        row["arrangements"] = arrangements
        row["pass_rate"] = sum(a["passed"] for a in arrangements) / len(arrangements)
    first = row["time_first_valid_s"]
    say(f"solver {res.status}: {len(res.candidates)} candidate(s) in {elapsed:.2f} s"
        + (f", first valid after {first:.2f} s" if first is not None else "")
        + (f", checker pass rate {row['pass_rate']:.0%}" if res.candidates else ""))
    return row


def _run_baseline(inst: Instance, rules: RuleSet, config: BenchConfig, budget: float,
                  say: Callable[[str], None]) -> dict[str, Any]:
    rss0 = _reset_peak()
    res = anneal(inst.plan, rules, AnnealOptions(time_limit=budget, seed=config.seed),
                 judge=_audit_passes(inst.plan, rules))
    row: dict[str, Any] = {
        "time_limit_s": budget,
        "elapsed_s": round(res.elapsed, 4),
        "time_first_valid_s": None if res.time_to_valid is None else round(res.time_to_valid, 4),
        "iterations": res.iterations,
        "accepted": res.accepted,
        "judged": res.judged,
        "hard_cost": round(res.hard, 4),
        "soft_cost": round(res.soft, 4),
        "peak_mb": _peak_mb(),
        "rss_before_mb": rss0,
    }
    # judged again here, independently of what the search was told
    arrangement = _time_arrangement(inst.plan, rules, res.layout)
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
            row["as_is"] = _time_arrangement(plan, rules, plan.layout)
            say(f"as-is arrangement audited in {row['as_is']['audit_s']:.3f} s")
        except Exception as e:
            row["as_is"] = {"error": _error(e)}
    if only in (None, "solver"):
        try:
            row["solver"] = _run_solver(inst, rules, config, say)
        except Exception as e:
            row["solver"] = {"error": _error(e)}
            say(f"solver failed: {row['solver']['error']}")
    skip = "impossible" in inst.tags or (config.quick and "sample" in inst.tags)
    if only in (None, "baseline") and not skip:
        solver = row.get("solver", {})
        budget = float(solver.get("time_limit_s", config.time_budget))
        try:
            row["baseline"] = _run_baseline(inst, rules, config, budget, say)
        except Exception as e:
            row["baseline"] = {"error": _error(e)}
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


# -- summary -------------------------------------------------------------------------------

def _median(xs: list[float]) -> float | None:
    return round(statistics.median(xs), 4) if xs else None


def _rate(xs: list[bool]) -> float | None:
    return round(sum(xs) / len(xs), 3) if xs else None


def group_rules_summary(rows: list[dict[str, Any]]) -> dict[str, Any]:
    """Functional-group rules met (``roomfit.audit.quality``) by the solver's first candidate
    and by the baseline's arrangement, over the instances where each found a valid one."""
    out: dict[str, Any] = {}
    for who, pick in (("solver", lambda r: (r.get("solver", {}).get("arrangements") or [{}])[0]),
                      ("baseline", lambda r: r.get("baseline", {}).get("arrangement", {}))):
        arr = [a for a in map(pick, rows) if a.get("passed") and "group_total" in a]
        met, total = sum(a["group_met"] for a in arr), sum(a["group_total"] for a in arr)
        out[who] = {"arrangements": len(arr), "checks_met": met, "checks": total,
                    "share": round(met / total, 3) if total else None,
                    "all_met": sum(a["group_met"] == a["group_total"] for a in arr)}
    return out


def group_rules_line(g: dict[str, Any]) -> str:
    """The solver's and the baseline's functional-group satisfaction side by side."""
    parts = [f"{who} {v['checks_met']} of {v['checks']} checks ({_fmt(v['share'])}), every "
             f"group rule met in {v['all_met']} of {v['arrangements']} arrangements"
             for who, v in g.items()]
    return "Functional-group rules met (valid arrangements; solver: first candidate): " + (
        "; ".join(parts) or "not measured")


def summarize(rows: list[dict[str, Any]]) -> dict[str, Any]:
    """Targets met or missed, success rates, ratios, the checker pass rate."""
    def tagged(tag: str) -> list[dict[str, Any]]:
        return [r for r in rows if tag in r["tags"]]

    out: dict[str, Any] = {"targets": {}}
    first = [r["solver"].get("time_first_valid_s") for r in tagged("first-valid") if "solver" in r]
    got = [t for t in first if t is not None]
    # a run that found nothing counts as slower than any that did; no median when most did not
    med = _median([t if t is not None else math.inf for t in first]) if first else None
    med = None if med is None or math.isinf(med) else med
    out["targets"]["first_valid_1room_10"] = {
        "target_s": TARGETS["first_valid_1room_10"], "median_s": med, "times_s": first,
        "found": len(got), "runs": len(first),
        "met": med is not None and med < TARGETS["first_valid_1room_10"]}
    three = [r["solver"] for r in tagged("three-rooms") if "solver" in r]
    times = [s.get("time_all_s") if s.get("candidates", 0) >= 3 else None for s in three]
    out["targets"]["three_rooms_25_3cand"] = {
        "target_s": TARGETS["three_rooms_25_3cand"], "times_s": times,
        "met": bool(times) and all(t is not None and t < TARGETS["three_rooms_25_3cand"] for t in times)}
    imp = [r["solver"] for r in tagged("impossible") if "solver" in r]
    imp_t = [s.get("elapsed_s") if s.get("status") == "impossible" and s.get("explanation") else None
             for s in imp]
    out["targets"]["impossible_explained"] = {
        "target_s": TARGETS["impossible_explained"], "times_s": imp_t,
        "met": bool(imp_t) and all(t is not None and t < TARGETS["impossible_explained"] for t in imp_t)}
    rates = [r["solver"]["pass_rate"] for r in rows if "pass_rate" in r.get("solver", {})]
    n_cand = sum(r["solver"].get("candidates", 0) for r in rows if "solver" in r)
    out["targets"]["all_candidates_valid"] = {
        "candidates": n_cand, "pass_rate": _rate([x == 1.0 for x in rates]) if rates else None,
        "met": bool(rates) and all(x == 1.0 for x in rates)}
    comp: dict[str, Any] = {}
    for tight in ("tight", "loose"):
        rs = [r for r in rows if tight in r["tags"] and "generated" in r["tags"]
              and "solver" in r and "baseline" in r]
        comp[tight] = {
            "instances": len(rs),
            "solver_success": _rate([bool(r["solver"].get("candidates")) for r in rs]),
            "baseline_success": _rate([bool(r["baseline"].get("success")) for r in rs]),
        }
    t = comp["tight"]
    out["targets"]["baseline_worse_on_tight"] = {
        **t, "met": (t["instances"] > 0 and t["solver_success"] is not None
                     and t["baseline_success"] is not None
                     and t["baseline_success"] < t["solver_success"])}
    for entry in out["targets"].values():  # nothing to judge: not measured, not missed
        measured = entry.get("times_s") or entry.get("candidates") or entry.get("instances")
        if not measured:
            entry["met"] = None
    out["comparison"] = comp
    out["group_rules"] = group_rules_summary(rows)
    ratios: dict[str, Any] = {}
    for key in ("time_to_valid_ratio", "walking_ratio", "preference_ratio"):
        xs = [r["compare"][key] for r in rows if r.get("compare", {}).get(key) is not None]
        ratios[key] = {"median": _median(xs), "n": len(xs)}
    out["ratios"] = ratios
    arr = [a for r in rows for a in r.get("solver", {}).get("arrangements", [])]
    arr += [r["as_is"] for r in rows if "audit_s" in r.get("as_is", {})]
    out["audit_s"] = {"median": _median([a["audit_s"] for a in arr]),
                      "max": max((a["audit_s"] for a in arr), default=None)}
    rt = [a["routes_s"] for a in arr if "routes_s" in a]
    out["routes_s"] = {"median": _median(rt), "max": max(rt, default=None)}
    return out


def scaling_rows(rows: list[dict[str, Any]]) -> list[dict[str, Any]]:
    """Time against rooms and pieces, from the instances tagged ``scaling``."""
    out = []
    for r in rows:
        if "scaling" not in r["tags"]:
            continue
        s, b = r.get("solver", {}), r.get("baseline", {})
        out.append({"rooms": r["rooms"], "pieces": r["pieces"], "name": r["name"],
                    "solver_first_s": s.get("time_first_valid_s"), "solver_all_s": s.get("time_all_s"),
                    "solver_candidates": s.get("candidates"), "solver_status": s.get("status"),
                    "baseline_first_s": b.get("time_first_valid_s"), "baseline_success": b.get("success"),
                    "peak_mb": s.get("peak_mb")})
    return sorted(out, key=lambda x: (x["pieces"], x["rooms"]))


def scaling_svg(points: list[dict[str, Any]], title: str = "Time against number of pieces") -> str:
    """A small line chart (log time axis) drawn by hand as SVG: solver first valid, solver all
    candidates, baseline first valid; points that found nothing are drawn at the top as
    crosses. Each point is labelled with its number of rooms."""
    width, height, left, right, top, bottom = 640, 400, 70, 170, 40, 50
    pw, ph = width - left - right, height - top - bottom
    series = [("solver_first_s", "solver: first valid", "#1f6f8b", "none"),
              ("solver_all_s", "solver: all candidates", "#1f6f8b", "6 4"),
              ("baseline_first_s", "baseline: first valid", "#c0522b", "none")]
    ts = [p[k] for p in points for k, *_ in series if p.get(k)]
    lo = 10 ** math.floor(math.log10(max(min(ts, default=0.01), 1e-3)))
    hi = 10 ** math.ceil(math.log10(max(max(ts, default=1.0), lo * 10)))
    xmax = max((p["pieces"] for p in points), default=10)
    step = 10 if xmax > 20 else 2
    xs = (xmax // step + 1) * step  # room to the right of the last point

    def px(n: float) -> float:
        return left + pw * n / xs

    def py(t: float) -> float:
        return top + ph * (1 - (math.log10(t) - math.log10(lo)) / (math.log10(hi) - math.log10(lo)))

    el = [f'<svg xmlns="http://www.w3.org/2000/svg" width="{width}" height="{height}" '
          f'viewBox="0 0 {width} {height}" font-family="sans-serif" font-size="11">',
          f'<rect width="{width}" height="{height}" fill="white"/>',
          f'<text x="{left}" y="22" font-size="14">{_esc(title)}</text>']
    e = int(round(math.log10(lo)))
    while 10 ** e <= hi * 1.0001:
        y = py(10 ** e)
        el.append(f'<line x1="{left}" y1="{y:.1f}" x2="{left + pw}" y2="{y:.1f}" stroke="#ddd"/>')
        el.append(f'<text x="{left - 6}" y="{y + 4:.1f}" text-anchor="end">{10 ** e:g} s</text>')
        e += 1
    for n in range(0, xs + 1, step):
        x = px(n)
        el.append(f'<line x1="{x:.1f}" y1="{top + ph}" x2="{x:.1f}" y2="{top + ph + 4}" stroke="#333"/>')
        el.append(f'<text x="{x:.1f}" y="{top + ph + 16}" text-anchor="middle">{n}</text>')
    el.append(f'<rect x="{left}" y="{top}" width="{pw}" height="{ph}" fill="none" stroke="#333"/>')
    el.append(f'<text x="{left + pw / 2}" y="{height - 12}" text-anchor="middle">pieces '
              f'(label: rooms)</text>')
    el.append(f'<text x="16" y="{top + ph / 2}" transform="rotate(-90 16 {top + ph / 2})" '
              f'text-anchor="middle">seconds (log)</text>')
    for k, (key, label, colour, dash) in enumerate(series):
        pts = [(px(p["pieces"]), py(p[key]), p["rooms"]) for p in points if p.get(key)]
        if len(pts) > 1:
            path = " ".join(f"{x:.1f},{y:.1f}" for x, y, _ in pts)
            el.append(f'<polyline points="{path}" fill="none" stroke="{colour}" stroke-width="2" '
                      f'stroke-dasharray="{dash}"/>')
        for x, y, rooms in pts:
            el.append(f'<circle cx="{x:.1f}" cy="{y:.1f}" r="3.5" fill="{colour}"/>')
            if key == "solver_first_s":
                el.append(f'<text x="{x + 5:.1f}" y="{y - 5:.1f}" fill="#555">{rooms}</text>')
        for p in points:
            if not p.get(key):
                x, y = px(p["pieces"]), top + 8 + 8 * k
                el.append(f'<path d="M{x - 4:.1f},{y - 4:.1f} l8,8 m0,-8 l-8,8" stroke="{colour}"/>')
        ly = top + 16 + 20 * k
        el.append(f'<line x1="{left + pw + 14}" y1="{ly}" x2="{left + pw + 40}" y2="{ly}" '
                  f'stroke="{colour}" stroke-width="2" stroke-dasharray="{dash}"/>')
        el.append(f'<text x="{left + pw + 46}" y="{ly + 4}">{_esc(label)}</text>')
    el.append(f'<text x="{left + pw + 14}" y="{top + 90}" fill="#555">x at top: nothing</text>')
    el.append(f'<text x="{left + pw + 14}" y="{top + 104}" fill="#555">valid in the budget</text>')
    el.append("</svg>")
    return "\n".join(el) + "\n"


def _esc(s: str) -> str:
    return s.replace("&", "&amp;").replace("<", "&lt;").replace(">", "&gt;")


def _fmt(t: float | None) -> str:
    return "-" if t is None else f"{t:.2f}"


def _cells(r: dict[str, Any]) -> dict[str, str]:
    """One instance's results as formatted cells, shared by the text and Markdown tables."""
    s, b = r.get("solver", {}), r.get("baseline", {})
    pr = s.get("pass_rate")
    return {
        "name": r["name"], "rooms": str(r["rooms"]), "pieces": str(r["pieces"]),
        "share": f"{r['floor_share']:.2f}",
        "status": str(s.get("status", "error" if "error" in s else "-")),
        "first": _fmt(s.get("time_first_valid_s")), "all": _fmt(s.get("time_all_s")),
        "cand": str(s.get("candidates", "-")), "pass": "-" if pr is None else f"{pr:.0%}",
        "rounds": str(s.get("rounds", "-")), "peak": str(s.get("peak_mb", "-")),
        "sa_ok": "-" if "success" not in b else ("yes" if b["success"] else "no"),
        "sa_first": _fmt(b.get("time_first_valid_s")),
    }


def table(rows: list[dict[str, Any]]) -> str:
    """A plain-text table, one line per instance."""
    head = (f"{'instance':40} {'rooms':>5} {'pcs':>4} {'share':>5} {'status':>10} {'first':>6} "
            f"{'all':>6} {'cand':>4} {'pass':>5} {'SA ok':>5} {'SA 1st':>6}")
    lines = [head, "-" * len(head)]
    for r in rows:
        c = _cells(r)
        lines.append(
            f"{c['name'][:40]:40} {c['rooms']:>5} {c['pieces']:>4} {c['share']:>5} "
            f"{c['status'][:10]:>10} {c['first']:>6} {c['all']:>6} {c['cand']:>4} "
            f"{c['pass']:>5} {c['sa_ok']:>5} {c['sa_first']:>6}")
    return "\n".join(lines)


def _yes(met: bool | None) -> str:
    return {True: "yes", False: "no", None: "not measured"}[met]


def markdown(results: dict[str, Any]) -> str:
    """Markdown tables of a results file: targets, the baseline comparison, scaling."""
    m = results["machine"]
    summ = results["summary"]
    code = results.get("code", {})
    lines = [f"Code: commit {code.get('commit')}{' with uncommitted changes' if code.get('dirty') else ''}. "
             f"Machine: {m['cpu']}, {m['cpu_count']} CPUs, Python {m['python']}, OR-Tools "
             f"{m['ortools']}, shapely {m['shapely']}; load average at start "
             f"{m.get('load_average')}, at end {results.get('load_average_end')}; "
             f"budget {results['config']['time_budget_s']} s per instance; run took "
             f"{results['wall_s']} s.", "",
             "| target | goal | measured | met |", "|---|---|---|---|"]
    t = summ["targets"]
    fv = t["first_valid_1room_10"]
    lines.append(f"| one room, 10 pieces: first valid (median) | < {fv['target_s']} s | "
                 f"{_fmt(fv['median_s'])} s (runs: {', '.join(_fmt(x) for x in fv['times_s'])}; "
                 f"found in {fv.get('found', '?')} of {fv.get('runs', '?')}) | "
                 f"{_yes(fv['met'])} |")
    for key, what in (("three_rooms_25_3cand", "three rooms, 25 pieces: 3 candidates"),
                      ("impossible_explained", "impossible room explained")):
        tt = t[key]
        lines.append(f"| {what} | < {tt['target_s']} s | "
                     f"{', '.join(_fmt(x) for x in tt['times_s'])} s | {_yes(tt['met'])} |")
    av = t["all_candidates_valid"]
    lines.append(f"| every candidate passes the checker | 100 % | {av['candidates']} candidates, "
                 f"instances with all valid: {av['pass_rate']} | {_yes(av['met'])} |")
    bw = t["baseline_worse_on_tight"]
    lines.append(f"| tight: baseline succeeds less often | baseline < solver | baseline "
                 f"{bw['baseline_success']}, solver {bw['solver_success']} on {bw['instances']} "
                 f"| {_yes(bw['met'])} |")
    lines += ["", "| instance | rooms | pieces | floor share | solver | first valid s | all s | "
              "cand. | pass | rounds | peak MB | baseline valid | baseline first s |",
              "|---|---|---|---|---|---|---|---|---|---|---|---|---|"]
    for r in results["instances"]:
        c = _cells(r)
        lines.append("| " + " | ".join(c[k] for k in (
            "name", "rooms", "pieces", "share", "status", "first", "all", "cand", "pass",
            "rounds", "peak", "sa_ok", "sa_first")) + " |")
    ra = summ["ratios"]
    lines += ["", group_rules_line(summ.get("group_rules", {}))]
    lines += ["", "Ratios (baseline / solver, median over instances where both found a valid "
              "arrangement): " + ", ".join(f"{k} {v['median']} (n={v['n']})" for k, v in ra.items()),
              "", f"Audit time per arrangement: median {summ['audit_s']['median']} s, max "
              f"{summ['audit_s']['max']} s; route scoring: median {summ['routes_s']['median']} s, "
              f"max {summ['routes_s']['max']} s."]
    return "\n".join(lines) + "\n"


def run(config: BenchConfig, out: Path, say: Callable[[str], None]) -> dict[str, Any]:
    """Run the suite, write the JSON (and the scaling SVG next to it), return the results."""
    started = time.time()
    host = machine()
    insts = suite(config)
    rows = []
    for k, inst in enumerate(insts, 1):
        prefix = f"[{k}/{len(insts)}] {inst.name}"
        say(f"{prefix}: {len(inst.plan.rooms)} rooms, {len(inst.plan.furniture)} pieces")
        rows.append(run_instance(inst, config, lambda m, p=prefix: say(f"{p}: {m}")))
    results = {
        "format": "roomfit-bench/1",
        "started_utc": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime(started)),
        "wall_s": round(time.time() - started, 1),
        "machine": host,
        "code": _code_version(),
        "config": {"quick": config.quick, "seed": config.seed, "time_budget_s": config.time_budget,
                   "only": config.only, "candidates": config.candidates},
        "targets": TARGETS,
        "instances": rows,
        "scaling": scaling_rows(rows),
        "summary": summarize(rows),
        "load_average_end": [round(x, 2) for x in os.getloadavg()],
    }
    atomic_write(out, json.dumps(results, indent=1, allow_nan=False) + "\n")
    if results["scaling"]:
        mode = "quick" if config.quick else "full"
        atomic_write(out.with_suffix(".svg"),
                     scaling_svg(results["scaling"], f"roomfit benchmark ({mode}): time against pieces"))
    return results


def main(argv: Sequence[str] | None = None) -> int:
    p = argparse.ArgumentParser(prog="python -m roomfit.bench",
                                description="Benchmark the placement model against a simulated-"
                                            "annealing baseline; results as JSON and an SVG plot.")
    p.add_argument("--quick", action="store_true", help="small suite, under 2 minutes on 2 cores")
    p.add_argument("--seed", type=int, default=0, help="master seed (default 0)")
    p.add_argument("--out", type=Path, default=None,
                   help="results file (default docs/bench-quick.json or docs/bench-full.json); "
                        "the plot goes next to it as .svg")
    p.add_argument("--time-budget", type=float, default=None,
                   help="seconds per instance for the solver and for the baseline alike "
                        "(default 4 quick, 20 full)")
    p.add_argument("--only", choices=("solver", "baseline", "audit"), default=None,
                   help="run one part only")
    p.add_argument("--no-samples", action="store_true", help="leave out the sample plans")
    p.add_argument("--markdown", type=Path, default=None, metavar="RESULTS",
                   help="print the tables of an earlier results file as Markdown and stop")
    args = p.parse_args(argv)
    if args.markdown is not None:
        print(markdown(json.loads(args.markdown.read_text(encoding="utf-8"))), end="")
        return 0
    budget = args.time_budget if args.time_budget is not None else (4.0 if args.quick else 20.0)
    if budget <= 0:
        p.error("--time-budget must be greater than 0")
    config = BenchConfig(quick=args.quick, seed=args.seed, time_budget=budget, only=args.only,
                         samples=not args.no_samples)
    out = args.out or DOCS / ("bench-quick.json" if args.quick else "bench-full.json")

    def say(msg: str) -> None:
        print(msg, file=sys.stderr, flush=True)

    results = run(config, out, say)
    print(table(results["instances"]))
    print()
    for name, t in results["summary"]["targets"].items():
        detail = json.dumps({k: v for k, v in t.items() if k != "met"})
        verdict = {True: "met", False: "MISSED", None: "not measured"}[t["met"]]
        print(f"{name}: {verdict}  {detail}")
    print(group_rules_line(results["summary"].get("group_rules", {})))
    print(f"\nresults: {out}")
    return 0

