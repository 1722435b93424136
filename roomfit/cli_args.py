"""The ``roomfit`` command line: its subcommands, their arguments and the checks on them.

What each subcommand runs lives in :mod:`roomfit.cli`; this module only reads the words
typed, so that a bad argument is refused (exit 2, naming it) before any file is touched.
"""

from __future__ import annotations

import argparse
from collections.abc import Callable

from roomfit.caution import CAUTION

__all__ = ["GRID_MAX_MM", "SEED_MAX", "build_parser", "tool_version"]

Subparsers = argparse._SubParsersAction  # the subcommand table argparse hands back


def tool_version() -> str:
    """The installed roomfit version (shown by --version, written into run manifests)."""
    from importlib.metadata import PackageNotFoundError, version

    try:
        return version("roomfit")
    except PackageNotFoundError:  # run from a source tree that was never installed
        return "(not installed)"


#: Largest ``--seed``: CP-SAT's random seed is a signed 32-bit integer.
SEED_MAX = 2**31 - 1

#: Largest ``--grid`` in mm (a coarser grid would not fit a door in a room).
GRID_MAX_MM = 1000


def _within(low: int, high: int) -> Callable[[str], int]:
    """An argument type: a whole number from ``low`` to ``high``, else a message naming them."""
    def whole(text: str) -> int:
        try:
            value = int(text)
        except ValueError:
            raise argparse.ArgumentTypeError(f"expected a whole number, found {text!r}") from None
        if not low <= value <= high:
            raise argparse.ArgumentTypeError(f"{value} is outside {low} to {high}")
        return value
    return whole


def _text_argument(text: str) -> str:
    """An argument type for text drawn or printed (a title): no control characters."""
    from roomfit.plan.limits import check_text

    wrong = check_text(text)
    if wrong is not None:
        raise argparse.ArgumentTypeError(f"the text {wrong}")
    return text


def build_parser() -> argparse.ArgumentParser:
    """The parser of every subcommand; ``args.command`` names the one chosen."""
    parser = argparse.ArgumentParser(
        prog="roomfit",
        description="Lay out furniture in real apartments under clearance, circulation and "
                    "wheelchair-access rules.",
        epilog=CAUTION,
    )
    parser.add_argument("--version", action="version", version=f"roomfit {tool_version()}")
    sub = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")
    _plan_commands(sub)
    _audit_commands(sub)
    _solve_command(sub)
    return parser


def _plan_commands(sub: Subparsers) -> None:
    """Reading, listing, drawing, exporting and importing plans."""
    p = sub.add_parser("validate", help="read a plan file and report every problem in it")
    p.add_argument("plan", help="plan file (.toml)")
    p = sub.add_parser("catalog", help="list the furniture types with sizes, zones and sources")
    p.add_argument("--rules", metavar="SET", help="also show each zone's depth under this rule set")
    p.add_argument("--category", help="only types of this category (bed, sofa, ...)")
    p.add_argument("--json", action="store_true", help="print JSON instead of a table")
    p = sub.add_parser("rules", help="list the rule sets, or every value of one set with its source")
    p.add_argument("set", nargs="?", help="rule set id (omit to list the sets)")
    p.add_argument("--plan", help="show the set a plan file picks, with its overrides")
    p.add_argument("--json", action="store_true", help="print JSON instead of a table")
    p = sub.add_parser("draw", help="draw a plan to scale as SVG (furniture where the plan puts it)")
    p.add_argument("plan", help="plan file (.toml)")
    p.add_argument("-o", "--output", required=True, help="SVG file to write")
    p.add_argument("--rules", metavar="SET", help="rule set for the use zones (default: the plan's)")
    p.add_argument("--title", type=_text_argument,
                   help="headline of the title block (default: the plan's name)")
    p.add_argument("--show", default="all", metavar="LAYERS",
                   help="layers to draw, comma-separated: zones, routes, turning, dimensions "
                        "(default all; 'none' for the bare plan)")
    p = sub.add_parser("export", help="export a plan as GeoJSON in local coordinates (metres)")
    p.add_argument("plan", help="plan file (.toml)")
    p.add_argument("-o", "--output", required=True, help="GeoJSON file to write")
    p.add_argument("--rules", metavar="SET", help="rule set for the use zones (default: the plan's)")
    p = sub.add_parser("import", help="read one storey of an IFC building model (IFC2x3, IFC4) "
                       "into a plan file, reporting every guess")
    p.add_argument("model", help="IFC model (.ifc)")
    p.add_argument("-o", "--output", metavar="PLAN", help="plan file to write (.toml)")
    p.add_argument("--list", action="store_true", help="list the storeys, spaces and flats")
    p.add_argument("--storey", metavar="NAME|N", help="storey name or number from --list "
                   "(default: the one with most spaces and doors)")
    p.add_argument("--spaces", metavar="PATTERN", help="only spaces whose name or long name "
                   "matches this pattern (* and ? wildcards)")
    p.add_argument("--entrance", metavar="DOOR", help="the entrance door (GlobalId, IFC name or "
                   "plan id; default: the doors to no imported space)")
    p.add_argument("--rules", metavar="SET", help="rule set for the plan (default: everyday)")


def _audit_commands(sub: Subparsers) -> None:
    """Judging furnished plans: one (check) or several side by side (compare, report)."""
    p = sub.add_parser("check", help="audit a furnished plan: clearances, circulation, turning "
                                     "space (exit 1 when a rule fails)")
    p.add_argument("plan", help="plan file (.toml) with furniture placed")
    p.add_argument("--rules", metavar="SET", help="rule set to audit against, as published; the plan's "
                   "overrides apply only to its own set (default: the plan's)")
    p.add_argument("--json", action="store_true", help="print the findings as JSON")
    p.add_argument("--draw", metavar="SVG", help="also write the plan with the failures marked")
    p = sub.add_parser("compare", help="compare furnished plans side by side: rules failed, "
                       "walking per day, narrowest passage, turning spaces, free floor")
    p.add_argument("plans", nargs="+", metavar="PLAN", help="furnished plan files (.toml)")
    p.add_argument("--rules", help="judge every plan under this rule set, without the plans' "
                   "overrides (default: each plan's own set and overrides)")
    p.add_argument("--html", metavar="FILE", help="also write the client report (HTML) here")
    p.add_argument("--title", type=_text_argument, help="title of the HTML report")
    p = sub.add_parser("report", help="write the client report (HTML) for one or more "
                       "furnished plans: drawings, routes, metrics, findings with sources")
    p.add_argument("plans", nargs="+", metavar="PLAN", help="furnished plan files (.toml)")
    p.add_argument("-o", "--output", required=True, metavar="FILE", help="report file (.html)")
    p.add_argument("--rules", help="judge every plan under this rule set, without the plans' "
                   "overrides (default: each plan's own set and overrides)")
    p.add_argument("--title", type=_text_argument, help="title of the report")


def _solve_command(sub: Subparsers) -> None:
    """Searching for arrangements."""
    p = sub.add_parser("solve", help="find furniture arrangements that pass every rule, or say "
                                     "why none exists (exit 1 impossible, 3 time limit)")
    p.add_argument("plan", help="plan file (.toml) with the furniture wanted")
    p.add_argument("--candidates", type=int, default=3, metavar="N",
                   help="arrangements to find (default 3)")
    p.add_argument("--time-limit", type=float, default=20.0, metavar="S",
                   help="seconds for the whole search (default 20)")
    p.add_argument("--rules", metavar="SET", help="rule set to satisfy, as published; the plan's "
                   "overrides apply only to its own set (default: the plan's)")
    p.add_argument("--seed", type=_within(0, SEED_MAX), default=0, metavar="K",
                   help=f"random seed, 0 to {SEED_MAX}; same seed, same result")
    p.add_argument("--grid", type=_within(1, GRID_MAX_MM), default=50, metavar="MM",
                   help="grid (mm) for angled walls, door swings and the turning space (default 50)")
    p.add_argument("--strict", action="store_true",
                   help="a flat that fails a rule before any furniture is placed is impossible "
                        "(default: furnish around such building findings, exit 1, not compliant)")
    p.add_argument("-o", "--output", metavar="DIR",
                   help="folder for the plan files and drawings (default ./<plan>-layouts/)")
