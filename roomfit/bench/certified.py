"""A certified-feasible corpus: flats whose furniture is known to fit, because a layout that
passes the audit was placed first; then ``solve`` is asked for it from scratch.

Each instance is a generated flat (``roomfit.bench.instances``: rectangle, L and angled
rooms, loose) under the everyday set or one of the bundled wheelchair sets. Its furniture is
placed piece by piece at random positions, turns and rooms (pieces that must stand against a
wall are put flush with a wall of the right facing); a position is kept only when the audit of
the pieces placed so far passes (``audit(widths=False)``). Because the audit is monotone in
obstacles, the last accepted layout passes as a whole; it is audited once more to be sure and
is the *witness*. Instances whose furniture could not be placed in the tries allowed are left
out (counted). The solver never sees the witness.

Reported for each method: the share found within the limit, median and 95th-percentile
time to the first valid layout, and *early give-ups* (any answer other than found before 90 %
of the limit without a proof; "impossible" on a certified instance is a wrong answer and
counted apart). Methods: the solver of this tree; with ``--baseline`` the annealing baseline
(stopping at its first arrangement the audit passes); with ``--solver-tree DIR`` the solver
of another checkout (``roomfit.bench.checkout``), on the same corpus.

``python -m roomfit.bench.certified [--count N] [--pieces K] [--tightness loose|tight]
[--time-limit S] [--seed K] [--baseline] [--solver-tree DIR] [--out FILE] [--write DIR]``
"""

from __future__ import annotations

import argparse
import json
import random
import statistics
import time
from collections.abc import Sequence
from dataclasses import dataclass, replace
from pathlib import Path
from typing import Any

from roomfit.audit.check import audit
from roomfit.audit.geometry import room_polygon, side_direction
from roomfit.bench.instances import SHAPES, InstanceSpec, generate
from roomfit.files import atomic_write
from roomfit.plan.data import Layout, Placement, Plan, RuleChoice
from roomfit.rules.catalog import PieceSpec, resolve_pieces
from roomfit.rules.sets import RuleSet, load_ruleset

__all__ = ["Certified", "SETS", "certify", "corpus", "write_corpus", "solver_rows", "baseline_rows",
           "outcome_row", "summarize", "run", "main"]

#: The everyday set and every bundled wheelchair set.
SETS = ("everyday", "ada-2010", "a117-2017", "iso-21542", "uk-m4-3", "din-18040-r")
#: Random positions tried per piece before an instance is given up.
_TRIES = 150


@dataclass(frozen=True)
class Certified:
    """A flat with its furniture unplaced, the rule set, and a witness layout that passes."""

    name: str
    plan: Plan
    rules: RuleSet
    witness: tuple[tuple[str, Placement], ...]


def _random_spot(plan: Plan, spec: PieceSpec, rng: random.Random) -> Placement:
    """A random (room, turn, position) for ``spec``, flush with a wall when it needs one."""
    room = plan.room(rng.choice(spec.rooms))
    x0, y0, x1, y1 = (int(v) for v in room_polygon(room).bounds)
    rot = rng.choice((0, 90, 180, 270))
    w, d = (spec.width, spec.depth) if rot in (0, 180) else (spec.depth, spec.width)
    x = rng.randint(x0, max(x0, x1 - w))
    y = rng.randint(y0, max(y0, y1 - d))
    if spec.against_wall:  # back flush with the bounding box side it faces
        bx, by = side_direction("back", rot)
        x = x0 if bx < 0 else (x1 - w if bx > 0 else x)
        y = y0 if by < 0 else (y1 - d if by > 0 else y)
    return Placement(x, y, rot, room.id)


def certify(plan: Plan, rules: RuleSet, rng: random.Random) -> tuple[tuple[str, Placement], ...] | None:
    """A layout of every piece of ``plan`` that passes the audit, or None (see the module
    docstring)."""
    specs = resolve_pieces(plan, rules)
    placed: dict[str, Placement] = {}
    for spec in sorted(specs, key=lambda s: -s.width * s.depth):
        for _ in range(_TRIES):
            spot = _random_spot(plan, spec, rng)
            trial = {**placed, spec.id: spot}
            part = replace(plan, furniture=tuple(replace(p, placement=trial[p.id])
                                                 for p in plan.furniture if p.id in trial))
            if audit(part, rules, widths=False).passed:
                placed = trial
                break
        else:
            return None
    layout = tuple((p.id, placed[p.id]) for p in plan.furniture)
    return layout if audit(plan.with_layout(layout), rules).passed else None


def corpus(count: int, seed: int = 0, pieces: int = 3,
           tightness: str = "loose") -> tuple[list[Certified], int]:
    """Up to ``count`` certified instances (one room, ``pieces`` pieces, shapes and sets in
    turn, generated at ``tightness``) and the number of generated flats left out (furniture
    not placed in the tries)."""
    rng = random.Random(seed)
    out: list[Certified] = []
    skipped = 0
    k = 0
    while len(out) < count and k < 4 * count:
        shape, set_id = SHAPES[k % len(SHAPES)], SETS[k % len(SETS)]
        spec = InstanceSpec(rooms=1, pieces=pieces, shape=shape, rules=set_id,
                            tightness=tightness, seed=seed * 1000 + k)
        k += 1
        plan = generate(spec)
        rules = load_ruleset(set_id)
        if not audit(replace(plan, furniture=()), rules, widths=False).passed:
            skipped += 1  # the bare flat fails: no certificate possible
            continue
        witness = certify(plan, rules, rng)
        if witness is None:
            skipped += 1
            continue
        out.append(Certified(spec.name, plan, rules, witness))
    return out, skipped


def write_corpus(items: list[Certified], folder: Path) -> list[Path]:
    """Each instance as a plan file (furniture unplaced, its rule set named) beside its
    witness (``NAME.witness.toml``); the instance files, in corpus order."""
    from roomfit.plan.write import write_plan

    folder.mkdir(parents=True, exist_ok=True)
    paths = []
    for c in items:
        plan = replace(c.plan, rules=RuleChoice(c.rules.id))
        write_plan(plan, folder / f"{c.name}.toml")
        write_plan(plan.with_layout(c.witness), folder / f"{c.name}.witness.toml")
        paths.append(folder / f"{c.name}.toml")
    return paths


def _pct(xs: list[float], q: float) -> float | None:
    if not xs:
        return None
    xs = sorted(xs)
    return xs[min(len(xs) - 1, round(q * (len(xs) - 1)))]


def outcome_row(name: str, rules: str, status: str, found: bool, elapsed: float,
                first: float | None, time_limit: float) -> dict[str, Any]:
    """One instance's outcome for any method, classified: an answer without a layout before
    90 % of the limit is an early give-up unless it claims a proof; "impossible" is wrong."""
    return {"name": name, "rules": rules, "status": status, "found": found,
            "elapsed": round(elapsed, 2), "first": None if first is None else round(first, 3),
            "early_give_up": not found and status != "impossible" and elapsed < 0.9 * time_limit,
            "wrong_impossible": status == "impossible"}


def solver_rows(items: list[Certified], time_limit: float, seed: int = 0) -> list[dict[str, Any]]:
    """Solve every instance from scratch with this tree's solver (one candidate)."""
    from roomfit.solve.search import SolveOptions, solve

    rows = []
    for c in items:
        started = time.monotonic()
        result = solve(c.plan, c.rules, SolveOptions(candidates=1, time_limit=time_limit,
                                                     seed=seed))
        found = bool(result.candidates)
        rows.append(outcome_row(c.name, c.rules.id, str(result.status), found,
                                time.monotonic() - started,
                                result.stats.time_to_first if found else None, time_limit))
    return rows


def baseline_rows(items: list[Certified], time_limit: float, seed: int = 0) -> list[dict[str, Any]]:
    """The annealing baseline on every instance, judged by the audit, stopping at its first
    arrangement the audit passes; "found" only when the returned arrangement passes again
    (its time is the judge's acceptance, or the end of the run when the judge, asked at most
    every 0.05 s, never saw that state)."""
    from roomfit.bench.baseline import AnnealOptions, anneal

    rows = []
    for c in items:
        def judge(layout: Layout, c: Certified = c) -> bool:
            return audit(c.plan.with_layout(layout), c.rules).passed

        res = anneal(c.plan, c.rules, AnnealOptions(time_limit=time_limit, seed=seed,
                                                     stop_when_valid=True), judge=judge)
        found = audit(c.plan.with_layout(res.layout), c.rules).passed
        # a valid state the judge was never asked about is known valid only at the end
        first = (res.elapsed if res.time_to_valid is None else res.time_to_valid) if found else None
        # the baseline proves nothing and gives up only at its limit
        rows.append(outcome_row(c.name, c.rules.id, "found" if found else "none", found,
                                res.elapsed, first, time_limit))
    return rows


def summarize(rows: list[dict[str, Any]], time_limit: float) -> dict[str, Any]:
    """Share found, median and 95th-percentile first valid (over the found ones), early
    give-ups and wrong "impossible" answers."""
    firsts = [r["first"] for r in rows if r["first"] is not None]
    return {"instances": len(rows),
            "found": sum(r["found"] for r in rows),
            "found_share": round(sum(r["found"] for r in rows) / len(rows), 3) if rows else None,
            "first_median": round(statistics.median(firsts), 3) if firsts else None,
            "first_p95": _pct(firsts, 0.95),
            "first_max": max(firsts, default=None),
            "early_give_ups": sum(r["early_give_up"] for r in rows),
            "wrong_impossible": sum(r["wrong_impossible"] for r in rows),
            "time_limit": time_limit}


def run(items: list[Certified], time_limit: float, seed: int = 0) -> dict[str, Any]:
    """This tree's solver on every instance: its rows and summary."""
    rows = solver_rows(items, time_limit, seed)
    return {"rows": rows, "summary": summarize(rows, time_limit)}


def _print(label: str, rows: list[dict[str, Any]], summary: dict[str, Any]) -> None:
    print(f"-- {label}")
    for r in rows:
        print(f"{r['name']:<40} {r['rules']:<12} {r['status']:<10} first "
              f"{r['first'] if r['first'] is not None else '-'}  ({r['elapsed']} s)")
    print(json.dumps(summary, indent=2))


def main(argv: Sequence[str] | None = None) -> int:
    """Build the corpus, solve it with each method asked for, print the summaries."""
    p = argparse.ArgumentParser(prog="python -m roomfit.bench.certified",
                                description="A certified-feasible corpus (a witness layout "
                                "that passes the audit is placed first), solved from scratch.")
    p.add_argument("--count", type=int, default=12, help="instances (default 12)")
    p.add_argument("--pieces", type=int, default=3, help="pieces per room (default 3)")
    p.add_argument("--tightness", choices=("loose", "tight"), default="loose")
    p.add_argument("--time-limit", type=float, default=20.0, help="seconds per instance and method")
    p.add_argument("--seed", type=int, default=0, help="corpus and solver seed (default 0)")
    p.add_argument("--baseline", action="store_true", help="also run the annealing baseline")
    p.add_argument("--solver-tree", type=Path, default=None, metavar="DIR",
                   help="also solve the corpus with the roomfit checkout in DIR (another commit)")
    p.add_argument("--out", type=Path, default=None, help="JSON results")
    p.add_argument("--write", type=Path, default=None,
                   help="folder for the instances and their witnesses as plan files")
    args = p.parse_args(argv)
    items, skipped = corpus(args.count, args.seed, args.pieces, args.tightness)
    if args.write is not None:
        write_corpus(items, args.write)
    results: dict[str, Any] = {"corpus": {"count": len(items), "skipped": skipped,
                                          "pieces": args.pieces, "tightness": args.tightness,
                                          "seed": args.seed}}
    methods = {"solver": solver_rows(items, args.time_limit, args.seed)}
    if args.baseline:
        methods["baseline"] = baseline_rows(items, args.time_limit, args.seed)
    if args.solver_tree is not None:
        from roomfit.bench.checkout import solve_in_tree

        rows, commit = solve_in_tree(args.solver_tree, items, args.time_limit, args.seed)
        methods["previous"] = rows
        results["previous_commit"] = commit
    for label, rows in methods.items():
        results[label] = {"rows": rows, "summary": summarize(rows, args.time_limit)}
        _print(label, rows, results[label]["summary"])
    if args.out is not None:
        atomic_write(args.out, json.dumps(results, indent=1) + "\n")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
