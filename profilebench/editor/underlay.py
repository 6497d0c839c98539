"""An underlay image (side-view sketch or photo) placed under the profile to trace over.

The image is placed by two reference points: two pixels of the image (column u, row v, rows
counted downwards) and the two profile positions (m) they land on. The placement is a similarity
transform (uniform scale, rotation, translation) with a mirror in y, since image rows run down
and profile y runs up. The same two point pairs are what a project file stores
(:class:`profilebench.io.Underlay`).
"""

from __future__ import annotations

from dataclasses import dataclass, replace
from pathlib import Path

import numpy as np

from profilebench.errors import InputError

__all__ = ["Underlay", "similarity_matrix"]


def similarity_matrix(points_px, points_m) -> np.ndarray:
    """The 2x3 affine map from image pixels (u, v) to profile metres fixed by two point pairs.

    With the row mirrored (z = u - i v) the map is w = k z + c in complex numbers, so
    k = (w_b - w_a) / (z_b - z_a) and c = w_a - k z_a: a similarity (plane geometry).
    """
    (ua, va), (ub, vb) = points_px
    za, zb = complex(ua, -va), complex(ub, -vb)
    wa, wb = complex(*points_m[0]), complex(*points_m[1])
    if abs(zb - za) < 1e-9:
        raise InputError("the two image reference points are the same pixel; pick two points apart")
    if abs(wb - wa) < 1e-12:
        raise InputError(
            "the two profile reference points are the same; give two different positions"
        )
    k = (wb - wa) / (zb - za)
    c = wa - k * za
    # w = k (u - i v) + c  ->  x = kr u + ki v + cr,  y = ki u - kr v + ci
    return np.array([[k.real, k.imag, c.real], [k.imag, -k.real, c.imag]])


@dataclass(frozen=True)
class Underlay:
    """An image under the profile: file, size (px), two reference point pairs and opacity (0..1)."""

    path: Path
    width_px: int
    height_px: int
    points_px: tuple[tuple[float, float], tuple[float, float]]
    points_m: tuple[tuple[float, float], tuple[float, float]]
    opacity: float = 0.35

    def __post_init__(self):
        if self.width_px <= 0 or self.height_px <= 0:
            raise InputError(
                f"the image {self.path} is empty ({self.width_px} x {self.height_px} px); pick another image"
            )
        op = self.opacity
        if isinstance(op, bool) or not isinstance(op, (int, float)) or not 0.0 <= op <= 1.0:
            raise InputError(f"underlay opacity {op!r} must be between 0 (hidden) and 1 (full)")
        similarity_matrix(self.points_px, self.points_m)  # refuses coincident points

    @classmethod
    def initial(
        cls, path, width_px: int, height_px: int, length: float = 4.5, opacity: float = 0.35
    ) -> "Underlay":
        """The image with its bottom edge on the ground (y = 0) from x = 0 to x = ``length`` (m)."""
        return cls(
            Path(path),
            int(width_px),
            int(height_px),
            ((0.0, float(height_px)), (float(width_px), float(height_px))),
            ((0.0, 0.0), (float(length), 0.0)),
            opacity,
        )

    @property
    def matrix(self) -> np.ndarray:
        return similarity_matrix(self.points_px, self.points_m)

    def to_world(self, u: float, v: float) -> tuple[float, float]:
        x, y = self.matrix @ np.array([u, v, 1.0])
        return (float(x), float(y))

    def to_image(self, x: float, y: float) -> tuple[float, float]:
        m = np.vstack((self.matrix, [0.0, 0.0, 1.0]))
        u, v, _ = np.linalg.solve(m, [x, y, 1.0])
        return (float(u), float(v))

    def placed(self, points_px, points_m) -> "Underlay":
        """The underlay placed so image pixels ``points_px`` land on profile points ``points_m``."""
        pts_px = tuple((float(u), float(v)) for u, v in points_px)
        pts_m = tuple((float(x), float(y)) for x, y in points_m)
        return replace(self, points_px=pts_px, points_m=pts_m)

    def with_opacity(self, opacity: float) -> "Underlay":
        return replace(self, opacity=opacity)

    @property
    def pixel_size(self) -> float:
        """Size of one image pixel on the profile, m."""
        a, b = self.matrix[0, :2]
        return float(np.hypot(a, b))
