"""Slickenline pitch -> slip line, net slip from throw, and Rickard's (1972) slip classes.

Conventions (DEVELOPERS.md): degrees; planes as dip / dip azimuth; right-hand-rule (RHR)
strike = dip azimuth - 90. A pitch (rake) measured in the fault plane from a named end of the
strike line, e.g. ``"50/200"`` = 50 deg from the end of the strike line whose azimuth is 200, is
converted to the RHR pitch r in [0, 180] measured from the RHR strike direction; the slip line is
then v = cos r * s + sin r * d (s: RHR strike unit vector, d: down-dip unit vector), the
down-plunging sense of the line.
"""

from __future__ import annotations

import re
from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import input_error

__all__ = [
    "parse_pitch",
    "rhr_pitch",
    "slip_line",
    "net_slip",
    "NetSlip",
    "classify_pitch",
    "hanging_wall_rake",
    "PITCH_CLASSES",
    "DEFAULT_END_TOLERANCE_DEG",
]

#: How far [deg] the azimuth named in a pitch may be from one end of the fault's strike line.
DEFAULT_END_TOLERANCE_DEG = 20.0

#: Rickard (1972) classes by pitch of the slip line (acute angle from strike) [deg].
PITCH_CLASSES = (("strike-slip", 0.0, 10.0), ("oblique", 10.0, 80.0), ("dip-slip", 80.0, 90.0))

_NUM = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)"
_PITCH = re.compile(rf"^\s*({_NUM})\s*(?:/|from)\s*({_NUM})\s*$", re.IGNORECASE)

def _f(x: ArrayLike) -> NDArray[np.float64]:
    return np.asarray(x, dtype=float)


def _first(x: ArrayLike, mask: NDArray[np.bool_]) -> float:
    """First value of ``x`` (broadcast to ``mask``) where ``mask`` is true."""
    return float(np.broadcast_to(_f(x), mask.shape)[mask].ravel()[0])


def _angle_between_azimuths(a, b):
    return np.abs((_f(a) - _f(b) + 180.0) % 360.0 - 180.0)


def parse_pitch(
    text: str,
    *,
    fault_dip_azimuth_deg: float | None = None,
    tolerance_deg: float = DEFAULT_END_TOLERANCE_DEG,
    source: object = None,
) -> tuple[float, float]:
    """Parse a pitch written ``pitch/from-azimuth`` (``"50/200"``, also ``"50 from 200"``).

    Parameters
    ----------
    text : str
        Pitch 0-180 [deg] and the azimuth of the end of the strike line it is measured from
        [deg, 0-360].
    fault_dip_azimuth_deg : float, optional
        When given, the named end is checked against the fault's strike line (see
        :func:`rhr_pitch`).
    tolerance_deg : float
        Allowed difference between the named azimuth and an end of the strike line. [deg]
    source : object, optional
        Where the text came from, for messages.

    Returns
    -------
    pitch_deg, from_azimuth_deg : float

    Raises
    ------
    InputError
        For text not of that form, values out of range, or (with a fault given) an azimuth that
        is not an end of the fault's strike line.

    Examples
    --------
    >>> parse_pitch("50/200")
    (50.0, 200.0)
    """
    form = ("expected pitch/from-azimuth, e.g. 50/200 = 50 deg measured in the fault plane from "
            "the end of the strike line pointing to 200")
    m = _PITCH.match(str(text))
    if not m:
        raise input_error("cannot read the slickenline pitch", source=source, value=str(text),
                          fix=form)
    pitch, end = float(m.group(1)), float(m.group(2))
    if not 0.0 <= pitch <= 180.0:
        raise input_error("pitch outside 0-180 deg", source=source, value=str(text), fix=form)
    if not 0.0 <= end <= 360.0:
        raise input_error("azimuth of the strike-line end outside 0-360 deg", source=source,
                          value=str(text), fix=form)
    end %= 360.0
    if fault_dip_azimuth_deg is not None:
        rhr_pitch(pitch, end, fault_dip_azimuth_deg=fault_dip_azimuth_deg,
                  tolerance_deg=tolerance_deg, source=source)
    return pitch, end


def rhr_pitch(
    pitch_deg: ArrayLike,
    from_azimuth_deg: ArrayLike,
    *,
    fault_dip_azimuth_deg: ArrayLike,
    tolerance_deg: float = DEFAULT_END_TOLERANCE_DEG,
    source: object = None,
) -> NDArray[np.float64]:
    """Convert a pitch measured from a named strike-line end to the right-hand-rule pitch.

    Parameters
    ----------
    pitch_deg : array_like
        Pitch from the named end, 0-180. [deg]
    from_azimuth_deg : array_like
        Azimuth of the end of the strike line it is measured from. [deg]
    fault_dip_azimuth_deg : array_like
        Fault dip azimuth; RHR strike = dip azimuth - 90. [deg]
    tolerance_deg : float
        The named azimuth must lie within this of one end of the strike line. [deg]
    source : object, optional
        For messages.

    Returns
    -------
    ndarray
        RHR pitch r in [0, 180]: r = p from the RHR-strike end, 180 - p from the opposite end.
        [deg]

    Raises
    ------
    InputError
        When the named azimuth is not an end of the strike line: "50 from 200" and "50 from
        020" are different lines on the same fault, and an azimuth far from both ends is most
        likely a dip direction or a typing error.

    References
    ----------
    .. [1] Rickard, M.J. (1972) "Fault classification: discussion", Geological Society of
       America Bulletin 83, 2545-2546 (pitch with the end it is measured from, e.g. P60N).
    .. [2] Nelson, E., rake to trend/plunge calculator (RHR strike, rake 0-180), Colorado School
       of Mines.

    Examples
    --------
    >>> float(rhr_pitch(50, 200, fault_dip_azimuth_deg=290)), float(rhr_pitch(
    ...     50, 20, fault_dip_azimuth_deg=290))
    (50.0, 130.0)
    """
    p = _f(pitch_deg)
    strike = (_f(fault_dip_azimuth_deg) - 90.0) % 360.0
    off = _angle_between_azimuths(from_azimuth_deg, strike)
    same = off <= tolerance_deg
    opposite = off >= 180.0 - tolerance_deg
    bad = np.asarray(~(same | opposite))
    if bad.any():
        e, s = _first(from_azimuth_deg, bad), _first(strike, bad)
        raise input_error(
            f"pitch measured from azimuth {e:g} is not from an end of the fault's strike line "
            f"({s:03.0f}/{(s + 180) % 360:03.0f}, tolerance {tolerance_deg:g} deg)",
            source=source, value=e,
            fix=(f"name the end the pitch is measured from: '50 from {s:03.0f}' and "
                 f"'50 from {(s + 180) % 360:03.0f}' are different slip lines; check the fault "
                 "dip azimuth too"),
        )
    bad_p = np.asarray(~((p >= 0) & (p <= 180)))
    if bad_p.any():
        raise input_error("pitch outside 0-180 deg", source=source,
                          value=_first(p, bad_p),
                          fix="give the pitch measured in the fault plane from the named end")
    return np.where(same, p, 180.0 - p)


def slip_line(
    fault_dip_deg: ArrayLike, fault_dip_azimuth_deg: ArrayLike, rhr_pitch_deg: ArrayLike
) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
    """Trend and plunge of the slip line (its down-plunging sense).

    Parameters
    ----------
    fault_dip_deg, fault_dip_azimuth_deg : array_like
        Fault dip (0-90) and dip azimuth. [deg]
    rhr_pitch_deg : array_like
        Right-hand-rule pitch r, 0-180 (:func:`rhr_pitch`). [deg]

    Returns
    -------
    trend_deg, plunge_deg : ndarray
        plunge = asin(sin d sin r), trend = strike + atan2(sin r cos d, cos r), in [0, 360).
        [deg]

    References
    ----------
    .. [1] Nelson, E., rake to trend/plunge calculator, Colorado School of Mines
       (T = S + atan(tan R cos D), P = asin(sin D sin R)).

    Examples
    --------
    >>> [round(float(v), 1) for v in slip_line(30, 180, 40)]
    [126.0, 18.7]
    """
    d = _f(fault_dip_deg)
    bad = np.asarray(~((d >= 0) & (d <= 90)))
    if bad.any():
        raise input_error("fault dip outside 0-90 deg", value=_first(d, bad),
                          fix="give the fault as dip 0-90 and dip azimuth 0-360")
    d = np.radians(d)
    r = np.radians(_f(rhr_pitch_deg))
    strike = _f(fault_dip_azimuth_deg) - 90.0
    plunge = np.degrees(np.arcsin(np.clip(np.sin(d) * np.sin(r), -1.0, 1.0)))
    trend = (strike + np.degrees(np.arctan2(np.sin(r) * np.cos(d), np.cos(r)))) % 360.0
    return trend, plunge


class NetSlip(NamedTuple):
    """Result of :func:`net_slip`. [length]"""

    net_slip: NDArray[np.float64]
    """Length of the slip vector, S = T / (sin th sin r)."""
    dip_slip: NDArray[np.float64]
    """Component along the fault dip, S sin r = T / sin th."""
    strike_slip: NDArray[np.float64]
    """Component along strike, S cos r; positive toward the RHR strike for r < 90."""


def net_slip(throw: ArrayLike, *, fault_dip_deg: ArrayLike, rhr_pitch_deg: ArrayLike) -> NetSlip:
    """Net slip and its dip- and strike-slip parts from throw and slip-line pitch.

    Parameters
    ----------
    throw : array_like
        Throw T, the vertical component of the net slip. [length]
    fault_dip_deg : array_like
        Fault dip th, 0-90. [deg]
    rhr_pitch_deg : array_like
        Right-hand-rule pitch r of the slip line, 0-180. [deg]

    Returns
    -------
    NetSlip
        ``(net_slip, dip_slip, strike_slip)``: S = T / (sin th sin r), S sin r, S cos r (the
        strike-slip part is signed: positive when the down-plunging slip line points toward the
        RHR strike, r < 90). NaN where sin th sin r = 0 (a horizontal slip line or fault has no
        throw from which to find the slip).

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, ch. 8 (throw as
       the vertical component of slip).
    .. [2] Tearpock, D.J. and Bischke, R.E. (1990) Oil & Gas Journal (throw = vertical
       component of net slip).

    Examples
    --------
    >>> [round(float(v), 3) for v in net_slip(100, fault_dip_deg=60, rhr_pitch_deg=70)]
    [122.881, 115.47, 42.028]
    """
    th = np.radians(_f(fault_dip_deg))
    r = np.radians(_f(rhr_pitch_deg))
    den = np.sin(th) * np.sin(r)
    zero = np.abs(den) < 1e-12
    with np.errstate(divide="ignore", invalid="ignore"):
        s = np.where(zero, np.nan, _f(throw) / np.where(zero, 1.0, den))
    return NetSlip(s, s * np.sin(r), s * np.cos(r))


def classify_pitch(pitch_deg: ArrayLike) -> NDArray[np.str_] | str:
    """Rickard's (1972) slip class from the pitch of the slip line.

    Parameters
    ----------
    pitch_deg : array_like
        Pitch 0-180 from either end of the strike line (folded to the acute angle). [deg]

    Returns
    -------
    ndarray of str, or str for a scalar
        "dip-slip" for 80-90, "strike-slip" for 0-10, "oblique" between (boundaries inclusive
        to the dip-slip and strike-slip classes).

    Raises
    ------
    InputError
        For a pitch outside 0-180.

    References
    ----------
    .. [1] Rickard, M.J. (1972) "Fault classification: discussion", Geological Society of
       America Bulletin 83, 2545-2546.

    Examples
    --------
    >>> classify_pitch(85), classify_pitch(45), classify_pitch(175)
    ('dip-slip', 'oblique', 'strike-slip')
    """
    p = _f(pitch_deg)
    bad = np.asarray(~((p >= 0) & (p <= 180)))
    if bad.any():
        raise input_error("pitch outside 0-180 deg", value=_first(p, bad),
                          fix="give the pitch of the slip line measured from the strike line")
    acute = np.minimum(p, 180.0 - p)
    out = np.where(acute >= 80.0, "dip-slip",
                   np.where(acute <= 10.0, "strike-slip", "oblique")).astype("<U11")
    return str(out.reshape(())) if out.ndim == 0 else out


def hanging_wall_rake(rhr_pitch_deg: ArrayLike, *, sense: str) -> NDArray[np.float64]:
    """Aki-Richards rake of the hanging-wall motion from the RHR pitch and the slip sense.

    Parameters
    ----------
    rhr_pitch_deg : array_like
        RHR pitch r of the slip line, 0-180. [deg]
    sense : {"normal", "reverse"}
        Whether the hanging wall moved down ("normal") or up ("reverse") the slip line.

    Returns
    -------
    ndarray
        Rake in (-180, 180] [deg], measured in the fault plane from the RHR strike, positive up:
        0 left-lateral, +-180 right-lateral, +90 reverse, -90 normal. Normal: -r; reverse:
        180 - r.

    References
    ----------
    .. [1] Aki, K. and Richards, P.G. (1980) Quantitative Seismology, W.H. Freeman (rake
       convention).

    Examples
    --------
    >>> float(hanging_wall_rake(70, sense="normal"))
    -70.0
    """
    key = str(sense).strip().lower()
    r = _f(rhr_pitch_deg)
    if key == "normal":
        rake = -r
    elif key == "reverse":
        rake = 180.0 - r
    else:
        raise input_error("unknown slip sense", value=str(sense), fix="use 'normal' or 'reverse'")
    rake = (rake + 180.0) % 360.0 - 180.0
    return np.where(rake == -180.0, 180.0, rake) + 0.0
