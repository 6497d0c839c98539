"""Cp and boundary-layer charts."""

import dataclasses

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from fake_analysis import A, B, fake_analysis
from profilebench.assess.results import Analysis, AnalysisStatus
from profilebench.errors import InputError
from profilebench.plotting import EVENT_STYLES, draw_boundary_layer, draw_cp


def _fig():
    fig = Figure(figsize=(8, 6), dpi=80)
    FigureCanvasAgg(fig)
    return fig


@pytest.fixture(scope="module")
def cp_axes():
    a = fake_analysis()
    ax = _fig().add_subplot(111)
    return a, ax, draw_cp(ax, a)


def test_cp_axis_inverted(cp_axes):
    _, ax, _ = cp_axes
    assert ax.yaxis_inverted()


def test_cp_curves_are_the_surface_values(cp_axes):
    a, ax, _ = cp_axes
    lines = {l.get_label(): l for l in ax.get_lines()}
    for name in ("upper", "lower"):
        x, cp = lines[f"{name} surface"].get_data()
        idx = getattr(a.flow, name).surface.index
        np.testing.assert_array_equal(cp, a.flow.inviscid.cp[idx])
        # exact ellipse potential flow, Cp = 1 - q^2 with q from the Joukowski mapping, e.g. Katz & Plotkin, Low-Speed Aerodynamics:
        # the minimum Cp on an ellipse is 1 - (1 + b/a)^2
        assert cp.min() == pytest.approx(1 - (1 + B / A) ** 2, abs=2e-3)


@pytest.mark.parametrize(
    "kind",
    ["transition", "laminar_separation", "reattachment", "turbulent_separation", "edge_separation"],
)
def test_event_marker_sits_on_its_surface_curve(cp_axes, kind):
    a, ax, handles = cp_axes
    ev = next(e for e in a.events if e.kind == kind)
    surf = getattr(a.flow, ev.surface)
    expected = np.interp(ev.s, surf.surface.s, a.flow.inviscid.cp[surf.surface.index])
    xs, ys = handles[kind].get_data()
    assert np.min(np.abs(np.asarray(ys) - expected)) < 1e-12
    assert handles[kind].get_label() == EVENT_STYLES[kind].label


def test_stagnation_marker_at_cp_one(cp_axes):
    _, _, handles = cp_axes
    # Bernoulli: Ue = 0 gives Cp = 1
    assert list(handles["stagnation"].get_data()[1]) == [1.0]


def test_boundary_layer_threshold_and_separated_stations_left_out():
    a = fake_analysis()
    fig = _fig()
    ax_h, ax_cf = fig.add_subplot(211), fig.add_subplot(212)
    draw_boundary_layer(ax_h, ax_cf, a)
    lines = {l.get_label(): l for l in ax_h.get_lines()}
    thr = lines["H_sep = 2.4 (turbulent)"]
    assert set(thr.get_ydata()) == {a.conditions.h_separation}
    s_up, h_up = lines["upper surface"].get_data()
    bl = a.flow.upper.bl
    sep_s = bl.separation.s
    assert s_up.max() <= sep_s
    n_attached = int(np.sum(bl.s <= sep_s))
    assert len(s_up) == n_attached
    assert ax_cf.get_xlabel().startswith("s from the stagnation point")


def test_failed_analysis_cannot_draw_cp():
    a = fake_analysis()
    failed = Analysis(
        AnalysisStatus.INVISCID_FAILED, "singular panel system", a.profile, a.conditions
    )
    with pytest.raises(InputError, match="singular panel system"):
        draw_cp(_fig().add_subplot(111), failed)


def _bl_figure(a, size=(680, 230)):
    """The boundary-layer plot as the editor's tab renders it (constrained layout, 90 dpi)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    fig = Figure(figsize=(size[0] / 90, size[1] / 90), dpi=90, layout="constrained")
    FigureCanvasAgg(fig)
    ax_h, ax_cf = fig.subplots(2, 1, sharex=True)
    draw_boundary_layer(ax_h, ax_cf, a)
    fig.canvas.draw()
    return fig, ax_h, ax_cf


def test_boundary_layer_legends_off_the_data_and_labels_inside_the_figure():
    fig, ax_h, ax_cf = _bl_figure(fake_analysis())
    r = fig.canvas.get_renderer()
    for ax in (ax_h, ax_cf):
        leg = ax.get_legend().get_window_extent(r)
        plot = ax.get_window_extent(r)
        assert leg.x0 >= plot.x1  # right of the axes: it covers no curve
        label = ax.yaxis.label.get_window_extent(r)
        assert label.x0 >= 0 and label.y0 >= 0 and label.y1 <= fig.bbox.height  # not cut off


def test_shape_factor_axis_clipped_with_a_note():
    a = fake_analysis()
    bl = a.flow.upper.bl
    H = np.array(bl.H, float)
    H[len(H) // 3] = 9.0  # a spike, as a bubble's edge gives
    spiky = dataclasses.replace(
        a,
        flow=dataclasses.replace(
            a.flow, upper=dataclasses.replace(a.flow.upper, bl=dataclasses.replace(bl, H=H))
        ),
    )
    fig, ax_h, _ = _bl_figure(spiky)
    assert ax_h.get_ylim() == (1.0, 4.0)  # laminar separation (Thwaites) at H about 3.5
    notes = [t.get_text() for t in ax_h.get_legend().get_texts() if "clipped" in t.get_text()]
    assert notes == ["H above 4 clipped\n(max 9.0)"]


def test_shape_factor_axis_without_spike_has_no_note():
    _, ax_h, _ = _bl_figure(fake_analysis())
    assert not [t for t in ax_h.get_legend().get_texts() if "clipped" in t.get_text()]
