"""Writing outputs: atomically, with ordinary permissions, never over a folder or a device."""

from __future__ import annotations

import os
import stat
import threading
from pathlib import Path

import pytest
from conftest import PROBE_FLAT

from roomfit.cli import main
from roomfit.errors import RoomfitError
from roomfit.files import atomic_write

PLAN = Path(__file__).parent / "plans_unseen" / "thick-walls.toml"


def test_new_file_gets_umask_permissions(tmp_path: Path) -> None:
    old = os.umask(0o022)
    try:
        out = atomic_write(tmp_path / "a" / "b.svg", "<svg/>")
    finally:
        os.umask(old)
    # POSIX open(2): a new file's mode is 0o666 less the umask, so 0o644 under umask 022
    assert stat.S_IMODE(out.stat().st_mode) == 0o644
    assert out.read_text() == "<svg/>"
    assert [p.name for p in out.parent.iterdir()] == ["b.svg"]  # no temporary file left


def test_replaced_file_keeps_its_permissions(tmp_path: Path) -> None:
    out = tmp_path / "r.html"
    out.write_text("old")
    out.chmod(0o640)
    atomic_write(out, "new")
    assert out.read_text() == "new" and stat.S_IMODE(out.stat().st_mode) == 0o640


def test_folder_and_file_in_the_way_are_errors(tmp_path: Path) -> None:
    (tmp_path / "dir").mkdir()
    with pytest.raises(RoomfitError, match="is a folder"):
        atomic_write(tmp_path / "dir", "x")
    (tmp_path / "f").write_text("keep")
    with pytest.raises(RoomfitError, match="is a file, not a folder"):
        atomic_write(tmp_path / "f" / "x.svg", "x")
    assert (tmp_path / "dir").is_dir() and (tmp_path / "f").read_text() == "keep"


def test_named_pipe_is_written_into_not_replaced(tmp_path: Path) -> None:
    fifo = tmp_path / "pipe"
    os.mkfifo(fifo)
    got: list[bytes] = []
    reader = threading.Thread(target=lambda: got.append(fifo.read_bytes()))
    reader.start()
    atomic_write(fifo, "through the pipe")
    reader.join(timeout=10)
    assert got == [b"through the pipe"] and stat.S_ISFIFO(fifo.stat().st_mode)


@pytest.mark.parametrize("cmd", ["draw", "export", "report"])
def test_cli_output_to_folder_exits_2(cmd: str, tmp_path: Path,
                                      capsys: pytest.CaptureFixture[str]) -> None:
    assert main([cmd, str(PLAN), "-o", str(tmp_path)]) == 2
    err = capsys.readouterr().err
    assert "is a folder" in err and "Traceback" not in err
    assert list(tmp_path.iterdir()) == []


# --------------------------------------------------------------------------- run folders

ROOM = PROBE_FLAT + '''
[[furniture]]
id = "chair"
type = "custom"
width = 500
depth = 500
height = 800
room = "room"

[[furniture]]
id = "table"
type = "custom"
width = 800
depth = 800
height = 750
room = "room"
'''


def _solve(tmp_path: Path, *extra: str) -> int:
    plan = tmp_path / "room.toml"
    if not plan.exists():
        plan.write_text(ROOM, encoding="utf-8")
    return main(["solve", str(plan), "--time-limit", "60", "-o", str(tmp_path / "out"), *extra])


def _contents(folder: Path) -> dict[str, bytes]:
    return {p.name: p.read_bytes() for p in folder.iterdir()}


def test_a_run_folder_holds_one_run_with_its_manifest(tmp_path: Path) -> None:
    import hashlib
    import json

    assert _solve(tmp_path, "--candidates", "3", "--seed", "7") == 0
    first = _contents(tmp_path / "out")
    assert {"room-1.toml", "room-3.svg", "manifest.json"} <= set(first)
    assert _solve(tmp_path, "--candidates", "1") == 0  # a second run replaces the first whole
    second = _contents(tmp_path / "out")
    assert sorted(second) == ["manifest.json", "room-1.svg", "room-1.toml"]
    record = json.loads(second["manifest.json"])
    assert record["files"] == ["room-1.svg", "room-1.toml"]
    assert record["plan_sha256"] == hashlib.sha256((tmp_path / "room.toml").read_bytes()).hexdigest()
    assert (record["rules"], record["seed"], record["limits"]["candidates"]) == ("everyday", 0, 1)
    assert record["tool"] == "roomfit" and record["version"] and record["outcome"] == "optimal"
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out", "room.toml"]  # nothing left over


def test_a_run_without_layouts_replaces_the_previous_candidates(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    from roomfit.solve import search as solver

    assert _solve(tmp_path, "--candidates", "2") == 0

    def gave_up(*_args: object, **_kw: object) -> solver.SolveResult:
        return solver.SolveResult(solver.Status.TIMEOUT, (), None, solver.SolveStats(elapsed=1.0))

    monkeypatch.setattr(solver, "solve", gave_up)
    assert _solve(tmp_path) == 3
    assert sorted(_contents(tmp_path / "out")) == ["manifest.json"]


def test_a_folder_that_is_not_a_run_is_refused_before_the_search(
        tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    out = tmp_path / "out"
    out.mkdir()
    (out / "thesis.docx").write_bytes(b"someone's work")
    assert _solve(tmp_path) == 2
    assert "holds no roomfit run" in capsys.readouterr().err
    assert _contents(out) == {"thesis.docx": b"someone's work"}


def test_a_file_added_to_a_previous_run_is_kept_safe(tmp_path: Path,
                                                     capsys: pytest.CaptureFixture[str]) -> None:
    assert _solve(tmp_path, "--candidates", "1") == 0
    (tmp_path / "out" / "my-notes.txt").write_text("keep me")
    before = _contents(tmp_path / "out")
    assert _solve(tmp_path, "--candidates", "1") == 2
    assert "my-notes.txt" in capsys.readouterr().err
    assert _contents(tmp_path / "out") == before


def test_an_output_folder_holding_the_plan_is_refused(tmp_path: Path,
                                                      capsys: pytest.CaptureFixture[str]) -> None:
    plan = tmp_path / "room.toml"
    plan.write_text(ROOM, encoding="utf-8")
    assert main(["solve", str(plan), "-o", str(tmp_path)]) == 2
    assert "holds the input" in capsys.readouterr().err
    assert plan.read_text(encoding="utf-8") == ROOM


def test_an_interrupt_while_writing_leaves_the_previous_run(
        tmp_path: Path, monkeypatch: pytest.MonkeyPatch) -> None:
    import roomfit.present.draw as draw

    assert _solve(tmp_path, "--candidates", "1") == 0
    before = _contents(tmp_path / "out")
    drawn = []

    def interrupted(*_args: object, **_kw: object) -> str:
        drawn.append(1)
        if len(drawn) == 2:  # Ctrl-C while the second candidate is drawn
            raise KeyboardInterrupt
        return "<svg/>"

    monkeypatch.setattr(draw, "draw_svg", interrupted)
    assert _solve(tmp_path, "--candidates", "2") == 130
    assert _contents(tmp_path / "out") == before
    assert sorted(p.name for p in tmp_path.iterdir()) == ["out", "room.toml"]
