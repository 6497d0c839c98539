"""The variants review page: a project's named variants side by side, ranked.

The page shows the variants' outlines overlaid (each in its own colour and line style, the
baseline variant in black), a small outline of each in a row with its Cd, CdA, drag force and
the corners where the flow separates, the ranking table with the deltas against the baseline,
the corner verdicts of every variant, the conditions and notes, and the safety caution.

It takes a ranking (:class:`profilebench.studies.variants.VariantTable`, read through its
attributes only: plotting does not import the studies) and is a plain
:class:`matplotlib.figure.Figure` with an Agg canvas. The text tables the command line and the
editor show come from :func:`ranking_rows` and :func:`corner_matrix` here, so every view reads
the same.
"""

from __future__ import annotations

import textwrap

import numpy as np

from profilebench.errors import ProfileBenchError
from profilebench.plotting.review import PAGE_DPI, PAGE_SIZE, _table, new_figure
from profilebench.plotting.style import CAUTION, OKABE_ITO

__all__ = [
    "RANKING_COLUMNS",
    "ranking_rows",
    "corner_matrix",
    "separated_corners",
    "variants_figure",
    "VARIANT_STYLES",
    "MAX_DRAWN",
]

#: the columns of the ranking table (text: the command line, the editor, the page)
RANKING_COLUMNS = (
    "rank",
    "variant",
    "Cd",
    "delta Cd",
    "CdA (m^2)",
    "delta CdA",
    "force (N)",
    "delta F (N)",
    "power (kW)",
    "separated corners",
    "status",
)

#: line colour and style of the variants on the page, in stored order after the baseline (which
#: is black and solid): Okabe-Ito colours, each with its own dash pattern so that a grey print
#: still tells them apart
VARIANT_STYLES = (
    (OKABE_ITO["blue"], (0, (6, 2))),
    (OKABE_ITO["vermillion"], (0, (2, 1.5))),
    (OKABE_ITO["bluish_green"], (0, (6, 2, 1.5, 2))),
    (OKABE_ITO["reddish_purple"], (0, (1, 1))),
    (OKABE_ITO["orange"], (0, (8, 2, 1.5, 2, 1.5, 2))),
    (OKABE_ITO["sky_blue"], (0, (4, 4))),
)
#: most variants drawn in the row of small outlines (the table lists them all)
MAX_DRAWN = 6


def _g(value, fmt, scale=1.0, sign=False):
    if value is None:
        return "n/a"
    return format(value * scale, ("+" if sign else "") + fmt)


def separated_corners(row) -> list[str]:
    """The names of ``row``'s corners where the flow separates (Verdict.separated)."""
    return [k for k, v in row.verdicts().items() if v.separated]


def ranking_rows(table):
    """The rows of :data:`RANKING_COLUMNS` for a variant ranking, in ranking order."""
    rows = []
    for r in table.rows:
        name = r.name + (" (baseline)" if r.is_baseline else "")
        if not r.success:
            rows.append(
                ("-", name, "n/a", "n/a", "n/a", "n/a", "n/a", "n/a", "n/a", "", r.status.value)
            )
            continue
        dcd = _g(r.delta_cd, ".4f", sign=True)
        if r.delta_cd_percent is not None:
            dcd += f" ({r.delta_cd_percent:+.1f}%)"
        sep = separated_corners(r)
        rows.append(
            (
                str(r.rank),
                name,
                _g(r.cd, ".4f"),
                dcd,
                _g(r.cda, ".4f"),
                _g(r.delta_cda, ".4f", sign=True),
                _g(r.force, ".1f"),
                _g(r.delta_force, ".1f", sign=True),
                _g(r.power, ".2f", 1e-3),
                f"{len(sep)} of {len(r.corners)}",
                r.status.value,
            )
        )
    return rows


def _column_name(r):
    return f"#{r.rank}" if r.rank is not None else f"({r.name})"


def corner_matrix(table):
    """(header, rows): a row per corner, a column per variant (headed by its rank, "#1", in
    ranking order; a failed variant by its name in brackets), each cell that variant's
    verdict there ("" where it has no such corner)."""
    header = ("corner",) + tuple(_column_name(r) for r in table.rows)
    verdicts = [r.verdicts() for r in table.rows]
    rows = []
    for key in table.corner_keys:
        rows.append((key,) + tuple(v[key].value if key in v else "" for v in verdicts))
    return header, rows


#: the short form of each corner verdict on the page (its legend is printed below the table)
SHORT_VERDICTS = {
    "attached": "attached",
    "laminar bubble, reattaches": "bubble",
    "separates (laminar)": "separates (lam.)",
    "separates (turbulent)": "separates (turb.)",
    "sharp-edge separation": "sharp edge",
    "in separated flow upstream": "in wake",
    "concave corner": "concave",
    "concave corner, bubble reattaches": "concave, bubble",
}
SHORT_LEGEND = (
    "bubble: laminar bubble, reattaches; in wake: in separated flow upstream; concave, "
    "bubble: concave corner, the layer separates ahead of it and reattaches"
)
#: cell tints of the corner verdicts: separated (vermillion), a bubble (orange), attached
#: (bluish green), from the Okabe-Ito colours of profilebench.plotting.style, lightened
_TINTS = {"separated": "#f6d5bf", "bubble": "#f9e6bf", "attached": "#cdeee3"}


def _tint(verdict):
    if verdict.separated:
        return _TINTS["separated"]
    if "bubble" in verdict.value:
        return _TINTS["bubble"]
    if verdict.value == "attached":
        return _TINTS["attached"]
    return None


def _styles(table):
    """{variant name: (colour, dashes, line width)}, the baseline black and solid."""
    out, k = {}, 0
    for r in sorted(table.rows, key=lambda r: (not r.is_baseline,)):
        if r.is_baseline:
            out[r.name] = (OKABE_ITO["black"], "solid", 2.0)
        else:
            colour, dashes = VARIANT_STYLES[k % len(VARIANT_STYLES)]
            out[r.name] = (colour, dashes, 1.6)
            k += 1
    return out


def _outline(profile, samples=400):
    """The outline's points (m), closed, for drawing."""
    from profilebench.geometry.outline import canonical_outline

    xy = np.asarray(canonical_outline(profile).sample(samples))
    return np.vstack([xy, xy[:1]])


def _outlines(table):
    """{variant name: closed outline points}, leaving out an outline that cannot be built."""
    out = {}
    for r in table.rows:
        try:
            out[r.name] = _outline(r.profile)
        except ProfileBenchError:
            pass
    return out


def _conditions_line(cond):
    speed = f"{cond.speed * 3.6:.0f} km/h"
    if cond.width is not None and cond.frontal_area is None:
        area = f"width {cond.width:g} m (area = width x each variant's h)"
    elif cond.frontal_area is not None:
        area = f"frontal area {cond.frontal_area:g} m^2 (the same for every variant)"
    else:
        area = "no frontal area or width"
    ground = "moving ground" if cond.ground else "free air"
    return (
        f"Every variant at the project's conditions: {speed}, {ground}, {area}, "
        f"transition {cond.transition}, {cond.panels} panels."
    )


def _label(r):
    text = f"#{r.rank} {r.name}" if r.rank is not None else f"{r.name} ({r.status.value})"
    return text + (" (baseline)" if r.is_baseline else "")


def _sized_table(ax, header, rows, fontsize, tints=None):
    """A table whose columns are as wide as their text (nothing cut off), cells tinted by
    ``tints`` ({(row, column): colour}, rows counted from 1 below the header)."""
    t = _table(ax, header, rows, fontsize=fontsize)
    if t is None:
        return None
    t.auto_set_column_width(list(range(len(header))))
    for (r, c), colour in (tints or {}).items():
        if (r, c) in t.get_celld():
            t[r, c].set_facecolor(colour)
    return t


def _short_corner_matrix(table):
    """The corner matrix in the page's short words, and the cells' tints."""
    header, _ = corner_matrix(table)
    tints, short = {}, []
    verdicts = [r.verdicts() for r in table.rows]
    for i, key in enumerate(table.corner_keys, start=1):
        name = key.replace("curvature peak at the ", "peak: ")
        row = [textwrap.shorten(name, 40, placeholder="...")]
        for j, v in enumerate(verdicts, start=1):
            if key in v:
                row.append(SHORT_VERDICTS.get(v[key].value, v[key].value))
                tint = _tint(v[key])
                if tint is not None:
                    tints[(i, j)] = tint
            else:
                row.append("")
        short.append(tuple(row))
    return header, short, tints


def _fitted_table(fig, rect, header, rows, fontsize, tints, limit, renderer, title):
    """A table in a new axes at ``rect``, its font made smaller (down to 5 pt) until its right
    edge is left of ``limit`` (figure fraction); returns its right and bottom edges (figure
    fraction)."""
    size = fontsize
    while True:
        ax = fig.add_axes(rect)
        t = _sized_table(ax, header, rows, size, tints)
        ax.set_title(title, fontsize=10, loc="left")
        bb = None if t is None else t.get_window_extent(renderer)
        right = 0.0 if bb is None else bb.x1 / fig.bbox.width
        if right <= limit or size <= 5.0:
            bottom = rect[1] + rect[3] - 0.03 if bb is None else bb.y0 / fig.bbox.height
            return max(right, rect[0] + 0.1), bottom
        ax.remove()
        size -= 0.5


def variants_figure(table, title=None, created=None):
    """The variants review page of ``table`` (a VariantTable) as a matplotlib Figure.

    ``title`` heads the page (default "Variants"); ``created`` (a text such as a date) is
    printed beside it.
    """
    fig = new_figure(PAGE_SIZE, PAGE_DPI)
    styles = _styles(table)
    outlines = _outlines(table)
    fig.text(0.02, 0.975, title or "Variants", fontsize=15, weight="bold", va="top")
    sub = (
        f"{len(table)} variants, {table.key_reason}; deltas against the baseline "
        f"{table.baseline!r}" + (f"; {created}" if created else "")
    )
    fig.text(0.02, 0.945, "\n".join(textwrap.wrap(sub, 190)), fontsize=9, va="top")

    # --- the outlines overlaid --------------------------------------------------------------
    ax = fig.add_axes((0.05, 0.62, 0.52, 0.28))
    for r in table.rows:
        if r.name in outlines:
            colour, dashes, width = styles[r.name]
            xy = outlines[r.name]
            ax.plot(xy[:, 0], xy[:, 1], color=colour, linestyle=dashes, lw=width, label=_label(r))
    ax.axhline(0.0, color="#555555", linewidth=0.8)
    ax.set_aspect("equal", adjustable="datalim")
    ax.set_xlabel("x (m, rearward)")
    ax.set_ylabel("y (m)")
    ax.set_title("Outlines overlaid (ground at y = 0)", fontsize=10, loc="left")
    ax.grid(True, linewidth=0.3, alpha=0.5)
    ax.legend(loc="upper left", bbox_to_anchor=(1.01, 1.0), fontsize=8, frameon=False)

    # --- notes beside the legend -------------------------------------------------------------
    notes = [_conditions_line(table.conditions)] + list(table.notes)
    notes += [f"{r.name}: {w}" for r in table.rows for w in r.warnings]
    notes += [f"{r.name}: {r.status.value}: {r.message}" for r in table.failed]
    wrapped = []
    for t in notes:
        wrapped += textwrap.wrap(t, 62) + [""]
    nax = fig.add_axes((0.76, 0.62, 0.22, 0.29))
    nax.axis("off")
    nax.text(0.0, 1.0, "\n".join(wrapped).rstrip(), va="top", fontsize=8, gid="variant-notes")

    # --- one small outline per variant, in ranking order ---------------------------------------
    drawn = table.rows[:MAX_DRAWN]
    n = max(len(drawn), 1)
    gap = 0.015
    w = (0.96 - gap * (n - 1)) / n
    xs = [xy[:, 0] for xy in outlines.values()] or [np.array([0.0, 1.0])]
    ys = [xy[:, 1] for xy in outlines.values()] or [np.array([0.0, 1.0])]
    x0, x1 = min(v.min() for v in xs), max(v.max() for v in xs)
    y1 = max(max(v.max() for v in ys), 0.0)
    pad = 0.04 * (x1 - x0)
    chars = max(int(w * 165), 20)  # characters of 7.5 pt text across one panel
    for k, r in enumerate(drawn):
        sub_ax = fig.add_axes((0.02 + k * (w + gap), 0.42, w, 0.13))
        colour, dashes, width = styles[r.name]
        if r.name in outlines:
            xy = outlines[r.name]
            sub_ax.plot(xy[:, 0], xy[:, 1], color=colour, linestyle=dashes, linewidth=width)
            sub_ax.fill(xy[:, 0], xy[:, 1], color=colour, alpha=0.08)
        sub_ax.axhline(0.0, color="#555555", linewidth=0.6)
        # one scale for every panel (the same x and y limits), so that sizes compare by eye
        sub_ax.set_xlim(x0 - pad, x1 + pad)
        sub_ax.set_ylim(-pad, y1 + pad)
        sub_ax.set_aspect("equal", adjustable="box")
        sub_ax.set_xticks([])
        sub_ax.set_yticks([])
        head = textwrap.shorten(_label(r), width=chars, placeholder="...")
        sub_ax.set_title(head, fontsize=9, weight="bold" if r.is_baseline else "normal")
        if r.success:
            sep = separated_corners(r)
            lines = [
                f"Cd {r.cd:.4f} ({_g(r.delta_cd, '.4f', sign=True)})",
                f"CdA {_g(r.cda, '.3f')} m^2 ({_g(r.delta_cda, '.3f', sign=True)})",
                f"force {_g(r.force, '.1f')} N ({_g(r.delta_force, '.1f', sign=True)} N)",
                "separates at: " + (", ".join(sep) if sep else "no corner"),
            ]
        else:
            lines = [f"{r.status.value}: {r.message}"]
        text = []
        for line in lines:
            text += textwrap.wrap(line, chars)
        if len(text) > 6:
            text = text[:5] + ["... (see the table)"]
        sub_ax.text(
            0.5,
            -0.05,
            "\n".join(text),
            transform=sub_ax.transAxes,
            ha="center",
            va="top",
            fontsize=7.5,
        )
    if len(table.rows) > MAX_DRAWN:
        fig.text(
            0.98,
            0.575,
            f"{len(table.rows) - MAX_DRAWN} more variants in the tables",
            ha="right",
            fontsize=8,
        )

    # --- the ranking table and the corner verdicts, each as wide as its text ---------------
    renderer = fig.canvas.get_renderer()
    rows = [
        tuple(textwrap.shorten(c, 40, placeholder="...") for c in r) for r in ranking_rows(table)
    ]
    right, _ = _fitted_table(
        fig,
        (0.02, 0.075, 0.44, 0.22),
        RANKING_COLUMNS,
        rows,
        7.5,
        None,
        0.60,
        renderer,
        "Ranking (deltas: variant minus baseline)",
    )
    header, short, tints = _short_corner_matrix(table)
    left = right + 0.025
    _, bottom = _fitted_table(
        fig,
        (left, 0.075, 0.98 - left, 0.22),
        header,
        short,
        7.0,
        tints,
        0.985,
        renderer,
        "Corner verdicts, the variants by rank",
    )
    fig.text(
        left,
        bottom - 0.008,
        "\n".join(textwrap.wrap(SHORT_LEGEND, int((0.98 - left) * 260))),
        fontsize=7,
        va="top",
    )
    fig.text(0.5, 0.008, CAUTION, ha="center", fontsize=9, weight="bold", color="#000000")
    return fig
