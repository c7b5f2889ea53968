"""Field screening, inputs: the manifest, column and bed dip as given (files or objects), one
task per well, and the unit of the tables."""

from __future__ import annotations

import math
import os

import pandas as pd

from ..errors import InputError
from ..geo.column import ReferenceColumn
from ..geo.dip import BedDip
from ..geo.units import DepthUnit, parse_depth_unit
from .screen_well import WellTask, _finite


# ------------------------------------------------------------------------------- helpers
def _as_manifest(manifest, depth_unit) -> pd.DataFrame:
    if isinstance(manifest, (str, os.PathLike)):
        from ..io import read_manifest

        return read_manifest(manifest, length_unit=depth_unit)
    if not isinstance(manifest, pd.DataFrame):
        raise InputError("manifest must be a DataFrame from wellfault.io.read_manifest or the "
                         f"path of a manifest CSV (got {type(manifest).__name__})")
    if "well" not in manifest.columns:
        raise InputError(f"the manifest has no 'well' column (columns: {list(manifest.columns)})"
                         "; read it with wellfault.io.read_manifest")
    return manifest


def _as_column(column, depth_unit) -> ReferenceColumn:
    if isinstance(column, ReferenceColumn):
        return column
    if isinstance(column, (str, os.PathLike)):
        from ..io import read_column_table

        return ReferenceColumn.from_table(read_column_table(column, depth_unit=depth_unit),
                                          source=str(column))
    if isinstance(column, pd.DataFrame):
        return ReferenceColumn.from_table(column)
    raise InputError("column must be a ReferenceColumn, a column table or its path "
                     f"(got {type(column).__name__})")


def _as_bed_dip(bed_dip) -> BedDip | None:
    if bed_dip is None or isinstance(bed_dip, BedDip):
        return bed_dip
    if isinstance(bed_dip, str):
        return BedDip.parse(bed_dip)
    try:
        dip, azi = bed_dip
    except (TypeError, ValueError):
        raise InputError(f"bed_dip must be 'dip/azimuth' text, a (dip, azimuth) pair or a "
                         f"BedDip (got {bed_dip!r})") from None
    return BedDip.constant(float(dip), float(azi))


def _tasks(manifest: pd.DataFrame) -> list[WellTask]:
    def cell(row, name):
        v = row.get(name)
        if v is None or (isinstance(v, float) and math.isnan(v)):
            return None
        return v

    tasks = []
    for k, row in enumerate(manifest.to_dict("records")):
        name = cell(row, "well")
        if name is None or not str(name).strip():
            raise InputError(f"manifest row {k + 1}: empty well name; name the well or delete "
                             "the row")
        tasks.append(WellTask(
            k, str(name), *(None if cell(row, c) is None else str(cell(row, c))
                            for c in ("las", "survey", "tops", "dip")),
            _finite(cell(row, "x_m")), _finite(cell(row, "y_m")),
            _finite(cell(row, "elevation_m")),
            None if cell(row, "depth_unit") is None else str(cell(row, "depth_unit"))))
    names = [t.well for t in tasks]
    if len(set(names)) != len(names):
        dup = sorted({n for n in names if names.count(n) > 1})[:5]
        raise InputError(f"the manifest lists well(s) {dup} more than once; list each well once")
    return tasks


def _output_unit(unit, well_units) -> tuple[DepthUnit, str]:
    """The tables' unit and a sentence saying where it comes from (``well_units``: each well's
    LAS depth unit, '' when unknown)."""
    counts: dict[str, int] = {}
    for u in well_units:
        if u:
            key = parse_depth_unit(u).suffix
            counts[key] = counts.get(key, 0) + 1
    logged = ", ".join(f"{k}: {v} well{'s' if v != 1 else ''}" for k, v in sorted(counts.items()))
    if unit is not None:
        out = parse_depth_unit(unit)
        why = "as chosen"
    elif len(counts) == 1:
        out = parse_depth_unit(next(iter(counts)))
        why = "the wells' unit"
    else:
        out = DepthUnit.M
        why = ("the default when the wells mix units; --output-unit ft for feet" if counts
               else "no well's unit known")
    text = f"lengths in {out.suffix} ({why})"
    if len(counts) > 1:
        text += f"; the wells were logged in mixed units ({logged}), all converted to {out.suffix}"
    return out, text
