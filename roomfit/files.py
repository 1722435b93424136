"""Writing outputs safely: atomically, and never over an input file.

An output is written to a temporary file in the same folder and moved into place with
``os.replace``, so a crash leaves either the old file or the new one, never half of one.

A run that writes several files (``roomfit solve``) writes a :class:`RunFolder`: the files
are collected, written into a fresh hidden folder beside the target with a ``manifest.json``,
and swapped in for the previous run's folder at the end, with interrupts held back for those
few milliseconds. The folder then holds exactly one run; an interrupt before the end leaves
the previous run as it was and no temporary files.
"""

from __future__ import annotations

import json
import os
import shutil
import stat
import tempfile
from pathlib import Path
from typing import Any

from roomfit.errors import Problem, RoomfitError
from roomfit.interrupts import signals_held

__all__ = ["atomic_write", "refuse_input_overwrite", "RunFolder", "MANIFEST"]

#: Name of the file that describes a run inside its folder.
MANIFEST = "manifest.json"


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


class RunFolder:
    """The output folder of one run, written whole at the end.

    Made before the work starts, so a folder that may not be replaced is refused at once:
    a file, a folder that holds an input, or a non-empty folder that is not a previous run
    (it has no :data:`MANIFEST`, or holds files its manifest does not list). Files are kept
    in memory by :meth:`add` (a run's plans and drawings are small) and written by
    :meth:`finish`.
    """

    def __init__(self, target: str | os.PathLike[str], *inputs: str | os.PathLike[str]) -> None:
        self.target = Path(target)
        self.files: dict[str, bytes] = {}
        _check_replaceable(self.target, inputs)

    def add(self, name: str, data: str | bytes) -> Path:
        """Keep ``data`` as the file ``name`` of the run; returns where it will be."""
        if Path(name).name != name or name in ("", ".", "..", MANIFEST):
            raise ValueError(f"not a plain file name: {name!r}")
        self.files[name] = data.encode("utf-8") if isinstance(data, str) else data
        return self.target / name

    def finish(self, manifest: dict[str, Any]) -> Path:
        """Write the files and ``manifest`` (plus the list of files) into a fresh folder
        beside the target and swap it in for the previous run; returns the folder."""
        record = {**manifest, "files": sorted(self.files)}
        parent = self.target.parent
        try:
            parent.mkdir(parents=True, exist_ok=True)
            with signals_held():
                stage = Path(tempfile.mkdtemp(prefix=f".{self.target.name}.", suffix=".partial",
                                              dir=parent))
                try:
                    for name, data in {**self.files, MANIFEST: _json(record)}.items():
                        (stage / name).write_bytes(data)
                    os.chmod(stage, 0o777 & ~_umask())
                    _swap_in(stage, self.target)
                except BaseException:
                    shutil.rmtree(stage, ignore_errors=True)
                    raise
        except OSError as e:
            raise RoomfitError(Problem("output", f"cannot write {self.target}: {e.strerror or e}",
                                       "check that the folder is writable and has space")) from e
        return self.target


def _json(record: dict[str, Any]) -> bytes:
    return (json.dumps(record, indent=2, ensure_ascii=False) + "\n").encode("utf-8")


def _swap_in(stage: Path, target: Path) -> None:
    """Put ``stage`` where ``target`` is; the previous folder goes only once the new one is
    in place."""
    if not target.exists():
        os.rename(stage, target)
        return
    old = Path(tempfile.mkdtemp(prefix=f".{target.name}.", suffix=".old", dir=target.parent))
    os.rename(target, old / "run")
    try:
        os.rename(stage, target)
    except BaseException:
        os.rename(old / "run", target)
        raise
    finally:
        shutil.rmtree(old, ignore_errors=True)


def _check_replaceable(target: Path, inputs: tuple[str | os.PathLike[str], ...]) -> None:
    """Raise :class:`RoomfitError` unless ``target`` may become a run's folder."""
    def refuse(why: str, hint: str = "give another folder with -o") -> RoomfitError:
        return RoomfitError(Problem("output", f"{target} {why}", hint))

    if target.exists() and not target.is_dir():
        raise refuse("is a file, not a folder")
    for inp in inputs:
        if Path(target).resolve() in Path(inp).resolve().parents:
            raise refuse(f"holds the input {inp}; roomfit replaces its output folder as a whole")
    if not target.is_dir():
        return
    present = {p.name for p in target.iterdir()}
    if not present:
        return
    try:
        listed = set(json.loads((target / MANIFEST).read_text(encoding="utf-8"))["files"])
    except (OSError, ValueError, KeyError, TypeError):
        raise refuse("is not empty and holds no roomfit run (no readable manifest.json)",
                     "give a new or empty folder with -o") from None
    strangers = sorted(present - listed - {MANIFEST})
    if strangers:
        raise refuse(f"holds files the previous run did not write ({', '.join(strangers[:5])})",
                     "move them away, or give another folder with -o")
