"""Corner assessment: r, t, r/t, the solver's verdict and margin, the table's verdict, and the
smallest radius that keeps the flow attached.

A corner is every node that is not smooth: a rounded node (radius > 0) or a sharp one. Its
*region* on the surface runs from the start of its arc (for a concave corner, a little ahead of
it) to the start of the next corner's region downstream on the same surface, at most
``CORNER_REACH_RATIO`` h behind a convex arc: a separation in that region (on the arc, or in the
pressure recovery behind it) is the corner's. All bounds are lengths, never station counts.

The thickness t of r/t is the profile's frontal height h unless the caller gives another.
"""

from __future__ import annotations

import math

import numpy as np

from profilebench.assess.results import CornerResult, Verdict
from profilebench.errors import GeometryError, RadiusTooLargeError
from profilebench.flow.boundary_layer import SEPARATION_KINDS, EventKind
from profilebench.geometry.polyline import arc_length, edges, signed_area

__all__ = [
    "assess_corners",
    "corner_regions",
    "curvature_peaks",
    "all_spans",
    "largest_fitting_radius",
]


# a sharp node turning the outline by more than this fixes separation ("more than a few degrees": a
# convention of this project; common practice, no source)
EDGE_TURN_DEG = 10.0


# A stretch of a smooth (spline) run whose curvature radius falls below this many frontal heights
# and that turns the outline by more than EDGE_TURN_DEG is reported as a corner of its own: a
# digitised or spline-drawn rounding has no node radius, but it is a corner all the same (common
# practice, no source).
PEAK_RADIUS_RATIO = 0.5


def curvature_peaks(panelling, height):
    """Curvature peaks of the smooth runs of a panelled outline, as CornerSpan values.

    The discrete curvature at panel point j is the turn between panels j-1 and j over the mean
    of their lengths. A peak is a local maximum of |curvature| above 1 / (PEAK_RADIUS_RATIO h) on
    points that belong to no node corner; its span runs while |curvature| stays above half the
    peak, its radius is 1 / peak curvature, its node the profile node nearest to it.
    """
    from profilebench.geometry.panelling import CornerSpan

    pts = np.asarray(panelling.points, dtype=float)
    n = len(pts)
    seg = edges(pts)
    lengths = np.hypot(seg[:, 0], seg[:, 1])
    heading = np.arctan2(seg[:, 1], seg[:, 0])
    turn = np.angle(np.exp(1j * (heading - np.roll(heading, 1))))  # at point j: panel j-1 -> j
    convex_sign = 1.0 if signed_area(pts) > 0 else -1.0  # counter-clockwise: left turns are convex
    kappa = turn / (0.5 * (lengths + np.roll(lengths, 1)))
    taken = np.zeros(n, dtype=bool)
    for span in panelling.corners:
        a, b = int(span.point_start), int(span.point_end)
        idx = np.arange(a - 1, (b if b >= a else b + n) + 2) % n
        taken[idx] = True
    k_abs = np.abs(kappa)
    k_min = 1.0 / (PEAK_RADIUS_RATIO * height)
    peaks = []
    for j in range(n):
        if taken[j] or k_abs[j] < k_min:
            continue
        if not (k_abs[j] >= k_abs[(j - 1) % n] and k_abs[j] > k_abs[(j + 1) % n]):
            continue
        half = 0.5 * k_abs[j]
        lo = j
        while not taken[(lo - 1) % n] and k_abs[(lo - 1) % n] >= half and (j - lo) < n // 4:
            lo -= 1
        hi = j
        while not taken[(hi + 1) % n] and k_abs[(hi + 1) % n] >= half and (hi - j) < n // 4:
            hi += 1
        idx = np.arange(lo, hi + 1) % n
        turned = float(np.degrees(abs(np.sum(turn[idx]))))
        if turned <= EDGE_TURN_DEG:
            continue
        node = int(np.argmin([np.hypot(*(pts[j] - pts[p])) for p in panelling.node_point]))
        s_arr = np.asarray(panelling.s)
        peaks.append(
            CornerSpan(
                node=node,
                radius=float(1.0 / k_abs[j]),
                turning_angle_deg=turned,
                convex=bool(np.sign(kappa[j]) == convex_sign),
                s_start=float(s_arr[lo % n]),
                s_end=float(s_arr[hi % n]),
                point_start=int(lo % n),
                point_end=int(hi % n),
                centre=None,
            )
        )
        taken[idx] = True
    return tuple(peaks)


# A separation that starts within this many frontal heights ahead of a concave corner's arc (or
# on the arc) belongs to the concave corner, not to the convex corner upstream: the pressure rise
# ahead of a concave corner (a windscreen base, the foot of a step) starts upstream of it and the
# separation it causes is a bubble in the corner (issue of attribution, not of the upstream
# radius). The pressure rise ahead of a forward-facing step reaches about one step height
# upstream (from memory); 0.15 h is a calibrated choice of this project, no source.
CONCAVE_APPROACH_RATIO = 0.15

# A convex corner owns a separation that starts on its arc or at most this many frontal heights
# behind the arc's end (its pressure recovery); one further downstream is the surface's, not
# the corner's: it gets no corner correction and the corner reads attached. On the samples the
# corners' separations start 0.006 to 0.13 h behind their arcs (measured); 0.25 h is a choice of
# this project, no source.
CORNER_REACH_RATIO = 0.25


def _arc_positions(panelling, flow, spans):
    """(surface index or -1, s_start, s_end) of each span's arc on the surface it lies on."""
    perim = float(flow.upper.perimeter)
    pts = np.asarray(panelling.points, dtype=float)
    point_sigma = arc_length(pts)[1]
    placed = []
    for span in spans:
        a, b = float(point_sigma[span.point_start]), float(point_sigma[span.point_end])
        if b < a:
            b += perim
        mid = 0.5 * (a + b) % perim
        best = (-1, 0.0, 0.0)
        for k, sfl in enumerate(flow.surfaces):
            sm = sfl.surface_s(mid)
            if sm is None:
                continue
            ends = [
                x for x in (sfl.surface_s(a % perim), sfl.surface_s(b % perim), sm) if x is not None
            ]
            best = (k, min(ends), max(ends))
            break
        else:
            # an arc whose first point is where a surface ends (the layer left there, at an arc
            # thinner than itself taken for a sharp edge): placed at that end
            for k, sfl in enumerate(flow.surfaces):
                end = float(sfl.surface.s_end)
                at = [
                    x for x in (sfl.surface_s(a % perim), sfl.surface_s(b % perim)) if x is not None
                ]
                if at and abs(max(at) - end) <= 1e-6 * max(1.0, end):
                    best = (k, end, end)
                    break
        placed.append(best)
    return placed


def corner_regions(panelling, flow, spans=None):
    """For each corner span: (surface index or -1, s_start, s_end, bounded) of its region.

    A corner's region starts where its arc starts on the surface (for a concave corner,
    ``CONCAVE_APPROACH_RATIO`` frontal heights ahead of it, but not before the arc of the corner
    upstream ends) and runs to the start of the next corner's region downstream on the same
    surface (``bounded`` True), or to the surface's end; a convex corner's region ends at most
    ``CORNER_REACH_RATIO`` frontal heights behind its arc. Regions are half-open: an event at the
    very start of the next corner's region belongs to that corner. All bounds are lengths on the
    outline, not station indices, so they do not move when the panels are refined.
    """
    spans = panelling.corners if spans is None else spans
    placed = _arc_positions(panelling, flow, spans)
    pts = np.asarray(panelling.points, dtype=float)
    height = float(pts[:, 1].max() - pts[:, 1].min())
    approach = CONCAVE_APPROACH_RATIO * height
    reach = CORNER_REACH_RATIO * height
    starts = []
    for i, (k, lo, hi) in enumerate(placed):
        if k < 0:
            starts.append(0.0)
            continue
        start = lo
        if not spans[i].convex:
            upstream_end = max(
                [
                    hi2
                    for j, (k2, _lo2, hi2) in enumerate(placed)
                    if j != i and k2 == k and hi2 <= lo + 1e-9
                ],
                default=0.0,
            )
            start = max(lo - approach, upstream_end, 0.0)
        starts.append(start)
    regions = []
    for i, (k, lo, hi) in enumerate(placed):
        if k < 0:
            regions.append((-1, 0.0, 0.0, False))
            continue
        end = float(flow.surfaces[k].surface.s_end)
        bounded = False
        for j, (k2, lo2, _hi2) in enumerate(placed):
            if j != i and k2 == k and lo2 > hi + 1e-9 and starts[j] <= end + 1e-9:
                end = max(starts[j], hi)
                bounded = True
        if spans[i].convex and hi + reach < end:
            end, bounded = hi + reach, True
        regions.append((k, starts[i], max(hi, end), bounded))
    return regions


def _event_s(e, edges):
    """Where an event counts for attribution: an edge separation at its edge (the march reports
    it at the station just ahead of the edge), any other event where it happens."""
    s = float(e.s)
    if e.kind is EventKind.EDGE_SEPARATION and edges:
        ahead = [x for x in edges if x >= s - 1e-9]
        if ahead:
            return float(min(ahead))
    return s


def surface_verdict(sfl, region, convex):
    """:func:`_verdict` of a region (k, lo, hi, bounded) on the surface flow ``sfl``."""
    _k, lo, hi, bounded = region
    # the march's own sharp edges, and the surface's end (where the wake model's surface ends at
    # the edge the closed-body layer left from)
    edges = tuple(sfl.edges) + (float(sfl.surface.s_end),)
    return _verdict(sfl.bl, lo, hi, convex, sfl.restarts, bounded, edges=edges)


def _verdict(bl, region_lo, region_hi, convex, restarts, bounded=True, edges=()):
    """Solver verdict, margin and a detail sentence for one corner region of a surface.

    A separation after which the march restarted (the layer reattaches behind it) is, at a
    concave corner, the corner's bubble (verdict CONCAVE_BUBBLE, no drag correction: it is not a
    radius to enlarge); at a convex corner it is the corner's separation.
    """
    events = list(bl.events)
    tol = 1e-6  # m: positions closer than this are the same place
    final = bl.separation
    final_s = _event_s(final, edges) if final is not None else math.inf
    restart_s = [r.s for r in restarts]
    upstream_cut = max([s for s in restart_s if s < region_lo - tol], default=-math.inf)
    s_arr = np.asarray(bl.s)
    if final_s < region_lo - tol:
        return (
            Verdict.IN_WAKE,
            0.0,
            f"the layer already separated upstream at s = {final_s * 1e3:.0f} mm",
        )

    def inside(x):
        return region_lo - tol <= x < region_hi - (tol if bounded else -tol) and x > upstream_cut

    in_region = sorted((e for e in events if inside(_event_s(e, edges))), key=lambda e: float(e.s))
    sel = (s_arr >= region_lo - tol) & (s_arr <= min(region_hi, final_s) + tol)
    margin = float(np.min(np.asarray(bl.margin)[sel])) if np.any(sel) else 1.0
    margin = min(max(margin, 0.0), 1.0)
    bubble = None
    concave_bubble = None
    for k, e in enumerate(in_region):
        if e.kind not in SEPARATION_KINDS:
            continue
        if e.kind is EventKind.LAMINAR_SEPARATION:
            nxt = next(
                (
                    f
                    for f in in_region[k + 1 :]
                    if f.kind in SEPARATION_KINDS + (EventKind.REATTACHMENT,)
                ),
                None,
            )
            if nxt is not None and nxt.kind is EventKind.REATTACHMENT:
                bubble = (e, nxt)
                continue
        if not convex and any(abs(float(e.s) - r) <= tol for r in restart_s):
            concave_bubble = concave_bubble or e
            continue
        if e.kind is EventKind.LAMINAR_SEPARATION:
            verdict = Verdict.LAMINAR_SEPARATION
        elif e.kind is EventKind.TURBULENT_SEPARATION:
            burst = "burst" in e.detail
            verdict = Verdict.LAMINAR_SEPARATION if burst else Verdict.TURBULENT_SEPARATION
        else:
            verdict = Verdict.EDGE_SEPARATION
        detail = f"{verdict.value} at s = {float(e.s) * 1e3:.0f} mm"
        if e.detail:
            detail += f" ({e.detail})"
        if bubble is not None:
            detail += f", after a laminar bubble at s = {float(bubble[0].s) * 1e3:.0f} mm"
        return verdict, 0.0, detail
    if not convex and concave_bubble is not None:
        return (
            Verdict.CONCAVE_BUBBLE,
            0.0,
            (
                f"concave corner; the layer separates in the adverse gradient ahead of it at "
                f"s = {float(concave_bubble.s) * 1e3:.0f} mm and reattaches (a bubble in the corner)"
            ),
        )
    if bubble is not None:
        return (
            Verdict.BUBBLE_REATTACHES,
            margin,
            (
                f"laminar separation at s = {float(bubble[0].s) * 1e3:.0f} mm, reattaches turbulent "
                f"at s = {float(bubble[1].s) * 1e3:.0f} mm; {margin * 100:.0f}% margin"
            ),
        )
    if not convex:
        return Verdict.CONCAVE, margin, f"concave corner, attached, {margin * 100:.0f}% margin"
    return Verdict.ATTACHED, margin, f"attached, {margin * 100:.0f}% margin"


def _table_view(table, r_over_t, solver_verdict, flagged):
    if table is None:
        return "", None, "no table", ""
    verdict = table.verdict(r_over_t).value
    critical = table.critical_ratio
    text = ""
    above = verdict.startswith("at or above")
    if solver_verdict.separated and above:
        text = (
            f"the solver finds separation, but r/t = {r_over_t:.3f} is at or above the "
            f"table's critical ratio {critical:.3f}"
        )
    elif (
        solver_verdict in (Verdict.ATTACHED, Verdict.BUBBLE_REATTACHES)
        and not above
        and critical is not None
    ):
        text = (
            f"the solver finds the flow attached, but r/t = {r_over_t:.3f} is below the "
            f"table's critical ratio {critical:.3f}"
        )
    if flagged:
        text = (
            text + "; " if text else ""
        ) + "the table's Reynolds range does not hold these conditions"
    return table.name, critical, verdict, text


def all_spans(panelling, height):
    """The node corners of a panelling followed by the curvature peaks of its smooth runs."""
    return tuple(panelling.corners) + curvature_peaks(panelling, height)


def corners_needing_floor(panelling, flow, spans=None, regions=None):
    """Nodes of convex node corners the solver finds separated with the layer reattaching behind
    them (corner bubbles): the corners whose drag correction needs the smallest attached radius.
    Curvature peaks are not among them (no node radius to vary). ``regions``: the result of
    :func:`corner_regions` for these spans, if already computed."""
    spans = panelling.corners if spans is None else spans
    node_spans = set(id(sp) for sp in panelling.corners)
    if regions is None:
        regions = corner_regions(panelling, flow, spans)
    out = []
    for span, (k, lo, hi, bounded) in zip(spans, regions):
        if k < 0 or not span.convex or id(span) not in node_spans:
            continue
        sfl = flow.surfaces[k]
        v = surface_verdict(sfl, (k, lo, hi, bounded), span.convex)[0]
        if v.separated and any(lo - 1e-9 <= r.s <= hi + 1e-9 for r in sfl.restarts):
            out.append(span.node)
    return out


def assess_corners(
    profile,
    panelling,
    flow,
    thickness,
    table=None,
    table_flagged=False,
    table_share=0.5,
    attached_ratios=None,
    spans=None,
    regions=None,
):
    """Corner results for every non-smooth node of ``profile`` and every curvature peak in
    ``spans`` (default: the node corners only; see :func:`all_spans`).

    ``table`` is an empirical r/t table (profilebench.assess.tables.RtTable) or None; its penalty
    curve gives the drag correction of corners that separate and then reattach (a corner
    bubble), times ``table_share`` (the data of a 2D section with two rounded front corners
    cover both: half each). ``regions``: the result of :func:`corner_regions` for these spans,
    if already computed.
    """
    spans = panelling.corners if spans is None else spans
    node_spans = set(id(sp) for sp in panelling.corners)
    if regions is None:
        regions = corner_regions(panelling, flow, spans)
    attached_ratios = {} if attached_ratios is None else dict(attached_ratios)
    from profilebench.geometry.places import place_names, place_of

    places = (
        place_names(profile) if any(not nd.smooth and not nd.label for nd in profile.nodes) else {}
    )
    pts_all = np.asarray(panelling.points, dtype=float)
    x0, x1 = float(pts_all[:, 0].min()), float(pts_all[:, 0].max())
    y0, y1 = float(pts_all[:, 1].min()), float(pts_all[:, 1].max())
    out = []
    for span, (k, lo, hi, bounded) in zip(spans, regions):
        node = profile.nodes[span.node]
        is_peak = id(span) not in node_spans
        # a corner is named by the user's label, else by its place on the outline (a node
        # number means nothing to the reader; it stays in CornerResult.node)
        label = node.label or places.get(span.node) or f"node {span.node}"
        if is_peak:
            px, py = pts_all[span.point_start]
            where = place_of(
                (px - x0) / max(x1 - x0, 1e-12), (py - y0) / max(y1 - y0, 1e-12), bool(span.convex)
            )
            label = f"curvature peak at the {where}" + (f" ({node.label})" if node.label else "")
        r_over_t = float(span.radius) / thickness
        if k < 0:
            # on neither surface: behind both final separation points, in the wake
            verdict, margin, detail, surface = (
                Verdict.IN_WAKE,
                0.0,
                "in the separated wake behind the body",
                "",
            )
            bl_restarts = ()
        else:
            sfl = flow.surfaces[k]
            verdict, margin, detail = surface_verdict(sfl, (k, lo, hi, bounded), span.convex)
            surface = sfl.name
            bl_restarts = sfl.restarts
            if verdict is Verdict.EDGE_SEPARATION and span.radius > 0.0:
                # a rounded corner taken for a sharp edge: its arc is thinner than the layer
                # reaching it (profilebench.assess.solve.THIN_ARC_RATIO)
                detail += (
                    f"; the layer reaching this {span.radius * 1e3:.0f} mm arc is thicker than "
                    "its radius and meets it as a sharp edge"
                )
        delta_cd = 0.0
        bubble = verdict.separated and any(lo - 1e-9 <= r.s <= hi + 1e-9 for r in bl_restarts)
        if table is not None and bubble and span.convex:
            floor = None if is_peak else attached_ratios.get(span.node)
            if floor is None:
                floor = (
                    table.critical_ratio if table.critical_ratio is not None else table.ratios[-1]
                )
            # the table holds its last value beyond its data: a floor past the end is the end
            floor = min(floor, table.ratios[-1])
            delta_cd = float(table_share * table.penalty(r_over_t, attached_ratio=floor))
            if delta_cd:
                detail += (
                    f"; drag correction {delta_cd:+.4f} for this separation (the layer "
                    f"reattaches behind it; attached from r/t {floor:.3f})"
                )
        name, critical, tverdict, disagreement = _table_view(
            table, r_over_t, verdict, table_flagged
        )
        out.append(
            CornerResult(
                node=span.node,
                label=label,
                x=float(panelling.points[span.point_start][0]) if is_peak else node.x,
                y=float(panelling.points[span.point_start][1]) if is_peak else node.y,
                radius=float(span.radius),
                turning_angle_deg=float(span.turning_angle_deg),
                convex=bool(span.convex),
                thickness=float(thickness),
                thickness_definition=(
                    "frontal height h of the profile"
                    if not is_peak
                    else "frontal height h; r = smallest curvature radius of the peak"
                ),
                r_over_t=r_over_t,
                surface=surface,
                s_start=float(lo),
                s_end=float(hi),
                verdict=verdict,
                margin=float(margin),
                detail=detail,
                table_name=name,
                table_critical_ratio=critical,
                table_verdict=tverdict,
                disagreement=disagreement,
                delta_cd=delta_cd,
            )
        )
    return tuple(out)


def largest_fitting_radius(profile, node):
    """The largest corner radius (m) that fits at ``node`` with its neighbours' radii unchanged."""
    from profilebench.geometry import build_outline

    p = profile.with_radius(node, 1e3 * max(1.0, _extent(profile)))
    try:
        build_outline(p)
    except RadiusTooLargeError as exc:
        if exc.node == node:
            return float(exc.largest)
        raise
    raise GeometryError(f"node {node}: could not find the largest radius that fits")


def _extent(profile):
    xs = [n.x for n in profile.nodes]
    ys = [n.y for n in profile.nodes]
    return max(max(xs) - min(xs), max(ys) - min(ys))
