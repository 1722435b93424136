"""Writing outputs safely: atomically, and never over an input file.

An output is written to a temporary file in the same folder and moved into place with
``os.replace``, so a crash leaves either the old file or the new one, never half of one.
"""

from __future__ import annotations

import os
import tempfile
from pathlib import Path

from roomfit.errors import Problem, RoomfitError

__all__ = ["atomic_write", "refuse_input_overwrite"]


def atomic_write(path: str | os.PathLike[str], data: str | bytes) -> Path:
    """Write ``data`` to ``path`` atomically; create the parent folder if needed."""
    target = Path(path)
    target.parent.mkdir(parents=True, exist_ok=True)
    raw = data.encode("utf-8") if isinstance(data, str) else data
    fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
    try:
        with os.fdopen(fd, "wb") as fh:
            fh.write(raw)
            fh.flush()
            os.fsync(fh.fileno())
        os.replace(tmp, target)
    except BaseException:
        Path(tmp).unlink(missing_ok=True)
        raise
    return target


def refuse_input_overwrite(output: str | os.PathLike[str], *inputs: str | os.PathLike[str]) -> None:
    """Raise :class:`RoomfitError` when ``output`` is one of the ``inputs``."""
    out = Path(output).resolve()
    for inp in inputs:
        if Path(inp).resolve() == out:
            raise RoomfitError(
                Problem("output", f"{output} is an input file; roomfit never overwrites its inputs",
                        "choose another output name")
            )
