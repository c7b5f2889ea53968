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

from ..geo.column import ReferenceColumn
from ..geo.dip import BedDip
from ..geo.trajectory import Trajectory
from .forward import SyntheticWell, simulate_well
from .structure import Beds, PlanarFault

__all__ = ["Scenario", "random_scenario", "build_trajectory", "TRAJECTORY_KINDS"]


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
        """The model's faults as mapped planes (:class:`wellfault.evidence.measure.FaultPlane`; TVDSS =
        TVD here, the scenarios' trajectories having no elevation), so that a detector can be
        given each cut's true fault attitude."""
        from ..evidence.measure import FaultPlane

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
    as :func:`~wellfault.synth.forward.simulate_well` computes it), and the samples after which the
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
