"""The Qt undo stack's command over an editor :class:`~profilebench.editor.commands.Edit`."""

from __future__ import annotations

from PySide6.QtGui import QUndoCommand

__all__ = ["EditCommand", "push_edit"]


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


def push_edit(stack, document, edit) -> bool:
    """Apply ``edit`` to ``document`` as one step of the QUndoStack ``stack``.

    An edit that changes nothing (a drag that ended where it started) is not recorded; the
    document is still set to its state, so that it shows the start. Returns whether it was pushed.
    """
    if not edit.changes_anything:
        document.set_state(edit.after)
        return False
    stack.push(EditCommand(document, edit))
    return True
