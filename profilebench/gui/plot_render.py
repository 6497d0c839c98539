"""Rendering of the analysis plots in a separate process (no Qt in this module).

matplotlib's Agg backend holds Python's global interpreter lock inside each of its C++ calls
(text layout, glyphs, paths: several ms each), so a plot rendered on a thread of the editor's
process stops the GUI thread for as long. The editor therefore renders its plots in one child
process (:func:`profilebench.gui.runners.process_pool`) with :func:`render_plot_rgba`, which
needs only matplotlib and :mod:`profilebench.plotting`, and gets back the RGBA pixels.
"""

from __future__ import annotations

__all__ = ["render_plot_rgba", "render_sweep_rgba", "warm_up"]


def render_plot_rgba(analysis, kind: str, width_px: int, height_px: int, dpi: float = 90.0):
    """Draw the ``kind`` plot ("cp" or "bl") of ``analysis`` with Agg.

    Returns
    -------
    tuple
        ``(kind, width, height, rgba)``: image width and height in px and the RGBA8888 pixels
        (``bytes``, rows top to bottom, 4 * width bytes a row).
    """
    from matplotlib.backends.backend_agg import FigureCanvasAgg
    from matplotlib.figure import Figure

    from profilebench.plotting import draw_boundary_layer, draw_cp

    fig = Figure(
        figsize=(max(width_px, 50) / dpi, max(height_px, 50) / dpi), dpi=dpi, layout="constrained"
    )
    agg = FigureCanvasAgg(fig)
    if kind == "cp":
        ax = fig.add_subplot(111)
        draw_cp(ax, analysis)
        ax.set_title("Cp along x", fontsize=9)
    else:
        ax_h, ax_cf = fig.subplots(2, 1, sharex=True)
        draw_boundary_layer(ax_h, ax_cf, analysis)
    agg.draw()
    buf = agg.buffer_rgba()
    h, w = buf.shape[0], buf.shape[1]
    return kind, w, h, bytes(buf)


def warm_up() -> bool:
    """Import matplotlib and the plotting module in the child process (before the first plot)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg  # noqa: F401

    import profilebench.plotting  # noqa: F401

    return True


def render_sweep_rgba(table, width_px: int, height_px: int, dpi: float = 90.0, title=None):
    """Draw the chart of a study's :class:`~profilebench.studies.SweepTable` with Agg
    (:func:`profilebench.plotting.sweep_chart.sweep_figure`, resized to ``width_px`` x
    ``height_px``) and find where its points landed.

    Returns
    -------
    tuple
        ``(width, height, rgba, points)``: as :func:`render_plot_rgba`, and ``points``, a tuple
        of ``(index, x_px, y_px)`` per drawn marker (Cd, and CdA when shown; the table's point
        index, pixels from the image's top left), for picking a point with the mouse.
    """
    import numpy as np
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    from profilebench.plotting.sweep_chart import axis_scale, sweep_figure

    fig = sweep_figure(table, title=title, width_in=max(width_px, 200) / dpi)
    fig.set_dpi(dpi)
    fig.set_size_inches(max(width_px, 200) / dpi, max(height_px, 150) / dpi)
    agg = FigureCanvasAgg(fig)
    agg.draw()
    buf = agg.buffer_rgba()
    h, w = buf.shape[0], buf.shape[1]
    points = []
    scale, _ = axis_scale(table.parameter)
    for ax, name in zip(fig.axes, ("cd", "cda")):
        values = getattr(table, name)
        for i in range(len(table)):
            if np.ma.getmaskarray(values)[i]:
                continue
            x, y = ax.transData.transform((float(table.values[i]) * scale, float(values[i])))
            points.append((i, float(x), float(h - y)))
    return w, h, bytes(buf), tuple(points)
