"""LAS 2.0 logs in and out. The only module that imports lasio.

:func:`read_las` parses with lasio and then checks what lasio lets through silently: the depth
unit (matched exactly, never guessed), ragged or wrapped lines, truncation, depth order,
duplicated depths, text in numeric curves and undeclared null values. Depths, the depth-reference
elevation and the surface location are converted to metres here, once. Every problem becomes one
:class:`~wellfault.errors.InputError` (or :class:`~wellfault.errors.UnitError`) whose message
names the file, the place, the bad value and the fix; recoverable ones warn with
:class:`~wellfault.errors.WellfaultWarning`.
"""

from __future__ import annotations

import io
import logging
import re
import warnings
from pathlib import Path

import lasio
import numpy as np
import pandas as pd
from numpy.typing import NDArray

from ..errors import InputError, UnitError, WellfaultWarning
from ..geo.units import DepthUnit, parse_depth_unit
from ..geo.well import Well
from .las_scan import (
    _check_data_shape,
    _curve_values,
    _fast_data,
    _items,
    _number,
    _row_where,
    _Scan,
    _scan,
)
from .outputs import write_output
from .sniff import PathLike, _decode, _read_bytes

__all__ = ["read_las", "write_las", "COMMON_NULLS"]


#: Null markers seen in the wild even when the header declares another NULL value.
COMMON_NULLS = (-999.25, -9999.0, -999.0)


# Depth-reference names (LMF / DREF / DMF values) -> short name.
_REF_NAMES = {
    "kb": "KB", "kelly bushing": "KB", "k.b.": "KB", "rkb": "KB", "rotary kelly bushing": "KB",
    "df": "DF", "derrick floor": "DF", "drill floor": "DF", "drilling floor": "DF",
    "rt": "RT", "rotary table": "RT",
    "gl": "GL", "ground level": "GL", "ground": "GL",
    "msl": "MSL", "mean sea level": "MSL", "sea level": "MSL", "sl": "MSL",
}


# Header mnemonics holding the elevation of each reference, in order of preference.
_ELEVATION_ITEMS = {
    "KB": ("EKB", "KB", "ELKB"),
    "DF": ("EDF", "DF"),
    "RT": ("ERT", "RT"),
    "GL": ("EGL", "GL", "ELGL"),
}


_COORD_PAIRS = (("XCOORD", "YCOORD"), ("X", "Y"), ("XWELL", "YWELL"), ("X_COORD", "Y_COORD"),
                ("EAST", "NORTH"), ("EASTING", "NORTHING"))


def _resolve_depth_unit(las: lasio.LASFile, items: dict[str, lasio.HeaderItem], *,
                        source: str, given: DepthUnit | str | None,
                        us_survey_foot: bool) -> DepthUnit:
    """The file's depth unit from the index curve and STRT units, checked against the caller's."""
    given_unit = parse_depth_unit(given, source=source) if given is not None else None
    stated: list[tuple[str, str]] = []
    index_unit = str(las.curves[0].unit or "").strip()
    if index_unit:
        stated.append((f"index curve {las.curves[0].mnemonic!r}", index_unit))
    for mnem in ("STRT", "STOP", "STEP"):
        if mnem in items and str(items[mnem].unit or "").strip():
            stated.append((mnem, str(items[mnem].unit).strip()))
    parsed: list[tuple[str, DepthUnit]] = []
    unknown: list[tuple[str, str]] = []
    for where, text in stated:
        try:
            parsed.append((where, parse_depth_unit(text)))
        except UnitError:
            unknown.append((where, text))
    if unknown and given_unit is None:
        where, text = unknown[0]
        raise UnitError(
            f"{source}: unknown depth unit {text!r} on {where}; pass depth_unit=... "
            "(--depth-unit m|ft|usft) or correct the unit in the header"
        )
    for where, unit in parsed[1:]:
        if unit is not parsed[0][1]:
            raise UnitError(
                f"{source}: the header disagrees about the depth unit ({parsed[0][0]} "
                f"{parsed[0][1].value}, {where} {unit.value}); correct the header"
            )
    feet = (DepthUnit.FT, DepthUnit.USFT)
    if given_unit is not None:
        if parsed and not (parsed[0][1] is given_unit or
                           (parsed[0][1] in feet and given_unit in feet)):
            raise UnitError(
                f"{source}: depth unit conflict: {parsed[0][0]} says {parsed[0][1].value} but "
                f"depth_unit={given_unit.value!r} was given; drop the argument or correct the "
                "file"
            )
        unit = given_unit
    elif parsed:
        unit = parsed[0][1]
    else:
        raise UnitError(
            f"{source}: no depth unit: the index curve and STRT/STOP carry no unit; pass "
            "depth_unit=... (--depth-unit m|ft|usft)"
        )
    if us_survey_foot and unit is DepthUnit.FT:
        unit = DepthUnit.USFT
    return unit


def _length_unit(item: lasio.HeaderItem, *, depth_unit: DepthUnit,
                 blank: DepthUnit | None) -> DepthUnit | None:
    """Unit of a header length item; feet follow the depth unit's foot (intl or US survey)."""
    text = str(item.unit or "").strip()
    if not text:
        return blank
    try:
        unit = parse_depth_unit(text)
    except UnitError:
        return None
    if unit is DepthUnit.FT and depth_unit is DepthUnit.USFT:
        return DepthUnit.USFT
    return unit


def _reference(items: dict[str, lasio.HeaderItem], *, source: str,
               depth_unit: DepthUnit) -> tuple[float | None, str]:
    """Elevation of the depth reference [m] and its name, from the header."""
    ref: str | None = None
    for mnem in ("LMF", "DREF", "DMF", "PDAT_REF"):
        if mnem in items:
            key = " ".join(str(items[mnem].value).strip().lower().split())
            if key in _REF_NAMES:
                ref = _REF_NAMES[key]
                break

    def elevation(mnem: str) -> float | None:
        item = items.get(mnem)
        if item is None:
            return None
        value = _number(item.value)
        if value is None:
            return None
        unit = _length_unit(item, depth_unit=depth_unit, blank=depth_unit)
        if unit is None:
            warnings.warn(
                f"{source}: elevation {mnem} has unit {item.unit!r}, not a length unit wellfault "
                "knows; ignored it (set the well's ref_elevation_m yourself)",
                WellfaultWarning, stacklevel=4,
            )
            return None
        if not str(item.unit or "").strip():
            warnings.warn(
                f"{source}: elevation {mnem} = {value:g} has no unit; took the file's depth unit "
                f"({depth_unit.value})",
                WellfaultWarning, stacklevel=4,
            )
        return value * unit.metres

    def permanent_datum() -> float | None:
        epd, apd = elevation("EPD"), elevation("APD")
        return epd + apd if epd is not None and apd is not None else None

    if ref == "MSL":
        return 0.0, "MSL"
    if ref is not None:
        for mnem in (*_ELEVATION_ITEMS.get(ref, ()), "EREF"):
            value = elevation(mnem)
            if value is not None:
                return value, ref
        value = permanent_datum()
        if value is not None:
            return value, ref
    else:
        for name in ("KB", "DF", "RT"):
            for mnem in _ELEVATION_ITEMS[name]:
                value = elevation(mnem)
                if value is not None:
                    return value, name
        for mnem in ("EREF", "ELEV", "ELEVATION"):
            value = elevation(mnem)
            if value is not None:
                return value, "REF"
        value = permanent_datum()
        if value is not None:
            return value, "REF"
    ground = next((m for m in _ELEVATION_ITEMS["GL"] if m in items and
                   _number(items[m].value) is not None), None)
    if ground is not None and ref != "GL":
        warnings.warn(
            f"{source}: the header gives only the ground elevation {ground} = "
            f"{items[ground].value} {items[ground].unit}, not the elevation of the depth "
            f"reference ({ref or 'not stated'}); left the reference elevation unknown. Give it "
            "in the field manifest (elevation column) or set Well.ref_elevation_m",
            WellfaultWarning, stacklevel=3,
        )
    return None, ref or "KB"


def _location(items: dict[str, lasio.HeaderItem], *, source: str,
              depth_unit: DepthUnit) -> tuple[float | None, float | None]:
    """Surface X/Y [m] from XCOORD/YCOORD, X/Y, ... or a LOC item holding two numbers."""
    crs = " ".join(str(items[m].value) for m in ("HZCS", "PROJ", "CRS", "GDAT") if m in items)
    utm = "utm" in crs.lower()
    pairs: list[tuple[lasio.HeaderItem, lasio.HeaderItem, float, float]] = []
    for mx, my in _COORD_PAIRS:
        if mx in items and my in items:
            x, y = _number(items[mx].value), _number(items[my].value)
            if x is not None and y is not None:
                pairs.append((items[mx], items[my], x, y))
                break
    if not pairs and "LOC" in items:
        m = re.fullmatch(r"\s*(" + r"[+-]?\d+(?:\.\d*)?" + r")\s*[,;\s]\s*(" +
                         r"[+-]?\d+(?:\.\d*)?" + r")\s*", str(items["LOC"].value))
        if m:
            pairs.append((items["LOC"], items["LOC"], float(m.group(1)), float(m.group(2))))
    if not pairs:
        return None, None
    ix, iy, x, y = pairs[0]
    blank = DepthUnit.M if utm else None
    ux = _length_unit(ix, depth_unit=depth_unit, blank=blank)
    uy = _length_unit(iy, depth_unit=depth_unit, blank=blank)
    if ux is None or uy is None:
        warnings.warn(
            f"{source}: surface location {ix.mnemonic}={x:g}, {iy.mnemonic}={y:g} has no "
            f"usable length unit ({ix.unit!r}) and no UTM coordinate system; left X/Y unknown. "
            "Give x/y with units in the field manifest, or set Well.x_m / Well.y_m",
            WellfaultWarning, stacklevel=3,
        )
        return None, None
    return x * ux.metres, y * uy.metres


def _lasio_read(text: str, source: str, **kwargs: object) -> lasio.LASFile:
    """lasio.read on text, with any lasio failure turned into one InputError.

    lasio's own log messages (e.g. "Could not convert curve #1") are held back while it reads:
    read_las reports the same problems as one warning or error that names the file.
    """
    logger = logging.getLogger("lasio")
    level = logger.level
    logger.setLevel(logging.ERROR)
    try:
        return lasio.read(io.StringIO(text), mnemonic_case="upper", **kwargs)
    except Exception as err:  # lasio raises many unrelated types; all mean "cannot parse"
        detail = str(err).strip().splitlines()[0] if str(err).strip() else type(err).__name__
        raise InputError(
            f"{source}: cannot be parsed as LAS ({detail}); check the header lines near the "
            "place named and that the file is LAS 1.2/2.0"
        ) from err
    finally:
        logger.setLevel(level)


def read_las(
    path: PathLike,
    *,
    depth_unit: DepthUnit | str | None = None,
    us_survey_foot: bool = False,
) -> Well:
    """Read a LAS 2.0 log into a :class:`~wellfault.geo.well.Well` with depths in metres.

    Parameters
    ----------
    path : str or PathLike
        LAS 1.2/2.0 file (wrapped or not).
    depth_unit : DepthUnit or str, optional
        Depth unit, needed when the file states none (index curve and STRT/STOP/STEP without a
        unit, or a unit not in the alias table). When the file states one, the two must agree;
        ``"usft"`` refines a file's ``ft``.
    us_survey_foot : bool, default False
        Read feet (depths, elevations, coordinates) as US survey feet (1200/3937 m) instead of
        international feet (0.3048 m). No effect on metre files.

    Returns
    -------
    Well
        Curves indexed by ``md_m`` (strictly increasing; a bottom-up file is reversed, irregular
        spacing is kept), NaN for nulls; ``depth_unit`` is the file's unit; elevation of the
        depth reference and surface X/Y in metres when the header gives them (None otherwise).

    Raises
    ------
    UnitError
        Depth unit missing or unknown without ``depth_unit``, inconsistent in the header, or in
        conflict with ``depth_unit``.
    InputError
        Missing, empty, binary, not-LAS, truncated or header-only files, ragged/wrapped lines in
        an unwrapped file, duplicated depths, depths that turn back, text depths, curves that
        are all text, a section after ~A (whose content would be lost), or anything else lasio
        cannot parse.

    Warns
    -----
    WellfaultWarning
        Undeclared null markers (-999.25, -9999, -999) converted to NaN; text cells and
        infinite values (``inf``, ``1e400``) in numeric curves; curves that are entirely null;
        a STEP/STRT/STOP that disagrees with the data (the data is used); elevations or
        coordinates without a usable unit.

    Notes
    -----
    The depth reference is taken from ``LMF``/``DREF``/``DMF`` (e.g. "KELLY BUSHING" -> KB) and
    its elevation from ``EKB``/``KB``, ``EDF``, ``ERT``, ``EGL`` as that reference requires, then
    ``EREF`` or ``EPD + APD`` (LAS 2.0 parameter conventions, common practice). A header giving
    only the ground elevation for a non-ground reference leaves the elevation unknown (warned).
    Elevations without a unit are taken in the file's depth unit (warned); coordinates without a
    unit are metres only under a UTM coordinate system (``HZCS``).
    """
    p, data = _read_bytes(path)
    source = str(p)
    if not data.strip():
        raise InputError(f"{source}: file is empty; give a LAS 2.0 file")
    text = _decode(data, source)
    if "\r" in text:  # Windows and old Mac line ends
        text = text.replace("\r\n", "\n").replace("\r", "\n")
    scan = _scan(text, source)
    las = _lasio_read(scan.header_text, source, ignore_data=True)
    if len(las.curves) == 0:
        raise InputError(f"{source}: the ~Curve section lists no curves; list the depth curve "
                         "and each log curve")
    data = _fast_data(scan, len(las.curves))
    columns: list[tuple[str, NDArray[np.float64], int]]
    if data is not None:
        columns = [(str(c.mnemonic), data[:, k].copy(), 0) for k, c in enumerate(las.curves)]
    else:
        _check_data_shape(scan)
        las = _lasio_read(text, source, engine="normal" if scan.wrapped else "numpy")
        if len(las.curves) == 0 or las.data is None or np.size(las.data) == 0:
            raise InputError(f"{source}: no curves or no data after parsing; export the log "
                             "again")
        columns = [(str(c.mnemonic),
                    *_curve_values(c, source=source, is_index=k == 0, scan=scan))
                   for k, c in enumerate(las.curves)]
    items = _items(las)
    unit = _resolve_depth_unit(las, items, source=source, given=depth_unit,
                               us_survey_foot=us_survey_foot)

    null_item = items.get("NULL")
    null = _number(null_item.value) if null_item is not None else None
    md_file = columns[0][1]
    curves = {name: values for name, values, _ in columns[1:]}
    text_counts = {name: n for name, _, n in columns[1:] if n}
    if text_counts:
        listed = ", ".join(f"{name} ({n})" for name, n in text_counts.items())
        warnings.warn(f"{source}: text in numeric curves set to NaN: {listed} cell(s)",
                      WellfaultWarning, stacklevel=2)
    if null is not None:
        md_file = np.where(md_file == null, np.nan, md_file)
        for values in curves.values():
            values[values == null] = np.nan
    for marker in COMMON_NULLS:
        if null is not None and marker == null:
            continue
        hits = [name for name, v in curves.items() if np.any(v == marker)]
        if hits:
            count = sum(int(np.sum(curves[name] == marker)) for name in hits)
            for name in hits:
                curves[name][curves[name] == marker] = np.nan
            warnings.warn(
                f"{source}: value {marker:g} appears {count} time(s) in {', '.join(hits)} but "
                f"the declared NULL is {null if null is not None else 'missing'}; treated it as "
                "null. Declare the NULL value in the header to silence this",
                WellfaultWarning, stacklevel=2,
            )
        md_file = np.where(md_file == marker, np.nan, md_file)

    overflow = {name: int(np.isinf(v).sum()) for name, v in curves.items() if np.isinf(v).any()}
    if overflow:
        for name in overflow:
            curves[name][np.isinf(curves[name])] = np.nan
        listed = ", ".join(f"{name} ({n})" for name, n in overflow.items())
        warnings.warn(f"{source}: infinite or overflowing values (e.g. inf, 1e400) set to NaN: "
                      f"{listed} cell(s)", WellfaultWarning, stacklevel=2)
    bad = ~np.isfinite(md_file)
    if bad.any():
        k = int(np.argmax(bad))
        raise InputError(f"{source}, {_row_where(scan, k)}: depth is null, missing or infinite; "
                         "delete rows without a depth")
    md_file = _check_depth_order(md_file, source=source, scan=scan, unit=unit)
    _check_header_depths(items, md_file, source=source, unit=unit)
    order = np.argsort(md_file) if md_file.size > 1 and md_file[0] > md_file[-1] else None
    md_m = md_file * unit.metres
    frame = pd.DataFrame(curves, index=pd.Index(md_m, name="md_m"))
    if order is not None:
        frame = frame.iloc[order]
    empty = [name for name in frame.columns if frame[name].isna().all()]
    if empty:
        warnings.warn(f"{source}: curve(s) {', '.join(map(str, empty))} hold only nulls",
                      WellfaultWarning, stacklevel=2)

    name = str(items["WELL"].value).strip() if "WELL" in items else ""
    if not name and "UWI" in items:
        name = str(items["UWI"].value).strip()
    elevation_m, ref_name = _reference(items, source=source, depth_unit=unit)
    x_m, y_m = _location(items, source=source, depth_unit=unit)
    return Well(
        name=name or p.stem,
        curves=frame,
        depth_unit=unit,
        ref_elevation_m=elevation_m,
        ref_name=ref_name,
        x_m=x_m,
        y_m=y_m,
        source=source,
    )


def _check_depth_order(md: NDArray[np.float64], *, source: str, scan: _Scan,
                       unit: DepthUnit) -> NDArray[np.float64]:
    """Raise on duplicated depths or depths that turn back; return ``md`` unchanged."""
    if md.size < 2:
        return md
    step = np.diff(md)
    same = step == 0
    if same.any():
        k = int(np.argmax(same))
        raise InputError(
            f"{source}: depth {md[k]:g} {unit.value} appears twice ({_row_where(scan, k)} and "
            f"{_row_where(scan, k + 1)}); remove the duplicated rows"
        )
    up = step > 0
    n_up = int(up.sum())
    if n_up in (0, step.size):
        return md
    increasing = n_up * 2 >= step.size
    k = int(np.argmax(~up if increasing else up))
    direction = "backwards" if increasing else "forwards"
    raise InputError(
        f"{source}: depth jumps {direction} from {md[k]:g} to {md[k + 1]:g} {unit.value} "
        f"({_row_where(scan, k)} to {_row_where(scan, k + 1)}) in a log that otherwise runs "
        f"{'down' if increasing else 'up'}; the file may hold two splices or repeated passes: "
        "remove or re-sort the out-of-order rows"
    )


def _check_header_depths(items: dict[str, lasio.HeaderItem], md: NDArray[np.float64], *,
                         source: str, unit: DepthUnit) -> None:
    """Warn when STEP, STRT or STOP disagree with the data (the data is used)."""
    spacing = np.abs(np.diff(md))
    if spacing.size == 0:
        return
    step = _number(items["STEP"].value) if "STEP" in items else None
    if step:
        tol = max(0.01 * abs(step), 2e-4)
        off = np.abs(spacing - abs(step)) > tol
        if off.any():
            warnings.warn(
                f"{source}: STEP {step:g} {unit.value} in the header, but the data spacing is "
                f"{np.median(spacing):g} (from {spacing.min():g} to {spacing.max():g}, "
                f"{int(off.sum())} of {spacing.size} steps differ); used the depths in the data",
                WellfaultWarning, stacklevel=3,
            )
    tol = max(0.5 * float(np.median(spacing)), 2e-4)
    for mnem, actual in (("STRT", md[0]), ("STOP", md[-1])):
        stated = _number(items[mnem].value) if mnem in items else None
        if stated is not None and abs(stated - actual) > tol:
            warnings.warn(
                f"{source}: {mnem} {stated:g} {unit.value} in the header, but the data "
                f"{'starts' if mnem == 'STRT' else 'ends'} at {actual:g}; used the data",
                WellfaultWarning, stacklevel=3,
            )


# --------------------------------------------------------------------------------------------
# writing

_LAS_UNIT = {DepthUnit.M: "M", DepthUnit.FT: "FT", DepthUnit.USFT: "USFT"}


def _mnemonic(name: str) -> str:
    clean = re.sub(r"[\s.:]+", "_", str(name).strip()) or "CURVE"
    return clean


def _format_depths(values: NDArray[np.float64]) -> list[str]:
    """Depths with as many decimals (6 to 10) as keep them strictly increasing."""
    for decimals in range(6, 11):
        text = [f"{v:.{decimals}f}" for v in values]
        if len(set(text)) == len(text):
            return text
    return [repr(float(v)) for v in values]


def write_las(well: Well, path: PathLike, *, depth_unit: DepthUnit | str | None = None) -> Path:
    """Write a well as a LAS 2.0 file (unwrapped) through :func:`~wellfault.io.outputs.write_output`.

    Parameters
    ----------
    well : Well
        Curves indexed by ``md_m``; NaN is written as the NULL value -999.25.
    path : str or PathLike
        Target file (``-`` for standard output); a plain file is replaced in one step.
    depth_unit : DepthUnit or str, optional
        Unit of the depths and the elevation in the file (default: ``well.depth_unit``).

    Returns
    -------
    Path
        The path written.

    Notes
    -----
    Header: ``~Well`` with STRT/STOP/STEP (STEP 0 when the spacing is irregular), NULL -999.25,
    WELL and, when known, X/Y in metres; ``~Parameter`` with DREF (the depth reference name) and
    its elevation (``EKB``, ``EDF``, ``EGL``, ... or ``EREF``) in the depth unit. Curve names are
    made LAS-safe (spaces, dots and colons become ``_``); units of log curves are not stored in
    a :class:`Well` and are written blank.
    """
    unit = parse_depth_unit(depth_unit if depth_unit is not None else well.depth_unit,
                            source=str(path))
    lu = _LAS_UNIT[unit]
    md = well.md_m / unit.metres
    null = -999.25
    if md.size > 1:
        spacing = np.diff(md)
        regular = np.allclose(spacing, spacing[0], rtol=1e-6, atol=1e-9)
        step = float(np.round(spacing[0], 8)) if regular else 0.0
    else:
        step = 0.0
    strt = float(md[0]) if md.size else 0.0
    stop = float(md[-1]) if md.size else 0.0
    names = [_mnemonic(c) for c in well.curves.columns]
    if len(set(names)) != len(names) or "DEPT" in names:
        raise InputError(
            f"{path}: curve names {list(well.curves.columns)} are not unique once made LAS-safe "
            "(or one is DEPT); rename the curves"
        )
    name = str(well.name).replace(":", "-")
    head = [
        "~Version Information",
        " VERS.          2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0",
        " WRAP.           NO : ONE LINE PER DEPTH STEP",
        "~Well Information",
        f" STRT.{lu:<4} {strt:>16.6f} : START DEPTH",
        f" STOP.{lu:<4} {stop:>16.6f} : STOP DEPTH",
        f" STEP.{lu:<4} {step:>16.8g} : STEP (0 = IRREGULAR)",
        f" NULL.     {null:>16.2f} : NULL VALUE",
        f" WELL.     {name:>16} : WELL",
    ]
    if well.x_m is not None and well.y_m is not None:
        head += [f" X   .M    {well.x_m:>16.3f} : SURFACE X (EASTING)",
                 f" Y   .M    {well.y_m:>16.3f} : SURFACE Y (NORTHING)"]
    head.append("~Curve Information")
    head.append(f" DEPT.{lu:<4}  : MEASURED DEPTH")
    head += [f" {n:<4}.      : {n}" for n in names]
    head.append("~Parameter Information")
    head.append(f" DREF.     {well.ref_name:>16} : DEPTH REFERENCE")
    if well.ref_elevation_m is not None:
        mnem = {"KB": "EKB", "DF": "EDF", "GL": "EGL", "RT": "ERT"}.get(well.ref_name, "EREF")
        elev = well.ref_elevation_m / unit.metres
        head.append(f" {mnem:<4}.{lu:<4} {elev:>16.6f} : ELEVATION OF DEPTH REFERENCE")
    head.append("~ASCII " + " ".join(["DEPT", *names]))
    depth_text = _format_depths(md)
    values = well.curves.to_numpy(dtype=np.float64, copy=True)
    values[~np.isfinite(values)] = null
    row_format = "%s" + " %.10g" * values.shape[1]
    body = "".join(row_format % (d, *row) + "\n" for d, row in zip(depth_text, values.tolist()))
    return write_output(path, "\n".join(head) + "\n" + body, what="the LAS file")
