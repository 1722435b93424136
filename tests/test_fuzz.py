"""Hostile plans through every command and the page's upload: no traceback, only the exit codes
0 (fine), 1 (a rule fails, or proven impossible), 2 (bad input) and 3 (time limit), and
output files either complete or untouched.

Plans are made by damaging a small furnished flat: a value replaced by something hostile (a
huge, tiny, negative, non-finite or wrongly typed number, text with control characters,
markup or a length a person might write), a key dropped, a table repeated, deep nesting, or
bytes of the file changed. The runs are bounded (few examples, derandomized, short time
limits) so CI stays quick; ``ROOMFIT_FUZZ_EXAMPLES=500`` runs a longer search (see
``docs/robustness.md``). No assertion measures time: every command is given small limits.
"""

from __future__ import annotations

import copy
import json
import os
import tomllib
import xml.etree.ElementTree as ET
from pathlib import Path
from typing import Any

import pytest
import tomli_w
from conftest import PROBE_FLAT
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from roomfit import page
from roomfit.cli import main
from roomfit.errors import RoomfitError

#: Examples per test: small in CI, larger on request.
EXAMPLES = int(os.environ.get("ROOMFIT_FUZZ_EXAMPLES", "8"))
FUZZ = settings(max_examples=EXAMPLES, derandomize=True, deadline=None, database=None,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.function_scoped_fixture])

FURNISHED = PROBE_FLAT + '''
[[windows]]
id = "w"
room = "room"
at = [4000, 1500]
width = 1200
sill = 900

[[furniture]]
id = "bed"
type = "custom"
label = "Bed"
width = 900
depth = 2000
height = 450
room = "room"
placement = { x = 100, y = 900, rotation = 0 }

[[furniture]]
id = "chair"
type = "custom"
width = 500
depth = 500
height = 800
room = "room"
locked = true
placement = { x = 3000, y = 2000, rotation = 90 }

[[routines]]
from = "entrance"
to = "bed"
per_day = 2
'''

HOSTILE = st.one_of(
    st.sampled_from([0, -1, 1, 2**31, 2**63, 10**300, 1e306, -1e20, 1e-9, float("inf"),
                     float("nan"), True, False, [], {}, [[]], "", " ", "0", "1e3", "2'8",
                     "5' 10", "1 500", "3 6", "900mm900", "-3 ft 6 in", "3 ft 6 in", "90 cm",
                     "<script>alert(1)</script>", "]]></svg>&amp;", "a\u0007b", "\x00", "\x1b[2J",
                     "\u202eevil", "\ufeff", "room\n", "outside", "entrance", "bed", "x" * 5000,
                     "9" * 400, [1, 2, 3], [[0, 0], [1, 0]], {"x": 1}]),
    st.integers(), st.floats(allow_nan=True, allow_infinity=True), st.text(max_size=20),
    st.lists(st.integers(-10**7, 10**7), max_size=3),
)


def _leaves(node: Any, path: tuple = ()) -> list[tuple]:
    """Paths of every value inside a TOML tree."""
    out = [path] if path else []
    if isinstance(node, dict):
        for k, v in node.items():
            out += _leaves(v, (*path, k))
    elif isinstance(node, list):
        for i, v in enumerate(node):
            out += _leaves(v, (*path, i))
    return out


@st.composite
def hostile_plans(draw: st.DrawFn) -> bytes:
    """Bytes of a damaged plan file."""
    tree = tomllib.loads(FURNISHED)
    for _ in range(draw(st.integers(1, 3))):
        paths = _leaves(tree)
        path = draw(st.sampled_from(paths))
        parent = tree
        for k in path[:-1]:
            parent = parent[k]
        how = draw(st.sampled_from(["replace", "replace", "drop", "repeat", "nest"]))
        if how == "replace":
            parent[path[-1]] = draw(HOSTILE)
        elif how == "drop" and isinstance(parent, dict):
            del parent[path[-1]]
        elif how == "repeat" and isinstance(parent, list):
            parent.extend([copy.deepcopy(parent[path[-1]])] * draw(st.integers(1, 3)))
        elif how == "nest":
            parent[path[-1]] = [[[[[[[parent[path[-1]]]]]]]]]
    try:
        data = tomli_w.dumps(tree).encode("utf-8")
    except (TypeError, ValueError):  # a value TOML cannot hold (e.g. a list of mixed tables)
        data = FURNISHED.encode("utf-8")
    if draw(st.booleans()):  # damage the bytes too
        at = draw(st.integers(0, len(data)))
        data = data[:at] + draw(st.binary(max_size=8)) + data[at:]
    return data


def _snapshot(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in sorted(folder.iterdir())} if folder.exists() else {}


def _complete(path: Path) -> None:
    """An output that was written must be whole: SVG is XML, GeoJSON is JSON, a solve
    folder is exactly what its manifest lists."""
    if path.is_dir():
        listed = json.loads((path / "manifest.json").read_text(encoding="utf-8"))["files"]
        assert sorted(p.name for p in path.iterdir()) == sorted([*listed, "manifest.json"])
        for name in listed:
            _complete(path / name)
    elif path.suffix == ".svg":
        ET.fromstring(path.read_bytes())
    elif path.suffix == ".json":
        json.loads(path.read_text(encoding="utf-8"))
    elif path.suffix == ".html":
        assert path.read_text(encoding="utf-8").rstrip().endswith("</html>")


def _commands(plan: Path, out: Path) -> list[tuple[list[str], Path | None]]:
    """Every command of the tool on ``plan``, with the output it writes (if any)."""
    return [
        (["validate", str(plan)], None),
        (["rules", "--plan", str(plan)], None),
        (["check", str(plan), "--json", "--draw", str(out / "check.svg")], out / "check.svg"),
        (["draw", str(plan), "-o", str(out / "plan.svg")], out / "plan.svg"),
        (["export", str(plan), "-o", str(out / "plan.json")], out / "plan.json"),
        (["compare", str(plan), str(plan)], None),
        (["report", str(plan), "-o", str(out / "report.html")], out / "report.html"),
        (["solve", str(plan), "--time-limit", "1", "--candidates", "1", "-o",
          str(out / "run")], out / "run"),
        (["import", str(plan), "-o", str(out / "imported.toml")], out / "imported.toml"),
    ]


@FUZZ
@given(data=hostile_plans())
def test_every_command_survives_a_hostile_plan(data: bytes, tmp_path_factory: pytest.TempPathFactory,
                                               capsys: pytest.CaptureFixture[str]) -> None:
    root = tmp_path_factory.mktemp("fuzz")
    plan, out = root / "plan.toml", root / "out"
    plan.write_bytes(data)
    out.mkdir()
    (out / "run").mkdir()
    (out / "run" / "manifest.json").write_text('{"files": ["old.toml"]}')
    (out / "run" / "old.toml").write_text("an earlier run")
    for argv, target in _commands(plan, out):
        before = _snapshot(out / "run") if target == out / "run" else None
        existed = target is not None and target.exists()
        code = main(argv)
        err = capsys.readouterr().err
        assert code in (0, 1, 2, 3), (argv, code, err)
        assert "Traceback" not in err, argv
        if target is not None and code == 2:  # bad input: the output is as it was
            assert (_snapshot(target) == before) if before is not None else (
                target.exists() == existed), argv
        elif target is not None and target.exists() and argv[0] != "import":
            _complete(target)
    assert plan.read_bytes() == data  # the input is never changed


@FUZZ
@given(data=hostile_plans())
def test_the_page_upload_survives_a_hostile_plan(data: bytes) -> None:
    try:
        page.plan_from_upload("upload.toml", data)
    except RoomfitError as e:
        assert e.problems and all(p.render(e.source) for p in e.problems)


def test_text_that_is_allowed_keeps_every_drawing_valid_xml(tmp_path: Path) -> None:
    # markup, quotes, ampersands, CDATA ends, emoji, tab, line breaks, a line separator and
    # right-to-left letters are plain text: escaped in every output, never refused
    odd = '<b>"Mum\'s" & ]]> 🛏\t\n\u2028 سرير'
    plan = tmp_path / "odd.toml"
    quoted = json.dumps(odd, ensure_ascii=False)  # a TOML basic string too
    plan.write_text(FURNISHED.replace('label = "Bed"', f"label = {quoted}")
                    .replace('name = "Probe flat (invented)"', f"name = {quoted}"), encoding="utf-8")
    assert main(["draw", str(plan), "-o", str(tmp_path / "a.svg"), "--title", odd]) == 0
    assert main(["check", str(plan), "--draw", str(tmp_path / "b.svg")]) in (0, 1)
    assert main(["export", str(plan), "-o", str(tmp_path / "c.json")]) == 0
    for name in ("a.svg", "b.svg"):
        root = ET.fromstring((tmp_path / name).read_bytes())  # valid XML
        assert any(odd.split("&")[0] in (t or "") for t in root.itertext())
    assert json.loads((tmp_path / "c.json").read_text(encoding="utf-8"))["roomfit"]["plan"] == odd
