"""Closed polylines (an outline's points, in order; the last joins the first): the small geometry
that the panelling, the flow and the corners all need, written once.

Every function takes an (N, 2) array of points in metres, first point not repeated.
"""

from __future__ import annotations

import numpy as np

__all__ = [
    "edges",
    "edge_lengths",
    "arc_length",
    "signed_area",
    "is_clockwise",
    "outward_normals",
    "midpoints",
]


def edges(points):
    """Edge vectors, edge i from point i to point i + 1 (the last back to the first), m."""
    pts = np.asarray(points, dtype=float)
    return np.roll(pts, -1, axis=0) - pts


def edge_lengths(points):
    """Length of each edge (see :func:`edges`), m."""
    seg = edges(points)
    return np.hypot(seg[:, 0], seg[:, 1])


def arc_length(points):
    """(perimeter, arc length of each point from point 0 along the polyline), m."""
    lengths = edge_lengths(points)
    return float(lengths.sum()), np.concatenate([[0.0], np.cumsum(lengths)[:-1]])


def signed_area(points) -> float:
    """Signed area (shoelace formula), m^2: positive when the points run counter-clockwise."""
    pts = np.asarray(points, dtype=float)
    return 0.5 * float(
        np.sum(pts[:, 0] * np.roll(pts[:, 1], -1) - np.roll(pts[:, 0], -1) * pts[:, 1])
    )


def is_clockwise(points) -> bool:
    """True when the points run clockwise (negative signed area)."""
    return signed_area(points) < 0.0


def outward_normals(points):
    """Unit outward normal of each edge (pointing out of the enclosed area), either orientation."""
    seg = edges(points)
    length = np.hypot(seg[:, 0], seg[:, 1])
    sgn = 1.0 if is_clockwise(points) else -1.0  # outward = sgn * the left normal
    return np.column_stack([-seg[:, 1] / length * sgn, seg[:, 0] / length * sgn])


def midpoints(points):
    """Midpoint of each edge, m."""
    pts = np.asarray(points, dtype=float)
    return 0.5 * (pts + np.roll(pts, -1, axis=0))
