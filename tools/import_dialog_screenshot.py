"""Draw docs/images/import_dialog.png: the editor's import dialog with a digitised outline of
the Kestrel Courier van (invented: its sample outline sampled every 5 mm, 1 mm of noise, written
as a CSV in mm) fitted at the default 5 mm tolerance, at the van's conditions (the radii the points leave
open analysed at both ends of their ranges). Run:
``python tools/import_dialog_screenshot.py``.
"""

from __future__ import annotations

import os
import sys
import tempfile
import time
from pathlib import Path

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")

OUT = Path(__file__).resolve().parent.parent / "docs" / "images" / "import_dialog.png"


def main(out=OUT) -> int:
    import numpy as np
    from PySide6.QtWidgets import QApplication

    from profilebench.geometry import build_outline
    from profilebench.gui.import_dialog import ImportDialog
    from profilebench.io import import_points_csv, load_project, sample_paths

    app = QApplication.instance() or QApplication(["import-dialog"])
    project = load_project(next(p for p in sample_paths() if p.stem == "kestrel_courier_van"))
    van = project.profile
    o = build_outline(van)
    n = int(o.length / 0.005)
    pts = o.sample(n) + np.random.default_rng(0).normal(0.0, 0.001, (n, 2))
    csv = Path(tempfile.mkdtemp()) / "courier_outline.csv"
    csv.write_text("x_mm,y_mm\n" + "\n".join(f"{x * 1e3:.2f},{y * 1e3:.2f}" for x, y in pts))
    dialog = ImportDialog(
        import_points_csv(csv), csv.stem, ground=True, conditions=project.conditions
    )
    dialog.resize(1100, 640)
    dialog.show()
    t0 = time.perf_counter()
    while dialog.fitting:
        app.processEvents()
        time.sleep(0.01)
        if time.perf_counter() - t0 > 120:
            raise TimeoutError("the fit did not come back")
    for _ in range(5):
        app.processEvents()
        time.sleep(0.02)
    out.parent.mkdir(parents=True, exist_ok=True)
    dialog.grab().save(str(out))
    print(f"{out}: {dialog.status.text()}")
    dialog.done(0)
    return 0


if __name__ == "__main__":
    sys.exit(main())
