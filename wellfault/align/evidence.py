"""From the DP state to an :class:`~wellfault.align.alignment.Alignment`: traceback, per-sample
positions, cut refinement on the well's own samples, cut margin, bracket and confidence.

The definitions are in the docstring of :mod:`wellfault.align.engine` ("Cut evidence").
"""

from __future__ import annotations

import math

import numpy as np

from . import _kernels as K
from .misfit import MISFITS


def _traceback(al, nrows: int, blocks: list) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    p = al._p
    path = np.zeros(nrows, np.int64)
    landing = np.zeros(nrows, np.uint8)
    jumped = np.zeros(nrows, np.uint8)
    r = nrows - 1
    j = int(al._rowarg.a[r])
    order = sorted(range(len(blocks)), key=lambda i: (blocks[i][0], i), reverse=True)
    for i in order:
        row0, blk = blocks[i]
        if r < 0:
            break
        if row0 <= r < row0 + blk.shape[0]:
            r, j = K.traceback_block(blk, row0, r, j, al._Rr.a, al._sig.a, p["bf"], p["bs"],
                                     al._rowarg.a, path, landing, jumped, p["jump_bin"],
                                     al._jsrc.a)
    return path, landing, jumped


def _sample_misfit(z, pos, ref_t, w, kind, delta, null_misfit) -> np.ndarray:
    """Misfit of standardised samples z (n, C) at float reference positions (linear interp)."""
    m = ref_t.shape[1]
    q = np.clip(pos, 0.0, m - 1.0)
    i0 = np.minimum(np.floor(q).astype(np.int64), m - 2)
    f = q - i0
    y = ref_t[:, i0] * (1 - f) + ref_t[:, i0 + 1] * f           # (C, n)
    d = z.T - y
    a = np.abs(d)
    rho = a if MISFITS[kind] == "abs" else np.where(a <= delta, 0.5 * d * d,
                                                      delta * (a - 0.5 * delta))
    ok = ~np.isnan(rho)
    ww = w[:, None] * ok
    num = np.where(ok, rho, 0.0) * w[:, None]
    wsum = ww.sum(axis=0)
    out = np.full(z.shape[0], float(null_misfit))
    good = wsum > 0
    out[good] = num.sum(axis=0)[good] / wsum[good]
    return out


def _path_misfit(x, path, p, kind, delta, null_misfit) -> np.ndarray:
    """Misfit of each row at its path column (same definition as misfit.misfit_cols; off-log
    columns cost ``off_cost``, or ``null_misfit`` on a row without any valid value)."""
    lo, hi = p["lo_t"][:, path].T, p["hi_t"][:, path].T            # (R, C)
    d = np.maximum(np.maximum(lo - x, x - hi), 0.0)
    q = np.minimum(d, delta)
    rho = d if MISFITS[kind] == "abs" else q * (d - 0.5 * q)
    ok = ~np.isnan(rho)
    ww = p["w"][None, :] * ok
    wsum = ww.sum(axis=1)
    out = np.full(x.shape[0], float(null_misfit))
    good = wsum > 0
    out[good] = (np.where(ok, rho, 0.0) * ww).sum(axis=1)[good] / wsum[good]
    off = (path < p["off"]) | (path >= p["off"] + p["m_ref"])
    valid = ~np.isnan(x).all(axis=1)               # a row without values: null_misfit anywhere
    out[off & valid] = p["off_cost"]
    return out


def _correlation(z: np.ndarray, pos: np.ndarray, ref_t: np.ndarray, w: np.ndarray) -> float:
    """Weighted mean over curves of the Pearson correlation between standardised well samples
    ``z`` (n, C) and the type log read at their positions; NaN with fewer than 5 samples."""
    if z.shape[0] < 5:
        return math.nan
    m = ref_t.shape[1]
    q = np.clip(pos, 0.0, m - 1.0)
    i0 = np.minimum(np.floor(q).astype(np.int64), m - 2)
    f = q - i0
    num = den = 0.0
    for c in range(z.shape[1]):
        y = ref_t[c, i0] * (1 - f) + ref_t[c, i0 + 1] * f
        ok = ~np.isnan(z[:, c]) & ~np.isnan(y)
        if ok.sum() < 5:
            continue
        a, b = z[ok, c] - z[ok, c].mean(), y[ok] - y[ok].mean()
        sab = math.sqrt(float(a @ a) * float(b @ b))
        if sab > 0:
            num += w[c] * float(a @ b) / sab
            den += w[c]
    return num / den if den > 0 else math.nan


def confidence_features(margin: float, corr: float, run: float) -> np.ndarray:
    """Features of the calibrated confidence (engine.py, "Cut evidence"): 1,
    ln(1 + max(margin, 0)), correlation (NaN → 0), ln(max(run, 1))."""
    m = max(float(margin), 0.0) if margin == margin else 0.0
    c = float(corr) if corr == corr else 0.0
    return np.array([1.0, math.log1p(m), c, math.log(max(float(run), 1.0))])


def _confidence(margin: float, corr: float, e, run: float = math.inf) -> float:
    """The cut's confidence (engine.py, "Cut evidence")."""
    if not margin == margin:
        return math.nan
    coef = getattr(e, "confidence_coef", None)
    if coef is not None:
        x = float(np.dot(np.asarray(coef, dtype=float), confidence_features(margin, corr, run)))
        return 1.0 / (1.0 + math.exp(-max(min(x, 700.0), -700.0)))
    x = max(min((margin - float(e.confidence_offset)) / float(e.confidence_scale), 700.0),
            -700.0)
    lo, hi = float(e.correlation_floor), float(e.correlation_full)
    ramp = 0.0 if not corr == corr else min(max((corr - lo) / (hi - lo), 0.0), 1.0)
    return ramp / (1.0 + math.exp(-x))


_PLACE_ROWS = 4   # rows either side of a jump's landing row searched for the cut's sample


def _landing_at_or_after(landing: np.ndarray, lo: int, hi: int) -> int:
    for r in range(lo, hi + 1):
        if landing[r]:
            return r
    return hi


def _landing_at_or_before(landing: np.ndarray, hi: int, lo: int) -> int:
    for r in range(hi, lo - 1, -1):
        if landing[r]:
            return r
    return lo


_NO_SOURCES = np.zeros((1, 1), np.int64)


def _window_dp(al, rows: np.ndarray, Rr: np.ndarray, sig: np.ndarray, start_col: int,
               centre: int, free: bool, anchors) -> np.ndarray:
    """Row minima of the jump-free DP over the given window rows (engine kernel, no jumps).

    Paths start on the first row at ``start_col`` (or, when ``free``, at any column within
    reach of it); only the columns within reach (two per row either way) are computed.
    ``anchors`` (rows of the window, first and last column) cost as in the engine.
    """
    p, e = al._p, al.engine
    n = rows.shape[0]
    m = p["lo_t"].shape[1]
    run = np.ones(n, np.int64)
    for i in range(1, n):
        run[i] = run[i - 1] + 1 if sig[i] == sig[i - 1] else 1
    reach = 2 * n + 2
    c0, c1 = max(0, centre - reach), min(m, centre + reach + 1)
    F = np.full((p["nb"], m + 2 * p["pad"]), np.inf)
    E = np.full_like(F, np.inf)
    rowmin = np.empty(n)
    rowarg = np.empty(n, np.int64)
    rowmean = np.empty(n)
    codes = np.empty((n, m), np.uint8)
    K.forward_rows(0, n, 0, -1 if free else start_col, c0, c1, rows, p["lo_t"], p["hi_t"],
                   p["ref_nan"], p["w"], p["kind"], float(e.huber_delta), float(e.null_misfit),
                   Rr, sig, run, p["bf"], p["bs"], math.inf, float(e.strain_penalty), F, E,
                   rowmin, rowarg, rowmean, codes, 0, p["off"], p["off"] + p["m_ref"],
                   p["off_cost"], 0, 0, 0.0, _NO_SOURCES, *anchors, p["anchor_cost"])
    return rowmin


def _jump_evidence(al, r: int, a: int, z: int, path: np.ndarray,
                   free_start: bool) -> tuple[float, int, int]:
    """Margin and bracket rows (lo, hi) of the jump landing at row r, on window [a, z].

    Paths start at the optimal path's cell of row a (anywhere near it if ``free_start``: the
    well's first block) and end anywhere near its cell of row z (after z the next jump, or the
    end of the window, frees the end). cost[k] = best such path with one jump, landing at row
    a + k (forward jump-free DP to row a + k - 1, jump, backward jump-free DP from row a + k),
    the jump costing what the path's own jump costs (penalty and prior excess for its size);
    the alternative is the best such path with no jump at all. Anchors cost as in the engine. The backward DP is the engine's
    forward kernel run on the reversed rows, whose multi-row moves put the lag change at the
    other end of the move: same stretch limits, a slightly different path family.
    """
    e = al.engine
    sl = slice(a, z + 1)
    rows = al._rows.a[sl]
    Rr, sig = al._Rr.a[sl], al._sig.a[sl]
    arow, alo, ahi = al.anchor_bands(a, z + 1)
    fmin = _window_dp(al, rows, Rr, sig, int(path[a]), int(path[a]), free_start,
                      (arow - a, alo, ahi))
    bmin = _window_dp(al, np.ascontiguousarray(rows[::-1]), np.ascontiguousarray(Rr[::-1]),
                      np.ascontiguousarray(-sig[::-1]), int(path[z]), int(path[z]), True,
                      ((z - arow)[::-1].copy(), alo[::-1].copy(), ahi[::-1].copy()))[::-1]
    cost = np.full(z - a + 1, np.inf)
    cost[1:] = fmin[:-1] + e.jump_cost(path[r - 1], path[r]) + bmin[1:]
    best = float(cost.min())
    alt = float(fmin[-1])
    margin = alt - best if np.isfinite(alt) else math.inf
    tol = float(e.bracket_tolerance) + 1e-9 * max(1.0, abs(best))
    k = r - a
    lo = hi = k
    while lo - 1 >= 1 and cost[lo - 1] - best <= tol:
        lo -= 1
    while hi + 1 < cost.size and cost[hi + 1] - best <= tol:
        hi += 1
    return margin, a + lo, a + hi


def _fitted_size(lag_row: np.ndarray, r: int, prev_r: int, next_r: int, W: int) -> float:
    """Lag step at the jump landing on row r, from straight lines fitted to the path's lag.

    The lag of the path is quantised to whole samples and, right next to a jump, can lag
    behind a gradual thickness change (the jump re-anchors the path for free, so the DP has no
    reason to catch up just before it). A least-squares line through the lag of up to ``W``
    rows on each side (not crossing neighbouring jumps), evaluated at the cut, averages both
    effects out; with fewer than 4 rows on a side the path's own lag there is used.
    """
    x = np.arange(lag_row.size, dtype=float)
    ends = []
    for lo, hi in ((max(prev_r, r - W), r), (r, min(next_r, r + W))):
        if hi - lo >= 4:
            k, c = np.polyfit(x[lo:hi], lag_row[lo:hi], 1)
            ends.append(k * (r - 0.5) + c)
        else:
            ends.append(float(lag_row[r - 1] if hi == r else lag_row[r]))
    return float(ends[1] - ends[0])


def _placed(al, nrows: int, blocks: list):
    """Traceback and per-sample positions, every cut placed on the well's own samples.

    Returns (path, landing, jumped, jump_rows, pos, cuts): ``cuts[q]`` is the sample of the
    cut of jump row ``jump_rows[q]`` (positions ``pos`` include the ``off``-log margin)."""
    p = al._p
    n = al.n_samples
    centre = al._meta.a[:nrows, 2]
    path, landing, jumped = _traceback(al, nrows, blocks)
    srow = al._srow.a[:n]
    spos = al._spos.a[:n]
    lag_row = path - centre                          # reference position minus prediction
    pos = spos + lag_row[srow]
    z = al._z.a[:n]
    kind, delta, nm = p["kind"], float(al.engine.huber_delta), float(al.engine.null_misfit)
    jump_rows = np.flatnonzero(jumped)
    cuts = []
    for q, r in enumerate(jump_rows):
        r = int(r)
        prev_r = int(jump_rows[q - 1]) if q > 0 else 0
        next_r = int(jump_rows[q + 1]) if q + 1 < jump_rows.size else nrows
        # place the cut on the well's own samples: split the samples of rows r-K..r+K-1
        # (not crossing the neighbouring jumps) where the misfit with the lag before / after
        # is least — the DP may land a jump a row or two off where the type log is plain
        i0 = int(np.searchsorted(srow, max(r - _PLACE_ROWS, prev_r), "left"))
        i1 = int(np.searchsorted(srow, min(r + _PLACE_ROWS - 1, next_r - 1), "right"))
        s_row = int(np.searchsorted(srow, r, "left"))
        cut = s_row
        if i1 - i0 >= 2:
            idx = np.arange(i0, i1)
            pre = _sample_misfit(z[idx], spos[idx] + lag_row[r - 1], p["dp_t"], p["w"],
                                 kind, delta, nm)
            post = _sample_misfit(z[idx], spos[idx] + lag_row[r], p["dp_t"], p["w"],
                                  kind, delta, nm)
            cpre = np.concatenate([[0.0], np.cumsum(pre)])
            cpost = np.concatenate([np.cumsum(post[::-1])[::-1], [0.0]])
            tot = cpre + cpost                        # split before idx[k], k = 0..len
            k_best = int(np.argmin(tot))
            if tot[k_best] < tot[s_row - i0] - 1e-12:
                cut = i0 + k_best
            pos[i0:cut] = spos[i0:cut] + lag_row[r - 1]
            pos[cut:i1] = spos[cut:i1] + lag_row[r]
        cuts.append(min(max(cut, 1), n - 1) if n > 1 else 0)
    return path, landing, jumped, jump_rows, pos, cuts


def path_and_score(al, nrows: int, blocks: list) -> tuple[np.ndarray, float]:
    """Per-sample reference positions (cuts placed as in :func:`build_alignment`) and the
    path's cost, without the jumps' evidence and details: what the calibration pre-pass
    reads (:meth:`~wellfault.align.engine.AlignmentEngine.calibrate`)."""
    pos = _placed(al, nrows, blocks)[4]
    return pos - al._p["off"], float(al._rowmin.a[nrows - 1])


def build_alignment(al, nrows: int, blocks: list, evidence: bool = True):
    """The :class:`Alignment` of the first ``nrows`` rows of streaming aligner ``al``.

    Without ``evidence`` the cut margins, brackets and confidences are left as NaN.
    """
    from .alignment import Alignment, Jump

    p, e = al._p, al.engine
    n = al.n_samples
    path, landing, jumped, jump_rows, pos, cuts = _placed(al, nrows, blocks)
    score = float(al._rowmin.a[nrows - 1])
    srow = al._srow.a[:n].copy()
    lag_row = path - al._meta.a[:nrows, 2]
    z = al._z.a[:n]
    kind, delta, nm = p["kind"], float(e.huber_delta), float(e.null_misfit)
    W = int(e.evidence_rows)
    found = []
    for q, r in enumerate(jump_rows):
        r = int(r)
        prev_r = int(jump_rows[q - 1]) if q > 0 else 0
        next_r = int(jump_rows[q + 1]) if q + 1 < jump_rows.size else nrows
        a = _landing_at_or_after(landing, max(prev_r, r - W), r - 1)
        zz = _landing_at_or_before(landing, min(next_r - 1, r + W), r)
        if evidence:
            margin, lo, hi = _jump_evidence(al, r, a, zz, path, free_start=(q == 0 and a == 0))
        else:
            margin, lo, hi = math.nan, r, r
        cut = cuts[q]
        b_lo = int(np.searchsorted(srow, lo, "left"))
        b_hi = int(np.searchsorted(srow, hi, "left"))
        bracket = (min(b_lo, cut), min(max(b_hi, cut), n - 1))
        size = _fitted_size(lag_row, r, prev_r, next_r, W)
        found.append((cut, r, size, float(margin), bracket, a, zz, r - prev_r, next_r - r))

    # correlation with the type log on either side, once every cut has been placed
    off, m_ref = p["off"], p["m_ref"]
    on_log = (pos >= off - 0.5) & (pos <= off + m_ref - 0.5) if off > 0 else \
        np.ones(pos.shape, dtype=bool)                            # within the type log's ends
    jumps = []
    for cut, r, size, margin, bracket, a, zz, run_above, run_below in found:
        above = slice(int(np.searchsorted(srow, a, "left")), cut)
        below = slice(cut, int(np.searchsorted(srow, zz, "right")))
        corr = min(_correlation(z[above], pos[above], p["dp_t"], p["w"]),
                   _correlation(z[below], pos[below], p["dp_t"], p["w"]))
        conf = _confidence(margin, corr, e, min(run_above, run_below))
        jumps.append(Jump(sample=cut, row=r, j_before=float(pos[cut - 1]) - off if cut > 0
                          else float("nan"), j_after=float(pos[cut]) - off, size=size,
                          margin=margin, correlation=corr, confidence=conf, bracket=bracket,
                          off_log=bool(not on_log[cut] or (cut > 0 and not on_log[cut - 1])),
                          rows_above=int(run_above), rows_below=int(run_below)))

    # local fit quality per row, smoothed, then per sample
    epath = _path_misfit(al._rows.a[:nrows], path, p, kind, delta, nm)
    mean = al._rowmean.a[:nrows]
    with np.errstate(divide="ignore", invalid="ignore"):
        qual = np.where(mean > 0, 1.0 - epath / mean, 0.0)
    qual = np.clip(qual, 0.0, 1.0)
    h = int(e.smooth_rows)
    if h > 0 and nrows > 1:
        ker = np.ones(2 * h + 1)
        num = np.convolve(qual, ker, "same")
        den = np.convolve(np.ones(nrows), ker, "same")
        qual = num / den
    return Alignment(path=pos - off, score=score, jumps=tuple(jumps), confidence=qual[srow],
                     correlation=_correlation(z, pos, p["dp_t"], p["w"]), row_path=path - off,
                     sample_row=srow, center=al.center.copy(), scale=al.scale.copy(),
                     on_log=on_log)
