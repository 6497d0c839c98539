"""The analysis overlay of the profile canvas: Cp band, separated flow, flow-event markers,
corner labels and legend, drawn with QPainter into images.

The drawing reads a snapshot of the canvas (:class:`OverlayScene`) so that it runs on the
overlay worker thread (QPainter on a QImage is allowed off the GUI thread); the canvas itself
(:mod:`profilebench.gui.canvas`) shares the same drawing methods through :class:`OverlayDrawing`
for the legend and the markers it draws on the GUI thread.
"""

from __future__ import annotations

import numpy as np
from matplotlib import colormaps
from matplotlib.colors import TwoSlopeNorm
from PySide6.QtCore import QLineF, QPointF, QRectF, Qt
from PySide6.QtGui import (
    QBrush,
    QColor,
    QFont,
    QFontMetricsF,
    QImage,
    QLinearGradient,
    QPainter,
    QPainterPath,
    QPen,
    QPolygonF,
    QTransform,
)

from profilebench.plotting.labels import FRONT_FRACTION, place_boxes
from profilebench.plotting.profile_view import bubbles, corner_label
from profilebench.plotting.style import (
    BASELINE_COLOUR,
    BUBBLE_STYLE,
    CP_COLORMAP,
    EVENT_STYLES,
    OKABE_ITO,
    SEPARATED_COLOUR,
)

__all__ = [
    "OverlayDrawing",
    "OverlayScene",
    "render_overlay",
    "overlay_job",
    "cached",
    "remember",
    "qcolor",
]

_CMAP = colormaps[CP_COLORMAP]
_CP_BINS = 64  # the Cp band is drawn with this many pen colours
#: a label over the front end costs this many px of leader on the canvas (less than on the
#: page: the canvas has no room in front of the nose, and long leaders cross the drawing)
CANVAS_FRONT_COST = 150.0


def remember(cache: dict, profile, result):
    """Keep the built outline ``result`` of ``profile`` in ``cache`` (a few profiles at most)."""
    if len(cache) > 8:
        cache.clear()
    cache[id(profile)] = (profile, result)


def cached(cache: dict, profile):
    """The built outline of this very ``profile`` object kept in ``cache``, or None."""
    hit = cache.get(id(profile))
    return hit[1] if hit is not None and hit[0] is profile else None


def _new_layer(width: int, height: int, dpr: float) -> QImage:
    img = QImage(
        max(1, round(width * dpr)), max(1, round(height * dpr)), QImage.Format_ARGB32_Premultiplied
    )
    img.setDevicePixelRatio(dpr)
    img.fill(Qt.transparent)
    return img


def render_overlay(scene):
    """(under, over) QImages of the analysis overlay of ``scene`` (safe on a worker thread:
    QPainter on a QImage is allowed off the GUI thread)."""
    alpha = 0.35 if scene.stale else 1.0
    under = _new_layer(scene.width(), scene.height(), scene.devicePixelRatioF())
    over = _new_layer(scene.width(), scene.height(), scene.devicePixelRatioF())
    qp = QPainter(under)
    qp.setRenderHint(QPainter.Antialiasing, True)
    qp.setFont(scene.font())
    scene._draw_separated(qp, alpha)
    scene._draw_cp(qp, alpha)
    qp.end()
    qp = QPainter(over)
    qp.setRenderHint(QPainter.Antialiasing, True)
    qp.setFont(scene.font())
    scene._draw_events(qp, alpha)
    scene._draw_corner_labels(qp, alpha)
    qp.setFont(scene.font())
    scene._draw_legend(qp)
    qp.end()
    return under, over


def overlay_job(key, analysis, scene):
    """(key, analysis, (under, over)): the overlay of ``scene`` drawn on the overlay worker."""
    return key, analysis, render_overlay(scene)


def qcolor(hex_colour: str, alpha: float = 1.0) -> QColor:
    c = QColor(hex_colour)
    c.setAlphaF(alpha)
    return c


class OverlayDrawing:
    """The drawing of the analysis overlay, over the fields both the canvas and its snapshot
    have: ``view``, ``analysis``, ``state``, ``show_cp``, ``cp_min``, ``cp_offset_curve``,
    ``selected``, ``_outline_cache``, ``_label_rects``, ``width()``, ``height()``, ``font()``."""

    def _poly(self, pts, close=True) -> QPolygonF:
        v = self.view
        sx = v.offset_x + v.scale * pts[:, 0]
        sy = v.offset_y - v.scale * pts[:, 1]
        points = [QPointF(a, b) for a, b in zip(sx.tolist(), sy.tolist())]
        if close and points:
            points.append(QPointF(points[0]))  # a Python list: QPolygonF.append leaks a
        return QPolygonF(points)  # reference to None in PySide 6.12

    def _stations(self):
        a = self.analysis
        if a is None or a.flow is None or a.flow.inviscid is None:
            return None
        inv = a.flow.inviscid
        return np.column_stack([np.asarray(inv.x, float), np.asarray(inv.y, float)]), np.asarray(
            inv.cp, float
        )

    def _outward(self, pts):
        """Unit outward normals at ``pts`` (world), from central differences."""
        t = np.roll(pts, -1, axis=0) - np.roll(pts, 1, axis=0)
        t /= np.maximum(np.hypot(t[:, 0], t[:, 1]), 1e-12)[:, None]
        x, y = pts[:, 0], pts[:, 1]
        area2 = float(np.dot(x, np.roll(y, -1)) - np.dot(np.roll(x, -1), y))
        n = np.column_stack([t[:, 1], -t[:, 0]])
        return n if area2 > 0 else -n  # counter-clockwise: the tangent turned clockwise

    def _cp_norm(self, cp):
        # one fixed scale (as on the review page), so that outlines compare by colour
        return TwoSlopeNorm(vmin=float(self.cp_min), vcenter=0.0, vmax=1.0)

    def _draw_cp(self, qp: QPainter, alpha: float):
        st = self._stations()
        if st is None or not self.show_cp:
            return
        pts, cp = st
        norm = self._cp_norm(cp)
        seg_cp = 0.5 * (cp + np.roll(cp, -1))
        level = np.clip(np.asarray(norm(seg_cp), float), 0.0, 1.0)
        bins = np.minimum((level * _CP_BINS).astype(int), _CP_BINS - 1)
        v = self.view
        sx = (v.offset_x + v.scale * pts[:, 0]).tolist()
        sy = (v.offset_y - v.scale * pts[:, 1]).tolist()
        n = len(pts)
        for b in np.unique(bins).tolist():
            r, g, bl, _ = _CMAP((b + 0.5) / _CP_BINS)
            qp.setPen(QPen(QColor.fromRgbF(r, g, bl, alpha), 7, Qt.SolidLine, Qt.RoundCap))
            lines = [
                QLineF(sx[i], sy[i], sx[(i + 1) % n], sy[(i + 1) % n])
                for i in np.flatnonzero(bins == b).tolist()
            ]
            qp.drawLines(lines)
        if self.cp_offset_curve:
            # offset curve: -Cp outward (suction drawn outside the body), 40 px per unit Cp
            off = pts + self._outward(pts) * (-cp)[:, None] * (40.0 / self.view.scale)
            qp.setPen(QPen(qcolor(OKABE_ITO["blue"], alpha), 1.2))
            qp.drawPolyline(self._poly(off))

    def _draw_separated(self, qp: QPainter, alpha: float):
        st = self._stations()
        if st is None or self.analysis.flow.separated is None:
            return
        mask = self.analysis.flow.separated
        mask = np.asarray(mask, bool)
        pts = st[0]
        if mask.shape[0] != len(pts) or not mask.any():
            return
        off = pts + self._outward(pts) * (22.0 / self.view.scale)
        qp.setPen(Qt.NoPen)
        qp.setBrush(QBrush(qcolor(SEPARATED_COLOUR, 0.35 * alpha)))
        n = len(pts)
        # one band polygon per run of separated stations (not one quad per station)
        idx = np.flatnonzero(mask)
        breaks = np.flatnonzero(np.diff(idx) > 1)
        for run in np.split(idx, breaks + 1):
            ends = np.append(run, (run[-1] + 1) % n)
            band = np.vstack([pts[ends], off[ends][::-1]])
            qp.drawPolygon(self._poly(band))

    def _marker_path(self, marker: str, size: float) -> QPainterPath:
        h = size / 2
        path = QPainterPath()
        if marker == "o":
            path.addEllipse(QPointF(0, 0), h, h)
        elif marker == "^":
            path.addPolygon(
                QPolygonF(
                    [QPointF(0, -h), QPointF(h, h * 0.8), QPointF(-h, h * 0.8), QPointF(0, -h)]
                )
            )
        elif marker == "v":
            path.addPolygon(
                QPolygonF(
                    [QPointF(0, h), QPointF(h, -h * 0.8), QPointF(-h, -h * 0.8), QPointF(0, h)]
                )
            )
        elif marker == "D":
            path.addPolygon(
                QPolygonF(
                    [
                        QPointF(0, -h),
                        QPointF(h * 0.75, 0),
                        QPointF(0, h),
                        QPointF(-h * 0.75, 0),
                        QPointF(0, -h),
                    ]
                )
            )
        elif marker == "s":
            path.addRect(QRectF(-h * 0.85, -h * 0.85, 1.7 * h, 1.7 * h))
        elif marker == "P":
            w = h / 3
            path.addRect(QRectF(-w, -h, 2 * w, 2 * h))
            path.addRect(QRectF(-h, -w, 2 * h, 2 * w))
            path.setFillRule(Qt.WindingFill)
            path = path.simplified()
        elif marker == "X":
            w = h / 3
            t = QTransform().rotate(45)
            plus = QPainterPath()
            plus.addRect(QRectF(-w, -h * 1.2, 2 * w, 2.4 * h))
            plus.addRect(QRectF(-h * 1.2, -w, 2.4 * h, 2 * w))
            plus.setFillRule(Qt.WindingFill)
            path = t.map(plus.simplified())
        else:
            path.addEllipse(QPointF(0, 0), h, h)
        return path

    def _draw_marker(self, qp: QPainter, kind: str, at: QPointF, alpha: float = 1.0, size=None):
        st = EVENT_STYLES[kind]
        path = self._marker_path(st.marker, (size or st.size) * 1.35)
        qp.save()
        qp.translate(at)
        qp.setPen(QPen(qcolor(st.edge, alpha), 1.0))
        qp.setBrush(QBrush(qcolor(st.face, alpha)))
        qp.drawPath(path)
        qp.restore()

    def _draw_events(self, qp: QPainter, alpha: float):
        events = self.analysis.events if self.analysis is not None else ()
        if not events:
            return
        for sep, rea in bubbles(events):
            pen = QPen(qcolor(BUBBLE_STYLE["color"], 0.85 * alpha), 6, Qt.SolidLine, Qt.RoundCap)
            qp.setPen(pen)
            qp.drawLine(
                QPointF(*self.view.to_screen(sep.x, sep.y)),
                QPointF(*self.view.to_screen(rea.x, rea.y)),
            )
        for e in events:
            if e.kind in EVENT_STYLES:
                self._draw_marker(qp, e.kind, QPointF(*self.view.to_screen(e.x, e.y)), alpha)

    def _label_obstacles(self):
        """(outline, hatched polygons, ground polygons, markers) in screen px for the labels."""
        st = self._stations()
        if st is None:
            return None
        pts = st[0]
        v = self.view
        to_px = lambda xy: np.column_stack(
            [
                v.offset_x + v.scale * xy[:, 0],  # noqa: E731
                v.offset_y - v.scale * xy[:, 1],
            ]
        )
        outline = to_px(pts)
        hatched = []
        mask = self.analysis.flow.separated  # stations: there is a flow
        if mask is not None and len(mask) == len(pts) and np.any(mask):
            off = pts + self._outward(pts) * (22.0 / v.scale)
            idx = np.flatnonzero(np.asarray(mask, bool))
            n = len(pts)
            for run in np.split(idx, np.flatnonzero(np.diff(idx) > 1) + 1):
                ends = np.append(run, (run[-1] + 1) % n)
                hatched.append(to_px(np.vstack([pts[ends], off[ends][::-1]])))
        ground = []
        if self.state.conditions.ground:
            _, sy = v.to_screen(0, 0)
            # the hatched strip and its caption below it
            ground.append(
                np.array(
                    [(0, sy - 2), (self.width(), sy - 2), (self.width(), sy + 30), (0, sy + 30)],
                    float,
                )
            )
        events = self.analysis.events
        markers = np.array([v.to_screen(e.x, e.y) for e in events], float).reshape(-1, 2)
        return outline, hatched, ground, markers

    def _draw_corner_labels(self, qp: QPainter, alpha: float):
        """Corner labels placed as on the review page (profilebench.plotting.labels): outside
        the outline, off the ground and the separated-flow band, clear of each other and of
        the front 30 % where there is room, each with a leader line to its corner."""
        corners = self.analysis.corners if self.analysis is not None else ()
        self._label_rects = []
        if not corners:
            return
        font = QFont(self.font())
        font.setPointSizeF(max(font.pointSizeF() - 1, 7))
        qp.setFont(font)
        fm = QFontMetricsF(font)
        texts = [corner_label(c) for c in corners]
        sizes = []
        for text in texts:
            lines = text.splitlines() or [text]
            sizes.append(
                (max(fm.horizontalAdvance(t) for t in lines) + 8, fm.height() * len(lines) + 4)
            )
        anchors = np.array([self.view.to_screen(c.x, c.y) for c in corners], float)
        obstacles = self._label_obstacles()
        if obstacles is None:
            return
        outline, hatched, ground, markers = obstacles
        xmin, xmax = float(outline[:, 0].min()), float(outline[:, 0].max())
        front_x = xmin + FRONT_FRACTION * (xmax - xmin)
        near = outline[outline[:, 0] <= front_x]
        front = (
            xmin - 10.0,
            float(near[:, 1].min()) - 10.0,
            front_x,
            float(near[:, 1].max()) + 10.0,
        )
        # on the canvas a lower corner's label may sit below the thin ground strip, its leader
        # crossing the strip (the page keeps leaders off its deep ground band)
        placed, _, _ = place_boxes(
            (0.0, 0.0, float(self.width()), float(self.height())),
            sizes,
            anchors,
            outline_px=outline,
            hatched_px=hatched + ground,
            markers_px=markers,
            front_px=front,
            front_cost=CANVAS_FRONT_COST,
        )
        for c, text, (sx, sy), (box, end) in zip(corners, texts, anchors, placed):
            rect = QRectF(QPointF(box[0], box[1]), QPointF(box[2], box[3]))
            self._label_rects.append(QRectF(rect))
            sep = c.verdict.separated
            colour = QColor(OKABE_ITO["vermillion"]) if sep else QColor(OKABE_ITO["bluish_green"])
            if c.node == self.selected:
                colour = QColor(OKABE_ITO["blue"])
            qp.setPen(QPen(qcolor("#606060", 0.7 * alpha), 0.8))
            qp.drawLine(QPointF(sx, sy), QPointF(float(end[0]), float(end[1])))
            qp.setPen(QPen(colour, 1.6 if c.node == self.selected else 1.0))
            qp.setBrush(QColor(255, 255, 255, int(225 * alpha)))
            qp.drawRoundedRect(rect, 3, 3)
            qp.setPen(QColor(20, 20, 20, int(255 * alpha)))
            qp.drawText(rect, Qt.AlignCenter, text)

    def _draw_legend(self, qp: QPainter):
        st = self._stations()
        fm = QFontMetricsF(self.font())
        rows = []
        a = self.analysis  # None: the legend of a baseline before the first analysis
        events = a.events if a is not None else ()
        kinds = [k for k in EVENT_STYLES if any(e.kind == k for e in events)]
        if bubbles(events):
            kinds.append("bubble")
        separated = a.flow.separated if a is not None and a.flow is not None else None
        if separated is not None and np.any(separated):
            kinds.append("separated")
        if self.state.baseline is not None:
            kinds += ["baseline", "difference"]
        labels = {k: EVENT_STYLES[k].label for k in EVENT_STYLES}
        labels.update(
            bubble="laminar bubble",
            separated="separated flow",
            baseline="baseline outline",
            difference="change from baseline",
        )
        rows = [(k, labels[k]) for k in kinds]
        width = (
            max([fm.horizontalAdvance(t) for _, t in rows] + [fm.horizontalAdvance("Cp  -2.0")])
            + 44
        )
        bar_h = 120 if (st is not None and self.show_cp) else 0
        height = len(rows) * (fm.height() + 3) + bar_h + 16
        x0, y0 = self._legend_position(width, height)
        qp.setPen(QColor(180, 180, 180))
        qp.setBrush(QColor(255, 255, 255, 225))
        qp.drawRect(QRectF(x0, y0, width, height))
        y = y0 + 8
        if bar_h:
            cp = st[1]
            norm = self._cp_norm(cp)
            top, bottom = norm.vmin, 1.0
            grad = QLinearGradient(0, y, 0, y + bar_h - 18)
            for f in np.linspace(0, 1, 9):
                r, g, b, _ = _CMAP(norm(top + (bottom - top) * f))
                grad.setColorAt(f, QColor.fromRgbF(r, g, b))
            head = fm.height() + fm.ascent() / 2 + 2  # room for the title above the top tick
            bar = QRectF(x0 + 10, y + head, 14, bar_h - 12 - head)
            grad.setStart(0, bar.top())
            grad.setFinalStop(0, bar.bottom())
            qp.setPen(QColor(20, 20, 20))
            qp.drawText(QPointF(x0 + 8, y + fm.ascent()), "Cp on the outline")
            qp.setBrush(QBrush(grad))
            qp.drawRect(bar)
            for value in (top, 0.0, 1.0):
                f = (value - top) / (bottom - top)
                ty = bar.top() + f * bar.height()
                qp.drawText(QPointF(bar.right() + 6, ty + fm.ascent() / 2 - 1), f"{value:+.1f}")
            y += bar_h
        for kind, text in rows:
            cy = y + fm.height() / 2
            if kind in EVENT_STYLES:
                self._draw_marker(qp, kind, QPointF(x0 + 17, cy), size=7)
            elif kind == "bubble":
                qp.setPen(QPen(QColor(BUBBLE_STYLE["color"]), 5, Qt.SolidLine, Qt.RoundCap))
                qp.drawLine(QPointF(x0 + 10, cy), QPointF(x0 + 24, cy))
            elif kind == "separated":
                qp.fillRect(QRectF(x0 + 10, cy - 5, 14, 10), qcolor(SEPARATED_COLOUR, 0.45))
            elif kind == "baseline":
                qp.setPen(QPen(QColor(BASELINE_COLOUR), 1.6, Qt.DashLine))
                qp.drawLine(QPointF(x0 + 8, cy), QPointF(x0 + 26, cy))
            elif kind == "difference":
                swatch = QRectF(x0 + 10, cy - 5, 14, 10)
                qp.fillRect(swatch, qcolor(OKABE_ITO["reddish_purple"], 0.30))
                qp.fillRect(
                    swatch, QBrush(qcolor(OKABE_ITO["reddish_purple"], 1.0), Qt.FDiagPattern)
                )
            qp.setPen(QColor(20, 20, 20))
            qp.drawText(QPointF(x0 + 34, y + fm.ascent()), text)
            y += fm.height() + 3

    def _legend_position(self, width: float, height: float):
        """Top-left corner (px) of the legend box where it covers least.

        Candidates: the four corners of the canvas and the middles of its top and bottom edges.
        Score: the area the box would hide of the corner labels (weighted 4x), of the outline's
        bounding box, of the length readouts at the top left, and of the ground line's label.
        """
        W, H, m = self.width(), self.height(), 10.0
        candidates = [
            (W - width - m, m),
            (W - width - m, H - height - m - 18),
            (m, H - height - m - 18),
            (0.5 * (W - width), m),
            (0.5 * (W - width), H - height - m - 18),
            (m, 110.0),
        ]
        avoid = [(r, 4.0) for r in self._label_rects]
        pts = None
        if self.state is not None:
            hit = cached(self._outline_cache, self.state.profile)
            pts = hit[0] if hit is not None else np.asarray(self.state.profile.xy, float)
        if pts is not None and len(pts):
            (x0, y1), (x1, y0) = (
                self.view.to_screen(*pts.min(axis=0)),
                self.view.to_screen(*pts.max(axis=0)),
            )
            avoid.append(
                (QRectF(QPointF(min(x0, x1), min(y0, y1)), QPointF(max(x0, x1), max(y0, y1))), 1.0)
            )
        avoid.append((QRectF(0, 0, 230, 90), 2.0))  # length readouts

        def cost(x, y):
            box = QRectF(x, y, width, height)
            total = 0.0
            for r, weight in avoid:
                inter = box.intersected(r)
                if not inter.isEmpty():
                    total += weight * inter.width() * inter.height()
            return total

        x, y = min(candidates, key=lambda c: cost(*c))
        return max(x, 2.0), max(y, 2.0)


class OverlayScene(OverlayDrawing):
    """A snapshot of the canvas fields the overlay drawing reads (copied on the GUI thread)."""

    def __init__(self, canvas):
        self.view = canvas.view
        self.analysis = canvas.analysis
        self.state = canvas.state
        self.stale = canvas.stale
        self.show_cp = canvas.show_cp
        self.cp_min = canvas.cp_min
        self.cp_offset_curve = canvas.cp_offset_curve
        self.selected = canvas.selected
        self._size = (canvas.width(), canvas.height())
        self._font = QFont(canvas.font())
        self._dpr = canvas.devicePixelRatioF()
        prof = canvas.state.profile if canvas.state is not None else None
        hit = cached(canvas._outline_cache, prof) if prof is not None else None
        self._outline_cache = {} if hit is None else {id(prof): (prof, hit)}
        self._label_rects = []

    def width(self):
        return self._size[0]

    def height(self):
        return self._size[1]

    def font(self):
        return self._font

    def devicePixelRatioF(self):
        return self._dpr
