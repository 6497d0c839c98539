"""Thwaites' method for the laminar boundary layer.

Thwaites (1949, Aeronautical Quarterly 1, 245-280) correlated exact laminar solutions with one
pressure-gradient parameter lambda = theta^2 (dUe/ds) / nu and integrated the momentum equation
in closed form:

    theta^2 = 0.45 nu / Ue^6 * integral_0^s Ue^5 ds.

Shape factor H(lambda) and shear parameter l(lambda) = tau_w theta / (mu Ue) come from Cebeci &
Bradshaw's fits of Thwaites' table (Cebeci & Bradshaw, Momentum Transfer in Boundary Layers,
1977):

    lambda >= 0:      l = 0.22 + 1.57 lambda - 1.8 lambda^2,
                      H = 2.61 - 3.75 lambda + 5.24 lambda^2
    lambda < 0:       l = 0.22 + 1.402 lambda + 0.018 lambda / (lambda + 0.107),
                      H = 2.088 + 0.0731 / (lambda + 0.14)

Laminar separation is predicted at lambda = -0.09 (Thwaites 1949; White, Viscous Fluid Flow).
"""

from __future__ import annotations

import numpy as np

__all__ = [
    "LAMBDA_SEPARATION",
    "LAMBDA_MAX",
    "thwaites_shape_factor",
    "thwaites_shear",
    "thwaites_momentum_thickness",
    "thwaites_theta_squared_between",
]

#: Thwaites' laminar separation criterion on lambda (Thwaites 1949).
LAMBDA_SEPARATION = -0.09
#: Upper end of Thwaites' table (lambda = 0.25: H = 2.00, l = 0.50); the fits are evaluated with
#: lambda limited to [LAMBDA_SEPARATION, LAMBDA_MAX], the range the table covers.
LAMBDA_MAX = 0.25


def thwaites_shape_factor(lam):
    """Shape factor H = delta*/theta of a laminar layer from Thwaites' parameter lambda.

    Cebeci & Bradshaw's fits of Thwaites' table (see module docstring); lambda is limited to the
    table range [-0.09, 0.25]. Dimensionless in, dimensionless out; works on arrays.
    """
    lam = np.clip(np.asarray(lam, dtype=float), LAMBDA_SEPARATION, LAMBDA_MAX)
    return np.where(
        lam >= 0.0,
        2.61 - 3.75 * lam + 5.24 * lam**2,
        2.088 + 0.0731 / (lam + 0.14),
    )


def thwaites_shear(lam):
    """Shear parameter l = tau_w theta / (mu Ue) of a laminar layer from lambda.

    Cebeci & Bradshaw's fits of Thwaites' table (see module docstring); lambda is limited to the
    table range [-0.09, 0.25]. Skin friction follows as Cf = 2 nu l / (Ue theta).
    """
    lam = np.clip(np.asarray(lam, dtype=float), LAMBDA_SEPARATION, LAMBDA_MAX)
    return np.where(
        lam >= 0.0,
        0.22 + 1.57 * lam - 1.8 * lam**2,
        0.22 + 1.402 * lam + 0.018 * lam / (lam + 0.107),
    )


def _integral_ue5(s, ue):
    """Cumulative integral of ue^5 ds (from s = 0) for a piecewise-linear ue through the stations.

    Exact for piecewise-linear ue: over [a, b] the integral of ue^5 is
    (b - a) * sum_k ua^k ub^(5-k) / 6.
    When s[0] > 0, ue is taken to rise linearly from 0 at s = 0 (the stagnation point) to ue[0].
    """
    first = s[0] * ue[0] ** 5 / 6.0
    out = np.empty_like(s)
    out[0] = first
    out[1:] = first + np.cumsum(np.diff(s) * _mean_ue5(ue[:-1], ue[1:]))
    return out


def _mean_ue5(ua, ub):
    """Mean of ue^5 over an interval where ue runs linearly from ua to ub."""
    return (ub**5 + ua * ub**4 + ua**2 * ub**3 + ua**3 * ub**2 + ua**4 * ub + ua**5) / 6.0


def thwaites_theta_squared_between(s, ue, nu_over_speed, x):
    """theta^2 (m^2) of Thwaites' integral at arc lengths ``x`` between the stations, with ue
    linear between stations as :func:`thwaites_momentum_thickness` takes it (there it is that
    function's value squared). ``x`` within (s[0], s[-1]]; inf where ue is 0 at x."""
    x = np.asarray(x, dtype=float)
    k = np.clip(np.searchsorted(s, x, side="right") - 1, 0, s.size - 2)
    ua = ue[k]
    ub = ua + (ue[k + 1] - ua) * (x - s[k]) / (s[k + 1] - s[k])
    integral = _integral_ue5(s, ue)[k] + (x - s[k]) * _mean_ue5(ua, ub)
    with np.errstate(divide="ignore", invalid="ignore"):
        return np.where(ub > 0.0, 0.45 * nu_over_speed * integral / ub**6, np.inf)


def thwaites_momentum_thickness(s, ue, nu_over_speed):
    """Momentum thickness theta (m) of Thwaites' integral at every station.

    Parameters
    ----------
    s : ndarray
        Arc length from the stagnation point (m), strictly increasing, s[0] >= 0.
    ue : ndarray
        Edge speed ratio Ue/V (>= 0) at s.
    nu_over_speed : float
        Kinematic viscosity over free-stream speed, nu / V (m).

    Returns
    -------
    theta : ndarray
        theta^2 = 0.45 (nu/V) / ue^6 * integral ue^5 ds (Thwaites 1949), with ue piecewise linear
        between stations (integrated exactly). At a stagnation station (ue = 0 at s[0]) the limit
        theta^2 = 0.075 (nu/V) / (due/ds) is used, due/ds from the first interval. Stations with
        ue = 0 further on are returned as +inf (the flow has stopped: the caller treats it as
        separation).
    """
    integral = _integral_ue5(s, ue)
    theta2 = np.full_like(s, np.inf)
    moving = ue > 0.0
    theta2[moving] = 0.45 * nu_over_speed * integral[moving] / ue[moving] ** 6
    if ue[0] == 0.0:
        slope = (ue[1] - ue[0]) / (s[1] - s[0])
        theta2[0] = 0.075 * nu_over_speed / slope
    return np.sqrt(theta2)
