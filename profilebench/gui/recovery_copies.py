"""The window's recovery copy of unsaved work: written on a timer, removed when the work is saved
or knowingly discarded, offered back at the next start (files: :mod:`profilebench.editor.recovery`).
"""

from __future__ import annotations

import logging
from pathlib import Path

from PySide6.QtCore import QStandardPaths, QTimer

from profilebench.editor import recovery
from profilebench.editor.project_file import document_of
from profilebench.errors import ProfileBenchError

__all__ = ["RecoveryCopies", "default_folder"]

log = logging.getLogger("profilebench.gui")


def default_folder(settings) -> Path:
    """The setting ``recovery_dir``, else ``recovery`` in the application's data folder."""
    configured = settings.value("recovery_dir", "")
    if configured:
        return Path(str(configured))
    base = QStandardPaths.writableLocation(QStandardPaths.AppDataLocation)
    return Path(base or Path.home() / ".profilebench") / "recovery"


class RecoveryCopies:
    """Writes ``window``'s unsaved document to ``folder`` every ``interval_ms``.

    The window supplies ``document``, ``statusBar()``, ``report_error``, ``ask_recover``,
    ``_show_banner`` and ``_install`` (to put a restored document in place).
    """

    def __init__(self, window, folder, interval_ms: int):
        self.window = window
        self.folder = Path(folder)
        self.error = ""  # the last failure to write, told once per distinct failure
        self._written_state = None
        self.timer = QTimer(window)
        self.timer.setInterval(interval_ms)
        self.timer.timeout.connect(self.write)
        self.timer.start()

    def write(self) -> bool:
        """Write the copy when there are unsaved changes not yet written; True if written."""
        w = self.window
        doc = w.document
        if doc is None:
            return False
        if not doc.dirty:
            self.discard()
            return False
        if self._written_state == doc.state:
            return False
        try:
            recovery.write_recovery(self.folder, doc)
        except ProfileBenchError as exc:
            if self.error != str(exc):
                log.warning("recovery copy not written: %s", exc)
                w.statusBar().showMessage(f"recovery copy not written: {exc}", 10000)
                w.report_error(
                    "Recovery copy not written",
                    f"Your unsaved changes are not protected by a recovery copy:\n\n{exc}\n\n"
                    "Save the project to keep them, or choose another recovery folder (setting "
                    "recovery_dir).",
                )
            self.error = str(exc)
            return False
        self.error = ""
        self._written_state = doc.state
        return True

    def discard(self) -> None:
        """The work is saved or knowingly dropped: no copy is kept."""
        self._written_state = None
        try:
            recovery.remove_recovery(self.folder)
        except OSError as exc:
            log.warning("recovery copy not removed: %s", exc)

    def offer(self) -> bool:
        """Offer the newest copy left by a process that ended; True when restored."""
        from profilebench.io import load_project

        w = self.window
        copies, project = recovery.left_behind(self.folder), None
        while copies and project is None:  # the newest copy that can be read
            try:
                project = load_project(copies[0].path)
            except ProfileBenchError as exc:
                try:
                    aside = recovery.set_aside(self.folder, copies[0])
                    where = f"set aside as {aside}"
                except ProfileBenchError as why:
                    where = str(why)
                w._show_banner(
                    f"the recovery copy {copies[0].path} cannot be read ({exc}); {where}", True
                )
                copies.pop(0)
        if not copies:
            return False
        copy = copies[0]
        restored = False
        if w.ask_recover(copy):
            doc = document_of(project, copy.origin)  # a recovery copy keeps no underlay
            doc.mark_unsaved()
            w._install(doc)
            restored = True
            w.statusBar().showMessage(f"restored unsaved work from {copy.path}", 10000)
        for c in copies:
            recovery.remove_recovery(self.folder, c.pid)
        if restored:
            self.write()
        return restored
