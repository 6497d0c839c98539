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
``reattach_length = None`` turns the restart off: the first separation is final.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass

import numpy as np

from profilebench.flow.boundary_layer import march_boundary_layer
from profilebench.flow.panel import solve_inviscid
from profilebench.flow.stagnation import split_surfaces

__all__ = ["FlowStatus", "SurfaceFlow", "ProfileFlow", "solve_profile_flow"]


class FlowStatus(enum.Enum):
    SUCCESS = "success"
    INVISCID_FAILED = "inviscid solve failed"
    BOUNDARY_LAYER_FAILED = "boundary-layer march failed"


@dataclass(frozen=True)
class BubbleRestart:
    """A corner separation after which the march was restarted turbulent (surface arc length, m)."""

    s: float
    kind: str


@dataclass(frozen=True)
class SurfaceFlow:
    """One surface: its edge speed (``surface``), its boundary layer (``bl``) and any restarts."""

    name: str
    surface: object
    bl: object
    restarts: tuple[BubbleRestart, ...]
    edges: tuple[float, ...]     # surface arc lengths of the sharp edges passed to the march
    perimeter: float             # outline length (m)

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
        return s if s <= float(self.surface.s[-1]) + 1e-12 else None


@dataclass(frozen=True)
class ProfileFlow:
    """Inviscid solution, the two surfaces' boundary layers, and the separated stations."""

    status: FlowStatus
    message: str
    inviscid: object
    upper: SurfaceFlow | None = None
    lower: SurfaceFlow | None = None
    separated: np.ndarray | None = None   # bool over the inviscid stations
    station_surface: np.ndarray | None = None  # 0 upper, 1 lower, per inviscid station
    station_bl: np.ndarray | None = None        # index into that surface's bl arrays

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
    import dataclasses

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
        dataclasses.replace(e, s=e.s + s_offset, index=e.index + i_offset) for e in second.events
        if not (e.kind == "transition" and e.index <= 1)
    )
    kept = tuple(e for e in first.events if e.index <= i_offset)
    fields["events"] = list(kept + shifted)
    fields["separation"] = (
        dataclasses.replace(second.separation, s=second.separation.s + s_offset,
                            index=second.separation.index + i_offset)
        if second.separation is not None else None
    )
    for name in ("status", "message"):
        if name in fields:
            fields[name] = getattr(second, name)
    return type(first)(**fields)


def _march_surface(s, ue, nu, speed, transition, h_separation, edges, reattach_length):
    """March one surface, restarting turbulent after corner bubbles (see module docstring)."""
    bl = march_boundary_layer(s, ue, nu=nu, speed=speed, transition=transition,
                              h_separation=h_separation, edges=edges)
    restarts = []
    while (reattach_length is not None and bl.success and bl.separation is not None):
        sep = bl.separation
        i0 = int(sep.index) + 1
        if i0 >= len(s) - 3 or s[-1] - s[i0] < reattach_length:
            break
        rest_s = s[i0:] - s[i0]
        # a fresh turbulent start needs a small positive first station
        rest_s = rest_s + max(1e-4, 1e-3 * (s[-1] - s[0]))
        rest_edges = tuple(e - s[i0] + rest_s[0] for e in edges if e > s[i0])
        tail = march_boundary_layer(rest_s, ue[i0:], nu=nu, speed=speed, transition="turbulent",
                                    h_separation=h_separation, edges=rest_edges)
        if not tail.success:
            break
        restarts.append(BubbleRestart(s=float(sep.s), kind=str(sep.kind)))
        bl = _merge(bl, tail, s_offset=float(s[i0] - rest_s[0]), i_offset=i0)
    return bl, tuple(restarts)


def solve_profile_flow(points, speed, nu, ground=False, kutta_node=None, transition="free",
                       h_separation=2.4, edge_points=(), reattach_length=None, inviscid=None):
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
    """
    pts = np.asarray(points, dtype=float)
    res = inviscid if inviscid is not None else solve_inviscid(pts, ground=ground, kutta_node=kutta_node)
    if not res.success:
        return ProfileFlow(FlowStatus.INVISCID_FAILED, res.message, res)
    n = len(res.s)
    seg = np.diff(np.vstack([pts, pts[:1]]), axis=0)
    lengths = np.hypot(seg[:, 0], seg[:, 1])
    perimeter = float(lengths.sum())
    point_sigma = np.concatenate([[0.0], np.cumsum(lengths)[:-1]])
    edge_sigma = [float(point_sigma[int(k)]) for k in edge_points]
    split = split_surfaces(res)
    if not split.success:
        return ProfileFlow(FlowStatus.INVISCID_FAILED, split.message, res)
    upper, lower = split.upper, split.lower
    flows = []
    station_surface = np.full(n, -1, dtype=int)
    station_bl = np.zeros(n, dtype=int)
    separated = np.zeros(n, dtype=bool)
    for k, (name, sf) in enumerate((("upper", upper), ("lower", lower))):
        direction = int(sf.direction)
        edges = _edges_on_surface(edge_sigma, sf, direction, perimeter)
        s = np.asarray(sf.s, dtype=float)
        ue = np.asarray(sf.ue, dtype=float)
        bl, restarts = _march_surface(s, ue, nu, speed, transition, h_separation, edges,
                                      reattach_length)
        if not bl.success:
            return ProfileFlow(FlowStatus.BOUNDARY_LAYER_FAILED,
                               f"{name} surface: {bl.message}", res)
        flow = SurfaceFlow(name=name, surface=sf, bl=bl, restarts=restarts, edges=edges,
                           perimeter=perimeter)
        flows.append(flow)
        idx = np.asarray(sf.index, dtype=int)
        # the march's stations may start with the stagnation point itself (not an inviscid
        # station): align from the end
        offset = len(bl.s) - len(idx)
        station_surface[idx] = k
        station_bl[idx] = np.arange(len(idx)) + offset
        if bl.separation is not None:
            separated[idx] = np.asarray(bl.s)[offset:] > bl.separation.s
    separated[station_surface < 0] = True  # stations beyond both surfaces' ends lie in the wake
    return ProfileFlow(FlowStatus.SUCCESS, "converged", res, flows[0], flows[1], separated,
                       station_surface, station_bl)
