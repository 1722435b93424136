"""Hostile, broken and huge plan files: each ends in a located problem (exit 2 on the command
line), never a traceback, and is read in bounded time and memory (the limits of
``roomfit/plan/limits.py``, stated in ``docs/plan-format.md``)."""

from __future__ import annotations

from pathlib import Path

import pytest
from conftest import PROBE_FLAT

from roomfit.cli import main
from roomfit.errors import PlanError
from roomfit.plan import limits
from roomfit.plan.read import loads_plan, read_plan

BASE = PROBE_FLAT

PIECE = '''
[[furniture]]
id = "chair"
type = "custom"
width = 500
depth = 500
height = 800
room = "room"
'''


def _refused(text: str | bytes, field: str, words: str) -> str:
    """Read ``text``; it must be refused with a problem at ``field`` whose message holds
    ``words``; the rendered error is returned."""
    with pytest.raises(PlanError) as info:
        loads_plan(text, "probe.toml")
    found = {p.field: p.message + " " + p.hint for p in info.value.problems}
    assert field in found, found
    assert words in found[field], found[field]
    return info.value.render()


def test_base_plan_reads() -> None:
    assert loads_plan(BASE).rooms[0].id == "room"


def test_nesting_500_levels_is_a_message_not_a_recursion_error() -> None:
    _refused(BASE + "x = " + "[" * 500 + "]" * 500 + "\n", "", "nested more than")
    _refused(BASE.replace('name = "Probe flat (invented)"', "name = " + "{a = " * 500 + "1"
                          + "}" * 500), "", "nested more than")


def test_nesting_deeper_than_a_plan_needs_names_the_field() -> None:
    _refused("deep = [[[[[[[1]]]]]]]\n" + BASE, "deep[0][0][0][0][0][0]", "nested more than 6")


def test_a_number_of_5000_digits() -> None:
    text = _refused(BASE.replace("width = 900", "width = " + "9" * 5000), "", "too long")
    assert "probe.toml:14" in text  # the line of the number


def test_coordinates_of_1e306_metres() -> None:
    huge = BASE.replace('units = "mm"', 'units = "m"').replace(
        "[[0, 0], [4000, 0], [4000, 3000], [0, 3000]]", "[[0, 0], [1e306, 0], [1e306, 3], [0, 3]]")
    _refused(huge, "rooms[0].outline[1][0]", "beyond the largest length")


def test_a_locked_piece_at_x_1e20() -> None:
    text = BASE + PIECE + "locked = true\nplacement = { x = 1e20, y = 0, rotation = 0 }\n"
    _refused(text, "furniture[0].placement.x", "1000 m either way")


def test_a_flat_wider_than_the_limit() -> None:
    far = BASE.replace("[[0, 0], [4000, 0], [4000, 3000], [0, 3000]]",
                       "[[0, 0], [400000, 0], [400000, 3000], [0, 3000]]")
    _refused(far, "rooms", f"at most {limits.MAX_FLAT_MM} mm each way")


def test_a_piece_longer_than_a_flat() -> None:
    _refused(BASE + PIECE.replace("width = 500", "width = 250000"), "furniture[0].width",
             f"allowed: 1 to {limits.MAX_FLAT_MM} mm")


def test_counts_beyond_the_limits() -> None:
    rooms = "".join(f'[[rooms]]\nid = "r{i}"\nuse = "hall"\noutline = [[{i * 10}, 0], '
                    f'[{i * 10 + 10}, 0], [{i * 10 + 10}, 10]]\n'
                    for i in range(limits.MAX_ITEMS["rooms"] + 1))
    _refused('roomfit_plan = 1\n' + rooms, "rooms", f"at most {limits.MAX_ITEMS['rooms']}")
    many = ", ".join(f"[{i}, 0]" for i in range(limits.MAX_OUTLINE_VERTICES)) + ", [0, 5]"
    _refused(BASE.replace("[[0, 0], [4000, 0], [4000, 3000], [0, 3000]]", f"[{many}]"),
             "rooms[0].outline", f"at most {limits.MAX_OUTLINE_VERTICES}")


def test_a_file_beyond_the_size_limit_is_refused_before_parsing(tmp_path: Path) -> None:
    big = tmp_path / "big.toml"
    big.write_text(BASE + "notes = '" + "x" * limits.MAX_FILE_BYTES + "'\n", encoding="utf-8")
    with pytest.raises(PlanError, match="larger than 1024 KiB"):
        read_plan(big)
    _refused(big.read_bytes(), "", "larger than")


def test_validate_dev_zero_stops_at_the_size_limit(capsys: pytest.CaptureFixture[str]) -> None:
    # /dev/zero never ends: reading stops after the size limit instead of filling memory
    assert main(["validate", "/dev/zero"]) == 2
    assert "larger than 1024 KiB" in capsys.readouterr().err


@pytest.mark.parametrize("version", ["true", "1.0", '"1"'])
def test_the_format_version_is_an_integer(version: str) -> None:
    _refused(BASE.replace("roomfit_plan = 1", f"roomfit_plan = {version}"), "roomfit_plan",
             "expected format version 1")


def test_rotation_is_an_integer() -> None:
    _refused(BASE + PIECE + "placement = { x = 0, y = 0, rotation = 90.0 }\n",
             "furniture[0].placement.rotation", "expected one of 0, 90, 180, 270")


def test_an_id_with_a_trailing_newline() -> None:
    _refused(BASE.replace('id = "room"', 'id = "room\\n"'), "rooms[0].id", "must start with")


def test_per_day_of_1e308_names_the_allowed_range() -> None:
    text = BASE + '\n[[routines]]\nfrom = "entrance"\nto = "room"\nper_day = 1e308\n'
    _refused(text, "routines[0].per_day", f"at most {limits.MAX_PER_DAY} a day")


def test_a_route_width_override_of_1e300_names_the_allowed_range() -> None:
    over = BASE.replace('units = "mm"', 'units = "mm"\n[rules]\nset = "everyday"\n'
                        'overrides = { "route.width" = 1e300 }')
    _refused(over, "rules.overrides.route.width", f"allowed: 0 to {limits.MAX_OVERRIDE_MM} mm")
    _refused(over.replace("1e300", "20000"), "rules.overrides.route.width",
             f"at most {limits.MAX_OVERRIDE_MM} mm")


def test_a_utf8_file_with_a_byte_order_mark_is_read(tmp_path: Path) -> None:
    p = tmp_path / "bom.toml"
    p.write_bytes(b"\xef\xbb\xbf" + BASE.encode("utf-8"))
    assert read_plan(p).name == "Probe flat (invented)"


@pytest.mark.parametrize("char", ["\\u0007", "\\u0000", "\\u001b", "\\u009b", "\\u202e",
                                  "\\uffff"])
def test_control_characters_in_text_are_refused_with_the_field(char: str) -> None:
    _refused(BASE.replace('name = "Probe flat (invented)"', f'name = "a{char}b"'), "name",
             "control character")
    _refused(BASE.replace('use = "living"', f'use = "living"\nlabel = "x{char}"'),
             "rooms[0].label", "control character")


def test_tabs_and_line_breaks_in_notes_are_fine() -> None:
    plan = loads_plan(BASE.replace('units = "mm"', 'units = "mm"\nnotes = "a\\tb\\nc"'))
    assert plan.notes == "a\tb\nc"


def test_messages_show_control_characters_escaped() -> None:
    # an unknown key may hold anything; printed, it must not drive the terminal
    text = _refused('"bad\\u001b[2J" = 1\n' + BASE, "bad\x1b[2J", "unknown key")
    assert "\x1b" not in text and "bad\\x1b[2J" in text


@pytest.mark.parametrize("case", ["nest", "digits", "huge", "lock", "bell", "idnl", "per_day"])
def test_the_command_line_exits_2_and_leaves_the_plan(case: str, tmp_path: Path,
                                                     capsys: pytest.CaptureFixture[str]) -> None:
    text = {
        "nest": BASE + "x = " + "[" * 500 + "]" * 500 + "\n",
        "digits": BASE.replace("width = 900", "width = " + "9" * 5000),
        "huge": BASE.replace("4000, 3000]", "1e306, 3000]"),
        "lock": BASE + PIECE + "locked = true\nplacement = { x = 1e20, y = 0, rotation = 0 }\n",
        "bell": BASE.replace("Probe", "Probe\\u0007"),
        "idnl": BASE.replace('id = "d"', 'id = "d\\n"'),
        "per_day": BASE + '[[routines]]\nfrom = "entrance"\nto = "room"\nper_day = 1e12\n',
    }[case]
    plan = tmp_path / "plan.toml"
    plan.write_text(text, encoding="utf-8")
    for argv in (["validate", str(plan)], ["check", str(plan)],
                 ["draw", str(plan), "-o", str(tmp_path / "d.svg")],
                 ["solve", str(plan), "--time-limit", "2", "-o", str(tmp_path / "out")]):
        assert main(argv) == 2, argv
        err = capsys.readouterr().err
        assert "plan.toml" in err and "Traceback" not in err
    assert plan.read_text(encoding="utf-8") == text
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plan.toml"]


def test_a_door_shape_costs_the_same_however_many_rooms_the_plan_has(
        monkeypatch: pytest.MonkeyPatch) -> None:
    # 2000 rooms took 91 s to draw and 115 s to check because every door rebuilt every
    # room; the shapes built for one door must not grow with the plan (counted, not timed)
    from dataclasses import replace

    from roomfit.audit import geometry
    from roomfit.rules.sets import rules_for

    plan = loads_plan(BASE)
    rules = rules_for(plan)
    built: list[int] = []

    polygon = geometry.Polygon

    def counted(*args: object, **kw: object) -> object:
        built.append(1)
        return polygon(*args, **kw)

    def shapes_built(p: object) -> int:
        built.clear()
        with monkeypatch.context() as m:
            m.setattr(geometry, "Polygon", counted)
            geometry.door_shape(p, p.doors[0], rules)  # type: ignore[attr-defined]
        return len(built)

    many = replace(plan, rooms=plan.rooms + tuple(
        replace(plan.rooms[0], id=f"r{i}", outline=tuple((x + 5000 * (i + 1), y)
                                                       for x, y in plan.rooms[0].outline))
        for i in range(300)))
    assert shapes_built(many) == shapes_built(plan) > 0


@pytest.mark.parametrize("argv, words", [
    (["--seed", "2147483648"], "2147483648 is outside 0 to 2147483647"),  # CP-SAT: 32-bit seed
    (["--seed", "-1"], "outside 0 to"),
    (["--grid", "0"], "outside 1 to 1000"),
    (["--seed", "1e3"], "expected a whole number"),
])
def test_solve_arguments_out_of_range_are_refused_with_a_message(
        argv: list[str], words: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    plan = tmp_path / "plan.toml"
    plan.write_text(BASE, encoding="utf-8")
    with pytest.raises(SystemExit) as info:
        main(["solve", str(plan), "-o", str(tmp_path / "out"), *argv])
    assert info.value.code == 2
    err = capsys.readouterr().err
    assert words in err and "Traceback" not in err
    assert sorted(p.name for p in tmp_path.iterdir()) == ["plan.toml"]


def test_a_title_with_a_control_character_is_refused(tmp_path: Path,
                                                     capsys: pytest.CaptureFixture[str]) -> None:
    plan = tmp_path / "plan.toml"
    plan.write_text(BASE, encoding="utf-8")
    with pytest.raises(SystemExit):
        main(["draw", str(plan), "-o", str(tmp_path / "a.svg"), "--title", "bell\x07"])
    assert "control character (U+0007)" in capsys.readouterr().err
