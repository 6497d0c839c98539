"""Recovery copies of unsaved work, so a crash loses at most the last autosave interval.

A running editor writes its unsaved document to ``<folder>/recovery-<pid>.json`` (an ordinary
project file, written atomically through :func:`profilebench.io.save_project`) with a sidecar
``recovery-<pid>.origin`` holding the path of the file it was opened from (empty for an untitled
document). A normal save or a clean close deletes both. At the next start the copies left by
processes that no longer run are offered back.

Whatever else lies in the folder is survived: a link that leads nowhere is skipped, a sidecar
that is not UTF-8 is read as the file-system path it is (bytes kept through ``surrogateescape``),
and a copy that cannot be read is set aside (:func:`set_aside`, renamed ``damaged-<pid>.json``)
so that it is not offered again and does not hide an older copy that can be read.
"""

from __future__ import annotations

import os
import stat
from dataclasses import dataclass
from pathlib import Path

from profilebench.errors import ProjectFileError

__all__ = [
    "RecoveryCopy",
    "recovery_file",
    "write_recovery",
    "remove_recovery",
    "left_behind",
    "set_aside",
]

PREFIX = "recovery-"
DAMAGED_PREFIX = "damaged-"
#: longest sidecar read (bytes): it holds one path
MAX_ORIGIN_BYTES = 64 * 1024


@dataclass(frozen=True)
class RecoveryCopy:
    """A recovery copy found on disk: the project file, its origin (or None) and its writer's pid."""

    path: Path
    origin: Path | None
    pid: int


def recovery_file(folder, pid: int | None = None) -> Path:
    """The recovery copy's path of process ``pid`` (default this process) in ``folder``."""
    return Path(folder) / f"{PREFIX}{os.getpid() if pid is None else int(pid)}.json"


def _origin_file(path: Path) -> Path:
    return path.with_suffix(".origin")


def write_recovery(folder, document) -> Path:
    """Write ``document`` (an :class:`~profilebench.editor.Document`) as this process's copy.

    Raises :class:`ProjectFileError` (with the reason) when the folder cannot be written.
    """
    from profilebench.io import atomic_write_text, save_project

    folder = Path(folder)
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except (OSError, ValueError) as exc:  # ValueError: a NUL in the configured folder
        reason = getattr(exc, "strerror", None) or str(exc)
        raise ProjectFileError(
            f"cannot create the recovery folder {folder}: {reason}; "
            "choose another recovery folder in the settings"
        ) from exc
    path = recovery_file(folder)
    # the underlay is not kept in the recovery copy (its path is relative to the project file)
    save_project(document.to_project(), path)
    origin = "" if document.path is None else str(Path(document.path).resolve())
    # a path is bytes on POSIX: one that is not UTF-8 is kept as it is (surrogateescape)
    atomic_write_text(_origin_file(path), lambda fh: fh.write(origin), errors="surrogateescape")
    return path


def remove_recovery(folder, pid: int | None = None) -> bool:
    """Delete a recovery copy and its sidecar; True when a copy was there."""
    path = recovery_file(folder, pid)
    found = path.exists()
    for p in (path, _origin_file(path)):
        try:
            p.unlink()
        except (FileNotFoundError, ValueError):  # gone, or a folder name no file can have
            pass
    return found


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except (ProcessLookupError, OverflowError):  # gone, or no process can have that number
        return False
    except PermissionError:
        return True
    return True


def _origin_of(path: Path) -> Path | None:
    """The origin named by the sidecar of ``path``; None when there is none or it is unusable."""
    try:
        fd = os.open(_origin_file(path), os.O_RDONLY | getattr(os, "O_NONBLOCK", 0))
    except OSError:
        return None
    with open(fd, "rb") as fh:
        if not stat.S_ISREG(os.fstat(fh.fileno()).st_mode):
            return None
        raw = fh.read(MAX_ORIGIN_BYTES + 1)
    text = raw.decode("utf-8", "surrogateescape").strip()
    if not text or len(raw) > MAX_ORIGIN_BYTES or "\0" in text:
        return None
    return Path(text)


def left_behind(folder) -> list[RecoveryCopy]:
    """Recovery copies in ``folder`` whose writing process no longer runs, newest first.

    Links that lead nowhere, folders and other entries that are not regular files are skipped.
    """
    folder = Path(folder)
    try:
        if not folder.is_dir():
            return []
        paths = list(folder.glob(f"{PREFIX}*.json"))
    except OSError:
        return []
    found = []
    for path in paths:
        try:
            pid = int(path.stem[len(PREFIX) :])
        except ValueError:
            continue
        try:
            st = path.stat()
        except OSError:  # a dangling link, or removed meanwhile
            continue
        if not stat.S_ISREG(st.st_mode) or not 0 < pid < 2**31 or _alive(pid):  # a C int
            continue
        found.append((st.st_mtime, RecoveryCopy(path, _origin_of(path), pid)))
    found.sort(key=lambda item: item[0], reverse=True)
    return [copy for _, copy in found]


def set_aside(folder, copy: RecoveryCopy) -> Path:
    """Rename an unreadable recovery copy (and its sidecar) to ``damaged-<pid>.json``, so it is
    kept for inspection but never offered again; returns the new path."""
    target = Path(folder) / f"{DAMAGED_PREFIX}{copy.pid}.json"
    try:
        os.replace(copy.path, target)
    except OSError as exc:
        raise ProjectFileError(
            f"cannot set the damaged recovery copy {copy.path} aside: "
            f"{exc.strerror or exc}; delete it by hand"
        ) from exc
    try:
        os.replace(_origin_file(copy.path), target.with_suffix(".origin"))
    except OSError:
        pass
    return target
