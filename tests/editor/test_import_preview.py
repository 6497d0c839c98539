"""The import dialog's data without Qt (profilebench.editor.import_preview): a fit with its
drawing points and summary, or the reason there is nothing to load.

The reference is the rounded box the points were sampled from: its four corners, and shapely's
distance from every point to the fitted outline.
"""

import pickle

import numpy as np
import shapely

from profilebench.editor.import_preview import fit_preview
from profilebench.geometry import build_outline, rounded_box


def _box_points():
    o = build_outline(rounded_box(4.0, 1.8, (0.2, 0.05, 0.05, 0.1), clearance=0.2))
    n = int(o.length / 0.005)
    return o.sample(n) + np.random.default_rng(2).normal(0.0, 0.001, (n, 2))


def test_a_valid_fit_comes_with_its_outline_counts_and_deviation():
    pts = _box_points()
    pv = fit_preview(pts, 0.005, ground=True, name="box")
    assert pv.ok and pv.error == "" and pv.corners == 4 and pv.smooth == 0
    ring = shapely.LinearRing(pv.outline)
    assert float(np.max(shapely.distance(shapely.points(pts), ring))) <= pv.max_deviation + 5e-4
    assert "4 nodes (4 corners, 0 smooth)" in pv.summary()
    assert f"largest deviation {pv.max_deviation * 1e3:.1f} mm" in pv.summary()
    # it travels to the editor's child process and back
    assert pickle.loads(pickle.dumps(pv)).summary() == pv.summary()


def test_points_that_give_no_profile_come_back_with_the_reason_and_nothing_to_load():
    pv = fit_preview([(0.0, 0.3), (4.0, 1.5), (4.0, 0.3), (0.0, 1.5)], 0.005)
    assert not pv.ok and pv.profile is None and "cross" in pv.error
    assert pv.summary().startswith("Cannot load this outline")
    low = fit_preview(_box_points() - np.array([0.0, 0.3]), 0.005, ground=True)
    assert not low.ok and "ground" in low.error
