"""The radius-search cache (profilebench.assess.radius_search.SearchCache) and its users.

These check the cache's bookkeeping against the search itself (a cached answer is the very
search that a fresh call gives); the physics of the search is checked in test_analysis.py.
"""

import pytest

from profilebench.assess.analysis import analyze
from profilebench.assess.radius_search import (
    SearchCache,
    cached_radius_search,
    smallest_attached_radius,
)
from profilebench.assess.results import RadiusSearch, SearchStatus
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
