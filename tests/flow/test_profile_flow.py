"""The wake model's closed-body pass on a coarser panelling (``closed_points``)."""

import numpy as np
import pytest
import shapely

from profilebench.errors import InputError
from profilebench.assess.solve import closed_points
from profilebench.flow.profile_flow import march_surface, solve_profile_flow
from profilebench.geometry import panelize
from profilebench.geometry.shapes import rounded_box

SPEED = 30.0
NU = 1.5e-5
HEIGHT = 1.4


def _box_points():
    prof = rounded_box(4.0, HEIGHT, radius=(0.3, 0.05, 0.05, 0.1), clearance=0.2)
    pan = panelize(prof, 300)
    return prof, pan


def _every_other_point(pan):
    """Every other panel point and every corner arc's, with no fully panelled rear: a coarser
    subset than the analysis's own (profilebench.assess.solve.closed_points)."""
    pts = pan.points
    keep = np.zeros(len(pts), dtype=bool)
    keep[::2] = True
    for span in pan.corners:
        i0, i1 = span.point_start, span.point_end
        if i1 >= i0:
            keep[i0 : i1 + 1] = True
        else:
            keep[i0:] = True
            keep[: i1 + 1] = True
    return np.flatnonzero(keep)


def _flow(pts, closed_points=None):
    return solve_profile_flow(
        pts,
        speed=SPEED,
        nu=NU,
        ground=True,
        reattach_length=2.5 * HEIGHT,
        wake_length=10.0 * HEIGHT,
        closed_points=closed_points,
    )


def _pressure_drag(flow):
    """Pressure drag coefficient on the height: -(1/h) closed-integral Cp n_x ds (numpy sums)."""
    inv = flow.inviscid
    return float(np.sum(inv.cp * inv.normal[:, 0] * inv.panel_length)) / HEIGHT


@pytest.fixture(scope="module")
def box_flows():
    _, pan = _box_points()
    return pan, _flow(pan.points), _flow(pan.points, closed_points(pan, HEIGHT))


def test_coarse_closed_pass_keeps_the_full_panelling_result(box_flows):
    pan, full, coarse = box_flows
    assert full.success and coarse.success
    # consistency with this package's own full closed-body pass (no outside value exists for
    # the wake model's separation point): the wake starts at the separation points themselves,
    # which the two passes place within a millimetre of each other, so the surfaces end there
    # and the pressure drag agrees to 0.1 % (tolerances: common practice, no source)
    assert coarse.closed.inviscid.n_panels < len(pan.points)
    for a, b in zip(coarse.surfaces, full.surfaces):
        assert a.name == b.name
        assert float(a.surface.s_end) == pytest.approx(float(b.surface.s_end), abs=1e-3)
    np.testing.assert_allclose(coarse.wake_points[0], full.wake_points[0], rtol=0, atol=1e-3)
    assert _pressure_drag(coarse) == pytest.approx(_pressure_drag(full), rel=1e-3)


def test_coarse_result_geometry_is_the_full_outline(box_flows):
    pan, _, coarse = box_flows
    inv = coarse.inviscid
    ring = shapely.LinearRing(pan.points)
    poly = shapely.Polygon(pan.points)
    # perimeter and orientation against shapely's own length and ring orientation
    assert inv.perimeter == pytest.approx(ring.length, rel=1e-12)
    assert inv.clockwise == (not ring.is_ccw)
    # outward normals: a step outward from each midpoint leaves the polygon (shapely.contains)
    eps = 1e-4
    out = shapely.points(inv.x + eps * inv.normal[:, 0], inv.y + eps * inv.normal[:, 1])
    inside = shapely.points(inv.x - eps * inv.normal[:, 0], inv.y - eps * inv.normal[:, 1])
    assert not shapely.contains(poly, out).any()
    assert shapely.contains(poly, inside).all()
    # midpoints and the midpoint arc length by numpy (cumulative chord lengths)
    pts = pan.points
    nxt = np.roll(pts, -1, axis=0)
    np.testing.assert_allclose(inv.x, 0.5 * (pts[:, 0] + nxt[:, 0]), rtol=0, atol=1e-15)
    chords = np.linalg.norm(nxt - pts, axis=1)
    np.testing.assert_allclose(inv.s, np.cumsum(chords) - 0.5 * chords, rtol=1e-13)
    assert inv.success and inv.ground


def test_a_coarse_pass_everywhere_places_the_wake_where_the_full_pass_does():
    _, pan = _box_points()
    full = _flow(pan.points)
    # every other point everywhere (no fully panelled rear): the wake still starts at the coarse
    # pass's separation points, projected on the full outline, within 20 mm of the
    # full pass's, and the pressure drag agrees to 1 % (consistency with this package's own full
    # pass; tolerances common practice, no source)
    again = _flow(pan.points, _every_other_point(pan))
    assert again.closed.inviscid.n_panels < len(pan.points)
    for a, b in zip(again.surfaces, full.surfaces):
        assert float(a.surface.s_end) == pytest.approx(float(b.surface.s_end), abs=0.02)
    assert _pressure_drag(again) == pytest.approx(_pressure_drag(full), rel=0.01)


@pytest.mark.parametrize("bad", [[0, 2, 400], [-1, 4, 8], [0.5, 2.0, 4.0]])
def test_closed_points_that_are_not_point_indices_are_refused(bad):
    _, pan = _box_points()
    with pytest.raises(InputError, match="closed_points must be indices"):
        _flow(pan.points, bad)


# Howarth's linearly retarded flow Ue/V = 1 - x/L: Thwaites' method puts laminar separation at
# x/L = 0.123 (the exact series solution: 0.120; Howarth 1938, White, Viscous Fluid Flow, 3rd ed.,
# sec. 4-6.5, from memory).
THWAITES_HOWARTH_SEPARATION = 0.123


@pytest.mark.parametrize("beyond, restarted", [(0.0, False), (0.5, True)])
def test_a_bubble_is_judged_on_the_closed_body_length_behind_it(beyond, restarted):
    s = np.linspace(1e-3, 0.9, 300)
    ue = 1.0 - s  # L = 1 m
    bl, restarts = march_surface(s, ue, 1.5e-5, 1.0, "free", 2.4, (), 1.0, beyond=beyond)
    lam = [e for e in bl.events if e.kind == "laminar_separation"]
    assert lam[0].s == pytest.approx(THWAITES_HOWARTH_SEPARATION, abs=0.002)  # Thwaites, above
    # the short bubble reattaches turbulent and the layer separates again at s0 ~ 0.3 m, leaving
    # 0.6 m of surface behind: below reattach_length = 1 m, so no restart; with ``beyond`` = 0.5 m
    # of closed body behind the surface's end it is 1.1 m: a corner bubble, restarted (the rule
    # in the module docstring of profilebench.flow.profile_flow)
    assert bool(restarts) is restarted
    s0 = restarts[0].s if restarts else bl.separation.s
    assert 0.9 - s0 < 1.0 <= 0.9 - s0 + 0.5


def _closed_surfaces():
    """The closed-body pass's surfaces of every sample (solved and split, not marched) with
    what marching them takes."""
    from profilebench.assess.solve import closed_body
    from profilebench.geometry import measure
    from profilebench.io import load_project, sample_paths

    out = []
    for path in sample_paths():
        project = load_project(path)
        cond = project.conditions.replace(panels=200)
        pan = panelize(project.profile, cond.panels)
        height = measure(project.profile).height
        split = closed_body(project.profile, cond, pan, height)
        for sfl in split.surfaces:
            out.append(pytest.param(sfl, cond, height, id=f"{path.stem}-{sfl.name}"))
    return out


@pytest.mark.parametrize("sfl, cond, height", _closed_surfaces())
@pytest.mark.parametrize("share", [0.1, 0.35, 0.7])
def test_a_march_stopped_early_is_the_whole_march_up_to_its_stop(sfl, cond, height, share):
    # numerical consistency of the march with itself (common practice, no source): the layer
    # ahead of the stop does not depend on the surface behind it, to rounding
    from profilebench.assess.solve import march_closed

    whole = march_closed(sfl, cond, height)
    stop = share * float(sfl.surface.s[-1])
    cut = march_closed(sfl, cond, height, stop_s=stop)
    assert len(cut.bl.s) < len(whole.bl.s)
    k = int(np.searchsorted(cut.bl.s, stop, side="right"))
    for name in ("s", "theta", "H", "cf", "margin"):
        a, b = np.asarray(getattr(whole.bl, name))[:k], np.asarray(getattr(cut.bl, name))[:k]
        np.testing.assert_allclose(b, a, rtol=1e-9, atol=1e-12, err_msg=name)

    def ahead(flow):
        return [(e.kind, e.s) for e in flow.bl.events if e.s <= stop]

    assert [k for k, _ in ahead(cut)] == [k for k, _ in ahead(whole)]
    np.testing.assert_allclose([s for _, s in ahead(cut)], [s for _, s in ahead(whole)], rtol=1e-9)
    np.testing.assert_allclose(
        [r.s for r in cut.restarts if r.s <= stop],
        [r.s for r in whole.restarts if r.s <= stop],
        rtol=1e-9,
    )
