"""Start the desktop editor: ``run(argv) -> exit code``."""

from __future__ import annotations

import logging
import sys

__all__ = ["run"]


def run(argv=None) -> int:
    """Open the main window (with a project file from ``argv`` if given, else the default sample).

    Returns the Qt event loop's exit code.
    """
    from PySide6.QtWidgets import QApplication

    from profilebench.gui.main_window import MainWindow

    argv = list(sys.argv if argv is None else argv)
    logging.basicConfig(level=logging.INFO, format="%(levelname)s %(name)s: %(message)s")
    app = QApplication.instance() or QApplication(argv if argv else ["profilebench"])
    app.setOrganizationName("profilebench")
    app.setApplicationName("profilebench editor")
    path = next((a for a in argv[1:] if not a.startswith("-")), None)
    window = MainWindow(path)
    window.show()
    return app.exec()


if __name__ == "__main__":
    raise SystemExit(run())
