"""A design-review page: annotated profile, Cp plot, summary and corner tables, caution line.

The page is a plain :class:`matplotlib.figure.Figure` with an Agg canvas (no pyplot state).
"""

from __future__ import annotations

from pathlib import Path

from matplotlib.backends.backend_agg import FigureCanvasAgg
from matplotlib.figure import Figure

from profilebench.errors import InputError
from profilebench.plotting.charts import draw_cp
from profilebench.plotting.profile_view import draw_profile
from profilebench.plotting.stations import is_analysis
from profilebench.plotting.summary import CORNER_COLUMNS, corner_rows, summary_rows
from profilebench.plotting.style import CAUTION

__all__ = ["review_figure", "save_figure", "IMAGE_FORMATS", "image_format"]

IMAGE_FORMATS = {".png": "png", ".svg": "svg", ".pdf": "pdf"}
PAGE_SIZE = (16.5, 11.7)     # inches, about A3 landscape (1980 x 1404 pixels at PAGE_DPI)
PAGE_DPI = 120


def new_figure(size=PAGE_SIZE, dpi=PAGE_DPI) -> Figure:
    """A Figure with its own Agg canvas (so text extents can be measured before saving)."""
    fig = Figure(figsize=size, dpi=dpi)
    FigureCanvasAgg(fig)
    return fig


def _table(ax, header, rows, fontsize=8, col_widths=None):
    ax.axis("off")
    if not rows:
        ax.text(0.0, 0.5, "none", fontsize=fontsize, transform=ax.transAxes)
        return None
    t = ax.table(cellText=[list(r) for r in rows], colLabels=list(header), loc="upper left",
                 cellLoc="left", colLoc="left", colWidths=col_widths)
    t.auto_set_font_size(False)
    t.set_fontsize(fontsize)
    t.scale(1.0, 1.25)
    for (r, _c), cell in t.get_celld().items():
        cell.set_linewidth(0.3)
        if r == 0:
            cell.set_text_props(weight="bold")
    return t


def review_figure(analysis, baseline=None) -> Figure:
    """A one-page design review of an analysis.

    Parameters
    ----------
    analysis : Analysis
        From :func:`profilebench.assess.analysis.analyze`.
    baseline : Profile or Analysis, optional
        Drawn behind the profile in grey with the difference hatched.

    Returns
    -------
    matplotlib.figure.Figure
        Page with the annotated profile, Cp plot, summary table, corner table and the caution.
    """
    if not is_analysis(analysis):
        raise InputError(
            f"review_figure needs an Analysis from profilebench.assess.analysis.analyze, got "
            f"{type(analysis).__name__}"
        )
    fig = new_figure()
    gs = fig.add_gridspec(3, 2, height_ratios=[1.55, 1.0, 0.75], width_ratios=[1.5, 1.0],
                          left=0.05, right=0.95, top=0.95, bottom=0.06, hspace=0.28, wspace=0.12)
    # a strip on the left is kept for the marker legend, however wide the profile is
    top = gs[0, :].subgridspec(1, 2, width_ratios=[0.11, 0.89], wspace=0.0)
    ax_prof = fig.add_subplot(top[0, 1])
    ax_cp = fig.add_subplot(gs[1, 0])
    ax_sum = fig.add_subplot(gs[1, 1])
    ax_cor = fig.add_subplot(gs[2, :])
    name = getattr(analysis.profile, "name", "profile")
    fig.suptitle(f"{name}: screening review", fontsize=13, weight="bold")

    draw_profile(ax_prof, analysis, baseline=baseline, title="", legend_outside=True)
    if analysis.success and analysis.flow is not None:
        draw_cp(ax_cp, analysis)
        ax_cp.set_title("Cp along the surface", fontsize=10)
    else:
        ax_cp.axis("off")
        ax_cp.text(0.02, 0.5, f"No flow result: {analysis.status.value}\n{analysis.message}",
                   fontsize=10, transform=ax_cp.transAxes, va="center", wrap=True)

    _table(ax_sum, ("quantity", "value", "unit / note"), summary_rows(analysis), fontsize=8,
           col_widths=[0.32, 0.2, 0.48])
    ax_sum.set_title("Summary", fontsize=10, loc="left")
    _table(ax_cor, CORNER_COLUMNS, corner_rows(analysis), fontsize=8,
           col_widths=[0.15, 0.06, 0.06, 0.06, 0.18, 0.05, 0.23, 0.07, 0.04])
    ax_cor.set_title("Corners", fontsize=10, loc="left")

    notes = [w for w in analysis.warnings]
    if analysis.drag is not None:
        notes += list(analysis.drag.notes)
    if notes:
        fig.text(0.05, 0.035, "Notes: " + " | ".join(notes)[:300], fontsize=7)
    fig.text(0.5, 0.012, CAUTION, ha="center", fontsize=9, weight="bold", color="#000000")
    return fig


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
