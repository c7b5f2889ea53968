"""Column names and their units: the accepted spellings of each column and the unit in a
column's name or a side file."""

from __future__ import annotations

import json
import re
from collections.abc import Iterable, Sequence
from pathlib import Path

from ..errors import InputError, UnitError
from ..geo.units import DepthUnit, parse_depth_unit
from .sniff import _RawTable

# Accepted column names (base name, without any unit suffix), in order of preference.
_WELL_NAMES = ("well", "well_name", "wellname", "well name", "uwi", "well_id", "api")


_SURFACE_NAMES = ("surface", "surface_name", "surface name", "name", "top_name", "horizon",
                  "marker", "formation", "formation_name", "pick")


_MD_NAMES = ("md", "measured_depth", "measured depth", "top_md", "md_top", "depth", "top_depth",
             "top", "pick_md", "dept")


_INC_NAMES = ("inc", "incl", "inclination", "dev", "deviation")


_AZI_NAMES = ("azi", "az", "azim", "azimuth")


_TVD_NAMES = ("tvd",)


_NORTH_NAMES = ("north", "northing", "ns", "n", "dy", "y_offset")


_EAST_NAMES = ("east", "easting", "ew", "e", "dx", "x_offset")


_DIP_NAMES = ("dip", "dip_angle", "bed_dip")


_DIP_AZI_NAMES = ("dip_azimuth", "dip_azi", "dipazi", "dip_az", "dip_direction", "dip_dir",
                  "dipdir", "azimuth", "azi", "az")


_THICKNESS_NAMES = ("thickness", "thick", "tst", "true_thickness", "unit_thickness", "isopach")


_UNCONFORMITY_NAMES = ("unconformity", "unconformable", "unconf", "is_unconformity")


_ANGLE_UNITS = ("deg", "degree", "degrees", "°", "dega")


# --------------------------------------------------------------------------------------------
# columns and units


def _is_length_unit(text: str) -> bool:
    try:
        parse_depth_unit(text)
    except UnitError:
        return False
    return True


def split_unit_suffix(name: str, *, angles: bool = True) -> tuple[str, str | None]:
    """Split a unit off a column name.

    ``"md_ft"`` -> ``("md", "ft")``; ``"md [m]"`` -> ``("md", "m")``; ``"md"`` -> ``("md", None)``.
    Only a suffix that is an exact length alias (or angle alias, with ``angles``) counts, so
    ``dip_azimuth`` stays whole. Shared by the table readers and the live-feed CSV reader.
    """
    m = re.fullmatch(r"(.+?)\s*[\(\[]\s*(.*?)\s*[\)\]]", name)
    if m:
        return m.group(1).strip(), m.group(2)
    for sep in ("_", " "):
        if sep in name:
            base, suffix = name.rsplit(sep, 1)
            if (angles and suffix in _ANGLE_UNITS) or _is_length_unit(suffix):
                return base.strip(), suffix
    return name, None


def _find_column(
    raw: _RawTable, names: Sequence[str], *, exclude: Iterable[str] = ()
) -> tuple[str, str | None] | None:
    """First column whose base name (unit suffix removed) is in ``names``: (column, unit text)."""
    skip = set(exclude)
    parsed = [(c, *split_unit_suffix(c)) for c in raw.frame.columns if c not in skip]
    for wanted in names:
        for col, base, unit in parsed:
            if base == wanted:
                return col, unit
        for col, _base, _unit in parsed:
            if col == wanted:
                return col, None
    return None


def _need_column(raw: _RawTable, names: Sequence[str], what: str, *,
                 cls: type[InputError] = InputError,
                 exclude: Iterable[str] = ()) -> tuple[str, str | None]:
    found = _find_column(raw, names, exclude=exclude)
    if found is None:
        raise cls(
            f"{raw.source}: no {what} column (columns are {list(raw.frame.columns)}); name one "
            f"of: {', '.join(names[:6])} (with a unit suffix where it is a length, e.g. "
            f"{names[0]}_m or {names[0]}_ft)"
        )
    return found


def _column_unit(raw: _RawTable, col: str, unit_text: str | None) -> DepthUnit | None:
    if unit_text is None:
        return None
    return parse_depth_unit(unit_text, source=f"{raw.source}, column {col!r}")


def _check_angle_unit(raw: _RawTable, col: str, unit_text: str | None) -> None:
    if unit_text is not None and unit_text not in _ANGLE_UNITS:
        raise UnitError(
            f"{raw.source}, column {col!r}: angle unit {unit_text!r} is not supported; give "
            "angles in degrees (suffix _deg or none)"
        )


def _compatible(a: DepthUnit, b: DepthUnit) -> bool:
    feet = {DepthUnit.FT, DepthUnit.USFT}
    return a is b or (a in feet and b in feet)


def _resolve_unit(
    found: Sequence[tuple[str, DepthUnit]],
    given: DepthUnit | str | None,
    *,
    source: str,
    hint: str,
) -> DepthUnit:
    """One depth unit from what the file states (``found``) and what the caller gives.

    The caller's ``usft`` refines a file's ``ft`` (which foot) and is not a conflict.
    """
    given_unit = parse_depth_unit(given, source=source) if given is not None else None
    for i, (where_a, unit_a) in enumerate(found):
        for where_b, unit_b in found[i + 1:]:
            if not _compatible(unit_a, unit_b):
                raise UnitError(
                    f"{source}: depth unit conflict: {where_a} says {unit_a.value} but {where_b} "
                    f"says {unit_b.value}; correct the one that is wrong"
                )
        if given_unit is not None and not _compatible(unit_a, given_unit):
            raise UnitError(
                f"{source}: depth unit conflict: {where_a} says {unit_a.value} but "
                f"depth_unit={given_unit.value!r} was given; drop the argument or correct the "
                "file"
            )
    if given_unit is not None:
        return given_unit
    if found:
        return found[0][1]
    raise UnitError(
        f"{source}: no depth unit: {hint}; add the unit to the column name (e.g. md_m, md_ft) "
        "or pass depth_unit=... (--depth-unit m|ft|usft)"
    )


def _unit_from_side_file(path: Path) -> tuple[str, DepthUnit] | None:
    """Length unit stated by a JSON side file with the same stem, if it states one."""
    side = path.with_suffix(".json")
    if not side.is_file():
        return None
    try:
        meta = json.loads(side.read_text(encoding="utf-8-sig"))
    except (OSError, UnicodeDecodeError, json.JSONDecodeError) as err:
        raise InputError(
            f"{side}: side file of {path.name} is not readable JSON ({err}); fix it or move it "
            "away"
        ) from err
    if not isinstance(meta, dict):
        return None
    for key in ("length_unit", "depth_unit", "md_unit", "unit"):
        if key in meta and meta[key] is not None:
            text = re.split(r"[(;]", str(meta[key]), maxsplit=1)[0].strip()
            if text.lower() in ("", "not stated", "unknown", "none", "n/a", "unstated"):
                return None
            return f"side file {side.name} ({key}={meta[key]!r})", parse_depth_unit(
                text, source=f"{side}, {key}"
            )
    return None
