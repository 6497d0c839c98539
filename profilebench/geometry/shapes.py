"""Standard shapes for tests and demonstrations: circle, ellipse, rounded box, NACA 4-digit.

``circle`` and ``ellipse`` return profiles of smooth nodes (a periodic spline through points on
the exact curve); ``circle_points`` and ``ellipse_points`` return points lying exactly on the
curve, for use directly as panel end points.
"""

from __future__ import annotations

import math

import numpy as np

from profilebench.errors import InputError
from profilebench.geometry.outline import build_outline
from profilebench.geometry.profile import Node, Profile

__all__ = ["circle", "ellipse", "circle_points", "ellipse_points", "rounded_box", "naca4"]


def _positive(name, value):
    if (
        isinstance(value, bool)
        or not isinstance(value, (int, float))
        or not math.isfinite(value)
        or value <= 0
    ):
        raise InputError(f"{name} must be a positive finite number in metres, got {value!r}")
    return float(value)


def _count(name, value, least):
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)) or value < least:
        raise InputError(f"{name} must be a whole number >= {least}, got {value!r}")
    return int(value)


def _centre(centre):
    try:
        cx, cy = (float(v) for v in centre)
    except (TypeError, ValueError):
        raise InputError(f"centre must be an (x, y) pair in metres, got {centre!r}") from None
    if not (math.isfinite(cx) and math.isfinite(cy)):
        raise InputError(f"centre {centre!r} must be finite")
    return cx, cy


def ellipse_points(a: float, b: float, n: int, centre=(0.0, 0.0)) -> np.ndarray:
    """``n`` points (m) exactly on the ellipse x = xc + a cos(eta), y = yc + b sin(eta).

    eta_j = 2 pi j / n, j = 0..n-1: counter-clockwise from the rear point (x = xc + a), first
    point not repeated. ``a`` is the semi-axis along x (the stream), ``b`` along y.
    """
    a, b = _positive("a", a), _positive("b", b)
    n = _count("n", n, 3)
    cx, cy = _centre(centre)
    eta = 2.0 * np.pi * np.arange(n) / n
    return np.column_stack([cx + a * np.cos(eta), cy + b * np.sin(eta)])


def circle_points(radius: float, n: int, centre=(0.0, 0.0)) -> np.ndarray:
    """``n`` points (m) exactly on a circle, counter-clockwise from the rear point (theta = 0)."""
    r = _positive("radius", radius)
    return ellipse_points(r, r, n, centre)


def ellipse(a: float, b: float, centre=(0.0, 0.0), n_nodes: int = 24, name="ellipse") -> Profile:
    """An ellipse (semi-axes ``a`` along x, ``b`` along y, m) as a profile of smooth nodes."""
    pts = ellipse_points(a, b, _count("n_nodes", n_nodes, 4), centre)
    return Profile.from_points(pts, smooth=[True] * len(pts), name=name)


def circle(radius: float, centre=(0.0, 0.0), n_nodes: int = 16, name="circle") -> Profile:
    """A circle of ``radius`` (m) as a profile of smooth nodes (periodic spline)."""
    r = _positive("radius", radius)
    return ellipse(r, r, centre, n_nodes, name=name)


def rounded_box(
    length: float, height: float, radius=0.0, clearance: float = 0.0, x0: float = 0.0, name="box"
) -> Profile:
    """A rectangle with rounded corners: nose at ``x0``, x rearward, bottom at y = ``clearance``.

    ``radius`` is one radius for all corners or a tuple (front_top, rear_top, rear_bottom,
    front_bottom), m. Nodes run counter-clockwise from the front-bottom corner. A radius that does
    not fit raises RadiusTooLargeError.
    """
    L, H = _positive("length", length), _positive("height", height)
    if isinstance(radius, (int, float)) and not isinstance(radius, bool):
        radii = (float(radius),) * 4
    else:
        try:
            radii = tuple(float(r) for r in radius)
        except (TypeError, ValueError):
            radii = ()
        if len(radii) != 4:
            raise InputError(
                f"radius must be one number or four (front_top, rear_top, rear_bottom, "
                f"front_bottom) in metres, got {radius!r}"
            )
    for v, nm in ((clearance, "clearance"), (x0, "x0")):
        if isinstance(v, bool) or not isinstance(v, (int, float)) or not math.isfinite(v):
            raise InputError(f"{nm} must be a finite number in metres, got {v!r}")
    ft, rt, rb, fb = radii
    c = float(clearance)
    prof = Profile(
        (
            Node(x0, c, fb, label="front bottom"),
            Node(x0 + L, c, rb, label="rear bottom"),
            Node(x0 + L, c + H, rt, label="rear top"),
            Node(x0, c + H, ft, label="front top"),
        ),
        name=name,
    )
    build_outline(prof)
    return prof


def _naca4_digits(code):
    code = str(code).strip()
    if len(code) != 4 or not code.isdigit():
        raise InputError(
            f"NACA 4-digit code {code!r} must be four digits, such as '2412' or '0012'"
        )
    m = int(code[0]) / 100.0
    p = int(code[1]) / 10.0
    t = int(code[2:]) / 100.0
    if t <= 0:
        raise InputError(f"NACA code {code!r} has zero thickness; the last two digits must be > 0")
    if (m > 0) != (p > 0):
        raise InputError(
            f"NACA code {code!r}: a cambered section needs both the camber (first digit) and its "
            "position (second digit) non-zero, a symmetric one both zero"
        )
    return m, p, t


def naca4_surface(code, x):
    """Upper and lower surface points of a NACA 4-digit section at chord stations ``x`` (chord 1).

    Thickness yt = 5 t (0.2969 sqrt(x) - 0.1260 x - 0.3516 x^2 + 0.2843 x^3 - 0.1036 x^4) (closed
    trailing edge variant of the last coefficient, -0.1015 in the original), mean line
    yc = m/p^2 (2 p x - x^2) for x < p, m/(1-p)^2 (1 - 2p + 2 p x - x^2) for x >= p; thickness laid
    off normal to the mean line (Abbott & von Doenhoff, Theory of Wing Sections, sec. 6.4; NACA
    Report 824). Returns (upper, lower), each (len(x), 2).
    """
    m, p, t = _naca4_digits(code)
    x = np.asarray(x, float)
    yt = 5 * t * (0.2969 * np.sqrt(x) - 0.1260 * x - 0.3516 * x**2 + 0.2843 * x**3 - 0.1036 * x**4)
    if m > 0:
        fore = x < p
        yc = np.where(
            fore, m / p**2 * (2 * p * x - x**2), m / (1 - p) ** 2 * (1 - 2 * p + 2 * p * x - x**2)
        )
        dyc = np.where(fore, 2 * m / p**2 * (p - x), 2 * m / (1 - p) ** 2 * (p - x))
    else:
        yc = np.zeros_like(x)
        dyc = np.zeros_like(x)
    th = np.arctan(dyc)
    upper = np.column_stack([x - yt * np.sin(th), yc + yt * np.cos(th)])
    lower = np.column_stack([x + yt * np.sin(th), yc - yt * np.cos(th)])
    return upper, lower


def naca4(code, chord: float = 1.0, n_points: int = 61, name=None) -> Profile:
    """A NACA 4-digit section (closed trailing edge) as a profile with a sharp trailing edge.

    ``n_points`` chord stations per surface with cosine spacing (leading and trailing edge
    included). Node 0 is the trailing edge at x = ``chord`` (sharp, ``trailing_edge=0``); the
    nodes run over the upper surface to the leading edge at x = 0 and back along the lower
    surface; all other nodes are smooth. Formulae: see :func:`naca4_surface`.
    """
    c = _positive("chord", chord)
    n = _count("n_points", n_points, 5)
    beta = np.linspace(0.0, np.pi, n)
    x = 0.5 * (1.0 - np.cos(beta))
    up, lo = naca4_surface(code, x)
    pts = np.concatenate([up[::-1][:-1], lo[:-1]]) * c  # TE, upper to LE, lower back to TE
    pts[0] = (c, 0.0) if _naca4_digits(code)[0] == 0 else pts[0]
    smooth = [False] + [True] * (len(pts) - 1)
    return Profile.from_points(pts, smooth=smooth, name=name or f"NACA {code}", trailing_edge=0)
