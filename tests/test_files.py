"""Writing outputs: atomically, with ordinary permissions, never over a folder or a device."""

from __future__ import annotations

import os
import stat
import threading
from pathlib import Path

import pytest

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
