"""Fault cuts assembled into faults: robust plane fits through the cuts of a field.

Every fault cut found in a field is a point on some fault surface: the cut's position (x, y,
TVDSS), known only within its bracket (the MD interval the evidence places it in — for tops,
the interval between two picks). Cuts that lie on one plane, across several wells, are one
fault. :func:`fit_faults` finds those planes:

1. **Possible unconformities first.** Missing section at one stratigraphic level in many wells
   (the same column surface inside the bracket of missing-section cuts in at least
   ``unconformity_min_wells`` wells, and in at least ``unconformity_fraction`` of the wells that
   drilled across that level when those counts are given) that no fault plane explains (the
   fault search below, run on those cuts alone, holds fewer than half of them) is flagged
   ``possible unconformity``, not fitted as a fault: erosion removes section at one
   stratigraphic level wherever it reached, a fault removes it along a plane that cuts the beds.
2. **Locally sampled RANSAC** (Fischler & Bolles 1981; neighbourhood sampling after
   Myatt et al. 2002, "NAPSAC"): every cut is a seed; planes through the seed and pairs of its
   nearest cuts in other wells are hypotheses; a hypothesis is scored on the cuts within
   ``radius_m`` by how many it explains — a cut is explained when the plane crosses the
   well inside its bracket, widened by ``tolerance_m`` — with an MSAC cost (Torr & Zisserman
   2000) to break ties. Planes flatter than ``min_dip_deg`` or within
   ``min_bedding_angle_deg`` of bedding are not faults and are not hypotheses.
3. **Refinement and growth.** The best hypothesis is refined by weighted total least squares
   (the plane minimising Σ wᵢ (m·(Pᵢ − c))², wᵢ = 1/σᵢ², σᵢ² = (m·hᵢ)²/3 + σ₀² for a cut
   uniformly placed along its half-bracket hᵢ), re-collecting the explained cuts among all
   cuts not yet assigned and keeping those connected to the seed (gaps under ``max_gap_m``),
   until the set is stable. A plane with at least ``min_cuts`` cuts in ``min_wells`` wells is
   a fault; its cuts leave the pool and the search repeats. Cuts left over fit no fault.
4. **Uncertainty.** The refined fit is repeated on ``bootstrap`` resamples of the fault's cuts
   (Efron & Tibshirani 1993); the standard deviations of dip and dip azimuth are reported.

Everything random is drawn from ``numpy.random.default_rng(seed)``: the same cuts and options
give the same faults. Lengths in metres, angles in degrees, planes as dip / dip azimuth with the
right-hand-rule strike = dip azimuth − 90 (DESIGN.md §2).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from numpy.typing import NDArray
from scipy.sparse import coo_matrix
from scipy.sparse.csgraph import connected_components
from scipy.spatial import cKDTree

from ..geo.column import ReferenceColumn
from ..errors import InputError
from ..geo.geometry import bed_normal
from ..evidence.measure import FaultPlane

__all__ = ["FaultFitOptions", "FaultFit", "FaultMap", "fit_faults", "plane_attitude",
           "FAULT_COLUMNS", "PROFILE_COLUMNS", "FIT_LABELS", "BRACKET_COLUMNS"]

#: ``fault_fit`` labels of a cut.
FIT_LABELS = ("fault", "no fault", "possible unconformity", "no position")
#: Bracket-end positions a cut table may carry (metres); without them a cut is a point.
BRACKET_COLUMNS = ("x_top_m", "y_top_m", "tvdss_top_m", "x_base_m", "y_base_m", "tvdss_base_m")
#: Columns of the fault table (lengths in metres).
FAULT_COLUMNS = ("fault_id", "kind", "n_cuts", "n_wells", "strike_deg", "dip_deg",
                 "dip_azimuth_deg", "dip_sd_deg", "azimuth_sd_deg", "sense", "vs_mean_m",
                 "vs_min_m", "vs_max_m", "throw_mean_m", "rms_m", "x_m", "y_m", "tvdss_m",
                 "length_m", "level", "wells")
#: Columns of the vertical-separation-along-strike table.
PROFILE_COLUMNS = ("fault_id", "well", "along_strike_m", "vertical_separation_m", "tvdss_m",
                   "section", "fault_type")


@dataclass(frozen=True)
class FaultFitOptions:
    """Settings of :func:`fit_faults` (lengths in metres, angles in degrees)."""

    min_cuts: int = 4
    min_wells: int = 3
    tolerance_m: float = 20.0
    position_sd_m: float = 10.0
    neighbours: int = 8
    radius_m: float = 3000.0
    max_gap_m: float = 3000.0
    min_dip_deg: float = 20.0
    min_bedding_angle_deg: float = 15.0
    bootstrap: int = 100
    seed: int = 0
    unconformity_min_wells: int = 5
    unconformity_fraction: float = 0.5
    max_refinements: int = 12

    def __post_init__(self):
        if self.min_cuts < 3:
            raise InputError(f"min_cuts must be at least 3 (three points always lie on a "
                             f"plane; got {self.min_cuts})")
        if self.min_wells < 1 or self.tolerance_m < 0 or self.position_sd_m <= 0:
            raise InputError("min_wells >= 1, tolerance_m >= 0 and position_sd_m > 0 please")


@dataclass
class FaultFit:
    """One fitted fault: plane, uncertainty and member cuts (row positions in the cut table)."""

    fault_id: str
    kind: str  # "fault" | "possible unconformity"
    normal: NDArray[np.float64]  # upward unit normal (into the hanging wall)
    centre: NDArray[np.float64]  # (x, y, tvdss) [m]
    dip_deg: float
    dip_azimuth_deg: float
    dip_sd_deg: float
    azimuth_sd_deg: float
    rms_m: float
    members: NDArray[np.int64]
    level: str = ""  # possible unconformity: the unit whose section is missing

    @property
    def strike_deg(self) -> float:
        return (self.dip_azimuth_deg - 90.0) % 360.0

    def plane(self) -> FaultPlane:
        return FaultPlane(self.fault_id, self.dip_deg, self.dip_azimuth_deg,
                          float(self.centre[0]), float(self.centre[1]), float(self.centre[2]))


@dataclass
class FaultMap:
    """What :func:`fit_faults` returns.

    ``fault_id`` and ``fit`` are aligned with the rows of the cut table given (``""`` where a
    cut belongs to no fault); ``fits`` holds the faults and possible unconformities.
    """

    fits: list[FaultFit]
    fault_id: NDArray[np.object_]
    fit: NDArray[np.object_]
    options: FaultFitOptions = field(default_factory=FaultFitOptions)

    @property
    def faults(self) -> list[FaultFit]:
        return [f for f in self.fits if f.kind == "fault"]

    def planes(self) -> tuple[FaultPlane, ...]:
        """The fitted faults as :class:`~wellfault.evidence.measure.FaultPlane` (for re-measuring)."""
        return tuple(f.plane() for f in self.faults)

    def tables(self, cuts: pd.DataFrame) -> tuple[pd.DataFrame, pd.DataFrame]:
        """(fault table, vertical separation along strike) from the cut table (metres).

        ``cuts`` must be the table the map was fitted on, or the same cuts re-measured with the
        fitted planes (same rows, same order): sense and throw are read from it.
        """
        rows, prof = [], []
        for f in self.fits:
            sub = cuts.iloc[f.members]
            pts = _points(sub)
            vs = sub["vertical_separation_m"].to_numpy(float)
            strike = math.radians(f.strike_deg)
            s_hat = np.array([math.sin(strike), math.cos(strike), 0.0])
            along = (pts - f.centre) @ s_hat
            types = sub["fault_type"].astype(str)
            counts = types[types != "undetermined"].value_counts()
            if f.kind != "fault":
                sense = "missing section"
            elif len(counts) == 0:
                sense = "undetermined"
            elif len(counts) > 1 and counts.iloc[0] == counts.iloc[1]:
                sense = "mixed"
            else:
                sense = str(counts.index[0])
            throw = sub["throw_m"].to_numpy(float) if "throw_m" in sub else np.full(len(sub),
                                                                                    np.nan)
            wells = sorted(set(sub["well"].astype(str)))
            rows.append({
                "fault_id": f.fault_id, "kind": f.kind, "n_cuts": int(len(sub)),
                "n_wells": len(wells), "strike_deg": f.strike_deg, "dip_deg": f.dip_deg,
                "dip_azimuth_deg": f.dip_azimuth_deg, "dip_sd_deg": f.dip_sd_deg,
                "azimuth_sd_deg": f.azimuth_sd_deg, "sense": sense,
                "vs_mean_m": float(np.nanmean(vs)) if np.isfinite(vs).any() else math.nan,
                "vs_min_m": float(np.nanmin(vs)) if np.isfinite(vs).any() else math.nan,
                "vs_max_m": float(np.nanmax(vs)) if np.isfinite(vs).any() else math.nan,
                "throw_mean_m": float(np.nanmean(throw)) if np.isfinite(throw).any()
                else math.nan,
                "rms_m": f.rms_m, "x_m": float(f.centre[0]), "y_m": float(f.centre[1]),
                "tvdss_m": float(f.centre[2]),
                "length_m": float(np.ptp(along)) if len(along) else 0.0,
                "level": f.level, "wells": ";".join(wells),
            })
            for k in range(len(sub)):
                prof.append({"fault_id": f.fault_id, "well": str(sub["well"].iloc[k]),
                             "along_strike_m": float(along[k]),
                             "vertical_separation_m": float(vs[k]),
                             "tvdss_m": float(pts[k, 2]), "section": str(sub["section"].iloc[k]),
                             "fault_type": str(sub["fault_type"].iloc[k])})
        faults = pd.DataFrame(rows, columns=list(FAULT_COLUMNS))
        profiles = pd.DataFrame(prof, columns=list(PROFILE_COLUMNS))
        if len(profiles):
            profiles = profiles.sort_values(["fault_id", "along_strike_m", "well"],
                                            kind="stable").reset_index(drop=True)
        return faults, profiles


# ------------------------------------------------------------------------------- geometry
def plane_attitude(normal) -> tuple[float, float]:
    """(dip, dip azimuth) [°] of a plane from any normal (DESIGN.md §2 convention).

    The upward normal m = (sin θ sin β, sin θ cos β, −cos θ): θ = arccos(−m_z),
    β = atan2(m_x, m_y).

    >>> [round(v, 6) for v in plane_attitude([math.sin(math.radians(60)), 0.0,
    ...                                        -math.cos(math.radians(60))])]
    [60.0, 90.0]
    """
    m = np.asarray(normal, dtype=float)
    m = m / np.linalg.norm(m)
    if m[2] > 0:
        m = -m
    dip = math.degrees(math.acos(min(1.0, max(-1.0, -float(m[2])))))
    azi = math.degrees(math.atan2(float(m[0]), float(m[1]))) % 360.0
    if dip < 1e-9:
        azi = 0.0
    return dip, azi


def _up(n: NDArray[np.float64]) -> NDArray[np.float64]:
    n = n / np.linalg.norm(n, axis=-1, keepdims=True)
    return np.where(n[..., 2:3] > 0, -n, n)


def _points(cuts: pd.DataFrame) -> NDArray[np.float64]:
    """Mid-bracket points (x, y, tvdss) of the cuts; the cut point without bracket columns."""
    if all(c in cuts.columns for c in BRACKET_COLUMNS):
        a = cuts[list(BRACKET_COLUMNS[:3])].to_numpy(float)
        b = cuts[list(BRACKET_COLUMNS[3:])].to_numpy(float)
        mid = 0.5 * (a + b)
        ok = np.all(np.isfinite(mid), axis=1)
        if ok.all():
            return mid
        pt = cuts[["x_m", "y_m", "tvdss_m"]].to_numpy(float)
        return np.where(ok[:, None], mid, pt)
    return cuts[["x_m", "y_m", "tvdss_m"]].to_numpy(float)


def _half_brackets(cuts: pd.DataFrame) -> NDArray[np.float64]:
    if all(c in cuts.columns for c in BRACKET_COLUMNS):
        a = cuts[list(BRACKET_COLUMNS[:3])].to_numpy(float)
        b = cuts[list(BRACKET_COLUMNS[3:])].to_numpy(float)
        h = 0.5 * (b - a)
        return np.where(np.isfinite(h), h, 0.0)
    return np.zeros((len(cuts), 3))


def _weighted_plane(p, h, n0, sd0, iterations=6):
    """Weighted total-least-squares plane (upward normal, centre, rms) from start normal n0."""
    n = n0
    c = p.mean(axis=0)
    for _ in range(iterations):
        w = 1.0 / ((h @ n) ** 2 / 3.0 + sd0 ** 2)
        c = (w[:, None] * p).sum(axis=0) / w.sum()
        d = p - c
        scatter = (w[:, None] * d).T @ d
        vals, vecs = np.linalg.eigh(scatter)
        n_new = _up(vecs[:, 0])
        done = float(np.max(np.abs(n_new - n))) < 1e-10
        n = n_new
        if done:
            break
    e = (p - c) @ n
    rms = float(np.sqrt(np.mean(e ** 2))) if len(e) else 0.0  # mid-bracket residuals
    return n, c, rms


# ------------------------------------------------------------------------------- fitting
def fit_faults(
    cuts: pd.DataFrame,
    *,
    options: FaultFitOptions = FaultFitOptions(),
    column: ReferenceColumn | None = None,
    crossing_counts: dict[int, int] | None = None,
) -> FaultMap:
    """Group a field's cuts into faults with robust plane fits (see the module docstring).

    Parameters
    ----------
    cuts : DataFrame
        Cut table in metres (``wellfault.evidence.results.CUT_COLUMNS("m")``), optionally with the
        bracket-end positions :data:`BRACKET_COLUMNS`.
    options : FaultFitOptions
    column : ReferenceColumn, optional
        Needed to find missing section at one stratigraphic level (possible unconformities).
    crossing_counts : dict, optional
        {column surface index: number of wells whose picks bracket that surface}: the wells
        that could have shown missing section there.

    Returns
    -------
    FaultMap
    """
    o = options
    n_all = len(cuts)
    fault_id = np.array([""] * n_all, dtype=object)
    fit = np.array(["no fault"] * n_all, dtype=object)
    fits: list[FaultFit] = []
    if n_all == 0:
        return FaultMap(fits, fault_id, fit, o)
    pts = _points(cuts)
    hb = _half_brackets(cuts)
    placed = np.all(np.isfinite(pts), axis=1)
    fit[~placed] = "no position"
    wells = pd.factorize(cuts["well"].astype(str))[0]
    bed_n = bed_normal(np.nan_to_num(cuts["bed_dip_deg"].to_numpy(float)),
                       np.nan_to_num(cuts["bed_dip_azimuth_deg"].to_numpy(float)))
    bed_n = np.asarray(bed_n, dtype=float).reshape(n_all, 3)
    rng = np.random.default_rng(o.seed)
    free = placed.copy()
    # direction of drilling through each bracket (top -> base) and the signed jump: under a
    # hypothesis plane they give each cut's separation sense (normal when c·Δs > 0, c = +1
    # crossing hanging wall -> footwall, DESIGN.md §3); one fault has one sense
    chord = 2.0 * hb
    size = np.linalg.norm(chord, axis=1)
    tan = np.where(size[:, None] > 1e-6, chord / np.where(size > 1e-6, size, 1.0)[:, None], 0.0)
    ds = np.nan_to_num(cuts["delta_s_m"].to_numpy(float)) if "delta_s_m" in cuts else \
        np.zeros(n_all)
    data = _Data(pts, hb, wells, bed_n, tan, ds)

    # -- 1. possible unconformities
    if column is not None:
        for uf in _unconformities(cuts, pts, hb, wells, bed_n, free, column, crossing_counts, o):
            uf.fault_id = f"U{sum(1 for f in fits if f.kind != 'fault') + 1:02d}"
            fits.append(uf)
            fault_id[uf.members] = uf.fault_id
            fit[uf.members] = "possible unconformity"
            free[uf.members] = False

    # -- 2./3. sequential, locally sampled RANSAC with refinement
    idx_free = np.flatnonzero(free)
    if idx_free.size >= o.min_cuts:
        tree = cKDTree(pts[idx_free])
        local = tree.query_ball_point(pts[idx_free], r=o.radius_m)
        local = [idx_free[np.asarray(lst, dtype=np.int64)] for lst in local]
        seed_of = {int(g): k for k, g in enumerate(idx_free)}
        best: list = [None] * idx_free.size
        score = np.full(idx_free.size, -1, dtype=np.int64)
        cost = np.full(idx_free.size, np.inf)
        dirty = np.ones(idx_free.size, dtype=bool)
        n_fault = 0
        while True:
            for k in np.flatnonzero(dirty):
                g = idx_free[k]
                best[k] = _seed_hypothesis(g, local[k], data, free, o) if free[g] else None
                score[k] = -1 if best[k] is None else best[k][0]
                cost[k] = np.inf if best[k] is None else best[k][1]
            dirty[:] = False
            if score.size == 0 or score.max() < o.min_cuts:
                break
            k = int(np.lexsort((cost, -score))[0])
            g = int(idx_free[k])
            members, n, c, rms = _grow(g, best[k][2], data, free, o)
            if members is None:
                score[k] = -1  # this seed leads to no fault
                continue
            n_fault += 1
            fid = f"F{n_fault:03d}"
            dip, azi = plane_attitude(n)
            dsd, asd = _bootstrap(pts[members], hb[members], n, o, rng)
            fits.append(FaultFit(fid, "fault", n, c, dip, azi, dsd, asd, rms,
                                 np.sort(members)))
            fault_id[members] = fid
            fit[members] = "fault"
            free[members] = False
            touched = np.zeros(n_all, dtype=bool)
            touched[members] = True
            for kk in np.flatnonzero(score >= 0):
                if touched[local[kk]].any():
                    dirty[kk] = True
            for gm in members:
                if int(gm) in seed_of:
                    kk = seed_of[int(gm)]
                    score[kk], cost[kk], dirty[kk] = -1, np.inf, False
    return FaultMap(fits, fault_id, fit, o)


def _valid_normals(n, bed, o: FaultFitOptions) -> NDArray[np.bool_]:
    dip = np.degrees(np.arccos(np.clip(-n[..., 2], -1.0, 1.0)))
    cosang = np.abs(np.sum(n * bed, axis=-1))
    bed_angle = np.degrees(np.arccos(np.clip(cosang, -1.0, 1.0)))
    return (dip >= o.min_dip_deg) & (bed_angle >= o.min_bedding_angle_deg)


def _explained(e, hn, o: FaultFitOptions):
    return np.abs(e) <= np.abs(hn) + o.tolerance_m


@dataclass
class _Data:
    pts: NDArray[np.float64]   # mid-bracket points (x, y, tvdss)
    hb: NDArray[np.float64]    # half-bracket vectors
    wells: NDArray[np.int64]   # well codes
    bed_n: NDArray[np.float64]  # bed normals
    tan: NDArray[np.float64]   # unit drilling direction through the bracket (0 if unknown)
    ds: NDArray[np.float64]    # signed stratigraphic jump Δs


def _senses(data: _Data, idx, n) -> NDArray[np.int64]:
    """Separation sense of cuts ``idx`` under plane normal(s) ``n``: +1 normal, -1 reverse,
    0 unknown (no bracket direction, no jump, or the well along the plane). Shape (L, H)."""
    n2 = np.atleast_2d(n)
    tm = data.tan[idx] @ n2.T
    crossing = np.where(np.abs(tm) > 0.02, -np.sign(tm), 0.0)  # t·m < 0: hanging -> foot
    return np.sign(crossing * data.ds[idx][:, None]).astype(np.int64)


def _majority(inl, sense):
    """Per column: inliers of the majority sense (unknown senses count with either)."""
    pos = (inl & (sense > 0)).sum(axis=0)
    neg = (inl & (sense < 0)).sum(axis=0)
    major = np.where(pos >= neg, 1, -1)
    keep = inl & ((sense == 0) | (sense == major[None, :]))
    return keep, major


def _seed_hypothesis(g, loc, data: _Data, free, o: FaultFitOptions):
    """Best plane through cut g and two nearby cuts of other wells: (count, cost, normal).

    A cut counts for a plane when the plane crosses its bracket (± tolerance) and gives it
    the plane's majority separation sense."""
    pts, wells = data.pts, data.wells
    loc = loc[free[loc]]
    others = loc[wells[loc] != wells[g]]
    if others.size < 2:
        return None
    d = np.linalg.norm(pts[others] - pts[g], axis=1)
    nb = others[np.argsort(d, kind="stable")[: o.neighbours]]
    j, k = np.triu_indices(nb.size, 1)
    j, k = nb[j], nb[k]
    keep = wells[j] != wells[k]
    j, k = j[keep], k[keep]
    if j.size == 0:
        return None
    a, b = pts[j] - pts[g], pts[k] - pts[g]
    cr = np.cross(a, b)
    size = np.linalg.norm(cr, axis=1)
    ok = size > math.sin(math.radians(5.0)) * np.linalg.norm(a, axis=1) * \
        np.linalg.norm(b, axis=1)
    if not ok.any():
        return None
    n = _up(cr[ok])
    ok2 = _valid_normals(n, data.bed_n[g], o)
    if not ok2.any():
        return None
    n = n[ok2]
    e = (pts[loc] - pts[g]) @ n.T  # (L, H)
    hn = data.hb[loc] @ n.T
    inl, _major = _majority(_explained(e, hn, o), _senses(data, loc, n))
    excess = np.maximum(np.abs(e) - np.abs(hn), 0.0)
    cost = np.minimum(excess, o.tolerance_m) ** 2
    cost = np.where(inl, cost, o.tolerance_m ** 2).sum(axis=0)
    count = inl.sum(axis=0)
    order = np.lexsort((cost, -count))
    h = int(order[0])
    return int(count[h]), float(cost[h]), n[h]


def _component(cand, pts, seed, o: FaultFitOptions):
    """Members of ``cand`` connected to ``seed`` (or the largest group) by gaps < max_gap_m."""
    if cand.size <= 1:
        return cand
    tree = cKDTree(pts[cand])
    pairs = tree.query_pairs(o.max_gap_m, output_type="ndarray")
    graph = coo_matrix((np.ones(len(pairs)), (pairs[:, 0], pairs[:, 1])),
                       shape=(cand.size, cand.size)) if len(pairs) else \
        coo_matrix((cand.size, cand.size))
    _n, label = connected_components(graph, directed=False)
    where = np.flatnonzero(cand == seed)
    if where.size:
        lab = label[where[0]]
    else:
        lab = np.bincount(label).argmax()
    return cand[label == lab]


def _grow(g, n, data: _Data, free, o: FaultFitOptions):
    """Refine a hypothesis through seed g: (members, normal, centre, rms) or Nones."""
    pts, hb = data.pts, data.hb
    pool = np.flatnonzero(free)
    c = pts[g]
    members = None
    for _ in range(o.max_refinements):
        e = (pts[pool] - c) @ n
        inl = _explained(e, hb[pool] @ n, o)[:, None]
        inl, _major = _majority(inl, _senses(data, pool, n))
        cand = _component(pool[inl[:, 0]], pts, g, o)
        if cand.size < 3:
            return None, None, None, None
        n_new, c_new, _rms = _weighted_plane(pts[cand], hb[cand], n, o.position_sd_m)
        same = members is not None and members.size == cand.size and np.array_equal(
            members, cand)
        members, n, c = cand, n_new, c_new
        if same:
            break
    n, c, rms = _weighted_plane(pts[members], hb[members], n, o.position_sd_m)
    bed = data.bed_n[members].mean(axis=0)
    bed = bed / np.linalg.norm(bed)
    if (members.size < o.min_cuts or np.unique(data.wells[members]).size < o.min_wells
            or not bool(_valid_normals(n[None, :], bed, o)[0])):
        return None, None, None, None
    return members, n, c, rms


def _bootstrap(p, h, n0, o: FaultFitOptions, rng) -> tuple[float, float]:
    if o.bootstrap <= 1 or len(p) < 4:
        return math.nan, math.nan
    dip0, azi0 = plane_attitude(n0)
    dips, azis = [], []
    for _ in range(o.bootstrap):
        k = rng.integers(0, len(p), len(p))
        if np.linalg.matrix_rank(p[k] - p[k].mean(axis=0), tol=1e-6) < 2:
            continue
        n, _c, _r = _weighted_plane(p[k], h[k], n0, o.position_sd_m, iterations=3)
        d, a = plane_attitude(n)
        dips.append(d)
        azis.append((a - azi0 + 180.0) % 360.0 - 180.0)
    if len(dips) < 2:
        return math.nan, math.nan
    return float(np.std(dips, ddof=1)), float(np.std(azis, ddof=1))


def _unconformities(cuts, pts, hb, wells, bed_n, free, column, crossing_counts,
                    o: FaultFitOptions) -> list[FaultFit]:
    """Missing section at one stratigraphic level in many wells, not on one fault plane.

    Levels are the column's surfaces: a missing-section cut is at level j when surface j lies
    inside the interval its picks bracket. The most populated level first: enough wells, a large
    enough share of the wells that crossed the level (when known), and no fault plane holding
    half of the cuts (a fault crossing many wells at one level, in a flat field, is a fault).
    """
    index = {n: i for i, n in enumerate(column.names)}
    ia = cuts["surface_above"].astype(str).map(index).to_numpy(dtype=float)
    ib = cuts["surface_below"].astype(str).map(index).to_numpy(dtype=float)
    missing = (cuts["section"].astype(str).to_numpy() == "missing") & np.isfinite(ia) & \
        np.isfinite(ib) & free
    lo, hi = np.fmin(ia, ib), np.fmax(ia, ib)
    out: list[FaultFit] = []
    used = np.zeros(len(cuts), dtype=bool)
    levels = []
    for j in range(1, len(column)):
        sel = missing & (lo < j) & (j <= hi)
        levels.append((np.unique(wells[sel]).size, j))
    plain = dataclasses.replace(o, bootstrap=0)
    for _count, j in sorted(levels, key=lambda t: (-t[0], t[1])):
        sel = np.flatnonzero(missing & ~used & (lo < j) & (j <= hi))
        n_wells = np.unique(wells[sel]).size
        if n_wells < o.unconformity_min_wells:
            continue
        if crossing_counts is not None:
            crossed = crossing_counts.get(j, 0)
            if crossed <= 0 or n_wells / crossed < o.unconformity_fraction:
                continue
        sub = fit_faults(cuts.iloc[sel], options=plain)
        on_fault = sel[sub.fit == "fault"]
        if on_fault.size >= 0.5 * sel.size:
            continue  # mostly one or more fault planes: leave them to the fault fit
        members = np.setdiff1d(sel, on_fault)
        if np.unique(wells[members]).size < o.unconformity_min_wells:
            continue
        used[members] = True
        nb = bed_n[members].mean(axis=0)
        nb = nb / np.linalg.norm(nb)
        n = _up(-nb)
        c = pts[members].mean(axis=0)
        e = (pts[members] - c) @ nb
        dip, azi = plane_attitude(n)
        rms = float(np.sqrt(np.mean(e ** 2)))
        out.append(FaultFit("", "possible unconformity", n, c, dip, azi, math.nan, math.nan,
                            rms, np.sort(members),
                            level=f"{column.names[j - 1]} to {column.names[j]}"))
    return out
