"""Rule sets: every bundled set is complete and sourced, and its values match the standards.

Expected values carry their source beside the check (standard and section, with the row id
of docs/references.md). Only rows verified there serve as oracles
(``reference_rows.oracle`` refuses the others); values marked memory or common practice
are checked for being labelled so, never for being right.
"""

from __future__ import annotations

import json
from dataclasses import replace
from pathlib import Path

import pytest
from reference_rows import RULE_STATUS, STATUS, cited_rows, oracle

from roomfit.cli import CAUTION, main
from roomfit.errors import RuleError
from roomfit.plan.read import loads_plan
from roomfit.rules.catalog import load_catalog, zone_kinds
from roomfit.rules.sets import (
    REQUIRED_RULES,
    STATUSES,
    Rule,
    RuleSet,
    load_ruleset,
    rule_record,
    rules_for,
    ruleset_ids,
    ruleset_problems,
)

SETS = ruleset_ids()
WHEELCHAIR = ("ada-2010", "a117-2017", "iso-21542", "uk-m4-3", "din-18040-r")
IN = 25.4  # mm per inch, exact (1959 international inch)


def test_bundled_sets() -> None:
    assert set(SETS) == {"everyday", "walking-aid", *WHEELCHAIR}


@pytest.mark.parametrize("name", SETS)
def test_every_set_is_complete_and_sound(name: str) -> None:
    rs = load_ruleset(name)
    ids = [r.id for r in rs.rules]
    assert len(ids) == len(set(ids))
    kinds = zone_kinds(load_catalog())
    # the alcove figures (2010 ADA §305.7) are optional: all of them or none
    from roomfit.audit.alcove import ALCOVE_RULES
    alcove = set(ids) & set(ALCOVE_RULES)
    assert not alcove or alcove == set(ALCOVE_RULES)
    # so is the WC transfer clearance (2010 ADA §604.3.1): both figures or none
    from roomfit.audit.transfer import WC_RULES
    wc = set(ids) & set(WC_RULES)
    assert not wc or wc == set(WC_RULES)
    assert set(ids) - alcove - wc == set(REQUIRED_RULES) | {f"zone.{k}" for k in kinds}
    assert ruleset_problems(rs, kinds) == []
    for r in rs.rules:
        assert r.description.strip() and r.source.strip(), r.id
        assert r.status in STATUSES, r.id
        assert not r.overridden


@pytest.mark.parametrize("name", SETS)
def test_statuses_match_the_rows_cited(name: str) -> None:
    # A rule's status is the status of the reference row its value comes from (the row in
    # square brackets); a rule naming no row cannot claim to be verified.
    for r in load_ruleset(name).rules:
        rows = cited_rows(r.source)
        for row, words in rows:
            assert RULE_STATUS[STATUS[row]] == r.status, (r.id, row)
            assert words == "", (r.id, words)
        if not rows:
            assert r.status != "verified", r.id
        if r.status == "memory":
            assert rows or "not checked" in r.source or "not confirmed" in r.source, r.id


def test_every_cited_row_is_on_the_references_page() -> None:
    # the repository stands alone: each row a rule cites is in docs/references.md
    for name in SETS:
        for r in load_ruleset(name).rules:
            for row, _ in cited_rows(r.source):
                assert row in STATUS, (name, r.id, row)


# --- 2010 ADA Standards: compared in inches, and within 3 mm of the printed millimetres


@pytest.mark.parametrize(("rule", "inches", "printed_mm", "row"), [
    ("turning.size", 60, 1525, "T1"),         # 2010 ADA §304.3.1: 60 in circle
    ("route.width", 36, 915, "R1"),           # 2010 ADA §403.5.1: 36 in
    ("route.pinch_width", 32, 815, "R2"),     # 2010 ADA §403.5.1 Exception: 32 in ...
    ("route.pinch_length", 24, 610, "R2"),    # ... for at most 24 in of length
    ("door.min_width", 32, 815, "D1"),        # 2010 ADA §404.2.3: 32 in clear
    ("door.approach_swing", 60, 1525, "D4"),  # 2010 ADA Table 404.2.4.1 front, pull side
    ("door.approach_latch", 18, 455, "D4"),   # same row: 18 in beyond the latch
    ("door.approach_other", 48, 1220, "D5"),  # Table 404.2.4.1 front, push side
    ("zone.bed_side", 30, 760, "B1"),         # 2010 ADA §806.2.3: 30 x 48 in CFS, parallel
    ("zone.bed_side_other", 30, 760, "B1"),   # §806.2.3: on both sides of the bed
    ("zone.seat_front", 30, 760, "F1"),       # 2010 ADA §305.3: CFS 30 in wide
    ("zone.storage_front", 48, 1220, "F1"),   # §305.3: 48 in long (forward approach)
    ("zone.wc_transfer", 60, 1525, "E19"),    # 2010 ADA §604.3.1: 60 in from the side wall
    ("zone.wc_transfer_depth", 56, 1420, "E19"),  # §604.3.1: 56 in from the rear wall
])
def test_ada_2010_values(rule: str, inches: int, printed_mm: int, row: str) -> None:
    r = load_ruleset("ada-2010").get(rule)
    assert r.unit == "in" and r.value == oracle(row, inches)
    assert abs(r.exact_mm - printed_mm) <= 3
    assert r.mm == round(inches * IN)
    assert r.status == "verified"


def test_ada_turning_shape_allows_the_t() -> None:
    # 2010 ADA §304.3: a 60 in circle (§304.3.1) or a T-shaped space in a 60 in square (§304.3.2)
    assert load_ruleset("ada-2010").text("turning.shape") == "circle-or-t"


def test_exact_inch_conversion() -> None:
    # 1 in = 25.4 mm exactly; the standard prints 1525 for 60 in, the exact value is 1524.0
    ada = load_ruleset("ada-2010").get("turning.size")
    assert ada.exact_mm == 1524.0 and ada.mm == 1524
    a117 = load_ruleset("a117-2017").get("turning.size")
    assert a117.exact_mm == pytest.approx(1701.8) and a117.mm == 1702  # 67 x 25.4
    assert load_ruleset("ada-2010").get("route.pinch_width").exact_mm == pytest.approx(812.8)


def test_a117_2017_circle() -> None:
    # ICC A117.1-2017 §304.3.1.1, new buildings: 67 in circle (row T10, verified)
    r = load_ruleset("a117-2017").get("turning.size")
    assert r.unit == "in" and r.value == oracle("T10", 67)
    assert abs(r.exact_mm - 1700) <= 3


def test_a117_clear_floor_space_is_a_default_not_an_oracle() -> None:
    # 30 x 52 in CFS (row F9) is marked from memory in the reference: the set must say so
    rs = load_ruleset("a117-2017")
    assert STATUS["F9"] == "M"
    for zone in ("zone.storage_front", "zone.dining_seat", "zone.desk_seat"):
        assert rs.get(zone).value == 52 and rs.get(zone).status == "memory"


@pytest.mark.parametrize(("name", "rule", "mm", "row"), [
    ("uk-m4-3", "turning.size", 1500, "T17"),      # ADM Vol. 1 M4(3) Section 3: 1500 circle
    ("din-18040-r", "turning.size", 1500, "T20"),  # DIN 18040-2 R: 1500 x 1500 movement area
    ("walking-aid", "turning.size", 1200, "T21"),  # DIN 18040-2 barrier-free: 1200 x 1200
    ("din-18040-r", "zone.bed_side", 1500, "B4"),  # DIN 18040-2 R: one long side 1500
    ("din-18040-r", "zone.bed_side_other", 1200, "B4"),  # ... the other 1200
    ("walking-aid", "zone.bed_side", 1200, "B5"),  # DIN 18040-2 barrier-free: 1200 ...
    ("walking-aid", "zone.bed_side_other", 900, "B5"),  # ... and 900
    ("walking-aid", "route.width", 900, "E2"),     # DIN 18040-2: 900 along furniture
    ("din-18040-r", "zone.storage_front", 1500, "E2"),  # DIN 18040-2 R: 1500 in front
    ("din-18040-r", "door.min_width", 900, "D15"),  # DIN 18040-2: doors R 900 ...
    ("walking-aid", "door.min_width", 800, "D15"),  # ... barrier-free 800
    ("din-18040-r", "door.approach_swing", 1500, "D17"),  # DIN 18040-2 R: swing side 1500
])
def test_metric_standards(name: str, rule: str, mm: int, row: str) -> None:
    r = load_ruleset(name).get(rule)
    assert r.unit == "mm" and r.mm == oracle(row, mm)
    assert r.status == "verified"


def test_din_movement_areas_are_squares() -> None:
    # DIN 18040-2 clause 5 states square movement areas (rows T20, T21)
    assert load_ruleset("din-18040-r").text("turning.shape") == "square"
    assert load_ruleset("walking-aid").text("turning.shape") == "square"


def test_iso_circle_is_marked_from_memory() -> None:
    # ISO 21542 1500 mm (row T15) is from memory in the reference: labelled, not trusted
    r = load_ruleset("iso-21542").get("turning.size")
    assert STATUS["T15"] == "M"
    assert r.mm == 1500 and r.status == "memory"


def test_sets_without_a_pinch_repeat_the_route_width() -> None:
    for name in SETS:
        rs = load_ruleset(name)
        if rs.mm("route.pinch_length") == 0:
            assert rs.mm("route.pinch_width") == rs.mm("route.width"), name
        else:
            assert rs.mm("route.pinch_width") < rs.mm("route.width"), name


@pytest.mark.parametrize("name", ["walking-aid", *WHEELCHAIR])
def test_aided_sets_ask_at_least_the_everyday_lengths(name: str) -> None:
    everyday = load_ruleset("everyday")
    rs = load_ruleset(name)
    for r in everyday.rules:
        if r.unit != "text":
            assert rs.mm(r.id) >= r.mm, (name, r.id)


def test_wheelchair_sets_ask_for_turning_space() -> None:
    assert load_ruleset("everyday").mm("turning.size") == 0
    for name in WHEELCHAIR:
        assert load_ruleset(name).mm("turning.size") >= 1500, name


# --- overrides and errors


def test_override_applied_and_reported() -> None:
    rs = load_ruleset("ada-2010", {"route.width": 1000, "turning.shape": "circle"})
    assert rs.mm("route.width") == 1000 and rs.text("turning.shape") == "circle"
    assert {r.id for r in rs.overridden} == {"route.width", "turning.shape"}
    route = rs.get("route.width")
    assert route.unit == "mm" and "§403.5.1" in route.source  # still names the default's source
    assert rule_record(route)["overridden"] is True
    assert not rs.get("turning.size").overridden and rs.mm("turning.size") == 1524


def test_override_from_a_plan_file() -> None:
    text = """roomfit_plan = 1
name = "Override test"
units = "mm"
[rules]
set = "din-18040-r"
overrides = { "route.width" = "110 cm", "zone.bed_side" = 1300 }
[[rooms]]
id = "r"
label = "Room"
use = "bedroom"
outline = [[0, 0], [4000, 0], [4000, 4000], [0, 4000]]
"""
    rs = rules_for(loads_plan(text))
    assert rs.id == "din-18040-r"
    assert rs.mm("route.width") == 1100 and rs.mm("zone.bed_side") == 1300
    assert {r.id for r in rs.overridden} == {"route.width", "zone.bed_side"}


def test_unknown_override_rejected_naming_the_field() -> None:
    with pytest.raises(RuleError, match=r"rules\.overrides\.route\.widht: .*no rule 'route\.widht'"):
        load_ruleset("ada-2010", {"route.widht": 1000})


def test_bad_override_values_rejected() -> None:
    with pytest.raises(RuleError, match=r"rules\.overrides\.route\.width: expected a length"):
        load_ruleset("everyday", {"route.width": -5})
    with pytest.raises(RuleError, match=r"rules\.overrides\.turning\.shape: unknown shape 'oval'"):
        load_ruleset("everyday", {"turning.shape": "oval"})


def test_unknown_set_rejected_listing_the_known() -> None:
    with pytest.raises(RuleError, match=r"rules\.set: unknown rule set 'ada-2020'") as e:
        load_ruleset("ada-2020")
    assert all(name in e.value.problems[0].hint for name in SETS)


# --- the checks load_ruleset runs on every set


def _ada() -> RuleSet:
    return load_ruleset("ada-2010")


def test_problems_missing_and_unknown_rules() -> None:
    rs = _ada()
    cut = replace(rs, rules=tuple(r for r in rs.rules if r.id != "door.min_width"))
    problems = ruleset_problems(cut, zone_kinds(load_catalog()))
    assert [p.field for p in problems] == ["ada-2010.rules.door.min_width"]
    extra = replace(rs, rules=(*rs.rules, Rule("route.widht", "typo", 1, "mm", "x", "memory")))
    assert [p.field for p in ruleset_problems(extra)] == ["ada-2010.rules.route.widht"]
    problems = ruleset_problems(rs, ["bed_side", "hammock_side"])
    assert [p.field for p in problems] == ["ada-2010.rules.zone.hammock_side"]


def test_problems_bad_values() -> None:
    rs = _ada()

    def swap(rule_id: str, **changes: object) -> list[str]:
        rules = tuple(replace(r, **changes) if r.id == rule_id else r for r in rs.rules)
        return [p.field for p in ruleset_problems(replace(rs, rules=rules))]

    assert swap("route.width", status="guess") == ["ada-2010.rules.route.width.status"]
    assert swap("route.width", source=" ") == ["ada-2010.rules.route.width.source"]
    assert swap("route.width", value=-1) == ["ada-2010.rules.route.width"]
    assert swap("turning.shape", value="oval") == ["ada-2010.rules.turning.shape.value"]
    # a pinch wider than the route makes no sense
    assert swap("route.pinch_width", value=40) == ["ada-2010.rules.route.pinch_width"]


# --- the `roomfit rules` command


def test_cli_lists_sets(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["rules"]) == 0
    out = capsys.readouterr().out
    assert all(name in out for name in SETS)
    assert out.rstrip().endswith(CAUTION)


def test_cli_lists_one_set(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["rules", "ada-2010"]) == 0
    out = capsys.readouterr().out
    line = next(x for x in out.splitlines() if x.startswith("turning.size"))
    assert "60 in" in line and "1524" in line and "§304.3.1" in line
    assert all(r.id in out for r in _ada().rules)
    assert out.rstrip().endswith(CAUTION)


def test_cli_json(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["rules", "a117-2017", "--json"]) == 0
    data = json.loads(capsys.readouterr().out)
    turning = next(r for r in data["rules"] if r["id"] == "turning.size")
    assert turning["value"] == 67 and turning["unit"] == "in"
    assert turning["exact_mm"] == pytest.approx(67 * IN)
    assert data["caution"] == CAUTION
    assert main(["rules", "--json"]) == 0
    assert {s["id"] for s in json.loads(capsys.readouterr().out)["sets"]} == set(SETS)


def test_cli_unknown_set(capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["rules", "ada-2020"]) == 2
    err = capsys.readouterr().err
    assert "unknown rule set 'ada-2020'" in err and "din-18040-r" in err


def test_cli_plan_overrides_marked(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    studio = Path(__file__).resolve().parents[1] / "plans" / "studio.toml"
    plan = tmp_path / "p.toml"
    plan.write_text(studio.read_text().replace(
        'set = "everyday"', 'set = "everyday"\noverrides = { "route.width" = 900 }'))
    assert main(["rules", "--plan", str(plan)]) == 0
    out = capsys.readouterr().out
    assert "route.width *" in out and "overridden by the plan (1)" in out
    assert main(["rules", "--plan", str(tmp_path / "missing.toml")]) == 2


def test_docs_describe_every_rule_and_match_the_values() -> None:
    doc = (Path(__file__).resolve().parents[1] / "docs" / "rules.md").read_text()
    header = next(line for line in doc.splitlines() if line.startswith("| rule |"))
    order = [c.strip() for c in header.strip("|").split("|")][1:]
    assert set(order) == set(SETS)
    for rid in (r.id for r in _ada().rules):
        assert f"- `{rid}`" in doc or f"`{rid}`:" in doc or f"- `{rid}`," in doc, rid
        row = next(line for line in doc.splitlines() if line.startswith(f"| `{rid}` |"))
        cells = [c.strip() for c in row.strip("|").split("|")][1:]
        for name, cell in zip(order, cells, strict=True):
            if not load_ruleset(name).has(rid):  # an optional rule the set does not state
                assert cell == "—", (name, rid, cell)
                continue
            r = load_ruleset(name).get(rid)
            shown = str(r.value) if r.unit == "text" else (
                f"{r.value} in ({r.mm})" if r.unit == "in" else str(r.mm))
            assert cell.split(" M")[0].split(" CP")[0] == shown, (name, rid, cell)
