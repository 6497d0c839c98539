"""The canvas's view: a uniform scale (true aspect ratio) from metres to screen pixels.

Screen coordinates have y downwards; profile coordinates have y up. A world point (x, y) maps to
``(offset_x + scale * x, offset_y - scale * y)``.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from profilebench.errors import InputError

__all__ = ["ViewTransform", "fit_view"]

SCALE_LIMITS = (1e-3, 1e7)  # px per metre: beyond these the view is lost, not a user input


@dataclass(frozen=True)
class ViewTransform:
    """Scale (px/m) and the screen position of the world origin (px)."""

    scale: float = 200.0
    offset_x: float = 0.0
    offset_y: float = 0.0

    def to_screen(self, x: float, y: float) -> tuple[float, float]:
        return (self.offset_x + self.scale * x, self.offset_y - self.scale * y)

    def to_world(self, sx: float, sy: float) -> tuple[float, float]:
        return ((sx - self.offset_x) / self.scale, (self.offset_y - sy) / self.scale)

    def zoomed(self, factor: float, sx: float, sy: float) -> "ViewTransform":
        """Zoom by ``factor`` keeping the world point under the screen point (sx, sy) fixed."""
        if not (isinstance(factor, (int, float)) and math.isfinite(factor) and factor > 0):
            raise InputError(f"zoom factor {factor!r} must be a positive number")
        scale = min(max(self.scale * factor, SCALE_LIMITS[0]), SCALE_LIMITS[1])
        wx, wy = self.to_world(sx, sy)
        return ViewTransform(scale, sx - scale * wx, sy + scale * wy)

    def panned(self, dx: float, dy: float) -> "ViewTransform":
        """Move the view by (dx, dy) screen pixels."""
        return replace(self, offset_x=self.offset_x + dx, offset_y=self.offset_y + dy)


def fit_view(bounds, width: float, height: float, margin: float = 40.0) -> ViewTransform:
    """The view that shows ``bounds`` = (xmin, ymin, xmax, ymax) (m) centred in a widget.

    ``width`` and ``height`` are the widget size and ``margin`` the free border (px).
    """
    xmin, ymin, xmax, ymax = (float(b) for b in bounds)
    if not all(math.isfinite(v) for v in (xmin, ymin, xmax, ymax)) or xmax < xmin or ymax < ymin:
        raise InputError(f"bounds {bounds!r} must be finite (xmin, ymin, xmax, ymax)")
    span_x = max(xmax - xmin, 1e-9)
    span_y = max(ymax - ymin, 1e-9)
    usable_w = max(width - 2 * margin, 10.0)
    usable_h = max(height - 2 * margin, 10.0)
    scale = min(usable_w / span_x, usable_h / span_y)
    cx, cy = 0.5 * (xmin + xmax), 0.5 * (ymin + ymax)
    return ViewTransform(scale, width / 2 - scale * cx, height / 2 + scale * cy)
