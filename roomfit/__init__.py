"""roomfit: furniture layouts for real apartments under clearance, circulation and
wheelchair-access rules.

Entry points (each stage a pure function over frozen data):

- :func:`read_plan` / :func:`write_plan`: plan files;
- :func:`load_ruleset` / :func:`rules_for`: rule sets with their sources;
- :func:`draw_svg` / :func:`to_geojson`: drawings to scale and GeoJSON export.
"""

from roomfit.draw import draw_svg
from roomfit.errors import PlanError, RoomfitError, RuleError
from roomfit.export import to_geojson
from roomfit.planfile import read_plan, write_plan
from roomfit.rules import load_ruleset, rules_for

__all__ = ["PlanError", "RoomfitError", "RuleError", "read_plan", "write_plan", "load_ruleset",
           "rules_for", "draw_svg", "to_geojson"]
