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
