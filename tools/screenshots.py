"""Regenerate the README screenshots of the editor into docs/images/ (offscreen Qt).

Shows the default sample analysed, a corner selected and a baseline pinned (the current profile
has that corner's radius changed, so the difference is visible), and the review page the editor
exports of it. Run:
``python tools/screenshots.py``.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")

OUT = Path(__file__).resolve().parent.parent / "docs" / "images"


def _wait(app, predicate, timeout=60.0):
    t0 = time.perf_counter()
    while not predicate():
        app.processEvents()
        time.sleep(0.005)
        if time.perf_counter() - t0 > timeout:
            raise TimeoutError("analysis did not finish")


def _settle(app, w, plot="cp"):
    """Wait for what is drawn in the background: built outline, overlay, the plot image."""
    w.canvas.repaint()
    _wait(app, lambda: w.canvas.up_to_date and not w.canvas.overlay_runner.busy)
    w.canvas.repaint()
    _wait(app, lambda: w.canvas.up_to_date)
    _wait(app, lambda: w.plots.images[plot] is not None and not w.plots.renderer.busy)
    for _ in range(5):
        app.processEvents()
        time.sleep(0.02)


def main() -> int:
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from profilebench.gui.main_window import MainWindow

    app = QApplication.instance() or QApplication(["screenshots"])
    settings = QSettings(os.path.join(tempfile.mkdtemp(), "s.ini"), QSettings.IniFormat)
    w = MainWindow(settings=settings)
    w.resize(1600, 1000)
    w.show()
    _wait(app, lambda: w.results_current)
    _settle(app, w)
    OUT.mkdir(parents=True, exist_ok=True)
    w.grab().save(str(OUT / "editor_sample.png"))

    w.pin_baseline()
    # the front-most rounded node corner (the bonnet leading edge on the sample) turns sharply,
    # so a larger radius there shows clearly against the baseline
    corner = min(
        (c for c in w.analysis.corners if c.radius > 0 and not c.label.startswith("curvature")),
        key=lambda c: c.x + 0.5 * abs(c.y - w.analysis.measures.height),
    )
    w.set_radius(corner.node, corner.radius * 2.5)
    _wait(app, lambda: w.results_current)
    _wait(app, lambda: w.baseline_analysis is not None)
    w.select_node(corner.node)
    w.plots.setCurrentIndex(0)
    _settle(app, w)
    w.grab().save(str(OUT / "editor_baseline_corner.png"))
    w.canvas.grab().save(str(OUT / "canvas_detail.png"))
    # the review page as the editor exports it (with the pinned baseline's Cd and deltas)
    w.export_image(OUT / "review_page.png")
    w.plots.setCurrentIndex(1)
    _settle(app, w, "bl")
    w.plots.grab().save(str(OUT / "boundary_layer_plots.png"))
    w.document.mark_saved()
    w.close()
    for p in sorted(OUT.glob("*.png")):
        print(p)
    return 0


if __name__ == "__main__":
    sys.exit(main())
