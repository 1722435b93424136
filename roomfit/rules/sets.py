"""Rule sets: the clearances that govern one client's home, each value with its source.

A rule set is a TOML file in ``roomfit/data/rules/``. Every rule has an id of our own, a
one-line description, its value in the unit the source states (inches stay inches and are
converted exactly, 60 in -> 1524 mm), the source (standard or handbook, edition, section) and
a status: ``verified`` against the named text, ``memory`` (a default to confirm) or
``common-practice`` (no standard behind it). A plan picks a set and may override values;
overridden rules say so.

Rule ids every set defines (see ``docs/rules.md`` for their meaning):

- ``route.width``: clear width of walking routes (mm);
- ``route.pinch_width`` and ``route.pinch_length``: a route may narrow to this width for at
  most this length (sets without such an allowance repeat ``route.width`` and 0);
- ``turning.size``: diameter of the turning circle or side of the movement square, 0 when the
  set asks for none; ``turning.shape``: ``circle``, ``square`` or ``circle-or-t``;
- ``door.min_width``: least clear width of a door on a route;
- ``door.approach_swing`` / ``door.approach_other``: depth of the clear floor kept in front of
  a door on the side it swings into / on the other side; ``door.approach_latch``: how far
  that floor extends beyond the latch jamb on the pull side;
- ``window.band``: depth in front of a window where tall pieces may not stand;
- ``zone.<kind>``: depth of the use zone of each kind the catalogue uses (bed side, storage
  front, seat front, ...).

>>> rs = load_ruleset("ada-2010")
>>> rs.mm("turning.size")
1524
"""

from __future__ import annotations

import functools
import tomllib
from collections.abc import Iterable
from dataclasses import dataclass, replace
from fractions import Fraction
from importlib import resources

from roomfit.errors import Problem, RuleError
from roomfit.plan.units import MM_PER

__all__ = [
    "Rule",
    "RuleSet",
    "STATUSES",
    "REQUIRED_RULES",
    "TURNING_SHAPES",
    "ruleset_ids",
    "ruleset_problems",
    "rule_record",
    "load_ruleset",
    "rules_for",
    "choose_rules",
]

STATUSES = ("verified", "memory", "common-practice")

#: Rule ids every rule set must define; zone kinds come from the catalogue on top.
REQUIRED_RULES = (
    "route.width",
    "route.pinch_width",
    "route.pinch_length",
    "turning.size",
    "turning.shape",
    "door.min_width",
    "door.approach_swing",
    "door.approach_other",
    "door.approach_latch",
    "window.band",
)

TURNING_SHAPES = ("circle", "square", "circle-or-t")

#: Rules whose value is a word, not a length.
_TEXT_RULES = ("turning.shape",)


@dataclass(frozen=True)
class Rule:
    """One clearance value with its source.

    ``value`` is in ``unit`` as the source states it (``mm`` or ``in``; ``text`` for a word
    such as a shape). ``overridden`` is True when the client's plan replaced the value; the
    source then still names where the default came from.
    """

    id: str
    description: str
    value: float | str
    unit: str
    source: str
    status: str
    overridden: bool = False

    @property
    def mm(self) -> int:
        """The value in whole millimetres (exact conversion, rounded at the end)."""
        if self.unit == "text" or isinstance(self.value, str):
            raise RuleError(Problem(self.id, f"rule {self.id!r} is not a length"))
        return int(round(Fraction(str(self.value)) * MM_PER[self.unit]))

    @property
    def exact_mm(self) -> float:
        """The value in millimetres without rounding (60 in -> 1524.0)."""
        if isinstance(self.value, str):
            raise RuleError(Problem(self.id, f"rule {self.id!r} is not a length"))
        return float(Fraction(str(self.value)) * MM_PER[self.unit])


@dataclass(frozen=True)
class RuleSet:
    """A named set of rules, e.g. everyday handbook clearances or ADA 2010."""

    id: str
    label: str
    description: str
    rules: tuple[Rule, ...]

    def get(self, rule_id: str) -> Rule:
        for r in self.rules:
            if r.id == rule_id:
                return r
        raise RuleError(
            Problem(f"rules.{rule_id}", f"rule set {self.id!r} has no rule {rule_id!r}",
                    "run `roomfit rules " + self.id + "` to list its rules")
        )

    def has(self, rule_id: str) -> bool:
        return any(r.id == rule_id for r in self.rules)

    def mm(self, rule_id: str) -> int:
        """Value of a length rule in millimetres."""
        return self.get(rule_id).mm

    def text(self, rule_id: str) -> str:
        return str(self.get(rule_id).value)

    @property
    def overridden(self) -> tuple[Rule, ...]:
        return tuple(r for r in self.rules if r.overridden)


def rule_record(rule: Rule) -> dict[str, object]:
    """A rule as plain data (for ``--json`` and tables): the value in its own unit, whole
    and exact millimetres (None for a word), status, source and whether it was overridden.

    >>> rule_record(load_ruleset("ada-2010").get("turning.size"))["exact_mm"]
    1524.0
    """
    length = rule.unit != "text" and not isinstance(rule.value, str)
    return {
        "id": rule.id,
        "description": rule.description,
        "value": rule.value,
        "unit": rule.unit,
        "mm": rule.mm if length else None,
        "exact_mm": rule.exact_mm if length else None,
        "source": rule.source,
        "status": rule.status,
        "overridden": rule.overridden,
    }


def ruleset_ids() -> list[str]:
    """Ids of the bundled rule sets, sorted."""
    folder = resources.files("roomfit") / "data" / "rules"
    return sorted(p.name[:-5] for p in folder.iterdir() if p.name.endswith(".toml"))


def _parse_rule(rule_id: str, raw: object, where: str) -> Rule:
    if not isinstance(raw, dict):
        raise RuleError(Problem(where, "expected a table with value, unit, source"))
    missing = [k for k in ("description", "value", "unit", "source", "status") if k not in raw]
    if missing:
        raise RuleError(Problem(where, f"missing {', '.join(missing)}"))
    if raw["status"] not in STATUSES:
        raise RuleError(Problem(where + ".status", f"unknown status {raw['status']!r}",
                                f"use one of {', '.join(STATUSES)}"))
    if raw["unit"] not in ("mm", "in", "text"):
        raise RuleError(Problem(where + ".unit", f"unknown unit {raw['unit']!r}",
                                "use mm, in or text"))
    return Rule(rule_id, raw["description"], raw["value"], raw["unit"], raw["source"],
                raw["status"])


@functools.cache
def _catalog_zone_kinds() -> tuple[str, ...]:
    """Zone kinds the bundled catalogue uses (read from its data file: the catalogue module
    imports this one, not the other way round)."""
    path = resources.files("roomfit") / "data" / "catalog.toml"
    data = tomllib.loads(path.read_text(encoding="utf-8"))
    kinds = {k for t in data.get("types", {}).values() for k in t.get("zones", {}).values()}
    return tuple(sorted(kinds))


def ruleset_problems(rs: RuleSet, zone_kinds: Iterable[str] = ()) -> list[Problem]:
    """Everything wrong with a rule set, as problems (empty when it is sound).

    Checks that every id of :data:`REQUIRED_RULES` and ``zone.<kind>`` for every kind in
    ``zone_kinds`` is present, that no other id is (a typo would otherwise go unnoticed),
    that descriptions and sources are not empty, statuses and units known, lengths numbers
    of 0 or more, ``turning.shape`` one of :data:`TURNING_SHAPES`, and that the pinch width
    does not exceed the route width.
    """
    where = f"{rs.id}.rules"
    hint = f"every rule set defines {', '.join(REQUIRED_RULES)} and zone.<kind> per zone kind"
    problems: list[Problem] = []
    have = {r.id for r in rs.rules}
    for rid in (*REQUIRED_RULES, *(f"zone.{k}" for k in zone_kinds)):
        if rid not in have:
            problems.append(Problem(f"{where}.{rid}", f"rule {rid!r} is missing", hint))
    for r in rs.rules:
        field = f"{where}.{r.id}"
        if r.id not in REQUIRED_RULES and not r.id.startswith("zone."):
            problems.append(Problem(field, f"unknown rule id {r.id!r}", hint))
        for name in ("description", "source"):
            if not str(getattr(r, name)).strip():
                problems.append(Problem(f"{field}.{name}", f"empty {name}"))
        if r.status not in STATUSES:
            problems.append(Problem(f"{field}.status", f"unknown status {r.status!r}",
                                    f"use one of {', '.join(STATUSES)}"))
        if r.id in _TEXT_RULES:
            if r.unit != "text" or r.value not in TURNING_SHAPES:
                problems.append(Problem(f"{field}.value", f"unknown shape {r.value!r}",
                                        f"use one of {', '.join(TURNING_SHAPES)} with unit text"))
        elif (r.unit not in MM_PER or isinstance(r.value, bool)
              or not isinstance(r.value, int | float) or r.value < 0):
            problems.append(Problem(field, f"expected a length of 0 or more in mm or in, found "
                                           f"{r.value!r} {r.unit}"))
    if not problems and rs.mm("route.pinch_width") > rs.mm("route.width"):
        problems.append(Problem(f"{where}.route.pinch_width",
                                f"pinch width {rs.mm('route.pinch_width')} mm is wider than the "
                                f"route width {rs.mm('route.width')} mm",
                                "repeat route.width when the set allows no pinch"))
    return problems


def load_ruleset(name: str, overrides: dict[str, int | str] | None = None) -> RuleSet:
    """Load a bundled rule set by id, check it, and apply ``overrides`` (rule id -> mm).

    Raises :class:`RuleError` for an unknown set (listing the known ones), a set that fails
    :func:`ruleset_problems` against the catalogue's zone kinds, an unknown rule id in
    ``overrides`` or a negative override.
    """
    known = ruleset_ids()
    if name not in known:
        raise RuleError(Problem("rules.set", f"unknown rule set {name!r}",
                                f"use one of {', '.join(known)}"))
    rs = _bundled(name)
    if overrides:
        rs = _apply_overrides(rs, overrides)
    return rs


@functools.cache
def _bundled(name: str) -> RuleSet:
    """A bundled set, read and checked once (rule sets are frozen, so sharing is safe)."""
    path = resources.files("roomfit") / "data" / "rules" / f"{name}.toml"
    try:
        data = tomllib.loads(path.read_text(encoding="utf-8"))
    except tomllib.TOMLDecodeError as e:
        raise RuleError(Problem(f"{name}.toml", f"not valid TOML: {e}")) from None
    head = [Problem(f"{name}.{k}", f"missing {k}") for k in ("label", "description", "rules")
            if k not in data]
    if head:
        raise RuleError(head)
    rules = tuple(
        _parse_rule(rid, raw, f"{name}.rules.{rid}") for rid, raw in data["rules"].items()
    )
    rs = RuleSet(name, data["label"], data["description"], rules)
    problems = ruleset_problems(rs, _catalog_zone_kinds())
    if problems:
        raise RuleError(problems)
    return rs


def _apply_overrides(rs: RuleSet, overrides: dict[str, int | str]) -> RuleSet:
    problems: list[Problem] = []
    by_id = {r.id: r for r in rs.rules}
    for rid, value in overrides.items():
        field = f"rules.overrides.{rid}"
        if rid not in by_id:
            problems.append(Problem(field, f"rule set {rs.id!r} has no rule {rid!r}",
                                    f"run `roomfit rules {rs.id}` to list its rules"))
        elif by_id[rid].unit == "text":
            if not isinstance(value, str):
                problems.append(Problem(field, f"expected a word, found {value!r}"))
            elif rid == "turning.shape" and value not in TURNING_SHAPES:
                problems.append(Problem(field, f"unknown shape {value!r}",
                                        f"use one of {', '.join(TURNING_SHAPES)}"))
            else:
                by_id[rid] = replace(by_id[rid], value=value, overridden=True)
        elif isinstance(value, bool) or not isinstance(value, int) or value < 0:
            problems.append(Problem(field, f"expected a length of 0 mm or more, found {value!r}"))
        else:
            by_id[rid] = replace(by_id[rid], value=value, unit="mm", overridden=True)
    if problems:
        raise RuleError(problems)
    return replace(rs, rules=tuple(by_id[r.id] for r in rs.rules))


def rules_for(plan: object) -> RuleSet:
    """The rule set a plan picks, with its overrides applied."""
    choice = plan.rules  # type: ignore[attr-defined]
    return load_ruleset(choice.set, choice.override_map())


def choose_rules(plan: object, name: str | None = None) -> RuleSet:
    """The rule set every command and the page judge ``plan`` by: the plan's own set with its
    overrides, or the set named ``name`` as published. The plan's overrides were written for
    its own set, so they carry over only when ``name`` is that same set (or None).

    >>> from roomfit.plan.data import Plan, RuleChoice
    >>> plan = Plan(name="x", rooms=(), rules=RuleChoice("everyday", (("route.width", 1000),)))
    >>> choose_rules(plan).get("route.width").mm, choose_rules(plan, "everyday").get("route.width").mm
    (1000, 1000)
    >>> choose_rules(plan, "ada-2010").get("route.width").mm   # 36 in, as published
    914
    """
    choice = plan.rules  # type: ignore[attr-defined]
    if name is None or name == choice.set:
        return load_ruleset(choice.set, choice.override_map())
    return load_ruleset(name)
