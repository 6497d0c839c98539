"""The menu bar (profilebench.gui.menus): each entry reaches the window's method with its file."""

import pytest
from PySide6.QtWidgets import QFileDialog, QInputDialog

from gui_helpers import wait_current


def _entry(w, menu, text):
    return next(a for a in w.menus[menu].actions() if a.text() == text)


def test_the_file_entries_hand_their_own_file_on(window, qtbot, tmp_path, monkeypatch):
    w = window
    wait_current(qtbot, w)
    target = tmp_path / "surface.csv"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    _entry(w, "File", "Export surface data (CSV)…").trigger()
    assert target.read_text().startswith("surface,s,x,y")
    missing = tmp_path / "no_such_points.csv"
    monkeypatch.setattr(QFileDialog, "getOpenFileName", lambda *a, **k: (str(missing), ""))
    _entry(w, "File", "Import point outline (CSV)…").trigger()  # reaches the import, not an export
    assert w.last_message.startswith(f"cannot import {missing}")
    monkeypatch.setattr(QFileDialog, "getOpenFileName", lambda *a, **k: ("", ""))  # cancelled
    before = w.document.state
    _entry(w, "Underlay", "Load image…").trigger()
    assert w.document.state is before


def test_save_as_and_the_recent_files(window, tmp_path, monkeypatch):
    w = window
    target = tmp_path / "saved.json"
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: (str(target), ""))
    _entry(w, "File", "Save &as…").trigger()
    assert target.exists() and w.document.path == target
    assert w.recent_files() == [str(target.resolve())]
    assert [a.text() for a in w.recent_menu.actions()] == [str(target.resolve())]
    monkeypatch.setattr(QFileDialog, "getSaveFileName", lambda *a, **k: ("", ""))  # cancelled
    assert not _entry(w, "File", "Save &as…").trigger()


def test_the_view_entries_set_the_canvas(window, monkeypatch):
    w = window
    c = w.canvas
    _entry(w, "View", "Snap to grid").trigger()
    assert c.grid == pytest.approx(0.01)
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: ("5", True))
    _entry(w, "View", "Grid spacing…").trigger()
    assert c.grid == pytest.approx(0.005)
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: ("-1", True))
    _entry(w, "View", "Grid spacing…").trigger()  # refused, said in the banner
    assert c.grid == pytest.approx(0.005) and "grid spacing" in w.last_message
    _entry(w, "View", "Cp colour band").trigger()
    assert not c.show_cp
    _entry(w, "View", "Cp offset curve").trigger()
    assert c.cp_offset_curve
    monkeypatch.setattr(QInputDialog, "getText", lambda *a, **k: ("-2.5", True))
    _entry(w, "View", "Cp colour scale…").trigger()
    assert c.cp_min == -2.5


def test_the_refinement_check_reports_what_the_check_gives(window, qtbot, tmp_path, monkeypatch):
    # the report is the command line's (profilebench.plotting.summary.refinement_lines) of the
    # check on the document as it was when the entry was chosen
    from profilebench.assess.refinement import check_refinement
    from profilebench.plotting.summary import refinement_lines

    w = window
    wait_current(qtbot, w)
    profile, conditions = w.document.profile, w.document.conditions
    _entry(w, "Analysis", "Check by &doubling the panels").trigger()
    assert w.progress.kind == "refinement"
    qtbot.waitUntil(lambda: w.refinement_check.report is not None, timeout=120000)
    report = w.refinement_check.report
    expected = check_refinement(profile, conditions, radii=True)
    assert report.text.toPlainText() == "\n".join(refinement_lines(expected))
    assert f"Refinement check: {conditions.panels} against {2 * conditions.panels}" in (
        report.text.toPlainText()
    )
    assert w.progress.kind is None
    report.grab().save(str(tmp_path / "refinement_report.png"))
    w.grab().save(str(tmp_path / "window_after_refinement.png"))
    report.close()
    # the review page exported now starts its notes with the check; after an edit it does not
    from profilebench.plotting.review import refinement_note

    assert w.refinement_check.for_state(w.document.state) is not None
    seen = []
    monkeypatch.setattr(
        "profilebench.plotting.review_figure",
        lambda analysis, **kw: seen.append(kw.get("refinement")) or _blank_figure(),
    )
    assert w.export_image(str(tmp_path / "page.png"))
    assert refinement_note(seen[-1]) == refinement_note(expected)
    w.set_radius(next(c.node for c in w.analysis.corners if c.radius > 0), 0.2)
    assert w.refinement_check.for_state(w.document.state) is None


def _blank_figure():
    from profilebench.plotting.review import new_figure

    return new_figure()
