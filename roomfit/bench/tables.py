"""Benchmark results as tables: plain text for the terminal, Markdown for the docs."""

from __future__ import annotations

from typing import Any

from roomfit.bench.summary import fmt_s, group_rules_line

__all__ = ["table", "markdown", "section_tables", "sections_text", "sections_markdown"]


def _cells(r: dict[str, Any]) -> dict[str, str]:
    """One instance's results as formatted cells, shared by the text and Markdown tables."""
    s, b = r.get("solver", {}), r.get("baseline", {})
    pr = s.get("pass_rate")
    return {
        "name": r["name"], "rooms": str(r["rooms"]), "pieces": str(r["pieces"]),
        "share": f"{r['floor_share']:.2f}",
        "status": str(s.get("status", "error" if "error" in s else "-")),
        "first": fmt_s(s.get("time_first_valid_s")), "all": fmt_s(s.get("time_all_s")),
        "cand": str(s.get("candidates", "-")), "pass": "-" if pr is None else f"{pr:.0%}",
        "rounds": str(s.get("rounds", "-")), "peak": str(s.get("peak_mb", "-")),
        "sa_ok": "-" if "success" not in b else ("yes" if b["success"] else "no"),
        "sa_first": fmt_s(b.get("time_first_valid_s")),
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
    """Markdown tables of a results file: targets, the baseline comparison, scaling, then
    the sections after the suite."""
    if not results["instances"]:
        return _machine_line(results) + "\n\n" + sections_markdown(results.get("sections", {}))
    return _suite_markdown(results) + "\n" + sections_markdown(results.get("sections", {}))


def _machine_line(results: dict[str, Any]) -> str:
    m, code = results["machine"], results.get("code", {})
    return (f"Code: commit {code.get('commit')}{' with uncommitted changes' if code.get('dirty') else ''}. "
            f"Machine: {m['cpu']}, {m['cpu_count']} CPUs, Python {m['python']}, OR-Tools "
            f"{m['ortools']}, shapely {m['shapely']}; load average at start "
            f"{m.get('load_average')}, at end {results.get('load_average_end')}; "
            f"budget {results['config']['time_budget_s']} s per instance; run took "
            f"{results['wall_s']} s.")


def _suite_markdown(results: dict[str, Any]) -> str:
    """The suite's tables: targets, one row per instance, group rules, ratios, timings."""
    summ = results["summary"]
    lines = [_machine_line(results), "",
             "| target | goal | measured | met |", "|---|---|---|---|"]
    t = summ["targets"]
    fv = t["first_valid_1room_10"]
    lines.append(f"| one room, 10 pieces: first valid (median) | < {fv['target_s']} s | "
                 f"{fmt_s(fv['median_s'])} s (runs: {', '.join(fmt_s(x) for x in fv['times_s'])}; "
                 f"found in {fv.get('found', '?')} of {fv.get('runs', '?')}) | "
                 f"{_yes(fv['met'])} |")
    for key, what in (("three_rooms_25_3cand", "three rooms, 25 pieces: 3 candidates"),
                      ("impossible_explained", "impossible room explained")):
        tt = t[key]
        lines.append(f"| {what} | < {tt['target_s']} s | "
                     f"{', '.join(fmt_s(x) for x in tt['times_s'])} s | {_yes(tt['met'])} |")
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



Table = tuple[str, list[str], list[list[str]]]

_METHOD = {"solver": "solver (this tree)", "baseline": "annealing baseline"}


def _certified_tables(cert: dict[str, Any]) -> list[Table]:
    head = ["method", "found", "first valid: median s", "p95 s", "max s", "early give-ups",
            "wrong \"impossible\""]
    prev = cert.get("previous_commit")
    names = {**_METHOD, "previous": f"previous solver ({(prev or '?')[:7]})"}
    out = []
    for g in cert["groups"]:
        rows = [[names.get(label, label), f"{s['found']} of {s['instances']}",
                 fmt_s(s["first_median"]), fmt_s(s["first_p95"]), fmt_s(s["first_max"]),
                 str(s["early_give_ups"]), str(s["wrong_impossible"])]
                for label, m in g["methods"].items() for s in [m["summary"]]]
        title = (f"Certified corpus: {g['count']} one-room flats of {g['pieces']} pieces "
                 f"({g['tightness']}), limit {cert['time_limit_s']:g} s")
        out.append((title, head, rows))
    return out


def _one_room_table(rows: list[dict[str, Any]]) -> Table:
    from roomfit.bench.one_room import words

    return ("One room, 10 to 40 pieces (everyday, loose, one candidate)",
            ["pieces", "result", "whole solve s", "layouts cut"],
            [[str(r["pieces"]), words(r), fmt_s(r["elapsed_s"]), str(r["cuts"])] for r in rows])


def _summary_table_table(rows: list[dict[str, Any]]) -> Table:
    return ("Solve to summary table: results recomputed (before) or carried (after)",
            ["plan", "candidates", "recomputed s", "carried s", "drawing s (both)", "same cells"],
            [[r["name"], str(r["candidates"]), fmt_s(r.get("before_s")),
              "-" if r.get("after_s") is None else f"{r['after_s']:.6f}", fmt_s(r.get("draw_s")),
              {True: "yes", False: "NO", None: "-"}[r.get("same_cells")]] for r in rows])


def _vertices_table(rows: list[dict[str, Any]]) -> Table:
    return ("Route scoring against corners (sawtooth wall, 4 pieces, 5 trips)",
            ["corners", "route scoring s", "audit s", "graph nodes", "edges", "simplified mm",
             "trips reached", "audit"],
            [[str(r["vertices"]), fmt_s(r["routes_s"]), fmt_s(r["audit_s"]),
              f"{r['detail'].get('nodes', 0):.0f}", f"{r['detail'].get('edges', 0):.0f}",
              f"{r['detail'].get('simplified_mm', 0):g}", f"{r['reachable']} of {r['trips']}",
              "pass" if r["audit_passed"] else "fail"] for r in rows])


def section_tables(sections: dict[str, Any]) -> list[Table]:
    """The sections after the suite as (title, header, rows) tables, in run order."""
    out: list[Table] = []
    if "certified" in sections:
        out += _certified_tables(sections["certified"])
    if "one_room" in sections:
        out.append(_one_room_table(sections["one_room"]))
    if "summary_table" in sections:
        out.append(_summary_table_table(sections["summary_table"]))
    if "vertices" in sections:
        out.append(_vertices_table(sections["vertices"]))
    return out


def sections_text(sections: dict[str, Any]) -> str:
    """The section tables as aligned plain text."""
    parts = []
    for title, head, rows in section_tables(sections):
        widths = [max(len(x) for x in col) for col in zip(head, *rows, strict=True)]
        lines = [title, "  ".join(h.ljust(w) for h, w in zip(head, widths, strict=True))]
        lines += ["  ".join(c.ljust(w) for c, w in zip(r, widths, strict=True)) for r in rows]
        parts.append("\n".join(lines))
    return "".join(f"\n{p}\n" for p in parts)


def sections_markdown(sections: dict[str, Any]) -> str:
    """The section tables in Markdown, each under its title in bold."""
    parts = []
    for title, head, rows in section_tables(sections):
        lines = [f"**{title}**", "", "| " + " | ".join(head) + " |", "|" + "---|" * len(head)]
        lines += ["| " + " | ".join(r) + " |" for r in rows]
        parts.append("\n".join(lines) + "\n")
    return "\n".join(parts)
