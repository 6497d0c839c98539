"""The annotated side profile: outline, ground, Cp band, flow events, separated flow, corners.

Everything draws onto a given matplotlib Axes, so the desktop editor and the review page share it.
"""

from __future__ import annotations

import numpy as np
from matplotlib.collections import LineCollection
from matplotlib.colors import TwoSlopeNorm
from matplotlib.patches import Patch, Polygon, Rectangle

from profilebench.assess.results import Verdict
from profilebench.errors import InputError
from profilebench.plotting.stations import is_analysis, outline_of
from profilebench.plotting.style import (
    BASELINE_COLOUR,
    BUBBLE_STYLE,
    CP_COLORMAP,
    EVENT_STYLES,
    OKABE_ITO,
    SEPARATED_COLOUR,
)

__all__ = ["draw_profile", "draw_events", "bubbles", "corner_label", "CP_FLOOR"]

#: Lowest Cp of the colour scale on the outline (display only; the data are not changed).
CP_FLOOR = -3.0


def _closed(x, y):
    return np.append(x, x[:1]), np.append(y, y[:1])


def _outward_normals(x, y):
    """Unit outward normals at the outline points (from the polygon's orientation)."""
    xc, yc = _closed(x, y)
    area2 = float(np.sum(xc[:-1] * yc[1:] - xc[1:] * yc[:-1]))
    tx = np.roll(x, -1) - np.roll(x, 1)
    ty = np.roll(y, -1) - np.roll(y, 1)
    norm = np.hypot(tx, ty)
    norm[norm == 0] = 1.0
    tx, ty = tx / norm, ty / norm
    # counter-clockwise (area > 0): outward is the tangent turned clockwise
    return (ty, -tx) if area2 > 0 else (-ty, tx)


def bubbles(events):
    """Pairs (laminar separation, reattachment) on the same surface: the laminar bubbles."""
    pairs = []
    for surface in ("upper", "lower"):
        evs = sorted((e for e in events if e.surface == surface), key=lambda e: e.s)
        for i, e in enumerate(evs):
            if e.kind != "laminar_separation":
                continue
            for f in evs[i + 1:]:
                if f.kind == "reattachment":
                    pairs.append((e, f))
                    break
                if f.kind in ("laminar_separation", "turbulent_separation", "edge_separation",
                              "bubble_separation"):
                    break
    return pairs


def draw_events(ax, events, *, y_of=None, x_of=None, zorder=6):
    """Draw flow-event markers; return {kind: handle} of the kinds drawn (for a legend).

    ``x_of(event)``/``y_of(event)`` map an event to plot coordinates (default: its x, y in m).
    """
    handles = {}
    for kind, st in EVENT_STYLES.items():
        evs = [e for e in events if e.kind == kind]
        if not evs:
            continue
        xs = [x_of(e) if x_of else e.x for e in evs]
        ys = [y_of(e) if y_of else e.y for e in evs]
        h = ax.plot(xs, ys, linestyle="none", marker=st.marker, markersize=st.size,
                    markerfacecolor=st.face, markeredgecolor=st.edge, markeredgewidth=1.0,
                    label=st.label, zorder=zorder)[0]
        handles[kind] = h
    return handles


def corner_label(corner) -> str:
    """Short label of a corner: its name, r/t and the solver's verdict with margin."""
    name = corner.label or f"node {corner.node}"
    verdict = getattr(corner.verdict, "value", str(corner.verdict))
    text = f"{name}\nr/t {corner.r_over_t:.3f}: {verdict}"
    if corner.verdict in (Verdict.ATTACHED, Verdict.BUBBLE_REATTACHES) and corner.margin is not None:
        text += f", {100 * corner.margin:.0f}% margin"
    return text


def _overlap_area(bb, others):
    total = 0.0
    for o in others:
        w = min(bb.x1, o.x1) - max(bb.x0, o.x0)
        h = min(bb.y1, o.y1) - max(bb.y0, o.y0)
        if w > 0 and h > 0:
            total += w * h
    return total


def _outside_area(bb, frame):
    w = max(0.0, min(bb.x1, frame.x1) - max(bb.x0, frame.x0))
    h = max(0.0, min(bb.y1, frame.y1) - max(bb.y0, frame.y0))
    return bb.width * bb.height - w * h


def _label_corners(ax, corners, x, y, scale, avoid=()):
    """Place one label per corner outside the outline, avoiding other labels and the outline.

    Candidate positions lie on rays from the corner, pointing away from the outline's centroid
    and turned by up to +-80 degrees, at growing distances. Each candidate is scored by its
    overlap (in display pixels^2) with labels already placed, with the outline, and with the
    area outside the axes; the first candidate with no overlap wins, else the least-overlapping.
    Without a renderer (a canvas that cannot measure text) the first candidate is used.
    """
    if not corners:
        return []
    cx, cy = float(np.mean(x)), float(np.mean(y))
    fig = ax.figure
    renderer = None
    if hasattr(fig.canvas, "get_renderer"):
        try:
            renderer = fig.canvas.get_renderer()
        except Exception:
            renderer = None
    if renderer is not None:
        ax.apply_aspect()  # the final axes box: text extents measured now stay valid
        frame = ax.get_window_extent(renderer)
        # the outline, densified so that short labels cannot slip between its points
        xc, yc = _closed(x, y)
        t = np.linspace(0.0, len(xc) - 1.0, 4 * len(xc))
        dense = np.column_stack([np.interp(t, np.arange(len(xc)), xc),
                                 np.interp(t, np.arange(len(yc)), yc)])
        if len(avoid):
            # event markers count heavily: a label must not hide a marker
            dense = np.vstack([dense] + [np.asarray(avoid, dtype=float)] * 20)
        dense = ax.transData.transform(dense)
    placed, texts = [], []
    for c in corners:
        d = np.array([c.x - cx, c.y - cy])
        d = d / (np.hypot(*d) or 1.0)
        if c.verdict.separated:
            colour = OKABE_ITO["vermillion"]
        elif c.verdict in (Verdict.ATTACHED, Verdict.BUBBLE_REATTACHES):
            colour = OKABE_ITO["bluish_green"]
        else:  # in the wake of an upstream separation, or concave
            colour = OKABE_ITO["black"]
        text = ax.annotate(
            corner_label(c), xy=(c.x, c.y), xytext=(c.x, c.y), textcoords="data",
            fontsize=7, ha="center", va="center", color=OKABE_ITO["black"],
            bbox=dict(boxstyle="round,pad=0.25", fc="white", ec=colour, lw=1.0, alpha=0.9),
            arrowprops=dict(arrowstyle="-", color=colour, lw=0.8), zorder=8,
        )
        best, best_score = None, np.inf
        for dist in (0.08, 0.13, 0.19, 0.26):
            for ang in (0.0, 20.0, -20.0, 40.0, -40.0, 60.0, -60.0, 80.0, -80.0):
                a = np.radians(ang)
                dd = (d[0] * np.cos(a) - d[1] * np.sin(a), d[0] * np.sin(a) + d[1] * np.cos(a))
                pos = (c.x + dist * scale * dd[0], c.y + dist * scale * dd[1])
                if renderer is None:
                    best = pos
                    break
                text.xyann = pos
                bb = text.get_window_extent(renderer)
                m = 7.0  # px: about half a marker, so a label does not cover a marker's edge
                hits = np.count_nonzero((dense[:, 0] > bb.x0 - m) & (dense[:, 0] < bb.x1 + m)
                                        & (dense[:, 1] > bb.y0 - m) & (dense[:, 1] < bb.y1 + m))
                score = (_overlap_area(bb, placed) + 4.0 * _outside_area(bb, frame)
                         + 50.0 * hits + 1e-3 * dist)
                if score < best_score:
                    best, best_score = pos, score
                if score < 1.0:
                    break
            if renderer is None or best_score < 1.0:
                break
        text.xyann = best
        if renderer is not None:
            # shift a label that still pokes out of the axes back inside (by its overflow)
            bb = text.get_window_extent(renderer)
            shift_px = (max(frame.x0 + 1.0 - bb.x0, 0.0) - max(bb.x1 - (frame.x1 - 1.0), 0.0),
                        max(frame.y0 + 1.0 - bb.y0, 0.0) - max(bb.y1 - (frame.y1 - 1.0), 0.0))
            if shift_px != (0.0, 0.0):
                inv = ax.transData.inverted()
                p0 = ax.transData.transform(best)
                text.xyann = tuple(inv.transform((p0[0] + shift_px[0], p0[1] + shift_px[1])))
            placed.append(text.get_window_extent(renderer))
        texts.append(text)
    return texts


def _shade_separated(ax, x, y, mask, depth):
    """Shade a strip outside the outline over each run of separated stations."""
    nx, ny = _outward_normals(x, y)
    n = len(x)
    if not mask.any():
        return None
    if mask.all():
        runs = [np.arange(n)]
    else:
        start = int(np.argmin(mask))  # a station that is attached: runs do not wrap past it
        order = np.roll(np.arange(n), -start)
        m = mask[order]
        runs, cur = [], []
        for k, flag in zip(order, m):
            if flag:
                cur.append(k)
            elif cur:
                runs.append(np.array(cur))
                cur = []
        if cur:
            runs.append(np.array(cur))
    handle = None
    for run in runs:
        px, py = x[run], y[run]
        ox, oy = px + depth * nx[run], py + depth * ny[run]
        poly = np.column_stack([np.concatenate([px, ox[::-1]]), np.concatenate([py, oy[::-1]])])
        handle = ax.add_patch(Polygon(poly, closed=True, facecolor=SEPARATED_COLOUR, alpha=0.35,
                                      edgecolor="none", hatch="///", zorder=2,
                                      label="separated flow"))
    return handle


def _baseline_difference(ax, baseline_xy, current_xy):
    """Hatch the area between the baseline and the current outline (shapely symmetric difference).

    Holes of the difference (an outline that grew all round) are kept: each piece is drawn as a
    compound path with its exterior counter-clockwise and its holes clockwise.
    """
    from matplotlib.patches import PathPatch
    from matplotlib.path import Path as MplPath
    from shapely.geometry import Polygon as ShPolygon
    from shapely.geometry.polygon import orient

    a = ShPolygon(baseline_xy).buffer(0)
    b = ShPolygon(current_xy).buffer(0)
    diff = a.symmetric_difference(b)
    geoms = getattr(diff, "geoms", [diff])
    handle = None
    for g in geoms:
        if g.is_empty or g.geom_type != "Polygon":
            continue
        g = orient(g, sign=1.0)
        rings = [np.asarray(g.exterior.coords)] + [np.asarray(r.coords) for r in g.interiors]
        path = MplPath.make_compound_path(*[MplPath(r, closed=True) for r in rings])
        handle = ax.add_patch(PathPatch(path, facecolor="none", edgecolor=BASELINE_COLOUR,
                                        hatch="xx", linewidth=0.0, zorder=1,
                                        label="change from baseline"))
    return handle


def draw_profile(ax, obj, *, baseline=None, ground=None, cp=True, events=True, corners=True,
                 colorbar=True, legend=True, title=None, legend_outside=False):
    """Draw an annotated profile at true aspect ratio onto ``ax``.

    Parameters
    ----------
    ax : matplotlib.axes.Axes
    obj : Analysis or Profile
        With an Analysis the outline is coloured by Cp (a colour band along the surface, with a
        colourbar), and the flow events, the separated flow and the corner verdicts are drawn.
    baseline : Profile or Analysis, optional
        Drawn behind in grey; the area between it and ``obj`` is hatched.
    ground : bool, optional
        Draw the ground (y = 0, hatched strip below). Default: the analysis' conditions, else True.
    cp, events, corners, colorbar, legend : bool
        Switch the layers on or off.
    legend_outside : bool
        Put the legend left of the axes (for pages with room there) instead of inside it.

    Returns
    -------
    dict
        Handles by layer: "outline", "cp" (LineCollection or None), "colorbar", "events"
        ({kind: handle}), "corner_labels", "legend".
    """
    if ax is None or not hasattr(ax, "plot"):
        raise InputError("draw_profile needs a matplotlib Axes to draw on; got " f"{type(ax).__name__}")
    analysis = obj if is_analysis(obj) else None
    outline = outline_of(obj)
    x, y = outline.x, outline.y
    length = float(np.ptp(x)) or 1.0
    height = float(np.ptp(y)) or 1.0
    scale = max(length, height)
    if ground is None:
        cond = getattr(analysis, "conditions", None)
        ground = bool(getattr(cond, "ground", True))
    out = {"outline": None, "cp": None, "colorbar": None, "events": {}, "corner_labels": [],
           "legend": None}
    legend_handles = []

    if baseline is not None:
        bl = outline_of(baseline)
        bx, by = _closed(bl.x, bl.y)
        legend_handles.append(ax.plot(bx, by, color=BASELINE_COLOUR, lw=1.5, ls="--", zorder=1,
                                      label="baseline")[0])
        try:
            h = _baseline_difference(ax, np.column_stack([bl.x, bl.y]), np.column_stack([x, y]))
            if h is not None:
                legend_handles.append(h)
        except Exception:  # a self-crossing outline has no clean difference: outlines still show
            pass

    xc, yc = _closed(x, y)
    out["outline"] = ax.plot(xc, yc, color=OKABE_ITO["black"], lw=0.8, zorder=4)[0]
    ax.fill(xc, yc, color="#f2f2f2", zorder=0)

    flow = getattr(analysis, "flow", None)
    inv = getattr(flow, "inviscid", None)
    if analysis is not None and cp and inv is not None:
        cpv = np.asarray(inv.cp, dtype=float)
        seg = np.stack([np.column_stack([xc[:-1], yc[:-1]]), np.column_stack([xc[1:], yc[1:]])], axis=1)
        seg_cp = 0.5 * (cpv + np.roll(cpv, -1))
        # Colour scale from Cp = 1 (stagnation) down to the lowest Cp, but not below CP_FLOOR:
        # the suction peaks at small corners would otherwise wash out the rest of the band.
        # Values below the floor show in the floor's colour, flagged by the colourbar's arrow.
        vmin = max(min(float(cpv.min()), -0.1), CP_FLOOR)
        norm = TwoSlopeNorm(vmin=vmin, vcenter=0.0, vmax=1.0)
        lc = LineCollection(seg, cmap=CP_COLORMAP, norm=norm, linewidths=5.0, zorder=3,
                            capstyle="round")
        lc.set_array(seg_cp)
        ax.add_collection(lc)
        out["cp"] = lc
        if colorbar:
            saturated = float(cpv.min()) < CP_FLOOR
            cb = ax.figure.colorbar(lc, ax=ax, fraction=0.03, pad=0.01,
                                    extend="min" if saturated else "neither")
            cb.set_label("Cp, colour band on the outline"
                         + (f" (below {CP_FLOOR:g} in the end colour)" if saturated else ""))
            out["colorbar"] = cb

    if analysis is not None and flow is not None and getattr(flow, "separated", None) is not None:
        mask = np.asarray(flow.separated, dtype=bool)
        if mask.shape == x.shape:
            h = _shade_separated(ax, x, y, mask, depth=0.035 * scale)
            if h is not None:
                legend_handles.append(h)

    if analysis is not None and events:
        evs = tuple(analysis.events)
        for sep, rea in bubbles(evs):
            sf = getattr(flow, sep.surface, None) if flow is not None else None
            if sf is None:
                bx, by = [sep.x, rea.x], [sep.y, rea.y]
            else:
                from profilebench.plotting.stations import surface_stations
                st = {s.name: s for s in surface_stations(analysis)}[sep.surface]
                keep = (st.s >= sep.s) & (st.s <= rea.s)
                bx = np.concatenate([[sep.x], st.x[keep], [rea.x]])
                by = np.concatenate([[sep.y], st.y[keep], [rea.y]])
            hb = ax.plot(bx, by, solid_capstyle="round", zorder=5, **BUBBLE_STYLE)[0]
            if "bubble" not in out["events"]:
                out["events"]["bubble"] = hb
        out["events"].update(draw_events(ax, evs))
        legend_handles.extend(out["events"].values())

    if ground:
        strip = 0.04 * scale
        x0, x1 = float(x.min()) - 0.1 * length, float(x.max()) + 0.1 * length
        ax.add_patch(Rectangle((x0, -strip), x1 - x0, strip, facecolor="white",
                               edgecolor=OKABE_ITO["black"], hatch="////", linewidth=0.0, zorder=1))
        ax.plot([x0, x1], [0.0, 0.0], color=OKABE_ITO["black"], lw=1.2, zorder=2)
        legend_handles.append(Patch(facecolor="white", edgecolor=OKABE_ITO["black"], hatch="////",
                                    label="ground (y = 0)"))

    ax.set_aspect("equal", adjustable="box")
    labelled = analysis is not None and corners and len(analysis.corners) > 0
    pad = 0.28 * scale if labelled else 0.08 * scale
    ax.set_xlim(float(x.min()) - pad, float(x.max()) + pad)
    ylo = -0.06 * scale if ground else float(y.min()) - 0.6 * pad
    ax.set_ylim(min(ylo, float(y.min()) - 0.05 * scale), float(y.max()) + 0.45 * pad)
    ax.set_xlabel("x, rearward (m)")
    ax.set_ylabel("y, up (m)")
    if title is None:
        title = getattr(getattr(obj, "profile", obj), "name", "")
    ax.set_title(title)

    if analysis is not None and corners:
        avoid = [(e.x, e.y) for e in analysis.events] if events else []
        out["corner_labels"] = _label_corners(ax, tuple(analysis.corners), x, y, scale, avoid)

    if legend and legend_handles:
        if legend_outside:
            out["legend"] = ax.legend(handles=legend_handles, loc="upper right", fontsize=8,
                                      framealpha=0.9, bbox_to_anchor=(-0.07, 1.0))
        else:
            out["legend"] = ax.legend(handles=legend_handles, loc="upper left", fontsize=7,
                                      framealpha=0.9, ncol=2)
    return out
