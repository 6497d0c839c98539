"""analyze(..., searches="nearby"): the editor's drag-time reuse of a nearby outline's radius search.

These check the pipeline against itself (the same flow either way, the exact search against a
fresh smallest-attached-radius search); the physics of the search is checked in test_analysis.py.
"""

import numpy as np
import pytest

from profilebench.assess.analysis import NEARBY_SHIFT_RATIO, analyze
from profilebench.assess.radius_search import smallest_attached_radius
from profilebench.errors import InputError
from sample_variants import bubble_van_project


@pytest.fixture(scope="module")
def van():
    project = bubble_van_project()
    cond = project.conditions.replace(panels=200)
    base = analyze(project.profile, cond)
    assert base.success and base.radius_searches, "the sharpened van has a corner bubble to search"
    return project.profile, cond, base


def _nudged(profile, corner, dy):
    """The profile with a node two places after ``corner`` moved up by ``dy`` metres."""
    j = (corner + 2) % len(profile.nodes)
    n = profile.nodes[j]
    return profile.moved(j, n.x, n.y + dy)


def test_nearby_mode_reuses_the_search_and_marks_the_corner_provisional(van):
    profile, cond, base = van
    corner = base.radius_searches[0].node
    moved = _nudged(profile, corner, 0.01)
    near = analyze(moved, cond, searches="nearby")
    assert near.success and near.provisional == (corner,)
    assert near.radius_searches[0] is base.radius_searches[0]  # the cached search, not a new one
    assert any(f"corner {corner}:" in w and "nearby outline" in w for w in near.warnings)
    exact = analyze(moved, cond)
    assert exact.provisional == () and not any("nearby outline" in w for w in exact.warnings)
    # the flow does not depend on the search: the same solution either way
    np.testing.assert_array_equal(near.flow.inviscid.cp, exact.flow.inviscid.cp)
    assert [c.verdict for c in near.corners] == [c.verdict for c in exact.corners]
    # the exact mode's search is this outline's own (started from the nearby outline's bracket,
    # so within the search's tolerance of a search from scratch)
    fresh = smallest_attached_radius(moved, cond, corner)
    got = exact.radius_searches[0]
    assert (got.status, got.largest_fitting) == (fresh.status, fresh.largest_fitting)
    assert abs(got.radius - fresh.radius) <= max(got.tolerance, fresh.tolerance)
    assert got is not base.radius_searches[0]


def test_nearby_mode_searches_when_the_outline_moved_too_far(van):
    profile, cond, base = van
    corner = base.radius_searches[0].node
    h = base.measures.height
    far = analyze(_nudged(profile, corner, 1.5 * NEARBY_SHIFT_RATIO * h), cond, searches="nearby")
    assert far.success and [s.node for s in far.radius_searches] == [corner]
    assert far.provisional == ()  # searched anew, not taken from the nearby outline
    assert far.radius_searches[0] is not base.radius_searches[0]


def test_nearby_mode_on_the_same_outline_is_not_provisional(van):
    profile, cond, base = van
    same = analyze(_nudged(profile, base.radius_searches[0].node, 0.0), cond, searches="nearby")
    assert same.provisional == () and same.drag.cd == base.drag.cd


def test_unknown_search_mode_is_refused_with_the_choices(van):
    profile, cond, _ = van
    with pytest.raises(InputError, match="run, nearby"):
        analyze(profile, cond, searches="fast")
