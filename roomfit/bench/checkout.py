"""The certified corpus solved by another checkout's solver, for a before-and-after line.

The corpus is written as plan files (:func:`roomfit.bench.certified.write_corpus`) and a
child Python process with ``PYTHONPATH`` set to the other checkout reads and solves each one
with that checkout's own reader, rule sets and solver (``roomfit.plan.read.read_plan``,
``roomfit.rules.sets.rules_for``, ``roomfit.solve.search.solve``, one candidate), printing one
JSON line per plan with the layout it found. That layout is judged again by this tree's
audit: "found" means it passes here (the other checkout's own audit may be older and differ;
``found_by_own_audit`` keeps what it said), and the outcomes are then classified exactly as
for this tree's solver. Make the other checkout with ``git worktree add --detach /tmp/old
COMMIT``; its commit is recorded.
"""

from __future__ import annotations

import json
import os
import subprocess
import sys
import tempfile
from pathlib import Path
from typing import Any

from roomfit.audit.check import audit
from roomfit.bench.certified import Certified, outcome_row, write_corpus
from roomfit.plan.data import Placement

__all__ = ["solve_in_tree", "tree_commit"]

#: Run in the other checkout: solve each plan file named on the command line.
_CHILD = """
import json, sys, time
from roomfit.plan.read import read_plan
from roomfit.rules.sets import rules_for
from roomfit.solve.search import SolveOptions, solve
limit, seed = float(sys.argv[1]), int(sys.argv[2])
for path in sys.argv[3:]:
    plan = read_plan(path)
    started = time.monotonic()
    r = solve(plan, rules_for(plan), SolveOptions(candidates=1, time_limit=limit, seed=seed))
    best = r.candidates[0].layout if r.candidates else ()
    layout = [[pid, p.x, p.y, p.rotation, p.room] for pid, p in best]
    print(json.dumps({"status": str(r.status), "found": bool(r.candidates),
                      "elapsed": time.monotonic() - started,
                      "first": r.stats.time_to_first, "layout": layout}), flush=True)
"""


def tree_commit(tree: Path) -> str | None:
    """The commit checked out in ``tree`` (None when it is not a git checkout)."""
    try:
        out = subprocess.run(["git", "-C", str(tree), "rev-parse", "HEAD"], capture_output=True,
                             text=True, timeout=10)
    except (OSError, subprocess.SubprocessError):
        return None
    return out.stdout.strip() or None


def solve_in_tree(tree: Path, items: list[Certified], time_limit: float,
                  seed: int = 0) -> tuple[list[dict[str, Any]], str | None]:
    """Rows for every instance solved by the checkout in ``tree``, and its commit. A plan
    that checkout cannot read or solve stops the run with the child's message."""
    if not (tree / "roomfit" / "solve" / "search.py").is_file():
        raise FileNotFoundError(f"{tree} holds no roomfit checkout with roomfit/solve/search.py")
    with tempfile.TemporaryDirectory(prefix="roomfit-corpus-") as tmp:
        paths = write_corpus(items, Path(tmp))
        env = {**os.environ, "PYTHONPATH": str(tree.resolve())}
        proc = subprocess.run([sys.executable, "-c", _CHILD, str(time_limit), str(seed),
                               *map(str, paths)], capture_output=True, text=True, env=env,
                              cwd=str(tree), timeout=len(items) * (time_limit + 60) + 60)
    lines = [json.loads(x) for x in proc.stdout.splitlines() if x.startswith("{")]
    if proc.returncode != 0 or len(lines) != len(items):
        raise RuntimeError(f"the solver in {tree} stopped: {proc.stderr.strip()[-500:]}")
    rows = []
    for c, r in zip(items, lines, strict=True):
        # judged by this tree's audit too: the other checkout's own audit may differ
        passes = bool(r["found"]) and _passes_here(c, r["layout"])
        row = outcome_row(c.name, c.rules.id, r["status"], passes, r["elapsed"],
                          r["first"] if passes else None, time_limit)
        rows.append({**row, "found_by_own_audit": bool(r["found"])})
    return rows, tree_commit(tree)


def _passes_here(c: Certified, layout: list[list[Any]]) -> bool:
    """Whether the other checkout's layout passes this tree's audit."""
    placed = tuple((str(pid), Placement(int(x), int(y), int(rot), str(room)))
                   for pid, x, y, rot, room in layout)
    return audit(c.plan.with_layout(placed), c.rules).passed
