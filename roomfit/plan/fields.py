"""Reading one value of a plan file: tables, text, ids, lengths, points and outlines.

:class:`FieldReader` walks the parsed TOML tree, turns each value into a model type and
collects every problem (field path and what is wrong) instead of stopping at the first, so the
user sees them all at once.
"""

from __future__ import annotations

import re
from dataclasses import replace
from typing import Any

from shapely import Polygon
from shapely.validation import explain_validity

from roomfit.errors import Problem, RoomfitError
from roomfit.plan.limits import MAX_FLAT_MM, check_text
from roomfit.plan.units import parse_length

__all__ = ["FieldReader", "kind_of", "array_items", "known_ids"]

_ID = re.compile(r"[A-Za-z0-9][A-Za-z0-9_.-]{0,99}")


class FieldReader:
    """Walks the TOML tree, turning values into model types and collecting problems."""

    def __init__(self, unit: str) -> None:
        self.unit = unit
        self.problems: list[Problem] = []

    def add(self, field: str, message: str, hint: str = "") -> None:
        self.problems.append(Problem(field, message, hint))

    def table(self, raw: Any, field: str, allowed: set[str], required: set[str]) -> dict | None:
        if not isinstance(raw, dict):
            self.add(field, f"expected a table, found {kind_of(raw)}")
            return None
        for k in sorted(set(raw) - allowed):
            self.add(_at(field, k), "unknown key", f"allowed keys: {', '.join(sorted(allowed))}")
        for k in sorted(required - set(raw)):
            self.add(_at(field, k), "missing key")
        return raw

    def text(self, raw: dict, key: str, field: str, default: str | None = None) -> str | None:
        if key not in raw:
            return default
        v = raw[key]
        if not isinstance(v, str):
            self.add(_at(field, key), f"expected text, found {kind_of(v)}")
            return None
        wrong = check_text(v)
        if wrong is not None:
            self.add(_at(field, key), f"the text {wrong}",
                     "remove control characters (tab and line breaks are allowed)")
            return None
        return v

    def ident(self, raw: dict, key: str, field: str) -> str | None:
        v = self.text(raw, key, field)
        if v is not None and not _ID.fullmatch(v):
            self.add(_at(field, key), f"id {v!r} must start with a letter or digit and use only "
                     "letters, digits, '-', '_' and '.' (at most 100 characters)")
            return None
        return v

    def length(self, raw: dict, key: str, field: str, low: int | None = 1,
               high: int | None = MAX_FLAT_MM) -> int | None:
        """A length in mm; ``low`` is the least value allowed (1: positive, 0: not negative,
        None: any, e.g. a coordinate), ``high`` the largest (None: any a coordinate may be)."""
        if key not in raw:
            return None
        try:
            v = parse_length(raw[key], self.unit, _at(field, key))
        except RoomfitError as e:
            allowed = f"allowed: {max(low or 0, 0)} to {high} mm" if high is not None else ""
            self.problems.extend(replace(p, hint=p.hint or allowed) for p in e.problems)
            return None
        if low is not None and v < low:
            need = "greater than 0" if low == 1 else f"at least {low} mm"
            self.add(_at(field, key), f"must be {need}, found {v} mm")
            return None
        if high is not None and v > high:
            self.add(_at(field, key), f"must be at most {high} mm, found {v} mm",
                     f"allowed: {max(low or 0, 0)} to {high} mm")
            return None
        return v

    def point(self, raw: Any, field: str) -> tuple[int, int] | None:
        if not isinstance(raw, list) or len(raw) != 2:
            self.add(field, f"expected a point [x, y], found {kind_of(raw)}")
            return None
        try:
            return (parse_length(raw[0], self.unit, field + "[0]"),
                    parse_length(raw[1], self.unit, field + "[1]"))
        except RoomfitError as e:
            self.problems.extend(e.problems)
            return None

    def outline(self, raw: dict, key: str, field: str) -> tuple[tuple[int, int], ...] | None:
        if key not in raw:
            return None
        pts_raw = raw[key]
        f = _at(field, key)
        if not isinstance(pts_raw, list) or len(pts_raw) < 3:
            self.add(f, "expected a list of at least 3 points [[x, y], ...]")
            return None
        pts = [self.point(p, f"{f}[{i}]") for i, p in enumerate(pts_raw)]
        if any(p is None for p in pts):
            return None
        pts_ok: list[tuple[int, int]] = [p for p in pts if p is not None]
        if len(pts_ok) > 3 and pts_ok[0] == pts_ok[-1]:
            pts_ok = pts_ok[:-1]
        poly = Polygon(pts_ok)
        if not poly.is_valid:
            self.add(f, f"not a simple polygon: {explain_validity(poly)}",
                     "list the corners in order around the outline, without crossing edges")
            return None
        if poly.area <= 0:
            self.add(f, "outline encloses no area")
            return None
        return tuple(pts_ok)


def _at(field: str, key: str) -> str:
    """The path of ``key`` inside ``field`` (``rooms[0].id``; a top-level key alone)."""
    return f"{field}.{key}" if field else key


def kind_of(v: Any) -> str:
    """How a TOML value reads to a person ("a table", "text", ...)."""
    return {dict: "a table", list: "a list", str: "text", bool: "true/false", int: "a number",
            float: "a number"}.get(type(v), type(v).__name__)


def array_items(r: FieldReader, data: dict, key: str) -> list[tuple[str, Any]]:
    """The tables of the array ``key`` with their field paths (``rooms[0]``, ...)."""
    raw = data.get(key, [])
    if not isinstance(raw, list):
        r.add(key, f"expected an array of tables ([[{key}]]), found {kind_of(raw)}")
        return []
    return [(f"{key}[{i}]", item) for i, item in enumerate(raw)]


def known_ids(rooms: dict[str, Any]) -> str:
    """A hint listing the ids a reference could have named."""
    return "known: " + ", ".join(sorted(rooms)) if rooms else "no rooms are defined"

