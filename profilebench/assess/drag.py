"""Section drag estimate with its breakdown.

The model (a screening model for a 2D section; trust differences between variants more than
absolute values):

- **Friction**: the boundary layer's skin friction on the attached stations, tau = 1/2 rho Ue^2 Cf,
  projected on the free-stream direction: Cd_f = sum(Cf ue^2 t_x ds) / h, with t_x the x component
  of the unit vector along the flow at the station.
- **Pressure**: the inviscid Cp on every station that is not in the wake, Cd_p = -sum(Cp n_x ds)/h
  (n the outward normal). The panel on which the layer leaves the surface counts attached up to
  the separation point and in the wake behind it (``ProfileFlow.attached``). Corner bubbles that reattach keep their inviscid Cp: their drag is in
  the corner correction, so it is not counted twice.
- **Base**: behind each surface's final separation point the pressure is taken constant at the
  base-pressure coefficient Cp_b (Conditions.base_pressure; square-back vehicles
  -0.15 to -0.3, Roshko, NACA TN 3169, 1954, and later compilations: from memory; or, with
  Conditions.base_model, found from the boundary layer at the two final separation points through
  Hoerner's blunt-base correlation, profilebench.flow.base_pressure),
  Cd_b = -Cp_b * sum(n_x ds)/h over the wake stations. This is the
  usual free-streamline picture: a dead-air region of uniform pressure behind separation
  (Roshko 1954 relates Cp_b to the wake's speed parameter k = sqrt(1 - Cp_b)).
- **Corners**: for each corner the solver finds separated whose layer then reattaches (a corner
  bubble), the empirical table's penalty curve, cd(r/t) - cd(floor), times the table's share per
  corner. The penalty vanishes once the solver finds the corner attached, so the solver places the
  knee and the table gives the magnitude.

Lift: Cl = -sum(Cp_eff n_y ds)/h on the same reference (caution: a 2D section over a slip ground
overstates ground-effect lift; the sign and trend matter, not the value).
"""

from __future__ import annotations

import numpy as np

from profilebench.assess.forces import cda as _cda, drag_force, drag_power
from profilebench.assess.results import DragBreakdown

__all__ = ["estimate_drag"]


# Within this many frontal heights of a sharp convex edge (along the outline, either side) the
# pressure in the force integrals is held at no lower than its value at that distance: the
# inviscid suction is singular at a sharp edge (Cp -> -infinity as d^(-2/3) at a right-angled
# edge) while the real layer separates there and the pressure stays finite. Without the cap the
# suction's integral grew with every refinement and a sharp-edged square section's Cd fell from
# 0.57 to 0.40 between 125 and 1000 panels (measured). A choice of this project, no source.
SHARP_EDGE_CAP_RATIO = 0.02


def capped_cp(inviscid, edge_points, height):
    """Cp of each panel with the suction near the sharp edges capped (see SHARP_EDGE_CAP_RATIO).

    ``edge_points``: panel point indices of the sharp convex edges. Returns a new array.
    """
    cp = np.array(inviscid.cp, dtype=float)
    if not len(edge_points):
        return cp
    lengths = np.asarray(inviscid.panel_length, dtype=float)
    perim = float(lengths.sum())
    point_sigma = np.concatenate([[0.0], np.cumsum(lengths)[:-1]])
    mid = point_sigma + 0.5 * lengths
    delta = SHARP_EDGE_CAP_RATIO * height
    for k in edge_points:
        e = float(point_sigma[int(k)])
        ahead = np.mod(e - mid, perim)  # distance before the edge (panels ending at it)
        behind = np.mod(mid - e, perim)  # distance after it
        for dist, sign in ((ahead, -1.0), (behind, 1.0)):
            near = dist < delta
            if not near.any():
                continue
            ref = float(np.interp(np.mod(e + sign * delta, perim), mid, cp, period=perim))
            cp[near] = np.maximum(cp[near], ref)
    return cp


def estimate_drag(flow, conditions, height, corner_penalties=(), notes=(), edge_points=()):
    """Drag and lift of a section from its flow solution.

    Parameters
    ----------
    flow : profilebench.flow.profile_flow.ProfileFlow
        A successful flow solution; its inviscid part carries the panel lengths, outward normals
        and tangents used here.
    conditions : profilebench.assess.conditions.Conditions
    height : float
        Reference height h (m): the profile's frontal height.
    corner_penalties : sequence of float
        Drag-coefficient corrections of the corners (already on h).
    edge_points : sequence of int
        Panel point indices of the sharp convex edges, near which the suction is capped (see
        SHARP_EDGE_CAP_RATIO).
    """
    inv = flow.inviscid
    lengths = np.asarray(inv.panel_length, dtype=float)
    normal = np.asarray(inv.normal, dtype=float)
    tangent = np.asarray(inv.tangent, dtype=float)
    cp = capped_cp(inv, edge_points, height)
    ue = np.asarray(inv.ue, dtype=float)
    wake = np.asarray(flow.separated, dtype=bool)
    # attached share of each panel: 1 or 0, except on the panel where the layer leaves the surface
    share = (
        np.asarray(flow.attached, dtype=float)
        if flow.attached is not None
        else (~wake).astype(float)
    )
    # the base pressure the flow used: the constant given, or the one found from the layers at
    # separation (Conditions.base_model)
    cp_base = float(conditions.base_pressure if flow.base_pressure is None else flow.base_pressure)

    # friction on attached stations, along the local flow direction (sign of ue along points)
    cf = np.zeros(len(cp))
    for k, sfl in enumerate(flow.surfaces):
        on = flow.station_surface == k
        cf[on] = np.asarray(sfl.bl.cf, dtype=float)[flow.station_bl[on]]
    flow_dir_x = np.sign(ue) * tangent[:, 0]
    cd_f = float(np.sum(share * cf * ue**2 * flow_dir_x * lengths)) / height

    cd_p = float(-np.sum(share * cp * normal[:, 0] * lengths)) / height
    cd_b = float(-cp_base * np.sum((1.0 - share) * normal[:, 0] * lengths)) / height
    cd_c = float(np.sum(corner_penalties)) if len(corner_penalties) else 0.0
    cp_eff = share * cp + (1.0 - share) * cp_base
    cl = float(-np.sum(cp_eff * normal[:, 1] * lengths)) / height
    cd = cd_f + cd_p + cd_b + cd_c

    area = conditions.reference_area(height)
    if area is not None and np.isfinite(cd) and cd >= 0.0:  # else the analysis fails it
        cda_value = float(_cda(cd, area))
        force = float(drag_force(cd, area, conditions.rho, conditions.speed))
        power = float(drag_power(force, conditions.speed))
    else:
        cda_value = force = power = None
    return DragBreakdown(
        cd_friction=cd_f,
        cd_pressure=cd_p,
        cd_base=cd_b,
        cd_corners=cd_c,
        cd=cd,
        cl=cl,
        reference_height=float(height),
        reference_area=area,
        cda=cda_value,
        force=force,
        power=power,
        base_pressure=cp_base,
        notes=tuple(notes),
    )
