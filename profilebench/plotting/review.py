"""A design-review page: annotated profile, Cp plot, summary and corner tables, caution line.

The page is a plain :class:`matplotlib.figure.Figure` with an Agg canvas (no pyplot state).
"""

from __future__ import annotations

import textwrap
from pathlib import Path

from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from profilebench.errors import InputError
from profilebench.plotting.charts import draw_cp
from profilebench.io.export import run_record
from profilebench.plotting.profile_view import CP_FLOOR, draw_profile
from profilebench.plotting.stations import is_analysis
from profilebench.plotting.summary import (
    CORNER_COLUMNS,
    MARGIN_DEFINITION,
    corner_disagreements,
    corner_notes,
    corner_rows,
    run_lines,
    summary_rows,
)
from profilebench.plotting.style import CAUTION

__all__ = [
    "review_figure",
    "baseline_rows",
    "save_figure",
    "IMAGE_FORMATS",
    "image_format",
    "RUN_GID",
    "NOTES_GID",
]

#: gids of the run block's and the notes' texts on the page
RUN_GID = "run-block"
NOTES_GID = "page-notes"

IMAGE_FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}
PAGE_SIZE = (16.5, 11.7)  # inches, about A3 landscape (1980 x 1404 pixels at PAGE_DPI)
PAGE_DPI = 120


def new_figure(size=PAGE_SIZE, dpi=PAGE_DPI) -> Figure:
    """A Figure with its own Agg canvas (so text extents can be measured before saving)."""
    fig = Figure(figsize=size, dpi=dpi)
    FigureCanvasAgg(fig)
    return fig


def _make_table(ax, header, rows, fontsize, col_widths, row_scale=1.25):
    t = ax.table(
        cellText=[list(r) for r in rows],
        colLabels=list(header),
        loc="upper left",
        cellLoc="left",
        colLoc="left",
        colWidths=col_widths,
    )
    t.auto_set_font_size(False)
    t.set_fontsize(fontsize)
    t.scale(1.0, row_scale)
    for (r, _c), cell in t.get_celld().items():
        cell.set_linewidth(0.3)
        if r == 0:
            cell.set_text_props(weight="bold")
    return t


def _table(ax, header, rows, fontsize=8, col_widths=None, bottom=None):
    """A table in the axes; when the rows do not fit above ``bottom`` (display px; default the
    axes' bottom), as many as fit, the last one saying how many were left out (the CLI's
    tables and the JSON hold them all)."""
    ax.axis("off")
    if not rows:
        ax.text(0.0, 0.5, "none", fontsize=fontsize, transform=ax.transAxes)
        return None
    rows = list(rows)
    renderer = ax.figure.canvas.get_renderer()
    if bottom is None:
        bottom = ax.get_window_extent(renderer).y0
    # closer rows, then a smaller font, before any row is left out
    for size, row_scale in ((fontsize, 1.25), (fontsize, 1.0), (fontsize - 1, 0.85)):
        t = _make_table(ax, header, rows, size, col_widths, row_scale)
        if t.get_window_extent(renderer).y0 >= bottom - 1.0:
            return t
        t.remove()
    fontsize, row_scale = fontsize - 1, 0.85
    t = _make_table(ax, header, rows, fontsize, col_widths, row_scale)
    t.get_window_extent(renderer)  # lays the cells out
    cells = t.get_celld()
    fit = sum(
        1
        for (r, c), cell in cells.items()
        if r > 0 and c == 0 and cell.get_window_extent(renderer).y0 >= bottom - 1.0
    )
    t.remove()
    kept = rows[: max(fit - 1, 0)]
    more = f"+ {len(rows) - len(kept)} more (CLI, JSON)"
    return _make_table(
        ax, header, kept + [(more,) + ("",) * (len(header) - 1)], fontsize, col_widths, row_scale
    )


def baseline_rows(analysis, baseline):
    """Summary rows of a baseline analysis against ``analysis``: its Cd and the deltas
    (variant minus baseline, :func:`profilebench.assess.compare.compare`). [] when the baseline
    is a bare profile (no analysis) or either analysis did not succeed."""
    if not (is_analysis(baseline) and baseline.success and analysis.success):
        return []
    from profilebench.assess.compare import compare

    c = compare(baseline, analysis)
    na = "n/a (no frontal area or width)"
    return [
        ("Cd baseline", f"{c.cd_before:.4f}", baseline.profile.name or "baseline"),
        ("delta Cd", f"{c.delta_cd:+.4f}", f"{c.delta_cd_percent:+.2f}% of the baseline"),
        ("delta CdA", na if c.delta_cda is None else f"{c.delta_cda:+.4f}", "m^2"),
        ("delta force", na if c.delta_force is None else f"{c.delta_force:+.2f}", "N"),
    ]


def review_figure(
    analysis, baseline=None, cp_min=CP_FLOOR, created=None, refinement=None, open_radii=()
) -> Figure:
    """A one-page design review of an analysis.

    Parameters
    ----------
    analysis : Analysis
        From :func:`profilebench.assess.analysis.analyze`.
    baseline : Profile or Analysis, optional
        Drawn over the Cp band as a dashed outline with the difference hatched; an Analysis
        also puts its Cd and the delta Cd, CdA and force in the summary.
    cp_min : float
        The lowest Cp of the colour scale (default :data:`CP_FLOOR`, the same on every page so
        that pages can be put side by side).
    created : datetime, optional
        The date the run block states (default: now, UTC).
    refinement : RefinementCheck, optional
        From :func:`profilebench.assess.refinement.check_refinement` on the same profile and
        conditions: the page's notes then start with whether its answers hold when the panels
        are doubled, and what moved.
    open_radii : sequence of OpenRadiusEffect, optional
        From :func:`profilebench.assess.open_radii.open_radius_effects` on a fitted outline: the
        notes then say, after the refinement check, which radii the digitised points do not fix
        and how far the Cd moves across each one's range.

    Returns
    -------
    matplotlib.figure.Figure
        Page with the run block, the annotated profile, Cp plot, summary table, corner table,
        notes and the caution.
    """
    if not is_analysis(analysis):
        raise InputError(
            f"review_figure needs an Analysis from profilebench.assess.analysis.analyze, got "
            f"{type(analysis).__name__}"
        )
    fig = new_figure()
    gs = fig.add_gridspec(
        3,
        2,
        height_ratios=[1.55, 1.0, 0.75],
        width_ratios=[1.5, 1.0],
        left=0.05,
        right=0.95,
        top=0.905,
        bottom=0.1,
        hspace=0.28,
        wspace=0.12,
    )
    # a strip on the left holds the marker legend, however wide the profile is
    top = gs[0, :].subgridspec(1, 2, width_ratios=[0.12, 0.88], wspace=0.02)
    ax_prof = fig.add_subplot(top[0, 1])  # the first axes of the page
    ax_leg = fig.add_subplot(top[0, 0])
    ax_leg.axis("off")
    ax_cp = fig.add_subplot(gs[1, 0])
    ax_sum = fig.add_subplot(gs[1, 1])
    ax_cor = fig.add_subplot(gs[2, :])
    name = analysis.profile.name or "profile"
    fig.suptitle(f"{name}: screening review", fontsize=13, weight="bold", y=0.985)
    lines = [
        part
        for line in run_lines(run_record(analysis, created=created))
        for part in textwrap.wrap(line, 250, subsequent_indent="    ")
    ]
    fig.text(0.05, 0.962, "\n".join(lines), fontsize=8, va="top", gid=RUN_GID)

    out = draw_profile(ax_prof, analysis, baseline=baseline, title="", legend=False, cp_min=cp_min)
    if out["legend_handles"]:
        ax_leg.legend(
            handles=out["legend_handles"],
            loc="upper left",
            fontsize=8,
            framealpha=0.9,
            borderaxespad=0.0,
        )
    if analysis.success and analysis.flow is not None:
        draw_cp(ax_cp, analysis)
        ax_cp.set_title("Cp along the surface", fontsize=10)
    else:
        ax_cp.axis("off")
        ax_cp.text(
            0.02,
            0.5,
            f"No flow result: {analysis.status.value}\n{analysis.message}",
            fontsize=10,
            transform=ax_cp.transAxes,
            va="center",
            wrap=True,
        )

    rows = summary_rows(analysis) + baseline_rows(analysis, baseline)
    # the summary may run down to the corner table's title
    room = ax_cor.get_window_extent(fig.canvas.get_renderer()).y1 + 0.025 * fig.bbox.height
    _table(
        ax_sum,
        ("quantity", "value", "unit / note"),
        rows,
        fontsize=8,
        col_widths=[0.32, 0.2, 0.48],
        bottom=room,
    )
    ax_sum.set_title("Summary", fontsize=10, loc="left")
    _table(
        ax_cor,
        CORNER_COLUMNS,
        corner_rows(analysis),
        fontsize=8,
        col_widths=[0.27, 0.055, 0.055, 0.055, 0.2, 0.07, 0.12, 0.06, 0.04],
    )
    ax_cor.set_title("Corners", fontsize=10, loc="left")

    notes = [] if refinement is None else [refinement_note(refinement)]
    notes += [open_radius_note(e) for e in open_radii]
    notes += corner_notes(analysis) + [f"{n}: {d}" for n, d in corner_disagreements(analysis)]
    notes += list(analysis.warnings)
    if analysis.drag is not None:
        notes += list(analysis.drag.notes)
    notes.append(MARGIN_DEFINITION)
    lines = textwrap.wrap("Notes: " + " | ".join(notes), 250)
    if len(lines) > 4:
        lines = lines[:3] + [
            textwrap.shorten(" ".join(lines[3:]), 230) + " (all notes: profilebench analyse FILE)"
        ]
    fig.text(0.05, 0.072, "\n".join(lines), fontsize=7, va="top", gid=NOTES_GID)
    fig.text(0.5, 0.012, CAUTION, ha="center", fontsize=9, weight="bold", color="#000000")
    return fig


def refinement_note(check) -> str:
    """One line of a refinement check for the page's notes (put first: when the notes run long,
    the later ones are the ones shortened)."""
    head = f"Refinement check ({check.panels} against {check.panels_refined} panels): "
    if check.holds:
        return head + "the answers hold when the panels are doubled"
    return head + "DOES NOT HOLD, quote the refined answers: " + "; ".join(check.problems)


def open_radius_note(effect) -> str:
    """One note on a radius the digitised points leave open: where, its range, the Cd's move."""
    r = effect.range
    spread = effect.spread
    moves = "" if spread is None else f", Cd moves {spread * 100.0:.1f} % across it"
    return (
        f"Radius not fixed by the points: {r.where}, {r.low * 1e3:.0f} to {r.high * 1e3:.0f} mm"
        f"{moves}; take it from the drawing"
    )


def image_format(path) -> str:
    """Image format of a path from its extension (.png, .svg, .pdf).

    Raises
    ------
    InputError
        For any other extension.
    """
    ext = Path(path).suffix.lower()
    if ext not in IMAGE_FORMATS:
        raise InputError(
            f"cannot write an image to {str(path)!r}: unknown extension {ext or '(none)'!r}; "
            f"use one of {', '.join(IMAGE_FORMATS)}"
        )
    return IMAGE_FORMATS[ext]


def save_figure(fig, path, dpi=None) -> Path:
    """Save a figure atomically (temporary file, then os.replace), format from the extension."""
    fmt = image_format(path)
    target = Path(path)
    folder = target.parent if str(target.parent) else Path(".")
    if not folder.is_dir():
        raise InputError(
            f"cannot write {str(target)!r}: the folder {str(folder)!r} does not exist; create it "
            "or choose another location"
        )
    if target.is_dir():
        raise InputError(f"cannot write {str(target)!r}: it is a folder; give a file name")
    from profilebench.io.atomic import atomic_write_bytes

    # atomic, through links, a killed writer's temporary files cleaned (profilebench.io.atomic)
    return atomic_write_bytes(target, lambda fh: fig.savefig(fh, format=fmt, dpi=dpi or fig.dpi))
