"""Functional-group values as data: distances and angles that make a group of pieces usable
together, each with its source (``roomfit/data/groups.toml``).

A value is stated in the unit its source uses (``mm``, ``in``, ``deg`` or ``ratio``); inches
convert exactly (36 in -> 914.4 mm, rounded to 914 by :meth:`GroupParam.mm`).

>>> load_group_params()["dining.pull_out"].mm
813
>>> load_group_params()["wall.share"].value
0.8
"""

from __future__ import annotations

import functools
import tomllib
from dataclasses import dataclass
from fractions import Fraction
from importlib import resources

from roomfit.errors import Problem, RuleError
from roomfit.plan.units import MM_PER

__all__ = ["GroupParam", "PARAM_UNITS", "load_group_params", "group_param_problems", "param",
           "rule_weight", "is_comfort"]

#: Units a group value may use: lengths, degrees, and shares between 0 and 1.
PARAM_UNITS = ("mm", "in", "deg", "ratio")

_STATUSES = ("verified", "memory", "common-practice")


@dataclass(frozen=True)
class GroupParam:
    """One group value with its source; ``value`` in ``unit`` as the source states it."""

    id: str
    description: str
    value: float
    unit: str
    source: str
    status: str

    @property
    def mm(self) -> int:
        """A length in whole millimetres (exact conversion, rounded at the end)."""
        if self.unit not in MM_PER:
            raise RuleError(Problem(f"params.{self.id}", f"{self.id!r} is not a length"))
        return int(round(Fraction(str(self.value)) * MM_PER[self.unit]))

    @property
    def cited(self) -> str:
        """The source with its status, as printed beside a measured value."""
        return self.source if self.status == "verified" else f"{self.source} ({self.status})"


def group_param_problems(raw: dict[str, dict[str, object]]) -> list[Problem]:
    """Everything wrong with the ``params`` table of a groups file (empty when sound)."""
    out = []
    for pid, rec in raw.items():
        f = f"params.{pid}"
        if rec.get("unit") not in PARAM_UNITS:
            out.append(Problem(f + ".unit", f"unknown unit {rec.get('unit')!r}",
                               f"use one of {', '.join(PARAM_UNITS)}"))
        if not isinstance(rec.get("value"), int | float) or float(rec["value"]) < 0:  # type: ignore[arg-type]
            out.append(Problem(f + ".value", "must be a number, 0 or more"))
        if not str(rec.get("source", "")).strip():
            out.append(Problem(f + ".source", "empty source", "name the standard or handbook, "
                                                              "or say common practice"))
        if rec.get("status") not in _STATUSES:
            out.append(Problem(f + ".status", f"unknown status {rec.get('status')!r}",
                               f"use one of {', '.join(_STATUSES)}"))
    return out


@functools.cache
def _file() -> dict:
    path = resources.files("roomfit") / "data" / "groups.toml"
    return tomllib.loads(path.read_text(encoding="utf-8"))


def rule_weight(rule: str) -> int:
    """Weight of an unmet group rule (an audit rule id such as ``group.view``) in the
    placement model and in the ranking of candidates: ``[solver].weight``, times
    ``comfort_share`` for the rules listed in ``comfort`` (a miss that leaves the group
    usable)."""
    solver = _file()["solver"]
    share = float(solver["comfort_share"]) if is_comfort(rule) else 1.0
    return round(int(solver["weight"]) * share)


def is_comfort(rule: str) -> bool:
    """True for a group rule whose miss leaves the group usable as meant (``[solver].comfort``:
    a bed head under a window, a rug beside its group)."""
    return rule in _file()["solver"]["comfort"]


@functools.cache
def _bundled() -> tuple[GroupParam, ...]:
    raw = _file()["params"]
    problems = group_param_problems(raw)
    if problems:
        raise RuleError(problems)
    return tuple(GroupParam(pid, str(r["description"]), float(r["value"]), str(r["unit"]),
                            str(r["source"]), str(r["status"])) for pid, r in raw.items())


def load_group_params() -> dict[str, GroupParam]:
    """The bundled group values by id (a fresh dict each call; the file is read once)."""
    return {p.id: p for p in _bundled()}


def param(pid: str) -> GroupParam:
    """One bundled group value (KeyError names the id when there is none)."""
    return load_group_params()[pid]
