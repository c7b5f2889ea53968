"""The forward model's structure: dipping beds and planar faults with their displacement."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError, WellfaultWarning
from ..geo.geometry import bed_normal, fault_normal_up

__all__ = ["Beds", "PlanarFault"]


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
