"""The main window: canvas in the middle, panels docked round it, menus, undo stack, workers.

The window holds an :class:`profilebench.editor.Document` and a QUndoStack of
:class:`~profilebench.gui.undo.EditCommand`; every user action becomes an editor edit. Analyses
run on a :class:`~profilebench.gui.worker.AnalysisRunner`; the newest result is shown, a failed
one is reported in the banner while the last good result stays on screen marked stale.
"""

from __future__ import annotations

import functools
import logging
import os
import sys
import time
from pathlib import Path

from PySide6.QtCore import QSettings, QStandardPaths, Qt, QTimer
from PySide6.QtGui import QAction, QImageReader, QKeySequence, QUndoStack
from PySide6.QtWidgets import (
    QDockWidget,
    QFileDialog,
    QInputDialog,
    QLabel,
    QMainWindow,
    QMessageBox,
    QVBoxLayout,
    QWidget,
)

from profilebench.editor import commands, recovery
from profilebench.editor.document import CAUTION, Document
from profilebench.editor.controller import AnalysisRequests, SearchBook, same_analysis
from profilebench.editor.fields import parse_number
from profilebench.editor.underlay import Underlay
from profilebench.errors import InputError, ProfileBenchError
from profilebench.gui.canvas import ProfileCanvas
from profilebench.gui.conditions_panel import ConditionsPanel
from profilebench.gui.node_panel import NodePanel
from profilebench.gui.results_panels import CornerTable, PlotPanel, SummaryPanel
from profilebench.gui.undo import push_edit
from profilebench.gui.child_process import call
from profilebench.gui.work_progress import WorkProgress
from profilebench.gui.worker import AnalysisRunner, ProcessTaskRunner

__all__ = ["MainWindow"]

log = logging.getLogger("profilebench.gui")

MAX_RECENT = 8
# Analyses, the radius search and the plots run in child processes (profilebench.gui.child_process);
# the outline and overlay workers are Python threads sharing the GIL with the GUI thread. With
# Python's default 5 ms switch interval every hand-over to the GUI thread can wait up to 5 ms;
# 1 ms keeps the GUI thread's painting responsive (measured with benchmarks/bench_gui.py).
GIL_SWITCH_INTERVAL_S = 0.001
AUTOSAVE_MS = 60000  # default interval of the recovery copy
AUTOSAVE_ENV = "PROFILEBENCH_AUTOSAVE_MS"
LONG_WORK_MS = 600  # work running longer shows the status bar's busy bar and Cancel
PLOT_INTERVAL_MS = 200  # plots are rendered at most this often, and not during a drag


BANNER_ERROR = "background: #fde2d8; color: #7a1f00; padding: 4px; border: 1px solid #e0a080;"
BANNER_INFO = "background: #fff6d5; color: #5a4500; padding: 4px; border: 1px solid #e0d090;"


#: longest autosave interval (ms): a day (a QTimer holds at most 2**31 - 1 ms, about 24.8 days)
AUTOSAVE_MAX_MS = 24 * 3600 * 1000


def _interval_ms(name, value) -> int:
    """An autosave interval from a setting or the environment: whole ms, 100 ms to a day."""
    try:
        ms = float(value)
    except (TypeError, ValueError):
        raise InputError(
            f"{name} = {str(value)[:40]!r} is not a number; give the autosave "
            "interval in milliseconds, e.g. 60000"
        ) from None
    if not 100 <= ms <= AUTOSAVE_MAX_MS:  # also refuses NaN and infinity
        raise InputError(
            f"{name} = {str(value)[:40]!r} ms is outside 100 ms to "
            f"{AUTOSAVE_MAX_MS} ms (a day); give an interval in that range"
        )
    return int(ms)


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
        self.analysis = None  # last good analysis (may be stale)
        self.analysis_state = None  # the document state it was computed for
        self.last_message = ""
        self.last_seconds = None
        self.baseline_analysis = None
        self.searches = SearchBook()  # each corner's radius search: running, or its result
        self.results_received = 0
        self.lagging_shown = 0  # superseded analyses shown during a drag (marked stale)
        self._requested = AnalysisRequests()  # generation -> the document state it is for

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

        self._plot_timer = QTimer(self)
        self._plot_timer.setSingleShot(True)
        self._plot_timer.timeout.connect(self._plots_due)
        self._last_plot = 0.0

        from profilebench.gui.refcount_guard import install

        self._refcount_timer = install(self)
        self.progress = WorkProgress()
        self.statusBar().addPermanentWidget(self.progress)
        self._progress_timer = QTimer(self)
        self._progress_timer.setSingleShot(True)
        self._progress_timer.timeout.connect(self._long_analysis)
        self._connect()
        self._build_menus()
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
            recovery_dir if recovery_dir is not None else self._default_recovery_dir()
        )
        self.autosave_ms = self._autosave_interval(autosave_ms)
        self._autosaved_state = None
        self.autosave_error = ""
        self._autosave_timer = QTimer(self)
        self._autosave_timer.setInterval(self.autosave_ms)
        self._autosave_timer.timeout.connect(self.autosave)
        self._autosave_timer.start()
        QTimer.singleShot(0, self._tell_startup_problems)  # after the caller could set report_error
        QTimer.singleShot(0, self.offer_recovery)  # after the caller could set ask_recover

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
        c.picked.connect(self._underlay_pick)
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
        self.search_runner.finished.connect(self._search_finished)
        self.search_runner.failed.connect(self._search_failed)
        self.progress.cancelled.connect(self._cancel_work)
        self.undo_stack.cleanChanged.connect(self._clean_changed)

    def _action(self, menu, text, slot, shortcut=None, checkable=False):
        act = QAction(text, self)
        if shortcut is not None:
            act.setShortcut(QKeySequence(shortcut))
        act.setCheckable(checkable)
        act.triggered.connect(slot)
        menu.addAction(act)
        return act

    def _build_menus(self):
        bar = self.menuBar()
        m = bar.addMenu("&File")
        self._action(m, "&New", self.new_document, QKeySequence.New)
        self._action(m, "&Open…", self._ask_open, QKeySequence.Open)
        self.recent_menu = m.addMenu("Open &recent")
        self._action(m, "&Save", self.save, QKeySequence.Save)
        self._action(m, "Save &as…", self._ask_save_as, QKeySequence.SaveAs)
        m.addSeparator()
        self._action(m, "Import point outline (CSV)…", self._ask_import_csv)
        self._action(m, "Export annotated view (PNG/SVG/PDF)…", self._ask_export_image)
        self._action(m, "Export surface data (CSV)…", self._ask_export_csv)
        m.addSeparator()
        self._action(m, "&Quit", self.close, QKeySequence.Quit)
        e = bar.addMenu("&Edit")
        undo = self.undo_stack.createUndoAction(self, "&Undo")
        undo.setShortcut(QKeySequence.Undo)
        redo = self.undo_stack.createRedoAction(self, "&Redo")
        redo.setShortcut(QKeySequence.Redo)
        e.addAction(undo)
        e.addAction(redo)
        e.addSeparator()
        self._action(e, "&Delete node", self.delete_selected, QKeySequence.Delete)
        self._action(e, "Toggle smooth / corner", self.toggle_smooth, "S")
        e.addSeparator()
        self._action(e, "&Pin as baseline", self.pin_baseline, "Ctrl+B")
        self._action(e, "Clear baseline", self.clear_baseline)
        v = bar.addMenu("&View")
        self._action(v, "&Fit to window", self.canvas.fit, "Ctrl+0")
        self._action(v, "Zoom &in", lambda: self.canvas.zoom(1.25), QKeySequence.ZoomIn)
        self._action(v, "Zoom &out", lambda: self.canvas.zoom(0.8), QKeySequence.ZoomOut)
        self.grid_action = self._action(
            v, "Snap to grid", self._toggle_grid, "Ctrl+G", checkable=True
        )
        self._action(v, "Grid spacing…", self._ask_grid)
        self.cp_action = self._action(v, "Cp colour band", self._toggle_cp, checkable=True)
        self.cp_action.setChecked(True)
        self.offset_action = self._action(v, "Cp offset curve", self._toggle_offset, checkable=True)
        self._action(v, "Cp colour scale…", self._ask_cp_scale)
        u = bar.addMenu("&Underlay")
        self._action(u, "Load image…", self._ask_underlay)
        self._action(u, "Place by two reference points…", self.start_underlay_picking)
        self._action(u, "Opacity…", self._ask_underlay_opacity)
        self._action(
            u,
            "Remove",
            lambda: self._try(
                lambda: commands.set_underlay(self.document.state, None, "Remove underlay")
            ),
        )
        self.grid_spacing = 0.01
        self._refresh_recent()

    # ------------------------------------------------------------------ document
    def _install(self, document):
        if self.document is not None:
            self.document.unsubscribe(self._state_changed)
        self.document = document
        document.subscribe(self._state_changed)
        self.undo_stack.clear()
        self.analysis = None
        self.analysis_state = None
        self.baseline_analysis = None
        self.searches.clear()
        self._requested.clear()  # an analysis still running for the old document is not shown
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
        self._install(Document(project.profile, project.conditions))
        return True

    def open_file(self, path) -> bool:
        """Open a project file; a bad file shows its message and changes nothing."""
        from profilebench.io import load_project, resolve_underlay

        try:
            project = load_project(path)
            underlay = None
            if project.underlay is not None:
                image = resolve_underlay(project, path)
                underlay = self._underlay_from_image(image)
                u = project.underlay
                underlay = underlay.placed(u.points_px, u.points_m).with_opacity(u.opacity)
        except ProfileBenchError as exc:
            self._show_banner(f"cannot open {path}: {exc}", True)
            return False
        self._install(Document.from_project(project, path=path, underlay=underlay))
        self._add_recent(path)
        return True

    def save_to(self, path) -> bool:
        """Save the project to ``path`` (atomic); the message of a failure is shown."""
        from profilebench.io import save_project
        from profilebench.io import Underlay as FileUnderlay
        from profilebench.io import underlay_relative_path

        doc = self.document
        try:
            file_underlay = None
            if doc.underlay is not None:
                u = doc.underlay
                file_underlay = FileUnderlay(
                    underlay_relative_path(u.path, path), u.points_px, u.points_m, u.opacity
                )
            save_project(doc.to_project(underlay=file_underlay), path)
        except ProfileBenchError as exc:
            self._show_banner(f"not saved: {exc}", True)
            self.statusBar().showMessage(f"NOT SAVED: {exc}")
            self.report_error("Not saved", f"The project was not saved.\n\n{exc}")
            return False
        doc.mark_saved(path)
        self._discard_recovery()
        self.undo_stack.setClean()
        self._add_recent(path)
        self._update_title()
        self.statusBar().showMessage(f"saved {path}", 5000)
        return True

    def save(self) -> bool:
        if self.document.path is None:
            return self._ask_save_as()
        return self.save_to(self.document.path)

    def import_points(self, path, simplify_mm: float = 5.0) -> bool:
        """Replace the profile by a CSV point outline fitted within ``simplify_mm`` (an
        undoable edit), with no dialog (scripts and tests; the menu shows the import dialog)."""
        from profilebench.editor.import_preview import fit_preview
        from profilebench.io import import_points_csv

        try:
            pts = import_points_csv(path)
        except ProfileBenchError as exc:
            self._show_banner(f"cannot import {path}: {exc}", True)
            return False
        preview = fit_preview(
            pts.points,
            simplify_mm / 1000.0,
            ground=self.document.conditions.ground,
            name=Path(path).stem,
        )
        return self._load_imported(path, pts, preview)

    def import_points_with_dialog(self, path) -> bool:
        """Read a CSV point outline and load its fit once the import dialog is accepted."""
        from profilebench.gui.import_dialog import ImportDialog
        from profilebench.io import import_points_csv

        try:
            pts = import_points_csv(path)
        except ProfileBenchError as exc:
            self._show_banner(f"cannot import {path}: {exc}", True)
            return False
        dialog = ImportDialog(
            pts, Path(path).stem, ground=self.document.conditions.ground, parent=self
        )
        try:
            if not self.run_import_dialog(dialog):
                return False
            return self._load_imported(path, pts, dialog.preview)
        finally:
            dialog.deleteLater()

    @staticmethod
    def run_import_dialog(dialog) -> bool:
        """Show the import dialog modally; True when accepted (tests replace this)."""
        from PySide6.QtWidgets import QDialog

        return dialog.exec() == QDialog.Accepted

    def _load_imported(self, path, pts, preview) -> bool:
        if preview is None or not preview.ok:
            reason = preview.error if preview is not None else "no fit"
            self._show_banner(f"cannot import {path}: {reason}", True)
            return False
        prof = preview.profile
        self.select_node(None)  # the old selection was a node of the old outline
        self.push(commands.import_profile(self.document.state, prof, f"Import {Path(path).name}"))
        self.canvas.fit()
        self.statusBar().showMessage(
            f"imported {len(prof)} nodes, {preview.corners} corners, within "
            f"{preview.max_deviation * 1e3:.1f} mm of the points ({pts.units}, {pts.units_reason})"
            + (f"; {preview.notes[0]}" if preview.notes else ""),
            12000,
        )
        return True

    def export_image(self, path) -> bool:
        """Write the annotated view (review page) as PNG, SVG or PDF via profilebench.plotting."""
        from profilebench.io.atomic import check_writable
        from profilebench.plotting import review_figure, save_figure

        if self.analysis is None:
            self._show_banner("nothing to export yet: no successful analysis", True)
            return False
        try:
            check_writable(path)  # a folder that refuses files: a message, not an OSError
            baseline = self.baseline_analysis or self.document.baseline
            fig = review_figure(self.analysis, baseline=baseline, cp_min=self.canvas.cp_min)
            save_figure(fig, path)
        except ProfileBenchError as exc:
            self._show_banner(f"export failed: {exc}", True)
            return False
        self.statusBar().showMessage(f"exported {path}", 5000)
        return True

    def export_surface_csv(self, path) -> bool:
        from profilebench.io.export import write_surface_csv

        if self.analysis is None:
            self._show_banner("nothing to export yet: no successful analysis", True)
            return False
        try:
            write_surface_csv(self.analysis, path)
        except ProfileBenchError as exc:
            self._show_banner(f"export failed: {exc}", True)
            return False
        self.statusBar().showMessage(f"exported {path}", 5000)
        return True

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
        prev = getattr(self, "_shown_state", None)
        self._shown_state = state
        sel = self.document.selection.node
        self.canvas.set_state(state, sel)
        self.canvas.set_stale(
            self.analysis_state is not None and not same_analysis(self.analysis_state, state)
        )
        if prev is None or prev.conditions != state.conditions or force:
            self.conditions_panel.set_conditions(state.conditions)
        if not self.canvas.dragging:
            self.node_panel.set_node(state.profile, sel)
        if (
            force
            or prev is None
            or prev.profile != state.profile
            or prev.conditions != state.conditions
        ):
            self.searches.clear()
            # during a drag a corner bubble's smallest attached radius comes from a nearby
            # outline's search (provisional) instead of a fresh search of ~10 solves
            self._request_analysis(state, "nearby" if self.canvas.dragging else "run")
            self.statusBar().showMessage("analysing…")
        if state.baseline is None:
            self.baseline_analysis = None
        elif (
            force
            or prev is None
            or prev.baseline != state.baseline
            or prev.conditions != state.conditions
        ):
            self.baseline_analysis = None
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
        self._requested.sent(generation, state)
        if not self.canvas.dragging and not self._progress_timer.isActive():
            self._progress_timer.start(LONG_WORK_MS)

    # ------------------------------------------------------------------ long work: progress, cancel
    def _long_analysis(self):
        """An analysis still running after LONG_WORK_MS: the busy bar and Cancel."""
        if self.runner.busy and not self.canvas.dragging and self.progress.kind != "search":
            self.progress.start("analysis", "analysing…")

    def _cancel_work(self, kind):
        if kind == "search":
            self.search_runner.cancel_pending()  # its result is never shown
            self.searches.drop_running()
            self.corner_table.message.setText("search cancelled")
            if self.analysis is not None:
                self.corner_table.set_rows(
                    self.analysis, self.searches.as_rows(), self.document.selection.node
                )
        else:
            self.runner.cancel_pending()
            self._requested.clear()
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

    def _ask_cp_scale(self):
        text, ok = QInputDialog.getText(
            self,
            "Cp colour scale",
            "Lowest Cp of the colour scale (the same on every page; default -3):",
            text=f"{self.canvas.cp_min:g}",
        )
        if ok:
            try:
                value = parse_number(text, "lowest Cp")
            except ProfileBenchError as exc:
                self._show_banner(str(exc), True)
                return
            self.set_cp_scale(value)

    def _refine_provisional(self, *_):
        """After a drag: a shown analysis of the current outline with provisional corner
        corrections is redone with the searches run (the drag's last result would otherwise
        keep a nearby outline's smallest attached radius)."""
        a = self.analysis
        if (
            a is not None
            and a.provisional
            and not self.canvas.dragging
            and not self.runner.busy
            and same_analysis(self.analysis_state, self.document.state)
        ):
            self._request_analysis(self.document.state, "run")
            self.statusBar().showMessage(
                "searching the smallest attached radius of the corner "
                "bubbles for the final outline…"
            )

    def _forget_requests(self, upto):
        """Drop the remembered states of requests up to generation ``upto``; return its state."""
        return self._requested.forget(upto)

    def _analysis_lagging(self, generation, analysis, seconds):
        """A result for an edit a newer edit has superseded (during a drag): shown marked stale.

        It is newer than the result on screen (the runner guarantees it), so it replaces it; the
        canvas greys it and says it is for an earlier outline. A failed one is not shown: the
        newest request's own result, or its failure, will say what is wrong.
        """
        state = self._forget_requests(generation)
        if state is None or analysis is None or not getattr(analysis, "success", False):
            return
        self.lagging_shown += 1
        # a failure shown earlier was for an older outline than this one: _show_analysis hides
        # its banner
        self._show_analysis(
            analysis, state, seconds, stale=not same_analysis(state, self.document.state)
        )
        self.statusBar().showMessage(
            f"Cd {analysis.drag.cd:.4f} for an earlier position "
            f"(solve {seconds * 1000:.0f} ms); the newest edit is being "
            "analysed"
        )

    def _show_analysis(self, analysis, state, seconds, stale):
        """Put a successful ``analysis`` of document state ``state`` on every view."""
        self.banner.hide()
        self.last_message = ""
        self.analysis = analysis
        self.analysis_state = state
        self.last_seconds = seconds
        self.canvas.set_analysis(analysis, stale=stale)
        self.corner_table.set_rows(analysis, self.searches.as_rows(), self.document.selection.node)
        self.summary.set_analysis(analysis, self._comparison(), seconds, stale=stale)

    def _analysis_finished(self, generation, analysis, seconds):
        self.results_received += 1
        if not self.runner.busy:
            self.progress.finish("analysis")
        self._forget_requests(generation)
        state = self._shown_state
        if analysis is None or not getattr(analysis, "success", False):
            msg = getattr(analysis, "message", "no result")
            status = getattr(getattr(analysis, "status", None), "value", "failed")
            self._show_banner(f"Analysis not updated ({status}): {msg}", True)
            self.statusBar().showMessage(f"{status}: {msg}")
            self.canvas.set_stale(self.analysis is not None)
            self.summary.set_analysis(
                self.analysis, self._comparison(), self.last_seconds, stale=True
            )
            return
        self._show_analysis(analysis, state, seconds, stale=False)
        self._schedule_plots()
        d = analysis.drag
        self.statusBar().showMessage(f"Cd {d.cd:.4f}   solve {seconds * 1000:.0f} ms")
        self._refine_provisional()

    def _schedule_plots(self):
        """Render the plots now if the window is idle and the last render is old enough, else later."""
        if self._plot_timer.isActive():
            return
        wait_ms = PLOT_INTERVAL_MS - 1000 * (time.perf_counter() - self._last_plot)
        if wait_ms <= 0 and not self.canvas.dragging:
            self._redraw_plots()
        else:
            self._plot_timer.start(
                max(int(wait_ms), 20) if not self.canvas.dragging else PLOT_INTERVAL_MS
            )

    def _plots_due(self):
        if self.canvas.dragging:
            self._plot_timer.start(PLOT_INTERVAL_MS)  # not while the user drags
        else:
            self._redraw_plots()

    def _redraw_plots(self):
        self._last_plot = time.perf_counter()
        if self.analysis is not None:
            try:
                self.plots.set_analysis(self.analysis)
            except ProfileBenchError as exc:
                self.plots.clear(str(exc))

    def _analysis_failed(self, generation, message):
        self.results_received += 1
        if not self.runner.busy:
            self.progress.finish("analysis")
        self._forget_requests(generation)
        self._show_banner(
            f"Analysis error (logged; last good result kept, marked stale): {message}", True
        )
        self.canvas.set_stale(self.analysis is not None)
        self.statusBar().showMessage("analysis error: " + message)

    def _baseline_finished(self, generation, analysis, seconds):
        self.baseline_analysis = analysis if getattr(analysis, "success", False) else None
        if self.analysis is not None:
            self.summary.set_analysis(
                self.analysis, self._comparison(), self.last_seconds, stale=self.canvas.stale
            )

    def _comparison(self):
        if self.analysis is None or self.baseline_analysis is None:
            return None
        from profilebench.assess.compare import compare

        try:
            return compare(self.baseline_analysis, self.analysis)
        except ProfileBenchError:
            return None

    @property
    def results_current(self) -> bool:
        """True when the shown analysis is for the document's current state."""
        return (
            not self.runner.busy
            and self.analysis is not None
            and same_analysis(self.analysis_state, self.document.state)
        )

    # ------------------------------------------------------------------ corner radius search
    def find_smallest_radius(self, node):
        if self.document.profile.nodes[node].smooth:
            self.corner_table.message.setText(f"node {node} is smooth; make it a corner first")
            return
        done = SearchBook.from_analysis(
            self.analysis, self.analysis_state, self.document.state, node
        )
        if done is not None:
            self.searches.put(node, done)
            self.corner_table.message.setText(f"{done.message} (from the analysis shown)")
            self.corner_table.set_rows(
                self.analysis, self.searches.as_rows(), self.document.selection.node
            )
            return
        self.searches.start(node, self.document.state)
        self.search_runner.request(self.document.profile, self.document.conditions, node)
        self.corner_table.message.setText(f"searching the smallest attached radius at node {node}…")
        self.progress.start("search", f"searching the smallest attached radius at node {node}…")
        if self.analysis is not None:
            self.corner_table.set_rows(
                self.analysis, self.searches.as_rows(), self.document.selection.node
            )

    def _search_finished(self, generation, result, seconds):
        self.progress.finish("search")
        if not self.searches.finish(result, self.document.state):
            self.corner_table.message.setText("the profile changed during the search; search again")
        else:
            self.corner_table.message.setText(
                f"{result.message} ({result.solves} solves, {seconds:.1f} s)"
            )
        if self.analysis is not None:
            self.corner_table.set_rows(
                self.analysis, self.searches.as_rows(), self.document.selection.node
            )

    def _search_failed(self, generation, message):
        self.progress.finish("search")
        self.searches.drop_running()
        self.corner_table.message.setText(f"search failed (logged): {message}")

    def apply_smallest_radius(self, node, margin_text):
        search = self.searches.result(node)
        if search is None:
            self.corner_table.message.setText(
                "find the smallest attached radius of this corner first"
            )
            return
        try:
            margin = parse_number(margin_text, "margin", "%", 0.0)
            r = search.radius * (1.0 + margin / 100.0)
            if r > search.largest_fitting:
                raise InputError(
                    f"{search.radius * 1000:.0f} mm + {margin:g}% = {r * 1000:.0f} mm does not fit; "
                    f"the largest radius that fits is {search.largest_fitting * 1000:.0f} mm: "
                    "choose a smaller margin"
                )
        except ProfileBenchError as exc:
            self.corner_table.message.setText(str(exc))
            return
        self.set_radius(node, r)

    # ------------------------------------------------------------------ underlay
    def _underlay_from_image(self, path) -> Underlay:
        from profilebench.io.atomic import check_input_file
        from profilebench.io.project import MAX_UNDERLAY_BYTES

        # a pipe, a device or a huge file would stall the image reader: refused first
        check_input_file(path, "underlay image", "choose a PNG or JPEG image", MAX_UNDERLAY_BYTES)
        reader = QImageReader(str(path))
        size = reader.size()
        if not size.isValid() or size.width() <= 0:
            raise InputError(
                f"cannot read the image {path} ({reader.errorString()}); give a PNG or JPEG"
            )
        length = 4.5
        if self.document is not None:
            xs = [x for x, _ in self.document.profile.xy]
            length = max(xs) - min(xs)
        return Underlay.initial(Path(path).resolve(), size.width(), size.height(), length=length)

    def load_underlay(self, path) -> bool:
        try:
            u = self._underlay_from_image(path)
        except ProfileBenchError as exc:
            self._show_banner(str(exc), True)
            return False
        return self._try(lambda: commands.set_underlay(self.document.state, u, "Load underlay"))

    def place_underlay(self, points_px, points_m) -> bool:
        u = self.document.underlay
        if u is None:
            self._show_banner("load an underlay image first", True)
            return False
        return self._try(
            lambda: commands.set_underlay(
                self.document.state, u.placed(points_px, points_m), "Place underlay"
            )
        )

    def start_underlay_picking(self):
        if self.document.underlay is None:
            self._show_banner("load an underlay image first (Underlay > Load image)", True)
            return
        self._picks = []
        self.canvas.picking = True
        self._show_banner(
            "Click the first reference point on the image (e.g. the front wheel centre).", False
        )

    def _underlay_pick(self, x, y):
        u = self.document.underlay
        self._picks.append(u.to_image(x, y))
        if len(self._picks) < 2:
            self._show_banner(
                "Click the second reference point on the image (e.g. the rear wheel centre).", False
            )
            return
        self.canvas.picking = False
        self.banner.hide()
        points_m = []
        for k in range(2):
            text, ok = QInputDialog.getText(
                self, "Underlay reference point", f"Profile position of point {k + 1}: x, y in mm"
            )
            if not ok:
                return
            try:
                parts = text.replace(";", ",").split(",")
                if len(parts) != 2:
                    raise InputError(f"{text!r}: type two numbers 'x, y' in mm")
                points_m.append(tuple(parse_number(p, "coordinate", "mm") / 1000.0 for p in parts))
            except ProfileBenchError as exc:
                self._show_banner(str(exc), True)
                return
        self.place_underlay(self._picks, points_m)

    def _ask_underlay(self):
        path, _ = QFileDialog.getOpenFileName(
            self, "Underlay image", "", "Images (*.png *.jpg *.jpeg *.bmp)"
        )
        if path:
            self.load_underlay(path)

    def _ask_underlay_opacity(self):
        u = self.document.underlay
        if u is None:
            return
        value, ok = QInputDialog.getText(
            self, "Underlay opacity", "Opacity, 0 (hidden) to 1:", text=f"{u.opacity:g}"
        )
        if ok:
            try:
                op = parse_number(value, "opacity", "", 0.0, 1.0)
            except ProfileBenchError as exc:
                self._show_banner(str(exc), True)
                return
            self._try(
                lambda: commands.set_underlay(
                    self.document.state, u.with_opacity(op), "Dim underlay"
                )
            )

    # ------------------------------------------------------------------ view options
    def _toggle_grid(self, on):
        self.canvas.grid = self.grid_spacing if on else None
        self.canvas.update()

    def _ask_grid(self):
        text, ok = QInputDialog.getText(
            self, "Grid spacing", "Grid spacing (mm):", text=f"{self.grid_spacing * 1000:g}"
        )
        if not ok:
            return
        try:
            self.grid_spacing = (
                parse_number(text, "grid spacing", "mm", 0.0, exclusive_minimum=True) / 1000.0
            )
        except ProfileBenchError as exc:
            self._show_banner(str(exc), True)
            return
        if self.grid_action.isChecked():
            self._toggle_grid(True)

    def _toggle_cp(self, on):
        self.canvas.show_cp = bool(on)
        self.canvas.update()

    def _toggle_offset(self, on):
        self.canvas.cp_offset_curve = bool(on)
        self.canvas.update()

    # ------------------------------------------------------------------ files: dialogs and recent
    def _dialog_folder(self):
        return str(self.document.path.parent) if self.document and self.document.path else ""

    def _ask_open(self):
        if not self.confirm_discard():
            return
        path, _ = QFileDialog.getOpenFileName(
            self, "Open project", self._dialog_folder(), "Projects (*.json)"
        )
        if path:
            self.open_file(path)

    def _ask_save_as(self) -> bool:
        path, _ = QFileDialog.getSaveFileName(
            self, "Save project", self._dialog_folder(), "Projects (*.json)"
        )
        return self.save_to(path) if path else False

    def _ask_import_csv(self):
        path, _ = QFileDialog.getOpenFileName(
            self, "Import point outline", "", "Point files (*.csv *.txt)"
        )
        if path:
            self.import_points_with_dialog(path)

    def _ask_export_image(self):
        path, _ = QFileDialog.getSaveFileName(
            self, "Export annotated view", "", "Images (*.png *.svg *.pdf)"
        )
        if path:
            self.export_image(path)

    def _ask_export_csv(self):
        path, _ = QFileDialog.getSaveFileName(self, "Export surface data", "", "CSV (*.csv)")
        if path:
            self.export_surface_csv(path)

    def recent_files(self) -> list[str]:
        value = self.settings.value("recent_files", [])
        if isinstance(value, str):
            value = [value]
        return [str(v) for v in (value or [])]

    def _add_recent(self, path):
        path = str(Path(path).resolve())
        files = [p for p in self.recent_files() if p != path]
        files.insert(0, path)
        self.settings.setValue("recent_files", files[:MAX_RECENT])
        self.settings.sync()
        self._refresh_recent()

    def _refresh_recent(self):
        self.recent_menu.clear()
        for p in self.recent_files():
            act = self.recent_menu.addAction(p)
            act.triggered.connect(
                lambda _=False, path=p: self.confirm_discard() and self.open_file(path)
            )
        self.recent_menu.setEnabled(bool(self.recent_files()))

    # ------------------------------------------------------------------ recovery copies
    def _default_recovery_dir(self) -> Path:
        configured = self.settings.value("recovery_dir", "")
        if configured:
            return Path(str(configured))
        base = QStandardPaths.writableLocation(QStandardPaths.AppDataLocation)
        return Path(base or Path.home() / ".profilebench") / "recovery"

    def _autosave_interval(self, given) -> int:
        """The autosave interval (ms) from the argument, the environment or the settings.

        A bad argument raises InputError; a bad environment variable or setting is reported
        (in :attr:`startup_problems`) and the next source, or the default, is used.
        """
        sources = [
            ("autosave_ms argument", given),
            (AUTOSAVE_ENV, os.environ.get(AUTOSAVE_ENV)),
            ("setting autosave_ms", self.settings.value("autosave_ms", None)),
        ]
        for name, value in sources:
            if value is None or value == "":
                continue
            try:
                return _interval_ms(name, value)
            except InputError as exc:
                if value is given:
                    raise
                self.startup_problems.append(
                    f"{exc}; the autosave interval is {AUTOSAVE_MS} ms instead"
                )
                log.warning("%s", exc)
        return AUTOSAVE_MS

    def autosave(self) -> bool:
        """Write the recovery copy when there are unsaved changes not yet written; True if written."""
        doc = self.document
        if doc is None:
            return False
        if not doc.dirty:
            self._discard_recovery()
            return False
        if self._autosaved_state == doc.state:
            return False
        try:
            recovery.write_recovery(self.recovery_dir, doc)
        except ProfileBenchError as exc:
            if self.autosave_error != str(exc):  # told once per distinct failure
                log.warning("recovery copy not written: %s", exc)
                self.statusBar().showMessage(f"recovery copy not written: {exc}", 10000)
                self.report_error(
                    "Recovery copy not written",
                    f"Your unsaved changes are not protected by a recovery copy:\n\n{exc}\n\n"
                    "Save the project to keep them, or choose another recovery folder (setting "
                    "recovery_dir).",
                )
            self.autosave_error = str(exc)
            return False
        self.autosave_error = ""
        self._autosaved_state = doc.state
        return True

    def _discard_recovery(self):
        self._autosaved_state = None
        try:
            recovery.remove_recovery(self.recovery_dir)
        except OSError as exc:
            log.warning("recovery copy not removed: %s", exc)

    def ask_recover(self, copy) -> bool:
        """Ask whether to restore the recovery copy ``copy`` (a dialog; tests replace it)."""
        where = str(copy.origin) if copy.origin is not None else "an untitled project"
        answer = QMessageBox.question(
            self,
            "Recover unsaved work",
            f"The editor did not close normally last time. Restore the unsaved changes to {where}?",
            QMessageBox.Yes | QMessageBox.No,
            QMessageBox.Yes,
        )
        return answer == QMessageBox.Yes

    def report_error(self, title: str, text: str) -> None:
        """Tell the user about a failure that needs attention (a dialog; tests replace it)."""
        QMessageBox.warning(self, title, text)

    def offer_recovery(self) -> bool:
        """Offer the newest recovery copy left by a process that ended; True when restored."""
        from profilebench.io import load_project

        copies, project = recovery.left_behind(self.recovery_dir), None
        while copies and project is None:  # the newest copy that can be read
            try:
                project = load_project(copies[0].path)
            except ProfileBenchError as exc:
                try:
                    aside = recovery.set_aside(self.recovery_dir, copies[0])
                    where = f"set aside as {aside}"
                except ProfileBenchError as why:
                    where = str(why)
                self._show_banner(
                    f"the recovery copy {copies[0].path} cannot be read ({exc}); {where}", True
                )
                copies.pop(0)
        if not copies:
            return False
        copy = copies[0]
        restored = False
        if self.ask_recover(copy):
            doc = Document.from_project(project, path=copy.origin)
            doc.mark_unsaved()
            self._install(doc)
            restored = True
            self.statusBar().showMessage(f"restored unsaved work from {copy.path}", 10000)
        for c in copies:
            recovery.remove_recovery(self.recovery_dir, c.pid)
        if restored:
            self.autosave()
        return restored

    # ------------------------------------------------------------------ closing
    def ask_unsaved(self) -> str:
        """Ask whether to save unsaved changes: "save", "discard" or "cancel" (a dialog)."""
        answer = QMessageBox.question(
            self,
            "Unsaved changes",
            f"Save the changes to {self.document.title.rstrip(' *')}?",
            QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel,
            QMessageBox.Save,
        )
        if answer == QMessageBox.Save:
            return "save"
        return "discard" if answer == QMessageBox.Discard else "cancel"

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
        self._autosave_timer.stop()
        self._discard_recovery()
        event.accept()

    def shutdown(self, msecs: int = 30000) -> bool:
        """Stop every background job: nothing new starts, running ones are waited for.

        Returns False (and logs) when a job did not end within ``msecs``.
        """
        self._plot_timer.stop()
        ok = True
        for r in (self.runner, self.baseline_runner, self.search_runner):
            ok = r.close(msecs) and ok
        ok = self.variants_panel.close_runner(msecs) and ok  # variant sets
        ok = self.canvas.shutdown(msecs) and ok
        ok = self.plots.shutdown(msecs) and ok
        if not ok:
            log.warning("a background job was still running when the window closed")
        return ok
