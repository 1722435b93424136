"""Importing an IFC storey as a plan: the functions the ``import`` command and the page share.

:func:`import_ifc` reads the model (:mod:`roomfit.plan.ifc_read`), converts the storey
(:mod:`roomfit.plan.floor`) and checks the result with the plan reader itself, so an import
either gives a plan that reads back equal or an error naming every problem. The report goes
on top of the written file as comments. :func:`fix_door` is the review step: a person sets a
door's leaf, swing room or hinge side after looking at the drawing.
"""

from __future__ import annotations

from dataclasses import replace
from pathlib import Path

from roomfit.errors import PlanError, Problem
from roomfit.plan.data import Door, Leaf, Plan
from roomfit.plan.floor import Imported, floor_to_plan, report_text
from roomfit.plan.floor_base import Note
from roomfit.plan.floordata import ModelSummary
from roomfit.plan.read import loads_plan
from roomfit.plan.write import dumps_plan

__all__ = ["import_ifc", "plan_text", "summary_text", "doors_to_review", "fix_door"]


def import_ifc(path: str | Path, *, storey: str | None = None, spaces: str | None = None,
               rules: str | None = None, entrance: str | None = None,
               name: str | None = None) -> Imported:
    """One storey of the IFC model at ``path`` as a checked plan with its report.

    Raises :class:`~roomfit.plan.ifc_read.IfcError` (ifcopenshell missing, a bad file, an
    unknown storey) or :class:`PlanError` (the storey gives a plan the reader rejects; each
    problem names the field).
    """
    from roomfit.plan.ifc_read import read_floor  # the optional extra, loaded only here

    floor, chose = read_floor(path, storey, spaces)
    imported = floor_to_plan(floor, rules=rules, entrance=entrance, name=name)
    notes = tuple(Note("assumed", floor.storey_gid, text) for text in chose) + imported.notes
    imported = replace(imported, notes=notes)
    doors = imported.plan.doors
    if doors and not any(d.is_entrance for d in doors):
        known = ", ".join(d.id for d in doors)
        raise PlanError(Problem("--entrance", "every door joins two imported spaces, so the "
                                "entrance is unknown", f"name it with --entrance; doors: {known}"),
                        str(path))
    try:
        plan = loads_plan(dumps_plan(imported.plan), str(path))
    except PlanError as e:
        raise PlanError([replace(p, message=f"the imported plan is not valid: {p.message}")
                         for p in e.problems], str(path)) from None
    return replace(imported, plan=plan)


def plan_text(imported: Imported, caution: str) -> str:
    """The plan file's text: the report as a comment block, then the plan."""
    return dumps_plan(imported.plan, report_text(imported, caution))


def summary_text(summary: ModelSummary) -> str:
    """What ``roomfit import MODEL --list`` prints: storeys, spaces (area in m2), zones."""
    lines = [f"{summary.source}: {summary.schema}, lengths in {summary.unit}"]
    for s in summary.storeys:
        lines.append(f"storey {s.number}: {s.name!r} at {s.elevation_mm / 1000:.2f} m "
                     f"({s.gid}): {len(s.spaces)} spaces, {s.doors} doors, {s.walls} walls")
        for sp in s.spaces:
            area = f"{sp.area:.2f} m2" if sp.area is not None else "area not stated"
            lines.append(f"  space {sp.name!r} {sp.long_name!r}: {area} ({sp.gid})")
        if not s.spaces and s.walls:
            lines.append("  no IfcSpace: rooms would be derived from the walls")
    for z in summary.zones:
        lines.append(f"flat/zone {z.name!r} ({z.ifc_class} {z.gid}): {', '.join(z.spaces) or 'empty'}")
    if not summary.zones:
        lines.append("no IfcZone groups spaces into flats")
    return "\n".join(lines)


def doors_to_review(imported: Imported) -> list[tuple[str, str]]:
    """(plan id, why) for every door, opening or entrance the import guessed or assumed."""
    out: list[tuple[str, str]] = []
    for n in imported.notes:
        if n.about and n.kind in ("guessed", "assumed") and any(d.id == n.about
                                                               for d in imported.plan.doors):
            out.append((n.about, n.text))
    return out


def fix_door(plan: Plan, door_id: str, leaf: str, swings_into: str | None = None,
             hinge: str | None = None) -> Plan:
    """``plan`` with one door's leaf, swing room and hinge side set by a person.

    A hinged leaf needs ``swings_into`` (one of the door's rooms) and ``hinge`` (``left`` or
    ``right``, seen from that room facing the door); the result is checked by the reader.
    """
    door = next((d for d in plan.doors if d.id == door_id), None)
    if door is None:
        raise PlanError(Problem("doors", f"no door {door_id!r}"), plan.name)
    kind = Leaf(leaf)
    new: Door = replace(door, leaf=kind,
                        swings_into=swings_into if kind == Leaf.HINGED else None,
                        hinge=hinge if kind == Leaf.HINGED else None)
    fixed = replace(plan, doors=tuple(new if d.id == door_id else d for d in plan.doors))
    return loads_plan(dumps_plan(fixed), plan.name)
