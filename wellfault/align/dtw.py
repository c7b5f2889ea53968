"""Plain monotone dynamic time warping: the published baseline the engine is compared with.

Classic DTW (Sakoe & Chiba 1978) with the symmetric step set (1,0), (0,1), (1,1), local cost the
absolute difference (summed over curves), both ends anchored. Its path is monotone in both
sequences, so it cannot represent a repeated section (the path would have to go back in the
type log) and can only smear a missing one over a long run of one-to-many matches
(reference/methods.md §5.1). Full cost matrix in memory: O(N·M) floats, for baselines only.

References
----------
.. [1] H. Sakoe and S. Chiba, "Dynamic programming algorithm optimization for spoken word
   recognition", IEEE Trans. ASSP 26(1):43-49, 1978. doi:10.1109/TASSP.1978.1163055
   (details from memory; cited as the ancestor of DTW in reference/methods.md §5.1)
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numba import njit

from ..errors import input_error

__all__ = ["DTWResult", "dtw_baseline"]


@dataclass(frozen=True)
class DTWResult:
    """DTW distance (sum of local costs along the path) and the path as (K, 2) index pairs."""

    distance: float
    path: np.ndarray


@njit(cache=True)
def _dtw(a, b):
    n, m = a.shape[0], b.shape[0]
    D = np.full((n + 1, m + 1), np.inf)
    D[0, 0] = 0.0
    for i in range(1, n + 1):
        for j in range(1, m + 1):
            c = 0.0
            for k in range(a.shape[1]):
                c += abs(a[i - 1, k] - b[j - 1, k])
            best = D[i - 1, j - 1]
            if D[i - 1, j] < best:
                best = D[i - 1, j]
            if D[i, j - 1] < best:
                best = D[i, j - 1]
            D[i, j] = c + best
    path = np.empty((n + m, 2), np.int64)
    i, j, k = n, m, 0
    while i > 0 and j > 0:
        path[k, 0] = i - 1
        path[k, 1] = j - 1
        k += 1
        d, u, l = D[i - 1, j - 1], D[i - 1, j], D[i, j - 1]
        if d <= u and d <= l:
            i, j = i - 1, j - 1
        elif u <= l:
            i -= 1
        else:
            j -= 1
    return D[n, m], path[:k][::-1].copy()


def dtw_baseline(a: np.ndarray, b: np.ndarray) -> DTWResult:
    """Monotone DTW of sequence ``a`` (N,) or (N, C) against ``b`` (M,) or (M, C).

    >>> dtw_baseline([1, 2, 3], [1, 2, 2, 3]).distance
    0.0
    """
    x = np.asarray(a, dtype=float)
    y = np.asarray(b, dtype=float)
    x = x[:, None] if x.ndim == 1 else x
    y = y[:, None] if y.ndim == 1 else y
    if x.ndim != 2 or y.ndim != 2 or x.shape[1] != y.shape[1] or len(x) == 0 or len(y) == 0:
        raise input_error("DTW needs two non-empty sequences with the same number of curves",
                          value=(x.shape, y.shape))
    if np.isnan(x).any() or np.isnan(y).any():
        raise input_error("DTW baseline does not take nulls", fix="drop or fill NaN first")
    d, path = _dtw(np.ascontiguousarray(x), np.ascontiguousarray(y))
    return DTWResult(distance=float(d), path=path)
