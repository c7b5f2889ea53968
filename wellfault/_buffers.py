"""Buffers of the alignment engine: a growable array for per-sample and per-row state that is
appended to (a well being drilled), and a pool of reusable move-code blocks."""

from __future__ import annotations

import threading

import numpy as np


class GrowBuffer:
    """Array ``a`` whose first axis grows by doubling (amortised O(1) per appended row).

    ``ensure(n)`` returns ``a`` with room for at least ``n`` rows, the existing ones kept; rows
    past those written are zeros. Callers keep their own count of the rows in use.
    """

    def __init__(self, tail: tuple = (), dtype=float, capacity: int = 64) -> None:
        self.a = np.zeros((int(capacity),) + tuple(tail), dtype=dtype)

    def ensure(self, n: int) -> np.ndarray:
        if n > self.a.shape[0]:
            new = np.zeros((max(n, 2 * self.a.shape[0]),) + self.a.shape[1:], self.a.dtype)
            new[: self.a.shape[0]] = self.a
            self.a = new
        return self.a


class BlockPool:
    """Reusable blocks of one-byte move codes, kept up to ``max_bytes`` in all.

    A whole-well alignment writes one byte per DP cell (tens of MB per well) and drops it once
    the path is traced back. Fresh memory of that size comes from the operating system page by
    page, each page faulted in and zeroed: measured 25 ms of system time per well (14,000 page
    faults) on the curve screening benchmark's wells, a sixth of a well's CPU. Blocks given
    back here are handed out again, unzeroed (every code is written before it is read).
    Thread-safe.
    """

    def __init__(self, max_bytes: int) -> None:
        self.max_bytes = int(max_bytes)
        self._free: dict[tuple, list[np.ndarray]] = {}
        self._bytes = 0
        self._lock = threading.Lock()

    def take(self, shape: tuple) -> np.ndarray:
        """A uint8 block of ``shape``: a pooled one if any, else a new one (contents unset)."""
        with self._lock:
            free = self._free.get(shape)
            if free:
                self._bytes -= free[-1].nbytes
                return free.pop()
        return np.empty(shape, np.uint8)

    def give(self, blocks) -> None:
        """Keep ``blocks`` for later :meth:`take` calls, as far as ``max_bytes`` allows."""
        with self._lock:
            for b in blocks:
                if self._bytes + b.nbytes <= self.max_bytes:
                    self._free.setdefault(b.shape, []).append(b)
                    self._bytes += b.nbytes
