"""Sweeps: the knee against the solver's own smallest attached radius, the tables (read-only,
no NaN, failed points kept), and the inputs refused."""

import math

import numpy as np
import pytest

from profilebench.assess.analysis import analyze
from profilebench.assess.conditions import Conditions
from profilebench.assess.corners import largest_fitting_radius
from profilebench.assess.radius_search import SearchCache, cached_radius_search
from profilebench.assess.results import Verdict
from profilebench.errors import GeometryError, InputError
from profilebench.geometry.shapes import rounded_box
from profilebench.studies import (
    PointCache,
    PointStatus,
    find_knee,
    position_sweep,
    radius_speed_grid,
    radius_sweep,
    speed_sweep,
)

PANELS = 150
# the Kestrel test body as rounded_box builds it: 2.0 m x 0.5 m, 50 mm above the ground, front
# corners rounded 100 mm, rear corners sharp (the kestrel_test_body sample's outline)
BODY = rounded_box(2.0, 0.5, radius=(0.1, 0.0, 0.0, 0.1), clearance=0.05, name="test body")
COND = Conditions(speed=30.0, ground=True, width=1.0, panels=PANELS)
FRONT_TOP = 3


def test_knee_agrees_with_the_solvers_smallest_attached_radius_within_the_step():
    # The check: the knee of Cd against the front top corner's radius, in ground
    # effect, lies within one sweep step of the smallest attached radius that the solver's own
    # search (bisection on the corner verdict, profilebench.assess.radius_search) finds.
    radii = np.linspace(0.0, 0.2, 9)
    step = radii[1] - radii[0]
    table = radius_sweep(BODY, COND, FRONT_TOP, radii=radii, workers=1, cache=PointCache())
    search = cached_radius_search(BODY, COND, FRONT_TOP, cache=SearchCache())
    assert search.radius is not None, search.message
    assert table.knee.found, table.knee.message
    assert abs(table.knee.radius - search.radius) <= step
    lo, hi = table.knee.bracket
    assert lo <= search.radius <= hi
    assert table.smallest_attached_radius == pytest.approx(search.radius)
    # one point searched it (radius_plan); every point carries it
    assert table.smallest_attached.count() == len(radii)
    assert np.allclose(table.smallest_attached.compressed(), search.radius)


def test_sweep_points_are_the_analyses_of_the_variants():
    radii = [0.0, 0.05]
    table = radius_sweep(BODY, COND, "front top", radii=radii, workers=1, cache=PointCache())
    for i, r in enumerate(radii):
        a = analyze(BODY.with_radius(FRONT_TOP, r), COND)
        assert table.cd[i] == pytest.approx(a.drag.cd, rel=1e-12)
        assert table.cda[i] == pytest.approx(a.drag.cda, rel=1e-12)
        # Cd = friction + pressure + base + corners (the breakdown's own sum, DragBreakdown)
        parts = table.cd_friction[i] + table.cd_pressure[i] + table.cd_base[i] + table.cd_corners[i]
        assert table.cd[i] == pytest.approx(parts, rel=1e-9)
        # F = 1/2 rho V^2 CdA and P = F V (definitions of drag force and power)
        q = 0.5 * COND.rho * COND.speed**2
        assert table.force[i] == pytest.approx(q * a.drag.cda, rel=1e-9)
        assert table.power[i] == pytest.approx(table.force[i] * COND.speed, rel=1e-9)
        j = table.corner_nodes.index(FRONT_TOP)
        assert table.verdicts[i, j] is next(c.verdict for c in a.corners if c.node == FRONT_TOP)


def test_table_arrays_are_read_only():
    table = radius_sweep(
        BODY, COND, FRONT_TOP, radii=[0.0, 0.05], workers=1, search=False, cache=PointCache()
    )
    for arr in (table.values, table.cd, table.margins, table.verdicts):
        with pytest.raises(ValueError):
            arr[0] = 1.0
    with pytest.raises(AttributeError):
        table.knee = None


def test_a_failed_point_keeps_its_status_and_has_no_number():
    # moving the rear bottom node 3 m forward carries it in front of the nose: the outline then
    # crosses itself (an invalid outline, a failed analysis, not a fatal error)
    table = position_sweep(
        BODY, COND, node=1, direction=(-3.0, 0.0), points=3, workers=1, cache=PointCache()
    )
    assert table.status[0] is PointStatus.SUCCESS
    assert table.status[-1] is not PointStatus.SUCCESS
    assert table.messages[-1]
    assert np.ma.getmaskarray(table.cd)[-1]
    assert not np.isnan(table.cd.data).any()
    assert table.verdicts[-1].tolist() == [None] * len(table.corner_nodes)
    assert [i for i, _, _ in table.failed] == [i for i in range(3) if not table.ok[i]]
    assert table.positions[-1] == pytest.approx((-1.0, 0.05))
    assert table.values[-1] == pytest.approx(3.0)


def test_speed_sweep_runs_each_speed():
    table = speed_sweep(BODY, COND, [20.0, 40.0], corner=FRONT_TOP, workers=1, cache=PointCache())
    assert all(table.ok)
    for i, v in enumerate((20.0, 40.0)):
        assert table.conditions[i].speed == v
        a = analyze(BODY, COND.replace(speed=v))
        assert table.cd[i] == pytest.approx(a.drag.cd, rel=1e-12)
    assert table.smallest_attached.count() == 2


def test_grid_has_one_radius_sweep_per_speed():
    grid = radius_speed_grid(
        BODY,
        COND,
        FRONT_TOP,
        radii=[0.0, 0.05, 0.1],
        speeds=[25.0, 35.0],
        workers=1,
        cache=PointCache(),
    )
    assert grid.grid("cd").shape == (2, 3)
    assert len(grid.knees) == 2
    assert grid.rows[1].conditions[0].speed == 35.0
    with pytest.raises(InputError, match="not a sweep number"):
        grid.grid("lift")


def _verdicts(n_sep, n):
    return [Verdict.EDGE_SEPARATION] * n_sep + [Verdict.ATTACHED] * (n - n_sep)


def test_knee_definition_on_a_made_up_curve():
    # by the definition in Knee's docstring: attached value = median of the attached points'
    # Cd (the last three: 0.231); the last point outside 2% of it is at 0.02 m, so the knee is 0.04 m
    radii = [0.0, 0.02, 0.04, 0.06, 0.08]
    cd = np.ma.array([0.7, 0.3, 0.232, 0.231, 0.230])
    knee = find_knee(radii, cd, _verdicts(2, 5))
    assert knee.found and knee.radius == 0.04 and knee.bracket == (0.02, 0.04)
    assert knee.attached_cd == pytest.approx(0.231)


def test_knee_leaves_out_masked_points():
    radii = [0.0, 0.02, 0.04, 0.06, 0.08]
    cd = np.ma.array([0.7, 0.3, 0.0, 0.231, 0.230], mask=[0, 0, 1, 0, 0])
    verdicts = _verdicts(1, 5)
    verdicts[2] = None
    knee = find_knee(radii, cd, verdicts)
    assert knee.radius == 0.06 and "1 failed" in knee.message


@pytest.mark.parametrize(
    "cd, n_sep, why",
    [
        ([0.7, 0.6, 0.5], 3, "separates at every swept radius"),
        ([0.231, 0.232, 0.230], 0, "at or below the smallest swept radius"),
        ([0.40, 0.30, 0.25, 0.20], 0, "keeps changing"),
    ],
)
def test_no_knee_says_why(cd, n_sep, why):
    radii = np.linspace(0.0, 0.1, len(cd))
    knee = find_knee(radii, np.ma.array(cd), _verdicts(n_sep, len(cd)))
    assert not knee.found and knee.radius is None
    assert knee.message.startswith("no knee in range") and why in knee.message


def test_default_range_runs_from_sharp_to_the_largest_that_fits():
    table = radius_sweep(
        BODY, COND, FRONT_TOP, points=2, workers=1, search=False, cache=PointCache()
    )
    assert table.values[0] == 0.0
    assert table.values[-1] == pytest.approx(largest_fitting_radius(BODY, FRONT_TOP), rel=2e-3)
    assert table.values[-1] < largest_fitting_radius(BODY, FRONT_TOP)


def test_bad_inputs_are_refused_before_any_work():
    with pytest.raises(InputError, match="largest that fits"):
        radius_sweep(BODY, COND, FRONT_TOP, radii=[0.0, 5.0], workers=1)
    with pytest.raises(InputError, match="no corner is called 'bonnet'"):
        radius_sweep(BODY, COND, "bonnet", workers=1)
    with pytest.raises(InputError, match="workers"):
        radius_sweep(BODY, COND, FRONT_TOP, radii=[0.0, 0.1], workers=0)
    with pytest.raises(InputError, match="number of points"):
        radius_sweep(BODY, COND, FRONT_TOP, points=1)
    with pytest.raises(InputError, match=r"\(0, 0\)"):
        position_sweep(BODY, COND, node=1, direction=(0.0, 0.0))
    with pytest.raises(InputError, match="increasing"):
        speed_sweep(BODY, COND, [30.0, math.nan])
    smooth = BODY.with_smooth(FRONT_TOP, True)
    with pytest.raises(GeometryError, match="smooth"):
        radius_sweep(smooth, COND, FRONT_TOP, workers=1)


def test_a_plan_run_point_by_point_gives_the_sweep_and_its_points_so_far():
    """The editor runs a plan's points itself and builds the table as they arrive: the finished
    table is the sweep's, and the table so far holds the points done, in sweep order."""
    from profilebench.studies import radius_plan, run_points

    body = rounded_box(2.0, 0.5, radius=(0.1, 0.0, 0.0, 0.1), clearance=0.05, name="plan body")
    cond = Conditions(speed=30.0, ground=True, width=1.0, panels=120)
    radii = [0.0, 0.05, 0.1]
    plan = radius_plan(body, cond, 3, radii=radii, search=False)
    assert len(plan) == 3 and plan.values.tolist() == radii and plan.corner == 3
    results, stats = run_points(plan.specs, workers=1, cache=PointCache())
    direct = radius_sweep(body, cond, 3, radii=radii, search=False, workers=1, cache=PointCache())
    table = plan.table(results, stats)
    assert table.cd.tolist() == direct.cd.tolist() and table.knee == direct.knee
    so_far = plan.table_so_far([results[0], None, results[2]], stats)
    assert so_far.values.tolist() == [0.0, 0.1]
    assert so_far.cd.tolist() == [direct.cd[0], direct.cd[2]]
    assert so_far.profiles == (plan.specs[0].profile, plan.specs[2].profile)
    assert plan.table_so_far([None] * 3, stats) is None
    with pytest.raises(InputError):
        plan.table(results[:2], stats)
