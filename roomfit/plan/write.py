"""Writing plan files (TOML), in the plan's own unit and atomically.

read -> write -> read gives an equal :class:`~roomfit.plan.data.Plan`: each length is written
as the shortest number in the plan's unit that reads back as the same millimetre, and in plans
measured in feet or inches as a feet-and-inches string when not a whole number
(:func:`roomfit.plan.units.write_length`).
"""

from __future__ import annotations

from pathlib import Path
from typing import Any

import tomli_w

from roomfit.files import atomic_write
from roomfit.plan.data import FORMAT_VERSION, VERSION_KEY, Piece, Plan
from roomfit.plan.units import write_length

__all__ = ["dumps_plan", "write_plan"]


def _plan_to_dict(plan: Plan) -> dict[str, Any]:
    u = plan.unit

    def pt(p: tuple[int, int]) -> list[int | float | str]:
        return [write_length(p[0], u), write_length(p[1], u)]

    d: dict[str, Any] = {VERSION_KEY: FORMAT_VERSION, "name": plan.name}
    for k in ("client", "address", "notes"):
        if getattr(plan, k):
            d[k] = getattr(plan, k)
    d["units"] = u
    rules: dict[str, Any] = {"set": plan.rules.set}
    if plan.rules.overrides:
        rules["overrides"] = {k: (v if isinstance(v, str) else write_length(v, u))
                              for k, v in plan.rules.overrides}
    d["rules"] = rules
    d["rooms"] = [{"id": r.id, "label": r.label, "use": r.use,
                   "outline": [pt(p) for p in r.outline]} for r in plan.rooms]
    if plan.doors:
        d["doors"] = []
        for door in plan.doors:
            dd: dict[str, Any] = {"id": door.id, "rooms": list(door.rooms), "at": pt(door.at),
                                  "width": write_length(door.width, u), "leaf": door.leaf.value}
            if door.swings_into is not None:
                dd["swings_into"] = door.swings_into
            if door.hinge is not None:
                dd["hinge"] = door.hinge
            d["doors"].append(dd)
    if plan.windows:
        d["windows"] = [{"id": w.id, "room": w.room, "at": pt(w.at), "width": write_length(w.width, u),
                         "sill": write_length(w.sill, u)} for w in plan.windows]
    if plan.fixtures:
        d["fixtures"] = []
        for fx in plan.fixtures:
            fd: dict[str, Any] = {"id": fx.id, "room": fx.room, "kind": fx.kind,
                                  "label": fx.label, "outline": [pt(p) for p in fx.outline],
                                  "height": write_length(fx.height, u)}
            if fx.zone:
                fd["zone"] = [pt(p) for p in fx.zone]
            if fx.transfer is not None:
                fd["transfer"] = fx.transfer
            d["fixtures"].append(fd)
    if plan.furniture:
        d["furniture"] = [_piece_to_dict(p, u) for p in plan.furniture]
    if plan.routines:
        d["routines"] = []
        for t in plan.routines:
            td: dict[str, Any] = {"from": t.origin, "to": t.target, "per_day": t.per_day}
            if t.label:
                td["label"] = t.label
            if t.night:
                td["night"] = True
            d["routines"].append(td)
    return d


def _piece_to_dict(p: Piece, u: str) -> dict[str, Any]:
    d: dict[str, Any] = {"id": p.id, "type": p.type}
    if p.label:
        d["label"] = p.label
    if len(p.rooms) == 1:
        d["room"] = p.rooms[0]
    else:
        d["rooms"] = list(p.rooms)
    for k in ("width", "depth", "height"):
        if getattr(p, k) is not None:
            d[k] = write_length(getattr(p, k), u)
    if p.access is not None:
        d["access"] = p.access
    if p.transfer is not None:
        d["transfer"] = p.transfer
    if p.category:
        d["category"] = p.category
    if p.zones:
        d["zones"] = dict(p.zones)
    if p.groups:
        d["groups"] = list(p.groups)
    if p.placement is not None:
        pl = p.placement
        d["placement"] = {"x": write_length(pl.x, u), "y": write_length(pl.y, u), "rotation": pl.rotation,
                          "room": pl.room}
    if p.locked:
        d["locked"] = True
    return d


def dumps_plan(plan: Plan, comment: str = "") -> str:
    """The plan as plan-file text, in the plan's own unit; ``comment`` (any lines) goes on
    top as a TOML comment block (an importer's report, for instance)."""
    head = "".join(f"# {line}".rstrip() + "\n" for line in comment.splitlines())
    return head + ("\n" if head else "") + tomli_w.dumps(_plan_to_dict(plan))


def write_plan(plan: Plan, path: str | Path, comment: str = "") -> Path:
    """Write ``plan`` to ``path`` atomically, with an optional comment block on top."""
    return atomic_write(path, dumps_plan(plan, comment))
