"""One well, all the evidence: the function behind ``wellfault detect``.

:func:`find_fault_cuts` takes in-memory objects (a :class:`~wellfault.geo.well.Well`, a tops frame,
a :class:`~wellfault.geo.trajectory.Trajectory`, a :class:`~wellfault.geo.column.ReferenceColumn`) and
returns the cut table as a DataFrame. :func:`detect_files` reads the same from files, the way the
command line gives them.
"""

from __future__ import annotations

import dataclasses
import warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from ..geo.column import ReferenceColumn
from .curve_settings import CurveSettings, plausible_separation_m
from .curvecuts import combine_evidence, find_cuts_from_curves
from ..geo.dip import BedDip
from ..errors import InputError, SurveyError, WellfaultWarning, input_error
from .measure import FaultAssumptions
from .results import FaultCut, cuts_to_frame
from .topcuts import TopsTolerance, find_cuts_from_tops, tops_intervals
from ..geo.trajectory import Trajectory
from ..geo.units import DepthUnit, parse_depth_unit

__all__ = ["WellAnalysis", "analyse_well", "find_fault_cuts", "detect_files",
           "load_column"]


@dataclass
class WellAnalysis:
    """Everything the detectors found in one well.

    ``cuts`` is the cut table (DataFrame, caller's unit); ``records`` the same cuts as
    :class:`FaultCut` (metres); ``track`` the stratigraphic position track (``md_m, s_m, unit,
    confidence``) when curves were aligned, else None; ``alignment`` the engine's result;
    ``notes`` the well-level findings that are not cuts: picks the curves do not honour
    ("possible mis-pick ..."), where the curve evidence is weak ("curve evidence weak from
    MD A to B ...", the type log having no character there, :mod:`wellfault.align.character`),
    and one "candidate cut withheld ..." per cut in ``withheld``: weak candidates measured but
    not reported (curve jumps under the confidence floors of
    :class:`~wellfault.evidence.curve_settings.CurveSettings`, and tops cuts the curves cross
    without a jump, :data:`TOPS_UNCONFIRMED_MIN`), the reason ending their notes.
    """

    cuts: pd.DataFrame
    records: list[FaultCut]
    track: pd.DataFrame | None = None
    alignment: object | None = None
    trajectory: Trajectory | None = None
    bed_dip: BedDip | None = None
    assumptions: FaultAssumptions | None = None
    well: object | None = None
    column: ReferenceColumn | None = None
    tops: pd.DataFrame | None = None
    tolerance: TopsTolerance | None = None
    notes: list[str] = dataclasses.field(default_factory=list)
    withheld: list[FaultCut] = dataclasses.field(default_factory=list)


#: Least tops confidence of a tops cut that the curves cross on the type log without a jump
#: (:meth:`~wellfault.evidence.curvecuts.CurveResult.crossed_without_jump`): under it the
#: thickness anomaly is less than 18 % beyond the tolerance and the curves, correlating
#: across the bracket, see no cut — natural thickness variation more likely than a fault.
#: On the low-character calibration wells (seeds 10000+, 960 wells with tops) the tops-only
#: cuts of curves+tops runs were 33 false ones at tops confidence 0.04-0.23 and 20 real ones
#: at 0.36-1.0 (the curves miss a real cut in a plain stretch, so a higher level would cost
#: real cuts: care, common practice is to trust a clear tops anomaly).
TOPS_UNCONFIRMED_MIN = 0.3


def analyse_well(
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
    curves: CurveSettings | None = None,
    unit: DepthUnit | str | None = None,
) -> WellAnalysis:
    """Find, classify and measure every fault cut in one well, with all the evidence given.

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
    curves : CurveSettings, optional
        Align these curves to the column's type log (the column must carry one, e.g. built
        with ``ReferenceColumn.from_type_well``); cuts found by both tops and curves are
        merged (``method="both"``). With tops too, the picks anchor the alignment and the
        tops' separations widen the default plausible separation
        (:func:`~wellfault.evidence.curve_settings.plausible_separation_m`); a pick the curves do not
        honour is noted ("possible mis-pick") on the tops cuts it brackets and in ``notes``,
        with a :class:`WellfaultWarning`.
    unit : DepthUnit or str, optional
        Output length unit; default the well's own depth unit.

    Returns
    -------
    WellAnalysis
        The cut table (``wellfault.evidence.results.CUT_COLUMNS``; empty with the right columns when
        the well shows no cut), the records in metres, and the stratigraphic track.
    """
    from ..geo.geometry import parse_attitude

    if isinstance(bed_dip, str):
        bed_dip = BedDip.parse(bed_dip)
    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    _check_dip_surfaces(bed_dip, column)
    if isinstance(fault, str):
        fault = parse_attitude(fault, what="fault dip")
    if isinstance(pitch, str):
        pitch = _parse_pitch_text(pitch)
    assumptions = FaultAssumptions(fault=fault, pitch=pitch, planes=tuple(planes))
    survey = trajectory
    if trajectory is None:
        trajectory = Trajectory.vertical(x0_m=_or0(well.x_m), y0_m=_or0(well.y_m),
                                         ref_elevation_m=well.ref_elevation_m)
    if tops is None and curves is None:
        raise InputError(f"well {well.name!r}: no evidence to work on; give tops, or curves "
                         "with a type log in the column")
    cuts: list[FaultCut] = []
    picks = None
    if tops is not None:
        picks = tops
        if "well" in tops.columns and tops["well"].nunique() > 1:
            picks = tops[tops["well"].astype(str) == str(well.name)]
            if len(picks) == 0:
                raise InputError(f"the tops file has no picks for well {well.name!r}; it names "
                                 f"{sorted(tops['well'].astype(str).unique())[:10]}")
        picks = picks.assign(well=str(well.name))
    check_depth_coverage(well, picks, survey)
    if picks is not None:
        cuts += find_cuts_from_tops(picks, column, trajectory, bed_dip=bed_dip,
                                    well=str(well.name), assumptions=assumptions,
                                    tolerance=tolerance, expected=expected)
    track = alignment = None
    notes: list[str] = []
    withheld: list[FaultCut] = []
    if curves is not None:
        if curves.max_separation_m is None and column.type_log is not None:
            curves = dataclasses.replace(curves, max_separation_m=plausible_separation_m(
                len(column.type_log) * column.type_log_step_m, [c.delta_s_m for c in cuts]))
        res = find_cuts_from_curves(well, column, trajectory, bed_dip=bed_dip, settings=curves,
                                    assumptions=assumptions, picks=picks)
        cuts = _note_mispicks(cuts, res.mispicks, well)
        notes = [n for _, _, n in res.mispicks]
        checks, apart = None, set()
        if picks is not None:
            checks = _IntervalChecks.of(tops_intervals(
                picks.sort_values("md_m", kind="stable"), column, trajectory, bed_dip,
                expected=expected), tolerance, res.cuts)
            cuts, apart = checks.tops_kept_apart(cuts)
        cuts = combine_evidence(cuts, res.cuts, apart=apart)
        cuts, withheld = _unconfirmed_tops(cuts, res)
        if checks is not None:
            cuts, contradicted = checks.withhold_contradicted(cuts)
            withheld += contradicted
        withheld = sorted(withheld + res.withheld, key=lambda c: c.md_m)
        notes += res.weak + [_withheld_note(c) for c in withheld]
        track, alignment = res.track, res.alignment
    frame = cuts_to_frame(cuts, unit if unit is not None else well.depth_unit)
    return WellAnalysis(frame, cuts, track, alignment, trajectory, bed_dip, assumptions, well,
                        column, picks, tolerance, notes, withheld)


def _unconfirmed_tops(cuts: list[FaultCut], res) -> tuple[list[FaultCut], list[FaultCut]]:
    """(reported, withheld): tops-only cuts under :data:`TOPS_UNCONFIRMED_MIN` whose bracket
    the curves cross on the type log without a jump are withheld, the reason in their notes."""
    keep, out = [], []
    for c in cuts:
        if (c.method == "tops" and c.confidence < TOPS_UNCONFIRMED_MIN
                and res.crossed_without_jump(c.md_top_m, c.md_base_m)):
            out.append(dataclasses.replace(c, notes=c.notes + (
                f"; withheld: tops confidence {c.confidence:.2f} under "
                f"{TOPS_UNCONFIRMED_MIN:g} and the curves cross the bracket on the type log "
                "without a jump")))
        else:
            keep.append(c)
    return keep, out


#: Relative error of a curve cut's |Δs| allowed when the tops check it (bench_curves.py goal:
#: |Δs| error <= max(10 %, 1 m)).
_CURVE_DS_ERROR = 0.1


@dataclass(frozen=True)
class _IntervalChecks:
    """The tops against the curves, interval by interval between consecutive picks.

    Between two consecutive picks the tops measure the net stratigraphic jump (expected
    minus drilled interval, :func:`~wellfault.evidence.topcuts.tops_intervals`); the curve
    cuts there add up to the curves' net jump. The two *disagree* when they differ by more
    than both measurements' tolerances: the tops tolerance of the interval plus a tenth of
    the curve cuts' summed |Δs| there (the curves measure |Δs| to about 10 %, the goal of
    bench_curves.py). The picks are where they are; a net jump they do not see, or only part
    of the jump they see, is the alignment hopping to a look-alike. So, where they disagree:

    * a tops cut is not merged with the curve cuts there (:meth:`tops_kept_apart`: it keeps the
      tops' bracket and size, a note saying why), and
    * the curves-only cuts there are withheld (:meth:`withhold_contradicted`).

    On the low-character calibration wells (seeds 10000+, 960 wells with tops) curves-only
    cuts in contradicted intervals were 19 false and none real. Merging regardless placed a
    cut where the curves put a partial jump (a 102 m missing section merged with a 39 m curve
    jump 50 m above it, outside the curve bracket). Keeping such tops cuts apart took the
    curves+tops recall (|Δs| >= 5 m, between picks) from 0.933 to 0.939 and the false cuts
    from 0.038 to 0.033 per well on 600 calibration wells (degraded logs 10000-10019, wells
    15000+). A cut of the curves the tops do not contradict (below their tolerance, or two
    faults that cancel) is kept.
    """

    top: np.ndarray
    base: np.ndarray
    seen: np.ndarray
    net: np.ndarray
    tol: np.ndarray
    n_curve: np.ndarray      # curve cuts per interval
    names: tuple

    @classmethod
    def of(cls, intervals: pd.DataFrame, tolerance: TopsTolerance,
           curve_cuts: list[FaultCut]) -> "_IntervalChecks":
        top = intervals["md_top_m"].to_numpy(float)
        base = intervals["md_base_m"].to_numpy(float)
        md = np.array([c.md_m for c in curve_cuts], dtype=float)
        ds = np.array([c.delta_s_m for c in curve_cuts], dtype=float)
        inside = (top[:, None] < md[None, :]) & (md[None, :] <= base[:, None])
        tol = (tolerance.allowed(intervals["spread_m"].to_numpy(float))
               + _CURVE_DS_ERROR * (inside * np.abs(ds)).sum(axis=1))
        names = tuple(zip(intervals["surface_above"].astype(str),
                          intervals["surface_below"].astype(str)))
        return cls(top, base, intervals["delta_s_m"].to_numpy(float),
                   (inside * ds).sum(axis=1), tol, inside.sum(axis=1), names)

    def disagreeing(self, md_m: float) -> int | None:
        """The interval holding ``md_m`` when tops and curves disagree there, else None."""
        k = np.flatnonzero((self.top < md_m) & (md_m <= self.base))
        if k.size and abs(self.net[k[0]] - self.seen[k[0]]) > self.tol[k[0]]:
            return int(k[0])
        return None

    def _why(self, k: int) -> str:
        a, b = self.names[k]
        return (f"the picks {a} and {b} show a net jump of {self.seen[k]:+.1f} m TST between "
                f"them, the curves {self.net[k]:+.1f} m (tolerance {self.tol[k]:.1f} m)")

    def tops_kept_apart(self, tops_cuts: list[FaultCut]) -> tuple[list[FaultCut], set[int]]:
        """(tops cuts, indices not to merge): tops cuts in disagreeing intervals that hold a
        curve cut, their notes saying they stand on the tops alone."""
        out, apart = [], set()
        for i, t in enumerate(tops_cuts):
            k = self.disagreeing(t.md_m)
            if t.method == "tops" and k is not None and self.n_curve[k]:
                apart.add(i)
                t = dataclasses.replace(t, notes=t.notes + (
                    f"; placed by the tops alone: {self._why(k)}"))
            out.append(t)
        return out, apart

    def withhold_contradicted(self, cuts: list[FaultCut]
                              ) -> tuple[list[FaultCut], list[FaultCut]]:
        """(reported, withheld): curves-only cuts in disagreeing intervals are withheld, the
        reason in their notes."""
        keep, out = [], []
        for c in cuts:
            k = self.disagreeing(c.md_m) if c.method == "curves" else None
            if k is not None:
                out.append(dataclasses.replace(c, notes=c.notes + f"; withheld: {self._why(k)}"))
            else:
                keep.append(c)
        return keep, out


def _withheld_note(c: FaultCut) -> str:
    """The well-level note of a withheld candidate cut (lengths in metres, like every note)."""
    return (f"candidate cut withheld ({c.method}): {c.section} section at MD {c.md_m:.1f} m, "
            f"{abs(c.delta_s_m):.1f} m TST, {c.notes.rsplit('; withheld: ', 1)[-1]}")


def _note_mispicks(tops_cuts: list[FaultCut], mispicks, well) -> list[FaultCut]:
    """Tops cuts with the mis-pick notes of the picks their brackets hold; one warning per
    mis-pick (the picks a tops cut rests on may be the cut's whole evidence)."""
    from ..geo.precision import lengths_in_text

    out = list(tops_cuts)
    for surface, md, note in mispicks:
        said = lengths_in_text(note, well.depth_unit)  # warnings speak the well's unit
        if not surface:                   # the curves follow none of the picks: no one pick
            warnings.warn(f"well {well.name!r}: {said}", WellfaultWarning, stacklevel=3)
            continue
        warnings.warn(f"well {well.name!r}: {said}; check the pick (the curve evidence was "
                      "aligned around it)", WellfaultWarning, stacklevel=3)
        for k, c in enumerate(out):
            if c.md_top_m - 1e-6 <= md <= c.md_base_m + 1e-6:
                out[k] = dataclasses.replace(c, notes=(c.notes + "; " if c.notes else "") + note)
    return out


def find_fault_cuts(well, column: ReferenceColumn, **kwargs) -> pd.DataFrame:
    """The cut table of one well: :func:`analyse_well` (same arguments) ``.cuts``.

    Examples
    --------
    >>> import pandas as pd
    >>> from wellfault import ReferenceColumn, find_fault_cuts
    >>> from wellfault.geo.well import Well
    >>> col = ReferenceColumn.from_table(pd.DataFrame(
    ...     {"surface": ["A", "B", "C"], "thickness_m": [30.0, 40.0, 50.0]}))
    >>> well = Well("W-1", pd.DataFrame(index=pd.Index([900.0, 1200.0], name="md_m")), "m")
    >>> tops = pd.DataFrame({"surface": ["A", "C"], "md_m": [1000.0, 1045.0]})
    >>> find_fault_cuts(well, col, tops=tops)[["md_m", "section", "tst_m"]]
         md_m  section  tst_m
    0  1022.5  missing   25.0
    """
    return analyse_well(well, column, **kwargs).cuts


def _or0(v):
    return 0.0 if v is None else float(v)


def survey_trajectory(path, *, depth_unit=None, x_m=None, y_m=None, ref_elevation_m=None,
                      name=None) -> Trajectory:
    """The trajectory of a survey file (``read_survey``) from a well's surface location
    (0 when unknown) and depth reference."""
    from ..io import read_survey

    return Trajectory.from_survey(read_survey(path, depth_unit=depth_unit), x0_m=_or0(x_m),
                                  y0_m=_or0(y_m), ref_elevation_m=ref_elevation_m, name=name,
                                  source=str(path))


def _check_dip_surfaces(bed_dip: BedDip, column: ReferenceColumn) -> None:
    """A per-surface dip table may name only surfaces of the column (a typo would silently
    leave that unit with the default dip)."""
    if bed_dip.kind != "surface" or bed_dip.table is None:
        return
    names = bed_dip.table["surface"].astype(str).tolist()
    unknown = [n for n in names if n not in set(column.names)]
    if unknown:
        rows = bed_dip.table.attrs.get("rows") or [None] * len(names)
        row = rows[names.index(unknown[0])] if len(rows) == len(names) else None
        raise input_error(
            f"surface {unknown[0]!r} in the dip table is not in the reference column",
            source=bed_dip.table.attrs.get("source", "dip table"), row=row,
            fix=f"the column has {list(column.names)}; rename it (names must match exactly) "
                "or delete the row")


def coverage_reach_m(well) -> float:
    """How far beyond the logged interval picks and the well path may reach. [m]

    10 % of the logged interval, at least 150 m (common practice: a straight extension over a
    few stands of pipe, or a pick from a log run a little deeper, is a fair reading; more is a
    sign of a wrong unit, a wrong well or a short survey).
    """
    top, base = well.md_range_m
    return max(150.0, 0.10 * (base - top))


def check_depth_coverage(well, picks: pd.DataFrame | None,
                         trajectory: Trajectory | None) -> None:
    """Check that the picks lie along the log and that the survey reaches down to them.

    A pick outside the logged interval by up to :func:`coverage_reach_m`, or a survey that
    ends that little above the deepest log sample or pick, is used as given (below the last
    station the path goes straight on along its direction) with a :class:`WellfaultWarning`;
    further raises. ``trajectory`` None or a lone station at MD 0 (a vertical well) skips the
    survey check.

    Raises
    ------
    InputError
        A pick further outside the log: a wrong depth unit, another well's tops, TVD as MD.
    SurveyError
        A survey that ends further above the deepest depth used.
    """
    unit = well.depth_unit
    k_u = 1.0 / unit.metres
    top, base = well.md_range_m
    reach = coverage_reach_m(well)
    md = np.zeros(0) if picks is None else picks["md_m"].to_numpy(float)
    off = np.maximum(top - md, md - base)
    log_text = f"the log {well.source} covers MD {top * k_u:g}-{base * k_u:g} {unit.suffix}"
    if md.size and np.nanmax(off) > 0:
        k = int(np.nanargmax(off))
        source = picks.attrs.get("source", "tops")
        where = f"pick {str(picks['surface'].iloc[k])!r} at MD {md[k] * k_u:g} {unit.suffix}"
        if off[k] > reach:
            raise input_error(
                f"{where} lies {off[k] * k_u:g} {unit.suffix} outside the log ({log_text})",
                source=source, row=picks["row"].iloc[k] if "row" in picks.columns else None,
                fix="check that the tops belong to this well and that their depth unit is "
                    "right (md_m or md_ft, --depth-unit); picks may lie at most "
                    f"{reach * k_u:g} {unit.suffix} beyond the log")
        warnings.warn(
            f"{source}: {int(np.sum(off > 0))} pick(s) outside the logged interval, the "
            f"furthest {where}, {off[k] * k_u:g} {unit.suffix} outside ({log_text}); used "
            "them as given", WellfaultWarning, stacklevel=3)
    if trajectory is None or trajectory.md_max_m <= 0.0:
        return
    deepest = float(np.nanmax(np.append(md, base)))
    gap = deepest - trajectory.md_max_m
    if not gap > 0:
        return
    end = (f"the survey ends at MD {trajectory.md_max_m * k_u:g} {unit.suffix}, "
           f"{gap * k_u:g} {unit.suffix} above the "
           f"{'log bottom' if deepest == base else 'deepest pick'} (MD "
           f"{deepest * k_u:g} {unit.suffix})")
    source = trajectory.source or (f"well {well.name!r}" if well.name else "survey")
    if gap > reach:
        raise input_error(
            end, source=source, cls=SurveyError,
            fix="give the survey down to total depth (wellfault extends the last station's "
                f"direction straight for at most {reach * k_u:g} {unit.suffix})")
    inc, azi = trajectory.inclination_azimuth(trajectory.md_max_m)
    warnings.warn(
        f"{source}: {end}; extended the path straight along the last station (inc "
        f"{float(inc[0]):g}, azi {float(azi[0]):g} deg). Give the survey down to total depth "
        "to silence this", WellfaultWarning, stacklevel=3)


def _parse_pitch_text(text: str) -> tuple[float, float]:
    from ..geo.slip import parse_pitch

    return parse_pitch(text)


def load_column(
    *,
    column: str | Path | None = None,
    type_well: str | Path | None = None,
    type_tops: str | Path | None = None,
    type_survey: str | Path | None = None,
    bed_dip: BedDip | None = None,
    depth_unit: DepthUnit | None = None,
) -> ReferenceColumn:
    """The reference column from a table, from a type well, or both.

    From a type well (its LAS, tops and survey; bed dip as for the wells) the column carries the
    type-log curves the curve evidence needs. Given both, the type well's surfaces are used and
    the table's unconformity flags are copied onto them.
    """
    from ..io import read_column_table, read_las, read_tops

    table = read_column_table(column, depth_unit=depth_unit) if column is not None else None
    if type_well is None:
        if type_tops is not None or type_survey is not None:
            raise InputError("--type-tops/--type-survey need --type-well TYPE.las")
        if table is None:
            raise InputError("no reference column: give --column COLUMN.csv, or a type well "
                             "(--type-well TYPE.las --type-tops TYPE_TOPS.csv)")
        return ReferenceColumn.from_table(table, source=column)
    if type_tops is None:
        raise InputError("a type well needs its tops to place the surfaces: give "
                         "--type-tops TYPE_TOPS.csv")
    tw = read_las(type_well, depth_unit=depth_unit)
    ttops = read_tops(type_tops, depth_unit=depth_unit, well=tw.name)
    ttraj = None
    if type_survey is not None:
        ttraj = survey_trajectory(type_survey, depth_unit=depth_unit, x_m=tw.x_m, y_m=tw.y_m,
                                  ref_elevation_m=tw.ref_elevation_m, name=tw.name)
    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    if ttraj is None:
        ttraj = Trajectory.vertical(x0_m=_or0(tw.x_m), y0_m=_or0(tw.y_m),
                                    ref_elevation_m=tw.ref_elevation_m)
    first_md = float(ttops["md_m"].min())
    dip = tuple(float(v[0]) for v in bed_dip.attitude_at(np.array([first_md]), ttops))
    unconformities = ()
    if table is not None:
        unconformities = tuple(table.loc[table["unconformity"].astype(bool), "surface"])
    return ReferenceColumn.from_type_well(tw, ttops, ttraj, dip,
                                          unconformities=unconformities)


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
    type_well: str | Path | None = None,
    type_tops: str | Path | None = None,
    type_survey: str | Path | None = None,
    curves: list[str] | None = None,
    depth_unit: str | None = None,
    output_unit: str | None = None,
    tolerance: TopsTolerance = TopsTolerance(),
    max_separation: float | None = None,
    pick_tolerance: float | None = None,
) -> WellAnalysis:
    """Read a well's files and analyse it (what ``wellfault detect`` does).

    Curve evidence runs when a type well is given (``curves`` defaults to every curve family
    the well and the type well share then, :func:`wellfault.evidence.curve_settings.shared_curves`); tops
    evidence when ``tops`` is given; both are combined. ``max_separation`` (the plausible fault
    separation, TST) and ``pick_tolerance`` (TST) are in the input depth unit
    (:class:`~wellfault.evidence.curve_settings.CurveSettings`).
    """
    from ..io import read_dip_table, read_las, read_tops

    unit_given = parse_depth_unit(depth_unit) if depth_unit else None
    well = read_las(las, depth_unit=unit_given)
    if dip is not None and dip_table is not None:
        raise InputError("give either --dip or --dip-table, not both")
    bed = BedDip.parse(dip, source="--dip") if dip is not None else None
    if isinstance(fault, str):
        from ..geo.geometry import parse_attitude

        fault = parse_attitude(fault, what="fault dip", source="--fault")
    if isinstance(pitch, str):
        from ..geo.slip import parse_pitch

        pitch = parse_pitch(pitch, source="--pitch")
    if dip_table is not None:
        t = read_dip_table(dip_table, depth_unit=unit_given)
        bed = BedDip.from_md_table(t, source=dip_table) if "md_m" in t.columns else \
            BedDip.per_surface(t, source=dip_table)
    col = load_column(column=column, type_well=type_well, type_tops=type_tops,
                      type_survey=type_survey, bed_dip=bed, depth_unit=unit_given)
    traj = None
    if survey is not None:
        traj = survey_trajectory(survey, depth_unit=unit_given, x_m=well.x_m, y_m=well.y_m,
                                 ref_elevation_m=well.ref_elevation_m, name=well.name)
    tops_df = read_tops(tops, depth_unit=unit_given, well=well.name) if tops is not None else None
    settings = None
    if curves or type_well is not None:
        if col.type_log is None:
            raise InputError("--curve needs a type log: give --type-well TYPE.las and "
                             "--type-tops TYPE_TOPS.csv")
        k = (unit_given or well.depth_unit).metres
        extra = {}
        if max_separation is not None:
            extra["max_separation_m"] = float(max_separation) * k
        if pick_tolerance is not None:
            extra["pick_tolerance_m"] = float(pick_tolerance) * k
        settings = CurveSettings.make(curves or None, **extra)
    elif max_separation is not None or pick_tolerance is not None:
        raise InputError("--max-separation and --pick-tolerance tune the curve evidence: give "
                         "a type well too (--type-well TYPE.las --type-tops TYPE_TOPS.csv)")
    if tops_df is None and settings is None:
        raise InputError("no evidence to work on: give --tops TOPS.csv, or a type well "
                         "(--type-well TYPE.las --type-tops TYPE_TOPS.csv) for the curves")
    out_unit = parse_depth_unit(output_unit) if output_unit else well.depth_unit
    return analyse_well(well, col, tops=tops_df, trajectory=traj, bed_dip=bed, fault=fault,
                        pitch=pitch, tolerance=tolerance, curves=settings, unit=out_unit)
