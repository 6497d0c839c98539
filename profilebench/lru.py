"""A small thread-safe least-recently-used cache (below every layer, as errors.py is), shared by
the radius-search cache (assess) and the studies' point cache."""

from __future__ import annotations

import threading
from collections import OrderedDict

__all__ = ["LruCache"]


class LruCache:
    """Values by key, at most ``size`` of them; the least recently used goes first."""

    def __init__(self, size: int, what: str = "entries"):
        if not isinstance(size, int) or isinstance(size, bool) or size < 1:
            raise ValueError(f"size must be a positive whole number of {what}, got {size!r}")
        self.size = size
        self._items: OrderedDict = OrderedDict()
        self._lock = threading.Lock()

    def __len__(self):
        with self._lock:
            return len(self._items)

    def clear(self):
        with self._lock:
            self._items.clear()

    def get(self, key):
        """The value stored under ``key``, or None (a hit becomes the most recent)."""
        with self._lock:
            hit = self._items.get(key)
            if hit is not None:
                self._items.move_to_end(key)
            return hit

    def put(self, key, value):
        with self._lock:
            self._items[key] = value
            self._items.move_to_end(key)
            while len(self._items) > self.size:
                self._items.popitem(last=False)

    def items(self):
        """A snapshot of the (key, value) pairs, oldest first."""
        with self._lock:
            return list(self._items.items())
