"""The exact-geometry audit of an arrangement: the judge of every layout.

``audit(plan, rules)`` looks at the pieces of ``plan`` that have a placement and returns one
:class:`~roomfit.audit.findings.Finding` per thing checked. It works on exact shapes
(shapely), independent of the solver's grid, so every candidate the solver proposes can be
judged here. Lengths in mm, areas in mm2; two shapes *touch* without overlapping when they
share less than 1 mm2, and a point lies on a line when it is within 1 mm of it.

Rule ids (see ``docs/audit.md`` for each method and the published wording it follows):

- ``piece.room``, ``piece.inside``, ``piece.overlap``, ``wall.against``, ``zone.clear``,
  ``door.width``, ``door.swing_clear``, ``door.approach``, ``window.clear``: the clearance
  rules (:mod:`roomfit.audit.clearances`); ``zone.alcove``: clear floor spaces in alcoves
  (2010 ADA §305.7, :mod:`roomfit.audit.alcove`);
- ``route.reach``, ``route.width``, ``route.trip``: circulation, judged by the walkway
  engine (:mod:`roomfit.audit.circulation`, :mod:`roomfit.audit.walkway`);
- ``turning.space``: a turning space of ``turning.size`` in each room when the set asks for
  one (:mod:`roomfit.audit.turning`).

Worked example (checked by hand): in an empty 3000 x 3000 mm room with a 760 mm route, the
shrunk floor is the square inset by 379.75 mm; a free 1500 x 1500 mm room holds a 1500 mm
turning circle and a 1499 mm room does not.
"""

from __future__ import annotations

from roomfit.audit.alcove import check_alcoves
from roomfit.audit.circulation import check_routes, check_trips
from roomfit.audit.clearances import (
    WALL_SHARE,
    check_doors,
    check_overlap,
    check_rooms,
    check_walls,
    check_windows,
    check_zones,
)
from roomfit.audit.findings import (
    AREA_RULES,
    RULE_IDS,
    Audit,
    Finding,
    audit_record,
    marks_for,
    summary_text,
)
from roomfit.audit.turning import RASTER_CELL, TurningResult, check_turning, turning_space
from roomfit.audit.walkway import TOUCH_MM, TOUCH_MM2, WIDTH_STEP, WIDTH_TOL, floor_of
from roomfit.plan.data import Plan
from roomfit.rules.sets import RuleSet

__all__ = [
    "RULE_IDS",
    "TOUCH_MM",
    "TOUCH_MM2",
    "WALL_SHARE",
    "WIDTH_STEP",
    "WIDTH_TOL",
    "RASTER_CELL",
    "Finding",
    "Audit",
    "audit",
    "turning_space",
    "TurningResult",
    "marks_for",
    "AREA_RULES",
    "audit_record",
    "summary_text",
]


def audit(plan: Plan, rules: RuleSet, *, widths: bool = True) -> Audit:
    """Audit the placed pieces of ``plan`` under ``rules`` with exact geometry.

    Pieces without a placement are reported in one failing ``piece.room`` finding; every
    other rule is checked on the pieces that are placed. ``widths=False`` skips measuring
    how much wider than the route the way into each passing room is (its ``route.width``
    finding then says "at least" the route width); every verdict, and every failure's
    widest route and bottleneck, stay the same, in a fraction of the time.
    """
    floor = floor_of(plan, rules)
    findings: list[Finding] = []
    findings += check_rooms(floor)
    findings += check_overlap(floor)
    findings += check_walls(floor)
    findings += check_zones(floor)
    findings += check_alcoves(floor)
    findings += check_doors(floor)
    findings += check_windows(floor)
    turning, spaces = check_turning(floor)
    findings += check_routes(floor, spaces, widths)
    findings += check_trips(floor)
    findings += turning
    order = {r: i for i, r in enumerate(RULE_IDS)}
    findings.sort(key=lambda f: order.get(f.rule, len(order)))
    return Audit(tuple(findings))
