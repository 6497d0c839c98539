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
