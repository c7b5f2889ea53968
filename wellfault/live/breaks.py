"""While drilling: abrupt breaks of the log in measured depth, judged against the type log.

A well drilled at a low angle to bedding crosses a bed boundary slowly — it drills only
r = |t·n| m of stratigraphy per metre of hole, so a change the type log shows over 0.5 m of
strat is spread over 0.5/r m of hole — while a steep fault plane is crossed at a high angle
and shows as a step over the tool's own resolution. A break of the log that is much sharper
than the type log, read along the predicted path at that position, can produce is an early
sign of a fault cut, available long before the correlation has the few metres of strat below
the cut it needs to place and size it (:mod:`wellfault.live.watch`).

The detector (:func:`find_breaks`, :func:`assess_break`) works on the last ``window`` samples:

1. noise: the standard deviation of each curve's noise from its first differences
   (:func:`noise_sigma`, median absolute deviation);
2. change points: penalised least squares on the curves divided by their noise (ruptures'
   kernel change-point detection with the linear kernel, i.e. the l2 cost, solved by PELT;
   Killick et al. 2012; Truong et al. 2020) — the penalty is in units of each curve's own
   noise variance, so one calibrated value serves every curve;
3. observed sharpness: the step of each curve across a change point, mean of ``side`` samples
   below minus mean of ``side`` samples above;
4. expected sharpness: the same step of the type log read along the predicted path (the
   correlation's position above the break, continued by the predicted strat increments of
   the samples), the largest over positions within ``tolerance`` rows of it (the position
   is uncertain by a few metres of strat, and a bed boundary there is no fault);
5. score: the excess of the observed over the expected step in units of the noise of the
   step (``σ·√(2/side)``), and a confidence from a logistic fit of the excess on calibration
   wells (:data:`CONFIDENCE_COEF`).

Lengths and positions are in samples here; :class:`wellfault.live.watch.WellWatcher` converts.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field

import numpy as np

__all__ = [
    "CONFIDENCE_COEF",
    "POSSIBLE_STATUSES",
    "Break",
    "PossibleCut",
    "assess_break",
    "break_confidence",
    "find_breaks",
    "noise_sigma",
    "read_along",
]

#: ``status`` of a possible cut: standing, confirmed by the correlation (a ``cut`` event with
#: the same identifier), or withdrawn.
POSSIBLE_STATUSES = ("raised", "confirmed", "withdrawn")

#: Logistic coefficients (intercept, slope on log(1 + excess), slope on log(ratio)) of the
#: probability that a break the default rule passes lies within 10 m of a true fault cut,
#: fitted by maximum likelihood on the 33 such breaks (27 at cuts) of 80 calibration wells
#: (benchmarks/bench_watch.py --calibrate-breaks --wells 10, seeds 10000+).
CONFIDENCE_COEF = (5.81, 0.40, -2.52)


def noise_sigma(x: np.ndarray) -> np.ndarray:
    """Robust standard deviation of the noise of each column of ``x`` (n, C) from its first
    differences: 1.4826 · MAD(Δx) / √2 (NaN rows skipped; NaN with fewer than 8 differences).

    The MAD estimate of a Gaussian standard deviation (1.4826 = 1/Φ⁻¹(3/4); Hampel 1974) of the
    differences, whose variance is twice the noise's where the signal varies slowly between
    samples (common practice for noise levels of sampled signals, e.g. Donoho & Johnstone
    1994 use the MAD of the finest wavelet coefficients).
    """
    d = np.diff(np.asarray(x, dtype=float), axis=0)
    out = np.full(d.shape[1], math.nan)
    for c in range(d.shape[1]):
        v = d[:, c][np.isfinite(d[:, c])]
        if v.size >= 8:
            out[c] = 1.4826 * float(np.median(np.abs(v - np.median(v)))) / math.sqrt(2.0)
    return out


def find_breaks(z: np.ndarray, penalty: float, min_size: int) -> np.ndarray:
    """Change points of the rows of ``z`` (n, C), each curve already divided by its noise
    standard deviation: indices b (first sample after the change), ends excluded.

    Penalised l2 segmentation, ruptures ``KernelCPD(kernel="linear")`` (PELT, Killick et al.
    2012, in ruptures' compiled code; Truong, Oudre & Vayatis 2020): a change adds a segment
    when it lowers the squared residual by more than ``penalty`` (noise variances).
    """
    import ruptures as rpt

    z = np.ascontiguousarray(z, dtype=float)
    if z.shape[0] < 2 * min_size + 1:
        return np.zeros(0, dtype=np.int64)
    bk = rpt.KernelCPD(kernel="linear", min_size=int(min_size)).fit(z).predict(
        pen=float(penalty))
    return np.asarray(bk[:-1], dtype=np.int64)


def read_along(ref_t: np.ndarray, pos: np.ndarray) -> np.ndarray:
    """Type log (C, M) at float reference positions (any shape), linear, ends held."""
    m = ref_t.shape[1]
    q = np.clip(pos, 0.0, m - 1.0)
    i0 = np.minimum(np.floor(q).astype(np.int64), m - 2)
    f = q - i0
    return ref_t[:, i0] * (1.0 - f) + ref_t[:, i0 + 1] * f       # (C, *pos.shape)


@dataclass(frozen=True)
class Break:
    """One change point, assessed: sample index ``sample`` (first sample below), the curve
    with the largest excess, its observed and expected step (standardised units), the noise
    of the step, the excess (in noise units) and the ratio observed / max(expected, noise)."""

    sample: int
    curve: int
    observed: float
    expected: float
    noise: float
    excess: float
    ratio: float


def assess_break(z: np.ndarray, b: int, side: int, pos: np.ndarray, ref_t: np.ndarray,
                 sigma: np.ndarray, tolerance: int, weights: np.ndarray | None = None
                 ) -> Break:
    """Observed against expected sharpness of the break before sample ``b`` of ``z`` (n, C).

    ``pos`` (n,) is the predicted path: the reference position [samples] of each sample with
    no fault (the correlation's position above the break, continued by the predicted strat
    increments). The observed step of curve c is ``mean(z[b:b+side]) − mean(z[b-side:b])``;
    the expected step is the same difference of the type log read at ``pos + δ``, the largest
    in magnitude over ``|δ| <= tolerance`` reference samples. ``sigma`` (C,) is the noise of
    each curve in the units of ``z``. The curve with the largest ``weights``-weighted excess
    ``(|observed| − expected) / (sigma·√(2/side))`` is reported.
    """
    lo, hi = b - side, b + side
    obs = np.nanmean(z[b:hi], axis=0) - np.nanmean(z[lo:b], axis=0)            # (C,)
    deltas = np.arange(-int(tolerance), int(tolerance) + 1, dtype=float)
    y = read_along(ref_t, pos[lo:hi][None, :] + deltas[:, None])               # (C, D, 2s)
    exp_steps = y[:, :, side:].mean(axis=2) - y[:, :, :side].mean(axis=2)      # (C, D)
    expected = np.max(np.abs(exp_steps), axis=1)
    noise = sigma * math.sqrt(2.0 / side)
    excess = (np.abs(obs) - expected) / noise
    w = np.ones_like(excess) if weights is None else np.asarray(weights, float)
    score = np.where(np.isfinite(excess), excess * w, -np.inf)
    c = int(np.argmax(score))
    return Break(int(b), c, float(obs[c]), float(expected[c]), float(noise[c]),
                 float(excess[c]), float(abs(obs[c]) / max(expected[c], noise[c])))


def break_confidence(excess: float, ratio: float) -> float:
    """Probability that a break is a fault cut, from its excess and ratio (logistic,
    :data:`CONFIDENCE_COEF`)."""
    a, b1, b2 = CONFIDENCE_COEF
    t = a + b1 * math.log1p(max(excess, 0.0)) + b2 * math.log(max(ratio, 1e-9))
    return 1.0 / (1.0 + math.exp(-t))


@dataclass
class PossibleCut:
    """A break raised as a possible fault cut (:mod:`wellfault.live.watch`): the identifier it
    shares with the ``cut`` that confirms it, where (``break_md_m``, the bit MD when raised),
    why (``curve``, observed and expected step in the curve's units over ``side_m`` of hole
    either side, the noise of the step, ``ratio``, ``confidence``), the position above the
    break and the separation the fault most likely has (``delta_s_m``, and from what)."""

    cut_id: int
    break_md_m: float
    raised_bit_md_m: float
    sample: int
    curve: str
    observed: float
    expected: float
    noise: float
    ratio: float
    excess: float
    confidence: float
    side_m: float
    r: float
    s_above_m: float
    delta_s_m: float = math.nan
    separation_from: str = ""
    status: str = "raised"
    reason: str = ""
    extra: dict = field(default_factory=dict)

    def evidence(self) -> dict:
        return {"curve": self.curve, "observed_sharpness": self.observed,
                "expected_sharpness": self.expected, "noise": self.noise,
                "ratio": self.ratio, "excess": self.excess, "r": self.r}
