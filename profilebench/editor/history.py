"""Undo/redo history of edits, without Qt (the window uses QUndoStack over the same edits)."""

from __future__ import annotations

from profilebench.editor.commands import Edit
from profilebench.editor.document import Document

__all__ = ["History"]


class History:
    """A linear undo/redo history applying :class:`Edit` values to a :class:`Document`."""

    def __init__(self, document: Document):
        self.document = document
        self._done: list[Edit] = []
        self._undone: list[Edit] = []

    def push(self, edit: Edit) -> bool:
        """Apply ``edit`` and record it; an edit that changes nothing is not recorded."""
        if not edit.changes_anything:
            return False
        self.document.set_state(edit.after)
        self._done.append(edit)
        self._undone.clear()
        return True

    @property
    def can_undo(self) -> bool:
        return bool(self._done)

    @property
    def can_redo(self) -> bool:
        return bool(self._undone)

    def undo(self) -> Edit:
        """Undo the last edit and return it."""
        if not self._done:
            raise RuntimeError("nothing to undo")
        edit = self._done.pop()
        self.document.set_state(edit.before)
        self._undone.append(edit)
        return edit

    def redo(self) -> Edit:
        """Redo the last undone edit and return it."""
        if not self._undone:
            raise RuntimeError("nothing to redo")
        edit = self._undone.pop()
        self.document.set_state(edit.after)
        self._done.append(edit)
        return edit

    def __len__(self) -> int:
        return len(self._done)
