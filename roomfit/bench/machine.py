"""The machine a benchmark ran on, the code it ran, and the process's memory.

Peak memory is the process's peak resident set size (``VmHWM`` in ``/proc/self/status``),
reset before each measured step by writing ``5`` to ``/proc/self/clear_refs`` (Linux 4.0+);
where that is not possible, ``resource.getrusage(RUSAGE_SELF).ru_maxrss`` (the peak over the
whole process, never reset). :func:`machine` says which was used.
"""

from __future__ import annotations

import os
import platform
import re
import resource
import subprocess
from pathlib import Path
from typing import Any

__all__ = ["machine", "code_version", "reset_peak", "peak_mb", "load_average"]


def _lib_version(module: str) -> str | None:
    try:
        mod = __import__(module)
    except ImportError:
        return None
    return str(getattr(mod, "__version__", "unknown"))


def _memory_method() -> str:
    try:
        with open("/proc/self/clear_refs", "w") as fh:
            fh.write("5")
        with open("/proc/self/status") as fh:
            if "VmHWM" in fh.read():
                return "VmHWM"
    except OSError:
        pass
    return "ru_maxrss"


_MEMORY = _memory_method()


def machine() -> dict[str, Any]:
    """Platform, CPU count, Python and library versions, the memory method, and the load
    average (1, 5, 15 min) when asked: other work on the machine slows every timing."""
    cpu = platform.processor() or ""
    try:
        with open("/proc/cpuinfo") as fh:
            m = re.search(r"model name\s*:\s*(.+)", fh.read())
            cpu = m.group(1).strip() if m else cpu
    except OSError:
        pass
    return {
        "platform": platform.platform(),
        "machine": platform.machine(),
        "cpu": cpu,
        "cpu_count": os.cpu_count(),
        "python": platform.python_version(),
        "ortools": _lib_version("ortools"),
        "shapely": _lib_version("shapely"),
        "numpy": _lib_version("numpy"),
        "scipy": _lib_version("scipy"),
        "networkx": _lib_version("networkx"),
        "memory_method": _MEMORY,
        "load_average": load_average(),
    }


def _rss_mb() -> float | None:
    try:
        with open("/proc/self/status") as fh:
            m = re.search(r"VmRSS:\s+(\d+)\s+kB", fh.read())
    except OSError:
        return None
    return round(int(m.group(1)) / 1024, 1) if m else None


def code_version() -> dict[str, Any]:
    """The git commit the benchmark ran on, and whether the tree had uncommitted changes."""
    root = Path(__file__).resolve().parent.parent.parent
    try:
        head = subprocess.run(["git", "rev-parse", "HEAD"], cwd=root, capture_output=True,
                              text=True, timeout=10).stdout.strip()
        dirty = subprocess.run(["git", "status", "--porcelain", "--untracked-files=no"], cwd=root,
                               capture_output=True, text=True, timeout=10).stdout.strip()
    except (OSError, subprocess.SubprocessError):
        return {"commit": None, "dirty": None}
    return {"commit": head or None, "dirty": bool(dirty)}


def reset_peak() -> float | None:
    """Reset the peak (where possible); the resident size now, in MB."""
    if _MEMORY == "VmHWM":
        with open("/proc/self/clear_refs", "w") as fh:
            fh.write("5")
    return _rss_mb()


def peak_mb() -> float:
    if _MEMORY == "VmHWM":
        with open("/proc/self/status") as fh:
            m = re.search(r"VmHWM:\s+(\d+)\s+kB", fh.read())
        if m:
            return round(int(m.group(1)) / 1024, 1)
    return round(resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024, 1)



def load_average() -> list[float]:
    """The load average over 1, 5 and 15 minutes: above the CPU count, timings are not to be
    trusted."""
    return [round(x, 2) for x in os.getloadavg()]
