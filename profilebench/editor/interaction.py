"""Mouse interaction as plain functions and small state objects, testable with fake events.

The canvas calls :func:`hit_node`, :func:`hit_segment` and :func:`hit_radius_handle` on a press,
then feeds every move to a :class:`NodeDrag` or :class:`RadiusDrag`, and on release asks it for
the one :class:`~profilebench.editor.commands.Edit` that the whole drag makes (one undo step).
All positions given to these functions are screen pixels unless named ``world``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from profilebench.editor.commands import Edit, replace_profile
from profilebench.editor.document import DocumentState
from profilebench.editor.view import ViewTransform
from profilebench.errors import GeometryError, InputError

__all__ = [
    "HANDLE_PX",
    "snap",
    "hit_node",
    "hit_segment",
    "SegmentHit",
    "corner_geometry",
    "CornerGeometry",
    "radius_handle_position",
    "hit_radius_handle",
    "NodeDrag",
    "RadiusDrag",
]

HANDLE_PX = 8.0  # pick tolerance of a node handle, px (common practice, no source)
SEGMENT_PX = 6.0  # pick tolerance of a segment, px
RADIUS_HANDLE_MIN_PX = 18.0  # a sharp corner's radius handle sits this far in from the node


def snap(value: float, grid: float | None) -> float:
    """``value`` rounded to the nearest multiple of ``grid`` (m); None or 0 leaves it alone."""
    if grid is None or grid == 0:
        return float(value)
    if not (math.isfinite(grid) and grid > 0):
        raise InputError(f"grid spacing {grid!r} m must be positive; give e.g. 0.01 for 10 mm")
    return round(value / grid) * grid


def _screen_points(profile, view: ViewTransform) -> np.ndarray:
    xy = np.asarray(profile.xy, dtype=float).reshape(-1, 2)
    return np.column_stack(
        (view.offset_x + view.scale * xy[:, 0], view.offset_y - view.scale * xy[:, 1])
    )


def hit_node(
    profile, view: ViewTransform, sx: float, sy: float, tolerance: float = HANDLE_PX
) -> int | None:
    """Index of the node whose handle is nearest (sx, sy) within ``tolerance`` px, else None."""
    pts = _screen_points(profile, view)
    if len(pts) == 0:
        return None
    d = np.hypot(pts[:, 0] - sx, pts[:, 1] - sy)
    i = int(np.argmin(d))
    return i if d[i] <= tolerance else None


@dataclass(frozen=True)
class SegmentHit:
    """A click near the chord from node ``index`` to the next: insert before ``index + 1``."""

    index: int
    insert_at: int
    t: float  # 0..1 along the chord
    world: tuple[float, float]
    distance_px: float


def hit_segment(
    profile, view: ViewTransform, sx: float, sy: float, tolerance: float = SEGMENT_PX
) -> SegmentHit | None:
    """The chord between consecutive nodes nearest (sx, sy) within ``tolerance`` px, else None.

    The foot of the perpendicular is clipped to the chord (standard point-to-segment distance).
    """
    a = _screen_points(profile, view)
    n = len(a)
    if n < 2:
        return None
    b = np.roll(a, -1, axis=0)
    ab = b - a
    length2 = np.einsum("ij,ij->i", ab, ab)
    p = np.array([sx, sy])
    with np.errstate(invalid="ignore", divide="ignore"):
        t = np.where(length2 > 0, np.einsum("ij,ij->i", p - a, ab) / length2, 0.0)
    t = np.clip(t, 0.0, 1.0)
    foot = a + t[:, None] * ab
    d = np.hypot(foot[:, 0] - sx, foot[:, 1] - sy)
    i = int(np.argmin(d))
    if d[i] > tolerance:
        return None
    world = view.to_world(*foot[i])
    return SegmentHit(i, i + 1, float(t[i]), world, float(d[i]))


@dataclass(frozen=True)
class CornerGeometry:
    """Geometry at a node: unit bisector (into the corner's inside), half angle between the
    neighbouring segments (rad) and the turning angle (rad)."""

    bisector: tuple[float, float]
    half_angle: float
    turning_angle: float


def corner_geometry(profile, i: int) -> CornerGeometry:
    """Bisector and angles at node ``i`` from its two neighbouring nodes (world units)."""
    n = len(profile)
    if n < 3:
        raise GeometryError("a corner needs two neighbours; the profile has fewer than 3 nodes")
    p = np.array(profile.xy[i])
    u = np.array(profile.xy[(i - 1) % n]) - p
    v = np.array(profile.xy[(i + 1) % n]) - p
    lu, lv = np.hypot(*u), np.hypot(*v)
    if lu == 0 or lv == 0:
        raise GeometryError(f"node {i} sits on a neighbouring node; move one of them apart")
    u, v = u / lu, v / lv
    cos_angle = float(np.clip(np.dot(u, v), -1.0, 1.0))
    angle = math.acos(cos_angle)  # angle between the two segments at the node
    bis = u + v
    nb = np.hypot(*bis)
    if nb < 1e-12:  # straight through: any normal; no corner
        bis = np.array([-u[1], u[0]])
        nb = 1.0
    bis = bis / nb
    return CornerGeometry((float(bis[0]), float(bis[1])), 0.5 * angle, math.pi - angle)


def _handle_distance(radius: float, half_angle: float) -> float:
    """Distance from the node to the arc's midpoint along the bisector, m.

    A circle of radius r tangent to both segments has its centre at r / sin(a) from the node
    (a the half angle between the segments), so the arc's midpoint is r / sin(a) - r from it
    (plane geometry of a circle inscribed in an angle).
    """
    s = math.sin(half_angle)
    return radius / s - radius if s > 1e-9 else 0.0


def radius_handle_position(profile, i: int, view: ViewTransform) -> tuple[float, float]:
    """Screen position of node ``i``'s radius handle: the arc's midpoint, or a point a little
    inside a sharp corner (px)."""
    geo = corner_geometry(profile, i)
    d_world = _handle_distance(profile.nodes[i].radius, geo.half_angle)
    d_px = max(d_world * view.scale, RADIUS_HANDLE_MIN_PX)
    sx, sy = view.to_screen(*profile.xy[i])
    bx, by = geo.bisector
    return (sx + d_px * bx, sy - d_px * by)


def hit_radius_handle(
    profile, i: int | None, view: ViewTransform, sx: float, sy: float, tolerance: float = HANDLE_PX
) -> bool:
    """True when (sx, sy) is on the radius handle of the selected corner node ``i``."""
    if i is None or profile.nodes[i].smooth:
        return False
    try:
        hx, hy = radius_handle_position(profile, i, view)
    except GeometryError:
        return False
    return math.hypot(hx - sx, hy - sy) <= tolerance


class NodeDrag:
    """Dragging one node: every move gives a new profile; release gives one edit."""

    def __init__(
        self,
        state: DocumentState,
        node: int,
        view: ViewTransform,
        sx: float,
        sy: float,
        grid: float | None = None,
    ):
        self.start = state
        self.node = node
        self.grid = grid
        wx, wy = view.to_world(sx, sy)
        nx, ny = state.profile.xy[node]
        self._grab = (nx - wx, ny - wy)  # keep the offset between cursor and node centre
        self.profile = state.profile
        self.moves = 0

    def move(self, view: ViewTransform, sx: float, sy: float):
        """The profile with the node under the cursor (snapped to the grid if set)."""
        wx, wy = view.to_world(sx, sy)
        x = snap(wx + self._grab[0], self.grid)
        y = snap(wy + self._grab[1], self.grid)
        self.profile = self.start.profile.moved(self.node, x, y)
        self.moves += 1
        return self.profile

    def finish(self) -> Edit:
        return replace_profile(self.start, self.profile, f"Move node {self.node}")


class RadiusDrag:
    """Dragging a corner's radius handle along the corner's bisector."""

    def __init__(self, state: DocumentState, node: int, grid: float | None = None):
        self.start = state
        self.node = node
        self.grid = grid
        self.geometry = corner_geometry(state.profile, node)
        self.profile = state.profile

    def radius_at(self, view: ViewTransform, sx: float, sy: float) -> float:
        """Radius (m) whose arc midpoint is the cursor's projection on the bisector (>= 0)."""
        wx, wy = view.to_world(sx, sy)
        nx, ny = self.start.profile.xy[self.node]
        bx, by = self.geometry.bisector
        d = (wx - nx) * bx + (wy - ny) * by
        s = math.sin(self.geometry.half_angle)
        if d <= 0 or s >= 1 - 1e-9:
            return 0.0
        r = d * s / (1.0 - s)  # inverse of d = r / sin(a) - r
        return max(snap(r, self.grid), 0.0)

    def move(self, view: ViewTransform, sx: float, sy: float):
        self.profile = self.start.profile.with_radius(self.node, self.radius_at(view, sx, sy))
        return self.profile

    def finish(self) -> Edit:
        r = self.profile.nodes[self.node].radius
        return replace_profile(
            self.start, self.profile, f"Set radius of node {self.node} to {r * 1000:.4g} mm"
        )
