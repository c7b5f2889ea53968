"""Plain monotone dynamic time warping: the published baseline the engine is compared with.

:func:`dtw_baseline` anchors both ends (the textbook form). :func:`dtw_subsequence` is the
open-begin/open-end form (the well may cover any part of the type log), and :func:`dtw_cuts`
turns its path into fault cuts the only way a monotone path can show them: a run of skipped
type-log samples at one well row (missing section) or a run of well rows held on one
type-log sample (a stall: where section is repeated, the path can only wait).

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

__all__ = ["DTWResult", "dtw_baseline", "dtw_subsequence", "DTWCut", "dtw_cuts"]


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


def _as_pair(a, b) -> tuple[np.ndarray, np.ndarray]:
    """Two sequences as (n, C) and (m, C) float arrays (1-D: one curve); refused when empty or
    when their curve counts differ."""
    x = np.asarray(a, dtype=float)
    y = np.asarray(b, dtype=float)
    x = x[:, None] if x.ndim == 1 else x
    y = y[:, None] if y.ndim == 1 else y
    if x.ndim != 2 or y.ndim != 2 or x.shape[1] != y.shape[1] or len(x) == 0 or len(y) == 0:
        raise input_error("DTW needs two non-empty sequences with the same number of curves",
                          value=(x.shape, y.shape))
    return x, y


def dtw_baseline(a: np.ndarray, b: np.ndarray) -> DTWResult:
    """Monotone DTW of sequence ``a`` (N,) or (N, C) against ``b`` (M,) or (M, C).

    >>> dtw_baseline([1, 2, 3], [1, 2, 2, 3]).distance
    0.0
    """
    x, y = _as_pair(a, b)
    if np.isnan(x).any() or np.isnan(y).any():
        raise input_error("DTW baseline does not take nulls", fix="drop or fill NaN first")
    d, path = _dtw(np.ascontiguousarray(x), np.ascontiguousarray(y))
    return DTWResult(distance=float(d), path=path)


@njit(cache=True)
def _dtw_open(a, b, w, delta):
    n, m, nc = a.shape[0], b.shape[0], a.shape[1]
    codes = np.empty((n, m), np.uint8)       # 0 diagonal, 1 from above (i-1), 2 from left (j-1)
    prev = np.empty(m)
    cur = np.empty(m)
    for i in range(n):
        for j in range(m):
            num = 0.0
            den = 0.0
            for c in range(nc):
                x = a[i, c]
                y = b[j, c]
                if x == x and y == y:
                    d = abs(x - y)
                    num += w[c] * (0.5 * d * d if d <= delta else delta * (d - 0.5 * delta))
                    den += w[c]
            e = num / den if den > 0 else 0.5
            if i == 0:                          # open begin: start anywhere in b
                best = 0.0
                code = 0
            else:
                best = prev[j - 1] if j > 0 else np.inf
                code = 0
                if prev[j] < best:
                    best = prev[j]
                    code = 1
            if j > 0 and cur[j - 1] < best and i > 0:
                best = cur[j - 1]
                code = 2
            cur[j] = best + e
            codes[i, j] = code
        for j in range(m):
            prev[j] = cur[j]
    jend = 0
    for j in range(m):                          # open end: finish anywhere in b
        if prev[j] < prev[jend]:
            jend = j
    total = prev[jend]
    path = np.empty((n + m, 2), np.int64)
    i, j, k = n - 1, jend, 0
    while True:
        path[k, 0] = i
        path[k, 1] = j
        k += 1
        if i == 0:
            break
        code = codes[i, j]
        if code == 0:
            i -= 1
            j -= 1
        elif code == 1:
            i -= 1
        else:
            j -= 1
    return total, path[:k][::-1].copy()


def dtw_subsequence(a: np.ndarray, b: np.ndarray, *, weights=None,
                    huber_delta: float = 1.0) -> DTWResult:
    """Monotone DTW of ``a`` (N, C) against any contiguous part of ``b`` (M, C).

    Steps (1,0), (0,1), (1,1), each adding the local cost; the path starts on any sample of
    ``b`` at the first of ``a`` (open begin) and ends on any (open end) — the subsequence form
    of DTW, since a well logs only part of the type log. Local cost: the engine's Huber misfit
    (misfit.py) of the curves valid in both, 0.5 where none is, so that the baseline differs
    from the engine only in the moves it allows. O(N·M) time, one byte per cell.

    >>> dtw_subsequence([2.0, 3.0, 4.0], [0.0, 1.0, 2.0, 3.0, 4.0, 5.0]).path[:, 1].tolist()
    [2, 3, 4]
    """
    x, y = _as_pair(a, b)
    w = np.ones(x.shape[1]) if weights is None else np.asarray(weights, dtype=float)
    d, path = _dtw_open(np.ascontiguousarray(x), np.ascontiguousarray(y),
                        np.ascontiguousarray(w), float(huber_delta))
    return DTWResult(distance=float(d), path=path)


@dataclass(frozen=True)
class DTWCut:
    """A cut read from a monotone DTW path: rows ``first_row..last_row`` of the well (in the
    path's own row order) hold the step; ``size`` is the lag change across it (reference
    samples; > 0 skipped reference, < 0 stalled rows)."""

    row: int
    first_row: int
    last_row: int
    size: float


def dtw_cuts(path: np.ndarray, n_rows: int, *, min_size: float, max_gap: int = 4,
             stretch: float = 1.5) -> tuple[np.ndarray, list[DTWCut]]:
    """Fault cuts from a monotone path of ``n_rows`` well rows predicted one reference sample
    apart (so that the lag ``j − i`` is constant where the well follows the type log).

    The lag of each row is taken at the row's last path cell; ``d`` is its change from the row
    before. Rows where the path leaves the prediction abnormally are *skips* (``d >= 2``: the
    path runs along the type log at one well row — missing section) and *stalls* (``d <= −1``:
    the path waits on one type-log sample — the only way a monotone path can absorb repeated
    section, or a thickening). Such rows of one kind are grouped when at most ``max_gap`` rows
    apart, and a group is a cut when its total lag change exceeds by ``min_size`` what a
    thickness change within the stretch window ``k`` could give over the group's span (a lag
    rise of ``(k − 1)`` or a fall of ``(1 − 1/k)`` per row, as the engine allows); the cut is
    placed at the group's middle row and bracketed by it, its size is the total change.

    Returns
    -------
    lag : (n_rows,) float — reference position minus row index per row.
    cuts : list of DTWCut

    >>> path = np.array([[0, 10], [1, 11], [1, 12], [1, 13], [1, 14], [2, 15], [3, 16]])
    >>> dtw_cuts(path, 4, min_size=3)[1]
    [DTWCut(row=1, first_row=1, last_row=1, size=3.0)]
    """
    p = np.asarray(path)
    last = np.full(n_rows, -1, np.int64)
    last[p[:, 0]] = p[:, 1]                      # path is ordered: the row's last cell wins
    lag = last.astype(float) - np.arange(n_rows)
    d = np.diff(lag, prepend=lag[0])
    cuts: list[DTWCut] = []
    k = float(stretch)
    for kind, allow in ((d >= 2, k - 1.0), (d <= -1, 1.0 - 1.0 / k)):
        rows = np.flatnonzero(kind)
        if rows.size == 0:
            continue
        breaks = np.flatnonzero(np.diff(rows) > max_gap + 1)
        for g in np.split(rows, breaks + 1):
            total = float(d[g].sum())
            if abs(total) - allow * (g[-1] - g[0] + 1) >= min_size:
                cuts.append(DTWCut(int((g[0] + g[-1]) // 2), int(g[0]), int(g[-1]), total))
    return lag, sorted(cuts, key=lambda c: c.row)
