"""Validity of a profile: every problem found, each with what to fix.

:func:`explain` lists every problem (an empty list means the profile is valid); :func:`validate`
raises the first one as a :class:`~profilebench.errors.GeometryError` subclass. Simplicity of the
outline is checked with shapely (``shapely.is_valid_reason`` on the polygon of the built
outline, sampled densely).
"""

from __future__ import annotations

import re

import numpy as np
import shapely
from scipy.spatial import cKDTree

from profilebench.errors import GeometryError, GroundContactError, SelfIntersectionError
from profilebench.geometry.outline import build_outline, canonical_outline, node_description
from profilebench.geometry.polyline import signed_area

__all__ = ["validate", "explain", "problems", "NEAR_COINCIDENT"]

NEAR_COINCIDENT = 1e-5  # nodes closer than this fraction of the profile size count as coincident
_SAMPLES = 2000
_LOC = re.compile(r"\[\s*([-+0-9.eE]+)\s+([-+0-9.eE]+)")


def _mm(v: float) -> str:
    """A length in m as mm with one decimal, without a '-0.0'."""
    return f"{round(v * 1e3, 1) + 0.0:.1f}"


def _intersection_error(where: str, reason: str) -> SelfIntersectionError:
    m = _LOC.search(reason)
    loc = (float(m.group(1)), float(m.group(2))) if m else None
    at = f" at ({_mm(loc[0])}, {_mm(loc[1])}) mm" if loc else ""
    return SelfIntersectionError(
        f"the {where} crosses itself{at} ({reason.split('[')[0].strip().lower()}); move the nodes "
        "there so the outline does not cross itself, or reorder the nodes so they run round the "
        "outline in order",
        location=loc,
    )


# smallest non-zero corner radius, as a fraction of the profile's size
MIN_RADIUS_RATIO = 1e-7


def problems(profile, ground: bool = False) -> list[GeometryError]:
    """Every problem of ``profile`` as a GeometryError (not raised), in checking order."""
    out: list[GeometryError] = []
    nodes = profile.nodes
    n = len(nodes)
    if n < 3:
        out.append(
            GeometryError(
                f"the profile has {n} node(s); a closed outline needs at least 3 nodes: add nodes"
            )
        )
        return out
    xy = np.array(profile.xy, float)
    size = float(np.max(np.ptp(xy, axis=0)))
    tol = NEAR_COINCIDENT * max(size, 1e-3)
    pairs = sorted(cKDTree(xy).query_pairs(tol))
    for i, j in pairs:
        d = float(np.hypot(*(xy[i] - xy[j])))
        out.append(
            GeometryError(
                f"{node_description(profile, i)} and {node_description(profile, j)} coincide or "
                f"nearly so ({d * 1e3:.3g} mm apart, less than {tol * 1e3:.3g} mm); delete one of "
                "them or move it"
            )
        )
    if pairs:
        return out
    # a radius this small cannot be panelled (its arc would be shorter than the rounding error of
    # the node positions); it is refused, never silently taken as sharp
    smallest = MIN_RADIUS_RATIO * max(size, 1e-3)
    for i, nd in enumerate(nodes):
        if 0.0 < nd.radius < smallest:
            out.append(
                GeometryError(
                    f"the corner radius {nd.radius:.3g} m at {node_description(profile, i)} is too "
                    f"small to build (below {smallest * 1e3:.2g} mm); set the radius to 0 for a sharp "
                    "edge or give at least that"
                )
            )
    if out:
        return out
    area = signed_area(xy)
    spread = np.linalg.svd(xy - xy.mean(axis=0), compute_uv=False)
    if spread[-1] <= 1e-9 * max(size, 1e-3):
        out.append(
            GeometryError(
                f"the nodes enclose no area (they are collinear or fold back on themselves, area "
                f"{abs(area) * 1e6:.3g} mm^2); move nodes off the line so they enclose the profile"
            )
        )
        return out
    poly = shapely.Polygon(xy)
    if not shapely.is_valid(poly):
        out.append(_intersection_error("polygon through the nodes", shapely.is_valid_reason(poly)))
    elif abs(area) <= 1e-9 * max(size, 1e-3) ** 2:
        out.append(
            GeometryError(
                f"the nodes enclose almost no area ({abs(area) * 1e6:.3g} mm^2); move nodes apart so "
                "they enclose the profile"
            )
        )
        return out
    try:
        # the canonical order's outline is the same curve, and the one the panelling uses
        outline = canonical_outline(profile)
    except GeometryError:
        try:
            outline = build_outline(profile)  # its error names the profile's own nodes
        except GeometryError as exc:
            out.append(exc)
            outline = None
    if outline is not None:
        if not out:
            pts = outline.sample(_SAMPLES)
            # include every node on the outline so sharp edges are not cut by the sampling
            ring = shapely.Polygon(pts)
            if not shapely.is_valid(ring):
                out.append(
                    _intersection_error(
                        "built outline (with its fillets and splines)",
                        shapely.is_valid_reason(ring),
                    )
                )
        if ground:
            ext = outline.extreme_points()
            k = int(np.argmin(ext[:, 1]))
            low = ext[k]
            if low[1] <= 0.0:
                out.append(
                    GroundContactError(
                        f"with the ground on, the profile must lie above y = 0, but its lowest point "
                        f"at ({_mm(low[0])}, {_mm(low[1])}) mm touches or lies below the "
                        f"ground; raise the profile "
                        + (
                            f"by more than {-low[1] * 1e3:.1f} mm"
                            if low[1] < -5e-5
                            else "clear of y = 0"
                        )
                        + " (or turn the "
                        "ground off)"
                    )
                )
    te = profile.trailing_edge
    if te is not None:
        nd = nodes[te]
        if nd.smooth or nd.radius > 0:
            kind = "smooth" if nd.smooth else f"rounded (radius {nd.radius * 1e3:.1f} mm)"
            out.append(
                GeometryError(
                    f"the trailing edge {node_description(profile, te)} is {kind}; a Kutta condition "
                    "needs a sharp edge: set its radius to 0 and make it a corner, or clear "
                    "trailing_edge"
                )
            )
    return out


def explain(profile, ground: bool = False) -> list[str]:
    """Every problem of ``profile`` as a message saying what to fix; empty if it is valid."""
    return [str(e) for e in problems(profile, ground=ground)]


def validate(profile, ground: bool = False) -> None:
    """Raise the first problem of ``profile`` (a GeometryError subclass); return None if valid."""
    found = problems(profile, ground=ground)
    if found:
        raise found[0]
