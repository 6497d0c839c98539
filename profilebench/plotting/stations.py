"""Read-outs of an analysis for drawing and export: outline, surface stations, events.

These helpers only read the public result types (:class:`profilebench.assess.results.Analysis`,
whose ``flow`` is a :class:`profilebench.flow.profile_flow.ProfileFlow`) and a bare
:class:`profilebench.geometry.profile.Profile`; they compute no physics.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass

import numpy as np

from profilebench.assess.results import Analysis
from profilebench.errors import InputError
from profilebench.geometry.profile import Profile

__all__ = [
    "Outline2D",
    "SurfaceStations",
    "outline_of",
    "surface_stations",
    "regime_name",
    "is_analysis",
]


@dataclass(frozen=True)
class Outline2D:
    """A closed outline to draw (m): points in order, first not repeated; where it came from."""

    x: np.ndarray
    y: np.ndarray
    source: str  # "panel stations", "panel points" or "nodes"


@dataclass(frozen=True)
class SurfaceStations:
    """One surface's stations in marching order, with its inviscid and boundary-layer values (SI)."""

    name: str
    index: np.ndarray  # into the inviscid arrays
    s: np.ndarray  # arc length from the stagnation point, m
    x: np.ndarray
    y: np.ndarray
    ue: np.ndarray  # edge speed / free-stream speed (magnitude)
    cp: np.ndarray
    theta: np.ndarray | None
    delta_star: np.ndarray | None
    H: np.ndarray | None
    cf: np.ndarray | None
    regime: tuple[str, ...] | None


def is_analysis(obj) -> bool:
    """True for an :class:`~profilebench.assess.results.Analysis`."""
    return isinstance(obj, Analysis)


def _panel_points(profile):
    try:
        from profilebench.geometry.panelling import panelize  # written in geometry/
    except ImportError:
        return None
    try:
        return np.asarray(panelize(profile).points, dtype=float)
    except Exception:  # an invalid outline still draws from its nodes
        return None


def outline_of(obj) -> Outline2D:
    """The outline of an Analysis (its panel stations) or a Profile (panel points, else nodes).

    Raises
    ------
    InputError
        If ``obj`` is neither an Analysis nor a Profile.
    """
    if is_analysis(obj):
        inv = obj.flow.inviscid if obj.flow is not None else None
        if inv is not None:
            return Outline2D(np.asarray(inv.x, float), np.asarray(inv.y, float), "panel stations")
        if obj.panelling is not None:
            pts = np.asarray(obj.panelling.points, float)
            return Outline2D(pts[:, 0], pts[:, 1], "panel points")
        obj = obj.profile
    if isinstance(obj, Profile):
        pts = _panel_points(obj)
        if pts is not None:
            return Outline2D(pts[:, 0], pts[:, 1], "panel points")
        xy = np.asarray(obj.xy, dtype=float)
        if len(xy) < 3:
            raise InputError(
                f"profile {obj.name!r} has {len(xy)} nodes; an outline needs at least 3 to draw"
            )
        return Outline2D(xy[:, 0], xy[:, 1], "nodes")
    raise InputError(
        f"cannot draw a {type(obj).__name__}; give a profilebench Profile or an Analysis from "
        "profilebench.assess.analysis.analyze"
    )


def regime_name(value) -> str:
    """A boundary-layer regime (a :class:`~profilebench.flow.boundary_layer.Regime`, another
    Enum, or a string) as a lower-case word."""
    if isinstance(value, enum.Enum):
        value = value.name if isinstance(value.value, (int, np.integer)) else value.value
    return str(value).lower()


def _aligned(arr, offset, n):
    """Stations ``offset`` to ``offset + n`` of a boundary-layer array, or None."""
    if arr is None:
        return None
    arr = np.asarray(arr)
    if arr.ndim != 1 or len(arr) < offset + n:
        return None
    return arr[offset : offset + n]


def surface_stations(analysis) -> tuple[SurfaceStations, ...]:
    """The upper and lower surfaces of an analysis, aligned station by station.

    The boundary-layer arrays may start with an extra station at the stagnation point itself
    (not an inviscid station); they are aligned from the end, as
    :func:`profilebench.flow.profile_flow.solve_profile_flow` does. Returns () when the analysis has
    no surface flow (e.g. a failed analysis).
    """
    flow = analysis.flow
    if flow is None or flow.inviscid is None:
        return ()
    inv = flow.inviscid
    cp_all = np.asarray(inv.cp, dtype=float)
    out = []
    for name, sf in (("upper", flow.upper), ("lower", flow.lower)):
        if sf is None:
            continue
        surf = sf.surface
        idx = np.asarray(surf.index, dtype=int)
        n = len(idx)
        s = np.asarray(surf.s, dtype=float)
        s = s[len(s) - n :] if len(s) >= n else s
        bl = sf.bl
        offset = 0
        if bl is not None and bl.s is not None:
            offset = max(0, len(np.asarray(bl.s)) - n)
        arrays = dict.fromkeys(("theta", "delta_star", "H", "cf"))
        if bl is not None:
            arrays = {
                "theta": _aligned(bl.theta, offset, n),
                "delta_star": _aligned(bl.delta_star, offset, n),
                "H": _aligned(bl.H, offset, n),
                "cf": _aligned(bl.cf, offset, n),
            }
        regime = None
        if bl is not None and bl.regime is not None:
            reg = list(bl.regime)
            if len(reg) >= offset + n:
                regime = tuple(regime_name(r) for r in reg[offset : offset + n])
        out.append(
            SurfaceStations(
                name=name,
                index=idx,
                s=s,
                x=np.asarray(inv.x, float)[idx],
                y=np.asarray(inv.y, float)[idx],
                ue=np.abs(np.asarray(inv.ue, float)[idx]),
                cp=cp_all[idx],
                theta=arrays["theta"],
                delta_star=arrays["delta_star"],
                H=arrays["H"],
                cf=arrays["cf"],
                regime=regime,
            )
        )
    return tuple(out)
