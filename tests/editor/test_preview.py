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
    exact = side ** 2 - (4.0 - math.pi) * r ** 2
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
