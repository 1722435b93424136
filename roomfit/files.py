"""Writing outputs safely: atomically, and never over an input file.

An output is written to a temporary file in the same folder and moved into place with
``os.replace``, so a crash leaves either the old file or the new one, never half of one.
"""

from __future__ import annotations

import os
import stat
import tempfile
from pathlib import Path

from roomfit.errors import Problem, RoomfitError

__all__ = ["atomic_write", "refuse_input_overwrite"]


def atomic_write(path: str | os.PathLike[str], data: str | bytes) -> Path:
    """Write ``data`` to ``path`` atomically; create the parent folder if needed.

    A new file gets the usual permissions (0o666 less the umask), a replaced file keeps its
    own. An existing device or pipe (``/dev/stdout``, a named pipe) is written into, not
    replaced. A folder, or an output that cannot be written (no permission, a file where a
    folder should be, a full disk), raises :class:`RoomfitError` naming the path.
    """
    target = Path(path)
    raw = data.encode("utf-8") if isinstance(data, str) else data
    try:
        if target.is_dir():
            raise RoomfitError(Problem("output", f"{path} is a folder, not a file",
                                       "give a file name, e.g. a name inside that folder"))
        if target.exists() and not target.is_file():
            with open(target, "wb") as fh:
                fh.write(raw)
            return target
        mode = (stat.S_IMODE(target.stat().st_mode) if target.exists()
                else 0o666 & ~_umask())
        for folder in (target.parent, *target.parent.parents):
            if folder.exists():
                if not folder.is_dir():
                    raise RoomfitError(Problem("output", f"cannot write {path}: {folder} is a "
                                               "file, not a folder", "choose another output"))
                break
        target.parent.mkdir(parents=True, exist_ok=True)
        fd, tmp = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=target.parent)
        try:
            with os.fdopen(fd, "wb") as fh:
                fh.write(raw)
                fh.flush()
                os.fsync(fh.fileno())
            os.chmod(tmp, mode)
            os.replace(tmp, target)
        except BaseException:
            Path(tmp).unlink(missing_ok=True)
            raise
    except OSError as e:
        raise RoomfitError(Problem("output", f"cannot write {path}: {e.strerror or e}",
                                   "check that the folder exists, is writable and has space"
                                   )) from e
    return target


def _umask() -> int:
    """The process's file-creation mask (read by setting it and putting it back)."""
    mask = os.umask(0o022)
    os.umask(mask)
    return mask


def refuse_input_overwrite(output: str | os.PathLike[str], *inputs: str | os.PathLike[str]) -> None:
    """Raise :class:`RoomfitError` when ``output`` is one of the ``inputs``."""
    out = Path(output).resolve()
    for inp in inputs:
        if Path(inp).resolve() == out:
            raise RoomfitError(
                Problem("output", f"{output} is an input file; roomfit never overwrites its inputs",
                        "choose another output name")
            )
