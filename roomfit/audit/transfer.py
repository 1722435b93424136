"""The transfer space beside a WC, on the side the plan says the client transfers from.

A WC fitting (kind ``wc``) with ``transfer = "left"`` or ``"right"`` (as seen sitting on
it) gets the rule set's WC clearance: ``zone.wc_transfer`` wide, measured perpendicular from
the side wall across the WC towards the transfer side, and ``zone.wc_transfer_depth`` deep,
measured from the rear wall (2010 ADA Standards 604.3.1: 60 in by 56 in). Sets that publish
no such figure have no such rule, and the WC then has no transfer area.

The WC's back is the edge of its outline that lies most on the room's walls; it faces away
from it. The side wall is the nearest wall or fitting beyond the WC's other side (within the
clearance width; the WC's own edge when there is none). The bed's transfer side is the
catalogue's business (``transfer`` on a bed puts the set's main bed-side zone there).

>>> from roomfit.plan.data import Fixture, Plan, Room
>>> room = Room("b", "Bath", "bathroom", ((0, 0), (2400, 0), (2400, 2400), (0, 2400)))
>>> wc = Fixture("wc", "b", "wc", "WC", ((50, 0), (450, 0), (450, 700), (50, 700)), 430,
...              transfer="left")
>>> wc_facing(Plan("p", (room,), fixtures=(wc,)), wc)
0
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass

from shapely import Polygon, box
from shapely.geometry.base import BaseGeometry

from roomfit.audit.geometry import fixture_polygon, fixture_zone, room_polygon, side_direction
from roomfit.audit.group_measures import back_edge, wall_share
from roomfit.plan.data import Fixture, Plan
from roomfit.rules.sets import RuleSet

__all__ = ["WC_RULES", "WcTransfer", "wc_facing", "wc_transfer", "clear_width", "fitting_zone"]

#: The rule ids of a set's WC clearance (optional: a set publishes both or neither).
WC_RULES = ("zone.wc_transfer", "zone.wc_transfer_depth")

#: How far (mm) the clear width is looked for.
_LOOK = 4000


@dataclass(frozen=True)
class WcTransfer:
    """A WC's transfer clearance: ``area`` (the rectangle the set asks to keep clear, the WC
    inside it), ``origin`` (the side wall's coordinate along the transfer ``axis``),
    ``sign`` (+1 when the transfer side lies towards larger coordinates), ``band`` (the
    rear wall's coordinate and the far end along the other axis), ``width`` and ``depth``
    the set's figures (mm) and ``source`` the width's."""

    fixture: str
    area: Polygon
    axis: int
    sign: int
    origin: float
    band: tuple[float, float]
    width: int
    depth: int
    source: str


def wc_facing(plan: Plan, wc: Fixture) -> int:
    """The turn (0, 90, 180, 270: facing north, west, south, east) of a WC whose back is the
    outline edge that lies most on its room's walls."""
    walls = room_polygon(plan.room(wc.room)).exterior
    bounds = fixture_polygon(wc).bounds
    return max((0, 90, 180, 270), key=lambda rot: (wall_share(back_edge(bounds, rot), walls), -rot))


def _blockers(plan: Plan, wc: Fixture, strip: Polygon) -> list[BaseGeometry]:
    """Walls (the room's outside) and other fittings in ``strip``."""
    room = room_polygon(plan.room(wc.room))
    out: list[BaseGeometry] = [strip.difference(room)]
    out += [fixture_polygon(f) for f in plan.fixtures if f.room == wc.room and f.id != wc.id]
    return out


def _strip(axis: int, lo: float, hi: float, band: tuple[float, float]) -> Polygon:
    """The rectangle ``lo``..``hi`` along ``axis`` and ``band`` along the other."""
    a, b = sorted(band)
    lo, hi = sorted((lo, hi))
    return box(lo, a, hi, b) if axis == 0 else box(a, lo, b, hi)


def _first_hit(shapes: list[BaseGeometry], strip: Polygon, axis: int, sign: int,
               start: float) -> float | None:
    """Distance (mm) from ``start`` along ``sign`` on ``axis`` to the nearest part of
    ``shapes`` inside ``strip`` (touching does not count); None when there is none."""
    best = None
    for s in shapes:
        hit = s.intersection(strip)
        if hit.area < 1.0:
            continue
        x0, y0, x1, y1 = hit.bounds
        near = (x0 if sign > 0 else x1) if axis == 0 else (y0 if sign > 0 else y1)
        d = max(0.0, (near - start) * sign)
        best = d if best is None else min(best, d)
    return best


def wc_transfer(plan: Plan, rules: RuleSet, wc: Fixture) -> WcTransfer | None:
    """The transfer clearance of ``wc`` under ``rules``; None when the plan names no transfer
    side or the set publishes no WC clearance."""
    if wc.transfer is None or not all(rules.has(r) for r in WC_RULES):
        return None
    rot = wc_facing(plan, wc)
    tx, ty = side_direction(wc.transfer, rot)
    fx, fy = side_direction("front", rot)
    axis, sign = (0, tx) if tx else (1, ty)
    x0, y0, x1, y1 = fixture_polygon(wc).bounds
    lo_hi = ((x0, x1), (y0, y1))
    rear = lo_hi[1 - axis][0] if (fx, fy)[1 - axis] > 0 else lo_hi[1 - axis][1]
    depth = rules.mm("zone.wc_transfer_depth")
    far = rear + (fx, fy)[1 - axis] * depth
    width = rules.mm("zone.wc_transfer")
    own = lo_hi[axis][0] if sign > 0 else lo_hi[axis][1]  # the WC's side away from transfer
    wc_band = lo_hi[1 - axis]
    look = _strip(axis, own - sign * width, own, wc_band)
    back = _first_hit(_blockers(plan, wc, look), look, axis, -sign, own)
    origin = own - sign * (back if back is not None else 0.0)
    area = _strip(axis, origin, origin + sign * width, (rear, far))
    return WcTransfer(wc.id, area, axis, sign, origin, (rear, far), width, depth,
                      rules.get("zone.wc_transfer").source)


def clear_width(plan: Plan, t: WcTransfer, pieces: Sequence[BaseGeometry]) -> float:
    """Clear width (mm) of ``t`` from the side wall towards the transfer side, over the
    clearance's depth: to the nearest wall, other fitting or standing piece (``pieces``), at
    most :data:`_LOOK`."""
    wc = next(f for f in plan.fixtures if f.id == t.fixture)
    strip = _strip(t.axis, t.origin, t.origin + t.sign * _LOOK, t.band)
    hit = _first_hit([*_blockers(plan, wc, strip), *pieces], strip, t.axis, t.sign, t.origin)
    return float(_LOOK) if hit is None else hit


def fitting_zone(plan: Plan, rules: RuleSet, fitting: Fixture) -> BaseGeometry | None:
    """The floor kept free of furniture at a fitting: its plan ``zone``, joined by its
    transfer clearance (less the fitting itself) when it has one; None when neither."""
    zone = fixture_zone(fitting)
    t = wc_transfer(plan, rules, fitting)
    if t is None:
        return zone
    extra = t.area.difference(fixture_polygon(fitting))
    return extra if zone is None else zone.union(extra)
