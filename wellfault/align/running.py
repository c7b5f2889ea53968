"""Running (gain- and offset-free) standardisation: the curves the calibration pre-pass aligns,
before the well's level is known."""

from __future__ import annotations

import numpy as np

__all__ = ["running_standardise"]


def running_standardise(values: np.ndarray, arc: np.ndarray, half: float) -> np.ndarray:
    """Each sample minus the mean, over the standard deviation, of the samples within ``half``
    of it in ``arc`` (non-decreasing positions), per curve, ignoring NaN.

    Invariant to any gain and offset of the curve. NaN where fewer than 3 valid samples share
    the window or the window is flat.

    >>> running_standardise(np.arange(1.0, 6.0) * 5 + 7, np.arange(5.0), 2.0).ravel().round(3).tolist()
    [-1.225, -0.447, 0.0, 0.447, 1.225]
    """
    v = np.asarray(values, dtype=float)
    v = v[:, None] if v.ndim == 1 else v
    a = np.asarray(arc, dtype=float)
    lo = np.searchsorted(a, a - half, "left")
    hi = np.searchsorted(a, a + half, "right")
    out = np.full_like(v, np.nan)
    for c in range(v.shape[1]):
        ok = ~np.isnan(v[:, c])
        x = np.where(ok, v[:, c], 0.0)
        mu0 = np.median(x[ok]) if ok.any() else 0.0      # cumsums of centred values: stable
        x = np.where(ok, x - mu0, 0.0)
        c0 = np.concatenate([[0], np.cumsum(ok)])
        c1 = np.concatenate([[0.0], np.cumsum(x)])
        c2 = np.concatenate([[0.0], np.cumsum(x * x)])
        cnt = c0[hi] - c0[lo]
        with np.errstate(invalid="ignore", divide="ignore"):
            mean = (c1[hi] - c1[lo]) / cnt
            var = (c2[hi] - c2[lo]) / cnt - mean * mean
            sd = np.sqrt(np.maximum(var, 0.0))
            z = (x - mean) / sd
        good = ok & (cnt >= 3) & (sd > 1e-9 * (1.0 + np.abs(mean)))
        out[good, c] = z[good]
    return out


_CAL_QUANTILES = np.linspace(0.1, 0.9, 9)
