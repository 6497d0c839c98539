"""Panelling: panel end points on the built outline for the panel method.

The points are distributed in arc length by a panel density (panels per metre)

    w(s) = b * (1 + sum_e A_e exp(-d_e(s) / l)) + c * |kappa(s)|

where kappa is the outline curvature (so an arc of turning angle phi receives c * phi panels on
top of the base density b: c = 5.9 per radian gives about 9 panels per 90 degrees), d_e(s) is the
distance along the outline to sharp edge e and the exponential term clusters panels toward sharp
edges (panel size falls smoothly toward the edge, as is common practice for panel methods, no
source). Sharp edges split the outline into sections; each section receives a whole number of
panels in proportion to its share of the integral of w and its points are equally spaced in the
integral of w, so every sharp node is exactly a panel end point.

A :class:`Focus` refines one corner's neighbourhood: within ``reach`` of its arc (along the
outline, either side) the density is multiplied by ``panels / n`` (at least 1), fading to the
plain density over half that length beyond it, so that round that corner the points are spread as
they would be at ``panels`` panels while the rest of the outline keeps ``n``; the panelling then
has more than ``n`` panels. The smallest-attached-radius search uses it (see
:mod:`profilebench.assess.radius_search`).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from profilebench.errors import InputError
from profilebench.geometry.outline import build_outline, canonical_order, canonical_profile

__all__ = [
    "CornerSpan",
    "Focus",
    "Panelling",
    "panelize",
    "canonical_order",
    "MIN_PANELS",
    "MAX_PANELS",
]

MIN_PANELS = 20
MAX_PANELS = 5000
_PANELS_PER_RADIAN = 5.9  # ~9.3 per 90 degrees, leaving room for rounding above the 8 asked for
_CURVATURE_SHARE = 0.6  # at most this share of the panels goes to curvature refinement
_EDGE_CLUSTER = 4.0  # panel density at a sharp edge is (1 + this) times the base density
_EDGE_LENGTH = 0.03  # decay length of the edge clustering, as a fraction of the perimeter
_EDGE_FULL_ANGLE = math.radians(30.0)  # an edge turning this much or more is fully clustered
# Panels also cluster round each fillet (density (1 + _ARC_CLUSTER) times the base at the arc,
# decaying over the edge length away from it: the faces next to a corner carry its suction peak
# and the log-singular slope at its tangent points) and on the steep parts of the outline
# (density (1 + _STEEP |n_x|) times the base, n the unit normal: where the pressure acts along
# the free stream and the drag is the small difference of large forward and backward forces).
# With neither, the samples' Cd moved by up to 4.6 % from 250 to 1000 panels; with these values
# by at most 1.6 % (measured on the four samples; calibrated choices of this project, no source).
_ARC_CLUSTER = 6.0
_STEEP = 3.0
_STEEP_SAMPLES = 2000  # as profilebench.geometry.validity samples the outline
_GRID = 2048
_REFERENCE_PANELS = 250  # the usual count; at or below it an arc gets c = _PANELS_PER_RADIAN


@dataclass(frozen=True)
class CornerSpan:
    """Where a corner node lies in a panelling.

    ``radius`` (m; 0 for a sharp edge), ``turning_angle_deg`` the magnitude of the tangent's turn
    (degrees), ``convex`` True for an outer corner (the outline turns away from the body interior,
    where flow may separate), ``s_start``/``s_end`` arc length of the fillet's tangent points (m,
    equal for a sharp edge), ``point_start``/``point_end`` the first and last panel point on the
    fillet (the edge's point for a sharp edge), ``centre`` the fillet centre (m; None when sharp).
    """

    node: int
    radius: float
    turning_angle_deg: float
    convex: bool
    s_start: float
    s_end: float
    point_start: int
    point_end: int
    centre: tuple[float, float] | None


@dataclass(frozen=True)
class Focus:
    """One corner's neighbourhood panelled as at ``panels`` panels (see the module notes):
    ``node`` (a node of the profile; a node without an arc, sharp or smooth, is left as it is),
    ``reach`` (m, > 0) either side of its arc."""

    node: int
    reach: float
    panels: int


@dataclass(frozen=True, eq=False)
class Panelling:
    """Panel end points of a closed outline.

    ``points`` (N, 2) in m, first not repeated, in the order of the nodes; panel j runs from
    points[j] to points[(j + 1) % N]. ``s`` (N,) arc length of each point from the outline's
    start (m): node 0, or the start of node 0's fillet (points[0] is its first point on the arc).
    ``node_point`` the point index of each profile node (its own point for sharp nodes, the point
    nearest the fillet middle for rounded ones, the nearest point for smooth ones). ``corners``
    a CornerSpan for every corner (non-smooth) node, in node order. ``length`` the perimeter (m).
    ``canonical`` each point's index in the canonical order (counter-clockwise from the
    canonical start node, see :func:`canonical_order`): the points are the same whatever node the
    outline starts at and whichever way round it is given, only their order follows the nodes.
    """

    points: np.ndarray
    s: np.ndarray
    node_point: tuple[int, ...]
    corners: tuple[CornerSpan, ...]
    n_panels: int
    length: float
    canonical: np.ndarray | None = None  # (N,) each point's index in the canonical order


def _check_count(n_panels):
    if isinstance(n_panels, bool) or not isinstance(n_panels, (int, np.integer)):
        raise InputError(
            f"n_panels must be a whole number between {MIN_PANELS} and {MAX_PANELS}, got "
            f"{n_panels!r}"
        )
    if not MIN_PANELS <= n_panels <= MAX_PANELS:
        raise InputError(
            f"n_panels = {n_panels} is outside {MIN_PANELS} to {MAX_PANELS}; choose a panel count "
            "in that range (about 250 is usual)"
        )
    return int(n_panels)


def panelize(profile, n_panels: int = 250, focus: Focus | None = None) -> Panelling:
    """Panel end points on the built outline of ``profile`` (see module notes for the spacing).

    Parameters
    ----------
    profile : Profile
    n_panels : int
        Number of panels (= number of points), 20 to 5000.
    focus : Focus or None
        One corner's neighbourhood refined (module notes); the panelling then has more than
        ``n_panels`` panels where ``focus.panels`` > ``n_panels``.

    Raises
    ------
    InputError
        Bad panel count, fewer panels than the sharp edges need, or a focus that would take more
        than the most panels.
    GeometryError
        From building the outline (see :func:`build_outline`).
    """
    n = _check_count(n_panels)
    if focus is not None and (focus.panels <= n or focus.reach <= 0.0):
        focus = None  # nothing to refine
    key = ("panelling", n, focus)
    cached = profile._cache.get(key)
    if cached is not None:
        return cached
    out = _panelize(profile, n, focus)
    profile._cache[key] = out
    return out


def _panelize(profile, n: int, focus: Focus | None = None) -> Panelling:
    """Panel the outline in its canonical order, then give the points in the profile's own order.

    The panel points depend on where the outline starts and which way round it runs (sections
    start at node 0, whole panels are shared out section by section), and with them every
    result: the same outline given from another node or clockwise moved the samples' Cd by up
    to 6 %. Panelling the canonical order makes the points the same set for every way of giving
    the outline.
    """
    canon, order, rev = canonical_profile(profile)
    m = len(order)
    if canon is profile:
        out = _panelize_nodes(profile, n, focus)
        return _with_canonical(out, np.arange(len(out.points)))
    user_of_canon_node = order  # canonical node k is profile node order[k]
    canon_of_user_node = {u: k for k, u in enumerate(order)}
    if focus is not None:
        focus = Focus(canon_of_user_node[focus.node], focus.reach, focus.panels)
    pc = _panelize_nodes(canon, n, focus)
    npts = len(pc.points)
    S = pc.length
    # the profile's own point 0 is where its outline starts: at node 0, or at the start (in the
    # profile's direction) of node 0's fillet
    c0 = canon_of_user_node[0]
    span0 = next((sp for sp in pc.corners if sp.node == c0), None)
    if span0 is None:
        p0 = int(pc.node_point[c0])
        s0 = float(pc.s[p0])
    else:
        p0 = int(span0.point_end if rev else span0.point_start)
        s0 = float(span0.s_end if rev else span0.s_start)  # the fillet's tangent point
    k = np.arange(npts)
    src = (p0 - k) % npts if rev else (p0 + k) % npts  # user point k is canonical point src[k]
    pos = np.empty(npts, dtype=int)
    pos[src] = k  # canonical point j is user point pos[j]
    pts = np.array(pc.points[src])
    s = np.mod((s0 - pc.s[src]) if rev else (pc.s[src] - s0), S)
    s[s > S * (1.0 - 1e-9)] = 0.0

    def s_user(v):
        out = float(np.mod((s0 - v) if rev else (v - s0), S))
        return 0.0 if out > S * (1.0 - 1e-9) else out

    node_point = tuple(int(pos[pc.node_point[canon_of_user_node[i]]]) for i in range(m))
    spans = []
    for sp in pc.corners:
        a_pt, b_pt = int(pos[sp.point_start]), int(pos[sp.point_end])
        a_s, b_s = s_user(sp.s_start), s_user(sp.s_end)
        if rev:
            a_pt, b_pt, a_s, b_s = b_pt, a_pt, b_s, a_s
        spans.append(
            CornerSpan(
                user_of_canon_node[sp.node],
                sp.radius,
                sp.turning_angle_deg,
                sp.convex,
                a_s,
                b_s,
                a_pt,
                b_pt,
                sp.centre,
            )
        )
    spans.sort(key=lambda sp: sp.node)
    pts.setflags(write=False)
    s.setflags(write=False)
    return _with_canonical(Panelling(pts, s, node_point, tuple(spans), npts, S), src)


def _with_canonical(pan, canonical):
    canonical = np.asarray(canonical, dtype=int)
    canonical.setflags(write=False)
    return Panelling(
        pan.points, pan.s, pan.node_point, pan.corners, pan.n_panels, pan.length, canonical
    )


def _focused(W, grid, outline, n, focus):
    """The cumulative density ``W`` (on ``grid``, ``n`` panels) with ``focus``'s neighbourhood
    refined (module notes); returns (W, panel count)."""
    arc = next((a for a in outline.arcs if a.node == focus.node), None)
    if arc is None:  # a sharp (or smooth) node: its own edge clustering is what it gets
        return W, n
    S = outline.length
    lo, width = float(arc.s_start) - focus.reach, float(arc.s_end - arc.s_start) + 2 * focus.reach
    mid = 0.5 * (grid[1:] + grid[:-1])
    # distance round the closed outline to the zone [lo, lo + width] (which may wrap past s = 0)
    ahead = np.mod(mid - lo, S)
    d = np.where(ahead <= width, 0.0, np.minimum(ahead - width, S - ahead))
    gain = focus.panels / n - 1.0
    dW = np.diff(W) * (1.0 + gain * np.exp(-d / (0.5 * focus.reach)))
    W = np.concatenate([[0.0], np.cumsum(dW)])
    count = int(round(W[-1]))
    if count > MAX_PANELS:
        raise InputError(
            f"refining node {focus.node}'s neighbourhood takes {count} panels, more than "
            f"{MAX_PANELS}; use fewer panels"
        )
    return W * (count / W[-1]), count


def _panelize_nodes(profile, n: int, focus: Focus | None = None) -> Panelling:
    o = build_outline(profile)
    S = o.length
    edges = o.sharp_edges
    s_edges = np.array([e.s for e in edges])
    bounds = np.unique(np.concatenate([[0.0], s_edges]))
    if bounds.size > n:
        raise InputError(
            f"{n} panels cannot put a panel end on each of the {bounds.size} sharp nodes; it "
            f"takes at least {bounds.size} panels"
        )
    ell = _EDGE_LENGTH * S
    # grid for the cumulative density: uniform, piece ends, section bounds, dense near edges
    near = ell * np.geomspace(1e-4, 8.0, 48)
    parts = [np.linspace(0.0, S, _GRID + 1), o.piece_s0, bounds]
    if s_edges.size:
        parts.append((s_edges[:, None] + np.concatenate([-near, near])[None, :]).ravel() % S)
    grid = np.unique(np.concatenate(parts))
    grid = grid[grid <= S]
    # clustering term
    clus = np.zeros_like(grid)
    for e in edges:
        amp = _EDGE_CLUSTER * min(1.0, abs(e.turning_angle) / _EDGE_FULL_ANGLE)
        d = np.abs(grid - e.s)
        d = np.minimum(d, S - d)
        clus += amp * np.exp(-d / ell)
    for arc in o.arcs:
        amp = _ARC_CLUSTER * min(1.0, abs(arc.turning_angle) / _EDGE_FULL_ANGLE)
        lo, hi = float(arc.s_start), float(arc.s_end)
        d = np.where(grid < lo, lo - grid, np.where(grid > hi, grid - hi, 0.0))
        d = np.minimum(d, S - d)
        clus += amp * np.exp(-d / ell)
    # |n_x| = |dy/ds| on the outline's uniform sample (the one the validity check takes too)
    xy = o.sample(_STEEP_SAMPLES)
    s_st = np.linspace(0.0, S, _STEEP_SAMPLES, endpoint=False)
    dxy = np.roll(xy, -1, axis=0) - np.roll(xy, 1, axis=0)
    steep = np.abs(dxy[:, 1]) / np.maximum(np.hypot(dxy[:, 0], dxy[:, 1]), 1e-300)
    clus += _STEEP * np.interp(grid, s_st, steep, period=S)
    base = grid + np.concatenate([[0.0], np.cumsum(0.5 * (clus[1:] + clus[:-1]) * np.diff(grid))])
    turn = o.cumulative_turn(grid)
    turn -= turn[0]
    # the curvature term grows with the panel count like the base density, so that refining
    # refines the arcs too (at a fixed c the arcs kept their panels as the count grew, and the
    # suction peaks on them converged slowly)
    c = _PANELS_PER_RADIAN * max(1.0, n / _REFERENCE_PANELS)
    if turn[-1] > 0 and c * turn[-1] > _CURVATURE_SHARE * n:
        c = _CURVATURE_SHARE * n / turn[-1]
    b = (n - c * turn[-1]) / base[-1]
    W = b * base + c * turn
    if focus is not None:
        W, n = _focused(W, grid, o, n, focus)
    # whole panels per section (largest remainder, at least one each)
    wb = np.interp(np.append(bounds, S), grid, W)
    share = np.diff(wb)
    counts = np.maximum(1, np.floor(share).astype(int))
    while counts.sum() > n:
        counts[np.argmax(counts)] -= 1
    rem = share - counts
    for j in np.argsort(-rem)[: n - counts.sum()]:
        counts[j] += 1
    targets = np.concatenate(
        [wb[j] + share[j] * np.arange(counts[j]) / counts[j] for j in range(bounds.size)]
    )
    s = np.interp(targets, W, grid)
    first = np.concatenate([[0], np.cumsum(counts)[:-1]])
    s[first] = bounds  # exactly on the section starts
    pts = o.points_at(s)
    nodes = profile.nodes
    edge_point = {}
    for e in edges:
        j = int(np.searchsorted(bounds, e.s))
        k = int(first[min(j, bounds.size - 1)])
        edge_point[e.node] = k
        pts[k] = (nodes[e.node].x, nodes[e.node].y)
    if not nodes[0].smooth and nodes[0].radius == 0.0:
        pts[0] = (nodes[0].x, nodes[0].y)

    def nearest(sv):
        d = np.abs(s - sv)
        d = np.minimum(d, S - d)
        return int(np.argmin(d))

    node_point = tuple(
        edge_point[i] if i in edge_point else nearest(o.node_s[i]) for i in range(len(nodes))
    )
    spans = []
    for e in edges:
        k = edge_point[e.node]
        spans.append(
            CornerSpan(
                e.node,
                nodes[e.node].radius,
                math.degrees(abs(e.turning_angle)),
                e.convex,
                e.s,
                e.s,
                k,
                k,
                None,
            )
        )
    tol = 1e-9 * S
    for a in o.arcs:
        inside = np.flatnonzero((s >= a.s_start - tol) & (s <= a.s_end + tol))
        if inside.size:
            p0, p1 = int(inside[0]), int(inside[-1])
        else:
            p0 = p1 = nearest(0.5 * (a.s_start + a.s_end))
        if a.s_end >= S - tol:
            p1 = 0
        spans.append(
            CornerSpan(
                a.node,
                a.radius,
                math.degrees(abs(a.turning_angle)),
                a.convex,
                a.s_start,
                a.s_end,
                p0,
                p1,
                a.centre,
            )
        )
    spans.sort(key=lambda sp: sp.node)
    pts.setflags(write=False)
    s.setflags(write=False)
    return Panelling(pts, s, node_point, tuple(spans), n, S)
