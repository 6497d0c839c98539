"""Boundary-layer march along one surface, from the stagnation point to the end or separation.

The march combines

* Thwaites' method for the laminar layer (:mod:`profilebench.flow.thwaites`),
* Michel's transition criterion in the Cebeci-Smith form (:mod:`profilebench.flow.transition`),
  a forced transition position, or a fully turbulent layer,
* Head's entrainment method with Ludwieg-Tillmann skin friction for the turbulent layer
  (:mod:`profilebench.flow.head`),
* a short-bubble model when the laminar layer separates before natural transition, and
* fixed separation at sharp convex edges.

Edge-speed slope. Panel methods give edge speeds with small station-to-station noise, which raw
differences turn into large errors in dUe/ds. The slope (and, for the turbulent march, the
value) at each station comes from a local least-squares quadratic through the 7 nearest
stations, or with a fit length through every station within it and at least the 5 nearest
(one-sided near the ends, never across the first sharp edge). The quadratic is exact
for linear and quadratic edge speeds. Thwaites' integral itself uses the given ue, integrated
exactly for ue piecewise linear between stations.

Laminar separation (lambda = -0.09) is looked for at the stations and, round each local minimum
of lambda that comes within 30 % of the criterion, between the neighbouring stations as well
(theta from Thwaites' integral with ue linear between stations, the slope from the same window
centred there): a narrow dip behind a fillet's tangent point then separates or not whatever the
stations' positions (a refinement rule of this project, no source).

Bubble model (documented choices, common practice, no source): at laminar separation the layer
restarts turbulent with theta continuous and H = ``BUBBLE_RESTART_H`` = 2.8 (a just-separated
turbulent layer: the top of the accepted turbulent-separation range). The bubble reattaches
when Head's H falls to ``h_separation - BUBBLE_REATTACH_HYSTERESIS`` (0.2 below the separation
threshold, so the layer does not flip back at once) within ``BUBBLE_MAX_LENGTH_THETA`` = 100
momentum thicknesses at separation; otherwise, or if H rises to ``BUBBLE_BURST_H`` = 3.5 first,
the bubble bursts and the layer is separated (a "turbulent_separation" event whose detail says
so). Stations inside a bubble are marked separated, with cf = 0.

Separation margin (``margin``), 1 = far from separation, 0 = at the criterion:
laminar: clip(1 - lambda / (-0.09), 0, 1) (1 for zero or favourable gradient);
turbulent: clip((h_separation - H) / (h_separation - 1.4), 0, 1), 1.4 being a flat-plate
turbulent H (Schlichting; H ~ 1.3-1.4); separated stations (bubble or final): 0.
"""

from __future__ import annotations

import enum
import math
import numbers
from dataclasses import dataclass, field

import numpy as np

from profilebench.enums import TextEnum
from profilebench.errors import InputError
from profilebench.flow.head import HeadStop, march_head
from profilebench.flow.thwaites import (
    LAMBDA_SEPARATION,
    thwaites_momentum_thickness,
    thwaites_shape_factor,
    thwaites_shear,
    thwaites_theta_squared_between,
)
from profilebench.flow.transition import michel_critical_re_theta

__all__ = [
    "Regime",
    "MarchStatus",
    "Event",
    "BoundaryLayerResult",
    "march_boundary_layer",
    "EVENT_KINDS",
    "TURBULENT_START_H",
    "FLAT_PLATE_TURBULENT_H",
    "BUBBLE_RESTART_H",
    "BUBBLE_REATTACH_HYSTERESIS",
    "BUBBLE_BURST_H",
    "BUBBLE_MAX_LENGTH_THETA",
    "H_SEPARATION_RANGE",
    "SEPARATION_KINDS",
    "EventKind",
]

#: Shape factor given to a turbulent layer where it starts (transition, or fully turbulent
#: from the stagnation point); theta is continuous (common practice, no source; close to the
#: 1/7-power-law flat-plate value 1.29-1.4, Schlichting).
TURBULENT_START_H = 1.4
#: Flat-plate turbulent H used as the "far from separation" end of the turbulent margin.
FLAT_PLATE_TURBULENT_H = 1.4
#: Shape factor of the turbulent restart at laminar separation (see module docstring).
BUBBLE_RESTART_H = 2.8
#: Reattachment when H <= h_separation - this value.
BUBBLE_REATTACH_HYSTERESIS = 0.2
#: A bubble whose H rises to this value bursts.
BUBBLE_BURST_H = 3.5
#: Longest short bubble, in momentum thicknesses at laminar separation.
BUBBLE_MAX_LENGTH_THETA = 100.0
#: Accepted turbulent separation thresholds on H (Cebeci & Bradshaw quote 1.8-2.8; 2.4 common).
H_SEPARATION_RANGE = (1.8, 2.8)


class EventKind(TextEnum):
    """Boundary-layer event kinds, in the trade's terms."""

    TRANSITION = "transition"
    LAMINAR_SEPARATION = "laminar_separation"
    REATTACHMENT = "reattachment"
    TURBULENT_SEPARATION = "turbulent_separation"
    EDGE_SEPARATION = "edge_separation"


#: Event kinds, in the trade's terms.
EVENT_KINDS = tuple(EventKind)
#: The event kinds at which the layer leaves the surface.
SEPARATION_KINDS = (
    EventKind.LAMINAR_SEPARATION,
    EventKind.TURBULENT_SEPARATION,
    EventKind.EDGE_SEPARATION,
)
_FIT_HALF_WIDTH = 3
# with a window of physical length, the fewest stations either side of a station: the length
# decides wherever the stations are not coarse (at 250 panels the 7 nearest stations reached
# past 0.06 h behind a fillet's tangent point and smoothed the adverse gradient there more than
# at 500: a rounded box's smallest attached front radius came out 78 mm against 94.5 mm)
_FIT_MIN_HALF_WIDTH = 2
# laminar separation between stations: a local minimum of lambda at the stations within this
# share of the criterion is looked at between its neighbours, at this many points per interval
_NEAR_MISS = 0.3
_SUBSTEPS = 12


class Regime(enum.Enum):
    """State of the boundary layer at a station."""

    LAMINAR = "laminar"
    TURBULENT = "turbulent"
    SEPARATED = "separated"


class MarchStatus(enum.Enum):
    """Outcome of the march as a computation (separation is a physical result, not a failure)."""

    COMPLETED = "completed"
    NUMERICAL_FAILURE = "numerical_failure"


@dataclass(frozen=True)
class Event:
    """A boundary-layer event.

    ``kind``: one of :data:`EVENT_KINDS`; ``s``: arc length (m); ``index``: the first station at
    or downstream of ``s`` (the first that carries the new state; ``len(s)`` if past the last
    station); ``detail``: a short text.
    """

    kind: EventKind
    s: float
    index: int
    detail: str

    def __post_init__(self):
        try:
            object.__setattr__(self, "kind", EventKind(self.kind))
        except ValueError:
            raise InputError(
                f"event kind {self.kind!r} is unknown; use one of {', '.join(EVENT_KINDS)}"
            ) from None


@dataclass(frozen=True)
class BoundaryLayerResult:
    """Boundary layer on one surface; arrays are on the stations ``s`` and read-only.

    Attributes
    ----------
    s : arc length from the stagnation point (m).
    ue : edge speed ratio Ue/V as given.
    theta : momentum thickness (m). delta_star : displacement thickness H theta (m).
    H : shape factor delta*/theta. re_theta : Ue theta / nu.
    cf : local skin-friction coefficient tau_w / (1/2 rho Ue^2); 0 where separated and at a
        stagnation station (tau_w = 0 there); at a sharp leading edge (theta = 0, unbounded cf)
        the value of the next station is reported.
    cf_free_stream : tau_w / (1/2 rho V^2) = cf ue^2, the one to integrate for friction drag.
    regime : array of :class:`Regime`. margin : separation margin, 1 far, 0 at the criterion.
    events : list of :class:`Event` in marching order. separation : the event where the layer
        finally separates, or None if it stays attached to the end.
    status, success, message : outcome of the computation.
    nu (m^2/s), speed (m/s), h_separation : the conditions used.
    """

    s: np.ndarray
    ue: np.ndarray
    theta: np.ndarray
    delta_star: np.ndarray
    H: np.ndarray
    cf: np.ndarray
    cf_free_stream: np.ndarray
    re_theta: np.ndarray
    regime: np.ndarray
    margin: np.ndarray
    events: list = field(default_factory=list)
    separation: Event | None = None
    status: MarchStatus = MarchStatus.COMPLETED
    success: bool = True
    message: str = ""
    nu: float = 1.46e-5
    speed: float = 30.0
    h_separation: float = 2.4

    @property
    def transition(self) -> Event | None:
        """The transition event, or None (also None when a bubble takes its place)."""
        for ev in self.events:
            if ev.kind == "transition":
                return ev
        return None


# ----------------------------------------------------------------------------------------------
# input checks


def _real(name, value, hint):
    if isinstance(value, bool) or not isinstance(value, numbers.Real):
        raise InputError(f"{name} must be a number, got {value!r}; {hint}")
    value = float(value)
    if not math.isfinite(value):
        raise InputError(f"{name} is {value!r}; {hint}")
    return value


def _array(name, value):
    try:
        arr = np.array(value, dtype=float)
    except (TypeError, ValueError):
        raise InputError(
            f"{name} must be a sequence of numbers; could not read {type(value).__name__} "
            "as numbers"
        ) from None
    if arr.ndim != 1:
        raise InputError(f"{name} must be one-dimensional, got shape {arr.shape}; pass a 1-D array")
    bad = np.flatnonzero(~np.isfinite(arr))
    if bad.size:
        raise InputError(
            f"{name} holds a non-finite value ({float(arr[bad[0]])!r}) at station {bad[0]}; "
            "give finite numbers at every station"
        )
    return arr


def _check_inputs(s, ue, nu, speed, transition, h_separation, edges):
    s = _array("s", s)
    ue = _array("ue", ue)
    if s.size != ue.size:
        raise InputError(
            f"s has {s.size} stations but ue has {ue.size}; give one edge speed per arc length"
        )
    if s.size < 3:
        raise InputError(f"the march needs at least 3 stations, got {s.size}; give more stations")
    steps = np.diff(s)
    if np.any(steps <= 0):
        k = int(np.flatnonzero(steps <= 0)[0])
        raise InputError(
            f"s must be strictly increasing, but s[{k + 1}] = {s[k + 1]:.6g} m does not exceed "
            f"s[{k}] = {s[k]:.6g} m; sort the stations and remove duplicates"
        )
    if s[0] < 0:
        raise InputError(
            f"s[0] = {s[0]:.6g} m is negative; s is the arc length from the stagnation point, "
            "so it starts at 0 or above"
        )
    if np.any(ue < 0):
        k = int(np.flatnonzero(ue < 0)[0])
        raise InputError(
            f"ue[{k}] = {ue[k]:.6g} is negative; give the edge speed magnitude |Ue|/V on each "
            "surface (split the surface at the stagnation point)"
        )
    if ue[0] == 0 and ue[1] == 0:
        raise InputError(
            "ue is zero at the first two stations; the layer must leave the stagnation point: "
            "keep a single stagnation station at the start"
        )
    nu = _real("nu", nu, "give the kinematic viscosity in m^2/s, e.g. 1.46e-5 for air")
    if nu <= 0:
        raise InputError(f"nu = {nu!r} m^2/s must be positive; air at sea level is 1.46e-5")
    speed = _real("speed", speed, "give the free-stream speed in m/s")
    if speed <= 0:
        raise InputError(f"speed = {speed!r} m/s must be positive; give the free-stream speed")
    lo, hi = H_SEPARATION_RANGE
    h_separation = _real("h_separation", h_separation, f"give a shape factor in {lo}..{hi}")
    if not lo <= h_separation <= hi:
        raise InputError(
            f"h_separation = {h_separation:g} is outside the accepted range {lo}..{hi} for "
            "turbulent separation on H; 2.4 is the usual choice"
        )
    if isinstance(transition, str):
        if transition not in ("free", "turbulent"):
            raise InputError(
                f"transition = {transition!r} is not understood; use 'free', 'turbulent' or an "
                "arc length in metres where transition is forced"
            )
    else:
        hint = "use 'free', 'turbulent' or an arc length in metres where transition is forced"
        transition = _real("transition", transition, hint)
        if not s[0] <= transition <= s[-1]:
            raise InputError(
                f"forced transition at s = {transition:.6g} m lies outside the surface "
                f"({s[0]:.6g} to {s[-1]:.6g} m); give an arc length on the surface or use 'free'"
            )
    try:
        edge_list = list(edges)
    except TypeError:
        raise InputError(
            f"edges must be a sequence of arc lengths in metres, got {edges!r}"
        ) from None
    checked = []
    for e in edge_list:
        e = _real("edge arc length", e, "give arc lengths in metres on s")
        if not s[0] < e <= s[-1]:
            raise InputError(
                f"sharp edge at s = {e:.6g} m lies outside the surface ({s[0]:.6g} to "
                f"{s[-1]:.6g} m, start excluded); give arc lengths on s"
            )
        checked.append(e)
    return s, ue, nu, speed, transition, h_separation, sorted(checked)


# ----------------------------------------------------------------------------------------------
# numerics


def _local_quadratic_fit(s, ue, n_fit, fit_length=0.0):
    """Value and slope of a least-squares quadratic through the stations near each station.

    The window of station i holds the 7 nearest stations; with ``fit_length`` > 0 it holds every
    station within ``fit_length`` (m) of s[i] and at least the 5 nearest: a window of physical
    length, so that the slope does not sharpen as the stations are refined. (The inviscid edge speed has a
    logarithmic slope singularity where the outline's curvature jumps, at a fillet's tangent
    points; a window of a fixed number of stations resolves it more and more as the panels are
    refined, and the laminar separation test on Thwaites' lambda then flips with the panel
    count.) Only the first ``n_fit`` stations take part (the rest, past a sharp edge, get the
    values of the last fitted station: the layer never marches there). Vectorised over stations.
    """
    n = s.size
    u_fit = np.empty(n)
    d_fit = np.empty(n)
    m = n_fit
    half = _FIT_MIN_HALF_WIDTH if fit_length > 0.0 else _FIT_HALF_WIDTH
    w = min(2 * half + 1, m)
    if w < 3:
        # one or two stations before the edge: straight line
        slope = (ue[1] - ue[0]) / (s[1] - s[0])
        u_fit[:] = ue
        d_fit[:] = slope
        return u_fit, d_fit
    sm = s[:m]
    c0, slope = _fit_at(sm, ue, np.arange(m), sm, half, fit_length)
    u_fit[:m] = c0
    d_fit[:m] = slope
    u_fit[m:] = u_fit[m - 1]
    d_fit[m:] = d_fit[m - 1]
    return u_fit, d_fit


def _quadratic_value_and_slope(x, y, wt):
    """c0 and c1 of the weighted least-squares fits c0 + c1 x + c2 x^2, one per row of x, y, wt."""
    # weighted normal equations of the fit c0 + c1 x + c2 x^2, by Cramer's rule (3 x 3, symmetric)
    x2 = x * x
    s0 = wt.sum(axis=1)
    s1 = (wt * x).sum(axis=1)
    s2 = (wt * x2).sum(axis=1)
    s3 = (wt * x2 * x).sum(axis=1)
    s4 = (wt * x2 * x2).sum(axis=1)
    t0 = (wt * y).sum(axis=1)
    t1 = (wt * x * y).sum(axis=1)
    t2 = (wt * x2 * y).sum(axis=1)
    m11 = s2 * s4 - s3 * s3
    m12 = s1 * s4 - s2 * s3
    m13 = s1 * s3 - s2 * s2
    det = s0 * m11 - s1 * m12 + s2 * m13
    c0 = (t0 * m11 - s1 * (t1 * s4 - s3 * t2) + s2 * (t1 * s3 - s2 * t2)) / det
    c1 = (s0 * (t1 * s4 - s3 * t2) - t0 * m12 + s2 * (s1 * t2 - s2 * t1)) / det
    return c0, c1


def _fit_at(sm, ue, nearest, x, half, fit_length):
    """Value and slope at arc lengths ``x`` of the least-squares quadratic through the window of
    each: the 2 ``half`` + 1 stations round station ``nearest`` (one-sided at the ends) and every
    station within ``fit_length`` of x."""
    m = sm.size
    w = min(2 * half + 1, m)
    lo = np.clip(nearest - half, 0, m - w)
    hi = lo + w - 1
    if fit_length > 0.0:
        lo = np.minimum(lo, np.searchsorted(sm, x - fit_length, side="left"))
        hi = np.maximum(hi, np.searchsorted(sm, x + fit_length, side="right") - 1)
    width = int((hi - lo).max()) + 1
    win = lo[:, None] + np.arange(width)[None, :]
    wt = (win <= hi[:, None]).astype(float)
    win = np.minimum(win, m - 1)
    scale = sm[hi] - sm[lo]
    c0, c1 = _quadratic_value_and_slope((sm[win] - x[:, None]) / scale[:, None], ue[win], wt)
    return c0, c1 / scale


def _slope_at(s, ue, n_fit, fit_length, x):
    """Slope of the fit of :func:`_local_quadratic_fit` centred at arc lengths ``x`` (m) between
    the stations: the same window round the nearest station, so that at a station it is that
    station's slope."""
    sm = s[:n_fit]
    j = np.clip(np.searchsorted(sm, x, side="right") - 1, 0, n_fit - 2)
    nearest = j + ((x - sm[j]) / (sm[j + 1] - sm[j]) >= 0.5)
    half = _FIT_MIN_HALF_WIDTH if fit_length > 0.0 else _FIT_HALF_WIDTH
    return _fit_at(sm, ue, nearest, x, half, fit_length)[1]


def _crossing(s, g, i):
    """Arc length where g (>= 0 at station i, < 0 at i-1) crosses zero, linear in s."""
    if i == 0 or not np.isfinite(g[i - 1]) or not np.isfinite(g[i]):
        return float(s[i])
    g0, g1 = g[i - 1], g[i]
    f = g0 / (g0 - g1) if g1 != g0 else 1.0
    return float(s[i - 1] + f * (s[i] - s[i - 1]))


def _first_index_at_or_after(s, x):
    return int(np.searchsorted(s, x, side="left"))


class _LaminarEnd(enum.Enum):
    """What ends the laminar part of a march."""

    NONE = "reaches the end of the surface"
    EDGE = "a sharp edge"
    STOPPED = "the edge speed falls to zero"
    LAMINAR_SEPARATION = "laminar separation"
    TURBULENT = "turbulent from the start"
    FREE = "free transition"
    FORCED = "forced transition"


class _March:
    """One surface's march: the inputs, the station arrays being filled and the events.

    The phases of :func:`march_boundary_layer` are its methods, over this one shared set of
    arrays: the laminar layer everywhere (:meth:`laminar`), the end of the laminar part
    (:meth:`laminar_end`), then the turbulent march, the laminar bubble or the separated
    remainder, and the result (:meth:`result`).
    """

    def __init__(self, s, ue, nu, speed, h_sep, edges, fit_length):
        self.s, self.ue, self.nu, self.speed, self.h_sep = s, ue, nu, speed, h_sep
        self.n = n = s.size
        self.nu_v = nu / speed
        self.s_edge = edges[0] if edges else None
        n_fit = n if self.s_edge is None else max(_first_index_at_or_after(s, self.s_edge) + 1, 2)
        self.n_fit, self.fit_length = min(n_fit, n), fit_length
        self.u_fit, self.d_fit = _local_quadratic_fit(s, ue, self.n_fit, fit_length)
        self.theta = np.zeros(n)
        self.H = np.zeros(n)
        self.cf = np.zeros(n)
        self.re_theta = np.zeros(n)
        self.margin = np.zeros(n)
        self.regime = np.empty(n, dtype=object)
        self.events: list[Event] = []
        self.status = MarchStatus.COMPLETED
        self.failure_msg = ""

    # ---- phase 1: the laminar layer everywhere (used up to the end of the laminar part) ----
    def laminar(self):
        s, ue, nu_v, n = self.s, self.ue, self.nu_v, self.n
        with np.errstate(divide="ignore", invalid="ignore", over="ignore"):
            theta_l = thwaites_momentum_thickness(s, ue, nu_v)
            lam = theta_l**2 * self.d_fit / nu_v
            stopped = np.zeros(n, dtype=bool)
            stopped[1:] = ue[1:] == 0.0
            lam[stopped] = -np.inf
            h_l = thwaites_shape_factor(np.where(np.isfinite(lam), lam, LAMBDA_SEPARATION))
            l_l = thwaites_shear(np.where(np.isfinite(lam), lam, LAMBDA_SEPARATION))
            re_t_l = ue * theta_l / nu_v
            cf_l = np.where(re_t_l > 0, 2.0 * l_l / re_t_l, 0.0)
            re_x = ue * s / nu_v
            g_tr = re_t_l - michel_critical_re_theta(re_x)
        if ue[0] == 0.0:
            cf_l[0] = 0.0  # stagnation: tau_w = 0
        elif theta_l[0] == 0.0:
            cf_l[0] = cf_l[1]  # sharp leading edge: cf unbounded, next station reported
        self.theta_l, self.lam, self.stopped, self.h_l = theta_l, lam, stopped, h_l
        self.re_t_l, self.cf_l, self.g_tr = re_t_l, cf_l, g_tr
        self.margin_l = np.clip(1.0 + lam / (-LAMBDA_SEPARATION), 0.0, 1.0)

    # ---- phase 2: where the laminar part ends: the first of edge, separation, transition ----
    def laminar_end(self, transition):
        """(s, kind) of the end of the laminar part (kind a :class:`_LaminarEnd`)."""
        s = self.s
        candidates = []  # (s, priority, kind)
        if self.s_edge is not None:
            candidates.append((self.s_edge, 0, _LaminarEnd.EDGE))
        sep_idx = np.flatnonzero((self.lam <= LAMBDA_SEPARATION) | self.stopped)
        # the stations ahead of which a laminar separation between stations could end the
        # laminar part: up to the first at the stations and the transition
        upto = int(sep_idx[0]) if sep_idx.size else self.n_fit
        if transition == "turbulent":
            upto = 0
        elif isinstance(transition, str):
            tr_idx = np.flatnonzero(self.g_tr >= 0)
            upto = min(upto, int(tr_idx[0]) + 1) if tr_idx.size else upto
        else:
            upto = min(upto, _first_index_at_or_after(s, transition) + 1)
        between = self.separation_between_stations(upto)
        if between is not None:
            candidates.append((between, 1, _LaminarEnd.LAMINAR_SEPARATION))
        elif sep_idx.size:
            i = int(sep_idx[0])
            if self.stopped[i]:
                candidates.append((float(s[i]), 1, _LaminarEnd.STOPPED))
            else:
                candidates.append(
                    (
                        _crossing(s, LAMBDA_SEPARATION - self.lam, i),
                        1,
                        _LaminarEnd.LAMINAR_SEPARATION,
                    )
                )
        if transition == "turbulent":
            candidates.append((float(s[0]), 2, _LaminarEnd.TURBULENT))
        else:
            tr_idx = np.flatnonzero(self.g_tr >= 0)
            if tr_idx.size:
                i = int(tr_idx[0])
                candidates.append((_crossing(s, self.g_tr, i), 3, _LaminarEnd.FREE))
            if not isinstance(transition, str):
                candidates.append((transition, 2, _LaminarEnd.FORCED))
        if not candidates:
            return None, _LaminarEnd.NONE
        x_end, _, kind = min(candidates, key=lambda c: (c[0], c[1]))
        return x_end, kind

    def separation_between_stations(self, upto):
        """The first laminar separation that lies between stations, ahead of station ``upto``.

        Thwaites' lambda dips steeply just behind a fillet's tangent point, over a few station
        spacings; with the test at the stations alone, whether the dip reaches the criterion
        depends on where the stations fall and flips with the panel count (a front lower
        fillet of a rounded box: lambda_min -0.088 at the stations at 250 panels, -0.092 between
        them, -0.097 to -0.103 at 300 to 1000). Round each near miss (a local minimum of lambda
        at the stations within _NEAR_MISS of the criterion) lambda is evaluated between the
        neighbouring stations, with theta from Thwaites' integral (ue linear between stations,
        as at the stations) and the slope of the same windowed fit centred there.
        """
        lam, s, ue = self.lam, self.s, self.ue
        hi = min(upto, self.n_fit - 1, self.n - 1)
        if hi < 2:
            return None
        inner = np.arange(1, hi)
        near = inner[
            (lam[inner] <= lam[inner - 1])
            & (lam[inner] <= lam[inner + 1])
            & (lam[inner] <= LAMBDA_SEPARATION * (1.0 - _NEAR_MISS))
            & np.isfinite(lam[inner])
        ]
        for j in near:
            x = np.linspace(s[j - 1], s[j + 1], 2 * _SUBSTEPS + 1)[1:-1]
            theta2 = thwaites_theta_squared_between(s, ue, self.nu_v, x)
            with np.errstate(invalid="ignore"):
                lam_x = theta2 * _slope_at(s, ue, self.n_fit, self.fit_length, x) / self.nu_v
            below = np.flatnonzero(lam_x <= LAMBDA_SEPARATION)
            if below.size:
                i = int(below[0])
                if i == 0:
                    return float(x[0])
                return _crossing(x, LAMBDA_SEPARATION - lam_x, i)
        return None

    # ---- filling the station arrays ----
    def fill_laminar(self, upto_s):
        k = _first_index_at_or_after(self.s, upto_s)
        self.theta[:k] = self.theta_l[:k]
        self.H[:k] = self.h_l[:k]
        self.cf[:k] = self.cf_l[:k]
        self.re_theta[:k] = self.re_t_l[:k]
        self.margin[:k] = self.margin_l[:k]
        self.regime[:k] = Regime.LAMINAR
        return k

    def fill_separated(self, from_s, theta_sep, h_sepv):
        k = _first_index_at_or_after(self.s, from_s)
        u_at = float(np.interp(from_s, self.s, self.ue))
        self.theta[k:] = theta_sep
        self.H[k:] = h_sepv
        self.cf[k:] = 0.0
        self.re_theta[k:] = u_at * theta_sep / self.nu_v
        self.margin[k:] = 0.0
        self.regime[k:] = Regime.SEPARATED

    def fill_march(self, m, regime, cf_zero=False):
        k = m.index
        if k.size == 0:
            return
        self.theta[k] = m.theta
        self.H[k] = m.H
        self.cf[k] = 0.0 if cf_zero else m.cf
        self.re_theta[k] = self.ue[k] * m.theta / self.nu_v
        if regime is Regime.SEPARATED:
            self.margin[k] = 0.0
        else:
            self.margin[k] = np.clip(
                (self.h_sep - m.H) / (self.h_sep - FLAT_PLATE_TURBULENT_H), 0.0, 1.0
            )
        self.regime[k] = regime

    def event(self, kind, x, detail):
        e = Event(kind=kind, s=float(x), index=_first_index_at_or_after(self.s, x), detail=detail)
        self.events.append(e)
        return e

    def fail(self, what, m):
        self.status = MarchStatus.NUMERICAL_FAILURE
        self.failure_msg = (
            f"{what} failed at s = {m.s_stop:.6g} m (non-finite state); values held from there"
        )
        self.fill_separated(m.s_stop, m.theta_stop, m.h_stop)

    # ---- phase 3: the turbulent layer ----
    def turbulent(self, x0, th0, h0):
        """Attached turbulent march from x0 (Head), its stations filled; returns the march."""
        m = march_head(
            self.s,
            self.u_fit,
            self.d_fit,
            x0,
            th0,
            h0,
            self.nu_v,
            h_above=self.h_sep,
            s_limit=self.s_edge,
        )
        self.fill_march(m, Regime.TURBULENT)
        return m

    def close_turbulent(self, m):
        """The event that ends an attached turbulent march, and the separated remainder."""
        if m.stop is HeadStop.END:
            return
        if m.stop is HeadStop.H_ABOVE:
            self.event(
                EventKind.TURBULENT_SEPARATION,
                m.s_stop,
                f"turbulent separation: H reached {self.h_sep:g} (Head)",
            )
        elif m.stop is HeadStop.LIMIT:
            self.event(
                EventKind.EDGE_SEPARATION, m.s_stop, "attached turbulent layer reaches a sharp edge"
            )
        elif m.stop is HeadStop.STOPPED:
            self.event(
                EventKind.TURBULENT_SEPARATION, m.s_stop, "edge speed falls to zero: the flow stops"
            )
        else:
            self.fail("turbulent march", m)
            return
        self.fill_separated(m.s_stop, m.theta_stop, m.h_stop)

    def transition(self, kind, x_end, th_x):
        """Transition (free, forced, or turbulent from the start), then the turbulent march."""
        s, ue = self.s, self.ue
        k0 = 0
        if kind is _LaminarEnd.TURBULENT:
            # start where Head's equations are regular: first station with ue > 0 and theta > 0
            k0 = 0 if (ue[0] > 0 and self.theta_l[0] > 0) else 1
            x0, th0 = float(s[k0]), float(self.theta_l[k0])
            if k0 == 1:
                self.theta[0] = self.theta_l[0]
                self.H[0] = TURBULENT_START_H
                self.re_theta[0] = self.re_t_l[0]
                self.margin[0] = 1.0
                self.regime[0] = Regime.TURBULENT
            self.event(
                EventKind.TRANSITION,
                s[0],
                f"turbulent from the start: theta from Thwaites, H = {TURBULENT_START_H:g}",
            )
        else:
            self.fill_laminar(x_end)
            x0, th0 = x_end, th_x
            if kind is _LaminarEnd.FREE:
                rx = float(np.interp(x_end, s, ue)) * x_end / self.nu_v
                detail = (
                    f"free transition, Michel's criterion (Cebeci-Smith form) at Re_x = {rx:.3g}"
                )
            else:
                detail = "forced transition at the given arc length"
            self.event(EventKind.TRANSITION, x_end, detail)
        m = self.turbulent(x0, th0, TURBULENT_START_H)
        if kind is _LaminarEnd.TURBULENT and k0 == 1 and m.index.size:
            self.cf[0] = 0.0 if ue[0] == 0.0 else m.cf[0]
        self.close_turbulent(m)

    # ---- phase 3': a laminar separation bubble ----
    def bubble(self, x_end, th_x):
        """Laminar separation: a turbulent bubble that reattaches, bursts or meets an edge."""
        self.fill_laminar(x_end)
        ls = self.event(
            EventKind.LAMINAR_SEPARATION,
            x_end,
            f"laminar separation (Thwaites, lambda = {LAMBDA_SEPARATION:g}): bubble",
        )
        h_re = self.h_sep - BUBBLE_REATTACH_HYSTERESIS
        l_max = x_end + BUBBLE_MAX_LENGTH_THETA * th_x
        limit = l_max if self.s_edge is None else min(l_max, self.s_edge)
        mb = march_head(
            self.s,
            self.u_fit,
            self.d_fit,
            x_end,
            th_x,
            BUBBLE_RESTART_H,
            self.nu_v,
            h_above=BUBBLE_BURST_H,
            h_below=h_re,
            s_limit=limit,
        )
        self.fill_march(mb, Regime.SEPARATED, cf_zero=True)
        if mb.stop is HeadStop.H_BELOW:
            self.event(
                EventKind.REATTACHMENT,
                mb.s_stop,
                f"bubble from s = {ls.s:.4g} m reattaches turbulent (H fell to {h_re:g}), "
                f"length {mb.s_stop - ls.s:.3g} m",
            )
            self.close_turbulent(self.turbulent(mb.s_stop, mb.theta_stop, mb.h_stop))
        elif mb.stop is HeadStop.END:
            pass  # the surface ends inside the bubble: separated from laminar separation on
        elif mb.stop is HeadStop.LIMIT and self.s_edge is not None and mb.s_stop >= self.s_edge:
            self.event(
                EventKind.EDGE_SEPARATION,
                mb.s_stop,
                f"bubble from s = {ls.s:.4g} m still open at a sharp edge: layer leaves there",
            )
            self.fill_separated(mb.s_stop, mb.theta_stop, mb.h_stop)
        elif mb.stop in (HeadStop.H_ABOVE, HeadStop.LIMIT, HeadStop.STOPPED):
            why = {
                HeadStop.H_ABOVE: f"H rose to {BUBBLE_BURST_H:g}",
                HeadStop.LIMIT: f"no reattachment within {BUBBLE_MAX_LENGTH_THETA:g} theta",
                HeadStop.STOPPED: "edge speed falls to zero",
            }[mb.stop]
            self.event(
                EventKind.TURBULENT_SEPARATION,
                mb.s_stop,
                f"bubble from s = {ls.s:.4g} m burst ({why}): the layer separates",
            )
            self.fill_separated(mb.s_stop, mb.theta_stop, mb.h_stop)
        else:
            self.fail("bubble march", mb)

    def run(self, transition):
        x_end, kind = self.laminar_end(transition)
        if kind is _LaminarEnd.NONE:
            self.fill_laminar(self.s[-1] + 1.0)
            return
        finite = np.isfinite(self.theta_l)
        th_x = float(np.interp(x_end, self.s[finite], self.theta_l[finite]))
        h_x = float(np.interp(x_end, self.s, self.h_l))
        if kind is _LaminarEnd.EDGE:
            self.fill_laminar(x_end)
            self.event(
                EventKind.EDGE_SEPARATION, x_end, "attached laminar layer reaches a sharp edge"
            )
            self.fill_separated(x_end, th_x, h_x)
        elif kind is _LaminarEnd.STOPPED:
            self.fill_laminar(x_end)
            k = _first_index_at_or_after(self.s, x_end)
            self.event(
                EventKind.LAMINAR_SEPARATION, x_end, "edge speed falls to zero: the flow stops"
            )
            self.fill_separated(x_end, float(self.theta_l[k - 1]), float(self.h_l[k - 1]))
        elif kind is _LaminarEnd.LAMINAR_SEPARATION:
            self.bubble(x_end, th_x)
        else:  # turbulent from the start, free or forced transition
            self.transition(kind, x_end, th_x)

    # ---- phase 4: the result ----
    def result(self):
        separation = None
        for e in self.events:
            if e.kind in SEPARATION_KINDS:
                separation = e
            elif e.kind is EventKind.REATTACHMENT:
                separation = None
        # anything not reached (numerical failure) is already filled by fill_separated
        if self.status is MarchStatus.COMPLETED:
            if separation is None:
                message = "boundary layer attached to the end of the surface"
            else:
                message = f"{separation.kind.replace('_', ' ')} at s = {separation.s:.4g} m"
        else:
            message = self.failure_msg
        arrays = dict(
            s=self.s,
            ue=self.ue,
            theta=self.theta,
            delta_star=self.H * self.theta,
            H=self.H,
            cf=self.cf,
            cf_free_stream=self.cf * self.ue**2,
            re_theta=self.re_theta,
            regime=self.regime,
            margin=self.margin,
        )
        for arr in arrays.values():
            arr.setflags(write=False)
        return BoundaryLayerResult(
            **arrays,
            events=self.events,
            separation=separation,
            status=self.status,
            success=self.status is MarchStatus.COMPLETED,
            message=message,
            nu=self.nu,
            speed=self.speed,
            h_separation=self.h_sep,
        )


def march_boundary_layer(
    s, ue, nu=1.46e-5, speed=30.0, transition="free", h_separation=2.4, edges=(), fit_length=0.0
) -> BoundaryLayerResult:
    """March the boundary layer along one surface from the stagnation point.

    Parameters
    ----------
    s : array_like
        Arc length from the stagnation point (m), strictly increasing, s[0] >= 0. If s[0] > 0,
        ue is taken to rise linearly from 0 at s = 0 to ue[0].
    ue : array_like
        Edge speed ratio |Ue|/V (>= 0) at s.
    nu : float
        Kinematic viscosity (m^2/s).
    speed : float
        Free-stream speed V (m/s); the edge speed is ue * speed.
    transition : {"free", "turbulent"} or float
        "free": Michel's criterion (Cebeci-Smith form); "turbulent": turbulent from the start
        (theta from Thwaites' stagnation or leading-edge value, H = 1.4); a float: transition
        forced at that arc length (m), or earlier where the free criterion is met first (a trip
        cannot delay transition).
    h_separation : float
        Turbulent separation threshold on H, 1.8..2.8 (default 2.4, common choice; Cebeci &
        Bradshaw).
    edges : sequence of float
        Arc lengths (m) of sharp convex edges; an attached layer reaching one separates there.
    fit_length : float
        Half-width (m) of the window over which the edge-speed slope is fitted (at least the 7
        nearest stations; 0: those only). See :func:`_local_quadratic_fit`.

    Returns
    -------
    BoundaryLayerResult
        Station arrays, events and status; see the class. Formulas: Thwaites (1949) with Cebeci
        & Bradshaw's fits; Michel (1951) in the Cebeci-Smith form; Head (1958) with
        Ludwieg-Tillmann (1949).

    Raises
    ------
    InputError
        Malformed or out-of-range input; the message says what and how to fix it.
    """
    s, ue, nu, speed, transition, h_sep, edges = _check_inputs(
        s, ue, nu, speed, transition, h_separation, edges
    )
    if not (isinstance(fit_length, (int, float)) and math.isfinite(fit_length) and fit_length >= 0):
        raise InputError(f"fit_length = {fit_length!r} must be a length >= 0 in metres")
    march = _March(s, ue, nu, speed, h_sep, edges, float(fit_length))
    march.laminar()
    march.run(transition)
    return march.result()
