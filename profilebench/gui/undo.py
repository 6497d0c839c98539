"""The Qt undo stack's command over an editor :class:`~profilebench.editor.commands.Edit`."""

from __future__ import annotations

from PySide6.QtGui import QUndoCommand

__all__ = ["EditCommand"]


class EditCommand(QUndoCommand):
    """Redo sets the edit's after-state on the document, undo its before-state (exact)."""

    def __init__(self, document, edit):
        super().__init__(edit.text)
        self.document = document
        self.edit = edit

    def redo(self):
        self.document.set_state(self.edit.after)

    def undo(self):
        self.document.set_state(self.edit.before)
