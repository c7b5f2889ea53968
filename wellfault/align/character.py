"""How well a type log can tell stratigraphic positions apart: its *character*, per sample.

A log correlates a well only where two positions a few metres apart read differently by more
than the noise: in a thick shale or a monotonous carbonate, behind casing or under an old tool's
smooth response, every position of a stretch looks like every other, and an alignment placed
there is a guess however good its misfit (common practice: no correlation without character).

The measure is the local **semivariogram** of the log against its **noise**. For a window of
``window_m`` of strat centred at each sample and lags ``h`` of ``lags_m``,

    γ(h) = ½ · mean over the window of (z(u + h) − z(u))²

is the mean squared difference of positions ``h`` apart (the semivariogram, Matheron 1963,
"Principles of geostatistics", Economic Geology 58; Isaaks & Srivastava 1989, An Introduction to
Applied Geostatistics, ch. 7). It holds both the local contrast (its sill) and the
autocorrelation length (how fast it rises: a smooth log with a long correlation length has a
small γ at short lags however large its overall spread). Noise adds its variance σₙ² to every
γ(h) (the nugget); σₙ² is estimated from the differences of consecutive samples, the
difference-based variance estimator of Rice (1984, "Bandwidth choice for nonparametric
regression", Annals of Statistics 12), made resistant to bed boundaries by using the median of
the squared differences (a squared normal difference is 2σₙ²·χ²₁, whose median is 0.4549).

The character of a sample is the mean over the lags of the signal's semivariogram against the
noise a well's curve brings to the comparison:

    κ = mean_h max(γ(h) − σₙ², 0) / (σₙ² + f²)

with ``z`` the log in units of its robust spread and ``f`` (``floor``, default 0.10 spread) the
least mismatch a well has with a type log besides the type log's own noise (thickness change,
a different tool, hole conditions; common practice, from memory). κ < 1: positions ``lags_m``
apart differ, on average, by less than the noise — the log cannot tell them apart there
(:data:`WEAK_BELOW`). Several curves add their evidence (independent noise): κ sums over curves,
each scaled by its weight relative to the largest.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["CharacterSettings", "CharacterMap", "curve_character", "log_character",
           "noise_variance", "weak_runs", "weigh_confidence", "WEAK_BELOW", "CHARACTER_COEF",
           "WeakInterval"]

#: Below this character the type log cannot tell positions apart (module docstring).
WEAK_BELOW = 1.0
_MEDIAN_CHI2_1 = 0.454936423119572        # median of the chi-square distribution, 1 d.o.f.


@dataclass(frozen=True)
class CharacterSettings:
    """Window [m of strat], lags [m], noise floor [robust spreads], the character under which a
    stretch is weak, and the shortest weak stretch reported [m]."""

    window_m: float = 20.0
    lags_m: tuple[float, ...] = (2.0, 4.0, 7.0, 12.0, 20.0)
    floor: float = 0.10
    weak_below: float = WEAK_BELOW
    min_weak_m: float = 15.0


@dataclass(frozen=True)
class WeakInterval:
    """A stretch of the type log (s from ``s_top_m`` to ``s_base_m``) that cannot tell positions
    apart, with its mean character."""

    s_top_m: float
    s_base_m: float
    character: float


def noise_variance(z: np.ndarray) -> float:
    """Noise variance of a regularly sampled log ``z`` from its consecutive differences (Rice
    1984 difference estimator, median form; module docstring). NaN samples are skipped.

    >>> rng = np.random.default_rng(0)
    >>> round(noise_variance(np.r_[np.zeros(5000), np.full(5000, 9.0)]
    ...                      + rng.normal(0, 0.5, 10000)), 2)
    0.25
    """
    d = np.diff(np.asarray(z, float))
    d = d[np.isfinite(d)]
    if d.size == 0:
        return 0.0
    return float(np.median(d * d) / (2.0 * _MEDIAN_CHI2_1))


def _one_curve(x: np.ndarray, ds: float, st: CharacterSettings) -> np.ndarray:
    from scipy.ndimage import uniform_filter1d

    from .misfit import robust_location_scale

    x = np.asarray(x, float)
    ok = np.isfinite(x)
    if ok.sum() < 3:
        return np.zeros(x.size)
    centre, scale = robust_location_scale(x[ok])
    z = np.where(ok, (x - centre[0]) / scale[0], np.nan)
    nug = noise_variance(z)
    denom = nug + st.floor ** 2
    m = z.size
    win = max(int(round(st.window_m / ds)), 1)
    acc = np.zeros(m)
    cnt = np.zeros(m)
    for h_m in st.lags_m:
        h = max(int(round(h_m / ds)), 1)
        if h >= m:
            continue
        d2 = 0.5 * (z[h:] - z[:-h]) ** 2
        good = np.isfinite(d2)
        # mean over the window of the pairs centred there (pair u, u+h sits at u + h/2)
        num = uniform_filter1d(np.where(good, d2, 0.0), win, mode="nearest")
        den = uniform_filter1d(good.astype(float), win, mode="nearest")
        g = np.divide(num, den, out=np.full(num.shape, np.nan), where=den > 0)
        pos = np.arange(g.size) + 0.5 * h
        gi = np.interp(np.arange(m), pos, np.nan_to_num(g, nan=nug))
        acc += np.maximum(gi - nug, 0.0) / denom
        cnt += 1.0
    return acc / np.maximum(cnt, 1.0)


def curve_character(curves: np.ndarray, ds: float,
                    settings: CharacterSettings = CharacterSettings()) -> np.ndarray:
    """Character κ of every sample of each curve of a type log (module docstring).

    Parameters
    ----------
    curves : array (M,) or (M, C)
        The type log on a regular step (NaN = null).
    ds : float
        Its step. [m]

    Returns
    -------
    (M, C) array of κ ≥ 0.
    """
    x = np.asarray(curves, float)
    if x.ndim == 1:
        x = x[:, None]
    return np.stack([_one_curve(x[:, c], float(ds), settings) for c in range(x.shape[1])],
                    axis=1)


def log_character(curves: np.ndarray, ds: float, *, weights=None,
                  settings: CharacterSettings = CharacterSettings()) -> np.ndarray:
    """Character κ (M,) of a type log of one or several curves: :func:`curve_character`
    summed over the curves, each scaled by its weight (``weights``, the engine's; default
    equal) over the largest."""
    per = curve_character(curves, ds, settings)
    w = np.ones(per.shape[1]) if weights is None else np.asarray(weights, float)
    return per @ (w / w.max())


def weak_runs(kappa: np.ndarray, s0_m: float, ds: float,
              settings: CharacterSettings = CharacterSettings()) -> list[WeakInterval]:
    """The stretches of at least ``settings.min_weak_m`` where κ < ``settings.weak_below``.

    >>> k = np.r_[np.full(100, 3.0), np.full(200, 0.2), np.full(100, 3.0)]
    >>> [(w.s_top_m, w.s_base_m) for w in weak_runs(k, 0.0, 0.1)]
    [(10.0, 30.0)]
    """
    weak = np.asarray(kappa, float) < settings.weak_below
    if not weak.any():
        return []
    edges = np.flatnonzero(np.diff(np.r_[0, weak.astype(np.int8), 0]))
    out = []
    for a, b in zip(edges[::2], edges[1::2]):
        if (b - a) * ds >= settings.min_weak_m:
            out.append(WeakInterval(float(s0_m + a * ds), float(s0_m + b * ds),
                                    float(np.mean(kappa[a:b]))))
    return out


#: Down-weighting of a cut whose either side lies where the type log is weak: its confidence's
#: log-odds drop by this coefficient times ln(κ'/κ'_weak) with κ' = κ + 0.05 (no change at or
#: above :data:`WEAK_BELOW`). Fitted by benchmarks/calibrate_confidence.py on seeds 10000+
#: (740 wells, 198 + 177 cuts on low-character type logs): about zero since the engine's
#: confidence was refitted on the same set (CONFIDENCE_COEF) — its margin, correlation and run
#: carry what the type log's character says about a cut; the weak stretches are *said* (notes),
#: not discounted. Refit it after CONFIDENCE_COEF.
CHARACTER_COEF = 5.363e-06


def weigh_confidence(confidence: float, character: float, *, coef: float = CHARACTER_COEF,
                     weak_below: float = WEAK_BELOW) -> float:
    """A cut's confidence lowered where the type log is weak (:data:`CHARACTER_COEF`).

    >>> weigh_confidence(0.9, 5.0), round(weigh_confidence(0.9, 0.0, coef=1.0), 3)
    (0.9, 0.3)
    """
    drop = min(np.log((max(float(character), 0.0) + 0.05) / (weak_below + 0.05)), 0.0)
    if drop == 0.0 or not np.isfinite(confidence):
        return float(confidence)
    c = float(np.clip(confidence, 1e-9, 1.0 - 1e-9))
    z = np.log(c / (1.0 - c)) + float(coef) * drop
    return float(1.0 / (1.0 + np.exp(-z)))


@dataclass(frozen=True)
class CharacterMap:
    """The character of one type log, computed once and read by the well-level wiring and the
    watcher: κ per type-log sample (:func:`log_character`) and the weak stretches
    (:func:`weak_runs`).

    ``at(s)`` gives κ at strat positions; ``weak_spans(md, s)`` the MD spans of a well whose
    placed position lies in a weak stretch; ``note(...)`` the text said about each
    ("curve evidence weak from A to B"). ``wellfault watch`` can build one per type log
    (:meth:`from_type_log`) and put ``weak_spans`` of its tail into its update events.
    """

    kappa: np.ndarray
    s0_m: float
    ds_m: float
    weak: tuple[WeakInterval, ...]
    settings: CharacterSettings = CharacterSettings()

    @classmethod
    def from_type_log(cls, ref: np.ndarray, s0_m: float, ds_m: float, *, weights=None,
                      settings: CharacterSettings = CharacterSettings()) -> CharacterMap:
        k = log_character(ref, ds_m, weights=weights, settings=settings)
        return cls(k, float(s0_m), float(ds_m), tuple(weak_runs(k, s0_m, ds_m, settings)),
                   settings)

    def at(self, s_m) -> np.ndarray:
        """κ at strat positions ``s_m`` (NaN where ``s_m`` is NaN)."""
        s = np.asarray(s_m, float)
        k = np.interp((s - self.s0_m) / self.ds_m, np.arange(self.kappa.size), self.kappa)
        return np.where(np.isfinite(s), k, np.nan)

    def weak_spans(self, md_m, s_m, *, join_m: float = 20.0
                   ) -> list[tuple[float, float, float, float]]:
        """(md_top, md_base, s_first, s_last) of each run of well samples placed in a weak
        stretch (runs closer than ``join_m`` of MD joined; shorter than the settings'
        ``min_weak_m`` of MD and of strat dropped)."""
        md = np.asarray(md_m, float)
        s = np.asarray(s_m, float)
        weak = np.zeros(md.size, bool)
        for w in self.weak:
            weak |= (s >= w.s_top_m) & (s <= w.s_base_m)
        if not weak.any():
            return []
        edges = np.flatnonzero(np.diff(np.r_[0, weak.astype(np.int8), 0]))
        runs: list[list[int]] = []
        for a, b in zip(edges[::2], edges[1::2]):
            if runs and md[a] - md[runs[-1][1] - 1] <= join_m:
                runs[-1][1] = b
            else:
                runs.append([a, b])
        out = []
        for a, b in runs:
            seg = s[a:b][np.isfinite(s[a:b])]
            if md[b - 1] - md[a] < self.settings.min_weak_m or seg.size == 0 or \
                    np.ptp(seg) < self.settings.min_weak_m:
                continue
            out.append((float(md[a]), float(md[b - 1]), float(seg[0]), float(seg[-1])))
        return out

    @staticmethod
    def note(md_top: float, md_base: float, surfaces: tuple[str, str] = ("", "")) -> str:
        """"curve evidence weak from MD A to B m" (+ the units the type log is weak in); in
        metres like every note, restated in the output's unit where it is written."""
        txt = f"curve evidence weak from MD {md_top:.1f} to {md_base:.1f} m"
        if surfaces[0] or surfaces[1]:
            a, b = surfaces
            txt += f" (type log without character in {a}{'' if a == b else ' to ' + b})"
        return txt
