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


def test_guard_gives_back_a_shortfall_when_it_is_needed(monkeypatch):
    # PySide6 6.12.0 (which pyproject excludes) drops references to None; simulate the shortfall
    # by a baseline three above today's count and check that CPython's own count
    # (sys.getrefcount) comes back up by exactly that much
    import profilebench.gui.refcount_guard as guard

    monkeypatch.setattr(guard, "_NEEDED", True)
    now = sys.getrefcount(None)
    monkeypatch.setattr(guard, "_baseline", now + 3)
    given = guard.restore_none_refcount()
    after = sys.getrefcount(None)
    assert given == 3
    assert after >= now + 3 - 1  # other code may drop a reference of its own meanwhile
    # no shortfall: nothing given back, and the baseline follows a rising count
    monkeypatch.setattr(guard, "_baseline", 0)
    assert guard.restore_none_refcount() == 0
    assert abs(guard._baseline - sys.getrefcount(None)) <= 2  # None passes through the call


def test_guard_does_nothing_where_pyside_is_sound(monkeypatch):
    import profilebench.gui.refcount_guard as guard

    monkeypatch.setattr(guard, "_NEEDED", False)
    monkeypatch.setattr(guard, "_baseline", sys.getrefcount(None) + 5)
    assert guard.restore_none_refcount() == 0
