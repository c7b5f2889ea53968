"""Low-character type logs: real logs degraded into monotonous stretches, and wells drawn on
them."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..geo.column import ReferenceColumn
from .real_logs import REAL_GR_LOGS, _prefix, curve_scenario, curve_spread, real_gr_values
from .scenarios import Scenario

__all__ = [
    "LowCharacterSpec",
    "LowCharacterLog",
    "degrade_log",
    "low_character_log",
    "low_character_scenario",
]


# ---------------------------------------------------------------- type logs with little character
@dataclass(frozen=True)
class LowCharacterSpec:
    """How a real gamma-ray log is degraded into a type log with little character
    (:func:`low_character_log`); each pair is the range a seed draws from.

    The degradations imitate what makes real type logs hard to correlate, in the order the
    rock and the tool apply them:

    * ``monotonous_fraction``, ``monotonous_length_m``, ``monotonous_contrast`` — **thick
      shales and monotonous carbonates**: stretches (together this fraction of the column,
      each this long) where the rock hardly changes; there the log keeps its long-wavelength
      trend (Gaussian, σ = ``trend_m``) and only this fraction of its variation about it.
      A shale or a tight carbonate reads near one gamma-ray level over tens to hundreds of
      metres (the "shale line" and "clean line" of gamma-ray interpretation; Rider & Kennedy,
      2011, The Geological Interpretation of Well Logs, 3rd ed., ch. 7, from memory).
    * ``contrast`` — **casing and cement attenuation, low-contrast lithology**: the log's
      variation about its median is scaled by this factor. Steel casing and cement absorb
      part of the gamma rays (cased-hole gamma ray reads some 20–40 % lower, more behind
      heavy casing; service-company chart books correct for it, from memory), and the
      counting noise (below) does not shrink with the signal, so the log loses contrast
      against its noise.
    * ``resolution_m`` — **old or cased-hole tool response**: the log is convolved with a
      Gaussian of this full width at half maximum. A gamma-ray sonde's vertical resolution is
      set by its detector length and by the time-constant filter at the logging speed: about
      0.3–0.6 m for a modern tool run slowly, a metre or more for old logs run fast with long
      time constants (Ellis & Singer, 2007, Well Logging for Earth Scientists, 2nd ed., ch. 7;
      Serra, 1984, Fundamentals of Well-Log Interpretation, vol. 1, on the time constant; both
      from memory). The same response applies to the wells drawn from the log.
    * ``type_noise_rel`` — **counting statistics of the type well**: Gaussian noise of this
      standard deviation, in units of the *original* log's robust spread (Poisson counting
      noise does not scale with the attenuated signal: its relative size grows as the count
      rate falls, Ellis & Singer, 2007, ch. 5, from memory). The wells get their own noise
      (``well_noise_rel``, same units, :func:`low_character_scenario`).
    """

    monotonous_fraction: tuple[float, float] = (0.25, 0.45)
    monotonous_length_m: tuple[float, float] = (60.0, 250.0)
    monotonous_contrast: tuple[float, float] = (0.08, 0.20)
    trend_m: float = 8.0
    contrast: tuple[float, float] = (0.35, 0.60)
    resolution_m: tuple[float, float] = (1.0, 2.0)
    type_noise_rel: tuple[float, float] = (0.05, 0.10)
    well_noise_rel: tuple[float, float] = (0.05, 0.10)


@dataclass(frozen=True)
class LowCharacterLog:
    """A degraded real type log (:func:`low_character_log`).

    ``rock`` is the column the wells are drawn through (the degraded signal without the type
    well's own counting noise); ``type_log`` the column a detector is given (same surfaces,
    the type well's recorded log: the signal plus its noise). ``monotonous`` lists the
    (top, base) s of the monotonous stretches [m]; ``drawn`` the parameters the seed drew;
    ``spread_original`` the robust spread of the undegraded log [API].
    """

    name: str
    seed: int
    rock: ReferenceColumn
    type_log: ReferenceColumn
    monotonous: tuple[tuple[float, float], ...]
    drawn: dict
    spread_original: float
    spec: LowCharacterSpec


def _monotonous_stretches(rng, n: int, ds: float, spec: LowCharacterSpec
                          ) -> list[tuple[int, int]]:
    """Non-overlapping sample ranges [a, b) covering about the drawn fraction of ``n``."""
    want = float(rng.uniform(*spec.monotonous_fraction)) * n
    taken = np.zeros(n, bool)
    out: list[tuple[int, int]] = []
    for _ in range(200):
        if taken.sum() >= want:
            break
        length = int(rng.uniform(*spec.monotonous_length_m) / ds)
        if length >= n:
            continue
        a = int(rng.integers(0, n - length))
        if taken[max(a - 1, 0):a + length + 1].any():
            continue
        taken[a:a + length] = True
        out.append((a, a + length))
    return sorted(out)


def degrade_log(values: np.ndarray, ds: float, seed,
                spec: LowCharacterSpec = LowCharacterSpec()
                ) -> tuple[np.ndarray, np.ndarray, list[tuple[int, int]], dict]:
    """Degrade a log on a regular step ``ds`` [m] (see :class:`LowCharacterSpec`).

    Returns (signal, recorded, stretches, drawn): the degraded signal without noise, the same
    with the type well's counting noise, the monotonous stretches as sample ranges, and the
    drawn parameters. The same ``seed`` (an int or a sequence of ints) always gives the same
    result.
    """
    from scipy.ndimage import gaussian_filter1d

    from ..align import robust_location_scale

    v = np.asarray(values, dtype=float).copy()
    rng = np.random.default_rng([*np.atleast_1d(seed).astype(int).tolist(), 12])
    spread = float(robust_location_scale(v)[1][0])
    drawn = {k: float(rng.uniform(*getattr(spec, k))) for k in
             ("monotonous_contrast", "contrast", "resolution_m", "type_noise_rel")}
    stretches = _monotonous_stretches(rng, v.size, ds, spec)
    trend = gaussian_filter1d(v, spec.trend_m / ds, mode="nearest")
    keep = np.ones(v.size)
    taper = max(int(round(5.0 / ds)), 1)          # 5 m ramps: no artificial step at the ends
    for a, b in stretches:
        w = np.full(b - a, drawn["monotonous_contrast"])
        ramp = np.linspace(1.0, drawn["monotonous_contrast"], min(taper, (b - a) // 2) + 1)[1:]
        w[:ramp.size] = ramp
        w[w.size - ramp.size:] = ramp[::-1]
        keep[a:b] = np.minimum(keep[a:b], w)
    v = trend + keep * (v - trend)
    med = float(np.median(v))
    v = med + drawn["contrast"] * (v - med)
    sigma = drawn["resolution_m"] / (2.0 * np.sqrt(2.0 * np.log(2.0))) / ds   # FWHM -> sigma
    signal = gaussian_filter1d(v, sigma, mode="nearest")
    recorded = signal + rng.normal(0.0, drawn["type_noise_rel"] * spread, size=v.size)
    drawn["monotonous_fraction"] = float(sum(b - a for a, b in stretches)) / v.size
    return signal, recorded, stretches, drawn


def low_character_log(name: str, folder, seed: int, *,
                      spec: LowCharacterSpec = LowCharacterSpec(),
                      surfaces_every_m: float = 50.0) -> LowCharacterLog:
    """A type log with little character from one of :data:`REAL_GR_LOGS`
    (:func:`degrade_log`; surfaces every ``surfaces_every_m`` snapped to breaks of the degraded
    signal, as :func:`real_gr_column`).

    Seeds follow the project's split (DEVELOPERS.md, "Curve evidence on real type logs"):
    calibration 10000+, tests 500+, benchmarks 0+.
    """
    from ..align import robust_location_scale
    from .columns import column_from_real_curve

    values, ds = real_gr_values(name, folder)
    signal, recorded, stretches, drawn = degrade_log(
        values, ds, (int(seed), list(REAL_GR_LOGS).index(name)), spec)
    a, b = REAL_GR_LOGS[name].interval_m
    label = f"low-character type log {seed}: {name} GR {a:.0f}-{b:.0f} m"
    rock = column_from_real_curve(signal, ds, surfaces_every_m=surfaces_every_m,
                                  name_prefix=_prefix(name), name=label + " (rock)")
    tl = rock.type_log.copy()
    tl["GR"] = recorded
    return LowCharacterLog(
        name=name, seed=int(seed), rock=rock, type_log=rock.with_type_log(tl).renamed(label),
        monotonous=tuple((a_ * ds, b_ * ds) for a_, b_ in stretches), drawn=drawn,
        spread_original=float(robust_location_scale(values)[1][0]), spec=spec)


def low_character_scenario(seed: int, log: LowCharacterLog, *, close_faults: bool = False,
                           **kwargs) -> Scenario:
    """A well drawn through a low-character log's rock (:func:`curve_scenario`).

    Vertical, deviated and high-angle wells with 0–2 normal or reverse faults of throw 5–110 m
    (|Δs| about 5–140 m; more where beds dip against a low-angle reverse fault), or with
    ``close_faults`` two faults 10–60 m of MD apart. The well's
    noise is drawn in ``log.spec.well_noise_rel`` × the *original* log's spread (counting noise
    does not shrink with the attenuated signal, :class:`LowCharacterSpec`). Detect against
    ``log.type_log``; the scenario's ``column`` is the rock (same surfaces).
    """
    spread = curve_spread(log.rock)
    rel = tuple(float(r) * log.spread_original / spread for r in log.spec.well_noise_rel)
    kw = dict(noise_rel=rel, throw_range_m=(5.0, 110.0))
    if close_faults:
        kw.update(min_faults=2, fault_gap_m=(10.0, 60.0), fault_clearance_m=15.0)
    kw.update(kwargs)
    return curve_scenario(seed, log.rock, **kw)
