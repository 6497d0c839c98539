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
        raise InputError(
            f"cannot draw {what}: the analysis has no surface flow (status: "
            f"{analysis.status.value}; {analysis.message}). Fix the profile or conditions and "
            "analyse again"
        )
    return {s.name: s for s in stations}


def draw_cp(ax, analysis, *, events=True, legend=True):
    """Cp against x (m) for the upper and lower surfaces, Cp axis inverted (suction up).

    Cp = 1 - (Ue/V)^2 from the inviscid solution (Bernoulli). Event markers sit on the curve of
    their surface at their arc length. Returns {kind: handle} of the event markers drawn.
    """
    st = _stations_or_raise(analysis, "the Cp plot")
    for name, s in st.items():
        ax.plot(
            s.x,
            s.cp,
            color=SURFACE_COLOURS[name],
            lw=1.4,
            ls="-" if name == "upper" else "--",
            label=f"{name} surface",
        )
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


#: the shape-factor axis: laminar H reaches about 3.5 at Thwaites' separation (lambda = -0.09,
#: Cebeci & Bradshaw's fits) and a bubble bursts at 3.5; beyond 4 the curve is clipped
H_AXIS = (1.0, 4.0)
#: gid of the legend entries that say a curve is clipped
CLIP_NOTE_GID = "clip-note"


def _clip_note(ax, what):
    """Say in the axes' legend (off the data) that a curve is clipped."""
    ax.plot([], [], ls="none", label=what, gid=CLIP_NOTE_GID)


def draw_boundary_layer(ax_h, ax_cf, analysis, *, legend=True):
    """Shape factor H and skin friction Cf against surface arc length s (m) on both surfaces.

    The turbulent separation threshold on H (the conditions' ``h_separation``, default 2.4:
    a common choice within the usual 1.8-2.8 range, Cebeci & Bradshaw 1977) is drawn as a line.
    Stations in separated flow are left out of the curves (the march holds values there).
    H is shown on :data:`H_AXIS` and Cf up to twice its 90th percentile (the stagnation point's
    Cf is singular): a curve beyond the axis is clipped and its legend says so.
    The legend sits right of the axes, off the data.
    """
    st = _stations_or_raise(analysis, "the boundary-layer plots")
    h_sep = float(analysis.conditions.h_separation)
    h_all, cf_all = [], []
    for name, s in st.items():
        colour = SURFACE_COLOURS[name]
        keep = np.ones(len(s.s), dtype=bool)
        if s.regime is not None:
            keep = np.array([r != "separated" for r in s.regime])
        style = "-" if name == "upper" else "--"
        if s.H is not None:
            ax_h.plot(s.s[keep], s.H[keep], color=colour, ls=style, lw=1.3, label=f"{name} surface")
            h_all.append(np.asarray(s.H[keep], float))
        if s.cf is not None:
            ax_cf.plot(
                s.s[keep], s.cf[keep], color=colour, ls=style, lw=1.3, label=f"{name} surface"
            )
            cf_all.append(np.asarray(s.cf[keep], float))
    ax_h.axhline(
        h_sep, color=OKABE_ITO["vermillion"], lw=1.0, ls=":", label=f"H_sep = {h_sep:g} (turbulent)"
    )
    ax_h.set_ylim(*H_AXIS)
    h_max = max((float(np.nanmax(h)) for h in h_all if h.size), default=H_AXIS[0])
    if h_max > H_AXIS[1]:
        _clip_note(ax_h, f"H above {H_AXIS[1]:g} clipped\n(max {h_max:.1f})")
    cf = np.concatenate(cf_all) if cf_all else np.zeros(0)
    cf = cf[np.isfinite(cf)]
    if cf.size:
        top = 2.0 * float(np.percentile(cf, 90))
        if top > 0 and float(cf.max()) > top:
            ax_cf.set_ylim(min(0.0, float(cf.min())), top)
            _clip_note(ax_cf, f"Cf above {top:.3g} clipped\n(max {float(cf.max()):.3g})")
    ax_h.set_ylabel("H")
    ax_cf.set_ylabel("Cf")
    ax_cf.set_xlabel("s from the stagnation point (m)")
    for ax in (ax_h, ax_cf):
        ax.grid(True, lw=0.3, alpha=0.6)
    if legend:
        ax_h.legend(
            fontsize=7,
            loc="upper left",
            bbox_to_anchor=(1.01, 1.0),
            borderaxespad=0.0,
            title="H = delta*/theta",
            title_fontsize=7,
        )
        ax_cf.legend(fontsize=7, loc="upper left", bbox_to_anchor=(1.01, 1.0), borderaxespad=0.0)
