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
) -> Scenario:
    """Draw one random well through a faulted model (see the module docstring).

    The same ``seed`` and ``column`` always give the same scenario.
    """
    rng = np.random.default_rng(seed)
    kind = str(rng.choice(list(kinds)))
    dip = float(rng.uniform(0.0, max_dip_deg))
    dip_azi = float(rng.uniform(0.0, 360.0))
    base_s = float(column.base_s_m)
    for _attempt in range(20):
        if kind == "vertical":
            inc, azi = 0.0, 0.0
        elif kind == "deviated":
            inc, azi = float(rng.uniform(20.0, 55.0)), float(rng.uniform(0.0, 360.0))
        else:
            inc, azi = float(rng.uniform(65.0, 85.0)), float(rng.uniform(0.0, 360.0))
        traj = build_trajectory(kind, inclination_deg=inc, azimuth_deg=azi, td_m=9000.0,
                                name=f"S{seed:04d}")
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
        span = md_base - md_top
        slots = np.sort(rng.uniform(0.2, 0.8, size=n_faults))
        if n_faults == 2 and slots[1] - slots[0] < 0.25:
            slots = np.array([0.3, 0.7])
        for frac in slots:
            fk = str(rng.choice(["normal", "reverse"]))
            fdip = float(rng.uniform(50.0, 70.0) if fk == "normal" else rng.uniform(25.0, 40.0))
            fazi = float(rng.uniform(0.0, 360.0))
            throw = float(rng.uniform(*throw_range_m))
            point = traj.position(np.array([md_top + frac * span]))[0]
            faults.append(PlanarFault.dip_slip(fdip, fazi, point, throw, kind=fk))
            fault_kinds.append(fk)

    factors = rng.uniform(1.0 - thickness_variation, 1.0 + thickness_variation, size=len(column))
    names = list(column.names)
    unpicked = [n for n in names if rng.random() < unpicked_fraction]
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
