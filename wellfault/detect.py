"""One well, all the evidence: the function behind ``wellfault detect``.

:func:`find_fault_cuts` takes in-memory objects (a :class:`~wellfault.well.Well`, a tops frame,
a :class:`~wellfault.trajectory.Trajectory`, a :class:`~wellfault.column.ReferenceColumn`) and
returns the cut table as a DataFrame. :func:`detect_files` reads the same from files, the way the
command line gives them.
"""

from __future__ import annotations

from dataclasses import dataclass, field
from pathlib import Path

import pandas as pd

from .column import ReferenceColumn
from .dip import BedDip
from .errors import InputError
from .measure import FaultAssumptions
from .results import FaultCut, cuts_to_frame
from .topcuts import TopsTolerance, find_cuts_from_tops
from .trajectory import Trajectory
from .units import DepthUnit, parse_depth_unit

__all__ = ["DetectionInputs", "find_fault_cuts", "load_inputs", "detect_files"]


@dataclass
class DetectionInputs:
    """Everything known about one well, in canonical units (metres, degrees)."""

    well: object  # wellfault.well.Well
    column: ReferenceColumn
    trajectory: Trajectory
    tops: pd.DataFrame | None = None
    bed_dip: BedDip = field(default_factory=lambda: BedDip.constant(0.0, 0.0))
    type_well: object | None = None
    output_unit: DepthUnit = DepthUnit.M
    warnings: list[str] = field(default_factory=list)


def find_fault_cuts(
    well,
    column: ReferenceColumn,
    *,
    tops: pd.DataFrame | None = None,
    trajectory: Trajectory | None = None,
    bed_dip: BedDip | str | None = None,
    fault: tuple[float, float] | str | None = None,
    pitch: tuple[float, float] | str | None = None,
    tolerance: TopsTolerance = TopsTolerance(),
    planes: tuple | list = (),
    expected: dict | None = None,
    unit: DepthUnit | str | None = None,
    as_records: bool = False,
):
    """Find, classify and measure every fault cut in one well.

    Parameters
    ----------
    well : Well
        The well (its name, surface location and depth-reference elevation are used).
    column : ReferenceColumn
        The field's reference column.
    tops : DataFrame, optional
        The well's picks (``surface, md_m``, optionally ``well``).
    trajectory : Trajectory, optional
        The well path; vertical below the well's surface location when omitted.
    bed_dip : BedDip or "dip/azimuth" text, optional
        Bed attitude; flat beds when omitted.
    fault, pitch : (float, float) or text, optional
        Fault attitude ``(dip, dip azimuth)`` / ``"60/090"`` and slickenline pitch
        ``(pitch, from azimuth)`` / ``"50/200"``.
    tolerance : TopsTolerance
        Thickness tolerance for tops evidence.
    planes : sequence of FaultPlane, optional
        A fault model: each cut takes the attitude of the mapped plane crossing the well inside
        its bracket (and is placed at that crossing).
    expected : dict, optional
        Local expected intervals {(surface_above, surface_below): TST [m]} replacing the
        column's (field screening's neighbour-aware thickness).
    unit : DepthUnit or str, optional
        Output length unit; default the well's own depth unit.

    Returns
    -------
    DataFrame
        The cut table (``wellfault.results.CUT_COLUMNS``); empty with the right columns when the
        well shows no cut. With ``as_records=True`` a list of :class:`FaultCut` (metres).
    """
    from .geometry import parse_attitude

    if isinstance(bed_dip, str):
        bed_dip = BedDip.parse(bed_dip)
    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    if isinstance(fault, str):
        fault = parse_attitude(fault)
    if isinstance(pitch, str):
        pitch = _parse_pitch_text(pitch)
    assumptions = FaultAssumptions(fault=fault, pitch=pitch, planes=tuple(planes))
    if trajectory is None:
        trajectory = Trajectory.vertical(x0_m=_or0(well.x_m), y0_m=_or0(well.y_m),
                                         ref_elevation_m=well.ref_elevation_m)
    cuts: list[FaultCut] = []
    if tops is not None:
        picks = tops
        if "well" in tops.columns and tops["well"].nunique() > 1:
            picks = tops[tops["well"].astype(str) == str(well.name)]
            if len(picks) == 0:
                raise InputError(f"the tops file has no picks for well {well.name!r}; it names "
                                 f"{sorted(tops['well'].astype(str).unique())[:10]}")
        picks = picks.assign(well=str(well.name))
        cuts += find_cuts_from_tops(picks, column, trajectory, bed_dip=bed_dip,
                                    well=str(well.name), assumptions=assumptions,
                                    tolerance=tolerance, expected=expected)
    if as_records:
        return cuts
    return cuts_to_frame(cuts, unit if unit is not None else well.depth_unit)


def _or0(v):
    return 0.0 if v is None else float(v)


def _parse_pitch_text(text: str) -> tuple[float, float]:
    from .slip import parse_pitch

    return parse_pitch(text)


def detect_files(
    las: str | Path,
    *,
    column: str | Path | None = None,
    tops: str | Path | None = None,
    survey: str | Path | None = None,
    dip: str | None = None,
    dip_table: str | Path | None = None,
    fault: str | None = None,
    pitch: str | None = None,
    depth_unit: str | None = None,
    output_unit: str | None = None,
    tolerance: TopsTolerance = TopsTolerance(),
) -> pd.DataFrame:
    """Read a well's files and return its cut table (what ``wellfault detect`` does)."""
    from .io import read_column_table, read_dip_table, read_las, read_survey, read_tops

    unit_given = parse_depth_unit(depth_unit) if depth_unit else None
    well = read_las(las, depth_unit=unit_given)
    if column is None:
        raise InputError("no reference column: give --column COLUMN.csv")
    col = ReferenceColumn.from_table(read_column_table(column, depth_unit=unit_given))
    traj = None
    if survey is not None:
        traj = Trajectory.from_survey(read_survey(survey, depth_unit=unit_given),
                                      x0_m=_or0(well.x_m), y0_m=_or0(well.y_m),
                                      ref_elevation_m=well.ref_elevation_m, name=well.name,
                                      source=str(survey))
    if dip is not None and dip_table is not None:
        raise InputError("give either --dip or --dip-table, not both")
    bed = BedDip.parse(dip) if dip is not None else None
    if dip_table is not None:
        t = read_dip_table(dip_table, depth_unit=unit_given)
        bed = BedDip.from_md_table(t, source=dip_table) if "md_m" in t.columns else \
            BedDip.per_surface(t, source=dip_table)
    tops_df = read_tops(tops, depth_unit=unit_given, well=well.name) if tops is not None else None
    if tops_df is None:
        raise InputError("no evidence to work on: give --tops TOPS.csv (log-curve evidence "
                         "needs --type-well and --type-tops)")
    out_unit = parse_depth_unit(output_unit) if output_unit else well.depth_unit
    return find_fault_cuts(well, col, tops=tops_df, trajectory=traj, bed_dip=bed, fault=fault,
                           pitch=pitch, tolerance=tolerance, unit=out_unit)
