"""Fixtures of the Qt tests: a main window with the default sample, settings in a temp file."""

import pytest

pytest.importorskip("PySide6")

from PySide6.QtCore import QSettings, QStandardPaths  # noqa: E402

from gui_helpers import ANALYSIS_TIMEOUT_MS  # noqa: E402


# never the user's real data folder (recovery copies) either
QStandardPaths.setTestModeEnabled(True)


@pytest.fixture
def settings(tmp_path):
    # never the user's real settings: an INI file in the test's own folder
    return QSettings(str(tmp_path / "settings.ini"), QSettings.IniFormat)


@pytest.fixture
def window(qtbot, settings, tmp_path):
    from profilebench.gui.main_window import MainWindow

    w = MainWindow(settings=settings, recovery_dir=tmp_path / "recovery")
    w.ask_recover = lambda copy: False
    w.errors_reported = []
    w.report_error = lambda title, text: w.errors_reported.append((title, text))
    # pytest-qt closes the window before fixtures are torn down: answer "discard" to the
    # unsaved-changes prompt so no modal dialog waits for a user
    w.ask_unsaved = lambda: "discard"
    qtbot.addWidget(w)
    w.show()
    qtbot.waitExposed(w)
    qtbot.waitUntil(lambda: w.results_current or bool(w.last_message), timeout=ANALYSIS_TIMEOUT_MS)
    yield w
    for r in (w.runner, w.baseline_runner, w.search_runner):
        r.wait(ANALYSIS_TIMEOUT_MS)


def pytest_sessionfinish(session, exitstatus):
    # collect the closed windows' Python wrappers while Qt is still fully alive; left to the
    # interpreter's final collection, PySide tears them down in an order that can crash
    import gc

    gc.collect()
