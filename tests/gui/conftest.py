"""Fixtures of the Qt tests: a main window with the default sample, settings in a temp file."""

import pytest

pytest.importorskip("PySide6")

from PySide6.QtCore import QSettings  # noqa: E402

ANALYSIS_TIMEOUT_MS = 30000


@pytest.fixture
def settings(tmp_path):
    # never the user's real settings: an INI file in the test's own folder
    return QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)


@pytest.fixture
def window(qtbot, settings):
    from profilebench.gui.main_window import MainWindow

    w = MainWindow(settings=settings)
    qtbot.addWidget(w)
    w.show()
    qtbot.waitExposed(w)
    qtbot.waitUntil(lambda: w.results_current or bool(w.last_message), timeout=ANALYSIS_TIMEOUT_MS)
    yield w
    w.document.mark_saved()        # no unsaved-changes prompt when the test closes the window
    for r in (w.runner, w.baseline_runner, w.search_runner):
        r.wait(ANALYSIS_TIMEOUT_MS)


def wait_current(qtbot, w):
    qtbot.waitUntil(lambda: w.results_current, timeout=ANALYSIS_TIMEOUT_MS)
