"""A growable array for per-sample and per-row state that is appended to (a well being drilled)."""

from __future__ import annotations

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
