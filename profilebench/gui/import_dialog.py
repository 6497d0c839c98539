"""The import dialog: a digitised outline's fit previewed over its points before it is loaded.

The dialog shows the points and the fitted outline (corner nodes as squares, smooth nodes as
circles, a ring round each corner whose radius the points do not fix, with a line saying which
radii they allow), the tolerance (mm, editable: the outline is fitted again on each change, in the
editor's child process, the newest request winning) and the largest deviation. OK loads the fit
shown; it stays disabled while a fit runs and when the points give no valid profile at that
tolerance, with the reason shown. The fitting and its summary live in
:mod:`profilebench.editor.import_preview`; this module only draws them and takes the input.
"""

from __future__ import annotations

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt, QTimer
from PySide6.QtGui import QColor, QPainter, QPainterPath, QPen
from PySide6.QtWidgets import (
    QDialog,
    QDialogButtonBox,
    QDoubleSpinBox,
    QFormLayout,
    QLabel,
    QSizePolicy,
    QVBoxLayout,
    QWidget,
)

from profilebench.editor.document import CAUTION
from profilebench.editor.import_preview import ImportPreview, fit_preview
from profilebench.gui.runners import ProcessTaskRunner

__all__ = ["ImportDialog", "OutlinePreview"]

TOLERANCE_RANGE_MM = (0.5, 50.0)
REFIT_DELAY_MS = 300  # a tolerance typed digit by digit is fitted once


class OutlinePreview(QWidget):
    """Draws the digitised points and the fitted outline, x rearward and y up, to scale."""

    def __init__(self, points, ground: bool, parent=None):
        super().__init__(parent)
        self.points = np.asarray(points, dtype=float)
        self.ground = bool(ground)
        self.preview: ImportPreview | None = None
        self.setMinimumSize(480, 220)
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Expanding)

    def set_preview(self, preview: ImportPreview | None) -> None:
        self.preview = preview
        self.update()

    def _transform(self):
        lo = self.points.min(axis=0)
        hi = self.points.max(axis=0)
        if self.ground:
            lo[1] = min(lo[1], 0.0)
        span = np.maximum(hi - lo, 1e-6)
        margin = 16.0
        scale = min((self.width() - 2 * margin) / span[0], (self.height() - 2 * margin) / span[1])
        x0 = margin + 0.5 * (self.width() - 2 * margin - scale * span[0])
        y0 = self.height() - margin - 0.5 * (self.height() - 2 * margin - scale * span[1])

        def to_px(xy):
            xy = np.asarray(xy, dtype=float)
            return np.stack(
                [x0 + (xy[..., 0] - lo[0]) * scale, y0 - (xy[..., 1] - lo[1]) * scale], axis=-1
            )

        return to_px, lo, hi

    def paintEvent(self, event):  # noqa: N802 (Qt's name)
        p = QPainter(self)
        p.setRenderHint(QPainter.Antialiasing)
        p.fillRect(self.rect(), QColor("#ffffff"))
        to_px, lo, hi = self._transform()
        if self.ground:
            g = to_px(np.array([[lo[0], 0.0], [hi[0], 0.0]]))
            p.setPen(QPen(QColor("#8a7a5a"), 1.5, Qt.DashLine))
            p.drawLine(QPointF(*g[0]), QPointF(*g[1]))
        pv = self.preview
        if pv is not None and pv.ok:
            self._draw_fit(p, to_px, pv)
        # the points over the outline, joined in the order given (a crossing shows), as small
        # grey dots, seen wherever the fit leaves them
        px = to_px(self.points)
        chain = QPainterPath()
        chain.moveTo(QPointF(*px[0]))
        for x, y in px[1:]:
            chain.lineTo(QPointF(x, y))
        chain.closeSubpath()
        p.setBrush(Qt.NoBrush)
        p.setPen(QPen(QColor(120, 120, 120, 110), 0.8))
        p.drawPath(chain)
        p.setPen(Qt.NoPen)
        p.setBrush(QColor(90, 90, 90, 90))
        for x, y in px:
            p.drawEllipse(QPointF(x, y), 1.0, 1.0)
        if pv is not None and pv.ok:
            self._draw_nodes(p, to_px, pv)

    @staticmethod
    def _draw_fit(p, to_px, pv):
        path = QPainterPath()
        px = to_px(pv.outline)
        path.moveTo(QPointF(*px[0]))
        for x, y in px[1:]:
            path.lineTo(QPointF(x, y))
        path.closeSubpath()
        p.setBrush(Qt.NoBrush)
        p.setPen(QPen(QColor("#1f5fb4"), 3.0))
        p.drawPath(path)

    @staticmethod
    def _draw_nodes(p, to_px, pv):
        unresolved = set(pv.unresolved_nodes)
        for i, nd in enumerate(pv.profile.nodes):
            x, y = to_px(np.array([nd.x, nd.y]))
            if i in unresolved:  # a radius the points do not fix: ringed
                p.setBrush(Qt.NoBrush)
                p.setPen(QPen(QColor("#d9822b"), 2.0))
                p.drawEllipse(QPointF(x, y), 9.0, 9.0)
            p.setPen(QPen(QColor("#1f5fb4"), 1.5))
            if nd.smooth:
                p.setBrush(QColor("#ffffff"))
                p.drawEllipse(QPointF(x, y), 4.0, 4.0)
            else:
                p.setBrush(QColor("#c0392b") if nd.radius > 0 else QColor("#1f5fb4"))
                p.drawRect(QRectF(x - 4.0, y - 4.0, 8.0, 8.0))


class ImportDialog(QDialog):
    """Preview and accept the fit of a digitised outline.

    ``points_import`` is the :class:`~profilebench.io.points.PointImport` read from the file.
    After ``accept`` (OK), :attr:`preview` holds the fit to load (``preview.ok`` is True).
    """

    def __init__(
        self,
        points_import,
        name: str,
        ground: bool = True,
        tolerance_mm: float = 5.0,
        parent=None,
        conditions=None,
    ):
        super().__init__(parent)
        # with conditions, each radius the points leave open is analysed at both ends of its
        # range in the child (the Cd it moves is shown)
        self.conditions = conditions
        self.setWindowTitle(f"Import outline: {name}")
        self.points_import = points_import
        self.name = name
        self.ground = bool(ground)
        self.preview: ImportPreview | None = None
        self._wanted = None  # generation of the newest fit asked for

        pts = points_import.points
        self.view = OutlinePreview(pts, self.ground, self)
        source = QLabel(
            f"{len(pts)} points, read in {points_import.units} ({points_import.units_reason})"
        )
        source.setWordWrap(True)
        self.tolerance = QDoubleSpinBox()
        self.tolerance.setRange(*TOLERANCE_RANGE_MM)
        self.tolerance.setDecimals(1)
        self.tolerance.setSingleStep(0.5)
        self.tolerance.setSuffix(" mm")
        self.tolerance.setValue(float(tolerance_mm))
        self.tolerance.setToolTip(
            "the largest distance the fitted outline may keep from the "
            "points; a larger tolerance gives fewer nodes"
        )
        legend = QLabel(
            "<span style='color:#6e6e6e'>&#9679;</span> points &nbsp; "
            "<span style='color:#1f5fb4'>&#9472;&#9472;</span> fitted outline &nbsp; "
            "<span style='color:#c0392b'>&#9632;</span> rounded corner &nbsp; "
            "<span style='color:#1f5fb4'>&#9632;</span> sharp corner &nbsp; "
            "<span style='color:#1f5fb4'>&#9675;</span> smooth node &nbsp; "
            "<span style='color:#d9822b'>&#9711;</span> radius not fixed by the points"
            + (" &nbsp; - - ground" if self.ground else "")
        )
        self.status = QLabel("")
        self.status.setWordWrap(True)
        self.notes = QLabel("")
        self.notes.setWordWrap(True)
        self.notes.setStyleSheet("color: #7a5a00;")
        caution = QLabel(CAUTION)
        caution.setWordWrap(True)
        caution.setStyleSheet("color: #666666; font-size: small;")
        self.buttons = QDialogButtonBox(QDialogButtonBox.Ok | QDialogButtonBox.Cancel)
        self.buttons.accepted.connect(self.accept)
        self.buttons.rejected.connect(self.reject)

        form = QFormLayout()
        form.addRow("Points", source)
        form.addRow("Tolerance", self.tolerance)
        layout = QVBoxLayout(self)
        layout.addWidget(self.view, 1)
        layout.addWidget(legend)
        layout.addLayout(form)
        layout.addWidget(self.status)
        layout.addWidget(self.notes)
        layout.addWidget(caution)
        layout.addWidget(self.buttons)

        self.runner = ProcessTaskRunner(fit_preview, self, child="import")
        self.runner.finished.connect(self._fitted)
        self.runner.failed.connect(self._fit_failed)
        self._timer = QTimer(self)
        self._timer.setSingleShot(True)
        self._timer.setInterval(REFIT_DELAY_MS)
        self._timer.timeout.connect(self.refit)
        self.tolerance.valueChanged.connect(self._tolerance_changed)
        self.refit()

    # --- state ----------------------------------------------------------------------------
    @property
    def ok_button(self):
        return self.buttons.button(QDialogButtonBox.Ok)

    @property
    def fitting(self) -> bool:
        """True while the fit for the tolerance shown has not come back."""
        return self._wanted is not None or self._timer.isActive()

    def _tolerance_changed(self, _value):
        # the fit shown is for another tolerance now: not loadable until the new one is back
        self.ok_button.setEnabled(False)
        self.status.setText(f"fitting within {self.tolerance.value():.1f} mm…")
        self.status.setStyleSheet("")
        self._timer.start()

    def refit(self) -> None:
        """Fit the points again at the tolerance shown (the newest request wins)."""
        self._timer.stop()
        self._wanted = self.runner.request(
            self.points_import.points,
            self.tolerance.value() / 1000.0,
            self.ground,
            self.name,
            800,
            self.conditions,
        )
        self.ok_button.setEnabled(False)
        self.status.setText(f"fitting within {self.tolerance.value():.1f} mm…")
        self.status.setStyleSheet("")

    def _fitted(self, generation, preview, _seconds):
        if generation != self._wanted:
            return
        self._wanted = None
        self.preview = preview
        self.view.set_preview(preview)
        self.status.setText(preview.summary())
        self.status.setStyleSheet("" if preview.ok else "color: #b03000;")
        lines = preview.notes + preview.radius_notes
        if preview.effect_lines:
            lines += ("At the ends of those ranges:",) + preview.effect_lines
        self.notes.setText("\n".join(lines))
        self.ok_button.setEnabled(preview.ok)

    def _fit_failed(self, generation, message):
        if generation != self._wanted:
            return
        self._wanted = None
        self.preview = ImportPreview(tolerance=self.tolerance.value() / 1000.0, error=message)
        self.view.set_preview(self.preview)
        self.status.setText(self.preview.summary())
        self.status.setStyleSheet("color: #b03000;")
        self.ok_button.setEnabled(False)

    def accept(self) -> None:
        if self.fitting or self.preview is None or not self.preview.ok:
            return  # an invalid or outdated fit is never loaded
        super().accept()

    def done(self, result) -> None:
        self._timer.stop()
        # no wait for a fit still running in the child: its result is dropped when it comes
        self.runner.close(0)
        super().done(result)
