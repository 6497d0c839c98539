"""Influence coefficients of the panel method checked by direct numerical integration (scipy)."""

import math

import numpy as np
import pytest
from scipy.integrate import quad

from profilebench.flow.panel import influence_coefficients


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
    inf = influence_coefficients(pts, ground)
    a, b = pts[j], pts[(j + 1) % len(pts)]
    mid = 0.5 * (pts[i] + pts[(i + 1) % len(pts)])
    v = _source_velocity(mid, a, b)
    if ground:
        # image panel mirrored about y = 0, same strength (method of images)
        v = v + _source_velocity(mid, a * [1, -1], b * [1, -1])
    t, nrm = inf.tangent[i], inf.normal[i]
    assert inf.src_t[i, j] == pytest.approx(float(v @ t), abs=1e-10)
    assert inf.src_n[i, j] == pytest.approx(float(v @ nrm), abs=1e-10)


@pytest.mark.parametrize("ground", [False, True])
def test_vortex_influence_matches_quadrature(ground):
    # a unit vortex sheet's velocity is the source velocity turned +90 degrees (counter-clockwise
    # positive); images carry the opposite sign; summed over every panel of the body
    pts = _outline(16)
    inf = influence_coefficients(pts, ground)
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
        t, nrm = inf.tangent[i], inf.normal[i]
        sgn = 1.0 if inf.clockwise else -1.0
        own_t = -0.5 * sgn
        assert inf.vor_t[i] == pytest.approx(float(v @ t) + own_t, abs=1e-10)
        assert inf.vor_n[i] == pytest.approx(float(v @ nrm), abs=1e-10)
