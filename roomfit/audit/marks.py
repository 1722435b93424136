"""What the audit and the route scorer ask a drawing to highlight: plain data, drawn by
``roomfit.present.draw`` (which reads them and never recomputes them)."""

from __future__ import annotations

from dataclasses import dataclass
from enum import StrEnum

__all__ = ["MarkKind", "Mark", "Path"]


class MarkKind(StrEnum):
    """What a mark highlights: a failed rule, or a note."""

    FAIL = "fail"
    NOTE = "note"


@dataclass(frozen=True)
class Mark:
    """Something to highlight on a drawing (a failed rule, say).

    ``kind`` is a :class:`MarkKind` (equal to its text, ``"fail"`` or ``"note"``); ``where``
    a point to number, ``outline`` a polygon to outline (either may be missing; a mark with
    neither appears in the legend only).
    """

    kind: MarkKind
    label: str
    where: tuple[float, float] | None
    outline: tuple[tuple[float, float], ...]


@dataclass(frozen=True)
class Path:
    """A walking route to draw: plan points in mm, dashed when ``night``."""

    label: str
    points: tuple[tuple[float, float], ...]
    night: bool = False
