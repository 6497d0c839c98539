"""The profile canvas: outline, handles, Cp band, flow markers and corner labels, with QPainter.

The canvas draws and forwards mouse gestures; what a gesture does is decided by the Qt-free
functions of :mod:`profilebench.editor.interaction`. The GUI thread never builds an outline during
editing: the built outline of each new profile is computed in a child process, and until it
arrives the canvas draws :func:`profilebench.editor.preview.preview_outline` (node polygon with
fillet arcs). The analysis overlay (Cp band, separated flow, markers, corner labels, legend) is
drawn once per analysis and view into cached images, always on a worker thread (the previous
images stay on screen, following a zoom or pan, until the new ones arrive), so a repaint only
draws the outline and the handles over them.
"""

from __future__ import annotations

import math
import time

import numpy as np
from PySide6.QtCore import QPointF, QRectF, Qt, QThreadPool, Signal
from PySide6.QtGui import (
    QBrush,
    QColor,
    QFontMetricsF,
    QPainter,
    QPen,
    QPixmap,
    QTransform,
)
from PySide6.QtWidgets import QSizePolicy, QWidget

from profilebench.editor.interaction import (
    NodeDrag,
    RadiusDrag,
    hit_node,
    hit_radius_handle,
    hit_segment,
    radius_handle_position,
)
from profilebench.editor.preview import build_outline_points, preview_outline
from profilebench.editor.preview import warm_up as _warm_up_outline
from profilebench.editor.view import ViewTransform, fit_view
from profilebench.errors import ProfileBenchError
from profilebench.gui.canvas_overlay import (
    OverlayDrawing,
    OverlayScene,
    cached,
    overlay_job,
    qcolor,
    remember,
)
from profilebench.gui.refcount_guard import restore_none_refcount
from profilebench.gui.runners import ProcessTaskRunner, TaskRunner
from profilebench.plotting.profile_view import CP_FLOOR, check_cp_min
from profilebench.plotting.style import (
    BASELINE_COLOUR,
    OKABE_ITO,
)

__all__ = ["ProfileCanvas", "outline_points"]

#: the scale bar's length is 1, 2 or 5 x 10^k mm, as near this many pixels as those allow
SCALE_BAR_PX = 110.0


def scale_bar_length(scale_px_per_m: float, target_px: float = SCALE_BAR_PX) -> float:
    """A round scale-bar length (m): 1, 2 or 5 x 10^k mm, the one nearest ``target_px`` at
    ``scale_px_per_m`` (in log terms), so the bar is between about 0.6 and 1.6 x target."""
    if not (scale_px_per_m > 0 and math.isfinite(scale_px_per_m)):
        return 0.0
    want_mm = 1000.0 * target_px / scale_px_per_m
    k = math.floor(math.log10(want_mm))
    options = [m * 10.0**e for e in (k - 1, k, k + 1) for m in (1.0, 2.0, 5.0)]
    best = min(options, key=lambda mm: abs(math.log(mm / want_mm)))
    return best / 1000.0


def _length_text(metres: float) -> str:
    mm = metres * 1000.0
    return f"{mm / 1000.0:g} m" if mm >= 1000.0 else f"{mm:g} mm"


def outline_points(profile, cache: dict):
    """Points (m) of the built outline of ``profile`` (arcs and splines), or its nodes.

    Built at once on the calling thread (for rare calls: fitting the view, the baseline).
    Returns (points, ok, message): ``ok`` False with the reason when the outline cannot be built.
    """
    hit = cached(cache, profile)
    if hit is not None:
        return hit
    result = build_outline_points(profile)
    remember(cache, profile, result)
    return result


class ProfileCanvas(OverlayDrawing, QWidget):
    """Draws the document's profile and turns mouse gestures into edits.

    Signals
    -------
    preview(object)
        A profile during a drag (not yet an undo step).
    edit_finished(object)
        An :class:`~profilebench.editor.commands.Edit` (a finished drag or an insertion).
    node_selected(int)
        The index of the node clicked, or -1 for none.
    insert_requested(int, float, float)
        A click on a segment: insert before index at (x, y) m.
    picked(float, float)
        A click while picking underlay reference points (world m).
    """

    preview = Signal(object)
    edit_finished = Signal(object)
    node_selected = Signal(int)  # -1: nothing selected
    insert_requested = Signal(int, float, float)
    picked = Signal(float, float)
    painted = Signal(float)

    def __init__(self, parent=None):
        super().__init__(parent)
        self.setSizePolicy(QSizePolicy.Expanding, QSizePolicy.Expanding)
        self.setMinimumSize(480, 260)
        self.setMouseTracking(False)
        self.setFocusPolicy(Qt.StrongFocus)
        self.view = ViewTransform()
        self.state = None  # DocumentState
        self.selected: int | None = None
        self.analysis = None  # the last good analysis (may be stale)
        self.stale = False
        self.grid: float | None = None  # snapping grid (m), None: off
        self.show_cp = True
        self.cp_min = CP_FLOOR  # the Cp colour scale's lowest value (fixed, user-set)
        self.cp_offset_curve = False
        self.picking = False
        self._outline_cache: dict = {}
        self._drag = None
        self._pan_from = None
        self._underlay_pixmap = None
        self._underlay_path = None
        self._difference = None  # cached (baseline, profile, polygons)
        self._fitted = False
        self.last_paint_profile = None
        self.last_paint_time = 0.0
        self.last_paint_built = False  # the last repaint drew the built outline (not the preview)
        self.outline_message = ""
        self._overlay = None  # (key, under image, over image)
        self.overlay_renders = 0
        self._label_rects: list = []
        self.scale_bar = (0.0, 0.0)  # (length m, length px) of the last scale bar drawn
        self.radius_readout = None  # the selected corner's "r ... mm" box (px) last drawn
        # outlines are built in a child process of their own (never behind an analysis, and
        # their Python-heavy building does not share the interpreter lock with the GUI thread)
        # (its child starts now: started after the first analysis, it was still importing during
        # a drag begun soon after and few built outlines arrived in time; measured with
        # benchmarks/bench_gui.py)
        self.outline_runner = ProcessTaskRunner(
            build_outline_points, self, warm_up=_warm_up_outline, child="outline"
        )
        self.outline_runner.finished.connect(self._outline_built)
        self._outline_requested = None
        self._outline_requests: dict = {}  # generation -> profile (only the newest arrives)
        self._outline_pool = QThreadPool(self)  # the overlay drawing's thread
        self._outline_pool.setMaxThreadCount(1)
        self._overlay_requested = None
        self.overlay_runner = TaskRunner(overlay_job, self, pool=self._outline_pool)
        self.overlay_runner.finished.connect(self._overlay_drawn)

    # ----------------------------------------------------------------- model in
    def set_state(self, state, selected=None):
        self.state = state
        self.selected = selected
        if not self._fitted and self.width() > 0:
            self.fit()
        self.update()

    def set_analysis(self, analysis, stale: bool):
        self.analysis = analysis
        self.stale = stale
        self.update()

    def set_stale(self, stale: bool):
        if stale != self.stale:
            self.stale = stale
            self.update()

    def current_outline(self):
        """(points, ok, message, built) of the current profile's outline.

        ``built`` False: the built outline is still being computed on the worker; the points are
        the cheap preview and ``ok``/``message`` those of the last built outline.
        """
        if self.state is None:
            return None, False, "", False
        prof = self.state.profile
        hit = cached(self._outline_cache, prof)
        if hit is not None:
            return (*hit, True)
        if self._outline_requested is not prof:
            self._outline_requested = prof
            self._outline_requests = {self.outline_runner.request(prof): prof}
        try:
            pts = preview_outline(prof)
        except Exception:  # the preview must never stop the drawing
            pts = np.asarray(prof.xy, dtype=float)
        return pts, True, self.outline_message, False

    def _outline_built(self, generation, result, seconds):
        profile = self._outline_requests.pop(generation, None)
        if profile is None:
            return
        remember(self._outline_cache, profile, result)
        if self.state is not None and self.state.profile is profile:
            self.update()

    def shutdown(self, msecs: int = 10000) -> bool:
        """Stop the outline worker (on closing the window)."""
        ok = self.outline_runner.close(msecs) and self.overlay_runner.close(msecs)
        return self._outline_pool.waitForDone(msecs) and ok

    # ----------------------------------------------------------------- view
    def fit(self):
        if self.state is None:
            return
        pts, _, _ = outline_points(self.state.profile, self._outline_cache)
        xmin, ymin = pts.min(axis=0)
        xmax, ymax = pts.max(axis=0)
        ymin = min(ymin, 0.0)
        # wide margin: room for the corner labels and the legend beside the outline
        self.view = fit_view(
            (xmin, ymin, xmax, ymax),
            self.width(),
            self.height(),
            margin=max(60, 0.2 * self.width()),
        )
        self._fitted = True
        self.update()

    def resizeEvent(self, event):
        super().resizeEvent(event)
        if not self._fitted and self.state is not None:
            self.fit()

    def zoom(self, factor: float, at=None):
        at = at or QPointF(self.width() / 2, self.height() / 2)
        self.view = self.view.zoomed(factor, at.x(), at.y())
        self.update()

    def screen_of_node(self, i: int) -> QPointF:
        """Screen position of node ``i`` (px), e.g. for a test to press on."""
        return QPointF(*self.view.to_screen(*self.state.profile.xy[i]))

    # ----------------------------------------------------------------- mouse
    def mousePressEvent(self, event):
        if self.state is None:
            return
        p = event.position()
        sx, sy = p.x(), p.y()
        if event.button() == Qt.MiddleButton or (
            event.button() == Qt.LeftButton and event.modifiers() & Qt.ShiftModifier
        ):
            self._pan_from = (sx, sy)
            return
        if event.button() != Qt.LeftButton:
            return
        if self.picking:
            self.picked.emit(*self.view.to_world(sx, sy))
            return
        prof = self.state.profile
        if (
            self.selected is not None
            and self.selected < len(prof)
            and hit_radius_handle(prof, self.selected, self.view, sx, sy)
        ):
            self._drag = RadiusDrag(self.state, self.selected, self.grid)
            return
        i = hit_node(prof, self.view, sx, sy)
        if i is not None:
            self.selected = i
            self.node_selected.emit(i)
            self._drag = NodeDrag(self.state, i, self.view, sx, sy, self.grid)
            self.update()
            return
        seg = hit_segment(prof, self.view, sx, sy)
        if seg is not None:
            self.insert_requested.emit(seg.insert_at, seg.world[0], seg.world[1])
            return
        self.selected = None
        self.node_selected.emit(-1)
        self._pan_from = (sx, sy)
        self.update()

    def mouseMoveEvent(self, event):
        p = event.position()
        if self._drag is not None:
            try:
                profile = self._drag.move(self.view, p.x(), p.y())
            except ProfileBenchError:
                return  # e.g. a degenerate corner mid-drag: keep the last
            self.preview.emit(profile)
            return
        if self._pan_from is not None:
            x0, y0 = self._pan_from
            self.view = self.view.panned(p.x() - x0, p.y() - y0)
            self._pan_from = (p.x(), p.y())
            self.update()

    def mouseReleaseEvent(self, event):
        if self._drag is not None:
            drag, self._drag = self._drag, None
            edit = drag.finish()
            if edit.changes_anything:
                self.edit_finished.emit(edit)
        self._pan_from = None

    def wheelEvent(self, event):
        steps = event.angleDelta().y() / 120.0
        if steps:
            self.zoom(1.15**steps, event.position())

    @property
    def dragging(self) -> bool:
        return self._drag is not None

    # ----------------------------------------------------------------- painting helpers
    def _set_underlay_pixmap(self, underlay):
        if underlay is None:
            self._underlay_pixmap = None
            self._underlay_path = None
            return
        if self._underlay_path != underlay.path:
            self._underlay_pixmap = QPixmap(str(underlay.path))
            self._underlay_path = underlay.path

    def _draw_underlay(self, qp: QPainter):
        u = self.state.underlay
        self._set_underlay_pixmap(u)
        if u is None or self._underlay_pixmap is None or self._underlay_pixmap.isNull():
            return
        (a, b, c), (d, e, f) = u.matrix.tolist()
        s, ox, oy = self.view.scale, self.view.offset_x, self.view.offset_y
        qp.save()
        qp.setTransform(QTransform(s * a, -s * d, s * b, -s * e, ox + s * c, oy - s * f))
        qp.setOpacity(u.opacity)
        qp.drawPixmap(0, 0, self._underlay_pixmap)
        qp.restore()

    def _draw_grid(self, qp: QPainter):
        if not self.grid:
            return
        step_px = self.grid * self.view.scale
        k = 1
        while step_px * k < 8:
            k *= 5
        step = self.grid * k
        x0, y1 = self.view.to_world(0, 0)
        x1, y0 = self.view.to_world(self.width(), self.height())
        qp.setPen(QPen(QColor(225, 228, 235), 1))
        for gx in np.arange(math.floor(x0 / step) * step, x1 + step, step):
            sx, _ = self.view.to_screen(gx, 0)
            qp.drawLine(QPointF(sx, 0), QPointF(sx, self.height()))
        for gy in np.arange(math.floor(y0 / step) * step, y1 + step, step):
            _, sy = self.view.to_screen(0, gy)
            qp.drawLine(QPointF(0, sy), QPointF(self.width(), sy))

    def _draw_ground(self, qp: QPainter):
        if not self.state.conditions.ground:
            return
        _, sy = self.view.to_screen(0, 0)
        qp.fillRect(QRectF(0, sy, self.width(), 14), QBrush(QColor(90, 90, 90), Qt.BDiagPattern))
        qp.setPen(QPen(QColor(40, 40, 40), 1.5))
        qp.drawLine(QPointF(0, sy), QPointF(self.width(), sy))
        qp.setPen(QColor(60, 60, 60))
        qp.drawText(QPointF(6, sy + 26), "ground (moving belt), y = 0")

    def _draw_baseline(self, qp: QPainter, current_pts):
        base = self.state.baseline
        if base is None:
            return
        bpts, _, _ = outline_points(base, self._outline_cache)
        key = (id(base), id(self.state.profile))
        if self._difference is None or self._difference[0] != key:
            polys = []
            try:
                import shapely
                from shapely.geometry import Polygon

                diff = Polygon(bpts).buffer(0).symmetric_difference(Polygon(current_pts).buffer(0))
                polys = [
                    np.asarray(g.exterior.coords)
                    for g in shapely.get_parts(diff)  # a polygon, or several
                    if not g.is_empty and g.area > 0
                ]
            except Exception:  # a self-crossing outline mid-drag: outlines still show
                polys = []
            self._difference = (key, polys)
        # a light fill under a dense hatch, edged: visible on the Cp band and at small changes
        fill = QBrush(qcolor(OKABE_ITO["reddish_purple"], 0.30))
        hatch = QBrush(qcolor(OKABE_ITO["reddish_purple"], 1.0), Qt.FDiagPattern)
        for poly in self._difference[1]:
            shape = self._poly(poly)
            qp.setPen(QPen(qcolor(OKABE_ITO["reddish_purple"], 0.9), 1.0))
            qp.setBrush(fill)
            qp.drawPolygon(shape)
            qp.setPen(Qt.NoPen)
            qp.setBrush(hatch)
            qp.drawPolygon(shape)
        pen = QPen(QColor(BASELINE_COLOUR), 1.6, Qt.DashLine)
        qp.setPen(pen)
        qp.setBrush(Qt.NoBrush)
        qp.drawPolyline(self._poly(bpts))

    def set_cp_min(self, cp_min: float):
        """Set the Cp colour scale's lowest value (InputError outside the allowed range)."""
        self.cp_min = check_cp_min(cp_min)
        self.update()

    def _draw_nodes(self, qp: QPainter):
        prof = self.state.profile
        for i, n in enumerate(prof.nodes):
            sx, sy = self.view.to_screen(n.x, n.y)
            sel = i == self.selected
            qp.setPen(QPen(QColor(OKABE_ITO["blue"]) if sel else QColor(30, 30, 30), 1.4))
            qp.setBrush(QColor(OKABE_ITO["sky_blue"]) if sel else QColor(255, 255, 255))
            size = 11 if sel else 8
            if n.smooth:
                qp.drawEllipse(QPointF(sx, sy), size / 2, size / 2)
            else:
                qp.drawRect(QRectF(sx - size / 2, sy - size / 2, size, size))
        if (
            self.selected is not None
            and self.selected < len(prof)
            and not prof.nodes[self.selected].smooth
        ):
            try:
                hx, hy = radius_handle_position(prof, self.selected, self.view)
            except ProfileBenchError:
                return
            sx, sy = self.view.to_screen(*prof.xy[self.selected])
            qp.setPen(QPen(QColor(OKABE_ITO["blue"]), 1, Qt.DotLine))
            qp.drawLine(QPointF(sx, sy), QPointF(hx, hy))
            qp.setPen(QPen(QColor(OKABE_ITO["blue"]), 1.4))
            qp.setBrush(QColor(OKABE_ITO["yellow"]))
            path = self._marker_path("D", 12)
            qp.save()
            qp.translate(hx, hy)
            qp.drawPath(path)
            qp.restore()
            r = prof.nodes[self.selected].radius
            # on a white box, over the corner labels: never hidden under one
            text = f"r {r * 1000:.0f} mm"
            fm = QFontMetricsF(qp.font())
            box = QRectF(
                hx + 7, hy - 6 - fm.ascent() - 2, fm.horizontalAdvance(text) + 4, fm.height() + 2
            )
            qp.setPen(QPen(QColor(OKABE_ITO["blue"]), 0.8))
            qp.setBrush(QColor(255, 255, 255, 240))
            qp.drawRect(box)
            qp.setPen(QColor(OKABE_ITO["blue"]))
            qp.drawText(QPointF(hx + 9, hy - 6), text)
            self.radius_readout = box

    def _draw_readouts(self, qp: QPainter, pts):
        xmin, ymin = pts.min(axis=0)
        xmax, ymax = pts.max(axis=0)
        lines = [
            f"length {1000 * (xmax - xmin):.0f} mm",
            f"frontal height {1000 * (ymax - ymin):.0f} mm",
            f"ground clearance {1000 * ymin:.0f} mm",
        ]
        fm = QFontMetricsF(self.font())
        bar_m = scale_bar_length(self.view.scale)
        bar_px = bar_m * self.view.scale
        bar_text = _length_text(bar_m)
        w = (
            max(
                [fm.horizontalAdvance(t) for t in lines]
                + [bar_px + 10 + fm.horizontalAdvance(bar_text)]
            )
            + 12
        )
        h = fm.height() * (len(lines) + 1) + 12
        rect = QRectF(8, 8, w, h)
        qp.setPen(QColor(180, 180, 180))
        qp.setBrush(QColor(255, 255, 255, 220))
        qp.drawRect(rect)
        qp.setPen(QColor(20, 20, 20))
        for k, t in enumerate(lines):
            qp.drawText(QPointF(14, 8 + fm.ascent() + 4 + k * fm.height()), t)
        # the scale bar: a round length at the current zoom, end ticks, its length beside it
        y = 8 + 4 + len(lines) * fm.height() + fm.height() / 2 + 2
        qp.setPen(QPen(QColor(20, 20, 20), 2.0))
        qp.drawLine(QPointF(14, y), QPointF(14 + bar_px, y))
        qp.setPen(QPen(QColor(20, 20, 20), 1.2))
        for x in (14, 14 + bar_px):
            qp.drawLine(QPointF(x, y - 4), QPointF(x, y + 4))
        qp.drawText(QPointF(14 + bar_px + 8, y + fm.ascent() / 2 - 1), bar_text)
        self.scale_bar = (bar_m, bar_px)

    # ----------------------------------------------------------------- overlay cache
    def _overlay_key(self):
        v = self.view
        return (
            id(self.analysis),
            self.stale,
            self.show_cp,
            self.cp_min,
            self.cp_offset_curve,
            self.selected,
            self.state is not None and self.state.baseline is not None,
            v.scale,
            v.offset_x,
            v.offset_y,
            self.width(),
            self.height(),
            self.devicePixelRatioF(),
        )

    def _scene(self):
        """A copy of what the analysis overlay depends on, for drawing it on a worker thread."""
        return OverlayScene(self)

    def _overlay_images(self):
        """(under, over, mapping) of the analysis overlay to draw now.

        Never drawn on the GUI thread: a new analysis, selection, view or canvas size is drawn
        on the overlay worker while the previous images stay on screen. ``mapping`` is None
        when the images belong to the current view, else ``(k, dx, dy)``: the old images are
        shown scaled by ``k`` and shifted by (dx, dy) px so they follow a zoom or pan until the
        new ones arrive. (None, None, None) before the first images of any analysis.
        """
        key = self._overlay_key()
        o = self._overlay
        if o is not None and o[0] == key and o[1] is self.analysis:
            return o[2], o[3], None
        if self._overlay_requested != key:
            self._overlay_requested = key
            self.overlay_runner.request(key, self.analysis, self._scene())
        if o is None:
            return None, None, None
        if o[0][7:10] == key[7:10]:
            return o[2], o[3], None
        s0, ox0, oy0 = o[0][7:10]
        k = self.view.scale / s0
        return o[2], o[3], (k, self.view.offset_x - k * ox0, self.view.offset_y - k * oy0)

    @staticmethod
    def _draw_layer(qp: QPainter, image, mapping):
        if mapping is None:
            qp.drawImage(0, 0, image)
            return
        k, dx, dy = mapping
        qp.save()
        qp.translate(dx, dy)
        qp.scale(k, k)
        qp.drawImage(0, 0, image)
        qp.restore()

    @property
    def up_to_date(self) -> bool:
        """True when the built outline and the overlay of the current analysis are on screen."""
        if self.state is None:
            return False
        if cached(self._outline_cache, self.state.profile) is None:
            return False
        if self.analysis is None:
            return True
        o = self._overlay
        return o is not None and o[0] == self._overlay_key() and o[1] is self.analysis

    def _overlay_drawn(self, generation, result, seconds):
        key, analysis, (under, over) = result
        self.overlay_renders += 1
        if key == self._overlay_key() and analysis is self.analysis:
            self._overlay = (key, analysis, under, over)
            self.update()

    def paintEvent(self, event):
        restore_none_refcount()
        qp = QPainter(self)
        qp.setRenderHint(QPainter.Antialiasing, True)
        qp.fillRect(self.rect(), QColor(250, 250, 252))
        if self.state is None:
            qp.end()
            return
        self._draw_grid(qp)
        self._draw_underlay(qp)
        self._draw_ground(qp)
        pts, ok, message, built = self.current_outline()
        self.outline_message = message
        self._draw_baseline(qp, pts)
        under = over = mapping = None
        if self.analysis is not None:
            under, over, mapping = self._overlay_images()
            if under is not None:
                self._draw_layer(qp, under, mapping)
        pen = QPen(
            QColor(15, 15, 15) if ok else QColor(OKABE_ITO["vermillion"]),
            1.6,
            Qt.SolidLine if ok else Qt.DashLine,
        )
        qp.setPen(pen)
        qp.setBrush(Qt.NoBrush)
        qp.drawPolyline(self._poly(pts))
        if over is not None:
            self._draw_layer(qp, over, mapping)
        elif self.analysis is None and self.state.baseline is not None:
            self._label_rects = []
            self._draw_legend(qp)
        self._draw_nodes(qp)
        self._draw_readouts(qp, pts)
        if self.stale and self.analysis is not None:
            qp.setPen(QColor(OKABE_ITO["vermillion"]))
            qp.drawText(
                QPointF(12, self.height() - 12), "results shown are for an earlier outline (stale)"
            )
        qp.end()
        restore_none_refcount()
        self.last_paint_profile = self.state.profile
        self.last_paint_built = built
        self.last_paint_time = time.perf_counter()
        self.painted.emit(self.last_paint_time)
