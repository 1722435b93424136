"""DEVELOPERS.md stays true: its module table names every module of the tree."""

from __future__ import annotations

import re
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
PKG = ROOT / "roomfit"
GUIDE = (ROOT / "DEVELOPERS.md").read_text(encoding="utf-8")
FILES = sorted([*(p for p in PKG.rglob("*.py") if p.name not in ("__init__.py", "__main__.py")),
                *ROOT.glob("app*.py")])


def _row(path: Path) -> str:
    """The table row of the module's package (the first column names it)."""
    rel = path.relative_to(PKG) if path.is_relative_to(PKG) else path.relative_to(ROOT)
    package = f"`{rel.parts[0]}/`" if len(rel.parts) > 1 else None
    rows = [line for line in GUIDE.splitlines() if line.startswith("| ")]
    if package is None:  # a top-level module: the 'top' or 'shells' row
        return "\n".join(r for r in rows if r.startswith(("| top ", "| shells ")))
    return "\n".join(r for r in rows if r.startswith(f"| {package}"))


@pytest.mark.parametrize("path", FILES, ids=lambda p: str(p.relative_to(ROOT)))
def test_every_module_is_in_the_developers_table(path: Path) -> None:
    assert re.search(rf"`{re.escape(path.name)}`", _row(path)), (
        f"DEVELOPERS.md: say what {path.relative_to(ROOT)} owns in its package's row")
