"""Inviscid surface flow past 2D bodies: a source-and-vortex panel method with ground effect.

Method (Hess & Smith 1967, "Calculation of potential flow about arbitrary bodies", Progress in
Aeronautical Sciences 8; the same formulation as Katz & Plotkin, Low-Speed Aerodynamics, 2nd ed.,
sections 11.2-11.3, and Moran, An Introduction to Theoretical and Computational Aerodynamics,
ch. 4): each straight panel carries a source of constant strength, and each body carries one
vortex sheet of uniform strength over all its panels. The flow tangency condition is applied at
the panel midpoints. With ``kutta_node`` given, one more equation asks for equal and opposite
tangential speeds on the two panels meeting at that node (smooth flow off a sharp trailing edge)
and the body's vortex strength becomes an unknown; otherwise the vortex strength is zero (zero
net circulation, the usual choice for a bluff profile whose wake the method does not model).

Ground effect uses the method of images: every panel is mirrored about y = 0, sources with the
same strength and vortices with the opposite sign, which makes y = 0 a streamline (an inviscid,
slip ground, as with a moving belt).

Free stream: speed V in +x. Every speed here is divided by V and every circulation by V (m).

Influence of a panel of unit strength, in the panel's own frame (xi along the panel from its
start point, eta to its left; r1, r2 distances to its ends, beta the angle the panel subtends at
the field point; Katz & Plotkin eqs. 11.21-11.22 and 11.44-11.45)::

    source: u_xi = ln(r1/r2) / (2 pi),   u_eta = beta / (2 pi)
    vortex: u_xi = -beta / (2 pi),       u_eta = ln(r1/r2) / (2 pi)   (counter-clockwise positive)

with beta = atan2(eta L, xi (xi - L) + eta^2): one logarithm and one arctan2 per panel pair.
"""

from __future__ import annotations

import enum
import math
from dataclasses import dataclass

import numpy as np
from scipy.linalg import lapack

from profilebench.errors import GroundContactError, InputError, SelfIntersectionError
from profilebench.geometry.polyline import edge_lengths, is_clockwise, signed_area

__all__ = [
    "InviscidStatus",
    "InviscidSolution",
    "InfluenceCoefficients",
    "influence_coefficients",
    "solve_inviscid",
    "solve_inviscid_bodies",
    "TranspirationResponse",
    "transpiration_response",
]

_TWO_PI = 2.0 * math.pi
# Relative panel length below which two consecutive points count as repeated.
_REPEAT_TOL = 1e-12
# Reciprocal condition number below which the system is reported as singular.
_RCOND_MIN = 1e3 * np.finfo(float).eps


class InviscidStatus(enum.Enum):
    """Outcome of an inviscid solve."""

    SOLVED = "solved"
    SINGULAR = "singular system"
    NOT_FINITE = "solution not finite"


@dataclass(frozen=True, eq=False)
class InviscidSolution:
    """Surface flow on one body from :func:`solve_inviscid` (speeds divided by V, lengths in m).

    Values are reported at the panel midpoints (the collocation points). Midpoints are the
    recommended stations: they avoid the singular speed exactly at a sharp convex edge.

    Attributes
    ----------
    x, y : ndarray, shape (N,)
        Panel midpoints, m. Panel ``i`` runs from ``points[i]`` to ``points[(i + 1) % N]``.
    s : ndarray, shape (N,)
        Arc length of each midpoint along the outline from ``points[0]``, in the direction of
        ``points``, m.
    ue : ndarray, shape (N,)
        Tangential surface speed / free-stream speed, signed: positive in the direction of
        ``points``.
    cp : ndarray, shape (N,)
        Pressure coefficient, Cp = 1 - ue**2 (Bernoulli, steady incompressible flow).
    circulation : float
        Net circulation round the body / V, m, taken positive **clockwise** (the aerodynamic
        sign: with the stream in +x, a positive value means upward Kutta-Joukowski lift, in free
        air L' = rho V^2 circulation per unit width). Zero unless ``kutta_node`` was given.
    points : ndarray, shape (N, 2)
        The panel end points as given, m.
    panel_length : ndarray, shape (N,)
        Panel lengths, m.
    tangent, normal : ndarray, shape (N, 2)
        Unit tangent (direction of ``points``) and unit outward normal of each panel.
    perimeter : float
        Length of the outline, m.
    clockwise : bool
        True if ``points`` run clockwise round the body.
    ground : bool
        True if y = 0 was a slip wall.
    kutta_node : int or None
        Index of the Kutta node, if any.
    status, success, message
        Outcome; on failure (``success`` False) the flow arrays are NaN and ``message`` says why.
    """

    x: np.ndarray
    y: np.ndarray
    s: np.ndarray
    ue: np.ndarray
    cp: np.ndarray
    circulation: float
    points: np.ndarray
    panel_length: np.ndarray
    tangent: np.ndarray
    normal: np.ndarray
    perimeter: float
    clockwise: bool
    ground: bool
    kutta_node: int | None
    status: InviscidStatus
    success: bool
    message: str

    @property
    def n_panels(self) -> int:
        """Number of panels N."""
        return int(self.x.shape[0])


# --------------------------------------------------------------------------------------------
# input checks
# --------------------------------------------------------------------------------------------
def _check_outline(points, name: str, ground: bool) -> np.ndarray:
    """Return ``points`` as a float (N, 2) array or raise a project error saying what is wrong."""
    try:
        pts = np.array(points, dtype=float)
    except (TypeError, ValueError) as exc:
        raise InputError(
            f"{name} cannot be read as numbers ({exc}); give an (N, 2) array of x, y in metres"
        ) from None
    if pts.ndim != 2 or pts.shape[1] != 2:
        raise InputError(
            f"{name} has shape {pts.shape}; give an (N, 2) array of (x, y) panel end points in metres"
        )
    n = pts.shape[0]
    if n < 3:
        raise InputError(
            f"{name} has {n} point(s); a closed outline needs at least 3 points (3 panels)"
        )
    bad = ~np.isfinite(pts).all(axis=1)
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        raise InputError(
            f"{name}: point {i} is {tuple(pts[i])}, not finite; give finite x, y in metres "
            f"({int(bad.sum())} such point(s))"
        )
    size = float(np.ptp(pts, axis=0).max())
    length = edge_lengths(pts)
    short = length <= _REPEAT_TOL * max(size, np.finfo(float).tiny)
    if short.any():
        i = int(np.flatnonzero(short)[0])
        j = (i + 1) % n
        if j == 0:
            raise InputError(
                f"{name}: the last point repeats the first point {tuple(pts[0])}; the outline "
                "closes by itself, so drop the repeated last point"
            )
        raise InputError(
            f"{name}: points {i} and {j} are repeated (both at {tuple(pts[i])}); remove one of "
            "them so every panel has a length"
        )
    area = signed_area(pts)
    if abs(area) <= 1e-12 * size * size:
        raise InputError(
            f"{name} encloses no area (the points are collinear); give a closed outline round a body"
        )
    if ground:
        low = pts[:, 1] <= 0.0
        if low.any():
            i = int(np.flatnonzero(low)[0])
            raise GroundContactError(
                f"{name}: with the ground on, every point must lie above y = 0, but point {i} is at "
                f"y = {pts[i, 1]:.6g} m ({int(low.sum())} point(s) at or below); raise the "
                "profile or switch the ground off"
            )
    return pts


def _check_simple(pts: np.ndarray, name: str):
    """Raise SelfIntersectionError if the outline crosses itself (checked with shapely)."""
    import shapely
    from shapely.geometry import LinearRing

    ring = LinearRing(pts)
    if not ring.is_simple:
        poly = shapely.Polygon(pts)
        where = None
        try:
            from shapely.validation import explain_validity

            why = explain_validity(poly)
            loc = why[why.find("[") + 1 : why.find("]")].split()
            if len(loc) == 2:
                where = (float(loc[0]), float(loc[1]))
        except (ValueError, IndexError):  # pragma: no cover - message parsing only
            why = "the outline crosses itself"
        raise SelfIntersectionError(
            f"{name} crosses itself ({why}); reorder or move the points so the outline is a "
            "simple closed curve",
            location=where,
        )


def _check_kutta(kutta_node, n: int, name: str):
    if kutta_node is None:
        return None
    if isinstance(kutta_node, (bool, np.bool_)) or not isinstance(kutta_node, (int, np.integer)):
        raise InputError(
            f"kutta_node for {name} is {kutta_node!r}; give the integer index of the sharp "
            "trailing-edge point, or None for zero circulation"
        )
    k = int(kutta_node)
    if not 0 <= k < n:
        raise InputError(
            f"kutta_node {k} for {name} is out of range: it must index one of its {n} points "
            f"(0 to {n - 1})"
        )
    return k


# --------------------------------------------------------------------------------------------
# influence coefficients
# --------------------------------------------------------------------------------------------
def _panel_integrals(px, py, ax, ay, tx, ty, length):
    """ln(r1/r2)/(2 pi) and beta/(2 pi) of every panel (columns) at every point (rows).

    One log and one arctan2 per pair (Katz & Plotkin, eqs. 11.21-11.22).
    """
    dx = px[:, None] - ax[None, :]
    dy = py[:, None] - ay[None, :]
    xi = dx * tx
    xi += dy * ty
    eta = dy * tx
    eta -= dx * ty
    dx *= dx
    dy *= dy
    dx += dy  # r1^2
    xm = xi - length
    eta2 = eta * eta
    r2sq = xm * xm
    r2sq += eta2
    dx /= r2sq
    lg = np.log(dx, out=dx)
    lg *= 1.0 / (2.0 * _TWO_PI)
    xi *= xm
    xi += eta2
    eta *= length
    bt = np.arctan2(eta, xi, out=eta)
    bt *= 1.0 / _TWO_PI
    return lg, bt


# Rows per block of the influence computation: the work arrays of one block stay in cache.
_BLOCK_ELEMENTS = 65536


def _assemble(pts_list, ground: bool):
    """Panel geometry of all bodies and the source influence matrices.

    Returns ``geom, src_n, src_t, vor_n, vor_t`` where ``src_n[i, j]`` / ``src_t[i, j]`` are
    the outward-normal / tangential speeds at midpoint i due to a unit source on panel j
    (with its ground image), and ``vor_n[i, b]`` / ``vor_t[i, b]`` those due to a unit uniform
    vortex sheet on all panels of body b (with its image of opposite sign).

    Per (real or image) panel pair: one logarithm and one arctan2 (Katz & Plotkin, eqs.
    11.21-11.22), evaluated block by block of rows in preallocated work arrays.
    """
    a = np.concatenate(pts_list)
    b = np.concatenate([np.roll(p, -1, axis=0) for p in pts_list])
    seg = b - a
    length = np.hypot(seg[:, 0], seg[:, 1])
    tx = seg[:, 0] / length
    ty = seg[:, 1] / length
    mx = 0.5 * (a[:, 0] + b[:, 0])
    my = 0.5 * (a[:, 1] + b[:, 1])
    # orientation of each body: outward normal = sgn * left normal, sgn = -1 counter-clockwise
    sgn_list, clockwise = [], []
    for p in pts_list:
        cw = is_clockwise(p)
        clockwise.append(cw)
        sgn_list.append(np.full(p.shape[0], 1.0 if cw else -1.0))
    sgn = np.concatenate(sgn_list)
    nx = -ty * sgn
    ny = tx * sgn
    n = a.shape[0]
    offsets = np.cumsum([0] + [p.shape[0] for p in pts_list])
    nbody = len(pts_list)

    if ground:
        # mirror images about y = 0: same sources, opposite vortices (method of images)
        ax = np.concatenate([a[:, 0], a[:, 0]])
        ay = np.concatenate([a[:, 1], -a[:, 1]])
        ptx = np.concatenate([tx, tx])
        pty = np.concatenate([ty, -ty])
        plen = np.concatenate([length, length])
    else:
        ax, ay, ptx, pty, plen = a[:, 0], a[:, 1], tx, ty, length
    k = ax.shape[0]
    # indicator of the body of each (real or image) panel, signed for the vortex images
    body_of = np.zeros((k, nbody))
    for bi in range(nbody):
        body_of[offsets[bi] : offsets[bi + 1], bi] = 1.0
        if ground:
            body_of[n + offsets[bi] : n + offsets[bi + 1], bi] = -1.0

    src_n = np.empty((n, n))
    src_t = np.empty((n, n))
    vor_n = np.empty((n, nbody))
    vor_t = np.empty((n, nbody))
    # tangents of the collocation panels, divided by 2 pi (folds the 1/(2 pi) of every
    # influence into the angle terms below)
    tix = tx / _TWO_PI
    tiy = ty / _TWO_PI
    step = max(1, min(n, _BLOCK_ELEMENTS // k))
    work = np.empty((7, step, k))
    for r0 in range(0, n, step):
        r1 = min(n, r0 + step)
        nb = r1 - r0
        dx, dy, xi, eta, w1, w2, w3 = (work[q, :nb] for q in range(7))
        np.subtract(mx[r0:r1, None], ax, out=dx)
        np.subtract(my[r0:r1, None], ay, out=dy)
        # panel frame: xi along the panel from its start, eta to its left
        np.multiply(dx, ptx, out=xi)
        np.multiply(dy, pty, out=w1)
        xi += w1
        np.multiply(dy, ptx, out=eta)
        np.multiply(dx, pty, out=w1)
        eta -= w1
        dx *= dx
        dy *= dy
        dx += dy  # r1^2
        np.subtract(xi, plen, out=dy)  # xi - L
        np.multiply(eta, eta, out=w1)  # eta^2
        np.multiply(dy, dy, out=w2)
        w2 += w1  # r2^2
        dx /= w2
        np.log(dx, out=dx)  # ln(r1^2 / r2^2) = 2 ln(r1 / r2)
        dx *= 0.5  # ln(r1 / r2)
        xi *= dy
        xi += w1  # xi (xi - L) + eta^2
        eta *= plen
        np.arctan2(eta, xi, out=eta)  # beta
        rows = np.arange(r0, r1)
        # self influence: the limit on the outer side (eta -> 0 with the sign of sgn)
        dx[rows - r0, rows] = 0.0
        eta[rows - r0, rows] = math.pi * sgn[r0:r1]
        # angle between the tangent at point i and the tangent of panel j (over 2 pi)
        np.multiply(tix[r0:r1, None], ptx, out=w1)
        np.multiply(tiy[r0:r1, None], pty, out=xi)
        w1 += xi  # cos_ij / (2 pi)
        np.multiply(tix[r0:r1, None], pty, out=w2)
        np.multiply(tiy[r0:r1, None], ptx, out=xi)
        w2 -= xi  # sin_ij / (2 pi)
        # unit source on panel j: velocity (lg t_j + bt nl_j) (nl = left normal);
        # nl_j . nl_i = cos_ij, t_j . nl_i = sin_ij, nl_j . t_i = -sin_ij
        np.multiply(dx, w2, out=w3)
        np.multiply(eta, w1, out=xi)
        w3 += xi  # left-normal speed
        dx *= w1
        eta *= w2
        dx -= eta  # tangential speed
        sg = sgn[r0:r1, None]
        # unit vortex: velocity rotated +90 degrees from the source's, so at point i
        # normal = sgn_i * (source tangential), tangential = -(source left-normal speed)
        vor_n[r0:r1] = dx @ body_of
        vor_n[r0:r1] *= sg
        vor_t[r0:r1] = w3 @ body_of
        np.negative(vor_t[r0:r1], out=vor_t[r0:r1])
        if ground:
            np.add(w3[:, :n], w3[:, n:], out=src_n[r0:r1])
            np.add(dx[:, :n], dx[:, n:], out=src_t[r0:r1])
        else:
            src_n[r0:r1] = w3
            src_t[r0:r1] = dx
        src_n[r0:r1] *= sg
    geom = dict(
        a=a,
        length=length,
        tx=tx,
        ty=ty,
        nx=nx,
        ny=ny,
        mx=mx,
        my=my,
        clockwise=clockwise,
        offsets=offsets,
    )
    return geom, src_n, src_t, vor_n, vor_t


def _lu_solve(mat: np.ndarray, rhs: np.ndarray):
    """Solve ``mat @ x = rhs`` by LU (LAPACK getrf/getrs), with its reciprocal condition number.

    Returns (x, status, message, (lu, piv)); x and the factors are None on failure.
    """
    anorm = float(np.abs(mat).sum(axis=0).max())
    lu, piv, info = lapack.dgetrf(mat, overwrite_a=True)
    if info > 0:
        return (
            None,
            InviscidStatus.SINGULAR,
            (
                f"the panel equations are singular (zero pivot {info}); check for coincident or "
                "overlapping panels"
            ),
            None,
        )
    rcond, info = lapack.dgecon(lu, anorm, norm="1")
    if not rcond > _RCOND_MIN:
        return (
            None,
            InviscidStatus.SINGULAR,
            (
                f"the panel equations are singular to working precision (reciprocal condition number "
                f"{rcond:.2e}); check for coincident, overlapping or very uneven panels"
            ),
            None,
        )
    x, info = lapack.dgetrs(lu, piv, rhs)
    if not np.isfinite(x).all():
        return None, InviscidStatus.NOT_FINITE, "the panel solution is not finite", None
    return (
        x,
        InviscidStatus.SOLVED,
        (f"solved {mat.shape[0]} panel equations (reciprocal condition number {rcond:.2e})"),
        (lu, piv),
    )


@dataclass(frozen=True, eq=False)
class InfluenceCoefficients:
    """The panel method's influence coefficients of one body (see the module docstring).

    ``src_n[i, j]`` / ``src_t[i, j]``: outward-normal / tangential speed at midpoint i of a unit
    source on panel j (with its ground image); ``vor_n[i]`` / ``vor_t[i]``: those of a unit
    uniform vortex sheet on all the panels (with its image of opposite sign). ``tangent``,
    ``normal``: unit vectors of each panel (outward normal); ``clockwise``: the orientation.
    """

    src_n: np.ndarray
    src_t: np.ndarray
    vor_n: np.ndarray
    vor_t: np.ndarray
    tangent: np.ndarray
    normal: np.ndarray
    clockwise: bool


def influence_coefficients(points, ground: bool = False) -> InfluenceCoefficients:
    """The influence coefficients that :func:`solve_inviscid` assembles for ``points``.

    For checks of the formulas (and for other solvers on the same panels); the same input
    checks as :func:`solve_inviscid`.
    """
    pts = _check_outline(points, "points", bool(ground))
    _check_simple(pts, "points")
    geom, src_n, src_t, vor_n, vor_t = _assemble([pts], bool(ground))
    return InfluenceCoefficients(
        src_n=src_n,
        src_t=src_t,
        vor_n=vor_n[:, 0].copy(),
        vor_t=vor_t[:, 0].copy(),
        tangent=np.column_stack([geom["tx"], geom["ty"]]),
        normal=np.column_stack([geom["nx"], geom["ny"]]),
        clockwise=bool(geom["clockwise"][0]),
    )


# --------------------------------------------------------------------------------------------
# public solvers
# --------------------------------------------------------------------------------------------
def solve_inviscid_bodies(bodies, ground: bool = False, kutta_nodes=None):
    """Solve the inviscid flow past several closed bodies at once.

    Parameters
    ----------
    bodies : sequence of (N_b, 2) arrays
        Each a closed outline as its panel end points (m), first point not repeated, either
        orientation. Bodies must not overlap.
    ground : bool
        If True, y = 0 is a slip wall (mirror images); every point must have y > 0.
    kutta_nodes : sequence of (int or None), optional
        Per body, the index of a sharp trailing edge whose Kutta condition fixes that body's
        circulation, or None for zero circulation. Default: None for every body.

    Returns
    -------
    tuple of InviscidSolution
        One per body, in the order given; all share one status.

    Notes
    -----
    Hess & Smith (1967) source panels with one uniform vortex sheet per lifting body; ground by
    images. See the module docstring for the influence formulas.
    """
    return _solve_bodies(bodies, ground, kutta_nodes)[0]


def _solve_bodies(bodies, ground, kutta_nodes):
    """(solutions, response) of :func:`solve_inviscid_bodies`; ``response`` a
    :class:`TranspirationResponse` of the factored system, None when the solve failed."""
    if isinstance(bodies, np.ndarray) and bodies.ndim == 2:
        raise InputError(
            "bodies is a single (N, 2) array; give a list of outlines, or use solve_inviscid "
            "for one body"
        )
    try:
        bodies = list(bodies)
    except TypeError:
        raise InputError(
            f"bodies is a {type(bodies).__name__}; give a list of (N, 2) outlines in metres"
        ) from None
    if not bodies:
        raise InputError("bodies is empty; give at least one closed outline")
    if not isinstance(ground, (bool, np.bool_)):
        raise InputError(f"ground is {ground!r}; give True (slip wall at y = 0) or False")
    ground = bool(ground)
    if kutta_nodes is None:
        kutta_nodes = [None] * len(bodies)
    else:
        kutta_nodes = list(kutta_nodes)
        if len(kutta_nodes) != len(bodies):
            raise InputError(
                f"kutta_nodes has {len(kutta_nodes)} entries for {len(bodies)} bodies; give "
                "one entry (index or None) per body"
            )
    names = ["points"] if len(bodies) == 1 else [f"body {i}" for i in range(len(bodies))]
    pts_list = [_check_outline(p, nm, ground) for p, nm in zip(bodies, names)]
    for p, nm in zip(pts_list, names):
        _check_simple(p, nm)
    kutta = [_check_kutta(k, p.shape[0], nm) for k, p, nm in zip(kutta_nodes, pts_list, names)]
    if len(pts_list) > 1:
        from shapely.geometry import Polygon

        polys = [Polygon(p) for p in pts_list]
        for i in range(len(polys)):
            for j in range(i + 1, len(polys)):
                if polys[i].intersects(polys[j]):
                    raise InputError(
                        f"{names[i]} and {names[j]} overlap or touch; move them apart so each "
                        "body is surrounded by flow"
                    )

    geom, src_n, src_t, vor_n, vor_t = _assemble(pts_list, ground)
    n = geom["a"].shape[0]
    offsets = geom["offsets"]
    lifting = [b for b, k in enumerate(kutta) if k is not None]
    m = n + len(lifting)
    mat = np.empty((m, m), order="F")
    rhs = np.empty(m)
    mat[:n, :n] = src_n
    rhs[:n] = -geom["nx"]
    # vortex columns (one per lifting body) and their tangential speeds
    mat[:n, n:] = vor_n[:, lifting]
    vt_cols = vor_t[:, lifting]
    for r, b in enumerate(lifting):
        nb = pts_list[b].shape[0]
        p_after = offsets[b] + kutta[b]
        p_before = offsets[b] + (kutta[b] - 1) % nb
        # Kutta: ue(before) + ue(after) = 0, equal and opposite tangential speeds at the edge
        mat[n + r, :n] = src_t[p_before] + src_t[p_after]
        mat[n + r, n:] = vt_cols[p_before] + vt_cols[p_after]
        rhs[n + r] = -(geom["tx"][p_before] + geom["tx"][p_after])

    sol, status, message, factors = _lu_solve(mat, rhs)
    if sol is None:
        ue_all = np.full(n, np.nan)
        gam = np.full(len(lifting), np.nan)
    else:
        ue_all = geom["tx"] + src_t @ sol[:n] + vt_cols @ sol[n:]
        gam = sol[n:]

    results = []
    for b, p in enumerate(pts_list):
        sl = slice(offsets[b], offsets[b + 1])
        length = geom["length"][sl]
        perim = float(length.sum())
        s = np.cumsum(length) - 0.5 * length
        ue = ue_all[sl].copy()
        if kutta[b] is None:
            circ = 0.0 if sol is not None else math.nan
        else:
            # counter-clockwise circulation of a uniform sheet is gamma * perimeter (Hess & Smith);
            # reported clockwise-positive
            circ = -float(gam[lifting.index(b)]) * perim
        arrays = dict(
            x=geom["mx"][sl].copy(),
            y=geom["my"][sl].copy(),
            s=s,
            ue=ue,
            cp=1.0 - ue * ue,
            points=p.copy(),
            panel_length=length.copy(),
            tangent=np.column_stack([geom["tx"][sl], geom["ty"][sl]]),
            normal=np.column_stack([geom["nx"][sl], geom["ny"][sl]]),
        )
        for arr in arrays.values():
            arr.setflags(write=False)
        results.append(
            InviscidSolution(
                **arrays,
                circulation=circ,
                perimeter=perim,
                clockwise=bool(geom["clockwise"][b]),
                ground=ground,
                kutta_node=kutta[b],
                status=status,
                success=status is InviscidStatus.SOLVED,
                message=message,
            )
        )
    response = None
    if factors is not None:
        response = TranspirationResponse(
            tuple(results), factors[0], factors[1], src_t, vt_cols, geom["tx"], n
        )
    return tuple(results), response


@dataclass(frozen=True, eq=False)
class TranspirationResponse:
    """The factored panel system of a solve, for the flow with a normal speed through panels.

    ``solutions``: the solve's :class:`InviscidSolution` per body (no transpiration). The
    tangency condition at the midpoints is linear in a prescribed outward normal speed ``v_n``
    (the right-hand side becomes ``-n_x + v_n``: the Neumann condition with a given normal speed
    in place of zero, the usual way a panel method takes a wall's transpiration; common
    practice, no source), so the signed tangential speed is ``ue + R @ v_n`` with R from
    :meth:`response` on the panels that carry it. The factors of the first solve are reused:
    one back-substitution per panel given (:meth:`response`), or one for a whole distribution
    (:meth:`change`).
    """

    solutions: tuple
    lu: np.ndarray
    piv: np.ndarray
    src_t: np.ndarray
    vt_cols: np.ndarray
    tx: np.ndarray
    n: int

    def response(self, panels) -> np.ndarray:
        """(N, k) array: the change of every midpoint's signed tangential speed per unit
        outward normal speed (/ V) on each of the k ``panels`` (indices over all bodies)."""
        panels = np.asarray(panels, dtype=int)
        rhs = np.zeros((self.lu.shape[0], panels.size), order="F")
        rhs[panels, np.arange(panels.size)] = 1.0
        return self._speeds(rhs)

    def change(self, panels, normal_speed) -> np.ndarray:
        """(N,) array: the change of every midpoint's signed tangential speed when the
        ``panels`` carry the outward ``normal_speed`` (/ V, one per panel): ``response(panels)
        @ normal_speed`` at the cost of one back-substitution."""
        rhs = np.zeros(self.lu.shape[0])
        np.add.at(rhs, np.asarray(panels, dtype=int), np.asarray(normal_speed, dtype=float))
        return self._speeds(rhs)

    def _speeds(self, rhs):
        x, info = lapack.dgetrs(self.lu, self.piv, rhs)
        if info != 0:
            raise InputError(f"the panel system could not be back-substituted (info {info})")
        return self.src_t @ x[: self.n] + self.vt_cols @ x[self.n :]


def transpiration_response(points, ground: bool = False, kutta_node=None):
    """(solution, response) of one body: the :class:`InviscidSolution` of
    :func:`solve_inviscid` (the same input checks) and its :class:`TranspirationResponse`, None
    when the solve failed (the solution says why)."""
    results, response = _solve_bodies([points], ground, [kutta_node])
    return results[0], response


def solve_inviscid(points, ground: bool = False, kutta_node=None) -> InviscidSolution:
    """Solve the inviscid flow past one closed 2D body in a stream V in +x.

    Parameters
    ----------
    points : (N, 2) array_like
        The closed outline as its panel end points, m; first point not repeated, either
        orientation, N >= 3. Panel ``i`` runs from ``points[i]`` to ``points[(i + 1) % N]``.
    ground : bool
        If True, the line y = 0 is a slip wall (mirror images, Hess & Smith sources mirrored
        with the same strength, the vortex with opposite sign); every point must have y > 0.
    kutta_node : int or None
        Index into ``points`` of a sharp trailing edge whose Kutta condition (equal and opposite
        tangential speeds on the two panels meeting there) fixes the circulation. None: zero net
        circulation.

    Returns
    -------
    InviscidSolution
        ue, Cp at the panel midpoints (recommended: they avoid the singular speed exactly at
        sharp edges), their arc length, and the circulation / V (m, clockwise positive).
        A singular system comes back with ``success`` False, not as an exception.

    Raises
    ------
    InputError
        Malformed points (shape, N < 3, NaN/inf, repeated consecutive points, zero area) or a
        bad ``kutta_node``.
    GroundContactError
        ``ground`` is True and a point has y <= 0.
    SelfIntersectionError
        The outline crosses itself.
    """
    return solve_inviscid_bodies([points], ground=ground, kutta_nodes=[kutta_node])[0]
