"""Edit commands: each edit is a pair of document states, before and after.

Profiles and conditions are immutable values, so an edit keeps both states and undo restores the
very same value (exact, no re-computation). The functions below check the user's input and build
the edit; they raise a :class:`~profilebench.errors.ProfileBenchError` subclass with a message
saying what is wrong and how to fix it. Apply an edit with ``Document.set_state(edit.after)``;
the window records it as one step of its Qt undo stack (profilebench.gui.undo.push_edit).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from profilebench.editor.document import DocumentState
from profilebench.errors import ConditionsError, GeometryError, InputError
from profilebench.geometry.profile import Node

__all__ = [
    "Edit",
    "MIN_NODES",
    "move_node",
    "insert_node",
    "delete_node",
    "set_radius",
    "set_smooth",
    "set_conditions",
    "pin_baseline",
    "clear_baseline",
    "replace_profile",
    "import_profile",
    "load_variant",
    "set_underlay",
]

MIN_NODES = 3


@dataclass(frozen=True)
class Edit:
    """One undoable step: a description and the document states before and after it."""

    text: str
    before: DocumentState
    after: DocumentState

    @property
    def changes_anything(self) -> bool:
        return self.before != self.after


def _finite(name: str, value, unit: str) -> float:
    if isinstance(value, bool) or not isinstance(value, (int, float)) or not math.isfinite(value):
        raise InputError(f"{name} must be a finite number in {unit}, got {value!r}")
    return float(value)


def _node_label(state: DocumentState, i: int) -> str:
    node = state.profile.nodes[i]
    return f"node {i}" + (f" ({node.label})" if node.label else "")


def move_node(state: DocumentState, i: int, x: float, y: float) -> Edit:
    """Move node ``i`` to (x, y) (m)."""
    x = _finite("x", x, "m")
    y = _finite("y", y, "m")
    profile = state.profile.moved(i, x, y)
    return Edit(f"Move {_node_label(state, i)}", state, replace(state, profile=profile))


def insert_node(
    state: DocumentState, before: int, x: float, y: float, smooth: bool | None = None
) -> Edit:
    """Insert a sharp node at (x, y) (m) before index ``before``.

    With ``smooth=None`` the new node is smooth when either neighbour is, so a click on a spline
    segment keeps it a spline.
    """
    x = _finite("x", x, "m")
    y = _finite("y", y, "m")
    nodes = state.profile.nodes
    n = len(nodes)
    if smooth is None:
        smooth = nodes[(before - 1) % n].smooth or nodes[before % n].smooth
    profile = state.profile.inserted(before, Node(x, y, 0.0, bool(smooth)))
    return Edit(f"Insert node {before}", state, replace(state, profile=profile))


def delete_node(state: DocumentState, i: int) -> Edit:
    """Delete node ``i``; a profile keeps at least three nodes."""
    if len(state.profile) <= MIN_NODES:
        raise GeometryError(
            f"cannot delete a node: a closed profile needs at least {MIN_NODES} nodes and this one "
            f"has {len(state.profile)}; insert a node elsewhere first"
        )
    label = _node_label(state, i)
    profile = state.profile.removed(i)
    return Edit(f"Delete {label}", state, replace(state, profile=profile))


def set_radius(state: DocumentState, i: int, radius: float) -> Edit:
    """Set node ``i``'s corner radius (m, >= 0); a smooth node becomes a corner."""
    radius = _finite("corner radius", radius, "m")
    if radius < 0:
        raise GeometryError(
            f"corner radius {radius * 1000:.4g} mm is negative; give 0 for a sharp edge or a "
            "positive radius"
        )
    profile = state.profile.with_radius(i, radius)
    return Edit(
        f"Set radius of {_node_label(state, i)} to {radius * 1000:.4g} mm",
        state,
        replace(state, profile=profile),
    )


def set_smooth(state: DocumentState, i: int, smooth: bool) -> Edit:
    """Make node ``i`` smooth (a spline passes through it) or a corner."""
    profile = state.profile.with_smooth(i, bool(smooth))
    what = "smooth" if smooth else "a corner"
    return Edit(f"Make {_node_label(state, i)} {what}", state, replace(state, profile=profile))


def set_conditions(state: DocumentState, conditions, text: str = "Change conditions") -> Edit:
    """Replace the flow conditions (an already checked Conditions value)."""
    if conditions is None:
        raise ConditionsError("conditions are missing; give a Conditions value")
    return Edit(text, state, replace(state, conditions=conditions))


def pin_baseline(state: DocumentState) -> Edit:
    """Pin the current profile as the baseline for comparison."""
    return Edit("Pin baseline", state, replace(state, baseline=state.profile))


def clear_baseline(state: DocumentState) -> Edit:
    """Remove the pinned baseline."""
    return Edit("Clear baseline", state, replace(state, baseline=None))


def replace_profile(state: DocumentState, profile, text: str) -> Edit:
    """Replace the whole profile (a finished drag, an import, a radius from a search)."""
    return Edit(text, state, replace(state, profile=profile))


def import_profile(state: DocumentState, profile, text: str) -> Edit:
    """Replace the profile by an imported one: the old baseline was pinned for the old outline,
    so it goes too (one undoable edit brings both back)."""
    return Edit(text, state, replace(state, profile=profile, baseline=None))


def load_variant(state: DocumentState, profile, conditions, text: str) -> Edit:
    """Replace the profile and the conditions by a variant a study analysed (a point of a
    sweep): the outline and the conditions of that point, in one undoable edit."""
    if profile is None or conditions is None:
        raise InputError("the study point has no variant to load; run the study again")
    return Edit(text, state, replace(state, profile=profile, conditions=conditions))


def set_underlay(state: DocumentState, underlay, text: str = "Change underlay") -> Edit:
    """Load, place, dim or remove (None) the underlay image."""
    return Edit(text, state, replace(state, underlay=underlay))
