"""Underlay placement by two reference points, and parsing of typed entries (no Qt)."""

import numpy as np
import pytest

from profilebench.editor.fields import (
    format_mm,
    parse_length_mm,
    parse_number,
    parse_optional,
    parse_point_mm,
    parse_speed_kmh,
)
from profilebench.editor.underlay import Underlay
from profilebench.errors import InputError


def test_initial_placement_puts_the_bottom_edge_on_the_ground():
    u = Underlay.initial("sketch.png", 900, 300, length=4.5)
    assert u.to_world(0, 300) == pytest.approx((0.0, 0.0))
    assert u.to_world(900, 300) == pytest.approx((4.5, 0.0))
    assert u.to_world(0, 0) == pytest.approx((0.0, 1.5))  # rows run down, y runs up
    assert u.pixel_size == pytest.approx(4.5 / 900)


@pytest.mark.parametrize(
    "px, m",
    [
        (((120, 410), (780, 405)), ((0.6, 0.33), (3.2, 0.33))),  # two wheel centres
        (((10, 10), (200, 300)), ((-1.0, 2.0), (0.5, 0.1))),
    ],
)
def test_two_point_placement_is_a_similarity(px, m):
    u = Underlay.initial("photo.jpg", 1000, 500).placed(px, m)
    assert u.to_world(*px[0]) == pytest.approx(m[0], abs=1e-12)
    assert u.to_world(*px[1]) == pytest.approx(m[1], abs=1e-12)
    a = u.matrix[:, :2]
    # a similarity with a mirror: A^T A = s^2 I and det A = -s^2 (numpy linear algebra)
    s2 = np.linalg.norm(np.subtract(*m)) ** 2 / np.linalg.norm(np.subtract(*px)) ** 2
    assert a.T @ a == pytest.approx(s2 * np.eye(2))
    assert np.linalg.det(a) == pytest.approx(-s2)
    assert u.to_image(*u.to_world(333, 222)) == pytest.approx((333, 222))


def test_coincident_reference_points_are_refused():
    u = Underlay.initial("photo.jpg", 100, 50)
    with pytest.raises(InputError, match="same"):
        u.placed(((5, 5), (5, 5)), ((0, 0), (1, 0)))


@pytest.mark.parametrize("opacity", [-0.1, 1.5, float("nan")])
def test_opacity_out_of_range_is_refused(opacity):
    with pytest.raises(InputError, match="opacity"):
        Underlay.initial("photo.jpg", 100, 50).with_opacity(opacity)


def test_speed_in_kmh():
    # 1 km/h = 1000 m / 3600 s (SI definition)
    assert parse_speed_kmh("108") == pytest.approx(30.0)
    assert parse_speed_kmh("72,5") == pytest.approx(72.5 / 3.6)


@pytest.mark.parametrize(
    "text, match",
    [
        ("", "empty"),
        ("abc", "not a number"),
        ("-5", "must be >"),
        ("0", "must be >"),
        ("inf", "finite"),
    ],
)
def test_bad_speed_entry_says_what_is_wrong(text, match):
    with pytest.raises(InputError, match=match):
        parse_speed_kmh(text)


def test_length_in_mm_and_range():
    assert parse_length_mm("25", "radius") == pytest.approx(0.025)
    with pytest.raises(InputError, match="radius = -1 mm is too small"):
        parse_length_mm("-1", "radius")
    with pytest.raises(InputError, match="too large"):
        parse_number("3", "scale", maximum=1.0)


def test_optional_entry_and_format():
    assert parse_optional("  ", parse_length_mm, "width") is None
    assert parse_optional("1800", parse_length_mm, "width") == pytest.approx(1.8)
    assert format_mm(0.0125) == "12.5" and format_mm(None) == ""


@pytest.mark.parametrize(
    "text, xy",
    [("1200, 350", (1.2, 0.35)), ("-40;0", (-0.04, 0.0)), (" 0 , 1e3 ", (0.0, 1.0))],
)
def test_a_point_is_typed_as_x_y_in_mm(text, xy):
    assert parse_point_mm(text) == pytest.approx(xy, abs=1e-15)


@pytest.mark.parametrize("text", ["1200", "1, 2, 3", "", "x, 3", "1,5, 2"])
def test_a_point_that_is_not_two_numbers_is_refused(text):
    with pytest.raises(InputError):
        parse_point_mm(text)
