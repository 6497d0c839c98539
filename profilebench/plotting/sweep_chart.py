"""Charts of a study (``profilebench.studies``): Cd and CdA against the swept parameter with the
watched corner's verdict shaded along the axis and the knee and smallest attached radius marked,
and a radius x speed map of Cd.

Drawn from the table's attributes only (no import of the studies package).
"""

from __future__ import annotations

import numpy as np

from profilebench.assess.results import Verdict
from profilebench.plotting.style import CAUTION, OKABE_ITO, SEPARATED_COLOUR

__all__ = ["sweep_figure", "grid_figure", "VERDICT_BANDS", "axis_scale"]

#: (colour, legend text) of the verdict bands, by kind
VERDICT_BANDS = {
    "attached": (OKABE_ITO["bluish_green"], "corner attached"),
    "bubble": (OKABE_ITO["yellow"], "laminar bubble, reattaches"),
    "separated": (OKABE_ITO["vermillion"], "corner separates"),
    "other": (OKABE_ITO["sky_blue"], "concave or in separated flow"),
    "failed": (SEPARATED_COLOUR, "analysis failed"),
}


def axis_scale(parameter):
    """(factor, axis label) that shows a parameter in the units users read: mm, km/h."""
    return {
        "radius": (1e3, "corner radius (mm)"),
        "displacement": (1e3, "node moved (mm)"),
        "speed": (3.6, "speed (km/h)"),
    }[parameter]


def _band_kind(verdict):
    """The band of a point's verdict: a kind of VERDICT_BANDS, None for no band."""
    if verdict is None:
        return "failed"
    if isinstance(verdict, _Unwatched):
        return None
    if verdict is Verdict.ATTACHED:
        return "attached"
    if verdict is Verdict.BUBBLE_REATTACHES:
        return "bubble"
    if isinstance(verdict, Verdict) and verdict.separated:
        return "separated"
    return "other"  # another verdict


def _edges(x):
    """Band edges: halfway between neighbouring points, half a step beyond the ends."""
    x = np.asarray(x, dtype=float)
    mids = 0.5 * (x[1:] + x[:-1])
    return np.concatenate([[x[0] - (mids[0] - x[0])], mids, [x[-1] + (x[-1] - mids[-1])]])


def _shade(ax, x, verdicts, seen):
    edges = _edges(x)
    for i, v in enumerate(verdicts):
        kind = _band_kind(v)
        if kind is None:
            continue
        colour, text = VERDICT_BANDS[kind]
        ax.axvspan(
            edges[i],
            edges[i + 1],
            color=colour,
            alpha=0.22,
            lw=0,
            hatch="//" if kind == "failed" else None,
            label=None if kind in seen else text,
        )
        seen.add(kind)


def _marks(ax, table, scale, legend):
    knee = table.knee
    if knee is not None and knee.found:
        ax.axvline(
            knee.radius * scale,
            color=OKABE_ITO["black"],
            ls="--",
            lw=1.2,
            label=f"knee {knee.radius * 1e3:.0f} mm" if legend else None,
        )
    r = table.smallest_attached_radius if table.parameter == "radius" else None
    if r is not None:
        ax.axvline(
            r * scale,
            color=OKABE_ITO["blue"],
            ls=":",
            lw=1.6,
            label=f"smallest attached r {r * 1e3:.0f} mm" if legend else None,
        )


def sweep_figure(table, title=None, width_in=8.0):
    """A matplotlib Figure (Agg, no pyplot) of a one-parameter sweep: Cd above, CdA below (when
    the conditions give a frontal area or width), the watched corner's verdict per point shaded
    along the axis, the knee and the smallest attached radius as vertical lines, failed points
    hatched grey, and the caution. ``width_in`` (inches) is the figure's width; the title's
    lines are wrapped to it."""
    from matplotlib.figure import Figure

    scale, xlabel = axis_scale(table.parameter)
    x = np.asarray(table.values) * scale
    has_cda = table.cda.count() > 0
    fig = Figure(
        figsize=(width_in, (6.4 if has_cda else 4.4) * width_in / 8.0),
        dpi=110,
        layout="constrained",
    )
    axes = fig.subplots(2 if has_cda else 1, 1, sharex=True, squeeze=False)[:, 0]
    verdicts = table.corner_verdicts() if table.corner is not None else (None,) * len(table)
    # a successful point without the watched corner's verdict (no corner watched, or a smooth
    # node moved) is not shaded; a failed point is hatched
    verdicts = tuple(_Unwatched() if v is None and ok else v for v, ok in zip(verdicts, table.ok))
    seen = set()
    for k, (ax, name, y, label) in enumerate(
        zip(axes, ("cd", "cda"), (table.cd, table.cda), ("Cd (on frontal height)", "CdA (m^2)"))
    ):
        _shade(ax, x, verdicts, seen if k == 0 else set(VERDICT_BANDS))
        ax.plot(
            x,
            y,
            color=OKABE_ITO["black"],
            marker="o",
            ms=4,
            lw=1.3,
            label=name.replace("cd", "Cd", 1) if k == 0 else None,
        )
        _marks(ax, table, scale, legend=(k == 0))
        ax.set_ylabel(label)
        ax.grid(True, lw=0.3, alpha=0.6)
    edges = _edges(x)
    axes[-1].set_xlim(edges[0], edges[-1])
    axes[-1].set_xlabel(xlabel)
    axes[0].legend(fontsize=7, loc="best")
    corner = f"{table.corner_label} (node {table.corner})" if table.corner is not None else ""
    head = title or f"{table.parameter} sweep" + (f", corner {corner}" if corner else "")
    knee = table.knee
    if knee is not None:
        import textwrap

        # about 15 characters of the 8 pt title to an inch
        head += "\n" + "\n".join(textwrap.wrap(knee.message, max(40, int(15 * width_in))))
    axes[0].set_title(head, fontsize=8)
    failed = len(table.failed)
    foot = f"{failed} of {len(table)} points did not succeed (hatched). " if failed else ""
    fig.text(0.01, 0.002, foot + CAUTION, fontsize=6, wrap=True, va="bottom")
    fig.get_layout_engine().set(rect=(0, 0.05, 1, 0.95))
    return fig


class _Unwatched:
    """A stand-in verdict for a successful point without the watched corner's verdict."""

    name = "UNWATCHED"
    separated = False


def grid_figure(grid, title=None):
    """A radius x speed map of Cd (masked cells, failed points, left blank), with each speed's
    knee (triangles) and smallest attached radius (dots) marked, and the caution."""
    from matplotlib.figure import Figure

    fig = Figure(figsize=(8.0, 5.0), dpi=110, layout="constrained")
    ax = fig.subplots()
    r = np.asarray(grid.radii) * 1e3
    v = np.asarray(grid.speeds) * 3.6
    cd = grid.grid("cd")
    mesh = ax.pcolormesh(
        _edges(r) if len(r) > 1 else r,
        _edges(v) if len(v) > 1 else v,
        cd,
        cmap="viridis",
        shading="flat",
    )
    fig.colorbar(mesh, ax=ax, label="Cd (on frontal height)")
    knees = [(k.radius * 1e3, s) for k, s in zip(grid.knees, v) if k is not None and k.found]
    if knees:
        ax.plot(*zip(*knees), "v", color="white", mec="black", ms=9, label="knee")
    small = [
        (row.smallest_attached_radius * 1e3, s)
        for row, s in zip(grid.rows, v)
        if row.smallest_attached_radius is not None
    ]
    if small:
        ax.plot(
            *zip(*small),
            "o",
            color=OKABE_ITO["orange"],
            mec="black",
            ms=7,
            label="smallest attached r",
        )
    if knees or small:
        ax.legend(fontsize=7, loc="upper right")
    ax.set_xlabel("corner radius (mm)")
    ax.set_ylabel("speed (km/h)")
    row = grid.rows[0]
    ax.set_title(title or f"Cd map, corner {row.corner_label} (node {row.corner})", fontsize=9)
    fig.text(0.01, 0.002, CAUTION, fontsize=6, wrap=True, va="bottom")
    fig.get_layout_engine().set(rect=(0, 0.05, 1, 0.95))
    return fig
