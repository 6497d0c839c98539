"""The analysis pipeline: profile and conditions in, everything the user asks about out.

``analyze(profile, conditions)`` validates the outline, panels it, solves the inviscid flow with
ground effect, marches both boundary layers, assesses every corner against the solver and the
empirical r/t table, and estimates the drag. Bad input (an invalid outline given directly by a
script, impossible conditions) raises a :class:`~profilebench.errors.ProfileBenchError` only for
wrong *types*; an outline that fails its validity check or a solver that fails comes back as an
:class:`Analysis` whose ``status`` and ``message`` say what happened, so an editor can show the
message mid-drag without catching anything.
"""

from __future__ import annotations

import math
import time

import numpy as np

from profilebench.assess.conditions import Conditions
from profilebench.assess.corners import (
    SEPARATION_KINDS,
    all_spans,
    assess_corners,
    corner_regions,
    corners_needing_floor,
)
from profilebench.assess.drag import estimate_drag
from profilebench.assess.radius_search import cached_radius_search, nearby_radius_search
from profilebench.assess.results import Analysis, AnalysisStatus, FlowEvent, FlowEventKind
from profilebench.assess.solve import REATTACH_RATIO, edge_points, solve_flow
from profilebench.errors import InputError, ProfileBenchError
from profilebench.geometry import Profile, measure, panelize, validate

__all__ = ["analyze", "REATTACH_RATIO", "NEARBY_SHIFT_RATIO", "SEARCH_MODES", "RE_MIN", "CD_MAX"]

# ``analyze(..., searches="nearby")`` (the editor during a drag) takes a corner's smallest attached
# radius from a cached search on an outline whose nodes all lie within this many frontal heights
# of this one's (otherwise the same nodes, radii and conditions), instead of searching again (a
# choice of this project for a live display, no source; the result is marked provisional).
NEARBY_SHIFT_RATIO = 0.1
SEARCH_MODES = ("run", "nearby")

# The boundary-layer methods hold above this Reynolds number on the section's larger extent
# (length or height): Michel's transition criterion was fitted to data for 1e5 < Re_x < 4e7
# (Cebeci & Bradshaw, Momentum Transfer in Boundary Layers, 1977, on Michel 1951: from memory),
# and below it the layer of a road-vehicle section would be laminar over lengths where
# Thwaites' and Head's methods give no transition at all. A section below it is refused as bad
# input (raise the speed).
RE_MIN = 1e5

# A two-dimensional section's Cd (on its frontal height) above this is implausible: the highest
# two-dimensional drag coefficients in the handbooks are about 2.0 for a flat plate normal to the
# stream (Fage & Johansen 1927), 2.1-2.2 for a sharp-edged square section (Delany & Sorensen,
# NACA TN 3038, 1953) and about 2.3 for a half-tube with its open side upstream (Hoerner,
# Fluid-Dynamic Drag, 1965, ch. 3, from memory); 3.0 leaves room for the corner corrections.
CD_MAX = 3.0


def _plausibility(drag):
    """The reason the drag estimate fails a physical check, or None.

    Checks: every part finite; Cd >= 0 and <= CD_MAX; skin friction >= 0 (the layer drags the
    body downstream; a negative sum means the surfaces were marched against the flow); base drag
    >= 0 (the separated part of the outline faces downstream; a negative sum means the "wake"
    covers a face that looks upstream, the layer having left the body at its front).
    """
    numbers = [drag.cd, drag.cl, drag.cd_friction, drag.cd_pressure, drag.cd_base]
    parts = (
        f"friction {drag.cd_friction:.4g}, pressure {drag.cd_pressure:.4g}, base "
        f"{drag.cd_base:.4g}, corners {drag.cd_corners:.4g}"
    )
    if not _finite(numbers):
        return "the drag estimate is not finite"
    if drag.cd < 0.0:
        return f"Cd = {drag.cd:.4g} is negative ({parts})"
    if drag.cd > CD_MAX:
        return (
            f"Cd = {drag.cd:.4g} exceeds {CD_MAX:g}, more than any two-dimensional section "
            f"is known to have ({parts})"
        )
    if drag.cd_friction < 0.0:
        return f"the skin friction sums to {drag.cd_friction:.4g}, against the flow ({parts})"
    if drag.cd_base < 0.0:
        return (
            f"the base drag is {drag.cd_base:.4g}: the separated part of the outline faces "
            f"upstream ({parts})"
        )
    return None


def _panelling_failure(profile, conditions, exc):
    """An Analysis for a panel count that cannot put a panel end on every sharp node."""
    from profilebench.assess.conditions import PANELS_RANGE
    from profilebench.geometry.outline import canonical_outline

    outline = canonical_outline(profile)
    sharp = len(outline.sharp_edges)
    # as the panelling counts them: the sections start at the outline's start and at each edge
    need = int(np.unique(np.concatenate([[0.0], [e.s for e in outline.sharp_edges]])).size)
    if need <= PANELS_RANGE[1]:
        advice = (
            f"give at least {need} panels (about {min(2 * need, PANELS_RANGE[1])} for "
            "usable results)"
        )
    else:
        advice = (
            f"the outline has {sharp} sharp nodes, more than the {PANELS_RANGE[1]} panels "
            "allowed: make the nodes of smooth stretches smooth (or simplify the outline) "
            "so that fewer sharp nodes remain"
        )
    return Analysis(
        AnalysisStatus.PANELLING_FAILED,
        f"{conditions.panels} panels cannot resolve this outline ({exc}); {advice}",
        profile,
        conditions,
    )


def _check_args(profile, conditions):
    if not isinstance(profile, Profile):
        raise InputError(f"profile must be a profilebench Profile, got {type(profile).__name__}")
    if not isinstance(conditions, Conditions):
        raise InputError(
            f"conditions must be a profilebench Conditions, got {type(conditions).__name__}"
        )


def _events(flow):
    """The flow events for the user. A separation after which the layer reattaches (the march
    restarted turbulent behind it: a corner bubble) is a "bubble_separation", drawn with its own
    marker, so that it is not read as the final separation."""
    events = []
    for sfl in flow.surfaces:
        sf = sfl.surface
        s_arr = np.asarray(sf.s)
        restarts = [float(r.s) for r in sfl.restarts]
        for e in sfl.bl.events:
            x = float(np.interp(e.s, s_arr, sf.x))
            y = float(np.interp(e.s, s_arr, sf.y))
            kind, detail = FlowEventKind(e.kind), str(e.detail)
            if kind in SEPARATION_KINDS and any(abs(float(e.s) - r) <= 1e-9 for r in restarts):
                detail = (
                    f"{kind.replace('_', ' ')}: {detail}; the layer reattaches behind it "
                    "(the march restarts turbulent)"
                )
                kind = FlowEventKind.BUBBLE_SEPARATION
            events.append(
                FlowEvent(kind=kind, surface=sfl.name, s=float(e.s), x=x, y=y, detail=detail)
            )
    st = flow.upper.surface.stagnation
    events.insert(
        0,
        FlowEvent(
            kind=FlowEventKind.STAGNATION,
            surface="",
            s=0.0,
            x=float(st[0]),
            y=float(st[1]),
            detail="front stagnation point",
        ),
    )
    return tuple(events)


def _relief_note(conditions, flow):
    """What the underbody side relief did, for the notes (None in free air)."""
    if not conditions.ground:
        return None
    if not conditions.side_relief:
        return (
            "underbody side relief switched off: the underbody pressures and the lift are the 2D "
            "section's"
        )
    if conditions.width is None:
        return (
            "no vehicle width given: the underbody pressures and the lift are the 2D section's "
            "(no side relief), which overstates the underbody suction; give the width to have "
            "the gap flow leak sideways"
        )
    return None if flow.underbody is None else flow.underbody.note()


def _finite(analysis_numbers):
    return all(v is None or math.isfinite(v) for v in analysis_numbers)


def analyze(profile, conditions=None, thickness=None, table=None, searches="run"):
    """Analyse ``profile`` at ``conditions``.

    Parameters
    ----------
    profile : Profile
    conditions : Conditions, optional (defaults: 30 m/s, sea-level ISO 2533 air, ground on)
    thickness : float, optional
        Reference thickness t (m) of every corner's r/t; default the frontal height h.
    table : RtTable, optional
        The empirical r/t table to use; default the built-in table chosen by Reynolds number.
    searches : {"run", "nearby"}
        How a corner with a corner bubble gets the smallest attached radius that its drag
        correction needs. "run" (default): from the search cache, or searched now (about ten
        solves). "nearby" (an editor during a drag): a cached search of that corner on an outline
        whose nodes are all within ``NEARBY_SHIFT_RATIO`` frontal heights of this one's is used
        instead of searching; such corners are listed in ``Analysis.provisional`` with a warning,
        and an analysis with "run" gives the exact answer.

    Returns
    -------
    Analysis
        ``status`` SUCCESS with every result, or a failure status with a message saying what to
        fix (an invalid outline) or what failed (the solver).
    """
    from profilebench.assess import tables as _tables

    conditions = Conditions() if conditions is None else conditions
    _check_args(profile, conditions)
    if not isinstance(searches, str) or searches not in SEARCH_MODES:
        raise InputError(f"searches is {searches!r}; give one of {', '.join(SEARCH_MODES)}")
    t0 = time.perf_counter()
    timings = {}
    try:
        validate(profile, ground=conditions.ground)
    except ProfileBenchError as exc:
        return Analysis(AnalysisStatus.INVALID_GEOMETRY, str(exc), profile, conditions)
    m = measure(profile)
    height = m.height
    t_ref = height if thickness is None else float(thickness)
    if not (math.isfinite(t_ref) and t_ref > 0):
        raise InputError(f"thickness {thickness!r} must be a positive length in metres")
    # on the section's larger extent: its length, or its height for a section standing across
    # the stream (a plate normal to it), along which its front layer runs
    extent = max(m.length, m.height)
    re_l = conditions.reynolds(extent)
    if not re_l >= RE_MIN:
        v_min = RE_MIN * conditions.nu / extent
        raise InputError(
            f"the section Reynolds number on its larger extent ({extent:.3g} m) is {re_l:.3g} at "
            f"{conditions.speed:.3g} m/s, below {RE_MIN:.0e}, where the boundary-layer methods "
            f"hold (Michel's transition criterion was fitted above it); give a speed of at least "
            f"{v_min:.3g} m/s (or a larger outline)"
        )
    try:
        panelling = panelize(profile, conditions.panels)
    except InputError as exc:
        return _panelling_failure(profile, conditions, exc)
    timings["geometry"] = time.perf_counter() - t0

    t1 = time.perf_counter()
    try:
        flow = solve_flow(profile, conditions, panelling, height)
    except ProfileBenchError as exc:
        # the solver refused what it built itself (a surface too short to march, say): not the
        # user's input, so a failed analysis with what to try
        return Analysis(
            AnalysisStatus.BOUNDARY_LAYER_FAILED,
            f"the flow solution failed on this outline at {conditions.panels} panels "
            f"({exc}); try another panel count (say {conditions.panels + 50}) or "
            "larger radii at the tightest corners",
            profile,
            conditions,
            m,
            panelling,
        )
    timings["flow"] = time.perf_counter() - t1
    if not flow.success:
        status = {
            "INVISCID_FAILED": AnalysisStatus.INVISCID_FAILED,
            "BASE_PRESSURE_FAILED": AnalysisStatus.BASE_PRESSURE_FAILED,
        }.get(flow.status.name, AnalysisStatus.BOUNDARY_LAYER_FAILED)
        return Analysis(status, flow.message, profile, conditions, m, panelling, flow)

    t2 = time.perf_counter()
    re_t = conditions.reynolds(t_ref)
    warnings = []
    flagged = False
    if table is None:
        table, flagged = _tables.select_table(re_t, _tables.builtin_tables())
        if flagged:
            warnings.append(
                f"no built-in r/t table covers Re = {re_t:.3g} (on t = {t_ref * 1e3:.0f} mm); "
                f"'{table.name}' is used outside its Reynolds range"
            )
    searches_done = []
    attached_ratios = {}
    spans = all_spans(panelling, height)
    regions = corner_regions(panelling, flow, spans)
    provisional = []
    for node in corners_needing_floor(panelling, flow, spans, regions=regions):
        near = None
        if searches == "nearby":
            near = nearby_radius_search(
                profile, conditions, node, thickness=thickness, within=NEARBY_SHIFT_RATIO * height
            )
        if near is None:
            search = cached_radius_search(profile, conditions, node, thickness=thickness)
        else:
            search, shift = near
            if shift > 0.0:
                provisional.append(node)
                warnings.append(
                    f"corner {node}: smallest attached radius taken from a nearby outline (nodes "
                    f"up to {shift * 1e3:.1f} mm away), not searched for this one; its drag "
                    "correction is provisional until the outline is analysed again with the search"
                )
        searches_done.append(search)
        if search.radius is not None:
            attached_ratios[node] = search.radius / t_ref
        elif search.status.name == "NONE_FITS":
            attached_ratios[node] = search.largest_fitting / t_ref
        else:
            warnings.append(
                f"corner {node}: {search.message}; its drag correction uses the table's own floor"
            )
    timings["radius_search"] = time.perf_counter() - t2
    corners = assess_corners(
        profile,
        panelling,
        flow,
        t_ref,
        table=table,
        table_flagged=flagged,
        attached_ratios=attached_ratios,
        spans=spans,
        regions=regions,
    )
    relief_note = _relief_note(conditions, flow)
    relieved = flow.underbody is not None and flow.underbody.applied
    if relief_note is not None and not relieved:
        warnings.append(relief_note)
    notes = (relief_note,) if relieved else ()
    if flow.base_estimate is not None:  # the base pressure from the layers at separation
        notes += (flow.base_estimate.note(),)
    drag = estimate_drag(
        flow,
        conditions,
        height,
        corner_penalties=[c.delta_cd for c in corners],
        edge_points=edge_points(panelling),
        notes=notes,
    )
    timings["assess"] = time.perf_counter() - t2
    timings["total"] = time.perf_counter() - t0
    events = _events(flow)
    reason = _plausibility(drag)
    if reason is not None:
        return Analysis(
            AnalysisStatus.IMPLAUSIBLE,
            f"{reason}; the analysis is not a result. This is a failure of the "
            f"solver on this outline, not of your input: try another panel count "
            f"(say {min(conditions.panels * 2, 2000)}), rounder corners, or a "
            "different trailing-edge setting",
            profile,
            conditions,
            m,
            panelling,
            flow,
        )
    return Analysis(
        status=AnalysisStatus.SUCCESS,
        message="analysis complete",
        profile=profile,
        conditions=conditions,
        measures=m,
        panelling=panelling,
        flow=flow,
        corners=corners,
        drag=drag,
        events=events,
        reynolds=conditions.reynolds(m.length),
        model_reynolds=conditions.model_reynolds(m.length),
        warnings=tuple(warnings),
        radius_searches=tuple(searches_done),
        provisional=tuple(provisional),
        timings=timings,
    )
