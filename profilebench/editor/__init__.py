"""The editor's model: document, selection, edits and mouse interaction, without Qt.

The desktop window in :mod:`profilebench.gui` only translates between the user and this model,
so everything here can be tested (and scripted) with plain Python objects.
"""

from profilebench.editor.document import CAUTION, Document, DocumentState
from profilebench.editor.commands import Edit
from profilebench.editor.selection import Selection
from profilebench.editor.view import ViewTransform

__all__ = ["CAUTION", "Document", "DocumentState", "Edit", "Selection", "ViewTransform"]
