"""Recovery copies of unsaved work, so a crash loses at most the last autosave interval.

A running editor writes its unsaved document to ``<folder>/recovery-<pid>.json`` (an ordinary
project file, written atomically through :func:`profilebench.io.save_project`) with a sidecar
``recovery-<pid>.origin`` holding the path of the file it was opened from (empty for an untitled
document). A normal save or a clean close deletes both. At the next start the copies left by
processes that no longer run are offered back.
"""

from __future__ import annotations

import os
from dataclasses import dataclass
from pathlib import Path

from profilebench.errors import ProjectFileError

__all__ = ["RecoveryCopy", "recovery_file", "write_recovery", "remove_recovery", "left_behind"]

PREFIX = "recovery-"


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
    from profilebench.io import Project, atomic_write_text, save_project

    folder = Path(folder)
    try:
        folder.mkdir(parents=True, exist_ok=True)
    except OSError as exc:
        raise ProjectFileError(f"cannot create the recovery folder {folder}: {exc.strerror}; "
                               "choose another recovery folder in the settings") from exc
    path = recovery_file(folder)
    # the underlay is not kept in the recovery copy (its path is relative to the project file)
    save_project(Project(document.profile, document.conditions, baseline=document.baseline), path)
    origin = "" if document.path is None else str(Path(document.path).resolve())
    atomic_write_text(_origin_file(path), lambda fh: fh.write(origin))
    return path


def remove_recovery(folder, pid: int | None = None) -> bool:
    """Delete a recovery copy and its sidecar; True when a copy was there."""
    path = recovery_file(folder, pid)
    found = path.exists()
    for p in (path, _origin_file(path)):
        try:
            p.unlink()
        except FileNotFoundError:
            pass
    return found


def _alive(pid: int) -> bool:
    if pid == os.getpid():
        return True
    try:
        os.kill(pid, 0)
    except ProcessLookupError:
        return False
    except PermissionError:
        return True
    return True


def left_behind(folder) -> list[RecoveryCopy]:
    """Recovery copies in ``folder`` whose writing process no longer runs, newest first."""
    folder = Path(folder)
    if not folder.is_dir():
        return []
    found = []
    for path in folder.glob(f"{PREFIX}*.json"):
        try:
            pid = int(path.stem[len(PREFIX):])
        except ValueError:
            continue
        if _alive(pid):
            continue
        origin_text = ""
        try:
            origin_text = _origin_file(path).read_text(encoding="utf-8").strip()
        except OSError:
            pass
        found.append(RecoveryCopy(path, Path(origin_text) if origin_text else None, pid))
    found.sort(key=lambda c: c.path.stat().st_mtime, reverse=True)
    return found
