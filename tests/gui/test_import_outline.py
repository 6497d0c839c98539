"""The editor's import of a digitised outline: fitted, the old baseline and selection cleared,
one undo step, an outline that cannot be fitted never loaded."""

import numpy as np

from gui_helpers import wait_current
from profilebench.geometry import build_outline, rounded_box


def _box_csv(path):
    o = build_outline(rounded_box(4.0, 1.8, (0.2, 0.05, 0.05, 0.1), clearance=0.2))
    n = int(o.length / 0.005)
    pts = o.sample(n) + np.random.default_rng(1).normal(0.0, 0.001, (n, 2))
    path.write_text("x_mm,y_mm\n" + "\n".join(f"{x * 1e3:.3f},{y * 1e3:.3f}" for x, y in pts))
    return path


def test_import_fits_the_outline_and_clears_the_baseline_and_selection(window, qtbot, tmp_path):
    w = window
    wait_current(qtbot, w)
    w.pin_baseline()
    w.select_node(1)
    assert w.document.baseline is not None and w.document.selection.node == 1
    before = w.document.profile
    assert w.import_points(_box_csv(tmp_path / "van.csv"))
    wait_current(qtbot, w)
    p = w.document.profile
    assert len(p.nodes) == 4 and all(nd.label for nd in p.nodes)
    assert w.document.baseline is None
    assert w.document.selection.node is None
    w.undo_stack.undo()
    assert w.document.profile == before


def test_an_outline_that_cannot_be_fitted_is_not_loaded(window, qtbot, tmp_path):
    w = window
    wait_current(qtbot, w)
    before = w.document.profile
    bad = tmp_path / "crossing.csv"
    bad.write_text("x_mm,y_mm\n0,300\n4000,1500\n4000,300\n0,1500\n")
    assert not w.import_points(bad)
    assert w.document.profile == before


def test_the_radii_an_import_leaves_open_go_into_the_project_notes(window, qtbot, tmp_path):
    # a box with a sharp rear upper corner turning 90 degrees: its points (1 mm of noise) allow
    # a radius of several mm there (measured on the test body's: up to 7-9 mm), above the 5 mm
    # tolerance, so the fit lists it as open; the editor keeps that in the project's notes
    o = build_outline(rounded_box(4.0, 1.8, (0.2, 0.0, 0.05, 0.1), clearance=0.2))
    n = int(o.length / 0.005)
    pts = o.sample(n) + np.random.default_rng(1).normal(0.0, 0.001, (n, 2))
    path = tmp_path / "sharp.csv"
    path.write_text("x_mm,y_mm\n" + "\n".join(f"{x * 1e3:.3f},{y * 1e3:.3f}" for x, y in pts))
    w = window
    wait_current(qtbot, w)
    assert w.import_points(path)
    wait_current(qtbot, w)
    notes = w.document.notes
    assert "Imported from sharp.csv: radii the points do not fix" in notes
    assert "(4000, 2000) mm: fitted sharp, but the points allow any radius up to" in notes
    assert w.document.to_project().notes == notes
