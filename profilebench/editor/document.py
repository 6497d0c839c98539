"""The document being edited: profile, flow conditions, baseline, the project's named variants,
file path and saved state.

A :class:`Document` holds one immutable :class:`DocumentState` at a time. Edits replace the state
(see :mod:`profilebench.editor.commands`), so undo is exact: the previous state is restored as the
very same value. The document is "dirty" when its state differs from the state last saved or
opened, which also makes an edit followed by its undo clean again.
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from pathlib import Path
from typing import Callable

import profilebench
from profilebench.editor.selection import Selection
from profilebench.errors import GeometryError

__all__ = ["CAUTION", "Document", "DocumentState"]

CAUTION = profilebench.CAUTION  # one text for the whole product


@dataclass(frozen=True)
class DocumentState:
    """One state of the document: the profile, the flow conditions, the pinned baseline, the
    underlay, and the project's named variants (a tuple of
    :class:`profilebench.io.project.Variant`, in the user's order) with the name of the one
    they are ranked against (None: the first). The variants are part of the state, so storing,
    renaming, deleting or switching to one is an edit that undo takes back."""

    profile: object  # profilebench.geometry.profile.Profile
    conditions: object  # profilebench.assess.conditions.Conditions
    baseline: object = None  # a Profile pinned for comparison, or None
    underlay: object = None  # profilebench.editor.underlay.Underlay, or None
    variants: tuple = ()  # profilebench.io.project.Variant, ...
    baseline_variant: str | None = None


class Document:
    """The editor's document (mutable holder of immutable states).

    Parameters
    ----------
    profile : Profile
        The profile to edit.
    conditions : Conditions
        The flow conditions.
    path : str or Path or None
        The project file the document was opened from or saved to.
    """

    def __init__(
        self,
        profile,
        conditions,
        path=None,
        baseline=None,
        underlay=None,
        variants=(),
        baseline_variant=None,
        notes: str = "",
    ):
        if profile is None:
            raise GeometryError("a document needs a profile; give a Profile (e.g. a sample)")
        self._state = DocumentState(
            profile, conditions, baseline, underlay, tuple(variants), baseline_variant
        )
        self._saved = self._state
        self.path = Path(path) if path is not None else None
        # the project file's free notes: the editor does not edit them, but keeps them, so that
        # saving a project from the editor does not lose what was written there
        self.notes = notes
        self.selection = Selection()
        self._listeners: list[Callable[[DocumentState], None]] = []

    # --- state ---------------------------------------------------------------------------
    @property
    def state(self) -> DocumentState:
        return self._state

    @property
    def profile(self):
        return self._state.profile

    @property
    def conditions(self):
        return self._state.conditions

    @property
    def baseline(self):
        return self._state.baseline

    @property
    def underlay(self):
        return self._state.underlay

    @property
    def variants(self) -> tuple:
        return self._state.variants

    @property
    def baseline_variant(self):
        return self._state.baseline_variant

    @classmethod
    def from_project(cls, project, path=None, underlay=None) -> "Document":
        """A document of a :class:`profilebench.io.project.Project` (its underlay, an editor
        :class:`~profilebench.editor.underlay.Underlay` with its image, given separately)."""
        return cls(
            project.profile,
            project.conditions,
            path=path,
            baseline=project.baseline,
            underlay=underlay,
            variants=project.variants,
            baseline_variant=project.baseline_variant,
            notes=project.notes,
        )

    def to_project(self, underlay=None, notes: str | None = None):
        """The document as a :class:`profilebench.io.project.Project` to save (``underlay``: the
        file's :class:`profilebench.io.project.Underlay`, its path relative to the project;
        ``notes``: the free notes, by default those the document was made with)."""
        from profilebench.io.project import Project

        return Project(
            self.profile,
            self.conditions,
            baseline=self.baseline,
            underlay=underlay,
            notes=self.notes if notes is None else notes,
            variants=self.variants,
            baseline_variant=self.baseline_variant,
        )

    def set_state(self, state: DocumentState) -> None:
        """Replace the whole state (used by edits, undo and redo) and tell the listeners."""
        if not isinstance(state, DocumentState):
            raise TypeError(f"expected a DocumentState, got {type(state).__name__}")
        if state == self._state and state.profile is self._state.profile:
            return
        self._state = state
        self.selection = self.selection.valid_for(state.profile)
        for listener in list(self._listeners):
            listener(state)

    def preview_profile(self, profile) -> None:
        """Show ``profile`` as current without an undo step (a drag in progress)."""
        self.set_state(replace(self._state, profile=profile))

    def subscribe(self, listener: Callable[[DocumentState], None]) -> None:
        """Call ``listener(state)`` after every change of state."""
        self._listeners.append(listener)

    def unsubscribe(self, listener) -> None:
        if listener in self._listeners:
            self._listeners.remove(listener)

    # --- file state ----------------------------------------------------------------------
    @property
    def dirty(self) -> bool:
        """True when the state differs from the one last opened or saved."""
        return self._state != self._saved

    def mark_saved(self, path=None) -> None:
        """Record the current state as saved (to ``path`` when given)."""
        if path is not None:
            self.path = Path(path)
        self._saved = self._state

    def mark_unsaved(self) -> None:
        """Treat the current state as not saved anywhere (a document restored from a recovery copy)."""
        self._saved = None

    @property
    def title(self) -> str:
        """A window title: the file name (or the profile name) with a star when unsaved."""
        name = self.path.name if self.path is not None else (self.profile.name or "untitled")
        return f"{name}{' *' if self.dirty else ''}"
