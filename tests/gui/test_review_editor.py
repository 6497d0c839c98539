"""The editor as a design review sees it: the node inspector after a drag, a pinned baseline
that leaves the results current, tables that fit at 1500 x 950, the margin defined."""

from PySide6.QtCore import QPointF

from gui_helpers import ANALYSIS_TIMEOUT_MS, wait_current
from profilebench.editor.fields import format_mm
from profilebench.plotting.summary import MARGIN_DEFINITION
from test_main_window import _movable_node, drag


def test_node_panel_follows_a_drag(window, qtbot):
    w = window
    i = _movable_node(w)
    start = w.canvas.screen_of_node(i)
    drag(qtbot, w.canvas, start, start + QPointF(-30, 20), steps=8)
    node = w.document.profile.nodes[i]
    assert w.node_panel.node == i
    # the inspector shows where the node is now, as the document holds it
    assert w.node_panel.x.text() == format_mm(node.x)
    assert w.node_panel.y.text() == format_mm(node.y)
    wait_current(qtbot, w)


def test_pinning_a_baseline_keeps_the_results_current(window, qtbot):
    w = window
    wait_current(qtbot, w)
    shown = w.analysis
    w.pin_baseline()
    assert w.document.state.baseline is not None
    assert not w.canvas.stale
    assert w.results_current            # nothing to re-analyse: the outline did not change
    assert w.analysis is shown
    qtbot.waitUntil(lambda: w.baseline_analysis is not None, timeout=ANALYSIS_TIMEOUT_MS)
    assert not w.canvas.stale
    w.undo_stack.undo()                 # unpin: still current
    assert not w.canvas.stale and w.results_current


def _fits(table):
    """All columns within the table's viewport (no horizontal scrolling)."""
    width = sum(table.columnWidth(k) for k in range(table.columnCount()))
    return width <= table.viewport().width() and not table.horizontalScrollBar().isVisible()


def test_tables_fit_at_1500_by_950_with_a_baseline(window, qtbot):
    w = window
    w.resize(1500, 950)
    w.pin_baseline()
    corner = next(c for c in w.analysis.corners if c.radius > 0)
    w.set_radius(corner.node, corner.radius * 1.5)
    wait_current(qtbot, w)
    qtbot.waitUntil(lambda: w.summary.value("ΔCd") is not None, timeout=ANALYSIS_TIMEOUT_MS)
    qtbot.wait(50)
    assert _fits(w.corner_table.table)
    assert _fits(w.summary.table)
    s = w.summary.table
    rows_px = sum(s.rowHeight(r) for r in range(s.rowCount()))
    assert rows_px <= s.viewport().height()     # every summary row, the deltas too, in view
    for k in range(s.rowCount()):
        note = s.item(k, 2)
        assert note is None or note.toolTip() == note.text()


def test_margin_column_defined_in_its_tooltip(window):
    t = window.corner_table.table
    header = [t.horizontalHeaderItem(k).text() for k in range(t.columnCount())]
    k = header.index("sep. margin")
    assert t.horizontalHeaderItem(k).toolTip() == MARGIN_DEFINITION
    assert t.item(0, k).toolTip() == MARGIN_DEFINITION
    assert "not a margin on the radius" in MARGIN_DEFINITION
    # the radius allowance of the apply button is a different thing and says so
    assert "radius allowance" in window.corner_table.margin.toolTip()


def test_shared_corner_notes_said_once_under_the_table(window):
    t = window.corner_table
    verdicts = {c.table_verdict for c in window.analysis.corners}
    assert len(verdicts) == 1    # the built-in table gives no critical ratio for any corner
    assert t.notes.text().count(verdicts.pop()) == 1
    assert {t.cell(r, 6) for r in range(t.table.rowCount())} == {"(see note)"}
