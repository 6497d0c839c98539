"""Atomic file writing: a file is either the old one or the complete new one, never half-written.
Also the bounded reading of an input file (:func:`read_input_bytes`).

The new content goes to a temporary file in the same folder (so the final rename stays on one
file system), is flushed and fsync'ed, and then replaces the target with :func:`os.replace`,
which is atomic on POSIX and Windows. On any failure the temporary file is removed, the previous
file is left untouched, and a :class:`~profilebench.errors.ProjectFileError` is raised.
"""

from __future__ import annotations

import os
import stat
import tempfile
from pathlib import Path
from typing import Callable, TextIO

from profilebench.errors import ProjectFileError

__all__ = ["atomic_write_text", "read_input_bytes"]


def _file_mode_for(target: Path) -> int:
    """Permission bits for the new file: those of the file it replaces, else 0o666 less umask."""
    try:
        return stat.S_IMODE(target.stat().st_mode)
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def atomic_write_text(path, write: Callable[[TextIO], None], *, encoding: str = "utf-8") -> Path:
    """Write a text file atomically.

    Parameters
    ----------
    path : str or os.PathLike
        The file to create or replace.
    write : callable
        Called with an open text file object; writes the whole content into it.
    encoding : str
        Text encoding of the file.

    Returns
    -------
    pathlib.Path
        The path written.

    Raises
    ------
    ProjectFileError
        If the folder is missing, the target is a folder, or anything fails while writing
        (the original error is chained as ``__cause__``). The previous file, if any, is intact
        and no temporary file is left behind.
    """
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    if target.is_dir():
        raise ProjectFileError(
            f"cannot save to {str(target)!r}: it is a folder; give a file name such as "
            f"{str(target / 'project.json')!r}"
        )
    if not folder.is_dir():
        raise ProjectFileError(
            f"cannot save to {str(target)!r}: the folder {str(folder)!r} does not exist; "
            "create it first or choose another location"
        )
    mode = _file_mode_for(target)
    fd, tmp_name = tempfile.mkstemp(prefix=f".{target.name}.", suffix=".tmp", dir=folder)
    tmp = Path(tmp_name)
    try:
        with os.fdopen(fd, "w", encoding=encoding, newline="\n") as fh:
            write(fh)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, mode)
        os.replace(tmp, target)
    except BaseException as exc:
        try:
            tmp.unlink()
        except FileNotFoundError:
            pass
        if isinstance(exc, (KeyboardInterrupt, SystemExit)):
            raise
        if isinstance(exc, ProjectFileError):
            raise
        raise ProjectFileError(
            f"could not save {str(target)!r}: {type(exc).__name__}: {exc}; the previous file "
            "(if any) is unchanged. Check free disk space and write permission, then save again"
        ) from exc
    _fsync_folder(folder)
    return target


def _fsync_folder(folder: Path) -> None:
    """Make the rename durable where the platform allows opening a folder (POSIX)."""
    try:
        dfd = os.open(folder, os.O_RDONLY)
    except OSError:
        return
    try:
        os.fsync(dfd)
    except OSError:
        pass
    finally:
        os.close(dfd)


def read_input_bytes(path, kind: str, choose: str, limit: int) -> bytes:
    """The bytes of the input file ``path``, at most ``limit`` of them.

    ``kind`` names the file in messages ("project file", "point file"); ``choose`` says what to
    pick instead ("choose a .json project file"). Raises ProjectFileError, saying what is wrong
    and what to do, for a missing path, a folder, something that is not a regular file (a device
    or a pipe, whose reading might never end), a file over ``limit`` bytes (refused before
    reading, and again if it grew while being read) and a file that cannot be read.
    """
    p = Path(path)
    shown = str(p)
    if not p.exists():
        raise ProjectFileError(f"no {kind} at {shown!r}; check the path")
    if p.is_dir():
        raise ProjectFileError(f"{shown!r} is a folder, not a {kind}; {choose}")
    if not p.is_file():
        raise ProjectFileError(f"{shown!r} is not a regular file; {choose}")
    try:
        size = p.stat().st_size
        if size > limit:
            raise ProjectFileError(
                f"{shown!r} is {size / 1e6:.1f} MB, over the {limit / 1e6:.0f} MB limit for a "
                f"{kind}; it is probably not one: {choose}")
        with open(p, "rb") as fh:
            raw = fh.read(limit + 1)
    except OSError as exc:
        raise ProjectFileError(f"cannot read {shown!r}: {exc.strerror or exc}; check permissions") from exc
    if len(raw) > limit:
        raise ProjectFileError(f"{shown!r} is over the {limit / 1e6:.0f} MB limit for a {kind}; "
                               f"{choose}")
    return raw
