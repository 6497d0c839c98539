"""Laminar-turbulent transition criteria.

Michel's criterion (Michel 1951, ONERA report 1/1578A) in the form given by Cebeci & Smith
(Analysis of Turbulent Boundary Layers, 1974):

    Re_theta,tr = 1.174 (1 + 22400 / Re_x) Re_x^0.46,

with Re_x = Ue s / nu and Re_theta = Ue theta / nu, s the arc length from the stagnation point.
Transition is predicted where the laminar Re_theta first reaches this value.
"""

from __future__ import annotations

import numpy as np

__all__ = ["michel_critical_re_theta", "michel_margin"]


def michel_critical_re_theta(re_x):
    """Critical Re_theta of Michel's criterion, Cebeci-Smith form (see module docstring).

    Parameters
    ----------
    re_x : float or ndarray
        Reynolds number on arc length from the stagnation point, Ue s / nu (>= 0).

    Returns
    -------
    ndarray
        1.174 (1 + 22400/Re_x) Re_x^0.46; +inf where Re_x = 0 (no transition at a stagnation
        point or a leading edge).
    """
    re_x = np.asarray(re_x, dtype=float)
    out = np.full(re_x.shape, np.inf)
    pos = re_x > 0.0
    rx = re_x[pos]
    out[pos] = 1.174 * (1.0 + 22400.0 / rx) * rx**0.46
    return out


def michel_margin(re_theta, re_x):
    """Re_theta minus Michel's critical Re_theta: transition where this first becomes >= 0."""
    return np.asarray(re_theta, dtype=float) - michel_critical_re_theta(re_x)
