"""Drawing of the annotated profile onto a plain Agg figure."""

import numpy as np
import pytest
from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.collections import LineCollection
from matplotlib.figure import Figure
from matplotlib.patches import Rectangle
from shapely.geometry import Polygon as ShPolygon

from fake_analysis import fake_analysis
from profilebench.errors import InputError
from profilebench.geometry.profile import Profile
from profilebench.plotting import EVENT_STYLES, draw_profile
from profilebench.plotting.stations import outline_of


def _ax():
    fig = Figure(figsize=(10, 5), dpi=80)
    FigureCanvasAgg(fig)
    return fig.add_subplot(111)


@pytest.fixture(scope="module")
def drawn():
    a = fake_analysis()
    ax = _ax()
    return a, ax, draw_profile(ax, a)


@pytest.mark.parametrize("kind", sorted(EVENT_STYLES))
def test_legend_has_one_entry_per_event_kind_drawn(drawn, kind):
    a, ax, out = drawn
    labels = [t.get_text() for t in out["legend"].get_texts()]
    occurs = any(e.kind == kind for e in a.events)
    assert occurs  # the fake holds every kind
    assert labels.count(EVENT_STYLES[kind].label) == 1


def test_legend_has_no_event_entries_when_no_events():
    ax = _ax()
    out = draw_profile(ax, fake_analysis(events=False))
    labels = [t.get_text() for t in out["legend"].get_texts()]
    assert not any(st.label in labels for st in EVENT_STYLES.values())
    assert "laminar bubble" not in labels


def test_event_markers_have_distinct_symbols():
    markers = [st.marker for st in EVENT_STYLES.values()]
    assert len(set(markers)) == len(markers)


def test_laminar_bubble_drawn_between_separation_and_reattachment(drawn):
    a, ax, out = drawn
    line = out["events"]["bubble"]
    sep = next(e for e in a.events if e.kind == "laminar_separation")
    rea = next(e for e in a.events if e.kind == "reattachment")
    xd, yd = line.get_data()
    assert (xd[0], yd[0]) == (sep.x, sep.y)
    assert (xd[-1], yd[-1]) == (rea.x, rea.y)


def test_true_aspect_ratio(drawn):
    _, ax, _ = drawn
    assert ax.get_aspect() == 1.0


def test_cp_band_colours_follow_cp(drawn):
    a, ax, out = drawn
    lc = out["cp"]
    assert isinstance(lc, LineCollection)
    cp = np.asarray(a.flow.inviscid.cp)
    # each outline segment carries the mean of its two end stations' Cp (numpy, independently)
    np.testing.assert_allclose(lc.get_array(), 0.5 * (cp + np.roll(cp, -1)))
    assert out["colorbar"].ax.get_ylabel().startswith("Cp")
    assert lc.norm(1.0) == pytest.approx(1.0)  # Cp = 1 (stagnation) at the top of the scale
    assert lc.norm(0.0) == pytest.approx(0.5)  # Cp = 0 in the middle of the diverging map


def test_ground_strip_drawn_below_zero(drawn):
    _, ax, _ = drawn
    strips = [p for p in ax.patches if isinstance(p, Rectangle) and p.get_hatch()]
    assert len(strips) == 1
    assert strips[0].get_y() + strips[0].get_height() == pytest.approx(0.0)
    assert strips[0].get_y() < 0


def test_no_ground_strip_without_ground():
    ax = _ax()
    draw_profile(ax, fake_analysis(ground=False))
    assert not [p for p in ax.patches if isinstance(p, Rectangle) and p.get_hatch()]


def test_separated_region_shaded(drawn):
    a, ax, _ = drawn
    shaded = [p for p in ax.patches if p.get_label() == "separated flow"]
    assert shaded
    sep_x = np.asarray(a.flow.inviscid.x)[a.flow.separated]
    # every shaded strip lies over the separated stations (x range)
    for p in shaded:
        xy = p.get_xy()
        assert xy[:, 0].min() >= sep_x.min() - 0.2


def test_corner_labels_one_per_corner_and_do_not_overlap(drawn):
    a, ax, out = drawn
    texts = out["corner_labels"]
    assert len(texts) == len(a.corners)
    for t, c in zip(texts, a.corners):
        assert f"r/t {c.r_over_t:.3f}" in t.get_text()
        assert c.verdict.value in t.get_text()
    r = ax.figure.canvas.get_renderer()
    boxes = [t.get_window_extent(r) for t in texts]
    for i in range(len(boxes)):
        for j in range(i + 1, len(boxes)):
            assert not boxes[i].overlaps(boxes[j])


def _signed_area(xy):
    x, y = xy[:, 0], xy[:, 1]
    return 0.5 * (np.dot(x, np.roll(y, -1)) - np.dot(y, np.roll(x, -1)))


def _path_area(patch):
    # exterior rings counter-clockwise (+), holes clockwise (-): the signed areas add up
    return sum(_signed_area(np.asarray(poly)) for poly in patch.get_path().to_polygons())


@pytest.mark.parametrize("factor, shift", [(1.05, 0.0), (0.9, 0.3)])
def test_baseline_difference_area_matches_shapely(factor, shift):
    a = fake_analysis()
    base = a.profile.scaled(factor).translated(shift, 0.0)
    ax = _ax()
    draw_profile(ax, a, baseline=base)
    hatched = [p for p in ax.patches if p.get_label() == "change from baseline"]
    assert hatched
    drawn_area = sum(_path_area(p) for p in hatched)
    cur = ShPolygon(np.column_stack([a.flow.inviscid.x, a.flow.inviscid.y]))
    bo = outline_of(base)
    bl = ShPolygon(np.column_stack([bo.x, bo.y]))
    # area of the symmetric difference computed by shapely directly
    assert drawn_area == pytest.approx(cur.symmetric_difference(bl).area, rel=1e-9)
    labels = [t.get_text() for t in ax.get_legend().get_texts()]
    assert "baseline" in labels and "change from baseline" in labels


def test_bare_profile_draws_nodes_outline():
    p = Profile.from_points([(0.0, 0.2), (4.0, 0.2), (4.0, 1.6), (0.0, 1.6)], name="box")
    ax = _ax()
    out = draw_profile(ax, p)
    x, y = out["outline"].get_data()
    assert len(x) >= 5 and out["cp"] is None
    assert ax.get_title() == "box"


def test_bad_object_is_an_input_error():
    with pytest.raises(InputError, match="Profile or an Analysis"):
        draw_profile(_ax(), "not a profile")
