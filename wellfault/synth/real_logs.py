"""Type logs from real gamma-ray curves (the open wells of the reference data) and forward-
modelled wells on them."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..geo.column import ReferenceColumn
from .scenarios import Scenario, random_scenario

__all__ = [
    "curve_scenario",
    "REAL_GR_LOGS",
    "RealLog",
    "real_gr_column",
    "real_gr_values",
    "curve_spread",
]


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
    :func:`~wellfault.synth.columns.column_from_real_curve` (invented surfaces every
    ``surfaces_every_m``, snapped to log breaks). A null gap longer than ``max_gap_m`` inside
    the interval is an error (it would be filled by a straight line).
    """
    from .columns import column_from_real_curve

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

    from ..io import read_las

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
    from ..align import robust_location_scale

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
