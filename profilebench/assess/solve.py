"""How a panelled profile's flow is set up: the model constants and the flow call.

Shared by :mod:`profilebench.assess.analysis` (the whole analysis) and
:mod:`profilebench.assess.radius_search` (the smallest-attached-radius search, which needs only
the flow and one corner's verdict), so that both solve exactly the same flow.
"""

from __future__ import annotations

import numpy as np

from profilebench.assess.corners import EDGE_TURN_DEG
from profilebench.flow.profile_flow import (
    closed_body_split,
    march_surface_flow,
    solve_profile_flow,
)
from profilebench.flow.underbody import SideRelief

__all__ = [
    "solve_flow",
    "closed_body",
    "march_closed",
    "edge_points",
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
        edge_points=edge_points(panelling),
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
