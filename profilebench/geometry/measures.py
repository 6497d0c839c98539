"""Measures of a profile taken on its built outline (arcs and splines included), in metres."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from profilebench.geometry.outline import canonical_outline

__all__ = ["Measures", "measure"]


@dataclass(frozen=True)
class Measures:
    """Size of a profile.

    ``length`` x extent (m), ``height`` frontal height h = y extent (m), ``clearance`` lowest y
    (m, the ground clearance when the ground is y = 0), ``area`` enclosed area (m^2),
    ``perimeter`` outline length (m), ``centroid`` (x, y) of the enclosed area (m), ``x_min``,
    ``x_max``, ``y_max`` (m).
    """

    length: float
    height: float
    clearance: float
    area: float
    perimeter: float
    centroid: tuple[float, float]
    x_min: float
    x_max: float
    y_max: float


def measure(profile) -> Measures:
    """Measures of ``profile``'s built outline.

    Area and centroid by Green's theorem, A = 1/2 closed-integral (x dy - y dx),
    x_c = 1/(2A) closed-integral x^2 dy, y_c = -1/(2A) closed-integral y^2 dx, evaluated with
    Gauss-Legendre quadrature on each line, arc and spline interval; the perimeter likewise; the
    extents from piece ends, arc extreme points and the roots of the spline derivatives.
    """
    o = canonical_outline(profile)  # the same curve whichever way the nodes are given
    p, d, w = o.boundary_quadrature()
    x, y = p[:, 0], p[:, 1]
    dx, dy = d[:, 0], d[:, 1]
    a2 = float(np.sum(w * (x * dy - y * dx)))
    area = 0.5 * a2
    cx = float(np.sum(w * x * x * dy)) / a2
    cy = -float(np.sum(w * y * y * dx)) / a2
    per = float(np.sum(w * np.hypot(dx, dy)))
    ext = o.extreme_points()
    x0, x1 = float(ext[:, 0].min()), float(ext[:, 0].max())
    y0, y1 = float(ext[:, 1].min()), float(ext[:, 1].max())
    return Measures(x1 - x0, y1 - y0, y0, abs(area), per, (cx, cy), x0, x1, y1)
