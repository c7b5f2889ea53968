"""Fault cuts from formation tops (DESIGN.md §4, "Tops evidence").

For each pair of consecutive picks in a well, the stratigraphic distance actually drilled,
``∫ t·n dMD`` from the trajectory and the bed dip, is compared with the column's distance between
the two surfaces. The difference is a stratigraphic jump Δs inside that interval:

    s(pick k+1) = s(pick k) + drilled + Δs   →   Δs = (s_{k+1} − s_k) − drilled

A jump larger than the tolerance (a relative part of the expected interval plus an absolute
floor) is a fault cut bracketed by the two picks. A surface picked twice is a repeat for certain
and is reported whatever the tolerance. A surface skipped while the interval has its full
thickness is only unpicked, and no cut is reported.
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..geo.column import ReferenceColumn
from ..geo.dip import BedDip
from ..errors import InputError, input_error
from .measure import MIN_BED_COSINE, FaultAssumptions, measure_cut
from .results import FaultCut

__all__ = ["TopsTolerance", "find_cuts_from_tops", "tops_intervals", "smallest_visible_jump"]


@dataclass(frozen=True)
class TopsTolerance:
    """How far the drilled interval may differ from the expected one before it is a fault.

    ``relative`` applies to the expected stratigraphic interval between the two picks (natural
    thickness variation, default 15 %); ``floor_m`` is the absolute floor (default 2 m: two to
    three times the vertical resolution of a gamma-ray tool plus pick uncertainty, methods.md §7,
    common practice). ``pick_uncertainty_m`` widens each cut's bracket beyond the two picks: a
    fault just above or below a pick can move the pick across it.
    """

    relative: float = 0.15
    floor_m: float = 2.0
    pick_uncertainty_m: float = 1.0

    def __post_init__(self):
        if not (0 <= self.relative < 1):
            raise InputError(f"relative thickness tolerance must be in [0, 1) (got "
                             f"{self.relative}); 0.15 means 15 %")
        if not (self.pick_uncertainty_m >= 0):
            raise InputError(f"pick uncertainty must be >= 0 (got {self.pick_uncertainty_m})")
        if not (self.floor_m >= 0):
            raise InputError(f"absolute tolerance floor must be >= 0 (got {self.floor_m})")

    def allowed(self, expected_m) -> np.ndarray:
        return self.relative * np.abs(np.asarray(expected_m, dtype=float)) + self.floor_m


def _picks_for_well(tops: pd.DataFrame, well: str | None) -> pd.DataFrame:
    t = tops
    if well is not None and "well" in t.columns:
        names = t["well"].astype(str)
        t = t[names == str(well)]
        if len(t) == 0:
            known = sorted(set(names))[:10]
            raise input_error(f"no tops for well {well!r}", value=None,
                              fix=f"the tops file names the wells {known}; check the well name "
                                  "in the LAS header or pass the right tops file")
    return t.sort_values("md_m", kind="stable").reset_index(drop=True)


def _surfaces_between(column: ReferenceColumn, above: str, below: str) -> list[str]:
    """Column surfaces strictly between two surfaces (in either order)."""
    names = list(column.names)
    i, j = sorted((names.index(above), names.index(below)))
    return names[i + 1:j]


def _unconformity_at(column: ReferenceColumn, above: str, below: str) -> bool:
    """True when an unconformity surface lies in (above, below] of the column."""
    names = list(column.names)
    i, j = sorted((names.index(above), names.index(below)))
    return bool(np.any(np.asarray(column.unconformity, dtype=bool)[i + 1:j + 1]))


def _certain_repeats(picks: pd.DataFrame, iv: pd.DataFrame, trajectory, bed_dip: BedDip
                     ) -> set[int]:
    """Intervals that must hold a repeat because a surface is picked twice around them.

    A surface picked at a < b by a well that kept drilling the same way through the beds (r of
    one sign, and clear of bedding, all the way from a to b) has crossed it twice only through
    a fault: the interval between a and b whose jump points most strongly against the
    direction of drilling is returned. A well that turns from down-section to up-section (or
    runs along bedding) can cross a surface twice without a fault, so no repeat is forced then.
    """
    names = picks["surface"].astype(str).tolist()
    md = picks["md_m"].to_numpy(float)
    ds = iv["delta_s_m"].to_numpy(float)
    out: set[int] = set()
    first: dict[str, int] = {}
    for b, name in enumerate(names):
        if name in first:
            a = first[name]
            grid = np.linspace(md[a], md[b], int(np.clip((md[b] - md[a]) / 5.0 + 1, 2, 4001)))
            r = np.einsum("ij,ij->i", trajectory.tangent(grid), bed_dip.normals_at(grid, picks))
            if np.all(r > MIN_BED_COSINE) or np.all(r < -MIN_BED_COSINE):
                k = a + int(np.argmax(-(ds[a:b] * np.sign(r[0]))))
                out.add(k)
        first[name] = b
    return out


def tops_intervals(picks: pd.DataFrame, column: ReferenceColumn, trajectory, bed_dip: BedDip,
                   *, expected: dict | None = None) -> pd.DataFrame:
    """One row per pair of consecutive picks: expected vs drilled stratigraphic distance.

    Columns: ``surface_above, surface_below, md_top_m, md_base_m, expected_m, spread_m,
    drilled_m, delta_s_m``. ``spread_m`` is the thickness the relative tolerance applies to:
    the root-sum-square of the column units between the two surfaces (independent natural
    variation of separate units), or the local expected interval when one is given. ``expected`` optionally maps (surface_above, surface_below) to a local expected
    interval (field screening's neighbour-aware thickness) replacing the column's.
    """
    known = set(column.names)
    unknown = [k for k, s in enumerate(picks["surface"].astype(str)) if s not in known]
    if unknown:
        k = unknown[0]
        raise input_error(
            f"surface {str(picks['surface'].iloc[k])!r} in the tops is not in the reference "
            "column", source=picks.attrs.get("source", "tops"),
            row=picks["row"].iloc[k] if "row" in picks.columns else None,
            fix=f"the column has {list(column.names)}; rename the pick (names must match "
                "exactly) or add the surface to the column")
    if len(picks) < 2:
        return pd.DataFrame(columns=["surface_above", "surface_below", "md_top_m", "md_base_m",
                                     "expected_m", "spread_m", "drilled_m", "delta_s_m"])
    md = picks["md_m"].to_numpy(float)
    names = picks["surface"].astype(str).to_numpy()
    s_of = dict(zip(column.names, np.asarray(column.s_m, dtype=float)))
    s = np.array([s_of[n] for n in names])
    exp = np.diff(s)
    if expected:
        for k in range(len(exp)):
            key = (names[k], names[k + 1])
            if key in expected and np.isfinite(expected[key]):
                exp[k] = expected[key]
    drilled = bed_dip.strat_travel(trajectory, md[:-1], md[1:], picks)
    # natural thickness variation of separate units is independent, so the spread of a
    # multi-unit interval grows as the root-sum-square of its units' thicknesses
    idx = {n: i for i, n in enumerate(column.names)}
    thick = np.asarray(column.thicknesses_m, dtype=float)
    spread = np.empty(len(exp))
    for k in range(len(exp)):
        i, j = sorted((idx[names[k]], idx[names[k + 1]]))
        spread[k] = np.sqrt(np.nansum(thick[i:j] ** 2)) if j > i else 0.0
        if expected and (names[k], names[k + 1]) in expected:
            spread[k] = abs(exp[k])
    return pd.DataFrame({
        "surface_above": names[:-1], "surface_below": names[1:],
        "md_top_m": md[:-1], "md_base_m": md[1:],
        "expected_m": exp, "spread_m": spread, "drilled_m": drilled,
        "delta_s_m": exp - drilled,
    })


def smallest_visible_jump(picks: pd.DataFrame, column: ReferenceColumn, trajectory,
                          bed_dip: BedDip, md_m, tolerance: TopsTolerance = TopsTolerance()
                          ) -> np.ndarray:
    """The smallest stratigraphic jump the tops can show at each MD [m TST].

    It is the tolerance of the pick interval holding the MD (floor + relative part of the
    interval's spread); NaN outside the picks. Useful to say which cuts tops cannot see.
    """
    iv = tops_intervals(picks.sort_values("md_m"), column, trajectory, bed_dip)
    allowed = tolerance.allowed(iv["spread_m"].to_numpy(float))
    top, base = iv["md_top_m"].to_numpy(float), iv["md_base_m"].to_numpy(float)
    md = np.atleast_1d(np.asarray(md_m, dtype=float))
    out = np.full(md.size, np.nan)
    for i, m in enumerate(md):
        k = np.flatnonzero((top <= m) & (m <= base))
        if k.size:
            out[i] = allowed[k[0]]
    return out


def find_cuts_from_tops(
    tops: pd.DataFrame,
    column: ReferenceColumn,
    trajectory,
    *,
    bed_dip: BedDip | None = None,
    well: str | None = None,
    assumptions: FaultAssumptions = FaultAssumptions(),
    tolerance: TopsTolerance = TopsTolerance(),
    expected: dict | None = None,
) -> list[FaultCut]:
    """Find, classify and measure the fault cuts that a well's tops show.

    Parameters
    ----------
    tops : DataFrame
        Picks with columns ``surface, md_m`` (and ``well`` when several wells share a file).
    column : ReferenceColumn
        The field's reference column (s of each surface).
    trajectory : Trajectory
        The well's path; use ``Trajectory.vertical()`` for a vertical well.
    bed_dip : BedDip, optional
        Bed attitude (default flat beds).
    well : str, optional
        Which well's picks to use and the name in the result rows.
    assumptions : FaultAssumptions
        Fault attitude and pitch when known.
    tolerance : TopsTolerance
        Relative and absolute thickness tolerance.
    expected : dict, optional
        Local expected intervals keyed by (surface_above, surface_below) [m TST].

    Returns
    -------
    list of FaultCut
        One per cut, ``method="tops"``. The best-estimate MD is the middle of the bracket:
        tops alone cannot place the cut inside it (curves can, see the alignment engine).
    """
    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    picks = _picks_for_well(tops, well)
    name = str(well if well is not None else (picks["well"].iloc[0] if "well" in picks.columns
                                               and len(picks) else "well"))
    iv = tops_intervals(picks, column, trajectory, bed_dip, expected=expected)
    cuts: list[FaultCut] = []
    allowed = tolerance.allowed(iv["spread_m"].to_numpy(float))
    flagged = np.abs(iv["delta_s_m"].to_numpy(float)) > allowed
    certain = _certain_repeats(picks, iv, trajectory, bed_dip)
    names = set(picks["surface"].astype(str))
    for k, row in iv.iterrows():
        ds = float(row["delta_s_m"])
        if not (flagged[k] or k in certain):
            continue
        notes = []
        if not flagged[k]:
            notes.append(f"surface {row['surface_below']} picked twice: repeated section for "
                         "certain, although the thickness difference is within tolerance")
        between = _surfaces_between(column, row["surface_above"], row["surface_below"])
        skipped = [b for b in between if b not in names]
        if skipped and ds > 0:
            notes.append("surfaces not seen between the picks: " + ", ".join(skipped))
        notes.append("cut placed mid-bracket: tops alone do not place it within the bracket")
        md_mid = 0.5 * (row["md_top_m"] + row["md_base_m"])
        excess = (abs(ds) - allowed[k]) / max(allowed[k], 1e-9)
        conf = 1.0 if k in certain else float(1.0 - math.exp(-2.0 * max(excess, 0.0)))
        cut = measure_cut(
            well=name, method="tops", md_m=md_mid,
            md_top_m=row["md_top_m"] - tolerance.pick_uncertainty_m,
            md_base_m=row["md_base_m"] + tolerance.pick_uncertainty_m, delta_s_m=ds, trajectory=trajectory, bed_dip=bed_dip,
            assumptions=assumptions, picks=picks, surface_above=row["surface_above"],
            surface_below=row["surface_below"], confidence=conf, notes=notes,
            expected_thickness_m=float(row["expected_m"]),
            observed_thickness_m=float(row["drilled_m"]),
        )
        if cut.section == "missing" and _unconformity_at(column, row["surface_above"],
                                                         row["surface_below"]):
            cut = dataclasses.replace(cut, notes=cut.notes + "; missing section at a surface "
                                      "flagged as an unconformity in the column: it may be the "
                                      "unconformity and not a fault")
        cuts.append(cut)
    return cuts
