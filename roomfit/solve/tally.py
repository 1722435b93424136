"""What one solve counts and the clock it keeps, shared by the groups searched side by side.

``Counters`` counts solver runs, audits, cuts and fallbacks from several threads at once;
``Clock`` is the solve's wall clock, with a reserve kept for the final audits.
"""

from __future__ import annotations

import threading
import time

__all__ = ["Counters", "Clock"]


class Counters:
    """What the search did, counted from several threads at once."""

    def __init__(self) -> None:
        self._lock = threading.Lock()
        self.values: dict[str, float] = {"solves": 0, "audits": 0, "cuts": 0, "fallback": 0}

    def add(self, key: str, n: float = 1) -> None:
        with self._lock:
            self.values[key] += n

    def __getitem__(self, key: str) -> float:
        return self.values[key]


class Clock:
    """Wall clock of one solve. ``left()`` is the time left for searching: the limit less a
    reserve for auditing the combined candidates at the end (``reserve`` seconds)."""

    def __init__(self, limit: float, reserve: float = 0.0) -> None:
        self.start = time.monotonic()
        self.deadline = self.start + limit
        self.reserve = reserve

    def left(self) -> float:
        return max(0.0, self.deadline - self.reserve - time.monotonic())

    def elapsed(self) -> float:
        return time.monotonic() - self.start
