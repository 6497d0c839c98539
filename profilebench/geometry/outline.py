"""Outline building: the closed curve a :class:`~profilebench.geometry.profile.Profile` stands for.

Corner nodes (``smooth=False``) split the outline into segments. A segment between two corner
nodes with no smooth node between them is a straight line; a run of smooth nodes is passed
through by a cubic spline (chord-length parameter, not-a-knot ends: the spline scipy's
``CubicSpline`` builds, with its coefficients computed here by ``scipy.linalg.solve_banded``)
running from the preceding corner node through the smooth nodes to the next corner node. If every node is
smooth the outline is one periodic cubic spline.

A corner node with radius r > 0 is rounded by a circular fillet of radius r tangent to both
neighbouring segments. Next to a line the tangent points follow from the classical construction
(setback d = r tan(theta / 2), theta the turning angle); next to a spline the two tangent points
are solved together (Newton's method with the analytic Jacobian, and ``scipy.optimize.root``
where Newton gives no acceptable root) so that the fillet centre lies at distance r along the
normal of each curve (the fillet is then tangent to the spline and has exactly radius r).

A radius that does not fit between its neighbours raises :class:`RadiusTooLargeError` naming the
node and the largest radius that fits (the neighbours keeping theirs); it is never clamped.

The outline's arc length s starts at node 0 (at the start of node 0's fillet when it is rounded)
and runs in the order of the nodes.
"""

from __future__ import annotations

import bisect
import math
from dataclasses import dataclass, field

import numpy as np
from scipy.interpolate import CubicSpline
from scipy.linalg import solve_banded
from scipy.optimize import brentq, root

from profilebench.errors import GeometryError, InputError, RadiusTooLargeError
from profilebench.geometry.polyline import edge_lengths, is_clockwise

__all__ = ["CornerArc", "SharpEdge", "Outline", "build_outline", "node_description"]

_GL_X, _GL_W = np.polynomial.legendre.leggauss(8)
_GL4_X, _GL4_W = np.polynomial.legendre.leggauss(4)
_SUB_PER_KNOT = 16  # sub-intervals per spline knot interval for the arc-length table
_ANGLE_EPS = 1e-9  # rad; a corner turning less than this is treated as straight


def node_description(profile, i: int) -> str:
    """'node 3 "roof front" at (1200.0, 1350.0) mm' for messages."""
    n = profile.nodes[i]
    label = f' "{n.label}"' if n.label else ""
    return f"node {i}{label} at ({n.x * 1e3:.1f}, {n.y * 1e3:.1f}) mm"


def _rot(v):
    """Rotate vectors 90 degrees counter-clockwise (last axis holds x, y)."""
    v = np.asarray(v, dtype=float)
    return np.stack([-v[..., 1], v[..., 0]], axis=-1)


def _cross(a, b) -> float:
    return float(a[0] * b[1] - a[1] * b[0])


def _not_a_knot_coefficients(t, y, dt, dy):
    """Piecewise-polynomial coefficients (4, n - 1, 2) of the not-a-knot cubic spline through
    (t, y), the same spline as ``scipy.interpolate.CubicSpline(t, y, bc_type="not-a-knot")``.

    Node slopes from de Boor's tridiagonal system (de Boor, A Practical Guide to Splines, ch. IV;
    the system scipy's CubicSpline solves), here with ``scipy.linalg.solve_banded``; for three
    points the not-a-knot spline is the parabola through them. Coefficients as a cubic Hermite
    interpolant, highest power first. ``dt``, ``dy``: the parameter and point differences.
    """
    n = t.size
    slope = dy / dt[:, None]
    if n == 3:
        # the parabola through the three points
        a2 = (slope[1] - slope[0]) / (dt[0] + dt[1])
        s = np.stack(
            [slope[0] - a2 * dt[0], slope[0] + a2 * dt[0], slope[0] + a2 * (dt[0] + 2.0 * dt[1])]
        )
    else:
        dxr = dt[:, None]
        A = np.zeros((3, n))
        b = np.empty((n, 2))
        A[1, 1:-1] = 2.0 * (dt[:-1] + dt[1:])
        A[0, 2:] = dt[:-1]
        A[-1, :-2] = dt[1:]
        b[1:-1] = 3.0 * (dxr[1:] * slope[:-1] + dxr[:-1] * slope[1:])
        d = t[2] - t[0]
        A[1, 0] = dt[1]
        A[0, 1] = d
        b[0] = ((dxr[0] + 2.0 * d) * dxr[1] * slope[0] + dxr[0] ** 2 * slope[1]) / d
        d = t[-1] - t[-3]
        A[1, -1] = dt[-2]
        A[-1, -2] = d
        b[-1] = (dxr[-1] ** 2 * slope[-2] + (2.0 * d + dxr[-1]) * dxr[-2] * slope[-1]) / d
        s = solve_banded((1, 1), A, b, overwrite_ab=True, overwrite_b=True, check_finite=False)
    dxr = dt[:, None]
    c = np.empty((4, n - 1, 2))
    tt = (s[:-1] + s[1:] - 2.0 * slope) / dxr
    c[0] = tt / dxr
    c[1] = (slope - s[:-1]) / dxr - tt
    c[2] = s[:-1]
    c[3] = y[:-1]
    return c


# --- the curves a segment can be ---------------------------------------------------------------
class _Line:
    """Straight segment p0 -> p1, parameter t = arc length in [0, T] (m)."""

    kind = "line"

    def __init__(self, p0, p1):
        self.p0 = np.asarray(p0, float)
        self.p1 = np.asarray(p1, float)
        d = self.p1 - self.p0
        self.T = float(math.hypot(d[0], d[1]))
        self.u = d / self.T

    def eval(self, t, nu=0):
        t = np.asarray(t, float)
        if nu == 0:
            return self.p0 + t[..., None] * self.u
        if nu == 1:
            return np.broadcast_to(self.u, t.shape + (2,)).copy()
        return np.zeros(t.shape + (2,))

    def pdd(self, t):
        """Point, first and second derivative at scalar t, as float tuples."""
        ux, uy = self.u
        return (self.p0[0] + t * ux, self.p0[1] + t * uy), (ux, uy), (0.0, 0.0)


class _Spline:
    """Cubic spline through points, chord-length parameter t in [0, T] (m of chord)."""

    kind = "spline"

    def __init__(self, pts, periodic=False):
        pts = np.asarray(pts, float)
        seg = np.diff(pts, axis=0)
        chords = np.hypot(seg[:, 0], seg[:, 1])
        t = np.concatenate([[0.0], np.cumsum(chords)])
        if periodic:
            self.cs = CubicSpline(t, pts, axis=0, bc_type="periodic")
        else:
            self.cs = CubicSpline.construct_fast(_not_a_knot_coefficients(t, pts, chords, seg), t)
        self._periodic = bool(periodic)
        self.T = float(t[-1])
        self.knots = t
        self._x = t.tolist()
        self._cc = self.cs.c
        self._c = self._cc.transpose(1, 2, 0).tolist()  # [interval][axis][power, high first]

    def eval(self, t, nu=0):
        t = np.asarray(t, float)
        if self._periodic:
            return self.cs(t, nu)
        # Horner on the piecewise-polynomial coefficients, intervals as in scipy's PPoly
        # (x[i] <= t < x[i + 1], the end intervals extrapolating)
        if t.ndim == 0 and nu <= 2:
            return np.array(self.pdd(float(t))[nu])
        x = self.knots
        i = np.searchsorted(x, t, side="right") - 1
        np.clip(i, 0, x.size - 2, out=i)
        h = (t - x[i])[..., None]
        c = self._cc[:, i]
        if nu == 0:
            return ((c[0] * h + c[1]) * h + c[2]) * h + c[3]
        if nu == 1:
            return (3.0 * c[0] * h + 2.0 * c[1]) * h + c[2]
        if nu == 2:
            return 6.0 * c[0] * h + 2.0 * c[1]
        return self.cs(t, nu)

    def pdd(self, t):
        """Point, first and second derivative at scalar t, as float tuples (Horner on the
        spline's own piecewise-polynomial coefficients; extrapolates past the ends)."""
        x = self._x
        i = min(max(bisect.bisect_right(x, t) - 1, 0), len(x) - 2)
        h = t - x[i]
        out = []
        for a3, a2, a1, a0 in self._c[i]:
            out.append(
                (
                    ((a3 * h + a2) * h + a1) * h + a0,
                    (3 * a3 * h + 2 * a2) * h + a1,
                    6 * a3 * h + 2 * a2,
                )
            )
        (px, dx, ddx), (py, dy, ddy) = out
        return (px, py), (dx, dy), (ddx, ddy)


def _tangent_and_normal_derivative(curve, t):
    """Unit tangent, left unit normal and d(normal)/dt of a curve at scalar t."""
    _, (dx, dy), (ddx, ddy) = curve.pdd(float(t))
    speed = math.hypot(dx, dy)
    tx, ty = dx / speed, dy / speed
    k = ddx * tx + ddy * ty
    dtx, dty = (ddx - k * tx) / speed, (ddy - k * ty) / speed
    return np.array([tx, ty]), np.array([-ty, tx]), np.array([-dty, dtx])


# --- pieces of the built outline ----------------------------------------------------------------
class _LinePiece:
    kind = "line"

    def __init__(self, p0, p1):
        self.p0 = np.asarray(p0, float)
        d = np.asarray(p1, float) - self.p0
        self.length = float(math.hypot(d[0], d[1]))
        self.u = d / self.length

    def at(self, sig):
        return self.p0 + sig[:, None] * self.u

    def turn_at(self, sig):
        return np.zeros_like(sig)

    def quad(self):
        x = 0.5 * (_GL_X + 1.0) * self.length
        return self.at(x), np.broadcast_to(self.u, (x.size, 2)), 0.5 * self.length * _GL_W

    def extreme_points(self):
        return np.array([self.p0, self.p0 + self.length * self.u])


class _ArcPiece:
    kind = "arc"

    def __init__(self, centre, radius, a0, sweep):
        self.centre = np.asarray(centre, float)
        self.radius = float(radius)
        self.a0 = float(a0)
        self.sweep = float(sweep)
        self.length = abs(self.sweep) * self.radius

    def at(self, sig):
        a = self.a0 + math.copysign(1.0, self.sweep) * sig / self.radius
        return self.centre + self.radius * np.stack([np.cos(a), np.sin(a)], axis=-1)

    def turn_at(self, sig):
        return sig / self.radius

    def quad(self):
        u = 0.5 * (_GL_X + 1.0)
        a = self.a0 + self.sweep * u
        p = self.centre + self.radius * np.stack([np.cos(a), np.sin(a)], axis=-1)
        d = self.radius * self.sweep * np.stack([-np.sin(a), np.cos(a)], axis=-1)
        return p, d, 0.5 * _GL_W

    def extreme_points(self):
        lo, hi = sorted((self.a0, self.a0 + self.sweep))
        k = np.arange(math.ceil(lo / (math.pi / 2)), math.floor(hi / (math.pi / 2)) + 1)
        a = np.concatenate([[lo, hi], k * math.pi / 2])
        return self.centre + self.radius * np.stack([np.cos(a), np.sin(a)], axis=-1)


class _SplinePiece:
    kind = "spline"

    def __init__(self, curve: _Spline, ta: float, tb: float):
        self.curve = curve
        self.ta, self.tb = float(ta), float(tb)
        knots = curve.knots[(curve.knots > self.ta) & (curve.knots < self.tb)]
        edges = np.concatenate([[self.ta], knots, [self.tb]])
        # sub-divide each knot interval; integrate |C'(t)| with 4-point Gauss per sub-interval
        frac = np.linspace(0.0, 1.0, _SUB_PER_KNOT + 1)[:-1]
        grid = (edges[:-1, None] + np.diff(edges)[:, None] * frac[None, :]).ravel()
        grid = np.concatenate([grid, [self.tb]])
        h = np.diff(grid)
        mid = 0.5 * (grid[:-1] + grid[1:])
        tq = mid[:, None] + 0.5 * h[:, None] * _GL4_X[None, :]
        d1 = curve.eval(tq.ravel(), 1)
        speed = np.hypot(d1[:, 0], d1[:, 1]).reshape(tq.shape)
        seg_len = 0.5 * h * (speed @ _GL4_W)
        self.tab_t = grid
        self.tab_s = np.concatenate([[0.0], np.cumsum(seg_len)])
        self.length = float(self.tab_s[-1])
        dg = curve.eval(grid, 1)
        ang = np.unwrap(np.arctan2(dg[:, 1], dg[:, 0]))
        self.tab_turn = np.concatenate([[0.0], np.cumsum(np.abs(np.diff(ang)))])
        self._edges = edges

    def t_of(self, sig):
        return np.interp(sig, self.tab_s, self.tab_t)

    def at(self, sig):
        return self.curve.eval(self.t_of(sig))

    def turn_at(self, sig):
        return np.interp(sig, self.tab_s, self.tab_turn)

    def quad(self):
        e = self._edges
        h = np.diff(e)
        t = (0.5 * (e[:-1] + e[1:]))[:, None] + 0.5 * h[:, None] * _GL_X[None, :]
        w = (0.5 * h[:, None] * _GL_W[None, :]).ravel()
        t = t.ravel()
        return self.curve.eval(t), self.curve.eval(t, 1), w

    def extreme_points(self):
        pts = [self.curve.eval(np.array([self.ta, self.tb]))]
        der = self.curve.cs.derivative()
        for k in range(2):
            cs_k = type(self.curve.cs).construct_fast(der.c[..., k], der.x)
            r = np.asarray(cs_k.roots(extrapolate=False), float)
            r = r[(r > self.ta) & (r < self.tb)]
            if r.size:
                pts.append(self.curve.eval(r))
        return np.concatenate(pts, axis=0)


# --- results ------------------------------------------------------------------------------------
@dataclass(frozen=True)
class CornerArc:
    """A rounded node's fillet on the built outline.

    ``s_start``/``s_end`` arc length (m) of the tangent points from the outline start, ``centre``
    (m), ``radius`` (m), ``turning_angle`` signed turn of the tangent (rad, positive
    counter-clockwise), ``convex`` True where the outline turns away from the body interior.
    """

    node: int
    radius: float
    s_start: float
    s_end: float
    centre: tuple[float, float]
    turning_angle: float
    convex: bool


@dataclass(frozen=True)
class SharpEdge:
    """A sharp (radius 0) corner node: its arc length ``s`` (m), signed turn (rad), convexity."""

    node: int
    s: float
    turning_angle: float
    convex: bool


@dataclass(frozen=True, eq=False)
class Outline:
    """The built closed outline of a profile.

    Attributes
    ----------
    length : float
        Total arc length (perimeter) of the outline (m).
    node_s : tuple of float
        Arc length of each node (m): its position for sharp and smooth nodes, the middle of its
        fillet for rounded nodes.
    arcs : tuple of CornerArc
        The fillets of rounded nodes, in outline order.
    sharp_edges : tuple of SharpEdge
        The sharp corner nodes, in outline order.
    orientation : int
        +1 if the outline runs counter-clockwise (x right, y up), -1 if clockwise.
    """

    pieces: tuple
    piece_s0: np.ndarray
    length: float
    node_s: tuple
    arcs: tuple
    sharp_edges: tuple
    orientation: int
    _samples: dict = field(default_factory=dict, init=False, repr=False, compare=False)

    def _locate(self, s):
        s = np.mod(np.asarray(s, float), self.length)
        k = np.clip(np.searchsorted(self.piece_s0, s, side="right") - 1, 0, len(self.pieces) - 1)
        return s, k

    def points_at(self, s) -> np.ndarray:
        """Points (m) at arc lengths ``s`` (m, taken modulo the perimeter); shape (len(s), 2)."""
        s, k = self._locate(np.atleast_1d(s))
        out = np.empty((s.size, 2))
        tab = self._piece_table()
        sig = s - self.piece_s0[k]
        np.clip(sig, 0.0, tab["length"][k], out=sig)
        kind = tab["kind"][k]
        # lines and arcs all at once (the same formulas as their pieces' ``at``)
        m = kind == 0
        if m.any():
            km = k[m]
            out[m] = tab["p0"][km] + sig[m, None] * tab["u"][km]
        m = kind == 1
        if m.any():
            km = k[m]
            a = tab["a0"][km] + tab["sense"][km] * sig[m] / tab["radius"][km]
            out[m] = tab["centre"][km] + tab["radius"][km, None] * np.stack(
                [np.cos(a), np.sin(a)], axis=-1
            )
        for j in tab["splines"]:
            m = k == j
            if m.any():
                out[m] = self.pieces[j].at(sig[m])
        return out

    def _piece_table(self) -> dict:
        """Per-piece parameters as arrays, for evaluating lines and arcs without a loop."""
        memo = self._memo()
        tab = memo.get("pieces")
        if tab is None:
            npc = len(self.pieces)
            tab = dict(
                kind=np.full(npc, 2),
                length=np.array([p.length for p in self.pieces]),
                p0=np.zeros((npc, 2)),
                u=np.zeros((npc, 2)),
                centre=np.zeros((npc, 2)),
                radius=np.ones(npc),
                a0=np.zeros(npc),
                sense=np.ones(npc),
                splines=[],
            )
            for j, p in enumerate(self.pieces):
                if p.kind == "line":
                    tab["kind"][j] = 0
                    tab["p0"][j] = p.p0
                    tab["u"][j] = p.u
                elif p.kind == "arc":
                    tab["kind"][j] = 1
                    tab["centre"][j] = p.centre
                    tab["radius"][j] = p.radius
                    tab["a0"][j] = p.a0
                    tab["sense"][j] = math.copysign(1.0, p.sweep)
                else:
                    tab["splines"].append(j)
            memo["pieces"] = tab
        return tab

    def cumulative_turn(self, s) -> np.ndarray:
        """Cumulative absolute turning of the tangent (rad) along smooth pieces up to ``s`` (m).

        Sharp edges (kinks) are not included; arcs and splines are.
        """
        s = np.atleast_1d(np.asarray(s, float))
        base = np.concatenate([[0.0], np.cumsum([self._piece_turn(p) for p in self.pieces])])
        k = np.clip(np.searchsorted(self.piece_s0, s, side="right") - 1, 0, len(self.pieces) - 1)
        out = base[k].copy()
        for j in np.unique(k):
            m = k == j
            piece = self.pieces[j]
            out[m] += piece.turn_at(np.clip(s[m] - self.piece_s0[j], 0.0, piece.length))
        return out

    @staticmethod
    def _piece_turn(p) -> float:
        return float(p.turn_at(np.array([p.length]))[0])

    def sample(self, n: int) -> np.ndarray:
        """``n`` points (m) evenly spaced in arc length from s = 0, first not repeated."""
        if isinstance(n, bool) or not isinstance(n, (int, np.integer)) or n < 3:
            raise InputError(f"sample count {n!r} must be an integer >= 3")
        got = self._samples.get(int(n))
        if got is None:  # remembered: the validity check and the panelling both sample
            got = self.points_at(np.linspace(0.0, self.length, int(n), endpoint=False))
            got.setflags(write=False)
            self._samples[int(n)] = got
        return got

    def boundary_quadrature(self):
        """Points, derivatives and weights for integrals round the outline.

        Gauss-Legendre (8 points) on every line, arc and spline knot interval: exact for lines and
        splines (polynomial integrands up to degree 15), near machine precision on arcs.
        Returns (P, dP, w) with P, dP of shape (k, 2).
        """
        memo = self._memo()
        got = memo.get("quadrature")
        if got is None:
            ps, ds, ws = zip(*(p.quad() for p in self.pieces))
            got = memo["quadrature"] = (np.concatenate(ps), np.concatenate(ds), np.concatenate(ws))
        return tuple(a.copy() for a in got)

    def signed_area(self) -> float:
        """Signed enclosed area (m^2), positive counter-clockwise (Green's theorem)."""
        p, d, w = self.boundary_quadrature()
        return 0.5 * float(np.sum(w * (p[:, 0] * d[:, 1] - p[:, 1] * d[:, 0])))

    def extreme_points(self) -> np.ndarray:
        """Candidate extreme points (piece ends, arc cardinal points, spline extrema) (m)."""
        memo = self._memo()
        got = memo.get("extreme_points")
        if got is None:
            got = memo["extreme_points"] = np.concatenate(
                [p.extreme_points() for p in self.pieces], axis=0
            )
        return got.copy()

    def _memo(self) -> dict:
        """Per-outline store of derived arrays (the outline is immutable, so they never go stale)."""
        memo = self.__dict__.get("_derived")
        if memo is None:
            memo = {}
            object.__setattr__(self, "_derived", memo)
        return memo


# --- building -----------------------------------------------------------------------------------
def _segments(profile, corners):
    """Curves between consecutive corner nodes (cyclic)."""
    nodes = profile.nodes
    n = len(nodes)
    m = len(corners)
    segs = []
    smooth_params = {}
    for k in range(m):
        a = corners[k]
        b = corners[(k + 1) % m]
        run = []
        i = (a + 1) % n
        while i != b:
            run.append(i)
            i = (i + 1) % n
        if not run:
            segs.append(_Line((nodes[a].x, nodes[a].y), (nodes[b].x, nodes[b].y)))
        else:
            idx = [a] + run + [b]
            spl = _Spline([(nodes[j].x, nodes[j].y) for j in idx])
            for pos, j in enumerate(run, start=1):
                smooth_params[j] = (k, float(spl.knots[pos]))
            segs.append(spl)
    return segs, smooth_params


def _turn(cin, cout) -> float:
    """Signed turning angle (rad) at the joint of cin's end and cout's start."""
    din = cin.eval(cin.T, 1)
    dout = cout.eval(0.0, 1)
    return math.atan2(_cross(din, dout), float(np.dot(din, dout)))


_NEWTON_XTOL = 1e-12  # relative step at which the fillet's Newton iteration has converged
_NEWTON_MAXITER = 30


def _newton2(fun2, t1, t2):
    """Newton's method for two equations F(t1, t2) = 0 with the analytic Jacobian.

    ``fun2(t1, t2)`` returns (F1, F2, J11, J12, J21, J22). Converged when a step is below
    ``_NEWTON_XTOL`` relative to (|t1|, |t2|) (the same test as MINPACK's hybrj xtol); returns
    (t1, t2), or None if the Jacobian is singular, a value is not finite or the iteration has
    not converged within ``_NEWTON_MAXITER`` steps.
    """
    for _ in range(_NEWTON_MAXITER):
        f1, f2, a, b, c, d = fun2(t1, t2)
        det = a * d - b * c
        if not (math.isfinite(det) and det != 0.0 and math.isfinite(f1) and math.isfinite(f2)):
            return None
        d1 = (d * f1 - b * f2) / det
        d2 = (a * f2 - c * f1) / det
        t1 -= d1
        t2 -= d2
        if not (math.isfinite(t1) and math.isfinite(t2)):
            return None
        if math.hypot(d1, d2) <= _NEWTON_XTOL * max(math.hypot(t1, t2), 1e-300):
            return t1, t2
    return None


def _fillet(cin, cout, r, theta):
    """Tangent parameters (t1 on cin, t2 on cout) and centre of a fillet of radius r.

    Returns None if no fillet of this radius exists on these curves.
    """
    sigma = 1.0 if theta > 0 else -1.0
    d = r * math.tan(abs(theta) / 2.0)
    if cin.kind == "line" and cout.kind == "line":
        t1, t2 = cin.T - d, d
        centre = cin.eval(t1) + sigma * r * _rot(cin.u)
        return t1, t2, centre
    # initial guess from the tangent lines at the node
    s1 = math.hypot(*cin.pdd(cin.T)[1])
    s2 = math.hypot(*cout.pdd(0.0)[1])
    x0 = np.array([cin.T - d / s1, d / s2])
    sr = sigma * r

    def offset(curve, t):
        # point of the offset curve C + sigma r n and its derivative in t
        (px, py), (dx, dy), (ddx, ddy) = curve.pdd(t)
        sp = math.hypot(dx, dy)
        tx, ty = dx / sp, dy / sp
        k = ddx * tx + ddy * ty
        dtx, dty = (ddx - k * tx) / sp, (ddy - k * ty) / sp
        return (px - sr * ty, py + sr * tx), (dx - sr * dty, dy + sr * dtx)

    def fun2(t1, t2):
        # residual (offset points' difference) and its analytic Jacobian, as floats
        (ax, ay), (adx, ady) = offset(cin, t1)
        (bx, by), (bdx, bdy) = offset(cout, t2)
        return ax - bx, ay - by, adx, -bdx, ady, -bdy

    def fun(x):
        fx, fy, j11, j12, j21, j22 = fun2(float(x[0]), float(x[1]))
        return np.array([fx, fy]), np.array([[j11, j12], [j21, j22]])

    scale = max(cin.T, cout.T)

    def acceptable(tt):
        # accept on the residual: hybr may report slow progress once the residual is at
        # round-off
        if tt is None or not (math.isfinite(tt[0]) and math.isfinite(tt[1])):
            return None
        t1, t2 = (float(v) for v in tt)
        if not (
            -1e-12 * scale <= t1 <= cin.T * (1 + 1e-12)
            and -1e-12 * scale <= t2 <= cout.T * (1 + 1e-12)
        ):
            return None
        fx, fy = fun2(t1, t2)[:2]
        if max(abs(fx), abs(fy)) > 1e-9 * max(scale, r):
            return None
        return t1, t2

    # Newton with the analytic Jacobian first (fast on this 2-unknown problem); where it does
    # not give an acceptable root, the trust-region hybrid method decides, as it always did
    found = acceptable(_newton2(fun2, float(x0[0]), float(x0[1])))
    if found is None:
        sol = root(fun, x0, jac=True, method="hybr", options={"xtol": 1e-12})
        found = acceptable(tuple(sol.x))
    if found is None:
        return None
    t1, t2 = found
    t1 = min(max(t1, 0.0), cin.T)
    t2 = min(max(t2, 0.0), cout.T)
    # the fillet must turn the same way as the corner and by less than a half turn
    tan1 = _tangent_and_normal_derivative(cin, t1)[0]
    tan2 = _tangent_and_normal_derivative(cout, t2)[0]
    phi = math.atan2(_cross(tan1, tan2), float(np.dot(tan1, tan2)))
    if phi * sigma <= 0:
        return None
    centre = cin.eval(t1) + sigma * r * _tangent_and_normal_derivative(cin, t1)[1]
    return t1, t2, centre


def _check_nodes(profile):
    n = len(profile.nodes)
    if n < 3:
        raise GeometryError(
            f"the profile has {n} node(s); a closed outline needs at least 3 nodes: add nodes"
        )
    xy = np.array(profile.xy, float)
    ext = float(np.max(np.ptp(xy, axis=0)))
    d = edge_lengths(xy)
    tol = 1e-9 * max(ext, 1e-3)
    for i in np.flatnonzero(d <= tol):
        j = (i + 1) % n
        raise GeometryError(
            f"{node_description(profile, int(i))} and {node_description(profile, int(j))} "
            f"coincide ({d[i] * 1e3:.3g} mm apart); delete one of them or move it"
        )


def canonical_order(profile):
    """(order, reversed) of the profile's nodes in the canonical order.

    Canonical: counter-clockwise (by the signed area of the node polygon), starting at the corner
    (non-smooth) node with the smallest x (ties: the smallest y), or at the node with the smallest
    x when all are smooth (a smooth run is then never cut at the start). ``order[k]`` is the index in ``profile`` of the
    canonical node k; ``reversed`` is True when the profile runs clockwise. The same outline
    given from any node or either way round has one canonical order.
    """
    xy = np.array([(nd.x, nd.y) for nd in profile.nodes], dtype=float)
    corners = [i for i, nd in enumerate(profile.nodes) if not nd.smooth]
    return canonical_point_order(xy, corners)


def canonical_point_order(xy, starts=None):
    """(order, reversed) of a closed polygon's points ``xy`` (N, 2) in the canonical order:
    counter-clockwise, from the point of least x (ties: least y) among ``starts`` (indices; all
    points when None or empty)."""
    xy = np.asarray(xy, dtype=float)
    m = len(xy)
    start = min(starts or range(m), key=lambda i: (xy[i, 0], xy[i, 1]))
    rev = is_clockwise(xy)
    step = -1 if rev else 1
    return tuple((start + step * k) % m for k in range(m)), rev


def canonical_profile(profile):
    """(canonical profile, order, reversed): the profile's nodes in the canonical order (see
    :func:`canonical_order`), remembered in the profile's cache; the profile itself when its
    nodes are already in that order."""
    cached = profile._cache.get("canonical")
    if cached is not None:
        return cached
    order, rev = canonical_order(profile)
    if order == tuple(range(len(order))):
        out = (profile, order, rev)
    else:
        te = profile.trailing_edge
        canon = type(profile)(
            tuple(profile.nodes[i] for i in order),
            name=profile.name,
            trailing_edge=None if te is None else order.index(te),
        )
        out = (canon, order, rev)
    profile._cache["canonical"] = out
    return out


def canonical_outline(profile) -> Outline:
    """The built outline of the profile's canonical order: the same curve as
    :func:`build_outline`'s (its arc length starts elsewhere and may run the other way), built
    once for every way of giving the outline. Errors name the canonical nodes; build the
    profile's own outline for a message in its numbering."""
    return build_outline(canonical_profile(profile)[0])


def build_outline(profile) -> Outline:
    """Build (or fetch from the profile's cache) the closed outline of ``profile``.

    Raises
    ------
    GeometryError
        Fewer than 3 nodes, coincident neighbouring nodes, a rounded node that turns back on itself.
    RadiusTooLargeError
        A corner radius does not fit between its neighbouring segments.
    """
    cached = profile._cache.get("outline")
    if cached is not None:
        return cached
    out = _build(profile)
    profile._cache["outline"] = out
    return out


def _build(profile) -> Outline:
    _check_nodes(profile)
    nodes = profile.nodes
    n = len(nodes)
    corners = [i for i, nd in enumerate(nodes) if not nd.smooth]
    if not corners:
        return _build_periodic(profile)
    m = len(corners)
    segs, smooth_params = _segments(profile, corners)
    # fillet of every corner, with the requested radii
    info = []  # per corner: (theta, t_in on seg k-1, t_out on seg k, centre or None, ok)
    for k, c in enumerate(corners):
        cin, cout = segs[k - 1], segs[k]
        theta = _turn(cin, cout)
        r = nodes[c].radius
        if r == 0.0 or abs(theta) < _ANGLE_EPS:
            info.append((theta, cin.T, 0.0, None, True))
            continue
        if abs(theta) > math.pi - 1e-9:
            raise GeometryError(
                f"{node_description(profile, c)} turns the outline straight back on itself, so no "
                "fillet can round it: move the node or its neighbours"
            )
        f = _fillet(cin, cout, r, theta)
        if f is None:
            info.append((theta, cin.T, 0.0, None, False))
        else:
            info.append((theta, f[0], f[1], f[2], True))
    # does every fillet fit between its neighbours?
    bad = []
    for k, c in enumerate(corners):
        theta, t_in, t_out, centre, ok = info[k]
        if nodes[c].radius == 0.0 or centre is None and ok:
            continue
        prev_out = info[k - 1][2]
        next_in = info[(k + 1) % m][1]
        if not ok or t_in < prev_out - 1e-12 * segs[k - 1].T or t_out > next_in + 1e-12 * segs[k].T:
            bad.append(k)
    if bad:
        _raise_radius_error(profile, corners, segs, info, bad)

    # assemble the pieces, starting at corner 0
    pieces = []
    arc_of = {}
    sharp_of = {}
    smooth_piece = {}  # segment index -> (piece index, t offset)
    for k, c in enumerate(corners):
        theta, t_in, t_out, centre, ok = info[k]
        cin, cout = segs[k - 1], segs[k]
        if centre is not None:
            p1 = cin.eval(t_in)
            tan1 = _tangent_and_normal_derivative(cin, t_in)[0]
            tan2 = _tangent_and_normal_derivative(cout, t_out)[0]
            phi = math.atan2(_cross(tan1, tan2), float(np.dot(tan1, tan2)))
            a0 = math.atan2(p1[1] - centre[1], p1[0] - centre[0])
            arc_of[c] = len(pieces)
            pieces.append(_ArcPiece(centre, nodes[c].radius, a0, phi))
        else:
            sharp_of[c] = (len(pieces), theta)
        seg = segs[k]
        ta, tb = t_out, info[(k + 1) % m][1]
        if tb - ta > 1e-12 * seg.T:
            smooth_piece[k] = len(pieces)
            if seg.kind == "line":
                pieces.append(_LinePiece(seg.eval(ta), seg.eval(tb)))
            else:
                pieces.append(_SplinePiece(seg, ta, tb))

    rotate_by = 0
    if nodes[0].smooth:
        # node 0 lies on the last segment: split that piece at node 0 and start there
        kseg, t0 = smooth_params[0]
        j = smooth_piece.get(kseg)
        if j is not None:
            p = pieces[j]
            t0 = min(max(t0, p.ta), p.tb)
            if p.tb - t0 > 1e-12 * p.curve.T and t0 - p.ta > 1e-12 * p.curve.T:
                pieces[j : j + 1] = [
                    _SplinePiece(p.curve, p.ta, t0),
                    _SplinePiece(p.curve, t0, p.tb),
                ]
                rotate_by = j + 1
                arc_of = {c: (v + 1 if v > j else v) for c, v in arc_of.items()}
                sharp_of = {
                    c: ((v[0] + 1 if v[0] > j else v[0]), v[1]) for c, v in sharp_of.items()
                }
                smooth_piece = {kk: (v + 1 if v > j else v) for kk, v in smooth_piece.items()}
                smooth_piece[kseg] = j  # first half; node 0 is at its end
            elif t0 - p.ta <= 1e-12 * p.curve.T:
                rotate_by = j
            else:
                rotate_by = j + 1
    npieces = len(pieces)
    order = [(rotate_by + q) % npieces for q in range(npieces)]
    newpos = {old: new for new, old in enumerate(order)}
    pieces = [pieces[q] for q in order]
    lengths = np.array([p.length for p in pieces])
    s0 = np.concatenate([[0.0], np.cumsum(lengths)[:-1]])
    total = float(np.sum(lengths))

    # orientation from the signed area
    tmp = Outline(tuple(pieces), s0, total, (), (), (), 1)
    area = tmp.signed_area()
    orient = 1 if area >= 0 else -1

    node_s = [0.0] * n
    arcs = []
    sharps = []
    for k, c in enumerate(corners):
        theta = info[k][0]
        convex = bool(theta * orient > 0)
        if c in arc_of:
            q = newpos[arc_of[c]]
            p = pieces[q]
            arcs.append(
                CornerArc(
                    c,
                    nodes[c].radius,
                    float(s0[q]),
                    float(s0[q] + p.length),
                    (float(p.centre[0]), float(p.centre[1])),
                    p.sweep,
                    bool(p.sweep * orient > 0),
                )
            )
            node_s[c] = float(s0[q] + 0.5 * p.length)
        else:
            q = newpos[sharp_of[c][0] % npieces]
            s_c = float(s0[q])
            sharps.append(SharpEdge(c, s_c, float(theta), convex))
            node_s[c] = s_c
    for i, (kseg, t) in smooth_params.items():
        cand = [
            qq
            for qq in range(npieces)
            if pieces[qq].kind == "spline" and pieces[qq].curve is segs[kseg]
        ]
        inside = [qq for qq in cand if pieces[qq].ta <= t <= pieces[qq].tb]
        if inside:
            q = inside[-1] if i == 0 else inside[0]
            p = pieces[q]
            node_s[i] = float(s0[q] + np.interp(t, p.tab_t, p.tab_s)) % total
        elif cand:
            # the node lies under a fillet: take the nearest end of its spline piece
            ends = [(abs(t - pieces[qq].ta), float(s0[qq])) for qq in cand]
            ends += [(abs(t - pieces[qq].tb), float(s0[qq] + pieces[qq].length)) for qq in cand]
            node_s[i] = min(ends)[1] % total
        else:
            node_s[i] = node_s[corners[kseg]]
    if nodes[0].smooth and rotate_by and abs(node_s[0] - total) < 1e-9 * total:
        node_s[0] = 0.0
    arcs.sort(key=lambda a: a.s_start)
    sharps.sort(key=lambda e: e.s)
    out = Outline(tuple(pieces), s0, total, tuple(node_s), tuple(arcs), tuple(sharps), orient)
    out._memo().update(tmp._memo())  # same pieces: the quadrature is shared
    return out


def _build_periodic(profile) -> Outline:
    xy = np.array(profile.xy + [profile.xy[0]], float)
    spl = _Spline(xy, periodic=True)
    piece = _SplinePiece(spl, 0.0, spl.T)
    tmp = Outline((piece,), np.array([0.0]), piece.length, (), (), (), 1)
    orient = 1 if tmp.signed_area() >= 0 else -1
    node_s = tuple(float(np.interp(t, piece.tab_t, piece.tab_s)) for t in spl.knots[:-1])
    return Outline((piece,), np.array([0.0]), piece.length, node_s, (), (), orient)


def _raise_radius_error(profile, corners, segs, info, bad):
    """Find the largest radius that fits at the first offending node and raise."""
    nodes = profile.nodes
    m = len(corners)
    found = []
    for k in bad:
        c = corners[k]
        theta = info[k][0]
        cin, cout = segs[k - 1], segs[k]
        same_prev = m == 1
        prev_out = info[k - 1][2]
        next_in = info[(k + 1) % m][1]

        def slack(r):
            if r <= 0:
                return min(
                    cin.T - (prev_out if not same_prev else 0.0),
                    (next_in if not same_prev else cout.T) - 0.0,
                )
            f = _fillet(cin, cout, r, theta)
            if f is None:
                return -1.0
            t1, t2, _ = f
            if same_prev:
                return t1 - t2
            return min(t1 - prev_out, next_in - t2)

        r_req = nodes[c].radius
        largest = 0.0
        if slack(1e-12 * r_req) > 0:
            if cin.kind == "line" and cout.kind == "line" and not same_prev:
                room = min(cin.T - prev_out, next_in)
                largest = room / math.tan(abs(theta) / 2.0)
            else:
                largest = brentq(slack, 1e-12 * r_req, r_req, xtol=1e-12 * r_req, rtol=1e-12)
                # step just inside the fitting side of the bracket
                while slack(largest) < 0 and largest > 0:
                    largest *= 1 - 1e-9
        found.append((k, c, largest))
    pick = next((f for f in found if f[2] > 0), found[0])
    k, c, largest = pick
    r_req = nodes[c].radius
    if largest > 0:
        hint = (
            f"the largest radius that fits there is {math.floor(largest * 1e4 + 1e-6) / 10:.1f} mm "
            "(the neighbouring corners keeping their radii): reduce the radius, reduce the "
            "neighbours' radii, or move the neighbouring nodes further away"
        )
    else:
        hint = (
            "no radius fits there while the neighbouring corners keep their radii: reduce "
            "the neighbours' radii or move the neighbouring nodes further away"
        )
    others = [f[1] for f in found if f[1] != c]
    if others:
        hint += (
            "; the radius at "
            + ", ".join(f"node {o}" for o in others)
            + " does not fit either with this one"
        )
    raise RadiusTooLargeError(
        f"corner radius {r_req * 1e3:.1f} mm at {node_description(profile, c)} is too large for "
        f"its neighbouring segments; {hint}",
        node=c,
        radius=r_req,
        largest=largest,
    )
