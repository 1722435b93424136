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
>>> print(format_length(1734, "ft"))
5' 8 1/4"
>>> format_area(12_000_000, "ft")
'12.00 m² (129.2 sq ft)'
"""

from __future__ import annotations

import re
from fractions import Fraction

from roomfit.errors import Problem, UnitError
from roomfit.plan.limits import MAX_COORDINATE_MM

__all__ = ["UNITS", "IMPERIAL", "MM_PER", "FORMS", "parse_length", "to_unit", "format_length",
           "inches", "format_inches", "format_feet_inches", "show_length", "format_area",
           "write_length", "show_area", "show_measure", "in_plan_units"]

#: Millimetres per unit, exact.
MM_PER: dict[str, Fraction] = {
    "mm": Fraction(1),
    "cm": Fraction(10),
    "m": Fraction(1000),
    "in": Fraction(254, 10),
    "ft": Fraction(3048, 10),
}
UNITS = tuple(MM_PER)
#: Units whose plans are shown in feet and inches.
IMPERIAL = ("in", "ft")
#: Square millimetres per square foot, exact (304.8 mm squared).
_MM2_PER_SQFT = Fraction(3048, 10) ** 2

#: A number as a plan writes it: digits with an optional decimal part (no exponent, no
#: thousands separator), short enough to stay exact.
_NUM = r"\d{1,10}(?:\.\d{1,10})?"
#: Inches may also be a fraction as on a tape measure: ``1/2`` or ``32 1/2``.
_INCHES = rf"(?:\d{{1,6}}\s+)?\d{{1,4}}/\d{{1,4}}|{_NUM}"
_FT, _IN = r"(?:ft|')", r'(?:in|")'
#: One number with an optional unit (the only form that may carry a sign).
_SINGLE = re.compile(rf"(?P<sign>[-+]?)\s*(?P<num>{_NUM})\s*(?P<unit>mm|cm|m|in|ft|\"|')?")
#: Inches with a fraction: ``32 1/2 in``, ``-1/4"``.
_FRACTION = re.compile(rf"(?P<sign>[-+]?)\s*(?P<inches>{_INCHES})\s*{_IN}")
#: Feet and inches, both with their unit: ``3 ft 6 in``, ``3'6"``, ``2 ft 7 1/2 in``.
_FEET_INCHES = re.compile(rf"(?P<feet>\d{{1,6}})\s*{_FT}\s*(?P<inches>{_INCHES})\s*{_IN}")
#: The accepted forms, shown with every length that cannot be read.
FORMS = ('a number in the plan\'s unit ("900", "-300"), or one unit: "90 cm", "2.5 m", '
         '"36 in", "32 1/2 in", "3 ft"; feet and inches with both units: "3 ft 6 in", '
         '"3\'6\"", "2 ft 7 1/2 in"')


def _round_half_away(x: Fraction) -> int:
    n = abs(x)
    r = int(n + Fraction(1, 2))
    return r if x >= 0 else -r


def inches(value: float) -> float:
    """Exact millimetres of ``value`` inches, unrounded (60 in -> 1524.0)."""
    return float(Fraction(str(value)) * MM_PER["in"])


def parse_length(value: object, unit: str = "mm", field: str = "") -> int:
    """Parse a length to integer millimetres.

    ``value`` is a number (in ``unit``) or a string in one of the :data:`FORMS`: ``"900"``,
    ``"90 cm"``, ``"2.5m"``, ``"36 in"``, ``"32 1/2 in"``, ``"3 ft 6 in"`` or ``3'6"``.
    Raises :class:`UnitError` naming ``field`` when the value cannot be read exactly or lies
    beyond :data:`~roomfit.plan.limits.MAX_COORDINATE_MM`.
    """
    if unit not in MM_PER:
        raise UnitError(Problem(field, f"unknown unit {unit!r}", f"use one of {', '.join(UNITS)}"))
    if isinstance(value, bool):
        raise UnitError(Problem(field, f"expected a length, found {value!r}"))
    if isinstance(value, int | float):
        if value != value or value in (float("inf"), float("-inf")):
            raise UnitError(Problem(field, f"expected a finite length, found {value!r}"))
        if abs(value) > MAX_COORDINATE_MM * 1000:  # refused before exact arithmetic on it
            return _limited(MAX_COORDINATE_MM + 1, value, field)
        return _limited(_round_half_away(Fraction(str(value)) * MM_PER[unit]), value, field)
    if not isinstance(value, str):
        raise UnitError(Problem(field, f"expected a length, found {type(value).__name__}"))
    return _limited(_parse_text(value, unit, field), value, field)


def _limited(mm: int, value: object, field: str) -> int:
    if abs(mm) > MAX_COORDINATE_MM:
        raise UnitError(Problem(field, f"{_shown(value)} is beyond the largest length roomfit reads "
                                f"({MAX_COORDINATE_MM // 1000} m either way)"))
    return mm


def _shown(value: object) -> str:
    """``value`` as a message quotes it: its repr, cut short when long."""
    text = repr(value)
    return text if len(text) <= 40 else f"{text[:36]}..."


def _fraction(text: str) -> Fraction:
    """``"32 1/2"`` -> 65/2, ``"1/4"`` -> 1/4, ``"7.5"`` -> 15/2 (exact)."""
    whole, _, frac = text.rpartition(" ") if "/" in text else ("", "", text)
    if "/" not in frac:
        return Fraction(frac)
    num, den = frac.split("/")
    if int(den) == 0 or int(num) >= int(den):
        raise ValueError(f"{frac} is not a proper fraction")
    return Fraction(int(whole or 0)) + Fraction(int(num), int(den))


def _parse_text(value: str, unit: str, field: str) -> int:
    """A length written as text, to mm; refuses what it cannot read exactly (see
    :data:`FORMS`): no sums of loose numbers (``"1 500"``, ``"900mm900"``), no inches without
    their unit after feet (``"2'8"``), no sign before feet and inches (``"-3 ft 6 in"``)."""
    text = " ".join(value.split())
    if len(text) > 40 or re.search(r"\d{11}", text):
        raise UnitError(Problem(field, f"cannot read length {_shown(value)}: too long; a length "
                                "has at most 10 digits before and after the point", FORMS))
    try:
        if m := _SINGLE.fullmatch(text):
            u = {'"': "in", "'": "ft"}.get(m["unit"] or "", m["unit"] or unit)
            mm = Fraction(m["num"]) * MM_PER[u]
            return _round_half_away(-mm if m["sign"] == "-" else mm)
        if m := _FRACTION.fullmatch(text):
            mm = _fraction(m["inches"]) * MM_PER["in"]
            return _round_half_away(-mm if m["sign"] == "-" else mm)
        if m := _FEET_INCHES.fullmatch(text):
            inch = _fraction(m["inches"])
            if inch >= 12:
                raise ValueError(f"{m['inches']} in after feet is 12 inches or more")
            return _round_half_away(int(m["feet"]) * MM_PER["ft"] + inch * MM_PER["in"])
    except ValueError as e:
        raise UnitError(Problem(field, f"cannot read length {_shown(value)}: {e}", FORMS)) from None
    raise UnitError(Problem(field, f"cannot read length {_shown(value)}{_why(text)}", FORMS))


def _why(text: str) -> str:
    """Why ``text`` is refused, where a common slip explains it."""
    if not text:
        return ": it is empty"
    if re.fullmatch(rf"[-+]?\s*\d+\s*{_FT}\s*{_NUM}", text):
        return ": the inches after feet need their unit"
    if text[0] in "-+" and re.search(_FT, text) and re.search(_IN, text):
        return ": a sign cannot stand before feet and inches; write the length in inches"
    tokens = re.findall(r"\d+(?:\.\d+)?|[a-z]+|\S", text.lstrip("-+"))
    numbers = [t for t in tokens if t[0].isdigit()]
    if len(numbers) > 1 and all(t[0].isdigit() or t in MM_PER or t in "'\"" for t in tokens):
        return ": it holds several numbers, and only feet followed by inches may be combined"
    return ""


def to_unit(mm: int | float, unit: str) -> float:
    """``mm`` expressed in ``unit`` (no rounding beyond float)."""
    return float(Fraction(str(mm)) / MM_PER[unit])


def _quarters(mm: int | float) -> int:
    """``mm`` in whole quarter inches, rounded half away from zero."""
    return _round_half_away(Fraction(str(mm)) / MM_PER["in"] * 4)


def _inch_text(quarters: int) -> str:
    """Whole and quarter inches: ``34 -> "8 1/2"``, ``1 -> "1/4"``, ``0 -> "0"``."""
    whole, q = divmod(quarters, 4)
    frac = {0: "", 1: "1/4", 2: "1/2", 3: "3/4"}[q]
    if whole and frac:
        return f"{whole} {frac}"
    return frac or str(whole)


def format_inches(mm: int | float) -> str:
    """``mm`` in inches to the nearest 1/4 in: ``format_inches(920) == "36 1/4 in"``."""
    q = _quarters(mm)
    return ("-" if q < 0 else "") + _inch_text(abs(q)) + " in"


def format_feet_inches(mm: int | float) -> str:
    """``mm`` in feet and inches to the nearest 1/4 in, as on a drawing: ``5' 8 1/4"``;
    under a foot only inches (``8 1/4"``), whole feet with ``0"``."""
    q = _quarters(mm)
    feet, rest = divmod(abs(q), 48)
    sign = "-" if q < 0 else ""
    if not feet:
        return f'{sign}{_inch_text(rest)}"'
    return f"{sign}{feet}' {_inch_text(rest)}\""


def show_length(mm: int | float, unit: str) -> str:
    """How a plan measured in ``unit`` shows a length to its reader: feet and inches for
    plans in ``in`` or ``ft``, whole millimetres otherwise."""
    if unit in IMPERIAL:
        return format_feet_inches(mm)
    return f"{mm:.0f} mm"


def format_area(mm2: float, unit: str) -> str:
    """An area in m² (two decimals), with square feet beside it for plans in ``in`` or ``ft``."""
    text = f"{mm2 / 1e6:.2f} m²"
    if unit in IMPERIAL:
        text += f" ({float(Fraction(str(mm2)) / _MM2_PER_SQFT):.1f} sq ft)"
    return text


def show_area(mm2: float, unit: str) -> str:
    """A small area (what a piece or wall cuts off a zone) as a plan in ``unit`` reads it:
    square feet for plans in ``in`` or ``ft``, cm² otherwise."""
    if unit in IMPERIAL:
        return f"{float(Fraction(str(mm2)) / _MM2_PER_SQFT):.2f} sq ft"
    return f"{mm2 / 100:.0f} cm²"


def show_measure(value: float | None, unit: str, *, area: bool = False) -> str:
    """A finding's measured or required figure (mm, or mm² when ``area``) as a plan in
    ``unit`` reads it; ``-`` when there is none.

    >>> print(show_measure(914, "ft"), show_measure(120000, "mm", area=True), show_measure(None, "mm"))
    3' 0" 1200 cm² -
    """
    if value is None:
        return "-"
    return show_area(value, unit) if area else show_length(value, unit)


_BY_WORDS = re.compile(r"(?<![\w.])(\d+(?:\.\d+)?) x (\d+(?:\.\d+)?) mm(?![\w²])")
_MM_WORDS = re.compile(r"(?<![\w.])(-?\d+(?:\.\d+)?) mm(?![\w²])")
_CM2_WORDS = re.compile(r"(?<![\w.])(\d+(?:\.\d+)?) cm(?:2|²)(?!\w)")
_POINT_WORDS = re.compile(r"\((-?\d+(?:\.\d+)?), (-?\d+(?:\.\d+)?)\)")


def in_plan_units(text: str, unit: str) -> str:
    """Words the audit wrote in millimetres, as a plan measured in ``unit`` reads them: for
    plans in ``in`` or ``ft`` every length ``N mm`` in feet and inches, every area ``N cm2``
    in square feet and every plan point ``(x, y)`` in feet and inches; other plans' words
    unchanged. The figures stay exact millimetres inside; only what is shown changes.

    >>> print(in_plan_units("914 mm wide at (1000, 2000), 256 cm2 outside", "ft"))
    3' 0" wide at (3' 3 1/4", 6' 6 3/4"), 0.28 sq ft outside
    >>> print(in_plan_units("a 1200 x 1500 mm space", "in"))
    a 3' 11 1/4" x 4' 11" space
    >>> print(in_plan_units("914 mm wide at (1000, 2000)", "cm"))
    914 mm wide at (1000, 2000)
    """
    if unit not in IMPERIAL:
        return text
    text = _BY_WORDS.sub(lambda m: f"{format_feet_inches(float(m.group(1)))} x "
                         f"{format_feet_inches(float(m.group(2)))}", text)
    text = _MM_WORDS.sub(lambda m: format_feet_inches(float(m.group(1))), text)
    text = _CM2_WORDS.sub(lambda m: show_area(float(m.group(1)) * 100, unit), text)
    return _POINT_WORDS.sub(lambda m: f"({format_feet_inches(float(m.group(1)))}, "
                            f"{format_feet_inches(float(m.group(2)))})", text)


def write_length(mm: int, unit: str) -> int | float | str:
    """``mm`` as a plan file in ``unit`` stores it, reading back as the same millimetre: a
    whole number when exact; for plans in ``in`` or ``ft`` otherwise a feet-and-inches
    string with the shortest decimal inches (``"17 ft 4.75 in"``); else the shortest decimal
    in ``unit``."""
    if unit == "mm":
        return mm
    v = Fraction(mm) / MM_PER[unit]
    if v.denominator == 1:
        return int(v)
    for digits in range(1, 7):
        out: int | float | str = round(float(v), digits)
        if unit in IMPERIAL and mm > 0:  # feet and inches; a negative stays a decimal
            feet, inch = divmod(round(float(Fraction(mm) / MM_PER["in"]), digits), 12)
            text = f"{inch:.{digits}f}".rstrip("0").rstrip(".")
            out = (f"{int(feet)} ft" + (f" {text} in" if text != "0" else "")) if feet else f"{text} in"
        if parse_length(out, unit) == mm:
            return out
    return float(v)


def format_length(mm: int | float, unit: str = "mm") -> str:
    """Human-readable length: ``format_length(1524, "in") == "60 in"``; inches and feet to
    the nearest 1/4 in (:func:`format_inches`, :func:`format_feet_inches`)."""
    if unit == "in":
        return format_inches(mm)
    if unit == "ft":
        return format_feet_inches(mm)
    v = to_unit(mm, unit)
    digits = {"mm": 0, "cm": 1, "m": 2, "in": 1, "ft": 2}[unit]
    s = f"{v:.{digits}f}".rstrip("0").rstrip(".") if digits else f"{v:.0f}"
    return f"{s} {unit}"
