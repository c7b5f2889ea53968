"""The reference stratigraphic column: ordered surfaces, their positions s, and a type log.

Stratigraphic position s is the true stratigraphic thickness (TST) below the top surface of the
column, in metres, growing down-section (DESIGN.md section 2). Surface ``i`` sits at ``s_m[i]``;
the *unit* named after surface ``i`` is the interval ``[s_m[i], s_m[i + 1])`` below it, and the
last unit ends at ``base_s_m``. A column whose last thickness is unknown has ``base_s_m = nan``:
the last unit is then open-ended (it extends without limit down-section).

A column is built from a table of surfaces and thicknesses (:meth:`ReferenceColumn.from_table`)
or from a type well (:meth:`ReferenceColumn.from_type_well`), whose curves become the type log:
a DataFrame indexed by ``"s_m"`` on a regular step.
"""

from __future__ import annotations

import math
from collections.abc import Iterable, Sequence

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray

from ..errors import ColumnError, input_error
from .geometry import bed_normal

__all__ = ["ReferenceColumn"]


def _check_dip(bed_dip: object, source: object) -> tuple[float, float]:
    try:
        dip, azi = (float(v) for v in bed_dip)  # type: ignore[union-attr]
    except (TypeError, ValueError):
        raise input_error(
            "bed dip must be a pair (dip_deg, dip_azimuth_deg)", source=source, value=bed_dip,
            fix="pass e.g. bed_dip=(8.0, 75.0) for beds dipping 8 degrees toward 075",
            cls=ColumnError,
        ) from None
    if not (0.0 <= dip <= 90.0) or not math.isfinite(azi):
        raise input_error(
            "bed dip outside 0-90 degrees or azimuth not finite", source=source,
            value=(dip, azi), fix="give dip in [0, 90] and dip azimuth in degrees from north",
            cls=ColumnError,
        )
    return dip, azi % 360.0


class ReferenceColumn:
    """Ordered stratigraphic surfaces with their positions s and an optional type log.

    Parameters
    ----------
    names : sequence of str
        Surface names, top down, unique.
    s_m : array_like
        Stratigraphic position of each surface, strictly increasing. [m TST]
    unconformity : array_like of bool, optional
        True where the surface is a known unconformity. Default all False.
    base_s_m : float, optional
        Position of the base of the last unit; ``nan`` (default) for an open-ended last unit.
        [m TST]
    type_log : DataFrame, optional
        Type-log curves indexed by ``"s_m"`` on a regular, increasing grid.
    name : str, optional
        A label used in messages and ``repr``.

    Raises
    ------
    ColumnError
        Repeated or empty names, s not strictly increasing (zero or negative thickness), a base
        not below the last surface, or a malformed type log.
    """

    def __init__(
        self,
        names: Sequence[str],
        s_m: ArrayLike,
        *,
        unconformity: ArrayLike | None = None,
        base_s_m: float = math.nan,
        type_log: pd.DataFrame | None = None,
        name: str = "reference column",
    ) -> None:
        self.name = str(name)
        names = tuple(str(n).strip() for n in names)
        s = np.asarray(s_m, dtype=float).reshape(-1)
        if len(names) == 0:
            raise ColumnError(f"{self.name}: no surfaces given; a column needs at least one")
        if len(s) != len(names):
            raise ColumnError(
                f"{self.name}: {len(names)} surface names but {len(s)} positions; "
                "give one s per surface"
            )
        for i, n in enumerate(names):
            if not n:
                raise input_error("empty surface name", source=self.name, row=i,
                                  fix="name every surface", cls=ColumnError)
        seen: dict[str, int] = {}
        for i, n in enumerate(names):
            if n in seen:
                raise input_error(
                    f"surface {n!r} appears twice (rows {seen[n]} and {i})", source=self.name,
                    fix="a reference column lists each surface once; rename or drop the repeat",
                    cls=ColumnError,
                )
            seen[n] = i
        if not np.all(np.isfinite(s)):
            i = int(np.flatnonzero(~np.isfinite(s))[0])
            raise input_error(f"surface {names[i]!r} has no position", source=self.name, row=i,
                              value=float(s[i]), fix="give a finite s for every surface",
                              cls=ColumnError)
        ds = np.diff(s)
        if np.any(ds <= 0):
            i = int(np.flatnonzero(ds <= 0)[0])
            raise input_error(
                f"unit {names[i]!r} has zero or negative thickness (s {s[i]:.3f} m at "
                f"{names[i]!r}, {s[i + 1]:.3f} m at {names[i + 1]!r})", source=self.name,
                row=i, value=float(ds[i]),
                fix="list surfaces top down with positive thicknesses", cls=ColumnError,
            )
        base = float(base_s_m)
        if not math.isnan(base) and base <= s[-1]:
            raise input_error(
                f"base of the last unit {names[-1]!r} is not below its top "
                f"(top {s[-1]:.3f} m)", source=self.name, value=base,
                fix="give a positive last thickness, or NaN for an open-ended last unit",
                cls=ColumnError,
            )
        if unconformity is None:
            unc = np.zeros(len(names), dtype=bool)
        else:
            unc = np.asarray(unconformity, dtype=bool).reshape(-1)
            if len(unc) != len(names):
                raise ColumnError(
                    f"{self.name}: {len(unc)} unconformity flags for {len(names)} surfaces; "
                    "give one flag per surface"
                )
        self._names = names
        self._index = seen
        self._s = s
        self._s.setflags(write=False)
        self._unc = unc
        self._unc.setflags(write=False)
        self._base = base
        self._type_log = None if type_log is None else self._check_type_log(type_log)

    # ------------------------------------------------------------------ properties
    @property
    def names(self) -> tuple[str, ...]:
        """Surface names, top down."""
        return self._names

    @property
    def s_m(self) -> NDArray[np.float64]:
        """Position of each surface (read-only). [m TST]"""
        return self._s

    @property
    def unconformity(self) -> NDArray[np.bool_]:
        """True where the surface is a known unconformity (read-only)."""
        return self._unc

    @property
    def base_s_m(self) -> float:
        """Base of the last unit, ``nan`` when the last unit is open-ended. [m TST]"""
        return self._base

    @property
    def thicknesses_m(self) -> NDArray[np.float64]:
        """Thickness of each unit below its surface; the last is ``nan`` if open-ended. [m]"""
        return np.append(np.diff(self._s), self._base - self._s[-1])

    @property
    def type_log(self) -> pd.DataFrame | None:
        """Type-log curves indexed by ``"s_m"`` (regular step), or None."""
        return self._type_log

    @property
    def type_log_step_m(self) -> float:
        """Step of the type log's s grid; ``nan`` without a type log. [m]"""
        if self._type_log is None or len(self._type_log) < 2:
            return math.nan
        idx = self._type_log.index.to_numpy(dtype=float)
        return float((idx[-1] - idx[0]) / (len(idx) - 1))

    def __len__(self) -> int:
        return len(self._names)

    def __eq__(self, other: object) -> bool:
        if not isinstance(other, ReferenceColumn):
            return NotImplemented
        same_log = (self._type_log is None and other._type_log is None) or (
            self._type_log is not None and other._type_log is not None
            and self._type_log.equals(other._type_log)
        )
        return (
            self._names == other._names
            and np.array_equal(self._s, other._s)
            and np.array_equal(self._unc, other._unc)
            and (self._base == other._base or (math.isnan(self._base) and math.isnan(other._base)))
            and same_log
        )

    __hash__ = None  # type: ignore[assignment]

    def __repr__(self) -> str:
        lines = [f"ReferenceColumn({self.name!r}, {len(self)} surfaces"
                 + (", base open" if math.isnan(self._base) else f", base {self._base:.2f} m")
                 + (f", type log {list(self._type_log.columns)} "
                    f"{self._type_log.index[0]:.2f}-{self._type_log.index[-1]:.2f} m "
                    f"step {self.type_log_step_m:.4f} m" if self._type_log is not None else "")
                 + ")"]
        width = max(len(n) for n in self._names)
        for n, s, h, u in zip(self._names, self._s, self.thicknesses_m, self._unc):
            th = "open" if math.isnan(h) else f"{h:8.2f}"
            lines.append(f"  {n:<{width}}  s {s:9.2f} m  thickness {th:>8} m"
                         + ("  (unconformity)" if u else ""))
        return "\n".join(lines)

    # ------------------------------------------------------------------ look-ups
    def index(self, name: str) -> int:
        """Position of surface ``name`` in the column (0 = top).

        Raises
        ------
        ColumnError
            When ``name`` is not in the column; the message lists the valid names.
        """
        try:
            return self._index[str(name).strip()]
        except KeyError:
            raise ColumnError(
                f"{self.name}: unknown surface {name!r}; valid surfaces are "
                f"{', '.join(self._names)}"
            ) from None

    def s_of(self, name: str) -> float:
        """Position s of surface ``name``. [m TST]"""
        return float(self._s[self.index(name)])

    def thickness(self, name: str) -> float:
        """Thickness of the unit below surface ``name``; ``nan`` for an open last unit. [m]"""
        return float(self.thicknesses_m[self.index(name)])

    def unit_at(self, s_m: ArrayLike) -> object:
        """Name of the unit containing each position s (vectorised).

        A unit is ``[s of its top surface, s of the next surface)``. Positions above the top
        surface, below a defined base, or NaN give None.

        Returns
        -------
        str or None for a scalar input, else an object array of the same shape.
        """
        s = np.asarray(s_m, dtype=float)
        idx = np.searchsorted(self._s, s, side="right") - 1
        ok = (idx >= 0) & np.isfinite(s)
        if not math.isnan(self._base):
            ok &= s < self._base
        names = np.array(self._names + (None,), dtype=object)
        out = names[np.where(ok, idx, len(self._names))]
        if s.ndim == 0:
            return out.item() if isinstance(out, np.ndarray) else out
        return out

    def surfaces_between(self, s1_m: float, s2_m: float) -> tuple[str, ...]:
        """Surfaces with ``lo < s <= hi`` where ``lo, hi = sorted((s1_m, s2_m))``, top down.

        This is the list of surfaces a well misses (or repeats) when its stratigraphic position
        jumps from ``s1_m`` to ``s2_m``.
        """
        lo, hi = sorted((float(s1_m), float(s2_m)))
        sel = (self._s > lo) & (self._s <= hi)
        return tuple(n for n, k in zip(self._names, sel) if k)

    # ------------------------------------------------------------------ conversions
    def to_frame(self) -> pd.DataFrame:
        """Table of surfaces: ``surface, s_m, thickness_m, unconformity`` (top down)."""
        return pd.DataFrame({
            "surface": list(self._names),
            "s_m": self._s.astype(float),
            "thickness_m": self.thicknesses_m,
            "unconformity": self._unc.astype(bool),
        })

    def with_type_log(self, type_log: pd.DataFrame) -> ReferenceColumn:
        """A copy of the column carrying ``type_log`` (index or column ``"s_m"``, regular step)."""
        return ReferenceColumn(self._names, self._s, unconformity=self._unc,
                               base_s_m=self._base, type_log=type_log, name=self.name)

    def renamed(self, name: str) -> ReferenceColumn:
        """A copy with another label."""
        return ReferenceColumn(self._names, self._s, unconformity=self._unc,
                               base_s_m=self._base, type_log=self._type_log, name=name)

    def _check_type_log(self, df: pd.DataFrame) -> pd.DataFrame:
        if not isinstance(df, pd.DataFrame):
            raise ColumnError(f"{self.name}: type log must be a DataFrame indexed by 's_m'")
        if "s_m" in df.columns:
            df = df.set_index("s_m")
        elif df.index.name != "s_m":
            raise ColumnError(
                f"{self.name}: type log has neither an 's_m' index nor an 's_m' column "
                f"(index {df.index.name!r}, columns {list(df.columns)}); index it by s in metres"
            )
        if df.shape[1] == 0 or len(df) < 2:
            raise ColumnError(f"{self.name}: type log needs at least one curve and two samples")
        s = df.index.to_numpy(dtype=float)
        d = np.diff(s)
        if not np.all(np.isfinite(s)) or np.any(d <= 0):
            raise ColumnError(f"{self.name}: type-log s_m must be finite and strictly increasing")
        step = (s[-1] - s[0]) / (len(s) - 1)
        if np.max(np.abs(d - step)) > 1e-6 * max(1.0, step) + 1e-9:
            raise ColumnError(
                f"{self.name}: type-log s_m is not on a regular step (steps from "
                f"{d.min():.6g} to {d.max():.6g} m); resample it onto a regular grid"
            )
        out = df.astype(float).copy()
        out.index = pd.Index(s, name="s_m", dtype=float)
        return out

    # ------------------------------------------------------------------ constructors
    @classmethod
    def from_table(cls, df: pd.DataFrame, *, source: object = None,
                   type_log: pd.DataFrame | None = None) -> ReferenceColumn:
        """Build a column from a table of surfaces and unit thicknesses.

        Parameters
        ----------
        df : DataFrame
            Columns ``surface``, ``thickness_m`` (thickness of the unit BELOW the surface) and
            optionally ``unconformity`` (bool), top down, as returned by
            ``wellfault.io.read_column_table``. The first surface is at s = 0.
        source : optional
            File name used in messages.

        Notes
        -----
        Only the LAST row may have a missing (NaN) thickness: its unit is then open-ended and
        ``base_s_m`` is NaN. Any other missing, zero or negative thickness raises ColumnError.
        """
        where = source if source is not None else "column table"
        missing = [c for c in ("surface", "thickness_m") if c not in df.columns]
        if missing:
            raise ColumnError(
                f"{where}: missing column(s) {missing} (have {list(df.columns)}); a column table "
                "needs 'surface' and 'thickness_m' (read it with read_column_table)"
            )
        names = [str(v) for v in df["surface"].tolist()]
        th = pd.to_numeric(df["thickness_m"], errors="coerce").to_numpy(dtype=float)
        for i in range(len(th)):
            if not np.isfinite(th[i]) and i < len(th) - 1:
                raise input_error(f"surface {names[i]!r} has no thickness", source=where, row=i,
                                  value=df["thickness_m"].iloc[i],
                                  fix="only the last unit may have an unknown thickness",
                                  cls=ColumnError)
            if np.isfinite(th[i]) and th[i] <= 0:
                raise input_error(f"unit {names[i]!r} has zero or negative thickness",
                                  source=where, row=i, value=float(th[i]),
                                  fix="give every unit a positive thickness in metres",
                                  cls=ColumnError)
        s = np.concatenate([[0.0], np.cumsum(th[:-1])]) if len(th) else np.zeros(0)
        base = float(s[-1] + th[-1]) if len(th) and np.isfinite(th[-1]) else math.nan
        unc = None
        if "unconformity" in df.columns:
            unc = df["unconformity"].map(_as_bool).to_numpy(dtype=bool)
        return cls(names, s, unconformity=unc, base_s_m=base, type_log=type_log,
                   name=str(where))

    @classmethod
    def from_type_well(
        cls,
        well: object,
        tops: pd.DataFrame,
        trajectory: object | None,
        bed_dip: tuple[float, float],
        *,
        step_m: float | None = None,
        curves: Iterable[str] | None = None,
        unconformities: Iterable[str] = (),
    ) -> ReferenceColumn:
        """Build a column and its type log from a type well.

        Parameters
        ----------
        well : wellfault.geo.well.Well
            The type well; its curves (indexed by MD in metres) become the type log.
        tops : DataFrame
            Columns ``surface`` and ``md_m`` (and optionally ``well``: rows of other wells are
            ignored). The pick order by MD defines the column order.
        trajectory : Trajectory or None
            The type well's path (None: vertical below the well's surface location).
        bed_dip : (dip_deg, dip_azimuth_deg)
            Bedding attitude at the type well. [°]
        step_m : float, optional
            Step of the type log's s grid; default the median stratigraphic increment between
            log samples. [m]
        curves : iterable of str, optional
            Curves to keep (default all).
        unconformities : iterable of str
            Surfaces to flag as unconformities.

        Notes
        -----
        The stratigraphic position of a point P along the well is ``s = n . (P - P0)`` with n the
        down-section bed normal and P0 the position of the first (shallowest) top (DESIGN.md
        section 2; TST from coordinates, Berg 2012, as in reference/methods.md section 2), so
        deviated type wells are handled exactly. The type log keeps the longest stretch of log
        around the tops along which s strictly increases, resampled by linear interpolation on
        the regular grid ``s = k * step`` (NaN where a neighbouring sample is null). The base of
        the last unit is undefined (``base_s_m = nan``).

        Raises
        ------
        ColumnError
            No tops for this well, a surface picked twice, s not increasing from pick to pick or
            along the log between the first and last pick (the type well must drill
            down-section), or a non-positive step.
        """
        wname = getattr(well, "name", "type well")
        where = f"type well {wname!r}"
        for c in ("surface", "md_m"):
            if c not in tops.columns:
                raise ColumnError(f"{where}: tops table lacks column {c!r} "
                                  f"(have {list(tops.columns)}); read it with read_tops")
        t = tops
        if "well" in t.columns:
            sel = t["well"].astype(str) == str(wname)
            if sel.any():
                t = t[sel]
            elif t["well"].nunique() > 1:
                raise ColumnError(f"{where}: no tops for this well in the tops table "
                                  f"(wells {sorted(t['well'].astype(str).unique())[:10]})")
        t = t[["surface", "md_m"]].copy()
        t["md_m"] = pd.to_numeric(t["md_m"], errors="coerce")
        t = t.dropna(subset=["md_m"]).sort_values("md_m", kind="stable")
        if len(t) == 0:
            raise ColumnError(f"{where}: no tops with a depth; a type well needs its tops")
        names = [str(v).strip() for v in t["surface"].tolist()]
        dup = pd.Series(names)[pd.Series(names).duplicated()].tolist()
        if dup:
            raise ColumnError(f"{where}: surface(s) {dup} picked twice; a type well must show an "
                              "unfaulted section (choose another type well or drop the repeat)")
        dip, azi = _check_dip(bed_dip, where)
        n = bed_normal(dip, azi)
        pos = _position_fn(trajectory, well)
        md_tops = t["md_m"].to_numpy(dtype=float)
        p_tops = pos(md_tops)
        p0 = p_tops[0]
        s_tops = (p_tops - p0) @ n
        d = np.diff(s_tops)
        if np.any(d <= 0):
            i = int(np.flatnonzero(d <= 0)[0])
            raise ColumnError(
                f"{where}: stratigraphic position does not increase from {names[i]!r} "
                f"(MD {md_tops[i]:.2f} m, s {s_tops[i]:.2f} m) to {names[i + 1]!r} "
                f"(MD {md_tops[i + 1]:.2f} m, s {s_tops[i + 1]:.2f} m); the tops are out of "
                "order or the well drills up-section here. A type well must drill down-section "
                "through an unfaulted column: check the picks, the bed dip and the survey"
            )
        curves_df = getattr(well, "curves", None)
        type_log = None
        if curves_df is not None and len(curves_df) >= 2:
            cdf = curves_df if curves is None else curves_df[list(curves)]
            md = cdf.index.to_numpy(dtype=float)
            s = (pos(md) - p0) @ n
            inc = np.diff(s) > 0
            # longest run of strictly increasing s that contains the tops interval
            lo = int(np.searchsorted(md, md_tops[0], side="right")) - 1
            hi = int(np.searchsorted(md, md_tops[-1], side="left"))
            lo, hi = max(lo, 0), min(max(hi, lo + 1), len(md) - 1)
            if not np.all(inc[lo:hi]):
                j = lo + int(np.flatnonzero(~inc[lo:hi])[0])
                raise ColumnError(
                    f"{where}: stratigraphic position stops increasing along the log at MD "
                    f"{md[j]:.2f} m (s {s[j]:.3f} -> {s[j + 1]:.3f} m); the type well must drill "
                    "down-section between its first and last top"
                )
            while lo > 0 and inc[lo - 1]:
                lo -= 1
            while hi < len(md) - 1 and inc[hi]:
                hi += 1
            md, s = md[lo:hi + 1], s[lo:hi + 1]
            step = float(np.median(np.diff(s))) if step_m is None else float(step_m)
            if not (step > 0 and math.isfinite(step)):
                raise input_error("type-log step must be positive", source=where, value=step,
                                  fix="pass step_m > 0", cls=ColumnError)
            k0, k1 = math.ceil(s[0] / step - 1e-9), math.floor(s[-1] / step + 1e-9)
            grid = np.arange(k0, k1 + 1) * step
            vals = {c: np.interp(grid, s, cdf[c].to_numpy(dtype=float)[lo:hi + 1],
                                 left=np.nan, right=np.nan) for c in cdf.columns}
            type_log = pd.DataFrame(vals, index=pd.Index(grid, name="s_m"))
        unc_set = {str(u) for u in unconformities}
        unknown = unc_set - set(names)
        if unknown:
            raise ColumnError(f"{where}: unconformity surface(s) {sorted(unknown)} not among the "
                              f"tops; valid surfaces are {', '.join(names)}")
        unc = [nm in unc_set for nm in names]
        return cls(names, s_tops, unconformity=unc, type_log=type_log, name=where)


def _as_bool(v: object) -> bool:
    if isinstance(v, (bool, np.bool_)):
        return bool(v)
    if v is None or (isinstance(v, float) and math.isnan(v)):
        return False
    if isinstance(v, (int, float, np.integer, np.floating)):
        return bool(v)
    text = str(v).strip().lower()
    if text in ("true", "t", "yes", "y", "1", "x", "unconformity", "u"):
        return True
    if text in ("false", "f", "no", "n", "0", "", "nan", "none"):
        return False
    raise ColumnError(f"unconformity flag {v!r} is not a yes/no value; use true/false")


def _position_fn(trajectory: object | None, well: object):
    """Position function md -> (N, 3) (x, y, tvd); vertical below the well head without a path."""
    if trajectory is not None:
        position = trajectory.position  # type: ignore[attr-defined]
        return lambda md: np.asarray(position(np.asarray(md, dtype=float)),
                                     dtype=float).reshape(-1, 3)
    x0 = getattr(well, "x_m", None) or 0.0
    y0 = getattr(well, "y_m", None) or 0.0

    def vertical(md: ArrayLike) -> NDArray[np.float64]:
        md = np.asarray(md, dtype=float).reshape(-1)
        return np.column_stack([np.full_like(md, x0), np.full_like(md, y0), md])

    return vertical
