"""Compiled kernels of the alignment engine (numba). See engine.py for the model.

Notation: row ``r`` of the DP is a strat row (resample.py); ``Rr[r]`` is the rounded predicted
position of its centre, ``sig[r]`` its direction (+-1) and ``run[r]`` the number of consecutive
rows ending at ``r`` with that direction. Cost rows are kept in rings of ``nb`` rows padded
with ``pad`` cells of +inf on each side, so moves that leave the reference read +inf.

Moves landing at (r, j) (codes stored one byte per cell):

* FOLLOW from (r-1, j - (Rr[r]-Rr[r-1]))
* FAST   from (r-bf, j - (Rr[r]-Rr[r-bf]) - sig) through rows r-bf+1..r-1 at the new lag
* SLOW   from (r-bs, j - (Rr[r]-Rr[r-bs]) + sig) likewise
* JUMP   from any cell i of row r-1; without the prior (``jump_bin <= 0``) at cost
  ``jump_pen`` from the best cell of row r-1 (its column is kept per row in ``rowarg``); with
  it at cost ``jump_pen + slope_bin·max(0, |i // B − j // B| − w)`` (``B = jump_bin``, ``w =
  jump_wbins``; engine.py, "Jump-size prior"), its source column kept per row and landing bin
  in ``jsrc[r]``
* START  (row 0 only)

Anchors (engine.py, "Anchors"): ``anc_row`` (sorted), ``anc_lo``, ``anc_hi`` list column bands;
on row ``anc_row[k]`` every column outside ``[anc_lo[k], anc_hi[k]]`` costs ``anc_cost`` more.
"""

from __future__ import annotations

import numpy as np
from numba import njit

from .misfit import _row_sum, misfit_cols

FOLLOW, FAST, SLOW, JUMP, START = 0, 1, 2, 3, 4
INF = np.inf
_INF_BITS = np.int64(0x7FF0000000000000)        # the bits of +inf
#: width of the column bins whose minima give a row's minimum (without the jump-size prior);
#: each bin costs a slice per row, so 64 cost the calibration's coarse DPs (about 1,800
#: columns) 12 % of their time against 256 (0.99 against 1.13 ns per cell); wider gains nothing
_CHUNK = 256


# Hot loops index slices from 0 (``x = a[off:off + m]; x[j]``), never ``a[off + j]``: with an
# index of unknown sign numba emits a negative-index wraparound test per access, which blocks
# vectorisation (measured 5x slower).


@njit(cache=True)
def _add_shifted(acc, src, so, m):
    s = src[so:so + m]
    for j in range(m):
        acc[j] += s[j]


@njit(cache=True)
def _all_null(x):
    for c in range(x.shape[0]):
        if not np.isnan(x[c]):
            return False
    return True


@njit(cache=True)
def _first_index(a, off, m, value):
    # no early exit: a minimum over the whole slice vectorises (a search stays scalar)
    x = a[off:off + m]
    first = m
    for j in range(m):
        first = min(first, j if x[j] == value else m)
    return first if first < m else 0


@njit(cache=True)
def _bin_minima(F, pad, c0, c1, B, out):
    """``out[q]``: the least cost of columns ``q·B .. q·B + B − 1`` of row ``F`` within c0..c1-1
    (+inf for a bin outside them: the columns outside hold +inf).

    Costs are sums of terms >= 0 (penalties, misfits: engine.py checks them) or +inf, and the
    bits of such doubles order as the numbers do, so each minimum is taken over the bits as
    integers: an integer minimum vectorises, a floating-point one stayed scalar even with
    fast-math flags (measured 12x slower)."""
    bits = out.view(np.int64)
    for q in range(out.shape[0]):
        lo, hi = max(q * B, c0), min(q * B + B, c1)
        x = F[pad + lo:pad + hi].view(np.int64)
        best = _INF_BITS
        for j in range(x.shape[0]):
            best = min(best, x[j])
        bits[q] = best


@njit(cache=True)
def _jump_sources(F, pad, m, B, w, slope_bin, bmin, hb, barg, src):
    """The cheapest jump source of every landing bin under the binned size prior.

    Columns are binned ``B`` at a time; a jump from bin q to bin q' costs
    ``slope_bin·max(0, |q − q'| − w)`` on top of the penalty. ``bmin`` holds each source bin's
    best cost (:func:`_bin_minima` of the previous row ``F``); per landing bin the best source
    bin: a minimum over the ``2w + 1`` bins around it, then a two-pass linear distance transform
    over the bins (Felzenszwalb and Huttenlocher 2012, the L1 case). ``hb[q]`` gets the cost of
    landing bin q's cheapest source, ``src[q]`` that source's column (the first column of the
    source bin at the bin's minimum). O(nbins·w), plus one bin's scan per source bin used.
    """
    nb = (m + B - 1) // B
    for q in range(nb):
        barg[q] = -1                            # the bin's best column, found when used
    for q in range(nb):                         # source bins first, their columns at the end
        best = INF
        arg = q
        for q2 in range(max(0, q - w), min(nb, q + w + 1)):
            if bmin[q2] < best:
                best = bmin[q2]
                arg = q2
        hb[q] = best
        src[q] = arg
    for q in range(1, nb):
        v = hb[q - 1] + slope_bin
        if v < hb[q]:
            hb[q] = v
            src[q] = src[q - 1]
    for q in range(nb - 2, -1, -1):
        v = hb[q + 1] + slope_bin
        if v < hb[q]:
            hb[q] = v
            src[q] = src[q + 1]
    for q in range(nb):
        b = src[q]
        if barg[b] < 0:
            barg[b] = b * B + _first_index(F, pad + b * B, min(B, m - b * B), bmin[b])
        src[q] = barg[b]


@njit(cache=True)
def forward_rows(r0, r1, r_first, start_col, c0, c1, xr, lo_t, hi_t, ref_nan, w, kind, delta,
                 null_misfit, Rr, sig, run, bf, bs, jump_pen, strain_pen, Fring, Ering, rowmin,
                 rowarg, rowmean, codes, code_row0, off_lo, off_hi, off_cost, jump_bin,
                 jump_wbins, slope_bin, jsrc, anc_row, anc_lo, anc_hi, anc_cost):
    """Run the DP over rows r0..r1-1, writing codes into ``codes[r - code_row0]``.

    Row ``r_first`` starts the paths: at every column (``start_col < 0``) or at ``start_col``
    only. Only columns c0..c1-1 are computed (the others stay +inf); ``jump_pen = inf``
    disables jumps. The engine runs it with (0, -1, 0, M); the cut evidence runs it on a
    window of rows with a fixed or free start, without jumps. Columns before ``off_lo`` and
    from ``off_hi`` on are off the type log (engine.py, "Off the type log"): their misfit is
    the constant ``off_cost`` (``null_misfit`` on a row without any valid value, like every
    column); ``rowmean`` is the mean over the columns on the log.

    Per row: the misfit pass (its mean taken before anchor bands, module docstring, are
    added), then the jump sources (with the jump-size prior, ``jump_bin > 0``, from
    :func:`_jump_sources` on the previous row's bin minima, sources into ``jsrc[r]``; without
    it the best cell of the previous row), then one pass over the candidates and codes
    (:func:`_best_moves`; a disabled move reads an all-inf row), then the row's bin minima
    (:func:`_bin_minima`), which give its minimum and the first column at it. Every cell gets
    the same arithmetic, in the same order, as in the first version of this kernel (one fused
    select pass with byte codes, 2.7 ns per cell on the curve screening benchmark's wells,
    now about 1.0-1.6 ns).
    """
    nb = Fring.shape[0]
    m = lo_t.shape[1]
    pad = (Fring.shape[1] - m) // 2
    n = c1 - c0
    none = np.full(m + 2 * pad, INF)
    zero = np.zeros(n)
    Xf = np.empty(n)
    Xs = np.empty(n)
    prior = jump_bin > 0 and jump_pen < INF
    jv = np.empty(m)
    # bins of columns: the prior's, or _CHUNK wide for the row minimum and its first column
    B = jump_bin if prior else _CHUNK
    nbin = (m + B - 1) // B
    bcur = np.full(nbin, INF)                   # bin minima of this row and of the previous
    bprev = np.full(nbin, INF)
    hb = np.empty(nbin)
    barg = np.empty(nbin, np.int64)
    if prior and r0 > r_first:
        _bin_minima(Fring[(r0 - 1) % nb], pad, c0, c1, B, bprev)
    ka = np.searchsorted(anc_row, r0)
    for r in range(r0, r1):
        slot = r % nb
        Er = Ering[slot]
        Fr = Fring[slot]
        cr = codes[r - code_row0, c0:c1]
        # the misfit on the type log's columns only; the off-log ones are the constant below
        a0, a1 = max(c0, off_lo), min(c1, off_hi)
        if a1 > a0:
            misfit_cols(xr[r], lo_t, hi_t, ref_nan, w, kind, delta, null_misfit,
                        Er[pad:pad + m], a0, a1)
        # a row without any valid value costs null_misfit everywhere, off the log included
        # (with off_cost there, a long run of nulls would draw the path off the log)
        oc = null_misfit if _all_null(xr[r]) else off_cost
        rowmean[r] = _row_sum(Er, pad + a0, a1 - a0) / (a1 - a0) if a1 > a0 else oc
        if a0 > c0 or a1 < c1:
            eo = Er[pad:pad + m]
            for j in range(c0, min(c1, off_lo)):
                eo[j] = oc
            for j in range(max(c0, off_hi), c1):
                eo[j] = oc
        while ka < anc_row.shape[0] and anc_row[ka] < r:
            ka += 1
        while ka < anc_row.shape[0] and anc_row[ka] == r:
            ea = Er[pad:pad + m]
            for j in range(c0, c1):
                if j < anc_lo[ka] or j > anc_hi[ka]:
                    ea[j] += anc_cost
            ka += 1
        fr = Fr[pad + c0:pad + c1]
        er = Er[pad + c0:pad + c1]
        if r == r_first:
            for j in range(n):
                fr[j] = er[j] if start_col < 0 or c0 + j == start_col else INF
                cr[j] = START
        else:
            Fp = Fring[(r - 1) % nb]
            op = pad + c0 - (Rr[r] - Rr[r - 1])
            # FAST: ff + (sf + ef) is ff + (strain + the misfit of its one intermediate row)
            # for bf = 2 (stretch 1.5), ff + strain for bf = 1; other bf: the sum made first
            Ff, of, ef, sf = none, pad + c0, zero, strain_pen
            if r - bf >= r_first and run[r] >= bf:
                Ff = Fring[(r - bf) % nb]
                of = pad + c0 - (Rr[r] - Rr[r - bf]) - sig[r]
                if bf == 2:
                    t = r - 1
                    ef = _shifted(Ering[t % nb], pad + c0 - (Rr[r] - Rr[t]), n)
                elif bf > 2:
                    _strain_sum(Xf, Ering, nb, pad + c0, Rr, r, r - bf + 1, strain_pen)
                    ef, sf = Xf, 0.0
            # SLOW: fs + ((ss + es1) + es2), likewise for bs = 3 and 2
            Fs, os_, es1, es2, ss = none, pad + c0, zero, zero, strain_pen
            if r - bs >= r_first and run[r] >= bs:
                Fs = Fring[(r - bs) % nb]
                os_ = pad + c0 - (Rr[r] - Rr[r - bs]) + sig[r]
                if bs <= 3:
                    t = r - bs + 1
                    es1 = _shifted(Ering[t % nb], pad + c0 - (Rr[r] - Rr[t]), n)
                    if bs == 3:
                        es2 = _shifted(Ering[(t + 1) % nb], pad + c0 - (Rr[r] - Rr[t + 1]), n)
                else:
                    _strain_sum(Xs, Ering, nb, pad + c0, Rr, r, r - bs + 1, strain_pen)
                    es1, ss = Xs, 0.0
            if prior:
                _jump_sources(Fp, pad, m, jump_bin, jump_wbins, slope_bin, bprev, hb, barg,
                              jsrc[r])
                for q in range(c0 // B, (c1 + B - 1) // B):
                    jv[max(q * B, c0):min(q * B + B, c1)] = hb[q] + jump_pen
            else:
                jv[c0:c1] = rowmin[r - 1] + jump_pen
            _best_moves(Fp[op:op + n], Ff[of:of + n], ef, sf, Fs[os_:os_ + n], es1, es2, ss,
                        jv[c0:c1], er, fr, cr)
        _bin_minima(Fr, pad, c0, c1, B, bcur)
        best = INF
        for q in range(c0 // B, (c1 + B - 1) // B):
            best = min(best, bcur[q])
        rowmin[r] = best
        rowarg[r] = _first_in_bins(Fr, pad, c0, c1, B, bcur, best)
        if prior:
            bcur, bprev = bprev, bcur


@njit(cache=True)
def _shifted(a, off, n):
    return a[off:off + n]


@njit(cache=True)
def _strain_sum(X, Ering, nb, off, Rr, r, t0, strain_pen):
    """``X = strain_pen + E[t0] + ... + E[r-1]``, each row shifted to the lag of row r, added
    in that order."""
    X[:] = strain_pen
    for t in range(t0, r):
        _add_shifted(X, Ering[t % nb], off - (Rr[r] - Rr[t]), X.shape[0])


@njit(cache=True)
def _first_in_bins(F, pad, c0, c1, B, bmin, best):
    """First column within c0..c1-1 of row ``F`` whose cost is ``best``, found through the bin
    minima: the first bin whose minimum is ``best``, then the first such column in it."""
    for q in range(c0 // B, (c1 + B - 1) // B):
        if bmin[q] == best:
            lo = max(q * B, c0)
            return lo + _first_index(F, pad + lo, min(q * B + B, c1) - lo, best)
    return c0


@njit(cache=True)
def _best_moves(fp, ff, ef, sf, fs, es1, es2, ss, aj, er, fr, cr):
    """One row's cost and move code per column, in one pass: the cheapest of FOLLOW
    (``fp``), FAST (``ff + (sf + ef)``), SLOW (``fs + ((ss + es1) + es2)``) and JUMP (``aj``,
    penalty included), ties keeping the earlier move, plus the misfit ``er``. The code is an
    integer narrowed on the store: a byte select per candidate kept the loop scalar (4x
    slower)."""
    for j in range(fr.shape[0]):
        c = fp[j]
        code = FOLLOW
        v = ff[j] + (sf + ef[j])
        if v < c:
            c = v
            code = FAST
        v = fs[j] + ((ss + es1[j]) + es2[j])
        if v < c:
            c = v
            code = SLOW
        v = aj[j]
        if v < c:
            c = v
            code = JUMP
        fr[j] = c + er[j]
        cr[j] = np.uint8(code)


@njit(cache=True)
def row_geometry(meta, r0, r1, Rr, sig, run):
    """Rounded centre, direction and same-direction run length of rows r0..r1-1."""
    for r in range(r0, r1):
        Rr[r] = np.int64(np.floor(meta[r, 2] + 0.5))
        sig[r] = np.int64(meta[r, 3])
        run[r] = run[r - 1] + 1 if r > 0 and sig[r] == sig[r - 1] else 1


@njit(cache=True)
def traceback_block(codes, code_row0, r, j, Rr, sig, bf, bs, rowarg, path, landing, jumped,
                    jump_bin, jsrc):
    """Follow moves back from landing cell (r, j) while r lies in this block of codes.

    Fills ``path`` (column per row), ``landing`` (1 where a move lands) and ``jumped`` (1 where
    a jump lands). Returns the next landing cell (r, j); r == -1 once the start is reached.
    """
    while r >= code_row0:
        path[r] = j
        landing[r] = 1
        code = codes[r - code_row0, j]
        if code == START:
            return -1, j
        if code == FOLLOW:
            j = j - (Rr[r] - Rr[r - 1])
            r = r - 1
        elif code == JUMP:
            jumped[r] = 1
            j = jsrc[r, j // jump_bin] if jump_bin > 0 else rowarg[r - 1]
            r = r - 1
        else:
            b = bf if code == FAST else bs
            for t in range(r - b + 1, r):
                path[t] = j - (Rr[r] - Rr[t])
                landing[t] = 0
            if code == FAST:
                j = j - (Rr[r] - Rr[r - b]) - sig[r]
            else:
                j = j - (Rr[r] - Rr[r - b]) + sig[r]
            r = r - b
    return r, j
