"""What a plan file may hold: size, nesting, counts, magnitudes and text.

The limits keep reading, checking, drawing and solving bounded in time and memory, and keep
every number inside what the geometry library and the solver handle exactly. They sit far
above any real apartment (the largest sample has 7 rooms and 40 vertices) and are stated in
``docs/plan-format.md``; a plan beyond one is refused with the limit named, never cut down.

>>> check_text("Grandmother's chest")
>>> check_text("bell\\x07")
'contains a control character (U+0007) at position 5'
"""

from __future__ import annotations

import unicodedata
from typing import Any

from roomfit.errors import PlanError, Problem

__all__ = [
    "MAX_FILE_BYTES",
    "MAX_DEPTH",
    "MAX_COORDINATE_MM",
    "MAX_FLAT_MM",
    "MAX_OVERRIDE_MM",
    "MAX_PER_DAY",
    "MAX_ITEMS",
    "MAX_OUTLINE_VERTICES",
    "MAX_VERTICES",
    "MAX_TEXT_CHARS",
    "check_text",
    "check_shape",
]

#: Largest plan file read, in bytes (1 MiB; a furnished seven-room sample is about 8 KB).
#: Reading stops after this many bytes, so ``/dev/zero`` or a 50 MB file is refused at once.
MAX_FILE_BYTES = 1024 * 1024

#: Deepest nesting of tables and arrays (a plan needs 4: ``rooms[0].outline[1][0]``).
MAX_DEPTH = 6

#: Largest distance of any coordinate from the plan's origin, mm (1 km).
MAX_COORDINATE_MM = 1_000_000

#: Largest flat: every room lies within a square this wide, and no length (a width, depth,
#: height or sill) is longer, mm (200 m).
MAX_FLAT_MM = 200_000

#: Largest value of a rule override, mm (10 m; the widest rule in any set is 2440 mm).
MAX_OVERRIDE_MM = 10_000

#: Most trips a day of one routine line.
MAX_PER_DAY = 1000

#: Most tables in each array of a plan.
MAX_ITEMS = {"rooms": 200, "doors": 400, "windows": 400, "fixtures": 400, "furniture": 300,
             "routines": 300}

#: Most corners of one outline (a room, a fitting or its zone).
MAX_OUTLINE_VERTICES = 1000

#: Most corners of all outlines of a plan together.
MAX_VERTICES = 10_000

#: Longest text value (a name, label, address or notes), in characters.
MAX_TEXT_CHARS = 4000

#: Bidirectional embedding, override and isolate controls: they make a label read
#: differently from what it holds, so they are refused like control characters.
_BIDI = frozenset("\u202a\u202b\u202c\u202d\u202e\u2066\u2067\u2068\u2069")


def _unsafe(ch: str) -> bool:
    """A character no output may carry: a control character other than tab and line breaks
    (XML 1.0 forbids most of them in SVG and HTML), a noncharacter (U+FFFE, U+FFFF, ...),
    a surrogate or a bidirectional control."""
    if ch in "\t\n\r":
        return False
    cp = ord(ch)
    return (unicodedata.category(ch) in ("Cc", "Cs") or ch in _BIDI
            or 0xFDD0 <= cp <= 0xFDEF or cp & 0xFFFE == 0xFFFE)


def check_text(value: str) -> str | None:
    """What is wrong with ``value`` as text roomfit will print and draw, or None."""
    if len(value) > MAX_TEXT_CHARS:
        return f"is {len(value)} characters long; at most {MAX_TEXT_CHARS} are allowed"
    for i, ch in enumerate(value):
        if _unsafe(ch):
            return f"contains a control character (U+{ord(ch):04X}) at position {i + 1}"
    return None


def check_shape(data: dict[str, Any], source: str) -> None:
    """Refuse a parsed plan whose nesting, array sizes or vertex count are beyond the limits.

    Runs before any value is read, so a huge plan costs no geometry. Raises one
    :class:`PlanError` listing each limit passed.
    """
    problems = []
    deep = _too_deep(data)
    if deep is not None:
        problems.append(Problem(deep, f"nested more than {MAX_DEPTH} levels deep",
                                "a plan needs 4 levels; see docs/plan-format.md"))
    for key, most in MAX_ITEMS.items():
        items = data.get(key)
        if isinstance(items, list) and len(items) > most:
            problems.append(Problem(key, f"{len(items)} entries; a plan may have at most {most}"))
    total = 0
    for key in ("rooms", "fixtures"):
        items = data.get(key)
        for i, item in enumerate(items if isinstance(items, list) else []):
            for part in ("outline", "zone"):
                pts = item.get(part) if isinstance(item, dict) else None
                if isinstance(pts, list):
                    total += len(pts)
                    if len(pts) > MAX_OUTLINE_VERTICES:
                        problems.append(Problem(f"{key}[{i}].{part}", f"{len(pts)} corners; an "
                                                f"outline may have at most {MAX_OUTLINE_VERTICES}"))
    if total > MAX_VERTICES:
        problems.append(Problem("", f"{total} corners in all outlines; a plan may have at most "
                                f"{MAX_VERTICES}"))
    if problems:
        raise PlanError(problems, source)


def _too_deep(data: Any) -> str | None:
    """Field path of a value nested deeper than :data:`MAX_DEPTH`, or None (no recursion:
    a hostile file may nest thousands of levels)."""
    stack: list[tuple[Any, str, int]] = [(data, "", 0)]
    while stack:
        node, path, depth = stack.pop()
        if depth > MAX_DEPTH:
            return path
        if isinstance(node, dict):
            stack.extend((v, f"{path}.{k}" if path else str(k), depth + 1) for k, v in node.items())
        elif isinstance(node, list):
            stack.extend((v, f"{path}[{i}]", depth + 1) for i, v in enumerate(node))
    return None
