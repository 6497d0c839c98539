"""Internals of outline building checked against scipy: spline coefficients and fillet solves."""

import numpy as np
import pytest
from scipy.interpolate import CubicSpline
from scipy.optimize import root

from profilebench.geometry import build_outline
from profilebench.geometry.outline import _newton2, _segments, _Spline
from profilebench.io import load_project
from profilebench.io.samples import sample_paths


@pytest.mark.parametrize("n", [3, 4, 5, 9])
def test_spline_matches_scipy_not_a_knot(n):
    # reference: scipy.interpolate.CubicSpline(bc_type="not-a-knot") on the same chord-length
    # parameter, computed independently of the project's coefficients
    rng = np.random.default_rng(n)
    pts = np.cumsum(rng.random((n, 2)) + 0.05, axis=0)
    spl = _Spline(pts)
    ref = CubicSpline(spl.knots, pts, axis=0, bc_type="not-a-knot")
    t = np.linspace(-0.1 * spl.T, 1.1 * spl.T, 97)  # includes extrapolation past both ends
    for nu in (0, 1, 2):
        np.testing.assert_allclose(
            spl.eval(t, nu), ref(t, nu), rtol=0, atol=1e-12 * (1 + np.abs(ref(t, nu)).max())
        )
    for tk in (0.37 * spl.T, float(spl.knots[1])):
        p, d1, d2 = spl.pdd(tk)
        np.testing.assert_allclose([p, d1, d2], [ref(tk), ref(tk, 1), ref(tk, 2)], atol=1e-12)


def test_newton2_solves_a_known_system():
    # circle x^2 + y^2 = 4 meets the line y = x at (sqrt 2, sqrt 2) (exact solution)
    def f(a, b):
        return a * a + b * b - 4.0, b - a, 2 * a, 2 * b, -1.0, 1.0

    a, b = _newton2(f, 1.0, 1.2)
    assert a == pytest.approx(np.sqrt(2.0), abs=1e-14)
    assert b == pytest.approx(np.sqrt(2.0), abs=1e-14)


def test_newton2_gives_up_on_a_singular_jacobian():
    # x^2 + 1 = 0 has no real root; the Jacobian vanishes at x = 0 (no solution to report)
    def f(a, b):
        return a * a + 1.0, b, 2 * a, 0.0, 0.0, 1.0

    assert _newton2(f, 0.0, 0.0) is None


def _fillet_cases():
    cases = []
    for path in sample_paths():
        prof = load_project(path).profile
        for i, nd in enumerate(prof.nodes):
            if not nd.smooth and nd.radius > 0:
                cases.append(pytest.param(path.stem, i, id=f"{path.stem}-{i}"))
    return cases


@pytest.mark.parametrize("sample,node", _fillet_cases())
def test_fillet_tangent_points_match_scipy_root(sample, node):
    # reference: the fillet centre solved with scipy.optimize.root (hybr) from the built
    # tangent points: the centre lies at distance r along the normal of both neighbouring curves
    prof = load_project(next(p for p in sample_paths() if p.stem == sample)).profile
    o = build_outline(prof)
    arc = next(a for a in o.arcs if a.node == node)
    corners = [i for i, nd in enumerate(prof.nodes) if not nd.smooth]
    segs, _ = _segments(prof, corners)
    k = corners.index(node)
    cin, cout = segs[k - 1], segs[k]
    r = prof.nodes[node].radius
    p_start, p_end = o.points_at(np.array([arc.s_start, arc.s_end]))

    def nearest_t(curve, p):
        t = np.linspace(0.0, curve.T, 4001)
        return float(t[np.argmin(np.hypot(*(curve.eval(t) - p).T))])

    sig = 1.0 if arc.turning_angle > 0 else -1.0

    def fun(x):
        out = []
        for curve, t in ((cin, x[0]), (cout, x[1])):
            d1 = curve.eval(t, 1)
            nl = np.array([-d1[1], d1[0]]) / np.hypot(*d1)
            out.append(curve.eval(t) + sig * r * nl)
        return out[0] - out[1]

    sol = root(
        fun,
        [nearest_t(cin, p_start), nearest_t(cout, p_end)],
        method="hybr",
        options={"xtol": 1e-13},
    )
    # hybr may stop with "not making good progress" once the residual is at round-off
    assert np.max(np.abs(fun(sol.x))) < 1e-12 * max(cin.T, cout.T, r)
    c_ref = cin.eval(sol.x[0]) + sig * r * (lambda d: np.array([-d[1], d[0]]) / np.hypot(*d))(
        cin.eval(sol.x[0], 1)
    )
    np.testing.assert_allclose(arc.centre, c_ref, atol=1e-9)
    np.testing.assert_allclose(p_start, cin.eval(sol.x[0]), atol=1e-9)
    np.testing.assert_allclose(p_end, cout.eval(sol.x[1]), atol=1e-9)
