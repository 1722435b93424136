"""The pinch allowance: a route may narrow to ``route.pinch_width`` for at most
``route.pinch_length`` (2010 ADA §403.5.1 Exception: 32 in for 24 in; sets with no
allowance have length 0).

:func:`pinch_walkway` is the walkway at the pinch width with every narrow stretch longer
than the allowance taken out; a place reached there but not at the full width is reached
"only through narrow stretches". The audit and the route scorer both ask it.
"""

from __future__ import annotations

import math

import shapely
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit.walkway import (
    QUAD_SEGS,
    TOUCH_MM,
    TOUCH_MM2,
    WIDTH_TOL,
    Floor,
    Walkway,
    erosion,
    polys,
    walkway,
)

__all__ = ["PINCH_SEGS", "allowance", "pinch_walkway"]

#: Segments per quarter circle in the narrow-stretch measure when a stretch is within 25 mm
#: of the allowed length, where a coarse arc would shorten it by up to ~15 mm (a chord cuts
#: the corner an arc only touches).
PINCH_SEGS = 64


def allowance(floor_: Floor) -> tuple[float, float] | None:
    """The set's (pinch width, pinch length) in mm, or None when it allows no narrowing."""
    rules = floor_.rules
    if not (rules.has("route.pinch_width") and rules.has("route.pinch_length")):
        return None
    pinch = rules.get("route.pinch_width").exact_mm
    length = rules.get("route.pinch_length").exact_mm
    if length <= 0 or pinch >= rules.get("route.width").exact_mm:
        return None
    return pinch, length


def pinch_walkway(floor_: Floor) -> tuple[Walkway, float] | None:
    """The walkway at the pinch width with narrow stretches longer than the allowance
    removed, and the longest stretch kept (mm); None when the set allows no narrowing."""
    allowed = allowance(floor_)
    if allowed is None:
        return None
    pinch, length = allowed
    if (round(pinch, 3), "pinch") not in floor_.cache:
        floors, floor_.pinch_longest = _pinch_floors(
            floor_, floor_.rules.get("route.width").exact_mm, pinch, length)
        walkway(floor_, pinch, floors, key="pinch")
    return floor_.cache[(round(pinch, 3), "pinch")], floor_.pinch_longest


def _pinch_floors(floor_: Floor, width: float, pinch: float, length: float
                  ) -> tuple[dict[str, BaseGeometry], float]:
    """Shrunk floors at the pinch width with narrow stretches longer than ``length`` removed.

    A narrow stretch is a connected part of the floor shrunk by half the pinch width that
    the floor shrunk by half the route width, grown back by the difference, does not cover.
    Its length is the shorter side of the smallest rectangle around the floor it leaves
    unswept at the full width; that is the stretch's length whenever the stretch is longer
    across than along (and when it is not, both sides exceed a pinch length no longer than
    the pinch width). Returns the floors and the longest stretch kept.
    """
    R, p = erosion(width), erosion(pinch)
    floors: dict[str, BaseGeometry] = {}
    longest = 0.0
    for rid, free in floor_.free.items():
        floor, drop, kept = _pinch_room(free, R, p, length, QUAD_SEGS)
        if any(abs(ln - length) < 25.0 for ln in drop + kept):  # close call: finer arcs
            floor, drop, kept = _pinch_room(free, R, p, length, PINCH_SEGS)
        floors[rid] = floor
        longest = max([longest, *kept])
    return floors, longest


def _pinch_room(free: BaseGeometry, R: float, p: float, length: float, segs: int
                ) -> tuple[BaseGeometry, list[float], list[float]]:
    """One room's floor shrunk by ``p`` less its narrow stretches longer than ``length``, and
    the lengths of the stretches dropped and kept."""
    narrow_ok = free.buffer(-p, quad_segs=segs)
    wide = free.buffer(-R, quad_segs=segs)
    swept = wide.buffer(R, quad_segs=segs)
    grown = wide.buffer(R - p, quad_segs=segs)
    drop: list[BaseGeometry] = []
    dropped: list[float] = []
    kept: list[float] = []
    for n in polys(narrow_ok.difference(grown)):
        unswept = n.buffer(p, quad_segs=segs).intersection(free).difference(swept)
        if unswept.is_empty or unswept.area <= TOUCH_MM2:
            continue
        xs = list(shapely.get_coordinates(shapely.minimum_rotated_rectangle(unswept)))
        ln = min(math.dist(xs[0], xs[1]), math.dist(xs[1], xs[2]))
        if ln > length + TOUCH_MM:
            drop.append(n)
            dropped.append(ln)
        else:
            kept.append(ln)
    # grown a hair so that no zero-width sliver along a removed stretch's edge joins the two
    # sides again
    floor = narrow_ok.difference(unary_union(drop).buffer(WIDTH_TOL / 10)) if drop else narrow_ok
    return floor, dropped, kept
