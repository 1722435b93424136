"""The one-way data flow, enforced over the whole tree (every module of ``roomfit/``, the
benchmark and ``app.py``): plan -> rules -> file reading and geometry -> audit -> solve ->
present -> benchmark and shells. A module may import only modules of its own stage or
earlier ones (imports inside functions count too)."""

from __future__ import annotations

import ast
import subprocess
import sys
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parent.parent
PKG = ROOT / "roomfit"

#: Stage of each module (dotted name below ``roomfit``; ``app`` is the page script).
STAGE = {
    "__init__": 0, "__main__": 11, "errors": 0, "files": 0, "interrupts": 0, "caution": 0,
    "plan": 1, "plan.units": 1, "plan.data": 1, "plan.limits": 1,
    "rules": 2, "rules.sets": 2, "rules.catalog": 2, "rules.groups": 2,
    # the reader validates piece types and rule-set names against the rules stage
    "plan.fields": 3, "plan.openings": 3, "plan.read": 3, "plan.write": 3,
    "audit": 3, "audit.geometry": 3, "audit.marks": 3, "audit.group_measures": 3,
    "audit.transfer": 3, "audit.group_rules": 3, "audit.quality": 3,
    "audit.ideas": 3,
    # the IFC import: neutral floor data, then the reader (sole user of ifcopenshell) and
    # the pure-shapely steps that make a Plan of it
    "plan.floordata": 1, "plan.ifc_read": 3, "plan.floor_base": 3, "plan.floor_doors": 3,
    "plan.floor_items": 3, "plan.floor": 3, "plan.ifc_import": 3,
    "audit.walkway": 4, "audit.pinch": 4, "audit.routines": 4, "audit.findings": 4,
    "audit.passage": 4, "audit.clearances": 4, "audit.turning": 4, "audit.circulation": 4,
    "audit.alcove": 4, "audit.places": 4, "audit.bottleneck": 4, "audit.visibility": 4,
    "audit.check": 4, "audit.routes": 4,
    "solve": 5, "solve.rooms": 5, "solve.vars": 5, "solve.groups": 5, "solve.hard_rules": 5,
    "solve.terms": 5,
    "solve.model": 5, "solve.symmetry": 5, "solve.solution": 5, "solve.construct": 5,
    "solve.bound": 5, "solve.tally": 5,
    "solve.cuts": 5,
    "solve.building": 5, "solve.explain": 5, "solve.group": 6,
    "solve.notes": 6, "solve.search": 6, "solve.possible": 6,
    "solve.outcome": 6,
    "present": 7, "present.canvas": 7, "present.building": 7, "present.clearances": 7,
    "present.draw": 7, "present.export": 7, "present.compare": 7,
    "present.report": 8,
    "bench": 9, "bench.instances": 9, "bench.baseline": 9, "bench.run": 9, "bench.__main__": 9,
    "bench.certified": 9, "bench.baseline_cost": 9, "bench.machine": 9, "bench.suite": 9,
    "bench.measure": 9, "bench.summary": 9, "bench.plot": 9, "bench.tables": 9,
    "bench.checkout": 9, "bench.one_room": 9, "bench.carried": 9, "bench.vertices": 9,
    "page": 9, "page_ifc": 9, "page_edit": 9, "page_trace": 9, "cli_args": 10, "cli": 10, "app": 12,
    # the page's parts beside app.py (they alone, with app.py, may use streamlit)
    "app_common": 11, "app_edit": 11, "app_trace": 11, "app_ifc": 11,
}
#: Pairs that must never import each other whatever their stage.
FORBIDDEN = {
    *((s, f"plan.{m}") for s in ("solve.search", "solve.model", "solve.explain")
      for m in ("fields", "openings", "read", "write")),
    *((f"solve.{s}", "audit.check")
      for s in ("model", "rooms", "vars", "terms", "cuts", "symmetry", "solution", "construct",
                "bound")),
    ("audit.check", "present.draw"), ("audit.routes", "present.draw"),
}


def _modules() -> dict[str, Path]:
    """Every Python file of the tree, by dotted name."""
    out = {p.stem: p for p in ROOT.glob("app*.py")}
    for p in PKG.rglob("*.py"):
        parts = p.relative_to(PKG).with_suffix("").parts
        if parts[-1] == "__init__" and len(parts) > 1:
            parts = parts[:-1]
        out[".".join(parts)] = p
    return out


def _imports(path: Path) -> set[str]:
    """The roomfit modules (dotted, below ``roomfit``) a file imports, plus ``streamlit``."""
    tree = ast.parse(path.read_text(encoding="utf-8"))
    out: set[str] = set()
    for node in ast.walk(tree):
        if isinstance(node, ast.ImportFrom) and node.module:
            if node.module == "roomfit" or node.module.startswith("roomfit."):
                base = node.module.removeprefix("roomfit").lstrip(".")
                for a in node.names:
                    sub = f"{base}.{a.name}" if base else a.name
                    out.add(sub if sub in STAGE else base)
            if node.module.split(".")[0] == "streamlit":
                out.add("streamlit")
        elif isinstance(node, ast.Import):
            for a in node.names:
                if a.name.startswith("roomfit."):
                    out.add(a.name.removeprefix("roomfit."))
                if a.name.split(".")[0] == "streamlit":
                    out.add("streamlit")
    return out - {""}


MODULES = _modules()


@pytest.mark.parametrize("module", sorted(MODULES))
def test_imports_flow_one_way(module: str) -> None:
    used = _imports(MODULES[module]) - {module}
    for other in used:
        if other == "streamlit":
            assert module.startswith("app"), f"{module} imports streamlit; only the page may"
            continue
        assert other in STAGE, f"{module} imports roomfit.{other}, which has no stage"
        assert STAGE[other] <= STAGE[module], (
            f"{module} (stage {STAGE[module]}) imports {other} (stage {STAGE[other]})")
        assert (module, other) not in FORBIDDEN, f"{module} must not import {other}"


def test_every_module_has_a_stage() -> None:
    missing = set(MODULES) - set(STAGE)
    assert not missing, f"give these modules a stage: {sorted(missing)}"


def test_every_module_declares_its_public_surface() -> None:
    for name, p in MODULES.items():
        if name in ("__main__", "bench.__main__", "app") or p.name == "__init__.py" and name != "__init__":
            continue
        assert "__all__" in p.read_text(encoding="utf-8"), f"{p} has no __all__"


def test_importing_the_data_model_loads_no_geometry() -> None:
    # lazy package imports: the frozen data model must not drag in shapely or the solver
    code = ("import sys, roomfit.plan.data; "
            "print(sorted(m for m in sys.modules if m.startswith(('roomfit', 'shapely', 'ortools'))))")
    out = subprocess.run([sys.executable, "-c", code], capture_output=True, text=True, check=True)
    assert out.stdout.strip() == "['roomfit', 'roomfit.plan', 'roomfit.plan.data']"
