"""Tests of drag force, power and drag area (profilebench.assess.forces)."""

import numpy as np
import pytest

from profilebench.assess.conditions import Conditions, kmh_to_ms
from profilebench.assess.forces import cda, drag_force, drag_power
from profilebench.errors import InputError, ProfileBenchError


def test_force_and_power_example_at_120_kmh():
    # by the definition F = 1/2 rho V^2 Cd A, P = F V (ISO 2533 sea-level rho): Cd 0.30, A 2.2 m^2, 120 km/h at sea level -> F = 449 N, P = 15.0 kW
    c = Conditions(speed=kmh_to_ms(120.0))
    f = drag_force(0.30, 2.2, c.rho, c.speed)
    assert f == pytest.approx(449.0, abs=0.5)
    assert drag_power(f, c.speed) == pytest.approx(15.0e3, abs=50.0)


def test_cda_is_product():
    # CdA = Cd A (definition): 0.30 * 2.2 = 0.66 m^2
    assert cda(0.30, 2.2) == pytest.approx(0.66)


def test_power_grows_with_cube_of_speed():
    # P = 1/2 rho Cd A V^3 (from F = 1/2 rho V^2 Cd A and P = F V): doubling V gives 8 x power
    v = np.array([10.0, 20.0, 40.0])
    p = drag_power(drag_force(0.35, 2.0, 1.225, v), v)
    assert isinstance(p, np.ndarray)
    np.testing.assert_allclose(p[1:] / p[:-1], 8.0, rtol=1e-12)


def test_lower_cd_with_larger_area_can_give_more_force():
    # rule of the trade (common practice, no source), checked by arithmetic:
    # Cd 0.30 on 2.4 m^2 (CdA 0.72) pulls harder than Cd 0.32 on 2.1 m^2 (CdA 0.672)
    assert drag_force(0.30, 2.4, 1.225, 30.0) > drag_force(0.32, 2.1, 1.225, 30.0)


@pytest.mark.parametrize(
    "args, name",
    [
        ((-0.1, 2.2, 1.225, 30.0), "cd"),
        ((float("nan"), 2.2, 1.225, 30.0), "cd"),
        ((0.3, 0.0, 1.225, 30.0), "area"),
        ((0.3, -2.2, 1.225, 30.0), "area"),
        ((0.3, 2.2, 0.0, 30.0), "density"),
        ((0.3, 2.2, 1.225, -1.0), "speed"),
        ((0.3, 2.2, 1.225, float("inf")), "speed"),
        ((0.3, 2.2, 1.225, "fast"), "speed"),
        ((0.3, 2.2, 1.225, [10.0, np.nan]), "speed"),
        ((True, 2.2, 1.225, 30.0), "cd"),
    ],
)
def test_drag_force_rejects_bad_input(args, name):
    with pytest.raises(InputError, match=name):
        drag_force(*args)


@pytest.mark.parametrize(
    "args, name", [((-5.0, 30.0), "force"), ((100.0, -1.0), "speed"), ((None, 30.0), "force")]
)
def test_drag_power_rejects_bad_input(args, name):
    with pytest.raises(ProfileBenchError, match=name):
        drag_power(*args)
