"""The baselines of curve evidence, on the engine's own inputs: monotone DTW and the lag change-
point screen (benchmarks compare alignment models only)."""

from __future__ import annotations

import math

import numpy as np

from ..geo.column import ReferenceColumn
from ..geo.dip import BedDip
from .curve_settings import CurveSettings
from .curvecuts import CurveResult, _inputs, _measured
from .measure import FaultAssumptions

__all__ = ["find_cuts_dtw_baseline", "find_cuts_lag_screen"]


def find_cuts_dtw_baseline(
    well,
    column: ReferenceColumn,
    trajectory,
    *,
    bed_dip: BedDip | None = None,
    settings: CurveSettings = CurveSettings(),
    assumptions: FaultAssumptions = FaultAssumptions(),
    picks=None,
) -> CurveResult:
    """The published baseline: monotone DTW of the well against the type log, cuts read from
    its path (:func:`wellfault.align.dtw_cuts`). For benchmarks, not for use.

    Same inputs as :func:`find_cuts_from_curves` and the same preparation — the engine's
    calibrated standardisation, the well resampled on rows one type-log sample apart in
    predicted strat (:func:`wellfault.align.resample_strat`), the engine's Huber misfit —
    so only the alignment model differs: open-begin/open-end DTW
    (:func:`wellfault.align.dtw_subsequence`) instead of the jump DP. The type log is read
    backwards for a well drilling mostly up-section (a monotone path has one direction).
    Cuts of at least ``settings.min_jump_m`` are reported with confidence NaN (DTW has no
    evidence measure); ``alignment`` holds the DTW result.
    """
    from ..align import AlignmentEngine, dtw_cuts, dtw_subsequence, resample_strat

    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    inp = _inputs(well, column, trajectory, bed_dip, settings, picks)
    kw = settings.engine_kwargs(inp.ds)
    kw["off_log"] = 0
    engine = AlignmentEngine(inp.ref, weights=inp.weights, **kw)
    center, scale = engine.calibrate(inp.x, inp.step)
    zr = engine._prepared()["ref_t"].T
    m = zr.shape[0]
    orient = 1.0 if float(np.sum(inp.step)) >= 0 else -1.0
    rows = resample_strat((inp.x - center) / scale, orient * inp.step,
                          min_rate=float(engine.min_rate))
    ref_o = zr if orient > 0 else zr[::-1]
    res = dtw_subsequence(np.nan_to_num(rows.values, nan=np.nan), np.ascontiguousarray(ref_o),
                          weights=inp.weights, huber_delta=float(engine.huber_delta))
    lag, found = dtw_cuts(res.path, rows.n_rows, min_size=settings.min_jump_m / inp.ds,
                          stretch=float(engine.stretch))
    jrow = lag + np.arange(rows.n_rows)                       # oriented reference position
    jpos = jrow if orient > 0 else (m - 1) - jrow
    srow = rows.sample_row
    s = inp.s0 + jpos[srow] * inp.ds
    track = inp.track(s, column.unit_at(s), np.nan)
    cuts = []
    for c in found:
        sample = int(np.clip(np.searchsorted(srow, c.row, "left"), 1, inp.md.size - 1))
        first = int(np.clip(np.searchsorted(srow, c.first_row, "left"), 1, inp.md.size - 1))
        last = int(np.clip(np.searchsorted(srow, c.last_row + 1, "left"), sample,
                           inp.md.size - 1))
        cuts.append(_measured(
            well, column, trajectory, bed_dip, assumptions, picks, inp, sample=sample,
            first=first, last=last, delta_s_m=orient * c.size * inp.ds,
            j_before=float(jpos[srow[sample - 1]]), j_after=float(jpos[srow[sample]]),
            confidence=math.nan, method="dtw", note="monotone DTW baseline"))
    return CurveResult(cuts, track, res, inp.names)


_LAG_WINDOW_M = 6.0    # lag-screen window [m of strat]; 9-20 m did no better on real logs


def find_cuts_lag_screen(
    well,
    column: ReferenceColumn,
    trajectory,
    *,
    bed_dip: BedDip | None = None,
    settings: CurveSettings = CurveSettings(),
    assumptions: FaultAssumptions = FaultAssumptions(),
    picks=None,
    **screen,
) -> CurveResult:
    """The cheap screen: steps of the tracked windowed cross-correlation lag
    (:func:`wellfault.align.lag_changepoints`; ``screen`` holds its keyword arguments; the
    window is 6 m of strat unless given).

    Cuts of at least ``settings.min_jump_m`` are measured like the engine's, placed at the
    change point and bracketed by the windows around it; confidence is the smaller of the
    tracked correlations either side. The windowed correlation is gain/offset free, so no
    calibration is needed. ``alignment`` holds the :class:`~wellfault.align.LagTrack`.
    """
    from ..align import lag_changepoints

    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    inp = _inputs(well, column, trajectory, bed_dip, settings, picks)
    opts = dict(min_step=settings.min_jump_m / inp.ds,
                window=max(8, int(round(_LAG_WINDOW_M / inp.ds))))
    opts.update(screen)
    tr = lag_changepoints(inp.x, inp.ref, inp.step, weights=inp.weights, **opts)
    n = inp.md.size
    pred = np.cumsum(inp.step) - 0.5 * inp.step            # lagcp's predicted positions
    if tr.sample.size:
        lag = np.interp(np.arange(n), tr.sample, tr.lag_filtered)
    else:
        lag = np.full(n, np.nan)
    s = inp.s0 + (pred + lag) * inp.ds
    track = inp.track(s, column.unit_at(s), np.nan)
    cuts = []
    nw = tr.sample.size
    for c in tr.cuts:
        if abs(c.size) * inp.ds < settings.min_jump_m:
            continue
        b = int(c.window)
        first = int(np.clip(tr.sample[max(b - 2, 0)], 1, n - 1))
        last = int(np.clip(tr.sample[min(b + 1, nw - 1)], 1, n - 1))
        sample = int(np.clip(c.sample, first, last))
        corr = tr.correlation[max(b - 2, 0):min(b + 2, nw)]
        conf = float(np.nanmin(corr)) if np.isfinite(corr).any() else math.nan
        cuts.append(_measured(
            well, column, trajectory, bed_dip, assumptions, picks, inp, sample=sample,
            first=first, last=last, delta_s_m=float(c.size) * inp.ds,
            j_before=float(pred[sample - 1] + c.lag_before),
            j_after=float(pred[sample] + c.lag_after), confidence=max(conf, 0.0),
            method="lag screen", note="lag change-point screen"))
    return CurveResult(cuts, track, tr, inp.names)
