"""Both surfaces of a profile: inviscid solve, split at the stagnation point, boundary-layer marches.

:func:`solve_profile_flow` is the flow part of the analysis pipeline. It runs
:func:`~profilebench.flow.panel.solve_inviscid`, splits the outline at the front stagnation point
into an upper and a lower surface, and marches the boundary layer along each from the stagnation
point with :func:`~profilebench.flow.boundary_layer.march_boundary_layer`.

Corner bubbles. A layer that separates at a corner with a long run of surface behind it (a bonnet
leading edge followed by the bonnet and the roof) reattaches in practice: the separated shear layer
becomes turbulent and closes onto the surface. When the surface left behind the separation point
is at least ``reattach_length`` long, the march is restarted there as a fully turbulent layer (a
fresh turbulent start, which underestimates the thickness after the bubble: the downstream
separation it predicts is on the optimistic side) and the separation is recorded as a corner
bubble. The drag of such a bubble is not in the pressure integral (the bubble region keeps its
inviscid Cp); it is carried by the empirical corner correction (see profilebench.assess.drag).
``reattach_length = None`` turns the restart off: the first separation is final. In the wake
model's second march the surface ends at the wake; the length left behind a separation is then
counted on the closed body (the surface to the wake plus the closed body's surface behind its
final separation), so a separation that the shortened surface alone would make final (say one
just behind the stagnation point) restarts as it would on the closed body.
"""

from __future__ import annotations

import dataclasses
import math
import enum
from dataclasses import dataclass

import numpy as np

from profilebench.enums import TextEnum
from profilebench.flow.base_pressure import BaseEstimate, LayerBasePressure
from profilebench.flow.boundary_layer import BoundaryLayerResult, EventKind, march_boundary_layer
from profilebench.errors import InputError, ProfileBenchError
from profilebench.flow.panel import InviscidSolution, InviscidStatus, solve_inviscid
from profilebench.flow.stagnation import Surface, split_surfaces
from profilebench.flow.underbody import UnderbodyRelief
from profilebench.geometry.polyline import (
    arc_length,
    edge_lengths,
    edges,
    is_clockwise,
    midpoints,
    outward_normals,
)

__all__ = [
    "FlowStatus",
    "SurfaceName",
    "SURFACE_NAMES",
    "SurfaceFlow",
    "ProfileFlow",
    "solve_profile_flow",
    "march_surface",
    "BubbleRestart",
    "ClosedBodySplit",
    "closed_body_split",
    "march_surface_flow",
]


class SurfaceName(TextEnum):
    """The two surfaces of a profile, split at the front stagnation point."""

    UPPER = "upper"
    LOWER = "lower"


SURFACE_NAMES = (SurfaceName.UPPER, SurfaceName.LOWER)


class FlowStatus(enum.Enum):
    SUCCESS = "success"
    INVISCID_FAILED = "inviscid solve failed"
    BOUNDARY_LAYER_FAILED = "boundary-layer march failed"
    BASE_PRESSURE_FAILED = "base pressure not found"  # the correlation does not hold here


@dataclass(frozen=True)
class BubbleRestart:
    """A corner separation after which the march was restarted turbulent (surface arc length, m)."""

    s: float
    kind: EventKind


@dataclass(frozen=True)
class SurfaceFlow:
    """One surface: its edge speed (``surface``), its boundary layer (``bl``) and any restarts."""

    name: SurfaceName
    surface: Surface
    bl: BoundaryLayerResult
    restarts: tuple[BubbleRestart, ...]
    edges: tuple[float, ...]  # surface arc lengths of the sharp edges passed to the march
    perimeter: float  # outline length (m)

    @property
    def direction(self) -> int:
        """+1 if the surface runs in the direction of the outline's points, else -1."""
        return int(self.surface.direction)

    def outline_s(self, s_surface):
        """Outline arc length (along the inviscid result's s) of surface arc lengths."""
        s = np.asarray(s_surface, dtype=float)
        return np.mod(self.surface.s_start + self.direction * s, self.perimeter)

    def surface_s(self, sigma):
        """Surface arc length of an outline arc length, or None if it is not on this surface."""
        s = float(np.mod(self.direction * (sigma - self.surface.s_start), self.perimeter))
        if s > self.perimeter - 1e-6:  # a hair before the start (rounding)
            s = 0.0
        return min(s, float(self.surface.s_end)) if s <= float(self.surface.s_end) + 1e-6 else None


@dataclass(frozen=True)
class ProfileFlow:
    """Inviscid solution, the two surfaces' boundary layers, and the separated stations."""

    status: FlowStatus
    message: str
    inviscid: InviscidSolution
    upper: SurfaceFlow | None = None
    lower: SurfaceFlow | None = None
    separated: np.ndarray | None = None  # bool over the inviscid stations
    station_surface: np.ndarray | None = None  # 0 upper, 1 lower, per inviscid station
    station_bl: np.ndarray | None = None  # index into that surface's bl arrays
    closed: "ProfileFlow | None" = None  # the closed-body solution (wake model only; on
    # the coarser points when closed_points was used)
    wake_points: np.ndarray | None = None  # outline of body + wake body (wake model only)
    # relaxation lengths (m) of the upper and lower shear layers of the wake body: 0 where the
    # layer leaves downstream (see profilebench.flow.profile_flow._DEPARTURE_START)
    departure: tuple[float, float] = (0.0, 0.0)
    attached: np.ndarray | None = None  # attached share (0 to 1) of each inviscid panel
    # the underbody side-relief model's outcome for this flow's lower surface, or None when the
    # model was not asked for (see profilebench.flow.underbody)
    underbody: UnderbodyRelief | None = None
    # the base pressure (Cp) the separated stations and the base drag take, and how it was found
    # from the layers at separation (None with a base pressure given as a number)
    base_pressure: float | None = None
    base_estimate: BaseEstimate | None = None

    @property
    def success(self) -> bool:
        return self.status is FlowStatus.SUCCESS

    @property
    def surfaces(self):
        return tuple(s for s in (self.upper, self.lower) if s is not None)


def _edges_on_surface(edge_sigma, surface, direction, perimeter):
    """Surface arc lengths of outline arc lengths ``edge_sigma`` that lie within the surface."""
    s_end = float(surface.s[-1])
    out = []
    for sig in edge_sigma:
        s = float(np.mod(direction * (sig - surface.s_start), perimeter))
        if 0.0 < s < s_end:
            out.append(s)
    return tuple(sorted(out))


def _merge(first, second, s_offset, i_offset):
    """Join a boundary layer result and the one restarted at station ``i_offset``."""

    fields = {}
    for f in dataclasses.fields(first):
        a = getattr(first, f.name)
        b = getattr(second, f.name)
        if isinstance(a, np.ndarray) and a.ndim == 1 and isinstance(b, np.ndarray):
            if f.name == "s":
                b = b + s_offset
            fields[f.name] = np.concatenate([a[:i_offset], b])
        else:
            fields[f.name] = a
    # the restarted march starts turbulent: its own "transition" at its first station is not a
    # transition of the real layer, so it is dropped
    shifted = tuple(
        dataclasses.replace(e, s=e.s + s_offset, index=e.index + i_offset)
        for e in second.events
        if not (e.kind is EventKind.TRANSITION and e.index <= 1)
    )
    kept = tuple(e for e in first.events if e.index <= i_offset)
    fields["events"] = list(kept + shifted)
    fields["separation"] = (
        dataclasses.replace(
            second.separation,
            s=second.separation.s + s_offset,
            index=second.separation.index + i_offset,
        )
        if second.separation is not None
        else None
    )
    for name in ("status", "message"):
        if name in fields:
            fields[name] = getattr(second, name)
    return type(first)(**fields)


# Stations kept behind ``stop_s + 2 fit_length`` by a march that stops early (march_surface): more
# than the 2 x 2 + 1 nearest stations of the edge-speed fit's window and the few a laminar
# separation test between stations looks at (a choice of this project, no source).
STOP_TAIL_STATIONS = 8


def march_surface(
    s,
    ue,
    nu,
    speed,
    transition,
    h_separation,
    edges,
    reattach_length,
    restart_hints=(),
    hint_tolerance=0.0,
    beyond=0.0,
    fit_length=0.0,
    stop_s=None,
):
    """March one surface, restarting turbulent after corner bubbles (see module docstring).

    ``s``, ``ue``, ``nu``, ``speed``, ``transition``, ``h_separation``, ``edges``,
    ``fit_length``: as for :func:`~profilebench.flow.boundary_layer.march_boundary_layer`.
    ``reattach_length`` (m or None): a separation with at least this much surface behind it is
    a corner bubble, and the march restarts turbulent just behind it. Returns
    ``(BoundaryLayerResult, tuple of BubbleRestart)``.

    ``restart_hints``: arc lengths where an earlier march of the same surface restarted; a
    separation within ``hint_tolerance`` of one restarts too (so the wake-model march keeps the
    closed-body march's corner bubbles although its surface ends earlier). ``beyond``: length
    (m) of the closed body's surface behind this surface's end, counted in the surface left
    behind a separation (the wake-model march; see the module docstring).

    ``stop_s`` (m or None): march only up to about this arc length. The stations are cut
    :data:`STOP_TAIL_STATIONS` stations and two ``fit_length`` behind it (so that the edge-speed
    fits up to ``stop_s`` see the same stations), the length cut off counts in ``beyond``, and
    the restart's first station is placed as on the whole surface: up to ``stop_s`` the result
    is the whole surface's (the smallest-attached-radius search needs the layer only to just
    past its corner). None: the whole surface.
    """
    s = np.asarray(s, dtype=float)
    ue = np.asarray(ue, dtype=float)
    span = float(s[-1] - s[0])  # the whole surface's, whatever is cut off
    if stop_s is not None:
        keep = int(np.searchsorted(s, float(stop_s) + 2.0 * fit_length, side="right"))
        keep = max(keep + STOP_TAIL_STATIONS, 4)
        if keep < len(s):
            beyond = beyond + float(s[-1] - s[keep - 1])
            s, ue = s[:keep], ue[:keep]
            edges = tuple(e for e in edges if e <= s[-1])
    bl = march_boundary_layer(
        s,
        ue,
        nu=nu,
        speed=speed,
        transition=transition,
        h_separation=h_separation,
        edges=edges,
        fit_length=fit_length,
    )
    restarts = []
    while reattach_length is not None and bl.success and bl.separation is not None:
        sep = bl.separation
        i0 = int(sep.index) + 1
        hinted = any(abs(float(sep.s) - h) <= hint_tolerance for h in restart_hints)
        if i0 >= len(s) - 3 or (s[-1] - s[i0] + beyond < reattach_length and not hinted):
            break
        rest_s = s[i0:] - s[i0]
        # a fresh turbulent start needs a small positive first station
        rest_s = rest_s + max(1e-4, 1e-3 * span)
        rest_edges = tuple(e - s[i0] + rest_s[0] for e in edges if e > s[i0])
        tail = march_boundary_layer(
            rest_s,
            ue[i0:],
            nu=nu,
            speed=speed,
            transition="turbulent",
            h_separation=h_separation,
            edges=rest_edges,
            fit_length=fit_length,
        )
        if not tail.success:
            break
        restarts.append(BubbleRestart(s=float(sep.s), kind=EventKind(sep.kind)))
        bl = _merge(bl, tail, s_offset=float(s[i0] - rest_s[0]), i_offset=i0)
    return bl, tuple(restarts)


def _marched(
    res,
    surfaces,
    names,
    perimeter,
    edge_sigma,
    nu,
    speed,
    transition,
    h_separation,
    reattach_length,
    fallback_separation=None,
    restart_hints=None,
    beyond=(0.0, 0.0),
    fit_length=0.0,
    underbody=None,
):
    """March the given surfaces (in original-outline terms) and assemble a ProfileFlow.

    ``underbody``: the side-relief model's outcome for the panel solution ``res`` (see
    :meth:`~profilebench.flow.underbody.SideRelief.solve`), reported with the flow.
    """
    n = len(res.s)
    flows = []
    station_surface = np.full(n, -1, dtype=int)
    station_bl = np.zeros(n, dtype=int)
    separated = np.zeros(n, dtype=bool)
    attached = np.ones(n)
    panel_length = np.asarray(res.panel_length, dtype=float)
    for k, (name, sf) in enumerate(zip(names, surfaces)):
        edges = _edges_on_surface(edge_sigma, sf, int(sf.direction), perimeter)
        s = np.asarray(sf.s, dtype=float)
        ue = np.asarray(sf.ue, dtype=float)
        hints = () if restart_hints is None else restart_hints[k]
        tol = 0.0 if reattach_length is None else 0.1 * reattach_length
        bl, restarts = march_surface(
            s,
            ue,
            nu,
            speed,
            transition,
            h_separation,
            edges,
            reattach_length,
            hints,
            tol,
            beyond[k],
            fit_length,
        )
        if not bl.success:
            return ProfileFlow(
                FlowStatus.BOUNDARY_LAYER_FAILED, f"{name} surface: {bl.message}", res
            )
        if (
            bl.separation is None
            and fallback_separation is not None
            and fallback_separation[k] is not None
        ):
            # the wake starts here: the layer leaves the surface at its end, as the closed-body
            # march found
            first = fallback_separation[k]
            ev = dataclasses.replace(first, s=float(s[-1]), index=len(s) - 1)
            bl = dataclasses.replace(bl, separation=ev, events=list(bl.events) + [ev])
        flows.append(
            SurfaceFlow(
                name=SurfaceName(name),
                surface=sf,
                bl=bl,
                restarts=restarts,
                edges=edges,
                perimeter=perimeter,
            )
        )
        idx = np.asarray(sf.index, dtype=int)
        offset = len(bl.s) - len(idx)  # station 0 is the stagnation point itself
        station_surface[idx] = k
        station_bl[idx] = np.arange(len(idx)) + offset
        if bl.separation is not None:
            s_st = np.asarray(bl.s)[offset:]
            separated[idx] = s_st > bl.separation.s
            # the panel the layer leaves on counts attached up to the separation point only, so
            # that the forces move continuously with the separation point, not panel by panel
            half = 0.5 * panel_length[idx]
            attached[idx] = np.clip(
                (float(bl.separation.s) - (s_st - half)) / (2.0 * half), 0.0, 1.0
            )
    separated[station_surface < 0] = True  # stations beyond both surfaces' ends lie in the wake
    attached[station_surface < 0] = 0.0
    return ProfileFlow(
        FlowStatus.SUCCESS,
        "converged",
        res,
        flows[0],
        flows[1],
        separated,
        station_surface,
        station_bl,
        attached=attached,
        underbody=underbody,
    )


def _geometric(start, stop, first, growth=1.2, max_step=None):
    """Points from ``start`` to ``stop`` (scalars): steps from ``first`` growing by ``growth`` up
    to ``max_step`` (no limit if None), then equal steps of at most ``max_step`` to the end."""
    length = stop - start
    cap = abs(length) if max_step is None else max(float(max_step), 1e-9 * abs(length))
    steps = []
    h = min(max(first, 1e-6 * abs(length)), cap)
    total = 0.0
    while h < cap and total + h < length * 0.999:
        total += h
        steps.append(total)
        h *= growth
    rest = length - total
    k = max(1, int(math.ceil(rest / cap - 1e-9)))
    steps.extend(total + rest * np.arange(1, k + 1) / k)
    steps = np.array(steps)
    # stretch so the last step is not a sliver
    if len(steps) > 1 and steps[-1] - steps[-2] < 0.5 * (
        steps[-2] - (steps[-3] if len(steps) > 2 else 0.0)
    ):
        steps = np.delete(steps, -2)
    return start + steps


def _nearest_point(point_sigma, perimeter, sigma):
    d = np.abs(np.mod(point_sigma - sigma + 0.5 * perimeter, perimeter) - 0.5 * perimeter)
    return int(np.argmin(d))


# The wake body's panels grow by 1.2 from the body's last panel at the usual count of this many
# points, and by proportionally less at more points, so that doubling the body's points about
# halves every wake panel too (at a fixed 1.2 the far wake kept its panels as the body was refined
# and the attached part's pressure drag converged slowly: on the test-body sample in free air it
# moved by 0.013 from 250 to 2000 points, 0.007 with the wake refined too; measured).
_WAKE_REFERENCE_POINTS = 250
# ... and no wake panel (nor a panel of the face that closes the wake) is longer than this many
# frontal heights at that count: the attached part's pressure force is balanced by the pressure
# on the wake's closing face (d'Alembert), so a coarse far wake shows in the body's pressure drag
# (on the test body a far wake one panel shorter moved it by 0.006; measured).
_WAKE_MAX_PANEL_RATIO = 1.0
# Over a ground, the lower shear layer and the ground bound a channel that carries the gap flow
# away behind the body; a panel much longer than its height above the ground does not hold that
# channel's walls apart (the midpoint collocation sees its image panel at twice the height), and
# the gap flow, with it the underbody pressure and the lift, then moved with the panel count: the
# test-body sample's Cl was 0.04 / 0.23 / 0.32 / 0.36 at 250 / 500 / 1000 / 2000 panels with
# wake panels of up to 10 times their height. The lower layer's panels are kept within this many
# times their height above the ground (with it: 0.30 / 0.32 / 0.33 / 0.36, for 3-9 % more points
# in the wake solve; at 1 instead of 2, 0.33 / 0.35 / 0.36 / 0.36 for 9-24 % more; measured, a
# choice of this project, no source).
_WAKE_GROUND_PANEL_RATIO = 2.0


# At a sharp edge the separated shear layer leaves along the face that leads to the edge and
# turns toward the stream over a relaxation length L (theta = theta0 exp(-xi / L), xi along the
# layer), L chosen so that the pressure at the edge equals the base pressure: the free-streamline
# condition of Kirchhoff's and Roshko's bluff-body theories, with the base pressure given. The
# search is a secant on log(L / h) to within _DEPARTURE_CP_TOL in Cp, from L = 0.08 h, at most
# _DEPARTURE_SOLVES wake solves (the flat plate and the square converge in 4 to 6, measured).
_DEPARTURE_START = 0.08  # frontal heights
_DEPARTURE_RANGE = (1e-3, 3.0)  # frontal heights
_DEPARTURE_CP_TOL = 5e-3
_DEPARTURE_SOLVES = 8
# a face within this angle of the stream leaves along the stream already (nothing to relax)
_DEPARTURE_MIN_ANGLE = math.radians(1.0)
# The condition is applied in full where the face meets the stream at _DEPARTURE_FULL or more
# (a flat plate or a square's front face: 90 degrees), not at all below _DEPARTURE_NONE, and in
# between with the found length scaled linearly, so that the answer is continuous in the angle.
# On a vehicle's sloping tail (the hatch sample's tail upper edge, 32 degrees) the full
# condition kept the layer attached down the tail in one wake pass and not in the other: Cd
# 0.283 against 0.243, with the roof-to-tail verdict changing between 250 and 500 panels
# (measured). A choice of this project, no source: the wake for shallow edges is left open.
_DEPARTURE_NONE = math.radians(45.0)
_DEPARTURE_FULL = math.radians(75.0)


def _departure_weight(theta0):
    """Share (0 to 1) of the free-streamline relaxation length used at a face angle theta0."""
    a = abs(theta0)
    return min(max((a - _DEPARTURE_NONE) / (_DEPARTURE_FULL - _DEPARTURE_NONE), 0.0), 1.0)


def _departure_angle(direction):
    """Angle (rad) of the flow direction ``direction`` at a separation point, from +x, held
    within +-90 degrees (a layer leaving upstream leaves across the stream)."""
    theta0 = math.atan2(float(direction[1]), float(direction[0]))
    return min(max(theta0, -0.5 * math.pi), 0.5 * math.pi)


def _departure_line(p0, direction, x_end, first, growth, max_step, relax):
    """Points of one shear layer from ``p0`` (excluded) to the plane x = ``x_end`` (m): steps
    from ``first`` growing by ``growth`` to ``max_step`` (see :func:`_geometric`).

    With ``relax`` = 0 the layer runs straight downstream (+x). Otherwise it leaves along
    ``direction`` and turns toward the stream as theta(xi) = theta0 exp(-xi / relax), xi the
    length along it; its points are spaced along xi as the straight layer's are along x.
    """
    theta0 = _departure_angle(direction)
    if relax <= 0.0 or abs(theta0) < _DEPARTURE_MIN_ANGLE:
        xs = _geometric(float(p0[0]), x_end, first, growth, max_step)
        return np.column_stack([xs, np.full(len(xs), float(p0[1]))])
    reach = max(x_end - float(p0[0]), 1e-9)
    xi = np.linspace(0.0, reach + 12.0 * relax, 4001)
    th = theta0 * np.exp(-xi / relax)
    dxi = np.diff(xi)
    cx = np.concatenate([[0.0], np.cumsum(0.5 * (np.cos(th[1:]) + np.cos(th[:-1])) * dxi)])
    cy = np.concatenate([[0.0], np.cumsum(0.5 * (np.sin(th[1:]) + np.sin(th[:-1])) * dxi)])
    xi_end = float(np.interp(reach, cx, xi))  # cx grows with xi (|theta| <= 90 degrees)
    st = _geometric(0.0, xi_end, first, growth, max_step)
    return np.column_stack([p0[0] + np.interp(st, xi, cx), p0[1] + np.interp(st, xi, cy)])


def _wake_outline(pts, j_l, j_u, d, wake_length, relax_u=0.0, relax_l=0.0, ground=False):
    """Outline of the body's attached part (points j_l to j_u, stepping d) closed by a wake.

    The wake is a displacement body bounded by the two shear layers from the separation points
    (:func:`_departure_line`, relaxation lengths ``relax_u`` and ``relax_l`` in m; 0: straight
    downstream) to ``wake_length`` behind the body, closed there. Over a ``ground`` the lower
    layer's panels stay within ``_WAKE_GROUND_PANEL_RATIO`` times the height of its start above
    the ground. Returns (points, m) with m the number of attached points (the first m points
    are the body's own).
    """
    n = len(pts)
    m = int(np.mod((j_u - j_l) * d, n)) + 1
    body = pts[(j_l + d * np.arange(m)) % n]
    x_end = float(pts[:, 0].max()) + wake_length
    lens = edge_lengths(pts)
    first_u = float(lens[j_u % n] if d > 0 else lens[(j_u - 1) % n])
    first_l = float(lens[(j_l - 1) % n] if d > 0 else lens[j_l % n])
    refine = min(1.0, _WAKE_REFERENCE_POINTS / n)
    growth = 1.0 + 0.2 * refine
    height = float(pts[:, 1].max() - pts[:, 1].min())
    max_step = _WAKE_MAX_PANEL_RATIO * height * refine
    upper = _departure_line(
        body[-1], body[-1] - body[-2], x_end, first_u, growth, max_step, relax_u
    )
    step_l = max_step
    if ground and float(body[0][1]) > 0.0:
        step_l = min(max_step, max(_WAKE_GROUND_PANEL_RATIO * float(body[0][1]), first_l))
    lower = _departure_line(body[0], body[0] - body[1], x_end, first_l, growth, step_l, relax_l)
    yu, yl = float(upper[-1, 1]), float(lower[-1, 1])
    n_close = max(6, int(math.ceil(abs(yu - yl) / max_step)))
    ys = yu + (yl - yu) * np.arange(1, n_close) / n_close
    close = np.column_stack([np.full(n_close - 1, x_end), ys])
    # from the closing face back to the first wake point behind the lower separation point
    # (the separation point itself is the body's first point)
    return np.vstack([body, upper, close, lower[::-1]]), m


def _surface_in_original(new_sf, orig_of_new, m, d, sigma_l, perimeter, s_junction):
    """A surface of the wake-model solution, cut at the wake and expressed on the original outline.

    ``s_junction`` is the outline arc length (on the wake outline) of the point where the wake
    starts on this surface.
    """
    idx = np.asarray(new_sf.index, dtype=int)
    keep = int(np.argmax(idx >= m - 1)) if np.any(idx >= m - 1) else len(idx)
    if keep < 3:
        return None
    s = np.asarray(new_sf.s)[: keep + 1]
    return dataclasses.replace(
        new_sf,
        s=s,
        ue=np.asarray(new_sf.ue)[: keep + 1],
        x=np.asarray(new_sf.x)[: keep + 1],
        y=np.asarray(new_sf.y)[: keep + 1],
        index=orig_of_new[idx[:keep]],
        s_start=float(np.mod(sigma_l + d * new_sf.s_start, perimeter)),
        direction=int(d * new_sf.direction),
        s_end=float(abs(s_junction - new_sf.s_start)),
    )


def _outline_solution(pts, ground, ue, cp, status, message):
    """An :class:`InviscidSolution` on the outline ``pts`` carrying given ``ue`` and ``cp``.

    The panel geometry (midpoints, arc length, lengths, unit tangent and outward normal,
    orientation) is computed as in :func:`~profilebench.flow.panel.solve_inviscid`; used when the
    closed-body pass ran on a coarser panelling and the wake model's speeds are reported on the
    full one.
    """
    seg = edges(pts)
    length = np.hypot(seg[:, 0], seg[:, 1])
    mid = midpoints(pts)
    arrays = dict(
        x=mid[:, 0],
        y=mid[:, 1],
        s=np.cumsum(length) - 0.5 * length,
        ue=np.asarray(ue, dtype=float),
        cp=np.asarray(cp, dtype=float),
        points=pts.copy(),
        panel_length=length,
        tangent=np.column_stack([seg[:, 0] / length, seg[:, 1] / length]),
        normal=outward_normals(pts),
    )
    for arr in arrays.values():
        arr.setflags(write=False)
    return InviscidSolution(
        **arrays,
        circulation=0.0,
        perimeter=float(length.sum()),
        clockwise=is_clockwise(pts),
        ground=bool(ground),
        kutta_node=None,
        status=status,
        success=status is InviscidStatus.SOLVED,
        message=message,
    )


def _point_at_sigma(pts, point_sigma, perimeter, sigma):
    """The point (m) at outline arc length ``sigma`` on the closed polyline ``pts``."""
    sig = float(np.mod(sigma, perimeter))
    j = int(np.searchsorted(point_sigma, sig, side="right")) - 1
    j = min(max(j, 0), len(pts) - 1)
    a, b = pts[j], pts[(j + 1) % len(pts)]
    seg = float(np.hypot(*(b - a)))
    f = 0.0 if seg <= 0.0 else min(max((sig - float(point_sigma[j])) / seg, 0.0), 1.0)
    return a + f * (b - a)


def _outline_sigma_of(pts, point_sigma, perimeter, j, xy):
    """Outline arc length of the projection of ``xy`` on the two panels that meet at point j."""
    n = len(pts)
    p = np.asarray(xy, dtype=float)
    best = (math.inf, float(point_sigma[j]))
    for a_i in ((j - 1) % n, j):
        a, b = pts[a_i], pts[(a_i + 1) % n]
        seg = b - a
        ll = float(seg @ seg)
        f = 0.0 if ll <= 0.0 else min(max(float((p - a) @ seg) / ll, 0.0), 1.0)
        dist = float(np.hypot(*(a + f * seg - p)))
        if dist < best[0]:
            best = (dist, float(np.mod(point_sigma[a_i] + f * math.sqrt(ll), perimeter)))
    return best[1]


def _separation_xy(sfl, s_at):
    """Position (m) on a surface at surface arc length ``s_at`` (between its stations)."""
    sf = sfl.surface
    s = np.asarray(sf.s, dtype=float)
    return float(np.interp(s_at, s, sf.x)), float(np.interp(s_at, s, sf.y))


def _lower_layer_panels(new_pts, m):
    """Indices of the panels of the wake's lower shear layer on the wake outline ``new_pts``
    (see _wake_outline: the body's m points first, from the lower separation point; the lower
    layer last, from the closing face back to the separation point): those behind the body
    whose outward normal points below the horizontal (the closing face's points along the
    stream, the upper layer's up)."""
    tail = np.arange(len(new_pts) - 1, m - 2, -1)  # from the separation point downstream
    ny = outward_normals(new_pts)[tail, 1]
    return tail[ny < 0.0]


class _WakeSkipped(Exception):
    """The wake body could not be built or solved (the message says why); ``ground``: because
    it would touch the ground."""

    def __init__(self, message, ground=False):
        super().__init__(message)
        self.ground = ground


def _wake_solution(moved, j_l, j_u, d, wake_length, ground, relax, relief=None):
    """(points, m, inviscid solution, side relief's outcome) of the body closed by a wake with
    relaxation lengths ``relax`` = (upper, lower) in m, with the side relief ``relief`` (None:
    the 2D section's; its outcome None); raises _WakeSkipped when the wake cannot be used."""
    new_pts, m = _wake_outline(moved, j_l, j_u, d, wake_length, relax[0], relax[1], ground)
    if ground and float(new_pts[:, 1].min()) <= 0.0:
        raise _WakeSkipped("the wake would touch the ground", ground=True)
    try:
        import shapely

        if not shapely.LinearRing(new_pts).is_simple:
            raise _WakeSkipped("the wake crosses the body")
        wake_panels = () if relief is None else _lower_layer_panels(new_pts, m)
        res, underbody = _relieved_solve(new_pts, ground, None, relief, wake_panels)
    except ProfileBenchError as exc:  # the closed-body answer stands; say why
        raise _WakeSkipped(str(exc)) from exc
    if not res.success:
        raise _WakeSkipped(res.message)
    return new_pts, m, res, underbody


def _free_streamline_wake(
    moved, j_l, j_u, d, wake_length, ground, weight, base_pressure, height, relief=None
):
    """The wake whose shear layers from sharp edges meet the free-streamline condition.

    ``weight`` = (upper, lower): the share of the found relaxation length each side uses (see
    _departure_weight; 0: the side leaves downstream and is not searched). A secant on log(L / h)
    per side drives the Cp of the last body panel before the edge to ``base_pressure`` (see
    _DEPARTURE_START). Returns (points, m, solution, (L_upper, L_lower) in m, a note for the
    message). A layer heading down whose wake would touch the ground is shortened (L / e) and
    the search goes on; a wake that cannot be built for another reason ends the search at the
    best one found so far; with none, at L = 0 (the layer leaves downstream) and the note says
    so. ``relief``: the side relief of every solve (see _wake_solution); the wake's outcome of
    it comes last in the returned tuple.
    """
    free = [w > 0.0 for w in weight]
    lo, hi = (math.log(v) for v in _DEPARTURE_RANGE)
    rho = np.full(2, math.log(_DEPARTURE_START))
    tried = []  # (rho, g, solution)
    best = None
    n = len(moved)
    heading_down = (
        _departure_angle(moved[j_u] - moved[(j_u - d) % n]) < 0.0,
        _departure_angle(moved[j_l] - moved[(j_l + d) % n]) < 0.0,
    )
    shorten = np.array([f and down for f, down in zip(free, heading_down)])
    solves = 0
    while solves < _DEPARTURE_SOLVES:
        relax = tuple(float(math.exp(r) * height) if f else 0.0 for r, f in zip(rho, free))
        try:
            sol = _wake_solution(moved, j_l, j_u, d, wake_length, ground, relax, relief)
        except _WakeSkipped as exc:
            # a layer heading down that reaches the ground turns toward the stream sooner: its
            # length is shortened (by a factor e) and the search goes on from there
            if exc.ground and shorten.any() and np.all(rho[shorten] > lo):
                rho = np.where(shorten, np.maximum(rho - 1.0, lo), rho)
                solves += 1
                continue
            break
        solves += 1
        cp = np.asarray(sol[2].cp)
        m = sol[1]
        g = np.where(free, np.array([cp[m - 2], cp[0]]) - base_pressure, 0.0)
        score = float(np.max(np.abs(g)))
        if best is None or score < best[0]:
            best = (score, sol, relax)
        if score <= _DEPARTURE_CP_TOL:
            break
        tried.append((rho.copy(), g))
        if len(tried) == 1:
            nxt = rho + 0.5
        else:
            (r0, g0), (r1, g1) = tried[-2], tried[-1]
            dg = g1 - g0
            safe = np.abs(dg) > 1e-12
            step = np.where(safe, -g1 * (r1 - r0) / np.where(safe, dg, 1.0), 0.5)
            nxt = r1 + np.clip(step, -2.0, 2.0)
        rho = np.where(free, np.clip(nxt, lo, hi), rho)
    if best is None:
        new_pts, m, res, underbody = _wake_solution(
            moved, j_l, j_u, d, wake_length, ground, (0.0, 0.0), relief
        )
        return (
            new_pts,
            m,
            res,
            (0.0, 0.0),
            ("; the shear layers leave downstream (no wake met the free-streamline condition)"),
            underbody,
        )
    score, (new_pts, m, res, underbody), relax = best
    if any(0.0 < w < 1.0 for w in weight):
        relax = tuple(r * w for r, w in zip(relax, weight))
        try:
            new_pts, m, res, underbody = _wake_solution(
                moved, j_l, j_u, d, wake_length, ground, relax, relief
            )
        except _WakeSkipped:
            relax = (0.0, 0.0)
            new_pts, m, res, underbody = _wake_solution(
                moved, j_l, j_u, d, wake_length, ground, relax, relief
            )
        cp = np.asarray(res.cp)
        score = float(max(abs(c - base_pressure) for c, f in zip((cp[m - 2], cp[0]), free) if f))
    lengths = ", ".join(
        f"{name} {r / height:.3g} h" for name, r, f in zip(("upper", "lower"), relax, free) if f
    )
    return (
        new_pts,
        m,
        res,
        relax,
        (
            f"; shear layers from the sharp edges relaxed over {lengths} "
            f"(edge Cp within {score:.2g} of the base pressure)"
        ),
        underbody,
    )


# The base pressure from the layers at separation (LayerBasePressure): where the wake's shape
# depends on it (shear layers leaving sharp edges across the stream), the wake pass is repeated
# with the last estimate until two passes agree within _BASE_CP_TOL in Cp, at most _BASE_PASSES
# passes (a choice of this project, no source; elsewhere one pass is exact: the wake does not
# depend on the base pressure).
_BASE_CP_TOL = 5e-3
_BASE_PASSES = 4


def _with_base(flow, estimate, base_stations=None):
    """``flow`` with the base pressure of ``estimate`` (a successful BaseEstimate): reported on
    the stations that take the base pressure (``base_stations``, bool; None: the separated
    stations without an edge speed) and recorded in ``base_pressure`` and ``base_estimate``."""
    inv = flow.inviscid
    if base_stations is None:
        base_stations = np.asarray(flow.separated, dtype=bool) & (np.asarray(inv.ue) == 0.0)
    cp = np.where(base_stations, float(estimate.cp_b), np.asarray(inv.cp, dtype=float))
    cp.setflags(write=False)
    return dataclasses.replace(
        flow,
        inviscid=dataclasses.replace(inv, cp=cp),
        base_pressure=float(estimate.cp_b),
        base_estimate=estimate,
    )


def _base_failed(flow, estimate):
    """A failed ProfileFlow saying why the base pressure could not be found."""
    return ProfileFlow(
        FlowStatus.BASE_PRESSURE_FAILED,
        estimate.message,
        flow.inviscid,
        flow.upper,
        flow.lower,
        flow.separated,
        flow.station_surface,
        flow.station_bl,
        base_estimate=estimate,
    )


def _resolved(flow, base_pressure, height):
    """``flow`` (any pass, its wake model done or not) with its base pressure: the number given,
    or, with a :class:`LayerBasePressure`, the estimate from its own layers unless it has one."""
    if not flow.success or flow.base_estimate is not None:
        return flow
    if not isinstance(base_pressure, LayerBasePressure):
        return dataclasses.replace(flow, base_pressure=float(base_pressure))
    if not np.any(flow.separated):  # no base: its pressure is not used
        unused = BaseEstimate(
            base_pressure.form, False, "no separated region: the base pressure is not used"
        )
        return dataclasses.replace(
            flow, base_pressure=float(base_pressure.start), base_estimate=unused
        )
    est = base_pressure.estimate(flow, height)
    if not est.ok:
        return _base_failed(flow, est)
    return _with_base(flow, est)


def _with_wake(
    first,
    pts,
    ground,
    perimeter,
    point_sigma,
    edge_sigma,
    nu,
    speed,
    transition,
    h_separation,
    reattach_length,
    wake_length,
    base_pressure,
    coarse=False,
    fit_length=0.0,
    relief=None,
):
    """Re-solve the attached flow with a wake displacement body behind the separation points.

    ``coarse``: ``first`` was solved on a coarser panelling of the same outline (a subset of
    ``pts``); the separation points are then placed on ``pts`` by nearest point in space (arc
    lengths differ between the two panellings) and the result is reported on ``pts``.
    """
    res0 = first.inviscid
    n = len(pts)
    sig = []
    seps = []
    xy = []
    for sfl in (first.upper, first.lower):
        sep = sfl.bl.separation
        s_at = float(sep.s) if sep is not None else float(sfl.surface.s_end)
        sig.append(float(sfl.outline_s(s_at)))
        seps.append(sep)
        if coarse:
            xy.append(_separation_xy(sfl, s_at))
    if coarse:
        j_u = int(np.argmin(np.hypot(pts[:, 0] - xy[0][0], pts[:, 1] - xy[0][1])))
        j_l = int(np.argmin(np.hypot(pts[:, 0] - xy[1][0], pts[:, 1] - xy[1][1])))
    else:
        j_u = _nearest_point(point_sigma, perimeter, sig[0])
        j_l = _nearest_point(point_sigma, perimeter, sig[1])
    # an edge separation is reported at the station just ahead of its edge: the wake starts at
    # the edge itself (the nearest sharp edge's point), not at a point next to it
    edge_idx = [_nearest_point(point_sigma, perimeter, e) for e in edge_sigma]
    js = []
    for j, sep in ((j_u, seps[0]), (j_l, seps[1])):
        if sep is not None and sep.kind is EventKind.EDGE_SEPARATION and edge_idx:
            j = min(edge_idx, key=lambda k: float(np.hypot(*(pts[k] - pts[j]))))
        js.append(j)
    j_u, j_l = js
    d = int(first.upper.direction)
    # a corner bubble is judged on the closed body's surface length (the wake-model surface plus
    # the closed surface behind its final separation; see the module docstring)
    beyond = tuple(
        float(f.surface.s_end) - (float(sep.s) if sep is not None else float(f.surface.s_end))
        for f, sep in zip((first.upper, first.lower), seps)
    )
    if j_u == j_l or np.mod((j_u - j_l) * d, n) < 4:
        return first, "wake model skipped: too little attached surface"
    # the wake starts at the separation points themselves: the nearest panel point is moved
    # there (along the outline), so that the wake moves with the separation point and not by a
    # whole panel when the nearest point changes
    if coarse:
        sig_full = [
            _outline_sigma_of(pts, point_sigma, perimeter, j, p)
            for j, p in ((j_u, xy[0]), (j_l, xy[1]))
        ]
    else:
        sig_full = sig
    moved = np.array(pts, dtype=float)
    for j, sg, sep in ((j_u, sig_full[0], seps[0]), (j_l, sig_full[1], seps[1])):
        if sep is not None and sep.kind is not EventKind.EDGE_SEPARATION:  # an edge stays put
            moved[j] = _point_at_sigma(pts, point_sigma, perimeter, sg)
    height = float(pts[:, 1].max() - pts[:, 1].min())
    # sides whose layer leaves a sharp edge across the stream: their relaxation length is found
    # from the free-streamline condition (see _DEPARTURE_START); the others leave downstream
    weight = [
        _departure_weight(_departure_angle(moved[j] - moved[(j - step) % n]))
        if sep is not None and sep.kind is EventKind.EDGE_SEPARATION
        else 0.0
        for j, sep, step in ((j_u, seps[0], d), (j_l, seps[1], -d))
    ]
    free_streamline = any(w > 0.0 for w in weight)

    def wake_pass(cp_b):
        """(flow, note, the stations that took the base pressure) of the wake model with the
        base pressure ``cp_b``; no stations (None) where the wake model was skipped."""
        try:
            if free_streamline:
                new_pts, m, res, relax, note, underbody = _free_streamline_wake(
                    moved, j_l, j_u, d, wake_length, ground, weight, cp_b, height, relief
                )
            else:
                new_pts, m, res, underbody = _wake_solution(
                    moved, j_l, j_u, d, wake_length, ground, (0.0, 0.0), relief
                )
                relax, note = (0.0, 0.0), ""
        except _WakeSkipped as exc:
            return first, f"wake model skipped: {exc}", None
        split = split_surfaces(res)
        if not split.success:
            return first, f"wake model skipped: {split.message}", None
        k = np.arange(m - 1)
        orig_of_new = ((j_l + k) % n) if d > 0 else ((j_l - k - 1) % n)
        # the body's stations take the wake model's Cp; the separated ones the base pressure
        ue = np.zeros(n)
        cp = np.full(n, cp_b)
        ue[orig_of_new] = d * np.asarray(res.ue)[: m - 1]
        cp[orig_of_new] = np.asarray(res.cp)[: m - 1]
        base = np.ones(n, dtype=bool)
        base[orig_of_new] = False
        message = res0.message + "; wake model: " + res.message + note
        if coarse:
            inviscid = _outline_solution(pts, ground, ue, cp, res0.status, message)
        else:
            inviscid = dataclasses.replace(res0, ue=ue, cp=cp, message=message)
        surfaces = []
        sigma_ju = float(edge_lengths(new_pts)[: m - 1].sum())  # the wake outline starts at j_l
        for new_sf in (split.upper, split.lower):
            s_junction = sigma_ju if new_sf.direction > 0 else 0.0
            sf = _surface_in_original(
                new_sf, orig_of_new, m, d, float(point_sigma[j_l]), perimeter, s_junction
            )
            if sf is None:
                return first, "wake model skipped: a surface is too short", None
            surfaces.append(sf)
        layer = (nu, speed, transition, h_separation, reattach_length)  # the march's conditions
        flow = _marched(
            inviscid,
            surfaces,
            SURFACE_NAMES,
            perimeter,
            edge_sigma,
            *layer,
            fallback_separation=seps,
            restart_hints=[tuple(r.s for r in f.restarts) for f in (first.upper, first.lower)],
            beyond=beyond,
            fit_length=fit_length,
            underbody=underbody,
        )
        if not flow.success:
            return first, f"wake model skipped: {flow.message}", None
        flow = dataclasses.replace(
            flow, closed=first, wake_points=new_pts, departure=relax, base_pressure=cp_b
        )
        return flow, "", base

    if not isinstance(base_pressure, LayerBasePressure):
        return wake_pass(float(base_pressure))[:2]
    # the base pressure from the layers at the wake pass's separation points; where the wake's
    # shape depends on it (the free-streamline condition), passes are repeated until it settles
    cp_b = float(base_pressure.start)
    for passes in range(1, _BASE_PASSES + 1):
        flow, note, base = wake_pass(cp_b)
        if note:
            return flow, note  # the caller estimates on the closed body
        est = base_pressure.estimate(flow, height)
        if not est.ok:
            return _base_failed(flow, est), ""
        est = dataclasses.replace(est, passes=passes)
        if not free_streamline or abs(est.cp_b - cp_b) <= _BASE_CP_TOL:
            return _with_base(flow, est, base), ""
        cp_b = est.cp_b
    failed = dataclasses.replace(
        est,
        ok=False,
        message=(
            f"the base pressure from the layer at separation did not settle in {_BASE_PASSES} "
            f"wake passes (last {cp_b:.3f}); use the constant base pressure for this outline"
        ),
    )
    return _base_failed(flow, failed), ""


def _closed_subset(n, closed_points, edge_points):
    """Sorted indices into the ``n`` points of the closed-body pass: ``closed_points`` and the
    sharp edges (InputError for indices that are not point indices)."""
    given = np.asarray(closed_points).ravel()
    if given.size and (
        not np.issubdtype(given.dtype, np.integer) or given.min() < 0 or given.max() >= n
    ):
        raise InputError(
            f"closed_points must be indices 0 to {n - 1} into the {n} points; got "
            f"{given.dtype} values from {given.min()} to {given.max()}: give integer point indices"
        )
    return np.unique(
        np.concatenate([given.astype(int), np.asarray(list(edge_points), dtype=int).ravel()])
    )


def _closed_split(pts, ground, sub, edge_points, relief=None):
    """The closed-body pass on the points ``pts[sub]``: (panel solution, split at the
    stagnation point, perimeter, outline arc lengths of the sharp edges ``edge_points``, given
    as indices into ``pts``, the side relief's outcome), or None where the solve or the split
    fails. ``relief``: the side-relief model (None: the 2D section's, outcome None)."""
    pts_c = pts[sub]
    try:
        res, underbody = _relieved_solve(pts_c, ground, None, relief)
    except ProfileBenchError:
        return None
    if not res.success:
        return None
    split = split_surfaces(res)
    if not split.success:
        return None
    perim, sigma = arc_length(pts_c)
    pos = {int(j): k for k, j in enumerate(sub)}
    return res, split, perim, [float(sigma[pos[int(k)]]) for k in edge_points], underbody


def _relieved_solve(pts, ground, kutta_node, relief, wake_panels=()):
    """(panel solution, side relief's outcome) of the outline ``pts``: with the side leakage of
    ``relief`` (:meth:`~profilebench.flow.underbody.SideRelief.solve`; ``wake_panels`` the
    wake's lower layer where ``pts`` is a body closed by a wake) or, without one, the 2D
    section's (outcome None)."""
    if relief is None:
        return solve_inviscid(pts, ground=ground, kutta_node=kutta_node), None
    return relief.solve(pts, ground, kutta_node=kutta_node, wake_panels=wake_panels)


@dataclass(frozen=True)
class ClosedBodySplit:
    """The wake model's closed-body pass solved and split at the stagnation point, its layers
    not marched yet (:func:`closed_body_split`).

    ``subset``: indices into the full points of the pass's points (all of them where the
    analysis would run the pass on all); ``upper``, ``lower``: the surfaces as
    :class:`SurfaceFlow` with ``bl`` None and no restarts, on the pass's points (their arc
    lengths are the pass's own); ``inviscid``: the pass's panel solution.
    """

    subset: np.ndarray
    inviscid: InviscidSolution
    upper: SurfaceFlow
    lower: SurfaceFlow

    @property
    def surfaces(self):
        return (self.upper, self.lower)


def closed_body_split(points, ground, closed_points, edge_points=(), relief=None):
    """The first part of :func:`solve_profile_flow`'s closed-body pass with the wake model: the
    panel solve on the points it uses (``closed_points`` and ``edge_points``, or all points
    where the wake model would use all) and the split at the stagnation point, as a
    :class:`ClosedBodySplit`; None where the pass fails (the inviscid solve or the split).

    Each surface can then be marched on its own, and only as far as needed, with
    :func:`march_surface_flow`: what the smallest-attached-radius search needs to judge one
    corner without the wake model.
    """
    pts = np.asarray(points, dtype=float)
    n = len(pts)
    sub = _closed_subset(n, closed_points, edge_points)
    if sub.size < 8 or sub.size >= n:
        sub = np.arange(n)  # the analysis runs the closed-body pass on all the points then
    solved = _closed_split(pts, ground, sub, edge_points, relief)
    if solved is None:
        return None
    res, split, perim, edge_sigma, _ = solved
    flows = [
        SurfaceFlow(
            name=name,
            surface=sf,
            bl=None,
            restarts=(),
            edges=_edges_on_surface(edge_sigma, sf, int(sf.direction), perim),
            perimeter=perim,
        )
        for name, sf in zip(SURFACE_NAMES, (split.upper, split.lower))
    ]
    return ClosedBodySplit(sub, res, flows[0], flows[1])


def march_surface_flow(
    sfl, nu, speed, transition, h_separation, reattach_length, fit_length=0.0, stop_s=None
):
    """The surface ``sfl`` (a :class:`SurfaceFlow`, its ``bl`` marched or not) with its boundary
    layer marched as the closed-body pass marches it (:func:`march_surface`, no restart hints),
    up to about ``stop_s`` (m along the surface; None: to its end). The arguments are those of
    :func:`solve_profile_flow`."""
    bl, restarts = march_surface(
        np.asarray(sfl.surface.s, dtype=float),
        np.asarray(sfl.surface.ue, dtype=float),
        nu,
        speed,
        transition,
        h_separation,
        sfl.edges,
        reattach_length,
        fit_length=fit_length,
        stop_s=stop_s,
    )
    return dataclasses.replace(sfl, bl=bl, restarts=restarts)


def _coarse_closed_with_wake(
    pts,
    ground,
    closed_points,
    edge_points,
    nu,
    speed,
    transition,
    h_separation,
    reattach_length,
    wake_length,
    base_pressure,
    fit_length=0.0,
    relief=None,
):
    """The wake model with its closed-body pass on the subset ``closed_points`` of ``pts``.

    Returns the wake-model ProfileFlow on ``pts``, or None when the coarse pass fails or the
    wake model is skipped (the caller then runs the full closed-body pass).
    """
    n = len(pts)
    sub = _closed_subset(n, closed_points, edge_points)
    if sub.size < 8 or sub.size >= n:
        return None  # nothing to gain (or too few points): the full closed-body pass
    solved = _closed_split(pts, ground, sub, edge_points, relief)
    if solved is None:
        return None
    res_c, split, perim_c, edge_sigma_c, underbody = solved
    first = _marched(
        res_c,
        (split.upper, split.lower),
        SURFACE_NAMES,
        perim_c,
        edge_sigma_c,
        nu,
        speed,
        transition,
        h_separation,
        reattach_length,
        fit_length=fit_length,
        underbody=underbody,
    )
    if not first.success:
        return None
    perimeter, point_sigma = arc_length(pts)
    edge_sigma = [float(point_sigma[int(k)]) for k in edge_points]
    flow, note = _with_wake(
        first,
        pts,
        ground,
        perimeter,
        point_sigma,
        edge_sigma,
        nu,
        speed,
        transition,
        h_separation,
        reattach_length,
        wake_length,
        base_pressure,
        coarse=True,
        fit_length=fit_length,
        relief=relief,
    )
    if note:
        return None
    return _resolved(flow, base_pressure, float(pts[:, 1].max() - pts[:, 1].min()))


def solve_profile_flow(
    points,
    speed,
    nu,
    ground=False,
    kutta_node=None,
    transition="free",
    h_separation=2.4,
    edge_points=(),
    reattach_length=None,
    inviscid=None,
    wake_length=None,
    base_pressure=-0.25,
    closed_points=None,
    fit_length=0.0,
    relief=None,
):
    """Inviscid flow and both boundary layers of a closed outline.

    Parameters
    ----------
    points : (N, 2) array
        Panel end points (m), as for :func:`solve_inviscid`.
    speed : float
        Free-stream speed (m/s).
    nu : float
        Kinematic viscosity (m^2/s).
    ground, kutta_node : see :func:`solve_inviscid`.
    transition, h_separation : see :func:`march_boundary_layer`.
    edge_points : sequence of int
        Indices into ``points`` of sharp convex edges that fix separation.
    reattach_length : float or None
        Surface length (m) behind a separation point above which the layer is taken to reattach
        (a corner bubble) and the march restarts turbulent; None: the first separation is final.
    inviscid : InviscidSolution, optional
        A solution already computed for these points (to avoid solving twice).
    wake_length : float or None
        With a length (m), the wake displacement model: after a first solve of the closed body,
        the separated part of the outline is replaced by a wake body (its two shear layers from
        the final separation points to ``wake_length`` behind the body: straight downstream, or,
        from a sharp edge whose face meets the stream steeply, along the face and turning
        toward the stream so that the edge's pressure is the base pressure, the free-streamline
        condition; see _DEPARTURE_START and ``ProfileFlow.departure``), the attached
        flow is solved again with it and both layers are marched again. A closed body in
        potential flow has a rear stagnation point that the real, separated flow does not have:
        its pressure recovery pushes the body forward, a thrust that would cancel much of the
        base drag. The wake body removes it (the attached part then behaves like the nose of a
        half-body, whose pressure force tends to zero). Separated stations report
        ``cp = base_pressure`` and ``ue = 0``. Not used with a Kutta condition.
    base_pressure : float or LayerBasePressure
        Cp of the separated stations (reported there by the wake model, and the target of the
        free-streamline condition), or a :class:`~profilebench.flow.base_pressure.
        LayerBasePressure`, which finds it from the layers at the final separation points of the
        wake pass (of the closed body where there is no wake pass). The result's
        ``base_pressure`` is the one used, ``base_estimate`` how it was found; an estimate
        outside the correlation's range is a failed result (``BASE_PRESSURE_FAILED``).
    closed_points : sequence of int, optional
        With the wake model (and no ``inviscid``, no Kutta condition): increasing indices into
        ``points`` of a coarser panelling of the same outline (``edge_points`` are added). The
        closed-body pass, which only has to locate the two final separation points and the
        corner-bubble restarts, then runs on these points; the wake is placed on the full
        outline at the points nearest in space to those separation points. If that pass fails
        or the wake model is skipped, the closed-body pass is repeated on all the points.
    fit_length : float
        Half-width (m) of the window of the edge-speed slope in the boundary-layer marches (see
        :func:`~profilebench.flow.boundary_layer.march_boundary_layer`).
    relief : SideRelief, optional
        The underbody side-relief model (:class:`profilebench.flow.underbody.SideRelief`): every
        panel solve of the analysis (the closed body's and each wake body's) is made with the
        gap's side leakage (:meth:`~profilebench.flow.underbody.SideRelief.solve`), before the
        surfaces are split and marched (``ProfileFlow.underbody`` says what it did). None: the
        2D section's.
    """
    pts = np.asarray(points, dtype=float)
    if (
        closed_points is not None
        and inviscid is None
        and kutta_node is None
        and wake_length is not None
    ):
        flow = _coarse_closed_with_wake(
            pts,
            ground,
            closed_points,
            edge_points,
            nu,
            speed,
            transition,
            h_separation,
            reattach_length,
            wake_length,
            base_pressure,
            fit_length,
            relief,
        )
        if flow is not None:
            return flow
    if inviscid is not None:
        res, underbody = inviscid, None
    else:
        res, underbody = _relieved_solve(pts, ground, kutta_node, relief)
    if not res.success:
        return ProfileFlow(FlowStatus.INVISCID_FAILED, res.message, res)
    perimeter, point_sigma = arc_length(pts)
    edge_sigma = [float(point_sigma[int(k)]) for k in edge_points]
    split = split_surfaces(res)
    if not split.success:
        return ProfileFlow(FlowStatus.INVISCID_FAILED, split.message, res)
    first = _marched(
        res,
        (split.upper, split.lower),
        SURFACE_NAMES,
        perimeter,
        edge_sigma,
        nu,
        speed,
        transition,
        h_separation,
        reattach_length,
        fit_length=fit_length,
        underbody=underbody,
    )
    height = float(pts[:, 1].max() - pts[:, 1].min())
    if not first.success or wake_length is None or kutta_node is not None:
        return _resolved(first, base_pressure, height)
    flow, note = _with_wake(
        first,
        pts,
        ground,
        perimeter,
        point_sigma,
        edge_sigma,
        nu,
        speed,
        transition,
        h_separation,
        reattach_length,
        wake_length,
        base_pressure,
        fit_length=fit_length,
        relief=relief,
    )
    if note:
        flow = dataclasses.replace(flow, message=flow.message + "; " + note)
    return _resolved(flow, base_pressure, height)
