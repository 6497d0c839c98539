"""Panels showing an analysis: the corner table, the summary and the matplotlib plots.

The tables are updated in place (only cells whose text changed are touched; rows are rebuilt
only when their number changes). The plots are rendered by matplotlib's Agg backend in a child
process (:mod:`profilebench.gui.plot_render`: Agg holds the interpreter lock inside its C++ calls,
so on a thread it would stop the GUI thread); the GUI thread only shows the finished image.
"""

from __future__ import annotations

from PySide6.QtCore import QSize, Qt, QTimer, Signal
from PySide6.QtGui import QImage, QPixmap
from PySide6.QtWidgets import (
    QAbstractItemView,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QPushButton,
    QSizePolicy,
    QTableWidget,
    QTableWidgetItem,
    QTabWidget,
    QVBoxLayout,
    QWidget,
)

from profilebench.editor.controller import SearchRunning
from profilebench.gui.plot_render import render_plot_rgba, warm_up
from profilebench.gui.runners import ProcessTaskRunner

from profilebench.plotting import summary_rows
from profilebench.plotting.summary import (
    CORNER_COLUMNS,
    MARGIN_DEFINITION,
    corner_notes,
    corner_rows,
)

__all__ = [
    "CornerTable",
    "SummaryPanel",
    "PlotPanel",
    "CORNER_HEADER",
    "LIFT_NOTE",
    "render_plot",
    "PlotView",
    "row_table",
    "set_table_cells",
]

LIFT_NOTE = (
    "Cl: 2D section over a slip ground; the gap flow under the body cannot escape "
    "sideways, so ground suction is overstated. Read its sign and trend only."
)


def set_table_cells(table: QTableWidget, rows, style=None) -> int:
    """Show ``rows`` (lists of cell texts) in ``table`` in place; returns how many cells changed.

    Items are created only for new rows; an existing cell is touched only when its text or its
    style changes. ``style(r, k, item)`` may set alignment, colour or tool tip of a cell.
    """
    changed = 0
    table.setUpdatesEnabled(False)
    try:
        if table.rowCount() != len(rows):
            table.setRowCount(len(rows))
        for r, row in enumerate(rows):
            for k, text in enumerate(row):
                text = str(text)
                item = table.item(r, k)
                if item is None:
                    item = QTableWidgetItem(text)
                    table.setItem(r, k, item)
                    changed += 1
                elif item.text() != text:
                    item.setText(text)
                    changed += 1
                if style is not None:
                    style(r, k, item)
    finally:
        table.setUpdatesEnabled(True)
    return changed


def row_table(header) -> QTableWidget:
    """A read-only table of the columns ``header`` whose rows are selected one whole row at a
    time, without row numbers."""
    table = QTableWidget(0, len(header))
    table.setHorizontalHeaderLabels(header)
    table.setSelectionBehavior(QAbstractItemView.SelectRows)
    table.setSelectionMode(QAbstractItemView.SingleSelection)
    table.setEditTriggers(QAbstractItemView.NoEditTriggers)
    table.verticalHeader().setVisible(False)
    return table


# the page's corner columns up to the table verdict (one definition of their names), then the
# editor's own: the searched radius and the correction
CORNER_HEADER = CORNER_COLUMNS[: CORNER_COLUMNS.index("table verdict") + 1] + (
    "smallest r (mm)",
    "ΔCd",
)
#: header tool tips of the corner table
CORNER_TIPS = {
    5: MARGIN_DEFINITION,
    7: "the smallest radius that keeps the flow attached at these conditions (Find smallest "
    "attached radius)",
    8: "the corner's drag correction from the r/t table",
}
#: widest the corner-name column starts (px); the full name is in the cell's tool tip
NAME_COLUMN_PX = 190
VERDICT_COLUMN_PX = 170


def _compact_rows(table: QTableWidget):
    """Rows as tall as one line of text (a dock at 1500 x 950 shows more of them)."""
    fm = table.fontMetrics()
    table.verticalHeader().setDefaultSectionSize(fm.height() + 6)
    table.verticalHeader().setMinimumSectionSize(fm.height() + 2)


class CornerTable(QWidget):
    """One row per corner; selecting a row selects the corner's node.

    Signals: ``node_selected(int)`` (-1 for none), ``search_requested(int)`` and
    ``apply_requested(int, str)`` (node, margin text in %).
    """

    node_selected = Signal(int)  # -1: no corner selected
    search_requested = Signal(int)
    apply_requested = Signal(int, str)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.table = row_table(CORNER_HEADER)
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.Interactive)
        self.table.setTextElideMode(Qt.ElideRight)
        for k, tip in CORNER_TIPS.items():
            self.table.horizontalHeaderItem(k).setToolTip(tip)
        _compact_rows(self.table)
        self.table.itemSelectionChanged.connect(self._selection_changed)
        self.search_button = QPushButton("Find smallest attached radius")
        self.search_button.clicked.connect(self._search)
        self.margin = QLineEdit("20")
        self.margin.setMaximumWidth(60)
        self.margin.setToolTip(
            "radius allowance: per cent added to the smallest attached radius "
            "(not the separation margin of the table)"
        )
        self.apply_button = QPushButton("Set radius to smallest + allowance")
        self.apply_button.clicked.connect(self._apply)
        self.message = QLabel("")
        self.message.setWordWrap(True)
        self.notes = QLabel("")  # what every corner shares, said once
        self.notes.setWordWrap(True)
        self.notes.setStyleSheet("color: #5a4500;")
        buttons = QHBoxLayout()
        buttons.addWidget(self.search_button)
        buttons.addWidget(QLabel("radius allowance (%)"))
        buttons.addWidget(self.margin)
        buttons.addWidget(self.apply_button)
        buttons.addStretch(1)
        layout = QVBoxLayout(self)
        layout.setContentsMargins(2, 2, 2, 2)
        layout.addWidget(self.table)
        layout.addLayout(buttons)
        layout.addWidget(self.notes)
        layout.addWidget(self.message)
        self._nodes: list[int] = []
        self._updating = False
        self.last_changed = 0  # cells changed by the last set_rows

    def set_rows(self, analysis, searches: dict, selected):
        """Fill from ``analysis.corners`` (via :func:`profilebench.plotting.corner_rows`)."""
        self._updating = True
        try:
            corners = analysis.corners
            rows = corner_rows(analysis) if corners else []
            nodes = [c.node for c in corners]
            same_rows = nodes == self._nodes and self.table.rowCount() == len(rows)
            self._nodes = nodes
            cells_all = []
            for c, row in zip(corners, rows):
                search = searches.get(c.node)
                if search is None:
                    found = ""
                elif isinstance(search, SearchRunning):
                    found = "searching…"
                elif search.radius is not None:
                    found = f"{search.radius * 1000:.0f}"
                else:
                    found = search.status.value
                cells_all.append(list(row[:7]) + [found, row[7]])

            def style(r, k, item):
                c = corners[r]
                if k in (1, 2, 3, 5, 7, 8) and item.textAlignment() != int(
                    Qt.AlignRight | Qt.AlignVCenter
                ):
                    item.setTextAlignment(Qt.AlignRight | Qt.AlignVCenter)
                if k == 4:
                    sep = c.verdict.separated
                    if item.data(Qt.UserRole) != sep:
                        item.setData(Qt.UserRole, sep)
                        item.setForeground(Qt.darkRed if sep else self.palette().text())
                tip = {
                    0: item.text(),
                    4: item.text(),
                    5: MARGIN_DEFINITION,
                    6: c.table_verdict + (f"; {c.disagreement}" if c.disagreement else ""),
                }.get(k)
                if tip is not None and item.toolTip() != tip:
                    item.setToolTip(tip)

            self.last_changed = set_table_cells(self.table, cells_all, style)
            if not same_rows:
                self.table.resizeColumnsToContents()
                for k, widest in ((0, NAME_COLUMN_PX), (4, VERDICT_COLUMN_PX)):
                    if self.table.columnWidth(k) > widest:
                        self.table.setColumnWidth(k, widest)
            notes = "; ".join(corner_notes(analysis)) if corners else ""
            if self.notes.text() != notes:
                self.notes.setText(notes)
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
        self.table.horizontalHeader().setSectionResizeMode(QHeaderView.Interactive)
        self.table.horizontalHeader().setStretchLastSection(True)
        # the note column takes the width that is left and wraps: nothing runs off the side
        self.table.horizontalHeader().setSectionResizeMode(2, QHeaderView.Stretch)
        self.table.setHorizontalScrollBarPolicy(Qt.ScrollBarAlwaysOff)
        self.table.setWordWrap(True)
        _compact_rows(self.table)
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
        notes = list(analysis.warnings) if analysis is not None else []
        d = analysis.drag if analysis is not None else None
        if d is not None:
            notes.extend(d.notes)
        if comparison is not None:
            rows.append(("baseline Cd", f"{comparison.cd_before:.4f}", ""))
            rows.append(
                ("ΔCd", f"{comparison.delta_cd:+.4f}", f"{comparison.delta_cd_percent:+.1f}%")
            )
            if comparison.delta_cda is not None:
                rows.append(("ΔCdA", f"{comparison.delta_cda:+.4f}", "m²"))
                rows.append(("Δ drag force", f"{comparison.delta_force:+.1f}", "N"))
                rows.append(("Δ power", f"{comparison.delta_power / 1000:+.2f}", "kW"))
            notes = list(comparison.warnings) + notes
        grey = self.palette().placeholderText() if stale else self.palette().text()

        def style(r, k, item):
            if item.data(Qt.UserRole) != bool(stale):
                item.setData(Qt.UserRole, bool(stale))
                item.setForeground(grey)
            if k == 2 and item.toolTip() != item.text():
                item.setToolTip(item.text())

        before = self.table.rowCount()
        set_table_cells(self.table, rows, style)
        if before != len(rows):
            self.table.resizeColumnToContents(0)
            self.table.resizeColumnToContents(1)
            self.table.resizeRowsToContents()
        text = "\n".join(["⚠ " + n for n in notes] + [LIFT_NOTE])
        if self.warnings.text() != text:
            self.warnings.setText(text)

    def value(self, quantity: str):
        for r in range(self.table.rowCount()):
            if self.table.item(r, 0).text().strip() == quantity:
                return self.table.item(r, 1).text()
        return None


def render_plot(analysis, kind: str, width_px: int, height_px: int, dpi: float = 90.0):
    """Draw the ``kind`` plot ("cp" or "bl") of ``analysis`` with Agg here; returns a QImage (RGBA).

    The editor renders in its child process instead (see :class:`PlotPanel`).
    """
    return _to_image(render_plot_rgba(analysis, kind, width_px, height_px, dpi))


def _to_image(rendered) -> QImage:
    kind, w, h, rgba = rendered
    return QImage(rgba, w, h, 4 * w, QImage.Format_RGBA8888).copy()


class PlotView(QLabel):
    """A plot image on white, centred, that takes the room its layout gives it."""

    def __init__(self):
        super().__init__()
        self.setAlignment(Qt.AlignCenter)
        self.setSizePolicy(QSizePolicy.Ignored, QSizePolicy.Ignored)
        self.setMinimumSize(200, 120)
        self.setStyleSheet("background: white;")

    def sizeHint(self):
        return QSize(450, 270)


class PlotPanel(QTabWidget):
    """Cp along x, and H and Cf along the surface (matplotlib Agg images rendered off the GUI thread).

    Signals: ``rendered(str)`` with the plot kind ("cp" or "bl") when a new image is shown.
    """

    rendered = Signal(str)
    KINDS = ("cp", "bl")

    def __init__(self, parent=None):
        super().__init__(parent)
        self.views = {"cp": PlotView(), "bl": PlotView()}
        self.addTab(self.views["cp"], "Pressure")
        self.addTab(self.views["bl"], "Boundary layer")
        self._analysis = None
        self._drawn = {"cp": None, "bl": None}
        self._sizes = {"cp": None, "bl": None}
        self.images = {"cp": None, "bl": None}
        # the child starts with the first plot, so it does not slow the window's first analysis
        self.renderer = ProcessTaskRunner(
            render_plot_rgba, self, warm_up=warm_up, child="plots", start=False
        )
        self._requests: dict = {}  # generation -> analysis it draws
        self.renderer.finished.connect(self._rendered)
        self.renderer.failed.connect(
            lambda g, m: self._show_text(self._kind(), f"plot failed (logged): {m}")
        )
        self._resize_timer = QTimer(self)
        self._resize_timer.setSingleShot(True)
        self._resize_timer.timeout.connect(self._draw_current)
        self.currentChanged.connect(lambda _: self._draw_current())
        self.draws = 0

    def _kind(self) -> str:
        return self.KINDS[max(self.currentIndex(), 0)]

    def set_analysis(self, analysis):
        self._analysis = analysis
        self._draw_current()

    def _draw_current(self):
        a = self._analysis
        kind = self._kind()
        view = self.views[kind]
        size = (max(view.width(), 200), max(view.height(), 120))
        if a is None or (self._drawn.get(kind) is a and self._sizes.get(kind) == size):
            return
        self._drawn[kind] = a
        self._sizes[kind] = size
        self.draws += 1
        generation = self.renderer.request(a, kind, *size)
        self._requests = {generation: a}  # only the newest request is ever delivered

    def _rendered(self, generation, result, seconds):
        analysis = self._requests.pop(generation, None)
        if analysis is not self._analysis:
            return
        kind = result[0]
        image = _to_image(result)
        self.images[kind] = image
        self.views[kind].setPixmap(QPixmap.fromImage(image))
        self.rendered.emit(kind)

    def _show_text(self, kind, message):
        self.views[kind].setPixmap(QPixmap())
        self.views[kind].setText(message)

    def resizeEvent(self, event):
        super().resizeEvent(event)
        if self._analysis is not None:
            self._resize_timer.start(150)

    def clear(self, message: str):
        self.renderer.cancel_pending()
        for kind in self.KINDS:
            self._show_text(kind, message)
            self.images[kind] = None
        self._analysis = None
        self._drawn = {"cp": None, "bl": None}

    def shutdown(self, msecs: int = 10000) -> bool:
        """Stop rendering (on closing the window)."""
        return self.renderer.close(msecs)
