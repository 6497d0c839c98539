"""Line charts of an analysis: Cp against x, and H and Cf along the surface arc length."""

from __future__ import annotations

import numpy as np

from profilebench.errors import InputError
from profilebench.plotting.profile_view import draw_events
from profilebench.plotting.stations import surface_stations
from profilebench.plotting.style import OKABE_ITO, SURFACE_COLOURS

__all__ = ["draw_cp", "draw_boundary_layer"]


def _stations_or_raise(analysis, what):
    stations = surface_stations(analysis)
    if not stations:
        status = getattr(getattr(analysis, "status", None), "value", "unknown")
        raise InputError(
            f"cannot draw {what}: the analysis has no surface flow (status: {status}; "
            f"{getattr(analysis, 'message', '')}). Fix the profile or conditions and analyse again"
        )
    return {s.name: s for s in stations}


def draw_cp(ax, analysis, *, events=True, legend=True):
    """Cp against x (m) for the upper and lower surfaces, Cp axis inverted (suction up).

    Cp = 1 - (Ue/V)^2 from the inviscid solution (Bernoulli). Event markers sit on the curve of
    their surface at their arc length. Returns {kind: handle} of the event markers drawn.
    """
    st = _stations_or_raise(analysis, "the Cp plot")
    for name, s in st.items():
        ax.plot(s.x, s.cp, color=SURFACE_COLOURS[name], lw=1.4,
                ls="-" if name == "upper" else "--", label=f"{name} surface")
    handles = {}
    if events:
        evs = [e for e in analysis.events if e.surface in st or e.kind == "stagnation"]

        def cp_of(e):
            s = st.get(e.surface) or next(iter(st.values()))
            if e.kind == "stagnation":
                return 1.0  # Cp at a stagnation point (Bernoulli, Ue = 0)
            return float(np.interp(e.s, s.s, s.cp))

        handles = draw_events(ax, evs, y_of=cp_of)
    ax.axhline(0.0, color=OKABE_ITO["black"], lw=0.5)
    if not ax.yaxis_inverted():
        ax.invert_yaxis()
    ax.set_xlabel("x (m)")
    ax.set_ylabel("Cp (axis inverted)")
    ax.grid(True, lw=0.3, alpha=0.6)
    if legend:
        ax.legend(fontsize=7, loc="best")
    return handles


def draw_boundary_layer(ax_h, ax_cf, analysis, *, legend=True):
    """Shape factor H and skin friction Cf against surface arc length s (m) on both surfaces.

    The turbulent separation threshold on H (the conditions' ``h_separation``, default 2.4:
    a common choice within the usual 1.8-2.8 range, Cebeci & Bradshaw 1977) is drawn as a line.
    Stations in separated flow are left out of the curves (the march holds values there).
    """
    st = _stations_or_raise(analysis, "the boundary-layer plots")
    h_sep = float(getattr(getattr(analysis, "conditions", None), "h_separation", 2.4))
    for name, s in st.items():
        colour = SURFACE_COLOURS[name]
        keep = np.ones(len(s.s), dtype=bool)
        if s.regime is not None:
            keep = np.array([r != "separated" for r in s.regime])
        style = "-" if name == "upper" else "--"
        if s.H is not None:
            ax_h.plot(s.s[keep], s.H[keep], color=colour, ls=style, lw=1.3, label=f"{name} surface")
        if s.cf is not None:
            ax_cf.plot(s.s[keep], s.cf[keep], color=colour, ls=style, lw=1.3, label=f"{name} surface")
    ax_h.axhline(h_sep, color=OKABE_ITO["vermillion"], lw=1.0, ls=":",
                 label=f"turbulent separation threshold, H = {h_sep:g} (turbulent layer only)")
    ax_h.set_ylabel("H = delta*/theta")
    ax_cf.set_ylabel("Cf")
    ax_cf.set_xlabel("s from the stagnation point (m)")
    for ax in (ax_h, ax_cf):
        ax.grid(True, lw=0.3, alpha=0.6)
        if legend:
            ax.legend(fontsize=7, loc="best")
