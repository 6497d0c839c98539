"""The base pressure from the boundary layer at separation (Conditions.base_model) in analyses.

Physics checks name their source: Hoerner, "Base drag and thick trailing edges", J. Aero. Sci. 17
(1950) (a thicker layer at the base gives a higher base pressure); Hoerner's body-of-revolution
correlation C_Db = 0.029 / sqrt(C_fb) as given by Mandell, Caporaso & Bengen, Topics in Advanced
Model Rocketry (1973), eq. (125) (see profilebench.flow.base_pressure).
"""

import dataclasses
import math

import pytest

from profilebench import Conditions, analyze, load_project
from profilebench.assess.conditions import BASE_MODELS
from profilebench.assess.results import AnalysisStatus
from profilebench.errors import ConditionsError
from profilebench.flow.base_pressure import (
    BaseEstimate,
    LayerBasePressure,
    base_pressure_coefficient,
)
from profilebench.geometry import naca4, rounded_box
from profilebench.io.samples import sample_paths

SAMPLES = {p.stem: load_project(p) for p in sample_paths()}


# Cd, base drag and Cl of the samples at their own conditions with the side relief off (250
# panels, constant Cp_b -0.25) as the analysis gave them before the base-pressure model existed
# (measured on that code, bdfdef1; the relief off, so that a change of the relief model does not
# move them)
@pytest.mark.parametrize(
    "name, before",
    [
        ("kestrel_courier_van", [0.26233756406545944, 0.23156669630057247, -4.83053665120881]),
        ("kestrel_hatch", [0.24487650103153405, 0.21206559900413957, -1.7532499373978372]),
        (
            "kestrel_shuttle_minibus",
            [0.26296831582134644, 0.23263152370224235, -1.7114343099277858],
        ),
        ("kestrel_test_body", [0.23359917493226273, 0.25, 0.30351786905454325]),
    ],
)
def test_the_constant_default_gives_the_numbers_of_before(name, before):
    project = SAMPLES[name]
    assert project.conditions.base_model == "constant"
    a = analyze(project.profile, project.conditions.replace(side_relief=False))
    assert a.success
    d = a.drag
    assert [d.cd, d.cd_base, d.cl] == pytest.approx(before, rel=1e-9, abs=1e-12)
    assert d.base_pressure == project.conditions.base_pressure
    assert a.flow.base_estimate is None


@pytest.mark.parametrize("model", ["body", "section"])
def test_the_base_pressure_comes_from_the_layers_at_separation(model):
    project = SAMPLES["kestrel_hatch"]
    a = analyze(project.profile, project.conditions.replace(base_model=model))
    assert a.success, a.message
    est = a.flow.base_estimate
    assert est.ok and est.form == model
    # the correlation at the flow's own C_fb, the drag's base pressure and the separated Cp agree
    assert a.drag.base_pressure == est.cp_b == base_pressure_coefficient(est.c_fb, model)
    sep = a.flow.separated & (a.flow.inviscid.ue == 0.0)
    assert sep.any() and (a.flow.inviscid.cp[sep] == est.cp_b).all()
    # C_fb = 2 (theta_u + theta_l) / h_b from the layers at their final separation points
    thetas = tuple(float(s.bl.theta[s.bl.separation.index]) for s in a.flow.surfaces)
    assert est.theta == thetas
    assert est.c_fb == pytest.approx(2 * sum(thetas) / est.base_height)
    assert any("from the boundary layer at separation" in n for n in a.drag.notes)
    assert all(math.isfinite(v) for v in (a.drag.cd, a.drag.cd_base, a.drag.cl))


def test_a_thicker_layer_at_separation_gives_a_higher_base_pressure():
    # turbulent from the stagnation point, the layers reach the separation points thicker than
    # with free transition: Hoerner 1950's insulation, a higher (less negative) base pressure
    project = SAMPLES["kestrel_test_body"]
    cond = project.conditions.replace(base_model="body")
    free = analyze(project.profile, cond)
    turb = analyze(project.profile, cond.replace(transition="turbulent"))
    assert free.success and turb.success
    assert sum(turb.flow.base_estimate.theta) > sum(free.flow.base_estimate.theta)
    assert turb.drag.base_pressure > free.drag.base_pressure


def test_variants_with_other_separation_points_get_other_base_drag():
    project = SAMPLES["kestrel_hatch"]
    variant = project.profile.with_radius(2, 0.15)  # rear bumper lower: 50 -> 150 mm
    runs = {}
    for model in ("constant", "body"):
        cond = project.conditions.replace(base_model=model)
        runs[model] = [analyze(p, cond) for p in (project.profile, variant)]
        assert all(a.success for a in runs[model])
    seps = [[float(s.bl.separation.s) for s in a.flow.surfaces] for a in runs["body"]]
    assert abs(seps[1][1] - seps[0][1]) > 0.01  # the lower separation point moves
    const, body = runs["constant"], runs["body"]
    assert const[0].drag.base_pressure == const[1].drag.base_pressure
    assert abs(body[1].drag.base_pressure - body[0].drag.base_pressure) > 5e-4
    # the base drag changes by more than the geometry alone changes it with the constant
    geometric = const[1].drag.cd_base / const[0].drag.cd_base
    layered = body[1].drag.cd_base / body[0].drag.cd_base
    assert abs(layered - geometric) > 1e-3


def test_a_base_outside_the_correlation_is_a_failed_analysis_not_a_clamp():
    # a flat plate normal to the stream: its layers leave the sharp edges very thin, C_fb far
    # below the correlation's span
    plate = rounded_box(0.02, 1.0, 0.0, clearance=1.0)
    a = analyze(plate, Conditions(ground=False, base_model="body"))
    assert a.status is AnalysisStatus.BASE_PRESSURE_FAILED and not a.success
    assert a.drag is None
    assert "outside the blunt-base correlation's range" in a.message
    assert "constant base pressure" in a.message
    ok = analyze(plate, Conditions(ground=False))  # the constant still works
    assert ok.success


@pytest.mark.parametrize("value", ["hoerner", "", None, 1, True])
def test_an_unknown_base_model_is_refused(value):
    with pytest.raises(ConditionsError, match="base_model"):
        Conditions(base_model=value)


@pytest.mark.parametrize("model", BASE_MODELS)
def test_base_model_round_trips_through_the_conditions_dict(model):
    c = Conditions(base_model=model)
    assert Conditions.from_dict(c.to_dict()) == c
    assert dataclasses.asdict(c)["base_model"] == model


@dataclasses.dataclass(frozen=True)
class _Contracting(LayerBasePressure):
    """A stand-in estimate that maps the Cp_b a wake pass used to slope * cp + (1 - slope) *
    (-0.6): its fixed point is -0.6, reached the faster the smaller the slope."""

    slope: float = 0.1

    def estimate(self, flow, height):
        cp = self.slope * flow.base_pressure + (1.0 - self.slope) * -0.6
        return BaseEstimate(self.form, True, "", cp, 0.05, (0.01, 0.01), 1.0)


@pytest.mark.parametrize("slope, settles", [(0.1, True), (0.7, False)])
def test_where_the_wake_depends_on_the_base_pressure_the_passes_repeat_until_it_settles(
    monkeypatch, slope, settles
):
    # the plate's shear layers leave its sharp edges across the stream: the free-streamline
    # wake's shape depends on Cp_b, so the wake pass is repeated with each new estimate
    monkeypatch.setattr(
        Conditions, "base_pressure_model", property(lambda c: _Contracting("body", -0.25, slope))
    )
    plate = rounded_box(0.02, 1.0, 0.0, clearance=1.0)
    a = analyze(plate, Conditions(ground=False, base_model="body", panels=120))
    if settles:
        # -0.25 -> -0.565 -> -0.5965 -> -0.59965: the third pass agrees within 0.005
        assert a.success, a.message
        assert a.flow.base_estimate.passes == 3
        assert a.drag.base_pressure == pytest.approx(-0.59965)
    else:
        assert a.status is AnalysisStatus.BASE_PRESSURE_FAILED
        assert "did not settle in 4 wake passes" in a.message


def test_without_a_separated_region_the_base_pressure_is_not_needed():
    # a NACA 0012 with its Kutta condition stays attached to its trailing edge: no base
    from profilebench.io.export import run_record
    from profilebench.plotting.summary import run_lines

    section = naca4("0012", chord=1.0)
    const = analyze(section, Conditions(ground=False))
    layer = analyze(section, Conditions(ground=False, base_model="body"))
    assert const.success and layer.success
    assert not layer.flow.separated.any()
    assert layer.drag.cd == const.drag.cd
    assert "not used" in layer.flow.base_estimate.message
    assert "no separated region" in run_lines(run_record(layer))[0]
