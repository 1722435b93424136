"""The benchmark's main run: every section in one process, one results file, the plots.

``python -m roomfit.bench [--quick] [--seed K] [--out results.json] [--time-budget S]
[--only PART] [--no-samples] [--previous-tree DIR] [--markdown RESULTS]`` runs

- the **suite** (:mod:`roomfit.bench.suite`): generated flats and the sample plans, the
  solver and the annealing baseline side by side, audit and route-scoring times;
- the **certified-feasible corpus** (:mod:`roomfit.bench.certified`): the solver, the
  baseline and, with ``--previous-tree``, another checkout's solver on the same instances;
- **one room** of 10 to 40 pieces (:mod:`roomfit.bench.one_room`);
- the **summary table** of a solve, carried against recomputed results
  (:mod:`roomfit.bench.carried`);
- **route scoring against corners** of a sawtooth wall (:mod:`roomfit.bench.vertices`),

writes the results as JSON with the machine recorded, the plots as SVG next to it, and prints
a summary. Progress goes to stderr. See ``docs/benchmarks.md``.
"""

from __future__ import annotations

import argparse
import json
import sys
import time
from collections.abc import Callable, Sequence
from pathlib import Path
from typing import Any

from roomfit.bench.machine import code_version, load_average, machine
from roomfit.bench.measure import run_instance
from roomfit.bench.plot import found_svg, scaling_svg
from roomfit.bench.suite import DOCS, PLANS, TARGETS, BenchConfig, suite
from roomfit.bench.summary import group_rules_line, scaling_rows, summarize
from roomfit.bench.tables import markdown, sections_text, table
from roomfit.files import atomic_write

__all__ = ["PARTS", "SECTIONS", "run", "main"]

#: The parts ``--only`` can pick: parts of the suite, then the sections after it.
PARTS = ("solver", "baseline", "audit")
SECTIONS = ("certified", "one-room", "summary-table", "vertices")

Say = Callable[[str], None]


def _corpus_group(pieces: int, tightness: str, count: int, limit: float, config: BenchConfig,
                  say: Say) -> dict[str, Any]:
    """One group of the certified corpus solved by every method: this tree's solver, the
    baseline and, with ``config.previous_tree``, that checkout's solver."""
    from roomfit.bench.certified import baseline_rows, corpus, solver_rows
    from roomfit.bench.certified import summarize as cs

    items, skipped = corpus(count, config.seed, pieces=pieces, tightness=tightness)
    say(f"certified corpus, {pieces} pieces {tightness}: {len(items)} instances "
        f"({skipped} generated flats left out)")
    out: dict[str, Any] = {"pieces": pieces, "tightness": tightness, "count": len(items),
                           "skipped": skipped, "methods": {}}
    methods: dict[str, Callable[[], list[dict[str, Any]]]] = {
        "solver": lambda: solver_rows(items, limit, config.seed),
        "baseline": lambda: baseline_rows(items, limit, config.seed)}
    tree = config.previous_tree
    if tree is not None:
        from roomfit.bench.checkout import solve_in_tree

        methods["previous"] = lambda: solve_in_tree(tree, items, limit, config.seed)[0]
    for label, rows_of in methods.items():
        rows = rows_of()
        s = cs(rows, limit)
        out["methods"][label] = {"rows": rows, "summary": s}
        say(f"certified, {pieces} pieces {tightness}, {label}: found {s['found']} of "
            f"{s['instances']}, first valid median {s['first_median']} s, p95 {s['first_p95']} s, "
            f"early give-ups {s['early_give_ups']}, wrong impossible {s['wrong_impossible']}")
    return out


def _certified(config: BenchConfig, say: Say) -> dict[str, Any]:
    """The certified corpus: one-room instances of 5 pieces (tight) and of 10 pieces
    (loose), 6 of each at 10 s with ``--quick``, 18 of each at 20 s otherwise."""
    from roomfit.bench.checkout import tree_commit

    count, limit = (6, 10.0) if config.quick else (18, 20.0)
    tree = config.previous_tree
    return {"time_limit_s": limit,
            "previous_commit": None if tree is None else tree_commit(tree),
            "groups": [_corpus_group(5, "tight", count, limit, config, say),
                       _corpus_group(10, "loose", count, limit, config, say)]}


def _summary_table(config: BenchConfig, say: Say) -> list[dict[str, Any]]:
    """Issue 10's line on the sample plans (all four with the full run, two with ``--quick``)."""
    from roomfit.bench.carried import measure
    from roomfit.bench.instances import sample_instances
    from roomfit.rules.sets import rules_for

    samples = sample_instances(PLANS)[: 2 if config.quick else None]
    return [measure(s.name, s.plan, rules_for(s.plan), config.time_budget, config.seed, say)
            for s in samples]


def _sections(config: BenchConfig, say: Say) -> dict[str, Any]:
    """The sections after the suite that ``config.only`` asks for (all when it is None)."""
    from roomfit.bench import one_room, vertices

    wanted = [s for s in SECTIONS if config.only in (None, s)]
    out: dict[str, Any] = {}
    if "certified" in wanted:
        out["certified"] = _certified(config, say)
    if "one-room" in wanted:
        limit = 10.0 if config.quick else 30.0
        out["one_room"] = one_room.series(one_room.SIZES, limit, config.seed, say)
    if "summary-table" in wanted:
        out["summary_table"] = _summary_table(config, say)
    if "vertices" in wanted:
        sizes = vertices.QUICK_SIZES if config.quick else vertices.FULL_SIZES
        out["vertices"] = vertices.measure_sizes(sizes, say)
    return out


def _plots(results: dict[str, Any], out: Path, quick: bool) -> None:
    mode = "quick" if quick else "full"
    if results["scaling"]:
        atomic_write(out.with_suffix(".svg"),
                     scaling_svg(results["scaling"], f"roomfit benchmark ({mode}): time against pieces"))
    cert = results["sections"].get("certified")
    if cert:
        groups = cert["groups"]
        prev = (cert.get("previous_commit") or "?")[:7]
        names = {"solver": "solver", "baseline": "baseline", "previous": f"previous ({prev})"}
        series = [(names.get(label, label), [r["first"] for g in groups
                                             for r in g["methods"][label]["rows"]])
                  for label in groups[0]["methods"]]
        sizes = " and ".join(f"{g['count']} of {g['pieces']} pieces" for g in groups)
        atomic_write(out.with_name(out.stem + "-certified.svg"),
                     found_svg(series, cert["time_limit_s"], f"certified corpus ({mode}): {sizes}"))


def _prefixed(say: Say, prefix: str) -> Say:
    def said(msg: str) -> None:
        say(f"{prefix}: {msg}")
    return said


def run(config: BenchConfig, out: Path, say: Say) -> dict[str, Any]:
    """Run the suite and the sections, write the JSON (and the plots next to it), return the
    results."""
    started = time.time()
    host = machine()
    rows = []
    if config.only in (None, *PARTS):
        insts = suite(config)
        for k, inst in enumerate(insts, 1):
            prefix = f"[{k}/{len(insts)}] {inst.name}"
            say(f"{prefix}: {len(inst.plan.rooms)} rooms, {len(inst.plan.furniture)} pieces")
            rows.append(run_instance(inst, config, _prefixed(say, prefix)))
    results: dict[str, Any] = {
        "format": "roomfit-bench/2",
        "started_utc": time.strftime("%Y-%m-%dT%H:%M:%SZ", time.gmtime(started)),
        "machine": host,
        "code": code_version(),
        "config": {"quick": config.quick, "seed": config.seed, "time_budget_s": config.time_budget,
                   "only": config.only, "candidates": config.candidates,
                   "previous_tree": None if config.previous_tree is None else str(config.previous_tree)},
        "targets": TARGETS,
        "instances": rows,
        "scaling": scaling_rows(rows),
        "summary": summarize(rows),
        "sections": _sections(config, say) if not config.instances else {},
    }
    results["wall_s"] = round(time.time() - started, 1)
    results["load_average_end"] = load_average()
    atomic_write(out, json.dumps(results, indent=1, allow_nan=False) + "\n")
    _plots(results, out, config.quick)
    return results


def _parser() -> argparse.ArgumentParser:
    p = argparse.ArgumentParser(
        prog="python -m roomfit.bench",
        description="Benchmark roomfit: the solver against a simulated-annealing baseline on "
        "generated flats and the sample plans; a certified-feasible corpus (solver, baseline "
        "and optionally an older checkout's solver); one room of 10 to 40 pieces; the solve "
        "summary table from carried against recomputed results; route scoring against the "
        "corners of a sawtooth wall. Results as JSON, plots as SVG, a summary on stdout.")
    p.add_argument("--quick", action="store_true",
                   help="small sizes of every part (about 6 minutes on 2 cores)")
    p.add_argument("--seed", type=int, default=0, help="master seed (default 0)")
    p.add_argument("--out", type=Path, default=None,
                   help="results file (default docs/bench-quick.json or docs/bench-full.json); "
                        "plots go next to it as .svg and -certified.svg")
    p.add_argument("--time-budget", type=float, default=None,
                   help="seconds per suite instance for the solver and for the baseline alike, "
                        "and per solve of the summary-table section (default 4 quick, 20 full)")
    p.add_argument("--only", choices=(*PARTS, *SECTIONS), default=None,
                   help="one part: the suite's solver, baseline or audit timings, or one section")
    p.add_argument("--no-samples", action="store_true", help="leave the sample plans out of the suite")
    p.add_argument("--previous-tree", type=Path, default=None, metavar="DIR",
                   help="also solve the certified corpus with the roomfit checkout in DIR "
                        "(e.g. git worktree add /tmp/old COMMIT); its commit is recorded")
    p.add_argument("--markdown", type=Path, default=None, metavar="RESULTS",
                   help="print the tables of an earlier results file as Markdown and stop")
    return p


def main(argv: Sequence[str] | None = None) -> int:
    p = _parser()
    args = p.parse_args(argv)
    if args.markdown is not None:
        print(markdown(json.loads(args.markdown.read_text(encoding="utf-8"))), end="")
        return 0
    budget = args.time_budget if args.time_budget is not None else (4.0 if args.quick else 20.0)
    if budget <= 0:
        p.error("--time-budget must be greater than 0")
    if args.previous_tree is not None and not (args.previous_tree / "roomfit").is_dir():
        p.error(f"--previous-tree {args.previous_tree}: no roomfit checkout there")
    config = BenchConfig(quick=args.quick, seed=args.seed, time_budget=budget, only=args.only,
                         samples=not args.no_samples, previous_tree=args.previous_tree)
    out = args.out or DOCS / ("bench-quick.json" if args.quick else "bench-full.json")

    def say(msg: str) -> None:
        print(msg, file=sys.stderr, flush=True)

    results = run(config, out, say)
    if results["instances"]:
        print(table(results["instances"]))
        print()
        for name, t in results["summary"]["targets"].items():
            detail = json.dumps({k: v for k, v in t.items() if k != "met"})
            verdict = {True: "met", False: "MISSED", None: "not measured"}[t["met"]]
            print(f"{name}: {verdict}  {detail}")
        print(group_rules_line(results["summary"].get("group_rules", {})))
    print(sections_text(results["sections"]), end="")
    print(f"\nresults: {out}")
    return 0
