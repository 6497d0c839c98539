"""Validity: each bad input gives a project error whose message says what to fix."""

import numpy as np
import pytest
import shapely

from profilebench.errors import (
    GeometryError,
    GroundContactError,
    RadiusTooLargeError,
    SelfIntersectionError,
)
from profilebench.geometry import Node, Profile, circle, explain, naca4, rounded_box, validate

from geometry_cases import make_car_like


@pytest.mark.parametrize(
    "make",
    [
        lambda: rounded_box(4, 1.4, 0.2, clearance=0.2),
        make_car_like,
        lambda: naca4("2412").translated(0, 0.5),
        lambda: circle(1.0, centre=(0, 1.5)),
    ],
)
def test_valid_profiles_have_no_problems(make):
    prof = make()
    assert explain(prof, ground=True) == []
    assert validate(prof, ground=True) is None


def test_too_few_nodes():
    prof = Profile((Node(0, 0), Node(1, 1)))
    with pytest.raises(GeometryError, match="needs at least 3 nodes: add nodes"):
        validate(prof)


def test_near_coincident_nodes_named_with_distance():
    prof = Profile((Node(0, 0), Node(1, 0), Node(1, 1), Node(1.000001, 1.0), Node(0, 1)))
    msgs = explain(prof)
    assert len(msgs) == 1
    assert "node 2" in msgs[0] and "node 3" in msgs[0] and "0.001 mm apart" in msgs[0]
    assert "delete one of them or move it" in msgs[0]
    with pytest.raises(GeometryError):
        validate(prof)


def test_self_intersection_location():
    # bow tie: segments (0,0)-(1,1) and (1,0)-(0,1) cross at (0.5, 0.5) (line intersection,
    # solved independently with numpy below)
    prof = Profile((Node(0, 0), Node(1, 1), Node(1, 0), Node(0, 1)))
    # (0,0) + u (1,1) = (1,0) + v (-1,1)  ->  u + v = 1, u - v = 0
    u, v = np.linalg.solve(np.array([[1.0, 1.0], [1.0, -1.0]]), [1.0, 0.0])
    expected = np.array([0.0, 0.0]) + u * np.array([1.0, 1.0])
    with pytest.raises(SelfIntersectionError) as exc:
        validate(prof)
    assert exc.value.location == pytest.approx(tuple(expected), abs=1e-9)
    assert "(500.0, 500.0) mm" in str(exc.value) and "so the outline does not cross" in str(
        exc.value
    )


def test_self_intersection_from_spline_overshoot():
    # the node polygon is simple but a spline through the smooth nodes loops across the line
    prof = Profile(
        (
            Node(0, 0),
            Node(2, 0),
            Node(2, 0.06, smooth=True),
            Node(0.3, 0.03, smooth=True),
            Node(0.3, 1, smooth=True),
            Node(0, 1),
        )
    )
    assert shapely.is_valid(shapely.Polygon(prof.xy))  # shapely: the node polygon is simple
    with pytest.raises(SelfIntersectionError) as exc:
        validate(prof)
    assert "built outline" in str(exc.value) and "crosses itself" in str(exc.value)
    # the crossing is on the bottom line y = 0, between the sharp nodes
    assert exc.value.location[1] == pytest.approx(0.0, abs=1e-9)
    assert 0.0 < exc.value.location[0] < 2.0


@pytest.mark.parametrize("pts", [[(0, 0), (1, 0), (2, 0)], [(0, 0), (1, 1), (2, 2), (0.5, 0.5)]])
def test_zero_area(pts):
    with pytest.raises(GeometryError, match="enclose no area.*move nodes off the line"):
        validate(Profile.from_points(pts))


def test_zero_area_collinear_message():
    msgs = explain(Profile.from_points([(0, 0), (1, 0), (3, 0), (2, 0)]))
    assert msgs and "enclose no area" in msgs[0] and "move nodes off the line" in msgs[0]


def test_radius_too_large_via_validate():
    prof = rounded_box(1.0, 0.5, 0.0).with_radius(2, 0.6)
    with pytest.raises(RadiusTooLargeError, match="largest radius that fits there is 500.0 mm"):
        validate(prof)


@pytest.mark.parametrize(
    "clearance, low_mm, remedy",
    [
        (-0.05, -50.0, "raise the profile by more than 50.0 mm"),
        (0.0, 0.0, "raise the profile clear of y = 0"),  # touching: no "by -0.0 mm"
    ],
)
def test_below_ground(clearance, low_mm, remedy):
    prof = rounded_box(4, 1.4, 0.2, clearance=clearance)
    assert explain(prof, ground=False) == []
    with pytest.raises(GroundContactError) as exc:
        validate(prof, ground=True)
    msg = str(exc.value)
    assert f"{low_mm:.1f}) mm" in msg and remedy in msg


def test_circle_below_ground_lowest_point():
    # circle of radius 1 m centred 0.9 m up: lowest point (0, -0.1) m (circle geometry)
    with pytest.raises(GroundContactError, match=r"\(0\.0, -100\.0\) mm.*more than 100\.0 mm"):
        validate(circle(1.0, centre=(0.0, 0.9)), ground=True)


@pytest.mark.parametrize("node", [Node(1, 0, 0.05), Node(1, 0, smooth=True)])
def test_trailing_edge_must_be_sharp(node):
    base = Profile((Node(0, 0.2), Node(1, 0), Node(0, -0.2)), trailing_edge=1)
    assert explain(base) == []
    prof = base.replace_node(1, node)
    with pytest.raises(GeometryError, match="needs a sharp edge: set its radius to 0"):
        validate(prof)


def test_explain_lists_every_problem():
    prof = Profile((Node(0, -0.1), Node(1, 0, 0.01), Node(0, 0.2)), trailing_edge=1)
    msgs = explain(prof, ground=True)
    assert len(msgs) == 2
    assert "ground" in msgs[0] and "trailing edge" in msgs[1]
