"""The shape of the code a newcomer meets: no module over 500 lines, no function over 80
lines unless the reason is written beside it (a ``# long: <reason>`` comment on the line
above its ``def``). Counts are physical lines, docstrings and comments included."""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
FILES = sorted([*ROOT.joinpath("roomfit").rglob("*.py"), *ROOT.glob("app*.py")])
MODULE_LINES = 500
FUNCTION_LINES = 80


def _name(p: Path) -> str:
    return str(p.relative_to(ROOT))


@pytest.mark.parametrize("path", FILES, ids=_name)
def test_module_is_short_enough(path: Path) -> None:
    n = len(path.read_text(encoding="utf-8").splitlines())
    assert n <= MODULE_LINES, f"{_name(path)} has {n} lines; split it by what it owns"


@pytest.mark.parametrize("path", FILES, ids=_name)
def test_long_functions_say_why(path: Path) -> None:
    lines = path.read_text(encoding="utf-8").splitlines()
    for node in ast.walk(ast.parse("\n".join(lines))):
        if isinstance(node, ast.FunctionDef | ast.AsyncFunctionDef):
            first = min([node.lineno, *(d.lineno for d in node.decorator_list)])
            length = (node.end_lineno or node.lineno) - node.lineno + 1
            above = lines[first - 2].strip() if first >= 2 else ""
            assert length <= FUNCTION_LINES or above.startswith("# long:"), (
                f"{_name(path)}:{node.lineno} {node.name} has {length} lines and no "
                "'# long: <reason>' comment above it")
