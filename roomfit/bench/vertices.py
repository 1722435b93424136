"""Route scoring against the number of corners of the free floor: a sawtooth wall.

One room 20 m by 5 m (a long gallery; invented) whose north wall is a sawtooth of ``n``
corners in all, 50 mm deep; the pitch shrinks as ``n`` grows, so the room and its furniture
stay the same and only the corner count changes. Four plain boxes stand against the south
wall, the entrance is in the south wall, and the routine walks from the entrance to each box
and from the first box to the last (five trips). The plan is built in code: a plan file may
hold at most 1,000 corners per outline (``roomfit.plan.limits``), so the larger rooms here
measure the route scorer's own bound, not what a user can load.

Measured per size: ``roomfit.audit.routes.score_routes`` and ``roomfit.audit.check.audit``
times, and ``roomfit.audit.routes.scoring_detail`` (walkway parts, visibility-graph nodes
and edges, the simplification tolerance used) beside them.
"""

from __future__ import annotations

import time
from collections.abc import Callable, Sequence
from typing import Any

from roomfit.audit.check import audit
from roomfit.audit.routes import score_routes, scoring_detail
from roomfit.plan.data import OUTSIDE, Door, Leaf, Piece, Placement, Plan, Point, Room, RuleChoice, Trip
from roomfit.rules.sets import load_ruleset

__all__ = ["QUICK_SIZES", "FULL_SIZES", "sawtooth_plan", "measure", "measure_sizes"]

#: Corner counts measured by ``--quick`` and by the full run.
QUICK_SIZES = (1_000, 10_000)
FULL_SIZES = (250, 500, 1_000, 2_000, 5_000, 10_000)

_WIDTH, _DEPTH, _TOOTH = 20_000, 5_000, 50  # mm


def _north_wall(n: int) -> list[Point]:
    """The sawtooth from the north-east corner back to the north-west one: ``n - 4`` inner
    corners, alternately 50 mm out and on the wall line, evenly spaced (integer mm)."""
    k = n - 4
    if k < 1 or _WIDTH // (k + 1) < 1:
        raise ValueError(f"a sawtooth of {n} corners does not fit a {_WIDTH} mm wall")
    return [(_WIDTH - _WIDTH * i // (k + 1), _DEPTH + (_TOOTH if i % 2 else 0))
            for i in range(1, k + 1)]


def sawtooth_plan(n: int) -> Plan:
    """The gallery with a north wall of ``n`` corners in all (the outline has ``n``
    vertices), its four boxes placed and its five trips (see the module docstring)."""
    outline = ((0, 0), (_WIDTH, 0), (_WIDTH, _DEPTH), *_north_wall(n), (0, _DEPTH))
    room = Room("gallery", "Gallery", "living", outline)
    door = Door("d-entrance", ("gallery", OUTSIDE), (1_000, 0), 900, Leaf.HINGED, "gallery", "left")
    pieces = tuple(
        Piece(f"box-{k}", "custom", ("gallery",), f"Box {k}", 1_000, 500, 900,
              placement=Placement(4_000 * k, 0, 0, "gallery"))
        for k in range(1, 5))
    trips = tuple(Trip("entrance", p.id, 2.0, f"Entrance to {p.id}") for p in pieces)
    trips += (Trip("box-1", "box-4", 1.0, "Box 1 to box 4"),)
    return Plan(name=f"Sawtooth gallery, {n} corners", rooms=(room,), doors=(door,),
                furniture=pieces, routines=trips, rules=RuleChoice("everyday"),
                notes="Generated benchmark plan (invented).")


def measure(n: int) -> dict[str, Any]:
    """Times (s) of route scoring and of the audit on the ``n``-corner gallery, with what the
    route scorer built and what it found."""
    plan = sawtooth_plan(n)
    rules = load_ruleset("everyday")
    t = time.perf_counter()
    scores = score_routes(plan, rules)
    routes_s = time.perf_counter() - t
    t = time.perf_counter()
    verdict = audit(plan, rules)
    audit_s = time.perf_counter() - t
    detail = scoring_detail(plan, rules)
    return {"vertices": len(plan.rooms[0].outline), "routes_s": round(routes_s, 3),
            "audit_s": round(audit_s, 3), "trips": len(scores.trips),
            "reachable": sum(t.reachable for t in scores.trips),
            "walking_m_per_day": round(scores.walking_m_per_day, 1),
            "audit_passed": verdict.passed,
            "detail": {k: round(v, 3) for k, v in detail.items()}}


def measure_sizes(sizes: Sequence[int], say: Callable[[str], None]) -> list[dict[str, Any]]:
    """:func:`measure` for each corner count, in order."""
    rows = []
    for n in sizes:
        row = measure(n)
        say(f"route scoring, {n} corners: {row['routes_s']:.2f} s "
            f"({row['detail'].get('nodes', 0):.0f} graph nodes), audit {row['audit_s']:.2f} s")
        rows.append(row)
    return rows
