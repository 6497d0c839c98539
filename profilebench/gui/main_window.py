"""The main window: canvas in the middle, panels docked round it, undo stack, workers.

The window holds an :class:`profilebench.editor.Document` and a QUndoStack of
:class:`~profilebench.gui.undo.EditCommand`; every user action becomes an editor edit. Analyses
run on a :class:`~profilebench.gui.runners.AnalysisRunner`; the newest result is shown, a failed
one is reported in the banner while the last good result stays on screen marked stale. Which
result is shown, and when, is decided by the Qt-free
:class:`~profilebench.editor.controller.ResultsController`; the window wires signals to it and
shows what it holds. The menus (:mod:`profilebench.gui.menus`) and the other parts of the
window's work live in modules of their own.
"""

from __future__ import annotations

import functools
import logging
import os
import sys
from pathlib import Path

from PySide6.QtCore import QSettings, Qt, QTimer
from PySide6.QtGui import QUndoStack
from PySide6.QtWidgets import (
    QDockWidget,
    QLabel,
    QMainWindow,
    QMessageBox,
    QVBoxLayout,
    QWidget,
)

from profilebench.editor import commands, recovery
from profilebench.editor.document import CAUTION
from profilebench.editor.controller import ResultsController, failure_text
from profilebench.editor.project_file import document_of, project_of
from profilebench.editor.recovery import AUTOSAVE_ENV
from profilebench.editor.underlay import Underlay
from profilebench.errors import ProfileBenchError
from profilebench.gui.canvas import ProfileCanvas
from profilebench.gui import exports, menus, outline_import, questions
from profilebench.gui.conditions_panel import ConditionsPanel
from profilebench.gui.corner_search import CornerSearch
from profilebench.gui.refinement_check import RefinementCheckRun
from profilebench.gui.node_panel import NodePanel
from profilebench.gui.plot_schedule import PlotSchedule
from profilebench.gui.recent_files import RecentFiles
from profilebench.gui.recovery_copies import RecoveryCopies, default_folder
from profilebench.gui.results_panels import CornerTable, PlotPanel, SummaryPanel
from profilebench.gui.undo import push_edit
from profilebench.gui.underlay_picking import UnderlayPicking, underlay_from_image
from profilebench.gui.child_process import call
from profilebench.gui.work_progress import WorkProgress
from profilebench.gui.runners import AnalysisRunner, ProcessTaskRunner

__all__ = ["MainWindow"]

log = logging.getLogger("profilebench.gui")

# Analyses, the radius search and the plots run in child processes (profilebench.gui.child_process);
# the outline and overlay workers are Python threads sharing the GIL with the GUI thread. With
# Python's default 5 ms switch interval every hand-over to the GUI thread can wait up to 5 ms;
# 1 ms keeps the GUI thread's painting responsive (measured with benchmarks/bench_gui.py).
GIL_SWITCH_INTERVAL_S = 0.001
LONG_WORK_MS = 600  # work running longer shows the status bar's busy bar and Cancel


BANNER_ERROR = "background: #fde2d8; color: #7a1f00; padding: 4px; border: 1px solid #e0a080;"
BANNER_INFO = "background: #fff6d5; color: #5a4500; padding: 4px; border: 1px solid #e0d090;"


# the radius search (a bisection of whole analyses) runs in a child process of its own, through
# that process's search cache; a search the shown analysis already ran is taken from it
_search = functools.partial(call, "profilebench.assess.radius_search:cached_radius_search")


class MainWindow(QMainWindow):
    """The profile editor's window.

    Parameters
    ----------
    path : str or Path, optional
        Project file to open; default the bundled default sample.
    settings : QSettings, optional
        Where recent files are kept (tests pass a temporary INI file).
    analyze_fn : callable, optional
        ``analyze(profile, conditions) -> Analysis``; default the package's pipeline.
    autosave_ms : int, optional
        Interval of the recovery copy of unsaved work (ms); default the environment variable
        ``PROFILEBENCH_AUTOSAVE_MS``, else the setting ``autosave_ms``, else 60000.
    recovery_dir : str or Path, optional
        Folder of recovery copies; default the setting ``recovery_dir``, else ``recovery`` in
        the application's data folder (QStandardPaths.AppDataLocation).
    """

    def __init__(
        self,
        path=None,
        settings: QSettings | None = None,
        analyze_fn=None,
        autosave_ms: int | None = None,
        recovery_dir=None,
    ):
        super().__init__()
        if sys.getswitchinterval() > GIL_SWITCH_INTERVAL_S:
            sys.setswitchinterval(GIL_SWITCH_INTERVAL_S)
        self.settings = settings if settings is not None else QSettings()
        self.undo_stack = QUndoStack(self)
        # superseded results are shown (marked stale) when newer than the one on screen, so a
        # long drag keeps updating the flow a few moves behind the mouse
        self.runner = AnalysisRunner(self, analyze_fn, deliver_lagging=True)
        self.baseline_runner = AnalysisRunner(self, analyze_fn)
        self.search_runner = ProcessTaskRunner(_search, self, child="search")
        self.document = None
        self._shown_state = None  # the document state the views show
        # what is shown of the analyses and searches, and which state each request is for
        self.results = ResultsController()
        self.last_message = ""

        self.canvas = ProfileCanvas()
        self.banner = QLabel("")
        self.banner.setWordWrap(True)
        self.banner.hide()
        self.caution = QLabel(CAUTION)
        self.caution.setWordWrap(True)
        self.caution.setStyleSheet("color: #5a4500; background: #fff9e6; padding: 3px;")
        central = QWidget()
        lay = QVBoxLayout(central)
        lay.setContentsMargins(0, 0, 0, 0)
        lay.setSpacing(0)
        lay.addWidget(self.banner)
        lay.addWidget(self.canvas, 1)
        lay.addWidget(self.caution)
        self.setCentralWidget(central)

        self.conditions_panel = ConditionsPanel()
        self.node_panel = NodePanel()
        self.corner_table = CornerTable()
        self.summary = SummaryPanel()
        self.plots = PlotPanel()
        self._docks = {}
        self._dock("Flow conditions", self.conditions_panel, Qt.LeftDockWidgetArea)
        self._dock("Selected node", self.node_panel, Qt.LeftDockWidgetArea)
        self._dock("Drag summary", self.summary, Qt.RightDockWidgetArea)
        self._dock("Corners", self.corner_table, Qt.BottomDockWidgetArea)
        self._dock("Plots", self.plots, Qt.BottomDockWidgetArea)
        self.resizeDocks([self._docks["Flow conditions"]], [300], Qt.Horizontal)
        self.resizeDocks([self._docks["Drag summary"]], [330], Qt.Horizontal)
        self.resizeDocks([self._docks["Corners"]], [250], Qt.Vertical)
        # the corner table's nine columns get the larger share of the bottom row
        self.resizeDocks([self._docks["Corners"], self._docks["Plots"]], [900, 600], Qt.Horizontal)
        # --- variant sets: the dock and its logic live in profilebench.gui.variants_panel ---
        from profilebench.gui.variants_panel import install_variants_panel

        self.variants_panel = install_variants_panel(self)
        # --- end of variant sets ---

        self.plot_schedule = PlotSchedule(self)

        from profilebench.gui.refcount_guard import install

        self._refcount_timer = install(self)
        self.progress = WorkProgress()
        self.statusBar().addPermanentWidget(self.progress)
        self._progress_timer = QTimer(self)
        self._progress_timer.setSingleShot(True)
        self._progress_timer.timeout.connect(self._long_analysis)
        self.grid_spacing = 0.01  # snapping grid (m) when on
        self.underlay_picking = UnderlayPicking(self)
        self.corner_search = CornerSearch(self)
        self.refinement_check = RefinementCheckRun(self)
        self._connect()
        self._build_menus()
        self._add_study_panel()
        self._load_cp_scale()
        self.statusBar().showMessage("ready")
        self.resize(1500, 950)
        self.startup_problems = []  # what went wrong at start-up, told once it is shown
        if path is not None and not self.open_file(path):
            self.startup_problems.append(
                f"{self.last_message}; the default profile is shown instead"
            )
        if self.document is None:
            self.new_document()

        self.recovery_dir = Path(
            recovery_dir if recovery_dir is not None else default_folder(self.settings)
        )
        self.autosave_ms, problems = recovery.autosave_interval(
            autosave_ms, os.environ.get(AUTOSAVE_ENV), self.settings.value("autosave_ms", None)
        )
        for problem in problems:  # a bad environment variable or setting: told once shown
            log.warning("%s", problem)
            self.startup_problems.append(problem)
        self.recovery_copies = RecoveryCopies(self, self.recovery_dir, self.autosave_ms)
        QTimer.singleShot(0, self._tell_startup_problems)  # after the caller could set report_error
        QTimer.singleShot(0, self.offer_recovery)  # after the caller could set ask_recover

    # the shown results, as the controller keeps them
    analysis = property(lambda self: self.results.analysis, doc="last good analysis (may be stale)")
    analysis_state = property(
        lambda self: self.results.analysis_state, doc="the document state it was computed for"
    )
    last_seconds = property(lambda self: self.results.seconds)
    baseline_analysis = property(lambda self: self.results.baseline_analysis)
    searches = property(lambda self: self.results.searches, doc="each corner's radius search")
    results_received = property(lambda self: self.results.results_received)
    lagging_shown = property(
        lambda self: self.results.lagging_shown, doc="superseded analyses shown (marked stale)"
    )

    def _tell_startup_problems(self):
        if self.startup_problems:
            text = "\n\n".join(self.startup_problems)
            self.statusBar().showMessage(self.startup_problems[0], 20000)
            self.report_error("Started with problems", text)

    # ------------------------------------------------------------------ construction
    def _dock(self, title, widget, area):
        dock = QDockWidget(title, self)
        dock.setObjectName(title)
        dock.setWidget(widget)
        dock.setFeatures(QDockWidget.DockWidgetMovable | QDockWidget.DockWidgetFloatable)
        self.addDockWidget(area, dock)
        self._docks[title] = dock

    def _connect(self):
        c = self.canvas
        c.preview.connect(self.preview_profile)
        c.edit_finished.connect(self.push)
        c.edit_finished.connect(self._refine_provisional)  # after push: the final state is set
        c.node_selected.connect(self.select_node)
        c.insert_requested.connect(self.insert_node)
        c.picked.connect(self.underlay_picking.pick)
        self.corner_table.node_selected.connect(self.select_node)
        self.corner_table.search_requested.connect(self.find_smallest_radius)
        self.corner_table.apply_requested.connect(self.apply_smallest_radius)
        self.node_panel.radius_entered.connect(self.set_radius)
        self.node_panel.position_entered.connect(
            lambda i, x, y: self._try(lambda: commands.move_node(self.document.state, i, x, y))
        )
        self.node_panel.smooth_toggled.connect(
            lambda i, on: self._try(lambda: commands.set_smooth(self.document.state, i, on))
        )
        self.conditions_panel.changed.connect(
            lambda cond, text: self._try(
                lambda: commands.set_conditions(self.document.state, cond, text)
            )
        )
        self.runner.finished.connect(self._analysis_finished)
        self.runner.failed.connect(self._analysis_failed)
        self.runner.lagging.connect(self._analysis_lagging)
        self.baseline_runner.finished.connect(self._baseline_finished)
        self.baseline_runner.failed.connect(
            lambda g, m: self._show_banner(f"baseline analysis failed: {m}", True)
        )
        self.progress.cancelled.connect(self._cancel_work)
        self.undo_stack.cleanChanged.connect(self._clean_changed)

    def _action(self, menu, text, slot, shortcut=None, checkable=False):
        return menus.add_action(self, menu, text, slot, shortcut, checkable)

    def _build_menus(self):
        """The menu bar (profilebench.gui.menus); ``self.menus`` holds its menus by title."""
        self.menus = menus.build_menus(self)
        self.recent = RecentFiles(
            self.settings, self.recent_menu, lambda p: self.confirm_discard() and self.open_file(p)
        )

    # ------------------------------------------------------------------ study dock
    # Everything the window does for the study panel is here (and its shutdown in shutdown());
    # the panel's logic is in profilebench/gui/study_panel.py.
    def _add_study_panel(self):
        from profilebench.gui.study_panel import StudyPanel
        from profilebench.studies.runner import start_worker_server

        # the study's workers are forked from a server with the package imported (threads run
        # here, so not from this process): started now, a study's first point comes in ~0.35 s
        start_worker_server()

        self.study_panel = StudyPanel(lambda: self.document.state if self.document else None)
        self._dock("Study", self.study_panel, Qt.RightDockWidgetArea)
        dock = self._docks["Study"]
        dock.setFeatures(dock.features() | QDockWidget.DockWidgetClosable)
        self.tabifyDockWidget(self._docks["Drag summary"], dock)
        self._docks["Drag summary"].raise_()
        menu = self.menuBar().addMenu("&Study")
        self._action(menu, "Open study panel", self.show_study_panel, "Ctrl+Shift+Y")
        self._action(menu, "Run study", lambda: (self.show_study_panel(), self.study_panel.run()))
        self._action(menu, "Cancel study", self.study_panel.cancel)
        self.canvas.node_selected.connect(self.study_panel.follow_node)
        self.corner_table.node_selected.connect(self.study_panel.follow_node)
        self.undo_stack.indexChanged.connect(self.study_panel.document_changed)
        self.study_panel.variant_chosen.connect(
            lambda profile, conditions, text: self._try(
                lambda: commands.load_variant(self.document.state, profile, conditions, text)
            )
        )

    def show_study_panel(self):
        """Show the study dock in front, wide enough for its chart."""
        dock = self._docks["Study"]
        dock.show()
        dock.raise_()
        self.resizeDocks([dock], [max(dock.width(), 620)], Qt.Horizontal)

    # ------------------------------------------------------------------ document
    def _install(self, document):
        if self.document is not None:
            self.document.unsubscribe(self._state_changed)
        self.document = document
        document.subscribe(self._state_changed)
        self.undo_stack.clear()
        self.results.reset()  # an analysis still running for the old document is not shown
        self.canvas._fitted = False
        self.canvas.set_analysis(None, False)
        self.conditions_panel.set_conditions(document.conditions)
        self.variants_panel.set_document(document)  # variant sets
        self._state_changed(document.state, force=True)
        self.canvas.fit()

    def new_document(self):
        """A new, untitled document from the default sample profile."""
        if not self.confirm_discard():
            return False
        from profilebench.io import default_sample_path, load_project

        project = load_project(default_sample_path())
        self._install(document_of(project))
        return True

    def open_file(self, path) -> bool:
        """Open a project file; a bad file shows its message and changes nothing."""
        from profilebench.io import load_project

        try:
            document = document_of(load_project(path), path, self._underlay_from_image)
        except ProfileBenchError as exc:
            self._show_banner(f"cannot open {path}: {exc}", True)
            return False
        self._install(document)
        self.recent.add(path)
        return True

    def save_to(self, path) -> bool:
        """Save the project to ``path`` (atomic); the message of a failure is shown."""
        from profilebench.io import save_project

        doc = self.document
        try:
            save_project(project_of(doc, path), path)
        except ProfileBenchError as exc:
            self._show_banner(f"not saved: {exc}", True)
            self.statusBar().showMessage(f"NOT SAVED: {exc}")
            self.report_error("Not saved", f"The project was not saved.\n\n{exc}")
            return False
        doc.mark_saved(path)
        self.recovery_copies.discard()
        self.undo_stack.setClean()
        self.recent.add(path)
        self._update_title()
        self.statusBar().showMessage(f"saved {path}", 5000)
        return True

    def save(self) -> bool:
        if self.document.path is None:
            return menus.ask_save_as(self)
        return self.save_to(self.document.path)

    def import_points(self, path, simplify_mm: float = 5.0) -> bool:
        """Replace the profile by a CSV point outline fitted within ``simplify_mm`` (an
        undoable edit), with no dialog (scripts and tests; the menu shows the import dialog)."""
        return outline_import.import_points(self, path, simplify_mm)

    def import_points_with_dialog(self, path) -> bool:
        """Read a CSV point outline and load its fit once the import dialog is accepted."""
        return outline_import.import_points_with_dialog(self, path)

    @staticmethod
    def run_import_dialog(dialog) -> bool:
        """Show the import dialog modally; True when accepted (tests replace this)."""
        from PySide6.QtWidgets import QDialog

        return dialog.exec() == QDialog.Accepted

    def export_image(self, path) -> bool:
        """Write the annotated view (review page) as PNG, SVG or PDF via profilebench.plotting."""
        return exports.export_image(self, path)

    def export_surface_csv(self, path) -> bool:
        return exports.export_surface_csv(self, path)

    # ------------------------------------------------------------------ edits
    def push(self, edit) -> bool:
        """Apply an editor edit as one undo step (nothing recorded if it changes nothing)."""
        pushed = push_edit(self.undo_stack, self.document, edit)
        if pushed:
            # the inspector shows the node where the edit left it (a drag's preview did not update it)
            self.node_panel.set_node(self.document.profile, self.document.selection.node)
        return pushed

    def _try(self, make_edit) -> bool:
        """Build an edit and push it; a refused edit shows its reason in the banner."""
        try:
            edit = make_edit()
        except ProfileBenchError as exc:
            self._show_banner(str(exc), True)
            self.statusBar().showMessage(str(exc), 8000)
            return False
        return self.push(edit)

    def preview_profile(self, profile):
        self.document.preview_profile(profile)

    def select_node(self, node):
        """Select node ``node`` (None or -1: nothing) on the canvas, in the table and panel."""
        if node is not None and node < 0:
            node = None
        self.document.selection = self.document.selection.__class__(node)
        self.canvas.selected = node
        self.canvas.update()
        self.corner_table.select_node(node)
        self.node_panel.set_node(self.document.profile, node)

    def insert_node(self, before, x, y):
        if self._try(lambda: commands.insert_node(self.document.state, before, x, y)):
            self.select_node(before)

    def delete_selected(self):
        node = self.document.selection.node
        if node is None:
            self.statusBar().showMessage("select a node to delete", 5000)
            return
        if self._try(lambda: commands.delete_node(self.document.state, node)):
            self.select_node(None)

    def toggle_smooth(self):
        node = self.document.selection.node
        if node is None:
            return
        on = not self.document.profile.nodes[node].smooth
        self._try(lambda: commands.set_smooth(self.document.state, node, on))

    def set_radius(self, node, radius):
        self._try(lambda: commands.set_radius(self.document.state, node, radius))

    def pin_baseline(self):
        self._try(lambda: commands.pin_baseline(self.document.state))

    def clear_baseline(self):
        self._try(lambda: commands.clear_baseline(self.document.state))

    # ------------------------------------------------------------------ state -> views
    def _state_changed(self, state, force=False):
        change = self.results.state_changed(self._shown_state, state, force)
        self._shown_state = state
        sel = self.document.selection.node
        self.canvas.set_state(state, sel)
        self.canvas.set_stale(self.results.is_stale(state))
        if change.conditions:
            self.conditions_panel.set_conditions(state.conditions)
        if not self.canvas.dragging:
            self.node_panel.set_node(state.profile, sel)
        if change.analysis:
            # during a drag a corner bubble's smallest attached radius comes from a nearby
            # outline's search (provisional) instead of a fresh search of ~10 solves
            self._request_analysis(state, "nearby" if self.canvas.dragging else "run")
            self.statusBar().showMessage("analysing…")
        if change.baseline:
            self.baseline_runner.request(state.baseline, state.conditions)
        self._update_title()

    def _clean_changed(self, _clean):
        self._update_title()

    def _update_title(self):
        if self.document is not None:
            self.setWindowTitle(f"{self.document.title} — profilebench")

    def _show_banner(self, text, error: bool):
        self.last_message = text
        self.banner.setStyleSheet(BANNER_ERROR if error else BANNER_INFO)
        self.banner.setText(text)
        self.banner.show()

    def _request_analysis(self, state, searches):
        generation = self.runner.request(state.profile, state.conditions, searches)
        self.results.sent(generation, state)
        if not self.canvas.dragging and not self._progress_timer.isActive():
            self._progress_timer.start(LONG_WORK_MS)

    # ------------------------------------------------------------------ long work: progress, cancel
    def _long_analysis(self):
        """An analysis still running after LONG_WORK_MS: the busy bar and Cancel."""
        if (
            self.runner.busy
            and not self.canvas.dragging
            and self.progress.kind not in ("search", "refinement")
        ):
            self.progress.start("analysis", "analysing…")

    def _cancel_work(self, kind):
        if kind == "search":
            self.corner_search.cancel()
        elif kind == "refinement":
            self.refinement_check.cancel()
        else:
            self.runner.cancel_pending()
            self.results.cancelled()
            self.canvas.set_stale(self.analysis is not None)
            self._show_banner(
                "analysis cancelled: the results shown are for an earlier outline "
                "(stale); the next edit analyses again",
                False,
            )
        self.statusBar().showMessage(f"{kind} cancelled", 5000)

    # ------------------------------------------------------------------ Cp colour scale
    def _load_cp_scale(self):
        value = self.settings.value("cp_scale_min", None)
        if value is not None:
            try:
                self.canvas.set_cp_min(float(value))
            except (ProfileBenchError, TypeError, ValueError):
                pass  # a bad stored value: the default scale

    def set_cp_scale(self, cp_min) -> bool:
        """Set the lowest Cp of the colour scale (canvas and exported pages), remembered."""
        try:
            self.canvas.set_cp_min(cp_min)
        except ProfileBenchError as exc:
            self._show_banner(str(exc), True)
            return False
        self.settings.setValue("cp_scale_min", self.canvas.cp_min)
        self.statusBar().showMessage(f"Cp colour scale from {self.canvas.cp_min:g} to +1", 5000)
        return True

    def _refine_provisional(self, *_):
        """After a drag: a shown analysis of the current outline with provisional corner
        corrections is redone with the searches run (the drag's last result would otherwise
        keep a nearby outline's smallest attached radius)."""
        if self.results.needs_refinement(
            self.document.state, self.canvas.dragging, self.runner.busy
        ):
            self._request_analysis(self.document.state, "run")
            self.statusBar().showMessage(
                "searching the smallest attached radius of the corner "
                "bubbles for the final outline…"
            )

    def _analysis_lagging(self, generation, analysis, seconds):
        """A result for an edit a newer edit has superseded (during a drag): shown marked stale.

        It is newer than the result on screen (the runner guarantees it), so it replaces it; the
        canvas greys it and says it is for an earlier outline. A failed one is not shown: the
        newest request's own result, or its failure, will say what is wrong.
        """
        stale = self.results.lagging_arrived(generation, analysis, seconds, self.document.state)
        if stale is None:
            return
        # a failure shown earlier was for an older outline than this one: its banner goes
        self._show_analysis(stale)
        self.statusBar().showMessage(
            f"Cd {analysis.drag.cd:.4f} for an earlier position "
            f"(solve {seconds * 1000:.0f} ms); the newest edit is being "
            "analysed"
        )

    def _show_analysis(self, stale):
        """Put the controller's analysis on every view."""
        self.banner.hide()
        self.last_message = ""
        analysis = self.analysis
        self.canvas.set_analysis(analysis, stale=stale)
        self._show_corner_rows()
        self.summary.set_analysis(
            analysis, self.results.comparison(), self.last_seconds, stale=stale
        )

    def _show_corner_rows(self):
        if self.analysis is not None:
            self.corner_table.set_rows(
                self.analysis, self.searches.as_rows(), self.document.selection.node
            )

    def _analysis_finished(self, generation, analysis, seconds):
        if not self.runner.busy:
            self.progress.finish("analysis")
        if not self.results.finished_arrived(generation, analysis, seconds, self._shown_state):
            status, msg = failure_text(analysis)
            self._show_banner(f"Analysis not updated ({status}): {msg}", True)
            self.statusBar().showMessage(f"{status}: {msg}")
            self.canvas.set_stale(self.analysis is not None)
            self.summary.set_analysis(
                self.analysis, self.results.comparison(), self.last_seconds, stale=True
            )
            return
        self._show_analysis(stale=False)
        self.plot_schedule.request()
        d = analysis.drag
        self.statusBar().showMessage(f"Cd {d.cd:.4f}   solve {seconds * 1000:.0f} ms")
        self._refine_provisional()

    def _analysis_failed(self, generation, message):
        if not self.runner.busy:
            self.progress.finish("analysis")
        self.results.failed_arrived(generation)
        self._show_banner(
            f"Analysis error (logged; last good result kept, marked stale): {message}", True
        )
        self.canvas.set_stale(self.analysis is not None)
        self.statusBar().showMessage("analysis error: " + message)

    def _baseline_finished(self, generation, analysis, seconds):
        self.results.baseline_arrived(analysis)
        if self.analysis is not None:
            self.summary.set_analysis(
                self.analysis, self.results.comparison(), self.last_seconds, stale=self.canvas.stale
            )

    @property
    def results_current(self) -> bool:
        """True when the shown analysis is for the document's current state."""
        return self.results.is_current(self.document.state, self.runner.busy)

    # ------------------------------------------------------------------ corner radius search
    def find_smallest_radius(self, node):
        self.corner_search.find(node)

    def apply_smallest_radius(self, node, margin_text):
        self.corner_search.apply(node, margin_text)

    # ------------------------------------------------------------------ underlay
    def _underlay_from_image(self, path) -> Underlay:
        return underlay_from_image(path, self.document.profile if self.document else None)

    def load_underlay(self, path) -> bool:
        """Put the image at ``path`` under the profile (an undoable edit)."""
        return self.underlay_picking.load(path)

    def place_underlay(self, points_px, points_m) -> bool:
        """Place the underlay so image pixels ``points_px`` land on ``points_m`` (m)."""
        return self.underlay_picking.place(points_px, points_m)

    def start_underlay_picking(self):
        """Place the underlay by two points clicked on it (profilebench.gui.underlay_picking)."""
        self.underlay_picking.start()

    # ------------------------------------------------------------------ files
    def recent_files(self) -> list[str]:
        return self.recent.paths()

    # ------------------------------------------------------------------ recovery copies
    def autosave(self) -> bool:
        """Write the recovery copy when there are unsaved changes not yet written; True if written."""
        return self.recovery_copies.write()

    @property
    def autosave_error(self) -> str:
        """The last failure to write the recovery copy ("" after a good write)."""
        return self.recovery_copies.error

    def offer_recovery(self) -> bool:
        """Offer the newest recovery copy left by a process that ended; True when restored."""
        return self.recovery_copies.offer()

    def ask_recover(self, copy) -> bool:
        """Ask whether to restore the recovery copy ``copy`` (a dialog; tests replace it)."""
        return questions.ask_recover(self, copy)

    def report_error(self, title: str, text: str) -> None:
        """Tell the user about a failure that needs attention (a dialog; tests replace it)."""
        QMessageBox.warning(self, title, text)

    # ------------------------------------------------------------------ closing
    def ask_unsaved(self) -> str:
        """Ask whether to save unsaved changes: "save", "discard" or "cancel" (a dialog)."""
        return questions.ask_unsaved(self)

    def confirm_discard(self) -> bool:
        """True when there are no unsaved changes or the user saves or discards them."""
        if self.document is None or not self.document.dirty:
            return True
        answer = self.ask_unsaved()
        if answer == "save":
            return self.save()
        return answer == "discard"

    def closeEvent(self, event):
        event.ignore()  # closed only when the work is saved or knowingly discarded
        try:
            allowed = self.confirm_discard()
        except Exception as exc:  # a failure while saving must not close the window
            log.exception("saving before closing failed")
            self.report_error(
                "Not closed",
                f"The project could not be saved ({exc}); the "
                "window stays open so nothing is lost.",
            )
            allowed = False
        if not allowed:
            return
        self.shutdown()
        self.recovery_copies.timer.stop()
        self.recovery_copies.discard()
        event.accept()

    def shutdown(self, msecs: int = 30000) -> bool:
        """Stop every background job: nothing new starts, running ones are waited for.

        Returns False (and logs) when a job did not end within ``msecs``.
        """
        self.plot_schedule.stop()
        ok = True
        for r in (self.runner, self.baseline_runner, self.search_runner):
            ok = r.close(msecs) and ok
        ok = self.refinement_check.close(msecs) and ok
        ok = self.variants_panel.close_runner(msecs) and ok  # variant sets
        ok = self.canvas.shutdown(msecs) and ok
        ok = self.plots.shutdown(msecs) and ok
        ok = self.study_panel.shutdown(msecs) and ok  # the study dock (see _add_study_panel)
        if not ok:
            log.warning("a background job was still running when the window closed")
        return ok
