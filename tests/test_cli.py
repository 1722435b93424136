"""The command-line shell: arguments it refuses before any work, its version, a closed pipe."""

from __future__ import annotations

import shlex
import subprocess
import sys
from importlib.metadata import version
from pathlib import Path

import pytest

from roomfit.cli import main

PLAN = Path(__file__).parent / "plans_unseen" / "tiny-bed.toml"
PLANS = Path(__file__).parent.parent / "plans"


@pytest.mark.parametrize("limit", ["nan", "inf", "-inf", "0", "-1"])
def test_solve_refuses_a_time_limit_that_is_not_a_finite_positive_number(
        limit: str, tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    assert main(["solve", str(PLAN), f"--time-limit={limit}", "-o", str(tmp_path)]) == 2
    captured = capsys.readouterr()
    assert "--time-limit" in captured.err and "Traceback" not in captured.err
    assert captured.out == "" and list(tmp_path.iterdir()) == []


def test_version(capsys: pytest.CaptureFixture[str]) -> None:
    with pytest.raises(SystemExit) as info:
        main(["--version"])
    assert info.value.code == 0
    assert capsys.readouterr().out.strip() == f"roomfit {version('roomfit')}"


def test_validate_counts_in_words(capsys: pytest.CaptureFixture[str]) -> None:
    # tiny-bed: one room, one door, no window, no fitting, one piece not placed, no routine
    assert main(["validate", str(PLAN)]) == 0
    assert ("  1 room, 1 door, 0 windows, 0 fittings, 1 piece (0 placed), 0 routine trips"
            in capsys.readouterr().out.splitlines())


def test_a_plan_without_a_name_says_so(tmp_path: Path, capsys: pytest.CaptureFixture[str]) -> None:
    plan = tmp_path / "nameless.toml"
    plan.write_text(PLAN.read_text().replace('name = "Box room, 6 Narrow Close (invented)"\n', ""))
    assert main(["validate", str(plan)]) == 0
    assert capsys.readouterr().out.splitlines()[0] == f"{plan}: valid plan (no name)"


@pytest.mark.parametrize("elapsed", [0.3, 9.9])
def test_timeout_never_claims_more_time_will_not_help(elapsed: float, tmp_path: Path,
                                                      capsys: pytest.CaptureFixture[str],
                                                      monkeypatch: pytest.MonkeyPatch) -> None:
    # a timeout is not a proof: whatever time it used, it never says more time will not help
    # (the search ends early only with a proof, which is "impossible", not "timeout")
    from roomfit.solve import search as solver

    def gave_up(*_args: object, **_kw: object) -> solver.SolveResult:
        return solver.SolveResult(solver.Status.TIMEOUT, (), None, solver.SolveStats(elapsed=elapsed))

    monkeypatch.setattr(solver, "solve", gave_up)
    assert main(["solve", str(PLAN), "--time-limit", "10", "-o", str(tmp_path)]) == 3
    out = capsys.readouterr().out
    assert "NOT proven impossible" in out and "will not help" not in out
    assert [p.name for p in tmp_path.iterdir()] == ["manifest.json"]  # the run, no layouts


def test_a_reader_that_goes_away_loses_no_file_of_the_run(tmp_path: Path) -> None:
    # `roomfit solve ... | head -1` with unbuffered output: every line after the first meets
    # a closed pipe; the run folder must be complete all the same, and no traceback shown
    out = tmp_path / "run"
    cmd = (f"{shlex.quote(sys.executable)} -u -m roomfit solve {shlex.quote(str(PLANS / 'studio.toml'))} "
           f"--candidates 1 --time-limit 20 -o {shlex.quote(str(out))} 2>{shlex.quote(str(tmp_path / 'err'))}"
           " | head -1")
    subprocess.run(cmd, shell=True, check=True, stdout=subprocess.DEVNULL)
    assert (out / "manifest.json").is_file()
    assert "Traceback" not in (tmp_path / "err").read_text()
