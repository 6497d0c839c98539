"""Fitting an editable profile to a digitised outline (profilebench.geometry.fit).

The reference is the built outline a fit was sampled from (this package's own geometry, exact
to rounding): a digitised box comes back as its four corners with their radii; the fit stays
within its tolerance of the points (shapely distances), is valid (shapely), above the ground,
and the same whichever way round and from whichever point the outline is given.
"""

import numpy as np
import pytest

from profilebench import Conditions, analyze
from profilebench.errors import GeometryError, InputError
from profilebench.geometry import build_outline, explain, rounded_box
from profilebench.geometry.fit import fit_outline
from profilebench.io import load_project, sample_paths

BOX = rounded_box(4.0, 1.8, (0.2, 0.05, 0.05, 0.1), clearance=0.2)


def _digitise(profile, step=0.005, noise=0.001, seed=0):
    o = build_outline(profile)
    n = int(o.length / step)
    return o.sample(n) + np.random.default_rng(seed).normal(0.0, noise, (n, 2))


@pytest.fixture(scope="module")
def box_fit():
    return fit_outline(_digitise(BOX), tolerance=0.005)


def test_a_digitised_box_comes_back_as_its_four_corners_with_their_radii(box_fit):
    p = box_fit.profile
    assert len(p.nodes) == 4 and box_fit.corners == 4 and not box_fit.notes
    want = sorted(nd.radius for nd in BOX.nodes)
    got = sorted(nd.radius for nd in p.nodes)
    # within 10 % of each radius (the round-trip rule)
    assert np.allclose(got, want, rtol=0.10)
    assert box_fit.max_deviation <= box_fit.tolerance
    assert explain(p, ground=True) == []


def test_the_fitted_box_analyses_like_the_box(box_fit):
    cond = Conditions(speed=30.0)
    a, b = analyze(BOX, cond), analyze(box_fit.profile, cond)
    assert a.success and b.success
    assert b.drag.cd == pytest.approx(a.drag.cd, rel=0.01)
    assert [c.verdict for c in b.corners] == [c.verdict for c in a.corners] or sorted(
        c.verdict.name for c in b.corners
    ) == sorted(c.verdict.name for c in a.corners)


@pytest.mark.parametrize("reverse, start", [(True, 0), (False, 1234), (True, 2500)])
def test_any_direction_and_start_point_gives_the_same_profile(box_fit, reverse, start):
    pts = _digitise(BOX)
    if reverse:
        pts = pts[::-1]
    pts = np.roll(pts, start, axis=0)
    other = fit_outline(pts, tolerance=0.005).profile
    a = np.array([(n.x, n.y, n.radius) for n in box_fit.profile.nodes])
    b = np.array([(n.x, n.y, n.radius) for n in other.nodes])
    assert a.shape == b.shape and np.allclose(a, b, atol=1e-9)


def test_millimetres_and_metres_give_the_same_profile(tmp_path, box_fit):
    from profilebench.io import import_points_csv

    pts = _digitise(BOX)
    mm = tmp_path / "box_mm.csv"
    mm.write_text("x_mm,y_mm\n" + "\n".join(f"{x * 1e3:.6f},{y * 1e3:.6f}" for x, y in pts))
    got = import_points_csv(mm).points
    other = fit_outline(got, tolerance=0.005).profile
    a = np.array([(n.x, n.y, n.radius) for n in box_fit.profile.nodes])
    b = np.array([(n.x, n.y, n.radius) for n in other.nodes])
    assert np.allclose(a, b, atol=1e-6)


@pytest.mark.parametrize("name", sorted(p.stem for p in sample_paths()))
def test_every_sample_digitised_fits_to_a_valid_profile_within_the_tolerance(name):
    # the samples' curved runs (bonnets, screens) come back as smooth nodes, their fillets as
    # radii (the round trip's own tests check how close); valid and within the tolerance
    profile = load_project(next(p for p in sample_paths() if p.stem == name)).profile
    pts = _digitise(profile)
    fit = fit_outline(pts, tolerance=0.005)
    assert fit.max_deviation <= 0.005
    assert explain(fit.profile, ground=True) == []
    # the built outline keeps the points' length and height within 0.5 %, or twice the
    # tolerance (each side may lie up to the tolerance from noisy points)
    line = build_outline(fit.profile).sample(4 * len(pts))
    for axis in (0, 1):
        want = np.ptp(pts[:, axis])
        assert abs(np.ptp(line[:, axis]) - want) <= max(0.005 * want, 2 * 0.005)


def test_too_few_points_are_refused():
    with pytest.raises(InputError, match="at least 3"):
        fit_outline([(0.0, 1.0), (1.0, 1.0)])


def test_points_that_cross_themselves_are_refused_with_where():
    bow = [(0.0, 1.0), (1.0, 2.0), (1.0, 1.0), (0.0, 2.0)]
    # the segments 1-2 and 3-4 of this bow tie cross at (0.5, 1.5) m
    with pytest.raises(
        GeometryError,
        match=r"point 1 to point 2 crosses the segment from "
        r"point 3 to point 4 at \(500\.0, 1500\.0\) mm",
    ):
        fit_outline(bow)


def test_an_outline_below_the_ground_is_refused_with_the_point():
    pts = _digitise(BOX) - np.array([0.0, 0.3])
    with pytest.raises(GeometryError, match="below the\\s+ground|on or below"):
        fit_outline(pts, ground=True)
    # with the ground off the same points fit
    assert fit_outline(pts, ground=False).corners == 4


def test_a_bad_tolerance_is_refused():
    with pytest.raises(InputError, match="tolerance"):
        fit_outline(_digitise(BOX), tolerance=0.0)
