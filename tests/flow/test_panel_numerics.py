"""Influence coefficients of the panel method checked by direct numerical integration (scipy)."""
import math

import numpy as np
import pytest
from scipy.integrate import quad

from profilebench.flow.panel import _assemble


def _source_velocity(p, a, b):
    """Velocity at p of a unit-strength source spread uniformly on the segment a -> b.

    Direct integral of the point-source field, v = 1/(2 pi) integral (p - q) / |p - q|^2 dl
    (Katz & Plotkin, eq. 10.1 integrated along the panel), by scipy.integrate.quad.
    """
    d = b - a
    length = math.hypot(*d)

    def comp(k):
        def f(u):
            q = a + u * d
            r = p - q
            return r[k] / (r @ r)

        return quad(f, 0.0, 1.0, epsabs=1e-13, epsrel=1e-12, limit=200)[0] * length / (2 * math.pi)

    return np.array([comp(0), comp(1)])


def _outline(n):
    # an ellipse-like body with uneven panels, above the ground
    t = np.linspace(0.0, 2 * np.pi, n, endpoint=False) + 0.2 * np.sin(np.linspace(0, 6, n))
    return np.column_stack([np.cos(t), 0.35 * np.sin(t) + 0.6])


@pytest.mark.parametrize("ground", [False, True])
@pytest.mark.parametrize("i,j", [(0, 5), (3, 11), (17, 2), (9, 10), (20, 19)])
def test_source_influence_matches_quadrature(ground, i, j):
    pts = _outline(24)
    geom, src_n, src_t, vor_n, vor_t = _assemble([pts], ground)
    a, b = pts[j], pts[(j + 1) % len(pts)]
    mid = 0.5 * (pts[i] + pts[(i + 1) % len(pts)])
    v = _source_velocity(mid, a, b)
    if ground:
        # image panel mirrored about y = 0, same strength (method of images)
        v = v + _source_velocity(mid, a * [1, -1], b * [1, -1])
    t = np.array([geom["tx"][i], geom["ty"][i]])
    nrm = np.array([geom["nx"][i], geom["ny"][i]])
    assert src_t[i, j] == pytest.approx(float(v @ t), abs=1e-10)
    assert src_n[i, j] == pytest.approx(float(v @ nrm), abs=1e-10)


@pytest.mark.parametrize("ground", [False, True])
def test_vortex_influence_matches_quadrature(ground):
    # a unit vortex sheet's velocity is the source velocity turned +90 degrees (counter-clockwise
    # positive); images carry the opposite sign; summed over every panel of the body
    pts = _outline(16)
    geom, src_n, src_t, vor_n, vor_t = _assemble([pts], ground)
    n = len(pts)
    for i in (0, 7):
        mid = 0.5 * (pts[i] + pts[(i + 1) % n])
        v = np.zeros(2)
        for j in range(n):
            a, b = pts[j], pts[(j + 1) % n]
            if j != i:
                s = _source_velocity(mid, a, b)
                v += np.array([-s[1], s[0]])
            if ground:
                s = _source_velocity(mid, a * [1, -1], b * [1, -1])
                v -= np.array([-s[1], s[0]])
        # the panel's own sheet: tangential jump of half the strength, outer side (Katz & Plotkin)
        t = np.array([geom["tx"][i], geom["ty"][i]])
        nrm = np.array([geom["nx"][i], geom["ny"][i]])
        sgn = 1.0 if geom["clockwise"][0] else -1.0
        own_t = -0.5 * sgn
        assert vor_t[i, 0] == pytest.approx(float(v @ t) + own_t, abs=1e-10)
        assert vor_n[i, 0] == pytest.approx(float(v @ nrm), abs=1e-10)


def _circle(n, height=None, skew=0.25):
    # uneven spacing so the midpoints are not exact by symmetry
    t = np.linspace(0.0, 2 * np.pi, n, endpoint=False)
    t = t + skew * (2 * np.pi / n) * np.sin(3 * t)
    pts = np.column_stack([np.cos(t), np.sin(t)])
    if height is not None:
        pts[:, 1] += height
    return pts


@pytest.mark.parametrize("reverse", [False, True])
def test_solve_after_a_body_sharing_panels_matches_the_exact_cylinder(reverse):
    # A D-shaped body (the circle's upper half closed by its diameter) is solved first; the
    # circle solved next shares its upper-half panels (reversed in order with ``reverse``), whose
    # coefficients are reused. Exact Cp = 1 - 4 sin^2 theta (Anderson, Fundamentals of
    # Aerodynamics; REFERENCES.md); same bound as a fresh 200-panel solve in test_panel.py.
    from profilebench.flow import panel

    circle = _circle(200)
    upper = circle[circle[:, 1] >= 0.0]
    chord = np.column_stack([np.linspace(upper[-1, 0], upper[0, 0], 12)[1:-1], np.zeros(10)])
    d_body = np.vstack([upper, chord])
    body = circle[::-1] if reverse else circle
    if reverse:
        body = np.roll(body, 1, axis=0)
    panel.solve_inviscid(d_body)
    shared = panel._shared_panels(body, np.roll(body, -1, axis=0), *_normals(body), False)
    assert shared is not None and len(shared[0]) >= 90  # the reuse path is taken
    res = panel.solve_inviscid(body)
    theta = np.arctan2(res.y, res.x)
    assert np.abs(res.cp - (1.0 - 4.0 * np.sin(theta) ** 2)).max() < 0.01
    panel._LAST.data = None
    fresh = panel.solve_inviscid(body)
    np.testing.assert_allclose(res.ue, fresh.ue, rtol=0, atol=1e-12)


def _normals(pts):
    seg = np.roll(pts, -1, axis=0) - pts
    length = np.hypot(seg[:, 0], seg[:, 1])
    area2 = np.sum(pts[:, 0] * np.roll(pts[:, 1], -1) - np.roll(pts[:, 0], -1) * pts[:, 1])
    sgn = 1.0 if area2 < 0 else -1.0
    return -seg[:, 1] / length * sgn, seg[:, 0] / length * sgn
