"""The cheap drag preview of an outline: fillet arcs against closed-form geometry."""

import math

import numpy as np
import pytest
from shapely.geometry import Polygon

from profilebench.editor.preview import preview_outline
from profilebench.geometry.profile import Node, Profile


def _square(side, r):
    pts = [(0.0, 0.0), (side, 0.0), (side, side), (0.0, side)]
    return Profile([Node(x, y + 0.1, r) for x, y in pts], name="square")


@pytest.mark.parametrize("r", [0.05, 0.2, 0.45])
def test_rounded_square_area_matches_closed_form(r):
    side = 1.0
    pts = preview_outline(_square(side, r), arc_points=200)
    # closed form: a square with four quarter-circle corners has area s^2 - (4 - pi) r^2
    exact = side**2 - (4.0 - math.pi) * r**2
    assert Polygon(pts).area == pytest.approx(exact, rel=1e-4)


def test_arc_points_lie_on_the_fillet_circle():
    r = 0.2
    pts = preview_outline(_square(1.0, r), arc_points=50)
    # the corner at (1, 1.1): fillet centre at (1 - r, 1.1 - r) (circle tangent to both sides)
    centre = np.array([1.0 - r, 1.1 - r])
    near = pts[(pts[:, 0] > 1.0 - r + 1e-9) & (pts[:, 1] > 1.1 - r + 1e-9)]
    assert len(near) > 10
    assert np.hypot(*(near - centre).T) == pytest.approx(r, abs=1e-12)


def test_sharp_corners_give_the_node_polygon():
    prof = _square(1.0, 0.0)
    np.testing.assert_array_equal(preview_outline(prof), np.asarray(prof.xy))


@pytest.mark.parametrize("r", [0.1, 0.3])
def test_built_outline_points_area_matches_closed_form(r):
    from profilebench.editor.preview import build_outline_points

    pts, ok, message = build_outline_points(_square(1.0, r), samples=2000)
    # closed form: a square with four quarter-circle corners has area s^2 - (4 - pi) r^2
    # (2000 samples: the chords lose well under 0.1 % of it)
    assert ok and message == ""
    assert Polygon(pts).area == pytest.approx(1.0 - (4.0 - math.pi) * r**2, rel=1e-3)


def test_built_outline_points_of_a_too_large_radius_say_why_and_give_the_nodes():
    from profilebench.editor.preview import build_outline_points

    prof = _square(1.0, 0.8)  # setback 0.8 m on 1 m sides: two fillets cannot share a side
    pts, ok, message = build_outline_points(prof)
    assert not ok and message
    np.testing.assert_array_equal(pts, np.asarray(prof.xy))
