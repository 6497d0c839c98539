"""How a panelled profile's flow is set up: the model constants and the flow call.

Shared by :mod:`profilebench.assess.analysis` (the whole analysis) and
:mod:`profilebench.assess.radius_search` (the smallest-attached-radius search, which needs only
the flow and one corner's verdict), so that both solve exactly the same flow.
"""

from __future__ import annotations

import math

import numpy as np

from profilebench.assess.corners import EDGE_TURN_DEG, _arc_positions
from profilebench.flow.profile_flow import (
    closed_body_split,
    march_surface_flow,
    solve_profile_flow,
)
from profilebench.flow.boundary_layer import Regime
from profilebench.flow.head import head_h1
from profilebench.flow.underbody import SideRelief
from profilebench.geometry.polyline import arc_length

__all__ = [
    "solve_flow",
    "closed_body",
    "march_closed",
    "edge_points",
    "thin_arc_points",
    "layer_thickness",
    "THIN_ARC_RATIO",
    "LAMINAR_DELTA_OVER_THETA",
    "closed_points",
    "REATTACH_RATIO",
    "WAKE_RATIO",
    "FIT_RATIO",
    "CLOSED_FULL_REAR",
    "CLOSED_STRIDE",
    "CLOSED_ARC_POINTS",
]

# A corner's separated shear layer is taken to reattach when at least this many frontal heights of
# surface follow it (rectangular prisms' shear layers reattach on the side faces beyond a
# length/depth of about 2.5 to 3: from memory).
REATTACH_RATIO = 2.5

# Length of the wake displacement body behind the profile, in frontal heights (see
# profilebench.flow.profile_flow.solve_profile_flow). Long enough that its closure no longer changes the
# attached pressures noticeably (the change from 10 to 20 h is below 0.01 in Cd on the test body).
WAKE_RATIO = 10.0

# The wake model's closed-body pass runs on every CLOSED_STRIDE-th panel point except within
# CLOSED_FULL_REAR frontal heights of the rearmost point (and on corner arcs), where it keeps
# every point. With these values the samples' Cd is that of the full closed-body pass to 0.001 %,
# and so it was on 48 randomly perturbed samples (nodes moved by 1 % of h, radii scaled by
# 0.5-1.5) at 150, 200, 250, 300 and 400 panels, none of which needed the full pass again (at
# 0.3 h, 7 of 48 did at 300 panels). Strides 3 and 4 moved Cd by up to 9 % (3) and 55 % (4) on
# some of them at 150 and 250 panels (measured; a calibrated choice of this project, no source).
# The boundary-layer marches fit the edge-speed slope over at least this many frontal heights
# either side of each station (see profilebench.flow.boundary_layer.march_boundary_layer): a
# window fixed in length, not in stations, so that refining the panels does not sharpen the
# slope at a fillet's tangent points. With a window of 7 stations the test-body sample's front
# lower corner turned from attached to a laminar bubble between 500 and 1000 panels; with
# 0.06 h it stays attached up to 2000 (measured; a calibrated choice of this project, no source).
FIT_RATIO = 0.06
CLOSED_FULL_REAR = 0.5
CLOSED_STRIDE = 2
# An arc with more points than this keeps every second one in the closed-body pass (at least 8
# per 90 degrees either way: the panelling gives each arc at least 9 per 90 degrees and, with
# its clustering round the fillets, usually far more). A choice of this project, no source.
CLOSED_ARC_POINTS = 16


def edge_points(panelling):
    """Panel point indices of the sharp convex edges, which fix separation.

    A rounded corner is never taken for a sharp edge, however small its radius against the
    panels: its arc always gets its own panels (see profilebench.geometry.panelling), and a rule
    "smaller than half a panel is sharp" made the verdict depend on the panel count (the minibus
    sample's front bumper, r = 45 mm, was a sharp edge at 100 panels and Cd 0.67, not 0.25).
    """
    out = []
    for span in panelling.corners:
        if not span.convex or abs(span.turning_angle_deg) <= EDGE_TURN_DEG:
            continue
        if span.radius <= 0.0:
            out.append(int(span.point_start))
    return out


# Blasius' layer: delta_99 = 5.0 x / sqrt(Re_x) and theta = 0.664 x / sqrt(Re_x) (Schlichting,
# Boundary-Layer Theory, the flat plate's laminar layer), so delta = 7.53 theta.
LAMINAR_DELTA_OVER_THETA = 5.0 / 0.664

# A convex arc whose radius is below this many thicknesses of the attached layer reaching it is
# met by that layer as a sharp edge: it separates at the arc's start. Boundary-layer theory, and
# the integral methods marched here, take the layer thin against the wall's radius of curvature
# (delta / R << 1); round a radius smaller than the layer itself the layer cannot follow the wall
# and the march, which sees the arc only through the edge speed fitted over FIT_RATIO h, would
# carry it round any arc however small (measured before this rule: the samples' underbody rear
# corners attached down to 0.5-0.8 mm under 21-30 mm of layer, and a digitised test body's
# sharp rear corners, given the 8 mm the points allow, moved the Cd by 10 %). The ratio 1 is a
# choice of this project (no source for the value).
THIN_ARC_RATIO = 1.0
# the arcs found thin are added as sharp edges and the flow solved again, at most this many
# times (a layer separating at a thin arc changes the flow downstream; measured: one pass more
# finds no further thin arc on the samples)
THIN_ARC_PASSES = 2


def layer_thickness(bl, s):
    """The boundary layer's thickness delta (m) at arc length ``s`` of a marched surface ``bl``
    (the station at or just before it), or None where the layer is separated there: turbulent,
    theta (H + H1) (Head's H1 = (delta - delta*) / theta); laminar, Blasius' 7.53 theta."""
    st = np.asarray(bl.s, dtype=float)
    j = int(np.clip(np.searchsorted(st, s, side="right") - 1, 0, st.size - 1))
    theta, shape = float(bl.theta[j]), float(bl.H[j])
    regime = bl.regime[j]
    if not (theta > 0.0 and math.isfinite(theta)) or regime is Regime.SEPARATED:
        return None
    if regime is Regime.TURBULENT:
        return theta * (shape + float(head_h1(shape)))
    return LAMINAR_DELTA_OVER_THETA * theta


def thin_arc_points(panelling, flow):
    """(point index, radius, layer thickness) of each convex arc (turning the outline by more
    than EDGE_TURN_DEG) that the attached layer reaches thicker than THIN_ARC_RATIO times its
    radius and that the march would carry it round (it does not separate on the arc or within a
    layer's thickness behind it); the point is the arc's first on the layer's way (see
    THIN_ARC_RATIO)."""
    spans = [
        sp
        for sp in panelling.corners
        if sp.convex and sp.radius > 0.0 and abs(sp.turning_angle_deg) > EDGE_TURN_DEG
    ]
    if not spans:
        return []
    out, point_sigma = [], None
    for span, (k, lo, hi) in zip(spans, _arc_positions(panelling, flow, spans)):
        if k < 0:
            continue
        sfl = flow.surfaces[k]
        sep = sfl.bl.separation
        if sep is not None and float(sep.s) < lo - 1e-9:
            continue  # the layer left the surface ahead of the arc
        delta = layer_thickness(sfl.bl, lo)
        if delta is None or delta <= THIN_ARC_RATIO * span.radius:
            continue
        if sep is not None and float(sep.s) <= hi + delta:
            # the march separates the layer on the arc, or within a layer's thickness behind
            # it, anyway: the rule is for the arcs it would carry the layer round
            continue
        # the arc's end the layer reaches first: the one at the arc's start on its surface
        if point_sigma is None:
            point_sigma = arc_length(np.asarray(panelling.points, dtype=float))[1]
        first = _entry_point(point_sigma, sfl, span, lo)
        out.append((first, float(span.radius), float(delta)))
    return out


def _entry_point(point_sigma, sfl, span, lo):
    """The panel point of ``span``'s arc ends that lies at arc length ``lo`` of the surface
    (``point_sigma``: the panel points' arc lengths round the outline)."""
    ends = (int(span.point_start), int(span.point_end))
    s_ends = [sfl.surface_s(float(point_sigma[i])) for i in ends]
    gaps = [abs(x - lo) if x is not None else math.inf for x in s_ends]
    return ends[int(np.argmin(gaps))]


def closed_points(panelling, height):
    """Points of the coarser panelling for the wake model's closed-body pass.

    Every ``CLOSED_STRIDE``-th panel point (in the canonical order); every point of each
    corner's arc (every second one on an arc of more than ``CLOSED_ARC_POINTS``); every point of
    the rear part (``x`` within ``CLOSED_FULL_REAR`` h of the rearmost point), where the final
    separations of a road vehicle lie. The closed-body pass only locates the separation points
    (the wake starts there, projected on the full outline) and the corner bubbles; on these
    points (about 60-75 % of them) it costs about half as much.
    """
    pts = panelling.points
    n = len(pts)
    # every CLOSED_STRIDE-th point in the canonical order, the same points however the outline
    # is given
    canonical = np.arange(n) if panelling.canonical is None else np.asarray(panelling.canonical)
    keep = canonical % CLOSED_STRIDE == 0
    keep |= pts[:, 0] >= float(pts[:, 0].max()) - CLOSED_FULL_REAR * height
    for span in panelling.corners:
        i0, i1 = int(span.point_start), int(span.point_end)
        arc = np.arange(i0, (i1 if i1 >= i0 else i1 + n) + 1) % n  # may run through point 0
        if arc.size > CLOSED_ARC_POINTS:
            # a well-panelled arc keeps every second point (its ends always), every second in
            # the canonical order: counted from one end, the points kept would depend on which
            # way round the outline is given (measured: with the radius search's refined arcs,
            # of 25 points and more, a box's front lower corner searched 61.0 against 61.9 mm)
            c = canonical[arc]
            first = c[0] if c[1] == (c[0] + 1) % n else c[-1]  # its first point, canonically
            arc = np.concatenate([arc[(c - first) % n % 2 == 0], arc[[0, -1]]])
        keep[arc] = True
    return np.flatnonzero(keep)


def solve_flow(profile, conditions, panelling, height):
    """The flow (inviscid with the wake model, both boundary layers) of a panelled profile.

    The one place where the analysis and the radius search set up
    :func:`~profilebench.flow.profile_flow.solve_profile_flow` from a profile and its conditions.
    """
    edges = edge_points(panelling)
    flow = _solve(profile, conditions, panelling, height, edges)
    # arcs thinner than the layer reaching them separate it as sharp edges (THIN_ARC_RATIO)
    for _ in range(THIN_ARC_PASSES):
        if not flow.success:
            break
        thin = [p for p, _r, _d in thin_arc_points(panelling, flow) if p not in edges]
        if not thin:
            break
        edges = sorted(set(edges) | set(thin))
        flow = _solve(profile, conditions, panelling, height, edges)
    return flow


def _solve(profile, conditions, panelling, height, edges):
    pts = panelling.points
    return solve_profile_flow(
        pts,
        speed=conditions.speed,
        nu=conditions.nu,
        ground=conditions.ground,
        kutta_node=(
            None
            if profile.trailing_edge is None
            else int(panelling.node_point[profile.trailing_edge])
        ),
        transition=conditions.transition,
        h_separation=conditions.h_separation,
        edge_points=edges,
        reattach_length=REATTACH_RATIO * height,
        wake_length=WAKE_RATIO * height,
        base_pressure=conditions.base_pressure_model,
        closed_points=closed_points(panelling, height),
        fit_length=FIT_RATIO * height,
        relief=None if conditions.relief_width is None else SideRelief(conditions.relief_width),
    )


def closed_body(profile, conditions, panelling, height):
    """The closed-body pass of :func:`solve_flow` solved and split, its layers not marched (a
    :class:`~profilebench.flow.profile_flow.ClosedBodySplit` on the points that pass uses), or
    None where it fails or where :func:`solve_flow` has no such pass (a Kutta condition: no
    wake model)."""
    if profile.trailing_edge is not None:
        return None
    return closed_body_split(
        panelling.points,
        conditions.ground,
        closed_points(panelling, height),
        edge_points(panelling),
        relief=None if conditions.relief_width is None else SideRelief(conditions.relief_width),
    )


def march_closed(surface_flow, conditions, height, stop_s=None):
    """One surface of :func:`closed_body` marched as :func:`solve_flow`'s closed-body pass marches
    it, up to about ``stop_s`` (m along the surface; None: to its end)."""
    return march_surface_flow(
        surface_flow,
        conditions.nu,
        conditions.speed,
        conditions.transition,
        conditions.h_separation,
        REATTACH_RATIO * height,
        fit_length=FIT_RATIO * height,
        stop_s=stop_s,
    )
