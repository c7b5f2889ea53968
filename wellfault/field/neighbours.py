"""Neighbour-aware thickness: the local TST of each unit at a well, predicted from other wells.

Tops evidence compares the stratigraphic distance a well drilled between two picks with the
expected interval (DESIGN.md §4). Against the field's reference column the tolerance must cover
all natural thickness change across the field (about 15 %), which hides a partial missing
section of a few tens of percent of a unit. Field screening instead predicts each interval
from the wells around it ("the local thickness predicted from neighbouring wells", DESIGN.md §4),
which is far sharper, and tests the well against that with a tight tolerance.

The prediction, per unit of the column (the interval between two adjacent surfaces):

1. **Samples.** Every well whose consecutive picks are the unit's top and base, drilled in the
   direction that makes the interval positive (down-section top → base, or up-section base →
   top), gives one sample: its drilled TST between the picks (``n·ΔP``, the thickness tops
   evidence itself uses) at the mid-point of the two picks (x, y). A well that crosses the
   unit more than once gives the median, at the mean position.
2. **Regional trend.** A robust plane ``h = a + b·x + c·y`` (iteratively reweighted least
   squares with Tukey's biweight) removes the regional thickness trend, so that wells at the
   edge of the field are not biased by a one-sided neighbourhood.
3. **Leave-one-out, robust, spatial.** The residuals of the ``k`` nearest other wells
   (:class:`scipy.spatial.cKDTree`, the well itself always left out) are combined by an
   inverse-distance-weighted median (weights ``1/(d + d0)^p``), and added to the trend at the
   target: a single faulted neighbour cannot move a median.
4. **Outliers out.** Each sample is first predicted from all the others; a sample whose
   residual from that prediction exceeds ``outlier_k`` robust standard deviations
   (1.4826 × MAD of all residuals of the unit, floored) is an outlier — most likely a faulted
   or mis-picked interval — and is removed from the trend and from every neighbourhood.

An interval between two picks that are not adjacent surfaces (an unpicked or missing unit
between them) is the sum of the predicted units it spans, with the sign of the column order.

:attr:`NeighbourThickness.relative_scatter` reports, per unit, the robust relative scatter of
the leave-one-out residuals of the good samples: how well the neighbours predict a well. The
screening's automatic tolerance uses it (three scatters, at least 6 %).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray
from scipy.spatial import cKDTree

from ..geo.column import ReferenceColumn
from ..errors import InputError

__all__ = ["NeighbourThickness", "thickness_samples", "weighted_median_rows",
           "SAMPLE_COLUMNS"]

#: Columns of the per-(well, unit) sample table.
SAMPLE_COLUMNS = ("well", "unit", "thickness_m", "x_m", "y_m", "outlier", "loo_pred_m")


def weighted_median_rows(values: NDArray[np.float64], weights: NDArray[np.float64]
                         ) -> NDArray[np.float64]:
    """Weighted median of each row (NaN values and their weights ignored).

    The smallest value whose cumulative weight reaches half the row's total weight (the lower
    weighted median); NaN for a row without values.

    >>> weighted_median_rows(np.array([[1.0, 2.0, 10.0]]), np.array([[1.0, 1.0, 1.0]])).tolist()
    [2.0]
    """
    v = np.asarray(values, dtype=float)
    w = np.where(np.isfinite(v), np.asarray(weights, dtype=float), 0.0)
    v = np.where(np.isfinite(v), v, np.inf)
    order = np.argsort(v, axis=1, kind="stable")
    vs = np.take_along_axis(v, order, axis=1)
    ws = np.take_along_axis(w, order, axis=1)
    cum = np.cumsum(ws, axis=1)
    total = cum[:, -1:] if cum.shape[1] else np.zeros((len(v), 1))
    k = np.argmax(cum >= 0.5 * total - 1e-12 * np.abs(total), axis=1)
    out = vs[np.arange(len(v)), k] if v.shape[1] else np.full(len(v), np.nan)
    return np.where(total[:, 0] > 0, out, np.nan)


def thickness_samples(well: ArrayLike, idx_above: ArrayLike, idx_below: ArrayLike,
                      drilled_m: ArrayLike, x_m: ArrayLike, y_m: ArrayLike) -> pd.DataFrame:
    """Unit-thickness samples from consecutive-pick intervals of many wells.

    Parameters
    ----------
    well : array_like of int
        Well id of each interval (any integers; intervals of one well together or not).
    idx_above, idx_below : array_like of int
        Column indices of the upper (first in MD) and lower pick of each interval.
    drilled_m : array_like
        Signed stratigraphic distance drilled between the picks (``n·ΔP``). [m]
    x_m, y_m : array_like
        Mid-point of the interval. [m]

    Returns
    -------
    DataFrame
        ``well, unit, thickness_m, x_m, y_m``: one row per (well, unit) with adjacent picks and
        a positive interval (median thickness, mean position when a well gives several).
    """
    w = np.asarray(well, dtype=np.int64)
    a = np.asarray(idx_above, dtype=np.int64)
    b = np.asarray(idx_below, dtype=np.int64)
    d = np.asarray(drilled_m, dtype=float)
    x = np.asarray(x_m, dtype=float)
    y = np.asarray(y_m, dtype=float)
    step = b - a
    h = d * step
    ok = (np.abs(step) == 1) & np.isfinite(h) & (h > 0) & np.isfinite(x) & np.isfinite(y)
    df = pd.DataFrame({"well": w[ok], "unit": np.minimum(a, b)[ok], "thickness_m": h[ok],
                       "x_m": x[ok], "y_m": y[ok]})
    if len(df) == 0:
        return df
    dup = df.duplicated(["well", "unit"], keep=False)
    if dup.any():
        single = df[~dup]
        multi = df[dup].groupby(["well", "unit"], sort=False).agg(
            thickness_m=("thickness_m", "median"), x_m=("x_m", "mean"), y_m=("y_m", "mean"))
        df = pd.concat([single, multi.reset_index()], ignore_index=True)
    return df.sort_values(["unit", "well"], kind="stable").reset_index(drop=True)


def _robust_plane(x, y, h, *, iterations: int = 8) -> NDArray[np.float64]:
    """Coefficients (a, b, c) of h ≈ a + b·x + c·y, Tukey-biweight IRLS (x, y centred)."""
    n = h.size
    if n == 0:
        return np.array([np.nan, 0.0, 0.0])
    if n < 6:
        return np.array([float(np.median(h)), 0.0, 0.0])
    design = np.column_stack([np.ones(n), x, y])
    w = np.ones(n)
    coef = np.array([float(np.median(h)), 0.0, 0.0])
    for _ in range(iterations):
        sw = np.sqrt(w)
        try:
            coef, *_ = np.linalg.lstsq(design * sw[:, None], h * sw, rcond=None)
        except np.linalg.LinAlgError:  # pragma: no cover - lstsq is robust to rank loss
            break
        r = h - design @ coef
        s = 1.4826 * float(np.median(np.abs(r - np.median(r))))
        if s <= 1e-9:
            break
        u = r / (4.685 * s)
        w = np.where(np.abs(u) < 1, (1 - u ** 2) ** 2, 0.0)
        if w.sum() < 3:
            break
    return coef


@dataclass
class _Unit:
    tree: cKDTree | None
    well: NDArray[np.int64]
    resid: NDArray[np.float64]
    coef: NDArray[np.float64]
    centre: tuple[float, float]

    def trend(self, x, y):
        return self.coef[0] + self.coef[1] * (x - self.centre[0]) + self.coef[2] * \
            (y - self.centre[1])


class NeighbourThickness:
    """Leave-one-out prediction of every unit's local thickness from neighbouring wells.

    Parameters
    ----------
    column : ReferenceColumn
        The reference column (defines the units and their order).
    samples : DataFrame
        From :func:`thickness_samples`: ``well, unit, thickness_m, x_m, y_m``.
    k : int
        Neighbours per prediction (default 6).
    power : float
        Inverse-distance weight exponent (default 2).
    min_neighbours : int
        Fewer usable neighbours than this gives no prediction (NaN).
    max_distance_m : float, optional
        Neighbours farther than this are not used.
    trend : bool
        Remove a robust regional plane before interpolating (default True).
    outlier_k : float
        Residuals beyond this many robust standard deviations mark a sample as an outlier.
    outlier_floor_m, outlier_floor_rel : float
        Floors of the outlier threshold (absolute, and relative to the predicted thickness), so
        that a field of near-identical wells does not call pick noise an outlier.
    """

    def __init__(self, column: ReferenceColumn, samples: pd.DataFrame, *, k: int = 6,
                 power: float = 2.0, min_neighbours: int = 3,
                 max_distance_m: float | None = None, trend: bool = True,
                 outlier_k: float = 4.0, outlier_floor_m: float = 1.0,
                 outlier_floor_rel: float = 0.03, distance_offset_m: float = 1.0) -> None:
        if int(k) < 1:
            raise InputError(f"neighbour count k must be at least 1 (got {k})")
        if int(min_neighbours) < 1 or int(min_neighbours) > int(k):
            raise InputError(f"min_neighbours must be in 1..k (got {min_neighbours} with "
                             f"k={k})")
        self.column = column
        self.k = int(k)
        self.power = float(power)
        self.min_neighbours = int(min_neighbours)
        self.max_distance_m = None if max_distance_m is None else float(max_distance_m)
        self.use_trend = bool(trend)
        self.outlier_k = float(outlier_k)
        self.outlier_floor_m = float(outlier_floor_m)
        self.outlier_floor_rel = float(outlier_floor_rel)
        self.d0 = float(distance_offset_m)
        self.samples = samples.reset_index(drop=True).copy()
        self.samples["outlier"] = False
        self.samples["loo_pred_m"] = np.nan
        self._units: dict[int, _Unit] = {}
        self.relative_scatter = np.full(len(column), np.nan)
        self._fit()

    # ---------------------------------------------------------------------------- fitting
    def _build(self, sub: pd.DataFrame) -> _Unit:
        x = sub["x_m"].to_numpy(float)
        y = sub["y_m"].to_numpy(float)
        h = sub["thickness_m"].to_numpy(float)
        centre = (float(np.mean(x)), float(np.mean(y))) if len(x) else (0.0, 0.0)
        if self.use_trend:
            coef = _robust_plane(x - centre[0], y - centre[1], h)
        else:
            coef = np.array([float(np.median(h)) if len(h) else np.nan, 0.0, 0.0])
        unit = _Unit(None, sub["well"].to_numpy(np.int64), np.zeros(0), coef, centre)
        unit.resid = h - unit.trend(x, y)
        unit.tree = cKDTree(np.column_stack([x, y])) if len(x) else None
        return unit

    def _query(self, unit: _Unit, x, y, exclude_well) -> NDArray[np.float64]:
        q = np.column_stack([np.asarray(x, float), np.asarray(y, float)])
        out = np.full(len(q), np.nan)
        if unit.tree is None or len(q) == 0:
            return out
        placed = np.all(np.isfinite(q), axis=1)
        if not placed.all():  # no location, no neighbours
            if placed.any():
                out[placed] = self._query(unit, q[placed, 0], q[placed, 1],
                                          np.asarray(exclude_well)[placed])
            return out
        n = unit.tree.n
        kk = min(self.k + 1, n)
        dist, idx = unit.tree.query(q, k=kk,
                                    distance_upper_bound=self.max_distance_m or np.inf)
        dist = np.asarray(dist, dtype=float).reshape(len(q), kk)
        idx = np.asarray(idx).reshape(len(q), kk)
        valid = idx < n
        safe = np.where(valid, idx, 0)
        same = valid & (unit.well[safe] == np.asarray(exclude_well)[:, None])
        valid &= ~same
        # keep the first k valid neighbours of each row
        rank = np.cumsum(valid, axis=1)
        valid &= rank <= self.k
        vals = np.where(valid, unit.resid[safe], np.nan)
        w = np.where(valid, 1.0 / (dist + self.d0) ** self.power, 0.0)
        med = weighted_median_rows(vals, w)
        enough = valid.sum(axis=1) >= self.min_neighbours
        pred = med + unit.trend(q[:, 0], q[:, 1])
        out[enough] = pred[enough]
        return out

    def _fit(self) -> None:
        s = self.samples
        for u in np.unique(s["unit"].to_numpy(np.int64)) if len(s) else []:
            rows = np.flatnonzero(s["unit"].to_numpy() == u)
            sub = s.iloc[rows]
            first = self._build(sub)
            pred = self._query(first, sub["x_m"], sub["y_m"], sub["well"].to_numpy(np.int64))
            h = sub["thickness_m"].to_numpy(float)
            r = h - pred
            good = np.isfinite(r)
            scale = 1.4826 * float(np.median(np.abs(r[good]))) if good.any() else 0.0
            limit = np.maximum(self.outlier_k * scale,
                               np.maximum(self.outlier_floor_m,
                                          self.outlier_floor_rel * np.abs(np.where(
                                              np.isfinite(pred), pred, h))))
            outlier = good & (np.abs(r) > limit)
            s.loc[s.index[rows], "outlier"] = outlier
            keep = sub[~outlier]
            unit = self._build(keep)
            self._units[int(u)] = unit
            loo = self._query(unit, sub["x_m"], sub["y_m"], sub["well"].to_numpy(np.int64))
            s.loc[s.index[rows], "loo_pred_m"] = loo
            ok = ~outlier & np.isfinite(loo) & (loo > 0)
            if ok.sum() >= 3:
                rel = np.abs(h[ok] - loo[ok]) / loo[ok]
                self.relative_scatter[int(u)] = 1.4826 * float(np.median(rel))

    # ---------------------------------------------------------------------------- queries
    def predict(self, unit: ArrayLike, x_m: ArrayLike, y_m: ArrayLike,
                exclude_well: ArrayLike) -> NDArray[np.float64]:
        """Predicted TST of ``unit`` at (x, y), leaving out the samples of ``exclude_well``.

        NaN where the unit has fewer than ``min_neighbours`` usable neighbours.
        """
        u = np.atleast_1d(np.asarray(unit, dtype=np.int64))
        x = np.broadcast_to(np.asarray(x_m, dtype=float), u.shape)
        y = np.broadcast_to(np.asarray(y_m, dtype=float), u.shape)
        wv = np.broadcast_to(np.asarray(exclude_well, dtype=np.int64), u.shape)
        out = np.full(u.shape, np.nan)
        for val in np.unique(u):
            sel = np.flatnonzero(u == val)
            unit_fit = self._units.get(int(val))
            if unit_fit is not None:
                out[sel] = self._query(unit_fit, x[sel], y[sel], wv[sel])
        return out

    def expected_intervals(self, well: ArrayLike, idx_above: ArrayLike, idx_below: ArrayLike,
                           x_m: ArrayLike, y_m: ArrayLike) -> NDArray[np.float64]:
        """Expected signed TST between consecutive picks (the ``expected`` of tops evidence).

        The sum of the predicted units between the two surfaces, negative when the lower pick
        is higher in the column (a well drilling up-section); 0 for the same surface twice;
        NaN when any unit spanned has no prediction.
        """
        w = np.asarray(well, dtype=np.int64)
        a = np.asarray(idx_above, dtype=np.int64)
        b = np.asarray(idx_below, dtype=np.int64)
        x = np.asarray(x_m, dtype=float)
        y = np.asarray(y_m, dtype=float)
        lo, hi = np.minimum(a, b), np.maximum(a, b)
        span = hi - lo
        rep = np.repeat(np.arange(len(a)), span)
        units = np.repeat(lo, span) + (np.arange(rep.size) - np.repeat(np.cumsum(span) - span,
                                                                        span))
        pred = self.predict(units, x[rep], y[rep], w[rep]) if rep.size else np.zeros(0)
        total = np.zeros(len(a))
        np.add.at(total, rep, pred)
        return np.sign(b - a) * total

    def summary(self) -> pd.DataFrame:
        """Per unit: samples, outliers, trend at the centre, relative LOO scatter."""
        rows = []
        s = self.samples
        for i, name in enumerate(self.column.names):
            sub = s[s["unit"] == i] if len(s) else s
            unit = self._units.get(i)
            rows.append({"unit": i, "surface": name, "samples": int(len(sub)),
                         "outliers": int(sub["outlier"].sum()) if len(sub) else 0,
                         "trend_m": float(unit.coef[0]) if unit is not None else math.nan,
                         "relative_scatter": float(self.relative_scatter[i])})
        return pd.DataFrame(rows)
