"""The underbody side-relief model: the leaking gap channel and its use in the analysis."""

from __future__ import annotations

import math

import numpy as np
import pytest
from scipy.integrate import solve_ivp

from profilebench import Conditions, analyze, load_project
from profilebench.flow.underbody import (
    SIDE_CONTRACTION,
    SideRelief,
    _leak,
    channel_cp,
    gap_run,
)
from profilebench.flow.panel import solve_inviscid
from profilebench.geometry.shapes import rounded_box
from profilebench.io.samples import sample_paths

BOX_CONDITIONS = Conditions(speed=25.0, width=1.9)


def _box():
    # the case: 4.0 m x 1.6 m box, corners r = 0.2 m, clearance 0.2 m
    return rounded_box(4.0, 1.6, 0.2, 0.2)


def test_no_leakage_is_bernoulli_with_constant_flux():
    # without sides the channel is the textbook one: q = u g constant, Cp = 1 - u^2 (Bernoulli)
    s = np.linspace(0.0, 3.0, 40)
    g = 0.2 + 0.05 * s / 3.0
    ok, _, q, cp = channel_cp(s, g, math.inf, exit_cp=-0.8)
    assert ok
    assert np.allclose(q, q[0])
    assert np.allclose(cp, 1.0 - (q / g) ** 2)
    assert cp[-1] == pytest.approx(-0.8)


def test_outflow_channel_matches_the_analytic_solution():
    # a uniform gap g whose sides open to Cp_side = -0.5, below the gap's pressure everywhere:
    # fluid only leaves, Bernoulli holds, u = q / g and du/ds = -(2 C / w) sqrt(a^2 - u^2) with
    # a^2 = 1 - Cp_side, so u(s) = a sin(asin(u0 / a) - 2 C s / w) (integrated by hand: the
    # separable equation du / sqrt(a^2 - u^2) = -(2 C / w) ds)
    g, w, side, length, u0 = 0.15, 3.0, -0.5, 1.0, 0.9
    a = math.sqrt(1.0 - side)
    s = np.linspace(0.0, length, 60)
    u_exact = a * np.sin(math.asin(u0 / a) - 2.0 * SIDE_CONTRACTION * s / w)
    cp_exact = 1.0 - u_exact**2
    ok, _, q, cp = channel_cp(
        s, np.full_like(s, g), w, exit_cp=float(cp_exact[-1]), side_pressure=side
    )
    assert ok
    assert np.max(np.abs(q / g - u_exact)) < 1e-3
    assert np.max(np.abs(cp - cp_exact)) < 2e-3


def test_inflow_channel_conserves_mass_and_matches_an_integration():
    # a uniform gap below the side pressure draws fluid in: the flux gained along the gap is the
    # leakage integrated over its length (mass conservation), and the solution is the one scipy's
    # solve_ivp integrates from the same inlet state
    g, w, length = 0.2, 1.9, 3.5
    s = np.linspace(0.0, length, 801)
    gap = np.full_like(s, g)
    ok, _, q, cp = channel_cp(s, gap, w, exit_cp=-0.6)
    assert ok
    m = _leak(cp, gap, w, 0.0, SIDE_CONTRACTION)
    gained = np.trapezoid(m, s)
    assert q[-1] - q[0] == pytest.approx(gained, rel=1e-3)
    assert q[-1] > q[0]  # it did draw fluid in

    # integrated upstream from the exit state (downstream, a gap held near the side pressure is
    # unstable: a little more inflow lowers the pressure and draws more in)
    def rhs(x, y):
        qq, total = y
        c = total - (qq / g) ** 2
        mm = float(_leak(c, g, w, 0.0, SIDE_CONTRACTION))
        return [mm, -2.0 * (qq / g) * max(mm, 0.0) / g]

    exit_state = [q[-1], cp[-1] + (q[-1] / g) ** 2]
    ivp = solve_ivp(rhs, (length, 0.0), exit_state, t_eval=s[::-1], rtol=1e-10, atol=1e-12)
    q_ivp = ivp.y[0][::-1]
    cp_ivp = ivp.y[1][::-1] - (q_ivp / g) ** 2
    assert np.max(np.abs(q_ivp - q)) < 1e-3
    assert np.max(np.abs(cp_ivp - cp)) < 5e-3
    assert cp_ivp[0] + (q_ivp[0] / g) ** 2 == pytest.approx(1.0, abs=5e-3)  # inlet total pressure


def test_gap_run_is_the_longest_ground_facing_run():
    ny = np.array([0.0, -0.9, -1.0, 0.2, -0.95, -1.0, -1.0, -0.99, -0.3])
    assert gap_run(ny) == (4, 7)
    assert gap_run(np.zeros(5)) is None


def test_relief_tends_to_the_2d_underbody_as_the_width_grows():
    flat = analyze(_box(), BOX_CONDITIONS.replace(side_relief=False))
    points = flat.flow.closed.inviscid.points  # the closed body's panels
    inv = solve_inviscid(points, ground=True)
    gaps = []
    for width in (4.0, 40.0, 400.0, 4000.0, 1.0e6):
        new_inv, relief = SideRelief(width).solve(points, ground=True)
        assert relief.applied
        gaps.append(float(np.max(np.abs(np.asarray(new_inv.cp) - np.asarray(inv.cp)))))
    assert all(b < a for a, b in zip(gaps, gaps[1:]))  # monotonic toward the 2D section's
    assert gaps[-1] < 1e-3
    # through the whole analysis too: the relief's share of the answer falls as 1 / w (the
    # channel runs under the wake for 10 heights, so a 1e4 m width still leaves 0.2 % in Cd;
    # measured 2.1 % / 0.22 % in Cd and 15 % / 1.6 % in Cl at 1e3 / 1e4 m)
    cd_gap, cl_gap = [], []
    for width in (1.0e3, 1.0e4):
        wide = analyze(_box(), BOX_CONDITIONS.replace(width=width))
        cd_gap.append(abs(wide.drag.cd / flat.drag.cd - 1.0))
        cl_gap.append(abs(wide.drag.cl / flat.drag.cl - 1.0))
    assert cd_gap[1] < 0.15 * cd_gap[0] and cd_gap[1] < 3e-3
    assert cl_gap[1] < 0.15 * cl_gap[0] and cl_gap[1] < 2e-2


def test_box_underbody_mean_cp_with_relief():
    # the 4.0 m x 1.6 m box at 0.2 m clearance, 1.9 m wide, 25 m/s: the side relief takes the
    # underbody's mean Cp from the 2D section's -2.4 to a few tenths (the sign and order the
    # published picture of a spilling underbody gives; the band itself in the next test)
    a = analyze(_box(), BOX_CONDITIONS)
    assert a.success
    relief = a.flow.underbody
    assert relief.applied
    assert relief.mean_cp_2d < -1.5
    assert -0.5 <= relief.mean_cp < 0.0
    assert abs(relief.mean_cp) < 0.2 * abs(relief.mean_cp_2d)
    assert any("side relief for a width of 1.9 m" in n for n in a.drag.notes)


@pytest.mark.xfail(
    strict=True,
    reason="measured: the box's mean underbody Cp is -0.2015 / -0.1976 / -0.1921 / -0.1887 at "
    "250 / 300 / 500 / 1000 panels, at the less negative end of the band and leaving it as the "
    "panels are refined (the side pressure taken as ambient sets the gap's level)",
)
def test_box_underbody_mean_cp_is_in_the_recalled_band():
    # centre-line underbody mean Cp of square-back bodies near a moving ground: roughly -0.2 to
    # -0.5 (from memory; no published centre-line measurement was found to check it against)
    a = analyze(_box(), BOX_CONDITIONS.replace(panels=500))
    assert -0.5 <= a.flow.underbody.mean_cp <= -0.2


def test_switched_off_gives_the_2d_numbers_exactly():
    # the same analysis without a width and with the relief switched off are the 2D section's
    off = analyze(_box(), BOX_CONDITIONS.replace(side_relief=False))
    none = analyze(_box(), BOX_CONDITIONS.replace(width=None, frontal_area=1.9 * 1.6))
    assert off.flow.underbody is None
    assert none.flow.underbody is None
    assert off.drag.cd == none.drag.cd
    assert off.drag.cl == none.drag.cl
    assert np.array_equal(off.flow.inviscid.cp, none.flow.inviscid.cp)
    assert any("no vehicle width given" in w for w in none.warnings)
    assert any("side relief switched off" in w for w in off.warnings)


def test_test_body_sample_is_a_2d_section_and_says_so():
    # the tunnel test body is given per metre of width: its conditions switch the relief off
    path = next(p for p in sample_paths() if p.stem == "kestrel_test_body")
    project = load_project(path)
    assert project.conditions.side_relief is False
    a = analyze(project.profile, project.conditions)
    assert a.flow.underbody is None
    assert any("side relief switched off" in w for w in a.warnings)


def test_side_relief_must_be_a_bool():
    from profilebench.errors import ConditionsError

    with pytest.raises(ConditionsError, match="side_relief"):
        Conditions(side_relief="yes")
    # old project files have no such key: the default
    assert Conditions.from_dict({"speed": 20.0}).side_relief is True


def test_a_body_without_a_flat_underbody_keeps_the_2d_section_and_says_why():
    # a circle over the ground has no stretch of underbody parallel to it long enough to be a
    # channel (its ground-facing arc is about as long as twice its gap): no relief, a warning
    from profilebench.geometry.shapes import circle

    a = analyze(circle(0.5, centre=(0.0, 0.7)), Conditions(speed=30.0, width=1.0))
    assert a.success
    assert a.flow.underbody is not None and not a.flow.underbody.applied
    assert any("side relief (width 1 m) not applied" in w for w in a.warnings)


def test_the_channel_refuses_an_exit_above_the_inlet_total_pressure():
    s = np.linspace(0.0, 1.0, 10)
    ok, message, q, cp = channel_cp(s, np.full(10, 0.1), 2.0, exit_cp=1.2)
    assert not ok and q is None and cp is None
    assert "exit pressure" in message


def test_a_5_mm_rounding_of_the_underbody_rear_moves_cd_as_little_as_in_2d():
    # a 5 mm arc on a 2 m tall van is far smaller than the boundary layer there (tens of mm): in
    # a real flow it acts as the sharp edge does (common practice, no source); the relief may
    # not turn the 2D section's few per cent between the two into tens. Measured: before the
    # thin-arc rule (profilebench.assess.solve.THIN_ARC_RATIO) the 5 mm arc read attached and
    # the van's Cd rose 15 % (minibus 21 %, hatch 16 %); with it -0.3 % (minibus -2.7 %, hatch
    # -0.5 %; as 2D sections +0.6, 0.0 and +0.1 %)
    van = load_project(next(p for p in sample_paths() if p.stem == "kestrel_courier_van"))
    node = next(j for j, nd in enumerate(van.profile.nodes) if nd.label == "underbody rear")
    sharp, rounded = (
        analyze(van.profile.with_radius(node, r), van.conditions) for r in (0.0, 0.005)
    )
    assert sharp.success and rounded.success
    assert abs(rounded.drag.cd / sharp.drag.cd - 1.0) <= 0.10
