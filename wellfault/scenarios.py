"""Seeded random wells through faulted models, for accuracy tests and benchmarks.

Each :class:`Scenario` is one well drawn by the forward model (:mod:`wellfault.forward`): a
reference column, planar beds dipping 0–25°, a vertical, deviated or high-angle trajectory,
0–2 planar faults (normal or reverse) placed where the well crosses the column, per-unit thickness
change, curve noise, tool gain/offset, and pick noise. It carries the truth (the forward model's
true cuts) beside everything a detector needs. Nothing here is invented data for users: these
are test and benchmark cases.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd

from .column import ReferenceColumn
from .dip import BedDip
from .forward import Beds, PlanarFault, SyntheticWell, simulate_well
from .trajectory import Trajectory

__all__ = ["Scenario", "random_scenario", "curve_scenario", "build_trajectory",
           "TRAJECTORY_KINDS", "REAL_GR_LOGS", "RealLog", "real_gr_column", "real_gr_values",
           "curve_spread", "LowCharacterSpec", "LowCharacterLog", "degrade_log",
           "low_character_log", "low_character_scenario"]

TRAJECTORY_KINDS = ("vertical", "deviated", "high-angle")


@dataclass
class Scenario:
    """One random well and its truth."""

    seed: int
    kind: str
    synthetic: SyntheticWell
    column: ReferenceColumn
    bed_dip: BedDip
    faults: list[PlanarFault] = field(default_factory=list)
    fault_kinds: list[str] = field(default_factory=list)

    @property
    def truth(self) -> pd.DataFrame:
        return self.synthetic.cuts

    @property
    def well(self):
        return self.synthetic.well

    @property
    def tops(self) -> pd.DataFrame:
        return self.synthetic.tops

    @property
    def trajectory(self) -> Trajectory:
        return self.synthetic.trajectory

    def fault_planes(self) -> tuple:
        """The model's faults as mapped planes (:class:`wellfault.measure.FaultPlane`; TVDSS =
        TVD here, the scenarios' trajectories having no elevation), so that a detector can be
        given each cut's true fault attitude."""
        from .measure import FaultPlane

        return tuple(FaultPlane(f"F{k + 1}", f.dip_deg, f.dip_azimuth_deg, *map(float, f.point))
                     for k, f in enumerate(self.faults))


def build_trajectory(kind: str, *, inclination_deg: float, azimuth_deg: float,
                     kickoff_m: float = 300.0, build_deg_per_30m: float = 3.0,
                     td_m: float = 6000.0, name: str = "well") -> Trajectory:
    """Vertical to a kick-off point, a constant-rate build, then a tangent to TD.

    Minimum curvature reproduces the constant build exactly (methods.md §1.4), so a few survey
    stations describe the path completely.
    """
    if kind == "vertical" or inclination_deg <= 0:
        return Trajectory([0.0, td_m], [0.0, 0.0], [0.0, 0.0], name=name)
    build_len = inclination_deg / build_deg_per_30m * 30.0
    md = [0.0, kickoff_m, kickoff_m + build_len, max(td_m, kickoff_m + build_len + 10.0)]
    inc = [0.0, 0.0, inclination_deg, inclination_deg]
    azi = [azimuth_deg] * 4
    return Trajectory(md, inc, azi, name=name)


def _logged_interval(traj: Trajectory, beds: Beds, base_s: float, td: float
                     ) -> tuple[float, float] | None:
    md = np.arange(0.0, td, 1.0)
    s = beds.s(traj.position(md))
    inside = (s > 5.0) & (s < base_s - 5.0)
    if not inside.any():
        return None
    # longest contiguous run of samples inside the column
    idx = np.flatnonzero(inside)
    breaks = np.flatnonzero(np.diff(idx) > 1)
    starts = np.r_[idx[0], idx[breaks + 1]]
    ends = np.r_[idx[breaks], idx[-1]]
    k = int(np.argmax(ends - starts))
    return float(md[starts[k]]), float(md[ends[k]])


def _draw_trajectory(rng, kind: str, seed: int):
    """A trajectory of the kind: vertical; deviated 20-55 deg; high-angle 65-85 deg (random
    azimuth), to 9,000 m MD."""
    if kind == "vertical":
        inc, azi = 0.0, 0.0
    elif kind == "deviated":
        inc, azi = float(rng.uniform(20.0, 55.0)), float(rng.uniform(0.0, 360.0))
    else:
        inc, azi = float(rng.uniform(65.0, 85.0)), float(rng.uniform(0.0, 360.0))
    return build_trajectory(kind, inclination_deg=inc, azimuth_deg=azi, td_m=9000.0,
                            name=f"S{seed:04d}")


def random_scenario(
    seed: int,
    column: ReferenceColumn,
    *,
    kinds: tuple[str, ...] = TRAJECTORY_KINDS,
    max_faults: int = 2,
    max_dip_deg: float = 25.0,
    throw_range_m: tuple[float, float] = (5.0, 80.0),
    thickness_variation: float = 0.10,
    noise_std: float = 5.0,
    gain_range: tuple[float, float] = (0.8, 1.25),
    offset_range: tuple[float, float] = (-15.0, 15.0),
    pick_noise_m: float = 0.3,
    unpicked_fraction: float = 0.1,
    md_step_m: float = 0.1524,
    max_logged_m: float = 1500.0,
    curves: tuple[str, ...] = ("GR",),
    inside_margin_m: float | None = None,
    fault_clearance_m: float = 40.0,
    fault_gap_m: tuple[float, float] | None = None,
    min_faults: int = 0,
) -> Scenario:
    """Draw one random well through a faulted model (see the module docstring).

    The same ``seed`` and ``column`` always give the same scenario.

    With ``inside_margin_m`` the well stays inside the column: the logged interval is trimmed
    so that the true reference position of every sample, after faulting and thickness change,
    lies at least that far inside the column's top and base (a type log says nothing about rock
    above or below it, and the forward model would only hold its end value there), and the
    faults are redrawn (up to 30 times, then fewer faults) until each crossing lies at least
    ``fault_clearance_m`` of MD inside the trimmed interval. Without it (default) the well is
    logged from where it enters the column, faults may carry it out, and the draw is the
    original one (the tops accuracy test depends on it). ``fault_gap_m`` (with
    ``inside_margin_m``) places the second of two faults that many metres of MD below the first
    (closely spaced cuts); by default two faults are at least a quarter of the interval apart.
    ``min_faults`` (with ``inside_margin_m``) raises the least number of faults drawn.
    """
    if inside_margin_m is not None:
        return _inside_scenario(
            seed, column, kinds=kinds, max_faults=max_faults, max_dip_deg=max_dip_deg,
            throw_range_m=throw_range_m, thickness_variation=thickness_variation,
            noise_std=noise_std, gain_range=gain_range, offset_range=offset_range,
            pick_noise_m=pick_noise_m, unpicked_fraction=unpicked_fraction,
            md_step_m=md_step_m, max_logged_m=max_logged_m, curves=curves,
            margin_m=float(inside_margin_m), clearance_m=float(fault_clearance_m),
            fault_gap_m=fault_gap_m, min_faults=min_faults)
    rng = np.random.default_rng(seed)
    kind = str(rng.choice(list(kinds)))
    dip = float(rng.uniform(0.0, max_dip_deg))
    dip_azi = float(rng.uniform(0.0, 360.0))
    base_s = float(column.base_s_m)
    for _attempt in range(20):
        traj = _draw_trajectory(rng, kind, seed)
        # the column top lies 150-400 m below the kick-off point (vertically)
        top_tvd = float(rng.uniform(450.0, 700.0))
        beds = Beds.through(dip, dip_azi, (0.0, 0.0, top_tvd), 0.0)
        iv = _logged_interval(traj, beds, base_s, 9000.0)
        if iv is not None and iv[1] - iv[0] > 60.0:
            break
        dip = float(rng.uniform(0.0, max_dip_deg))
    else:  # pragma: no cover - every kind finds an interval within 20 draws in practice
        raise RuntimeError(f"scenario {seed}: no trajectory crosses the column")
    md_top, md_base = iv
    md_base = min(md_base, md_top + max_logged_m)

    n_faults = int(rng.integers(0, max_faults + 1))
    faults: list[PlanarFault] = []
    fault_kinds: list[str] = []
    if n_faults:
        # well-separated crossing points in the middle of the logged interval
        faults, fault_kinds = _draw_faults(rng, traj, md_top, md_base, n_faults, throw_range_m)

    factors = rng.uniform(1.0 - thickness_variation, 1.0 + thickness_variation, size=len(column))
    return _log_well(rng, seed, kind, column, beds, faults, fault_kinds, traj, md_top, md_base,
                     factors, dip, dip_azi, unpicked_fraction=unpicked_fraction,
                     gain_range=gain_range, offset_range=offset_range, md_step_m=md_step_m,
                     curves=curves, noise_std=noise_std, pick_noise_m=pick_noise_m)


def _reference_s(md: np.ndarray, traj: Trajectory, beds: Beds, faults: list[PlanarFault],
                 column: ReferenceColumn, factors: np.ndarray
                 ) -> tuple[np.ndarray, np.ndarray]:
    """True reference-column position of the well at ``md`` (faults undone, thickness mapped,
    as :func:`~wellfault.forward.simulate_well` computes it), and the samples after which the
    set of hanging walls changes (fault crossings)."""
    from .forward import _restore, _ThicknessMap

    q, mem = _restore(np.asarray(traj.position(md), dtype=float), tuple(faults))
    s = _ThicknessMap(column, factors).to_reference(q @ beds.normal + beds.origin_s_m)
    return s, np.flatnonzero(np.any(mem[1:] != mem[:-1], axis=1))


def _longest_run(mask: np.ndarray) -> tuple[int, int] | None:
    idx = np.flatnonzero(mask)
    if idx.size == 0:
        return None
    breaks = np.flatnonzero(np.diff(idx) > 1)
    starts = np.r_[idx[0], idx[breaks + 1]]
    ends = np.r_[idx[breaks], idx[-1]]
    k = int(np.argmax(ends - starts))
    return int(starts[k]), int(ends[k])


def _draw_faults(rng, traj, md_top, md_base, n_faults, throw_range_m, gap_m=None):
    """``n_faults`` planar dip-slip faults crossing the well between 20 and 80 % of the logged
    interval (two at least a quarter of it apart, or ``gap_m`` of MD apart): normal 50-70 deg,
    reverse 25-40 deg, any dip azimuth, throw in ``throw_range_m``."""
    span = md_base - md_top
    slots = np.sort(rng.uniform(0.2, 0.8, size=n_faults))
    if n_faults == 2 and gap_m is not None:
        slots[0] = rng.uniform(0.2, 0.6)
        slots[1] = slots[0] + rng.uniform(*gap_m) / span
    elif n_faults == 2 and slots[1] - slots[0] < 0.25:
        slots = np.array([0.3, 0.7])
    faults, kinds = [], []
    for frac in slots:
        fk = str(rng.choice(["normal", "reverse"]))
        fdip = float(rng.uniform(50.0, 70.0) if fk == "normal" else rng.uniform(25.0, 40.0))
        fazi = float(rng.uniform(0.0, 360.0))
        throw = float(rng.uniform(*throw_range_m))
        point = traj.position(np.array([md_top + frac * span]))[0]
        faults.append(PlanarFault.dip_slip(fdip, fazi, point, throw, kind=fk))
        kinds.append(fk)
    return faults, kinds


def _log_well(rng, seed, kind, column, beds, faults, fault_kinds, traj, md_top, md_base,
              factors, dip, dip_azi, *, unpicked_fraction, gain_range, offset_range, md_step_m,
              curves, noise_std, pick_noise_m) -> Scenario:
    """Draw the unpicked surfaces and the tool's gain and offset (in this order, so a seed
    keeps its scenario), then log the well through the model."""
    unpicked = [n for n in column.names if rng.random() < unpicked_fraction]
    gain = float(rng.uniform(*gain_range))
    offset = float(rng.uniform(*offset_range))
    syn = simulate_well(
        column, beds, faults, traj, md_top_m=md_top, md_base_m=md_base, md_step_m=md_step_m,
        curves=curves, thickness_factors=factors, noise_std=noise_std, gain=gain,
        offset=offset, unpicked=unpicked, pick_noise_m=pick_noise_m, seed=seed,
        name=f"S{seed:04d}",
    )
    return Scenario(seed=seed, kind=kind, synthetic=syn, column=column,
                    bed_dip=BedDip.constant(dip, dip_azi), faults=faults,
                    fault_kinds=fault_kinds)


def _inside_scenario(seed, column, *, kinds, max_faults, max_dip_deg, throw_range_m,
                     thickness_variation, noise_std, gain_range, offset_range, pick_noise_m,
                     unpicked_fraction, md_step_m, max_logged_m, curves, margin_m, clearance_m,
                     fault_gap_m=None, min_faults=0) -> Scenario:
    """:func:`random_scenario` with the well kept inside the column (its docstring)."""
    rng = np.random.default_rng(seed)
    kind = str(rng.choice(list(kinds)))
    base_s = float(column.base_s_m)
    if not np.isfinite(base_s):
        raise ValueError("inside_margin_m needs a column with a defined base")
    top_s = float(column.s_m[0])
    lo_s, hi_s = top_s + margin_m, base_s - margin_m
    for _attempt in range(50):
        dip = float(rng.uniform(0.0, max_dip_deg))
        dip_azi = float(rng.uniform(0.0, 360.0))
        traj = _draw_trajectory(rng, kind, seed)
        top_tvd = float(rng.uniform(450.0, 700.0))
        beds = Beds.through(dip, dip_azi, (0.0, 0.0, top_tvd), 0.0)
        md = np.arange(0.0, 9000.0, 1.0)
        s = beds.s(traj.position(md))
        run = _longest_run((s > lo_s) & (s < hi_s))
        if run is None or md[run[1]] - md[run[0]] < 150.0:
            continue
        # start anywhere along the crossing that leaves room for the logged length, so that
        # wells do not all begin at the column top
        md_top = float(md[run[0]])
        md_end = float(md[run[1]])
        room = md_end - md_top - min(max_logged_m, md_end - md_top)
        md_top += float(rng.uniform(0.0, max(room, 0.0)))
        md_base = min(md_end, md_top + max_logged_m)
        break
    else:  # pragma: no cover
        raise RuntimeError(f"scenario {seed}: no trajectory crosses the column")
    factors = rng.uniform(1.0 - thickness_variation, 1.0 + thickness_variation, size=len(column))
    n_faults = int(rng.integers(min(min_faults, max_faults), max_faults + 1))
    grid = np.arange(md_top, md_base, 0.5)
    faults, fault_kinds = [], []
    for _attempt in range(31 * max(n_faults, 1)):
        nf = n_faults if _attempt < 30 else max(n_faults - 1 - (_attempt - 30) // 30, 0)
        faults, fault_kinds = _draw_faults(rng, traj, md_top, md_base, nf, throw_range_m,
                                           fault_gap_m)
        s_ref, crossed = _reference_s(grid, traj, beds, faults, column, factors)
        run = _longest_run((s_ref > lo_s) & (s_ref < hi_s))
        if run is None or grid[run[1]] - grid[run[0]] < 0.5 * (md_base - md_top):
            continue
        a, b = float(grid[run[0]]), float(grid[run[1]])
        if all(a + clearance_m <= grid[i] <= b - clearance_m for i in crossed):
            md_top, md_base = a, b
            break
    else:  # no fault draw fits: log the unfaulted well, trimmed to the column all the same
        faults, fault_kinds = [], []
        s_ref, _ = _reference_s(grid, traj, beds, faults, column, factors)
        run = _longest_run((s_ref > lo_s) & (s_ref < hi_s))
        if run is not None and run[1] > run[0]:
            md_top, md_base = float(grid[run[0]]), float(grid[run[1]])
    return _log_well(rng, seed, kind, column, beds, faults, fault_kinds, traj, md_top, md_base,
                     factors, dip, dip_azi, unpicked_fraction=unpicked_fraction,
                     gain_range=gain_range, offset_range=offset_range, md_step_m=md_step_m,
                     curves=curves, noise_std=noise_std, pick_noise_m=pick_noise_m)


# ----------------------------------------------------------------- type logs from real curves
@dataclass(frozen=True)
class RealLog:
    """A real open log used as a type log for benchmarks: file, the MD interval kept [m] and
    why (see ../shared/reference_data/README.md for the files' provenance)."""

    file: str
    interval_m: tuple[float, float]
    reason: str


#: The real gamma-ray logs of ../shared/reference_data and the interval of each that makes a
#: sensible type log. Excluded: stretches that are not formation signal (logged through casing,
#: nulls, a tool held on one value) and long featureless ones, where no log correlation can
#: place a cut (documented in DEVELOPERS.md, "Curve evidence on real type logs").
REAL_GR_LOGS: dict[str, RealLog] = {
    # Windsor-Kennetcook sub-basin, Nova Scotia (welly 0.5.2 sdist, tests/assets/P-129_out.LAS)
    "P-129": RealLog("P-129_Kennetcook2.las", (290.0, 1900.0),
                     "GR above 280 m logged through casing (and held flat 211-253 m); "
                     "held flat over the last 30 m (1908-1939 m)"),
    # Dutch North Sea block F3 (welly 0.5.2 sdist, tests/assets/F03-02.las); bottom-up file
    "F03-02": RealLog("F03-02_NorthSea.las", (400.0, 1650.0),
                      "nulls at 9.9-15 m and below 2140 m; 15-400 m a quiet trend "
                      "(10-90 % range under 18 API); 1650-1880 m near-constant low GR "
                      "(about 8 API) without character"),
    # Sumner County, Kansas (welly 0.5.2 sdist, tutorial/data/Wellington_KGS-1-32...); feet
    "Wellington": RealLog("Wellington_KGS_1-32.las", (180.0, 1575.0),
                          "nulls below 1580.7 m and a basement spike at the very base"),
}


def real_gr_column(name: str, folder, *, surfaces_every_m: float = 50.0,
                   max_gap_m: float = 2.0) -> ReferenceColumn:
    """Reference column whose type log is the gamma ray of one of :data:`REAL_GR_LOGS`.

    The log is read with :func:`wellfault.io.read_las` (metres, top down), cut to the entry's
    interval, put on a regular grid of its median step (F03-02's step is irregular) by linear
    interpolation between valid samples, and handed to
    :func:`~wellfault.forward.column_from_real_curve` (invented surfaces every
    ``surfaces_every_m``, snapped to log breaks). A null gap longer than ``max_gap_m`` inside
    the interval is an error (it would be filled by a straight line).
    """
    from .forward import column_from_real_curve

    values, ds = real_gr_values(name, folder, max_gap_m=max_gap_m)
    a, b = REAL_GR_LOGS[name].interval_m
    return column_from_real_curve(values, ds, surfaces_every_m=surfaces_every_m,
                                  name_prefix=_prefix(name),
                                  name=f"type log: {name} GR {a:.0f}-{b:.0f} m")


def _prefix(name: str) -> str:
    return name.split("-")[0][:3].upper() + "-"


def real_gr_values(name: str, folder, *, max_gap_m: float = 2.0) -> tuple[np.ndarray, float]:
    """The gamma ray of one of :data:`REAL_GR_LOGS` over its kept interval, on a regular grid:
    (values [API], step [m]); see :func:`real_gr_column`."""
    from pathlib import Path

    from .io import read_las

    if name not in REAL_GR_LOGS:
        raise KeyError(f"unknown real log {name!r}; choose from {sorted(REAL_GR_LOGS)}")
    entry = REAL_GR_LOGS[name]
    well = read_las(Path(folder) / entry.file)
    md = well.curves.index.to_numpy(float)
    gr = well.curves["GR"].to_numpy(float)
    a, b = entry.interval_m
    sel = (md >= a) & (md <= b)
    md, gr = md[sel], gr[sel]
    ok = np.isfinite(gr)
    gaps = np.diff(md[ok])
    if gaps.size and gaps.max() > max_gap_m:
        raise ValueError(f"{entry.file}: null gap of {gaps.max():.1f} m inside {entry.interval_m}")
    ds = float(np.median(np.diff(md)))
    grid = np.arange(md[ok][0], md[ok][-1] + 1e-9, ds)
    return np.interp(grid, md[ok], gr[ok]), ds


def curve_spread(column: ReferenceColumn, curve: str = "GR") -> float:
    """Robust spread of a type-log curve: (q90 − q10) / 2.5631, the standard deviation for
    normal data (:func:`wellfault.align.robust_location_scale`)."""
    from .align import robust_location_scale

    return float(robust_location_scale(column.type_log[curve].to_numpy(float))[1][0])


def curve_scenario(
    seed: int,
    column: ReferenceColumn,
    *,
    curve: str = "GR",
    noise_rel: tuple[float, float] = (0.10, 0.20),
    offset_rel: float = 0.35,
    gain_range: tuple[float, float] = (0.8, 1.25),
    thickness_variation: float = 0.15,
    max_logged_m: float = 1000.0,
    inside_margin_m: float = 10.0,
    **kwargs,
) -> Scenario:
    """A well for the curve-evidence accuracy goals (the issue "Fault cuts from log curves").

    :func:`random_scenario` kept inside the column (``inside_margin_m``), with measurement
    noise and tool offset scaled to the type log's robust spread (:func:`curve_spread`):
    noise standard deviation drawn per well in ``noise_rel`` × spread, offset in
    ±``offset_rel`` × spread, gain in ``gain_range``; thickness of every unit changed by up to
    ±``thickness_variation``; vertical, deviated and high-angle wells; 0–2 normal or reverse
    faults. Noise set in API units would be far larger, relative to the signal, on a quiet log
    than on a lively one.
    """
    spread = curve_spread(column, curve)
    rng = np.random.default_rng([int(seed), 7])        # apart from the scenario's own draws
    noise = float(rng.uniform(*noise_rel)) * spread
    return random_scenario(
        seed, column, curves=(curve,), noise_std=noise, gain_range=gain_range,
        offset_range=(-offset_rel * spread, offset_rel * spread),
        thickness_variation=thickness_variation, max_logged_m=max_logged_m,
        inside_margin_m=inside_margin_m, **kwargs)


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

    from .align import robust_location_scale

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
    from .align import robust_location_scale
    from .forward import column_from_real_curve

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
