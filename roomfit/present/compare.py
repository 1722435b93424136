"""Arrangements side by side: one row of metrics per arrangement, the best value marked.

Metrics (see ``docs/routes.md``):

- rules failed: failing findings of :func:`roomfit.audit.check.audit` (fewer is better);
- walking per day: :attr:`RouteScores.walking_m_per_day`; an arrangement that leaves a
  routine trip unreachable ranks behind every one that does not, whatever its metres;
- narrowest passage on any routine route (mm, wider is better; an unreachable trip counts
  as narrower than any width);
- turning spaces: rooms that have one the route reaches, out of the rooms the rule set asks
  one for (a space the audit finds cut off counts as missing);
- free floor: the share of the rooms' floor not under fittings or furniture; an arrangement
  that leaves pieces unplaced ranks behind every one that places them all (its floor is
  free only because pieces are missing);
- group rules met and preferences met: the checks of the layout-quality audit
  (:func:`roomfit.audit.quality.quality`) that pass, of those measured; each check, with its
  measured value and target, is listed under the table (:func:`quality_notes`).

A metric is marked best on the rows that reach its best value, unless every row ties (then
the mark would say nothing) or there is only one row.
"""

from __future__ import annotations

from collections.abc import Sequence
from dataclasses import dataclass
from enum import StrEnum

from shapely import Polygon
from shapely.ops import unary_union

from roomfit.audit.check import Audit, audit
from roomfit.audit.geometry import fixture_polygon, footprint, lies_flat
from roomfit.audit.ideas import describe
from roomfit.audit.quality import GroupCheck, Kind, quality, quality_lines
from roomfit.audit.routes import RouteScores, score_routes
from roomfit.plan.data import Plan
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import RuleSet, rules_for

__all__ = [
    "METRICS",
    "Better",
    "Metric",
    "Row",
    "Comparison",
    "compare",
    "compare_row",
    "render_table",
    "quality_notes",
    "Judged",
]

#: An arrangement's audit (route widths measured) and route scores, computed once.
Judged = tuple[Audit, RouteScores]


class Better(StrEnum):
    """Which way a metric improves."""

    LOWER = "lower"
    HIGHER = "higher"


@dataclass(frozen=True)
class Metric:
    """A column of the comparison and the way it improves."""

    id: str
    label: str
    better: Better


METRICS = (
    Metric("rules_failed", "Rules failed", Better.LOWER),
    Metric("walking", "Walking per day", Better.LOWER),
    Metric("narrowest", "Narrowest on a routine route", Better.HIGHER),
    Metric("turning", "Turning spaces (have / need)", Better.HIGHER),
    Metric("free_floor", "Free floor", Better.HIGHER),
    Metric("groups", "Group rules met", Better.HIGHER),
    Metric("preferences", "Preferences met", Better.HIGHER),
)


@dataclass(frozen=True)
class Row:
    """One arrangement's metrics, with the audit and route scores they came from."""

    name: str
    plan: Plan
    rules: RuleSet
    audit: Audit
    routes: RouteScores
    rules_failed: int
    walking_m_per_day: float
    unreachable: int
    narrowest_mm: float | None
    turning_have: int
    turning_need: int
    free_floor_share: float
    quality: tuple[GroupCheck, ...]
    #: The arrangement's idea in one line (:func:`roomfit.audit.ideas.describe`).
    idea: str = ""
    unplaced: int = 0

    def _met(self, kind: Kind) -> tuple[int, int]:
        mine = [c for c in self.quality if c.kind == kind]
        return sum(c.ok for c in mine), len(mine)

    def value(self, metric: str) -> tuple[float, ...] | None:
        """The metric as a sortable key at the precision shown (None when it does not apply):
        values that print the same tie."""
        if metric == "rules_failed":
            return (self.rules_failed,)
        if metric == "walking":  # no trip to walk: nothing to compare, not a best 0 m
            if not self.routes.trips:
                return None
            return (self.unreachable, round(self.walking_m_per_day, 1))
        if metric == "narrowest":  # an unreachable trip is narrower than any width
            if not self.routes.trips:
                return None
            return (-self.unreachable, round(self.narrowest_mm or 0))
        if metric == "turning":
            return None if not self.turning_need else (self.turning_have / self.turning_need,)
        if metric == "free_floor":
            return (-self.unplaced, round(100 * self.free_floor_share))
        if metric in ("groups", "preferences"):
            met, asked = self._met(Kind.GROUP if metric == "groups" else Kind.PREFERENCE)
            return None if not asked else (met / asked,)
        raise KeyError(metric)

    def text(self, metric: str) -> str:
        """The metric as a short cell text."""
        if metric == "rules_failed":
            return f"{self.rules_failed} of {len(self.audit.findings)}"
        if metric == "walking":
            if not self.routes.trips:
                return "- (no trips)"
            out = f"{self.walking_m_per_day:.1f} m"
            if self.unreachable:
                out += f" ({self.unreachable} trip{'s' if self.unreachable > 1 else ''} unreachable)"
            return out
        if metric == "narrowest":
            out = "-" if self.narrowest_mm is None else f"{self.narrowest_mm:.0f} mm"
            return out + (" (a trip is unreachable)" if self.unreachable else "")
        if metric == "turning":
            return "not asked" if not self.turning_need else f"{self.turning_have} / {self.turning_need}"
        if metric == "free_floor":
            out = f"{100 * self.free_floor_share:.0f} %"
            return out + (f" ({self.unplaced} not placed)" if self.unplaced else "")
        if metric in ("groups", "preferences"):
            met, asked = self._met(Kind.GROUP if metric == "groups" else Kind.PREFERENCE)
            return "-" if not asked else f"{met} / {asked} (listed below)"
        raise KeyError(metric)


@dataclass(frozen=True)
class Comparison:
    """Rows in the order given; ``best`` maps a metric id to the indexes of its best rows."""

    rows: tuple[Row, ...]
    best: tuple[tuple[str, tuple[int, ...]], ...]

    def is_best(self, metric: str, index: int) -> bool:
        return index in dict(self.best).get(metric, ())


def _free_share(plan: Plan, rules: RuleSet) -> float:
    floor = unary_union([Polygon(r.outline) for r in plan.rooms])
    specs = {s.id: s for s in resolve_pieces(plan, rules)}
    taken = [fixture_polygon(f) for f in plan.fixtures]
    taken += [footprint(specs[pid], pl) for pid, pl in plan.layout
              if not lies_flat(specs[pid])]  # a rug leaves its floor free
    used = floor.intersection(unary_union(taken)).area if taken else 0.0
    return (floor.area - used) / floor.area if floor.area else 0.0


def compare_row(plan: Plan, name: str, rules: RuleSet | None = None,
                judged: Judged | None = None) -> Row:
    """Audit, route and measure one arrangement (``rules``: the plan's own set if None).

    ``judged``: the arrangement's audit (route widths measured) and route scores when they
    are already known (a solver candidate carries them), so they are not computed again."""
    rs = rules if rules is not None else rules_for(plan)
    result, routes = judged if judged is not None else (audit(plan, rs), score_routes(plan, rs))
    turning = result.by_rule("turning.space")
    cut_off = {f.room for f in result.by_rule("route.reach")
               if not f.ok and f.message.startswith("the turning space in ")}
    return Row(
        name=name, plan=plan, rules=rs, audit=result, routes=routes,
        rules_failed=len(result.failures),
        walking_m_per_day=routes.walking_m_per_day,
        unreachable=len(routes.unreachable),
        narrowest_mm=routes.narrowest_mm,
        turning_have=sum(f.ok and f.room not in cut_off for f in turning),
        turning_need=len(turning),
        free_floor_share=_free_share(plan, rs),
        quality=quality(plan, rs),
        idea=describe(plan, rs),
        unplaced=sum(p.placement is None for p in plan.furniture),
    )


def _best(rows: Sequence[Row]) -> tuple[tuple[str, tuple[int, ...]], ...]:
    out = []
    for m in METRICS:
        vals = [(i, v) for i, r in enumerate(rows) if (v := r.value(m.id)) is not None]
        if len(vals) < 2:
            continue
        pick = min if m.better == Better.LOWER else max
        top = pick(v for _, v in vals)
        winners = tuple(i for i, v in vals if v == top)
        if len(winners) < len(vals):
            out.append((m.id, winners))
    return tuple(out)


def compare(plans: Sequence[Plan], names: Sequence[str] | None = None,
            rules: RuleSet | Sequence[RuleSet] | None = None,
            judged: Sequence[Judged] | None = None) -> Comparison:
    """One row per arrangement (each plan's as-is layout), best values marked.

    ``names`` label the rows (default: the plans' names); ``rules`` is one rule set for all,
    one per plan (as ``rules.sets.choose_rules`` picks them for ``--rules``), or None for each
    plan's own with its overrides; ``judged``, one (audit, route scores) per plan where they
    are known already (``compare_row``).
    """
    labels = list(names) if names is not None else [p.name for p in plans]
    if len(labels) != len(plans):
        raise ValueError("compare needs one name per plan")
    per_plan = list(rules) if isinstance(rules, Sequence) else [rules] * len(plans)
    if len(per_plan) != len(plans):
        raise ValueError("compare needs one rule set per plan")
    known = list(judged) if judged is not None else [None] * len(plans)
    if len(known) != len(plans):
        raise ValueError("compare needs one (audit, routes) per plan")
    rows = tuple(compare_row(p, n, r, j)
                 for p, n, r, j in zip(plans, labels, per_plan, known, strict=True))
    return Comparison(rows, _best(rows))


def render_table(comparison: Comparison, mark: str = "*") -> str:
    """A plain-text table: metrics down, arrangements across, best values marked ``mark``."""
    rows = comparison.rows
    head = ["", *(r.name for r in rows)]
    body = [["Rule set", *(r.rules.id for r in rows)]]
    notes_idea = [f"{r.name}: {r.idea}" for r in rows]
    for m in METRICS:
        body.append([m.label, *(r.text(m.id) + (f" {mark}" if comparison.is_best(m.id, i) else "")
                                for i, r in enumerate(rows))])
    table = [head, *body]
    widths = [max(len(line[c]) for line in table) for c in range(len(head))]
    lines = ["  ".join(cell.ljust(w) for cell, w in zip(line, widths, strict=True)).rstrip()
             for line in table]
    lines.insert(1, "  ".join("-" * w for w in widths))
    notes = [f"{mark} best value" if comparison.best else "no metric tells the arrangements apart"]
    notes += ["The idea of each arrangement:", *("  " + n for n in notes_idea)]
    notes += quality_notes(comparison)
    for r in rows:
        for t in r.routes.unreachable:
            notes.append(f"{r.name}: {t.name} unreachable: {t.reason}")
        for f in r.routes.flags:
            if "unreachable" not in f:
                notes.append(f"{r.name}: {f}")
        if r.routes.defaults:
            notes.append(f"{r.name}: no routine in the plan; " + (
                "default trips assumed" if r.routes.trips else
                "no default trip applies either (they join a placed bed to a WC, or a "
                "kitchen to the entrance, a placed table or sofa)"))
    return "\n".join(lines + [""] + notes)


def quality_notes(comparison: Comparison) -> list[str]:
    """Each arrangement's group rules and preferences, one line each with the measured value
    and its target (failures first): what the counts in the table stand for."""
    out: list[str] = []
    for r in comparison.rows:
        if r.quality:
            out.append(f"{r.name}, layout quality (advisory):")
            out += ["  " + line for line in quality_lines(r.quality)]
    return out
