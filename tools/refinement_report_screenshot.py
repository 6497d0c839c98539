"""Regenerate the README screenshot of the editor's refinement check
(docs/images/refinement_report.png).

Opens the hatchback sample, chooses *Analysis > Check by doubling the panels* and saves the
report window once the check is done. Run:
``python tools/refinement_report_screenshot.py [OUT.png]``.
"""

from __future__ import annotations

import os
import sys
import tempfile
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")

OUT = Path(__file__).resolve().parent.parent / "docs" / "images" / "refinement_report.png"


def main(out=OUT) -> int:
    from PySide6.QtCore import QSettings
    from PySide6.QtWidgets import QApplication

    from profilebench.gui.main_window import MainWindow
    from profilebench.io import sample_paths
    from screenshots import _wait  # the same wait as the other screenshots (tools/ is on the path)

    app = QApplication.instance() or QApplication(["refinement screenshot"])
    settings = QSettings(os.path.join(tempfile.mkdtemp(), "s.ini"), QSettings.IniFormat)
    sample = next(p for p in sample_paths() if Path(p).stem == "kestrel_hatch")
    w = MainWindow(sample, settings=settings, recovery_dir=tempfile.mkdtemp())
    w.show()
    _wait(app, lambda: w.results_current)
    entry = next(a for a in w.menus["Analysis"].actions() if "doubling" in a.text())
    entry.trigger()
    _wait(app, lambda: w.refinement_check.report is not None, timeout=300.0)
    report = w.refinement_check.report
    _wait(app, lambda: report.isVisible())
    app.processEvents()
    Path(out).parent.mkdir(parents=True, exist_ok=True)
    ok = report.grab().save(str(out))
    w.shutdown()
    if not ok:
        print(f"could not write {out}", file=sys.stderr)
        return 1
    print(f"written: {out}")
    return 0


if __name__ == "__main__":
    sys.exit(main(*sys.argv[1:]))
