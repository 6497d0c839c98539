"""The profile model: a closed side outline given by nodes.

A :class:`Profile` is an immutable value. Editing returns a new profile, so an editor's undo
stack, a baseline and a background analysis can all hold profiles without copying or locking.

Conventions (SI units, see DEVELOPERS.md): x points rearward (the free stream flows in +x), y
points up, the ground (when on) is y = 0. Nodes run round the outline in order, either
orientation; the outline closes from the last node back to the first.

Each node has a corner radius ``radius`` (m, >= 0): a node with radius > 0 is rounded by a
circular arc tangent to its two neighbouring segments; radius 0 is a sharp edge. A node with
``smooth=True`` is passed through by a spline instead (bonnet, windscreen, roof curves); a smooth
node carries no radius.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace

from profilebench.errors import GeometryError

__all__ = ["Node", "Profile", "MAX_COORDINATE"]

#: Largest magnitude of a node coordinate or radius (m). A road vehicle is under 50 m long; far
#: beyond that a value is a slip (a unit, a typo) and near the float limit the geometry
#: overflows (common practice, no source).
MAX_COORDINATE = 10000.0


@dataclass(frozen=True)
class Node:
    """One outline node: position (m), corner radius (m), smooth flag and an optional label."""

    x: float
    y: float
    radius: float = 0.0
    smooth: bool = False
    label: str = ""

    def __post_init__(self):
        for name in ("x", "y", "radius"):
            value = getattr(self, name)
            if isinstance(value, bool) or not isinstance(value, (int, float)):
                raise GeometryError(
                    f"node {name} must be a number in metres, got {value!r}; give a plain float"
                )
            if isinstance(value, float) and not math.isfinite(value):
                raise GeometryError(f"node {name} is {value!r}; give a finite number in metres")
            if abs(value) > MAX_COORDINATE:  # an int of any size compares without overflow
                shown = f"{value:.4g} m" if abs(value) < 1e300 else "a number beyond any float"
                raise GeometryError(
                    f"node {name} = {shown} is beyond the limit of {MAX_COORDINATE:g} m; give "
                    "it in metres (a vehicle is a few metres long)"
                )
            object.__setattr__(self, name, float(value))
        if self.radius < 0:
            raise GeometryError(
                f"corner radius {self.radius!r} m is negative; use 0 for a sharp edge or a "
                "positive radius in metres"
            )
        if self.smooth and self.radius > 0:
            raise GeometryError(
                f"node at ({self.x:.4g}, {self.y:.4g}) m is smooth and has a corner radius "
                f"{self.radius:.4g} m; a spline passes through a smooth node, so set its radius "
                "to 0 or make it a corner (smooth=False)"
            )


@dataclass(frozen=True)
class Profile:
    """A closed profile outline.

    Parameters
    ----------
    nodes : tuple of Node
        The outline's nodes in order round the outline (either orientation, first not repeated).
    name : str
        A name for reports.
    trailing_edge : int or None
        Index of a sharp node whose Kutta condition fixes the circulation (a sharp tail of a
        streamlined body). None: zero net circulation (the usual choice for a bluff vehicle
        profile, whose wake is not modelled by a lifting condition).
    """

    nodes: tuple[Node, ...]
    name: str = "profile"
    trailing_edge: int | None = None
    _cache: dict = field(default_factory=dict, init=False, repr=False, compare=False, hash=False)

    def __post_init__(self):
        nodes = tuple(self.nodes)
        for i, n in enumerate(nodes):
            if not isinstance(n, Node):
                raise GeometryError(f"node {i} is a {type(n).__name__}, expected a Node")
        object.__setattr__(self, "nodes", nodes)
        if self.trailing_edge is not None:
            te = self.trailing_edge
            if isinstance(te, bool) or not isinstance(te, int) or not 0 <= te < len(nodes):
                raise GeometryError(
                    f"trailing_edge {te!r} is not a node index (0 to {len(nodes) - 1}); "
                    "give the index of a sharp node or None"
                )

    # --- construction ---------------------------------------------------------------------
    @classmethod
    def from_points(cls, points, radii=None, smooth=None, name="profile", trailing_edge=None):
        """Build a profile from an (N, 2) sequence of points in metres.

        ``radii`` and ``smooth`` are optional per-node sequences of the same length.
        """
        pts = [tuple(p) for p in points]
        n = len(pts)
        radii = [0.0] * n if radii is None else list(radii)
        smooth = [False] * n if smooth is None else list(smooth)
        if len(radii) != n or len(smooth) != n:
            raise GeometryError(
                f"radii ({len(radii)}) and smooth ({len(smooth)}) must each have one entry per "
                f"point ({n})"
            )
        for i, p in enumerate(pts):
            if len(p) != 2:
                raise GeometryError(f"point {i} has {len(p)} coordinates; give (x, y) pairs")
        nodes = tuple(
            Node(float(p[0]), float(p[1]), float(r), bool(s)) for p, r, s in zip(pts, radii, smooth)
        )
        return cls(nodes, name=name, trailing_edge=trailing_edge)

    # --- read-outs ------------------------------------------------------------------------
    def __len__(self) -> int:
        return len(self.nodes)

    @property
    def xy(self):
        """Node positions as a list of (x, y) tuples (m)."""
        return [(n.x, n.y) for n in self.nodes]

    def panel_points(self, n_panels: int = 250):
        """Panel end points (N, 2) in m on the built outline: ``panelize(self, n_panels).points``."""
        from profilebench.geometry.panelling import panelize

        return panelize(self, n_panels).points

    # --- editing: each returns a new Profile ---------------------------------------------
    def _check_index(self, i: int) -> int:
        if (
            isinstance(i, bool)
            or not isinstance(i, int)
            or not -len(self.nodes) <= i < len(self.nodes)
        ):
            raise GeometryError(f"node index {i!r} is out of range (0 to {len(self.nodes) - 1})")
        return i % len(self.nodes)

    def _with_nodes(self, nodes, trailing_edge="keep") -> "Profile":
        te = self.trailing_edge if trailing_edge == "keep" else trailing_edge
        return Profile(tuple(nodes), name=self.name, trailing_edge=te)

    def replace_node(self, i: int, node: Node) -> "Profile":
        i = self._check_index(i)
        nodes = list(self.nodes)
        nodes[i] = node
        return self._with_nodes(nodes)

    def moved(self, i: int, x: float, y: float) -> "Profile":
        """The profile with node ``i`` moved to (x, y) (m)."""
        i = self._check_index(i)
        return self.replace_node(i, replace(self.nodes[i], x=x, y=y))

    def with_radius(self, i: int, radius: float) -> "Profile":
        """The profile with node ``i``'s corner radius set (m); a smooth node becomes a corner."""
        i = self._check_index(i)
        return self.replace_node(
            i,
            replace(
                self.nodes[i], radius=radius, smooth=False if radius > 0 else self.nodes[i].smooth
            ),
        )

    def with_smooth(self, i: int, smooth: bool) -> "Profile":
        """The profile with node ``i`` made smooth (spline through it, radius 0) or a corner."""
        i = self._check_index(i)
        return self.replace_node(
            i,
            replace(
                self.nodes[i], smooth=bool(smooth), radius=0.0 if smooth else self.nodes[i].radius
            ),
        )

    def inserted(self, i: int, node: Node) -> "Profile":
        """The profile with ``node`` inserted before index ``i`` (``i == len`` appends)."""
        if isinstance(i, bool) or not isinstance(i, int) or not 0 <= i <= len(self.nodes):
            raise GeometryError(f"insert position {i!r} is out of range (0 to {len(self.nodes)})")
        nodes = list(self.nodes)
        nodes.insert(i, node)
        te = self.trailing_edge
        if te is not None and te >= i:
            te += 1
        return self._with_nodes(nodes, trailing_edge=te)

    def removed(self, i: int) -> "Profile":
        """The profile without node ``i``. Removing the trailing-edge node clears trailing_edge."""
        i = self._check_index(i)
        nodes = list(self.nodes)
        del nodes[i]
        te = self.trailing_edge
        if te is not None:
            te = None if te == i else (te - 1 if te > i else te)
        return self._with_nodes(nodes, trailing_edge=te)

    def translated(self, dx: float, dy: float) -> "Profile":
        return self._with_nodes([replace(n, x=n.x + dx, y=n.y + dy) for n in self.nodes])

    def scaled(self, factor: float) -> "Profile":
        """The profile scaled about the origin by ``factor`` (radii scale too)."""
        if not (isinstance(factor, (int, float)) and math.isfinite(factor) and factor > 0):
            raise GeometryError(f"scale factor {factor!r} must be a positive finite number")
        return self._with_nodes(
            [
                replace(n, x=n.x * factor, y=n.y * factor, radius=n.radius * factor)
                for n in self.nodes
            ]
        )

    def renamed(self, name: str) -> "Profile":
        return Profile(self.nodes, name=name, trailing_edge=self.trailing_edge)
