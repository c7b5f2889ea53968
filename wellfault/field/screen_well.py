"""Field screening, one well: load its files, place its tops, detect and re-measure its cuts
(what a worker process runs)."""

from __future__ import annotations

import dataclasses
import math
import re
import time
import warnings
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..errors import InputError, WellfaultError, WellfaultWarning
from ..evidence.measure import FaultPlane
from ..evidence.results import FaultCut
from ..evidence.topcuts import TopsTolerance
from ..geo.column import ReferenceColumn
from ..geo.dip import BedDip

__all__ = ["WellTask"]


_ATTITUDE = re.compile(r"^\s*\d+(?:\.\d*)?\s*/\s*\d+(?:\.\d*)?\s*$")


_CUT_FIELDS = [f.name for f in dataclasses.fields(FaultCut) if f.name != "extra"]


# ------------------------------------------------------------------------------- records
@dataclass(frozen=True)
class WellTask:
    """One manifest row: what a worker needs to read and screen one well (paths, metres)."""

    index: int
    well: str
    las: str | None = None
    survey: str | None = None
    tops: str | None = None
    dip: str | None = None
    x_m: float | None = None
    y_m: float | None = None
    elevation_m: float | None = None
    depth_unit: str | None = None


@dataclass(frozen=True)
class _Config:
    """Settings shared by every well of a run (sent once to each worker process)."""

    column: ReferenceColumn
    bed_dip: BedDip | None
    tolerance: TopsTolerance
    planes: tuple[FaultPlane, ...] = ()
    depth_unit: str | None = None
    # curve evidence: the CurveSettings screen_wells builds from the type well and the curves
    # (None: tops only); the detection passes it to find_fault_cuts(curves=...)
    curves: object | None = None


class _Inputs:
    """One well's inputs as read by a worker; the trajectory is built on first use."""

    def __init__(self, task, well, survey, picks, bed_dip, x, y, elevation):
        self.task, self.well, self.survey, self.picks = task, well, survey, picks
        self.bed_dip, self.x, self.y, self.elevation = bed_dip, x, y, elevation
        self._trajectory = None

    @property
    def trajectory(self):
        if self._trajectory is None:
            from ..geo.trajectory import Trajectory

            if self.survey is not None:
                md, inc, azi = self.survey
                self._trajectory = Trajectory(md, inc, azi, x0_m=self.x or 0.0,
                                              y0_m=self.y or 0.0,
                                              ref_elevation_m=self.elevation,
                                              name=self.task.well, source=self.task.survey)
            else:
                self._trajectory = Trajectory.vertical(x0_m=self.x or 0.0, y0_m=self.y or 0.0,
                                                       ref_elevation_m=self.elevation,
                                                       name=self.task.well)
        return self._trajectory


def _finite(v) -> float | None:
    if v is None:
        return None
    try:
        f = float(v)
    except (TypeError, ValueError):
        return None
    return f if math.isfinite(f) else None


def _load(cfg: _Config, task: WellTask, stage: dict) -> _Inputs:
    """Read one well's files (LAS when given, survey, tops, dip). ``stage['file']`` tracks the
    file being read, for the error table."""
    from ..io.fastpath import load_picks, load_survey_arrays

    unit = task.depth_unit or cfg.depth_unit
    x, y, elev = _finite(task.x_m), _finite(task.y_m), _finite(task.elevation_m)
    well = None
    if task.las:
        from ..io import read_las

        stage["file"] = task.las
        well = read_las(task.las, depth_unit=unit)
        x = x if x is not None else well.x_m
        y = y if y is not None else well.y_m
        elev = elev if elev is not None else well.ref_elevation_m
        well.name, well.x_m, well.y_m, well.ref_elevation_m = task.well, x, y, elev
    survey = None
    if task.survey:
        stage["file"] = task.survey
        survey = load_survey_arrays(task.survey, unit)
    if not task.tops:
        stage["file"] = ""
        raise InputError(f"well {task.well!r}: no tops file in the manifest; screening by tops "
                         "needs one (fill the manifest's tops column)")
    stage["file"] = task.tops
    picks = load_picks(task.tops, task.well, unit)
    bed = cfg.bed_dip or BedDip.constant(0.0, 0.0)
    if task.dip:
        from ..geo.geometry import parse_attitude

        text = str(task.dip)
        if _ATTITUDE.match(text):
            stage["file"] = ""
            bed = BedDip.constant(*parse_attitude(text, what=f"dip of well {task.well!r}"))
        else:
            from ..io import read_dip_table

            stage["file"] = text
            t = read_dip_table(text, depth_unit=unit)
            bed = BedDip.from_md_table(t, source=text) if "md_m" in t.columns else \
                BedDip.per_surface(t, source=text)
    inp = _Inputs(task, well, survey, picks, bed, x, y, elev)
    if survey is not None:  # build (and so validate) the path while the survey is the file
        stage["file"] = task.survey
        inp.trajectory  # noqa: B018
    stage["file"] = task.tops
    return inp


def _pick_geometry(cfg: _Config, inp: _Inputs):
    """Column indices of the picks, drilled TST between consecutive picks (``n·ΔP``, as tops
    evidence computes it), and the interval mid-points (x, y, TVD)."""
    picks = inp.picks
    index = {n: i for i, n in enumerate(cfg.column.names)}
    idx = [index.get(str(s)) for s in picks.surface]
    if any(i is None for i in idx):
        from ..evidence.topcuts import tops_intervals

        # the canonical message for a surface the column lacks
        tops_intervals(picks.frame(), cfg.column, inp.trajectory, inp.bed_dip)
        raise InputError("surface not in the reference column")  # pragma: no cover
    idx = np.asarray(idx, dtype=np.int64)
    md = np.asarray(picks.md_m, dtype=float)
    if md.size < 2:
        return idx, md, np.zeros(0), np.zeros((0, 3))
    if inp.bed_dip.is_constant:
        from ..geo.dip import bed_normal_vector

        n = bed_normal_vector(inp.bed_dip.dip_deg, inp.bed_dip.dip_azimuth_deg)
        if inp.survey is None:  # vertical below the surface location: P = (x0, y0, md)
            located = inp.x is not None and inp.y is not None
            x0, y0 = (inp.x, inp.y) if located else (np.nan, np.nan)
            drilled = np.diff(md) * n[2]
            mid = np.column_stack([np.full(md.size - 1, x0), np.full(md.size - 1, y0),
                                   0.5 * (md[:-1] + md[1:])])
            return idx, md, drilled, mid
        pos = inp.trajectory.position(md)
        drilled = np.diff(pos, axis=0) @ n
    else:
        pos = inp.trajectory.position(md)
        drilled = inp.bed_dip.strat_travel(inp.trajectory, md[:-1], md[1:], picks.frame())
    mid = 0.5 * (pos[:-1] + pos[1:])
    if inp.x is None or inp.y is None:  # no surface location: no place among neighbours
        mid[:, :2] = np.nan
    return idx, md, np.asarray(drilled, dtype=float), mid


def _clean_by_tops(cfg: _Config, idx, drilled, expected, tol: TopsTolerance) -> bool:
    """True when tops evidence certainly finds no cut (so find_fault_cuts need not run).

    The same comparison as :func:`wellfault.evidence.topcuts.tops_intervals` with a 10 % margin: every
    interval within 90 % of its allowed difference, and no surface picked twice (a certain
    repeat whatever the thickness).
    """
    if idx.size < 2:
        return True
    if np.unique(idx).size != idx.size:
        return False
    col = cfg.column
    s = np.asarray(col.s_m, dtype=float)
    exp = s[idx[1:]] - s[idx[:-1]]
    # spread: root-sum-square of the column units between the two surfaces
    sq = np.concatenate([[0.0], np.cumsum(np.nan_to_num(
        np.asarray(col.thicknesses_m, dtype=float)) ** 2)])
    lo, hi = np.minimum(idx[:-1], idx[1:]), np.maximum(idx[:-1], idx[1:])
    spread = np.sqrt(np.maximum(sq[hi] - sq[lo], 0.0))
    if expected:
        names = col.names
        for k in range(exp.size):
            key = (names[idx[k]], names[idx[k + 1]])
            if key in expected:
                if math.isfinite(expected[key]):
                    exp[k] = expected[key]
                spread[k] = abs(exp[k])
    allowed = tol.allowed(spread)
    delta = np.abs(exp - np.asarray(drilled, dtype=float))
    return bool(np.all(delta <= 0.9 * allowed - 1e-9))


def _header_well(inp: _Inputs):
    from ..geo.well import Well

    if inp.well is not None:
        return inp.well
    return Well(inp.task.well, pd.DataFrame(index=pd.Index([], dtype=float, name="md_m")),
                inp.task.depth_unit or "m", inp.elevation, x_m=inp.x, y_m=inp.y,
                source="<manifest>")


def _detect(cfg: _Config, inp: _Inputs, expected, tol, planes, precheck=True
            ) -> tuple[list[FaultCut], int]:
    """Cuts of one well (metres) and the number of candidate cuts withheld (weak candidates
    of the curve evidence, :attr:`~wellfault.evidence.detect.WellAnalysis.withheld`; tops
    evidence alone withholds none). With curve settings (``cfg.curves``) the well's curves
    are aligned too (the alignment engine, through ``detect.analyse_well(curves=...)``).

    ``precheck``: first test whether tops evidence certainly finds nothing (skipped when the
    main process already knows the well has something to show)."""
    if precheck and cfg.curves is None:
        idx, _md, drilled, _mid = _pick_geometry(cfg, inp)
        if _clean_by_tops(cfg, idx, drilled, expected, tol):
            return [], 0
    planes = tuple(cfg.planes) + tuple(planes)
    if cfg.curves is None:
        # tops evidence alone: what detect.analyse_well does for tops, without building the
        # per-well cut table (pandas) that screening does not need
        from ..evidence.measure import FaultAssumptions
        from ..evidence.topcuts import find_cuts_from_tops

        # well=None: the frame holds this well's picks only (no filtering by name needed)
        return find_cuts_from_tops(inp.picks.frame(), cfg.column, inp.trajectory,
                                   bed_dip=inp.bed_dip, well=None,
                                   assumptions=FaultAssumptions(planes=planes), tolerance=tol,
                                   expected=expected), 0
    from ..evidence.detect import analyse_well

    res = analyse_well(_header_well(inp), cfg.column, tops=inp.picks.frame(),
                       trajectory=inp.trajectory, bed_dip=inp.bed_dip, tolerance=tol,
                       planes=planes, expected=expected, curves=cfg.curves, unit="m")
    return list(res.records), len(res.withheld)


#: The note tops evidence ends its own notes with (wellfault.evidence.topcuts.find_cuts_from_tops).
_MID_NOTE = "cut placed mid-bracket: tops alone do not place it within the bracket"


def _same_cut(a: FaultCut, b: FaultCut) -> bool:
    """Field by field, NaN equal to NaN, floats to 1e-9 relative."""
    for f in _CUT_FIELDS:
        x, y = getattr(a, f), getattr(b, f)
        if isinstance(x, float) or isinstance(y, float):
            if not (math.isnan(x) and math.isnan(y)) and not math.isclose(
                    x, y, rel_tol=1e-9, abs_tol=1e-9):
                return False
        elif x != y:
            return False
    return True


def _remeasure(cfg: _Config, inp: _Inputs, previous: list[dict], planes) -> list | None:
    """Pass 3 without detecting again: each cut of pass 2 measured anew with the fitted planes.

    A cut of tops evidence is :func:`wellfault.evidence.measure.measure_cut` applied to the interval
    between two picks. Its arguments are read back from the pass-2 cut and first checked: the
    same call without the fitted planes must give the pass-2 cut again (field by field). If
    any cut does not (curve evidence, notes that cannot be split, anything unforeseen), None:
    the well is detected again with the planes instead, which always gives the right answer.
    """
    from ..evidence.measure import FaultAssumptions, measure_cut
    from ..evidence.topcuts import _unconformity_at

    if cfg.curves is not None:
        return None
    frame = None if inp.bed_dip.is_constant else inp.picks.frame()
    before = FaultAssumptions(planes=tuple(cfg.planes))
    after = FaultAssumptions(planes=tuple(cfg.planes) + tuple(planes))
    out = []
    for d in previous:
        c = FaultCut(**d)
        notes = c.notes.split("; ")
        if c.method != "tops" or _MID_NOTE not in notes:
            return None
        own = notes[:notes.index(_MID_NOTE) + 1]
        unc = c.section == "missing" and _unconformity_at(cfg.column, c.surface_above,
                                                          c.surface_below)
        args = dict(well=c.well, method=c.method, md_m=0.5 * (c.md_top_m + c.md_base_m),
                    md_top_m=c.md_top_m, md_base_m=c.md_base_m, delta_s_m=c.delta_s_m,
                    trajectory=inp.trajectory, bed_dip=inp.bed_dip, picks=frame,
                    surface_above=c.surface_above, surface_below=c.surface_below,
                    confidence=c.confidence, expected_thickness_m=c.expected_thickness_m,
                    observed_thickness_m=c.observed_thickness_m)

        def measured(assumptions):
            m = measure_cut(assumptions=assumptions, notes=list(own), **args)
            if unc:
                m = dataclasses.replace(m, notes=m.notes + "; missing section at a surface "
                                        "flagged as an unconformity in the column: it may be "
                                        "the unconformity and not a fault")
            return m

        if not _same_cut(measured(before), c):
            return None
        out.append(measured(after))
    return out


def _brackets(inp: _Inputs, cuts: list[FaultCut]) -> list[list[float]]:
    if not cuts:
        return []
    md = np.array([[c.md_top_m, c.md_base_m] for c in cuts], dtype=float).reshape(-1)
    pos = inp.trajectory.position(md)
    dz = inp.elevation if inp.elevation is not None else math.nan
    pos[:, 2] -= dz
    return pos.reshape(len(cuts), 6).tolist()


def _cut_dict(c: FaultCut) -> dict:
    return {f: getattr(c, f) for f in _CUT_FIELDS}


def _run_one(cfg: _Config, kind: str, task: WellTask, extra) -> dict:
    """One well, one pass. Returns an outcome dict; any exception becomes its error."""
    t0 = time.perf_counter()
    stage = {"file": task.las or task.tops or ""}
    out: dict = {"p": kind, "i": task.index, "e": None, "w": [], "n": 0}
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always", WellfaultWarning)
        try:
            inp = _load(cfg, task, stage)
            out["n"] = len(inp.picks)
            if inp.well is not None:
                out["u"] = inp.well.depth_unit.value
            if kind == "thickness":
                idx, _md, drilled, mid = _pick_geometry(cfg, inp)
                out["iv"] = [idx[:-1].tolist(), idx[1:].tolist(), drilled.tolist(),
                             mid[:, 0].tolist(), mid[:, 1].tolist()]
            else:
                expected, tol, by, planes, precheck = extra[:5]
                stage["file"] = task.tops
                cuts = None
                if kind == "remeasure" and len(extra) > 5:
                    cuts = _remeasure(cfg, inp, extra[5], planes)
                if kind == "separation":      # the field's plausible separation (pass 2b)
                    cfg = dataclasses.replace(cfg, curves=extra[5])
                if cuts is None:
                    cuts, out["h"] = _detect(cfg, inp, expected, tol, planes, precheck)
                out["c"] = [_cut_dict(c) for c in cuts]
                out["b"] = _brackets(inp, cuts)
                out["by"] = by
                if precheck:  # one pass: the picks' column indices, for level statistics
                    index = {nm: k for k, nm in enumerate(cfg.column.names)}
                    out["ix"] = [index.get(str(x), -1) for x in inp.picks.surface]
            if len(inp.picks) < 2:
                out["w"].append(f"{len(inp.picks)} pick(s): nothing to compare")
        except WellfaultError as err:
            out["e"] = [stage["file"], type(err).__name__, str(err)]
        except Exception as err:  # noqa: BLE001 - one well's failure never stops the rest
            out["e"] = [stage["file"], type(err).__name__,
                        f"internal error: {type(err).__name__}: {err}"]
    out["w"] += [str(w.message) for w in caught if issubclass(w.category, WellfaultWarning)]
    out["s"] = time.perf_counter() - t0
    return out
