"""What the user has selected: one node (a corner is a node) or nothing."""

from __future__ import annotations

from dataclasses import dataclass

__all__ = ["Selection"]


@dataclass(frozen=True)
class Selection:
    """The selected node index (None: nothing selected).

    Canvas and corner table share one selection, so picking a corner in either highlights it in
    both.
    """

    node: int | None = None

    def valid_for(self, profile) -> "Selection":
        """This selection, or an empty one when its node no longer exists in ``profile``."""
        if self.node is None or (profile is not None and 0 <= self.node < len(profile)):
            return self
        return Selection()
