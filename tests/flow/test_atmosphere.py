"""Tests of the ISO 2533 standard atmosphere (profilebench.flow.atmosphere)."""

import math

import pytest

from profilebench.errors import ConditionsError, ProfileBenchError
from profilebench.flow.atmosphere import (
    GAS_CONSTANT,
    standard_atmosphere,
    sutherland_viscosity,
)


def test_sea_level_matches_iso_2533():
    air = standard_atmosphere()
    # ISO 2533:1975 Standard Atmosphere, sea-level values (T0 288.15 K, p0 101325 Pa, rho0 1.225
    # kg/m^3; mu from Sutherland's law with the standard's constants)
    assert air.temperature == pytest.approx(288.15, abs=1e-9)
    assert air.pressure == pytest.approx(101325.0, abs=1e-6)
    assert air.density == pytest.approx(1.225, rel=1e-5)
    assert air.dynamic_viscosity == pytest.approx(1.7894e-5, rel=1e-4)
    assert air.kinematic_viscosity == pytest.approx(1.46e-5, rel=2e-3)  # given to 3 figures
    # ISO 2533 sea-level speed of sound 340.294 m/s (from memory)
    assert air.speed_of_sound == pytest.approx(340.294, abs=2e-3)


def test_sutherland_at_288_15_k():
    # Sutherland's law with ISO 2533's beta 1.458e-6 and S 110.4 K gives 1.7894e-5 Pa s at 288.15 K
    assert sutherland_viscosity(288.15) == pytest.approx(1.7894e-5, rel=5e-5)


@pytest.mark.parametrize(
    "altitude, temperature, pressure, density, rel",
    [
        # ISA table reproduced at https://www.av8n.com/physics/altimetry.htm (checked via search):
        # 11 000 m: 216.65 K, 22632.1 Pa, 0.363918 kg/m^3; 20 000 m: 216.65 K, 5474.89 Pa,
        # 0.088035 kg/m^3
        (11000.0, 216.65, 22632.1, 0.363918, 2e-5),
        (20000.0, 216.65, 5474.89, 0.088035, 2e-5),
        # ISO 2533 table at 5000 m geopotential: 255.65 K, 54019.9 Pa, 0.73612 kg/m^3
        # (from memory: tolerance 0.05 %)
        (5000.0, 255.65, 54019.9, 0.73612, 5e-4),
    ],
)
def test_altitudes_against_iso_2533_tables(altitude, temperature, pressure, density, rel):
    air = standard_atmosphere(altitude)
    assert air.temperature == pytest.approx(temperature, abs=1e-9)
    assert air.pressure == pytest.approx(pressure, rel=rel)
    assert air.density == pytest.approx(density, rel=rel)


def test_layers_join_continuously_at_tropopause():
    # the hydrostatic law is continuous across the tropopause (ISO 2533 defines p11 that way)
    below = standard_atmosphere(11000.0 - 1e-6)
    above = standard_atmosphere(11000.0 + 1e-6)
    assert above.pressure == pytest.approx(below.pressure, rel=1e-9)


def test_pressure_against_numerical_hydrostatic_integration():
    # dp/dh = -g0 p / (R T(h)), integrated independently with scipy's solve_ivp
    from scipy.integrate import solve_ivp

    def rhs(h, p):
        t = 288.15 - 0.0065 * h if h <= 11000.0 else 216.65
        return [-9.80665 * p[0] / (GAS_CONSTANT * t)]

    sol = solve_ivp(
        rhs,
        (0.0, 18000.0),
        [101325.0],
        rtol=1e-11,
        atol=1e-8,
        t_eval=[0.0, 3000.0, 11000.0, 18000.0],
        max_step=500.0,
    )
    ours = [standard_atmosphere(float(h)).pressure for h in sol.t]
    assert ours == pytest.approx(list(sol.y[0]), rel=1e-7)


def test_temperature_offset_changes_temperature_and_density_not_pressure():
    std = standard_atmosphere(1000.0)
    hot = standard_atmosphere(1000.0, temperature_offset=20.0)
    assert hot.temperature == pytest.approx(std.temperature + 20.0)
    assert hot.pressure == pytest.approx(std.pressure)
    # ideal gas law rho = p / (R T)
    assert hot.density == pytest.approx(std.pressure / (GAS_CONSTANT * hot.temperature))
    # speed of sound sqrt(gamma R T), gamma = 1.4
    assert hot.speed_of_sound == pytest.approx(math.sqrt(1.4 * GAS_CONSTANT * hot.temperature))
    assert hot.kinematic_viscosity == pytest.approx(hot.dynamic_viscosity / hot.density)


@pytest.mark.parametrize(
    "kwargs, word",
    [
        ({"altitude": -2500.0}, "altitude"),
        ({"altitude": 20001.0}, "altitude"),
        ({"altitude": float("nan")}, "altitude"),
        ({"altitude": float("inf")}, "altitude"),
        ({"altitude": "100"}, "altitude"),
        ({"altitude": True}, "altitude"),
        ({"temperature_offset": float("nan")}, "temperature_offset"),
        ({"temperature_offset": -300.0}, "temperature_offset"),
    ],
)
def test_bad_input_raises_conditions_error(kwargs, word):
    with pytest.raises(ConditionsError, match=word):
        standard_atmosphere(**kwargs)


def test_sutherland_rejects_zero_kelvin():
    with pytest.raises(ProfileBenchError, match="temperature"):
        sutherland_viscosity(0.0)
