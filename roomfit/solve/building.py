"""Building findings: what the bare apartment fails that no furniture can cause or cure.

The audit is monotone in obstacles (furniture only takes floor away), so a rule the empty
apartment (with its locked pieces) already fails stays failed whatever is placed: a bathroom
too small for its turning space, walls cutting a door's approach floor, a door narrower than
the rule set asks, a fitting zone no route reaches. Such a finding is about the *building*.
Unless ``--strict`` is asked, the solve reports each with a concrete change in the set's terms
and furnishes the flat under every other rule; the result is marked non-compliant.

A bare failure that names a locked piece is not a building finding (the piece can be freed):
that answer stays "impossible" with the advice to unlock it.

Matching: a furnished layout passes *around* the building findings when each of its failures
has the key (rule, room, subject) of one of them (``excused``); the subject is the finding's
pieces for door rules and its target for route rules, the room for turning spaces.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from typing import TYPE_CHECKING

from roomfit.plan.data import OUTSIDE, Door, Plan
from roomfit.rules.sets import RuleSet

if TYPE_CHECKING:
    from roomfit.audit.check import Audit, Finding

__all__ = ["BuildingFinding", "building_findings", "excused", "key", "no_turning"]

#: Shifts (mm) along a door's wall tried for a door whose approach floor the walls cut short.
_SHIFTS = tuple(s * k for k in range(1, 11) for s in (100, -100))


@dataclass(frozen=True)
class BuildingFinding:
    """A rule the bare apartment fails, with the change (``change``) that would cure it in the
    rule set's terms, or an empty change when none was found to test."""

    finding: Finding
    change: str


def key(f: Finding) -> tuple[str, str | None, str]:
    """What a finding is about, stable when furniture is added (see the module docstring)."""
    if f.rule.startswith("route."):
        subject = f.message.split(" is ")[0] if f.rule == "route.reach" else ""
    elif f.rule == "turning.space":
        subject = ""
    else:
        subject = ",".join(f.pieces)
    return f.rule, f.room, subject


def excused(result: Audit, building: tuple[BuildingFinding, ...]) -> bool:
    """True when every failure of ``result`` is one of the ``building`` findings."""
    keys = {key(b.finding) for b in building}
    return all(key(f) in keys for f in result.failures)


def building_findings(plan: Plan, rules: RuleSet, bare: Audit) -> tuple[BuildingFinding, ...] | None:
    """The bare audit's failures as building findings, each with its change; None when a
    failure names a locked piece (then it is no building finding)."""
    locked = {p.id for p in plan.furniture if p.locked}
    fails = bare.failures
    if any(set(f.pieces) & locked for f in fails):
        return None
    return tuple(BuildingFinding(f, _change(plan, rules, f)) for f in fails)


def _change(plan: Plan, rules: RuleSet, f: Finding) -> str:
    """A concrete change that cures ``f``, in the rule set's terms."""
    if f.rule == "door.width" and f.measured is not None and f.required is not None:
        more = round(f.required - f.measured)
        return (f"widen door {f.pieces[0]} by {more} mm to the {f.required:.0f} mm clear width "
                f"{rules.label} asks ({f.source})")
    if f.rule == "turning.space" and f.measured is not None and f.required is not None:
        return (f"free {f.required - f.measured:.0f} mm more floor across {f.room} for the "
                f"{f.required:.0f} mm turning space ({f.source}): move a fitting or enlarge the "
                "room")
    if f.rule == "door.approach" and f.pieces:
        return _door_move(plan, rules, f.pieces[0])
    return ""


def _door_move(plan: Plan, rules: RuleSet, door_id: str) -> str:
    """The smallest tested move of a door along its wall (100 mm steps, up to 1 m either way),
    or rehanging it, that clears the approach floor asked in front of it; each is judged by
    the audit on the door's own rooms."""
    from roomfit.audit.check import audit  # the judge

    door = next(d for d in plan.doors if d.id == door_id)
    rooms = tuple(r for r in plan.rooms if r.id in door.rooms)

    def clear(d: Door) -> bool:
        if not _on_wall(plan, d):
            return False
        trial = replace(plan, rooms=rooms, doors=(d,), windows=(), furniture=(), routines=(),
                        fixtures=tuple(x for x in plan.fixtures if x.room in door.rooms))
        try:
            verdict = audit(trial, rules, widths=False)
        except Exception:  # noqa: BLE001 - a moved door off its wall is no answer
            return False
        return all(f.ok for f in verdict.findings if f.rule in ("door.approach", "door.swing_clear"))

    (ax, ay) = door.at
    along = _wall_axis(plan, door)
    for shift in _SHIFTS:
        at = (ax + shift, ay) if along == "x" else (ax, ay + shift)
        if clear(replace(door, at=at)):
            way = {("x", 1): "east", ("x", -1): "west", ("y", 1): "north", ("y", -1): "south"}
            return (f"move door {door_id} {abs(shift)} mm {way[(along, 1 if shift > 0 else -1)]} "
                    f"along its wall, so the clear floor {rules.label} asks in front of it fits")
    if door.hinge in ("left", "right"):
        flipped = replace(door, hinge="right" if door.hinge == "left" else "left")
        if clear(flipped):
            return f"rehang door {door_id} with its hinges on the {flipped.hinge}"
    other = next((r for r in door.rooms if r != door.swings_into and r != OUTSIDE), None)
    if door.swings_into and other and clear(replace(door, swings_into=other)):
        return f"rehang door {door_id} to open into {other}"
    return f"door {door_id}: no move along its wall up to 1 m nor rehanging clears it"


def _on_wall(plan: Plan, door: Door) -> bool:
    """Both ends of the door's opening lie on its host room's outline (within 1 mm)."""
    from shapely.geometry import Point

    from roomfit.audit.geometry import room_polygon, wall_direction

    ring = room_polygon(plan.room(door.rooms[0])).exterior
    ux, uy = wall_direction(plan.room(door.rooms[0]).outline, door.at)
    h = door.width / 2
    ends = [(door.at[0] + ux * h * k, door.at[1] + uy * h * k) for k in (-1, 1)]
    return all(ring.distance(Point(e)) <= 1.0 for e in ends)


def _wall_axis(plan: Plan, door: Door) -> str:
    """``"x"`` when the door's wall runs along x, else ``"y"``."""
    from roomfit.audit.geometry import wall_direction

    ux, _ = wall_direction(plan.room(door.rooms[0]).outline, door.at)
    return "x" if abs(ux) > 0.5 else "y"


def no_turning(building: tuple[BuildingFinding, ...]) -> frozenset[str]:
    """Rooms whose bare floor cannot hold a turning space (a building finding): the search
    furnishes them without one."""
    return frozenset(b.finding.room for b in building
                     if b.finding.rule == "turning.space" and b.finding.room)
