import pytest

from roomfit.errors import UnitError
from roomfit.plan.units import format_length, inches, parse_length


def test_inches_are_exact():
    # 1 in = 25.4 mm exactly (international yard and pound agreement, 1959).
    assert inches(60) == 1524.0
    assert parse_length("60 in") == 1524
    # 2010 ADA §403.5.1: 36 in route; printed as 915 mm, exact 914.4 mm.
    assert abs(parse_length(36, "in") - 914.4) < 1


@pytest.mark.parametrize(
    "value, unit, mm",
    [(90, "cm", 900), ("2.5 m", "mm", 2500), ("3 ft 6 in", "mm", 1067), ("3'6\"", "mm", 1067),
     ("900", "mm", 900), (1.5, "m", 1500), ("-300", "mm", -300)],
)
def test_parse_length(value, unit, mm):
    assert parse_length(value, unit) == mm


@pytest.mark.parametrize("bad", ["90 furlongs", "", "abc", True, None, float("nan")])
def test_bad_lengths_name_the_field(bad):
    with pytest.raises(UnitError, match="doors\\[0\\].width"):
        parse_length(bad, "mm", "doors[0].width")


def test_unknown_unit():
    with pytest.raises(UnitError, match="unknown unit 'yd'"):
        parse_length(3, "yd", "units")


def test_format_length():
    assert format_length(1524, "in") == "60 in"
    assert format_length(2500, "m") == "2.5 m"
    assert format_length(915) == "915 mm"


# Lengths that were misread by adding up loose numbers are refused with the accepted forms;
# feet and inches with both units are exact (1 ft = 12 in = 304.8 mm, 1959 agreement).
@pytest.mark.parametrize("text, why", [
    ("2'8", "inches after feet need their unit"),
    ("5' 10", "inches after feet need their unit"),
    ("1 500", "several numbers"),
    ("3 6", "several numbers"),
    ("900mm900", "several numbers"),
    ("-3 ft 6 in", "sign cannot stand before feet and inches"),
    ("5 ft 14 in", "12 inches or more"),
    ("1/0 in", "not a proper fraction"),
    ("1e3", ""),
    ("9" * 5000, "too long"),
])
def test_lengths_that_cannot_be_read_exactly_are_refused(text, why):
    with pytest.raises(UnitError) as info:
        parse_length(text, "mm", "furniture[0].width")
    problem = info.value.problems[0]
    assert problem.field == "furniture[0].width" and why in problem.message
    assert '"3 ft 6 in"' in problem.hint and '"90 cm"' in problem.hint  # the accepted forms


@pytest.mark.parametrize("text, mm", [
    ("2'8\"", 813),          # 32 in = 812.8 mm
    ("5' 10\"", 1778),       # 70 in = 1778 mm
    ("2 ft 8 in", 813),
    ("32 1/2 in", 826),      # 32.5 in = 825.5 mm, half away from zero
    ("2 ft 7 1/2 in", 800),  # 31.5 in = 800.1 mm
    ("-42 in", -1067),       # a negative length is one number with its unit
    ("  90   cm ", 900),
    ("+3 ft", 914),
])
def test_exact_forms(text, mm):
    assert parse_length(text) == mm


@pytest.mark.parametrize("value", [1e306, 10**4000, "1000001", 1e20])
def test_magnitudes_beyond_a_kilometre_are_refused(value):
    with pytest.raises(UnitError, match="beyond the largest length"):
        parse_length(value, "mm", "rooms[0].outline[1][0]")


def test_feet_and_inches_to_the_quarter_inch() -> None:
    from roomfit.plan.units import format_area, format_feet_inches, format_inches

    # 1 in = 25.4 mm exactly (1959 international yard and pound agreement)
    assert format_feet_inches(1734) == "5' 8 1/4\""  # 68.27 in -> 68 1/4 in
    assert format_feet_inches(914.4) == "3' 0\""
    assert format_feet_inches(6.35) == '1/4"'
    assert format_inches(920) == "36 1/4 in"  # 36.22 in
    # 1 sq ft = 0.09290304 m² exactly
    assert format_area(9_290_304, "ft") == "9.29 m² (100.0 sq ft)"
    assert format_area(9_290_304, "mm") == "9.29 m²"


def test_lengths_written_read_back_to_the_millimetre() -> None:
    from roomfit.plan.units import write_length

    assert write_length(5302, "ft") == "17 ft 4.74 in"
    assert write_length(914, "ft") == "3 ft"  # 36 in = 914.4 mm; never "2 ft 12 in"
    assert write_length(3048, "ft") == 10
    for mm in range(-2000, 30000, 37):
        for unit in ("in", "ft", "cm", "m", "mm"):
            assert parse_length(write_length(mm, unit), unit) == mm


def test_a_feet_and_inches_plan_round_trips_through_solve(tmp_path, capsys) -> None:
    import re
    import tomllib
    from pathlib import Path

    from roomfit.cli import main
    from roomfit.plan.read import read_plan

    src = Path(__file__).parent / "plans_unseen" / "feet-l-shape.toml"
    out = tmp_path / "found"
    assert main(["solve", str(src), "-o", str(out), "--candidates", "1", "--time-limit", "60"]) == 0
    written = sorted(out.glob("*.toml"))[0]
    raw = tomllib.loads(written.read_text())
    assert raw["units"] == "ft"
    # every placement in whole feet or a feet-and-inches string, never a long decimal of feet
    for piece in raw["furniture"]:
        for key in ("x", "y"):
            v = piece["placement"][key]
            assert isinstance(v, int) or re.fullmatch(r"\d+ ft( \d+(\.\d+)? in)?|\d+(\.\d+)? in", v), v
    again = read_plan(written)
    original = read_plan(src)
    assert again.rooms == original.rooms and again.doors == original.doors
    assert all(p.placement is not None for p in again.furniture)
    svg = sorted(out.glob("*.svg"))[0].read_text()
    assert "sq ft" in svg and re.search(r"\d+' \d+( \d/\d)?\"", svg.replace("&quot;", '"'))


def test_a_plan_in_feet_is_summarised_in_feet_and_inches(capsys) -> None:
    """The audit of a plan measured in feet reads in feet and inches and square feet, on the
    command line and in the report: no millimetre figure left in a finding."""
    import re
    from pathlib import Path

    from roomfit.audit.check import audit
    from roomfit.cli import main
    from roomfit.plan.read import read_plan
    from roomfit.plan.units import in_plan_units
    from roomfit.present.compare import compare
    from roomfit.present.report import build_report
    from roomfit.rules.sets import rules_for

    src = Path(__file__).parent / "plans_unseen" / "feet-l-shape.toml"
    main(["check", str(src)])
    text = capsys.readouterr().out
    findings = [line for line in text.splitlines() if line.startswith(("      - ", "      ok:"))]
    assert findings and not any(re.search(r"\d mm\b|cm2", line) for line in findings), findings
    assert re.search(r"\d+' \d+( \d/\d)?\"", text) and "sq ft" in text
    # 1 in = 25.4 mm exactly: a 1036 mm passage is 40.79 in, shown to the quarter inch
    assert in_plan_units("1036 mm", "ft") == "3' 4 3/4\""
    plan = read_plan(src)
    html = build_report(compare([plan]))
    first = audit(plan, rules_for(plan)).failures[0].message
    assert in_plan_units(first, "ft").replace("'", "&#x27;").replace('"', "&quot;") in html
    # a source is quoted as the standard words it, in its own units
    assert "[B5]" in text and any("1200 mm" in line for line in text.splitlines()
                                  if line.lstrip().startswith("source:"))
