"""Errors and warnings of profilebench.

Every error the package raises on bad input derives from :class:`ProfileBenchError`, so callers
(the command line, the editor, scripts) can catch one class and show its message. Messages say
what is wrong and how to fix it. Numerical failures of a solver are *not* errors: they come back
as a result whose ``status`` says what happened (see the result dataclasses).
"""

from __future__ import annotations

__all__ = [
    "ProfileBenchError",
    "GeometryError",
    "RadiusTooLargeError",
    "SelfIntersectionError",
    "GroundContactError",
    "InputError",
    "ConditionsError",
    "ProjectFileError",
    "TableError",
    "ProfileBenchWarning",
    "excerpt",
]


class ProfileBenchError(ValueError):
    """Root of every error raised by profilebench on bad input.

    Subclasses ValueError so code that treats bad arguments generically still works.
    """


class GeometryError(ProfileBenchError):
    """The profile outline is not usable (too few nodes, zero area, bad node data...)."""


class RadiusTooLargeError(GeometryError):
    """A corner radius does not fit between its neighbouring segments.

    ``node`` is the index of the node, ``radius`` the requested radius and ``largest`` the
    largest radius that fits (all in metres).
    """

    def __init__(self, message: str, node: int, radius: float, largest: float):
        super().__init__(message)
        self.node = node
        self.radius = radius
        self.largest = largest


class SelfIntersectionError(GeometryError):
    """The outline crosses itself; ``location`` is an (x, y) where it does, in metres."""

    def __init__(self, message: str, location: tuple[float, float] | None = None):
        super().__init__(message)
        self.location = location


class GroundContactError(GeometryError):
    """With the ground on, part of the profile touches or lies below y = 0."""


class InputError(ProfileBenchError):
    """A numeric argument is malformed (wrong shape, NaN, out of range...)."""


class ConditionsError(ProfileBenchError):
    """The flow conditions are impossible (speed <= 0, viscosity <= 0, NaN...)."""


class ProjectFileError(ProfileBenchError):
    """A project or point file cannot be read; ``path`` names the bad field where known."""

    def __init__(self, message: str, path: str | None = None):
        super().__init__(message)
        self.path = path


class TableError(ProfileBenchError):
    """An empirical r/t table is malformed (bad header, non-monotone ratios...)."""


class ProfileBenchWarning(UserWarning):
    """A result is usable but should be read with care (an option ignored, a table extrapolated...)."""


def excerpt(text: str, chars: int = 60) -> str:
    """A piece of the user's input for a message: its repr, cut to ``chars`` characters, so a
    long line or a number of thousands of digits is not echoed in full."""
    shown = repr(text)
    return shown if len(shown) <= chars else shown[: chars - 4] + "...'"
