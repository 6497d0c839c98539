"""The main window's menu bar (File, Edit, View, Underlay) and the small dialogs its entries open.

:func:`build_menus` takes the window and returns its menus by title, so a new panel adds its
entries to the menu it belongs in (``menus["View"]``) with :func:`add_action`. The entries call
the window's public methods; the dialogs here only ask for a file or a number and hand it on.
"""

from __future__ import annotations

from PySide6.QtGui import QAction, QKeySequence
from PySide6.QtWidgets import QFileDialog, QInputDialog

from profilebench.editor import commands
from profilebench.editor.fields import parse_number
from profilebench.errors import ProfileBenchError

__all__ = ["add_action", "build_menus", "ask_save_as"]

PROJECT_FILES = "Projects (*.json)"


def add_action(window, menu, text, slot, shortcut=None, checkable=False) -> QAction:
    """Add an entry ``text`` calling ``slot`` to ``menu``; return its QAction."""
    act = QAction(text, window)
    if shortcut is not None:
        act.setShortcut(QKeySequence(shortcut))
    act.setCheckable(checkable)
    act.triggered.connect(slot)
    menu.addAction(act)
    return act


def build_menus(window) -> dict:
    """Build the window's menu bar; return its menus by title ("File", "Edit", ...).

    Sets ``window.recent_menu`` (filled by the window's recent files) and the checkable view
    entries ``window.grid_action``, ``window.cp_action`` and ``window.offset_action``.
    """
    bar = window.menuBar()
    menus = {}

    def entry(menu, text, slot, shortcut=None, checkable=False):
        return add_action(window, menu, text, slot, shortcut, checkable)

    m = menus["File"] = bar.addMenu("&File")
    entry(m, "&New", window.new_document, QKeySequence.New)
    entry(m, "&Open…", lambda: _ask_open(window), QKeySequence.Open)
    window.recent_menu = m.addMenu("Open &recent")
    entry(m, "&Save", window.save, QKeySequence.Save)
    entry(m, "Save &as…", lambda: ask_save_as(window), QKeySequence.SaveAs)
    m.addSeparator()
    for text, save, title, kinds, then in (
        (
            "Import point outline (CSV)…",
            False,
            "Import point outline",
            "Point files (*.csv *.txt)",
            window.import_points_with_dialog,
        ),
        (
            "Export annotated view (PNG/SVG/PDF)…",
            True,
            "Export annotated view",
            "Images (*.png *.svg *.pdf)",
            window.export_image,
        ),
        (
            "Export surface data (CSV)…",
            True,
            "Export surface data",
            "CSV (*.csv)",
            window.export_surface_csv,
        ),
    ):
        # the default arguments keep this entry's values (a closure would see the last ones)
        entry(m, text, lambda _=False, a=(save, title, kinds, then): _with_file(window, *a))
    m.addSeparator()
    entry(m, "&Quit", window.close, QKeySequence.Quit)

    e = menus["Edit"] = bar.addMenu("&Edit")
    undo = window.undo_stack.createUndoAction(window, "&Undo")
    undo.setShortcut(QKeySequence.Undo)
    redo = window.undo_stack.createRedoAction(window, "&Redo")
    redo.setShortcut(QKeySequence.Redo)
    e.addAction(undo)
    e.addAction(redo)
    e.addSeparator()
    entry(e, "&Delete node", window.delete_selected, QKeySequence.Delete)
    entry(e, "Toggle smooth / corner", window.toggle_smooth, "S")
    e.addSeparator()
    entry(e, "&Pin as baseline", window.pin_baseline, "Ctrl+B")
    entry(e, "Clear baseline", window.clear_baseline)

    a = menus["Analysis"] = bar.addMenu("&Analysis")
    entry(a, "Check by &doubling the panels", window.refinement_check.start, "Ctrl+D")

    canvas = window.canvas
    v = menus["View"] = bar.addMenu("&View")
    entry(v, "&Fit to window", canvas.fit, "Ctrl+0")
    entry(v, "Zoom &in", lambda: canvas.zoom(1.25), QKeySequence.ZoomIn)
    entry(v, "Zoom &out", lambda: canvas.zoom(0.8), QKeySequence.ZoomOut)
    window.grid_action = entry(
        v, "Snap to grid", lambda on: _show_grid(window, on), "Ctrl+G", checkable=True
    )
    entry(v, "Grid spacing…", lambda: _ask_grid(window))
    window.cp_action = entry(
        v, "Cp colour band", lambda on: _canvas_option(canvas, "show_cp", on), checkable=True
    )
    window.cp_action.setChecked(True)
    window.offset_action = entry(
        v,
        "Cp offset curve",
        lambda on: _canvas_option(canvas, "cp_offset_curve", on),
        checkable=True,
    )
    entry(v, "Cp colour scale…", lambda: _ask_cp_scale(window))

    u = menus["Underlay"] = bar.addMenu("&Underlay")
    entry(
        u,
        "Load image…",
        lambda: _with_file(
            window,
            False,
            "Underlay image",
            "Images (*.png *.jpg *.jpeg *.bmp)",
            window.load_underlay,
        ),
    )
    entry(u, "Place by two reference points…", window.start_underlay_picking)
    entry(u, "Opacity…", lambda: _ask_underlay_opacity(window))
    entry(
        u,
        "Remove",
        lambda: window._try(
            lambda: commands.set_underlay(window.document.state, None, "Remove underlay")
        ),
    )
    return menus


# ---------------------------------------------------------------------- files
def _folder(window) -> str:
    doc = window.document
    return str(doc.path.parent) if doc and doc.path else ""


def _with_file(window, save: bool, title, kinds, then, folder=""):
    """Ask for a file to open (``save`` False) or to save to, and give it to ``then``; returns
    what ``then`` returns, or False when no file was chosen."""
    ask = QFileDialog.getSaveFileName if save else QFileDialog.getOpenFileName
    path, _ = ask(window, title, folder, kinds)
    return then(path) if path else False


def _ask_open(window):
    if window.confirm_discard():
        _with_file(window, False, "Open project", PROJECT_FILES, window.open_file, _folder(window))


def ask_save_as(window) -> bool:
    """Ask for a project file and save there; False when not saved (or no file chosen)."""
    return _with_file(window, True, "Save project", PROJECT_FILES, window.save_to, _folder(window))


# ---------------------------------------------------------------------- numbers
def _ask_number(window, title, label, text, parse):
    """A number typed in a dialog, parsed by ``parse``; None when cancelled or refused (the
    reason is shown in the window's banner)."""
    typed, ok = QInputDialog.getText(window, title, label, text=text)
    if not ok:
        return None
    try:
        return parse(typed)
    except ProfileBenchError as exc:
        window._show_banner(str(exc), True)
        return None


def _show_grid(window, on):
    window.canvas.grid = window.grid_spacing if on else None
    window.canvas.update()


def _canvas_option(canvas, name, on):
    setattr(canvas, name, bool(on))
    canvas.update()


def _ask_grid(window):
    mm = _ask_number(
        window,
        "Grid spacing",
        "Grid spacing (mm):",
        f"{window.grid_spacing * 1000:g}",
        lambda t: parse_number(t, "grid spacing", "mm", 0.0, exclusive_minimum=True),
    )
    if mm is None:
        return
    window.grid_spacing = mm / 1000.0
    if window.grid_action.isChecked():
        _show_grid(window, True)


def _ask_cp_scale(window):
    value = _ask_number(
        window,
        "Cp colour scale",
        "Lowest Cp of the colour scale (the same on every page; default -3):",
        f"{window.canvas.cp_min:g}",
        lambda t: parse_number(t, "lowest Cp"),
    )
    if value is not None:
        window.set_cp_scale(value)


# ---------------------------------------------------------------------- underlay
def _ask_underlay_opacity(window):
    u = window.document.underlay
    if u is None:
        return
    op = _ask_number(
        window,
        "Underlay opacity",
        "Opacity, 0 (hidden) to 1:",
        f"{u.opacity:g}",
        lambda t: parse_number(t, "opacity", "", 0.0, 1.0),
    )
    if op is not None:
        window._try(
            lambda: commands.set_underlay(window.document.state, u.with_opacity(op), "Dim underlay")
        )
