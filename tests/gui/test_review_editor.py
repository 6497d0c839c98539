"""The editor as a design review sees it: the node inspector after a drag, a pinned baseline
that leaves the results current, tables that fit at 1500 x 950, the margin defined."""

import math

import pytest
from PySide6.QtCore import QPointF, Qt

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
    assert w.results_current  # nothing to re-analyse: the outline did not change
    assert w.analysis is shown
    qtbot.waitUntil(lambda: w.baseline_analysis is not None, timeout=ANALYSIS_TIMEOUT_MS)
    assert not w.canvas.stale
    w.undo_stack.undo()  # unpin: still current
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
    assert rows_px <= s.viewport().height()  # every summary row, the deltas too, in view
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
    assert len(verdicts) == 1  # the built-in table gives no critical ratio for any corner
    assert t.notes.text().count(verdicts.pop()) == 1
    assert {t.cell(r, 6) for r in range(t.table.rowCount())} == {"(see note)"}


def test_scale_bar_is_a_round_length_at_the_zoom(window, qtbot):
    from profilebench.gui.canvas import scale_bar_length

    c = window.canvas
    for factor in (1.0, 3.0, 0.4):
        c.zoom(factor)
        c.repaint()
        length, px = c.scale_bar
        assert px == pytest.approx(length * c.view.scale)  # true to the drawing's scale
        mm = round(length * 1000, 6)
        mantissa = mm / 10 ** math.floor(math.log10(mm))
        assert round(mantissa, 6) in (1.0, 2.0, 5.0)
        assert 0.6 * 110 <= px <= 1.6 * 110
    # 1 px per mm: a 110 px bar is 100 mm (nearest of 50, 100, 200 in log terms)
    assert scale_bar_length(1000.0) == pytest.approx(0.1)


def test_radius_readout_drawn_on_its_own_box(window, qtbot):
    w = window
    corner = next(c for c in w.analysis.corners if c.radius > 0)
    w.select_node(corner.node)
    qtbot.waitUntil(lambda: w.canvas.up_to_date, timeout=ANALYSIS_TIMEOUT_MS)
    img = w.canvas.grab().toImage()
    box = w.canvas.radius_readout
    assert box is not None
    dpr = img.devicePixelRatioF()
    colours = [
        img.pixelColor(int(x * dpr), int(y * dpr))
        for x in range(int(box.left()) + 2, int(box.right()) - 1)
        for y in range(int(box.top()) + 2, int(box.bottom()) - 1)
    ]
    white = sum(1 for q in colours if min(q.red(), q.green(), q.blue()) > 230)
    blue = sum(1 for q in colours if q.blue() > 120 and q.red() < 80)  # the readout's text
    assert white > 0.5 * len(colours) and blue > 0


def test_cp_scale_setting_fixed_remembered_and_exported(
    window, qtbot, tmp_path, settings, monkeypatch
):
    import profilebench.plotting as plotting

    w = window
    assert w.canvas._cp_norm(w.analysis.flow.inviscid.cp).vmin == -3.0  # the default of every page
    assert w.set_cp_scale(-2.0)
    assert w.canvas._cp_norm(w.analysis.flow.inviscid.cp).vmin == -2.0  # not from the data
    assert float(settings.value("cp_scale_min")) == -2.0
    got = {}
    real = plotting.review_figure
    monkeypatch.setattr(plotting, "review_figure", lambda a, **kw: got.update(kw) or real(a, **kw))
    assert w.export_image(tmp_path / "page.png")
    assert got["cp_min"] == -2.0
    assert not w.set_cp_scale(0.5)  # refused, named
    assert "Cp colour scale" in w.last_message
    assert w.canvas.cp_min == -2.0


def test_search_shows_a_busy_bar_that_cancels(window, qtbot):
    w = window
    corner = next(c for c in w.analysis.corners if c.radius > 0 and c.convex)
    w.find_smallest_radius(corner.node)
    assert w.progress.isVisible() and w.progress.kind == "search"
    assert w.progress.bar.maximum() == 0  # busy mode: no fraction is claimed
    qtbot.mouseClick(w.progress.cancel_button, Qt.LeftButton)
    assert not w.progress.isVisible()
    assert w.searches.get(corner.node) is None
    assert w.corner_table.message.text() == "search cancelled"
    qtbot.waitUntil(lambda: not w.search_runner.busy, timeout=ANALYSIS_TIMEOUT_MS)
    qtbot.wait(50)
    assert w.searches.get(corner.node) is None  # its result was not shown


def test_long_analysis_shows_the_busy_bar_and_cancel_marks_stale(window, qtbot):
    w = window
    corner = next(c for c in w.analysis.corners if c.radius > 0)
    w.set_radius(corner.node, corner.radius * 1.3)
    assert w.runner.busy  # the child takes tens of ms at least
    w._long_analysis()  # as the timer does after LONG_WORK_MS
    assert w.progress.kind == "analysis" and w.progress.isVisible()
    qtbot.mouseClick(w.progress.cancel_button, Qt.LeftButton)
    assert w.canvas.stale and "analysis cancelled" in w.last_message


def test_canvas_labels_clear_of_each_other_the_outline_and_the_ground(window, qtbot):
    """The canvas places its corner labels as the page does; checked with shapely."""
    from shapely.geometry import Polygon, box

    from profilebench.gui.canvas_overlay import render_overlay

    w = window
    qtbot.waitUntil(lambda: w.canvas.up_to_date, timeout=ANALYSIS_TIMEOUT_MS)
    c = w.canvas
    scene = c._scene()  # what the overlay worker draws, drawn here
    render_overlay(scene)
    rects = [box(r.left(), r.top(), r.right(), r.bottom()) for r in scene._label_rects]
    assert len(rects) == len(w.analysis.corners)
    inv = w.analysis.flow.inviscid
    body = Polygon([c.view.to_screen(x, y) for x, y in zip(inv.x, inv.y)]).buffer(0)
    _, sy = c.view.to_screen(0.0, 0.0)
    strip = box(0, sy, c.width(), sy + 14)  # the hatched ground strip as drawn
    for i, r in enumerate(rects):
        assert not r.intersects(body)
        assert not r.intersects(strip)
        for r2 in rects[i + 1 :]:
            assert not r.intersects(r2)
