"""Benchmark of the editor's responsiveness during a node drag (offscreen Qt).

Drives a drag of 60 real mouse moves (QTest) on the default sample analysed with ~300 panels and
reports, as medians over the moves:

- mouse event to repaint of the canvas with the new outline (the cheap preview at first);
- mouse event to the first repaint with the built outline of that move (built on a worker);
- mouse event to arrival of an analysis of that outline as the newest result (moves superseded
  by a newer one never get one: the newest edit wins; those are counted, not timed);
- the analyses shown during the drag although a newer move had superseded them (shown marked
  stale, newer than the one on screen): how many, how old each was on arrival (time since its
  own mouse move), and the longest stretch of the drag with no new analysis on screen;
- a second pass with a pause after each move: mouse event to arrival of that move's analysis;
- the longest gap of a 5 ms QTimer heartbeat during the drag (how long the GUI thread was busy).

Target: medians under 50 ms for the repaint, and no heartbeat gap over 50 ms.
Run: ``python benchmarks/bench_gui.py``; ``run()`` returns the rows.
"""

from __future__ import annotations

import os
import statistics
import sys
import tempfile
import time

os.environ.setdefault("QT_QPA_PLATFORM", "offscreen")
os.environ.setdefault("MPLBACKEND", "Agg")

TARGET_MS = 50.0


def _wait(app, predicate, timeout=60.0):
    t0 = time.perf_counter()
    while not predicate():
        app.processEvents()
        time.sleep(0.001)
        if time.perf_counter() - t0 > timeout:
            raise TimeoutError("the analysis did not arrive in time")


def run(moves: int = 60, panels: int = 300, move_interval_ms: float = 16.0):
    """Run the benchmark; return a list of row dicts (metric, value, unit, target, ok)."""
    from PySide6.QtCore import QPoint, QSettings, Qt, QTimer
    from PySide6.QtTest import QTest
    from PySide6.QtWidgets import QApplication

    from profilebench.editor import commands
    from profilebench.gui.main_window import MainWindow

    app = QApplication.instance() or QApplication(["bench"])
    settings = QSettings(os.path.join(tempfile.mkdtemp(), "s.ini"), QSettings.IniFormat)
    w = MainWindow(settings=settings)
    w.show()
    _wait(app, lambda: w.results_current or bool(w.last_message))
    w.push(commands.set_conditions(w.document.state, w.document.conditions.replace(panels=panels)))
    _wait(app, lambda: w.results_current)
    n_panels = len(w.analysis.flow.inviscid.x)
    solve_ms = 1000 * w.last_seconds

    c = w.canvas
    prof = w.document.profile
    node = max(range(len(prof)), key=lambda i: prof.nodes[i].y)  # a roof node

    gaps = []
    last = [time.perf_counter()]

    def beat():
        now = time.perf_counter()
        gaps.append(now - last[0])
        last[0] = now

    heart = QTimer()
    heart.setInterval(5)
    heart.timeout.connect(beat)

    arrivals = {}
    w.runner.finished.connect(lambda g, a, s: arrivals.setdefault(g, time.perf_counter()))
    lagging = {}
    w.runner.lagging.connect(lambda g, a, s: lagging.setdefault(g, time.perf_counter()))
    built_at = {}

    def painted(t):
        if c.last_paint_built:
            built_at.setdefault(id(c.last_paint_profile), t)

    c.painted.connect(painted)

    def press_at(p):
        QTest.mousePress(c, Qt.LeftButton, Qt.NoModifier, p)

    # ---- pass 1: continuous drag at ~60 Hz
    start = c.screen_of_node(node)
    p0 = QPoint(round(start.x()), round(start.y()))
    press_at(p0)
    heart.start()
    last[0] = time.perf_counter()
    paint_ms, sent, targets = [], [], []
    for k in range(1, moves + 1):
        p = QPoint(p0.x() + (k % 20) - 10 if k > 20 else p0.x(), p0.y() - k // 2)
        t0 = time.perf_counter()
        QTest.mouseMove(c, p)
        target = w.document.profile
        sent.append((w.runner.generation, t0))
        targets.append((target, t0))
        _wait(app, lambda: c.last_paint_profile is target)
        paint_ms.append(1000 * (c.last_paint_time - t0))
        t_next = t0 + move_interval_ms / 1000
        while time.perf_counter() < t_next:
            app.processEvents()
            time.sleep(0.0005)
    t_release = time.perf_counter()
    QTest.mouseRelease(c, Qt.LeftButton, Qt.NoModifier, p)
    _wait(app, lambda: w.results_current)
    heart.stop()
    drag_gap = 1000 * max(gaps)
    sent_at = dict(sent)
    shown = sorted(t for g, t in lagging.items() if t <= t_release)
    lag_ages = [
        1000 * (t - sent_at[g]) for g, t in lagging.items() if g in sent_at and t <= t_release
    ]
    edges = [sent[0][1]] + shown + [t_release]
    no_update_ms = 1000 * max(b - a for a, b in zip(edges[:-1], edges[1:]))
    analysis_ms = [1000 * (arrivals[g] - t) for g, t in sent if g in arrivals]
    built_ms = [1000 * (built_at[id(p)] - t) for p, t in targets if id(p) in built_at]

    # ---- pass 2: a move, then wait for its analysis, 10 times
    gaps.clear()
    heart.start()
    last[0] = time.perf_counter()
    start = c.screen_of_node(node)
    p0 = QPoint(round(start.x()), round(start.y()))
    press_at(p0)
    each_ms = []
    for k in range(1, 11):
        t0 = time.perf_counter()
        QTest.mouseMove(c, QPoint(p0.x(), p0.y() + k))
        g = w.runner.generation
        _wait(app, lambda: g in arrivals or (not w.runner.busy and w.last_message != ""))
        if g in arrivals:
            each_ms.append(1000 * (arrivals[g] - t0))
    QTest.mouseRelease(c, Qt.LeftButton, Qt.NoModifier, QPoint(p0.x(), p0.y() + 10))
    _wait(app, lambda: w.results_current)
    heart.stop()
    wait_gap = 1000 * max(gaps)
    w.document.mark_saved()
    w.close()

    def row(metric, value, unit="ms", target=None):
        return {
            "metric": metric,
            "value": value,
            "unit": unit,
            "target": target,
            "ok": None if target is None else value <= target,
        }

    rows = [
        row("panels in the solve", n_panels, ""),
        row("one analysis (background), last", solve_ms),
        row(
            "drag: mouse move -> canvas repaint, median",
            statistics.median(paint_ms),
            target=TARGET_MS,
        ),
        row("drag: mouse move -> canvas repaint, max", max(paint_ms)),
        row("drag: moves whose built outline was drawn", len(built_ms), f"of {moves}"),
        row(
            "drag: mouse move -> built outline drawn, median",
            statistics.median(built_ms) if built_ms else float("nan"),
        ),
        row("drag: moves that got their own analysis", len(analysis_ms), f"of {moves}"),
        row(
            "drag: mouse move -> its analysis, median",
            statistics.median(analysis_ms) if analysis_ms else float("nan"),
        ),
        row("drag: superseded analyses shown (marked stale)", len(shown), f"during {moves} moves"),
        row(
            "drag: age of a shown superseded analysis, median",
            statistics.median(lag_ages) if lag_ages else float("nan"),
        ),
        row("drag: longest stretch with no new analysis shown", no_update_ms),
        row("drag: longest GUI-thread gap (5 ms heartbeat)", drag_gap, target=TARGET_MS),
        row(
            "move and wait: mouse move -> its analysis, median",
            statistics.median(each_ms) if each_ms else float("nan"),
        ),
        row("move and wait: longest GUI-thread gap", wait_gap, target=TARGET_MS),
    ]
    return rows


def main() -> int:
    rows = run()
    for r in rows:
        verdict = "" if r["ok"] is None else ("  ok" if r["ok"] else "  OVER TARGET")
        target = "" if r["target"] is None else f"  (target <= {r['target']:g} ms)"
        value = r["value"]
        text = f"{value:.1f}" if isinstance(value, float) else str(value)
        print(f"{r['metric']:<52} {text:>8} {r['unit']}{target}{verdict}")
    return 0


if __name__ == "__main__":
    sys.exit(main())
