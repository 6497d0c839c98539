"""Work-around for a reference-count bug of PySide6 6.12 on Python < 3.12.

In PySide6 6.12.0 every call of a Qt method returning ``void`` (``QPainter.setPen``,
``QPainter.drawLine``, ``QPolygonF.append``...) drops one reference to ``None`` that it never
took (measured: ``sys.getrefcount(None)`` falls by exactly one per call). Before Python 3.12
``None`` is not immortal, so after enough painting its count reaches zero and the interpreter
aborts ("none_dealloc: deallocating None"). The guard gives the lost references back: it
records the count once and, when called (after each repaint, and on a timer), adds back any
shortfall with ``Py_IncRef``. Extra references to None are harmless, so over-compensating a
legitimate drop does no damage. Remove this module once PySide6 is fixed.
"""

from __future__ import annotations

import ctypes
import sys

__all__ = ["restore_none_refcount", "install"]

_baseline = None
_incref = ctypes.pythonapi.Py_IncRef
_incref.argtypes = [ctypes.py_object]
_incref.restype = None


def _needed() -> bool:
    try:
        import PySide6
    except ImportError:
        return False
    return sys.version_info < (3, 12) and PySide6.__version__.startswith("6.12.0")


# pyproject.toml excludes PySide6 6.12.0; the guard stays for an environment that has it anyway
_NEEDED = _needed()


def restore_none_refcount() -> int:
    """Give back references to None lost since the last call; returns how many."""
    global _baseline
    if not _NEEDED:
        return 0
    now = sys.getrefcount(None)
    if _baseline is None or now > _baseline:
        _baseline = now
        return 0
    deficit = _baseline - now
    for _ in range(deficit):
        _incref(None)
    return deficit


def install(parent) -> object:
    """Run the guard every 100 ms on a QTimer owned by ``parent``; returns the timer."""
    from PySide6.QtCore import QTimer

    timer = QTimer(parent)
    timer.setInterval(100)
    timer.timeout.connect(restore_none_refcount)
    timer.start()
    restore_none_refcount()
    return timer
