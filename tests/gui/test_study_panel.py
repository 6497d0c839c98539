"""The study dock driven like a user: a short radius sweep on the hatchback sample, its chart and
table checked against the study engine called directly, cancelling mid-run, loading a point from
the chart (undoable), the corner following the editor's selection, and the chart's export.

Low panel counts: the physics is not the point here (tests/studies and tests/assess check it).
"""

import math
import multiprocessing
import os

import pytest
from PySide6.QtCore import QPoint, Qt

from profilebench.editor import commands
from profilebench.editor.document import CAUTION
from profilebench.studies import PointCache, PointStatus, radius_range, radius_sweep

from gui_helpers import ANALYSIS_TIMEOUT_MS, wait_current

BONNET = 11  # the hatchback sample's "bonnet leading edge" corner
POINTS = 3
#: one cache for the tests that run the same sweep (the first fills it, the others reuse it)
SHARED = PointCache()


@pytest.fixture
def panel(window, qtbot):
    """The window at 120 panels with the study dock in front and a fresh point cache."""
    w = window
    w.push(commands.set_conditions(w.document.state, w.document.conditions.replace(panels=120)))
    wait_current(qtbot, w)
    w.show_study_panel()
    p = w.study_panel
    qtbot.waitUntil(lambda: p.isVisible() and p.chart.width() > 200)
    p.cache = SHARED
    p.follow_node(BONNET)
    p.points.setValue(POINTS)
    p.workers.setValue(1)
    return p


def _finish(qtbot, p):
    qtbot.waitUntil(lambda: not p.running, timeout=ANALYSIS_TIMEOUT_MS)
    qtbot.waitUntil(
        lambda: p.drawn_table is p.table and not p.renderer.busy, timeout=ANALYSIS_TIMEOUT_MS
    )


def _default_radii(w):
    """The radii the panel's defaults give: 0 to the largest fitting radius (whole mm)."""
    top = radius_range(w.document.profile, BONNET, points=2)[-1]
    return radius_range(w.document.profile, BONNET, 0.0, math.floor(top * 1e3) / 1e3, POINTS)


def test_a_short_radius_sweep_fills_the_chart_and_agrees_with_the_engine(window, panel, qtbot):
    w, p = window, panel
    assert p.parameter == "radius" and p.node == BONNET
    assert "bonnet leading edge" in p.corner.currentText()
    assert p.run()
    assert p.running and not p.run_button.isEnabled() and p.cancel_button.isEnabled()
    _finish(qtbot, p)
    # the same sweep by a direct call of the engine, computed afresh (its own cache)
    direct = radius_sweep(
        w.document.profile,
        w.document.conditions,
        BONNET,
        radii=_default_radii(w),
        workers=1,
        cache=PointCache(),
    )
    t = p.table
    assert t.values.tolist() == direct.values.tolist()
    assert t.cd.tolist() == direct.cd.tolist()
    assert t.knee == direct.knee
    assert t.smallest_attached_radius == direct.smallest_attached_radius
    # the status line says what the engine found
    text = p.status.text()
    assert text.startswith(f"done: {POINTS} of {POINTS} points")
    if direct.knee.found:
        assert f"knee at {direct.knee.radius * 1e3:.0f} mm" in text
    else:
        assert "no knee in range" in text
    if direct.smallest_attached_radius is not None:
        assert f"smallest attached radius {direct.smallest_attached_radius * 1e3:.1f} mm" in text
    # the table: a row per point, Cd as the engine gives it
    assert p.point_table.rowCount() == POINTS
    for i in range(POINTS):
        assert p.point_table.item(i, 1).text() == f"{float(direct.cd[i]):.4f}"
        assert p.point_table.item(i, 4).text() == direct.status[i].value
    # the chart: an image with a marker per successful point in each of the Cd and CdA plots
    assert p.image is not None and not p.image.isNull()
    assert len(p.points_px) == 2 * int(direct.ok.sum())
    assert p.bar.text() == f"{POINTS} of {POINTS} points"
    assert not p.note.isVisible()  # the chart is of the editor's outline


def _child_pids():
    """This process's child processes (Linux /proc/<pid>/task/<tid>/children), but
    multiprocessing's resource tracker, which a process keeps once it spawned anything (Python's
    multiprocessing documentation, "resource tracker")."""
    me, out = os.getpid(), set()
    for task in os.listdir(f"/proc/{me}/task"):
        try:
            with open(f"/proc/{me}/task/{task}/children") as fh:
                out |= {int(pid) for pid in fh.read().split()}
        except OSError:  # a thread that ended meanwhile
            continue
    kept = set()
    for pid in out:
        try:
            with open(f"/proc/{pid}/cmdline", "rb") as fh:
                command = fh.read()
        except OSError:
            continue
        if b"resource_tracker" not in command:
            kept.add(pid)
    return kept


@pytest.mark.skipif(not os.path.exists("/proc/self/task"), reason="reads /proc (Linux)")
def test_cancel_mid_run_leaves_no_worker_process_and_the_window_responds(window, panel, qtbot):
    w, p = window, panel
    p.cache = PointCache()  # nothing cached: every point runs on the workers
    p.points.setValue(24)
    p.workers.setValue(2)
    before, mp_before = _child_pids(), set(multiprocessing.active_children())
    assert p.run()
    qtbot.waitUntil(lambda: p.run_record.done >= 2, timeout=ANALYSIS_TIMEOUT_MS)
    # the points so far are shown as they arrive: the table, the status, a chart asked for
    assert p.point_table.rowCount() == p.run_record.done == len(p.table)
    assert p.status.text().startswith(f"running: {p.run_record.done} of 24 points")
    assert p.partial_draws >= 1
    p.cancel()
    assert "cancelling" in p.status.text()
    qtbot.waitUntil(lambda: not p.running, timeout=ANALYSIS_TIMEOUT_MS)
    r = p.run_record
    assert r.stats.cancelled and r.done < 24
    assert PointStatus.CANCELLED in p.table.status
    assert p.status.text().startswith("cancelled:")
    assert set(multiprocessing.active_children()) - mp_before == set()
    assert _child_pids() - before == set()
    assert p.run_button.isEnabled() and not p.cancel_button.isEnabled()
    # the editor still edits and undoes
    old = w.document.profile.nodes[BONNET].radius
    w.set_radius(BONNET, 0.05)
    assert w.document.profile.nodes[BONNET].radius == 0.05
    w.undo_stack.undo()
    assert w.document.profile.nodes[BONNET].radius == old


def test_clicking_a_point_loads_its_variant_and_undo_restores(window, panel, qtbot):
    w, p = window, panel
    old_radius = w.document.profile.nodes[BONNET].radius
    steps = w.undo_stack.count()
    assert p.run()
    _finish(qtbot, p)
    k = POINTS - 1
    x, y = p.chart_position(k)
    qtbot.mouseClick(p.chart, Qt.LeftButton, pos=QPoint(round(x), round(y)))
    assert w.undo_stack.count() == steps + 1
    assert w.document.profile == p.table.profiles[k]
    assert w.document.profile.nodes[BONNET].radius == pytest.approx(float(p.table.values[k]))
    assert w.undo_stack.undoText().startswith("Load study point: bonnet leading edge radius")
    # the chart is of the outline the run started from, which the editor no longer shows
    assert p.note.isVisible() and "outline" in p.note.text()
    # a click away from every point loads nothing
    qtbot.mouseClick(p.chart, Qt.LeftButton, pos=QPoint(2, 2))
    assert w.undo_stack.count() == steps + 1
    w.undo_stack.undo()
    assert w.document.profile.nodes[BONNET].radius == old_radius
    assert not p.note.isVisible()


def test_the_corner_follows_the_selection_on_the_canvas_and_in_the_table(window, panel, qtbot):
    w, p = window, panel
    c = w.canvas
    pos = c.screen_of_node(9)  # the windscreen base
    qtbot.mouseClick(c, Qt.LeftButton, pos=QPoint(round(pos.x()), round(pos.y())))
    assert w.document.selection.node == 9
    assert p.node == 9 and "windscreen base" in p.corner.currentText()
    top = radius_range(w.document.profile, 9, points=2)[-1]
    assert p.last.text() == f"{math.floor(top * 1e3):g}"  # the range follows the corner
    row = w.corner_table.row_of_node(BONNET)
    w.corner_table.table.selectRow(row)
    assert w.document.selection.node == BONNET and p.node == BONNET


def test_a_bad_range_is_refused_with_its_reason(panel):
    p = panel
    p.last.setText("5000")
    assert not p.run()
    assert "does not fit" in p.status.text() and not p.running


def test_the_exported_chart_carries_the_caution(window, panel, qtbot, tmp_path):
    import matplotlib

    p = panel
    assert not p.export_chart(tmp_path / "early.svg")  # nothing to export before a run
    assert p.run()
    qtbot.waitUntil(lambda: not p.running, timeout=ANALYSIS_TIMEOUT_MS)
    out = tmp_path / "study.svg"
    with matplotlib.rc_context({"svg.fonttype": "none"}):  # text kept as text in the SVG
        assert p.export_chart(out)
    svg = out.read_text()
    assert CAUTION.split()[0] in svg and "corner radius (mm)" in svg
    assert CAUTION[:40].split(",")[0] in svg


def test_closing_the_window_stops_a_running_study(panel, qtbot):
    p = panel
    p.cache = PointCache()
    p.points.setValue(24)
    assert p.run()
    assert p.shutdown(ANALYSIS_TIMEOUT_MS)  # what the window's shutdown calls
    assert not p.run_record.thread.is_alive()
    qtbot.waitUntil(lambda: not p.running, timeout=ANALYSIS_TIMEOUT_MS)
    assert p.run_record.stats.cancelled and p.run_record.done < 24
