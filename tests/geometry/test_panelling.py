"""Panelling: point count, sharp nodes on points, arc refinement, clustering, bad counts."""

import numpy as np
import pytest

from profilebench.errors import InputError, ProfileBenchError
from profilebench.geometry import Node, Profile, naca4, panelize, rounded_box

from geometry_cases import make_car_like as car_like


def signed_area(p):
    # shoelace formula
    return 0.5 * np.sum(p[:, 0] * np.roll(p[:, 1], -1) - np.roll(p[:, 0], -1) * p[:, 1])


PROFILES = {
    "box_mixed": lambda: rounded_box(4.0, 1.4, (0.3, 0.0, 0.05, 0.0), clearance=0.15),
    "car": car_like,
    "naca2412": lambda: naca4("2412"),
    "clockwise": lambda: Profile(
        (Node(0, 0.1), Node(0, 1.0, 0.2), Node(3, 1.0, 0.1), Node(3, 0.1))
    ),
}


@pytest.mark.parametrize("name", sorted(PROFILES))
@pytest.mark.parametrize("n", [20, 57, 250, 1000])
def test_exact_count_orientation_and_sharp_nodes(name, n):
    prof = PROFILES[name]()
    pan = panelize(prof, n)
    assert pan.points.shape == (n, 2) and pan.n_panels == n
    # orientation of the points matches the nodes' (shoelace sign)
    assert np.sign(signed_area(pan.points)) == np.sign(signed_area(np.array(prof.xy)))
    # every sharp node is exactly a panel end point
    for i, nd in enumerate(prof.nodes):
        if not nd.smooth and nd.radius == 0:
            assert tuple(pan.points[pan.node_point[i]]) == (nd.x, nd.y)
    # s runs from the outline's start (node 0, or the start of node 0's fillet): point 0 lies on
    # it or, given the other way round than the canonical order, within the first panel after it
    assert 0.0 <= pan.s[0] < pan.s[1] and np.all(np.diff(pan.s) > 0) and pan.s[-1] < pan.length
    # panels are chords of the outline: their total length is just below the perimeter
    chords = np.hypot(*(np.roll(pan.points, -1, axis=0) - pan.points).T)
    assert chords.sum() <= pan.length * (1 + 1e-12)
    assert chords.sum() >= pan.length * (1 - 0.02 if n >= 57 else 0.9)


@pytest.mark.parametrize("r", [0.01, 0.1, 0.4])
@pytest.mark.parametrize("n", [150, 250])
def test_at_least_8_panels_per_90_degrees_of_arc(r, n):
    prof = rounded_box(4.0, 1.4, (r, r / 2, r, 0.0), clearance=0.2)
    pan = panelize(prof, n)
    for c in pan.corners:
        if c.radius == 0:
            continue
        inside = np.flatnonzero((pan.s >= c.s_start) & (pan.s <= c.s_end))
        panels_on_arc = inside.size + 1  # points inside split the arc into this many pieces
        # requirement of the design: at least about 8 panels per 90 degrees of arc
        assert panels_on_arc >= 8 * c.turning_angle_deg / 90.0
        assert c.turning_angle_deg == pytest.approx(90.0)  # box corners turn by 90 degrees
        assert c.point_start == inside[0] and c.point_end == inside[-1]
        assert c.convex


def test_clustering_toward_sharp_edges():
    # panels next to a sharp edge are shorter than panels mid-way along the same straight side
    # (common practice for panel methods, no source)
    pan = panelize(rounded_box(4.0, 1.4, 0.0), 200)
    chords = np.hypot(*(np.roll(pan.points, -1, axis=0) - pan.points).T)
    k = pan.node_point[1]  # rear bottom corner; the bottom side runs from node 0 to node 1
    mid = pan.node_point[0] + (k - pan.node_point[0]) // 2
    assert chords[k - 1] < 0.5 * chords[mid]
    assert chords[pan.node_point[0]] < 0.5 * chords[mid]
    # growth away from the edge is smooth: neighbouring panels differ by less than 30 %
    ratio = chords[pan.node_point[0] + 1 : k] / chords[pan.node_point[0] : k - 1]
    assert np.all((ratio > 0.7) & (ratio < 1.3))


def test_corner_spans_and_node_points():
    prof = car_like()
    pan = panelize(prof, 250)
    spans = {c.node: c for c in pan.corners}
    assert sorted(spans) == [i for i, nd in enumerate(prof.nodes) if not nd.smooth]
    tail = spans[5]
    assert tail.radius == 0 and tail.s_start == tail.s_end and tail.centre is None
    nose = spans[0]
    # the fillet centre is one radius from its arc's panel points (circle geometry)
    d = np.hypot(*(pan.points[nose.point_start : nose.point_end + 1] - nose.centre).T)
    assert d == pytest.approx(nose.radius, rel=1e-6)
    # the nose's node point is the point nearest the middle of its fillet
    mid = 0.5 * (nose.s_start + nose.s_end)
    assert pan.node_point[0] == int(np.argmin(np.abs(pan.s - mid)))


def test_panel_points_method_matches_panelize():
    prof = car_like()
    assert np.array_equal(prof.panel_points(120), panelize(prof, 120).points)
    assert prof.panel_points().shape == (250, 2)


@pytest.mark.parametrize("bad", [19, 5001, 0, -5, 2.5, True, "250"])
def test_bad_panel_counts(bad):
    with pytest.raises(InputError, match="20 (and|to) 5000") as exc:
        panelize(rounded_box(1.0, 1.0), bad)
    assert isinstance(exc.value, ProfileBenchError)


def test_bad_geometry_raises_project_error():
    with pytest.raises(ProfileBenchError, match="at least 3 nodes"):
        panelize(Profile((Node(0, 0), Node(1, 0))), 100)


# --- a focus: one corner's neighbourhood panelled as at a higher count -------------------------


def _box():
    return rounded_box(4.0, 1.6, (0.08, 0.05, 0.05, 0.12), clearance=0.2)


def _arc_points(pan, node):
    sp = next(c for c in pan.corners if c.node == node)
    return (sp.point_end - sp.point_start) % len(pan.points)


def test_a_focus_spreads_the_points_round_its_corner_as_at_its_count():
    from profilebench.geometry.panelling import Focus

    box = _box()
    plain, fine = panelize(box, 250), panelize(box, 1000)
    focused = panelize(box, 250, focus=Focus(3, 0.16, 1000))
    # more panels than asked for: the corner's neighbourhood has the finer count's
    assert len(focused.points) > 250 and focused.n_panels == len(focused.points)
    assert abs(_arc_points(focused, 3) - _arc_points(fine, 3)) <= 1
    # the other corners keep the plain count's
    for node in (0, 1, 2):
        assert abs(_arc_points(focused, node) - _arc_points(plain, node)) <= 1
    # the corner's own span and radius are the outline's either way
    a = next(c for c in focused.corners if c.node == 3)
    b = next(c for c in plain.corners if c.node == 3)
    assert (a.s_start, a.s_end, a.radius) == pytest.approx((b.s_start, b.s_end, b.radius))


def test_a_focus_that_refines_nothing_is_the_plain_panelling():
    from profilebench.geometry.panelling import Focus

    box = _box()
    plain = panelize(box, 500)
    for focus in (Focus(3, 0.16, 400), Focus(3, 0.0, 1000)):
        assert panelize(box, 500, focus=focus) is plain  # the cached plain panelling
    # a sharp node has no arc to refine round: its edge clustering is what it gets
    sharp = rounded_box(2.0, 0.5, (0.1, 0.0, 0.0, 0.1), clearance=0.05)
    np.testing.assert_array_equal(
        panelize(sharp, 250, focus=Focus(1, 0.05, 1000)).points, panelize(sharp, 250).points
    )


def test_a_focus_gives_the_same_points_whichever_way_round_the_outline_is_given():
    from profilebench.geometry.panelling import Focus

    box = _box()
    nodes = box.nodes
    other = Profile([nodes[2], nodes[1], nodes[0], nodes[3]], name="reversed")
    a = panelize(box, 250, focus=Focus(3, 0.16, 1000)).points
    b = panelize(other, 250, focus=Focus(3, 0.16, 1000)).points
    assert len(a) == len(b)
    key = lambda p: tuple(np.round(p, 9))  # noqa: E731
    assert sorted(map(key, a)) == sorted(map(key, b))


def test_a_focus_on_the_corner_at_the_outline_start_refines_both_sides():
    # the canonical outline starts at a fillet's tangent point: the zone round that arc wraps
    # past s = 0, and the points on both sides of it are refined alike
    from profilebench.geometry.panelling import Focus

    def gap(pts, a, b):
        return float(np.hypot(*(pts[a % len(pts)] - pts[b % len(pts)])))

    box = _box()
    fine = panelize(box, 1000)
    for node in range(4):
        focused = panelize(box, 250, focus=Focus(node, 0.16, 1000))
        assert abs(_arc_points(focused, node) - _arc_points(fine, node)) <= 1
        sp = next(c for c in focused.corners if c.node == node)
        spf = next(c for c in fine.corners if c.node == node)
        # three panels out either side of the arc: as long as at the finer count
        for a, b, af, bf in (
            (sp.point_start - 3, sp.point_start, spf.point_start - 3, spf.point_start),
            (sp.point_end, sp.point_end + 3, spf.point_end, spf.point_end + 3),
        ):
            assert gap(focused.points, a, b) == pytest.approx(gap(fine.points, af, bf), rel=0.3)
