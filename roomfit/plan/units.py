"""Lengths: parsing and formatting.

Inside roomfit every length is an integer number of millimetres. On input we accept plain
numbers in the plan's unit and strings with a unit suffix. Inch and foot conversions are
exact (1 in = 25.4 mm by the 1959 international yard and pound agreement) and rounded to the
nearest millimetre only at the end, so ``"60 in"`` is 1524 mm (standards print 1525).

>>> parse_length("60 in")
1524
>>> parse_length(90, "cm")
900
>>> parse_length("3 ft 6 in")
1067
>>> format_length(1524, "in")
'60 in'
"""

from __future__ import annotations

import re
from fractions import Fraction

from roomfit.errors import Problem, UnitError

__all__ = ["UNITS", "MM_PER", "parse_length", "to_unit", "format_length", "inches"]

#: Millimetres per unit, exact.
MM_PER: dict[str, Fraction] = {
    "mm": Fraction(1),
    "cm": Fraction(10),
    "m": Fraction(1000),
    "in": Fraction(254, 10),
    "ft": Fraction(3048, 10),
}
UNITS = tuple(MM_PER)

_PART = re.compile(r"\s*(-?\d+(?:\.\d+)?)\s*(mm|cm|m|in|ft|\"|')?\s*")


def _round_half_away(x: Fraction) -> int:
    n = abs(x)
    r = int(n + Fraction(1, 2))
    return r if x >= 0 else -r


def inches(value: float) -> float:
    """Exact millimetres of ``value`` inches, unrounded (60 in -> 1524.0)."""
    return float(Fraction(str(value)) * MM_PER["in"])


def parse_length(value: object, unit: str = "mm", field: str = "") -> int:
    """Parse a length to integer millimetres.

    ``value`` is a number (in ``unit``) or a string such as ``"900"``, ``"90 cm"``,
    ``"2.5m"``, ``"36 in"``, ``"3 ft 6 in"`` or ``3'6"``. Raises :class:`UnitError` naming
    ``field`` when the value cannot be read.
    """
    if unit not in MM_PER:
        raise UnitError(Problem(field, f"unknown unit {unit!r}", f"use one of {', '.join(UNITS)}"))
    if isinstance(value, bool):
        raise UnitError(Problem(field, f"expected a length, found {value!r}"))
    if isinstance(value, int | float):
        if value != value or value in (float("inf"), float("-inf")):
            raise UnitError(Problem(field, f"expected a finite length, found {value!r}"))
        return _round_half_away(Fraction(str(value)) * MM_PER[unit])
    if not isinstance(value, str):
        raise UnitError(Problem(field, f"expected a length, found {type(value).__name__}"))
    text = value.strip()
    pos, total, parts = 0, Fraction(0), 0
    while pos < len(text):
        m = _PART.match(text, pos)
        if not m or m.end() == pos:
            raise UnitError(
                Problem(field, f"cannot read length {value!r}", 'write e.g. "900", "90 cm", "36 in"')
            )
        num, suffix = m.group(1), m.group(2)
        u = {'"': "in", "'": "ft"}.get(suffix or "", suffix or unit)
        total += Fraction(num) * MM_PER[u]
        parts += 1
        pos = m.end()
    if parts == 0:
        raise UnitError(Problem(field, "empty length"))
    return _round_half_away(total)


def to_unit(mm: int | float, unit: str) -> float:
    """``mm`` expressed in ``unit`` (no rounding beyond float)."""
    return float(Fraction(str(mm)) / MM_PER[unit])


def format_length(mm: int | float, unit: str = "mm") -> str:
    """Human-readable length: ``format_length(1524, "in") == "60 in"``."""
    v = to_unit(mm, unit)
    digits = {"mm": 0, "cm": 1, "m": 2, "in": 1, "ft": 2}[unit]
    s = f"{v:.{digits}f}".rstrip("0").rstrip(".") if digits else f"{v:.0f}"
    return f"{s} {unit}"
