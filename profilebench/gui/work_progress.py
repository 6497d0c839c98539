"""The status bar's progress indicator for long background work, with a Cancel button."""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QHBoxLayout, QLabel, QProgressBar, QPushButton, QWidget

__all__ = ["WorkProgress"]


class WorkProgress(QWidget):
    """A label, a busy progress bar and Cancel; hidden while no long work runs.

    The work in the background (an analysis, a radius search) reports no fraction done, so the
    bar runs in Qt's busy mode. Signal ``cancelled(str)`` gives the kind of work cancelled.
    """

    cancelled = Signal(str)

    def __init__(self, parent=None):
        super().__init__(parent)
        lay = QHBoxLayout(self)
        lay.setContentsMargins(0, 0, 0, 0)
        self.label = QLabel("")
        self.bar = QProgressBar()
        self.bar.setRange(0, 0)  # busy: no fraction to show
        self.bar.setMaximumWidth(140)
        self.bar.setMaximumHeight(14)
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.clicked.connect(self._cancel)
        lay.addWidget(self.label)
        lay.addWidget(self.bar)
        lay.addWidget(self.cancel_button)
        self.kind = None
        self.hide()

    def start(self, kind: str, text: str):
        """Show ``text`` with the busy bar for work of ``kind`` ("analysis", "search")."""
        self.kind = kind
        self.label.setText(text)
        self.show()

    def finish(self, kind: str):
        """Hide the indicator if it shows work of ``kind``."""
        if self.kind == kind:
            self.kind = None
            self.hide()

    @property
    def running(self) -> bool:
        return self.kind is not None

    def _cancel(self):
        kind, self.kind = self.kind, None
        self.hide()
        if kind is not None:
            self.cancelled.emit(kind)
