"""Well trajectories by the minimum-curvature method.

:func:`minimum_curvature` turns survey stations (MD, inclination, azimuth) into TVD, north, east
and dogleg. :class:`Trajectory` holds a computed survey and answers, vectorised, the position,
tangent, TVD and TVDSS at any MD, interpolating *along the circular arc* of each course (not
linearly between stations), and inverts TVD to MD.

Frame (DEVELOPERS.md): x = easting, y = northing, TVD positive down from the depth reference;
vectors are (east, north, down). Lengths in metres inside the package.

References
----------
.. [1] Taylor, H.L. and Mason, M.C. (1972) "A Systematic Approach to Well Surveying
   Calculations", SPE Journal 12(6), 474-488. doi:10.2118/3362-PA
.. [2] Sawaryn, S.J. and Thorogood, J.L. (2005) "A Compendium of Directional Calculations
   Based on the Minimum Curvature Method", SPE Drilling & Completion 20(1), 24-36.
   doi:10.2118/84246-PA
"""

from __future__ import annotations

from typing import Any

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError, SurveyError, input_error
from .mincurve import _slerp_weights, _tangent, minimum_curvature, ratio_factor
from .units import DepthUnit, parse_depth_unit

__all__ = ["Trajectory"]


_MAX_DOGLEG_RAD = np.pi - 1e-6  # a course turning the hole back on itself is not an arc


class Trajectory:
    """A well path from survey stations by minimum curvature, queried at any MD.

    Parameters
    ----------
    md_m : array_like, shape (n,)
        Station measured depths, strictly increasing, >= 0. [m]
    inc_deg : array_like, shape (n,)
        Inclination from vertical, 0-180. [deg]
    azi_deg : array_like, shape (n,)
        Azimuth clockwise from north, 0-360 (ignored where the inclination is 0). [deg]
    x0_m, y0_m : float, keyword-only
        Easting and northing of the well at MD 0 (surface location). [m]
    ref_elevation_m : float or None, keyword-only
        Elevation of the depth reference (KB, DF, ...) above sea level; needed for TVDSS. [m]
    name : str or None, keyword-only
        Well name, used in messages.
    source : str or None, keyword-only
        File the survey came from, used in messages.

    Raises
    ------
    SurveyError
        For non-finite values, MD not strictly increasing or negative, inclination outside
        0-180, azimuth outside 0-360, or a course whose dogleg is 180 degrees. Rows in messages
        count the stations as given, from 1.

    Notes
    -----
    * MD 0 is the depth reference (TVD 0). When the first station lies below MD 0, a vertical
      tie-on station (MD 0, inclination 0) is added, as is common practice when a survey starts
      below the surface; the course to the first station is then a minimum-curvature arc from
      vertical. :attr:`stations` shows it.
    * Between stations the path is the circular arc of minimum curvature; positions and
      tangents inside a course use the Sawaryn & Thorogood interpolation (the tangent at
      fraction f of the dogleg is ``t = (sin((1-f) beta) t1 + sin(f beta) t2) / sin beta``, the
      position the minimum-curvature formula over the partial course), so they lie exactly on
      the arc [2]_.
    * Beyond the last station the path goes straight on along the last station's tangent (an
      extrapolation; nothing is emitted here, callers compare with :attr:`md_max_m` and warn).
      Above MD 0 the path goes straight up (vertical).

    References
    ----------
    .. [1] Taylor, H.L. and Mason, M.C. (1972) "A Systematic Approach to Well Surveying
       Calculations", SPE Journal 12(6), 474-488. doi:10.2118/3362-PA
    .. [2] Sawaryn, S.J. and Thorogood, J.L. (2005) "A Compendium of Directional Calculations
       Based on the Minimum Curvature Method", SPE Drilling & Completion 20(1), 24-36.
       doi:10.2118/84246-PA

    Examples
    --------
    >>> traj = Trajectory([0, 1000, 1500], [0, 0, 15], [0, 0, 45])
    >>> round(float(traj.tvd(1500)), 3)
    1494.308
    """

    def __init__(
        self,
        md_m: ArrayLike,
        inc_deg: ArrayLike,
        azi_deg: ArrayLike,
        *,
        x0_m: float = 0.0,
        y0_m: float = 0.0,
        ref_elevation_m: float | None = None,
        name: str | None = None,
        source: str | None = None,
    ) -> None:
        self.name = name
        self.source = source
        self.x0_m = float(x0_m)
        self.y0_m = float(y0_m)
        self.ref_elevation_m = None if ref_elevation_m is None else float(ref_elevation_m)
        md, inc, azi = self._validate(md_m, inc_deg, azi_deg)
        self.tie_on_added = bool(md[0] > 0.0)
        if self.tie_on_added:
            md = np.concatenate([[0.0], md])
            inc = np.concatenate([[0.0], inc])
            azi = np.concatenate([[0.0], azi])
        # where the hole is vertical the azimuth is meaningless: store it as given, the
        # tangent does not depend on it
        self._md = md
        self._inc = inc
        self._azi = azi
        self._t = _tangent(inc, azi)
        tvd, north, east, dl = minimum_curvature(md, inc, azi)
        self._p = np.stack([east, north, tvd], axis=-1)  # relative (east, north, tvd)
        self._beta = np.radians(dl[1:])
        self._dmd = np.diff(md)
        bad = np.flatnonzero(self._beta > _MAX_DOGLEG_RAD)
        if bad.size:
            j = int(bad[0])
            raise self._err(
                "a course turns the hole back on itself (dogleg 180 deg), so no arc joins the "
                f"stations at MD {md[j]:.2f} and {md[j + 1]:.2f} m",
                row=j + 1 - int(self.tie_on_added) + 1,
                value=f"inc {inc[j]:g}->{inc[j + 1]:g}, azi {azi[j]:g}->{azi[j + 1]:g}",
                fix="check the inclination/azimuth columns or add the missing stations",
            )
        self._dl_deg = dl

    # ------------------------------------------------------------------ construction
    def _err(self, what: str, *, row: Any = None, value: Any = None, fix: str | None = None):
        where = self.source or (f"well {self.name!r}" if self.name else "survey")
        return input_error(what, source=where, row=row, value=value, fix=fix, cls=SurveyError)

    def _validate(self, md_m, inc_deg, azi_deg):
        arrays = []
        for label, values in (("MD", md_m), ("inclination", inc_deg), ("azimuth", azi_deg)):
            try:
                a = np.atleast_1d(np.asarray(values, dtype=float))
            except (TypeError, ValueError) as err:
                raise self._err(
                    f"{label} values are not numbers", fix="give numeric md, inc, azi columns"
                ) from err
            if a.ndim != 1:
                raise self._err(f"{label} must be one-dimensional", value=a.shape)
            arrays.append(a)
        md, inc, azi = arrays
        if not (md.size == inc.size == azi.size):
            raise self._err(
                "MD, inclination and azimuth have different lengths",
                value=f"{md.size}, {inc.size}, {azi.size}",
                fix="give one inclination and one azimuth per station",
            )
        if md.size == 0:
            raise self._err("survey has no stations", fix="give at least one station")
        for label, a in (("MD", md), ("inclination", inc), ("azimuth", azi)):
            bad = np.flatnonzero(~np.isfinite(a))
            if bad.size:
                i = int(bad[0])
                raise self._err(
                    f"{label} is not a finite number", row=i + 1, value=float(a[i]),
                    fix="remove or fill the incomplete station",
                )
        if md[0] < 0:
            raise self._err(
                "MD below zero (MD is measured from the depth reference)", row=1,
                value=float(md[0]), fix="shift the survey so that MD 0 is the depth reference",
            )
        step = np.diff(md)
        bad = np.flatnonzero(step <= 0)
        if bad.size:
            i = int(bad[0])
            raise self._err(
                f"MD is not strictly increasing ({md[i]:g} m then {md[i + 1]:g} m)",
                row=i + 2, value=float(md[i + 1]),
                fix="sort the stations by MD and drop duplicated stations",
            )
        bad = np.flatnonzero((inc < 0) | (inc > 180))
        if bad.size:
            i = int(bad[0])
            raise self._err(
                "inclination outside 0-180 deg", row=i + 1, value=float(inc[i]),
                fix="check the column order (md, inc, azi) and that angles are in degrees",
            )
        bad = np.flatnonzero((azi < 0) | (azi > 360))
        if bad.size:
            i = int(bad[0])
            raise self._err(
                "azimuth outside 0-360 deg", row=i + 1, value=float(azi[i]),
                fix="give azimuths clockwise from north in 0-360 (add 360 to negative ones)",
            )
        return md, inc, azi

    @classmethod
    def vertical(
        cls, *, x0_m: float = 0.0, y0_m: float = 0.0, ref_elevation_m: float | None = None,
        name: str | None = None, source: str | None = None,
    ) -> "Trajectory":
        """A vertical well (no survey): TVD = MD everywhere, x = x0, y = y0."""
        return cls([0.0], [0.0], [0.0], x0_m=x0_m, y0_m=y0_m, ref_elevation_m=ref_elevation_m,
                   name=name, source=source)

    @classmethod
    def from_survey(cls, df: pd.DataFrame, **kwargs: Any) -> "Trajectory":
        """Build from a survey table with columns ``md_m``, ``inc_deg``, ``azi_deg``.

        Other columns (provider TVD, north, east, ...) are ignored. Keyword arguments are passed
        to :class:`Trajectory` (``x0_m``, ``y0_m``, ``ref_elevation_m``, ``name``, ``source``);
        ``source`` defaults to the file :func:`wellfault.io.read_survey` noted in ``df.attrs``.
        """
        if kwargs.get("source") is None and df.attrs.get("source"):
            kwargs["source"] = str(df.attrs["source"])
        need = ("md_m", "inc_deg", "azi_deg")
        missing = [c for c in need if c not in df.columns]
        if missing:
            source = kwargs.get("source")
            raise input_error(
                f"survey table lacks column(s) {', '.join(missing)}",
                source=source or "survey table",
                value=", ".join(map(str, df.columns)),
                fix="read the survey with wellfault.io.read_survey or name the columns "
                "md_m, inc_deg, azi_deg (metres and degrees)",
                cls=SurveyError,
            )
        return cls(df["md_m"].to_numpy(float), df["inc_deg"].to_numpy(float),
                   df["azi_deg"].to_numpy(float), **kwargs)

    # ------------------------------------------------------------------ tables
    @property
    def md_min_m(self) -> float:
        """MD of the first station (0: the depth reference). [m]"""
        return float(self._md[0])

    @property
    def md_max_m(self) -> float:
        """MD of the last station; deeper positions are extrapolated. [m]"""
        return float(self._md[-1])

    @property
    def stations(self) -> pd.DataFrame:
        """Stations with computed TVD/N/E [m] and dogleg severity [deg/30 m].

        Includes the vertical tie-on station at MD 0 when one was added. ``dls_deg_per_30m``
        belongs to the course ending at the station (0 at the first station).
        """
        return pd.DataFrame({
            "md_m": self._md,
            "inc_deg": self._inc,
            "azi_deg": self._azi,
            "tvd_m": self._p[:, 2],
            "north_m": self._p[:, 1],
            "east_m": self._p[:, 0],
            "dls_deg_per_30m": self._dls(30.0),
        })

    def _dls(self, per_m: float) -> NDArray[np.float64]:
        out = np.zeros_like(self._md)
        out[1:] = self._dl_deg[1:] * per_m / self._dmd
        return out

    def survey_table(self, unit: DepthUnit | str = DepthUnit.M) -> pd.DataFrame:
        """The station table in ``unit``, for output (the ``wellfault survey`` command).

        ``survey_out`` is the same method under another name.

        Parameters
        ----------
        unit : DepthUnit or str
            Output length unit (``"m"``, ``"ft"``, ``"usft"``).

        Returns
        -------
        DataFrame
            Columns ``md_<u>, inc_deg, azi_deg, tvd_<u>, north_<u>, east_<u>`` plus
            ``tvdss_<u>`` when the reference elevation is known, ``x_<u>, y_<u>``, and the
            dogleg severity ``dls_deg_per_100ft`` (feet) or ``dls_deg_per_30m`` (metres), of the
            course ending at each station.
        """
        u = parse_depth_unit(unit)
        k = 1.0 / u.metres
        s = u.suffix
        cols: dict[str, NDArray[np.float64]] = {
            f"md_{s}": self._md * k,
            "inc_deg": self._inc,
            "azi_deg": self._azi,
            f"tvd_{s}": self._p[:, 2] * k,
        }
        if self.ref_elevation_m is not None:
            cols[f"tvdss_{s}"] = (self._p[:, 2] - self.ref_elevation_m) * k
        cols[f"north_{s}"] = self._p[:, 1] * k
        cols[f"east_{s}"] = self._p[:, 0] * k
        cols[f"x_{s}"] = (self.x0_m + self._p[:, 0]) * k
        cols[f"y_{s}"] = (self.y0_m + self._p[:, 1]) * k
        if u is DepthUnit.M:
            cols["dls_deg_per_30m"] = self._dls(30.0)
        else:
            cols["dls_deg_per_100ft"] = self._dls(100.0 * u.metres)
        return pd.DataFrame(cols)

    survey_out = survey_table

    def __repr__(self) -> str:
        label = f" {self.name!r}" if self.name else ""
        return (f"<Trajectory{label}: {self._md.size} stations, MD {self._md[0]:g}-"
                f"{self._md[-1]:g} m, max inc {self._inc.max():g} deg>")

    # ------------------------------------------------------------------ queries
    def _locate(self, md: NDArray[np.float64]):
        """Relative position and tangent at flat MD array (NaN rows for NaN MD)."""
        n = self._md.size
        pos = np.full((md.size, 3), np.nan)
        tan = np.full((md.size, 3), np.nan)
        above = md < self._md[0]
        below = md > self._md[-1]
        inside = ~(above | below) & np.isfinite(md)
        # above the first station (MD 0): straight up
        pos[above] = self._p[0] + (md[above] - self._md[0])[:, None] * np.array([0.0, 0.0, 1.0])
        tan[above] = np.array([0.0, 0.0, 1.0])
        # beyond the last station: straight on along the last tangent
        pos[below] = self._p[-1] + (md[below] - self._md[-1])[:, None] * self._t[-1]
        tan[below] = self._t[-1]
        if n == 1:
            pos[inside] = self._p[0]
            tan[inside] = self._t[0]
            return pos, tan
        m = md[inside]
        i = np.clip(np.searchsorted(self._md, m, side="right") - 1, 0, n - 2)
        f = (m - self._md[i]) / self._dmd[i]
        beta = self._beta[i]
        t1, t2 = self._t[i], self._t[i + 1]
        w1, w2 = _slerp_weights(f, beta)
        tf = w1[:, None] * t1 + w2[:, None] * t2
        tf /= np.linalg.norm(tf, axis=1)[:, None]
        half = f * self._dmd[i] / 2.0 * ratio_factor(f * beta)
        pos[inside] = self._p[i] + half[:, None] * (t1 + tf)
        tan[inside] = tf
        return pos, tan

    def _flat(self, md_m: ArrayLike) -> NDArray[np.float64]:
        return np.atleast_1d(np.asarray(md_m, dtype=float)).ravel()

    def position(self, md_m: ArrayLike) -> NDArray[np.float64]:
        """Position (x, y, tvd) at each MD, along the arc.

        Parameters
        ----------
        md_m : array_like
            Measured depths (any order, NaN allowed and propagated). [m]

        Returns
        -------
        ndarray, shape (N, 3)
            x = x0 + east, y = y0 + north, TVD. [m] Beyond the last station the path is
            extrapolated along the last tangent; above MD 0 it is vertical.
        """
        pos, _ = self._locate(self._flat(md_m))
        pos[:, 0] += self.x0_m
        pos[:, 1] += self.y0_m
        return pos

    def tangent(self, md_m: ArrayLike) -> NDArray[np.float64]:
        """Unit tangent (east, north, down) at each MD; shape (N, 3)."""
        return self._locate(self._flat(md_m))[1]

    def inclination_azimuth(
        self, md_m: ArrayLike
    ) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        """Inclination and azimuth [deg] of the path at each MD (azimuth 0 where vertical)."""
        t = self.tangent(md_m)
        inc = np.degrees(np.arccos(np.clip(t[:, 2], -1.0, 1.0)))
        horiz = np.hypot(t[:, 0], t[:, 1])
        azi = np.where(horiz > 1e-12, np.degrees(np.arctan2(t[:, 0], t[:, 1])) % 360.0, 0.0)
        return inc, azi

    def tvd(self, md_m: ArrayLike) -> NDArray[np.float64] | float:
        """TVD below the depth reference at each MD (same shape as ``md_m``). [m]"""
        shape = np.shape(md_m)
        z = self._locate(self._flat(md_m))[0][:, 2]
        return float(z[0]) if shape == () else z.reshape(shape)

    def tvdss(self, md_m: ArrayLike) -> NDArray[np.float64] | float:
        """TVDSS = TVD - reference elevation, positive below sea level. [m]

        Raises
        ------
        InputError
            When the trajectory has no ``ref_elevation_m``.
        """
        if self.ref_elevation_m is None:
            raise input_error(
                "TVDSS needs the elevation of the depth reference, which is not known",
                source=self.source or (f"well {self.name!r}" if self.name else None),
                fix="pass ref_elevation_m= (e.g. the KB elevation from the LAS header EKB/EREF)",
                cls=InputError,
            )
        z = self.tvd(md_m)
        return z - self.ref_elevation_m

    # ------------------------------------------------------------------ TVD -> MD
    def _course_tvd_range(self):
        """Min and max TVD over each course (interior extremes of the arc included)."""
        z1, z2 = self._p[:-1, 2], self._p[1:, 2]
        lo, hi = np.minimum(z1, z2), np.maximum(z1, z2)
        beta = self._beta
        t1, t2 = self._t[:-1], self._t[1:]
        curved = beta > 1e-9
        if np.any(curved):
            b = beta[curved]
            k = (t2[curved] - np.cos(b)[:, None] * t1[curved]) / np.sin(b)[:, None]
            a_, b_ = t1[curved, 2], k[:, 2]
            phi = np.mod(np.arctan2(a_, -b_), np.pi)  # where a cos(phi) + b sin(phi) = 0
            r = self._dmd[curved] / b
            zc = z1[curved] + r * (a_ * np.sin(phi) + b_ * (1.0 - np.cos(phi)))
            hit = phi < b
            lo_c, hi_c = lo[curved], hi[curved]
            lo[curved] = np.where(hit, np.minimum(lo_c, zc), lo_c)
            hi[curved] = np.where(hit, np.maximum(hi_c, zc), hi_c)
        return lo, hi

    def md_at_tvd(self, tvd_m: ArrayLike) -> NDArray[np.float64] | float:
        """MD at which the path reaches each TVD, solved exactly on the arc.

        Parameters
        ----------
        tvd_m : array_like
            TVD below the depth reference (NaN propagated). [m]

        Returns
        -------
        ndarray or float
            MD, same shape as ``tvd_m``. [m] Negative TVD maps to negative MD (vertical above
            the reference); TVD below the last station uses the straight extension only when the
            last station points downwards.

        Raises
        ------
        SurveyError
            When a requested TVD is reached where the path does not descend (a horizontal or
            upward part, so MD is not one-to-one), more than once, or never; the message names
            the TVD.

        Notes
        -----
        Each course whose TVD grows strictly (both end tangents pointing down or horizontal,
        not both horizontal) is monotone over its whole arc, because a dogleg is below 180 deg;
        the root is found by a safeguarded Newton iteration on the exact arc position, to
        about 1e-9 m.
        """
        shape = np.shape(tvd_m)
        z = np.atleast_1d(np.asarray(tvd_m, dtype=float)).ravel()
        out = np.full(z.size, np.nan)
        ok = np.isfinite(z)
        tz = self._t[:, 2]
        zs = self._p[:, 2]
        n = self._md.size
        # pieces: [above MD 0] + courses + [extension if descending]
        if n > 1:
            mono = (tz[:-1] >= 0) & (tz[1:] >= 0) & (np.maximum(tz[:-1], tz[1:]) > 0)
            lo, hi = self._course_tvd_range()
        else:
            mono = np.zeros(0, bool)
            lo = hi = np.zeros(0)
        count = np.zeros(z.size, int)
        bad = np.zeros(z.size, bool)
        piece = np.full(z.size, -2, int)  # -1 above, n-1 extension, else course index
        zz = z[ok]
        cnt = np.zeros(zz.size, int)
        pc = np.full(zz.size, -2, int)
        bd = np.zeros(zz.size, bool)
        first = zz <= zs[0]
        cnt += first
        pc[first] = -1
        for c in range(n - 1):
            if mono[c]:
                inside = (zz > zs[c]) & (zz <= zs[c + 1])
                cnt += inside
                pc[inside] = c
            else:
                bd |= (zz >= lo[c]) & (zz <= hi[c])
        if tz[-1] > 0:
            beyond = zz > zs[-1]
            cnt += beyond
            pc[beyond] = n - 1
        count[ok], piece[ok], bad[ok] = cnt, pc, bd
        wrong = ok & (bad | (count != 1))
        if np.any(wrong):
            j = int(np.flatnonzero(wrong)[0])
            zj = float(z[j])
            deepest = float(max(zs.max(), hi.max() if hi.size else zs.max()))
            if count[j] == 0 and not bad[j]:
                what = (f"TVD {zj:.3f} m is never reached by the well (deepest TVD "
                        f"{deepest:.3f} m; the last station does not point downwards)")
                fix = "extend the survey or ask only for TVDs the well reaches"
            else:
                flat = np.flatnonzero(~mono) if n > 1 else np.zeros(0, int)
                md_flat = float(self._md[flat[0]]) if flat.size else float(self._md[-1])
                what = (f"TVD {zj:.3f} m is reached where TVD is not increasing with MD "
                        f"(horizontal or upward section from MD {md_flat:.2f} m), so the MD "
                        "is not unique")
                fix = "convert this depth with the MD where it was picked instead of its TVD"
            raise self._err(what, fix=fix)
        # above MD 0 (vertical)
        sel = ok & (piece == -1)
        out[sel] = self._md[0] + (z[sel] - zs[0])
        sel = ok & (piece == n - 1)
        out[sel] = self._md[-1] + (z[sel] - zs[-1]) / tz[-1]
        sel = ok & (piece >= 0) & (piece < n - 1)
        if np.any(sel):
            out[sel] = self._solve_courses(piece[sel], z[sel])
        return float(out[0]) if shape == () else out.reshape(shape)

    def _solve_courses(self, c: NDArray[np.int_], z: NDArray[np.float64]) -> NDArray[np.float64]:
        """Safeguarded Newton for the fraction f in [0, 1] of course c with TVD z."""
        md1, dmd = self._md[c], self._dmd[c]
        z1, z2 = self._p[c, 2], self._p[c + 1, 2]
        lo = np.zeros(c.size)
        hi = np.ones(c.size)
        span = z2 - z1
        f = np.clip((z - z1) / np.where(span > 0, span, 1.0), 0.0, 1.0)
        for _ in range(60):
            pos, tan = self._locate(md1 + f * dmd)
            g = pos[:, 2] - z
            lo = np.where(g < 0, f, lo)
            hi = np.where(g > 0, f, hi)
            slope = tan[:, 2] * dmd
            with np.errstate(divide="ignore", invalid="ignore"):
                step = f - g / slope
            bisect = ~np.isfinite(step) | (step <= lo) | (step >= hi)
            f_new = np.where(g == 0, f, np.where(bisect, 0.5 * (lo + hi), step))
            done = np.abs(f_new - f) * dmd < 1e-10
            f = f_new
            if np.all(done | (g == 0)):
                break
        return md1 + f * dmd
