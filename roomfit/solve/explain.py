"""Say why furniture cannot fit, in plain words, and what would make it fit.

Two steps. First quick pre-checks that are proofs on their own, independent of the model:
a piece larger than the bounding box of every room it may stand in (in both turns), or the
pieces assigned to a room needing more floor than the room has once fittings, their use
zones and the door clearances are taken out (footprints may not overlap each other nor those;
a rug is floor to them and not counted).

Then the model: every rule group (each piece's presence, its use zones, its wall, each
room's turning space, each door's clearance, each window band, each fitting's use zone) sits
behind an assumption literal; CP-SAT, solving the feasibility model with one worker and no
objective, returns a sufficient set of assumptions for infeasibility. We shrink that set to a
minimal clash by dropping one group at a time, then test single relaxations: leaving out a
piece, or the next smaller catalogue type of the same category.

"Impossible" here means impossible in the model: positions on the grid or flush against a
wall, angled walls covered conservatively. The pre-checks hold for any position.
"""

from __future__ import annotations

import time
from dataclasses import dataclass, replace

from ortools.sat.python import cp_model
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit.geometry import (
    door_shapes,
    fixture_polygon,
    fixture_zone,
    lies_flat,
    room_polygon,
)
from roomfit.plan.data import Plan
from roomfit.rules.catalog import PieceSpec, load_catalog
from roomfit.rules.sets import RuleSet
from roomfit.solve.model import build_model, tune

__all__ = ["Explanation", "Fix", "precheck", "explain"]


@dataclass(frozen=True)
class Fix:
    """A change that may make the furniture fit: leave out piece ``piece`` (``swap`` None),
    give it the catalogue type ``swap``, or, with ``unlock``, free a locked piece to move;
    ``text`` says it in plain words."""

    text: str
    piece: str
    swap: str | None = None
    unlock: bool = False


@dataclass(frozen=True)
class Explanation:
    """Why nothing fits: a plain-words ``summary``, the ``pieces`` and rule ids in the clash,
    ``fixes`` that an actual solve confirmed (empty when none was), ``trials``: the fixes the
    model suggests, not yet confirmed (``roomfit.solve.search`` solves each before it shows
    it), and general ``advice`` that is no tested fix."""

    summary: str
    pieces: tuple[str, ...]
    rules: tuple[str, ...]
    fixes: tuple[str, ...]
    trials: tuple[Fix, ...] = ()
    advice: tuple[str, ...] = ()


_RULE_OF = {"piece": "piece.inside", "zone": "zone.clear", "wall": "wall.against",
            "turning": "turning.space", "door": "door.swing_clear", "window": "window.clear",
            "fixture": "zone.clear"}


def _fits_box(spec: PieceSpec, bw: float, bh: float) -> bool:
    return (spec.width <= bw and spec.depth <= bh) or (spec.depth <= bw and spec.width <= bh)


def precheck(plan: Plan, rules: RuleSet, specs: tuple[PieceSpec, ...]) -> Explanation | None:
    """Impossibilities that need no search (see the module docstring), or None."""
    for spec in specs:
        boxes = []
        for rid in spec.rooms:
            x0, y0, x1, y1 = room_polygon(plan.room(rid)).bounds
            boxes.append((rid, x1 - x0, y1 - y0))
        if not any(_fits_box(spec, bw, bh) for _, bw, bh in boxes):
            where = "; ".join(f"{plan.room(r).label} {bw:.0f} x {bh:.0f} mm" for r, bw, bh in boxes)
            return Explanation(
                f"The {spec.label} ({spec.width} x {spec.depth} mm) is larger than the room it "
                f"may stand in, whichever way it is turned ({where}).",
                (spec.id,), ("piece.inside",), (),
                (Fix(f"without the {spec.label} the rest fits", spec.id),))
    shapes = door_shapes(plan, rules)
    for room in plan.rooms:
        mine = [s for s in specs if s.rooms == (room.id,) and not lies_flat(s)]  # a rug is floor
        if not mine:
            continue
        poly = room_polygon(room)
        taken: list[BaseGeometry] = [fixture_polygon(f) for f in plan.fixtures if f.room == room.id]
        taken += [z for f in plan.fixtures if f.room == room.id and (z := fixture_zone(f)) is not None]
        taken += [ds.approach[room.id] for ds in shapes if room.id in ds.approach]
        free = poly.difference(unary_union(taken)).area if taken else poly.area
        need = sum(s.width * s.depth for s in mine)
        if need > free:
            return Explanation(
                f"The furniture for the {room.label} covers {need / 1e6:.2f} m2 but only "
                f"{free / 1e6:.2f} m2 of its floor is left once the fittings, their use zones and "
                f"the door clearances are kept free.",
                tuple(s.id for s in mine), ("piece.overlap", "door.swing_clear"), (),
                tuple(Fix(f"without the {s.label} it fits", s.id)
                      for s in sorted(mine, key=lambda s: -s.width * s.depth)[:3]),
                ("fewer or smaller pieces in the " + room.label,))
    return None


def _check(built, solver_params, groups: list[str], deadline: float) -> cp_model.CpSolverStatus:
    m = built.model
    m.clear_assumptions()
    m.add_assumptions([built.groups[g] for g in groups])
    solver = cp_model.CpSolver()
    solver.parameters.num_workers = 1
    solver.parameters.random_seed = solver_params.seed
    solver.parameters.max_time_in_seconds = max(0.05, min(5.0, deadline - time.monotonic()))
    tune(solver.parameters)
    status = solver.solve(m)
    _check.last = solver  # type: ignore[attr-defined]
    return status


def _describe(plan: Plan, specs: dict[str, PieceSpec], rules: RuleSet, gid: str) -> str:
    kind, _, name = gid.partition(".")
    if kind == "piece":
        s = specs[name]
        return f"the {s.label} ({s.width} x {s.depth} mm)"
    if kind == "zone":
        s = specs[name]
        depths = ", ".join(f"{z.side} {z.depth} mm" for z in s.zones)
        return f"the clear floor at the {s.label} ({depths})"
    if kind == "wall":
        return f"the {specs[name].label} standing against a wall"
    if kind == "turning":
        return (f"a {rules.mm('turning.size')} mm turning space ({rules.text('turning.shape')}) "
                f"in the {plan.room(name).label}")
    if kind == "door":
        return f"the clear floor at door {name}"
    if kind == "window":
        return f"keeping tall pieces {rules.mm('window.band')} mm clear of window {name}"
    f = next(x for x in plan.fixtures if x.id == name)
    return f"the clear floor in front of the {f.label}"


def explain(plan: Plan, rules: RuleSet, specs: list[PieceSpec], rooms: list[str], options,
            deadline: float) -> Explanation:
    """Explain why ``specs`` cannot be placed in ``rooms`` (the plain model is infeasible)."""
    # explaining is worth a few seconds even when the search used up its time
    deadline = max(deadline, time.monotonic() + min(3.0, options.time_limit))
    built = build_model(plan, rules, specs, rooms, options.grid, strengthen=False, relaxed=True,
                        assume=True, objective=False)
    by_id = {s.id: s for s in specs}
    everything = list(built.groups)
    status = _check(built, options, everything, deadline)
    names = {v.index: k for k, v in built.groups.items()}
    room_names = ", ".join(plan.room(r).label for r in rooms)
    if status != cp_model.INFEASIBLE:
        return Explanation(
            f"No arrangement was found in the {room_names} on a {options.grid} mm grid, but no "
            f"single clash of rules could be isolated in the time available.",
            tuple(by_id), (), ())
    core = [names[i] for i in _check.last.sufficient_assumptions_for_infeasibility()]  # type: ignore
    core = core or everything
    # shrink to a minimal clash: drop one group at a time
    for g in list(core):
        if time.monotonic() > deadline:
            break
        rest = [x for x in core if x != g]
        if rest and _check(built, options, rest, deadline) == cp_model.INFEASIBLE:
            core = rest
    pieces = tuple(dict.fromkeys(g.partition(".")[2] for g in core if g.partition(".")[0]
                                 in ("piece", "zone", "wall")))
    rule_ids = tuple(dict.fromkeys(_RULE_OF[g.partition(".")[0]] for g in core))
    fixes: list[Fix] = []
    for pid in pieces:
        if time.monotonic() > deadline:
            break
        rest = [g for g in everything if g != f"piece.{pid}"]
        if _check(built, options, rest, deadline) in (cp_model.FEASIBLE, cp_model.OPTIMAL):
            fixes.append(Fix(f"without the {by_id[pid].label} it fits", pid))
    fixes += _smaller(plan, rules, specs, rooms, options, pieces, deadline)
    clash = "; ".join(_describe(plan, by_id, rules, g) for g in core)
    summary = (f"The furniture cannot be arranged in the {room_names}: these cannot all be met "
               f"together: {clash}. (Searched over positions in whole millimetres; angled walls and "
               f"door swings are covered on a {options.grid} mm grid.)")
    return Explanation(summary, pieces, rule_ids, (), tuple(fixes))


def _smaller(plan: Plan, rules: RuleSet, specs: list[PieceSpec], rooms: list[str], options,
             pieces: tuple[str, ...], deadline: float) -> list[Fix]:
    """Try the next smaller catalogue types of each clashing piece's category."""
    catalog = load_catalog()
    out: list[Fix] = []
    for pid in pieces:
        spec = next(s for s in specs if s.id == pid)
        if spec.type not in catalog:
            continue
        area = spec.width * spec.depth
        smaller = sorted((t for t in catalog.values() if t.category == spec.category
                          and t.width * t.depth < area), key=lambda t: -t.width * t.depth)
        for t in smaller[:6]:
            if time.monotonic() > deadline:
                return out
            zones = tuple(z for z in spec.zones if z.side in dict(t.zones))
            alt = replace(spec, type=t.id, label=t.label, width=t.width, depth=t.depth,
                          height=t.height, zones=zones)
            trial = [alt if s.id == pid else s for s in specs]
            built = build_model(plan, rules, trial, rooms, options.grid, strengthen=False,
                                relaxed=True, objective=False)
            solver = cp_model.CpSolver()
            solver.parameters.num_workers = 1
            solver.parameters.random_seed = options.seed
            solver.parameters.max_time_in_seconds = max(0.05, min(3.0, deadline - time.monotonic()))
            tune(solver.parameters)
            if solver.solve(built.model) in (cp_model.FEASIBLE, cp_model.OPTIMAL):
                out.append(Fix(f"a {t.label} ({t.width} x {t.depth} mm) instead of the "
                               f"{spec.label} ({spec.width} x {spec.depth} mm) fits", pid, t.id))
                break
    return out

