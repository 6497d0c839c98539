"""Panels showing an analysis: the corner table, the summary and the matplotlib plots."""

from __future__ import annotations

from matplotlib.backends.backend_qtagg import FigureCanvasQTAgg
from matplotlib.figure import Figure
from PySide6.QtCore import Qt, Signal
from PySide6.QtWidgets import (QAbstractItemView, QHBoxLayout, QHeaderView, QLabel, QLineEdit,
                               QPushButton, QTableWidget, QTableWidgetItem, QTabWidget,
                               QVBoxLayout, QWidget)

from profilebench.plotting import draw_boundary_layer, draw_cp, summary_rows
from profilebench.plotting.summary import corner_rows

__all__ = ["CornerTable", "SummaryPanel", "PlotPanel", "CORNER_HEADER"]

CORNER_HEADER = ("corner", "r (mm)", "t (mm)", "r/t", "solver verdict", "margin", "table verdict",
                 "smallest attached r (mm)", "ΔCd")


class CornerTable(QWidget):
    """One row per corner; selecting a row selects the corner's node.

    Signals: ``node_selected(int)`` (-1 for none), ``search_requested(int)`` and
    ``apply_requested(int, str)`` (node, margin text in %).
    """

    node_selected = Signal(int)       # -1: no corner selected
    search_requested = Signal(int)
    apply_requested = Signal(int, str)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.table = QTableWidget(0, len(CORNER_HEADER))
        self.table.setHorizontalHeaderLabels(CORNER_HEADER)
        self.table.setSelectionBehavior(QAbstractItemView.SelectRows)
        self.table.setSelectionMode(QAbstractItemView.SingleSelection)
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.verticalHeader().setVisible(False)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.table.itemSelectionChanged.connect(self._selection_changed)
        self.search_button = QPushButton("Find smallest attached radius")
        self.search_button.clicked.connect(self._search)
        self.margin = QLineEdit("20")
        self.margin.setMaximumWidth(60)
        self.margin.setToolTip("margin added to the smallest attached radius, in %")
        self.apply_button = QPushButton("Set radius to smallest + margin")
        self.apply_button.clicked.connect(self._apply)
        self.message = QLabel("")
        self.message.setWordWrap(True)
        buttons = QHBoxLayout()
        buttons.addWidget(self.search_button)
        buttons.addWidget(QLabel("margin (%)"))
        buttons.addWidget(self.margin)
        buttons.addWidget(self.apply_button)
        buttons.addStretch(1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addWidget(self.table)
        layout.addLayout(buttons)
        layout.addWidget(self.message)
        self._nodes: list[int] = []
        self._updating = False

    def set_rows(self, analysis, searches: dict, selected):
        """Fill from ``analysis.corners`` (via :func:`profilebench.plotting.corner_rows`)."""
        self._updating = True
        try:
            corners = tuple(getattr(analysis, "corners", ()) or ())
            rows = corner_rows(analysis) if corners else []
            self.table.setRowCount(len(rows))
            self._nodes = [c.node for c in corners]
            for r, (c, row) in enumerate(zip(corners, rows)):
                search = searches.get(c.node)
                if search is None:
                    found = ""
                elif search == "running":
                    found = "searching…"
                elif getattr(search, "radius", None) is not None:
                    found = f"{search.radius * 1000:.0f}"
                else:
                    found = getattr(search.status, "value", str(search.status))
                cells = list(row[:7]) + [found, row[7]]
                for k, text in enumerate(cells):
                    item = QTableWidgetItem(str(text))
                    if k in (1, 2, 3, 5, 7, 8):
                        item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                    if k == 4 and getattr(c.verdict, "separated", False):
                        item.setForeground(Qt.darkRed)
                    if k == 6 and c.disagreement:
                        item.setToolTip(c.disagreement)
                    self.table.setItem(r, k, item)
            self.select_node(selected)
        finally:
            self._updating = False

    def cell(self, row: int, column: int) -> str:
        item = self.table.item(row, column)
        return "" if item is None else item.text()

    def row_of_node(self, node):
        return self._nodes.index(node) if node in self._nodes else None

    def select_node(self, node):
        was = self._updating
        self._updating = True
        try:
            row = self.row_of_node(node)
            if row is None:
                self.table.clearSelection()
            else:
                self.table.selectRow(row)
        finally:
            self._updating = was

    def selected_node(self):
        rows = self.table.selectionModel().selectedRows()
        return self._nodes[rows[0].row()] if rows else None

    def _selection_changed(self):
        if not self._updating:
            node = self.selected_node()
            self.node_selected.emit(-1 if node is None else node)

    def _search(self):
        node = self.selected_node()
        if node is None:
            self.message.setText("select a corner in the table or on the canvas first")
            return
        self.search_requested.emit(node)

    def _apply(self):
        node = self.selected_node()
        if node is None:
            self.message.setText("select a corner in the table or on the canvas first")
            return
        self.apply_requested.emit(node, self.margin.text())


class SummaryPanel(QWidget):
    """Cd with its breakdown, CdA, force, power, Cl, solve time, and deltas to the baseline."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.table = QTableWidget(0, 3)
        self.table.setHorizontalHeaderLabels(("quantity", "value", "note"))
        self.table.verticalHeader().setVisible(False)
        self.table.setEditTriggers(QAbstractItemView.NoEditTriggers)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.table.horizontalHeader().setStretchLastSection(True)
        self.warnings = QLabel("")
        self.warnings.setWordWrap(True)
        self.warnings.setStyleSheet("color: #8a4b00;")
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addWidget(self.table)
        layout.addWidget(self.warnings)

    def set_analysis(self, analysis, comparison=None, seconds=None, stale=False):
        rows = [tuple(r) for r in summary_rows(analysis)] if analysis is not None else []
        if seconds is not None:
            rows.append(("solve time", f"{seconds * 1000:.0f}", "ms (background)"))
        notes = list(getattr(analysis, "warnings", ()) or ())
        d = getattr(analysis, "drag", None)
        if d is not None:
            notes.extend(d.notes)
        if comparison is not None:
            rows.append(("baseline Cd", f"{comparison.cd_before:.4f}", ""))
            rows.append(("ΔCd", f"{comparison.delta_cd:+.4f}", f"{comparison.delta_cd_percent:+.1f}%"))
            if comparison.delta_cda is not None:
                rows.append(("ΔCdA", f"{comparison.delta_cda:+.4f}", "m²"))
                rows.append(("Δ drag force", f"{comparison.delta_force:+.1f}", "N"))
                rows.append(("Δ power", f"{comparison.delta_power / 1000:+.2f}", "kW"))
            notes = list(comparison.warnings) + notes
        self.table.setRowCount(len(rows))
        for r, row in enumerate(rows):
            for k, text in enumerate(row):
                item = QTableWidgetItem(str(text))
                if stale:
                    item.setForeground(Qt.gray)
                self.table.setItem(r, k, item)
        lift = "Cl: from an inviscid 2D section with no wake model; read its sign and trend only."
        self.warnings.setText("\n".join(["⚠ " + n for n in notes] + [lift]))

    def value(self, quantity: str):
        for r in range(self.table.rowCount()):
            if self.table.item(r, 0).text().strip() == quantity:
                return self.table.item(r, 1).text()
        return None


class PlotPanel(QTabWidget):
    """Cp along x, and H and Cf along the surface (matplotlib via FigureCanvasQTAgg)."""

    def __init__(self, parent=None):
        super().__init__(parent)
        self.cp_figure = Figure(figsize=(5, 3), dpi=90, layout="constrained")
        self.cp_canvas = FigureCanvasQTAgg(self.cp_figure)
        self.bl_figure = Figure(figsize=(5, 3), dpi=90, layout="constrained")
        self.bl_canvas = FigureCanvasQTAgg(self.bl_figure)
        self.addTab(self.cp_canvas, "Pressure")
        self.addTab(self.bl_canvas, "Boundary layer")
        self._analysis = None
        self._drawn = {0: None, 1: None}
        self.currentChanged.connect(lambda _: self._draw_current())
        self.draws = 0

    def set_analysis(self, analysis):
        self._analysis = analysis
        self._draw_current()

    def _draw_current(self):
        a = self._analysis
        k = self.currentIndex()
        if a is None or self._drawn.get(k) is a:
            return
        self._drawn[k] = a
        self.draws += 1
        if k == 0:
            fig = self.cp_figure
            fig.clear()
            ax = fig.add_subplot(111)
            draw_cp(ax, a)
            ax.set_title("Cp along x", fontsize=9)
            self.cp_canvas.draw_idle()
        else:
            fig = self.bl_figure
            fig.clear()
            ax_h, ax_cf = fig.subplots(2, 1, sharex=True)
            draw_boundary_layer(ax_h, ax_cf, a)
            self.bl_canvas.draw_idle()

    def clear(self, message: str):
        for fig, canvas in ((self.cp_figure, self.cp_canvas), (self.bl_figure, self.bl_canvas)):
            fig.clear()
            fig.text(0.5, 0.5, message, ha="center", va="center", wrap=True, fontsize=9)
            canvas.draw_idle()
        self._analysis = None
        self._drawn = {0: None, 1: None}
