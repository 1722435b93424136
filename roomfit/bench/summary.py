"""The summary of a benchmark run: targets met or missed, success rates, ratios, group rules,
the scaling points."""

from __future__ import annotations

import math
import statistics
from typing import Any

from roomfit.bench.suite import TARGETS

__all__ = ["summarize", "group_rules_summary", "group_rules_line", "scaling_rows", "fmt_s",
           "median"]


def fmt_s(t: float | None) -> str:
    return "-" if t is None else f"{t:.2f}"



def median(xs: list[float]) -> float | None:
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
    verdicts = [p["reach"] for r in rows for p in r.get("solver", {}).get("possible", [])]
    if "solver" in out:
        out["solver"]["misses"] = {reach: verdicts.count(reach) for reach in sorted(set(verdicts))}
    return out


def group_rules_line(g: dict[str, Any]) -> str:
    """The solver's and the baseline's functional-group satisfaction side by side."""
    parts = [f"{who} {v['checks_met']} of {v['checks']} checks ({fmt_s(v['share'])}), every "
             f"group rule met in {v['all_met']} of {v['arrangements']} arrangements"
             + (" (its misses, as the solve settled them: " + ", ".join(
                 f"{n} {reach}" for reach, n in v["misses"].items()) + ")" if v.get("misses") else "")
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
    med = median([t if t is not None else math.inf for t in first]) if first else None
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
        ratios[key] = {"median": median(xs), "n": len(xs)}
    out["ratios"] = ratios
    arr = [a for r in rows for a in r.get("solver", {}).get("arrangements", [])]
    arr += [r["as_is"] for r in rows if "audit_s" in r.get("as_is", {})]
    out["audit_s"] = {"median": median([a["audit_s"] for a in arr]),
                      "max": max((a["audit_s"] for a in arr), default=None)}
    rt = [a["routes_s"] for a in arr if "routes_s" in a]
    out["routes_s"] = {"median": median(rt), "max": max(rt, default=None)}
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

