"""The editor window driven like a user: real mouse events, typed entries, files (headless)."""

import numpy as np
import pytest
from PySide6.QtCore import QPoint, Qt

from profilebench.editor.document import CAUTION
from profilebench.io import default_sample_path, load_project

from gui_helpers import ANALYSIS_TIMEOUT_MS, wait_current


def _pt(qpointf):
    return QPoint(round(qpointf.x()), round(qpointf.y()))


def drag(qtbot, canvas, start, end, steps=10):
    """Press at ``start``, move in ``steps`` real mouse moves to ``end``, release (screen px)."""
    qtbot.mousePress(canvas, Qt.LeftButton, pos=_pt(start))
    for k in range(1, steps + 1):
        f = k / steps
        p = start + (end - start) * f
        qtbot.mouseMove(canvas, pos=_pt(p))
    qtbot.mouseRelease(canvas, Qt.LeftButton, pos=_pt(end))


def _movable_node(w):
    """A node in the middle of the roof, away from corners (the sample's 'roof' labels)."""
    prof = w.document.profile
    ys = [n.y for n in prof.nodes]
    return int(np.argmax(ys))


def test_window_opens_with_the_sample_analysed(window):
    w = window
    sample = load_project(default_sample_path())
    assert w.document.profile == sample.profile
    assert w.analysis is not None and w.analysis.success
    assert w.analysis.profile == sample.profile
    # the table has one row per corner the pipeline reported, the summary the pipeline's Cd
    assert w.corner_table.table.rowCount() == len(w.analysis.corners) > 0
    assert w.summary.value("Cd") == f"{w.analysis.drag.cd:.4f}"
    assert w.caution.text() == CAUTION and w.caution.isVisible()
    assert not w.banner.isVisible()


def test_drag_a_node_with_the_mouse_then_undo(window, qtbot):
    w = window
    c = w.canvas
    i = _movable_node(w)
    before = w.document.profile
    old_cd = w.analysis.drag.cd
    start = c.screen_of_node(i)
    end = start + type(start)(0, -25)  # 25 px up
    drag(qtbot, c, start, end, steps=12)
    moved = w.document.profile
    assert moved != before
    dy = (moved.nodes[i].y - before.nodes[i].y) * c.view.scale
    assert dy == pytest.approx(25, abs=1.0)  # screen y runs down, so up is +y in metres
    assert w.undo_stack.count() == 1  # the whole drag is one undo step
    wait_current(qtbot, w)
    assert w.analysis.profile == moved and w.analysis.drag.cd != old_cd
    w.undo_stack.undo()
    assert w.document.profile == before  # exact: the very same node values
    assert w.document.profile.nodes[i] == before.nodes[i]
    wait_current(qtbot, w)
    assert w.analysis.drag.cd == pytest.approx(old_cd, rel=1e-12)


def test_radius_entry_changes_the_corner_table(window, qtbot):
    w = window
    corner = next(c for c in w.analysis.corners if c.radius > 0)
    w.select_node(corner.node)
    row = w.corner_table.row_of_node(corner.node)
    new_mm = round(corner.radius * 1000 * 0.5)
    w.node_panel.radius.setText(str(new_mm))
    w.node_panel.radius.editingFinished.emit()
    wait_current(qtbot, w)
    assert w.document.profile.nodes[corner.node].radius == pytest.approx(new_mm / 1000)
    assert w.corner_table.cell(w.corner_table.row_of_node(corner.node), 1) == f"{new_mm:.1f}"
    assert row is not None


def test_bad_radius_entry_is_refused_next_to_the_field(window):
    w = window
    corner = next(c for c in w.analysis.corners if c.radius > 0)
    w.select_node(corner.node)
    before = w.document.profile
    w.node_panel.radius.setText("-3")
    w.node_panel.radius.editingFinished.emit()
    assert "too small" in w.node_panel.error.text()
    assert w.document.profile is before and w.undo_stack.count() == 0


def test_table_row_selects_the_corner_on_the_canvas(window):
    w = window
    node = w.analysis.corners[-1].node
    w.corner_table.table.selectRow(w.corner_table.row_of_node(node))
    assert w.canvas.selected == node and w.document.selection.node == node


def test_save_then_open_gives_the_same_profile(window, qtbot, tmp_path):
    w = window
    w.set_radius(w.analysis.corners[0].node, 0.05)
    w.pin_baseline()
    path = tmp_path / "variant.json"
    assert w.save_to(path)
    assert not w.document.dirty and "*" not in w.windowTitle()
    saved = w.document.state
    assert w.open_file(path)
    assert w.document.profile == saved.profile
    assert w.document.conditions == saved.conditions
    assert w.document.baseline == saved.baseline
    assert str(path.resolve()) in w.recent_files()
    wait_current(qtbot, w)


@pytest.mark.parametrize(
    "suffix, magic", [(".png", b"\x89PNG\r\n\x1a\n"), (".svg", b"<?xml"), (".pdf", b"%PDF")]
)
def test_export_writes_a_non_empty_image(window, tmp_path, suffix, magic):
    # file signatures: PNG (RFC 2083 / ISO 15948), SVG is XML, PDF (ISO 32000 header)
    path = tmp_path / f"view{suffix}"
    assert window.export_image(path)
    data = path.read_bytes()
    assert len(data) > 1000 and data.startswith(magic)


def test_export_surface_csv(window, tmp_path):
    path = tmp_path / "surface.csv"
    assert window.export_surface_csv(path)
    lines = path.read_text().splitlines()
    assert len(lines) > 50


def test_self_intersecting_drag_shows_a_message_and_keeps_the_app_alive(window, qtbot):
    w = window
    c = w.canvas
    good = w.analysis
    i = _movable_node(w)
    start = c.screen_of_node(i)
    lowest = min(n.y for n in w.document.profile.nodes)
    # drag the top node below the underside: the outline must cross itself
    end = type(start)(start.x(), c.view.to_screen(0, lowest * 0.5 + 0.0)[1])
    drag(qtbot, c, start, end, steps=15)
    qtbot.waitUntil(lambda: not w.runner.busy and w.banner.isVisible(), timeout=ANALYSIS_TIMEOUT_MS)
    assert "Analysis not updated" in w.banner.text()
    # the last good result is kept: the one from before the drag, or one of an earlier, valid
    # position of this drag shown while it went on (a superseded result, shown marked stale)
    assert w.analysis.success and w.analysis.profile != w.document.profile
    assert w.analysis is good or w.lagging_shown > 0
    assert c.stale  # ...and drawn marked stale
    w.undo_stack.undo()
    wait_current(qtbot, w)
    assert not w.banner.isVisible() and not c.stale


def test_conditions_change_reanalyses(window, qtbot):
    w = window
    w.conditions_panel.set_value("speed", "150")
    wait_current(qtbot, w)
    # 150 km/h = 150 / 3.6 m/s (SI definition of the km/h)
    assert w.analysis.conditions.speed == pytest.approx(150 / 3.6)
    w.undo_stack.undo()
    assert w.conditions_panel.fields["speed"].text() == f"{w.document.conditions.speed * 3.6:.5g}"


def test_side_relief_switch_reanalyses_with_the_2d_underbody(window, qtbot, tmp_path):
    w = window
    box = w.conditions_panel.side_relief
    assert box.isChecked() == w.document.conditions.side_relief
    before = w.analysis
    box.setChecked(not box.isChecked())
    wait_current(qtbot, w)
    assert w.analysis.conditions.side_relief is box.isChecked()
    relieved = w.analysis if box.isChecked() else before
    flat = before if box.isChecked() else w.analysis
    # the hatch (the default sample) has a width: with the relief its lift is the relieved one
    assert relieved.flow.underbody is not None and relieved.flow.underbody.applied
    assert flat.flow.underbody is None and flat.drag.cl < relieved.drag.cl
    w.conditions_panel.grab().save(str(tmp_path / "conditions_panel.png"))
    w.undo_stack.undo()
    assert box.isChecked() == w.document.conditions.side_relief


def test_base_pressure_from_the_layer_reanalyses_and_undoes(window, qtbot, tmp_path):
    w = window
    combo = w.conditions_panel.base_model
    assert w.document.conditions.base_model == "constant" and combo.currentIndex() == 0
    before = w.analysis
    assert before.drag.base_pressure == w.document.conditions.base_pressure
    combo.setCurrentIndex(1)  # the 3D base's correlation
    wait_current(qtbot, w)
    a = w.analysis
    assert a.conditions.base_model == "body" and a.success
    # the base pressure now comes from the layers at separation, not the constant
    assert a.drag.base_pressure != before.drag.base_pressure
    assert a.drag.base_pressure == a.flow.base_estimate.cp_b
    assert a.drag.cd_base != before.drag.cd_base
    path = tmp_path / "conditions_panel_base.png"
    w.conditions_panel.grab().save(str(path))
    assert path.stat().st_size > 0
    w.undo_stack.undo()
    assert w.document.conditions.base_model == "constant" and combo.currentIndex() == 0


def test_invalid_condition_shows_why_and_changes_nothing(window):
    w = window
    before = w.document.conditions
    w.conditions_panel.set_value("h_separation", "3.5")
    err = w.conditions_panel.errors["h_separation"]
    assert not err.isHidden() and "outside the allowed range" in err.text()
    assert w.document.conditions is before and w.undo_stack.count() == 0


def test_click_on_a_segment_inserts_a_node_and_delete_key_removes_it(window, qtbot):
    w = window
    c = w.canvas
    prof = w.document.profile
    n = len(prof)
    a, b = np.array(prof.xy[0]), np.array(prof.xy[1])
    # the chord's midpoint between the first two nodes
    mid = c.view.to_screen(*(0.5 * (a + b)))
    qtbot.mouseClick(c, Qt.LeftButton, pos=QPoint(round(mid[0]), round(mid[1])))
    assert len(w.document.profile) == n + 1
    assert w.document.selection.node == 1
    c.setFocus()
    qtbot.keyClick(c, Qt.Key_Delete)
    assert w.document.profile == prof
    assert w.undo_stack.count() == 2


def test_baseline_pinned_shows_deltas(window, qtbot):
    w = window
    w.pin_baseline()
    corner = next(c for c in w.analysis.corners if c.radius > 0)
    w.set_radius(corner.node, corner.radius * 0.5)
    wait_current(qtbot, w)
    qtbot.waitUntil(
        lambda: w.baseline_analysis is not None and w.summary.value("ΔCd") is not None,
        timeout=ANALYSIS_TIMEOUT_MS,
    )
    delta = float(w.summary.value("ΔCd"))
    assert delta == pytest.approx(w.analysis.drag.cd - w.baseline_analysis.drag.cd, abs=1e-4)


def test_unsaved_changes_prompt_on_close(window):
    w = window
    w.set_radius(w.analysis.corners[0].node, 0.04)
    asked = []
    w.ask_unsaved = lambda: asked.append(w.document.title) or "cancel"
    assert not w.close()  # cancelled: the window stays
    assert asked == [w.document.title] and asked[0].endswith("*") and w.isVisible()
    w.ask_unsaved = lambda: "discard"
    assert w.close()


def test_a_long_drag_shows_superseded_results_marked_stale_then_the_final_one(window, qtbot):
    w = window
    c = w.canvas
    seen = []  # (canvas stale, shown analysis is for the current outline) at each lagging result
    w.runner.lagging.connect(
        lambda g, a, s: seen.append((c.stale, w.analysis_state == w.document.state))
    )
    i = _movable_node(w)
    start = c.screen_of_node(i)
    qtbot.mousePress(c, Qt.LeftButton, pos=_pt(start))
    # keep dragging (small moves every 10 ms, faster than an analysis; no position twice) until
    # a superseded result has been shown, for at most 600 moves
    k = 0

    def at(k):
        return start + type(start)(k % 8, -(k // 8))

    while not seen and k < 600:
        k += 1
        qtbot.mouseMove(c, pos=_pt(at(k)))
        qtbot.wait(10)
    end = at(k)
    qtbot.mouseRelease(c, Qt.LeftButton, pos=_pt(end))
    assert seen, "no analysis came back during a 6 s drag"
    # each was drawn marked stale: it is for an earlier position than the one on screen
    assert all(stale and not current for stale, current in seen)
    assert w.lagging_shown >= 1
    wait_current(qtbot, w)
    assert not c.stale and w.analysis.profile == w.document.profile
    assert w.undo_stack.count() == 1  # the whole drag is one undo step


def test_drag_reuses_a_nearby_radius_search_and_the_final_outline_gets_its_own(
    window, qtbot, tmp_path
):
    from profilebench.assess.analysis import analyze

    from sample_variants import bubble_van_project
    from profilebench.io import save_project

    w = window
    van = save_project(bubble_van_project(), tmp_path / "bubble_van.json")
    assert w.open_file(van)
    wait_current(qtbot, w)
    assert w.analysis.radius_searches and not w.analysis.provisional
    got = []
    w.runner.finished.connect(lambda g, a, s: got.append(a))
    w.runner.lagging.connect(lambda g, a, s: got.append(a))
    c = w.canvas
    start = c.screen_of_node(_movable_node(w))
    drag(qtbot, c, start, start + type(start)(0, -6), steps=6)
    wait_current(qtbot, w)
    # during the drag: the van's corner bubble took its smallest attached radius from the
    # search of the outline before the drag (no new search per move) ...
    assert any(a.provisional for a in got)
    # ... and the final outline was analysed again with its own search
    final = w.analysis
    assert final.profile == w.document.profile and not final.provisional
    here = analyze(w.document.profile, w.document.conditions)
    assert final.drag.cd == pytest.approx(here.drag.cd, rel=1e-12)
    assert not c.stale


def test_a_superseded_result_newer_than_a_shown_failure_replaces_its_banner(window):
    w = window
    state = w.document.state
    good = w.analysis
    w._show_banner("Analysis not updated (invalid_geometry): an older outline crossed itself", True)
    # a valid position's analysis arrives after that failure, itself superseded by a newer edit
    w.results.sent(10_000, state)
    n = state.profile.nodes[0]
    w.preview_profile(state.profile.moved(0, n.x, n.y + 0.001))  # the newer edit
    w._analysis_lagging(10_000, good, 0.02)
    assert not w.banner.isVisible() and w.last_message == ""
    assert w.analysis is good and w.canvas.stale and 10_000 not in w.results.requests


def test_find_smallest_radius_takes_the_search_the_shown_analysis_ran(window, qtbot, tmp_path):
    from profilebench.editor.controller import SearchRunning
    from sample_variants import bubble_van_project
    from profilebench.io import save_project

    w = window
    van = save_project(bubble_van_project(), tmp_path / "bubble_van.json")
    assert w.open_file(van)
    wait_current(qtbot, w)
    ran = w.analysis.radius_searches[0]
    requests = []
    w.search_runner.request = lambda *args: requests.append(args)  # no child should be asked
    w.find_smallest_radius(ran.node)
    assert w.searches.get(ran.node) is ran and requests == []
    assert "from the analysis shown" in w.corner_table.message.text()
    # another corner, which the analysis did not search, goes to the search child
    other = next(
        i for i, n in enumerate(w.document.profile.nodes) if not n.smooth and i != ran.node
    )
    w.find_smallest_radius(other)
    assert len(requests) == 1 and isinstance(w.searches.get(other), SearchRunning)
