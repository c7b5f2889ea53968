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


# Hot loops index slices from 0 (``x = a[off:off + m]; x[j]``), never ``a[off + j]``: with an
# index of unknown sign numba emits a negative-index wraparound test per access, which blocks
# vectorisation (measured 5x slower).


@njit(cache=True)
def _add_shifted(acc, src, so, m):
    s = src[so:so + m]
    for j in range(m):
        acc[j] += s[j]


@njit(cache=True, fastmath={"reassoc", "nsz", "nnan"})
def _row_min(a, off, m):
    # reassociation lets the reduction vectorise; costs hold +inf but never NaN
    x = a[off:off + m]
    best = np.inf
    for j in range(m):
        best = min(best, x[j])
    return best


@njit(cache=True)
def _all_null(x):
    for c in range(x.shape[0]):
        if not np.isnan(x[c]):
            return False
    return True


@njit(cache=True)
def _first_index(a, off, m, value):
    x = a[off:off + m]
    for j in range(m):
        if x[j] == value:
            return j
    return 0


@njit(cache=True)
def _jump_costs(F, pad, m, B, w, slope_bin, bmin, barg, out, src):
    """Jump cost and source per column of the landing row under the binned size prior.

    Columns are binned ``B`` at a time; a jump from bin q to bin q' costs
    ``slope_bin·max(0, |q − q'| − w)`` on top of the penalty. Per source bin its best cell
    (vectorised minimum), then the best source bin of each landing bin: a minimum over the
    ``2w + 1`` bins around it, then a two-pass linear distance transform over the bins
    (Felzenszwalb and Huttenlocher 2012, the L1 case). ``out[j]`` gets the cheapest source cost
    of column j's bin, ``src[q]`` that source's column. O(m + nbins·w).
    """
    nb = (m + B - 1) // B
    for q in range(nb):
        bmin[q] = _row_min(F, pad + q * B, min(B, m - q * B))
        barg[q] = -1                            # the bin's best column, found when used
    hb = bmin[nb:2 * nb]
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
        s0 = q * B
        o = out[s0:min(s0 + B, m)]
        o[:] = hb[q]
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

    Per row: the misfit pass, one pass per intermediate row of the FAST/SLOW moves, then one
    fused branch-free pass over the candidates (a disabled move reads an all-inf row), so the
    compiler can vectorise; the jump source (best cell of the row) is kept per row. With the
    jump-size prior (``jump_bin > 0``) the jump cost of every column and the source of every
    landing bin come from :func:`_jump_costs` on the previous row (sources into ``jsrc[r]``).
    Anchor bands (module docstring) are added to the misfit row after its mean is taken.
    """
    nb = Fring.shape[0]
    m = lo_t.shape[1]
    pad = (Fring.shape[1] - m) // 2
    n = c1 - c0
    Xf = np.empty(n)
    Xs = np.empty(n)
    none = np.full(m + 2 * pad, INF)
    prior = jump_bin > 0 and jump_pen < INF
    jv = np.empty(m)
    nbin = (m + jump_bin - 1) // jump_bin if prior else 1
    bmin = np.empty(2 * nbin)
    barg = np.empty(nbin, np.int64)
    ka = np.searchsorted(anc_row, r0)
    for r in range(r0, r1):
        slot = r % nb
        Er = Ering[slot]
        Fr = Fring[slot]
        cr = codes[r - code_row0, c0:c1]
        misfit_cols(xr[r], lo_t, hi_t, ref_nan, w, kind, delta, null_misfit, Er[pad:pad + m],
                    c0, c1)
        # a row without any valid value costs null_misfit everywhere, off the log included
        # (with off_cost there, a long run of nulls would draw the path off the log)
        oc = null_misfit if _all_null(xr[r]) else off_cost
        a0, a1 = max(c0, off_lo), min(c1, off_hi)
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
            s = sig[r]
            Ff = none
            of = pad + c0
            Xf[:] = strain_pen
            if r - bf >= r_first and run[r] >= bf:
                Ff = Fring[(r - bf) % nb]
                of = pad + c0 - (Rr[r] - Rr[r - bf]) - s
                for t in range(r - bf + 1, r):
                    _add_shifted(Xf, Ering[t % nb], pad + c0 - (Rr[r] - Rr[t]), n)
            Fs = none
            os_ = pad + c0
            Xs[:] = strain_pen
            if r - bs >= r_first and run[r] >= bs:
                Fs = Fring[(r - bs) % nb]
                os_ = pad + c0 - (Rr[r] - Rr[r - bs]) + s
                for t in range(r - bs + 1, r):
                    _add_shifted(Xs, Ering[t % nb], pad + c0 - (Rr[r] - Rr[t]), n)
            if prior:
                _jump_costs(Fp, pad, m, jump_bin, jump_wbins, slope_bin, bmin, barg, jv,
                            jsrc[r])
            else:
                jv[:] = rowmin[r - 1]
            jc = jv[c0:c1]
            fp = Fp[op:op + n]
            ff = Ff[of:of + n]
            fs = Fs[os_:os_ + n]
            for j in range(n):
                # selects, no data-dependent branches; ties keep the earlier move
                c = fp[j]
                code = np.uint8(FOLLOW)
                v = ff[j] + Xf[j]
                lt = v < c
                c = v if lt else c
                code = np.uint8(FAST) if lt else code
                v = fs[j] + Xs[j]
                lt = v < c
                c = v if lt else c
                code = np.uint8(SLOW) if lt else code
                v = jc[j] + jump_pen
                lt = v < c
                c = v if lt else c
                code = np.uint8(JUMP) if lt else code
                fr[j] = c + er[j]
                cr[j] = code
        best = _row_min(Fr, pad + c0, n)
        rowmin[r] = best
        rowarg[r] = c0 + _first_index(Fr, pad + c0, n, best)


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
