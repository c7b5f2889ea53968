"""Thickness and separation equations: TST, TVT, stratigraphic and vertical separation, throw
and heave, apparent dip."""

from __future__ import annotations

from typing import NamedTuple

import numpy as np
from numpy.typing import ArrayLike, NDArray

from .geometry import _check_dip, _f, _safe_div, bed_normal, well_tangent

__all__ = [
    "stratigraphic_thickness",
    "stratigraphic_thickness_from_coordinates",
    "true_vertical_thickness",
    "stratigraphic_separation",
    "vertical_separation",
    "throw_and_heave",
    "ThrowHeave",
    "fault_dip_from_throw_and_heave",
    "apparent_dip",
    "bed_dip_in_fault_section",
]


# ----------------------------------------------------------------------------- thickness


def stratigraphic_thickness(
    md_interval: ArrayLike,
    *,
    inclination_deg: ArrayLike,
    azimuth_deg: ArrayLike,
    dip_deg: ArrayLike,
    dip_azimuth_deg: ArrayLike,
) -> NDArray[np.float64]:
    """Signed true stratigraphic thickness (TST) drilled along a straight hole segment.

    Parameters
    ----------
    md_interval : array_like
        Along-hole (MD) length of the segment. [any length unit; returned in the same]
    inclination_deg, azimuth_deg : array_like
        Borehole inclination from vertical and azimuth from north. [deg]
    dip_deg, dip_azimuth_deg : array_like
        Bed dip (0-90) and dip azimuth. [deg]

    Returns
    -------
    ndarray
        TST = MT (cos I cos d - sin I sin d cos(A - b)) = MT (t.n). Positive when the well
        cuts down-section (toward older beds), negative up-section (the sign convention of
        Bateman's calculator note: the well enters the bed from underneath). [length]

    Notes
    -----
    Straight segment, constant dip. For curved holes use
    :func:`stratigraphic_thickness_from_coordinates` on the trajectory's displacement.

    References
    ----------
    .. [1] Bateman, R.M. and Konen, C.E. (1979) The Log Analyst (TST/TVT equations), as given in
       Crain's Petrophysical Handbook, "True vertical and true stratigraphic thickness".
    .. [2] Berg, C.R. (2012) "Calculating true stratigraphic and true vertical thickness".
    .. [3] Tearpock, D.J. and Bischke, R.E. (2003) Applied Subsurface Geological Mapping with
       Structural Methods, 2nd ed., Prentice Hall.

    Examples
    --------
    >>> round(float(stratigraphic_thickness(100, inclination_deg=30, azimuth_deg=90,
    ...                                     dip_deg=20, dip_azimuth_deg=270)), 3)
    98.481
    """
    t = well_tangent(inclination_deg, azimuth_deg)
    n = bed_normal(dip_deg, dip_azimuth_deg)
    return _f(md_interval) * np.sum(t * n, axis=-1)


def stratigraphic_thickness_from_coordinates(
    d_east: ArrayLike,
    d_north: ArrayLike,
    d_tvd: ArrayLike,
    *,
    dip_deg: ArrayLike,
    dip_azimuth_deg: ArrayLike,
) -> NDArray[np.float64]:
    """Signed TST between two points of a (possibly curved) well, from their displacement.

    Parameters
    ----------
    d_east, d_north, d_tvd : array_like
        Displacement from the upper to the lower point (TVD positive down). [length]
    dip_deg, dip_azimuth_deg : array_like
        Bed dip (0-90) and dip azimuth. [deg]

    Returns
    -------
    ndarray
        TST = n.dP = dTVD cos d - (dN cos b + dE sin b) sin d; positive down-section. [length]

    References
    ----------
    .. [1] Berg, C.R. (2012) "Calculating true stratigraphic and true vertical thickness"
       (coordinate form recommended for curved holes).
    .. [2] Boak, J.M., "Depth and thickness conversion", AAPG Wiki (Development Geology Reference
       Manual, AAPG Methods in Exploration).
    """
    n = bed_normal(dip_deg, dip_azimuth_deg)
    return n[..., 0] * _f(d_east) + n[..., 1] * _f(d_north) + n[..., 2] * _f(d_tvd)


def true_vertical_thickness(tst: ArrayLike, *, dip_deg: ArrayLike) -> NDArray[np.float64]:
    """True vertical thickness from TST: TVT = TST / cos d (sign kept).

    Parameters
    ----------
    tst : array_like
        True stratigraphic thickness. [length]
    dip_deg : array_like
        Bed dip, 0-90. [deg]

    Returns
    -------
    ndarray
        TVT, the thickness a vertical well would log at a fixed (x, y); +-inf for vertical
        beds. [length]

    References
    ----------
    .. [1] Bateman, R.M. and Konen, C.E. (1979) The Log Analyst, via Crain's Petrophysical
       Handbook (TVT = TST / cos dip).
    .. [2] Boak, J.M., "Depth and thickness conversion", AAPG Wiki.
    """
    d = _f(dip_deg)
    _check_dip(d)
    return _safe_div(_f(tst), np.cos(np.radians(d)), d == 90)


def stratigraphic_separation(vertical_separation: ArrayLike, *, dip_deg: ArrayLike):
    """Stratigraphic separation SS = VS cos d (Groshong 2006, eq. 7.3).

    Parameters
    ----------
    vertical_separation : array_like
        Vertical separation. [length]
    dip_deg : array_like
        Cross-fault bed dip, 0-90. [deg]

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, eq. 7.3.

    Examples
    --------
    >>> round(float(stratigraphic_separation(100, dip_deg=10)), 3)
    98.481
    """
    d = _f(dip_deg)
    _check_dip(d)
    return _f(vertical_separation) * np.cos(np.radians(d))


# ----------------------------------------------------------------------------- separation


def vertical_separation(delta_s: ArrayLike, *, dip_deg: ArrayLike) -> NDArray[np.float64]:
    """Vertical separation from a stratigraphic jump: VS = |ds| / cos d.

    Parameters
    ----------
    delta_s : array_like
        Stratigraphic jump (missing or repeated TST) at the cut. [length]
    dip_deg : array_like
        Bed dip across the fault, 0-90. [deg]

    Returns
    -------
    ndarray
        VS, positive; independent of the well path for planar beds. [length]

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, eq. 7.3
       (VS = t / cos d).
    .. [2] Tearpock, D.J. and Bischke, R.E. (2003) Applied Subsurface Geological Mapping with
       Structural Methods, 2nd ed., Prentice Hall (VS is what the log records).
    """
    d = _f(dip_deg)
    _check_dip(d)
    return _safe_div(np.abs(_f(delta_s)), np.cos(np.radians(d)), d == 90)


class ThrowHeave(NamedTuple):
    """Result of :func:`throw_and_heave`. [length]"""

    throw: NDArray[np.float64]
    """Vertical component of the dip separation."""
    heave: NDArray[np.float64]
    """Horizontal component, in the fault-dip direction."""
    dip_separation: NDArray[np.float64]
    """Separation measured in the fault plane, in the dip direction."""


def throw_and_heave(
    vertical_separation: ArrayLike,
    *,
    fault_dip_deg: ArrayLike,
    apparent_bed_dip_deg: ArrayLike,
) -> ThrowHeave:
    """Throw, heave and dip separation from vertical separation, in the section normal to strike.

    Parameters
    ----------
    vertical_separation : array_like
        Vertical separation VS. [length]
    fault_dip_deg : array_like
        Fault dip theta, 0-90. [deg]
    apparent_bed_dip_deg : array_like
        Apparent bed dip alpha in the fault-dip direction, positive when the beds dip the way
        the fault dips, negative when they dip against it (see :func:`bed_dip_in_fault_section`).
        [deg]

    Returns
    -------
    ThrowHeave
        ``(throw, heave, dip_separation)``:
        T = VS tan th / (tan th - tan a) = VS sin th cos a / sin(th - a),
        H = VS / (tan th - tan a) = VS cos th cos a / sin(th - a),
        DS = VS cos a / sin(th - a). [length]

    Notes
    -----
    Horizontal beds give T = VS; beds dipping with the fault give T > VS, against it T < VS.
    When the beds dip the same way as the fault but more steeply (a > th) the values are
    negative: the separation sense is opposite to the slip sense. a = th (beds parallel to the
    fault) gives infinities.

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, eqs. 8.1-8.2
       (t = H cos r / cos f = T cos r / sin f), which these forms restate.
    .. [2] Tearpock, D.J. and Bischke, R.E. (1990) "Mapping throw in place of vertical
       separation: a costly subsurface mapping misconception", Oil & Gas Journal.

    Examples
    --------
    >>> [round(float(v), 3) for v in throw_and_heave(100, fault_dip_deg=60,
    ...                                               apparent_bed_dip_deg=10)]
    [111.334, 64.279, 128.558]
    """
    th = _f(fault_dip_deg)
    _check_dip(th, "fault_dip_deg")
    th = np.radians(th)
    a = np.radians(_f(apparent_bed_dip_deg))
    vs = _f(vertical_separation)
    s = np.sin(th - a)
    with np.errstate(divide="ignore", invalid="ignore"):
        ds = vs * np.cos(a) / s
    return ThrowHeave(ds * np.sin(th), ds * np.cos(th), ds)


def fault_dip_from_throw_and_heave(throw: ArrayLike, heave: ArrayLike) -> NDArray[np.float64]:
    """Fault dip from throw and heave: phi = atan(T / H) [deg] (Groshong 2006, eq. 8.3).

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, eq. 8.3.

    Examples
    --------
    >>> round(float(fault_dip_from_throw_and_heave(32, 25.6)), 2)
    51.34
    """
    return np.degrees(np.arctan2(np.abs(_f(throw)), np.abs(_f(heave))))


def apparent_dip(
    dip_deg: ArrayLike, dip_azimuth_deg: ArrayLike, section_azimuth_deg: ArrayLike
) -> NDArray[np.float64]:
    """Apparent dip of a plane in a vertical section, signed.

    Parameters
    ----------
    dip_deg, dip_azimuth_deg : array_like
        True dip (0-90) and dip azimuth of the plane. [deg]
    section_azimuth_deg : array_like
        Azimuth of the section line, the direction in which the apparent dip is measured. [deg]

    Returns
    -------
    ndarray
        atan(tan d cos(e - b)) [deg]: positive when the plane descends toward
        ``section_azimuth_deg``, negative when it rises.

    References
    ----------
    .. [1] Boak, J.M., "Depth and thickness conversion", AAPG Wiki (d' = atan(tan d cos(b - e))).
    .. [2] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer (apparent dip).

    Examples
    --------
    >>> round(float(apparent_dip(20, 270, 90)), 6)
    -20.0
    """
    d = _f(dip_deg)
    _check_dip(d)
    c = np.cos(np.radians(_f(section_azimuth_deg) - _f(dip_azimuth_deg)))
    # atan2 keeps vertical planes finite: sign(c) * 90
    return np.degrees(np.arctan2(np.sin(np.radians(d)) * c, np.cos(np.radians(d))))


def bed_dip_in_fault_section(
    bed_dip_deg: ArrayLike, bed_dip_azimuth_deg: ArrayLike, *, fault_dip_azimuth_deg: ArrayLike
) -> NDArray[np.float64]:
    """Apparent bed dip in the fault's dip direction (the section normal to fault strike).

    Positive when the beds dip the same way as the fault, negative when they dip against it:
    the ``apparent_bed_dip_deg`` that :func:`throw_and_heave` takes. [deg]

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, ch. 8 (cross-fault
       bed dip in the section normal to the fault).
    """
    return apparent_dip(bed_dip_deg, bed_dip_azimuth_deg, fault_dip_azimuth_deg)
