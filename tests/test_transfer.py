"""Wheelchair sets: the transfer space beside a bed on the side the plan says the client
transfers from (``transfer`` in the plan file). The side takes the set's main bed-side zone;
the layout-quality audit measures the free depth there and the clearance audit keeps the
zone free; the solver places for it."""

from __future__ import annotations

import pytest

from roomfit.audit.check import audit
from roomfit.audit.quality import quality
from roomfit.errors import PlanError
from roomfit.plan.read import loads_plan
from roomfit.plan.write import dumps_plan
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import rules_for
from roomfit.solve.search import SolveOptions, solve

_PLAN = """
roomfit_plan = 1
name = "transfer"
[rules]
set = "{rules}"
[[rooms]]
id = "r"
label = "Bedroom"
use = "bedroom"
outline = [[0, 0], [6000, 0], [6000, 5000], [0, 5000]]
[[doors]]
id = "d"
rooms = ["r", "outside"]
at = [5000, 0]
width = 1000
leaf = "sliding"
[[furniture]]
id = "bed"
type = "bed-double-160"
room = "r"
transfer = "{side}"
{bed_at}
{extra}
"""
# the bed (1700 x 2100 with its frame) with its head on the south wall, facing north: its
# own right is east, at x = 1400 + 1700
_RIGHT = 3100
_BED_AT = 'placement = { x = 1400, y = 0, rotation = 0, room = "r" }'


def _blocked_at(x: int) -> str:
    """A box (600 x 600, 1 m high) east of the bed, its west face at ``x``."""
    return (f'[[furniture]]\nid = "box"\ntype = "custom"\nroom = "r"\nwidth = 600\n'
            f'depth = 600\nheight = 1000\nplacement = {{ x = {x}, y = 1000, rotation = 0, '
            f'room = "r" }}')


def _transfer(text: str) -> tuple[object, object]:
    plan = loads_plan(text)
    rules = rules_for(plan)
    got = [c for c in quality(plan, rules) if c.rule == "access.transfer"]
    assert len(got) == 1
    return got[0], audit(plan, rules)


def test_the_transfer_side_takes_the_sets_main_bed_side_zone() -> None:
    plan = loads_plan(_PLAN.format(rules="din-18040-r", side="right", bed_at="", extra=""))
    rules = rules_for(plan)
    zones = {z.side: z.depth for z in resolve_pieces(plan, rules)[0].zones}
    # DIN 18040-2:2011-09, bedrooms, level R: 1500 mm along the long side one transfers
    # from, 1200 mm along the other
    assert zones["right"] == 1500 and zones["left"] == 1200


@pytest.mark.parametrize(("rules", "figure"), [
    ("din-18040-r", 1500),  # DIN 18040-2:2011-09, bedrooms, level R: 1500 mm
    ("ada-2010", 762),  # 2010 ADA Standards 806.2.3 with 305.3: 30 in (762 mm) deep
])
def test_transfer_space_at_the_published_figure_and_10_mm_below(rules: str, figure: int) -> None:
    text = _PLAN.format(rules=rules, side="right", bed_at=_BED_AT, extra=_blocked_at(_RIGHT + figure))
    check, result = _transfer(text)
    assert check.ok and check.measured == pytest.approx(figure, abs=3)
    assert not any(f.rule == "zone.clear" and "box" in f.pieces for f in result.failures)
    text = _PLAN.format(rules=rules, side="right", bed_at=_BED_AT,
                        extra=_blocked_at(_RIGHT + figure - 10))
    check, result = _transfer(text)
    assert not check.ok and check.measured == pytest.approx(figure - 10, abs=3)
    assert "(right side)" in check.label and check.source
    # the clearance audit keeps the same zone free: blocked by the box
    assert any(f.rule == "zone.clear" and "box" in f.pieces for f in result.failures)


def test_the_other_side_is_not_the_transfer_side() -> None:
    # the box 1600 mm east of the bed, room enough on the right; transferring from the
    # left (1400 mm to the west wall, DIN 18040-2 level R asks 1500 there now) fails on
    # that side instead
    check, _ = _transfer(_PLAN.format(rules="din-18040-r", side="left", bed_at=_BED_AT,
                                      extra=_blocked_at(_RIGHT + 1600)))
    assert "(left side)" in check.label and check.measured == pytest.approx(1400, abs=1)
    assert not check.ok


def test_the_solver_places_the_bed_with_its_transfer_space() -> None:
    plan = loads_plan(_PLAN.format(rules="din-18040-r", side="right", bed_at="", extra=""))
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=20.0, workers=1))
    assert result.candidates, result.status
    done = plan.with_layout(result.candidates[0].layout)
    check = next(c for c in quality(done, rules) if c.rule == "access.transfer")
    assert check.ok and check.measured >= 1500, check.text  # DIN 18040-2 level R, 1500 mm


@pytest.mark.parametrize(("value", "extra", "message"), [
    ('"up"', "", "unknown transfer side"),
    ('"left"', 'access = "right"', "access keeps only the right side"),
])
def test_bad_transfer_sides_are_located_errors(value: str, extra: str, message: str) -> None:
    text = _PLAN.format(rules="din-18040-r", side="x", bed_at=extra, extra="").replace(
        'transfer = "x"', f"transfer = {value}")
    with pytest.raises(PlanError, match=message) as err:
        loads_plan(text)
    assert "furniture[0].transfer" in str(err.value)


def test_transfer_applies_to_beds_only() -> None:
    text = _PLAN.format(rules="din-18040-r", side="right", bed_at="", extra="").replace(
        'type = "bed-double-160"', 'type = "sofa-3"')
    with pytest.raises(PlanError, match="beds only"):
        loads_plan(text)


def test_transfer_is_written_back() -> None:
    plan = loads_plan(_PLAN.format(rules="din-18040-r", side="right", bed_at=_BED_AT, extra=""))
    again = loads_plan(dumps_plan(plan))
    assert again.piece("bed").transfer == "right"


_BATH = """
roomfit_plan = 1
name = "wc transfer"
[rules]
set = "ada-2010"
[[rooms]]
id = "b"
label = "Bathroom"
use = "bathroom"
outline = [[0, 0], [2600, 0], [2600, 2600], [0, 2600]]
[[doors]]
id = "d"
rooms = ["b", "outside"]
at = [2000, 2600]
width = 915
leaf = "sliding"
[[fixtures]]
id = "wc"
room = "b"
kind = "wc"
label = "WC"
outline = [[255, 0], [655, 0], [655, 700], [255, 700]]
height = 430
transfer = "{side}"
{extra}
"""
# the WC's back on the south wall, its centreline 455 mm (18 in, the most 2010 ADA 604.2
# allows) from the west side wall; sitting on it the client faces north, the right is east


def _cabinet(x: int, placed: bool = True) -> str:
    """A cabinet (500 x 500, 900 high) east of the WC, its west face at ``x``."""
    at = f'placement = {{ x = {x}, y = 300, rotation = 0, room = "b" }}\n' if placed else ""
    return ('[[furniture]]\nid = "cab"\ntype = "custom"\nroom = "b"\nwidth = 500\n'
            f'depth = 500\nheight = 900\n{at}')


@pytest.mark.parametrize(("x", "ok"), [(1524, True), (1514, False)])
def test_wc_transfer_width_from_the_side_wall(x: int, ok: bool) -> None:
    # 2010 ADA Standards 604.3.1: clearance 60 in (1524 mm) wide measured perpendicular from
    # the side wall, 56 in (1422 mm) deep from the rear wall; at the figure and 10 mm below
    plan = loads_plan(_BATH.format(side="right", extra=_cabinet(x)))
    rules = rules_for(plan)
    check = next(c for c in quality(plan, rules) if c.rule == "access.transfer")
    assert check.ok is ok and check.measured == pytest.approx(x, abs=1), check.text
    assert check.target == "at least 1.52 m" and "604.3.1" in check.source
    blocked = [f for f in audit(plan, rules).failures if f.rule == "zone.clear" and "cab" in f.pieces]
    assert bool(blocked) is not ok


def test_wc_transfer_depth_is_measured_from_the_rear_wall() -> None:
    # the cabinet 1430 mm from the rear wall (beyond the 56 in, 1422 mm, of 604.3.1) and
    # 1000 mm from the side wall: clear of the transfer space
    cab = _cabinet(1000).replace("y = 300", "y = 1430")
    plan = loads_plan(_BATH.format(side="right", extra=cab))
    check = next(c for c in quality(plan, rules_for(plan)) if c.rule == "access.transfer")
    assert check.ok, check.text


def test_the_solver_keeps_the_wc_transfer_space_free() -> None:
    plan = loads_plan(_BATH.format(side="right", extra=_cabinet(0, placed=False)))
    rules = rules_for(plan)
    result = solve(plan, rules, SolveOptions(candidates=1, time_limit=20.0, workers=1))
    assert result.candidates, result.status
    done = plan.with_layout(result.candidates[0].layout)
    check = next(c for c in quality(done, rules) if c.rule == "access.transfer")
    assert check.ok and check.measured >= 1524, check.text  # 2010 ADA 604.3.1, 60 in


def test_wc_transfer_is_read_checked_and_written_back() -> None:
    plan = loads_plan(_BATH.format(side="left", extra=""))
    assert loads_plan(dumps_plan(plan)).fixtures[0].transfer == "left"
    with pytest.raises(PlanError, match="fixtures\\[0\\].transfer"):
        loads_plan(_BATH.format(side="up", extra=""))
