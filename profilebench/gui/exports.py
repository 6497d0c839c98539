"""Writing what the window shows: the annotated view (the review page, PNG/SVG/PDF, with the
screening caution) and the surface data (CSV), through the same functions the command line uses."""

from __future__ import annotations

from profilebench.errors import ProfileBenchError

__all__ = ["export_image", "export_surface_csv"]


def _export(window, path, write) -> bool:
    """``write(analysis, path)`` for the window's analysis; a failure is told in its banner."""
    if window.analysis is None:
        window._show_banner("nothing to export yet: no successful analysis", True)
        return False
    try:
        write(window.analysis, path)
    except ProfileBenchError as exc:
        window._show_banner(f"export failed: {exc}", True)
        return False
    window.statusBar().showMessage(f"exported {path}", 5000)
    return True


def export_image(window, path) -> bool:
    """Write the review page of the window's analysis (against its baseline) to ``path``, with
    the last refinement check when it is of the outline shown."""
    from profilebench.io.atomic import check_writable
    from profilebench.plotting import review_figure, save_figure

    def write(analysis, path):
        check_writable(path)  # a folder that refuses files: a message, not an OSError
        baseline = window.baseline_analysis or window.document.baseline
        # a refinement check of the outline as it is now heads the page's notes
        refinement = window.refinement_check.for_state(window.document.state)
        fig = review_figure(
            analysis, baseline=baseline, cp_min=window.canvas.cp_min, refinement=refinement
        )
        save_figure(fig, path)

    return _export(window, path, write)


def export_surface_csv(window, path) -> bool:
    """Write the surface data (stations, Cp, boundary layer) of the window's analysis."""
    from profilebench.io.export import write_surface_csv

    return _export(window, path, write_surface_csv)
