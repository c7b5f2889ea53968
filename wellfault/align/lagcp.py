"""Cheap fault screen: change points of the local lag between well and type log.

The well is put in predicted strat coordinates (:func:`~wellfault.align.resample_strat`, same
rows as the engine). For windows of ``window`` rows every ``hop`` rows, the zero-normalised
cross-correlation (Pearson, per curve, weighted mean over curves) with the type log is computed
at every reference position by FFT; a position gives a lag (reference position minus predicted
position, in reference samples). Across a fault the lag steps by the stratigraphic jump Δs;
between faults it drifts (a thickness change of 10 % drifts it by one sample every ten).

Tracking. Each window's best position on its own (``track=False``, the screen's first form) is
lost on long type logs: a window of a few metres finds chance matches of correlation 0.9 and
more anywhere in thousands of metres of log. So the lag is *tracked*: a Viterbi pass over
(window, lag) — every lag, not a short list of candidates, O(windows × (M + span) × drift) —
with cost −atanh(r) per window at lag ℓ (the Fisher transform of the correlation r, clipped at
0.995, so that 0.99 against 0.9 counts as evidence, unlike 1 − r), lag changes between
consecutive windows of up to ``ceil(hop·drift_rate) + 1`` samples at ``drift_cost`` per sample
(thickness change), and any larger change at ``jump_cost`` (a fault). The tracked lag is then
median-filtered (edge-preserving; long enough to remove the windows that straddle a cut) and
segmented with PELT (Killick et al. 2012, via ruptures). The default cost fits a straight line
to each segment (ruptures ``linear``: least-squares residual of ``lag ~ 1 + window index``);
``l2``/``l1`` fit a constant. With tracking, a change point is reported only where the tracked
path itself jumps within one window length of it (PELT alone also splits the bends that
unit-by-unit thickness change puts in the drift).

Penalty (reference/methods.md §6.2): ``pen = c·σ²·ln n`` for the squared-residual costs
(``linear``, ``l2``), ``c·σ·ln n`` for ``l1``, ``n`` the number of windows, σ estimated robustly
from the (tracked) unfiltered lag track as ``MAD(diff)/(0.6745·√2)`` and floored at 0.5 sample
(the lag is an integer); ``c = 3`` by default (c = 1 over-segments, c = 2..4 recover the true
steps in the ruptures experiment of §6.2). Steps smaller than ``min_step`` samples are not
reported.

Window length is a trade: longer windows make chance matches rarer, but with overlapping
windows the track can slide across a cut by the drift allowed in each straddling window (see
``drift_cost``), and the median filter and minimum segment (a window's worth of windows) grow.
On the real-log benchmark 40 rows (6 m) did best; 130 rows (20 m) found fewer cuts.

Measured (benchmarks/bench_curves.py, 210 wells on three real gamma-ray type logs of
8,000-10,600 samples, through :func:`wellfault.evidence.curve_baselines.find_cuts_lag_screen`): see the
benchmark's "lag screen" column — it finds most cuts of |Δs| >= 5 m with a few false ones,
placed to a few metres of MD (a screen, not a pick), in about a second per well — no faster
than the engine on logs of this size (per window an FFT over the whole type log, and the
tracking pass); its first, untracked form found next to nothing there (chance matches of 6 m
windows everywhere).

References
----------
.. [1] R. Killick, P. Fearnhead and I. A. Eckley, "Optimal detection of changepoints with a
   linear computational cost", JASA 107(500):1590-1598, 2012. doi:10.1080/01621459.2012.737745
.. [2] C. Truong, L. Oudre and N. Vayatis, "Selective review of offline change point detection
   methods", Signal Processing 167:107299, 2020. doi:10.1016/j.sigpro.2019.107299
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import ruptures as rpt
from numba import njit
from scipy import fft as sfft
from scipy.signal import medfilt

from ..errors import input_error
from .misfit import standardise
from .resample import resample_strat

__all__ = ["LAG_MODELS", "LagCut", "LagTrack", "lag_changepoints"]

_R_MAX = 0.995   # correlations are clipped here before the Fisher transform (atanh(0.995) = 3)

#: valid ``model`` keys (ruptures cost functions): piecewise-linear lag (a fault step on top
#: of the slow drift that thickness change gives), piecewise-constant lag (l2, l1)
LAG_MODELS = ("linear", "l2", "l1")


@dataclass(frozen=True)
class LagCut:
    """A step of the lag track: a candidate fault cut.

    ``sample`` is the first well sample below it; ``size`` = lag after − lag before (medians of
    the two segments) = Δs in reference samples, same sign convention as the engine's jumps.
    """

    sample: int
    window: int
    size: float
    lag_before: float
    lag_after: float


@dataclass(frozen=True)
class LagTrack:
    """Lag track of the windows (centre sample, lag, filtered lag, correlation at the chosen
    lag) and its change points; ``lag_raw`` is each window's best lag on its own (equal to
    ``lag`` without tracking)."""

    sample: np.ndarray
    lag: np.ndarray
    lag_filtered: np.ndarray
    correlation: np.ndarray
    penalty: float
    cuts: tuple[LagCut, ...]
    lag_raw: np.ndarray | None = None


def _window_scores(xr, Rr, ref, w, starts, window):
    """Yield, per window ``q``: the weighted Pearson correlation of the window with the type
    log at every template start ``i`` (-inf where invalid), and ``omin``, the predicted
    position of the window's lowest row — the lag of start ``i`` is ``i − omin``."""
    m, nc = ref.shape
    span = int(np.max([Rr[s:s + window].max() - Rr[s:s + window].min() for s in starts])) + 1
    nfft = sfft.next_fast_len(m + span)
    ref_f = sfft.rfft(ref, nfft, axis=0)            # (nf, C)
    ref2_f = sfft.rfft(ref * ref, nfft, axis=0)
    chunk = 64
    for c0 in range(0, len(starts), chunk):
        ss = starts[c0:c0 + chunk]
        k = len(ss)
        score = np.zeros((k, m))
        wtot = np.zeros((k, m))
        omins = np.array([int(Rr[s:s + window].min()) for s in ss], np.int64)
        for ch in range(nc):
            T = np.zeros((k, nfft))
            Mk = np.zeros((k, nfft))
            sx2 = np.zeros(k)
            for q, s in enumerate(ss):
                x = xr[s:s + window, ch]
                o = Rr[s:s + window]
                ok = ~np.isnan(x)
                if ok.sum() < 2:
                    continue
                xt = x[ok] - x[ok].mean()
                oo = o[ok]
                omin, omax = int(o.min()), int(o.max())
                L = omax - omin + 1
                # reversed template so that a convolution gives the correlation
                np.add.at(T[q], L - 1 - (oo - omin), xt)
                np.add.at(Mk[q], L - 1 - (oo - omin), 1.0)
                sx2[q] = float(np.sum(xt * xt))
            Tf = sfft.rfft(T, axis=1)
            Mf = sfft.rfft(Mk, axis=1)
            num = sfft.irfft(Tf * ref_f[:, ch], nfft, axis=1)
            s1 = sfft.irfft(Mf * ref_f[:, ch], nfft, axis=1)
            s2 = sfft.irfft(Mf * ref2_f[:, ch], nfft, axis=1)
            for q, s in enumerate(ss):
                o = Rr[s:s + window]
                L = int(o.max() - o.min()) + 1
                nmask = Mk[q].sum()
                if nmask < 2 or sx2[q] <= 0:
                    continue
                # valid correlation index i <-> template offset 0 at reference i (i = 0..m-L)
                sl = slice(L - 1, m)
                var = s2[q, sl] - s1[q, sl] ** 2 / nmask
                den = np.sqrt(np.maximum(var, 1e-12) * sx2[q])
                corr = num[q, sl] / den
                score[q, : m - L + 1] += w[ch] * corr
                wtot[q, : m - L + 1] += w[ch]
        for q in range(k):
            valid = wtot[q] > 0
            sc = np.where(valid, score[q] / np.where(valid, wtot[q], 1.0), -np.inf)
            yield c0 + q, sc, int(omins[q])


@njit(cache=True)
def _dp_step(F, e, drift, drift_cost, jump_cost, back):
    """One window of the lag tracking: ``F`` (L,) best costs per lag before, ``e`` (L,)
    emission; a lag change of ``d <= drift`` costs ``drift_cost·|d|``, a jump from the best
    lag ``jump_cost``. Writes the move into ``back`` (offset of the predecessor lag, or 127
    for a jump) and returns the new costs and the previous best lag."""
    n = F.shape[0]
    arg = 0
    for k in range(n):
        if F[k] < F[arg]:
            arg = k
    jc = F[arg] + jump_cost
    out = np.empty(n)
    for j in range(n):
        b = np.inf
        bo = 0
        for d in range(-drift, drift + 1):
            k = j - d
            if 0 <= k < n:
                v = F[k] + drift_cost * abs(d)
                if v < b:
                    b = v
                    bo = d
        if jc < b:
            b = jc
            bo = 127
        out[j] = b + e[j]
        back[j] = bo
    return out, arg


def _window_lags(xr, Rr, ref, w, starts, window, track=False, drift=0, drift_cost=0.0,
                 jump_cost=1.0):
    """Per window: its best lag on its own (``raw``) and correlation there, and with ``track``
    the lag and correlation of the tracked path (module docstring; else equal to raw)."""
    m = ref.shape[0]
    nwin = len(starts)
    raw = np.full(nwin, np.nan)
    raw_c = np.full(nwin, np.nan)
    F = back = argprev = keep = lo = nl = None
    if track:
        spans = [int(Rr[s:s + window].min()) for s in starts]
        lo = -max(spans)                       # lag grid: every lag any window can take
        nl = m + max(spans) - min(spans) + 1
        F = np.zeros(nl)
        back = np.zeros((nwin, nl), np.int8)
        argprev = np.zeros(nwin, np.int64)
        keep = []
    for q, sc, omin in _window_scores(xr, Rr, ref, w, starts, window):
        if np.isfinite(sc).any():
            i = int(np.argmax(sc))
            raw[q] = i - omin
            raw_c[q] = sc[i]
        if track:
            e = np.zeros(nl)                   # no correlation (also off the log): 0
            a0 = -omin - lo                    # lag grid index of template start 0
            good = np.isfinite(sc)
            seg = e[a0:a0 + m]
            seg[good] = -np.arctanh(np.clip(sc[good], -_R_MAX, _R_MAX))
            F, argprev[q] = _dp_step(F, e, int(drift), float(drift_cost), float(jump_cost),
                                     back[q])
            keep.append((a0, sc))
    if not track:
        return raw, raw_c, raw.copy(), raw_c.copy(), None
    lag = np.empty(nwin)
    corr = np.empty(nwin)
    jumped = np.zeros(nwin, dtype=bool)
    j = int(np.argmin(F))
    for q in range(nwin - 1, -1, -1):
        lag[q] = j + lo
        a0, sc = keep[q]
        i = j - a0
        corr[q] = sc[i] if 0 <= i < m and np.isfinite(sc[i]) else np.nan
        bo = int(back[q, j])
        jumped[q] = bo == 127 and q > 0
        j = int(argprev[q]) if bo == 127 else j - bo
    return raw, raw_c, lag, corr, jumped


def _segment_end(t: np.ndarray, y: np.ndarray, at: float, model: str) -> float:
    """Value of a segment's fit at window position ``at`` (line for ``linear``, else median)."""
    if model == "linear" and t.size >= 8:
        k, c = np.polyfit(t, y, 1)
        return float(k * at + c)
    return float(np.median(y))


def lag_changepoints(
    well: np.ndarray,
    ref: np.ndarray,
    step: np.ndarray,
    *,
    weights: np.ndarray | None = None,
    window: int = 40,
    hop: int | None = None,
    min_rate: float = 0.1,
    penalty_factor: float = 3.0,
    model: str = "linear",
    min_size: int | None = None,
    smooth: int | None = None,
    min_step: float = 6.0,
    track: bool = True,
    jump_cost: float = 3.0,
    drift_rate: float = 0.2,
    drift_cost: float = 0.02,
) -> LagTrack:
    """Candidate fault cuts from steps in the windowed cross-correlation lag.

    A fast screen and a cross-check of :class:`~wellfault.align.AlignmentEngine`: cut
    positions are known to about ``hop`` rows, sizes to a sample or two.

    Parameters
    ----------
    well : (N, C) or (N,) — well curves (NaN = null); ref : (M, C) or (M,) — type log.
    step : (N,) — predicted signed strat increment per well sample [reference samples].
    weights : (C,) optional curve weights.
    window, hop : window length and spacing [rows = reference samples of predicted strat];
        hop defaults to window // 4.
    min_rate : floor on |step| for the strat arc length (as in the engine).
    penalty_factor : c in ``pen = c·σ²·ln n`` (l2) or ``c·σ·ln n`` (l1).
    model : one of :data:`LAG_MODELS`.
    min_size : minimum segment length [windows]; default ``window // hop`` (one window).
    smooth : median-filter length [windows, odd]; default ``2·(window // hop) + 1``, so that
        the windows straddling a cut (whose lag is meaningless) are filtered out.
    min_step : smallest lag step reported as a cut [reference samples].
    track : follow the lag from window to window (module docstring); False = each window's
        best lag on its own (the screen's first form, lost on long type logs).
    jump_cost : cost of a lag change beyond the drift allowance in the tracking [units of
        1 − correlation, summed over windows].
    drift_rate, drift_cost : from one window to the next the lag may drift by up to
        ``ceil(hop·drift_rate) + 1`` samples (thickness change: 0.2 = 20 % thicker or thinner
        than predicted), at ``drift_cost`` per sample. Across the ``window // hop`` windows
        that straddle a cut the track may slide by that many drifts instead of jumping: keep
        ``(window // hop)·(ceil(hop·drift_rate) + 1)`` below ``min_step`` (true of the
        defaults for ``min_step`` >= 13, i.e. 2 m at 0.15 m), or small cuts go unconfirmed.

    Returns
    -------
    LagTrack
    """
    if model not in LAG_MODELS:
        raise input_error("unknown lag change-point model", value=model,
                          fix=f"use one of {LAG_MODELS}")
    if window < 4:
        raise input_error("window too short", value=window, fix="use at least 4 rows")
    hop = max(1, window // 4) if hop is None else int(hop)
    per = max(1, window // hop)
    min_size = per if min_size is None else int(min_size)
    smooth = 2 * per + 1 if smooth is None else int(smooth)
    x = np.asarray(well, dtype=float)
    r = np.asarray(ref, dtype=float)
    x = x[:, None] if x.ndim == 1 else x
    r = r[:, None] if r.ndim == 1 else r
    if x.shape[1] != r.shape[1]:
        raise input_error("well and reference have different numbers of curves",
                          value=(x.shape[1], r.shape[1]))
    w = np.ones(r.shape[1]) if weights is None else np.asarray(weights, dtype=float)
    zr = np.nan_to_num(standardise(r), nan=0.0)
    rows = resample_strat(standardise(x), step, min_rate=min_rate)
    Rr = np.floor(rows.centre + 0.5).astype(np.int64)
    nr = rows.n_rows
    starts = np.arange(0, max(nr - window, 0) + 1, hop)
    if nr < window or len(starts) == 0:
        empty = np.zeros(0)
        return LagTrack(np.zeros(0, np.int64), empty, empty, empty, math.nan, ())
    raw, raw_c, lags, peaks, jumped = _window_lags(
        rows.values, Rr, zr, w, starts, window, track=bool(track),
        drift=int(math.ceil(hop * float(drift_rate))) + 1, drift_cost=float(drift_cost),
        jump_cost=float(jump_cost))
    centre_rows = starts + window // 2
    samples = np.searchsorted(rows.sample_row, centre_rows, "left").clip(0, len(x) - 1)
    fill = np.where(np.isnan(lags), np.nanmedian(lags) if np.isfinite(lags).any() else 0, lags)
    k = max(1, int(smooth) | 1)
    filt = medfilt(fill, k) if k > 1 and len(fill) >= k else fill.copy()
    n = len(filt)
    d = np.diff(fill)                     # raw lag: its jitter is the noise the filter hides
    sigma = np.median(np.abs(d - np.median(d))) / (0.6745 * math.sqrt(2)) if n > 2 else 0.0
    sigma = max(float(sigma), 0.5)
    pen = penalty_factor * (sigma if model == "l1" else sigma**2) * math.log(max(n, 2))
    cuts = []
    if n >= 2 * min_size:
        t = np.arange(n, dtype=float)
        signal = np.column_stack([filt, np.ones(n), t]) if model == "linear" else filt
        bkps = rpt.Pelt(model=model, min_size=min_size, jump=1).fit(signal).predict(pen=pen)
        edges = [0] + list(bkps)
        for q in range(1, len(edges) - 1):
            b = edges[q]
            before = _segment_end(t[edges[q - 1]:b], filt[edges[q - 1]:b], b - 0.5, model)
            after = _segment_end(t[b:edges[q + 1]], filt[b:edges[q + 1]], b - 0.5, model)
            if abs(after - before) < min_step:
                continue
            if jumped is not None and not jumped[max(b - per, 0):b + per + 1].any():
                continue                  # the tracked lag drifts here: no step to confirm
            mid_row = (centre_rows[b - 1] + centre_rows[b]) // 2
            sample = int(np.searchsorted(rows.sample_row, mid_row, "left"))
            cuts.append(LagCut(sample=sample, window=int(b), size=after - before,
                               lag_before=before, lag_after=after))
    return LagTrack(sample=samples, lag=lags, lag_filtered=filt, correlation=peaks,
                    penalty=float(pen), cuts=tuple(cuts), lag_raw=raw)
