"""The node inspector: position and corner radius of the selected node in mm, smooth or corner."""

from __future__ import annotations

from PySide6.QtCore import Signal
from PySide6.QtWidgets import QCheckBox, QFormLayout, QLabel, QLineEdit, QWidget

from profilebench.editor.fields import format_mm, parse_length_mm, parse_number

__all__ = ["NodePanel"]


class NodePanel(QWidget):
    """Signals: ``radius_entered(int, float)`` (node, m), ``position_entered(int, float, float)``,
    ``smooth_toggled(int, bool)``. A bad entry shows its message under the fields."""

    radius_entered = Signal(int, float)
    position_entered = Signal(int, float, float)
    smooth_toggled = Signal(int, bool)

    def __init__(self, parent=None):
        super().__init__(parent)
        form = QFormLayout(self)
        self.title = QLabel("no node selected")
        self.x = QLineEdit()
        self.y = QLineEdit()
        self.radius = QLineEdit()
        self.radius.setToolTip("corner radius in mm; 0 for a sharp edge")
        self.smooth = QCheckBox("smooth (spline through the node)")
        self.error = QLabel("")
        self.error.setStyleSheet("color: #b03000;")
        self.error.setWordWrap(True)
        form.addRow(self.title)
        form.addRow("x (mm)", self.x)
        form.addRow("y (mm)", self.y)
        form.addRow("Radius (mm)", self.radius)
        form.addRow(self.smooth)
        form.addRow(self.error)
        self.x.editingFinished.connect(self._position)
        self.y.editingFinished.connect(self._position)
        self.radius.editingFinished.connect(self._radius)
        self.smooth.toggled.connect(self._smooth)
        self.node = None
        self._updating = False
        self.set_node(None, None)

    def set_node(self, profile, i):
        self._updating = True
        try:
            self.node = i
            on = profile is not None and i is not None and i < len(profile)
            for w in (self.x, self.y, self.radius, self.smooth):
                w.setEnabled(on)
            if not on:
                self.node = None
                self.title.setText("no node selected: click a node on the canvas")
                for w in (self.x, self.y, self.radius):
                    w.setText("")
                return
            n = profile.nodes[i]
            self.title.setText(f"node {i}" + (f": {n.label}" if n.label else ""))
            self.x.setText(format_mm(n.x))
            self.y.setText(format_mm(n.y))
            self.radius.setText(format_mm(n.radius))
            self.radius.setEnabled(not n.smooth)
            self.smooth.setChecked(n.smooth)
            self.error.setText("")
        finally:
            self._updating = False

    def _fail(self, exc):
        self.error.setText(str(exc))

    def _radius(self):
        if self._updating or self.node is None:
            return
        try:
            r = parse_length_mm(self.radius.text(), "corner radius")
        except Exception as exc:
            return self._fail(exc)
        self.error.setText("")
        self.radius_entered.emit(self.node, r)

    def _position(self):
        if self._updating or self.node is None:
            return
        try:
            x = parse_number(self.x.text(), "x", "mm") / 1000.0
            y = parse_number(self.y.text(), "y", "mm") / 1000.0
        except Exception as exc:
            return self._fail(exc)
        self.error.setText("")
        self.position_entered.emit(self.node, x, y)

    def _smooth(self, on):
        if self._updating or self.node is None:
            return
        self.smooth_toggled.emit(self.node, bool(on))
