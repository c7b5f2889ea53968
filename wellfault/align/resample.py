"""Resample a well's curves onto rows one reference sample apart in predicted strat distance.

The alignment engine does not work on the well's own samples. Each well sample ``i`` is
predicted to move through ``step[i]`` reference samples of stratigraphy (signed; from the
trajectory and the bed dip). The well is cut into *rows* of predicted stratigraphic arc length
one reference sample each, so that every DP row is predicted to move exactly ±1 reference
sample (see :mod:`wellfault.align.engine` for why).

Arc length of sample ``i`` is ``a_i = max(|step_i|, min_rate)``. Each sample is an interval of
that arc length; the interval is shared between the rows it overlaps, and a row's curve value
is the overlap-weighted mean of the valid (non-null) values falling in it ("box" resampling:
averaging when samples are dense in strat, as in high-angle wells; repeating when they are
sparse). The signed predicted displacement of a row is the sum of ``step_i·(overlap/a_i)`` over
its pieces, so ``|displacement| <= 1`` and it is < 1 where the floor ``min_rate`` applies (well
nearly parallel to bedding) or where the row was cut short. A row is cut short (emitted early)
when the direction of travel flips (a sample with ``|step| >= min_rate`` whose sign differs from
the row's): rows never straddle a turning point, so each row has one direction ``±1``.

The resampler is incremental: :func:`resample_chunk` consumes any number of samples and keeps
its state in small arrays, so feeding a whole well at once and feeding it one sample at a time
give bit-identical rows (the streaming aligner relies on this).
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numba import njit

__all__ = ["StratRows", "resample_strat", "new_resampler_state", "resample_chunk"]

# state vector layout (float64): arc in the current row, its signed displacement, predicted
# position at the row start, current direction (0 unknown, +-1), first sample of the row,
# number of samples consumed, number of rows emitted
_U, _D, _P0, _DIR, _FIRST, _NSEEN, _NROWS = range(7)
_FULL = 1.0 - 1e-9


def new_resampler_state(n_curves: int) -> tuple[np.ndarray, np.ndarray]:
    """Fresh (state, accumulator) arrays for :func:`resample_chunk`."""
    return np.zeros(7), np.zeros((2, n_curves))


@njit(cache=True)
def _emit(st, acc, rows, meta):
    k = int(st[_NROWS])
    nc = acc.shape[1]
    for c in range(nc):
        rows[k, c] = acc[0, c] / acc[1, c] if acc[1, c] > 0.0 else np.nan
        acc[0, c] = 0.0
        acc[1, c] = 0.0
    d = st[_D]
    meta[k, 0] = st[_U]                    # arc length of the row
    meta[k, 1] = d                         # signed predicted displacement
    meta[k, 2] = st[_P0] + 0.5 * d         # predicted position of the row centre
    meta[k, 3] = st[_DIR] if st[_DIR] != 0.0 else 1.0
    meta[k, 4] = st[_FIRST]                # first sample overlapping the row
    st[_P0] += d
    st[_U] = 0.0
    st[_D] = 0.0
    st[_NROWS] = k + 1


@njit(cache=True)
def resample_chunk(values, steps, min_rate, st, acc, rows, meta, s_pos, s_row, flush):
    """Consume samples; write completed rows into ``rows``/``meta`` from row ``st[6]`` on.

    ``values`` (n, C), ``steps`` (n,). Per sample, ``s_pos`` gets the predicted position of its
    centre and ``s_row`` the row holding its centre (indexed from ``st[5]`` = samples seen).
    ``rows``/``meta`` must have room for ``sum(ceil(arc)) + n + 1`` more rows. With ``flush``
    the unfinished last row is emitted too. Returns the number of rows now emitted.
    """
    n = values.shape[0]
    nc = values.shape[1]
    for i in range(n):
        gi = int(st[_NSEEN])
        s = steps[i]
        a = abs(s)
        sgn = 0.0
        if a >= min_rate:
            sgn = 1.0 if s > 0.0 else -1.0
        if a < min_rate:
            a = min_rate
        if sgn != 0.0:
            if st[_DIR] != 0.0 and sgn != st[_DIR] and st[_U] > 0.0:
                _emit(st, acc, rows, meta)
                st[_FIRST] = gi
            st[_DIR] = sgn
        rate = s / a                       # signed displacement per unit arc
        s_pos[gi] = st[_P0] + st[_D] + 0.5 * s
        half = 0.5 * a
        centre_set = False
        rem = a
        done = 0.0
        while rem > 1e-12:
            piece = min(rem, 1.0 - st[_U])
            for c in range(nc):
                x = values[i, c]
                if not np.isnan(x):
                    acc[0, c] += piece * x
                    acc[1, c] += piece
            st[_U] += piece
            st[_D] += piece * rate
            rem -= piece
            done += piece
            if not centre_set and done >= half:
                s_row[gi] = int(st[_NROWS])
                centre_set = True
            if st[_U] >= _FULL:
                _emit(st, acc, rows, meta)
                st[_FIRST] = gi if rem > 1e-12 else gi + 1
        if not centre_set:
            s_row[gi] = int(st[_NROWS])
        st[_NSEEN] = gi + 1
    if flush and st[_U] > 0.0:
        _emit(st, acc, rows, meta)
    return int(st[_NROWS])


def max_new_rows(steps: np.ndarray, min_rate: float) -> int:
    """Upper bound on the rows that ``len(steps)`` more samples (plus a flush) can emit."""
    arc = np.maximum(np.abs(steps), min_rate)
    return int(np.sum(np.ceil(arc))) + len(steps) + 2


@dataclass(frozen=True)
class StratRows:
    """A well resampled onto rows one reference sample apart in predicted strat distance.

    Attributes
    ----------
    values : (R, C) ndarray — row curve values (overlap-weighted mean; NaN where no valid value).
    arc : (R,) — predicted strat arc length of each row [reference samples], 1 except the last
        row and rows cut at a turning point.
    displacement : (R,) — signed predicted displacement through the row [reference samples].
    centre : (R,) — predicted position of the row centre [reference samples, arbitrary origin:
        the first sample starts at 0].
    direction : (R,) int — +1 down-section, -1 up-section.
    first_sample : (R,) int — first well sample overlapping the row.
    sample_position : (N,) — predicted position of each well sample's centre (same origin).
    sample_row : (N,) int — the row holding each well sample's centre (non-decreasing).
    """

    values: np.ndarray
    arc: np.ndarray
    displacement: np.ndarray
    centre: np.ndarray
    direction: np.ndarray
    first_sample: np.ndarray
    sample_position: np.ndarray
    sample_row: np.ndarray

    @property
    def n_rows(self) -> int:
        return int(self.values.shape[0])


def resample_strat(values: np.ndarray, step: np.ndarray, *, min_rate: float = 0.1) -> StratRows:
    """Resample well curves onto rows of one reference sample of predicted strat arc length.

    Parameters
    ----------
    values : (N, C) array_like — well curves (NaN = null), any units.
    step : (N,) array_like — predicted signed strat increment of each sample [reference
        samples].
    min_rate : float — floor on ``|step|`` when measuring arc length [reference samples]; see
        the module docstring.

    Returns
    -------
    StratRows
    """
    v = np.ascontiguousarray(np.asarray(values, dtype=float))
    if v.ndim == 1:
        v = v[:, None]
    s = np.ascontiguousarray(np.asarray(step, dtype=float))
    n = v.shape[0]
    cap = max_new_rows(s, min_rate)
    rows = np.empty((cap, v.shape[1]))
    meta = np.empty((cap, 5))
    s_pos = np.empty(n)
    s_row = np.empty(n, dtype=np.int64)
    st, acc = new_resampler_state(v.shape[1])
    nr = resample_chunk(v, s, float(min_rate), st, acc, rows, meta, s_pos, s_row, True)
    return StratRows(
        values=rows[:nr].copy(),
        arc=meta[:nr, 0].copy(),
        displacement=meta[:nr, 1].copy(),
        centre=meta[:nr, 2].copy(),
        direction=meta[:nr, 3].astype(np.int64),
        first_sample=meta[:nr, 4].astype(np.int64),
        sample_position=s_pos,
        sample_row=s_row,
    )
