"""Enumerations whose members are also their text (event kinds, stop reasons, surface names)."""

from __future__ import annotations

import enum

__all__ = ["TextEnum"]


class TextEnum(str, enum.Enum):
    """An enumeration whose members are also their text: they compare, hash, format and write
    to JSON as their value, so ``EventKind.TRANSITION == "transition"`` and a dict keyed by the
    text finds the member."""

    def __str__(self):
        return self.value

    __hash__ = str.__hash__
