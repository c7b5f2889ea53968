"""Pure, vectorised geometry of beds, faults and wells: thickness, separation, fault type.

Every function takes array_like values (broadcast together) and returns numpy arrays; scalars in
give 0-d results (or plain ``str`` for the classifiers). No pandas, no I/O.

Conventions (DEVELOPERS.md): angles in degrees; vectors (east, north, down); planes as dip
delta in [0, 90] and dip azimuth beta in [0, 360); well tangent
t = (sin I sin A, sin I cos A, cos I); bed normal pointing down-section
n = (-sin d sin b, -sin d cos b, cos d); fault normal pointing up into the hanging wall
m = (sin th sin bf, sin th cos bf, -cos th). r = t.n > 0 drilling down-section; t.m < 0 crossing
hanging wall -> footwall. A cut's jump ds = s(below) - s(above) in TST; MISSING section when
sign(ds) = sign(r), REPEATED when they differ.
"""

from __future__ import annotations

import re

import numpy as np
from numpy.typing import ArrayLike, NDArray

from ..errors import input_error

__all__ = [
    "well_tangent",
    "bed_normal",
    "fault_normal_up",
    "crossing_direction",
    "section_kind",
    "classify_fault",
    "parse_attitude",
    "check_attitude",
    "expected_md_span",
    "andersonian_fault_dip",
    "ANDERSONIAN_DIPS",
    "DEFAULT_MIN_COS",
]


#: Default threshold on |t.m| and |r| = |t.n|: the sine of the angle between the well and the
#: plane (fault or bedding). Below it (well within 2 deg of the plane) the geometry is reported
#: as degenerate rather than guessed.
DEFAULT_MIN_COS = float(np.sin(np.radians(2.0)))


#: Andersonian fault dips for a friction angle of about 30 deg (Anderson 1951). [deg]
ANDERSONIAN_DIPS = {"normal": 60.0, "reverse": 30.0, "thrust": 30.0, "strike-slip": 90.0}


def _f(x: ArrayLike) -> NDArray[np.float64]:
    return np.asarray(x, dtype=float)


def _check_dip(dip: NDArray[np.float64], name: str = "dip_deg") -> None:
    bad = np.asarray(~((dip >= 0) & (dip <= 90)) & ~np.isnan(dip))
    if bad.any():
        value = float(np.broadcast_to(dip, bad.shape)[bad].ravel()[0])
        raise input_error(
            f"{name} outside 0-90 deg", value=value,
            fix="give the dip as 0-90 and its direction as a dip azimuth 0-360 "
            "(an overturned or reversed dip is a different dip azimuth)",
        )


def _unit_vectors(east, north, down) -> NDArray[np.float64]:
    return np.stack(np.broadcast_arrays(east, north, down), axis=-1)


# ----------------------------------------------------------------------------- vectors


def well_tangent(inc_deg: ArrayLike, azi_deg: ArrayLike) -> NDArray[np.float64]:
    """Unit tangent of the borehole, (east, north, down).

    Parameters
    ----------
    inc_deg : array_like
        Inclination from vertical. [deg]
    azi_deg : array_like
        Azimuth clockwise from north. [deg]

    Returns
    -------
    ndarray, shape (..., 3)
        t = (sin I sin A, sin I cos A, cos I).

    References
    ----------
    .. [1] Sawaryn, S.J. and Thorogood, J.L. (2005) "A Compendium of Directional Calculations
       Based on the Minimum Curvature Method", SPE Drilling & Completion 20(1), 24-36.
       doi:10.2118/84246-PA
    """
    i, a = np.radians(_f(inc_deg)), np.radians(_f(azi_deg))
    return _unit_vectors(np.sin(i) * np.sin(a), np.sin(i) * np.cos(a), np.cos(i))


def bed_normal(dip_deg: ArrayLike, dip_azimuth_deg: ArrayLike) -> NDArray[np.float64]:
    """Unit bed normal pointing down-section, (east, north, down).

    Parameters
    ----------
    dip_deg : array_like
        Bed dip, 0-90. [deg]
    dip_azimuth_deg : array_like
        Direction of steepest descent. [deg]

    Returns
    -------
    ndarray, shape (..., 3)
        n = (-sin d sin b, -sin d cos b, cos d): toward older rock in upright beds, so the
        stratigraphic position of a point P is s = n.P + const.

    Raises
    ------
    InputError
        When a dip lies outside 0-90.

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, ch. 7-8
       (stratigraphic thickness normal to bedding).
    """
    d, b = _f(dip_deg), _f(dip_azimuth_deg)
    _check_dip(d)
    d, b = np.radians(d), np.radians(b)
    return _unit_vectors(-np.sin(d) * np.sin(b), -np.sin(d) * np.cos(b), np.cos(d))


def fault_normal_up(dip_deg: ArrayLike, dip_azimuth_deg: ArrayLike) -> NDArray[np.float64]:
    """Unit fault normal pointing upward into the hanging wall, (east, north, down).

    Parameters
    ----------
    dip_deg : array_like
        Fault dip theta, 0-90. [deg]
    dip_azimuth_deg : array_like
        Fault dip azimuth. [deg]

    Returns
    -------
    ndarray, shape (..., 3)
        m = (sin th sin b, sin th cos b, -cos th). A well with t.m < 0 goes from the hanging
        wall into the footwall.

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, ch. 8 (hanging wall
       and footwall of a dipping fault).
    """
    d, b = _f(dip_deg), _f(dip_azimuth_deg)
    _check_dip(d, "fault_dip_deg")
    d, b = np.radians(d), np.radians(b)
    return _unit_vectors(np.sin(d) * np.sin(b), np.sin(d) * np.cos(b), -np.cos(d))


def _safe_div(num, den, zero):
    with np.errstate(divide="ignore", invalid="ignore"):
        out = num / np.where(zero, 0.0, den)
    return out


# ----------------------------------------------------------------------------- classification


def crossing_direction(
    tangent: ArrayLike,
    *,
    fault_dip_deg: ArrayLike,
    fault_dip_azimuth_deg: ArrayLike,
    min_abs_cos: float = DEFAULT_MIN_COS,
) -> NDArray[np.int64]:
    """Which way a well crosses a fault: +1 hanging wall -> footwall, -1 the other way, 0 unclear.

    Parameters
    ----------
    tangent : array_like, shape (..., 3)
        Unit well tangent (east, north, down) at the crossing (``Trajectory.tangent``).
    fault_dip_deg, fault_dip_azimuth_deg : array_like
        Fault dip (0-90) and dip azimuth. [deg]
    min_abs_cos : float
        Threshold on |t.m|, the sine of the angle between the well and the fault plane; below
        it the well runs (nearly) in the fault plane and 0 is returned. Default sin 2 deg.

    Returns
    -------
    ndarray of int
        +1 where t.m < -min_abs_cos (hanging wall -> footwall), -1 where t.m > min_abs_cos
        (footwall -> hanging wall), 0 otherwise.

    Notes
    -----
    A well drilled toward the fault's dip direction crosses footwall -> hanging wall when it is
    flatter than the fault, tan I cos(A - b_f) > cot th, i.e. I > 90 - th straight down-dip
    (methods.md section 3.4, derived from the vector form).

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, ch. 7-8 (hanging
       wall and footwall; fault cuts).
    """
    t = _f(tangent)
    m = fault_normal_up(fault_dip_deg, fault_dip_azimuth_deg)
    c = np.sum(t * m, axis=-1)
    return np.where(c < -min_abs_cos, 1, np.where(c > min_abs_cos, -1, 0)).astype(np.int64)


def _text_out(arr: NDArray, scalar: bool):
    return str(arr.reshape(())) if scalar else arr


def section_kind(
    delta_s: ArrayLike, r: ArrayLike, *, min_abs_r: float = DEFAULT_MIN_COS
) -> NDArray[np.str_] | str:
    """Observed section change at a cut: "missing", "repeated" or "undetermined".

    Parameters
    ----------
    delta_s : array_like
        Stratigraphic jump ds = s(below the cut) - s(above). [length]
    r : array_like
        r = t.n, positive when the well drills down-section.
    min_abs_r : float
        Below this |r| the well runs (nearly) parallel to bedding and the jump has no
        missing/repeated meaning. Default sin 2 deg.

    Returns
    -------
    ndarray of str, or str for scalar inputs
        "missing" where sign(ds) = sign(r), "repeated" where they differ, "undetermined" where
        |r| < min_abs_r or ds = 0 (no jump).

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, ch. 7 (missing and
       repeated section at fault cuts; Tearpock & Bischke's definition of a fault cut).
    """
    ds, rr = np.broadcast_arrays(_f(delta_s), _f(r))
    scalar = ds.ndim == 0
    prod = np.sign(ds) * np.sign(rr)
    out = np.where(prod > 0, "missing", "repeated").astype("<U12")
    out[np.asarray((np.abs(rr) < min_abs_r) | (ds == 0) | np.isnan(prod))] = "undetermined"
    return _text_out(out, scalar)


def classify_fault(
    delta_s: ArrayLike,
    *,
    r: ArrayLike,
    crossing: ArrayLike,
    min_abs_r: float = DEFAULT_MIN_COS,
) -> tuple[NDArray[np.str_] | str, NDArray[np.str_] | str]:
    """Fault type from the separation sense: "normal", "reverse" or "undetermined", with reason.

    Parameters
    ----------
    delta_s : array_like
        Stratigraphic jump ds = s(below) - s(above). [length]
    r : array_like
        r = t.n at the cut (drilling direction through the beds).
    crossing : array_like of int
        From :func:`crossing_direction`: +1 hanging wall -> footwall, -1 footwall -> hanging
        wall, 0 degenerate.
    min_abs_r : float
        |r| threshold below which the well is treated as parallel to bedding.

    Returns
    -------
    fault_type, reason : ndarray of str (or str for scalar inputs)
        Separation sense = sign(crossing * ds): > 0 normal (going hanging wall -> footwall the
        well jumps down-section to older rock: hanging wall younger on older), < 0 reverse.
        "undetermined" when the crossing is 0 (well nearly parallel to the fault),
        |r| < min_abs_r (well nearly parallel to bedding) or ds = 0; the reason says which
        ("" otherwise).

    Notes
    -----
    Truth table (methods.md section 3.4): normal HW->FW down-section = missing, up-section =
    repeated; normal FW->HW down-section = repeated; reverse the opposite. "Normal/reverse"
    means separation: beds dipping with the fault more steeply than it turn normal slip into
    reverse separation.

    References
    ----------
    .. [1] Groshong, R.H. (2006) 3-D Structural Geology, 2nd ed., Springer, ch. 7-8.
    .. [2] Tearpock, D.J. and Bischke, R.E. (2003) Applied Subsurface Geological Mapping with
       Structural Methods, 2nd ed., Prentice Hall (normal fault: missing section; reverse:
       repeated, in the usual hanging wall -> footwall crossing).
    """
    ds, rr, cr = np.broadcast_arrays(_f(delta_s), _f(r), _f(crossing))
    scalar = ds.ndim == 0
    sense = np.sign(cr) * np.sign(ds)
    ftype = np.where(sense > 0, "normal", "reverse").astype("<U12")
    reason = np.full(ds.shape, "", dtype="<U80")
    rules = [  # later rules win, so list the most basic last
        (np.abs(rr) < min_abs_r, "well nearly parallel to bedding (|t.n| small)"),
        (cr == 0, "well nearly parallel to the fault plane (|t.m| small)"),
        (np.isnan(ds) | np.isnan(rr) | np.isnan(cr), "missing input (NaN)"),
        (ds == 0, "no stratigraphic jump (delta_s = 0)"),
    ]
    for mask, why in rules:
        mask = np.asarray(mask)
        ftype[mask] = "undetermined"
        reason[mask] = why
    return _text_out(ftype, scalar), _text_out(reason, scalar)


def expected_md_span(tst: ArrayLike, r: ArrayLike) -> NDArray[np.float64]:
    """MD interval the missing (or repeated) strata occupy in the well: |TST| / |r|.

    Parameters
    ----------
    tst : array_like
        Missing or repeated true stratigraphic thickness. [length]
    r : array_like
        r = t.n of the well. inf where r = 0.

    References
    ----------
    .. [1] Bateman, R.M. and Konen, C.E. (1979) The Log Analyst, via Crain's Petrophysical
       Handbook (TST = MT (t.n), inverted).
    """
    return _safe_div(np.abs(_f(tst)), np.abs(_f(r)), _f(r) == 0)


# ----------------------------------------------------------------------------- text and defaults

_NUM = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)"


_ATTITUDE = re.compile(rf"^\s*({_NUM})\s*/\s*({_NUM})\s*$")


def check_attitude(dip: float, azi: float, *, what: str = "dip", source: object = None,
                   row: int | None = None) -> None:
    """Refuse a dip outside 0-90 degrees or a dip azimuth outside 0-360 (common practice: a
    plane is given by its dip from horizontal and the azimuth it dips towards).

    ``what`` names the quantity (``"dip"``, ``"fault dip"``, ...), ``source`` and ``row``
    where it came from, in the message.
    """
    if not np.isfinite(dip) or not 0.0 <= dip <= 90.0:
        raise input_error(f"{what} outside 0-90 degrees", source=source, row=row, value=dip,
                          fix="dip is measured down from horizontal, 0 to 90; give the direction "
                              "of dip as the azimuth (an overturned plane dips the other way)")
    if not np.isfinite(azi) or not 0.0 <= azi <= 360.0:
        raise input_error(f"{what} azimuth outside 0-360 degrees", source=source, row=row,
                          value=azi, fix="give the dip azimuth clockwise from north, 0 to 360")


def parse_attitude(text: str, *, what: str = "dip", source: object = None
                   ) -> tuple[float, float]:
    """Parse a plane written ``dip/dip-azimuth`` (e.g. ``"12/075"``): the one reader of the
    trade's notation for bed dips (``--dip``) and fault attitudes (``--fault``).

    Parameters
    ----------
    text : str
        Dip 0-90 and dip azimuth 0-360 separated by ``/`` (spaces allowed).
    what : str
        What the plane is (``"dip"``, ``"fault dip"``, ``"dip of well 'A-1'"``), for messages.
    source : object, optional
        Where the text came from (option name, file and row), for messages.

    Returns
    -------
    dip_deg, dip_azimuth_deg : float
        Dip azimuth normalised to [0, 360). [deg]

    Raises
    ------
    InputError
        For text not of that form, a dip outside 0-90 or an azimuth outside 0-360; the message
        shows the expected form.

    Examples
    --------
    >>> parse_attitude("12/075")
    (12.0, 75.0)
    """
    m = _ATTITUDE.match(str(text))
    if not m:
        raise input_error(f"cannot read {what} {str(text)!r}", source=source,
                          fix="write it as dip/dip-azimuth in degrees, e.g. 12/075 (dip 0-90, "
                              "azimuth 0-360)")
    dip, azi = float(m.group(1)), float(m.group(2))
    check_attitude(dip, azi, what=what, source=source)
    return dip, azi % 360.0


def andersonian_fault_dip(kind: str) -> float:
    """Default fault dip from Anderson's theory of faulting. [deg]

    Parameters
    ----------
    kind : str
        One of ``"normal"`` (60), ``"reverse"`` / ``"thrust"`` (30), ``"strike-slip"`` (90).

    Notes
    -----
    For an angle of internal friction of about 30 deg (methods.md section 7). Used when a
    fault's dip is not given; results say the dip was assumed.

    References
    ----------
    .. [1] Anderson, E.M. (1951) The Dynamics of Faulting and Dyke Formation with Applications
       to Britain, 2nd ed. Oliver & Boyd, Edinburgh.

    Raises
    ------
    InputError
        For an unknown kind; the message lists the valid ones.
    """
    key = str(kind).strip().lower()
    try:
        return ANDERSONIAN_DIPS[key]
    except KeyError:
        raise input_error("unknown fault kind", value=str(kind),
                          fix=f"use one of {', '.join(ANDERSONIAN_DIPS)}") from None
