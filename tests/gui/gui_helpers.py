"""Helpers shared by the Qt tests."""

ANALYSIS_TIMEOUT_MS = 30000


def wait_current(qtbot, w):
    """Wait until the window shows the analysis of its current document state."""
    qtbot.waitUntil(lambda: w.results_current, timeout=ANALYSIS_TIMEOUT_MS)
