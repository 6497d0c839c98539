"""Regenerate the README screenshot of the editor's study dock (docs/images/study_panel.png).

Opens the hatchback sample, selects its bonnet leading edge, runs a radius sweep from 0 to
200 mm over 8 points in the study dock and saves the window once the chart is drawn. Run:
``python tools/study_panel_screenshot.py [OUT.png]``.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")

OUT = Path(__file__).resolve().parent.parent / "docs" / "images" / "study_panel.png"
BONNET = "bonnet leading edge"


def _wait(app, predicate, timeout=300.0):
    t0 = time.perf_counter()
    while not predicate():
        app.processEvents()
        time.sleep(0.005)
        if time.perf_counter() - t0 > timeout:
            raise TimeoutError("the study or its chart did not finish")


def _pause(app, seconds):
    t0 = time.perf_counter()
    while time.perf_counter() - t0 < seconds:
        app.processEvents()
        time.sleep(0.01)


def main(out=OUT) -> int:
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from profilebench.gui.main_window import MainWindow
    from profilebench.io import sample_paths
    from profilebench.studies import corner_node

    app = QApplication.instance() or QApplication(["study screenshot"])
    settings = QSettings(os.path.join(tempfile.mkdtemp(), "s.ini"), QSettings.IniFormat)
    sample = next(p for p in sample_paths() if Path(p).stem == "kestrel_hatch")
    w = MainWindow(sample, settings=settings, recovery_dir=tempfile.mkdtemp())
    w.resize(1600, 1000)
    w.show()
    _wait(app, lambda: w.results_current)
    node = corner_node(w.document.profile, BONNET)
    w.select_node(node)
    p = w.study_panel
    p.follow_node(node)
    w.show_study_panel()
    p.first.setText("0")
    p.last.setText("200")
    p.points.setValue(8)
    if not p.run():
        raise SystemExit(f"the study did not start: {p.status.text()}")
    _wait(app, lambda: not p.running)
    for _ in range(2):  # the chart is drawn again when the dock settles
        _pause(app, 0.5)
        _wait(app, lambda: p.drawn_table is p.table and not p.renderer.busy)
    _wait(app, lambda: w.plots.images["cp"] is not None and not w.plots.renderer.busy)
    _pause(app, 0.3)
    Path(out).parent.mkdir(parents=True, exist_ok=True)
    w.grab().save(str(out))
    print(f"{out}: {p.status.text()}")
    w.shutdown()
    return 0


if __name__ == "__main__":  # the study's worker processes are spawned: they import this module
    sys.exit(main(*sys.argv[1:]))
