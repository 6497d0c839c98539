"""The editor's "check by doubling the panels": the outline analysed again at twice the panels,
in the background, and what moved shown in a window of its own.

The check is :func:`profilebench.assess.refinement.check_refinement` (the command line's
``analyse --check-refinement``), run in the radius search's child process (its searches land in
that process's search cache, where the corner table's "Find smallest attached radius" finds
them); the report is :func:`profilebench.plotting.summary.refinement_lines`.
"""

from __future__ import annotations

import functools

from PySide6.QtGui import QFontDatabase
from PySide6.QtWidgets import QDialog, QDialogButtonBox, QLabel, QPlainTextEdit, QVBoxLayout

from profilebench.gui.child_process import call_with_keywords
from profilebench.gui.runners import ProcessTaskRunner
from profilebench.io.export import CAUTION
from profilebench.plotting.summary import refinement_lines

__all__ = ["RefinementCheckRun", "RefinementReport"]

_check = functools.partial(call_with_keywords, "profilebench.assess.refinement:check_refinement")


class RefinementReport(QDialog):
    """The report of one check: the lines of the command line's, monospaced, and the caution."""

    def __init__(self, check, changed: bool, parent=None):
        super().__init__(parent)
        self.setWindowTitle(f"Refinement check: {check.profile}")
        lay = QVBoxLayout(self)
        head = (
            "The answers hold when the panels are doubled."
            if check.holds
            else "Some answers move when the panels are doubled: quote the refined ones."
        )
        if changed:
            head += " (For the outline as it was when the check started: it has changed since.)"
        self.headline = QLabel(head)
        self.headline.setWordWrap(True)
        self.text = QPlainTextEdit("\n".join(refinement_lines(check)))
        self.text.setReadOnly(True)
        self.text.setLineWrapMode(QPlainTextEdit.NoWrap)
        self.text.setFont(QFontDatabase.systemFont(QFontDatabase.FixedFont))
        caution = QLabel(CAUTION)
        caution.setWordWrap(True)
        buttons = QDialogButtonBox(QDialogButtonBox.Close)
        buttons.rejected.connect(self.reject)
        lay.addWidget(self.headline)
        lay.addWidget(self.text, 1)
        lay.addWidget(caution)
        lay.addWidget(buttons)
        self.resize(1400, 440)


class RefinementCheckRun:
    """Runs ``window``'s refinement checks, one at a time, and shows each report."""

    def __init__(self, window):
        self.window = window
        self.runner = ProcessTaskRunner(_check, window, child="search")
        self.runner.finished.connect(self._finished)
        self.runner.failed.connect(self._failed)
        self.state = None  # the document state being checked
        self.report = None  # the last report shown
        self._done = (None, None)  # (document state, its check) of the last check finished

    def start(self) -> None:
        w = self.window
        doc = w.document
        self.state = doc.state
        n = doc.conditions.panels
        self.runner.request((doc.profile, doc.conditions), {"radii": True})
        text = f"checking by doubling the panels ({n} and {2 * n})…"
        w.progress.start("refinement", text)
        w.statusBar().showMessage(text)

    def _finished(self, generation, check, seconds):
        w = self.window
        w.progress.finish("refinement")
        changed = w.document.state is not self.state
        self._done = (self.state, check)
        w.statusBar().showMessage(
            f"refinement check {'holds' if check.holds else 'does not hold'} ({seconds:.1f} s)",
            8000,
        )
        self.report = RefinementReport(check, changed, w)
        self.report.show()

    def _failed(self, generation, message):
        self.window.progress.finish("refinement")
        self.window._show_banner(f"refinement check failed (logged): {message}", True)

    def for_state(self, state):
        """The last finished check if it is of document state ``state``, else None."""
        done_state, check = self._done
        return check if done_state is not None and done_state is state else None

    def cancel(self) -> None:
        self.runner.cancel_pending()
        self.window.statusBar().showMessage("refinement check cancelled", 5000)

    def close(self, msecs: int) -> bool:
        return self.runner.close(msecs)
