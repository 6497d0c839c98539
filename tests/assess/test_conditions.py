"""Tests of the flow conditions (profilebench.assess.conditions)."""

import json

import pytest

from profilebench.assess.conditions import Conditions, kmh_to_ms, ms_to_kmh
from profilebench.errors import ConditionsError
from profilebench.flow.atmosphere import standard_atmosphere


def test_defaults_use_iso_2533_sea_level_air():
    c = Conditions()
    # ISO 2533:1975 Standard Atmosphere, sea level: rho 1.225 kg/m^3, nu 1.46e-5 m^2/s, mu 1.7894e-5 Pa s
    assert c.rho == pytest.approx(1.225, rel=1e-5)
    assert c.nu == pytest.approx(1.46e-5, rel=2e-3)
    assert c.mu == pytest.approx(1.7894e-5, rel=1e-4)
    # q = 1/2 rho V^2 with rho 1.225, V 30 m/s: 551.25 Pa (hand computation)
    assert c.dynamic_pressure == pytest.approx(551.25, rel=1e-5)


def test_altitude_and_offset_reach_the_standard_atmosphere():
    c = Conditions(altitude=11000.0)
    # ISA at 11 000 m: 0.363918 kg/m^3 (av8n.com ISA table, checked via search)
    assert c.rho == pytest.approx(0.363918, rel=2e-5)
    hot = Conditions(temperature_offset=15.0)
    assert hot.air.temperature == pytest.approx(288.15 + 15.0)  # ISO 2533 T0 plus offset


def test_given_density_and_viscosity_override_the_atmosphere():
    # water at 20 C, rho 998.2 kg/m^3, nu 1.004e-6 m^2/s (from memory; only used as inputs)
    c = Conditions(speed=2.0, density=998.2, kinematic_viscosity=1.004e-6)
    assert c.rho == 998.2
    assert c.nu == 1.004e-6
    assert c.mu == pytest.approx(998.2 * 1.004e-6)  # mu = rho nu by definition
    assert c.reynolds(0.5) == pytest.approx(2.0 * 0.5 / 1.004e-6)  # Re = V L / nu


def test_reynolds_of_quarter_scale_model_beside_full_scale():
    # Re = V L / nu (definition); a 1:4 model at twice the road speed has half the full-scale
    # Re, and at four times the road speed the same Re (Reynolds similarity).
    nu = standard_atmosphere().kinematic_viscosity
    c = Conditions(speed=30.0, model_scale=0.25, tunnel_speed=60.0)
    full = c.reynolds(4.5)
    model = c.model_reynolds(4.5)
    assert full == pytest.approx(30.0 * 4.5 / nu)
    assert model == pytest.approx(60.0 * 4.5 * 0.25 / nu)
    assert model / full == pytest.approx(0.5)
    # with ISO 2533:1975 Standard Atmosphere's sea-level nu = 1.46e-5 m^2/s: full scale 30 * 4.5 / 1.46e-5 = 9.25e6
    assert full == pytest.approx(9.25e6, rel=3e-3)
    same = c.replace(tunnel_speed=120.0)
    assert same.model_reynolds(4.5) == pytest.approx(full)


def test_model_reynolds_is_none_without_tunnel_speed():
    assert Conditions(model_scale=0.25).model_reynolds(4.0) is None


@pytest.mark.parametrize(
    "kwargs, h, expected",
    [
        ({"frontal_area": 2.2}, 1.4, 2.2),
        ({"width": 1.8}, 1.4, 1.8 * 1.4),
        ({"frontal_area": 2.2, "width": 1.8}, 1.4, 2.2),  # frontal_area wins
        ({}, 1.4, None),
    ],
)
def test_reference_area(kwargs, h, expected):
    assert Conditions(**kwargs).reference_area(h) == (
        None if expected is None else pytest.approx(expected)
    )


@pytest.mark.parametrize(
    "kmh, ms",
    [(120.0, 33.3333333333), (36.0, 10.0), (0.0, 0.0)],  # 1 km/h = 1000 m / 3600 s (SI)
)
def test_speed_units(kmh, ms):
    assert kmh_to_ms(kmh) == pytest.approx(ms)
    assert ms_to_kmh(ms) == pytest.approx(kmh)


@pytest.mark.parametrize(
    "field, value",
    [
        ("speed", 0.0),
        ("speed", -5.0),
        ("speed", 151.0),
        ("speed", float("nan")),
        ("speed", "30"),
        ("speed", True),
        ("altitude", -2001.0),
        ("altitude", 20001.0),
        ("altitude", float("inf")),
        ("temperature_offset", float("nan")),
        ("temperature_offset", -400.0),
        ("ground", 1),
        ("ground", "yes"),
        ("transition", "laminar"),
        ("transition", -0.1),
        ("transition", float("nan")),
        ("transition", None),
        ("h_separation", 1.7),
        ("h_separation", 2.9),
        ("h_separation", float("nan")),
        ("frontal_area", 0.0),
        ("frontal_area", -1.0),
        ("frontal_area", float("inf")),
        ("width", 0.0),
        ("width", "1.8"),
        ("model_scale", 0.0),
        ("model_scale", 1.2),
        ("model_scale", -0.25),
        ("tunnel_speed", 0.0),
        ("tunnel_speed", 200.0),
        ("base_pressure", 0.1),
        ("base_pressure", -1.6),
        ("panels", 39),
        ("panels", 2001),
        ("panels", 250.0),
        ("panels", True),
    ],
)
def test_bad_field_raises_with_its_name(field, value):
    with pytest.raises(ConditionsError, match=field):
        Conditions(**{field: value})


@pytest.mark.parametrize(
    "kwargs, named",
    [
        ({"density": 1.2}, "kinematic_viscosity"),
        ({"kinematic_viscosity": 1.5e-5}, "density"),
        ({"density": -1.2, "kinematic_viscosity": 1.5e-5}, "density"),
        ({"density": 1.2, "kinematic_viscosity": 0.0}, "kinematic_viscosity"),
        ({"density": float("nan"), "kinematic_viscosity": 1.5e-5}, "density"),
    ],
)
def test_density_and_viscosity_must_come_together_and_be_positive(kwargs, named):
    with pytest.raises(ConditionsError, match=named):
        Conditions(**kwargs)


@pytest.mark.parametrize(
    "conditions",
    [
        Conditions(),
        Conditions(
            speed=41.7,
            altitude=1500.0,
            temperature_offset=-10.0,
            transition=0.35,
            frontal_area=2.3,
            model_scale=0.25,
            tunnel_speed=50.0,
            panels=400,
            base_pressure=-0.2,
            h_separation=2.0,
            ground=False,
        ),
        Conditions(density=1.19, kinematic_viscosity=1.52e-5, transition="turbulent", width=1.7),
    ],
)
def test_to_dict_from_dict_round_trip_through_json(conditions):
    d = json.loads(json.dumps(conditions.to_dict()))  # plain JSON types only
    assert Conditions.from_dict(d) == conditions


def test_from_dict_names_unknown_key():
    with pytest.raises(ConditionsError, match="spead"):
        Conditions.from_dict({"spead": 30.0})


def test_from_dict_names_wrongly_typed_key():
    with pytest.raises(ConditionsError, match="frontal_area"):
        Conditions.from_dict({"frontal_area": "2.2"})


def test_from_dict_refuses_non_mapping():
    with pytest.raises(ConditionsError, match="mapping"):
        Conditions.from_dict([("speed", 30.0)])


def test_replace_checks_the_new_value_and_unknown_fields():
    c = Conditions()
    assert c.replace(speed=40.0).speed == 40.0
    with pytest.raises(ConditionsError, match="speed"):
        c.replace(speed=-1.0)
    with pytest.raises(ConditionsError, match="colour"):
        c.replace(colour="red")


@pytest.mark.parametrize("length", [0.0, -1.0, float("nan"), "1"])
def test_reynolds_rejects_bad_length(length):
    with pytest.raises(ConditionsError, match="length"):
        Conditions().reynolds(length)
