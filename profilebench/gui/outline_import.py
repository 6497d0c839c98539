"""Importing a digitised point outline (CSV) into the window's document, with or without the
import dialog (:mod:`profilebench.gui.import_dialog`); the fit is an undoable edit."""

from __future__ import annotations

from pathlib import Path

from profilebench.editor import commands
from profilebench.errors import ProfileBenchError

__all__ = ["import_points", "import_points_with_dialog"]


def _read(window, path):
    """The points of ``path``, or None (the reason shown in the window's banner)."""
    from profilebench.io import import_points_csv

    try:
        return import_points_csv(path)
    except ProfileBenchError as exc:
        window._show_banner(f"cannot import {path}: {exc}", True)
        return None


def import_points(window, path, simplify_mm: float = 5.0) -> bool:
    """Replace the profile by the outline of ``path`` fitted within ``simplify_mm``, no dialog."""
    from profilebench.editor.import_preview import fit_preview

    pts = _read(window, path)
    if pts is None:
        return False
    preview = fit_preview(
        pts.points,
        simplify_mm / 1000.0,
        ground=window.document.conditions.ground,
        name=Path(path).stem,
    )
    return _load(window, path, pts, preview)


def import_points_with_dialog(window, path) -> bool:
    """Read the outline of ``path`` and load its fit once the import dialog is accepted
    (``window.run_import_dialog`` shows it)."""
    from profilebench.gui.import_dialog import ImportDialog

    pts = _read(window, path)
    if pts is None:
        return False
    dialog = ImportDialog(
        pts,
        Path(path).stem,
        ground=window.document.conditions.ground,
        parent=window,
        conditions=window.document.conditions,
    )
    try:
        if not window.run_import_dialog(dialog):
            return False
        return _load(window, path, pts, dialog.preview)
    finally:
        dialog.deleteLater()


def _load(window, path, pts, preview) -> bool:
    if preview is None or not preview.ok:
        reason = preview.error if preview is not None else "no fit"
        window._show_banner(f"cannot import {path}: {reason}", True)
        return False
    prof = preview.profile
    window.select_node(None)  # the old selection was a node of the old outline
    window.push(commands.import_profile(window.document.state, prof, f"Import {Path(path).name}"))
    if preview.radius_notes:
        # the radii the points leave open go with the project, as the command line's import
        # writes them (the editor keeps the project's notes but does not edit them)
        heading = f"Imported from {Path(path).name}: radii the points do not fix"
        old = window.document.notes.strip()
        window.document.notes = "\n".join(
            ([old] if old else []) + [heading] + list(preview.radius_notes)
        )
    window.canvas.fit()
    window.statusBar().showMessage(
        f"imported {len(prof)} nodes, {preview.corners} corners, within "
        f"{preview.max_deviation * 1e3:.1f} mm of the points ({pts.units}, {pts.units_reason})"
        + (f"; {preview.notes[0]}" if preview.notes else "")
        + (
            f"; {len(preview.radius_notes)} radii not fixed by the points, take them from "
            "the drawing (listed in the project's notes)"
            if preview.radius_notes
            else ""
        ),
        12000,
    )
    return True
