"""The ``roomfit`` command: a thin shell over the library's public functions.

Exit codes: 0 success (and, for ``check``, every rule passes); 1 a rule fails or the
furniture is proven not to fit; 2 bad input (file, field and what is wrong are printed);
3 no arrangement found within the time limit (not proven impossible).
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
from collections.abc import Callable, Sequence
from typing import TYPE_CHECKING

from roomfit.caution import CAUTION
from roomfit.cli_args import build_parser, tool_version
from roomfit.errors import Problem, RoomfitError
from roomfit.interrupts import Interrupted, interrupts_raised
from roomfit.plan.data import Plan
from roomfit.plan.read import read_plan
from roomfit.rules.catalog import load_catalog, type_record
from roomfit.rules.sets import RuleSet, choose_rules, load_ruleset, rule_record, rules_for, ruleset_ids

if TYPE_CHECKING:
    from roomfit.audit.findings import Finding
    from roomfit.audit.routes import RouteScores
    from roomfit.files import RunFolder

__all__ = ["COMMANDS", "main"]


EXIT_OK, EXIT_FAIL, EXIT_BAD_INPUT, EXIT_TIMEOUT = 0, 1, 2, 3


def _titled(plan: Plan) -> str:
    """The plan's name quoted, or ``(no name)`` when the file gives none."""
    return repr(plan.name) if plan.name else "(no name)"


def _count(items: Sequence[object], word: str) -> str:
    """``"1 room"``, ``"3 rooms"``."""
    return f"{len(items)} {word}{'' if len(items) == 1 else 's'}"


def _cmd_validate(args: argparse.Namespace) -> int:
    plan = read_plan(args.plan)
    rules = rules_for(plan)
    placed = sum(p.placement is not None for p in plan.furniture)
    print(f"{args.plan}: valid plan {_titled(plan)}")
    print(f"  {_count(plan.rooms, 'room')}, {_count(plan.doors, 'door')}, "
          f"{_count(plan.windows, 'window')}, {_count(plan.fixtures, 'fitting')}, "
          f"{_count(plan.furniture, 'piece')} ({placed} placed), "
          f"{_count(plan.routines, 'routine trip')}")
    print(f"  rule set: {rules.id} ({rules.label})"
          + (f", {_count(rules.overridden, 'value')} overridden" if rules.overridden else ""))
    return EXIT_OK


def _aligned(header: Sequence[str], rows: Sequence[Sequence[str]]) -> str:
    """Rows as a plain text table, columns padded to their widest cell (last one unpadded)."""
    cells = [list(header), *[list(r) for r in rows]]
    widths = [max(len(r[i]) for r in cells) for i in range(len(header) - 1)]
    lines = ["  ".join([*(c.ljust(w) for c, w in zip(r, widths, strict=False)), r[-1]]).rstrip()
             for r in cells]
    lines.insert(1, "  ".join([*("-" * w for w in widths), "-" * len(header[-1])]))
    return "\n".join(lines)


def _cmd_catalog(args: argparse.Namespace) -> int:
    rules = load_ruleset(args.rules) if args.rules else None
    types = [t for t in load_catalog().values()
             if args.category is None or t.category == args.category]
    if not types:
        cats = sorted({t.category for t in load_catalog().values()})
        raise RoomfitError(Problem("--category", f"no type has category {args.category!r}",
                                   f"use one of {', '.join(cats)}"))
    records = [type_record(t, rules) for t in types]
    if args.json:
        print(json.dumps({"rules": rules.id if rules else None, "types": records,
                          "caution": CAUTION}, indent=2, ensure_ascii=False))
        return EXIT_OK
    rows: list[list[str]] = []
    for r in records:
        zones = ", ".join(f"{z['side']} {z['kind']}" + (f" {z['depth']}" if "depth" in z else "")
                          for z in r["zones"])  # type: ignore[attr-defined]
        rows.append([str(r["id"]), str(r["label"]), f"{r['width']} x {r['depth']}",
                     str(r["height"]), "yes" if r["against_wall"] else "no", zones or "-",
                     ", ".join(r["touch_sides"]) or "-",  # type: ignore[arg-type]
                     str(r["source"])])
    print(_aligned(["id", "label", "size mm", "height", "wall", "zones"
                    + (f" (depth mm, {rules.id})" if rules else ""), "may touch", "source"], rows))
    print(f"\n{len(rows)} types. Sizes are defaults: a plan may give a piece its own width, "
          "depth and height.")
    print(CAUTION)
    return EXIT_OK


def _format_value(rec: dict[str, object]) -> str:
    if rec["unit"] == "text":
        return str(rec["value"])
    v = rec["value"]
    return f"{v:g} {rec['unit']}" if isinstance(v, float) else f"{v} {rec['unit']}"


def _cmd_rules(args: argparse.Namespace) -> int:
    if args.plan:
        rs = rules_for(read_plan(args.plan))
    elif args.set:
        rs = load_ruleset(args.set)
    else:
        sets = [load_ruleset(i) for i in ruleset_ids()]
        if args.json:
            print(json.dumps({"sets": [{"id": s.id, "label": s.label,
                                        "description": s.description} for s in sets],
                              "caution": CAUTION}, indent=2, ensure_ascii=False))
            return EXIT_OK
        print(_aligned(["id", "label", "description"],
                       [[s.id, s.label, s.description] for s in sets]))
        print("\nShow one set's values: roomfit rules SET")
        print(CAUTION)
        return EXIT_OK
    records = [rule_record(r) for r in rs.rules]
    if args.json:
        print(json.dumps({"id": rs.id, "label": rs.label, "description": rs.description,
                          "rules": records, "caution": CAUTION}, indent=2, ensure_ascii=False))
        return EXIT_OK
    print(f"{rs.id}: {rs.label}\n{rs.description}\n")
    rows = [[str(r["id"]) + (" *" if r["overridden"] else ""), _format_value(r),
             "-" if r["mm"] is None else str(r["mm"]), str(r["status"]), str(r["source"])]
            for r in records]
    print(_aligned(["rule", "value", "mm", "status", "source"], rows))
    if rs.overridden:
        print(f"\n* overridden by the plan ({len(rs.overridden)}); the source names the default.")
    print("\nmemory: a default to confirm against the named text; common-practice: no standard "
          "behind it. Rule meanings: docs/rules.md")
    print(CAUTION)
    return EXIT_OK


def _plan_and_rules(args: argparse.Namespace) -> tuple[Plan, RuleSet]:
    """The plan file and the rule set to use (see ``rules.sets.choose_rules``)."""
    plan = read_plan(args.plan)
    return plan, choose_rules(plan, getattr(args, "rules", None))


def _cmd_draw(args: argparse.Namespace) -> int:
    from roomfit.files import atomic_write, refuse_input_overwrite
    from roomfit.present.clearances import parse_layers
    from roomfit.present.draw import draw_svg

    try:
        show = parse_layers(args.show)
    except ValueError as e:
        raise RoomfitError(Problem("--show", str(e))) from None
    refuse_input_overwrite(args.output, args.plan)
    plan, rules = _plan_and_rules(args)
    findings: Sequence[Finding] = ()
    routes: RouteScores | None = None
    if "turning" in show:  # the turning spaces drawn are the ones the audit finds
        from roomfit.audit.check import audit

        findings = audit(plan, rules).findings
    if "routes" in show:
        from roomfit.audit.routes import score_routes

        routes = score_routes(plan, rules)
    out = atomic_write(args.output, draw_svg(plan, rules, title=args.title, findings=findings,
                                             routes=routes, show=show))
    placed = sum(p.placement is not None for p in plan.furniture)
    print(f"{out}: drawing of {_titled(plan)} to scale (1 unit = 1 mm), {_count(plan.rooms, 'room')}, "
          f"{placed} of {len(plan.furniture)} pieces placed, rule set {rules.id}; layers: "
          f"{', '.join(show) or 'none'}")
    print(CAUTION)
    return EXIT_OK


def _cmd_export(args: argparse.Namespace) -> int:
    from roomfit.files import atomic_write, refuse_input_overwrite
    from roomfit.present.export import to_geojson

    refuse_input_overwrite(args.output, args.plan)
    plan, rules = _plan_and_rules(args)
    collection = to_geojson(plan, rules)
    out = atomic_write(args.output, json.dumps(collection, indent=1, ensure_ascii=False) + "\n")
    print(f"{out}: GeoJSON of {_titled(plan)}, {_count(collection['features'], 'feature')}, "
          "local coordinates in metres (x east, y north; not longitude/latitude)")
    print(CAUTION)
    return EXIT_OK


def _cmd_check(args: argparse.Namespace) -> int:
    from roomfit.audit.check import audit, audit_record, marks_for, summary_text
    from roomfit.audit.quality import quality, quality_lines, quality_record
    from roomfit.files import atomic_write, refuse_input_overwrite
    from roomfit.plan.units import in_plan_units

    if args.draw:
        refuse_input_overwrite(args.draw, args.plan)
    plan = read_plan(args.plan)
    rules = choose_rules(plan, args.rules)
    result = audit(plan, rules)
    groups = quality(plan, rules)
    if args.draw:
        from roomfit.present.draw import draw_svg

        atomic_write(args.draw, draw_svg(plan, rules, marks=marks_for(result),
                                         findings=result.findings))
    if args.json:
        record = {"plan": plan.name, "rules": rules.id, **audit_record(result),
                  "quality": quality_record(groups), "caution": CAUTION}
        print(json.dumps(record, indent=2, ensure_ascii=False))
    else:
        print(f"{args.plan}: audit of {_titled(plan)}")
        # the plan's own units, but each source quoted as the standard words it
        print("\n".join(line if line.lstrip().startswith("source:")
                        else in_plan_units(line, plan.unit)
                        for line in summary_text(result, rules).splitlines()))
        if groups:
            print("layout quality (advisory, not safety rules; the verdict above does not "
                  "count them):")
            print("\n".join(quality_lines(groups)))
        if args.draw:
            print(f"drawing with {len(result.failures)} failures marked: {args.draw}")
        print(CAUTION)
    return EXIT_OK if result.passed else EXIT_FAIL


def _cmd_solve(args: argparse.Namespace) -> int:
    from dataclasses import replace
    from pathlib import Path

    from roomfit.interrupts import signals_kept
    from roomfit.plan.data import RuleChoice
    from roomfit.plan.write import dumps_plan
    from roomfit.present.draw import draw_svg
    from roomfit.solve.outcome import describe
    from roomfit.solve.search import SolveOptions, Status, solve

    plan, rules = _plan_and_rules(args)
    run = _run_folder(args)  # a folder that may not be replaced is refused before the search
    if args.candidates < 1 or not 0 < args.time_limit < math.inf or args.grid < 1:
        raise RoomfitError(Problem("arguments", "--candidates, --time-limit and --grid must be "
                                   "positive (and the time limit a finite number of seconds)"))
    options = SolveOptions(candidates=args.candidates, time_limit=args.time_limit, seed=args.seed,
                           grid=args.grid, strict=args.strict)
    print(f"searching {args.plan} under {rules.id}: up to {options.candidates} candidates, "
          f"{options.time_limit:g} s", file=sys.stderr)
    with signals_kept():  # CP-SAT's own SIGINT handler must not swallow an interrupt
        result = solve(plan, rules, options, progress=_progress_printer(options.candidates))
    st = result.stats
    print(f"{args.plan}: {result.status} ({st.elapsed:.1f} s, {st.solves} solver runs, "
          f"{st.audits} audits, {st.cuts} layouts cut by the audit)")
    words = describe(result, options.time_limit)
    if not result.candidates:
        written = _finish_run(run, args, rules, result.status)
        print(words.headline)
        for line in words.details:
            print(f"  {line}")
        print(written)
        print(CAUTION)
        return EXIT_FAIL if result.status == Status.IMPOSSIBLE else EXIT_TIMEOUT
    stem = Path(args.plan).stem
    chosen = replace(plan, rules=RuleChoice(rules.id, plan.rules.overrides))
    rows = [f"{'candidate':>9}  {'objective':>9}  {'optimal / gap':>13}  {'walking':>10}  checker  files"]
    for c in result.candidates:
        furnished = chosen.with_layout(c.layout)
        files = [str(run.add(f"{stem}-{c.rank + 1}.toml", dumps_plan(furnished)))]
        verdict, routes = c.audit, c.routes
        svg = draw_svg(furnished, rules, title=f"{plan.name}: candidate {c.rank + 1}",
                       findings=verdict.findings, routes=routes)  # routes, turning, clearances
        files.append(str(run.add(f"{stem}-{c.rank + 1}.svg", svg)))
        ok = sum(f.ok for f in verdict.findings)
        gap = "optimal" if c.optimal else f"gap {c.gap:.0%}"
        check = (f"pass {ok}/{len(verdict.findings)}" if verdict.passed else
                 f"pass {ok}/{len(verdict.findings)} + building" if result.building else "FAIL")
        walking = f"{routes.walking_m_per_day:.0f} m/day"
        rows.append(f"{c.rank + 1:>9}  {c.objective:>9g}  {gap:>13}  {walking:>10}  {check:<7}  "
                    f"{', '.join(files)}")
    written = _finish_run(run, args, rules, result.status)  # before printing: a reader that
    print("\n".join(rows))                                    # goes away loses no file
    _print_ideas(plan, rules, result.candidates, result.possible)
    if result.building:
        print(words.headline)
    for line in words.details:
        print(line)
    print(written)
    print(CAUTION)
    return EXIT_OK if result.compliant else EXIT_FAIL


def _run_folder(args: argparse.Namespace) -> RunFolder:
    """The folder ``solve`` writes its run into (``-o``, default ``<plan>-layouts``)."""
    from pathlib import Path

    from roomfit.files import RunFolder

    return RunFolder(args.output or f"{Path(args.plan).stem}-layouts", args.plan)


def _finish_run(run: RunFolder, args: argparse.Namespace, rules: RuleSet, outcome: str) -> str:
    """Swap the run's files in with a manifest saying what made them (the plan's hash, rule
    set, seed, limits, tool version), so a folder never mixes two runs; returns the line
    that says where they are."""
    import hashlib
    from pathlib import Path

    from roomfit.plan.limits import MAX_FILE_BYTES

    with Path(args.plan).open("rb") as fh:
        digest = hashlib.sha256(fh.read(MAX_FILE_BYTES + 1)).hexdigest()
    folder = run.finish({
        "tool": "roomfit", "version": tool_version(), "command": "solve", "plan": str(args.plan),
        "plan_sha256": digest, "rules": rules.id, "overrides": {r.id: r.value for r in rules.overridden},
        "seed": args.seed, "limits": {"time_limit_s": args.time_limit, "candidates":
                                      args.candidates, "grid_mm": args.grid},
        "outcome": outcome})
    return f"run written to {folder}/ ({len(run.files)} files and manifest.json)"


def _print_ideas(plan: Plan, rules: RuleSet, candidates: Sequence, possible: Sequence = ()) -> None:
    """Each candidate's idea in one line, its unmet group rules (measured, with targets), for
    the first one what the group-rule check found of its misses (``possible``) and, when the
    plan has furniture placed as it stands, the moving list from there."""
    from roomfit.audit.ideas import describe, moves
    from roomfit.audit.quality import Kind, quality

    for c in candidates:
        furnished = plan.with_layout(c.layout)
        groups = [q for q in quality(furnished, rules) if q.kind == Kind.GROUP]
        print(f"candidate {c.rank + 1}: {describe(furnished, rules)}")
        print(f"  group rules met {sum(q.ok for q in groups)} of {len(groups)}"
              + "".join(f"\n  ! {q.text}" for q in groups if not q.ok))
        if c.rank == 0 and possible:
            print("  its missed group rules, checked:" + "".join(f"\n    - {p.text}" for p in possible))
        if plan.layout:
            todo = moves(plan, furnished, rules)
            print("  moving list from today's arrangement:" + ("" if todo else " nothing moves"))
            for line in todo:
                print(f"    - {line}")


def _progress_printer(wanted: int) -> Callable[[str], None]:
    """Print the solver's progress in the user's words on stderr, each line once (the time
    left is left out, so a line repeats only when something new happened)."""
    import time

    from roomfit.page import progress_words

    start = time.monotonic()
    seen: dict[str, int] = {}
    printed: set[str] = set()

    def say(line: str) -> None:
        words = progress_words(line, wanted, None, seen)
        if words not in printed:
            printed.add(words)
            print(f"[{time.monotonic() - start:5.1f} s] {words}", file=sys.stderr)

    return say


def _arrangements(args: argparse.Namespace) -> tuple[list[Plan], list[str], list[RuleSet]]:
    """The plans named on the command line, a label for each, and the rule set each is judged
    by (``rules.sets.choose_rules`` with ``--rules``: the same policy as ``check``)."""
    from pathlib import Path

    plans = [read_plan(p) for p in args.plans]
    stems = [Path(p).stem for p in args.plans]
    names = stems if len(set(stems)) == len(stems) else list(args.plans)
    return plans, names, [choose_rules(p, args.rules) for p in plans]


def _write_report(args: argparse.Namespace, path: str, comparison, title: str | None) -> None:  # noqa: ANN001
    from roomfit.files import atomic_write, refuse_input_overwrite
    from roomfit.present.report import build_report

    refuse_input_overwrite(path, *args.plans)
    atomic_write(path, build_report(comparison, title=title))


def _cmd_compare(args: argparse.Namespace) -> int:
    from roomfit.present.compare import compare, render_table

    plans, names, rules = _arrangements(args)
    if args.html:
        from roomfit.files import refuse_input_overwrite

        refuse_input_overwrite(args.html, *args.plans)
    comparison = compare(plans, names, rules)
    print(render_table(comparison))
    if args.html:
        _write_report(args, args.html, comparison, args.title)
        print(f"report with {len(plans)} drawings side by side: {args.html}")
    print(CAUTION)
    return EXIT_OK


def _cmd_report(args: argparse.Namespace) -> int:
    from roomfit.files import refuse_input_overwrite
    from roomfit.present.compare import compare

    plans, names, rules = _arrangements(args)
    refuse_input_overwrite(args.output, *args.plans)
    comparison = compare(plans, names, rules)
    _write_report(args, args.output, comparison, args.title)
    failed = sum(r.rules_failed for r in comparison.rows)
    print(f"{args.output}: client report for {len(plans)} arrangement"
          f"{'s' if len(plans) > 1 else ''}, {failed} failed checks shown with their sources "
          "(HTML; no PDF: print it from a browser)")
    print(CAUTION)
    return EXIT_OK


def _cmd_import(args: argparse.Namespace) -> int:
    from roomfit.files import atomic_write, refuse_input_overwrite
    from roomfit.plan.ifc_import import import_ifc, plan_text, summary_text
    from roomfit.plan.ifc_read import INSTALL_HINT, have_ifc, summarise_model

    if not have_ifc():
        raise RoomfitError(Problem("", "reading IFC needs ifcopenshell", INSTALL_HINT), args.model)
    if args.list:
        print(summary_text(summarise_model(args.model)))
        return EXIT_OK
    if not args.output:
        raise RoomfitError(Problem("-o", "give the plan file to write, e.g. -o plan.toml",
                                   "or --list to see the storeys and spaces"), args.model)
    refuse_input_overwrite(args.output, args.model)
    imported = import_ifc(args.model, storey=args.storey, spaces=args.spaces, rules=args.rules,
                          entrance=args.entrance)
    text = plan_text(imported, CAUTION)
    atomic_write(args.output, text)
    print("\n".join(line[2:] for line in text.splitlines() if line.startswith("# ")))
    print(f"wrote {args.output}")
    return EXIT_OK


#: What each subcommand runs (the parser in :mod:`roomfit.cli_args` names them).
COMMANDS: dict[str, Callable[[argparse.Namespace], int]] = {
    "validate": _cmd_validate, "catalog": _cmd_catalog, "rules": _cmd_rules, "draw": _cmd_draw,
    "export": _cmd_export, "check": _cmd_check, "solve": _cmd_solve, "compare": _cmd_compare,
    "report": _cmd_report, "import": _cmd_import,
}


def main(argv: Sequence[str] | None = None) -> int:
    """Run one subcommand; the exit code is the module docstring's."""
    args = build_parser().parse_args(argv)
    func = COMMANDS[args.command]
    try:
        with interrupts_raised():
            return func(args)
    except RoomfitError as e:
        print(e.render(), file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt as e:
        print("interrupted: outputs not yet complete were not written; earlier results are as "
              "they were", file=sys.stderr)
        return 128 + (e.signum if isinstance(e, Interrupted) else 2)
    except BrokenPipeError:
        # The reader (e.g. `| head`) went away: stop quietly, as Unix tools do.
        devnull = os.open(os.devnull, os.O_WRONLY)
        os.dup2(devnull, sys.stdout.fileno())
        return EXIT_OK


if __name__ == "__main__":
    sys.exit(main())
