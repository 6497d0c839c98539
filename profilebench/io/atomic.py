"""Atomic file writing: a file is either the old one or the complete new one, never half-written.
Also the bounded reading of an input file (:func:`read_input_bytes`).

The new content goes to a temporary file in the same folder (so the final rename stays on one
file system), is flushed and fsync'ed, and then replaces the target with :func:`os.replace`,
which is atomic on POSIX and Windows. On any failure the temporary file is removed, the previous
file is left untouched, and a :class:`~profilebench.errors.ProjectFileError` is raised.

Links are kept: a symbolic link is written through to the file it points to (the link stays a
link), and a file with several hard links is rewritten in place once its complete new content
is safely on disk beside it, so every link sees the new content (that last copy is not atomic:
should it fail, the complete new content stays in the temporary file, which the error names).
A temporary file left by a writer that was killed (it holds no lock any more, and is older than
:data:`FRESH_TMP_SECONDS`) is removed at the next save of the same file.
"""

from __future__ import annotations

import os
import re
import stat
import tempfile
import time
from pathlib import Path
from typing import BinaryIO, Callable, TextIO

from profilebench.errors import ProjectFileError

# the bounded input reader lives below every layer (the r/t tables of assess read with it too)
from profilebench.input_files import check_input_file, megabytes, read_input_bytes  # noqa: F401

try:  # POSIX: a writer holds a lock on its temporary file while it writes
    import fcntl
except ImportError:  # pragma: no cover - Windows: stale files are recognised by age instead
    fcntl = None

__all__ = [
    "atomic_write_text",
    "atomic_write_bytes",
    "read_input_bytes",
    "check_input_file",
    "check_writable",
    "megabytes",
]

#: without file locks (Windows), a temporary file this old (s) counts as left by a dead writer
STALE_TMP_SECONDS = 3600.0
#: a temporary file younger than this (s) is never taken for a stale one: a writer creates it
#: a moment before it locks it (common practice, no source)
FRESH_TMP_SECONDS = 2.0
#: characters of the target's name kept in its temporary files' names (which add 14 more), so a
#: name near the file system's 255-byte limit still gets a temporary file
TMP_NAME_CHARS = 120
#: longest file name (bytes) of common file systems (ext4, APFS, NTFS in UTF-16 units)
NAME_MAX = 255


def _real_target(path) -> Path:
    """The file to write: ``path`` itself, or the file a symbolic link ``path`` points to."""
    target = Path(path)
    if target.is_symlink():
        try:
            return Path(os.path.realpath(target, strict=True))
        except OSError:
            resolved = Path(os.path.realpath(target))
            if resolved.is_symlink() or not resolved.parent.is_dir():
                raise ProjectFileError(
                    f"cannot save to {str(target)!r}: it is a link that loops or leads to a "
                    f"missing folder ({str(resolved)!r}); remove the link or choose another "
                    "location"
                ) from None
            return resolved  # a link to a file not yet written: create that file
    return target


def _target_and_folder(path) -> tuple[Path, Path]:
    """The file a save of ``path`` writes (a link's target) and its folder, both checked."""
    shown = str(path)
    if "\0" in shown:
        raise ProjectFileError(
            f"cannot save to {shown!r}: a file name cannot hold a NUL "
            "character; choose another name"
        )
    name = Path(path).name
    if len(os.fsencode(name)) > NAME_MAX:
        raise ProjectFileError(
            f"cannot save to {shown!r}: the file name is {len(name)} "
            f"characters, over the {NAME_MAX} a file system allows; choose a "
            "shorter name"
        )
    try:
        target = _real_target(path)
        folder = target.parent if str(target.parent) else Path(".")
        if target.is_dir():
            raise ProjectFileError(
                f"cannot save to {str(target)!r}: it is a folder; give a file name such as "
                f"{str(target / 'project.json')!r}"
            )
        if folder.exists() and not folder.is_dir():
            raise ProjectFileError(
                f"cannot save to {str(target)!r}: {str(folder)!r} is a file, not a folder; "
                "choose another location"
            )
        if not folder.is_dir():
            raise ProjectFileError(
                f"cannot save to {str(target)!r}: the folder {str(folder)!r} does not exist; "
                "create it first or choose another location"
            )
    except OSError as exc:  # a folder name too long, a folder that cannot be entered
        raise ProjectFileError(
            f"cannot save to {shown!r}: {exc.strerror or exc}; choose another location"
        ) from exc
    return target, folder


def _temporary_prefix(target: Path) -> str:
    """Start of the temporary files' names of ``target``: short enough for any file name."""
    return f".{target.name[:TMP_NAME_CHARS]}."


def _is_stale(name: str, folder: Path) -> bool:
    """True when the temporary file ``name`` in ``folder`` has no live writer."""
    try:
        fd = os.open(folder / name, os.O_RDONLY | getattr(os, "O_NOFOLLOW", 0))
    except OSError:
        return False
    try:
        st = os.fstat(fd)
        age = time.time() - st.st_mtime
        if not stat.S_ISREG(st.st_mode) or age < FRESH_TMP_SECONDS:
            return False
        if fcntl is None:
            return age > STALE_TMP_SECONDS
        try:
            fcntl.flock(fd, fcntl.LOCK_EX | fcntl.LOCK_NB)
        except OSError:
            return False  # a writer holds it: a save in progress
        return True
    finally:
        os.close(fd)


def _remove_stale_temporaries(target: Path, folder: Path, own: str) -> None:
    """Delete this file's temporary files (``.NAME.xxxxxxxx.tmp``) that no writer holds."""
    pattern = re.compile(re.escape(_temporary_prefix(target)) + r"[A-Za-z0-9_]{8}\.tmp")
    try:
        names = [n for n in os.listdir(folder) if n != own and pattern.fullmatch(n)]
    except OSError:
        return
    for name in names:
        if _is_stale(name, folder):
            try:
                os.unlink(folder / name)
            except OSError:
                pass


def _copy_into(tmp: Path, target: Path) -> None:
    """Rewrite the hard-linked ``target`` in place with the complete content of ``tmp``."""
    with open(tmp, "rb") as src, open(target, "r+b") as dst:
        while True:
            block = src.read(1 << 20)
            if not block:
                break
            dst.write(block)
        dst.truncate()
        dst.flush()
        os.fsync(dst.fileno())


def _file_mode_for(target: Path) -> int:
    """Permission bits for the new file: those of the file it replaces, else 0o666 less umask."""
    try:
        return stat.S_IMODE(target.stat().st_mode)
    except OSError:
        umask = os.umask(0)
        os.umask(umask)
        return 0o666 & ~umask


def atomic_write_bytes(path, write: Callable[[BinaryIO], None]) -> Path:
    """Write a binary file atomically (an image): as :func:`atomic_write_text`, but ``write``
    gets a file object open for bytes."""
    return _atomic_write(path, write, {"mode": "wb"})


def atomic_write_text(
    path, write: Callable[[TextIO], None], *, encoding: str = "utf-8", errors: str = "strict"
) -> Path:
    """Write a text file atomically.

    Parameters
    ----------
    path : str or os.PathLike
        The file to create or replace.
    write : callable
        Called with an open text file object; writes the whole content into it.
    encoding, errors : str
        Text encoding of the file and its error handling (as :func:`open`).

    Returns
    -------
    pathlib.Path
        The path written.

    Raises
    ------
    ProjectFileError
        If the folder is missing or cannot be written, the target is a folder, or anything
        fails while writing (the original error is chained as ``__cause__``). The previous
        file, if any, is intact and no temporary file is left behind.
    """
    return _atomic_write(
        path, write, {"mode": "w", "encoding": encoding, "errors": errors, "newline": "\n"}
    )


def _atomic_write(path, write, open_args: dict) -> Path:
    target, folder = _target_and_folder(path)
    mode = _file_mode_for(target)
    try:
        fd, tmp_name = tempfile.mkstemp(prefix=_temporary_prefix(target), suffix=".tmp", dir=folder)
    except OSError as exc:
        raise ProjectFileError(
            f"cannot save to {str(target)!r}: {exc.strerror or exc} (a file cannot be created in "
            f"{str(folder)!r}); nothing was written. Choose a folder you can write to, or a "
            "shorter file name"
        ) from exc
    tmp = Path(tmp_name)
    in_place = False
    lock = _lock(fd)
    try:
        with os.fdopen(fd, **open_args) as fh:
            write(fh)
            fh.flush()
            os.fsync(fh.fileno())
        os.chmod(tmp, mode)
        _remove_stale_temporaries(target, folder, tmp.name)
        try:
            in_place = target.stat().st_nlink > 1
        except FileNotFoundError:
            in_place = False
        if in_place:
            _copy_into(tmp, target)
            tmp.unlink()
        else:
            os.replace(tmp, target)
    except BaseException as exc:
        if in_place and tmp.exists():
            raise ProjectFileError(
                f"could not rewrite the hard-linked file {str(target)!r} in place: "
                f"{type(exc).__name__}: {exc}; it may be incomplete, and the complete new "
                f"content is in {str(tmp)!r}: copy that file over it"
            ) from exc
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
    finally:
        if lock is not None:
            os.close(lock)
    _fsync_folder(folder)
    return target


def _lock(fd: int) -> int | None:
    """A second descriptor of the temporary file ``fd``, holding a lock on it until closed (POSIX
    flock): a writer killed at any moment releases it, so others know its file is stale. The
    writing descriptor itself may then be closed before the rename (Windows needs that)."""
    if fcntl is None:
        return None
    lock = os.dup(fd)  # the same open file: its lock lasts until both are closed
    try:
        fcntl.flock(lock, fcntl.LOCK_EX)
    except OSError:  # a file system without locks: others cannot lock it either, so they
        pass  # never take this file for a stale one
    return lock


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


def check_writable(path) -> Path:
    """Check that ``path`` can be saved by :func:`atomic_write_text`, before any work is done.

    A temporary file is created in the folder and removed at once, so a read-only folder or file
    system, a folder of the kernel (/proc), a name too long or a missing folder is found at the
    start. Returns the file that would be written (a symbolic link's target). Raises
    ProjectFileError saying why and what to do.
    """
    target, folder = _target_and_folder(path)
    try:
        fd, probe = tempfile.mkstemp(prefix=_temporary_prefix(target), suffix=".tmp", dir=folder)
    except OSError as exc:
        raise ProjectFileError(
            f"cannot write {str(target)!r}: {exc.strerror or exc} (a file cannot be created in "
            f"{str(folder)!r}); choose a folder you can write to, or a shorter file name"
        ) from exc
    os.close(fd)
    try:
        os.unlink(probe)
    except FileNotFoundError:  # another save took it for a stale temporary meanwhile
        pass
    return target
