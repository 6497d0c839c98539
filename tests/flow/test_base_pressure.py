"""Hoerner's blunt-base correlations and the forebody friction coefficient from the layers.

Sources: Mandell, Caporaso & Bengen, Topics in Advanced Model Rocketry (MIT Press, 1973), eq.
(125), C_Db = 0.029 / sqrt(C_fb) for a body of revolution (after Hoerner, Fluid-Dynamic Drag,
1965), and the span of its Fig. 34 (C_fb from 0.0093, where C_Db = 0.30, to 0.8); Hoerner,
"Base drag and thick trailing edges", J. Aero. Sci. 17 (1950): the boundary layer at the end of
the forebody insulates the dead air from the outer flow, so a thicker layer gives a higher base
pressure; the two-dimensional form C_Db = 0.135 / C_fb^(1/3) is from memory (Hoerner 1965, ch. 3).
"""

import math

import pytest

from profilebench.errors import InputError, ProfileBenchError
from profilebench.flow.base_pressure import (
    BASE_FORMS,
    CFB_RANGE,
    LayerBasePressure,
    base_pressure_coefficient,
    forebody_friction_coefficient,
)


# Mandell et al. 1973, eq. (125) at the ends of Fig. 34's curve and within it: C_Db on the base
# area, Cp_b = -C_Db
@pytest.mark.parametrize(
    "c_fb, c_db",
    [((0.029 / 0.30) ** 2, 0.300), (0.1, 0.0917), (0.8, 0.0324), (0.04, 0.145)],
)
def test_body_form_gives_the_published_base_drag(c_fb, c_db):
    assert base_pressure_coefficient(c_fb, "body") == pytest.approx(-c_db, abs=5e-4)


# from memory (Hoerner 1965, ch. 3): 0.135 / C_fb^(1/3); 0.027 = 0.3^3
@pytest.mark.parametrize("c_fb, c_db", [(0.027, 0.45), (0.125, 0.27), (0.729, 0.15)])
def test_section_form_gives_the_recalled_base_drag(c_fb, c_db):
    assert base_pressure_coefficient(c_fb, "section") == pytest.approx(-c_db, rel=1e-9)


@pytest.mark.parametrize("form", BASE_FORMS)
def test_a_thicker_layer_gives_a_higher_base_pressure(form):
    # Hoerner 1950: the layer at the base insulates the dead air (the jet-pump picture)
    h = 1.0
    thetas = [0.004, 0.008, 0.016, 0.032, 0.064]
    cps = [base_pressure_coefficient(forebody_friction_coefficient(t, t, h), form) for t in thetas]
    assert all(b > a for a, b in zip(cps, cps[1:]))
    assert all(-1.5 <= c < 0.0 for c in cps)


def test_the_two_dimensional_base_has_the_lower_pressure():
    # a base across the whole span sheds its vortex street: lower base pressure than a 3D base
    # behind the same layer (Hoerner 1965 ch. 3; the 2D form from memory)
    for c_fb in (CFB_RANGE[0], 0.05, 0.2, CFB_RANGE[1]):
        assert base_pressure_coefficient(c_fb, "section") < base_pressure_coefficient(c_fb, "body")


def test_friction_coefficient_of_a_blasius_plate_is_its_momentum_thickness():
    # Blasius (Schlichting, Boundary-Layer Theory): theta = 0.664 L / sqrt(Re_L) and
    # C_F = 1.328 / sqrt(Re_L) per side, so two sides on a base of height h: 2 C_F L / h
    L, h, re = 3.0, 0.5, 4e5
    theta = 0.664 * L / math.sqrt(re)
    c_f = 1.328 / math.sqrt(re)
    assert forebody_friction_coefficient(theta, theta, h) == pytest.approx(2 * c_f * L / h)


@pytest.mark.parametrize(
    "c_fb", [0.0, CFB_RANGE[0] * 0.99, CFB_RANGE[1] * 1.01, math.nan, math.inf, -0.1]
)
@pytest.mark.parametrize("form", BASE_FORMS)
def test_outside_the_range_is_refused_not_clamped(c_fb, form):
    with pytest.raises(InputError) as err:
        base_pressure_coefficient(c_fb, form)
    assert isinstance(err.value, ProfileBenchError)


def test_unknown_form_is_refused():
    with pytest.raises(InputError, match="not known"):
        base_pressure_coefficient(0.05, "cylinder")
    with pytest.raises(InputError, match="not known"):
        LayerBasePressure("cylinder")
