"""The cut table: one row per fault cut, the same columns whatever found the cut.

Internally every length is in metres (:class:`FaultCut`); :func:`cuts_to_frame` converts to the
caller's unit once and puts the unit in each length column's name (``md_ft``, ``tvdss_m``).
"""

from __future__ import annotations

import dataclasses
import math
from dataclasses import dataclass, field

import pandas as pd

from ..geo.precision import lengths_in_text
from ..geo.units import DepthUnit, parse_depth_unit

__all__ = [
    "FaultCut",
    "CUT_COLUMNS",
    "LENGTH_FIELDS",
    "cuts_to_frame",
    "empty_cut_frame",
    "SECTIONS",
    "FAULT_TYPES",
    "CROSSINGS",
]

#: Observed section change.
SECTIONS = ("missing", "repeated", "undetermined")
#: Interpreted fault type (separation sense).
FAULT_TYPES = ("normal", "reverse", "undetermined")
#: Which way the well crossed the fault.
CROSSINGS = (
    "hanging wall -> footwall",
    "footwall -> hanging wall",
    "assumed hanging wall -> footwall",
    "undetermined",
)


@dataclass(frozen=True)
class FaultCut:
    """One fault cut in one well. Lengths in metres, angles in degrees.

    ``md_m`` is the MD of the first sample below the cut; ``md_top_m``/``md_base_m`` bracket the
    interval in which the evidence places it. ``delta_s_m`` is the signed stratigraphic jump
    (TST, s below the cut minus s above). ``tst_m``/``tvt_m`` are the missing or repeated
    thickness (positive). ``md_span_m`` is the MD interval the missing strata would have
    occupied in this well, or the repeated MD interval.
    """

    well: str
    method: str  # "tops" | "curves" | "both"
    md_m: float
    md_top_m: float
    md_base_m: float
    tvd_m: float
    tvdss_m: float
    x_m: float
    y_m: float
    section: str
    fault_type: str
    delta_s_m: float
    tst_m: float
    tvt_m: float
    md_span_m: float
    vertical_separation_m: float
    throw_m: float
    heave_m: float
    fault_dip_deg: float
    fault_dip_azimuth_deg: float
    fault_dip_source: str  # "given" | "assumed (...)"
    crossing: str
    surface_above: str
    surface_below: str
    confidence: float = 1.0
    net_slip_m: float = math.nan
    strike_slip_m: float = math.nan
    bed_dip_deg: float = math.nan
    bed_dip_azimuth_deg: float = math.nan
    expected_thickness_m: float = math.nan
    observed_thickness_m: float = math.nan
    fault_name: str = ""
    notes: str = ""
    extra: dict = field(default_factory=dict, compare=False)


_FIELDS = [f.name for f in dataclasses.fields(FaultCut) if f.name != "extra"]
#: Fields holding lengths (stored in metres, suffix ``_m``).
LENGTH_FIELDS = tuple(f for f in _FIELDS if f.endswith("_m"))


def _column_name(field_name: str, unit: DepthUnit) -> str:
    if field_name in LENGTH_FIELDS:
        return field_name[:-2] + "_" + unit.suffix
    return field_name


def CUT_COLUMNS(unit: DepthUnit | str = DepthUnit.M) -> list[str]:  # noqa: N802 - table schema
    """Column names of the cut table for an output unit, in order."""
    u = parse_depth_unit(unit)
    return [_column_name(f, u) for f in _FIELDS]


def empty_cut_frame(unit: DepthUnit | str = DepthUnit.M) -> pd.DataFrame:
    """A cut table with no rows and the right columns."""
    return pd.DataFrame({c: pd.Series(dtype=object) for c in CUT_COLUMNS(unit)})


def cuts_to_frame(cuts, unit: DepthUnit | str = DepthUnit.M) -> pd.DataFrame:
    """Turn :class:`FaultCut` records into the cut table, lengths converted to ``unit`` (the
    lengths the notes state too, :func:`wellfault.geo.precision.lengths_in_text`)."""
    u = parse_depth_unit(unit)
    cuts = list(cuts)
    if not cuts:
        return empty_cut_frame(u)
    rows = []
    for c in cuts:
        row = {}
        for f in _FIELDS:
            v = getattr(c, f)
            if f in LENGTH_FIELDS and v is not None:
                v = float(v) / u.metres
            elif f == "notes":
                v = lengths_in_text(v, u)
            row[_column_name(f, u)] = v
        rows.append(row)
    df = pd.DataFrame(rows, columns=CUT_COLUMNS(u))
    return df.sort_values(["well", df.columns[2]], kind="stable").reset_index(drop=True)
