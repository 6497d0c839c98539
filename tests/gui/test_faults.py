"""The editor under faults: a raising analysis is shown and logged; closing mid-analysis is clean."""

import logging
import threading
import time

from PySide6.QtCore import QSettings, QThreadPool

from profilebench.assess.analysis import analyze
from profilebench.editor import commands

from gui_helpers import ANALYSIS_TIMEOUT_MS


def _window(qtbot, tmp_path, analyze_fn):
    from profilebench.gui.main_window import MainWindow

    w = MainWindow(
        settings=QSettings(str(tmp_path / "s.ini"), QSettings.IniFormat),
        analyze_fn=analyze_fn,
        recovery_dir=tmp_path / "recovery",
    )
    w.ask_unsaved = lambda: "discard"
    w.ask_recover = lambda c: False
    qtbot.addWidget(w)
    w.show()
    return w


def test_exception_in_the_analysis_is_shown_logged_and_the_app_goes_on(qtbot, tmp_path, caplog):
    calls = []

    def flaky(profile, conditions):
        calls.append(profile)
        if len(calls) == 2:
            raise ZeroDivisionError("injected fault in the solver")
        return analyze(profile, conditions)

    w = _window(qtbot, tmp_path, flaky)
    qtbot.waitUntil(lambda: w.results_current, timeout=ANALYSIS_TIMEOUT_MS)
    good = w.analysis
    n = w.document.profile.nodes[0]
    with caplog.at_level(logging.ERROR, logger="profilebench.gui"):
        w.push(commands.move_node(w.document.state, 0, n.x, n.y + 0.002))
        qtbot.waitUntil(
            lambda: not w.runner.busy and w.banner.isVisible(), timeout=ANALYSIS_TIMEOUT_MS
        )
    assert "ZeroDivisionError: injected fault in the solver" in w.banner.text()
    assert any("injected fault" in r.getMessage() for r in caplog.records)
    assert "Traceback" in caplog.text and "ZeroDivisionError" in caplog.text
    assert w.analysis is good and w.canvas.stale  # last good result kept, marked stale
    # the app goes on: the next edit is analysed normally
    w.push(commands.move_node(w.document.state, 0, n.x, n.y + 0.004))
    qtbot.waitUntil(lambda: w.results_current, timeout=ANALYSIS_TIMEOUT_MS)
    assert w.analysis.profile == w.document.profile and not w.banner.isVisible()
    w.close()


def test_closing_while_an_analysis_runs_exits_cleanly(qtbot, tmp_path, qtlog):
    started, finished = threading.Event(), threading.Event()

    def slow(profile, conditions):
        started.set()
        time.sleep(1.0)
        finished.set()
        return analyze(profile, conditions)

    w = _window(qtbot, tmp_path, slow)
    assert started.wait(10)
    delivered = []
    w.runner.finished.connect(lambda *a: delivered.append(a))
    t0 = time.perf_counter()
    assert w.close()
    waited = time.perf_counter() - t0
    assert finished.is_set() and waited < 5.0  # closing waited for the running solve
    assert QThreadPool.globalInstance().waitForDone(5000)  # the pool drained
    qtbot.wait(50)
    assert delivered == []  # nothing was delivered after closing
    bad = [
        r.message
        for r in qtlog.records
        if "destroyed" in r.message.lower()
        or "deleted" in r.message.lower()
        or "QThread" in r.message
    ]
    assert bad == []
