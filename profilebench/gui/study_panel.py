"""The editor's study panel: a sweep of one corner's radius, one node's position or the speed,
run in the background on the study engine, its chart drawn as the points arrive, and a click on
a point loading that point's variant into the editor as one undoable edit.

The study is planned here (:func:`profilebench.studies.radius_plan` and its siblings, from the
editor's profile and conditions when *Run* is pressed) and its points run on a Python thread
through :func:`profilebench.studies.run_points`: with two or more workers the points are analysed
on worker processes and the thread only waits for them, so the window stays responsive; with one
worker they run on that thread, sharing the interpreter with the window. *Cancel* sets the run's
cancel event: the engine stops between points and shuts its worker processes down. The chart is
rendered by matplotlib in the editor's plot process (:func:`profilebench.gui.plot_render.
render_sweep_rgba`), at most every :data:`REDRAW_MS`, and the GUI thread only shows the image.

A run keeps the document state it started from: its points never mix with another outline's,
and when the editor's outline or conditions change the panel says that its chart is of the
outline as it was when the run started.
"""

from __future__ import annotations

import dataclasses
import logging
import math
import threading
import time

from PySide6.QtCore import QObject, QSize, Qt, QTimer, Signal
from PySide6.QtGui import QImage, QPixmap
from PySide6.QtWidgets import (
    QComboBox,
    QFileDialog,
    QFormLayout,
    QHBoxLayout,
    QHeaderView,
    QLabel,
    QLineEdit,
    QProgressBar,
    QPushButton,
    QSpinBox,
    QSplitter,
    QVBoxLayout,
    QWidget,
)

from profilebench import studies
from profilebench.editor.fields import parse_number
from profilebench.errors import InputError, ProfileBenchError
from profilebench.gui.child_process import CHILD_NICENESS
from profilebench.gui.plot_render import render_sweep_rgba, warm_up
from profilebench.gui.results_panels import PlotView, row_table, set_table_cells
from profilebench.gui.runners import ProcessTaskRunner

__all__ = ["StudyPanel", "SWEEP_KINDS", "REDRAW_MS", "PICK_PX"]

log = logging.getLogger("profilebench.gui")

#: the sweeps the panel runs: (parameter of the table, name in the panel)
SWEEP_KINDS = (
    ("radius", "corner radius"),
    ("displacement", "node position"),
    ("speed", "speed"),
)
#: the two range fields of each sweep: (first label, second label, unit of the entry)
_RANGE_FIELDS = {
    "radius": ("first radius (mm)", "last radius (mm)", "mm"),
    "displacement": ("move x by (mm)", "move y by (mm)", "mm"),
    "speed": ("first speed (km/h)", "last speed (km/h)", "km/h"),
}
REDRAW_MS = 300  # the chart is rendered at most this often while points arrive
WATCH_MS = 500  # how often the panel looks whether the editor shows another document
PICK_PX = 12  # a click this close to a point's marker (px) loads that point
POINTS_DEFAULT = 8
POINTS_MAX = 200
TABLE_HEADER = ("", "Cd", "CdA (m²)", "corner verdict", "status")
NOTE_STYLE = "background: #fff6d5; color: #5a4500; padding: 3px; border: 1px solid #e0d090;"
ERROR_STYLE = "color: #b03000;"


@dataclasses.dataclass
class StudyRun:
    """One run of the panel: its plan, the document state it started from, the points' results
    as they arrive (None: not yet), its cancel event and thread."""

    number: int
    plan: object  # profilebench.studies.SweepPlan
    state: object  # the DocumentState the run was planned from
    workers: int
    cached: int  # points already in the point cache when the run started
    started: float
    results: list
    cancel: threading.Event
    thread: threading.Thread | None = None
    stats: object = None  # RunStats once finished
    error: str = ""

    @property
    def done(self) -> int:
        """Points analysed or taken from the cache (not those a cancel kept from running)."""
        return sum(_ran(r) for r in self.results)

    @property
    def failed(self) -> int:
        """Points analysed whose analysis did not succeed."""
        return sum(_ran(r) and not r.success for r in self.results)

    @property
    def finished(self) -> bool:
        return self.stats is not None or bool(self.error)


def _ran(result) -> bool:
    return result is not None and result.status is not studies.PointStatus.CANCELLED


class _Relay(QObject):
    point = Signal(int, int, object)  # run number, point index, PointResult
    done = Signal(int, object, str)  # run number, (results, stats) or None, error text


def _run_points(run: StudyRun, cache, relay: _Relay):
    """The run's thread: every point through the engine, each reported as it finishes."""

    def progress(done, total, index, result):
        try:
            relay.point.emit(run.number, index, result)
        except RuntimeError:  # the panel was deleted meanwhile
            pass

    payload, error = None, ""
    try:
        payload = studies.run_points(
            run.plan.specs,
            order=run.plan.order,
            workers=run.workers,
            progress=progress,
            cancel=run.cancel,
            cache=cache,
            niceness=CHILD_NICENESS,  # as the editor's other background processes
        )
    except Exception as exc:  # shown in the panel and logged; the editor goes on
        log.exception("the study failed in the background")
        error = f"{type(exc).__name__}: {exc}"
    try:
        relay.done.emit(run.number, payload, error)
    except RuntimeError:
        pass


def _lean(table):
    """The table without its variants (what the chart needs crosses to the plot process)."""
    return dataclasses.replace(table, profiles=(), conditions=())


class _ChartView(PlotView):
    """The chart image; a left click reports where (logical px of the widget)."""

    clicked = Signal(float, float)
    resized = Signal()

    def __init__(self):
        super().__init__()
        self.setMinimumSize(260, 200)
        self.setStyleSheet("background: white; color: #555;")
        self.setWordWrap(True)

    def sizeHint(self):
        return QSize(560, 460)

    def resizeEvent(self, event):
        super().resizeEvent(event)
        self.resized.emit()

    def mousePressEvent(self, event):
        if event.button() == Qt.LeftButton:
            p = event.position()
            self.clicked.emit(float(p.x()), float(p.y()))
        super().mousePressEvent(event)


class StudyPanel(QWidget):
    """The study dock's content.

    Parameters
    ----------
    state_source : callable
        Returns the editor's current :class:`~profilebench.editor.document.DocumentState` (its
        profile and conditions are what a run studies).

    Signals
    -------
    variant_chosen(object, object, str)
        A point was picked on the chart (or double-clicked in the table): its profile, its
        conditions and the text of the edit that loads them.
    finished()
        A run ended (all points, cancelled, or failed).
    rendered()
        A new chart image is shown.
    """

    variant_chosen = Signal(object, object, str)
    finished = Signal()
    rendered = Signal()

    def __init__(self, state_source, parent=None):
        super().__init__(parent)
        self.state_source = state_source
        self._follow = None  # a node selected while the panel was hidden (followed when shown)
        self.cache = studies.POINT_CACHE
        self.run_record: StudyRun | None = None  # the run shown (running or finished)
        self.table = None  # the SweepTable shown: the finished run's, or its points so far
        self.points_px: tuple = ()  # (index, x, y) of the markers of the image shown
        self.drawn_table = None  # the table the image shown was drawn from
        self.image = None  # the chart image shown (QImage)
        self.partial_draws = 0  # charts asked for of a run's points so far (before its end)
        self._runs = 0
        self._corners_key = None
        self._relay = _Relay(self)
        self._relay.point.connect(self._point_arrived)
        self._relay.done.connect(self._run_done)
        self.renderer = ProcessTaskRunner(
            render_sweep_rgba, self, warm_up=warm_up, child="plots", start=False
        )
        self.renderer.finished.connect(self._chart_rendered)
        self.renderer.failed.connect(self._chart_failed)
        # one chart drawn at a time, so that each is shown (a newer request would supersede it)
        self._requests: dict = {}  # render generation -> the table it draws
        self._draw_due = False  # points came (or the chart was resized) while one was drawn
        self._last_draw = 0.0
        self._redraw_timer = QTimer(self)
        self._redraw_timer.setSingleShot(True)
        self._redraw_timer.timeout.connect(self._draw)
        self._seen_state = None
        # the window tells of edits (document_changed); another document opened without an edit
        # before it is seen by this watch
        self._watch = QTimer(self)
        self._watch.setInterval(WATCH_MS)
        self._watch.timeout.connect(self._look)
        self._watch.start()
        self._build()

    # ------------------------------------------------------------------ widgets
    def _build(self):
        self.kind = QComboBox()
        for parameter, name in SWEEP_KINDS:
            self.kind.addItem(name, parameter)
        self.kind.setToolTip("what the study varies, point by point")
        self.corner = QComboBox()
        self.corner.setToolTip(
            "the corner swept (a radius sweep), moved (a position sweep) or watched (its verdict "
            "shaded along the chart); follows the node selected on the canvas or in the corner "
            "table"
        )
        self.first = QLineEdit()
        self.last = QLineEdit()
        self.first_label, self.last_label = QLabel(), QLabel()
        self.points = QSpinBox()
        self.points.setRange(2, POINTS_MAX)
        self.points.setValue(POINTS_DEFAULT)
        self.workers = QSpinBox()
        self.workers.setRange(1, max(1, studies.default_workers()) * 2)
        self.workers.setValue(studies.default_workers())
        self.workers.setToolTip(
            "processes analysing the points; 1 runs them beside the window, which then "
            "responds more slowly"
        )
        form = QFormLayout()
        form.setFieldGrowthPolicy(QFormLayout.AllNonFixedFieldsGrow)
        form.addRow("Sweep", self.kind)
        form.addRow("Corner", self.corner)
        row = QHBoxLayout()
        row.addWidget(self.first_label)
        row.addWidget(self.first, 1)
        row.addWidget(self.last_label)
        row.addWidget(self.last, 1)
        form.addRow(row)
        counts = QHBoxLayout()
        counts.addWidget(QLabel("points"))
        counts.addWidget(self.points)
        counts.addSpacing(12)
        counts.addWidget(QLabel("workers"))
        counts.addWidget(self.workers)
        counts.addStretch(1)
        form.addRow(counts)

        self.run_button = QPushButton("Run")
        self.run_button.clicked.connect(self.run)
        self.cancel_button = QPushButton("Cancel")
        self.cancel_button.setEnabled(False)
        self.cancel_button.clicked.connect(self.cancel)
        self.export_button = QPushButton("Export chart…")
        self.export_button.setEnabled(False)
        self.export_button.setToolTip("the chart as PNG, SVG or PDF, with the caution")
        self.export_button.clicked.connect(self._ask_export)
        self.bar = QProgressBar()
        self.bar.setRange(0, 1)
        self.bar.setValue(0)
        self.bar.setFormat("%v of %m points")
        buttons = QHBoxLayout()
        buttons.addWidget(self.run_button)
        buttons.addWidget(self.cancel_button)
        buttons.addWidget(self.bar, 1)
        buttons.addWidget(self.export_button)

        self.status = QLabel("choose the corner and the range, then Run")
        self.status.setWordWrap(True)
        self.note = QLabel("")
        self.note.setWordWrap(True)
        self.note.setStyleSheet(NOTE_STYLE)
        self.note.hide()
        self.chart = _ChartView()
        self.chart.setText("no study yet")
        self.chart.setToolTip("click a point to load that variant into the editor (undoable)")
        self.chart.clicked.connect(self._chart_clicked)
        self.chart.resized.connect(self._chart_resized)
        self.point_table = row_table(TABLE_HEADER)
        self.point_table.horizontalHeader().setSectionResizeMode(QHeaderView.ResizeToContents)
        self.point_table.horizontalHeader().setStretchLastSection(True)
        self.point_table.setToolTip("double-click a point to load that variant into the editor")
        self.point_table.cellDoubleClicked.connect(lambda r, _c: self.load_point(r))
        split = QSplitter(Qt.Vertical)
        split.addWidget(self.chart)
        split.addWidget(self.point_table)
        split.setStretchFactor(0, 3)
        split.setStretchFactor(1, 1)
        split.setChildrenCollapsible(False)

        layout = QVBoxLayout(self)
        layout.setContentsMargins(4, 4, 4, 4)
        layout.addLayout(form)
        layout.addLayout(buttons)
        layout.addWidget(self.status)
        layout.addWidget(self.note)
        layout.addWidget(split, 1)
        self.kind.currentIndexChanged.connect(lambda _: self._defaults())
        self.corner.currentIndexChanged.connect(lambda _: self._defaults())
        self._sync()
        self._defaults()

    # ------------------------------------------------------------------ the editor's side
    @property
    def parameter(self) -> str:
        return self.kind.currentData()

    @property
    def node(self):
        """The node chosen in the corner list (None: none)."""
        return self.corner.currentData()

    @property
    def running(self) -> bool:
        r = self.run_record
        return r is not None and not r.finished

    def follow_node(self, node):
        """The editor selected ``node`` (-1 or None: nothing): the corner list follows it.

        A hidden panel only remembers the node and follows it when shown: filling the list and
        the range (the largest radius that fits) took about 60 ms of the GUI thread on every
        press on the canvas, the start of every drag."""
        if node is None or node < 0:
            return
        self._follow = int(node)
        if self.isVisible():
            self._follow_now()

    def _follow_now(self):
        node, self._follow = self._follow, None
        self._refresh()  # the list is of the editor's outline
        if node is None:
            return
        k = self.corner.findData(node)
        if k >= 0:
            self.corner.setCurrentIndex(k)

    def document_changed(self, *_):
        """The editor's document changed: the corner list follows its nodes, and the note says
        whether the chart is still of the editor's outline and conditions (a hidden panel looks
        when it is shown: listing the corners by place takes the GUI thread at every edit)."""
        if self.isVisible():
            self._sync()

    def _sync(self):
        state = self.state_source()
        self._seen_state = state
        if state is None:
            return
        self._list_corners(state.profile)
        self._update_note(state)

    def _refresh(self):
        """Look at the editor's document now (it may have been replaced without an edit)."""
        if self.state_source() is not self._seen_state:
            self._sync()

    def _look(self):  # the watch: only while the panel is shown (a hidden one looks when shown)
        if self.isVisible():
            self._refresh()

    def showEvent(self, event):
        super().showEvent(event)
        self._follow_now()

    def _list_corners(self, profile):
        from profilebench.geometry.places import place_names

        try:
            places = place_names(profile)
        except ProfileBenchError:  # an outline that does not build: the nodes unnamed
            places = {}
        items = []
        for i, n in enumerate(profile.nodes):
            if n.smooth:
                text = f"node {i} (smooth)"
            else:
                place = places.get(i, "corner")
                text = f"node {i}: {n.label} ({place})" if n.label else f"node {i}: {place}"
            items.append((text, i))
        key = tuple(items)
        if key == self._corners_key:
            return
        self._corners_key = key
        keep = self.node
        self.corner.blockSignals(True)
        try:
            self.corner.clear()
            for text, i in items:
                self.corner.addItem(text, i)
            k = self.corner.findData(keep) if keep is not None else -1
            if k < 0:  # by default the first corner
                k = next((j for j, (_, i) in enumerate(items) if not profile.nodes[i].smooth), 0)
            self.corner.setCurrentIndex(k)
        finally:
            self.corner.blockSignals(False)
        if keep is None or self.node != keep:
            self._defaults()

    def _update_note(self, state):
        r = self.run_record
        if r is None:
            self.note.hide()
            return
        old = r.state
        changed = []
        if state.profile != old.profile:
            changed.append("outline")
        if state.conditions != old.conditions:
            changed.append("conditions")
        if not changed:
            self.note.hide()
            return
        self.note.setText(
            f"This chart is of the outline and conditions as they were when the run started "
            f"({time.strftime('%H:%M:%S', time.localtime(r.started))}); the editor's "
            f"{' and '.join(changed)} changed since. Run again to study the current ones."
        )
        self.note.show()

    def _defaults(self):
        """The range fields of the chosen sweep, filled with its defaults."""
        parameter = self.parameter
        first, last, _ = _RANGE_FIELDS[parameter]
        self.first_label.setText(first)
        self.last_label.setText(last)
        state = self.state_source()
        if state is None:
            return
        if parameter == "radius":
            self.first.setText("0")
            node = self.node
            try:
                top = (
                    studies.radius_range(state.profile, node, points=2)[-1]
                    if node is not None
                    else None
                )
            except ProfileBenchError:
                top = None
            self.last.setText("" if top is None else f"{math.floor(top * 1e3):g}")
        elif parameter == "displacement":
            self.first.setText("0")
            self.last.setText("50")
        else:
            from profilebench.assess.conditions import ms_to_kmh

            v = ms_to_kmh(state.conditions.speed)
            self.first.setText(f"{round(v * 0.5):g}")
            self.last.setText(f"{round(v * 1.5):g}")

    # ------------------------------------------------------------------ planning and running
    def plan(self, state):
        """The :class:`~profilebench.studies.SweepPlan` of the fields for ``state``; raises a
        ProfileBenchError saying what to fix."""
        from profilebench.assess.conditions import kmh_to_ms

        node = self.node
        if node is None:
            raise InputError("choose a corner: click it on the canvas or in the corner table")
        parameter = self.parameter
        first_name, last_name, unit = _RANGE_FIELDS[parameter]
        first_name, last_name = (n.rsplit(" (", 1)[0] for n in (first_name, last_name))
        a = parse_number(self.first.text(), first_name, unit)
        b = parse_number(self.last.text(), last_name, unit)
        n = self.points.value()
        profile, conditions = state.profile, state.conditions
        watched = None if profile.nodes[node].smooth else node
        if parameter == "radius":
            radii = studies.radius_range(profile, node, a / 1e3, b / 1e3, n)
            return studies.radius_plan(profile, conditions, node, radii=radii)
        if parameter == "displacement":
            return studies.position_plan(
                profile, conditions, node, (a / 1e3, b / 1e3), n, corner=watched
            )
        if not a < b:
            raise InputError(
                f"the speed range {a:g} to {b:g} km/h is empty; give a first speed below the last"
            )
        speeds = [kmh_to_ms(a + (b - a) * k / (n - 1)) for k in range(n)]
        return studies.speed_plan(profile, conditions, speeds, corner=watched)

    def run(self) -> bool:
        """Plan the study from the editor's current state and start it; False (with the reason
        shown) when the fields do not give a study or one is running."""
        if self.running:
            self._say("a study is running; cancel it first", error=True)
            return False
        self._refresh()
        state = self.state_source()
        try:
            plan = self.plan(state)
        except ProfileBenchError as exc:
            self._say(str(exc), error=True)
            return False
        self._runs += 1
        cached = sum(self.cache.get(s.key()) is not None for s in plan.specs)
        run = StudyRun(
            self._runs,
            plan,
            state,
            self.workers.value(),
            cached,
            time.time(),
            [None] * len(plan),
            threading.Event(),
        )
        self.run_record = run
        self.table = None
        self._requests = {}  # a chart of an earlier run still being drawn is not shown
        self.drawn_table = None
        self.points_px = ()
        self.chart.setPixmap(QPixmap())
        self.chart.setText("waiting for the first points…")
        set_table_cells(self.point_table, [])
        self.bar.setRange(0, len(plan))
        self.bar.setValue(0)
        self.run_button.setEnabled(False)
        self.cancel_button.setEnabled(True)
        self.export_button.setEnabled(False)
        self._update_note(state)
        self._status()
        run.thread = threading.Thread(
            target=_run_points,
            args=(run, self.cache, self._relay),
            daemon=True,
            name="profilebench-study",
        )
        run.thread.start()
        return True

    def cancel(self):
        """Stop the running study: the engine stops between points and ends its workers."""
        r = self.run_record
        if r is None or r.finished:
            return
        r.cancel.set()
        self.cancel_button.setEnabled(False)
        self._status()

    def _point_arrived(self, number, index, result):
        r = self.run_record
        if r is None or number != r.number:
            return  # a point of an earlier run: never mixed in
        r.results[index] = result
        self.bar.setValue(r.done)
        self._status()
        self._schedule_draw()

    def _run_done(self, number, payload, error):
        r = self.run_record
        if r is None or number != r.number:
            return
        if payload is None:
            r.error = error or "the study failed"
        else:
            results, r.stats = payload
            r.results = list(results)
            self.table = r.plan.table(results, r.stats)
        self.bar.setValue(r.done)
        self.run_button.setEnabled(True)
        self.cancel_button.setEnabled(False)
        self.export_button.setEnabled(r.stats is not None)
        self._status()
        self._show_rows()
        self._schedule_draw(now=True)
        self.finished.emit()

    def _counts(self, r) -> str:
        cached = r.stats.from_cache if r.stats is not None else min(r.cached, r.done)
        seconds = r.stats.seconds if r.stats is not None else time.time() - r.started
        return (
            f"{r.done} of {len(r.results)} points, {cached} from the cache, "
            f"{r.failed} failed; {seconds:.1f} s"
        )

    def _status(self):
        r = self.run_record
        if r.error:
            self._say(f"study failed (logged): {r.error}", error=True)
            return
        if r.stats is None:
            what = (
                "cancelling: waiting for the points being analysed…"
                if r.cancel.is_set()
                else "running:"
            )
            self._say(f"{what} {self._counts(r)}")
            return
        what = "cancelled" if r.stats.cancelled else "done"
        knee, tail = self.table.knee, ""
        if knee is not None:
            tail = f"; knee at {knee.radius * 1e3:.0f} mm" if knee.found else "; no knee in range"
        small = self.table.smallest_attached_radius if self.table.parameter == "radius" else None
        if small is not None:
            tail += f"; smallest attached radius {small * 1e3:.1f} mm"
        self._say(f"{what}: {self._counts(r)}{tail}")

    def _say(self, text, error=False):
        self.status.setStyleSheet(ERROR_STYLE if error else "")
        self.status.setText(text)

    # ------------------------------------------------------------------ the chart and the table
    def _schedule_draw(self, now=False):
        r = self.run_record
        if r is None:
            return
        if not r.finished:
            stats = studies.RunStats(0, 0, False, time.time() - r.started, None, r.workers)
            self.table = r.plan.table_so_far(r.results, stats)
            self._show_rows()
        if self._redraw_timer.isActive() and not now:
            return
        wait_ms = REDRAW_MS - 1000 * (time.perf_counter() - self._last_draw)
        if now or wait_ms <= 0:
            self._redraw_timer.stop()
            self._draw()
        else:
            self._redraw_timer.start(max(int(wait_ms), 20))

    def _draw(self):
        table = self.table
        if table is None:
            return
        if len(table) < 2:
            self.chart.setText(f"{len(table)} point done; the chart starts with the second")
            return
        if self.renderer.busy:  # one chart drawn at a time: the next when it is done
            self._draw_due = True
            return
        self._last_draw = time.perf_counter()
        title = None
        if self.running:  # said in the title: the knee of the points so far may still move
            self.partial_draws += 1
            corner = (
                f", corner {table.corner_label} (node {table.corner})"
                if table.corner is not None
                else ""
            )
            title = (
                f"{table.parameter} sweep{corner}: {len(table)} of "
                f"{len(self.run_record.results)} points so far"
            )
        ratio = self.chart.devicePixelRatioF()
        w, h = self.chart.width(), self.chart.height()
        generation = self.renderer.request(
            _lean(table), int(w * ratio), int(h * ratio), 90.0 * ratio, title
        )
        self._requests = {generation: (table, ratio)}

    def _drawn(self):
        """A chart came back: the newest points are drawn next if they came meanwhile."""
        if self._draw_due:
            self._draw_due = False
            self._redraw_timer.start(20)

    def _chart_failed(self, generation, message):
        self._chart_text(f"chart failed (logged): {message}")
        self._drawn()

    def _chart_rendered(self, generation, result, seconds):
        self._drawn()
        drawn = self._requests.pop(generation, None)
        if drawn is None:  # a chart of an earlier run
            return
        table, ratio = drawn
        w, h, rgba, points = result
        image = QImage(rgba, w, h, 4 * w, QImage.Format_RGBA8888).copy()
        pixmap = QPixmap.fromImage(image)
        pixmap.setDevicePixelRatio(ratio)
        self.chart.setPixmap(pixmap)
        self.image = image
        self.drawn_table = table
        self.points_px = tuple((i, x / ratio, y / ratio) for i, x, y in points)
        self.rendered.emit()

    def _chart_text(self, text):
        self.chart.setPixmap(QPixmap())
        self.chart.setText(text)

    def _chart_resized(self):
        if self.table is not None:
            self._redraw_timer.start(150)

    def markers(self) -> tuple:
        """(index, x, y) of every point's marker (Cd first, then CdA) in px of the chart
        widget, in the image shown (the image is centred in the widget)."""
        pixmap = self.chart.pixmap()
        if pixmap is None or pixmap.isNull():
            return ()
        size = pixmap.deviceIndependentSize()
        ox = (self.chart.width() - size.width()) / 2.0
        oy = (self.chart.height() - size.height()) / 2.0
        return tuple((i, px + ox, py + oy) for i, px, py in self.points_px)

    def point_at(self, x, y):
        """The index of the point whose marker is nearest (x, y) (px of the chart widget),
        within :data:`PICK_PX`, or None."""
        near = [(math.hypot(px - x, py - y), i) for i, px, py in self.markers()]
        near = [(d, i) for d, i in near if d <= PICK_PX]
        return min(near)[1] if near else None

    def chart_position(self, index):
        """Where (px of the chart widget) the Cd marker of point ``index`` is drawn, or None."""
        return next(((x, y) for i, x, y in self.markers() if i == index), None)

    def _chart_clicked(self, x, y):
        i = self.point_at(x, y)
        if i is not None:
            self.load_point(i, self.drawn_table)

    def _show_rows(self):
        table = self.table
        if table is None:
            set_table_cells(self.point_table, [])
            return
        from profilebench.plotting.sweep_chart import axis_scale

        scale, label = axis_scale(table.parameter)
        header = self.point_table.horizontalHeaderItem(0)
        if header is not None and header.text() != label:
            header.setText(label)
        verdicts = table.corner_verdicts() if table.corner is not None else (None,) * len(table)
        rows = []
        for i in range(len(table)):
            cd, cda = table.cd, table.cda
            rows.append(
                [
                    f"{float(table.values[i]) * scale:.4g}",
                    "" if cd.mask[i] else f"{float(cd.data[i]):.4f}",
                    "" if cda.mask[i] else f"{float(cda.data[i]):.4f}",
                    "" if verdicts[i] is None else verdicts[i].value,
                    table.status[i].value,
                ]
            )

        def style(r, k, item):
            if k == 4 and item.toolTip() != table.messages[r]:
                item.setToolTip(table.messages[r])

        set_table_cells(self.point_table, rows, style)

    def load_point(self, index, table=None):
        """Load the variant of point ``index`` of ``table`` (default the table shown) into the
        editor (through :attr:`variant_chosen`: one undoable edit); True if asked."""
        table = self.table if table is None else table
        if table is None or not 0 <= index < len(table):
            return False
        from profilebench.plotting.sweep_chart import axis_scale

        scale, label = axis_scale(table.parameter)
        unit = label.rsplit("(", 1)[-1].rstrip(")")
        value = float(table.values[index]) * scale
        what = {
            "radius": f"{table.corner_label or f'node {table.corner}'} radius",
            "displacement": "node moved",
            "speed": "speed",
        }[table.parameter]
        text = f"Load study point: {what} {value:.4g} {unit}"
        self.variant_chosen.emit(table.profiles[index], table.conditions[index], text)
        if table is self.table:
            self.point_table.selectRow(index)
        return True

    # ------------------------------------------------------------------ export, closing
    def _ask_export(self):
        path, _ = QFileDialog.getSaveFileName(
            self, "Export study chart", "", "Images (*.png *.svg *.pdf)"
        )
        if path:
            self.export_chart(path)

    def export_chart(self, path) -> bool:
        """Write the chart of the finished study (with the caution) as PNG, SVG or PDF."""
        from profilebench.io.atomic import check_writable
        from profilebench.plotting import save_figure
        from profilebench.plotting.sweep_chart import sweep_figure

        r = self.run_record
        if self.table is None or r is None or r.stats is None:
            self._say("nothing to export yet: run a study to its end", error=True)
            return False
        try:
            check_writable(path)
            save_figure(sweep_figure(self.table), path)
        except ProfileBenchError as exc:
            self._say(f"export failed: {exc}", error=True)
            return False
        self._say(f"chart exported to {path}")
        return True

    def shutdown(self, msecs: int = 30000) -> bool:
        """Cancel a running study and wait for its thread and the chart; False if one did not
        end within ``msecs``."""
        self._redraw_timer.stop()
        self._watch.stop()
        r = self.run_record
        ok = True
        if r is not None and r.thread is not None:
            r.cancel.set()
            r.thread.join(msecs / 1000.0)
            ok = not r.thread.is_alive()
        return self.renderer.close(msecs) and ok
