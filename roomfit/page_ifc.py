"""The page's IFC import: functions the page calls and tests call the same way.

An uploaded model is written to a temporary file (the IFC reader opens files by name), read,
and the file removed. The review shows the drawing with every guessed door, open link,
entrance and stair arrival marked, lists the report, and lets a person set each door's leaf,
swing room and hinge side (:func:`roomfit.plan.ifc_import.fix_door`).
"""

from __future__ import annotations

import os
import tempfile
from collections.abc import Callable, Iterator
from contextlib import contextmanager
from pathlib import Path
from typing import Any

from roomfit.audit.marks import Mark, MarkKind
from roomfit.plan.data import OUTSIDE, Leaf, Plan
from roomfit.plan.floor import Imported
from roomfit.plan.floordata import ModelSummary

__all__ = ["ifc_available", "summary_from_upload", "import_from_upload", "storey_choices",
           "review_marks", "review_rows", "door_options", "door_state"]

def ifc_available() -> bool:
    """True when the ``ifc`` extra (ifcopenshell) is installed."""
    from roomfit.plan.ifc_read import have_ifc

    return have_ifc()


@contextmanager
def _as_file(name: str, data: bytes) -> Iterator[Path]:
    """The uploaded bytes as a temporary ``.ifc`` file, removed afterwards."""
    fd, tmp = tempfile.mkstemp(suffix=".ifc", prefix="roomfit-upload-")
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(data)
        yield Path(tmp)
    finally:
        Path(tmp).unlink(missing_ok=True)


def summary_from_upload(name: str, data: bytes) -> ModelSummary:
    """Storeys, spaces and zones of an uploaded model; problems name the upload's ``name``."""
    from roomfit.plan.ifc_read import summarise_model

    return _run(name, data, summarise_model)


def import_from_upload(name: str, data: bytes, storey: str | None, spaces: str | None) -> Imported:
    """One storey of an uploaded model as a checked plan with its report."""
    from roomfit.plan.ifc_import import import_ifc

    return _run(name, data, lambda p: import_ifc(p, storey=storey, spaces=spaces or None,
                                                 name=f"{name}: storey {storey}"))


def _run(name: str, data: bytes, work: Callable[[Path], Any]) -> Any:
    from roomfit.errors import RoomfitError

    with _as_file(name, data) as tmp:
        try:
            return work(tmp)
        except RoomfitError as e:
            if e.source in ("", str(tmp)):
                e.source = name
            raise


def storey_choices(summary: ModelSummary) -> list[tuple[str, str]]:
    """(value for ``--storey``, label) per storey: number, name, spaces and doors."""
    return [(str(s.number), f"{s.number}: {s.name} ({len(s.spaces)} spaces, {s.doors} doors)")
            for s in summary.storeys]


def review_marks(imported: Imported) -> list[Mark]:
    """One drawing mark per door, link, entrance or stair arrival the import guessed or
    assumed anything about (numbered on the drawing, every reason in its legend line)."""
    doors = {d.id: d for d in imported.plan.doors}
    reasons: dict[str, list[str]] = {}
    for n in imported.notes:
        if n.about in doors and n.kind in ("guessed", "assumed"):
            reasons.setdefault(n.about, []).append(f"{n.kind}: {n.text}")
    return [Mark(MarkKind.NOTE, "; ".join(texts), (float(doors[d].at[0]), float(doors[d].at[1])), ())
            for d, texts in reasons.items()]


def review_rows(imported: Imported) -> list[dict[str, str]]:
    """The report as table rows: kind, IFC GlobalId, plan id, what."""
    return [{"kind": n.kind, "IFC GlobalId": n.gid, "plan id": n.about, "what": n.text}
            for n in imported.notes]


def door_options(plan: Plan, door_id: str) -> dict[str, list[str]]:
    """The values a person may pick for a door: leaf kinds, swing rooms and hinge sides."""
    door = next(d for d in plan.doors if d.id == door_id)
    return {"leaf": [x.value for x in Leaf],
            "swings_into": list(door.rooms),
            "hinge": ["left", "right"]}


def door_state(plan: Plan, door_id: str) -> tuple[str, str, str]:
    """A door's current leaf, swing room and hinge side (defaults for an unhinged leaf)."""
    door = next(d for d in plan.doors if d.id == door_id)
    return (door.leaf.value, door.swings_into or (door.rooms[0] if door.rooms[0] != OUTSIDE
                                                  else door.rooms[1]), door.hinge or "left")
