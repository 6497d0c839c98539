"""profilebench.geometry.polyline against shapely's own lengths, areas and orientation."""

import numpy as np
import pytest
import shapely
from hypothesis import given, settings, strategies as st

from profilebench.geometry import polyline
from profilebench.geometry.shapes import ellipse_points


def _star(n, seed):
    """A simple polygon (star-shaped about its centre) with n uneven points."""
    rng = np.random.default_rng(seed)
    # evenly spaced angles with a jitter under half a step: the centre stays inside, so the
    # polygon is simple
    t = (np.arange(n) + rng.uniform(-0.4, 0.4, n)) * (2 * np.pi / n)
    r = rng.uniform(0.5, 1.5, n)
    return np.column_stack([r * np.cos(t) + 3.0, r * np.sin(t) + 2.0])


@settings(max_examples=30, deadline=None)
@given(n=st.integers(3, 60), seed=st.integers(0, 10_000), reverse=st.booleans())
def test_area_length_and_orientation_match_shapely(n, seed, reverse):
    pts = _star(n, seed)
    if reverse:
        pts = pts[::-1]
    ring = shapely.LinearRing(pts)
    poly = shapely.Polygon(pts)
    assert abs(polyline.signed_area(pts)) == pytest.approx(poly.area, rel=1e-12)
    assert polyline.is_clockwise(pts) == (not ring.is_ccw)
    perimeter, sigma = polyline.arc_length(pts)
    assert perimeter == pytest.approx(ring.length, rel=1e-12)
    assert sigma[0] == 0.0 and np.all(np.diff(sigma) > 0)
    np.testing.assert_allclose(polyline.edge_lengths(pts).sum(), ring.length, rtol=1e-12)


@pytest.mark.parametrize("reverse", [False, True])
def test_outward_normals_point_out_of_the_polygon(reverse):
    pts = ellipse_points(2.0, 0.7, 48, centre=(0.0, 1.0))
    if reverse:
        pts = pts[::-1]
    nrm = polyline.outward_normals(pts)
    mid = polyline.midpoints(pts)
    np.testing.assert_allclose(np.hypot(nrm[:, 0], nrm[:, 1]), 1.0, rtol=1e-14)
    # perpendicular to each edge
    np.testing.assert_allclose(np.einsum("ij,ij->i", nrm, polyline.edges(pts)), 0.0, atol=1e-14)
    poly = shapely.Polygon(pts)
    eps = 1e-4
    assert not shapely.contains(poly, shapely.points(mid + eps * nrm)).any()
    assert shapely.contains(poly, shapely.points(mid - eps * nrm)).all()
