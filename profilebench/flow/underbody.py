"""Underbody side relief: a one-dimensional gap channel with leakage through its two sides.

Why. A two-dimensional section over a ground sends all the flow that passes under the body
through the gap between the underbody and the ground: the panel solution's underbody Cp is
about -1.8 on a 4 m box at 0.2 m clearance and -2.6 on the courier van sample, along the whole
length. A vehicle of width w has side openings of the gap's height all along its length, and its
centre-line underbody pressure is held much nearer the pressure beside the car.

What is modelled. The ground-facing run of the lower surface (stations whose outward normal
points within 30 degrees of straight down, the longest such run) is a channel of height g(s) (the
station's height above the ground, y = 0) and width w, along the surface arc length s. Per unit
span, with speeds divided by V and pressures as Cp:

* flux q = u g, u the gap speed; ``dq/ds = m`` with the side leakage (both sides, per unit span)
  ``m = (2 g / w) C sign(Cp_side - Cp) sqrt|Cp_side - Cp|`` (inflow positive): the speed of a jet
  through a slot driven by the pressure difference, times the slot's contraction coefficient
  C = pi / (pi + 2) (Kirchhoff 1869; the side opening taken as a slot in a thin wall);
* momentum: fluid that leaves carries its streamwise momentum (Bernoulli holds along the gap,
  the total pressure ``H = Cp + u^2`` constant), fluid that enters from the side has none and
  must be accelerated (``g dCp/ds = -2 d(q u)/ds``, so ``dH/ds = -2 u m / g`` where m > 0):
  the quasi-one-dimensional channel with lateral mass exchange
  (the "pumping" picture of underbody flow of Cooper, Bertenyi, Dutil, Syms and Sovran, SAE
  980030, 1998, and the channel flow under a wing in extreme ground effect of Widnall and
  Barrows, J. Fluid Mech. 41, 1970, and Rozhdestvensky, Aerodynamics of a Lifting System in
  Extreme Ground Effect, 2000, whose side edges are held at the outer pressure);
* the inlet has the total pressure of the two-dimensional solution (Cp + u^2 = 1: the panel
  method's flow is potential); the inlet speed, and so the flux, is unknown;
* the exit has the pressure that the two-dimensional gap has there, so that the model reduces
  to the two-dimensional answer as w / g grows without bound (no leakage: q is constant and the
  exit pressure gives back the 2D flux). Where the body is closed by a wake (the wake model's
  passes), the channel runs on from the ground-facing run along the rest of the lower surface
  (the rear ramp, the rear bumper's arc) and under the wake's lower shear layer to the wake's
  closing face, ten heights behind the body; its exit is there. The 2D flux between the ground
  and the body with its wake is one constant, so the 2D channel is as exact there as under the
  body, and a leaking channel forgets its exit's pressure over the length it leaks: the exit
  no longer moves with the separation point. (With the channel ending at the separation point,
  a 5 mm rounding of the van's underbody rear edge moved the exit from the edge, 2D Cp -0.5, to
  the rear bumper's arc, -1.05, and Cd by 40 %; with the channel under the wake, the gap's inlet
  flux is 0.1809 and 0.1808 in the two cases; measured.) On a closed body (the first pass, which only finds the separation points) the
  channel is the ground-facing run. The base pressure is not imposed at the exit: the wake
  model of the two-dimensional solution does not impose it at the lower separation point
  either, and a model imposing it only at finite width would not reduce to the 2D answer.

The boundary-value problem (two first-order equations, one condition at each end) is solved by
shooting: a fourth-order Runge-Kutta march from the exit upstream (the stable direction) and
scipy's ``brentq`` on the exit flux until the inlet's total pressure is met (about 1.2 ms a
pass on the samples at 300 panels; ``solve_bvp`` took 30 to 800 ms for the same answer and
converged only with a loose tolerance; measured).

How it is used (:meth:`SideRelief.solve`, on every panel solve of the analysis: the closed
body's and each wake body's). The 2D panel solution gives the channel its heights and the 2D
channel (constant flux ``q_2d`` fitted to the panel solution's gap by least squares in Cp); the
leaking channel's side flow ``m(s)`` then goes back into the panel solution as a normal speed
through the channel's panels (a transpiration velocity, one more back-substitution on the
factored panel system): the flow round the whole body then carries the flux the gap really
passes, so the front stagnation point, the front face and the upper surface move with it
(without this step, a change at the rear that changed the 2D section's gap flux moved the
front's pressures and the windscreen's as if the gap were sealed at its sides). The panel
solution with the leakage is lossless: fluid drawn in from the sides keeps the free stream's
total pressure there, which the channel's momentum balance does not allow (without that loss
the gap's suction runs away toward its exit: Cp -3 on the hatch's rear ramp; measured). On the
channel's stations its edge speed is therefore multiplied by the ratio of the channel's speed
to that of the lossless channel with the same leakage fitted to it, ``r(s) = sqrt(1 - Cp_w) /
(q_t(s) / g)`` with ``q_t = q_0 + integral of m ds`` (``q_0`` fitted as ``q_2d`` is), and its
Cp becomes ``1 - ue^2``: the panel solution's local detail (a fillet's suction peak) stays and
the level is the leaking channel's; r tends to 1 as w grows. Ahead of the channel, the lower
surface from the stagnation point down the front face and round the front lower corner carries
the flow into the gap: the inlet's ratio is faded in linearly in arc length from the
stagnation point (where the edge speed is 0 whatever the flux) to the inlet, so that the edge
speed does not jump there. (Fading it in over the ground-facing part of the corner only made
the edge speed fall along the corner, an adverse gradient that is not in the flow: the van's
and the minibus's front lower corners separated; measured.) Solving the leakage and the panel
solution together instead (Newton's method on the leakage through every lower panel, the
channel's loss carried along the surface) was tried: the closed body's gap ran away to Cp -40
toward its rear stagnation point, where nothing holds the gap's exit; measured, not taken.
The relieved pressures set the underbody's boundary-layer march (and so its separation, and
the wake placed there), the pressure drag and the lift.

What it is not. The side pressure is taken as ambient (Cp_side = 0; the flanks of a vehicle
see somewhat lower pressures: common practice, no source), the flow across the width is not
resolved (the centre line's pressure stands for the gap's), and friction in the gap is left to
the boundary-layer march. A screening estimate of the order of the relief, not an underbody
design tool.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np

__all__ = [
    "SIDE_CONTRACTION",
    "SIDE_PRESSURE",
    "GAP_FACING",
    "UnderbodyRelief",
    "SideRelief",
    "gap_run",
    "channel_cp",
]

# contraction coefficient of a jet from a slot in a thin wall, pi / (pi + 2) = 0.611 (Kirchhoff
# 1869, free-streamline theory): the side openings of the gap taken as such slots
SIDE_CONTRACTION = math.pi / (math.pi + 2.0)
# pressure beside the gap's side openings: ambient (common practice, no source)
SIDE_PRESSURE = 0.0
# a station belongs to the gap when its outward normal points within 30 degrees of straight down
# (n_y <= -cos 30 deg): the part of the underbody that is nearly parallel to the ground, where a
# channel of slowly varying height stands for the flow (a choice of this project, no source)
GAP_FACING = math.cos(math.radians(30.0))
# the leakage's square root is smoothed over this much Cp round the side pressure, so that its
# slope stays finite for the solver (1e-3 in Cp: far below anything the model resolves)
_SMOOTH_CP = 1e-3
_MIN_STATIONS = 4
# the exit-flux bracket is first split at this share of the no-leakage flux (see channel_cp)
_SPLIT = 0.7
# ... and the exit flux is found to this share of it (the samples' and the boxes' Cd and Cl the
# same to 4 digits as at 1e-9; the inlet's total pressure is very sensitive to the exit flux
# where the gap sits at the side pressure, so a tighter tolerance costs marches; measured)
_FLUX_TOL = 1e-4
# the gap's speed may not fall below this share of the 2D section's anywhere (else the channel is
# said not to hold: a layer marched into a stagnating gap means nothing)
_MIN_SPEED_RATIO = 0.05
# the channel beyond the ground-facing run ends where its gap first exceeds this many times the
# run's largest (a choice of this project, no source: a channel 9 times the run's gap high,
# under a wake that left the top of the van's rear face, had no solution; measured)
_CHANNEL_RISE = 4.0
# the channel under the wake ends this many leakage lengths w / (2 C) beyond the run (its
# exit pressure then differs from the side pressure by exp(-4) of the 2D exit's; a choice of this
# project, to spare the channel's march the rest of the 10-height wake)
_CHANNEL_REACH = 4.0
# Gauss-Newton steps of the lossless channel's fit (its residual is nearly linear in the flux:
# the flux's change in the last step is below 1e-12 of it on the samples after 4; measured)
_FIT_STEPS = 6


@dataclass(frozen=True, eq=False)
class UnderbodyRelief:
    """The side-relief model's outcome for one lower surface.

    ``applied`` False: the panel solution is kept (``message`` says why). Otherwise ``s`` (m,
    surface arc length), ``gap`` (m), ``cp_2d`` (the panel solution) and ``cp`` (relieved) of the
    ground-facing run's stations, ``index`` the channel's panels (the run, and where the body is
    closed by a wake the lower surface behind it and the wake's lower shear layer) and
    ``leakage`` the side inflow through them (normal speed / V, inflow to the gap positive),
    ``flux_ratio`` the inlet flux with the width over the 2D channel's, and the length-weighted
    mean Cp of the run before and after.
    """

    width: float
    applied: bool
    message: str
    s: np.ndarray | None = None
    gap: np.ndarray | None = None
    cp_2d: np.ndarray | None = None
    cp: np.ndarray | None = None
    index: np.ndarray | None = None
    flux_ratio: float | None = None
    mean_cp_2d: float | None = None
    mean_cp: float | None = None
    # the side leakage through the panels ``index`` (outward normal speed / V; inflow to the gap
    # positive)
    leakage: np.ndarray | None = None

    def note(self) -> str:
        """One line for the result's notes."""
        if not self.applied:
            return f"underbody side relief (width {self.width:.3g} m) not applied: {self.message}"
        return (
            f"underbody side relief for a width of {self.width:.3g} m: mean underbody Cp "
            f"{self.mean_cp:.2f} (the 2D section's {self.mean_cp_2d:.2f} on the same wake), gap "
            f"inlet flux {self.flux_ratio:.2f} of the 2D section's (a one-dimensional gap channel "
            "leaking through its sides; see docs/validation.md)"
        )


def gap_run(normal_y, stations=None):
    """(first, last) positions of the longest run of ground-facing stations, or None.

    ``normal_y``: the outward normal's y component at the surface's stations (in marching
    order); a station faces the ground when ``normal_y <= -GAP_FACING``. ``stations`` (optional
    bool mask) limits the run to those stations.
    """
    facing = np.asarray(normal_y, dtype=float) <= -GAP_FACING
    if stations is not None:
        facing &= np.asarray(stations, dtype=bool)
    best = None
    k = 0
    n = len(facing)
    while k < n:
        if not facing[k]:
            k += 1
            continue
        j = k
        while j + 1 < n and facing[j + 1]:
            j += 1
        if best is None or j - k > best[1] - best[0]:
            best = (k, j)
        k = j + 1
    return best


def _path_length(x, y):
    """Distance along the polyline through the points (x, y) from the first, m."""
    return np.concatenate([[0.0], np.cumsum(np.hypot(np.diff(x), np.diff(y)))])


def _leak(cp, gap, width, side_pressure, contraction):
    """Side inflow per unit length and unit span (V m / m; negative: outflow)."""
    d = side_pressure - cp
    return (2.0 * gap / width) * contraction * d / np.sqrt(np.abs(d) + _SMOOTH_CP)


def _march_plan(s, g, width, contraction):
    """The march's steps from the exit to the inlet, the same for every exit flux tried.

    Each station interval is cut into steps no longer than half the leakage's relaxation length
    (its equations are stiff where the gap sits at the side pressure). A step is (h, station it
    ends at or None, and for its start, middle and end the leakage factor k g and 1 / g), with
    k = 2 C / w.
    """
    k_leak = 2.0 * contraction / width
    relax = 0.5 * math.sqrt(_SMOOTH_CP) / (k_leak * float(np.max(g)))
    s_list = s.tolist()
    g_list = g.tolist()
    plan = []
    for i in range(len(s_list) - 1, 0, -1):
        length = s_list[i] - s_list[i - 1]
        steps = max(1, int(math.ceil(length / relax)))
        g0 = g_list[i]
        dg = (g_list[i - 1] - g0) / steps
        for j in range(steps):
            ga = g0 + dg * j
            gm, gb = ga + 0.5 * dg, ga + dg
            plan.append(
                (
                    -length / steps,
                    i - 1 if j == steps - 1 else None,
                    k_leak * ga,
                    1.0 / ga,
                    k_leak * gm,
                    1.0 / gm,
                    k_leak * gb,
                    1.0 / gb,
                )
            )
    return plan


def _march_upstream(q_exit, plan, n, g_exit, exit_cp, side_pressure):
    """(q, H) at the ``n`` stations, marched from the exit state (q_exit, exit_cp) to the inlet.

    Classical fourth-order Runge-Kutta on the steps of ``plan`` (:func:`_march_plan`), the
    right-hand side written out: dq/ds = m, dH/ds = -2 u m / g where m > 0, else 0. Upstream
    the gap's deviation from the side pressure decays, so the march is stable in this direction
    (downstream it is not).
    """
    q_out = np.empty(n)
    h_out = np.empty(n)
    q = float(q_exit)
    h = float(exit_cp) + (q / float(g_exit)) ** 2
    q_out[-1], h_out[-1] = q, h
    sqrt = math.sqrt
    smooth = _SMOOTH_CP
    side = float(side_pressure)
    for step, station, ka, ia, km, im, kb, ib in plan:
        u = q * ia
        d = side - h + u * u
        a1 = ka * d / sqrt(abs(d) + smooth)
        b1 = -2.0 * u * a1 * ia if a1 > 0.0 else 0.0
        half = 0.5 * step
        q2, h2 = q + half * a1, h + half * b1
        u = q2 * im
        d = side - h2 + u * u
        a2 = km * d / sqrt(abs(d) + smooth)
        b2 = -2.0 * u * a2 * im if a2 > 0.0 else 0.0
        q3, h3 = q + half * a2, h + half * b2
        u = q3 * im
        d = side - h3 + u * u
        a3 = km * d / sqrt(abs(d) + smooth)
        b3 = -2.0 * u * a3 * im if a3 > 0.0 else 0.0
        q4, h4 = q + step * a3, h + step * b3
        u = q4 * ib
        d = side - h4 + u * u
        a4 = kb * d / sqrt(abs(d) + smooth)
        b4 = -2.0 * u * a4 * ib if a4 > 0.0 else 0.0
        sixth = step / 6.0
        q += sixth * (a1 + 2.0 * a2 + 2.0 * a3 + a4)
        h += sixth * (b1 + 2.0 * b2 + 2.0 * b3 + b4)
        if station is not None:
            q_out[station], h_out[station] = q, h
    return q_out, h_out


def channel_cp(
    s,
    gap,
    width,
    exit_cp,
    total=1.0,
    side_pressure=SIDE_PRESSURE,
    contraction=SIDE_CONTRACTION,
):
    """Solve the leaking gap channel: (success, message, q(s), Cp(s)) at the stations ``s``.

    ``s`` (m, increasing) and ``gap`` (m, > 0): the channel's stations and heights; ``width``
    (m, > 0, or ``math.inf``: no leakage); ``exit_cp``: the pressure at the exit (the last
    station); ``total``: the inlet's total pressure as Cp (1 for the free stream's). Speeds are
    divided by V, the flux q = u g per unit span (m). The equations are those of the module
    docstring, in the state (q, H) with H = Cp + u^2 the total pressure: dq/ds = m and
    dH/ds = -2 u max(m, 0) / g. Solved by shooting: the exit flux is found with scipy's
    ``brentq`` so that the march from the exit (:func:`_march_upstream`) arrives at the inlet
    with the inlet's total pressure.
    """
    s_in = np.asarray(s, dtype=float)
    g_in = np.asarray(gap, dtype=float)
    s, g = s_in, g_in
    if not exit_cp < total:
        return False, "the gap's exit pressure is not below the inlet's total pressure", None, None
    q_top = float(g[-1] * math.sqrt(total - exit_cp))
    if math.isinf(width):
        return True, "no leakage", np.full(len(s_in), q_top), total - (q_top / g_in) ** 2

    marched = {}  # exit flux -> (q, H): brentq evaluates its bracket's ends again
    plan = _march_plan(s, g, width, contraction)

    def march(q_exit):
        key = float(q_exit)
        if key not in marched:
            marched[key] = _march_upstream(key, plan, len(s), g[-1], exit_cp, side_pressure)
        return marched[key]

    def miss(q_exit):
        return float(march(q_exit)[1][0] - total)

    with np.errstate(all="ignore"):
        q_exit = _exit_flux(miss, q_top)
    if q_exit is None:
        return False, "the gap channel has no solution (no exit flux meets the inlet)", None, None
    q_c, h_c = march(q_exit)
    q = np.interp(s_in, s, q_c)
    cp = np.interp(s_in, s, h_c) - (q / g_in) ** 2
    if not (np.all(np.isfinite(q)) and np.all(np.isfinite(cp))):
        return False, "the gap channel's solution is not finite", None, None
    return True, "converged", q, cp


def _exit_flux(miss, q_top):
    """The exit flux where ``miss`` (the inlet's total pressure less the wanted) is 0, or None.

    With the whole exit speed ``q_top`` the total pressure only rises upstream (inflow lowers it
    downstream): miss >= 0; with a vanishing exit flux the inlet's total pressure is about the
    exit's pressure: miss < 0. The root lies at 70-95 % of ``q_top`` on the samples and the
    boxes, so the bracket is split there first and scipy's brentq takes 5 to 7 marches (the
    secant method from there strayed into the steep part at small fluxes on the minibus;
    measured).
    """
    from scipy.optimize import brentq

    f_top = miss(q_top)
    if f_top == 0.0:
        return q_top
    high, low = q_top, _SPLIT * q_top
    f_mid = miss(low)
    if not f_mid < 0.0:
        high, low = low, 1e-6 * q_top
        f_low = miss(low)
        if not (f_low < 0.0 < f_mid and math.isfinite(f_low)):
            return None
    elif not f_top > 0.0:
        return None
    return float(brentq(miss, low, high, xtol=_FLUX_TOL * q_top, rtol=_FLUX_TOL))


@dataclass(frozen=True)
class SideRelief:
    """The side-relief model for a vehicle of ``width`` (m), applied to a panel solution.

    Built by :func:`profilebench.assess.solve.solve_flow` when the conditions ask for it and
    passed to :func:`~profilebench.flow.profile_flow.solve_profile_flow`, which calls
    :meth:`apply` on the lower surface before each march of it.
    """

    width: float
    side_pressure: float = SIDE_PRESSURE
    contraction: float = SIDE_CONTRACTION

    def solve(self, points, ground=True, kutta_node=None, wake_panels=()):
        """(inviscid, UnderbodyRelief): the panel solution of ``points`` with the gap relieved.

        ``wake_panels``: where ``points`` is a body closed by a wake, the indices of the panels
        of the wake's lower shear layer, from the separation point downstream (the channel runs
        on under the wake); empty for a closed body (the channel ends with the ground-facing
        run). Steps:

        1. the panel solution without leakage (the 2D section's) and its lower surface;
        2. the gap channel (:func:`channel_cp`) along the channel's stations (see the module
           docstring), and the 2D channel fitted to the panel solution there;
        3. the channel's side leakage as a normal speed through those panels, and the panel
           solution with it (one more back-substitution on the factored system,
           :class:`~profilebench.flow.panel.TranspirationResponse`): the flow round the whole
           body with the gap's flux taken out at its sides, so that the front stagnation point,
           the front face and the upper surface see the flux the gap really passes;
        4. on the channel's stations, that solution's edge speed times the ratio of the
           channel's speed to the lossless channel with the same leakage fitted to it (the
           total pressure the side inflow costs, and the level the channel's exit sets), faded
           in from the stagnation point to the channel's inlet.

        The panel solution without leakage, unchanged, where the model does not apply (the
        UnderbodyRelief says why).
        """
        from profilebench.flow.panel import transpiration_response
        from profilebench.flow.stagnation import split_surfaces

        base, response = transpiration_response(points, ground=ground, kutta_node=kutta_node)

        def kept(why):
            return base, UnderbodyRelief(self.width, False, why)

        if response is None:
            return base, None
        if not ground:
            return kept("there is no ground under the body")
        split = split_surfaces(base)
        if not split.success:
            return kept(split.message)
        idx = np.asarray(split.lower.index, dtype=int)
        wake = np.asarray(wake_panels, dtype=int)
        on_wake = np.isin(idx, wake)
        if on_wake.any():  # the lower surface runs on along the wake: its body part
            idx = idx[: int(np.argmax(on_wake))]
        ny_all = np.asarray(base.normal, dtype=float)[:, 1]
        x_all = np.asarray(base.x, dtype=float)
        y_all = np.asarray(base.y, dtype=float)
        run = gap_run(ny_all[idx], stations=y_all[idx] > 0.0)
        if run is None or run[1] - run[0] + 1 < _MIN_STATIONS:
            return kept("no part of the underbody faces the ground over enough stations")
        a, b = run
        s_low = np.asarray(split.lower.s, dtype=float)[1:]
        sr, gr = s_low[a : b + 1], y_all[idx[a : b + 1]]
        if sr[-1] - sr[0] < 2.0 * float(gr.max()):
            return kept("the ground-facing part is shorter than twice its gap")
        # the channel's panels, in the flow's order: from the run's start along the rest of the
        # lower surface and on under the wake, or the run alone on a closed body
        if wake.size:
            chan = np.concatenate([idx[a:], wake])
            # ... as long as it stays a gap: up to the first station beyond the run higher than
            # _CHANNEL_RISE times the run's largest gap (a layer that stays attached up a rear
            # face leaves its wake far above the ground, where no channel holds)
            high = np.flatnonzero(y_all[chan[b - a + 1 :]] > _CHANNEL_RISE * float(gr.max()))
            if high.size:
                chan = chan[: b - a + 1 + int(high[0])]
            # ... and no further than _CHANNEL_REACH leakage lengths w / (2 C) beyond the run,
            # where its exit has forgotten the 2D one (exp(-4), 2 %)
            along = _path_length(x_all[chan], y_all[chan])
            reach = _CHANNEL_REACH * self.width / (2.0 * self.contraction)
            chan = chan[along <= along[b - a] + reach]
        else:
            chan = idx[a : b + 1]
        xc, gc = x_all[chan], y_all[chan]
        sc = sr[0] + _path_length(xc, gc)
        if not (np.all(gc > 0.0) and np.all(np.diff(sc) > 0.0)):
            return kept("the gap channel's stations do not follow one another")
        cpc = np.asarray(base.cp, dtype=float)[chan]
        dsc = np.gradient(sc)
        # the 2D channel: constant flux fitted to the panel solution's gap (least squares in Cp)
        q2 = float(np.sum((1.0 - cpc) / gc**2 * dsc) / np.sum(dsc / gc**4))
        if not q2 > 0.0:
            return kept("the 2D section has no flow through the gap")
        cp_ref = 1.0 - q2 / gc**2
        # the exit's pressure: the 2D channel's where the channel ends with the run; beyond it
        # (under the wake) the leaking channel forgets the 2D exit over the length its sides
        # take to pass its own section, w / (2 C): the exit tends to the side pressure as
        # exp(-L / (w / 2C)), L the channel's length beyond the run (so that it is the 2D
        # section's as w grows; a 2D exit 4 heights high under the wake, Cp 0.45 after the 2D
        # channel's diffusion, could not be met by the leaking channel at all; measured)
        beyond = float(sc[-1] - sc[b - a])  # the channel always holds the whole run
        fade = math.exp(-beyond * 2.0 * self.contraction / self.width)
        exit_cp = self.side_pressure + (float(cp_ref[-1]) - self.side_pressure) * fade
        ok, why, q, cp_w = channel_cp(
            sc,
            gc,
            self.width,
            exit_cp,
            side_pressure=self.side_pressure,
            contraction=self.contraction,
        )
        if not ok:
            return kept(why)
        if not (np.all(1.0 - cp_w > 0.0) and float(np.min(q)) > 0.0):
            return kept(
                "the gap flow stagnates: the one-dimensional channel does not hold for so narrow "
                "or so long a gap"
            )
        # the side leakage (inflow to the gap positive: a normal speed out of the body into it)
        leak = _leak(cp_w, gc, self.width, self.side_pressure, self.contraction)
        ue_t = np.asarray(base.ue, dtype=float) + response.change(chan, leak)
        cp_t = 1.0 - ue_t**2
        # the lossless channel with the same leakage, fitted to that solution: flux q0 + Q(s),
        # q0 by least squares in Cp as the 2D channel's (Gauss-Newton from it; without leakage
        # it is the 2D channel's exactly)
        added = np.concatenate([[0.0], np.cumsum(0.5 * (leak[1:] + leak[:-1]) * np.diff(sc))])
        room_t = 1.0 - cp_t[chan]
        q0 = math.sqrt(float(np.sum(room_t / gc**2 * dsc) / np.sum(dsc / gc**4)))
        for _ in range(_FIT_STEPS):
            q_t = q0 + added
            res = room_t - (q_t / gc) ** 2
            jac = -2.0 * q_t / gc**2
            q0 -= float(np.sum(dsc * jac * res) / np.sum(dsc * jac * jac))
        q_t = q0 + added
        if not float(np.min(q_t)) > 0.0:
            return kept("the gap flow with the side leakage reverses")
        ratio = np.sqrt((1.0 - cp_w) / (q_t / gc) ** 2)
        if float(ratio.min()) < _MIN_SPEED_RATIO:
            return kept(
                f"the gap flow nearly stagnates (speed {ratio.min():.2g} of the lossless "
                "channel's): the one-dimensional channel does not hold for so narrow or so long "
                "a gap"
            )
        relieved = dataclasses.replace(base, ue=ue_t, cp=cp_t)
        split_t = split_surfaces(relieved)
        if not split_t.success:
            return kept(f"with the side leakage, {split_t.message}")
        # ahead of the channel, the lower surface from the (moved) stagnation point carries the
        # flow into it: the inlet's ratio faded in linearly in arc length from the stagnation
        # point (where the edge speed is 0 whatever the flux) to the inlet
        idx_t = np.asarray(split_t.lower.index, dtype=int)
        s_t = np.asarray(split_t.lower.s, dtype=float)[1:]
        first = np.flatnonzero(idx_t == chan[0])
        factor = np.ones(len(ue_t))
        if first.size:
            k0 = int(first[0])
            factor[idx_t[:k0]] = 1.0 + (float(ratio[0]) - 1.0) * s_t[:k0] / s_t[k0]
        factor[chan] = ratio
        ue = ue_t * factor
        cp = 1.0 - ue**2
        if not (np.all(np.isfinite(ue)) and np.all(np.isfinite(cp))):
            return kept("the flow with the side leakage is not finite")
        for arr in (ue, cp):
            arr.setflags(write=False)
        relieved = dataclasses.replace(
            base,
            ue=ue,
            cp=cp,
            message=base.message + f"; side leakage through {chan.size} gap panels",
        )
        run_idx = idx[a : b + 1]
        ds = np.gradient(sr)
        cp_2d = np.asarray(base.cp, dtype=float)[run_idx]
        cp_run = cp[run_idx]
        relief = UnderbodyRelief(
            width=self.width,
            applied=True,
            message="applied",
            s=sr,
            gap=gr,
            cp_2d=cp_2d,
            cp=cp_run,
            index=chan,
            flux_ratio=float(q[0] / math.sqrt(q2)),
            mean_cp_2d=float(np.sum(cp_2d * ds) / np.sum(ds)),
            mean_cp=float(np.sum(cp_run * ds) / np.sum(ds)),
            leakage=leak,
        )
        return relieved, relief
