"""The radius-search cache (profilebench.assess.radius_search.SearchCache) and its users.

These check the cache's bookkeeping against the search itself (a cached answer is the very
search that a fresh call gives), the search against its definition written out, and the
closed-body verdict's set-up against the analysis's; the physics of the search is checked in
test_analysis.py.
"""

import numpy as np
import pytest

from profilebench.assess.analysis import analyze
from profilebench.assess.conditions import Conditions
from profilebench.assess.corners import largest_fitting_radius
from profilebench.assess.radius_search import (
    SearchCache,
    cached_radius_search,
    closed_body_verdict,
    corner_verdict,
    smallest_attached_radius,
)
from profilebench.assess.results import RadiusSearch, SearchStatus
from profilebench.assess.solve import closed_body, march_closed, solve_flow
from profilebench.geometry import Profile, measure, panelize, rounded_box
from profilebench.io import load_project, sample_paths
from sample_variants import bubble_van_project


def _fake(node, radius):
    return RadiusSearch(node, SearchStatus.FOUND, radius, 0.5, (0.0, radius), 1e-3, 1, "fake")


@pytest.fixture(scope="module")
def van():
    project = bubble_van_project()
    cond = project.conditions.replace(panels=150)
    return project.profile, cond


def test_cache_forgets_the_least_recently_used_beyond_its_size(van):
    profile, cond = van
    cache = SearchCache(size=2)
    keys = [SearchCache.key(profile, cond.replace(speed=v), 1) for v in (20.0, 21.0, 22.0)]
    cache.put(keys[0], _fake(1, 0.1))
    cache.put(keys[1], _fake(1, 0.2))
    assert cache.get(keys[0]).radius == 0.1  # now the most recent
    cache.put(keys[2], _fake(1, 0.3))
    assert len(cache) == 2
    assert cache.get(keys[1]) is None  # the least recently used went
    assert cache.get(keys[0]).radius == 0.1 and cache.get(keys[2]).radius == 0.3
    cache.clear()
    assert len(cache) == 0


def test_cache_key_leaves_the_searched_corner_radius_out(van):
    profile, cond = van
    node = next(i for i, n in enumerate(profile.nodes) if not n.smooth and n.radius > 0)
    other = next(i for i, n in enumerate(profile.nodes) if not n.smooth and i != node)
    base = SearchCache.key(profile, cond, node)
    assert SearchCache.key(profile.with_radius(node, 0.2), cond, node) == base
    assert SearchCache.key(profile.with_radius(other, 0.2), cond, node) != base
    assert SearchCache.key(profile, cond.replace(speed=cond.speed + 1.0), node) != base


def test_nearby_finds_only_outlines_within_the_shift(van):
    profile, cond = van
    cache = SearchCache()
    node = 1
    cache.put(SearchCache.key(profile, cond, node), _fake(node, 0.1))
    j = 3
    moved = profile.moved(j, profile.nodes[j].x, profile.nodes[j].y + 0.02)
    hit = cache.nearby(moved, cond, node, within=0.03)
    assert hit is not None and hit[0].radius == 0.1 and hit[1] == pytest.approx(0.02)
    assert cache.nearby(moved, cond, node, within=0.01) is None
    assert cache.nearby(moved, cond.replace(speed=cond.speed + 1.0), node, within=0.03) is None


def test_the_analysis_and_a_later_search_share_one_cache(van):
    profile, cond = van
    base = analyze(profile, cond)
    assert base.success and base.radius_searches, "the sharpened van has a corner bubble to search"
    ran = base.radius_searches[0]
    # the analysis stored its search: asking again gives that very object, with no solve
    assert cached_radius_search(profile, cond, ran.node) is ran
    fresh = smallest_attached_radius(profile, cond, ran.node)
    assert (fresh.status, fresh.radius) == (ran.status, ran.radius)


def test_a_separate_cache_is_searched_anew(van):
    profile, cond = van
    base = analyze(profile, cond)
    ran = base.radius_searches[0]
    own = SearchCache()
    got = cached_radius_search(profile, cond, ran.node, cache=own)
    assert got is not ran and (got.status, got.radius) == (ran.status, ran.radius)
    assert len(own) == 1 and cached_radius_search(profile, cond, ran.node, cache=own) is got


# --- the search is bisection on the analysis's own verdict ---------------------------------------


def _bisection(profile, cond, node):
    """The search written out: attached at r = 0, separated at the largest radius that fits,
    else halve [0, largest] on corner_verdict to 1 mm or 1 % of the radius (the definition in
    smallest_attached_radius's docstring)."""
    r_max = largest_fitting_radius(profile, node) * 0.999

    def attached(r):
        return not corner_verdict(profile.with_radius(node, r), cond, node).separated

    if attached(0.0):
        return SearchStatus.ALWAYS_ATTACHED, (0.0, 0.0)
    if not attached(r_max):
        return SearchStatus.NONE_FITS, (r_max, r_max)
    lo, hi = 0.0, r_max
    while hi - lo > max(1e-3, 0.01 * hi):
        mid = 0.5 * (lo + hi)
        lo, hi = (lo, mid) if attached(mid) else (mid, hi)
    return SearchStatus.FOUND, (lo, hi)


def _corner_cases():
    body = load_project(next(p for p in sample_paths() if p.stem == "kestrel_test_body"))
    cases = [
        pytest.param(body.profile, body.conditions.replace(panels=150), node, id=f"body-{node}")
        for node, nd in enumerate(body.profile.nodes)
        if not nd.smooth
    ]
    rng = np.random.default_rng(13)
    for k in range(2):
        height = rng.uniform(1.2, 2.5)
        box = rounded_box(
            rng.uniform(3.0, 6.0),
            height,
            tuple(float(r) for r in rng.uniform(0.01, 0.1, 4) * height),
            clearance=rng.uniform(0.1, 0.35),
        )
        cond = Conditions(speed=float(rng.uniform(20.0, 40.0)), panels=150)
        cases += [pytest.param(box, cond, node, id=f"box{k}-{node}") for node in (0, 3)]
    return cases


@pytest.mark.parametrize("profile, cond, node", _corner_cases())
def test_the_search_is_the_bisection_on_the_analysis_verdict(profile, cond, node):
    # the verdict is not monotone in the radius on some corners, so the answer is defined by
    # the bisection's own tries: the same tries give the same bracket, exactly
    found = smallest_attached_radius(profile, cond, node)
    status, bracket = _bisection(profile, cond, node)
    assert found.status is status
    assert found.bracket == bracket


def test_the_closed_body_split_is_the_analysis_closed_body_pass():
    # the pass closed_body_verdict judges on is the analysis's own (the same panel solution
    # and surfaces, and the same layers where marched in full) for the 2D section: the measuring
    # tool does not apply the underbody side relief (the search does not use it)
    body = load_project(next(p for p in sample_paths() if p.stem == "kestrel_hatch"))
    cond = body.conditions.replace(panels=150, side_relief=False)
    pan = panelize(body.profile, cond.panels)
    height = measure(body.profile).height
    flow = solve_flow(body.profile, cond, pan, height)
    split = closed_body(body.profile, cond, pan, height)
    assert flow.closed is not None
    np.testing.assert_array_equal(split.inviscid.points, flow.closed.inviscid.points)
    for mine, theirs in zip(split.surfaces, flow.closed.surfaces):
        np.testing.assert_array_equal(mine.surface.ue, theirs.surface.ue)
        marched = march_closed(mine, cond, height)
        np.testing.assert_array_equal(marched.bl.theta, theirs.bl.theta)
        assert [e.kind for e in marched.bl.events] == [e.kind for e in theirs.bl.events]
        assert marched.restarts == theirs.restarts


def test_a_kutta_profile_has_no_closed_body_pass_and_gets_the_full_verdict():
    body = load_project(next(p for p in sample_paths() if p.stem == "kestrel_test_body"))
    kutta = Profile(body.profile.nodes, name="kutta", trailing_edge=2)
    cond = body.conditions.replace(panels=120)
    node = 3
    assert closed_body_verdict(kutta, cond, node) == corner_verdict(kutta, cond, node)
