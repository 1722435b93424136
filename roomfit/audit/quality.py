"""Layout quality: does each functional group work as a group? Advisory, apart from safety.

The clearance audit (``roomfit.audit.check``) says whether every piece can be reached and
used; this module says whether the pieces that belong together stand together, the way a
designer would arrange them. Each rule is measured, never just counted, and every record
carries the measured value, its target and the target's source:

- ``group.view``: a seat faces the screen within the viewing distance (screen diagonals,
  catalogue ``view_min``..``view_max``) and ``group.view_angle``: within ``view.off_axis``
  degrees of the screen's axis and of the seat's; ``group.view_clear``: nothing taller
  than ``view.clear_height`` stands between them;
- ``group.reach``: the coffee table stands in front of its seat, the catalogue's gap from
  the seat front (:func:`reach_range`), and ``group.reach_axis``: on the seat's centre line;
- ``group.bedside``: a nightstand touches the head half of a long side the bed is used
  from (one nightstand per used side while there are free sides);
- ``group.bed_wall``: the bed's head against a wall; ``group.bed_window``: not under a window;
- ``group.dining``: every seated edge of a dining table has its chairs' pull-out depth free;
- ``group.desk_chair``: the desk's chair has its depth free; ``group.desk_height``: the top
  is at a height that leaves knee space;
- ``group.talk`` / ``group.talk_turn``: seats of a conversation group within speaking
  distance of another seat (front middle to front middle) and turned towards it: the other
  seat's front not behind this seat's back (angle from the back middle to it, off the
  seat's axis, at most ``talk.turn``);
- ``group.rug``: a rug lies under the centre of the group of its room.

Preferences (``Kind.PREFERENCE``) are measured the same way: ``pref.wall``, a piece of a
wall-loving category (``data/preferences.toml``) with its back to a wall. "Tall pieces do
not block windows" is the clearance audit's ``window.clear`` rule and is not repeated here.

The rules are measured by :mod:`roomfit.audit.group_rules` over the shared measures of
:mod:`roomfit.audit.group_measures`; this module is the entry point and the summaries.
Values come from ``data/groups.toml`` (:mod:`roomfit.rules.groups`) and the catalogue, each
with its source. Which types form which group is the catalogue's ``groups`` field.
"""

from __future__ import annotations

from collections.abc import Iterable

from roomfit.audit.group_measures import GroupCheck, Kind, context
from roomfit.audit.group_rules import RULES
from roomfit.plan.data import Plan
from roomfit.rules.groups import rule_weight
from roomfit.rules.sets import RuleSet

__all__ = [
    "Kind",
    "GroupCheck",
    "QUALITY_RULES",
    "quality",
    "group_failures",
    "group_cost",
    "group_summary",
    "quality_record",
    "quality_lines",
]

#: Every rule this module measures, with what it asks (the texts in ``docs/quality.md``).
QUALITY_RULES = (
    "group.view", "group.view_angle", "group.view_clear", "group.reach", "group.reach_axis",
    "group.bedside",
    "group.bed_wall", "group.bed_window", "group.dining", "group.desk_chair",
    "group.desk_height", "group.talk", "group.talk_turn", "group.rug", "access.transfer", "pref.wall",
)


def quality(plan: Plan, rules: RuleSet) -> tuple[GroupCheck, ...]:
    """Measure every functional-group rule and preference on the plan's as-is arrangement.

    Only groups the plan has are measured (no TV: no viewing rule). Advisory: a failure is
    a layout a designer would rearrange, not a safety fault.
    """
    ctx = context(plan, rules)
    return tuple(c for rule in RULES for c in rule(ctx))


def group_failures(plan: Plan, rules: RuleSet) -> int:
    """How many functional-group rules (not preferences) the arrangement misses."""
    return sum(not c.ok for c in quality(plan, rules) if c.kind == Kind.GROUP)


def group_cost(plan: Plan, rules: RuleSet) -> int:
    """The functional-group rules the arrangement misses, each by its weight
    (:func:`roomfit.rules.groups.rule_weight`: a miss that leaves the group usable weighs
    less): how candidates are ranked first."""
    return sum(rule_weight(c.rule) for c in quality(plan, rules) if c.kind == Kind.GROUP and not c.ok)


def group_summary(plan: Plan, rules: RuleSet) -> dict[str, object]:
    """Group-rule satisfaction of an arrangement as plain data (for the benchmark):
    ``group_met`` and ``group_total`` checks, and the rule ids that failed."""
    groups = [c for c in quality(plan, rules) if c.kind == Kind.GROUP]
    return {"group_met": sum(c.ok for c in groups), "group_total": len(groups),
            "group_failed": sorted({c.rule for c in groups if not c.ok})}


def quality_record(checks: Iterable[GroupCheck]) -> list[dict[str, object]]:
    """The checks as plain data (for ``--json`` and the page)."""
    return [{"rule": c.rule, "kind": str(c.kind), "label": c.label, "ok": c.ok,
             "measured": c.measured, "unit": c.unit, "target": c.target, "source": c.source,
             "pieces": list(c.pieces), "room": c.room, "text": c.text} for c in checks]


def quality_lines(checks: Iterable[GroupCheck]) -> list[str]:
    """One line per check, failures first, for a terminal summary."""
    cs = sorted(checks, key=lambda c: (c.ok, c.kind != Kind.GROUP))
    return [("  " if c.ok else "! ") + ("preference: " if c.kind == Kind.PREFERENCE else "")
            + c.text for c in cs]
