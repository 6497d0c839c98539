"""The None-refcount guard gives back what PySide6's void methods drop."""

import sys

from PySide6.QtCore import QPointF
from PySide6.QtGui import QImage, QPainter, QPen

from profilebench.gui.refcount_guard import restore_none_refcount


def test_none_refcount_is_restored_after_many_void_calls(qtbot):
    restore_none_refcount()
    before = sys.getrefcount(None)
    img = QImage(20, 20, QImage.Format_ARGB32)
    qp = QPainter(img)
    pen = QPen()
    for _ in range(5000):
        qp.setPen(pen)
        qp.drawLine(QPointF(0, 0), QPointF(10, 10))
    qp.end()
    restore_none_refcount()
    # sys.getrefcount is CPython's own count: after the guard it is not below where it started
    assert sys.getrefcount(None) >= before
