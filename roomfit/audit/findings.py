"""Audit records: one :class:`Finding` per thing checked, the :class:`Audit` that holds them,
and their wording (summary text, JSON record, drawing marks).

Lengths in mm, areas in mm2 (the rules in :data:`AREA_RULES`). Figures in messages are the
measured ones rounded down to the whole millimetre, so a message never claims a width or a
circle the floor does not hold.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

from shapely import Point, Polygon
from shapely.geometry.base import BaseGeometry

from roomfit.audit.marks import Mark, MarkKind
from roomfit.audit.walkway import polys
from roomfit.rules.sets import Rule, RuleSet

__all__ = [
    "RULE_IDS",
    "AREA_RULES",
    "Finding",
    "Audit",
    "outline",
    "point",
    "source_of",
    "fmt_mm",
    "cm2",
    "audit_record",
    "summary_text",
    "marks_for",
]

#: Every rule id an audit can report, in the order the summary lists them.
RULE_IDS = ("piece.room", "piece.inside", "piece.overlap", "wall.against", "zone.clear",
            "zone.alcove",
            "door.width", "door.swing_clear", "door.approach", "window.clear", "route.reach",
            "route.width", "route.trip", "turning.space")

#: Rules whose ``measured`` and ``required`` are areas (mm2) rather than lengths.
AREA_RULES = ("piece.inside", "piece.overlap", "zone.clear", "door.swing_clear", "door.approach",
              "window.clear")


@dataclass(frozen=True)
class Finding:
    """One audited rule on one subject (a piece, door, window, room or target).

    ``measured`` and ``required`` are in mm (mm2 for areas); ``where`` is a point to mark on
    the drawing and ``outline`` an optional polygon (empty when none). For ``route.reach``
    failures ``pieces`` names the pieces and fittings next to the bottleneck at ``where``.
    """

    rule: str
    ok: bool
    message: str
    measured: float | None = None
    required: float | None = None
    source: str = ""
    pieces: tuple[str, ...] = ()
    room: str | None = None
    where: tuple[float, float] | None = None
    outline: tuple[tuple[float, float], ...] = ()


@dataclass(frozen=True)
class Audit:
    """Every finding of one audit."""

    findings: tuple[Finding, ...]

    @property
    def passed(self) -> bool:
        return all(f.ok for f in self.findings)

    @property
    def failures(self) -> tuple[Finding, ...]:
        return tuple(f for f in self.findings if not f.ok)

    def by_rule(self, rule: str) -> tuple[Finding, ...]:
        return tuple(f for f in self.findings if f.rule == rule)



def outline(g: BaseGeometry) -> tuple[tuple[float, float], ...]:
    """Outline of the largest polygon in ``g`` (rounded to 0.1 mm), empty if none."""
    ps = polys(g)
    if not ps:
        return ()
    p = max(ps, key=lambda q: q.area)
    return tuple((round(x, 1), round(y, 1)) for x, y in p.exterior.coords[:-1])


def point(g: BaseGeometry) -> tuple[float, float]:
    """A representative point of ``g`` (rounded to 0.1 mm)."""
    p = g.centroid if not g.is_empty else Point(0, 0)
    if not g.is_empty and isinstance(g, Polygon) and not g.contains(p):
        p = g.representative_point()
    return (round(p.x, 1), round(p.y, 1))


def source_of(rule: Rule) -> str:
    """The rule's source for a finding; when the client's plan overrode the value, says so
    first (the set's source speaks of the set's own value, not of the client's)."""
    if not rule.overridden:
        return rule.source
    return f"value set by the plan for this client (the rule set's own value: {rule.source})"


def fmt_mm(mm: float) -> str:
    """A measured length in whole millimetres, rounded down (a 1499.9 mm circle is not
    reported as 1500 mm); values within 0.05 mm of a whole millimetre read as it."""
    return f"{math.floor(mm + 0.05):.0f} mm"


def cm2(mm2: float) -> str:
    """An area given in mm2 as whole square centimetres (1 cm2 = 100 mm2)."""
    return f"{mm2 / 100:.0f} cm2"


def audit_record(result: Audit) -> dict[str, object]:
    """The audit as plain data for ``--json``: ``passed``, counts and every finding."""
    return {
        "passed": result.passed,
        "checked": len(result.findings),
        "failed": len(result.failures),
        "findings": [
            {"rule": f.rule, "ok": f.ok, "message": f.message, "measured": f.measured,
             "required": f.required, "unit": "mm2" if f.rule in AREA_RULES else "mm",
             "source": f.source, "pieces": list(f.pieces), "room": f.room,
             "where": list(f.where) if f.where else None,
             "outline": [list(p) for p in f.outline]}
            for f in result.findings
        ],
    }


#: Rules whose passing findings the summary lists too (they carry the key measures).
_ALWAYS_SHOWN = ("route.width", "turning.space")


def _amount(f: Finding, value: float, inches: bool) -> str:
    if f.rule in AREA_RULES:
        return cm2(value) if value >= 100 else f"{value:.0f} mm2"
    text = f"{value:.0f} mm"
    return text + f" ({value / 25.4:.1f} in)" if inches else text


def summary_text(result: Audit, rules: RuleSet) -> str:
    """A readable summary: per rule pass or fail, then each failure with measured against
    required (in inches too for sets stated in inches), where, which pieces and the source."""
    inches = rules.get("route.width").unit == "in"
    lines = [f"rule set: {rules.id} ({rules.label})"
             + (f", {len(rules.overridden)} values overridden by the plan" if rules.overridden
                else "")]
    for rule in RULE_IDS + tuple(sorted({f.rule for f in result.findings} - set(RULE_IDS))):
        mine = result.by_rule(rule)
        if not mine:
            continue
        bad = [f for f in mine if not f.ok]
        head = "FAIL" if bad else "pass"
        lines.append(f"{head}  {rule:<17} {len(mine) - len(bad)} of {len(mine)} pass")
        if rule in _ALWAYS_SHOWN:  # the narrowest passages and turning spaces, even when fine
            lines += [f"      ok: {f.message}" for f in mine if f.ok]
        for f in bad:
            lines.append(f"      - {f.message}")
            facts = []
            if f.measured is not None and f.required is not None:
                facts.append(f"measured {_amount(f, f.measured, inches)}, required "
                             + ("none" if f.rule in AREA_RULES and f.required == 0 else
                                _amount(f, f.required, inches)))
            if f.where is not None:
                facts.append(f"at ({f.where[0]:.0f}, {f.where[1]:.0f})")
            if f.room:
                facts.append(f"room {f.room}")
            if f.pieces:
                facts.append("involves " + ", ".join(f.pieces))
            if facts:
                lines.append("        " + "; ".join(facts))
            if f.source:
                lines.append(f"        source: {f.source}")
    n, k = len(result.findings), len(result.failures)
    lines.append(f"result: all {n} checks pass" if not k else f"result: {k} of {n} checks fail")
    return "\n".join(lines)



def marks_for(result: Audit) -> list[Mark]:
    """Marks for a drawing: one ``fail`` mark per failed place. Failures of the circulation
    rules that point to the same place (within a route width of each other, say a blocked
    corridor that cuts off several targets) share one mark listing them all."""
    marks: list[Mark] = []
    groups: list[tuple[tuple[float, float], list[Finding]]] = []
    for f in result.failures:
        if f.rule.startswith("route.") and f.where is not None:
            for where, group in groups:
                if math.dist(where, f.where) <= (f.required or 0.0):
                    group.append(f)
                    break
            else:
                groups.append((f.where, [f]))
            continue
        marks.append(Mark(MarkKind.FAIL, f"{f.rule}: {f.message}", f.where, f.outline))
    for where, group in groups:
        head = group[0]
        label = f"{head.rule}: {head.message}"
        if len(group) > 1:
            label += f" (and {len(group) - 1} more cut off at this place)"
        marks.append(Mark(MarkKind.FAIL, label, where, head.outline))
    return marks
