"""Stagnation points of an inviscid surface flow and the split into two boundary-layer surfaces.

The signed surface speed ``ue`` of an :class:`~profilebench.flow.panel.InviscidSolution` is
positive in the direction of the outline's points. Walking round the outline in that direction:

* a change of sign from negative to positive is a *dividing* (front) stagnation point: the flow
  leaves it on both sides;
* a change from positive to negative is a *meeting* (rear) stagnation point, or the sharp trailing
  edge when the circulation was fixed there by a Kutta condition.

A speed exactly 0 counts as positive. The stagnation point is placed by linear interpolation of
``ue`` in arc length between the two panel midpoints on either side of the sign change, and its
(x, y) is the point of the outline (the panel polygon) at that arc length. A change of sign across
the Kutta node is placed exactly at that node.

If there are several dividing points (possible on concave profiles), the most upstream one
(smallest x) is taken as the front stagnation point and the result's ``message`` says how many
were found. If ``ue`` never changes sign (no dividing point at all; zero circulation and a Kutta
condition both force a sign change, so this means a corrupted or hand-made solution) no split is
made: the result has ``success`` False, status ``NO_STAGNATION`` and no surfaces.
"""

from __future__ import annotations

import enum
from dataclasses import dataclass

import numpy as np

from profilebench.errors import InputError
from profilebench.flow.panel import InviscidSolution

__all__ = ["SplitStatus", "SurfaceEnd", "Surface", "SurfaceSplit", "split_surfaces"]


class SplitStatus(enum.Enum):
    """Outcome of :func:`split_surfaces`."""

    SPLIT = "split"
    NO_STAGNATION = "no dividing stagnation point"


class SurfaceEnd(enum.Enum):
    """Where a surface ends."""

    REAR_STAGNATION = "rear stagnation point"
    TRAILING_EDGE = "sharp trailing edge (Kutta)"


@dataclass(frozen=True, eq=False)
class Surface:
    """One surface from the front stagnation point to where the flow leaves the body.

    Station 0 is the stagnation point itself (s = 0, ue = 0); stations 1, 2, ... are panel
    midpoints of the inviscid solution in marching order.

    Attributes
    ----------
    s : ndarray
        Arc length from the front stagnation point along the outline, m, increasing from 0.
    ue : ndarray
        Edge speed / free-stream speed, >= 0 (magnitude).
    x, y : ndarray
        Station positions, m.
    index : ndarray of int, length ``len(s) - 1``
        Indices into the solution's arrays of stations 1, 2, ... (station 0 is not a panel
        midpoint): ``solution.cp[surface.index]`` pairs with ``surface.s[1:]``.
    stagnation : tuple of float
        (x, y) of the front stagnation point, m.
    s_start : float
        Arc length of the stagnation point along the solution's ``s`` (from ``points[0]`` in the
        direction of the points), m.
    direction : int
        +1 if this surface runs in the direction of the points, -1 against it.
    end : tuple of float
        (x, y) where the surface ends, m: the rear stagnation point or the Kutta edge.
    s_end : float
        Arc length from the stagnation point to ``end``, m (beyond the last station).
    end_kind : SurfaceEnd
        What ``end`` is.
    """

    s: np.ndarray
    ue: np.ndarray
    x: np.ndarray
    y: np.ndarray
    index: np.ndarray
    stagnation: tuple
    s_start: float
    direction: int
    end: tuple
    s_end: float
    end_kind: SurfaceEnd

    @property
    def cp(self) -> np.ndarray:
        """Pressure coefficient at the stations, 1 - ue**2."""
        return 1.0 - self.ue * self.ue

    @property
    def mean_y(self) -> float:
        """Arc-length weighted mean height of the surface, m."""
        return (
            float(np.trapezoid(self.y, self.s) / self.s[-1]) if self.s[-1] > 0 else float(self.y[0])
        )


@dataclass(frozen=True, eq=False)
class SurfaceSplit:
    """The two surfaces of an inviscid solution; unpacks as ``upper, lower``.

    ``upper`` is the surface with the larger arc-length mean y (over the top). Both are None when
    ``success`` is False.
    """

    upper: Surface | None
    lower: Surface | None
    stagnation: tuple | None
    n_dividing: int
    status: SplitStatus
    success: bool
    message: str

    def __iter__(self):
        return iter((self.upper, self.lower))


def _outline_point(points: np.ndarray, length: np.ndarray, s: float) -> tuple:
    """(x, y) of the closed panel polygon at arc length ``s`` from points[0], m."""
    nodes_s = np.concatenate([[0.0], np.cumsum(length)])
    closed = np.vstack([points, points[:1]])
    s = s % nodes_s[-1]
    return (float(np.interp(s, nodes_s, closed[:, 0])), float(np.interp(s, nodes_s, closed[:, 1])))


def _crossing_s(res: InviscidSolution, i: int) -> float:
    """Interpolated arc length of the sign change of ue between midpoints i and i + 1."""
    n = res.n_panels
    j = (i + 1) % n
    length = res.panel_length
    if res.kutta_node is not None and j == res.kutta_node:
        # the change of sign across the Kutta edge sits exactly at the edge
        return float(np.sum(length[:j]))
    ds = 0.5 * (length[i] + length[j])
    frac = res.ue[i] / (res.ue[i] - res.ue[j])
    return float((res.s[i] + frac * ds) % res.perimeter)


def _march(res, start, direction, s0, stag):
    """Stations from midpoint ``start`` stepping by ``direction`` while the flow runs that way."""
    n = res.n_panels
    order = (start + direction * np.arange(n)) % n
    ue = res.ue[order]
    along = ue >= 0.0 if direction > 0 else ue < 0.0  # a zero speed counts as positive
    stop = np.flatnonzero(~along)
    count = int(stop[0]) if stop.size else n
    idx = order[:count]
    last = int(idx[-1])
    # the meeting point lies between the last station and the next one in marching order
    if direction > 0:
        s_meet = _crossing_s(res, last)
        at_edge = res.kutta_node is not None and (last + 1) % n == res.kutta_node
        dist = lambda s_abs: (s_abs - s0) % res.perimeter  # noqa: E731
    else:
        s_meet = _crossing_s(res, (last - 1) % n)
        at_edge = res.kutta_node is not None and last == res.kutta_node
        dist = lambda s_abs: (s0 - s_abs) % res.perimeter  # noqa: E731
    s_st = dist(res.s[idx])
    # a midpoint that coincides with the stagnation point is the stagnation station itself
    keep = s_st > 1e-12 * res.perimeter
    idx, s_st = idx[keep], s_st[keep]
    s_end = dist(s_meet)
    end = _outline_point(res.points, res.panel_length, s_meet)
    return Surface(
        s=np.concatenate([[0.0], s_st]),
        ue=np.concatenate([[0.0], np.abs(res.ue[idx])]),
        x=np.concatenate([[stag[0]], res.x[idx]]),
        y=np.concatenate([[stag[1]], res.y[idx]]),
        index=idx.astype(int),
        stagnation=stag,
        s_start=s0,
        direction=direction,
        end=end,
        s_end=float(s_end),
        end_kind=SurfaceEnd.TRAILING_EDGE if at_edge else SurfaceEnd.REAR_STAGNATION,
    )


def split_surfaces(res: InviscidSolution) -> SurfaceSplit:
    """Find the front stagnation point and split the outline into upper and lower surfaces.

    Parameters
    ----------
    res : InviscidSolution
        A successful solution of :func:`~profilebench.flow.panel.solve_inviscid`.

    Returns
    -------
    SurfaceSplit
        ``upper, lower = split_surfaces(res)``. Each :class:`Surface` runs from the front
        (dividing) stagnation point to the next meeting point in its direction: the rear
        stagnation point, or the Kutta edge. See the module docstring for the rules (several
        dividing points: the most upstream is used; no sign change: ``success`` False).

    Raises
    ------
    InputError
        ``res`` is not an InviscidSolution or is a failed one.
    """
    if not isinstance(res, InviscidSolution):
        raise InputError(
            f"split_surfaces needs an InviscidSolution from solve_inviscid, got {type(res).__name__}"
        )
    if not res.success:
        raise InputError(
            f"the inviscid solution failed ({res.message}); fix the outline before splitting "
            "it into surfaces"
        )
    ue = np.asarray(res.ue, dtype=float)
    if not np.isfinite(ue).all():
        raise InputError("the inviscid solution has non-finite speeds; it cannot be split")
    n = res.n_panels
    pos = ue >= 0.0
    nxt = np.roll(pos, -1)
    dividing = np.flatnonzero(~pos & nxt)  # ue < 0 at i, >= 0 at i + 1
    if dividing.size == 0:
        return SurfaceSplit(
            upper=None,
            lower=None,
            stagnation=None,
            n_dividing=0,
            status=SplitStatus.NO_STAGNATION,
            success=False,
            message=(
                "the surface speed never changes sign from negative to positive, so the flow has "
                "no dividing (front) stagnation point on this body; no surfaces were made"
            ),
        )
    s_cand = [_crossing_s(res, int(i)) for i in dividing]
    xy_cand = [_outline_point(res.points, res.panel_length, s) for s in s_cand]
    pick = int(np.argmin([xy[0] for xy in xy_cand]))
    i = int(dividing[pick])
    s0 = s_cand[pick]
    stag = xy_cand[pick]
    forward = _march(res, (i + 1) % n, +1, s0, stag)
    backward = _march(res, i, -1, s0, stag)
    if forward.mean_y >= backward.mean_y:
        upper, lower = forward, backward
    else:
        upper, lower = backward, forward
    msg = f"front stagnation point at x = {stag[0]:.6g} m, y = {stag[1]:.6g} m"
    if dividing.size > 1:
        msg += f"; {dividing.size} dividing points found, the most upstream (smallest x) was taken"
    return SurfaceSplit(
        upper=upper,
        lower=lower,
        stagnation=stag,
        n_dividing=int(dividing.size),
        status=SplitStatus.SPLIT,
        success=True,
        message=msg,
    )
