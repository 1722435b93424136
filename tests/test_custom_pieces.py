"""Custom pieces a client actually has (a care bed, a riser chair, a hoist's footprint)
declare their own category, use zones and groups in the plan file, and are then treated
like catalogue types by the audit, the quality audit and the solver."""

from __future__ import annotations

import pytest

from roomfit.audit.quality import quality
from roomfit.errors import PlanError
from roomfit.plan.read import loads_plan
from roomfit.plan.write import dumps_plan
from roomfit.rules.catalog import resolve_pieces
from roomfit.rules.sets import rules_for

_PLAN = """
roomfit_plan = 1
name = "care room"
[rules]
set = "{rules}"
[[rooms]]
id = "r"
label = "Bedroom"
use = "bedroom"
outline = [[0, 0], [4500, 0], [4500, 4000], [0, 4000]]
[[furniture]]
id = "care-bed"
type = "custom"
label = "Care bed"
room = "r"
width = 1000
depth = 2200
height = 600
category = "bed"
zones = {{ left = "bed_side", front = "bed_foot" }}
groups = ["sleeping"]
placement = {{ x = 1800, y = 0, rotation = 0, room = "r" }}
[[furniture]]
id = "hoist"
type = "custom"
label = "Hoist footprint"
room = "r"
width = 1200
depth = 700
height = 0
{extra}
"""


def test_a_care_bed_has_the_zones_it_declares_with_the_rule_sets_depths() -> None:
    plan = loads_plan(_PLAN.format(rules="din-18040-r", extra=""))
    rules = rules_for(plan)
    bed = resolve_pieces(plan, rules)[0]
    assert bed.category == "bed" and bed.groups == ("sleeping",)
    # DIN 18040-2 level R: 1500 mm along the long side one gets in from (bed_side)
    assert {(z.side, z.depth) for z in bed.zones} == {
        ("left", rules.mm("zone.bed_side")), ("front", rules.mm("zone.bed_foot"))}
    assert rules.mm("zone.bed_side") == 1500
    # the quality audit treats it as a bed: head against the south wall, no window
    checks = {c.rule: c for c in quality(plan, rules)}
    assert checks["group.bed_wall"].ok and checks["group.bed_window"].ok


def test_custom_declarations_survive_writing_and_reading() -> None:
    plan = loads_plan(_PLAN.format(rules="everyday", extra=""))
    again = loads_plan(dumps_plan(plan))
    assert again.furniture == plan.furniture


@pytest.mark.parametrize(("extra", "message"), [
    ('zones = { left = "hoist_swing" }', "unknown zone kind 'hoist_swing'"),
    ('zones = { top = "bed_side" }', "unknown side 'top'"),
    ('groups = ["bathing"]', "expected a list of groups"),
    ('category = "hoist"', "unknown category 'hoist'"),
])
def test_bad_declarations_are_named(extra: str, message: str) -> None:
    with pytest.raises(PlanError, match=message):
        loads_plan(_PLAN.format(rules="everyday", extra=extra))


def test_a_catalogue_type_may_not_redefine_its_zones() -> None:
    text = _PLAN.format(rules="everyday", extra="").replace(
        'id = "hoist"\ntype = "custom"', 'id = "hoist"\ntype = "armchair"') + \
        'zones = { front = "seat_front" }\n'
    with pytest.raises(PlanError, match="only a custom piece declares zones"):
        loads_plan(text)
