"""Rows of the project's clearance reference cited by the rule sets and the catalogue.

Copied from ``shared/reference/clearances.md`` (the Status column: V verified against
the named page, M from memory, CP common practice) so the tests also run on a clean clone;
``test_rules.py`` compares this copy with the file when the file is on the machine.
Only V rows may serve as test oracles.
"""

from __future__ import annotations

import re
from pathlib import Path

__all__ = ["REFERENCE_FILE", "STATUS", "RULE_STATUS", "parse_statuses", "cited_rows", "oracle"]

REFERENCE_FILE = Path(__file__).resolve().parents[2] / "shared" / "reference" / "clearances.md"

STATUS: dict[str, str] = {
    "B1": "V", "B4": "V", "B5": "V", "B6": "M", "B11": "V", "B13": "V",
    "D1": "V", "D4": "V", "D5": "V", "D15": "V", "D17": "V", "D18": "M", "D20": "V", "D24": "M",
    "E1": "V", "E2": "V", "E4": "V", "E5": "CP", "E8": "V", "E10": "V", "E11": "V", "E12": "V",
    "E14": "CP", "E16": "CP", "E25": "V", "E26": "V", "E28": "CP",
    "F1": "V", "F2": "V", "F3": "V", "F9": "M", "H5": "V", "H6": "V",
    "R1": "V", "R2": "V", "R11": "V",
    "S1": "V", "S2": "V", "S3": "V", "S5": "M", "S6": "V", "S7": "V", "S8": "CP", "S9": "CP",
    "S10": "V", "S12": "M", "S13": "V",
    "T1": "V", "T2": "V", "T9": "V", "T10": "V", "T15": "M", "T17": "V", "T18": "V", "T19": "V",
    "T20": "V", "T21": "V",
}

#: Reference status letters and the rule-set status words they stand for.
RULE_STATUS = {"V": "verified", "M": "memory", "CP": "common-practice"}

_ROW = re.compile(r"^\|\s*([A-Z]\d+)\s*\|")


def parse_statuses(text: str) -> dict[str, str]:
    """Row id -> status letter from the reference's markdown tables (first word of the last
    column, e.g. ``CP (V DG)`` -> ``CP``)."""
    out: dict[str, str] = {}
    for line in text.splitlines():
        m = _ROW.match(line)
        if m:
            out[m.group(1)] = line.strip().strip("|").split("|")[-1].split()[0]
    return out


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
