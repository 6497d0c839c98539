"""The annotated side profile: outline, ground, Cp band, flow events, separated flow, corners.

Everything draws onto a given matplotlib Axes, so the desktop editor and the review page share it.
"""

from __future__ import annotations

import textwrap

import numpy as np
from matplotlib.collections import LineCollection
from matplotlib.colors import TwoSlopeNorm
from matplotlib.patches import Patch, Polygon, Rectangle
from matplotlib.patheffects import withStroke

from profilebench.assess.results import Verdict
from profilebench.errors import InputError
from profilebench.plotting.labels import (
    FRONT_FRACTION,
    LABEL_GID,
    LEADER_GID,
    LabelSpec,
    place_labels,
)
from profilebench.plotting.stations import is_analysis, outline_of
from profilebench.plotting.style import (
    BASELINE_COLOUR,
    BUBBLE_STYLE,
    CP_COLORMAP,
    EVENT_STYLES,
    OKABE_ITO,
    SEPARATED_COLOUR,
)

__all__ = [
    "draw_profile",
    "draw_events",
    "bubbles",
    "corner_label",
    "CP_FLOOR",
    "CP_MIN_RANGE",
    "check_cp_min",
]

#: gids of the hatched areas (labels keep off them; tests find them by these)
GROUND_GID = "ground-band"
SEPARATED_GID = "separated-flow"
BASELINE_CHANGE_GID = "baseline-change"

#: Lowest Cp of the colour scale on the outline, the default of every figure (display only;
#: the data are not changed). Users set their own with ``cp_min`` (CLI ``--cp-min``).
CP_FLOOR = -3.0
#: the range a user's cp_min may take
CP_MIN_RANGE = (-20.0, -0.1)
BASELINE_GID = "baseline-outline"
BASELINE_LINE_COLOUR = "#333333"


def check_cp_min(cp_min):
    """Raise InputError unless ``cp_min`` is a number in :data:`CP_MIN_RANGE`."""
    lo, hi = CP_MIN_RANGE
    try:
        v = float(cp_min)
    except (TypeError, ValueError):
        raise InputError(
            f"the Cp colour scale's lowest value {cp_min!r} is not a number; give "
            f"one from {lo:g} to {hi:g}, such as {CP_FLOOR:g}"
        ) from None
    if not (lo <= v <= hi):
        raise InputError(
            f"the Cp colour scale's lowest value {cp_min!r} is outside "
            f"[{lo:g}, {hi:g}]; give one in that range, such as {CP_FLOOR:g}"
        )
    return v


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
            for f in evs[i + 1 :]:
                if f.kind == "reattachment":
                    pairs.append((e, f))
                    break
                if f.kind in (
                    "laminar_separation",
                    "turbulent_separation",
                    "edge_separation",
                    "bubble_separation",
                ):
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
        h = ax.plot(
            xs,
            ys,
            linestyle="none",
            marker=st.marker,
            markersize=st.size,
            markerfacecolor=st.face,
            markeredgecolor=st.edge,
            markeredgewidth=1.0,
            label=st.label,
            zorder=zorder,
        )[0]
        handles[kind] = h
    return handles


def corner_label(corner) -> str:
    """Short label of a corner: its name (wrapped), r/t with the separation margin, and the
    solver's verdict, on three short lines (labels stay narrow enough to sit beside a nose)."""
    name = corner.label or f"node {corner.node}"
    verdict = corner.verdict.value
    second = f"r/t {corner.r_over_t:.3f}"
    if (
        corner.verdict in (Verdict.ATTACHED, Verdict.BUBBLE_REATTACHES)
        and corner.margin is not None
    ):
        second += f", {100 * corner.margin:.0f}% sep. margin"
    return "\n".join(textwrap.wrap(name, 30) + [second, verdict])


#: more corners than this get a smaller label font
MANY_CORNERS = 12
#: placements tried, each with more room than the last, before a label may overlap
PLACEMENT_ATTEMPTS = 8


def _fill_box(ax, xlim, ylim):
    """Set limits that hold ``xlim`` and ``ylim`` and fill the axes box at equal aspect:
    the spare width (or height, above the profile) becomes room for labels."""
    fig = ax.figure
    pos = ax.get_position()
    box_w = pos.width * fig.get_figwidth()
    box_h = pos.height * fig.get_figheight()
    (x0, x1), (y0, y1) = xlim, ylim
    want_w = (y1 - y0) * box_w / box_h
    if want_w > x1 - x0:
        grow = 0.5 * (want_w - (x1 - x0))
        x0, x1 = x0 - grow, x1 + grow
    else:
        y1 = y0 + (x1 - x0) * box_h / box_w
    ax.set_xlim(x0, x1)
    ax.set_ylim(y0, y1)


def _label_colour(corner):
    if corner.verdict.separated:
        return OKABE_ITO["vermillion"]
    if corner.verdict in (Verdict.ATTACHED, Verdict.BUBBLE_REATTACHES):
        return OKABE_ITO["bluish_green"]
    return OKABE_ITO["black"]  # in the wake of an upstream separation, or concave


def _label_corners(ax, corners, x, y, *, obstacles, markers, ground, scale):
    """One label per corner, placed by :func:`profilebench.plotting.labels.place_labels`.

    Labels keep outside the outline, off the hatching and markers, away from the front 30 % of
    the outline where they can, and apart from each other, each with a leader line to its
    corner. When some label finds no free place the axes get more room above the profile (and
    at its ends) and the placement is made again (up to PLACEMENT_ATTEMPTS times).
    Without a renderer (a canvas that cannot measure text) labels stay at their corners.
    """
    if not corners:
        return []
    texts = []
    size = 7 if len(corners) <= MANY_CORNERS else 6  # imported outlines may have dozens
    for c in corners:
        colour = _label_colour(c)
        texts.append(
            ax.text(
                c.x,
                c.y,
                corner_label(c),
                fontsize=size,
                ha="center",
                va="center",
                color=OKABE_ITO["black"],
                gid=LABEL_GID,
                zorder=8,
                bbox=dict(boxstyle="round,pad=0.25", fc="white", ec=colour, lw=1.0, alpha=0.95),
            )
        )
    fig = ax.figure
    if not hasattr(fig.canvas, "get_renderer"):
        return texts
    xmin, xmax = float(np.min(x)), float(np.max(x))
    front_x = xmin + FRONT_FRACTION * (xmax - xmin)
    in_front = x <= front_x
    front_box = (
        xmin - 0.02 * scale,
        float(np.min(y[in_front])) if not ground else 0.0,
        front_x,
        float(np.max(y[in_front])) + 0.03 * scale,
    )
    specs = [LabelSpec((c.x, c.y), t, _label_colour(c)) for c, t in zip(corners, texts)]
    outline_xy = np.column_stack([x, y])
    for attempt in range(PLACEMENT_ATTEMPTS):
        crowded, crossing = place_labels(
            ax,
            specs,
            outline_xy=outline_xy,
            obstacles=obstacles,
            markers_xy=markers,
            front_box=front_box,
        )
        # more room always helps a crowded label; a crossing leader gets two tries
        if crowded == 0 and (crossing == 0 or attempt >= 1) or attempt == PLACEMENT_ATTEMPTS - 1:
            break
        for line in [ln for ln in ax.lines if ln.get_gid() == LEADER_GID]:
            line.remove()
        x0, x1 = ax.get_xlim()
        y0, y1 = ax.get_ylim()
        _fill_box(ax, (x0 - 0.04 * scale, x1 + 0.04 * scale), (y0, y1 + 0.12 * scale))
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
        handle = ax.add_patch(
            Polygon(
                poly,
                closed=True,
                facecolor=SEPARATED_COLOUR,
                alpha=0.35,
                edgecolor="none",
                hatch="///",
                zorder=2,
                label="separated flow",
                gid=SEPARATED_GID,
            )
        )
    return handle


def _baseline_difference(ax, baseline_xy, current_xy):
    """Hatch the area between the baseline and the current outline (shapely symmetric difference).

    Holes of the difference (an outline that grew all round) are kept: each piece is drawn as a
    compound path with its exterior counter-clockwise and its holes clockwise.
    """
    from matplotlib.patches import PathPatch
    from matplotlib.path import Path as MplPath
    import shapely
    from shapely.geometry import Polygon as ShPolygon
    from shapely.geometry.polygon import orient

    a = ShPolygon(baseline_xy).buffer(0)
    b = ShPolygon(current_xy).buffer(0)
    diff = a.symmetric_difference(b)
    handle = None
    for g in shapely.get_parts(diff):  # a polygon, or several
        if g.is_empty or g.geom_type != "Polygon":
            continue
        g = orient(g, sign=1.0)
        rings = [np.asarray(g.exterior.coords)] + [np.asarray(r.coords) for r in g.interiors]
        path = MplPath.make_compound_path(*[MplPath(r, closed=True) for r in rings])
        handle = ax.add_patch(
            PathPatch(
                path,
                facecolor="none",
                edgecolor=BASELINE_COLOUR,
                hatch="xx",
                linewidth=0.0,
                zorder=1,
                label="change from baseline",
                gid=BASELINE_CHANGE_GID,
            )
        )
    return handle


def draw_profile(
    ax,
    obj,
    *,
    baseline=None,
    ground=None,
    cp=True,
    events=True,
    corners=True,
    colorbar=True,
    legend=True,
    title=None,
    cp_min=CP_FLOOR,
):
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
    cp_min : float
        The lowest Cp of the colour scale (fixed, not taken from the data, so that figures can
        be compared; default :data:`CP_FLOOR`). Must be below 0.

    Returns
    -------
    dict
        Handles by layer: "outline", "cp" (LineCollection or None), "colorbar", "events"
        ({kind: handle}), "corner_labels", "legend", "legend_handles" (for a legend drawn
        elsewhere).

    Raises
    ------
    InputError
        For a ``cp_min`` that is not a finite number below 0.
    """
    if ax is None or not hasattr(ax, "plot"):
        raise InputError(
            f"draw_profile needs a matplotlib Axes to draw on; got {type(ax).__name__}"
        )
    check_cp_min(cp_min)
    analysis = obj if is_analysis(obj) else None
    outline = outline_of(obj)
    x, y = outline.x, outline.y
    length = float(np.ptp(x)) or 1.0
    height = float(np.ptp(y)) or 1.0
    scale = max(length, height)
    if ground is None:
        # a bare profile is drawn over the ground, the default of Conditions
        ground = True if analysis is None else bool(analysis.conditions.ground)
    out = {
        "outline": None,
        "cp": None,
        "colorbar": None,
        "events": {},
        "corner_labels": [],
        "legend": None,
        "legend_handles": [],
    }
    legend_handles = []

    if baseline is not None:
        bl = outline_of(baseline)
        bx, by = _closed(bl.x, bl.y)
        # over the Cp band (zorder 3) and the outline, with a white halo so that it shows on
        # every colour of the band
        legend_handles.append(
            ax.plot(
                bx,
                by,
                color=BASELINE_LINE_COLOUR,
                lw=1.3,
                ls=(0, (5, 3)),
                zorder=5.5,
                label="baseline",
                gid=BASELINE_GID,
                path_effects=[withStroke(linewidth=3.0, foreground="white")],
            )[0]
        )
        try:
            h = _baseline_difference(ax, np.column_stack([bl.x, bl.y]), np.column_stack([x, y]))
            if h is not None:
                legend_handles.append(h)
        except Exception:  # a self-crossing outline has no clean difference: outlines still show
            pass

    xc, yc = _closed(x, y)
    out["outline"] = ax.plot(xc, yc, color=OKABE_ITO["black"], lw=0.8, zorder=4)[0]
    ax.fill(xc, yc, color="#f2f2f2", zorder=0)

    flow = analysis.flow if analysis is not None else None
    inv = flow.inviscid if flow is not None else None
    if analysis is not None and cp and inv is not None:
        cpv = np.asarray(inv.cp, dtype=float)
        seg = np.stack(
            [np.column_stack([xc[:-1], yc[:-1]]), np.column_stack([xc[1:], yc[1:]])], axis=1
        )
        seg_cp = 0.5 * (cpv + np.roll(cpv, -1))
        # A fixed colour scale from Cp = 1 (stagnation) down to cp_min, the same on every page:
        # values below it show in the end colour, flagged by the colourbar's arrow.
        norm = TwoSlopeNorm(vmin=float(cp_min), vcenter=0.0, vmax=1.0)
        lc = LineCollection(
            seg, cmap=CP_COLORMAP, norm=norm, linewidths=5.0, zorder=3, capstyle="round"
        )
        lc.set_array(seg_cp)
        ax.add_collection(lc)
        out["cp"] = lc
        if colorbar:
            saturated = float(cpv.min()) < cp_min
            cb = ax.figure.colorbar(
                lc, ax=ax, fraction=0.03, pad=0.01, extend="min" if saturated else "neither"
            )
            cb.set_label(
                "Cp, colour band on the outline"
                + (f" (below {cp_min:g} in the end colour)" if saturated else "")
            )
            out["colorbar"] = cb

    if flow is not None and flow.separated is not None:
        mask = np.asarray(flow.separated, dtype=bool)
        if mask.shape == x.shape:
            h = _shade_separated(ax, x, y, mask, depth=0.035 * scale)
            if h is not None:
                legend_handles.append(h)

    if analysis is not None and events:
        evs = tuple(analysis.events)
        for sep, rea in bubbles(evs):
            sf = (
                {"upper": flow.upper, "lower": flow.lower}.get(sep.surface)
                if flow is not None
                else None
            )
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
        ax.add_patch(
            Rectangle(
                (x0, -strip),
                x1 - x0,
                strip,
                facecolor="white",
                edgecolor=OKABE_ITO["black"],
                hatch="////",
                linewidth=0.0,
                zorder=1,
                gid=GROUND_GID,
            )
        )
        ax.plot([x0, x1], [0.0, 0.0], color=OKABE_ITO["black"], lw=1.2, zorder=2)
        legend_handles.append(
            Patch(
                facecolor="white",
                edgecolor=OKABE_ITO["black"],
                hatch="////",
                label="ground (y = 0)",
            )
        )

    ax.set_aspect("equal", adjustable="box")
    labelled = analysis is not None and corners and len(analysis.corners) > 0
    pad = 0.28 * scale if labelled else 0.08 * scale
    ylo = -0.06 * scale if ground else float(y.min()) - 0.6 * pad
    _fill_box(
        ax,
        (float(x.min()) - pad, float(x.max()) + pad),
        (min(ylo, float(y.min()) - 0.05 * scale), float(y.max()) + 0.45 * pad),
    )
    ax.set_xlabel("x, rearward (m)")
    ax.set_ylabel("y, up (m)")
    if title is None:
        title = (analysis.profile if analysis is not None else obj).name
    ax.set_title(title)

    if analysis is not None and corners:
        markers = [(e.x, e.y) for e in analysis.events] if events else []
        hatched = [
            p for p in ax.patches if p.get_gid() in (GROUND_GID, SEPARATED_GID, BASELINE_CHANGE_GID)
        ]
        out["corner_labels"] = _label_corners(
            ax,
            tuple(analysis.corners),
            x,
            y,
            obstacles=hatched,
            markers=markers,
            ground=ground,
            scale=scale,
        )

    out["legend_handles"] = legend_handles
    if legend and legend_handles:
        out["legend"] = ax.legend(
            handles=legend_handles, loc="upper left", fontsize=7, framealpha=0.9, ncol=2
        )
    return out
