"""Which corner a separation belongs to, concave-corner bubbles, and the correction that follows.

Rules of the trade (common practice, no source): a separation caused by the adverse gradient
ahead of a concave corner (a windscreen base) is a bubble in that corner, not a fault of the
convex corner upstream; a corner is charged only for separation that starts on its arc or in
the pressure recovery just behind it; drag falls steeply with a corner's radius until the flow
stays attached, and a larger radius then buys (almost) nothing.
"""

import numpy as np
import pytest

from profilebench import analyze, load_project
from profilebench.assess.corners import (
    CONCAVE_APPROACH_RATIO,
    CORNER_REACH_RATIO,
    _arc_positions,
    all_spans,
    corner_regions,
)
from profilebench.assess.results import Verdict
from profilebench.io.samples import sample_paths

BONNET = 7  # the courier van's bonnet leading edge
SCREEN_BASE = 5  # its windscreen base (concave)


@pytest.fixture(scope="module")
def van():
    return load_project(next(p for p in sample_paths() if p.stem == "kestrel_courier_van"))


def _corner(analysis, node):
    return next(c for c in analysis.corners if c.node == node)


def test_van_bonnet_carries_no_correction_and_the_screen_base_has_its_bubble(van):
    a = analyze(van.profile, van.conditions)
    bonnet, base = _corner(a, BONNET), _corner(a, SCREEN_BASE)
    assert not bonnet.verdict.separated and bonnet.delta_cd == 0.0
    assert base.verdict is Verdict.CONCAVE_BUBBLE and base.delta_cd == 0.0
    assert "ahead of it" in base.detail
    # the screen base's bubble is drawn as a separation that reattaches, not a final one
    assert any(e.kind == "bubble_separation" and e.surface == "upper" for e in a.events)
    assert sum(c.delta_cd for c in a.corners) == 0.0


def test_van_cd_falls_with_the_bonnet_radius_to_the_knee_then_stays_flat(van):
    def cd_and_delta(r):
        a = analyze(van.profile.with_radius(BONNET, r), van.conditions)
        assert a.success, a.message
        return a.drag.cd, _corner(a, BONNET).delta_cd

    sharp = [cd_and_delta(r) for r in (0.0, 0.02, 0.04)]
    # below the knee: the bonnet separates and its correction (and Cd) fall as r grows
    assert all(d > 0.0 for _, d in sharp)
    assert sharp[0][0] > sharp[1][0] > sharp[2][0]
    assert sharp[0][1] > sharp[1][1] > sharp[2][1]
    # beyond it (the van's knee is near 55 mm): no correction, Cd flat within 2 %
    rounded = [cd_and_delta(r) for r in (0.06, 0.12, 0.2, 0.3)]
    assert all(d == 0.0 for _, d in rounded)
    cds = np.array([c for c, _ in rounded])
    assert cds.max() - cds.min() <= 0.02 * cds.min()
    assert sharp[-1][0] > cds.max()


def test_a_corrected_corner_says_which_separation_its_correction_is_for(van):
    a = analyze(van.profile.with_radius(BONNET, 0.03), van.conditions)
    bonnet = _corner(a, BONNET)
    assert bonnet.verdict is Verdict.TURBULENT_SEPARATION and bonnet.delta_cd > 0.0
    assert "drag correction" in bonnet.detail and "for this separation" in bonnet.detail
    s_mm = int(bonnet.detail.split("at s = ")[1].split(" mm")[0])
    near = [e for e in a.events if e.kind == "bubble_separation" and abs(e.s * 1e3 - s_mm) <= 1]
    assert near, "the corrected separation is drawn as one that reattaches"


def test_regions_end_within_the_reach_of_a_convex_arc_and_start_ahead_of_a_concave_one(van):
    a = analyze(van.profile, van.conditions)
    h = a.measures.height
    spans = all_spans(a.panelling, h)
    arcs = _arc_positions(a.panelling, a.flow, spans)
    for span, (k, lo, hi, _bounded), (k2, arc_lo, arc_hi) in zip(
        spans, corner_regions(a.panelling, a.flow, spans), arcs
    ):
        if k < 0:
            continue
        assert k == k2
        if span.convex:
            assert lo == pytest.approx(arc_lo) and hi <= arc_hi + CORNER_REACH_RATIO * h + 1e-9
        else:
            assert arc_lo - CONCAVE_APPROACH_RATIO * h - 1e-9 <= lo <= arc_lo
