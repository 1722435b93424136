"""Every command on plans written apart from the samples (tests/plans_unseen/): feet and
inches, cm, m and ft plans, a railroad corridor, a trapezoid and a pentagon with windows on
angled walls, a column, thick walls, a door in a corner, no hall, seven rooms and 21 pieces,
a bed wider than its room, every bundled rule set, overrides, a locked piece, no furniture,
no routine. Exit codes as documented (README, docs/audit.md, docs/routes.md, docs/solver.md):
0 ok, 1 a rule fails or proven impossible, 2 bad input, 3 time limit; never a traceback,
never a changed input.
"""

from __future__ import annotations

import hashlib
import json
import xml.etree.ElementTree as ET
from pathlib import Path

import pytest
from shapely.geometry import shape

from roomfit.audit.check import audit
from roomfit.cli import main
from roomfit.plan.read import read_plan
from roomfit.rules.sets import rules_for

UNSEEN = Path(__file__).resolve().parent / "plans_unseen"
PLANS = sorted(UNSEEN.glob("*.toml"))

#: The audit's verdict on each plan as written, reasoned by hand (exit 0 pass, 1 fail).
CHECK_EXIT = {
    "ambulant-a117": 0,       # one armchair in a 6 x 5 m room, its seat zone free
    "cm-flat": 1,             # the wardrobe and the table have no placement
    "column-room": 1,         # the locked bed's 1000 mm foot zone runs into the column
    "corridor-flat": 1,       # 300 mm shoe cabinet in a 1000 mm corridor: 700 < 762 mm (30 in)
    "feet-l-shape": 1,        # the daybed stands 24 mm through the nook's north wall
    "inches-cottage": 1,      # the dresser has no placement
    # no furniture, but the corner door leaves no floor beyond its latch (door.approach)
    "no-hall": 1,
    "seven-rooms": 1,         # 21 pieces, none placed
    "thick-walls": 1,         # the single bed runs 100 mm into the 200 mm wall
    "tiny-bed": 1,            # the 1900 mm bed has no placement
    "trapezoid-pentagon": 1,  # the sofa stands in the entrance door's swing
}


def _digest(path: Path) -> str:
    return hashlib.sha256(path.read_bytes()).hexdigest()


def _run(args: list[str], capsys: pytest.CaptureFixture[str]) -> tuple[int, str, str]:
    code = main(args)
    out, err = capsys.readouterr()
    assert "Traceback" not in out + err
    return code, out, err


def test_every_unseen_plan_has_a_verdict() -> None:
    assert {p.stem for p in PLANS} == set(CHECK_EXIT)
    # every bundled rule set is tried at least once
    assert {read_plan(p).rules.set for p in PLANS} == {
        "everyday", "walking-aid", "ada-2010", "a117-2017", "iso-21542", "uk-m4-3", "din-18040-r"}


@pytest.mark.parametrize("path", PLANS, ids=[p.stem for p in PLANS])
def test_every_command_on_unseen_plan(path: Path, tmp_path: Path,
                                      capsys: pytest.CaptureFixture[str]) -> None:
    before = _digest(path)
    expected = CHECK_EXIT[path.stem]
    assert _run(["validate", str(path)], capsys)[0] == 0
    assert _run(["rules", "--plan", str(path)], capsys)[0] == 0

    svg = tmp_path / "plan.svg"
    assert _run(["draw", str(path), "-o", str(svg)], capsys)[0] == 0
    assert ET.parse(svg).getroot().tag.endswith("svg")

    geo = tmp_path / "plan.geojson"
    assert _run(["export", str(path), "-o", str(geo)], capsys)[0] == 0
    features = json.loads(geo.read_text())["features"]
    assert features and all(shape(f["geometry"]).is_valid for f in features)

    code, out, _ = _run(["check", str(path)], capsys)
    assert code == expected and out.rstrip().splitlines()[-1].startswith("Caution")
    code, out, _ = _run(["check", "--json", str(path)], capsys)
    assert code == expected and json.loads(out)["passed"] is (expected == 0)
    marked = tmp_path / "marked.svg"
    assert _run(["check", "--draw", str(marked), str(path)], capsys)[0] == expected
    ET.parse(marked)

    html = tmp_path / "report.html"
    assert _run(["compare", str(path), "--html", str(html)], capsys)[0] == 0
    assert _run(["report", str(path), "-o", str(tmp_path / "r.html")], capsys)[0] == 0
    assert "<html" in html.read_text()
    assert _digest(path) == before


def test_compare_all_unseen_plans_at_once(capsys: pytest.CaptureFixture[str]) -> None:
    code, out, _ = _run(["compare", *map(str, PLANS)], capsys)
    assert code == 0 and all(p.stem in out.splitlines()[0] for p in PLANS)


def _broken(tmp_path: Path) -> list[tuple[Path, str]]:
    """Broken variants of the unseen plans, each with the field its problem must name."""
    src = (UNSEEN / "thick-walls.toml").read_text()
    cases = {
        "typo.toml": (src.replace("width = 900\n", "widht = 900\n", 1), "doors[0].widht"),
        "type.toml": (src.replace("width = 900\n", 'width = "wide"\n', 1), "doors[0].width"),
        "rotation.toml": (src.replace("rotation = 180", "rotation = 45"),
                          "furniture[0].placement.rotation"),
        "set.toml": (src.replace('"din-18040-r"', '"din"'), "rules.set"),
        "syntax.toml": (src.replace("[[rooms]]", "[[rooms]", 1), ":"),
        "empty.toml": ("", "roomfit_plan"),
        "version.toml": (src.replace("roomfit_plan = 1", 'roomfit_plan = "1"'), "roomfit_plan"),
    }
    out = []
    for name, (text, field) in cases.items():
        (tmp_path / name).write_text(text)
        out.append((tmp_path / name, field))
    (tmp_path / "binary.toml").write_bytes(bytes(range(256)))
    out.append((tmp_path / "binary.toml", "UTF-8"))
    (tmp_path / "folder.toml").mkdir()
    out.append((tmp_path / "folder.toml", "folder"))
    out.append((tmp_path / "missing.toml", "no such file"))
    return out


def test_broken_inputs_exit_2_naming_file_and_field(tmp_path: Path,
                                                    capsys: pytest.CaptureFixture[str]) -> None:
    for path, field in _broken(tmp_path):
        before = _digest(path) if path.is_file() else None
        for args in (["validate", str(path)], ["check", "--json", str(path)],
                     ["draw", str(path), "-o", str(tmp_path / "x.svg")],
                     ["export", str(path), "-o", str(tmp_path / "x.geojson")],
                     ["compare", str(path)]):
            code, _, err = _run(args, capsys)
            assert code == 2, (path.name, args[0])
            assert err.startswith(str(path)) and field in err, (path.name, args[0], err)
        assert before is None or _digest(path) == before
    assert not (tmp_path / "x.svg").exists() and not (tmp_path / "x.geojson").exists()


def test_outputs_never_replace_the_input_or_a_folder(tmp_path: Path,
                                                     capsys: pytest.CaptureFixture[str]) -> None:
    plan = tmp_path / "flat.toml"
    plan.write_bytes((UNSEEN / "cm-flat.toml").read_bytes())
    before = _digest(plan)
    for args in (["draw", str(plan), "-o", str(plan)], ["export", str(plan), "-o", str(plan)],
                 ["check", str(plan), "--draw", str(plan)],
                 ["report", str(plan), "-o", str(plan)],
                 ["compare", str(plan), "--html", str(plan)],
                 ["draw", str(plan), "-o", str(tmp_path)],
                 ["draw", str(plan), "-o", str(plan / "x.svg")]):
        code, _, err = _run(args, capsys)
        assert code == 2 and err.startswith("output:"), (args, err)
    assert _digest(plan) == before and sorted(p.name for p in tmp_path.iterdir()) == ["flat.toml"]


@pytest.mark.parametrize(("stem", "codes"), [
    ("ambulant-a117", {0, 1, 3}),  # one armchair in a large room: any documented outcome
    # a 1900 x 2100 mm bed in a 1500 x 2600 mm room fits neither way round (1900 > 1500,
    # 2100 > 1500): provably impossible
    ("tiny-bed", {1}),
    # no furniture, and the bare flat already fails the audit (a corner door with no floor
    # beyond its latch): no arrangement can pass, so solve must say impossible
    ("no-hall", {1}),
])
def test_solve_small_unseen_plans(stem: str, codes: set[int], tmp_path: Path,
                                  capsys: pytest.CaptureFixture[str]) -> None:
    path = UNSEEN / f"{stem}.toml"
    before = _digest(path)
    code, _, _ = _run(["solve", str(path), "--time-limit", "8", "--candidates", "2",
                       "-o", str(tmp_path)], capsys)
    assert code in codes
    written = sorted(tmp_path.glob("*.toml"))
    assert bool(written) is (code == 0)
    for out in written:
        furnished = read_plan(out)
        assert audit(furnished, rules_for(furnished)).passed, out.name
        assert {p.id for p in furnished.furniture if p.placement} == {
            p.id for p in read_plan(path).furniture}
    assert _digest(path) == before
