"""Loading an underlay image and placing it by two reference points clicked on the canvas.

The placement itself (a similarity from two point pairs) is Qt-free
(:mod:`profilebench.editor.underlay`); here the image is read for its size, the two clicks are
collected, and the profile position of each point is asked for in a dialog.
"""

from __future__ import annotations

from pathlib import Path

from PySide6.QtGui import QImageReader
from PySide6.QtWidgets import QInputDialog

from profilebench.editor import commands
from profilebench.editor.fields import parse_point_mm
from profilebench.editor.underlay import Underlay
from profilebench.errors import InputError, ProfileBenchError

__all__ = ["underlay_from_image", "UnderlayPicking"]

#: the length (m) an image spans at first when there is no profile to size it by
DEFAULT_LENGTH = 4.5


def underlay_from_image(path, profile=None) -> Underlay:
    """The underlay of the image at ``path``, its bottom edge on the ground along the length of
    ``profile`` (or 4.5 m). InputError when the file is not an image that can be read."""
    from profilebench.io.atomic import check_input_file
    from profilebench.io.project import MAX_UNDERLAY_BYTES

    # a pipe, a device or a huge file would stall the image reader: refused first
    check_input_file(path, "underlay image", "choose a PNG or JPEG image", MAX_UNDERLAY_BYTES)
    reader = QImageReader(str(path))
    size = reader.size()
    if not size.isValid() or size.width() <= 0:
        raise InputError(
            f"cannot read the image {path} ({reader.errorString()}); give a PNG or JPEG"
        )
    length = DEFAULT_LENGTH
    if profile is not None:
        xs = [x for x, _ in profile.xy]
        length = max(xs) - min(xs)
    return Underlay.initial(Path(path).resolve(), size.width(), size.height(), length=length)


class UnderlayPicking:
    """The window's underlay: loaded from an image, placed by two point pairs, or by two
    clicks on it and the profile position of each (asked in a dialog)."""

    def __init__(self, window):
        self.window = window
        self.picks: list[tuple[float, float]] = []

    def load(self, path) -> bool:
        """Put the image at ``path`` under the profile (an undoable edit)."""
        w = self.window
        try:
            u = w._underlay_from_image(path)
        except ProfileBenchError as exc:
            w._show_banner(str(exc), True)
            return False
        return w._try(lambda: commands.set_underlay(w.document.state, u, "Load underlay"))

    def place(self, points_px, points_m) -> bool:
        """Place the underlay so image pixels ``points_px`` land on ``points_m`` (m)."""
        w = self.window
        u = w.document.underlay
        if u is None:
            w._show_banner("load an underlay image first", True)
            return False
        return w._try(
            lambda: commands.set_underlay(
                w.document.state, u.placed(points_px, points_m), "Place underlay"
            )
        )

    def start(self) -> None:
        w = self.window
        if w.document.underlay is None:
            w._show_banner("load an underlay image first (Underlay > Load image)", True)
            return
        self.picks = []
        w.canvas.picking = True
        w._show_banner(
            "Click the first reference point on the image (e.g. the front wheel centre).", False
        )

    def pick(self, x: float, y: float) -> None:
        """A click at profile position (x, y) m while picking."""
        w = self.window
        self.picks.append(w.document.underlay.to_image(x, y))
        if len(self.picks) < 2:
            w._show_banner(
                "Click the second reference point on the image (e.g. the rear wheel centre).", False
            )
            return
        w.canvas.picking = False
        w.banner.hide()
        points_m = []
        for k in range(2):
            text, ok = QInputDialog.getText(
                w, "Underlay reference point", f"Profile position of point {k + 1}: x, y in mm"
            )
            if not ok:
                return
            try:
                points_m.append(parse_point_mm(text))
            except ProfileBenchError as exc:
                w._show_banner(str(exc), True)
                return
        self.place(self.picks, points_m)
