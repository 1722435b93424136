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

Reported: the share found within the limit, median and 95th-percentile time to the first
valid layout, and *early give-ups* (any answer other than found before the limit without a
proof; "impossible" on a certified instance is a wrong answer and counted apart).

``python -m roomfit.bench.certified [--count N] [--pieces K] [--tightness loose|tight]
[--time-limit S] [--out FILE] [--write DIR]``
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
from roomfit.plan.data import Placement, Plan
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import RuleSet, load_ruleset

__all__ = ["Certified", "SETS", "certify", "corpus", "run", "main"]

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


def _random_spot(plan: Plan, spec, rng: random.Random) -> Placement:
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


def _pct(xs: list[float], q: float) -> float | None:
    if not xs:
        return None
    xs = sorted(xs)
    return xs[min(len(xs) - 1, round(q * (len(xs) - 1)))]


def run(items: list[Certified], time_limit: float, seed: int = 0) -> dict[str, Any]:
    """Solve every instance from scratch; rows and the summary (see the module docstring)."""
    from roomfit.solve.search import SolveOptions, solve

    rows: list[dict[str, Any]] = []
    for c in items:
        started = time.monotonic()
        result = solve(c.plan, c.rules, SolveOptions(candidates=1, time_limit=time_limit,
                                                     seed=seed))
        elapsed = time.monotonic() - started
        rows.append({"name": c.name, "rules": c.rules.id, "status": str(result.status),
                     "found": bool(result.candidates), "elapsed": round(elapsed, 2),
                     "first": result.stats.time_to_first,
                     "early_give_up": not result.candidates and result.status != "impossible"
                     and elapsed < 0.9 * time_limit,
                     "wrong_impossible": result.status == "impossible"})
    firsts = [r["first"] for r in rows if r["first"] is not None]
    summary = {"instances": len(rows), "found_share": (sum(r["found"] for r in rows) / len(rows)
                                                       if rows else None),
               "first_median": statistics.median(firsts) if firsts else None,
               "first_p95": _pct(firsts, 0.95),
               "early_give_ups": sum(r["early_give_up"] for r in rows),
               "wrong_impossible": sum(r["wrong_impossible"] for r in rows),
               "time_limit": time_limit}
    return {"rows": rows, "summary": summary}


def main(argv: Sequence[str] | None = None) -> int:
    """Build the corpus, solve it, print the summary; ``--write DIR`` also writes each
    instance as a plan file (furniture unplaced) beside its witness, for other solvers."""
    p = argparse.ArgumentParser(prog="python -m roomfit.bench.certified")
    p.add_argument("--count", type=int, default=12)
    p.add_argument("--pieces", type=int, default=3)
    p.add_argument("--tightness", choices=("loose", "tight"), default="loose")
    p.add_argument("--time-limit", type=float, default=20.0)
    p.add_argument("--seed", type=int, default=0)
    p.add_argument("--out", type=Path, default=None, help="JSON results")
    p.add_argument("--write", type=Path, default=None, help="folder for the instances")
    args = p.parse_args(argv)
    items, skipped = corpus(args.count, args.seed, args.pieces, args.tightness)
    if args.write is not None:
        from roomfit.plan.data import RuleChoice
        from roomfit.plan.write import write_plan

        args.write.mkdir(parents=True, exist_ok=True)
        for c in items:
            plan = replace(c.plan, rules=RuleChoice(c.rules.id))
            write_plan(plan, args.write / f"{c.name}.toml")
            write_plan(plan.with_layout(c.witness), args.write / f"{c.name}.witness.toml")
    results = run(items, args.time_limit, args.seed)
    results["summary"]["skipped"] = skipped
    for r in results["rows"]:
        print(f"{r['name']:<40} {r['rules']:<12} {r['status']:<10} first "
              f"{r['first'] if r['first'] is not None else '-'}  ({r['elapsed']} s)")
    print(json.dumps(results["summary"], indent=2))
    if args.out is not None:
        args.out.write_text(json.dumps(results, indent=2), encoding="utf-8")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
