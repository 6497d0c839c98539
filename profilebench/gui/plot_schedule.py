"""When the window's plots are rendered: at most every PLOT_INTERVAL_MS, never during a drag
(the rule is :func:`profilebench.editor.controller.plot_wait_ms`)."""

from __future__ import annotations

import time

from PySide6.QtCore import QTimer

from profilebench.editor.controller import plot_wait_ms
from profilebench.errors import ProfileBenchError

__all__ = ["PlotSchedule", "PLOT_INTERVAL_MS"]

PLOT_INTERVAL_MS = 200  # plots are rendered at most this often, and not during a drag


class PlotSchedule:
    """Renders ``window.analysis`` on ``window.plots`` when ``window.canvas`` is not dragging."""

    def __init__(self, window):
        self.window = window
        self.timer = QTimer(window)
        self.timer.setSingleShot(True)
        self.timer.timeout.connect(self._due)
        self._last = 0.0

    def request(self) -> None:
        """Render now if the window is idle and the last render is old enough, else later."""
        if self.timer.isActive():
            return
        dragging = self.window.canvas.dragging
        wait = plot_wait_ms(time.perf_counter() - self._last, dragging, PLOT_INTERVAL_MS)
        if wait is None:
            self.redraw()
        else:
            self.timer.start(wait)

    def _due(self):
        if self.window.canvas.dragging:
            self.timer.start(PLOT_INTERVAL_MS)  # not while the user drags
        else:
            self.redraw()

    def redraw(self) -> None:
        self._last = time.perf_counter()
        w = self.window
        if w.analysis is not None:
            try:
                w.plots.set_analysis(w.analysis)
            except ProfileBenchError as exc:
                w.plots.clear(str(exc))

    def stop(self) -> None:
        self.timer.stop()
