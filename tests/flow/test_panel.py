"""Tests of the inviscid panel method against exact potential-flow solutions."""

import numpy as np
import pytest

from profilebench.errors import (
    GroundContactError,
    InputError,
    ProfileBenchError,
    SelfIntersectionError,
)
from profilebench.flow import (
    InviscidStatus,
    SplitStatus,
    SurfaceEnd,
    solve_inviscid,
    solve_inviscid_bodies,
    split_surfaces,
)
from profilebench.flow import panel


# ------------------------------------------------------------------------------------------
# exact shapes
# ------------------------------------------------------------------------------------------
def circle(n, radius=1.0, centre=(0.0, 0.0), skew=0.0):
    """Circle points, counter-clockwise; ``skew`` makes the spacing uneven (theta + skew sin theta)."""
    phi = np.linspace(0.0, 2.0 * np.pi, n, endpoint=False)
    th = phi + skew * np.sin(phi)
    return np.column_stack([centre[0] + radius * np.cos(th), centre[1] + radius * np.sin(th)])


def ellipse(n, ratio, a=1.0, centre=(0.0, 0.0)):
    """Ellipse x = a cos eta, y = b sin eta with nodes uniform in eta (clustered at the ends)."""
    eta = np.linspace(0.0, 2.0 * np.pi, n, endpoint=False)
    return np.column_stack([centre[0] + a * np.cos(eta), centre[1] + ratio * a * np.sin(eta)])


def ellipse_speed(eta, ratio):
    """Exact surface speed q/U on an ellipse at x = a cos eta (Joukowski mapping, e.g. Katz & Plotkin, Low-Speed Aerodynamics)."""
    s, c = np.sin(eta), np.cos(eta)
    return (1.0 + ratio) * np.abs(s) / np.sqrt(s * s + ratio * ratio * c * c)


# Joukowski airfoil z = zeta + C^2 / zeta of the circle through zeta = C centred at ZETA0.
C = 1.0
ZETA0 = -0.1 + 0.08j
RADIUS = abs(C - ZETA0)
BETA = float(np.arctan2(ZETA0.imag, C - ZETA0.real))  # camber angle; trailing edge at theta = -BETA


def joukowski(n):
    """Airfoil points, counter-clockwise from the trailing edge (index 0, at z = 2C)."""
    th = np.linspace(0.0, 2.0 * np.pi, n, endpoint=False) - BETA
    zeta = ZETA0 + RADIUS * np.exp(1j * th)
    z = zeta + C * C / zeta
    pts = np.column_stack([z.real, z.imag])
    pts[0] = (2.0 * C, 0.0)  # the cusp exactly
    return pts, th


def joukowski_speed(theta):
    """Exact |q|/V on the airfoil at circle angle theta, alpha = 0, Kutta circulation.

    On the circle |dW/dzeta| = 2 V |sin theta + sin beta| (Gamma = 4 pi a V sin beta, Milne-Thomson,
    Theoretical Aerodynamics, ch. 6); divided by |dz/dzeta| = |1 - C^2/zeta^2|.
    """
    zeta = ZETA0 + RADIUS * np.exp(1j * theta)
    return 2.0 * np.abs(np.sin(theta) + np.sin(BETA)) / np.abs(1.0 - C * C / zeta**2)


def cylinder_over_wall_speed(z, height, radius, terms=40):
    """Exact complex velocity u - i v / V of zero-circulation flow past a circle over a wall y = 0.

    Method of successive images (Milne-Thomson, Theoretical Hydrodynamics, circle theorem and
    image in a plane): the circle image of the stream is a doublet V R^2 at the centre c; each
    doublet m at z0 has a wall image conj(m) at conj(z0), whose circle image is the doublet
    -m R^2 / d^2 at c - R^2 / d with d = conj(c) - z0... computed here term by term.
    """
    c = 1j * height
    dz = np.ones_like(z, dtype=complex)
    m, z0 = complex(radius * radius), c
    for _ in range(terms):
        dz -= m / (z - z0) ** 2 + np.conj(m) / (z - np.conj(z0)) ** 2
        # circle image of the wall image (strength conj(m) at conj(z0))
        d = np.conj(c - np.conj(z0))
        m, z0 = -m * radius * radius / d**2, c - radius * radius / d
    return dz


# ------------------------------------------------------------------------------------------
# circular cylinder
# ------------------------------------------------------------------------------------------
def cylinder_cp_error(n, skew):
    res = solve_inviscid(circle(n, skew=skew))
    theta = np.arctan2(res.y, res.x)
    # exact Cp = 1 - 4 sin^2 theta (Anderson, Fundamentals of Aerodynamics)
    return np.abs(res.cp - (1.0 - 4.0 * np.sin(theta) ** 2)).max()


@pytest.mark.parametrize("skew", [0.0, 0.25])
def test_cylinder_cp_at_200_panels(skew):
    # Cp within 0.01 of 1 - 4 sin^2 theta (Anderson, Fundamentals of Aerodynamics)
    assert cylinder_cp_error(200, skew) < 0.01


def test_cylinder_error_falls_as_panels_double():
    # uneven spacing: on an evenly spaced polygon constant-source panels are exact at the
    # midpoints, which would hide the convergence. Error must fall steadily (common practice, no source)
    errors = [cylinder_cp_error(n, 0.25) for n in (100, 200, 400)]
    assert errors[1] < 0.7 * errors[0]
    assert errors[2] < 0.7 * errors[1]


def test_cylinder_circulation_and_mean_speed_zero():
    res = solve_inviscid(circle(120, skew=0.2))
    assert res.success and res.status is InviscidStatus.SOLVED
    assert res.circulation == 0.0
    # closed-contour integral of ue ds is the circulation: zero (Kelvin; any potential-flow text)
    assert abs(np.sum(res.ue * res.panel_length)) < 1e-3
    # stations: midpoints and their arc length from points[0]
    pts = res.points
    assert np.allclose(res.x, 0.5 * (pts[:, 0] + np.roll(pts[:, 0], -1)))
    assert res.s[0] == pytest.approx(0.5 * res.panel_length[0])
    assert np.all(np.diff(res.s) > 0) and res.s[-1] < res.perimeter
    # perimeter of the inscribed polygon converges to 2 pi R (geometry)
    assert res.perimeter == pytest.approx(2 * np.pi, rel=1e-3)


# ------------------------------------------------------------------------------------------
# ellipses
# ------------------------------------------------------------------------------------------
@pytest.mark.parametrize(
    "ratio, n, tol",
    [
        (0.5, 200, 2e-4),  # measured 4.6e-5 at 200 panels
        (0.1, 200, 3e-3),  # measured 1.2e-3 at 200 panels (thin: sharp speed peak at the nose)
        (0.1, 400, 8e-4),  # measured 2.7e-4: error falls about 4x per doubling
    ],
)
def test_ellipse_surface_speed(ratio, n, tol):
    res = solve_inviscid(ellipse(n, ratio))
    eta = np.arctan2(res.y / ratio, res.x)
    # exact q/U = (1 + b/a)|sin eta| / sqrt(sin^2 eta + (b/a)^2 cos^2 eta) (Joukowski mapping, e.g. Katz & Plotkin, Low-Speed Aerodynamics)
    assert np.abs(np.abs(res.ue) - ellipse_speed(eta, ratio)).max() < tol
    # peak speed 1 + b/a (Joukowski mapping, e.g. Katz & Plotkin, Low-Speed Aerodynamics)
    assert np.abs(res.ue).max() == pytest.approx(1.0 + ratio, abs=tol)


def test_orientation_reversal_flips_ue_keeps_cp():
    pts = ellipse(150, 0.4, centre=(0.3, 0.7))
    fwd = solve_inviscid(pts)
    rev = solve_inviscid(pts[::-1])
    assert fwd.clockwise is False and rev.clockwise is True
    # reversed panel i is forward panel N-2-i (same segment, walked the other way)
    j = (len(pts) - 2 - np.arange(len(pts))) % len(pts)
    assert np.allclose(rev.cp, fwd.cp[j], atol=1e-12)
    assert np.allclose(rev.ue, -fwd.ue[j], atol=1e-12)
    assert np.allclose(rev.normal, fwd.normal[j])  # outward either way


def test_orientation_reversal_with_kutta_and_ground():
    pts, _ = joukowski(160)
    pts = pts + [0.0, 0.6]
    fwd = solve_inviscid(pts, ground=True, kutta_node=0)
    rev_pts = pts[::-1]
    rev = solve_inviscid(rev_pts, ground=True, kutta_node=len(pts) - 1)
    j = (len(pts) - 2 - np.arange(len(pts))) % len(pts)
    assert np.allclose(rev.cp, fwd.cp[j], atol=1e-10)
    assert np.allclose(rev.ue, -fwd.ue[j], atol=1e-10)
    # the circulation is a property of the flow, not of the point order
    assert rev.circulation == pytest.approx(fwd.circulation, rel=1e-10)


# ------------------------------------------------------------------------------------------
# transpiration (a prescribed normal speed through the panels)
# ------------------------------------------------------------------------------------------
def test_uniform_outflow_from_a_circle_leaves_its_surface_speed_unchanged():
    # a circle blowing out uniformly at speed c is the stream past it plus a line source of
    # strength 2 pi R c at its centre; the source's speed is radial, so the tangential speed is
    # 2 V sin theta still (superposition of the circle's doublet flow and a source; Milne-
    # Thomson, Theoretical Hydrodynamics, ch. 6 and 8)
    pts = circle(160, skew=0.2)
    res, response = panel.transpiration_response(pts)
    assert res.success and response is not None
    change = response.response(np.arange(160)) @ np.full(160, 0.1)
    assert np.abs(change).max() < 1e-3
    # the same from one back-substitution of the whole distribution
    assert np.allclose(response.change(np.arange(160), np.full(160, 0.1)), change, atol=1e-12)


def test_cosine_blowing_on_a_circle_changes_the_speed_by_its_doublet():
    # v_n = eps cos theta on r = R is the potential B cos(theta) / r with B = -eps R^2, a
    # doublet at the centre; at r = R its tangential speed is eps sin theta, against the
    # stream's -2 V sin theta (counter-clockwise outline), so |ue| = (2 V - eps) |sin theta|
    # (the same superposition, Milne-Thomson, ch. 6)
    eps = 0.1
    pts = circle(200, skew=0.2)
    res, response = panel.transpiration_response(pts)
    theta = np.arctan2(res.y, res.x)
    ue = res.ue + response.response(np.arange(200)) @ (eps * np.cos(theta))
    expected = (2.0 - eps) * np.abs(np.sin(theta))
    # the panel error of the circle itself at 200 uneven panels (test_cylinder_cp_at_200_panels)
    assert np.abs(np.abs(ue) - expected).max() < 5e-3
    # and the change alone, which the circle's own error hardly touches
    change = np.abs(ue) - np.abs(res.ue)
    assert np.abs(change + eps * np.abs(np.sin(theta))).max() < 2e-3


def test_transpiration_response_comes_with_the_plain_solution():
    # the factored solve behind the response is the plain solve's, with the ground's images
    # and a Kutta row
    pts, _ = joukowski(120)
    pts = pts + [0.0, 0.6]
    res, response = panel.transpiration_response(pts, ground=True, kutta_node=0)
    plain = solve_inviscid(pts, ground=True, kutta_node=0)
    assert np.array_equal(res.ue, plain.ue) and res.circulation == plain.circulation
    assert response.response([10, 40]).shape == (120, 2)


# ------------------------------------------------------------------------------------------
# ground effect
# ------------------------------------------------------------------------------------------
@pytest.mark.parametrize("kutta", [False, True])
def test_ground_equals_body_plus_mirror_image(kutta):
    # method of images: body over a slip ground == body + mirror body in free air (method of images; any potential-flow text, e.g. Katz & Plotkin)
    if kutta:
        pts, _ = joukowski(120)
        pts = pts + [0.0, 0.5]
        k = 0
    else:
        pts = ellipse(120, 0.4, centre=(0.0, 0.55))
        k = None
    over_ground = solve_inviscid(pts, ground=True, kutta_node=k)
    mirror = pts * [1.0, -1.0]
    body, image = solve_inviscid_bodies([pts, mirror], kutta_nodes=[k, k])
    assert np.allclose(over_ground.ue, body.ue, atol=1e-10)
    # the image mirrors the body: same speeds; its circulation is opposite
    assert np.allclose(np.abs(image.ue), np.abs(body.ue), atol=1e-10)
    assert image.circulation == pytest.approx(-body.circulation, abs=1e-12)
    assert over_ground.circulation == pytest.approx(body.circulation, rel=1e-10, abs=1e-14)


@pytest.mark.parametrize("height", [1.5, 2.5])
def test_cylinder_over_ground_against_image_series(height):
    n = 240
    res = solve_inviscid(circle(n, centre=(0.0, height)), ground=True)
    theta = np.arctan2(res.y - height, res.x)
    z = 1j * height + np.exp(1j * theta)
    w = cylinder_over_wall_speed(z, height, 1.0)
    # the series is converged: the flow is tangent to the circle (normal speed ~ 0)
    normal = np.real(w * np.exp(1j * theta))  # (u - i v) e^(i theta): (u, v) . (cos, sin)
    assert np.abs(normal).max() < 1e-10
    # exact surface speed by successive images (Milne-Thomson), vs. panels
    assert np.abs(np.abs(res.ue) - np.abs(w)).max() < 5e-3


def gap_speed(clearance):
    b = 0.4
    res = solve_inviscid(ellipse(200, b, centre=(0.0, b + clearance)), ground=True)
    under = res.y < b + clearance
    return np.abs(res.ue[under]).max()


def test_gap_flow_speeds_up_as_the_ground_nears():
    clearances = [2.0, 1.0, 0.5, 0.25, 0.1]
    speeds = [gap_speed(c) for c in clearances]
    # Venturi effect of the gap between body and ground (common practice, no source); the far
    # case tends to the free-air peak 1 + b/a = 1.4 (Joukowski mapping, e.g. Katz & Plotkin, Low-Speed Aerodynamics)
    assert np.all(np.diff(speeds) > 0)
    assert speeds[0] == pytest.approx(1.4, abs=0.05)


# ------------------------------------------------------------------------------------------
# Kutta condition
# ------------------------------------------------------------------------------------------
@pytest.mark.parametrize("n, tol", [(200, 0.03), (400, 0.02)])
def test_joukowski_circulation(n, tol):
    pts, _ = joukowski(n)
    res = solve_inviscid(pts, kutta_node=0)
    exact = 4.0 * np.pi * RADIUS * np.sin(BETA)  # Gamma/V = 4 pi a sin(alpha + beta), alpha = 0
    assert res.circulation > 0  # clockwise: upward lift for upward camber
    assert res.circulation == pytest.approx(exact, rel=tol)
    # equal and opposite speeds on the two panels at the edge (the Kutta condition)
    assert res.ue[-1] == pytest.approx(-res.ue[0], abs=1e-10)
    assert res.ue[-1] > 0


def test_joukowski_circulation_converges():
    exact = 4.0 * np.pi * RADIUS * np.sin(BETA)
    errs = [
        abs(solve_inviscid(joukowski(n)[0], kutta_node=0).circulation / exact - 1)
        for n in (100, 200, 400)
    ]
    assert errs[0] > errs[1] > errs[2]


def test_joukowski_surface_speed():
    n = 300
    pts, th = joukowski(n)
    res = solve_inviscid(pts, kutta_node=0)
    theta_mid = th + np.pi / n
    exact = joukowski_speed(theta_mid)
    # away from the cusp (front 75 % of the chord), where constant-source panels are accurate;
    # exact speed from the mapping (Milne-Thomson)
    front = res.x < 1.0
    assert np.abs(np.abs(res.ue[front]) - exact[front]).max() < 0.015


def test_without_kutta_circulation_is_zero():
    res = solve_inviscid(joukowski(200)[0])
    assert res.circulation == 0.0
    # no Kutta: the flow turns round the sharp edge, so the edge panels are not balanced
    assert abs(res.ue[0] + res.ue[-1]) > 0.1


# ------------------------------------------------------------------------------------------
# stagnation points and surfaces
# ------------------------------------------------------------------------------------------
def test_split_cylinder():
    res = solve_inviscid(circle(101, centre=(2.0, 0.0), skew=0.1))
    split = split_surfaces(res)
    upper, lower = split
    assert split.success and split.status is SplitStatus.SPLIT and split.n_dividing == 1
    # front / rear stagnation of a circle in a uniform stream at (1, 0) / (3, 0) (exact)
    assert upper.stagnation == pytest.approx((1.0, 0.0), abs=2e-3)
    assert upper.end == pytest.approx((3.0, 0.0), abs=2e-3)
    assert upper.end_kind is SurfaceEnd.REAR_STAGNATION
    assert upper.mean_y > 0 > lower.mean_y
    for surf in (upper, lower):
        assert surf.s[0] == 0.0 and surf.ue[0] == 0.0
        assert np.all(np.diff(surf.s) > 0) and np.all(surf.ue >= 0)
        assert len(surf.index) == len(surf.s) - 1
        assert np.allclose(surf.ue[1:], np.abs(res.ue[surf.index]))
        # each surface is half the circumference (pi R, exact for the circle)
        assert surf.s_end == pytest.approx(np.pi, rel=2e-3)
    # every midpoint is on one surface, except one that coincides with the stagnation point
    # (101 panels: a midpoint sits at theta = pi)
    assert len(upper.index) + len(lower.index) in (res.n_panels, res.n_panels - 1)


@pytest.mark.parametrize("reverse", [False, True])
def test_split_joukowski_ends_at_kutta_edge(reverse):
    pts, _ = joukowski(200)
    k = 0
    if reverse:
        pts, k = pts[::-1], len(pts) - 1
    res = solve_inviscid(pts, kutta_node=k)
    upper, lower = split_surfaces(res)
    # front stagnation at circle angle pi + beta, mapped: z = -2.0333 (exact, alpha = 0)
    zeta = ZETA0 + RADIUS * np.exp(1j * (np.pi + BETA))
    z = zeta + C * C / zeta
    assert upper.stagnation == pytest.approx((z.real, z.imag), abs=5e-3)
    for surf in (upper, lower):
        assert surf.end_kind is SurfaceEnd.TRAILING_EDGE
        assert surf.end == pytest.approx((2.0, 0.0), abs=1e-12)
    assert upper.mean_y > lower.mean_y
    assert upper.s_end + lower.s_end == pytest.approx(res.perimeter, rel=1e-12)
    # counter-clockwise points run from the edge over the top: against the upper flow
    assert upper.direction == (1 if reverse else -1)


def test_split_without_sign_change_is_a_failed_status():
    import dataclasses

    res = solve_inviscid(joukowski(100)[0], kutta_node=0)
    all_forward = dataclasses.replace(res, ue=np.abs(res.ue) + 0.01)
    split = split_surfaces(all_forward)
    assert not split.success and split.status is SplitStatus.NO_STAGNATION
    assert split.upper is None and split.lower is None
    assert "never changes sign" in split.message


def test_split_several_dividing_points_takes_most_upstream():
    import dataclasses

    res = solve_inviscid(circle(100, centre=(2.0, 0.0)))
    ue = np.array(res.ue)
    # reverse the flow on a block of stations downstream on the upper side (x > 2.4): this adds
    # a second dividing point and a second meeting point
    sel = np.flatnonzero((res.x > 2.4) & (res.y > 0))
    block = sel[2:5]
    assert np.all(np.diff(block) == 1)
    ue[block] = -ue[block]
    split = split_surfaces(dataclasses.replace(res, ue=ue))
    assert split.n_dividing >= 2
    assert split.stagnation[0] == pytest.approx(1.0, abs=2e-3)
    assert "most upstream" in split.message


# ------------------------------------------------------------------------------------------
# bad input and numerical failure
# ------------------------------------------------------------------------------------------
TRIANGLE = [[0.0, 1.0], [1.0, 1.0], [0.5, 2.0]]


@pytest.mark.parametrize(
    "points, kwargs, error, text",
    [
        (np.zeros((4, 3)), {}, InputError, "shape (4, 3)"),
        ([[0.0, 1.0], [1.0, 1.0]], {}, InputError, "at least 3 points"),
        ([[0.0, 1.0], [np.nan, 1.0], [0.5, 2.0]], {}, InputError, "not finite"),
        ([[0.0, 1.0], [np.inf, 1.0], [0.5, 2.0]], {}, InputError, "not finite"),
        (
            [[0.0, 1.0], [1.0, 1.0], [1.0, 1.0], [0.5, 2.0]],
            {},
            InputError,
            "points 1 and 2 are repeated",
        ),
        (TRIANGLE + [[0.0, 1.0]], {}, InputError, "last point repeats the first"),
        ([[0.0, 1.0], [1.0, 1.0], [2.0, 1.0]], {}, InputError, "encloses no area"),
        ([["a", 1.0], [1.0, 1.0], [0.5, 2.0]], {}, InputError, "cannot be read as numbers"),
        ([[0.0, 0.0], [1.0, 1.0], [0.5, 2.0]], {"ground": True}, GroundContactError, "above y = 0"),
        ([[0.0, -1.0], [1.0, 1.0], [0.5, 2.0]], {"ground": True}, GroundContactError, "point 0"),
        (TRIANGLE, {"kutta_node": 3}, InputError, "out of range"),
        (TRIANGLE, {"kutta_node": -1}, InputError, "out of range"),
        (TRIANGLE, {"kutta_node": 1.0}, InputError, "integer index"),
        (TRIANGLE, {"kutta_node": True}, InputError, "integer index"),
        (TRIANGLE, {"ground": "yes"}, InputError, "ground is 'yes'"),
        ([[0, 1], [4, 1], [4, 3], [3, 0.5], [2, 3]], {}, SelfIntersectionError, "crosses itself"),
    ],
)
def test_bad_input_raises_project_error(points, kwargs, error, text):
    with pytest.raises(error) as info:
        solve_inviscid(points, **kwargs)
    assert isinstance(info.value, ProfileBenchError)
    assert text in str(info.value)


def test_overlapping_bodies_raise():
    with pytest.raises(InputError, match="overlap"):
        solve_inviscid_bodies([circle(20), circle(20, centre=(0.5, 0.0))])


def test_kutta_nodes_count_must_match_bodies():
    with pytest.raises(InputError, match="one entry"):
        solve_inviscid_bodies([circle(20)], kutta_nodes=[None, None])


def test_split_rejects_non_solution():
    with pytest.raises(InputError, match="InviscidSolution"):
        split_surfaces(np.zeros(3))


def test_ill_conditioned_system_comes_back_as_status(monkeypatch):
    # LAPACK's condition estimate below the solver's threshold: a failed status, not numbers
    monkeypatch.setattr(panel.lapack, "dgecon", lambda lu, anorm, norm="1": (1e-20, 0))
    res = solve_inviscid(circle(30))
    assert not res.success and res.status is InviscidStatus.SINGULAR
    assert "singular to working precision" in res.message and np.isnan(res.ue).all()


def test_singular_system_comes_back_as_status(monkeypatch):
    # force LAPACK's getrf to report a zero pivot: the solver must return a failed status
    def zero_pivot(a, overwrite_a=False):
        return a, np.arange(a.shape[0], dtype=np.int32), 1

    monkeypatch.setattr(panel.lapack, "dgetrf", zero_pivot)
    res = solve_inviscid(circle(30))
    assert not res.success and res.status is InviscidStatus.SINGULAR
    assert "singular" in res.message
    assert np.isnan(res.ue).all()
    with pytest.raises(InputError, match="failed"):
        split_surfaces(res)


def test_result_is_frozen():
    res = solve_inviscid(circle(30))
    with pytest.raises(AttributeError):
        res.circulation = 1.0
    with pytest.raises(ValueError):
        res.ue[0] = 1.0
