"""Interrupts (Ctrl-C, SIGTERM) that stop a command cleanly.

A command runs inside :func:`interrupts_raised`: SIGINT and SIGTERM raise
:class:`Interrupted`, so ``finally`` blocks run and an unfinished output folder is never
written (see :class:`roomfit.files.RunFolder`). The CP-SAT solver installs its own SIGINT
handler while it searches (it would end the search as if the time limit had come, and the
run would go on to report it) and leaves the operating system's default behind, which kills
the process without any cleanup. :func:`signals_kept` runs such a library with the two
signals kept from it: a watcher thread receives them and raises :class:`Interrupted` in the
main thread as soon as the library hands control back to Python, and the handlers are put
back afterwards.
"""

from __future__ import annotations

import _thread
import signal
import threading
from collections.abc import Iterator
from contextlib import contextmanager
from types import FrameType

__all__ = ["Interrupted", "interrupts_raised", "signals_kept", "signals_held"]

_CAUGHT = (signal.SIGINT, signal.SIGTERM)


class Interrupted(KeyboardInterrupt):
    """SIGINT or SIGTERM arrived; ``signum`` says which (exit status 128 + signum)."""

    def __init__(self, signum: int) -> None:
        super().__init__(signal.Signals(signum).name)
        self.signum = signum


def _raise(signum: int, _frame: FrameType | None) -> None:
    raise Interrupted(signum)


def _on_main_thread() -> bool:
    return threading.current_thread() is threading.main_thread()


@contextmanager
def interrupts_raised() -> Iterator[None]:
    """SIGINT and SIGTERM raise :class:`Interrupted` while the block runs (a signal the
    process was started to ignore stays ignored); the previous handlers come back after."""
    if not _on_main_thread():  # only the main thread may set handlers (the page's threads)
        yield
        return
    saved = {s: signal.getsignal(s) for s in _CAUGHT}
    for s in _CAUGHT:
        if saved[s] is not signal.SIG_IGN:
            signal.signal(s, _raise)
    try:
        yield
    finally:
        for s, handler in saved.items():
            signal.signal(s, handler if handler is not None else signal.SIG_DFL)


@contextmanager
def signals_held() -> Iterator[None]:
    """Hold SIGINT and SIGTERM back while the block runs (a few file renames); one that
    arrives meanwhile is raised again when the block ends, so nothing is cut in half."""
    if not _on_main_thread():
        yield
        return
    arrived: list[int] = []
    saved = {s: signal.getsignal(s) for s in _CAUGHT}
    for s in _CAUGHT:
        if saved[s] is not signal.SIG_IGN:
            signal.signal(s, lambda signum, _frame: arrived.append(signum))
    try:
        yield
    finally:
        for s, handler in saved.items():
            signal.signal(s, handler if handler is not None else signal.SIG_DFL)
        if arrived:
            signal.raise_signal(arrived[0])


@contextmanager
def signals_kept() -> Iterator[None]:
    """Run a library that installs its own SIGINT handler (CP-SAT) with SIGINT and SIGTERM
    kept from it; they raise :class:`Interrupted` in the main thread when the library next
    returns to Python, and this module's handlers are reinstalled afterwards."""
    if not _on_main_thread():
        yield
        return
    handlers = {s: signal.getsignal(s) for s in _CAUGHT}
    old_mask = signal.pthread_sigmask(signal.SIG_BLOCK, _CAUGHT)  # threads started now inherit it
    stop = threading.Event()
    later: list[signal.Signals] = []  # their handler is the system's default: raised after

    def watch() -> None:
        while not stop.is_set():
            info = signal.sigtimedwait(_CAUGHT, 0.1)
            if info is None:
                continue
            signum = signal.Signals(info.si_signo)
            if callable(handlers[signum]):
                _thread.interrupt_main(signum)
            elif handlers[signum] is not signal.SIG_IGN:
                later.append(signum)

    watcher = threading.Thread(target=watch, name="roomfit-interrupts", daemon=True)
    watcher.start()
    try:
        yield
    finally:
        for s, handler in handlers.items():  # the library may have left the default behind
            signal.signal(s, handler if handler is not None else signal.SIG_DFL)
        signal.pthread_sigmask(signal.SIG_SETMASK, old_mask)
        stop.set()
        watcher.join()
        for s in later:
            signal.raise_signal(s)
