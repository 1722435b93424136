"""The ``roomfit`` command: a thin shell over the library's public functions.

Exit codes: 0 success (and, for ``check``, every rule passes); 1 a rule fails or the
furniture is proven not to fit; 2 bad input (file, field and what is wrong are printed);
3 no arrangement found within the time limit (not proven impossible).
"""

from __future__ import annotations

import argparse
import sys
from collections.abc import Callable, Sequence

from roomfit.errors import RoomfitError
from roomfit.planfile import read_plan
from roomfit.rules import rules_for

__all__ = ["CAUTION", "main", "build_parser"]

#: Printed with every summary, report and on the page.
CAUTION = ("Caution: these results are advisory. Local building codes, the accessibility "
           "standards in force where the client lives, and licensed professionals decide.")

EXIT_OK, EXIT_FAIL, EXIT_BAD_INPUT, EXIT_TIMEOUT = 0, 1, 2, 3


def _cmd_validate(args: argparse.Namespace) -> int:
    plan = read_plan(args.plan)
    rules = rules_for(plan)
    placed = sum(p.placement is not None for p in plan.furniture)
    print(f"{args.plan}: valid plan {plan.name!r}")
    print(f"  {len(plan.rooms)} rooms, {len(plan.doors)} doors, {len(plan.windows)} windows, "
          f"{len(plan.fixtures)} fittings, {len(plan.furniture)} pieces ({placed} placed), "
          f"{len(plan.routines)} routine trips")
    print(f"  rule set: {rules.id} ({rules.label})"
          + (f", {len(rules.overridden)} values overridden" if rules.overridden else ""))
    return EXIT_OK


def build_parser() -> argparse.ArgumentParser:
    parser = argparse.ArgumentParser(
        prog="roomfit",
        description="Lay out furniture in real apartments under clearance, circulation and "
                    "wheelchair-access rules.",
        epilog=CAUTION,
    )
    sub = parser.add_subparsers(dest="command", required=True, metavar="COMMAND")
    p = sub.add_parser("validate", help="read a plan file and report every problem in it")
    p.add_argument("plan", help="plan file (.toml)")
    p.set_defaults(func=_cmd_validate)
    return parser


def main(argv: Sequence[str] | None = None) -> int:
    parser = build_parser()
    args = parser.parse_args(argv)
    func: Callable[[argparse.Namespace], int] = args.func
    try:
        return func(args)
    except RoomfitError as e:
        print(e.render(), file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("interrupted", file=sys.stderr)
        return 130


if __name__ == "__main__":
    sys.exit(main())
