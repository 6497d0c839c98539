"""Outline building: fillet radii measured on the built outline, radius-too-large errors."""

import math

import numpy as np
import pytest

from profilebench.errors import GeometryError, RadiusTooLargeError
from profilebench.geometry import Node, Profile, build_outline, rounded_box

from geometry_cases import make_car_like


def fitted_radius(outline, s_lo, s_hi, n=60):
    """Radius of the least-squares circle through outline points sampled on [s_lo, s_hi].

    Algebraic (Kasa) circle fit solved with numpy.linalg.lstsq: x^2 + y^2 = 2 a x + 2 b y + c,
    R = sqrt(c + a^2 + b^2). Uses only sampled points, not the builder's arc data.
    """
    p = outline.points_at(np.linspace(s_lo, s_hi, n))
    A = np.column_stack([2 * p[:, 0], 2 * p[:, 1], np.ones(n)])
    (a, b, c), *_ = np.linalg.lstsq(A, (p**2).sum(axis=1), rcond=None)
    return math.sqrt(c + a * a + b * b)


def fd_radius(outline, s, h):
    """Curvature radius from three points a step h apart (circumradius, |abc| / (4 area))."""
    p0, p1, p2 = outline.points_at(np.array([s - h, s, s + h]))
    a, b, c = (np.hypot(*(q - r)) for q, r in ((p0, p1), (p1, p2), (p2, p0)))
    area = 0.5 * abs((p1 - p0)[0] * (p2 - p0)[1] - (p1 - p0)[1] * (p2 - p0)[0])
    return a * b * c / (4 * area)


# Line-to-line corners of a 4 m x 1.4 m box.
@pytest.mark.parametrize("r", [0.005, 0.05, 0.2, 0.5, 0.69])
def test_line_line_fillet_radius_measured(r):
    prof = rounded_box(4.0, 1.4, r, clearance=0.2)
    o = build_outline(prof)
    assert len(o.arcs) == 4
    for a in o.arcs:
        L = a.s_end - a.s_start
        # requirement: measured curvature radius within 1 % of the requested radius
        assert fitted_radius(o, a.s_start + 0.1 * L, a.s_end - 0.1 * L) == pytest.approx(
            r, rel=0.01
        )
        assert fd_radius(o, 0.5 * (a.s_start + a.s_end), 0.05 * L) == pytest.approx(r, rel=0.01)


car_like = make_car_like


@pytest.mark.parametrize(
    "radii", [(0.1, 0.15, 0.05, 0.08), (0.02, 0.3, 0.2, 0.03), (0.2, 0.05, 0.01, 0.2)]
)
def test_fillets_next_to_splines_honour_radius(radii):
    prof = car_like(*radii)
    o = build_outline(prof)
    wanted = {prof.nodes[a.node].radius for a in o.arcs}
    assert wanted == set(radii)
    for a in o.arcs:
        L = a.s_end - a.s_start
        # requirement: measured curvature radius within 1 % of the requested radius
        assert fitted_radius(o, a.s_start + 0.1 * L, a.s_end - 0.1 * L) == pytest.approx(
            a.radius, rel=0.01
        )
        assert fd_radius(o, 0.5 * (a.s_start + a.s_end), 0.05 * L) == pytest.approx(
            a.radius, rel=0.01
        )


@pytest.mark.parametrize("node", [0, 2, 4, 6])
def test_fillet_is_tangent_to_its_neighbours(node):
    # Tangency: the direction of the outline just before and just after each tangent point agree
    # (a finite-difference check on sampled points; a kink would show the corner's turn).
    o = build_outline(car_like())
    a = next(a for a in o.arcs if a.node == node)
    h = 1e-5
    for s in (a.s_start, a.s_end):
        p = o.points_at(np.array([s - 2 * h, s - h, s + h, s + 2 * h]))
        t_in, t_out = p[1] - p[0], p[3] - p[2]
        ang = math.atan2(t_in[0] * t_out[1] - t_in[1] * t_out[0], t_in @ t_out)
        assert abs(ang) < 1e-3  # rad; an unrounded corner here turns by > 0.3 rad


def test_box_perimeter_and_start():
    # closed form: perimeter of a rounded rectangle 2(L + H) - (8 - 2 pi) r
    o = build_outline(rounded_box(4.0, 1.4, 0.2))
    assert o.length == pytest.approx(2 * (4 + 1.4) - (8 - 2 * math.pi) * 0.2, rel=1e-12)
    assert o.sample(100).shape == (100, 2)
    # node 0 (front bottom) is rounded: the outline starts where its fillet meets the front face
    assert o.points_at(0.0)[0] == pytest.approx([0.0, 0.2], abs=1e-12)


def test_sharp_and_smooth_nodes_lie_on_outline():
    prof = car_like()
    o = build_outline(prof)
    pts = o.points_at(np.array(o.node_s))
    for i, nd in enumerate(prof.nodes):
        if nd.smooth or nd.radius == 0:
            assert pts[i] == pytest.approx([nd.x, nd.y], abs=1e-6)


def test_all_smooth_is_closed_periodic_spline():
    prof = Profile.from_points([(0, 0), (1, -0.2), (2, 0.3), (1, 1)], smooth=[True] * 4)
    o = build_outline(prof)
    assert o.arcs == () and o.sharp_edges == ()
    p = o.points_at(np.array([0.0, o.length * (1 - 1e-9)]))
    assert p[0] == pytest.approx(p[1], abs=1e-6)


def test_radius_too_large_line_line_gives_largest_that_fits():
    # 1 m x 0.5 m box, one rounded corner between a 1 m and a 0.5 m side (neighbours sharp):
    # fillet setback r / tan(90 deg / 2) = r must fit in the 0.5 m side, so the largest is 0.5 m
    # (textbook fillet construction, setback = r cot(theta/2)).
    prof = Profile((Node(0, 0), Node(1, 0), Node(1, 0.5, 0.6, label="rear top"), Node(0, 0.5)))
    with pytest.raises(RadiusTooLargeError) as exc:
        build_outline(prof)
    err = exc.value
    assert err.node == 2 and err.radius == 0.6
    assert err.largest == pytest.approx(0.5, rel=1e-9)
    msg = str(err)
    assert "node 2" in msg and "rear top" in msg and "(1000.0, 500.0) mm" in msg
    assert "500.0 mm" in msg and "reduce the radius" in msg
    build_outline(prof.with_radius(2, err.largest))  # the largest radius fits


def test_radius_too_large_with_rounded_neighbour():
    # nodes 1 and 2 share the 0.5 m rear side; setbacks r1 + r2 = 0.6 m do not fit. The first
    # such node is reported: with node 2 keeping 0.4 m, node 1 has 0.5 - 0.4 = 0.1 m left
    # (setback = r for a 90 degree corner, textbook fillet construction); node 2 is named too.
    prof = Profile((Node(0, 0), Node(1, 0, 0.2), Node(1, 0.5, 0.4), Node(0, 0.5)))
    with pytest.raises(RadiusTooLargeError) as exc:
        build_outline(prof)
    assert exc.value.node == 1
    assert exc.value.largest == pytest.approx(0.1, rel=1e-9)
    assert "100.0 mm" in str(exc.value) and "node 2 does not fit either" in str(exc.value)
    build_outline(prof.with_radius(1, exc.value.largest))


@pytest.mark.parametrize("node", [0, 4, 6])
def test_radius_too_large_next_to_spline(node):
    base = car_like()
    prof = base.with_radius(node, 2.0)
    with pytest.raises(RadiusTooLargeError) as exc:
        build_outline(prof)
    err = exc.value
    assert err.node == node and 0 < err.largest < 2.0
    assert f"{math.floor(err.largest * 1e4 + 1e-6) / 10:.1f} mm" in str(err)
    # the reported largest radius fits, and anything noticeably larger does not
    o = build_outline(base.with_radius(node, err.largest * (1 - 1e-6)))
    a = next(a for a in o.arcs if a.node == node)
    L = a.s_end - a.s_start
    assert fitted_radius(o, a.s_start + 0.1 * L, a.s_end - 0.1 * L) == pytest.approx(
        err.largest, rel=0.01
    )
    with pytest.raises(RadiusTooLargeError):
        build_outline(base.with_radius(node, err.largest * 1.01))


def test_too_few_nodes():
    with pytest.raises(GeometryError, match="at least 3 nodes"):
        build_outline(Profile((Node(0, 0), Node(1, 0))))


def test_coincident_neighbours():
    with pytest.raises(GeometryError, match="coincide.*delete one"):
        build_outline(Profile((Node(0, 0), Node(1, 0), Node(1, 0), Node(0, 1))))


def test_outline_is_cached_on_profile():
    prof = rounded_box(2.0, 1.0, 0.1)
    assert build_outline(prof) is build_outline(prof)


@pytest.mark.parametrize("turn_deg", [20.0, 30.0, 60.0, 120.0])
def test_gentle_and_sharp_line_corners_set_back_r_tan_half_turn(turn_deg):
    # Textbook fillet between two lines (any geometry text): the tangent points lie r tan(theta/2)
    # from the corner along each line, theta the turning angle; the arc turns by theta.
    r = 0.1
    th = math.radians(turn_deg)
    corner = np.array([2.0, 0.5])
    a = corner - 2.0 * np.array([1.0, 0.0])
    b = corner + 2.0 * np.array([math.cos(th), math.sin(th)])
    prof = Profile((Node(*a), Node(*corner, radius=r), Node(*b), Node(a[0], b[1] + 1.0)))
    o = build_outline(prof)
    arc = next(x for x in o.arcs if x.node == 1)
    p_start, p_end = o.points_at(np.array([arc.s_start, arc.s_end]))
    d = r * math.tan(th / 2)
    assert np.hypot(*(p_start - corner)) == pytest.approx(d, rel=1e-9)
    assert np.hypot(*(p_end - corner)) == pytest.approx(d, rel=1e-9)
    assert abs(p_start[1] - corner[1]) < 1e-12  # on the incoming line
    assert (arc.s_end - arc.s_start) == pytest.approx(r * th, rel=1e-9)  # arc length r theta


def test_largest_radius_of_a_gentle_corner_is_room_over_tan_half_turn():
    # room on the shorter neighbouring segment / tan(theta/2) (inverse of the setback above)
    th = math.radians(30.0)
    corner = np.array([2.0, 0.5])
    a = corner - 0.05 * np.array([1.0, 0.0])  # 50 mm of straight before the corner
    b = corner + 2.0 * np.array([math.cos(th), math.sin(th)])
    prof = Profile((Node(*a), Node(*corner, radius=1.0), Node(*b), Node(a[0], b[1] + 1.0)))
    with pytest.raises(RadiusTooLargeError) as err:
        build_outline(prof)
    assert err.value.largest == pytest.approx(0.05 / math.tan(th / 2), rel=1e-6)
