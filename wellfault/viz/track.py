"""A well's stratigraphic position track: where in the reference column each MD of the well is.

Schema (every producer of a track returns this; :func:`check_track` validates it)
--------------------------------------------------------------------------------
A pandas DataFrame, one row per sample, with a default RangeIndex and the columns

============  ======  ==========================================================================
column        dtype   meaning
============  ======  ==========================================================================
``md_m``      float   measured depth of the sample [m], finite and strictly increasing
``s_m``       float   stratigraphic position there: TST below the top of the reference column
                      [m], growing down-section (DESIGN.md §2); NaN where nothing places it
``unit``      object  name of the reference-column unit holding ``s_m`` (the surface at the top
                      of the unit), or None (a missing value) outside the column / where
                      ``s_m`` is NaN
``confidence`` float  how well the evidence places the sample, in [0, 1]
============  ======  ==========================================================================

A fault is a *step* in ``s_m``: the sample at a cut's MD (the first sample below the cut,
DESIGN.md §2) already carries the position below the cut, the sample before it the position
above, and ``s_below − s_above`` is the cut's jump Δs. Producers may add further columns (e.g.
``source``); consumers use only the four above. ``DataFrame.attrs["well"]`` may name the well.

Producers: :func:`track_from_tops` (formation tops) here; the curve alignment engine
(``wellfault.align``) returns the same schema from its best path.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike

from ..geo.column import ReferenceColumn
from ..geo.dip import BedDip
from ..errors import InputError, input_error

__all__ = ["TRACK_COLUMNS", "check_track", "empty_track", "track_from_tops", "track_steps",
           "cuts_in_metres", "cuts_in_unit"]

#: Columns of a stratigraphic position track, in order.
TRACK_COLUMNS = ("md_m", "s_m", "unit", "confidence")

#: Confidence inside a cut's bracket: tops say a cut lies there, not where, so the position
#: between the bracket ends is the one above or the one below the cut, and tops cannot say which.
BRACKET_CONFIDENCE = 0.5
#: Beyond the outermost picks the position is extrapolated along the bed dip; its confidence
#: falls linearly from 1 at the pick to ``EXTRAPOLATION_FLOOR`` at ``EXTRAPOLATION_SCALE_M``.
EXTRAPOLATION_SCALE_M = 200.0
EXTRAPOLATION_FLOOR = 0.2


def empty_track() -> pd.DataFrame:
    """A track with no rows and the right columns."""
    return pd.DataFrame({"md_m": pd.Series(dtype=float), "s_m": pd.Series(dtype=float),
                         "unit": pd.Series(dtype=object),
                         "confidence": pd.Series(dtype=float)})


def check_track(track: pd.DataFrame, *, source: object = "track") -> pd.DataFrame:
    """Validate a track against the schema above and return a clean copy (float columns).

    Raises
    ------
    InputError
        A missing column, MD not finite and strictly increasing, or a confidence outside [0, 1].
    """
    if not isinstance(track, pd.DataFrame):
        raise InputError(f"{source}: a track must be a DataFrame with columns "
                         f"{list(TRACK_COLUMNS)} (got {type(track).__name__})")
    missing = [c for c in TRACK_COLUMNS if c not in track.columns]
    if missing:
        raise InputError(f"{source}: track lacks column(s) {missing} (have "
                         f"{list(track.columns)}); a track has {list(TRACK_COLUMNS)}")
    out = track.reset_index(drop=True).copy()
    out["md_m"] = pd.to_numeric(out["md_m"], errors="coerce").astype(float)
    out["s_m"] = pd.to_numeric(out["s_m"], errors="coerce").astype(float)
    out["confidence"] = pd.to_numeric(out["confidence"], errors="coerce").astype(float)
    md = out["md_m"].to_numpy()
    if len(md) and (not np.all(np.isfinite(md)) or np.any(np.diff(md) <= 0)):
        bad = int(np.flatnonzero(~np.isfinite(md))[0]) if not np.all(np.isfinite(md)) else \
            int(np.flatnonzero(np.diff(md) <= 0)[0]) + 1
        raise input_error("track MD is not finite and strictly increasing", source=source,
                          row=bad, value=float(md[bad]),
                          fix="sort the track by MD and drop duplicate depths")
    conf = out["confidence"].to_numpy()
    bad = np.isfinite(conf) & ((conf < 0) | (conf > 1))
    if bad.any():
        i = int(np.flatnonzero(bad)[0])
        raise input_error("track confidence outside [0, 1]", source=source, row=i,
                          value=float(conf[i]), fix="give confidence as a number from 0 to 1")
    out.attrs = dict(track.attrs)
    return out


def cuts_in_metres(cuts: pd.DataFrame | None) -> pd.DataFrame:
    """The cut table with every length column in metres (``md_ft`` → ``md_m``).

    Cut tables carry their unit in the length columns' names (``wellfault.evidence.results``); this
    converts a table written in feet back to metres once, for plotting and track building.
    """
    from ..evidence.results import LENGTH_FIELDS
    from ..geo.units import METRES_PER_FOOT

    if cuts is None:
        return pd.DataFrame()
    df = cuts.copy()
    rename = {}
    for f in LENGTH_FIELDS:
        stem = f[:-2]
        for suffix, factor in (("ft", METRES_PER_FOOT), ("usft", 1200.0 / 3937.0)):
            col = f"{stem}_{suffix}"
            if col in df.columns and f not in df.columns:
                df[col] = pd.to_numeric(df[col], errors="coerce") * factor
                rename[col] = f
    return df.rename(columns=rename)


def cuts_in_unit(cuts: pd.DataFrame | None, unit) -> pd.DataFrame:
    """The cut table with every length column in ``unit`` (``md_m`` → ``md_ft``).

    Every column whose name ends in a unit suffix (``_m``, ``_ft``, ``_usft``: the cut table's
    lengths, and the bracket-end positions a screening adds) is a length; a table already in
    ``unit`` is returned as a copy.
    """
    from ..geo.units import parse_depth_unit

    u = parse_depth_unit(unit)
    if cuts is None:
        return pd.DataFrame()
    df = cuts.copy()
    rename = {}
    for col in df.columns:
        stem, _, suffix = str(col).rpartition("_")
        if not stem or suffix not in ("m", "ft", "usft") or suffix == u.suffix:
            continue
        target = f"{stem}_{u.suffix}"
        if target in df.columns:
            continue
        df[col] = pd.to_numeric(df[col], errors="coerce") * (
            parse_depth_unit(suffix).metres / u.metres)
        rename[col] = target
    return df.rename(columns=rename)


def _unit_names(column: ReferenceColumn, s: np.ndarray) -> np.ndarray:
    out = np.full(s.shape, None, dtype=object)
    ok = np.isfinite(s)
    if ok.any():
        out[ok] = np.asarray(column.unit_at(s[ok]), dtype=object)
    return out


def track_from_tops(
    picks: pd.DataFrame,
    column: ReferenceColumn,
    trajectory,
    bed_dip: BedDip | str | None = None,
    cuts: pd.DataFrame | None = None,
    *,
    md_m: ArrayLike | None = None,
    step_m: float = 1.0,
    well: str | None = None,
) -> pd.DataFrame:
    """The stratigraphic position track a well's tops give, faults as steps.

    Parameters
    ----------
    picks : DataFrame
        The well's tops: ``surface, md_m`` (rows of other wells are dropped when ``well`` is
        given and a ``well`` column exists). Every surface must be in ``column``.
    column : ReferenceColumn
        The reference column (s of each surface).
    trajectory : Trajectory
        The well path.
    bed_dip : BedDip or "dip/azimuth" text, optional
        Bed attitude; flat beds when omitted.
    cuts : DataFrame, optional
        The well's cut table (lengths in metres or feet, as ``find_fault_cuts`` returns it);
        each cut puts a step of its ``delta_s`` at its MD. Cuts of other wells are ignored
        when ``well`` is given.
    md_m : array_like, optional
        MDs to evaluate [m]; default every ``step_m`` from the first to the last pick. Pick and
        cut MDs are always added.
    step_m : float
        Sampling step of the default MD grid [m].
    well : str, optional
        Well name (selects picks and cuts; stored in ``attrs["well"]``).

    Returns
    -------
    DataFrame
        A track (schema at the top of this module).

    Notes
    -----
    Pick k sits at the column's ``s_k`` of its surface. Below it the well moves through the
    beds by the drilled stratigraphic travel ``∫ t·n dMD`` (:meth:`BedDip.strat_travel`, exact
    along the minimum-curvature arc for planar beds), so ``s(md) = s_k + travel(md_k → md)``;
    each cut inside the interval adds its jump Δs from its MD down (a fault is a step). What is
    left between this and the next pick's ``s_{k+1}`` is natural thickness change within the
    tolerance; it is spread along the interval in proportion to the travel, so the track is
    continuous at the picks. For a single cut found by tops that remainder is zero: its Δs is
    exactly ``s_{k+1} − s_k − travel``. Beyond the outermost picks the track continues with the
    travel alone (and any cut there). Confidence: 1 between picks, ``BRACKET_CONFIDENCE``
    inside a cut's bracket, falling linearly to ``EXTRAPOLATION_FLOOR`` within
    ``EXTRAPOLATION_SCALE_M`` beyond the outermost picks.
    """
    from ..geo.trajectory import Trajectory

    if isinstance(bed_dip, str):
        bed_dip = BedDip.parse(bed_dip)
    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    if trajectory is None:
        trajectory = Trajectory.vertical()
    for c in ("surface", "md_m"):
        if c not in picks.columns:
            raise InputError(f"tops lack column {c!r} (have {list(picks.columns)}); read them "
                             "with wellfault.io.read_tops")
    p = picks
    if well is not None and "well" in p.columns:
        p = p[p["well"].astype(str) == str(well)]
    p = p.assign(md_m=pd.to_numeric(p["md_m"], errors="coerce")).dropna(subset=["md_m"])
    p = p.sort_values("md_m", kind="stable").reset_index(drop=True)
    if len(p) == 0:
        raise InputError(f"no tops with a depth{' for well ' + repr(well) if well else ''}: "
                         "a track from tops needs at least one pick")
    known = set(column.names)
    for i, name in enumerate(p["surface"].astype(str)):
        if name not in known:
            raise input_error(f"surface {name!r} is not in the reference column", row=i,
                              fix=f"the column has {list(column.names)}; rename the pick")
    if not (step_m > 0 and math.isfinite(step_m)):
        raise input_error("track step must be positive", value=step_m, fix="pass step_m > 0")

    pmd = p["md_m"].to_numpy(float)
    ps = np.array([column.s_of(str(n)) for n in p["surface"]], dtype=float)

    c = cuts_in_metres(cuts)
    if len(c) and well is not None and "well" in c.columns:
        c = c[c["well"].astype(str) == str(well)]
    if len(c):
        for col in ("md_m", "delta_s_m"):
            if col not in c.columns:
                raise InputError(f"cut table lacks {col!r} (have {list(c.columns)[:12]}...); "
                                 "pass the table find_fault_cuts returns")
        cmd = c["md_m"].to_numpy(float)
        cds = c["delta_s_m"].to_numpy(float)
        ctop = c["md_top_m"].to_numpy(float) if "md_top_m" in c.columns else cmd
        cbase = c["md_base_m"].to_numpy(float) if "md_base_m" in c.columns else cmd
        keep = np.isfinite(cmd) & np.isfinite(cds)
        cmd, cds, ctop, cbase = cmd[keep], cds[keep], ctop[keep], cbase[keep]
    else:
        cmd = cds = ctop = cbase = np.zeros(0)

    if md_m is None:
        n = max(1, int(math.ceil((pmd[-1] - pmd[0]) / step_m)))
        grid = np.linspace(pmd[0], pmd[-1], n + 1) if pmd[-1] > pmd[0] else pmd[:1]
    else:
        grid = np.asarray(md_m, dtype=float).reshape(-1)
        grid = grid[np.isfinite(grid)]
    inside = (cmd >= grid.min()) & (cmd <= grid.max()) if grid.size else cmd > np.inf
    md = np.unique(np.concatenate([grid, pmd[(pmd >= grid.min()) & (pmd <= grid.max())],
                                   cmd[inside]]))
    # cumulative drilled travel along the grid (anchored at the grid's first MD); pick MDs
    # outside the grid are included for the anchoring and dropped at the end
    full = np.unique(np.concatenate([md, pmd, cmd]))
    steps = bed_dip.strat_travel(trajectory, full[:-1], full[1:], p) if full.size > 1 else \
        np.zeros(0)
    cum = np.concatenate([[0.0], np.cumsum(steps)])

    def travel_to(x):
        return np.interp(x, full, cum)

    cum_p = travel_to(pmd)
    # sum of the jumps of the cuts at or above each MD (a cut's own MD carries the position
    # below it)
    order = np.argsort(cmd)
    cmd_s, cds_s = cmd[order], cds[order]
    jump_cum = np.concatenate([[0.0], np.cumsum(cds_s)])

    def jumps_to(x):
        return jump_cum[np.searchsorted(cmd_s, x, side="right")]

    s = np.empty(md.size)
    k = np.searchsorted(pmd, md, side="right") - 1  # pick at or above each sample
    above = k < 0
    k0 = np.clip(k, 0, len(pmd) - 1)
    base = ps[k0] + (travel_to(md) - cum_p[k0]) + (jumps_to(md) - jumps_to(pmd[k0]))
    # spread the remainder of each interval along it in proportion to the travel
    last = k0 >= len(pmd) - 1
    k1 = np.clip(k0 + 1, 0, len(pmd) - 1)
    model_next = ps[k0] + (cum_p[k1] - cum_p[k0]) + (jumps_to(pmd[k1]) - jumps_to(pmd[k0]))
    remainder = ps[k1] - model_next
    span = cum_p[k1] - cum_p[k0]
    frac = np.zeros(md.size)
    ok = (~last) & (np.abs(span) > 1e-9)
    frac[ok] = (travel_to(md[ok]) - cum_p[k0[ok]]) / span[ok]
    frac = np.clip(frac, 0.0, 1.0)
    s[:] = base + np.where(last | above, 0.0, remainder * frac)
    # above the first pick: extrapolate upward from it
    if above.any():
        s[above] = ps[0] + (travel_to(md[above]) - cum_p[0]) + (jumps_to(md[above])
                                                                 - jumps_to(pmd[0]))

    conf = np.ones(md.size)
    dist = np.where(md < pmd[0], pmd[0] - md, np.where(md > pmd[-1], md - pmd[-1], 0.0))
    conf = np.maximum(EXTRAPOLATION_FLOOR,
                      conf - (1.0 - EXTRAPOLATION_FLOOR) * np.clip(dist / EXTRAPOLATION_SCALE_M,
                                                                   0.0, 1.0))
    for lo, hi in zip(ctop, cbase):
        lo, hi = (lo, hi) if np.isfinite(lo) and np.isfinite(hi) else (np.nan, np.nan)
        if np.isfinite(lo):
            sel = (md > lo) & (md < hi)
            conf[sel] = np.minimum(conf[sel], BRACKET_CONFIDENCE)

    out = pd.DataFrame({"md_m": md, "s_m": s,
                        "unit": pd.Series(_unit_names(column, s), dtype=object),
                        "confidence": conf})
    if well is not None:
        out.attrs["well"] = str(well)
    return out


def track_steps(track: pd.DataFrame, *, min_step_m: float = 0.0) -> pd.DataFrame:
    """Where a track steps: rows ``md_m, s_above_m, s_below_m, delta_s_m``.

    A step is a change of s between consecutive samples larger than the drilled travel could
    make (more than ``min_step_m`` plus twice the largest ordinary sample-to-sample change, the
    median absolute change times 20). Used by the figures to break the line at faults.
    """
    t = check_track(track)
    s = t["s_m"].to_numpy(float)
    md = t["md_m"].to_numpy(float)
    if s.size < 2:
        return pd.DataFrame(columns=["md_m", "s_above_m", "s_below_m", "delta_s_m"])
    d = np.diff(s)
    dmd = np.diff(md)
    rate = np.abs(d) / np.where(dmd > 0, dmd, np.nan)
    typical = np.nanmedian(rate) if np.isfinite(rate).any() else 0.0
    thresh = max(min_step_m, 0.0) + 20.0 * typical * dmd + 1e-6
    idx = np.flatnonzero(np.isfinite(d) & (np.abs(d) > thresh))
    return pd.DataFrame({"md_m": md[idx + 1], "s_above_m": s[idx], "s_below_m": s[idx + 1],
                         "delta_s_m": d[idx]})
