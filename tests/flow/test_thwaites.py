"""Laminar boundary layer: Thwaites' fits and the laminar part of the march."""

import numpy as np
import pytest
from scipy.integrate import solve_bvp, trapezoid
from scipy.optimize import brentq

from profilebench.flow import Regime, march_boundary_layer
from profilebench.flow.thwaites import (
    LAMBDA_SEPARATION,
    thwaites_shape_factor,
    thwaites_shear,
)
from profilebench.flow.transition import michel_critical_re_theta

NU = 1.46e-5  # air, ISO 2533:1975 Standard Atmosphere, sea level
SPEED = 30.0


@pytest.mark.parametrize(
    "lam, h_expected, l_expected",
    [
        (0.0, 2.61, 0.22),  # Thwaites' table at lambda = 0 (flat plate), from memory
        (0.25, 2.00, 0.50),  # Thwaites' table at lambda = 0.25, from memory
        (-0.09, 3.55, 0.0),  # Thwaites' table at separation: H 3.55, l 0, from memory
    ],
)
def test_thwaites_fits_against_table(lam, h_expected, l_expected):
    # Cebeci & Bradshaw's fits reproduce Thwaites' table to about 0.01 (fit accuracy)
    assert thwaites_shape_factor(lam) == pytest.approx(h_expected, abs=0.01)
    assert thwaites_shear(lam) == pytest.approx(l_expected, abs=0.01)


def test_thwaites_separation_value():
    # Thwaites (1949), White (Viscous Fluid Flow): laminar separation at lambda = -0.09
    assert LAMBDA_SEPARATION == -0.09


def _falkner_skan(beta):
    """theta, delta* (in the FS variable eta) of the Falkner-Skan solution, by scipy solve_bvp.

    f''' + f f'' + beta (1 - f'^2) = 0, f(0) = f'(0) = 0, f'(inf) = 1; eta = y sqrt((m+1) U /
    (2 nu x)), beta = 2m/(m+1) (Schlichting, Boundary-Layer Theory; White, Viscous Fluid Flow).
    """
    eta = np.linspace(0.0, 10.0, 400)
    y0 = np.vstack([eta - 1 + np.exp(-eta), 1 - np.exp(-eta), np.exp(-eta)])
    sol = solve_bvp(
        lambda e, y: np.vstack([y[1], y[2], -y[0] * y[2] - beta * (1 - y[1] ** 2)]),
        lambda a, b: np.array([a[0], a[1], b[1] - 1.0]),
        eta,
        y0,
        tol=1e-8,
        max_nodes=100000,
    )
    assert sol.status == 0
    fp = sol.y[1]
    return trapezoid(fp * (1 - fp), sol.x), trapezoid(1 - fp, sol.x)


@pytest.mark.parametrize(
    "m, tol_theta, tol_h",
    [
        # Blasius: Thwaites gives theta 1% high (0.671 vs 0.664) and H 2.61 vs 2.59 (Schlichting, Boundary-Layer Theory;
        # White, Viscous Fluid Flow)
        (0.0, 0.02, 0.02),
        # favourable wedge flow m = 1/3: Thwaites within about 5% (White, Viscous Fluid Flow,
        # accuracy of Thwaites' method, from memory); measured 4.2% in theta, 5.2% in H
        (1.0 / 3.0, 0.05, 0.06),
        # plane stagnation flow m = 1 (Hiemenz): Thwaites' 0.274 vs exact 0.292; about 6%
        (1.0, 0.07, 0.07),
    ],
)
def test_laminar_march_against_falkner_skan(m, tol_theta, tol_h):
    s = np.linspace(0.0, 1.0, 201)
    ue = s**m if m > 0 else np.ones_like(s)
    bl = march_boundary_layer(s, ue, nu=NU, speed=SPEED, transition="free")
    k = 100  # s = 0.5 m, Re_x well below transition
    assert bl.regime[k] is Regime.LAMINAR
    th_fs, ds_fs = _falkner_skan(2 * m / (m + 1))
    scale = np.sqrt(2 * NU * s[k] / ((m + 1) * SPEED * ue[k]))
    # Falkner-Skan similarity solution computed by scipy.integrate.solve_bvp
    assert bl.theta[k] == pytest.approx(th_fs * scale, rel=tol_theta)
    assert bl.H[k] == pytest.approx(ds_fs / th_fs, rel=tol_h)


def test_falkner_skan_helper_reproduces_blasius():
    # Blasius: theta sqrt(U/(nu x)) = 0.664, H = 2.59 (Schlichting, Boundary-Layer Theory; White, Viscous Fluid Flow)
    th, ds = _falkner_skan(0.0)
    assert th * np.sqrt(2) == pytest.approx(0.664, abs=0.001)
    assert ds / th == pytest.approx(2.59, abs=0.005)


@pytest.mark.parametrize("x", [0.05, 0.2, 0.4])
def test_blasius_flat_plate(x):
    s = np.linspace(0.0, 0.4, 161)
    bl = march_boundary_layer(s, np.ones_like(s), nu=NU, speed=SPEED)
    k = int(np.argmin(abs(s - x)))
    blasius = 0.664 * np.sqrt(NU * s[k] / SPEED)  # Blasius exact (Schlichting)
    assert bl.theta[k] == pytest.approx(blasius, rel=0.02)
    assert bl.H[k] == pytest.approx(2.61, abs=0.005)  # Thwaites' fit value; exact 2.59
    # Blasius Cf sqrt(Re_x) = 0.664; Thwaites 2 * 0.22 / 0.671 = 0.656 (within 2%)
    assert bl.cf[k] * np.sqrt(SPEED * s[k] / NU) == pytest.approx(0.664, rel=0.02)
    assert bl.margin[k] == 1.0  # zero pressure gradient: far from separation
    assert bl.separation is None


def test_stagnation_point_limit():
    # plane stagnation flow Ue = a s: Thwaites' limit theta^2 = 0.075 nu / a (Thwaites 1949;
    # exact for linear Ue, which the integral reproduces)
    a = 3.0
    s = np.linspace(0.0, 0.2, 41)
    bl = march_boundary_layer(s, a * s, nu=NU, speed=SPEED)
    expected = np.sqrt(0.075 * NU / (a * SPEED))
    np.testing.assert_allclose(bl.theta, expected, rtol=1e-9)
    assert bl.cf[0] == 0.0  # wall shear vanishes at the stagnation point
    assert np.all(np.isfinite(bl.cf))


@pytest.mark.parametrize("re_l", [1e4, 1e5, 1e6])
def test_howarth_retarded_flow_separation(re_l):
    # Howarth (1938): U = U0 (1 - x/L) separates at x/L = 0.120 (from memory 0.1198); Thwaites
    # gives about 0.123 (Thwaites 1949 with lambda = -0.09); accepted band 0.115..0.126
    s = np.linspace(0.0, 1.0, 801)
    bl = march_boundary_layer(s, 1.0 - s, nu=1.0 / re_l, speed=1.0)
    first = bl.events[0]
    assert first.kind == "laminar_separation"
    assert 0.115 <= first.s <= 0.126
    k = first.index - 1
    assert bl.margin[k] < 0.1  # just upstream of separation: margin near 0
    assert bl.margin[k - 50] > bl.margin[k]


def test_free_transition_flat_plate():
    s = np.linspace(0.0, 4.0, 801)
    bl = march_boundary_layer(s, np.ones_like(s), nu=NU, speed=SPEED)
    tr = bl.transition
    assert tr is not None
    re_x = tr.s * SPEED / NU
    # Michel's criterion (Michel 1951, Cebeci-Smith form; from memory) is crossed near Re_x = 1.7e6 to 3e6 on a flat plate
    assert 1e6 <= re_x <= 4e6
    # independent root of 0.671 sqrt(Re_x) = Michel(Re_x) by scipy brentq (Thwaites' flat
    # plate theta = sqrt(0.45 nu x / U) with the Cebeci-Smith form of Michel's criterion)
    root = brentq(lambda r: np.sqrt(0.45) * np.sqrt(r) - michel_critical_re_theta(r), 1e5, 1e8)
    assert re_x == pytest.approx(root, rel=0.01)
    assert "Michel" in tr.detail
    assert bl.regime[tr.index] is Regime.TURBULENT
    assert bl.regime[tr.index - 1] is Regime.LAMINAR


def test_forced_transition_position():
    s = np.linspace(0.0, 1.0, 201)
    bl = march_boundary_layer(s, np.ones_like(s), nu=NU, speed=SPEED, transition=0.3)
    assert bl.transition.s == pytest.approx(0.3)
    assert "forced" in bl.transition.detail
    assert bl.regime[59] is Regime.LAMINAR and bl.regime[60] is Regime.TURBULENT
    # theta continuous across transition (documented restart), H set to 1.4
    assert bl.theta[60] == pytest.approx(bl.theta[59], rel=0.05)


def test_trip_downstream_of_free_transition_has_no_effect():
    s = np.linspace(0.0, 4.0, 401)
    free = march_boundary_layer(s, np.ones_like(s), nu=NU, speed=SPEED)
    tripped = march_boundary_layer(s, np.ones_like(s), nu=NU, speed=SPEED, transition=3.5)
    assert tripped.transition.s == pytest.approx(free.transition.s)


def test_theta_between_stations_is_thwaites_integral_there():
    # ue = c s (plane stagnation flow): Thwaites' integral gives theta^2 = 0.075 nu / c at every
    # s (Thwaites 1949; the constant his method gives for Hiemenz flow), between stations too
    import numpy as np

    from profilebench.flow.thwaites import (
        thwaites_momentum_thickness,
        thwaites_theta_squared_between,
    )

    c, nu_v = 4.0, 5e-7
    s = np.linspace(0.0, 1.0, 11)
    x = np.linspace(0.013, 0.987, 37)
    got = thwaites_theta_squared_between(s, c * s, nu_v, x)
    assert np.allclose(got, 0.075 * nu_v / c, rtol=1e-12)
    # and at a station it is thwaites_momentum_thickness squared, for any edge speed
    ue = 1.0 + 0.3 * np.sin(3.0 * s)
    at = thwaites_theta_squared_between(s, ue, nu_v, s[1:])
    assert np.allclose(at, thwaites_momentum_thickness(s, ue, nu_v)[1:] ** 2, rtol=1e-12)
