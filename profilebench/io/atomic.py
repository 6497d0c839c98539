"""Atomic file writing: a file is either the old one or the complete new one, never half-written.

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

__all__ = ["atomic_write_text"]


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
