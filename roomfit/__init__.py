"""roomfit: furniture layouts for real apartments under clearance, circulation and
wheelchair-access rules.

Entry points (each stage a pure function over frozen data), loaded on first use so that
``import roomfit`` loads nothing else:

- :func:`read_plan` / :func:`write_plan`: plan files;
- :func:`load_ruleset` / :func:`rules_for`: rule sets with their sources;
- :func:`draw_svg` / :func:`to_geojson`: drawings to scale and GeoJSON export.
"""

from __future__ import annotations

import importlib
from typing import Any

__all__ = ["PlanError", "RoomfitError", "RuleError", "read_plan", "write_plan", "load_ruleset",
           "rules_for", "draw_svg", "to_geojson"]

#: Where each entry point lives (module path under ``roomfit``).
_HOME = {
    "PlanError": "errors", "RoomfitError": "errors", "RuleError": "errors",
    "read_plan": "plan.read", "write_plan": "plan.write",
    "load_ruleset": "rules.sets", "rules_for": "rules.sets",
    "draw_svg": "present.draw", "to_geojson": "present.export",
}


def __getattr__(name: str) -> Any:
    """Load an entry point's module the first time the name is asked for (PEP 562)."""
    if name not in _HOME:
        raise AttributeError(f"module 'roomfit' has no attribute {name!r}")
    return getattr(importlib.import_module(f"roomfit.{_HOME[name]}"), name)
