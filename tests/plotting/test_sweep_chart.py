"""The study chart's verdict bands: one band per point of the watched corner's verdict, none
for a successful point without one (no corner watched), hatched for a failed point."""

import pytest

from profilebench.assess.conditions import Conditions
from profilebench.geometry.shapes import rounded_box
from profilebench.plotting.sweep_chart import VERDICT_BANDS, sweep_figure
from profilebench.studies import PointCache, speed_sweep

BODY = rounded_box(2.0, 0.5, radius=(0.1, 0.0, 0.0, 0.1), clearance=0.05, name="chart body")
COND = Conditions(speed=30.0, ground=True, width=1.0, panels=120)


def _band_labels(fig):
    ax = fig.axes[0]
    return list(ax.patches), [t.get_text() for t in ax.get_legend().get_texts()]


@pytest.mark.parametrize("corner", [None, 3])
def test_bands_only_where_the_watched_corner_has_a_verdict(corner):
    table = speed_sweep(BODY, COND, (25.0, 35.0), corner=corner, workers=1, cache=PointCache())
    assert table.ok.all()
    patches, legend = _band_labels(sweep_figure(table))
    if corner is None:
        # nothing watched: no band, and no band's name in the legend
        assert patches == []
        assert not set(legend) & {text for _, text in VERDICT_BANDS.values()}
    else:
        assert len(patches) == len(table)
        kinds = {text for _, text in VERDICT_BANDS.values()}
        assert set(legend) & kinds
