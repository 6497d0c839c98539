"""A cheap outline preview shown while the built outline is computed in the background.

During a drag the canvas must repaint within a few milliseconds of each mouse move. The exact
outline (fillet arcs, splines through smooth nodes; :func:`profilebench.geometry.build_outline`)
is built in the background (:func:`build_outline_points`, in a child process of the editor);
until it arrives the canvas draws this preview: the node polygon
with each rounded corner replaced by its circular fillet arc. Smooth nodes are joined by straight
segments here. The preview is for display only; it never validates or changes the profile.
"""

from __future__ import annotations

import numpy as np

__all__ = ["build_outline_points", "preview_outline", "warm_up"]


def build_outline_points(profile, samples: int = 400):
    """(points, ok, message) of the built outline of ``profile``; for a worker or child process.

    ``points`` (m, shape (k, 2)) samples :func:`profilebench.geometry.build_outline` at
    ``samples`` points. ``ok`` is False with the reason when the outline cannot be built; then
    the node polygon is returned so the user still sees what they drew.
    """
    from profilebench.errors import ProfileBenchError
    from profilebench.geometry.outline import build_outline

    try:
        pts = np.asarray(build_outline(profile).sample(samples), dtype=float)
        return pts, True, ""
    except ProfileBenchError as exc:
        return np.asarray(profile.xy, dtype=float), False, str(exc)
    except Exception as exc:  # a geometry bug must not stop the drawing
        return np.asarray(profile.xy, dtype=float), False, f"{type(exc).__name__}: {exc}"


def warm_up() -> bool:
    """Import the outline builder (in the child process, before the first outline)."""
    import profilebench.geometry.outline  # noqa: F401

    return True


def preview_outline(profile, arc_points: int = 9) -> np.ndarray:
    """Points (m) of the node polygon with fillet arcs at rounded corners, shape (k, 2).

    A corner of radius r turning the outline by theta gets tangent points at the distance
    r tan(theta / 2) from the node along both neighbouring segments and an arc of radius r
    between them (the circle tangent to two lines; any geometry text, e.g. Eberly,
    "Geometric Tools"). A fillet that does not fit (setback longer than half of either segment,
    or a near-straight or reversing corner) is drawn as the sharp node: the exact outline, built
    in the background, reports that radius as too large.
    """
    p = np.asarray(profile.xy, dtype=float)
    n = len(p)
    if n < 3:
        return p
    r = np.array([0.0 if nd.smooth else float(nd.radius) for nd in profile.nodes])
    prev = np.roll(p, 1, axis=0) - p
    nxt = np.roll(p, -1, axis=0) - p
    lp = np.hypot(prev[:, 0], prev[:, 1])
    ln = np.hypot(nxt[:, 0], nxt[:, 1])
    ok = (r > 0) & (lp > 0) & (ln > 0)
    up = prev / np.where(lp > 0, lp, 1.0)[:, None]
    un = nxt / np.where(ln > 0, ln, 1.0)[:, None]
    cos_a = np.clip(np.sum(up * un, axis=1), -1.0, 1.0)
    alpha = np.arccos(cos_a)  # interior angle between the two segments
    half = 0.5 * alpha
    with np.errstate(divide="ignore", invalid="ignore"):
        setback = r / np.tan(half)  # = r tan(theta/2) with theta = pi - alpha
    ok &= (half > 1e-3) & (half < 0.5 * np.pi - 1e-3)
    ok &= np.isfinite(setback) & (setback <= 0.5 * lp) & (setback <= 0.5 * ln)
    out = []
    t = np.linspace(0.0, 1.0, arc_points)
    for i in range(n):
        if not ok[i]:
            out.append(p[i][None, :])
            continue
        a = p[i] + up[i] * setback[i]
        b = p[i] + un[i] * setback[i]
        bis = up[i] + un[i]
        bis /= np.hypot(*bis)
        centre = p[i] + bis * (r[i] / np.sin(half[i]))
        a0 = np.arctan2(*(a - centre)[::-1])
        a1 = np.arctan2(*(b - centre)[::-1])
        sweep = (a1 - a0 + np.pi) % (2 * np.pi) - np.pi  # the short way round
        ang = a0 + sweep * t
        out.append(centre + r[i] * np.column_stack([np.cos(ang), np.sin(ang)]))
    return np.vstack(out)
