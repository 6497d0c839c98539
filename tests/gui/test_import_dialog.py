"""The import dialog: the fit previewed over the points, the tolerance refitting on change, the
largest deviation shown, OK only for a valid fit; and the editor's import through it.

The reference for the fit is the rounded box the points were sampled from (its four corners)
and shapely's distances from the points to the fitted outline.
"""

import numpy as np
import pytest
import shapely
from PySide6.QtWidgets import QDialog

from gui_helpers import ANALYSIS_TIMEOUT_MS, wait_current
from profilebench.geometry import build_outline, rounded_box
from profilebench.io import import_points_csv

BOX = rounded_box(4.0, 1.8, (0.2, 0.05, 0.05, 0.1), clearance=0.2)


def _box_csv(path):
    o = build_outline(BOX)
    n = int(o.length / 0.005)
    pts = o.sample(n) + np.random.default_rng(1).normal(0.0, 0.001, (n, 2))
    path.write_text("x_mm,y_mm\n" + "\n".join(f"{x * 1e3:.3f},{y * 1e3:.3f}" for x, y in pts))
    return path


def _dialog(qtbot, path, tolerance_mm=5.0):
    from profilebench.gui.import_dialog import ImportDialog

    d = ImportDialog(import_points_csv(path), path.stem, ground=True, tolerance_mm=tolerance_mm)
    qtbot.addWidget(d)
    d.show()
    qtbot.waitUntil(lambda: not d.fitting, timeout=ANALYSIS_TIMEOUT_MS)
    return d


def test_the_dialog_previews_a_valid_fit_with_its_largest_deviation(qtbot, tmp_path):
    d = _dialog(qtbot, _box_csv(tmp_path / "box.csv"))
    pv = d.preview
    assert pv.ok and d.ok_button.isEnabled()
    assert len(pv.profile.nodes) == 4 and pv.corners == 4
    # the deviation shown is the fit's, and shapely agrees every point is that close
    pts = d.points_import.points
    ring = shapely.LinearRing(build_outline(pv.profile).sample(8000))
    worst = float(np.max(shapely.distance(shapely.points(pts), ring)))
    assert worst <= pv.max_deviation + 1e-4 and pv.max_deviation <= 0.005
    assert f"{pv.max_deviation * 1e3:.1f} mm" in d.status.text()
    assert "tolerance 5.0 mm" in d.status.text()
    d.grab().save(str(tmp_path / "import_dialog.png"))


def test_a_changed_tolerance_refits_and_the_newest_wins(qtbot, tmp_path):
    d = _dialog(qtbot, _box_csv(tmp_path / "box.csv"))
    first = d.preview
    d.tolerance.setValue(12.0)
    d.tolerance.setValue(8.0)  # typed on: only the last value counts
    assert not d.ok_button.isEnabled()
    qtbot.waitUntil(lambda: not d.fitting and d.preview is not first, timeout=ANALYSIS_TIMEOUT_MS)
    assert d.preview.tolerance == pytest.approx(0.008)
    assert "tolerance 8.0 mm" in d.status.text() and d.ok_button.isEnabled()


def test_an_outline_that_gives_no_valid_profile_cannot_be_accepted(qtbot, tmp_path):
    bad = tmp_path / "crossing.csv"
    bad.write_text("x_mm,y_mm\n0,300\n4000,1500\n4000,300\n0,1500\n")
    d = _dialog(qtbot, bad)
    assert not d.preview.ok and not d.ok_button.isEnabled()
    assert "Cannot load" in d.status.text() and "cross" in d.status.text()
    d.accept()  # even forced, nothing is accepted
    assert d.result() != QDialog.DialogCode.Accepted


def test_the_editor_imports_through_the_dialog_and_cancel_changes_nothing(window, qtbot, tmp_path):
    w = window
    wait_current(qtbot, w)
    before = w.document.profile
    path = _box_csv(tmp_path / "van.csv")
    seen = []

    def cancel(dialog):
        qtbot.waitUntil(lambda: not dialog.fitting, timeout=ANALYSIS_TIMEOUT_MS)
        seen.append(dialog.preview)
        return False

    w.run_import_dialog = cancel
    assert not w.import_points_with_dialog(path)
    assert seen[0].ok and w.document.profile == before

    def accept(dialog):
        qtbot.waitUntil(lambda: not dialog.fitting, timeout=ANALYSIS_TIMEOUT_MS)
        dialog.accept()
        return dialog.result() == QDialog.DialogCode.Accepted

    w.pin_baseline()
    w.run_import_dialog = accept
    assert w.import_points_with_dialog(path)
    wait_current(qtbot, w)
    assert len(w.document.profile.nodes) == 4 and w.document.baseline is None


def test_cancel_while_a_fit_runs_returns_at_once_and_drops_the_late_result(qtbot, tmp_path):
    import time

    from profilebench.gui.import_dialog import ImportDialog

    d = ImportDialog(import_points_csv(_box_csv(tmp_path / "box.csv")), "box")
    qtbot.addWidget(d)
    d.show()
    assert d.fitting
    t0 = time.perf_counter()
    d.reject()
    assert time.perf_counter() - t0 < 1.0
    assert d.result() == QDialog.DialogCode.Rejected
    qtbot.wait(1500)  # the fit comes back meanwhile: nothing is shown
    assert d.preview is None


def test_the_dialog_rings_the_corners_whose_radius_the_points_leave_open(qtbot, tmp_path):
    # the courier van digitised (5 mm, 1 mm of noise): the underbody rear fillet (r 50 mm,
    # turning about 22 degrees) cannot be fixed by such points; the dialog says which radii they
    # allow and rings the node (profilebench.geometry.radius_bounds)
    from profilebench.io import load_project, sample_paths

    van = load_project(next(p for p in sample_paths() if p.stem == "kestrel_courier_van"))
    o = build_outline(van.profile)
    n = int(o.length / 0.005)
    pts = o.sample(n) + np.random.default_rng(0).normal(0.0, 0.001, (n, 2))
    path = tmp_path / "van.csv"
    path.write_text("x_mm,y_mm\n" + "\n".join(f"{x * 1e3:.3f},{y * 1e3:.3f}" for x, y in pts))
    from profilebench.gui.import_dialog import ImportDialog

    d = ImportDialog(import_points_csv(path), path.stem, ground=True, conditions=van.conditions)
    qtbot.addWidget(d)
    d.show()
    qtbot.waitUntil(lambda: not d.fitting, timeout=ANALYSIS_TIMEOUT_MS)
    pv = d.preview
    assert pv.ok and pv.unresolved_nodes
    # with the document's conditions the dialog gives the Cd at both ends of each open range:
    # the underbody rear decides it (sharp 0.29 against about 0.35 rounded)
    rear_line = next(line for line in pv.effect_lines if "(4100, 180) mm" in line)
    assert "sharp: Cd" in rear_line and "across the range" in rear_line
    assert rear_line in d.notes.text()
    rear = [pv.profile.nodes[i] for i in pv.unresolved_nodes]
    assert any(abs(nd.x - 4.1) < 0.01 and abs(nd.y - 0.18) < 0.01 for nd in rear)
    assert "(4100, 180) mm: fitted sharp, but the points allow" in d.notes.text()
    assert any("radius not fixed by the points" in w.text() for w in d.findChildren(type(d.notes)))
    d.resize(900, 520)
    d.grab().save(str(tmp_path / "import_dialog_open_radii.png"))
