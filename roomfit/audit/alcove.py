"""Clear floor spaces in alcoves (``zone.alcove``): 2010 ADA §305.7.

"If a clear floor space is located in an alcove or otherwise confined on all or part of three
sides, additional maneuvering clearance shall be provided": for a forward approach the alcove
is at least 36 in wide where it is deeper than 24 in (§305.7.1); for a parallel approach at
least 60 in wide where it is deeper than 15 in (§305.7.2). Sets that state these figures
(``zone.alcove_*``) are checked; the others ask nothing.

A use zone whose rule cites §305 is a clear floor space: forward approach when it is at least
as deep as the space is long (``zone.space_length``, 48 in: §305.5, the 30 in side faces the
element), parallel otherwise. The element (the piece) confines one side. Measured in the
zone's own frame, with ``n`` out from the element and ``t`` along it:

- **Ends** (the alcove proper): the free floor beside the zone, in the band deeper than the
  alcove depth, is measured along ``t`` until a wall, fitting or piece; when both ends are
  closed within the alcove width, that span must reach the alcove width.
- **Outer side** (a space between the element and a wall standing at its far side, within
  1 in, open at one end, like the floor between a bed and a wall): the reading chosen
  (``docs/audit.md``) is that the published space is ``zone.space_length`` long and may
  stand anywhere along the zone, so when the zone is longer than that, the space stands at
  the open end and is confined on two sides only (element and outer side). When the zone
  is no longer than the space, or a rule-set override sets ``zone.space_length`` to 0 (the
  other reading: the whole zone is the space), a zone closed at one end is confined on
  three sides and the distance from the element to the outer obstacle must reach the
  alcove width.
"""

from __future__ import annotations

from shapely import Polygon, box
from shapely.geometry.base import BaseGeometry
from shapely.ops import unary_union

from roomfit.audit import geometry as geo
from roomfit.audit.findings import Finding, fmt_mm, outline, point, source_of
from roomfit.audit.walkway import TOUCH_MM, WIDTH_TOL, Floor, standing

__all__ = ["ALCOVE_RULES", "check_alcoves"]

#: An obstacle within this distance (mm) beyond a space's far side confines that side (1 in:
#: it stands at the space's edge; one farther off leaves floor to turn in).
_ADJOIN = 25.4
#: The rules a set states to ask for the alcove check.
ALCOVE_RULES = ("zone.alcove_forward_depth", "zone.alcove_forward_width",
                "zone.alcove_parallel_depth", "zone.alcove_parallel_width", "zone.space_length")


def _frame(zp: Polygon, n: tuple[int, int]) -> tuple[float, float, float, float]:
    """The zone's extent as (t0, t1, n0, n1) in its own frame (axis-parallel zones)."""
    x0, y0, x1, y1 = zp.bounds
    if n[0] != 0:  # element to the west or east: t runs along y
        face, far = (x0, x1) if n[0] == 1 else (-x1, -x0)
        return y0, y1, face, far
    face, far = (y0, y1) if n[1] == 1 else (-y1, -y0)
    return x0, x1, face, far


def _world(n: tuple[int, int], t0: float, t1: float, n0: float, n1: float) -> Polygon:
    """The box ``t0..t1`` along the element and ``n0..n1`` out from it, in plan coordinates."""
    if n[0] != 0:
        xs = (n0, n1) if n[0] == 1 else (-n1, -n0)
        return box(xs[0], t0, xs[1], t1)
    ys = (n0, n1) if n[1] == 1 else (-n1, -n0)
    return box(t0, ys[0], t1, ys[1])


def _limits(solid: BaseGeometry, n: tuple[int, int], t0: float, t1: float, n0: float,
            n1: float, reach: float) -> tuple[float | None, float | None]:
    """How far the free floor beside the zone runs along the element, in the band n0..n1:
    the nearest obstacle before ``t0`` and after ``t1`` within ``reach`` (None: open)."""
    lo = hi = None
    left = solid.intersection(_world(n, t0 - reach, t0 - TOUCH_MM / 2, n0, n1))
    right = solid.intersection(_world(n, t1 + TOUCH_MM / 2, t1 + reach, n0, n1))
    if left.area > TOUCH_MM:
        lo = _frame_bounds(left, n)[1]
    if right.area > TOUCH_MM:
        hi = _frame_bounds(right, n)[0]
    return lo, hi


def _frame_bounds(g: BaseGeometry, n: tuple[int, int]) -> tuple[float, float]:
    """(t min, t max) of ``g``."""
    x0, y0, x1, y1 = g.bounds
    return (y0, y1) if n[0] != 0 else (x0, x1)


def _outer(solid: BaseGeometry, n: tuple[int, int], t0: float, t1: float, face: float,
           reach: float) -> float | None:
    """Distance from the element to the nearest obstacle beyond the zone's outer side
    (within ``reach`` of the element), None when there is none."""
    beyond = solid.intersection(_world(n, t0, t1, face + TOUCH_MM / 2, face + reach))
    if beyond.area <= TOUCH_MM:
        return None
    x0, y0, x1, y1 = beyond.bounds
    near = {(1, 0): x0, (-1, 0): -x1, (0, 1): y0, (0, -1): -y1}[n]
    return near - face


def check_alcoves(floor: Floor) -> list[Finding]:
    """One failing ``zone.alcove`` finding per clear floor space in an alcove too narrow for
    its approach; one passing finding per space checked otherwise."""
    rules = floor.rules
    if not all(rules.has(r) for r in ALCOVE_RULES):
        return []
    space = rules.get("zone.space_length").exact_mm
    out: list[Finding] = []
    for pid, pc in floor.placed.items():
        room = floor.rooms.get(pc.placement.room)
        if room is None:
            continue
        others = [g for q, p2 in standing(floor) if q != pid for g in [p2.shape]]
        outside = box(*room.buffer(10_000).bounds).difference(room)
        solid = unary_union([outside, *floor.fixtures.values(), *others])
        for z, zp in geo.use_zones(pc.spec, pc.placement):
            if not rules.has(z.rule) or "§305" not in rules.get(z.rule).source:
                continue
            n = geo.side_direction(z.side, pc.placement.rotation)
            out.append(_one(floor, pid, z.side, zp, n, solid, space))
    return out


def _one(floor: Floor, pid: str, side: str, zp: Polygon, n: tuple[int, int],
         solid: BaseGeometry, space: float) -> Finding:
    """The alcove verdict of one clear floor space (see the module docstring)."""
    rules = floor.rules
    t0, t1, face, far = _frame(zp, n)
    depth, length = far - face, t1 - t0
    forward = depth >= space - TOUCH_MM and space > 0
    kind = "forward" if forward else "parallel"
    need_rule = rules.get(f"zone.alcove_{kind}_width")
    need = need_rule.exact_mm
    deep = rules.get(f"zone.alcove_{kind}_depth").exact_mm
    lo, hi = _limits(solid, n, t0, t1, face + min(deep, depth), far, need)
    what = f"the {side} zone of {pid} ({kind} approach)"
    if lo is not None and hi is not None and hi - lo < need - WIDTH_TOL:
        return Finding("zone.alcove", False,
                       f"{what} lies in an alcove {fmt_mm(hi - lo)} wide; an alcove deeper than "
                       f"{fmt_mm(deep)} must be {fmt_mm(need)} wide", measured=round(hi - lo, 1),
                       required=need, source=source_of(need_rule), pieces=(pid,),
                       room=floor.placed[pid].placement.room, where=point(zp),
                       outline=outline(zp))
    lo, hi = _limits(solid, n, t0, t1, face, far, need)
    closed_end = lo is not None or hi is not None
    slides = space > 0 and length > space + TOUCH_MM and not forward
    across = _outer(solid, n, t0, t1, face, depth + _ADJOIN)
    if closed_end and across is not None and not slides and length > deep \
            and across < need - WIDTH_TOL:
        return Finding("zone.alcove", False,
                       f"{what} is confined on three sides (the piece, the far side and one "
                       f"end): {fmt_mm(across)} across, an alcove deeper than {fmt_mm(deep)} "
                       f"must be {fmt_mm(need)} wide", measured=round(across, 1), required=need,
                       source=source_of(need_rule), pieces=(pid,),
                       room=floor.placed[pid].placement.room, where=point(zp),
                       outline=outline(zp))
    return Finding("zone.alcove", True, f"{what} is not in an alcove narrower than "
                   f"{fmt_mm(need)}", required=need, source=source_of(need_rule), pieces=(pid,),
                   room=floor.placed[pid].placement.room)
