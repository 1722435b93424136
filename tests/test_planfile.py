"""Plan files: samples parse and round-trip; every validation problem names its field.

The base plan below is hand-made: two 4.0 x 3.0 m and 3.0 x 3.0 m rooms side by side, so
every number in the expected messages can be checked by hand.
"""

from __future__ import annotations

import copy
import tomllib
from dataclasses import replace
from pathlib import Path
from typing import Any

import pytest
import tomli_w
from conftest import SAMPLES
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from roomfit.errors import PlanError, RoomfitError
from roomfit.plan.data import Leaf, Placement
from roomfit.plan.read import loads_plan, read_plan
from roomfit.plan.units import parse_length
from roomfit.plan.write import dumps_plan, write_plan


def _base() -> dict[str, Any]:
    return {
        "roomfit_plan": 1,
        "name": "Test flat",
        "units": "mm",
        "rooms": [
            {"id": "a", "label": "A", "use": "living",
             "outline": [[0, 0], [4000, 0], [4000, 3000], [0, 3000]]},
            {"id": "b", "label": "B", "use": "bedroom",
             "outline": [[4000, 0], [7000, 0], [7000, 3000], [4000, 3000]]},
        ],
        "doors": [
            {"id": "d1", "rooms": ["a", "outside"], "at": [2000, 0], "width": 900,
             "leaf": "hinged", "swings_into": "a", "hinge": "left"},
            {"id": "d2", "rooms": ["a", "b"], "at": [4000, 1500], "width": 800, "leaf": "sliding"},
        ],
        "windows": [{"id": "w1", "room": "b", "at": [5500, 3000], "width": 1200, "sill": 900}],
        "fixtures": [{"id": "f1", "room": "a", "kind": "radiator", "label": "Radiator",
                      "outline": [[0, 1000], [100, 1000], [100, 2000], [0, 2000]], "height": 600}],
        "furniture": [{"id": "bed", "type": "bed-single-90", "room": "b",
                       "placement": {"x": 4000, "y": 0, "rotation": 0}}],
        "routines": [{"from": "bed", "to": "entrance", "per_day": 1}],
    }


def _problems(data: dict[str, Any]) -> dict[str, str]:
    """field -> message of every problem reading ``data`` reports (it must report some)."""
    with pytest.raises(PlanError) as info:
        loads_plan(tomli_w.dumps(data), "test.toml")
    return {p.field: p.message for p in info.value.problems}


def test_base_plan_is_valid() -> None:
    plan = loads_plan(tomli_w.dumps(_base()))
    assert [r.id for r in plan.rooms] == ["a", "b"]
    assert plan.doors[1].leaf == Leaf.SLIDING
    assert plan.furniture[0].placement == Placement(4000, 0, 0, "b")


# --- samples ---------------------------------------------------------------------------------

def test_every_sample_is_there() -> None:
    names = {p.stem for p in SAMPLES}
    assert {"studio", "one-bed", "two-bed", "ground-floor-wheelchair"} <= names


def test_sample_reads(sample_path: Path) -> None:
    plan = read_plan(sample_path)
    assert plan.rooms and plan.doors and plan.furniture and plan.routines
    assert plan.is_furnished  # every sample carries an as-is arrangement
    assert any(d.is_entrance for d in plan.doors)
    assert any(t.night for t in plan.routines)


def test_sample_round_trips(sample_path: Path, tmp_path: Path) -> None:
    plan = read_plan(sample_path)
    out = write_plan(plan, tmp_path / "again.toml")
    assert read_plan(out) == plan
    assert loads_plan(dumps_plan(plan)) == plan


def test_l_shaped_living_room_and_angled_wall_are_there() -> None:
    one = read_plan(next(p for p in SAMPLES if p.stem == "one-bed"))
    assert len(one.room("living").outline) == 6  # an L has six corners
    two = read_plan(next(p for p in SAMPLES if p.stem == "two-bed"))
    edges = [(a, b) for r in two.rooms for a, b in zip(r.outline, r.outline[1:] + r.outline[:1], strict=True)]
    assert any(a[0] != b[0] and a[1] != b[1] for a, b in edges)


def test_wheelchair_sample_uses_wide_doors() -> None:
    plan = read_plan(next(p for p in SAMPLES if p.stem == "ground-floor-wheelchair"))
    assert plan.rules.set == "ada-2010"
    # 2010 ADA §404.2.3: 32 in clear opening; the sample asks for at least 900 mm
    assert all(d.width >= 900 for d in plan.doors)


def test_plan_in_inches_round_trips(tmp_path: Path) -> None:
    data = _base()
    data["units"] = "in"
    data["rooms"][0]["outline"] = [[0, 0], [157.5, 0], [157.5, 118.11], [0, 118.11]]
    data["rooms"][1]["outline"] = [[157.5, 0], [275.6, 0], [275.6, 118.11], [157.5, 118.11]]
    data["doors"][0].update(at=[78.75, 0], width="36 in")
    data["doors"][1].update(at=[157.5, 59], width=32)
    data["windows"][0].update(at=[216.5, 118.11], width=47.25, sill="3 ft")
    data["fixtures"][0]["outline"] = [[0, 40], [4, 40], [4, 80], [0, 80]]
    data["fixtures"][0]["height"] = 24
    data["furniture"][0]["placement"] = {"x": 157.5, "y": 0, "rotation": 0}
    plan = loads_plan(tomli_w.dumps(data))
    assert plan.unit == "in"
    # 1 in = 25.4 mm exactly (1959 international yard and pound agreement)
    assert plan.room("a").outline[1] == (4001, 0)  # 157.5 in = 4000.5 mm, rounded half away
    assert plan.doors[0].width == 914  # 36 in = 914.4 mm
    assert plan.windows[0].sill == 914  # 3 ft = 914.4 mm
    text = dumps_plan(plan)
    assert 'units = "in"' in text
    again = loads_plan(text)
    assert again == plan
    assert read_plan(write_plan(plan, tmp_path / "in.toml")) == plan


@pytest.mark.parametrize(("unit", "mm", "written"), [
    # plans in inches or feet are written in feet and inches (1 in = 25.4 mm):
    # 5486 mm = 215.984.. in; 216 in = 18 ft = 5486.4 mm reads back as 5486
    ("in", 5486, '"18 ft"'),
    # 1 mm = 0.03937 in: 0.0 in would read as 0 mm, 0.04 in = 1.016 mm reads as 1
    ("in", 1, '"0.04 in"'),
    # 1000 mm = 39.370.. in = 3 ft 3.37 in (3.4 in would read back as 1001 mm)
    ("ft", 1000, '"3 ft 3.37 in"'),
    ("cm", 1235, "123.5"),
])
def test_lengths_are_written_as_short_decimals(unit: str, mm: int, written: str) -> None:
    plan = read_plan(Path(__file__).parent / "plans_unseen" / "cm-flat.toml")
    piece = plan.furniture[0]
    assert piece.placement is not None
    moved = replace(piece, placement=replace(piece.placement, x=mm))
    plan = replace(plan, unit=unit, furniture=(moved, *plan.furniture[1:]))
    text = dumps_plan(plan)
    assert f"x = {written}\n" in text
    assert loads_plan(text) == plan


# --- one test per validation problem -------------------------------------------------------

def test_self_intersecting_outline_says_where() -> None:
    data = _base()
    data["rooms"][0]["outline"] = [[0, 0], [4000, 3000], [4000, 0], [0, 3000]]  # a bow tie
    got = _problems(data)
    assert "not a simple polygon" in got["rooms[0].outline"]
    assert "2000 1500" in got["rooms[0].outline"]  # the diagonals cross at (2000, 1500), by hand


def test_overlapping_rooms() -> None:
    data = _base()
    data["rooms"][1]["outline"] = [[3500, 0], [7000, 0], [7000, 3000], [3500, 3000]]
    got = _problems(data)
    # overlap 500 x 3000 mm = 1.5 m2, by hand
    assert "overlaps room 'a' by 1.500 m2" in got["rooms[1].outline"]


def test_entrance_with_a_bad_width_is_not_also_missing() -> None:
    # one mistake, one problem: the entrance's bad width must not also read "no entrance"
    data = _base()
    data["doors"][0]["width"] = "3 ft 6 inch"
    assert set(_problems(data)) == {"doors[0].width"}
    data["doors"][0]["rooms"] = ["a", "outsid"]
    got = _problems(data)
    assert "doors[0].rooms[1]" in got and "no entrance" in got["doors"]


def test_fitting_zone_outside_its_room() -> None:
    # the radiator stands on room a's west wall (x 0..100); a zone west of it, x -600..0,
    # is 600 x 1000 mm = 0.6 m2 of floor that is not in the room
    data = _base()
    data["fixtures"][0]["zone"] = [[-600, 1000], [0, 1000], [0, 2000], [-600, 2000]]
    assert "0.600 m2 of the fitting's zone lies outside room 'a'" in _problems(data)[
        "fixtures[0].zone"]
    data["fixtures"][0]["zone"] = [[100, 1000], [700, 1000], [700, 2000], [100, 2000]]
    assert loads_plan(tomli_w.dumps(data)).fixtures[0].zone is not None


def test_opening_across_a_corner_listed_mid_wall() -> None:
    # room a's south wall listed as two straight pieces (0..2000, 2000..4000) and a repeated
    # corner: the 900 mm entrance centred at x 2000 spans both pieces of one straight wall
    data = _base()
    data["rooms"][0]["outline"] = [[0, 0], [2000, 0], [4000, 0], [4000, 3000], [4000, 3000],
                                   [0, 3000]]
    plan = loads_plan(tomli_w.dumps(data))
    assert plan.doors[0].at == (2000, 0)
    # a real corner still ends a wall: the same door at x 4000 runs 450 mm round the corner
    data["doors"][0]["at"] = [4000, 0]
    assert "runs 450 mm past the end of its wall" in _problems(data)["doors[0].at"]


def test_openings_overlapping_on_a_wall() -> None:
    # the entrance spans x 1550..2450 on room a's south wall; a window centred at x 2600,
    # 1000 mm wide, spans 2100..3100: 350 mm of it over the door; moved to x 3000 (2500..3500)
    # it stands 50 mm clear
    data = _base()
    data["windows"].append({"id": "w2", "room": "a", "at": [2600, 0], "width": 1000,
                            "sill": 900})
    got = _problems(data)
    assert got == {"windows[1].at": "the window's opening overlaps door 'd1' by 350 mm"}
    data["windows"][1]["at"] = [3000, 0]
    assert len(loads_plan(tomli_w.dumps(data)).windows) == 2


def test_access_is_for_beds_only() -> None:
    # plan format: access keeps a bed's long sides free; on a sofa or a custom piece it would
    # silently do nothing (or, on a round table, drop two of its seats)
    data = _base()
    data["furniture"][0]["access"] = "left"
    assert loads_plan(tomli_w.dumps(data)).furniture[0].access == "left"
    for ptype in ("sofa-2", "dining-table-round-4"):
        data["furniture"][0]["type"] = ptype
        assert "access applies to beds only" in _problems(data)["furniture[0].access"]


def test_door_off_its_wall_says_how_far() -> None:
    data = _base()
    data["doors"][1]["at"] = [3700, 1500]
    got = _problems(data)
    assert "300 mm off the nearest wall of room 'a'" in got["doors[1].at"]


def test_door_wider_than_its_wall() -> None:
    data = _base()
    data["doors"][0]["width"] = 5000
    got = _problems(data)
    assert "5000 mm is wider than its wall" in got["doors[0].width"]
    assert "4000 mm long" in got["doors[0].width"]


def test_door_running_past_the_end_of_its_wall() -> None:
    data = _base()
    data["doors"][0]["at"] = [300, 0]
    got = _problems(data)
    assert "runs 150 mm past the end" in got["doors[0].at"]  # 300 - 900/2 = -150, by hand


def test_door_too_far_from_the_other_room() -> None:
    data = _base()
    data["rooms"][1]["outline"] = [[4700, 0], [7000, 0], [7000, 3000], [4700, 3000]]
    got = _problems(data)
    assert "700 mm from the nearest wall of room 'b'" in got["doors[1].at"]


def test_door_leading_partly_into_a_wall_beyond_the_other_room() -> None:
    data = _base()
    data["rooms"][1]["outline"] = [[4000, 0], [7000, 0], [7000, 1700], [4000, 1700]]
    data["windows"][0]["at"] = [5500, 1700]
    # the opening runs y 1100..1900 and room b ends at y 1700: 200 mm too far, by hand
    got = _problems(data)
    assert "200 mm of the 800 mm opening leads past the end of the wall of room 'b'" in got["doors[1].at"]


def test_door_across_a_wall_gap_is_fine() -> None:
    data = _base()
    data["rooms"][1]["outline"] = [[4100, 0], [7000, 0], [7000, 3000], [4100, 3000]]
    assert loads_plan(tomli_w.dumps(data)).doors[1].rooms == ("a", "b")


def test_unknown_room_ids() -> None:
    data = _base()
    data["furniture"][0]["room"] = "kitchen"
    data["doors"][1]["rooms"] = ["a", "attic"]
    data["windows"][0]["room"] = "loft"
    got = _problems(data)
    assert "unknown room 'kitchen'" in got["furniture[0].room"]
    assert "unknown room 'attic'" in got["doors[1].rooms[1]"]
    assert "unknown room 'loft'" in got["windows[0].room"]


def test_unknown_furniture_type() -> None:
    data = _base()
    data["furniture"][0]["type"] = "bed-emperor"
    assert "unknown furniture type 'bed-emperor'" in _problems(data)["furniture[0].type"]


@pytest.mark.parametrize("path,value,field", [
    (("doors", 0, "width"), 0, "doors[0].width"),
    (("doors", 0, "width"), -900, "doors[0].width"),
    (("windows", 0, "sill"), -1, "windows[0].sill"),
    (("fixtures", 0, "height"), 0, "fixtures[0].height"),
    (("furniture", 0, "width"), -5, "furniture[0].width"),
])
def test_zero_or_negative_sizes(path: tuple, value: int, field: str) -> None:
    data = _base()
    node = data
    for k in path[:-1]:
        node = node[k]
    node[path[-1]] = value
    msg = _problems(data)[field]
    assert "must be" in msg and f"found {value} mm" in msg


def test_unknown_units() -> None:
    data = _base()
    data["units"] = "furlong"
    got = _problems(data)
    assert "unknown unit 'furlong'" in got["units"]


def test_unknown_unit_in_a_length() -> None:
    data = _base()
    data["doors"][0]["width"] = "3 cubits"
    assert "cannot read length" in _problems(data)["doors[0].width"]


def test_duplicate_ids() -> None:
    data = _base()
    data["furniture"][0]["id"] = "a"  # the id of a room
    data["windows"][0]["id"] = "d1"  # the id of a door
    got = _problems(data)
    assert "duplicate id 'a', already used by rooms[0].id" in got["furniture[0].id"]
    assert "duplicate id 'd1'" in got["windows[0].id"]


def test_missing_keys() -> None:
    data = _base()
    del data["rooms"][0]["use"]
    del data["doors"][0]["width"]
    del data["furniture"][0]["type"]
    got = _problems(data)
    assert got["rooms[0].use"] == "missing key"
    assert got["doors[0].width"] == "missing key"
    assert got["furniture[0].type"] == "missing key"


def test_missing_format_version() -> None:
    data = _base()
    del data["roomfit_plan"]
    assert "expected format version 1, missing" in _problems(data)["roomfit_plan"]


def test_wrong_types() -> None:
    data = _base()
    data["rooms"][0]["label"] = 5
    data["windows"] = "north"
    data["furniture"][0]["locked"] = "yes"
    data["routines"][0]["per_day"] = "often"
    got = _problems(data)
    assert got["rooms[0].label"] == "expected text, found a number"
    assert "expected an array of tables" in got["windows"]
    assert "expected true or false, found text" in got["furniture[0].locked"]
    assert "found 'often'" in got["routines[0].per_day"]


def test_not_toml_gives_line_and_column() -> None:
    text = 'roomfit_plan = 1\nname = "x"\nunits = \n'
    with pytest.raises(PlanError) as info:
        loads_plan(text, "broken.toml")
    p = info.value.problems[0]
    assert "not a valid TOML file" in p.message
    assert p.line == 3 and p.column is not None
    assert info.value.render().startswith("broken.toml:3:")


def test_unknown_key() -> None:
    data = _base()
    data["rooms"][0]["colour"] = "red"
    data["furniture"][0]["placement"]["angle"] = 10
    got = _problems(data)
    assert got["rooms[0].colour"] == "unknown key"
    assert got["furniture[0].placement.angle"] == "unknown key"


def test_locked_without_placement() -> None:
    data = _base()
    del data["furniture"][0]["placement"]
    data["furniture"][0]["locked"] = True
    assert "a locked piece needs a placement" in _problems(data)["furniture[0].locked"]


@pytest.mark.parametrize("rotation", [45, -90, 360, "90", True])
def test_bad_rotation(rotation: Any) -> None:
    data = _base()
    data["furniture"][0]["placement"]["rotation"] = rotation
    msg = _problems(data)["furniture[0].placement.rotation"]
    assert "expected one of 0, 90, 180, 270 degrees" in msg


def test_hinged_door_needs_hinge_and_swing() -> None:
    data = _base()
    data["doors"][0]["hinge"] = "middle"
    data["doors"][0]["swings_into"] = "b"
    got = _problems(data)
    assert "expected 'left' or 'right'" in got["doors[0].hinge"]
    assert "swings into one of its rooms" in got["doors[0].swings_into"]


def test_unknown_routine_place() -> None:
    data = _base()
    data["routines"][0]["to"] = "fridge"
    assert "unknown place 'fridge'" in _problems(data)["routines[0].to"]


def test_several_problems_are_collected_in_one_error() -> None:
    data = _base()
    data["units"] = "furlong"
    data["doors"][1]["at"] = [3700, 1500]
    data["furniture"][0]["type"] = "bed-emperor"
    data["rooms"][0]["colour"] = "red"
    with pytest.raises(PlanError) as info:
        loads_plan(tomli_w.dumps(data), "many.toml")
    fields = {p.field for p in info.value.problems}
    assert {"units", "doors[1].at", "furniture[0].type", "rooms[0].colour"} <= fields
    text = info.value.render()
    assert text.count("many.toml: ") == len(info.value.problems) >= 4


def test_missing_file_and_folder(tmp_path: Path) -> None:
    with pytest.raises(PlanError, match="no such file"):
        read_plan(tmp_path / "nope.toml")
    with pytest.raises(PlanError, match="is a folder"):
        read_plan(tmp_path)


# --- malformed files never raise anything but our own errors --------------------------------

_KEYS = ["roomfit_plan", "name", "units", "rooms", "doors", "windows", "fixtures", "furniture",
         "routines", "rules", "id", "label", "use", "outline", "at", "width", "depth", "height",
         "leaf", "hinge", "swings_into", "room", "type", "placement", "x", "y", "rotation", "sill",
         "kind", "zone", "locked", "from", "to", "per_day", "night", "set", "overrides", "access"]

_scalars = st.one_of(
    st.integers(-10**7, 10**7), st.floats(allow_nan=True, allow_infinity=True), st.booleans(),
    st.text(max_size=12), st.sampled_from(["mm", "in", "a", "b", "outside", "hinged", "left",
                                           "bed-single-90", "custom", "36 in", "ada-2010"]),
)
_trees = st.recursive(
    _scalars,
    lambda inner: st.one_of(st.lists(inner, max_size=5),
                            st.dictionaries(st.sampled_from(_KEYS), inner, max_size=6)),
    max_leaves=40,
)


def _read_text(text: str) -> None:
    try:
        loads_plan(text)
    except RoomfitError:
        pass


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.dictionaries(st.sampled_from(_KEYS), _trees, max_size=8), st.booleans())
def test_random_toml_trees_only_raise_our_errors(tree: dict[str, Any], versioned: bool) -> None:
    if versioned:
        tree["roomfit_plan"] = 1
    _read_text(tomli_w.dumps(tree))


def _paths(node: Any, prefix: tuple = ()) -> list[tuple]:
    out = [prefix] if prefix else []
    if isinstance(node, dict):
        for k, v in node.items():
            out += _paths(v, prefix + (k,))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            out += _paths(v, prefix + (i,))
    return out


_SAMPLE_DATA = {p.stem: tomllib.loads(p.read_text(encoding="utf-8")) for p in SAMPLES}


@settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
@given(st.sampled_from(sorted(_SAMPLE_DATA)), st.data())
def test_mutated_samples_only_raise_our_errors(name: str, data: st.DataObject) -> None:
    tree = copy.deepcopy(_SAMPLE_DATA[name])
    for _ in range(data.draw(st.integers(1, 4))):
        paths = _paths(tree)
        path = data.draw(st.sampled_from(paths))
        parent = tree
        for k in path[:-1]:
            parent = parent[k]
        if data.draw(st.booleans()) and isinstance(parent, dict):
            del parent[path[-1]]
        else:
            parent[path[-1]] = data.draw(_trees)
    _read_text(tomli_w.dumps(tree))


@settings(max_examples=100, deadline=None)
@given(st.sampled_from(SAMPLES), st.integers(0, 10**6), st.text(max_size=4), st.integers(0, 6))
def test_damaged_sample_text_only_raises_our_errors(path: Path, at: int, insert: str,
                                                    cut: int) -> None:
    text = path.read_text(encoding="utf-8")
    i = at % (len(text) + 1)
    _read_text(text[:i] + insert + text[i + cut:])


def test_lengths_in_the_file_use_the_same_rules_as_units() -> None:
    data = _base()
    data["doors"][0]["width"] = "2 ft 11.5 in"
    plan = loads_plan(tomli_w.dumps(data))
    assert plan.doors[0].width == parse_length("35.5 in") == 902  # 35.5 * 25.4 = 901.7


def test_example_in_the_format_document_is_valid() -> None:
    doc = (Path(__file__).parent.parent / "docs" / "plan-format.md").read_text(encoding="utf-8")
    example = doc.split("```toml\n")[-1].split("```")[0]
    plan = loads_plan(example, "docs/plan-format.md")
    assert plan.rules.override_map() == {"route.width": 813}  # 32 in = 812.8 mm
    assert plan.piece("chest").width == 914  # 36 in = 914.4 mm
