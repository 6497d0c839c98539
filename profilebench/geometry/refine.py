"""Refining a fitted profile on its built outline.

A first fit puts its nodes on the points (smooth nodes at the reduced outline's vertices,
corners where the straight runs' lines meet). A spline through such nodes need not follow the
points between them: it runs from corner node to corner node, and a filleted corner node is
the point where the tangent lines meet, off the outline. :func:`refine_profile` therefore
moves every node (and sizes every fillet) to minimise the points' distances to the *built*
outline (scipy ``least_squares``, trust-region reflective, with a sparse finite-difference
Jacobian: a node moves only the outline near it), and where the outline still strays more
than the tolerance inserts a smooth node at the point it misses most and refits, up to a
bound on the nodes added.

The distances are those of the points to a dense polyline sampled on the built outline
(nearest sample from a k-d tree, then the two polyline edges beside it), signed by the side.
"""

from __future__ import annotations

import math

import numpy as np
from scipy.optimize import least_squares
from scipy.sparse import lil_matrix
from scipy.spatial import cKDTree

from profilebench.errors import GeometryError
from profilebench.geometry.profile import Node, Profile

__all__ = ["point_distances", "polyline_distances", "refine_profile"]

# A failed build (a radius that no longer fits, a fillet that turns back) counts every point as
# this far off (m), so the optimiser steps back from it.
_FAIL_DISTANCE = 1.0


def _outline_samples(profile, n):
    from profilebench.geometry.outline import build_outline

    o = build_outline(profile)
    return o, o.sample(n)


def polyline_distances(samples, pts):
    """Signed distances (m) of ``pts`` to the closed polyline ``samples`` (left positive)."""
    n = len(samples)
    _, i = cKDTree(samples).query(pts)
    best = np.full(len(pts), np.inf)
    signed = np.zeros(len(pts))
    for j in (i - 1, i):
        a = samples[j % n]
        ab = samples[(j + 1) % n] - a
        ap = pts - a
        t = np.clip(np.sum(ap * ab, axis=1) / np.maximum(np.sum(ab * ab, axis=1), 1e-300), 0, 1)
        d = ap - t[:, None] * ab
        dist = np.hypot(d[:, 0], d[:, 1])
        side = np.sign(ab[:, 0] * ap[:, 1] - ab[:, 1] * ap[:, 0])
        better = dist < best
        best[better] = dist[better]
        signed[better] = (side * dist)[better]
    return signed


def point_distances(profile, pts, n_samples=None):
    """Signed distances (m) of the points ``pts`` (N, 2) to the profile's built outline."""
    pts = np.asarray(pts, float)
    n = n_samples or max(2000, 2 * len(pts))
    return polyline_distances(_outline_samples(profile, n)[1], pts)


def _point_segments(profile, pts, n):
    """For each point, the corner-to-corner segment (index of its starting corner among the
    corner nodes) it lies on; None when every node is smooth."""
    corners = [i for i, nd in enumerate(profile.nodes) if not nd.smooth]
    if not corners:
        return None, corners
    o, samples = _outline_samples(profile, n)
    _, k = cKDTree(samples).query(pts)
    s = k * (o.length / n)
    cs = np.array([o.node_s[c] for c in corners])
    order = np.argsort(cs)
    seg = np.searchsorted(cs[order], s, side="right") - 1
    return order[seg % len(corners)], corners


def _sparsity(profile, pts, n, layout):
    """Which residuals (points) each parameter can move: a node moves its own segment, the
    segments either side (their fillets' tangent points shift) and, for a corner, one more."""
    seg, corners = _point_segments(profile, pts, n)
    npar = layout[-1][1] if layout else 0
    if seg is None:
        return None
    m = len(corners)
    nodes = profile.nodes
    # the segment each node sits in: corner k starts segment k (and ends segment k - 1)
    node_seg, k = {}, -1
    first = corners[0]
    for q in range(len(nodes)):
        i = (first + q) % len(nodes)
        if not nodes[i].smooth:
            k += 1
        node_seg[i] = k
    sp = lil_matrix((len(pts), npar), dtype=int)
    for i, (start, stop) in enumerate(layout):
        k = node_seg[i]
        reach = range(k - 2, k + 2) if not nodes[i].smooth else range(k - 1, k + 2)
        rows = np.flatnonzero(np.isin(seg, [r % m for r in reach]))
        for col in range(start, stop):
            sp[rows, col] = 1
    return sp


def _pack(profile):
    x, layout, lo, hi = [], [], [], []
    for nd in profile.nodes:
        start = len(x)
        x += [nd.x, nd.y]
        lo += [-np.inf, -np.inf]
        hi += [np.inf, np.inf]
        if nd.radius > 0:
            x.append(nd.radius)
            lo.append(0.05 * nd.radius)
            hi.append(20.0 * nd.radius)
        layout.append((start, len(x)))
    return np.array(x), layout, (np.array(lo), np.array(hi))


def _unpack(profile, x, layout):
    nodes = []
    for nd, (start, stop) in zip(profile.nodes, layout):
        r = float(x[start + 2]) if stop - start == 3 else 0.0
        nodes.append(Node(float(x[start]), float(x[start + 1]), r, nd.smooth, nd.label))
    return Profile(tuple(nodes), name=profile.name, trailing_edge=profile.trailing_edge)


def _least_squares_fit(profile, pts, n):
    x0, layout, bounds = _pack(profile)
    x0 = np.clip(x0, bounds[0], bounds[1])

    def resid(x):
        try:
            return point_distances(_unpack(profile, x, layout), pts, n)
        except GeometryError:
            return np.full(len(pts), _FAIL_DISTANCE)

    sparsity = _sparsity(profile, pts, n, layout)
    sol = least_squares(
        resid,
        x0,
        bounds=bounds,
        jac_sparsity=sparsity,
        method="trf",
        x_scale=1.0,
        max_nfev=15,
        diff_step=1e-7,
        ftol=1e-5,
        xtol=1e-7,
    )
    return _unpack(profile, sol.x, layout)


def _insert_smooth_node(profile, pts, d, tolerance):
    """The profile with a smooth node at the point the outline misses most, placed between the
    nodes it falls between along the outline; None when that point is a corner's."""
    from profilebench.geometry.outline import build_outline

    k = int(np.argmax(np.abs(d)))
    if abs(d[k]) <= tolerance:
        return None
    o = build_outline(profile)
    n = max(2000, 2 * len(pts))
    samples = o.sample(n)
    _, j = cKDTree(samples).query(pts[k])
    s = j * (o.length / n)
    node_s = np.array(o.node_s)
    order = np.argsort(node_s)
    pos = int(np.searchsorted(node_s[order], s, side="right"))
    before = int(order[(pos - 1) % len(order)])
    return profile.inserted(before + 1, Node(float(pts[k, 0]), float(pts[k, 1]), smooth=True))


def refine_profile(profile, pts, tolerance, max_added=4, give_up_above=None):
    """(profile, largest distance (m)): ``profile`` with its nodes and fillet radii fitted to
    the points ``pts`` (N, 2) on the built outline, smooth nodes added (at most ``max_added``)
    where it strays more than ``tolerance`` (m) from them. Corner nodes stay corners, smooth
    nodes stay smooth. The distance is measured on a dense polyline of the outline; the caller
    checks the result (validity, the exact deviation) as it checks any candidate. With
    ``give_up_above`` (m), a first fit that still strays farther than that is returned at once
    (adding nodes one by one would rarely bring it within the tolerance)."""
    pts = np.asarray(pts, float)
    n = max(2000, 2 * len(pts))
    best, best_dev = profile, math.inf
    current = profile
    for _ in range(max_added + 1):
        try:
            current = _least_squares_fit(current, pts, n)
            d = point_distances(current, pts, n)
        except GeometryError:
            break
        dev = float(np.max(np.abs(d)))
        first = best_dev == math.inf
        if dev < best_dev:
            best, best_dev = current, dev
        if dev <= tolerance or (first and give_up_above is not None and dev > give_up_above):
            break
        nxt = _insert_smooth_node(current, pts, d, tolerance)
        if nxt is None:
            break
        current = nxt
    return best, best_dev
