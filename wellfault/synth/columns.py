"""Invented and real-curve reference columns for the forward model: lithology curves, unit
kinds, type logs."""

from __future__ import annotations

import math
from collections.abc import Iterable

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError
from ..geo.column import ReferenceColumn

__all__ = ["synthetic_column", "column_from_real_curve", "LITHOLOGY_CURVES"]


# ---------------------------------------------------------------------------------- columns
#: Curves :func:`synthetic_column` can draw from its lithologies.
LITHOLOGY_CURVES = ("GR", "RHOB", "NPHI", "DT")


# Typical responses by lithology (common practice, from memory: shale GR 80-150 API, clean sand
# 20-60, limestone 10-40, coal low GR and density ~1.3-1.5 g/cm3, hot shale GR > 150).
_LITH = {
    #            GR    sdGR  RHOB  NPHI  DT
    "shale":    (108., 12., 2.48, 0.30, 95.),
    "silt":     (78., 10., 2.42, 0.22, 85.),
    "sand":     (38., 8., 2.30, 0.17, 78.),
    "lime":     (22., 6., 2.66, 0.05, 55.),
    "coal":     (32., 6., 1.45, 0.45, 125.),
    "hot":      (185., 20., 2.40, 0.32, 105.),
}


_UNIT_KINDS = {
    # kind: (lithology mixture, suffix of the name)
    "shale": ({"shale": 0.8, "silt": 0.2}, "Shale"),
    "sand": ({"sand": 0.75, "silt": 0.15, "shale": 0.10}, "Sandstone"),
    "hetero": ({"sand": 0.35, "silt": 0.35, "shale": 0.30}, "Formation"),
    "lime": ({"lime": 0.75, "shale": 0.25}, "Limestone"),
    "coal": ({"shale": 0.45, "silt": 0.25, "sand": 0.2, "coal": 0.1}, "Coal Measures"),
}


# Invented formation-name roots (made-up words).
_ROOTS = (
    "Arvel", "Brennoch", "Cadrow", "Dunvair", "Elsk", "Farrow", "Gelmoor", "Hallin", "Istrow",
    "Jarnock", "Kelvor", "Loskey", "Marrin", "Nethby", "Orrach", "Pellow", "Quarnby", "Rusk",
    "Selvane", "Tarrick", "Ulvar", "Vennick", "Wystan", "Yarrow",
)


def _smooth(v: NDArray[np.float64], sigma_samples: float) -> NDArray[np.float64]:
    if sigma_samples <= 0:
        return v
    from scipy.ndimage import gaussian_filter1d

    return gaussian_filter1d(v, sigma_samples, mode="nearest")


def synthetic_column(
    n_units: int = 14,
    *,
    seed: int | None = 0,
    ds: float = 0.1524,
    curves: Iterable[str] = ("GR",),
    thickness_range_m: tuple[float, float] = (10.0, 80.0),
    resolution_m: float = 0.5,
    pad_m: float = 0.0,
    name: str = "synthetic column",
) -> ReferenceColumn:
    """Invent a reference column with lithology-like type-log curves.

    Each unit has a character (shale, sandstone, heterolithic, limestone, coal measures) and is
    built from beds 0.3-6 m thick whose lithologies are drawn from that character; each bed's
    GR is the lithology's typical level plus a random offset, with a random-walk texture, a few
    thin high-GR "hot shale" markers at unit tops and fining/coarsening ramps in sands. The
    curves are smoothed to a tool resolution (Gaussian, ``resolution_m`` ≈ GR vertical
    resolution, reference/methods.md section 8: ~0.3-0.5 m).

    Parameters
    ----------
    n_units : int
        Number of units (2-24).
    seed : int, optional
        Random seed; the same seed gives the same column.
    ds : float
        Type-log step. [m]
    curves : iterable of str
        Any of :data:`LITHOLOGY_CURVES`.
    thickness_range_m : (float, float)
        Range of unit thicknesses. [m]
    resolution_m : float
        Vertical resolution the curves are smoothed to. [m]
    pad_m : float
        Extra type log above the top surface (shaly overburden, negative s) and below the base
        (underburden), so wells logged from above the first surface read a textured log. [m]

    Returns
    -------
    ReferenceColumn
        Surfaces at s = 0 ... with a defined base, and a type log on ``s = k * ds`` covering
        ``[-pad_m, base + pad_m]``.
    """
    curves = tuple(curves)
    bad = [c for c in curves if c not in LITHOLOGY_CURVES]
    if bad:
        raise InputError(f"synthetic_column cannot draw curve(s) {bad}; choose from "
                         f"{', '.join(LITHOLOGY_CURVES)}")
    if not 2 <= int(n_units) <= len(_ROOTS):
        raise InputError(f"n_units must be between 2 and {len(_ROOTS)} (got {n_units})")
    lo_t, hi_t = (float(v) for v in thickness_range_m)
    if not (0 < lo_t <= hi_t):
        raise InputError(f"thickness_range_m must be 0 < low <= high (got {thickness_range_m})")
    if not ds > 0:
        raise InputError(f"ds must be positive (got {ds})")
    if not pad_m >= 0:
        raise InputError(f"pad_m must be zero or positive (got {pad_m})")
    n_units = int(n_units)
    rng = np.random.default_rng(seed)
    roots = rng.permutation(len(_ROOTS))[:n_units]
    kinds_cycle = ["shale", "sand", "hetero", "shale", "lime", "sand", "coal", "shale", "hetero"]
    start = int(rng.integers(len(kinds_cycle)))
    kinds = [kinds_cycle[(start + i) % len(kinds_cycle)] for i in range(n_units)]
    th = np.round(rng.uniform(lo_t, hi_t, n_units), 1)
    s_top = np.concatenate([[0.0], np.cumsum(th)[:-1]])
    base = float(np.sum(th))
    names = [f"{_ROOTS[r]} {_UNIT_KINDS[k][1]}" for r, k in zip(roots, kinds)]

    k0 = -int(math.floor(pad_m / ds + 1e-9))
    k1 = int(math.floor((base + pad_m) / ds + 1e-9))
    grid = np.arange(k0, k1 + 1) * ds
    nk = grid.size
    lith_idx = np.empty(nk, dtype=object)
    gr = np.empty(nk)
    # pseudo-units for the pads: shaly overburden above, heterolithic underburden below
    seg_top = np.concatenate([[grid[0]], s_top, [base]])
    seg_kind = ["shale", *kinds, "hetero"]
    for u in range(n_units + 2):
        u_top = float(seg_top[u])
        u_base = float(seg_top[u + 1]) if u < n_units + 1 else float(grid[-1]) + ds
        if u_base <= u_top:
            continue
        kind = seg_kind[u]
        mix, _ = _UNIT_KINDS[kind]
        liths, probs = list(mix), np.array(list(mix.values()))
        z = u_top
        bed_tops, bed_liths = [], []
        while z < u_base:
            bed_tops.append(z)
            bed_liths.append(liths[int(rng.choice(len(liths), p=probs / probs.sum()))])
            z += float(rng.uniform(0.3, 6.0))
        idx_unit = np.flatnonzero((grid >= u_top - 1e-9) & (grid < u_base - 1e-9))
        if idx_unit.size == 0:
            continue
        bt = np.asarray(bed_tops)
        which = np.clip(np.searchsorted(bt, grid[idx_unit], side="right") - 1, 0, len(bt) - 1)
        for b in range(len(bt)):
            sel = idx_unit[which == b]
            if sel.size == 0:
                continue
            lith = bed_liths[min(b, len(bed_liths) - 1)]
            mean, sd = _LITH[lith][0], _LITH[lith][1]
            level = mean + rng.normal(0.0, sd)
            if lith == "sand" and rng.random() < 0.5:  # fining- or coarsening-upward ramp
                ramp = np.linspace(-1.0, 1.0, sel.size) * rng.choice([-1.0, 1.0]) * 12.0
            else:
                ramp = 0.0
            gr[sel] = level + ramp
            lith_idx[sel] = lith
        if 0 < u <= n_units and (u % 3 == 2 or kind == "shale"):  # thin hot-shale markers
            m_top = u_top + float(rng.uniform(0.2, 1.0))
            sel = idx_unit[(grid[idx_unit] >= m_top)
                           & (grid[idx_unit] < m_top + float(rng.uniform(0.6, 1.5)))]
            gr[sel] = _LITH["hot"][0] + rng.normal(0.0, _LITH["hot"][1])
            lith_idx[sel] = "hot"
    walk = np.cumsum(rng.normal(0.0, 1.0, nk))
    walk = walk - _smooth(walk, 3.0 / ds)  # keep only the short-wavelength texture
    gr = gr + 4.0 * walk / max(np.std(walk), 1e-9)
    sig = resolution_m / ds / 2.0
    data: dict[str, NDArray[np.float64]] = {}
    for c in curves:
        if c == "GR":
            data[c] = np.clip(_smooth(gr, sig), 5.0, 300.0)
            continue
        col = LITHOLOGY_CURVES.index(c) + 1  # RHOB 2, NPHI 3, DT 4 in the _LITH tuples
        base_vals = np.array([_LITH[lith][col] for lith in lith_idx])
        scale = {"RHOB": 0.03, "NPHI": 0.02, "DT": 3.0}[c]
        data[c] = _smooth(base_vals + scale * rng.normal(0.0, 1.0, nk), sig)
    type_log = pd.DataFrame(data, index=pd.Index(grid, name="s_m")) if curves else None
    return ReferenceColumn(names, s_top, base_s_m=base, type_log=type_log, name=name)


def column_from_real_curve(
    values: ArrayLike,
    ds: float,
    *,
    surfaces_every_m: float = 50.0,
    name_prefix: str = "R",
    curve: str = "GR",
    snap: bool = True,
    name: str = "column from a real curve",
) -> ReferenceColumn:
    """Build a reference column whose type log is a real curve (e.g. a measured gamma ray).

    Parameters
    ----------
    values : array_like
        Curve samples on a regular step ``ds`` taken as stratigraphic (TST) spacing, top down.
        Leading and trailing nulls (NaN) are dropped; inner gaps are filled linearly.
    ds : float
        Sample step. [m]
    surfaces_every_m : float
        Nominal spacing of the invented surfaces ``<prefix>01, <prefix>02, ...``. [m]
    snap : bool
        Move each surface (except the first, at s = 0) to the strongest change of the
        smoothed curve within a quarter spacing of its nominal place, as a geologist picks on
        log breaks.

    Returns
    -------
    ReferenceColumn with a defined base at the last sample and the type log on ``s = k * ds``.
    """
    v = np.asarray(values, dtype=float).reshape(-1)
    ds = float(ds)
    if not ds > 0:
        raise InputError(f"ds must be positive (got {ds})")
    good = np.flatnonzero(np.isfinite(v))
    if good.size < 2:
        raise InputError("the curve has fewer than two valid samples; give a real log")
    v = v[good[0]:good[-1] + 1]
    bad = ~np.isfinite(v)
    if bad.any():
        x = np.arange(v.size)
        v = v.copy()
        v[bad] = np.interp(x[bad], x[~bad], v[~bad])
    grid = np.arange(v.size) * ds
    base = float(grid[-1])
    every = float(surfaces_every_m)
    if not every > 0:
        raise InputError(f"surfaces_every_m must be positive (got {surfaces_every_m})")
    nominal = np.arange(0.0, base - 0.5 * every + 1e-9, every)
    if nominal.size == 0:
        nominal = np.array([0.0])
    s = nominal.copy()
    if snap and nominal.size > 1:
        grad = np.abs(np.gradient(_smooth(v, 0.5 / ds)))
        for i in range(1, nominal.size):
            lo = int(np.ceil((nominal[i] - every / 4) / ds))
            hi = int(np.floor((nominal[i] + every / 4) / ds))
            lo, hi = max(lo, 1), min(hi, v.size - 2)
            if hi > lo:
                s[i] = grid[lo + int(np.argmax(grad[lo:hi + 1]))]
    s = np.unique(np.round(s / ds) * ds)
    width = max(2, len(str(s.size)))
    names = [f"{name_prefix}{i + 1:0{width}d}" for i in range(s.size)]
    type_log = pd.DataFrame({curve: v}, index=pd.Index(grid, name="s_m"))
    return ReferenceColumn(names, s, base_s_m=base if base > s[-1] else math.nan,
                           type_log=type_log, name=name)
