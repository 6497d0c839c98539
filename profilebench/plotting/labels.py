"""Placement of corner labels on an annotated profile: outside the outline, off the hatching.

The free space of the axes is rasterised in display pixels (a cell of :data:`CELL_PX`): the
outline (filled, grown by a clearance), every hatched patch (ground band, separated flow, the
change from a baseline), the flow-event markers and the labels already placed are obstacles. A
label goes where its box touches no obstacle; among those places the shortest leader line wins,
with a penalty for a box over the front :data:`FRONT_FRACTION` of the outline (the front end a
design review looks at) and for a leader that crosses another leader. Boxes are tested with
summed-area tables, so every candidate position of a label costs O(1). The most constrained
label (fewest free places) is placed first. A leader line joins each box to its corner; it may
not pass through the outline, the ground band or another label.

When a label finds no free place, :func:`place_labels` reports it, and the caller gives the
axes more room and tries again (see :func:`profilebench.plotting.profile_view.draw_profile`).
"""

from __future__ import annotations

import numpy as np
from matplotlib.path import Path as MplPath

__all__ = [
    "place_labels",
    "place_boxes",
    "LabelSpec",
    "CELL_PX",
    "FRONT_FRACTION",
    "LABEL_GID",
    "LEADER_GID",
]

#: raster cell size in display pixels
CELL_PX = 2.0
#: the front part of the outline (fraction of its length) that labels keep off where they can
FRONT_FRACTION = 0.30
#: clearance (px) kept between a label box and any obstacle or other label
CLEARANCE_PX = 4.0
#: gid of the label texts and leader lines, so that tests and tools can find them on a figure
LABEL_GID = "corner-label"
LEADER_GID = "corner-leader"


class LabelSpec:
    """One label to place: its anchor (data coordinates), text artist and leader colour."""

    def __init__(self, anchor, text, colour):
        self.anchor = anchor
        self.text = text
        self.colour = colour


def _box_px(text, renderer):
    """Width and height (px) of a text's bbox patch (the text extent plus its pad)."""
    bb = text.get_window_extent(renderer)
    patch = text.get_bbox_patch()
    pad = 0.0
    if patch is not None:
        pad = patch.get_boxstyle().pad * text.get_fontsize() * renderer.points_to_pixels(1.0)
    return bb.width + 2 * pad, bb.height + 2 * pad


_PATH_TEST_CELLS = 4000  # cells per point-in-path call (see _Raster.fill_path)


class _Raster:
    """Boolean layers over the axes box in display pixels, with summed-area tables."""

    def __init__(self, frame):
        self.x0, self.y0 = frame[0], frame[1]
        self.nx = max(int(np.ceil((frame[2] - frame[0]) / CELL_PX)), 1)
        self.ny = max(int(np.ceil((frame[3] - frame[1]) / CELL_PX)), 1)
        cx = self.x0 + (np.arange(self.nx) + 0.5) * CELL_PX
        cy = self.y0 + (np.arange(self.ny) + 0.5) * CELL_PX
        gx, gy = np.meshgrid(cx, cy)
        self.centres = np.column_stack([gx.ravel(), gy.ravel()])

    def empty(self):
        return np.zeros((self.ny, self.nx), dtype=bool)

    def fill_path(self, mask, path_px):
        """Mark the cells whose centres lie inside ``path_px``: only the cells within the path's
        extent are tested, a few thousand at a time. (matplotlib's point-in-path test holds the
        interpreter lock for a whole call: over every cell of the canvas at once it took tens of
        milliseconds, during which the editor's GUI thread, beside the overlay thread that lays
        out the labels, could not run.)"""
        ext = path_px.get_extents()
        i0, i1 = self._range(ext.y0, ext.y1, self.y0, self.ny)
        j0, j1 = self._range(ext.x0, ext.x1, self.x0, self.nx)
        if i1 <= i0 or j1 <= j0:
            return mask
        rows = max(1, _PATH_TEST_CELLS // (j1 - j0))
        for a in range(i0, i1, rows):
            b = min(a + rows, i1)
            sub = self.centres.reshape(self.ny, self.nx, 2)[a:b, j0:j1].reshape(-1, 2)
            mask[a:b, j0:j1] |= path_px.contains_points(sub).reshape(b - a, j1 - j0)
        return mask

    def fill_box(self, mask, x0, y0, x1, y1):
        i0, i1 = self._range(y0, y1, self.y0, self.ny)
        j0, j1 = self._range(x0, x1, self.x0, self.nx)
        if i1 > i0 and j1 > j0:
            mask[i0:i1, j0:j1] = True
        return mask

    def fill_polyline(self, mask, pts_px, width_px):
        """Mark the cells within width_px/2 of a polyline (sampled every half cell)."""
        pts = np.asarray(pts_px, float)
        seg = np.diff(pts, axis=0)
        length = np.hypot(seg[:, 0], seg[:, 1])
        samples = [pts[:1]]
        for p, d, n in zip(pts[:-1], seg, np.ceil(length / (0.5 * CELL_PX)).astype(int)):
            t = np.linspace(0.0, 1.0, max(n, 1) + 1)[1:, None]
            samples.append(p + t * d)
        s = np.vstack(samples)
        r = 0.5 * width_px
        for dx in np.arange(-r, r + 1e-9, CELL_PX):
            for dy in np.arange(-r, r + 1e-9, CELL_PX):
                if dx * dx + dy * dy > r * r + 1e-9:
                    continue
                j = np.floor((s[:, 0] + dx - self.x0) / CELL_PX).astype(int)
                i = np.floor((s[:, 1] + dy - self.y0) / CELL_PX).astype(int)
                ok = (i >= 0) & (i < self.ny) & (j >= 0) & (j < self.nx)
                mask[i[ok], j[ok]] = True
        return mask

    @staticmethod
    def _range(a, b, origin, n):
        lo = int(np.floor((a - origin) / CELL_PX))
        hi = int(np.ceil((b - origin) / CELL_PX))
        return max(lo, 0), min(hi, n)

    @staticmethod
    def table(mask):
        sat = np.zeros((mask.shape[0] + 1, mask.shape[1] + 1), dtype=np.int32)
        sat[1:, 1:] = np.cumsum(np.cumsum(mask, axis=0, dtype=np.int32), axis=1)
        return sat

    @staticmethod
    def box_sums(sat, i0, j0, hi, wj):
        """Sums of the mask over boxes of hi x wj cells with lower-left cells (i0, j0)."""
        return sat[i0 + hi, j0 + wj] - sat[i0, j0 + wj] - sat[i0 + hi, j0] + sat[i0, j0]

    def cells(self, pts_px):
        pts = np.asarray(pts_px, float)
        j = np.floor((pts[:, 0] - self.x0) / CELL_PX).astype(int)
        i = np.floor((pts[:, 1] - self.y0) / CELL_PX).astype(int)
        ok = (i >= 0) & (i < self.ny) & (j >= 0) & (j < self.nx)
        return i, j, ok


def _segments_cross(p, q, segs):
    """True where segment p-q properly crosses each of the segments (n, 2, 2)."""
    if not len(segs):
        return np.zeros(0, dtype=bool)
    a, b = segs[:, 0], segs[:, 1]

    def orient(u, v, w):
        return (v[..., 0] - u[..., 0]) * (w[..., 1] - u[..., 1]) - (v[..., 1] - u[..., 1]) * (
            w[..., 0] - u[..., 0]
        )

    p = np.broadcast_to(p, a.shape)
    q = np.broadcast_to(q, a.shape)
    return (orient(p, q, a) * orient(p, q, b) < 0) & (orient(a, b, p) * orient(a, b, q) < 0)


def place_labels(
    ax,
    specs,
    *,
    outline_xy,
    obstacles=(),
    markers_xy=(),
    marker_px=7.0,
    front_box=None,
    renderer=None,
):
    """Move each label of ``specs`` to a free place and draw its leader line.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
        The axes, with its final limits and aspect.
    specs : sequence of LabelSpec
    outline_xy : (n, 2) array
        The closed outline in data coordinates (first point not repeated).
    obstacles : sequence of matplotlib patches
        Hatched areas (ground band, separated flow, baseline change) that labels keep off.
    markers_xy : (m, 2) array
        Flow-event marker positions (data), kept clear by ``marker_px``.
    front_box : (x0, y0, x1, y1) in data coordinates, optional
        The front end: a label box over it costs as much as 600 px more leader.

    Returns
    -------
    (int, int)
        The numbers of labels that found no free place (placed where they overlap least) and
        of labels that found one only with a leader crossing the body, the ground or a label.
    """
    if not specs:
        return 0, 0
    fig = ax.figure
    if renderer is None:
        renderer = fig.canvas.get_renderer()
    ax.apply_aspect()
    bb = ax.get_window_extent(renderer)
    to_px = ax.transData.transform
    hatched, ground = [], []
    for patch in obstacles:
        path = patch.get_path().transformed(patch.get_transform())
        polys = [poly for poly in path.to_polygons() if len(poly) >= 3]
        (ground if patch.get_gid() == "ground-band" else hatched).extend(polys)
    markers = to_px(np.asarray(markers_xy, float).reshape(-1, 2)) if len(markers_xy) else ()
    front = None
    if front_box is not None:
        (fx0, fy0), (fx1, fy1) = to_px([front_box[:2], front_box[2:]])
        front = (fx0, fy0, fx1, fy1)
    anchors = to_px(np.array([s.anchor for s in specs], float).reshape(-1, 2))
    placed, crowded, crossing = place_boxes(
        (bb.x0, bb.y0, bb.x1, bb.y1),
        [_box_px(s.text, renderer) for s in specs],
        anchors,
        outline_px=to_px(np.asarray(outline_xy, float)),
        hatched_px=hatched,
        ground_px=ground,
        markers_px=markers,
        marker_px=marker_px,
        front_px=front,
    )
    inverse = ax.transData.inverted()
    for spec, a, (box, end) in zip(specs, anchors, placed):
        centre = ((box[0] + box[2]) / 2.0, (box[1] + box[3]) / 2.0)
        spec.text.set_position(tuple(inverse.transform(centre)))
        if np.hypot(*(end - a)) > 1.0:
            data = inverse.transform(np.array([a, end]))
            ax.plot(data[:, 0], data[:, 1], color=spec.colour, lw=0.8, zorder=7, gid=LEADER_GID)
    return crowded, crossing


def place_boxes(
    frame,
    sizes,
    anchors,
    *,
    outline_px,
    hatched_px=(),
    ground_px=(),
    markers_px=(),
    marker_px=7.0,
    front_px=None,
    front_cost=600.0,
):
    """Free places for label boxes in display pixels (no drawing library needed).

    Parameters
    ----------
    frame : (x0, y0, x1, y1)
        The drawing area (px); either direction of y works.
    sizes : sequence of (width, height)
        Each box's size (px).
    anchors : (n, 2) array
        The corner each box belongs to (px).
    outline_px : (m, 2) array
        The closed outline (px, first point not repeated).
    hatched_px, ground_px : sequences of (k, 2) polygons
        Hatched areas boxes keep off; leaders may cross ``hatched_px`` but not ``ground_px``.
    markers_px : (j, 2) array
        Markers kept clear by ``marker_px``.
    front_px : (x0, y0, x1, y1), optional
        The front end: a box over it costs as much as ``front_cost`` px more leader.

    Returns
    -------
    placed : list of ((x0, y0, x1, y1), end)
        Each box and its leader's end on the box (px), in the order of ``sizes``.
    crowded, crossing : int
        Boxes that found no free place, and boxes whose leader crosses the body, the ground or
        another box.
    """
    ras = _Raster(frame)
    outline_px = np.asarray(outline_px, float)
    interior = ras.fill_path(
        ras.empty(), MplPath(np.vstack([outline_px, outline_px[:1]]), closed=True)
    )
    hard = interior.copy()
    # the outline's line and its Cp band (5 px wide) plus the clearance
    ras.fill_polyline(hard, np.vstack([outline_px, outline_px[:1]]), 6.0 + 2 * CLEARANCE_PX)
    ground = ras.empty()
    for polys, mask in ((hatched_px, hard), (ground_px, ground)):
        for poly in polys:
            poly = np.asarray(poly, float)
            # closed=True takes the last vertex as the closing one: repeat the first
            ras.fill_path(mask, MplPath(np.vstack([poly, poly[:1]]), closed=True))
    hard |= ground
    for m in np.asarray(markers_px, float).reshape(-1, 2):
        ras.fill_box(hard, m[0] - marker_px, m[1] - marker_px, m[0] + marker_px, m[1] + marker_px)
    # leaders may cross hatching but not the body, the ground band or another label
    leader_block = interior | ground
    hard_sat = ras.table(hard)
    front = ras.empty()
    if front_px is not None:
        fx0, fy0, fx1, fy1 = front_px
        ras.fill_box(front, min(fx0, fx1), min(fy0, fy1), max(fx0, fx1), max(fy0, fy1))
    front_sat = ras.table(front)
    labels = ras.empty()  # boxes placed (with their clearance)
    leader_cells = ras.empty()
    leaders = []  # (2, 2) segments already drawn
    sizes = [tuple(map(float, sz)) for sz in sizes]
    anchors = np.asarray(anchors, float).reshape(-1, 2)
    gap = int(np.ceil(CLEARANCE_PX / CELL_PX))

    def candidates(k, labels_sat):
        w, h = sizes[k]
        wj = int(np.ceil(w / CELL_PX)) + 2 * gap
        hi = int(np.ceil(h / CELL_PX)) + 2 * gap
        if wj >= ras.nx or hi >= ras.ny:
            return None
        i0, j0 = np.mgrid[0 : ras.ny - hi : 3, 0 : ras.nx - wj : 3]
        i0, j0 = i0.ravel(), j0.ravel()
        blocked = _Raster.box_sums(hard_sat, i0, j0, hi, wj) + _Raster.box_sums(
            labels_sat, i0, j0, hi, wj
        )
        in_front = _Raster.box_sums(front_sat, i0, j0, hi, wj) / float(hi * wj)
        # box (px) without the clearance ring
        bx0 = ras.x0 + (j0 + gap) * CELL_PX
        by0 = ras.y0 + (i0 + gap) * CELL_PX
        ax_, ay_ = anchors[k]
        px = np.clip(ax_, bx0, bx0 + w)
        py = np.clip(ay_, by0, by0 + h)
        leader = np.hypot(px - ax_, py - ay_)
        score = leader + front_cost * in_front
        return blocked, score, bx0, by0, px, py

    def leader_hits(k, ends):
        """For each end point (n, 2): how many samples of the leader from the corner fall on
        the body, the ground band or a label placed (outside the corner's own marker)."""
        a = anchors[k]
        d = ends - a
        length = np.hypot(d[:, 0], d[:, 1])
        # samples at most 4 px apart along the longest leader, at most 160 of them
        m = int(min(max(np.ceil(length.max(initial=1.0) / (2 * CELL_PX)), 2), 160))
        t = np.linspace(0.0, 1.0, m)[None, :]
        px_ = a[0] + t * d[:, :1]
        py_ = a[1] + t * d[:, 1:]
        near = np.hypot(px_ - a[0], py_ - a[1]) <= marker_px + 2.0
        i = np.floor((py_ - ras.y0) / CELL_PX).astype(int)
        j = np.floor((px_ - ras.x0) / CELL_PX).astype(int)
        ok = (i >= 0) & (i < ras.ny) & (j >= 0) & (j < ras.nx) & ~near
        i, j = np.where(ok, i, 0), np.where(ok, j, 0)
        hit = (leader_block[i, j] | labels[i, j]) & ok
        return hit.sum(axis=1)

    def feasible(k, res, first=20000):
        """Free places of label k whose leader is clear (among the ``first`` by score)."""
        blocked, score, bx0, by0, px, py = res
        free_idx = np.flatnonzero(blocked == 0)
        free_idx = free_idx[np.argsort(score[free_idx])][:first]
        if not len(free_idx):
            return free_idx
        return free_idx[leader_hits(k, np.column_stack([px[free_idx], py[free_idx]])) == 0]

    # the most constrained label first: fewest clear places on the empty axes
    first = ras.table(labels)
    counts = {}
    for k in range(len(sizes)):
        res = candidates(k, first)
        counts[k] = -1 if res is None else len(feasible(k, res))

    def run(order):
        """Place the boxes in ``order``; returns (placed, crowded, crossing, failed labels)."""
        labels[:] = False
        leader_cells[:] = False
        leaders.clear()
        placed = [None] * len(sizes)
        crowded = crossing = 0
        failed = []
        for k in order:
            labels_sat = ras.table(labels | leader_cells)
            res = candidates(k, labels_sat)
            w, h = sizes[k]
            choice = None
            if res is not None:
                blocked, score, bx0, by0, px, py = res
                segs = np.array(leaders).reshape(-1, 2, 2)
                good = feasible(k, res)
                if len(good):
                    cost = score[good].astype(float)
                    for seg in segs:
                        cost += 300.0 * _segments_cross(
                            seg[0],
                            seg[1],
                            np.stack(
                                [
                                    np.broadcast_to(anchors[k], (len(good), 2)),
                                    np.column_stack([px[good], py[good]]),
                                ],
                                axis=1,
                            ),
                        )
                    choice = (float(cost.min()), int(good[np.argmin(cost)]))
                else:
                    free_idx = np.flatnonzero(blocked == 0)
                    if len(free_idx):
                        # a free box whose leader crosses least
                        crossing += 1
                        failed.append(k)
                        free_idx = free_idx[np.argsort(score[free_idx])][:20000]
                        hits = leader_hits(k, np.column_stack([px[free_idx], py[free_idx]]))
                        c = int(free_idx[np.lexsort((score[free_idx], hits))[0]])
                    else:
                        crowded += 1
                        failed.append(k)
                        c = int(np.argmin(blocked * 1e6 + score))
                    choice = (np.inf, c)
                c = choice[1]
                box = (bx0[c], by0[c], bx0[c] + w, by0[c] + h)
                end = np.array([px[c], py[c]])
            else:
                crowded += 1
                failed.append(k)
                box = (anchors[k][0], anchors[k][1], anchors[k][0] + w, anchors[k][1] + h)
                end = anchors[k]
            placed[k] = (box, end)
            ras.fill_box(
                labels,
                box[0] - CLEARANCE_PX,
                box[1] - CLEARANCE_PX,
                box[2] + CLEARANCE_PX,
                box[3] + CLEARANCE_PX,
            )
            if np.hypot(*(end - anchors[k])) > 1.0:
                leaders.append([anchors[k], end])
                # later boxes keep off this leader (but not off the corner's marker end of it)
                d = float(np.hypot(*(end - anchors[k])))
                start = anchors[k] + min((marker_px + 2.0) / d, 1.0) * (end - anchors[k])
                ras.fill_polyline(leader_cells, [start, end], 2.0)
        return placed, crowded, crossing, failed

    # the most constrained first; labels that found no clean place go first next time
    order = sorted(counts, key=lambda kk: (counts[kk], kk))
    best = None
    for _attempt in range(3):
        result = run(order)
        if best is None or result[1] + result[2] < best[1] + best[2]:
            best = result
        if not result[3]:
            break
        order = result[3] + [k for k in order if k not in result[3]]
    return best[0], best[1], best[2]
