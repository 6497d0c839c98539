"""The closed-body pass's points are the same whichever way round the outline is given (the
invariance rule of docs/validation.md: the same outline from any start node and in either
direction gives the same answers)."""

import numpy as np
import pytest

from profilebench.assess.solve import CLOSED_ARC_POINTS, closed_points
from profilebench.geometry import Profile, measure, panelize, rounded_box


@pytest.mark.parametrize("n", [250, 1000])
def test_the_closed_pass_keeps_the_same_points_in_either_direction(n):
    box = rounded_box(4.6, 1.9, (0.06, 0.03, 0.03, 0.042), clearance=0.25)
    nodes = box.nodes
    other = Profile([nodes[2], nodes[1], nodes[0], nodes[3]], name="reversed")
    h = measure(box).height
    pa, pb = panelize(box, n), panelize(other, n)
    if n == 1000:  # the case this is about: arcs long enough to keep every second point
        assert max((c.point_end - c.point_start) % n + 1 for c in pa.corners) > CLOSED_ARC_POINTS
    kept_a = set(np.asarray(pa.canonical)[closed_points(pa, h)].tolist())
    kept_b = set(np.asarray(pb.canonical)[closed_points(pb, h)].tolist())
    assert kept_a == kept_b
