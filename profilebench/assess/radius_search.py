"""The smallest attached radius of a corner: the search, the verdict it needs, and its cache.

:func:`smallest_attached_radius` varies one corner's radius and re-solves the flow at each try
(:func:`corner_verdict`: the analysis's own flow, no drag and no tables, on points that round
the searched corner are spread as at :data:`SEARCH_PANELS` panels), bisecting on the solver's
verdict. :class:`SearchCache` remembers answers by everything a search depends on; the
analysis (:func:`profilebench.assess.analysis.analyze`) and the editor's "find the smallest
attached radius" both go through :func:`cached_radius_search`, so that a corner searched once is
not searched again.
"""

from __future__ import annotations

import dataclasses
import math

import numpy as np

from profilebench.assess.corners import (
    all_spans,
    corner_regions,
    largest_fitting_radius,
    surface_verdict,
)
from profilebench.assess.results import RadiusSearch, SearchStatus, Verdict
from profilebench.assess.solve import (
    THIN_ARC_RATIO,
    closed_body,
    layer_thickness,
    march_closed,
    solve_flow,
)
from profilebench.errors import GeometryError, ProfileBenchError
from profilebench.lru import LruCache
from profilebench.geometry import measure, panelize, validate
from profilebench.geometry.panelling import Focus

__all__ = [
    "SEARCH_PANELS",
    "SEARCH_REACH_RATIO",
    "search_focus",
    "corner_verdict",
    "thin_arc_note",
    "thin_arc_bound",
    "closed_body_verdict",
    "smallest_attached_radius",
    "SearchCache",
    "SEARCH_CACHE",
    "cached_radius_search",
    "nearby_radius_search",
]


# The search judges its corner on points spread round it as at SEARCH_PANELS panels, within
# SEARCH_REACH_RATIO frontal heights of its arc (covering the edge-speed fit's window, 0.06 h,
# either side), the rest of the outline at the conditions' count. At 250 panels alone the
# samples' smallest attached radii came out 4 to 41 % below their 1000-panel values and jumped by
# 10-20 % between neighbouring counts (200 to 400); with the corner's neighbourhood as at 1000,
# all seven are within 2 % of the 1000-panel answer at 250 and 500 (measured,
# docs/validation.md). A choice of this project, no source.
SEARCH_PANELS = 1000
SEARCH_REACH_RATIO = 0.1


def corner_verdict(profile, conditions, node, thickness=None):
    """The solver's verdict on one corner (a :class:`Verdict`), or None if the flow failed.

    The fast path of the analysis used by the smallest-attached-radius search: no drag, no
    tables, and the points within :data:`SEARCH_REACH_RATIO` frontal heights of the corner's
    arc spread as at :data:`SEARCH_PANELS` panels (:func:`search_focus`; the rest of the outline
    at ``conditions.panels``). At a corner near its critical radius this verdict can differ from
    the analysis's at the conditions' count, whose points round the corner are coarser: the
    refined one is the one that holds when the panels are doubled (docs/validation.md).
    """
    judged = _judged(profile, conditions, node)
    return None if judged is None else judged[0]


def _judged(profile, conditions, node):
    """(verdict, the layer's thickness at the corner's arc in m or None) of
    :func:`corner_verdict`'s flow, or None if the flow failed."""
    panelled = _panelled(profile, conditions, node)
    if panelled is None:
        return None
    panelling, height = panelled
    try:
        flow = solve_flow(profile, conditions, panelling, height)
    except ProfileBenchError:
        return None
    if not flow.success:
        return None
    spans = all_spans(panelling, height)
    regions = corner_regions(panelling, flow, spans)
    i, span = _corner_span(spans[: len(panelling.corners)], node)
    k, lo = regions[i][0], regions[i][1]
    if k < 0:
        return Verdict.IN_WAKE, None
    sfl = flow.surfaces[k]
    return surface_verdict(sfl, regions[i], span.convex)[0], layer_thickness(sfl.bl, lo)


def _panelled(profile, conditions, node=None):
    """(panelling, frontal height) of a valid profile, or None where it is not valid; with
    ``node``, that corner's neighbourhood refined (:func:`search_focus`)."""
    try:
        validate(profile, ground=conditions.ground)
        height = measure(profile).height
        focus = None if node is None else search_focus(node, height)
        panelling = panelize(profile, conditions.panels, focus=focus)
    except ProfileBenchError:
        return None
    return panelling, height


def search_focus(node, height):
    """The :class:`~profilebench.geometry.panelling.Focus` of a verdict on corner ``node`` of a
    profile of frontal height ``height`` (m): within :data:`SEARCH_REACH_RATIO` frontal heights
    of its arc, the points spread as at :data:`SEARCH_PANELS` panels (at counts below it)."""
    return Focus(int(node), SEARCH_REACH_RATIO * float(height), SEARCH_PANELS)


def _corner_span(spans, node):
    """(index, span) of ``node``'s span among the node corners' ``spans``."""
    for i, span in enumerate(spans):
        if span.node == node:
            return i, span
    raise GeometryError(f"node {node} is not a corner of the profile")


def closed_body_verdict(profile, conditions, node):
    """The verdict on one corner from the closed-body pass alone, or None if it failed.

    The analysis's own closed-body pass (:func:`profilebench.assess.solve.closed_body`: the
    panel solve on its coarser points, the split at the stagnation point), the boundary layer
    marched on the corner's surface only and only to just past the corner's region (the
    march's result there is the whole march's), and the corner's region and verdict taken on
    that pass as :func:`corner_verdict` takes them on the wake model's. No wake-model solve:
    0.4-0.5 of :func:`corner_verdict`'s time on the samples at 250 panels. Where the analysis
    has no closed-body pass (a Kutta condition) or the profile is not valid,
    :func:`corner_verdict` itself.

    Not the analysis's verdict: the wake model changes the edge speed round the front corners,
    and the smallest attached radius on this verdict was 1.0 to 2.9 times smaller than the
    analysis's on the samples' corners (17.7 against 45.6 mm on the van's front bumper lower
    corner, 32.0 against 41.4 mm on the test body's front upper edge; measured with
    ``benchmarks/bench_radius_search.py --closed-body``), so the search does not use it; it is
    kept to measure that (and any cheaper verdict) against the analysis's.
    """
    panelled = _panelled(profile, conditions, node)
    closed = None if panelled is None else closed_body(profile, conditions, *panelled)
    if closed is None:  # not valid (None), or no closed-body pass: the analysis's verdict
        return corner_verdict(profile, conditions, node)
    panelling, height = panelled
    sub = closed.subset
    spans = all_spans(panelling, height)
    # the spans on the pass's points: each end at the nearest point the pass keeps (the corner
    # arcs' ends are always kept)
    coarse = tuple(
        dataclasses.replace(
            sp,
            point_start=_nearest_kept(sub, sp.point_start),
            point_end=_nearest_kept(sub, sp.point_end),
        )
        for sp in spans
    )
    regions = corner_regions(_Points(panelling.points[sub]), closed, coarse)
    i, span = _corner_span(coarse[: len(panelling.corners)], node)
    k, lo, hi, bounded = regions[i]
    if k < 0:
        return Verdict.IN_WAKE
    try:
        sfl = march_closed(closed.surfaces[k], conditions, height, stop_s=hi)
    except ProfileBenchError:
        return None
    if not sfl.bl.success:
        return None
    return surface_verdict(sfl, regions[i], span.convex)[0]


@dataclasses.dataclass(frozen=True)
class _Points:
    """The points of a panelling (what :func:`corner_regions` reads of one)."""

    points: np.ndarray


def _nearest_kept(subset, i):
    """Position in the sorted point indices ``subset`` of the one nearest to point ``i``."""
    j = int(np.searchsorted(subset, i))
    if j < len(subset) and subset[j] == i:
        return j
    cands = [c for c in (j - 1, j) if 0 <= c < len(subset)]
    return min(cands, key=lambda c: abs(int(subset[c]) - i))


class _SearchFailed(Exception):
    pass


def smallest_attached_radius(profile, conditions, node, thickness=None, tolerance=None, start=None):
    """The smallest radius (m) at ``node`` that keeps the flow attached round that corner.

    The corner's radius is varied and the flow re-solved (inviscid and boundary layer) at each
    try; bisection on the solver's verdict (attached or a reattaching laminar bubble counts as
    attached). Tolerance: 1 mm or 1% of the radius, whichever is larger. Returns a
    :class:`RadiusSearch`; "none within the largest radius that fits" is a valid answer.

    Every try is the analysis's own verdict (:func:`corner_verdict`, the flow with the wake
    model). The closed-body verdict alone (:func:`closed_body_verdict`) costs half as much,
    but its answers are not the analysis's (see there). Where the verdict changes, the margin
    on the attached side is still 1 to 22 % on the samples' corners (on the separated side it
    is 0), and the verdict is not monotone in the radius on some corners (the minibus's front
    bumper lower corner is attached at 40.6 mm and separated at 59.6 mm): a secant on the
    margin took more solves than the bisection and found another change of the verdict on 5
    of 43 corners (the samples' and five random boxes'), so the answer stays the one the
    bisection's tries define (docs/benchmarks.md).

    ``start``: a (separated, attached) bracket to try first, for example the answer on a nearby
    outline (:func:`cached_radius_search` passes one). Both ends are solved; where the verdicts
    confirm it the bisection starts there (two solves when it is still within the tolerance),
    else the bracket widens, doubling, toward 0 or the largest radius that fits. With a verdict
    that changes once between 0 and the largest radius, the answer is the one a search without
    ``start`` finds, within the tolerance.
    """
    if profile.nodes[node].smooth:
        raise GeometryError(f"node {node} is smooth, not a corner; make it a corner first")
    r_max = largest_fitting_radius(profile, node) * 0.999
    solves = 0

    thickness_at = {}  # the layer's thickness at the corner on each attached try

    def attached(r):
        nonlocal solves
        solves += 1
        judged = _judged(profile.with_radius(node, r), conditions, node)
        if judged is None:
            raise _SearchFailed(f"the flow could not be solved at r = {r * 1e3:.1f} mm")
        thickness_at[r] = judged[1]
        return not judged[0].separated

    try:
        found = _bisected(attached, r_max, start)
    except _SearchFailed as exc:
        return RadiusSearch(
            node, SearchStatus.FAILED, None, r_max, (0.0, r_max), 0.0, solves, str(exc)
        )
    if found == "always":
        return _always_attached(node, r_max, solves)
    if found == "none":
        return _none_fits(node, r_max, solves)
    lo, hi = found
    delta = thickness_at.get(hi)
    message = f"smallest attached radius {hi * 1e3:.0f} mm (separated at {lo * 1e3:.0f} mm)"
    if delta is not None and thin_arc_bound(hi, delta):
        message += "; " + thin_arc_note(hi, delta)
    return RadiusSearch(
        node,
        SearchStatus.FOUND,
        hi,
        r_max,
        (lo, hi),
        _tolerance(hi),
        solves,
        message,
        layer_thickness=delta,
    )


def thin_arc_bound(radius, delta):
    """True when a smallest attached radius (m) is the bound the layer's thickness ``delta``
    (m) sets (:data:`profilebench.assess.solve.THIN_ARC_RATIO`): within the search's tolerance
    and 5 % of it (the thickness is taken at the attached try, the bound at the separated one)."""
    bound = THIN_ARC_RATIO * delta
    return radius <= 1.05 * bound + _tolerance(radius)


def thin_arc_note(radius, delta):
    """What a smallest attached radius set by the layer's thickness means (both in m)."""
    return (
        f"the boundary layer is {delta * 1e3:.0f} mm thick there: a smaller arc is met by it "
        "as a sharp edge (the model's rule, a choice of this project), so this radius is the "
        "layer's thickness, not a pressure-gradient answer; read it as 'of the order of the "
        "layer's thickness'"
    )


def _tolerance(r):
    """The search's tolerance at radius ``r`` (m): 1 mm or 1 % of r, whichever is larger."""
    return max(1e-3, 0.01 * r)


def _bisected(attached, r_max, start=None):
    """Bisection of ``attached(r)`` (True: attached) between 0 and ``r_max``, from the bracket
    ``start`` where it holds (see :func:`_widened`): a (separated, attached) bracket within the
    tolerance, "always" (attached at r = 0) or "none" (separated at ``r_max``)."""
    bracket = None if start is None else _widened(start, r_max, attached)
    if bracket in ("always", "none"):
        return bracket
    if bracket is not None:
        lo, hi = bracket
    elif attached(0.0):
        return "always"
    elif not attached(r_max):
        return "none"
    else:
        lo, hi = 0.0, r_max
    while hi - lo > _tolerance(hi):
        mid = 0.5 * (lo + hi)
        if attached(mid):
            hi = mid
        else:
            lo = mid
    return lo, hi


def _always_attached(node, r_max, solves):
    return RadiusSearch(
        node,
        SearchStatus.ALWAYS_ATTACHED,
        0.0,
        r_max,
        (0.0, 0.0),
        0.0,
        solves,
        "attached even as a sharp edge",
    )


def _none_fits(node, r_max, solves):
    return RadiusSearch(
        node,
        SearchStatus.NONE_FITS,
        None,
        r_max,
        (r_max, r_max),
        0.0,
        solves,
        f"separated even at the largest radius that fits, {r_max * 1e3:.0f} mm",
    )


def _widened(start, r_max, attached):
    """A (separated, attached) bracket from the hint ``start``, checked by solving its ends and
    widened by doubling until the verdicts bound the answer: (lo, hi), "always" (attached at
    r = 0), "none" (separated at the largest radius that fits), or None for a hint that is no
    bracket at all."""
    try:
        lo, hi = (float(v) for v in start)
    except (TypeError, ValueError):
        return None
    if not (math.isfinite(lo) and math.isfinite(hi)) or not 0.0 <= lo < hi:
        return None
    hi = min(hi, r_max)
    if lo >= hi:
        return None
    width = max(hi - lo, 1e-3)
    if attached(hi):
        while lo > 0.0 and attached(lo):
            hi, lo = lo, max(0.0, lo - width)
            width *= 2.0
        if lo == 0.0 and attached(0.0):
            return "always"
        return lo, hi
    while hi < r_max:
        lo, hi = hi, min(r_max, hi + width)
        width *= 2.0
        if attached(hi):
            return lo, hi
    return "none"


def _key_nodes(profile, node):
    """The nodes as the cache keys them: (x, y, radius, smooth), the searched corner's own radius
    left out (the search does not depend on it)."""
    return tuple(
        (n.x, n.y, 0.0 if i == node else n.radius, n.smooth) for i, n in enumerate(profile.nodes)
    )


class SearchCache(LruCache):
    """Smallest-attached-radius searches remembered by what they depend on (thread-safe, LRU).

    The key is the profile's nodes (the searched corner's own radius left out: changing only
    that radius, a radius drag, reuses the answer), its trailing edge, the conditions, the node
    and the reference thickness.
    """

    def __init__(self, size=128):
        super().__init__(size, "searches")

    @staticmethod
    def key(profile, conditions, node, thickness=None):
        return (_key_nodes(profile, node), profile.trailing_edge, conditions, node, thickness)

    def _alike(self, profile, conditions, node, thickness):
        """(nodes of this profile as keyed, [(stored nodes, search)]) of the stored searches of
        ``node`` with as many nodes, the same smooth flags, trailing edge, conditions and
        thickness."""
        here = _key_nodes(profile, node)
        out = []
        for (key_nodes, te, cond, k_node, k_thick), result in self.items():
            if (
                k_node == node
                and te == profile.trailing_edge
                and cond == conditions
                and k_thick == thickness
                and len(key_nodes) == len(here)
                and all(a[3] == b[3] for a, b in zip(key_nodes, here))
            ):
                out.append((key_nodes, result))
        return here, out

    def nearby(self, profile, conditions, node, thickness=None, within=0.0):
        """A stored search of ``node`` on an outline whose nodes all lie within ``within`` m of
        this profile's (otherwise the same radii, smooth flags, trailing edge, conditions and
        thickness): ``(search, shift)`` with the smallest largest node shift, or None."""
        here, alike = self._alike(profile, conditions, node, thickness)
        best, best_shift = None, None
        for key_nodes, result in alike:
            if any(a[2] != b[2] for a, b in zip(key_nodes, here)):
                continue
            shift = max(math.hypot(a[0] - b[0], a[1] - b[1]) for a, b in zip(key_nodes, here))
            if shift <= within and (best_shift is None or shift < best_shift):
                best, best_shift = result, shift
        return None if best is None else (best, float(best_shift))

    def nearest_bracket(self, profile, conditions, node, thickness=None):
        """The (separated, attached) bracket of a FOUND search of ``node`` on the nearest outline
        in the cache with as many nodes, the same smooth flags, trailing edge, conditions and
        thickness; nearest by the largest change of a node's position or of another corner's
        radius (a radius sweep of another corner, a drag). None if there is none. A hint only:
        :func:`smallest_attached_radius` checks it."""
        here, alike = self._alike(profile, conditions, node, thickness)
        best, best_d = None, None
        for key_nodes, result in alike:
            if result.status is not SearchStatus.FOUND:
                continue
            d = max(
                math.hypot(a[0] - b[0], a[1] - b[1]) + abs(a[2] - b[2])
                for a, b in zip(key_nodes, here)
            )
            if best_d is None or d < best_d:
                best, best_d = result, d
        return None if best is None else best.bracket


# The cache a process's analyses and searches share unless they are given another.
SEARCH_CACHE = SearchCache()


def cached_radius_search(profile, conditions, node, thickness=None, cache=None):
    """:func:`smallest_attached_radius`, remembered in ``cache`` (default :data:`SEARCH_CACHE`),
    started from the bracket found on the nearest outline in the cache
    (:meth:`SearchCache.nearest_bracket`)."""
    cache = SEARCH_CACHE if cache is None else cache
    key = SearchCache.key(profile, conditions, node, thickness)
    hit = cache.get(key)
    if hit is not None:
        return hit
    # the answer on the nearest outline searched before as the first bracket to try: the search
    # checks it, so it only saves solves
    start = cache.nearest_bracket(profile, conditions, node, thickness=thickness)
    result = smallest_attached_radius(profile, conditions, node, thickness=thickness, start=start)
    cache.put(key, result)
    return result


def nearby_radius_search(profile, conditions, node, thickness=None, within=0.0, cache=None):
    """A cached search of ``node`` on a nearby outline (see :meth:`SearchCache.nearby`), or None."""
    cache = SEARCH_CACHE if cache is None else cache
    return cache.nearby(profile, conditions, node, thickness=thickness, within=within)
