"""Interrupts stop a command cleanly: the output folder keeps the previous run whole and no
temporary file is left, also after CP-SAT (which installs its own SIGINT handler) has run."""

from __future__ import annotations

import os
import signal
import subprocess
import sys
from pathlib import Path

import pytest
from ortools.sat.python import cp_model

from roomfit.interrupts import Interrupted, interrupts_raised, signals_held, signals_kept

ROOT = Path(__file__).resolve().parent.parent
STUDIO = ROOT / "plans" / "studio.toml"


def _tiny_solve() -> None:
    model = cp_model.CpModel()
    x = model.new_int_var(0, 10, "x")
    model.maximize(x)
    solver = cp_model.CpSolver()
    solver.parameters.num_workers = 1
    solver.solve(model)


def test_sigint_after_a_cp_sat_solve_raises_instead_of_killing() -> None:
    # CP-SAT leaves the system's default SIGINT action behind it, which would end this very
    # test process without a word; with the handlers put back the tool's own path runs
    with interrupts_raised(), pytest.raises(Interrupted) as info:
        with signals_kept():
            _tiny_solve()
        os.kill(os.getpid(), signal.SIGINT)
        signal.sigtimedwait([], 0)  # a bytecode boundary for the handler to run at
    assert info.value.signum == signal.SIGINT


def test_sigterm_raises_too() -> None:
    with interrupts_raised(), pytest.raises(Interrupted) as info:
        os.kill(os.getpid(), signal.SIGTERM)
        signal.sigtimedwait([], 0)
    assert info.value.signum == signal.SIGTERM


def test_a_signal_during_a_kept_block_is_raised_when_control_returns() -> None:
    with interrupts_raised(), pytest.raises(Interrupted):
        with signals_kept():
            os.kill(os.getpid(), signal.SIGINT)
            for _ in range(200):  # the watcher thread passes it on within its 0.1 s wait
                signal.sigtimedwait([], 0.05)


def test_a_held_signal_waits_for_the_end_of_the_block() -> None:
    done = []
    with interrupts_raised(), pytest.raises(Interrupted):
        with signals_held():
            os.kill(os.getpid(), signal.SIGINT)
            done.append("renamed")
    assert done == ["renamed"]


def _start_solve(out: Path) -> subprocess.Popen[str]:
    """``roomfit solve`` in a child whose SIGINT is Python's own (a shell may start it ignored)."""
    code = ("import signal, sys; signal.signal(signal.SIGINT, signal.default_int_handler); "
            "from roomfit.cli import main; sys.exit(main(sys.argv[1:]))")
    env = {**os.environ, "PYTHONPATH": str(ROOT)}
    return subprocess.Popen([sys.executable, "-c", code, "solve", str(STUDIO), "--candidates",
                             "30", "--time-limit", "300", "-o", str(out)],
                            stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True, env=env)


@pytest.mark.parametrize("signum", [signal.SIGINT, signal.SIGTERM])
def test_interrupting_a_solve_keeps_the_previous_run(tmp_path: Path, signum: int) -> None:
    out = tmp_path / "layouts"
    out.mkdir()
    before = {"a-1.toml": "previous run\n", "manifest.json": '{"files": ["a-1.toml"]}\n'}
    for name, text in before.items():
        (out / name).write_text(text, encoding="utf-8")
    child = _start_solve(out)
    assert child.stderr is not None
    for line in child.stderr:  # the search has started (CP-SAT is at work)
        if line.startswith("searching"):
            break
    child.send_signal(signum)
    _, err = child.communicate(timeout=600)
    assert child.returncode == 128 + signum, err
    assert "interrupted" in err and "Traceback" not in err
    assert {p.name: p.read_text(encoding="utf-8") for p in out.iterdir()} == before
    assert [p.name for p in tmp_path.iterdir()] == ["layouts"]  # no temporary folder left
