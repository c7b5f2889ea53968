"""Minimum curvature between survey stations: dogleg, ratio factor, station positions,
interpolation along the arc."""

from __future__ import annotations

import numpy as np
from numpy.typing import ArrayLike, NDArray

__all__ = ["minimum_curvature", "ratio_factor", "dogleg"]


_TAYLOR_BETA = 1e-3  # below this dogleg [rad] the ratio factor uses its Taylor series


def dogleg(
    inc1_deg: ArrayLike, azi1_deg: ArrayLike, inc2_deg: ArrayLike, azi2_deg: ArrayLike
) -> NDArray[np.float64]:
    """Dogleg angle between two survey directions (angle between their unit tangents).

    Parameters
    ----------
    inc1_deg, azi1_deg, inc2_deg, azi2_deg : array_like
        Inclination from vertical and azimuth from north at the two stations. [deg]

    Returns
    -------
    ndarray
        Dogleg angle beta. [rad]

    Notes
    -----
    Uses the haversine form, free of the round-off of ``arccos`` near zero:
    beta = 2 asin( sqrt( sin^2(dI/2) + sin I1 sin I2 sin^2(dA/2) ) ).
    It equals the classic ``cos beta = cos(I2 - I1) - sin I1 sin I2 (1 - cos(A2 - A1))`` [1]_.
    The azimuth drops out when either inclination is zero.

    References
    ----------
    .. [1] Taylor, H.L. and Mason, M.C. (1972) SPE Journal 12(6). doi:10.2118/3362-PA

    Examples
    --------
    >>> round(float(np.degrees(dogleg(15, 20, 25, 45))), 5)
    12.95165
    """
    i1, a1 = np.radians(inc1_deg), np.radians(azi1_deg)
    i2, a2 = np.radians(inc2_deg), np.radians(azi2_deg)
    h = np.sin((i2 - i1) / 2) ** 2 + np.sin(i1) * np.sin(i2) * np.sin((a2 - a1) / 2) ** 2
    return 2.0 * np.arcsin(np.sqrt(np.clip(h, 0.0, 1.0)))


def ratio_factor(beta_rad: ArrayLike) -> NDArray[np.float64]:
    """Minimum-curvature ratio factor RF = (2/beta) tan(beta/2).

    Parameters
    ----------
    beta_rad : array_like
        Dogleg angle, 0 <= beta < pi. [rad]

    Returns
    -------
    ndarray
        RF (1 for a straight course). [-]

    Notes
    -----
    For beta < 1e-3 rad the Taylor series RF = 1 + beta^2/12 + beta^4/120 is used (tan x = x +
    x^3/3 + 2x^5/15 + ...); its truncation error there is below 1e-20.

    References
    ----------
    .. [1] Taylor, H.L. and Mason, M.C. (1972) SPE Journal 12(6). doi:10.2118/3362-PA
    .. [2] Sawaryn, S.J. and Thorogood, J.L. (2005) SPE Drilling & Completion 20(1).
       doi:10.2118/84246-PA

    Examples
    --------
    >>> round(float(ratio_factor(np.pi / 2)), 6)  # 4/pi
    1.27324
    """
    b = np.asarray(beta_rad, dtype=float)
    small = b < _TAYLOR_BETA
    safe = np.where(small, 1.0, b)
    exact = 2.0 / safe * np.tan(safe / 2.0)
    series = 1.0 + b**2 / 12.0 + b**4 / 120.0
    return np.where(small, series, exact)


def _tangent(inc_deg: ArrayLike, azi_deg: ArrayLike) -> NDArray[np.float64]:
    """Unit tangent (east, north, down) from inclination and azimuth [deg]."""
    i, a = np.radians(inc_deg), np.radians(azi_deg)
    return np.stack([np.sin(i) * np.sin(a), np.sin(i) * np.cos(a), np.cos(i)], axis=-1)


def minimum_curvature(
    md: ArrayLike, inc_deg: ArrayLike, azi_deg: ArrayLike
) -> tuple[NDArray[np.float64], NDArray[np.float64], NDArray[np.float64], NDArray[np.float64]]:
    """TVD, north, east and dogleg at each survey station by minimum curvature.

    Parameters
    ----------
    md : array_like, shape (n,)
        Measured depth of the stations, increasing. [any length unit; returned in the same]
    inc_deg, azi_deg : array_like, shape (n,)
        Inclination from vertical and azimuth clockwise from north. [deg]

    Returns
    -------
    tvd, north, east : ndarray, shape (n,)
        Cumulative displacements from the first station (0 there). [unit of ``md``]
    dogleg_deg : ndarray, shape (n,)
        Dogleg of the course ending at each station (0 at the first station). [deg]
        Dogleg severity per 100 ft or 30 m is ``dogleg_deg * 100 / diff(md)`` etc.

    Notes
    -----
    Each course between stations 1 and 2 is a circular arc tangent to both station directions:
    ``dP = dMD/2 * (t1 + t2) * RF(beta)`` with t the unit tangent, beta the dogleg and
    RF = (2/beta) tan(beta/2) [1]_ [2]_. The dogleg uses the numerically safe haversine form
    (see :func:`dogleg`); RF uses its Taylor series for small beta. Inputs are not validated
    here; :class:`Trajectory` validates.

    References
    ----------
    .. [1] Taylor, H.L. and Mason, M.C. (1972) "A Systematic Approach to Well Surveying
       Calculations", SPE Journal 12(6), 474-488. doi:10.2118/3362-PA
    .. [2] Sawaryn, S.J. and Thorogood, J.L. (2005) "A Compendium of Directional Calculations
       Based on the Minimum Curvature Method", SPE Drilling & Completion 20(1), 24-36.
       doi:10.2118/84246-PA

    Examples
    --------
    >>> tvd, n, e, dl = minimum_curvature([3500, 3600], [15, 25], [20, 45])
    >>> [round(float(v), 3) for v in (n[1], e[1], tvd[1], dl[1])]
    [27.218, 19.451, 94.012, 12.952]
    """
    md = np.asarray(md, dtype=float)
    inc = np.asarray(inc_deg, dtype=float)
    azi = np.asarray(azi_deg, dtype=float)
    t = _tangent(inc, azi)
    beta = dogleg(inc[:-1], azi[:-1], inc[1:], azi[1:])
    half = np.diff(md) / 2.0 * ratio_factor(beta)
    d = half[:, None] * (t[:-1] + t[1:])
    cum = np.vstack([np.zeros((1, 3)), np.cumsum(d, axis=0)])
    dl = np.concatenate([[0.0], np.degrees(beta)])
    return cum[:, 2], cum[:, 1], cum[:, 0], dl


def _slerp_weights(f: NDArray[np.float64], beta: NDArray[np.float64]):
    """Weights sin((1-f)b)/sin b and sin(f b)/sin b, stable as b -> 0 (via sinc)."""
    sb = np.sinc(beta / np.pi)
    w1 = (1.0 - f) * np.sinc((1.0 - f) * beta / np.pi) / sb
    w2 = f * np.sinc(f * beta / np.pi) / sb
    return w1, w2
