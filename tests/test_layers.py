"""The one-way data flow, enforced: plan -> file reading -> geometry -> model/solve ->
check and score -> compare and draw -> CLI and page. A module may import only modules of
its own stage or earlier ones (imports inside functions count too)."""

from __future__ import annotations

import ast
from pathlib import Path

import pytest

PKG = Path(__file__).resolve().parent.parent / "roomfit"

#: Stage of each module; a module may import modules of a stage <= its own, except where
#: FORBIDDEN says otherwise.
STAGE = {
    "errors": 0, "units": 0, "plan": 0,
    "rules": 1, "catalog": 1, "files": 1,
    "geometry": 2, "planfile": 2,
    "model": 3, "explain": 3, "solver": 5,
    "draw": 4, "check": 4, "routes": 4, "export": 4,
    "compare": 6, "report": 7, "page": 8, "cli": 8,
}
#: Pairs that must never import each other whatever their stage.
FORBIDDEN = {
    ("solver", "planfile"), ("solver", "draw"), ("model", "planfile"), ("explain", "planfile"),
    ("model", "check"), ("check", "solver"), ("check", "model"), ("draw", "check"),
    ("draw", "routes"), ("draw", "solver"), ("routes", "solver"), ("routes", "check"),
}


def _imports(path: Path) -> set[str]:
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.module:
            if node.module == "roomfit":
                out |= {a.name for a in node.names}
            elif node.module.startswith("roomfit."):
                out.add(node.module.split(".")[1])
        elif isinstance(node, ast.Import):
            out |= {a.name.split(".")[1] for a in node.names if a.name.startswith("roomfit.")}
            if any(a.name == "streamlit" for a in node.names):
                out.add("streamlit")
    return out


@pytest.mark.parametrize("module", sorted(STAGE))
def test_imports_flow_one_way(module):
    used = _imports(PKG / f"{module}.py") - {module}
    for other in used:
        assert other != "streamlit", f"{module} imports streamlit; only app.py may"
        if other not in STAGE:
            continue
        assert STAGE[other] <= STAGE[module], (
            f"{module} (stage {STAGE[module]}) imports {other} (stage {STAGE[other]})")
        assert (module, other) not in FORBIDDEN, f"{module} must not import {other}"


def test_every_module_has_a_stage():
    modules = {p.stem for p in PKG.glob("*.py")} - {"__init__", "__main__"}
    assert modules <= set(STAGE), f"give these modules a stage: {sorted(modules - set(STAGE))}"


def test_every_module_declares_its_public_surface():
    for p in PKG.glob("*.py"):
        if p.stem in ("__main__",):
            continue
        assert "__all__" in p.read_text(encoding="utf-8"), f"{p.name} has no __all__"
