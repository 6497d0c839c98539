"""The canvas's analysis overlay is drawn on a worker in every case (first analysis, zoom, pan,
resize) and the old images follow the view until the new ones arrive."""

import threading

import numpy as np
import pytest

import profilebench.gui.canvas_overlay as overlay_module

from gui_helpers import ANALYSIS_TIMEOUT_MS


@pytest.fixture
def overlay_threads(monkeypatch):
    """Record the thread of every overlay drawing."""
    threads = []
    real = overlay_module.render_overlay

    def recording(scene):
        threads.append(threading.current_thread() is threading.main_thread())
        return real(scene)

    monkeypatch.setattr(overlay_module, "render_overlay", recording)
    return threads


@pytest.mark.parametrize("change", ["zoom", "pan", "resize"])
def test_overlay_redrawn_off_the_gui_thread(window, qtbot, overlay_threads, change):
    c = window.canvas
    qtbot.waitUntil(lambda: c.up_to_date, timeout=ANALYSIS_TIMEOUT_MS)
    overlay_threads.clear()
    before = c._overlay
    if change == "zoom":
        c.zoom(1.25)
    elif change == "pan":
        c.view = c.view.panned(40, -25)
        c.update()
    else:
        window.resize(window.width() - 120, window.height() - 60)
    c.repaint()
    qtbot.waitUntil(lambda: c.up_to_date, timeout=ANALYSIS_TIMEOUT_MS)
    assert c._overlay is not before  # new images arrived
    assert overlay_threads and not any(overlay_threads)  # all drawn on a worker thread


def test_first_overlay_drawn_off_the_gui_thread(window, qtbot, overlay_threads):
    c = window.canvas
    c._overlay = None  # as on the first analysis: no images yet
    c._overlay_requested = None
    c.repaint()  # paints without an overlay, asks the worker
    qtbot.waitUntil(lambda: c.up_to_date, timeout=ANALYSIS_TIMEOUT_MS)
    assert overlay_threads and not any(overlay_threads)


@pytest.mark.parametrize(
    "factor, shift", [(1.25, (0, 0)), (0.8, (0, 0)), (1.0, (35, -20)), (1.5, (-12, 9))]
)
def test_old_overlay_follows_the_view(window, qtbot, factor, shift):
    c = window.canvas
    qtbot.waitUntil(lambda: c.up_to_date, timeout=ANALYSIS_TIMEOUT_MS)
    old_view = c.view
    c.overlay_runner.close(5000)  # keep the old images: nothing new arrives
    c.view = c.view.zoomed(factor, 300.0, 200.0).panned(*shift)
    under, over, mapping = c._overlay_images()
    assert under is c._overlay[2] and over is c._overlay[3]
    k, dx, dy = mapping
    # a world point's old screen position, mapped, lands on its new one (ViewTransform:
    # screen x = offset_x + scale * x, screen y = offset_y - scale * y)
    world = np.array([[0.0, 0.0], [1.7, 0.4], [-0.3, 1.2]])
    old = np.array([old_view.to_screen(*p) for p in world.tolist()])
    new = np.array([c.view.to_screen(*p) for p in world.tolist()])
    np.testing.assert_allclose(k * old + [dx, dy], new, atol=1e-9)
