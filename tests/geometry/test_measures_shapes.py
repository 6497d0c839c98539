"""Measures of the built outline against closed-form values; standard shapes."""

import math

import numpy as np
import pytest
from scipy.integrate import quad
from scipy.special import ellipe

from profilebench.errors import InputError, ProfileBenchError
from profilebench.geometry import (
    circle,
    circle_points,
    ellipse,
    ellipse_points,
    measure,
    naca4,
    panelize,
    rounded_box,
    validate,
)


@pytest.mark.parametrize("r", [0.0, 0.05, 0.3, 0.7])
def test_rounded_box_closed_form(r):
    L, H, c, x0 = 4.0, 1.4, 0.15, -0.5
    m = measure(rounded_box(L, H, r, clearance=c, x0=x0))
    # closed form for equal radii: area L H - (4 - pi) r^2, perimeter 2 (L + H) - (8 - 2 pi) r
    assert m.area == pytest.approx(L * H - (4 - math.pi) * r**2, rel=1e-12)
    assert m.perimeter == pytest.approx(2 * (L + H) - (8 - 2 * math.pi) * r, rel=1e-12)
    # symmetry: centroid at the box centre
    assert m.centroid == pytest.approx((x0 + L / 2, c + H / 2), abs=1e-12)
    assert (m.length, m.height, m.clearance, m.x_min) == pytest.approx((L, H, c, x0), abs=1e-12)


def test_rounded_box_unequal_radii():
    radii = (0.3, 0.1, 0.0, 0.5)
    m = measure(rounded_box(3.0, 1.2, radii))
    # each rounded corner removes (1 - pi/4) r^2 of area and (2 - pi/2) r of perimeter
    assert m.area == pytest.approx(3.6 - (1 - math.pi / 4) * sum(r * r for r in radii), rel=1e-12)
    assert m.perimeter == pytest.approx(8.4 - (2 - math.pi / 2) * sum(radii), rel=1e-12)


@pytest.mark.parametrize("n_nodes, tol", [(16, 1e-4), (32, 1e-5)])
def test_circle_area(n_nodes, tol):
    # exact: A = pi r^2, perimeter 2 pi r; the periodic spline through n points on the circle
    # differs by O(n^-4)
    m = measure(circle(0.7, centre=(1.0, 2.0), n_nodes=n_nodes))
    assert m.area == pytest.approx(math.pi * 0.7**2, rel=tol)
    assert m.perimeter == pytest.approx(2 * math.pi * 0.7, rel=tol)
    assert m.centroid == pytest.approx((1.0, 2.0), abs=1e-9)
    assert m.height == pytest.approx(1.4, rel=tol)


@pytest.mark.parametrize("a, b", [(2.0, 1.0), (1.0, 0.25), (0.5, 1.5)])
def test_ellipse_area_and_perimeter(a, b):
    m = measure(ellipse(a, b, n_nodes=48))
    # exact: A = pi a b; perimeter 4 A_major E(e^2), complete elliptic integral (scipy.special.ellipe)
    assert m.area == pytest.approx(math.pi * a * b, rel=1e-4)
    big, small = max(a, b), min(a, b)
    assert m.perimeter == pytest.approx(4 * big * ellipe(1 - (small / big) ** 2), rel=1e-4)


def test_exact_point_sets():
    p = circle_points(0.5, 40, centre=(1.0, -1.0))
    assert p.shape == (40, 2)
    assert np.hypot(p[:, 0] - 1.0, p[:, 1] + 1.0) == pytest.approx(0.5, abs=1e-15)
    q = ellipse_points(2.0, 0.5, 64)
    assert (q[:, 0] / 2.0) ** 2 + (q[:, 1] / 0.5) ** 2 == pytest.approx(1.0, abs=1e-14)
    assert q[0] == pytest.approx([2.0, 0.0])  # starts at the rear point, counter-clockwise
    assert q[1, 1] > 0


def naca_thickness(x, t):
    # NACA 4-digit thickness, closed trailing edge (Abbott & von Doenhoff sec. 6.4 with -0.1036)
    return (
        5 * t * (0.2969 * math.sqrt(x) - 0.1260 * x - 0.3516 * x**2 + 0.2843 * x**3 - 0.1036 * x**4)
    )


def test_naca0012_area_and_thickness():
    prof = naca4("0012", chord=2.0, n_points=81)
    validate(prof)
    m = measure(prof)
    exact, _ = quad(lambda x: 2 * naca_thickness(x, 0.12), 0.0, 1.0)  # scipy quadrature
    assert m.area == pytest.approx(exact * 4.0, rel=2e-3)
    # NACA 0012 maximum thickness 12 % of chord near 30 % chord (Abbott & von Doenhoff
    # ordinates, from memory: 6.00 % at 30 %)
    assert m.height == pytest.approx(0.12 * 2.0, rel=2e-3)
    assert (m.x_min, m.x_max) == pytest.approx((0.0, 2.0), abs=1e-4)
    assert prof.trailing_edge == 0 and prof.nodes[0].radius == 0 and not prof.nodes[0].smooth
    assert (prof.nodes[0].x, prof.nodes[0].y) == (2.0, 0.0)


def test_naca2412_camber_moves_centroid_up():
    # mean line of the 2412: max camber 2 % at 40 % chord (NACA Report 824 designation);
    # the area centroid lies above the chord line, the thickness area equals the 0012's closely
    m12, m2412 = measure(naca4("0012")), measure(naca4("2412"))
    assert m2412.centroid[1] > 0.005
    assert m2412.area == pytest.approx(m12.area, rel=5e-3)
    pan = panelize(naca4("2412"), 160)
    assert tuple(pan.points[0]) == (naca4("2412").nodes[0].x, naca4("2412").nodes[0].y)


@pytest.mark.parametrize(
    "call, text",
    [
        (lambda: naca4("24a2"), "four digits"),
        (lambda: naca4("2012"), "position"),
        (lambda: naca4("0000"), "zero thickness"),
        (lambda: rounded_box(-1.0, 1.0), "positive"),
        (lambda: rounded_box(1.0, 1.0, (0.1, 0.2)), "four"),
        # 1 m sides, neighbours keeping 0.6 m: 1 - 0.6 = 0.4 m left (setback = r at 90 degrees)
        (lambda: rounded_box(1.0, 1.0, 0.6), "largest radius that fits there is 400.0 mm"),
        (lambda: circle(0.0), "positive"),
        (lambda: ellipse_points(1.0, 1.0, 2), ">= 3"),
    ],
)
def test_bad_shape_arguments(call, text):
    with pytest.raises(ProfileBenchError, match=text):
        call()


def test_input_error_class():
    with pytest.raises(InputError):
        circle_points(1.0, 2.5)
