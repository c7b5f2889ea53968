"""Forward model: what a well would log through planar dipping beds cut by planar faults.

The model (DESIGN.md section 4, "Synthetic wells"): a reference column with a type log, planar
beds (``s(P) = n . P + origin``), planar faults each with a rigid slip vector, and a trajectory.
For every MD sample the point is moved back through each fault whose hanging wall holds it, its
stratigraphic position s is taken, mapped through an optional lateral thickness change onto the
reference column, and the type log is read there. The model returns the curves, the tops as a
geologist would pick them (repeats included) and the true fault cuts.

Frame and signs follow DEVELOPERS.md: (x, y, z) = (east, north, TVD down); bed normal n points
down-section; fault normal m points up into the hanging wall; Δs = s below the cut − s above;
MISSING when sign(Δs) = sign(r), r = t . n, REPEATED otherwise.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray

from .column import ReferenceColumn
from .errors import ColumnError, InputError, WellfaultWarning, input_error
from .geometry import bed_normal, fault_normal_up
from .units import DepthUnit, parse_depth_unit

__all__ = [
    "Beds",
    "PlanarFault",
    "SyntheticWell",
    "simulate_well",
    "synthetic_column",
    "column_from_real_curve",
    "TRUTH_COLUMNS",
    "BEYOND_COLUMN",
    "MODEL_DATUMS",
    "LITHOLOGY_CURVES",
]

#: How the type log is read beyond its ends: hold the end value, or reflect the log.
BEYOND_COLUMN = ("clip", "mirror")
#: Vertical datum of the model (beds and faults): the well's depth reference, or sea level.
MODEL_DATUMS = ("reference", "sea level")

#: Columns of :attr:`SyntheticWell.cuts`, in order.
TRUTH_COLUMNS = (
    "well", "md_m", "md_first_below_m", "tvd_m", "tvdss_m", "x_m", "y_m", "fault", "fault_name",
    "delta_s_m", "s_above_m", "s_below_m", "tst_m", "vertical_separation_m", "section",
    "fault_type", "crossing", "r", "surface_above", "surface_below",
)


def _as_point(v: object, what: str) -> tuple[float, float, float]:
    try:
        a = tuple(float(x) for x in v)  # type: ignore[union-attr]
    except (TypeError, ValueError):
        raise InputError(f"{what} must be three numbers (east, north, down) in metres "
                         f"(got {v!r})") from None
    if len(a) != 3 or not all(math.isfinite(x) for x in a):
        raise InputError(f"{what} must be three finite numbers (east, north, down) in metres "
                         f"(got {v!r})")
    return a  # type: ignore[return-value]


def _check_attitude(dip: float, azi: float, what: str, *, allow_zero: bool) -> tuple[float, float]:
    dip, azi = float(dip), float(azi)
    lo_ok = dip >= 0.0 if allow_zero else dip > 0.0
    if not (lo_ok and dip <= 90.0 and math.isfinite(azi)):
        raise InputError(
            f"{what}: dip {dip:g} deg / azimuth {azi:g} deg is not a valid attitude; give dip in "
            f"{'[0' if allow_zero else '(0'}, 90] and a finite dip azimuth (degrees from north)"
        )
    return dip, azi % 360.0


# ---------------------------------------------------------------------------------- beds
@dataclass(frozen=True)
class Beds:
    """Planar, parallel beds: stratigraphic position ``s(P) = n . P + origin_s_m``.

    Parameters
    ----------
    dip_deg, dip_azimuth_deg : float
        Bedding attitude. [°]
    origin_s_m : float
        s at the frame origin (x = y = 0, TVD 0 below the depth reference). [m TST]

    Notes
    -----
    n is the down-section bed normal of DESIGN.md section 2; s grows down-section and is the TST
    from the column top (s = n . ΔP for planar beds, TST from coordinates, Berg 2012, as quoted in
    reference/methods.md section 2).

    Examples
    --------
    >>> Beds(0.0, 0.0, origin_s_m=-1000.0).s([[0.0, 0.0, 1250.0]]).tolist()
    [250.0]
    """

    dip_deg: float = 0.0
    dip_azimuth_deg: float = 0.0
    origin_s_m: float = 0.0

    def __post_init__(self) -> None:
        dip, azi = _check_attitude(self.dip_deg, self.dip_azimuth_deg, "beds", allow_zero=True)
        object.__setattr__(self, "dip_deg", dip)
        object.__setattr__(self, "dip_azimuth_deg", azi)
        object.__setattr__(self, "origin_s_m", float(self.origin_s_m))

    @property
    def normal(self) -> NDArray[np.float64]:
        """Down-section unit normal n (east, north, down)."""
        return bed_normal(self.dip_deg, self.dip_azimuth_deg)

    def s(self, points: ArrayLike) -> NDArray[np.float64]:
        """Stratigraphic position of points (N, 3) of (x, y, tvd). [m TST]"""
        p = np.asarray(points, dtype=float).reshape(-1, 3)
        return p @ self.normal + self.origin_s_m

    @classmethod
    def through(cls, dip_deg: float, dip_azimuth_deg: float, point: ArrayLike,
                s_m: float) -> Beds:
        """Beds with position ``s_m`` at ``point`` (e.g. a surface's top at a known TVD)."""
        n = bed_normal(*_check_attitude(dip_deg, dip_azimuth_deg, "beds", allow_zero=True))
        p = np.asarray(_as_point(point, "beds point"))
        return cls(dip_deg, dip_azimuth_deg, float(s_m) - float(n @ p))


# ---------------------------------------------------------------------------------- faults
@dataclass(frozen=True)
class PlanarFault:
    """A planar fault with a rigid displacement of its hanging wall.

    Parameters
    ----------
    dip_deg, dip_azimuth_deg : float
        Fault attitude; dip in (0, 90]. [°]
    point : (x, y, z)
        Any point of the fault plane (east, north, TVD). [m]
    slip : (ux, uy, uz)
        Displacement of the hanging wall relative to the footwall (east, north, down). [m]
    name : str
        Label used in truth tables.

    Notes
    -----
    The hanging wall is the side ``m . (P - point) > 0`` with ``m = (sin θ sin β, sin θ cos β,
    -cos θ)`` the upward fault normal (DEVELOPERS.md, DESIGN.md section 3). The slip should lie in
    the plane (``m . slip = 0``); a slip off the plane opens or overlaps the blocks and is warned
    about. For a vertical fault (θ = 90°) the hanging wall is the side the dip azimuth points to.
    """

    dip_deg: float
    dip_azimuth_deg: float
    point: tuple[float, float, float]
    slip: tuple[float, float, float]
    name: str = ""

    def __post_init__(self) -> None:
        label = f"fault {self.name!r}" if self.name else "fault"
        dip, azi = _check_attitude(self.dip_deg, self.dip_azimuth_deg, label, allow_zero=False)
        object.__setattr__(self, "dip_deg", dip)
        object.__setattr__(self, "dip_azimuth_deg", azi)
        object.__setattr__(self, "point", _as_point(self.point, f"{label} point"))
        object.__setattr__(self, "slip", _as_point(self.slip, f"{label} slip"))
        object.__setattr__(self, "name", str(self.name))
        u = np.asarray(self.slip)
        size = float(np.linalg.norm(u))
        if size > 0 and abs(float(self.normal_up @ u)) > 1e-6 * size:
            import warnings

            warnings.warn(
                f"{label}: slip {self.slip} is not in the fault plane (m.u = "
                f"{float(self.normal_up @ u):.3g} m); the blocks will gap or overlap",
                WellfaultWarning, stacklevel=3,
            )

    @property
    def normal_up(self) -> NDArray[np.float64]:
        """Upward unit normal m, pointing into the hanging wall (east, north, down)."""
        return fault_normal_up(self.dip_deg, self.dip_azimuth_deg)

    @property
    def down_dip(self) -> NDArray[np.float64]:
        """Unit vector down the fault's dip line (east, north, down)."""
        t, b = math.radians(self.dip_deg), math.radians(self.dip_azimuth_deg)
        return np.array([math.cos(t) * math.sin(b), math.cos(t) * math.cos(b), math.sin(t)])

    @property
    def throw_m(self) -> float:
        """Throw: vertical component of the slip, positive when the hanging wall went down. [m]"""
        return float(self.slip[2])

    def side(self, points: ArrayLike) -> NDArray[np.float64]:
        """Signed distance ``m . (P - point)`` of points (N, 3): > 0 in the hanging wall. [m]"""
        p = np.asarray(points, dtype=float).reshape(-1, 3)
        return (p - np.asarray(self.point)) @ self.normal_up

    def in_hanging_wall(self, points: ArrayLike) -> NDArray[np.bool_]:
        """True for points strictly on the hanging-wall side."""
        return self.side(points) > 0.0

    def separation(self, beds: Beds) -> str:
        """Separation sense for these beds: ``"normal"`` when the hanging wall moved down-section
        relative to the beds (``n . u > 0``: younger on older), ``"reverse"`` when up,
        ``"undetermined"`` when ``n . u = 0`` (DESIGN.md section 3, Δs = c (n . u))."""
        nu = float(beds.normal @ np.asarray(self.slip))
        if abs(nu) < 1e-12:
            return "undetermined"
        return "normal" if nu > 0 else "reverse"

    @classmethod
    def dip_slip(cls, dip_deg: float, dip_azimuth_deg: float, point: ArrayLike, throw_m: float,
                 kind: str = "normal", *, name: str = "") -> PlanarFault:
        """A pure dip-slip fault with the given throw (vertical component of the slip).

        The net slip is ``throw / sin θ`` along the dip line (Groshong 2006, ch. 8: throw is the
        vertical component of the dip separation; reference/methods.md section 3.1). ``kind``
        ``"normal"`` moves the hanging wall down the dip line, ``"reverse"`` up it.
        """
        return cls.from_pitch(dip_deg, dip_azimuth_deg, point, throw_m, 90.0, kind, name=name)

    @classmethod
    def from_pitch(cls, dip_deg: float, dip_azimuth_deg: float, point: ArrayLike, throw_m: float,
                   rhr_pitch_deg: float, kind: str = "normal", *, name: str = "") -> PlanarFault:
        """A fault whose slip line has the given pitch (rake) in the fault plane.

        Parameters
        ----------
        rhr_pitch_deg : float
            Angle in the fault plane from the right-hand-rule strike direction (β − 90) to the
            slip line, measured down toward the dip direction, in (0, 180). 90 is dip slip. [°]
        throw_m : float
            Throw (vertical component of the net slip), > 0. [m]
        kind : {"normal", "reverse"}
            The hanging wall moves down (normal) or up (reverse) the slip line.

        Notes
        -----
        Slip line l = cos p · strike + sin p · down-dip; net slip S = T / (sin θ sin p)
        (reference/methods.md section 4.3: 060/60, pitch 70 from the NE end, T 100 gives
        S = 122.881 on a line plunging 54.469 toward 113.948).
        """
        label = f"fault {name!r}" if name else "fault"
        dip, azi = _check_attitude(dip_deg, dip_azimuth_deg, label, allow_zero=False)
        kinds = ("normal", "reverse")
        if kind not in kinds:
            raise InputError(f"{label}: unknown kind {kind!r}; use one of {', '.join(kinds)}")
        p = float(rhr_pitch_deg)
        if not 0.0 < p < 180.0:
            raise InputError(f"{label}: pitch {p:g} deg outside (0, 180); give the right-hand-"
                             "rule pitch from the strike direction (90 = dip slip)")
        if not (float(throw_m) > 0 and math.isfinite(float(throw_m))):
            raise InputError(f"{label}: throw must be a positive number of metres "
                             f"(got {throw_m!r}); choose the sense with kind=")
        t, b = math.radians(dip), math.radians(azi)
        strike = np.array([-math.cos(b), math.sin(b), 0.0])
        down_dip = np.array([math.cos(t) * math.sin(b), math.cos(t) * math.cos(b), math.sin(t)])
        pr = math.radians(p)
        line = math.cos(pr) * strike + math.sin(pr) * down_dip
        net = float(throw_m) / (math.sin(t) * math.sin(pr))
        slip = net * line * (1.0 if kind == "normal" else -1.0)
        return cls(dip, azi, _as_point(point, f"{label} point"), tuple(slip.tolist()), name)


# ---------------------------------------------------------------------------------- model
def _restore(points: NDArray[np.float64], faults: Sequence[PlanarFault],
             member: NDArray[np.bool_] | None = None):
    """Move points back through each fault whose hanging wall holds them, in list order.

    Returns the restored points and the (N, F) hanging-wall membership used. With ``member``
    given, that membership is applied instead of being tested.
    """
    q = np.array(points, dtype=float, copy=True).reshape(-1, 3)
    mem = np.zeros((len(q), len(faults)), dtype=bool) if member is None else member
    for k, f in enumerate(faults):
        if member is None:
            mem[:, k] = (q - np.asarray(f.point)) @ f.normal_up > 0.0
        q[mem[:, k]] -= np.asarray(f.slip)
    return q, mem


class _ThicknessMap:
    """Piecewise-linear map between local (laterally thickened) s and reference-column s.

    Local unit i has thickness ``f_i h_i``; above the column top, and below a defined base, the
    map has slope 1; an open last unit keeps its factor down to infinity.
    """

    def __init__(self, column: ReferenceColumn, factors: object) -> None:
        ref = np.asarray(column.s_m, dtype=float)
        f = _factor_array(column, factors)
        base = column.base_s_m
        ref_knots = ref if math.isnan(base) else np.append(ref, base)
        th = np.diff(ref_knots)
        loc_knots = ref_knots[0] + np.concatenate([[0.0], np.cumsum(th * f[: len(th)])])
        self.ref = ref_knots
        self.loc = loc_knots
        self.f = f
        self.tail = float(f[-1]) if math.isnan(base) else 1.0
        self.identity = bool(np.all(f == 1.0))

    def to_reference(self, s_local: NDArray[np.float64]) -> NDArray[np.float64]:
        if self.identity:
            return np.asarray(s_local, dtype=float)
        s = np.asarray(s_local, dtype=float)
        out = np.interp(s, self.loc, self.ref)
        lo, hi = s < self.loc[0], s > self.loc[-1]
        out[lo] = self.ref[0] + (s[lo] - self.loc[0])
        out[hi] = self.ref[-1] + (s[hi] - self.loc[-1]) / self.tail
        return out


def _factor_array(column: ReferenceColumn, factors: object) -> NDArray[np.float64]:
    n = len(column)
    if factors is None:
        return np.ones(n)
    if isinstance(factors, Mapping):
        f = np.ones(n)
        for name, v in factors.items():
            f[column.index(name)] = float(v)
    else:
        f = np.asarray(factors, dtype=float).reshape(-1)
        if len(f) != n:
            raise ColumnError(f"thickness_factors has {len(f)} values for {n} units of "
                              f"{column.name!r}; give one per unit or a {{surface: factor}} map")
    if not np.all(np.isfinite(f) & (f > 0)):
        bad = int(np.flatnonzero(~(np.isfinite(f) & (f > 0)))[0])
        raise ColumnError(f"thickness factor for unit {column.names[bad]!r} must be a positive "
                          f"number (got {f[bad]}); 1 keeps the reference thickness")
    return f


def _per_curve(value: object, curve: str, what: str) -> float:
    if isinstance(value, Mapping):
        return float(value.get(curve, 0.0 if what == "noise_std" else
                               (1.0 if what == "gain" else 0.0)))
    return float(value)  # type: ignore[arg-type]


def _read_type_log(grid: NDArray[np.float64], values: NDArray[np.float64],
                   s: NDArray[np.float64], beyond: str) -> NDArray[np.float64]:
    if beyond == "mirror":
        lo, hi = grid[0], grid[-1]
        length = hi - lo
        u = np.mod(s - lo, 2.0 * length)
        s = lo + length - np.abs(u - length)
    return np.interp(s, grid, values)


@dataclass
class SyntheticWell:
    """What :func:`simulate_well` returns.

    Attributes
    ----------
    well : Well
        Curves indexed by ``md_m`` with the header facts.
    tops : DataFrame
        ``well, surface, md_m``: every surface crossing as picked (repeats included), by MD.
    cuts : DataFrame
        The true fault cuts, columns :data:`TRUTH_COLUMNS` (see :func:`simulate_well`).
    trajectory : Trajectory
    s_m : ndarray
        Reference-column s at every MD sample (after faults and thickness change). [m TST]
    """

    well: object
    tops: pd.DataFrame
    cuts: pd.DataFrame
    trajectory: object
    s_m: NDArray[np.float64]
    column: ReferenceColumn | None = None
    beds: Beds | None = None
    faults: tuple[PlanarFault, ...] = field(default_factory=tuple)

    @property
    def name(self) -> str:
        return str(getattr(self.well, "name", ""))

    def to_files(self, folder: str | Path, *, depth_unit: DepthUnit | str | None = None,
                 stem: str | None = None) -> dict[str, Path]:
        """Write ``<stem>.las``, ``<stem>_tops.csv`` and ``<stem>_survey.csv`` into ``folder``.

        Lengths are written in ``depth_unit`` (default: the well's ``depth_unit``), with the unit
        in the LAS header and in the CSV column names (``md_ft``). Returns the paths by kind.
        """
        from .io import write_las, write_survey, write_tops

        unit = parse_depth_unit(depth_unit if depth_unit is not None
                                else getattr(self.well, "depth_unit", "m"))
        folder = Path(folder)
        folder.mkdir(parents=True, exist_ok=True)
        stem = stem or _file_stem(self.name)
        paths = {"las": folder / f"{stem}.las", "tops": folder / f"{stem}_tops.csv",
                 "survey": folder / f"{stem}_survey.csv"}
        write_las(self.well, paths["las"], depth_unit=unit)
        write_tops(self.tops, paths["tops"], depth_unit=unit)
        write_survey(self.trajectory.stations, paths["survey"],  # type: ignore[attr-defined]
                     depth_unit=unit)
        return paths


def _file_stem(name: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "_", name).strip("_") or "well"


def first_state_change(state: Callable[[float], np.ndarray], lo_md: float, hi_md: float,
                       lo_state: np.ndarray) -> tuple[float, float]:
    """Bisect ``[lo_md, hi_md]`` for the first MD where ``state(md)`` (which fault blocks the
    point is in) stops equalling ``lo_state``; returns (crossing MD, an MD just past it), to
    1e-9 m."""
    a, b = float(lo_md), float(hi_md)
    for _ in range(200):
        if b - a <= 1e-9:
            break
        c = 0.5 * (a + b)
        if np.array_equal(state(c), lo_state):
            a = c
        else:
            b = c
    return 0.5 * (a + b), b


def simulate_well(
    column: ReferenceColumn,
    beds: Beds,
    faults: Sequence[PlanarFault],
    trajectory: object | None,
    *,
    md_top_m: float,
    md_base_m: float,
    md_step_m: float = 0.1524,
    curves: Iterable[str] = ("GR",),
    thickness_factors: Mapping[str, float] | Sequence[float] | None = None,
    noise_std: float | Mapping[str, float] = 0.0,
    gain: float | Mapping[str, float] = 1.0,
    offset: float | Mapping[str, float] = 0.0,
    unpicked: Iterable[str] = (),
    pick_noise_m: float = 0.0,
    seed: int | None = None,
    name: str = "SYN-1",
    beyond: str = "clip",
    depth_unit: DepthUnit | str = "m",
    ref_name: str = "KB",
    datum: str = "reference",
) -> SyntheticWell:
    """Draw the logs, picked tops and true fault cuts of a well through a faulted model.

    Parameters
    ----------
    column : ReferenceColumn
        Surfaces and type log (needed when ``curves`` is not empty).
    beds : Beds
        Bedding attitude and position: ``s = n . P + origin`` before faulting.
    faults : sequence of PlanarFault
        Faults, undone in the order given: list the YOUNGEST first. Each later fault's plane is
        read in the coordinates restored by the earlier ones (for faults that do not intersect
        in the modelled volume the order does not matter).
    trajectory : Trajectory or None
        Well path (None: vertical at x = y = 0). Its surface location and reference elevation
        become the well's header facts.
    md_top_m, md_base_m, md_step_m : float
        Sampled MD interval and step; samples at ``md_top_m + k * md_step_m``. [m]
    curves : iterable of str
        Type-log curves to draw.
    thickness_factors : mapping or sequence, optional
        Lateral change of unit thickness at this well: local TST of unit i = factor × reference
        (e.g. 0.85-1.15). Beds.s is the LOCAL position; it is mapped onto the reference column.
    noise_std, gain, offset : float or {curve: float}
        Measurement model ``value = gain * type_log + offset + N(0, noise_std²)``.
    unpicked : iterable of str
        Surfaces the geologist did not pick (omitted from ``tops``).
    pick_noise_m : float
        Standard deviation of Gaussian MD error added to every pick. [m]
    seed : int, optional
        Seed of the one random generator used (curve noise in curve order, then pick noise).
    name : str
        Well name.
    beyond : {"clip", "mirror"}
        Reading the type log beyond its ends: ``"clip"`` holds the end value (cannot fake a
        section); ``"mirror"`` reflects the log at its ends (keeps texture).
    depth_unit : DepthUnit or str
        The well's file unit (used when writing files); the curves stay in metres.
    ref_name : str
        Name of the well's depth reference (``"KB"``, ``"DF"``, ...).
    datum : {"reference", "sea level"}
        Vertical datum of the beds' and faults' z: the well's depth reference (TVD, default), or
        sea level (TVDSS = TVD − the trajectory's ``ref_elevation_m``), which lets one model
        serve wells with different KB elevations.

    Returns
    -------
    SyntheticWell

    Notes
    -----
    * Restoration: for each sample P and each fault in order, if ``m . (P - point) > 0``
      (hanging wall) then ``P <- P - slip``; then ``s = n . P + origin`` (DESIGN.md section 4).
    * A truth cut is where the set of hanging walls holding the point changes. Its MD is found by
      bisection along the arc between the two samples (to 1e-9 m); the jump is
      ``Δs = s_below - s_above`` from the restored crossing point with the memberships of either
      side, in reference-column TST. It equals ``c (n . u)`` (c = +1 hanging wall → footwall)
      without thickness change (DESIGN.md section 3; reference/methods.md section 3.3).
      ``section`` follows the rule of reference/methods.md section 3.4 with ``r = t . n`` at the
      crossing; ``fault_type`` is the separation sense (``c Δs > 0`` normal); ``crossing`` is +1
      hanging wall → footwall, −1 footwall → hanging wall for the fault whose plane is crossed
      (``fault``: its index in ``faults``); ``md_first_below_m`` is the first sample below (the
      reporting convention of DEVELOPERS.md); ``vertical_separation_m = |Δs| / cos δ``
      (Groshong 2006, eq. 7.3); ``surface_above``/``surface_below`` name the units on either
      side.
    * A top is where the well's s crosses a surface's s between two samples that are not
      separated by a cut (the cut points are inserted in the sequence); its MD is interpolated
      linearly in MD between them (exact on straight hole, within ~1e-5 m on a 3°/30 m build at
      a 0.15 m step).
    """
    from .trajectory import Trajectory
    from .well import Well

    if beyond not in BEYOND_COLUMN:
        raise InputError(f"beyond={beyond!r} is not known; use one of {', '.join(BEYOND_COLUMN)}")
    if datum not in MODEL_DATUMS:
        raise InputError(f"datum={datum!r} is not known; use one of {', '.join(MODEL_DATUMS)}")
    faults = tuple(faults)
    for f in faults:
        if not isinstance(f, PlanarFault):
            raise InputError(f"faults must be PlanarFault objects (got {type(f).__name__})")
    top, base, step = float(md_top_m), float(md_base_m), float(md_step_m)
    if not (math.isfinite(top) and math.isfinite(base) and base > top and step > 0):
        raise input_error("MD interval must have md_base_m > md_top_m and md_step_m > 0",
                          source=f"well {name!r}", value=(top, base, step),
                          fix="give a positive step and an interval going down-hole")
    if trajectory is None:
        trajectory = Trajectory.vertical(name=name)
    dz = 0.0
    if datum == "sea level":
        elev = getattr(trajectory, "ref_elevation_m", None)
        if elev is None:
            raise InputError(f"well {name!r}: datum='sea level' needs the trajectory's "
                             "ref_elevation_m (elevation of the depth reference); give it")
        dz = float(elev)

    def model_position(m_: ArrayLike) -> NDArray[np.float64]:
        p_ = np.array(trajectory.position(m_), dtype=float)  # type: ignore[attr-defined]
        p_[:, 2] -= dz
        return p_
    curves = tuple(curves)
    if curves:
        if column.type_log is None:
            raise ColumnError(f"{column.name}: no type log to draw curves {list(curves)} from; "
                              "attach one with with_type_log() or pass curves=()")
        missing = [c for c in curves if c not in column.type_log.columns]
        if missing:
            raise ColumnError(f"{column.name}: type log has no curve(s) {missing}; available: "
                              f"{', '.join(map(str, column.type_log.columns))}")
    unpicked = {str(u) for u in unpicked}
    for u in sorted(unpicked):
        column.index(u)  # raises with the valid names
    tmap = _ThicknessMap(column, thickness_factors)
    n_vec = beds.normal

    nsamp = int(math.floor((base - top) / step + 1e-9)) + 1
    md = top + step * np.arange(nsamp)
    q, mem = _restore(model_position(md), faults)
    s_loc = q @ n_vec + beds.origin_s_m
    s_ref = tmap.to_reference(s_loc)

    # ---- truth cuts: changes of hanging-wall membership between samples
    cut_rows = []
    jumps: list[tuple[int, float, float, float]] = []  # (sample i, md, s_above, s_below)
    changed = np.flatnonzero(np.any(mem[1:] != mem[:-1], axis=1)) if faults else np.zeros(0, int)

    def state(m_: float):
        return _restore(model_position([m_]), faults)[1][0]

    for i in changed:
        lo_md, hi_md = float(md[i]), float(md[i + 1])
        lo_state, end_state = mem[i].copy(), mem[i + 1].copy()
        while not np.array_equal(lo_state, end_state):
            c_md, b = first_state_change(state, lo_md, hi_md, lo_state)
            b_state = state(b)
            p_c = model_position([c_md])
            q_above = _restore(p_c, faults, lo_state[None, :].copy())[0]
            q_below = _restore(p_c, faults, b_state[None, :].copy())[0]
            loc_above = float((q_above @ n_vec)[0] + beds.origin_s_m)
            loc_below = float((q_below @ n_vec)[0] + beds.origin_s_m)
            s_above = float(tmap.to_reference(np.array([loc_above]))[0])
            s_below = float(tmap.to_reference(np.array([loc_below]))[0])
            k = int(np.flatnonzero(lo_state != b_state)[0])
            crossing = 1 if lo_state[k] else -1
            t_c = np.asarray(trajectory.tangent([c_md]),  # type: ignore[attr-defined]
                             dtype=float)[0]
            r = float(t_c @ n_vec)
            ds = s_below - s_above
            if ds == 0.0 or abs(r) < 1e-12:
                section = "undetermined"
            else:
                section = "missing" if (ds > 0) == (r > 0) else "repeated"
            fault_type = ("undetermined" if ds == 0.0
                          else ("normal" if crossing * ds > 0 else "reverse"))
            tvd_c = float(p_c[0, 2]) + dz
            ref_el = getattr(trajectory, "ref_elevation_m", None)
            first_below = float(md[i + 1])
            cut_rows.append({
                "well": name, "md_m": c_md, "md_first_below_m": first_below,
                "tvd_m": tvd_c,
                "tvdss_m": (tvd_c - ref_el) if ref_el is not None else math.nan,
                "x_m": float(p_c[0, 0]), "y_m": float(p_c[0, 1]), "fault": k,
                "fault_name": faults[k].name, "delta_s_m": ds, "s_above_m": s_above,
                "s_below_m": s_below, "tst_m": abs(ds),
                "vertical_separation_m": abs(ds) / math.cos(math.radians(beds.dip_deg))
                if beds.dip_deg < 90 else math.inf,
                "section": section, "fault_type": fault_type, "crossing": crossing, "r": r,
                "surface_above": column.unit_at(s_above), "surface_below": column.unit_at(s_below),
            })
            jumps.append((int(i), c_md, loc_above, loc_below))
            lo_md, lo_state = b, b_state
    cuts = pd.DataFrame(cut_rows, columns=list(TRUTH_COLUMNS))
    if len(cuts):
        cuts = cuts.astype({"fault": int, "crossing": int})

    # ---- tops: crossings of surfaces on the sample sequence with the cut points inserted,
    # found in local s (linear along the hole) against the surfaces' local positions
    md_aug, s_aug, is_jump = _augment(md, s_loc, jumps)
    picks_md: list[float] = []
    picks_name: list[str] = []
    s0, s1 = s_aug[:-1], s_aug[1:]
    m0, m1 = md_aug[:-1], md_aug[1:]
    ok = ~is_jump
    for nm, sk in zip(column.names, tmap.loc[: len(column)]):
        if nm in unpicked:
            continue
        hit = ok & (((s0 < sk) & (s1 >= sk)) | ((s1 < sk) & (s0 >= sk)))
        for j in np.flatnonzero(hit):
            frac = (sk - s0[j]) / (s1[j] - s0[j])
            picks_md.append(float(m0[j] + frac * (m1[j] - m0[j])))
            picks_name.append(nm)

    rng = np.random.default_rng(seed)
    # ---- curves
    data: dict[str, NDArray[np.float64]] = {}
    if curves:
        tl = column.type_log
        grid = tl.index.to_numpy(dtype=float)  # type: ignore[union-attr]
        for c in curves:
            values = tl[c].to_numpy(dtype=float)  # type: ignore[index]
            v = _read_type_log(grid, values, s_ref, beyond)
            v = _per_curve(gain, c, "gain") * v + _per_curve(offset, c, "offset")
            sd = _per_curve(noise_std, c, "noise_std")
            if sd > 0:
                v = v + rng.normal(0.0, sd, size=v.shape)
            data[c] = v
    if pick_noise_m > 0 and picks_md:
        picks_md = list(np.asarray(picks_md) + rng.normal(0.0, float(pick_noise_m),
                                                          size=len(picks_md)))
    tops = pd.DataFrame({"well": [name] * len(picks_md), "surface": picks_name,
                         "md_m": np.asarray(picks_md, dtype=float)})
    tops = tops.sort_values("md_m", kind="stable").reset_index(drop=True)

    well = Well(
        name=name,
        curves=pd.DataFrame(data, index=pd.Index(md, name="md_m")),
        depth_unit=parse_depth_unit(depth_unit),
        ref_elevation_m=getattr(trajectory, "ref_elevation_m", None),
        ref_name=ref_name,
        x_m=getattr(trajectory, "x0_m", 0.0),
        y_m=getattr(trajectory, "y0_m", 0.0),
        source="<synthetic>",
    )
    return SyntheticWell(well=well, tops=tops, cuts=cuts, trajectory=trajectory, s_m=s_ref,
                         column=column, beds=beds, faults=faults)


def _augment(md: NDArray[np.float64], s: NDArray[np.float64],
             jumps: list[tuple[int, float, float, float]]):
    """Insert each cut as two points (md, s_above), (md, s_below) joined by a jump link."""
    if not jumps:
        return md, s, np.zeros(len(md) - 1, dtype=bool)
    md_parts, s_parts = [], []
    start = 0
    for i, c_md, s_a, s_b in sorted(jumps, key=lambda j: j[1]):
        md_parts.append(md[start:i + 1])
        s_parts.append(s[start:i + 1])
        md_parts.append(np.array([c_md, c_md]))
        s_parts.append(np.array([s_a, s_b]))
        start = i + 1
    md_parts.append(md[start:])
    s_parts.append(s[start:])
    md_aug = np.concatenate(md_parts)
    s_aug = np.concatenate(s_parts)
    is_jump = np.zeros(len(md_aug) - 1, dtype=bool)
    pos = 0
    for k, part in enumerate(md_parts):  # parts alternate: samples, pair, samples, pair, ...
        if k % 2 == 1:
            is_jump[pos] = True  # the link from s_above to s_below
        pos += len(part)
    return md_aug, s_aug, is_jump


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
