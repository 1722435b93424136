"""Furnishing around building findings (``roomfit.solve.building``): a flat whose bathroom
cannot hold the turning space, or whose entrance door lacks approach floor between the walls,
is furnished under every other rule, the finding is reported with a change that the audit
confirms, the result is marked non-compliant, and ``strict`` keeps the all-or-nothing answer.

Reference values: ISO 21542:2021 asks a 1500 mm turning circle; a 1400 mm wide bathroom
cannot hold one (worked by hand: the circle is wider than the room). 2010 ADA Table 404.2.4.1
asks 60 in (1524 mm) of floor in front of a pull-side door and 18 in (457 mm) beyond its
latch; a 915 mm door 600 mm from a corner has walls in that floor.
"""

from __future__ import annotations

import re
from dataclasses import replace
from pathlib import Path

from roomfit.audit.check import audit
from roomfit.cli import main
from roomfit.plan.read import loads_plan
from roomfit.rules.sets import rules_for
from roomfit.solve.outcome import describe
from roomfit.solve.search import SolveOptions, solve

BATH = """
roomfit_plan = 1
name = "Flat with a small bathroom (invented)"
[rules]
set = "iso-21542"
[[rooms]]
id = "bed"
use = "bedroom"
outline = [[0, 0], [4000, 0], [4000, 3600], [0, 3600]]
[[rooms]]
id = "bath"
use = "bath"
outline = [[4000, 0], [5400, 0], [5400, 2000], [4000, 2000]]
[[doors]]
id = "d-in"
rooms = ["bed", "outside"]
at = [1700, 0]
width = 915
leaf = "hinged"
swings_into = "bed"
hinge = "left"
[[doors]]
id = "d-bath"
rooms = ["bath", "bed"]
at = [4000, 1000]
width = 900
leaf = "sliding"
[[furniture]]
id = "bed1"
type = "bed-double-160"
room = "bed"
width = 1600
depth = 2000
"""

DOOR = BATH.replace('set = "iso-21542"', 'set = "ada-2010"').replace("at = [1700, 0]", "at = [600, 0]")


def test_small_bathroom_is_furnished_around_its_building_finding() -> None:
    plan = loads_plan(BATH, "bath.toml")
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=30, seed=0))
    assert result.status in ("found", "optimal") and result.candidates
    assert not result.compliant
    assert [(b.finding.rule, b.finding.room) for b in result.building] == [("turning.space", "bath")]
    assert "100 mm more floor" in result.building[0].change  # 1500 asked - 1400 across
    for c in result.candidates:  # every failure of the furnished flat is the bathroom's
        verdict = audit(plan.with_layout(c.layout), rules)
        assert {(f.rule, f.room) for f in verdict.failures} == {("turning.space", "bath")}
    words = describe(result, 30)
    assert words.level == "warning" and "NOT a compliant flat" in words.headline
    strict = solve(plan, rules, SolveOptions(candidates=1, time_limit=30, seed=0, strict=True))
    assert strict.status == "impossible" and not strict.candidates


def test_door_approach_change_is_confirmed_by_the_audit() -> None:
    plan = loads_plan(DOOR, "door.toml")
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=30, seed=0))
    assert result.candidates and not result.compliant
    approach = [b for b in result.building if b.finding.rule == "door.approach"]
    assert approach, [b.finding.message for b in result.building]
    got = re.search(r"move door d-in (\d+) mm (east|west)", approach[0].change)
    assert got, approach[0].change
    shift = int(got.group(1)) * (1 if got.group(2) == "east" else -1)
    moved = replace(plan, doors=tuple(replace(d, at=(d.at[0] + shift, d.at[1])) if d.id == "d-in"
                                      else d for d in plan.doors), furniture=())
    assert all(f.ok for f in audit(moved, rules).findings if f.rule == "door.approach")


def test_cli_marks_a_flat_furnished_around_building_findings(tmp_path: Path, capsys) -> None:
    path = tmp_path / "bath.toml"
    path.write_text(BATH)
    code = main(["solve", str(path), "--candidates", "1", "--time-limit", "30",
                 "-o", str(tmp_path / "out")])
    out = capsys.readouterr().out
    assert code == 1 and "NOT a compliant flat" in out and "Building finding" in out
    assert "+ building" in out
    assert main(["solve", str(path), "--strict", "--candidates", "1", "--time-limit", "30",
                 "-o", str(tmp_path / "strict")]) == 1
    assert "No arrangement exists" in capsys.readouterr().out
