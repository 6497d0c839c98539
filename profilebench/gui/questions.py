"""The questions the window asks in a modal box (the window's methods of the same names call
these; tests replace those methods)."""

from __future__ import annotations

from PySide6.QtWidgets import QMessageBox

__all__ = ["ask_recover", "ask_unsaved"]


def ask_recover(window, copy) -> bool:
    """Restore the recovery copy ``copy`` (a RecoveryCopy)? True for yes."""
    where = str(copy.origin) if copy.origin is not None else "an untitled project"
    answer = QMessageBox.question(
        window,
        "Recover unsaved work",
        f"The editor did not close normally last time. Restore the unsaved changes to {where}?",
        QMessageBox.Yes | QMessageBox.No,
        QMessageBox.Yes,
    )
    return answer == QMessageBox.Yes


def ask_unsaved(window) -> str:
    """Save the window's unsaved changes? "save", "discard" or "cancel"."""
    answer = QMessageBox.question(
        window,
        "Unsaved changes",
        f"Save the changes to {window.document.title.rstrip(' *')}?",
        QMessageBox.Save | QMessageBox.Discard | QMessageBox.Cancel,
        QMessageBox.Save,
    )
    if answer == QMessageBox.Save:
        return "save"
    return "discard" if answer == QMessageBox.Discard else "cancel"
