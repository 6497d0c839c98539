"""Mouse interaction functions driven by fake press/move/release positions (no Qt)."""

import math

import numpy as np
import pytest
from shapely.geometry import LineString, Point

from profilebench.assess.conditions import Conditions
from profilebench.editor.document import Document
from profilebench.editor.interaction import (
    NodeDrag,
    RadiusDrag,
    corner_geometry,
    hit_node,
    hit_radius_handle,
    hit_segment,
    radius_handle_position,
    snap,
)
from profilebench.editor.view import ViewTransform, fit_view
from profilebench.errors import InputError
from profilebench.geometry.profile import Profile

BOX = Profile.from_points([(0.0, 0.2), (4.0, 0.2), (4.0, 1.7), (0.0, 1.7)], radii=[0, 0, 0.1, 0.2])
VIEW = ViewTransform(scale=100.0, offset_x=50.0, offset_y=300.0)
# close enough that every arc midpoint is further from its node than the smallest handle offset
CLOSE = ViewTransform(scale=1000.0, offset_x=50.0, offset_y=3000.0)


def test_view_round_trip_and_y_flip():
    sx, sy = VIEW.to_screen(1.25, 0.5)
    assert (sx, sy) == (175.0, 250.0)  # y up in the world is up (smaller row) on screen
    assert VIEW.to_world(sx, sy) == pytest.approx((1.25, 0.5))


@pytest.mark.parametrize("factor", [0.5, 1.25, 3.0])
def test_zoom_keeps_the_point_under_the_cursor(factor):
    zoomed = VIEW.zoomed(factor, 321.0, 123.0)
    assert zoomed.to_world(321.0, 123.0) == pytest.approx(VIEW.to_world(321.0, 123.0))
    assert zoomed.scale == pytest.approx(VIEW.scale * factor)


def test_fit_view_shows_all_of_the_bounds_at_true_aspect():
    v = fit_view((0.0, 0.0, 4.0, 1.7), 800, 400, margin=20)
    corners = [v.to_screen(x, y) for x in (0.0, 4.0) for y in (0.0, 1.7)]
    assert all(
        20 - 1e-9 <= sx <= 780 + 1e-9 and 20 - 1e-9 <= sy <= 380 + 1e-9 for sx, sy in corners
    )
    assert v.scale == pytest.approx(min(760 / 4.0, 360 / 1.7))


def test_zoom_factor_must_be_positive():
    with pytest.raises(InputError):
        VIEW.zoomed(0.0, 0, 0)


@pytest.mark.parametrize("dx, dy, hit", [(0, 0, True), (5, -5, True), (9, 0, False)])
def test_hit_node_within_tolerance(dx, dy, hit):
    sx, sy = VIEW.to_screen(*BOX.xy[1])
    assert hit_node(BOX, VIEW, sx + dx, sy + dy, tolerance=8.0) == (1 if hit else None)


@pytest.mark.parametrize("world", [(1.3, 0.23), (4.02, 1.0), (2.0, 1.68), (-0.03, 0.9)])
def test_hit_segment_foot_matches_shapely(world):
    sx, sy = VIEW.to_screen(*world)
    hit = hit_segment(BOX, VIEW, sx, sy, tolerance=6.0)
    assert hit is not None
    a, b = BOX.xy[hit.index], BOX.xy[(hit.index + 1) % len(BOX)]
    chord = LineString([a, b])
    # shapely's project/interpolate give the nearest point on the chord independently
    foot = chord.interpolate(chord.project(Point(world)))
    assert hit.world == pytest.approx((foot.x, foot.y), abs=1e-9)
    assert hit.distance_px == pytest.approx(chord.distance(Point(world)) * VIEW.scale, abs=1e-6)


def test_miss_far_from_every_segment():
    assert hit_segment(BOX, VIEW, *VIEW.to_screen(2.0, 1.0)) is None


@pytest.mark.parametrize(
    "value, grid, expected",
    [(0.1234, 0.01, 0.12), (0.126, 0.01, 0.13), (-0.0049, 0.005, -0.005), (0.1234, None, 0.1234)],
)
def test_snap(value, grid, expected):
    assert snap(value, grid) == pytest.approx(expected)


def test_snap_refuses_negative_grid():
    with pytest.raises(InputError):
        snap(1.0, -0.01)


def test_drag_snaps_to_grid():
    doc = Document(BOX, Conditions())
    sx, sy = VIEW.to_screen(*BOX.xy[1])
    drag = NodeDrag(doc.state, 1, VIEW, sx, sy, grid=0.05)
    prof = drag.move(VIEW, sx + 7.0, sy - 12.0)  # +0.07 m, +0.12 m
    assert prof.xy[1] == pytest.approx((4.05, 0.3))


@pytest.mark.parametrize("node", [2, 3])
def test_radius_handle_sits_on_the_inscribed_arc(node):
    geo = corner_geometry(BOX, node)
    r = BOX.nodes[node].radius
    p = np.array(BOX.xy[node])
    centre = p + np.array(geo.bisector) * r / math.sin(geo.half_angle)
    n = len(BOX)
    # shapely distances: the circle's centre is r from both neighbouring segments (tangent arc)
    for j in ((node - 1) % n, (node + 1) % n):
        seg = LineString([BOX.xy[node], BOX.xy[j]])
        assert seg.distance(Point(centre)) == pytest.approx(r, rel=1e-9)
    hx, hy = CLOSE.to_world(*radius_handle_position(BOX, node, CLOSE))
    assert Point(hx, hy).distance(Point(centre)) == pytest.approx(r, rel=1e-9)
    assert Point(hx, hy).distance(Point(p)) == pytest.approx(r / math.sin(geo.half_angle) - r)


def test_dragging_the_radius_handle_round_trips_the_radius():
    doc = Document(BOX, Conditions())
    sx, sy = radius_handle_position(BOX, 2, CLOSE)
    assert hit_radius_handle(BOX, 2, CLOSE, sx, sy)
    drag = RadiusDrag(doc.state, 2)
    assert drag.radius_at(CLOSE, sx, sy) == pytest.approx(0.1)
    target = BOX.with_radius(2, 0.25)
    tx, ty = radius_handle_position(target, 2, CLOSE)
    assert drag.move(CLOSE, tx, ty).nodes[2].radius == pytest.approx(0.25)
    assert drag.finish().before.profile is BOX


def test_right_angle_corner_geometry():
    geo = corner_geometry(BOX, 0)
    # a rectangle's corner: 90 degrees between the sides, so 90 degrees of turning
    assert math.degrees(geo.turning_angle) == pytest.approx(90.0)
    assert geo.bisector == pytest.approx((math.sqrt(0.5), math.sqrt(0.5)))
