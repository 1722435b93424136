"""Rows of the project's references page (``docs/references.md``) cited by the rule sets,
the catalogue and the tests, read from the page itself so the repository stands alone.

Each row's Status column is ``verified`` (checked against the named text), ``from memory``
or ``common practice``; only verified rows may serve as test oracles.
"""

from __future__ import annotations

import re
from pathlib import Path

__all__ = ["REFERENCE_FILE", "STATUS", "RULE_STATUS", "parse_statuses", "cited_rows", "oracle"]

REFERENCE_FILE = Path(__file__).resolve().parents[1] / "docs" / "references.md"

_WORDS = {"verified": "V", "from memory": "M", "common practice": "CP"}

#: Reference status letters and the rule-set status words they stand for.
RULE_STATUS = {"V": "verified", "M": "memory", "CP": "common-practice"}

_ROW = re.compile(r"^\|\s*([A-Z]\d+)\s*\|")


def parse_statuses(text: str) -> dict[str, str]:
    """Row id -> status letter (V, M or CP) from the references page's table, whose last
    column is ``verified``, ``from memory`` or ``common practice``."""
    out: dict[str, str] = {}
    for line in text.splitlines():
        m = _ROW.match(line)
        if m:
            out[m.group(1)] = _WORDS[line.strip().strip("|").split("|")[-1].strip()]
    return out


STATUS: dict[str, str] = parse_statuses(REFERENCE_FILE.read_text(encoding="utf-8"))


def cited_rows(source: str) -> list[tuple[str, str]]:
    """(row id, qualifier) for each row a source names in square brackets:
    ``"... [S5, from memory]"`` -> ``[("S5", "from memory")]``; ``"[T1, T2]"`` -> two rows."""
    out: list[tuple[str, str]] = []
    for group in re.findall(r"\[([^\]]+)\]", source):
        parts = [p.strip() for p in group.split(",")]
        ids = [p for p in parts if re.fullmatch(r"[A-Z]\d+", p)]
        words = ", ".join(p for p in parts if p not in ids)
        out.extend((i, words) for i in ids)
    return out


def oracle(row: str, value: float) -> float:
    """``value`` from reference row ``row``, refused unless the row is verified."""
    assert STATUS[row] == "V", f"row {row} is {STATUS[row]}: a default, not a test oracle"
    return value
