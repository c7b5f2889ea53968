"""Field screening: every well of a field, its cuts, the failures, and the faults they make.

:func:`screen_wells` runs the same per-well function on every well of a manifest (DESIGN.md §6):

* **pass 1 — thickness** (tops only, cheap): each well's consecutive picks give the
  stratigraphic distance drilled between them (``n·ΔP``, as tops evidence computes it); the
  field's unit thicknesses follow (:mod:`wellfault.neighbours`);
* **pass 2 — detection**: tops evidence (:func:`wellfault.topcuts.find_cuts_from_tops`, what
  :func:`wellfault.detect.find_fault_cuts` runs for tops) with each well's expected intervals
  predicted from its neighbours (leave-one-out, robust, spatial) and a tight relative
  tolerance (DESIGN.md §4: "Field screening replaces the column thickness by the local
  thickness predicted from neighbouring wells"); without neighbours (``neighbours=False``, or a
  well whose intervals have no prediction) against the reference column and ``tolerance``.
  Pass 1 has already measured every interval, so the wells in which that comparison certainly
  flags nothing (no interval beyond 90 % of its tolerance, no surface picked twice) are done
  without a second reading (``tests/test_screen.py`` checks that this changes nothing);
* **faults**: the cuts grouped into faults by robust plane fits (:mod:`wellfault.faultmap`),
  missing section at one level in many wells flagged as a possible unconformity;
* **pass 3 — re-measure**: the cuts of each fitted fault are measured again with the fitted
  plane (:func:`wellfault.measure.measure_cut` with ``planes=``), which gives the crossing
  direction, fault type, throw and heave. The measurement is first repeated without the planes
  and must give the pass-2 cut again; otherwise the well is detected again with the planes.

Wells are read where they are processed (in the worker), so memory does not grow with the
field; one well's failure becomes one row of the error table (its file, the error type and
message; ``internal error: ...`` for an exception wellfault did not raise on purpose) and never
stops the rest. The work runs serially (``workers=1``), on a local process pool (default: all
cores, wells submitted in chunks, at most two chunks per worker waiting) or on a Dask cluster
(``client=``): the tables are the same whichever runs them (the ``seconds`` column of the well
table is a timing, not a result). Worker processes are forked where that is safe (Linux, no
other thread in this process) and started by a fork server otherwise, which, like Dask's
local clusters, needs the ``if __name__ == "__main__":`` guard in scripts.

With ``out_dir`` the tables are written there (CSV or Parquet, each file replaced in one step)
and every finished well is checkpointed in ``out_dir/.wells/`` (one JSON line per well and pass,
appended in one write, flushed every half second; a line cut short by a crash is dropped), so
that ``resume=True`` skips the wells already done after an interruption and gives the same
tables.
A checkpoint made with other settings, another manifest or other versions of the input files
is not resumed.

Curve evidence: the worker passes ``_Config.curves`` (curve settings for the alignment engine)
to :func:`wellfault.detect.analyse_well` when it is set. Without a given plausible separation
(``max_separation_m``), a pass 2b derives the field's own from the cuts of pass 2
(:func:`_field_separation`) and reads again the wells with a curve cut beyond it.
"""

from __future__ import annotations

import dataclasses
import hashlib
import json
import math
import os
import re
import sys
import time
import warnings
from collections import defaultdict
from collections.abc import Callable, Iterable, Iterator
from concurrent.futures import FIRST_COMPLETED, ProcessPoolExecutor, wait
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from . import __version__
from .column import ReferenceColumn
from .dip import BedDip
from .errors import InputError, WellfaultError, WellfaultWarning
from .faultmap import BRACKET_COLUMNS, FaultFitOptions, FaultMap, fit_faults
from .io.outputs import output_folder, remove_stale_temporaries, write_output
from .measure import FaultPlane
from .neighbours import NeighbourThickness, thickness_samples
from .precision import DEFAULT_DECIMALS, Decimals, lengths_in_text, round_table
from .results import FaultCut, cuts_to_frame
from .topcuts import TopsTolerance
from .units import DepthUnit, parse_depth_unit

__all__ = ["screen_wells", "ScreenResult", "WellTask", "ERROR_COLUMNS", "WELL_COLUMNS",
           "NEIGHBOUR_TOLERANCE", "OUTPUT_FILES"]

#: Columns of the error table.
ERROR_COLUMNS = ("well", "file", "error_type", "message")
#: Columns of the well table.
WELL_COLUMNS = ("well", "status", "checked_by", "cuts_found", "seconds", "n_picks",
                "depth_unit", "thickness_source", "warnings")
#: Default tolerance of neighbour-aware tops evidence: 6 % of the local interval + 2 m.
NEIGHBOUR_TOLERANCE = TopsTolerance(relative=0.06, floor_m=2.0)
#: Files written into ``out_dir`` (``.csv`` or ``.parquet``).
OUTPUT_FILES = ("cuts", "errors", "wells", "faults", "fault_profiles")

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
    # Hook for curve evidence: the lead wires the alignment engine here (a type well, its
    # tops and the curves to use); _detect then passes it to find_fault_cuts(curves=...).
    curves: object | None = None


@dataclass
class ScreenResult:
    """Tables of a screening run (lengths in the run's output unit).

    Attributes
    ----------
    cuts : DataFrame
        Every cut of every well (``wellfault.results.CUT_COLUMNS`` plus ``fault_id``,
        ``fault_fit`` and the bracket-end positions), sorted by well then MD.
    errors : DataFrame
        ``well, file, error_type, message``: one row per well that could not be screened.
    wells : DataFrame
        :data:`WELL_COLUMNS`, one row per manifest well, in manifest order.
    faults : DataFrame
        The fitted faults and possible unconformities (:data:`wellfault.faultmap.FAULT_COLUMNS`).
    fault_profiles : DataFrame
        Vertical separation along strike of each fault.
    thickness : DataFrame
        Neighbour-thickness samples (well, unit, thickness, position, outlier, leave-one-out
        prediction); empty without neighbours.
    info : dict
        Run facts: tolerances used, timings per pass, worker kind, counts.
    """

    cuts: pd.DataFrame
    errors: pd.DataFrame
    wells: pd.DataFrame
    faults: pd.DataFrame
    fault_profiles: pd.DataFrame
    thickness: pd.DataFrame = field(default_factory=pd.DataFrame)
    info: dict = field(default_factory=dict)

    @property
    def n_failed(self) -> int:
        return int(len(self.errors))

    def summary(self) -> str:
        """A few lines for the command line."""
        i = self.info
        n = len(self.wells)
        ok = n - int(self.wells["status"].eq("failed").sum()) if n else 0
        kinds = self.faults["kind"].value_counts() if len(self.faults) else pd.Series(dtype=int)
        fit = self.cuts["fault_fit"].value_counts() if len(self.cuts) else pd.Series(dtype=int)
        lines = [
            f"screened {n} well(s) in {i.get('seconds_total', float('nan')):.1f} s "
            f"({i.get('runner', '?')}): {ok} ran, {n - ok} failed"
            + (" (see errors)" if n - ok else ""),
            f"{len(self.cuts)} cut(s): {int(fit.get('fault', 0))} on "
            f"{int(kinds.get('fault', 0))} fitted fault(s), {int(fit.get('no fault', 0))} "
            f"fit no fault, {int(fit.get('possible unconformity', 0))} flagged as possible "
            f"unconformity ({int(kinds.get('possible unconformity', 0))} level(s))",
            f"thickness: {lengths_in_text(i.get('thickness_mode', '?'), i.get('unit', 'm'))}",
        ]
        if i.get("unit_note"):
            lines.append(i["unit_note"])
        return "\n".join(lines)

    def write(self, out_dir: str | os.PathLike, fmt: str = "csv",
              decimals: Decimals = DEFAULT_DECIMALS) -> dict[str, Path]:
        """Write the tables (:data:`OUTPUT_FILES`) into ``out_dir``, each replaced atomically,
        numbers at the precision they carry (:mod:`wellfault.precision`)."""
        return _write_tables(self, Path(out_dir), fmt, decimals)


# ------------------------------------------------------------------------------- worker side
_WORKER_CFG: _Config | None = None


def _init_worker(cfg: _Config) -> None:
    global _WORKER_CFG
    _WORKER_CFG = cfg
    warnings.simplefilter("ignore", DeprecationWarning)


def _pool_items(kind: str, items: list) -> list[dict]:
    """Entry point in a pool worker (the settings came once, with the initializer)."""
    return _run_items(_WORKER_CFG, kind, items)


def _run_items(cfg: _Config, kind: str, items: list) -> list[dict]:
    """Screen a chunk of wells: one outcome dict per (task, extra) item, never raising."""
    return [_run_one(cfg, kind, task, extra) for task, extra in items]


class _Inputs:
    """One well's inputs as read by a worker; the trajectory is built on first use."""

    def __init__(self, task, well, survey, picks, bed_dip, x, y, elevation):
        self.task, self.well, self.survey, self.picks = task, well, survey, picks
        self.bed_dip, self.x, self.y, self.elevation = bed_dip, x, y, elevation
        self._trajectory = None

    @property
    def trajectory(self):
        if self._trajectory is None:
            from .trajectory import Trajectory

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
    from ._fastio import load_picks, load_survey_arrays

    unit = task.depth_unit or cfg.depth_unit
    x, y, elev = _finite(task.x_m), _finite(task.y_m), _finite(task.elevation_m)
    well = None
    if task.las:
        from .io import read_las

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
        from .geometry import parse_attitude

        text = str(task.dip)
        if _ATTITUDE.match(text):
            stage["file"] = ""
            bed = BedDip.constant(*parse_attitude(text, what=f"dip of well {task.well!r}"))
        else:
            from .io import read_dip_table

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
        from .topcuts import tops_intervals

        # the canonical message for a surface the column lacks
        tops_intervals(picks.frame(), cfg.column, inp.trajectory, inp.bed_dip)
        raise InputError("surface not in the reference column")  # pragma: no cover
    idx = np.asarray(idx, dtype=np.int64)
    md = np.asarray(picks.md_m, dtype=float)
    if md.size < 2:
        return idx, md, np.zeros(0), np.zeros((0, 3))
    if inp.bed_dip.is_constant:
        from .dip import bed_normal_vector

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

    The same comparison as :func:`wellfault.topcuts.tops_intervals` with a 10 % margin: every
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
    from .well import Well

    if inp.well is not None:
        return inp.well
    return Well(inp.task.well, pd.DataFrame(index=pd.Index([], dtype=float, name="md_m")),
                inp.task.depth_unit or "m", inp.elevation, x_m=inp.x, y_m=inp.y,
                source="<manifest>")


def _detect(cfg: _Config, inp: _Inputs, expected, tol, planes, precheck=True
            ) -> list[FaultCut]:
    """Cuts of one well (metres). With curve settings (``cfg.curves``) the well's curves are
    aligned too (the alignment engine, through ``detect.analyse_well(curves=...)``).

    ``precheck``: first test whether tops evidence certainly finds nothing (skipped when the
    main process already knows the well has something to show)."""
    if precheck and cfg.curves is None:
        idx, _md, drilled, _mid = _pick_geometry(cfg, inp)
        if _clean_by_tops(cfg, idx, drilled, expected, tol):
            return []
    planes = tuple(cfg.planes) + tuple(planes)
    if cfg.curves is None:
        # tops evidence alone: what detect.analyse_well does for tops, without building the
        # per-well cut table (pandas) that screening does not need
        from .measure import FaultAssumptions
        from .topcuts import find_cuts_from_tops

        # well=None: the frame holds this well's picks only (no filtering by name needed)
        return find_cuts_from_tops(inp.picks.frame(), cfg.column, inp.trajectory,
                                   bed_dip=inp.bed_dip, well=None,
                                   assumptions=FaultAssumptions(planes=planes), tolerance=tol,
                                   expected=expected)
    from .detect import analyse_well

    return list(analyse_well(_header_well(inp), cfg.column, tops=inp.picks.frame(),
                             trajectory=inp.trajectory, bed_dip=inp.bed_dip, tolerance=tol,
                             planes=planes, expected=expected, curves=cfg.curves,
                             unit="m").records)


#: Least number of confident cuts (confidence >= 0.5) for the field's own separations.
FIELD_MIN_CUTS = 5


def _field_separation(column: ReferenceColumn, cut_out: dict) -> tuple[float, list[int]]:
    """The field's plausible separation [m] and the wells to read again with it.

    From the first reading (each well against its own default,
    :func:`wellfault.curvecuts.plausible_separation_m`): 1.5 times the 90th percentile of
    |Δs| over the field's cuts with confidence >= 0.5, within the floor of
    ``plausible_separation_m`` and that default (screening only narrows the prior, with at
    least FIELD_MIN_CUTS such cuts). The wells with a curve cut beyond 85 % of it (the prior's
    bins, engine.py "Jump-size prior") are read again with it; the others keep their reading,
    whose path has no reported jump the narrower prior would price.
    """
    from .curvecuts import SEPARATION_FLOOR_M, plausible_separation_m

    tl = column.type_log
    default = plausible_separation_m(len(tl) * column.type_log_step_m)
    seps = [abs(float(c["delta_s_m"])) for o in cut_out.values() for c in o["c"]
            if float(c["confidence"]) >= 0.5 and math.isfinite(float(c["delta_s_m"]))]
    if len(seps) < FIELD_MIN_CUTS:
        return default, []
    d = min(default, max(SEPARATION_FLOOR_M, 1.5 * float(np.quantile(seps, 0.9))))
    again = sorted(i for i, o in cut_out.items()
                   if any(c["method"] in ("curves", "both")
                          and abs(float(c["delta_s_m"])) > 0.85 * d for c in o["c"]))
    return d, again


#: The note tops evidence ends its own notes with (wellfault.topcuts.find_cuts_from_tops).
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

    A cut of tops evidence is :func:`wellfault.measure.measure_cut` applied to the interval
    between two picks. Its arguments are read back from the pass-2 cut and first checked: the
    same call without the fitted planes must give the pass-2 cut again (field by field). If
    any cut does not (curve evidence, notes that cannot be split, anything unforeseen), None:
    the well is detected again with the planes instead, which always gives the right answer.
    """
    from .measure import FaultAssumptions, measure_cut
    from .topcuts import _unconformity_at

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
                    cuts = _detect(cfg, inp, expected, tol, planes, precheck)
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


# ------------------------------------------------------------------------------- runners
def _chunks(items: Iterable, size: int) -> Iterator[list]:
    chunk: list = []
    for it in items:
        chunk.append(it)
        if len(chunk) >= size:
            yield chunk
            chunk = []
    if chunk:
        yield chunk


def _mp_context():
    """Start method of the worker processes.

    ``fork`` where it is the platform's safe default (Linux, Python < 3.14) and this process
    runs no other Python thread: workers start in milliseconds and scripts need no
    ``if __name__ == "__main__"`` guard. Otherwise ``forkserver`` (POSIX, the server preloads
    this module) or ``spawn``, which need that guard in scripts.
    """
    import multiprocessing as mp
    import threading

    methods = mp.get_all_start_methods()
    if sys.platform.startswith("linux") and sys.version_info < (3, 14) and "fork" in methods \
            and threading.active_count() == 1:
        return mp.get_context("fork")
    if "forkserver" in methods:
        ctx = mp.get_context("forkserver")
        ctx.set_forkserver_preload(["wellfault.screen"])
        return ctx
    return mp.get_context("spawn")


def _noop() -> int:
    return os.getpid()


class _NoBar:
    def __enter__(self):
        return self

    def __exit__(self, *exc):
        return False

    def update(self, n: int) -> None:
        pass


class _Runner:
    """Serial, process-pool or Dask execution of chunks of wells, with a progress bar."""

    def __init__(self, cfg: _Config, *, workers: int, client, chunk_size: int | None,
                 progress: bool) -> None:
        self.cfg = cfg
        self.workers = max(1, int(workers))
        self.client = client
        self.chunk_size = chunk_size
        self.progress = progress
        self._pool: ProcessPoolExecutor | None = None
        self._cfg_future = None
        if client is not None:
            self.kind = "dask"
        elif self.workers > 1:
            self.kind = f"process pool, {self.workers} workers"
        else:
            self.kind = "serial"

    def __enter__(self):
        return self

    def __exit__(self, *exc):
        self.close()

    def close(self):
        if self._pool is not None:
            self._pool.shutdown(wait=True, cancel_futures=True)
            self._pool = None

    def _size(self, total: int, slots: int) -> int:
        if self.chunk_size:
            return max(1, int(self.chunk_size))
        return max(1, min(256, math.ceil(total / max(1, slots * 8))))

    def _bar(self, total: int, desc: str):
        if not self.progress:
            return _NoBar()
        from tqdm.auto import tqdm

        class _Bar(tqdm):
            monitor_interval = 0  # no monitor thread: keeps forking worker processes safe

        return _Bar(total=total, desc=desc, unit="well", file=sys.stderr, mininterval=0.5,
                    leave=False)

    def run(self, kind: str, items: Iterable, total: int, desc: str,
            handle: Callable[[dict], None]) -> None:
        if total == 0:
            return
        pool = self.client is None and self.workers > 1 and total > 1
        if pool and self._pool is None:
            pool = self._start_pool()
        with self._bar(total, desc) as bar:
            def take(outs):
                for o in outs:
                    handle(o)
                bar.update(len(outs))

            if self.client is not None:
                self._run_dask(kind, items, total, take)
            elif pool:
                self._run_pool(kind, items, total, take)
            else:
                for chunk in _chunks(items, self._size(total, 1)):
                    take(_run_items(self.cfg, kind, chunk))

    def _failed_chunk(self, kind, chunk, err) -> list[dict]:
        return [{"p": kind, "i": t.index, "e": [t.las or t.tops or "", type(err).__name__,
                                                 f"internal error: {type(err).__name__}: the "
                                                 f"worker screening this well failed ({err})"],
                 "w": [], "n": 0, "s": 0.0} for t, _x in chunk]

    def _run_pool(self, kind, items, total, take):
        from concurrent.futures.process import BrokenProcessPool

        size = self._size(total, self.workers)
        source = _chunks(items, size)
        retry: list[list] = []
        inflight: dict = {}
        limit = 2 * self.workers
        exhausted = False
        while True:
            while len(inflight) < limit and (retry or not exhausted):
                if retry:
                    chunk = retry.pop()
                else:
                    chunk = next(source, None)
                    if chunk is None:
                        exhausted = True
                        break
                try:
                    inflight[self._pool.submit(_pool_items, kind, chunk)] = chunk
                except BrokenProcessPool:
                    self._restart()
                    retry.append(chunk)
            if not inflight:
                break
            done, _ = wait(list(inflight), return_when=FIRST_COMPLETED)
            broken = False
            for fut in done:
                chunk = inflight.pop(fut)
                try:
                    take(fut.result())
                except Exception as err:  # noqa: BLE001 - a worker died: isolate the well
                    broken = broken or isinstance(err, BrokenProcessPool)
                    if len(chunk) > 1:
                        retry.extend([[it] for it in chunk])
                    else:
                        take(self._failed_chunk(kind, chunk, err))
            if broken:
                for fut, chunk in list(inflight.items()):
                    retry.extend([[it] for it in chunk])
                inflight.clear()
                self._restart()

    def _start_pool(self) -> bool:
        """Start the worker processes now (all of them); False, with a warning, when they
        cannot start (then the wells run in this process)."""
        from concurrent.futures.process import BrokenProcessPool

        self._pool = ProcessPoolExecutor(self.workers, mp_context=_mp_context(),
                                         initializer=_init_worker, initargs=(self.cfg,))
        try:
            for fut in [self._pool.submit(_noop) for _ in range(self.workers)]:
                fut.result()
        except (BrokenProcessPool, OSError, RuntimeError) as err:
            self._pool.shutdown(wait=False, cancel_futures=True)
            self._pool = None
            self.workers = 1
            self.kind = "serial (worker processes could not start)"
            warnings.warn(
                f"worker processes could not start ({type(err).__name__}); screening in this "
                "process. In a script, put the call under `if __name__ == \"__main__\":`",
                WellfaultWarning, stacklevel=4)
            return False
        return True

    def _restart(self):
        if self._pool is not None:
            self._pool.shutdown(wait=False, cancel_futures=True)
        if not self._start_pool():
            raise RuntimeError("the worker processes died and could not be restarted")

    def _run_dask(self, kind, items, total, take):
        from distributed import as_completed

        client = self.client
        if self._cfg_future is None:
            self._cfg_future = client.scatter(self.cfg, broadcast=True, hash=False)
        slots = max(1, sum(client.nthreads().values()))
        size = self._size(total, slots)
        source = _chunks(items, size)
        chunks: dict = {}
        ac = as_completed()
        for _ in range(2 * slots):
            chunk = next(source, None)
            if chunk is None:
                break
            fut = client.submit(_run_items, self._cfg_future, kind, chunk, pure=False)
            chunks[fut.key] = chunk
            ac.add(fut)
        for fut in ac:
            chunk = chunks.pop(fut.key)
            try:
                take(fut.result())
            except Exception as err:  # noqa: BLE001 - a worker died: isolate the well
                if len(chunk) > 1:
                    for it in chunk:
                        f2 = client.submit(_run_items, self._cfg_future, kind, [it], pure=False)
                        chunks[f2.key] = [it]
                        ac.add(f2)
                else:
                    take(self._failed_chunk(kind, chunk, err))
            nxt = next(source, None)
            if nxt is not None:
                f3 = client.submit(_run_items, self._cfg_future, kind, nxt, pure=False)
                chunks[f3.key] = nxt
                ac.add(f3)


# ------------------------------------------------------------------------------- checkpoint
class _Checkpoint:
    """Per-well results of a run in ``DIR/.wells/``: one JSON line per (pass, well).

    Each line is written with one ``write`` call as its well finishes and flushed at least
    every half second (and at the end); a line cut short by a crash is dropped on reading. ``run.json`` holds the fingerprint of the run's
    settings and manifest: resuming a different run is refused.
    """

    def __init__(self, out_dir: Path, fingerprint: str, resume: bool) -> None:
        self.folder = out_dir / ".wells"
        self.fingerprint = fingerprint
        self.loaded: dict[str, dict[int, dict]] = {"thickness": {}, "detect": {},
                                                   "separation": {}, "remeasure": {}}
        self._files: dict = {}
        self._flushed = time.monotonic()
        run = self.folder / "run.json"
        if resume and run.is_file():
            stored = json.loads(run.read_text(encoding="utf-8")).get("fingerprint")
            if stored != fingerprint:
                raise InputError(
                    f"{self.folder}: the checkpoint belongs to a different run (other settings "
                    "or manifest); run without --resume to start afresh, or remove the folder")
            for kind in self.loaded:
                self._read(kind)
        else:
            output_folder(self.folder, what="the checkpoint folder")
            for p in self.folder.glob("*"):
                if p.is_file() and not p.is_symlink():  # our own files; anything else is left
                    p.unlink()
            write_output(run, json.dumps({"fingerprint": fingerprint, "version": __version__}),
                         what="the checkpoint")

    def _path(self, kind: str) -> Path:
        return self.folder / f"{kind}.jsonl"

    def _read(self, kind: str) -> None:
        path = self._path(kind)
        if not path.is_file():
            return
        data = path.read_bytes()
        end = data.rfind(b"\n") + 1
        if end < len(data):  # a line cut short by a crash: drop it before appending
            with open(path, "r+b") as fh:
                fh.truncate(end)
        for line in data[:end].splitlines():
            try:
                rec = json.loads(line)
            except ValueError:
                continue
            self.loaded[kind][int(rec["i"])] = rec

    def append(self, kind: str, outcomes: list[dict]) -> None:
        fh = self._files.get(kind)
        if fh is None:
            fh = self._files[kind] = open(self._path(kind), "a", encoding="utf-8")
        for o in outcomes:
            fh.write(json.dumps(o, separators=(",", ":")) + "\n")
        now = time.monotonic()
        if now - self._flushed > 0.5:  # at most half a second of wells to redo after a crash
            fh.flush()
            self._flushed = now

    def close(self) -> None:
        for fh in self._files.values():
            fh.close()
        self._files.clear()


# ------------------------------------------------------------------------------- helpers
def _as_manifest(manifest, depth_unit) -> pd.DataFrame:
    if isinstance(manifest, (str, os.PathLike)):
        from .io import read_manifest

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
        from .io import read_column_table

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


def _stamp(path) -> list | None:
    if not path or _ATTITUDE.match(str(path)):
        return None
    try:
        st = os.stat(path)
    except OSError:
        return None
    return [st.st_size, st.st_mtime_ns]


def _fingerprint(cfg: _Config, tasks: list[WellTask], settings: dict) -> str:
    col = cfg.column
    doc = {
        "version": __version__,
        "column": [list(col.names), [repr(float(v)) for v in col.s_m],
                   repr(float(col.base_s_m)), [bool(v) for v in col.unconformity]],
        "bed_dip": None if cfg.bed_dip is None else cfg.bed_dip.describe(),
        "tolerance": dataclasses.asdict(cfg.tolerance),
        "planes": [dataclasses.asdict(p) for p in cfg.planes],
        "depth_unit": cfg.depth_unit,
        "curves": None if cfg.curves is None else repr(cfg.curves),
        "settings": settings,
        "wells": [[t.index, t.well, t.las, t.survey, t.tops, t.dip, t.x_m, t.y_m,
                   t.elevation_m, t.depth_unit] for t in tasks],
        # the files as they are now: a checkpoint made from other versions is not resumed
        "files": [[_stamp(f) for f in (t.las, t.survey, t.tops, t.dip)] for t in tasks],
    }
    return hashlib.sha256(json.dumps(doc, sort_keys=True, default=repr).encode()).hexdigest()


def _auto_tolerance(model: NeighbourThickness, base: TopsTolerance,
                    floor: TopsTolerance) -> TopsTolerance:
    """6 % (or 3 × the neighbours' robust relative scatter, when larger), never looser than
    the column tolerance."""
    scatter = model.relative_scatter[np.isfinite(model.relative_scatter)]
    rel = floor.relative
    if scatter.size:
        rel = max(rel, 3.0 * float(np.median(scatter)))
    rel = min(rel, base.relative)
    return TopsTolerance(relative=rel, floor_m=floor.floor_m,
                         pick_uncertainty_m=base.pick_uncertainty_m)


def _convert_lengths(df: pd.DataFrame, unit: DepthUnit) -> pd.DataFrame:
    if unit is DepthUnit.M or len(df.columns) == 0:
        return df
    out = df.copy()
    ren = {}
    for c in df.columns:
        if c.endswith("_m"):
            out[c] = out[c].astype(float) / unit.metres
            ren[c] = c[:-2] + "_" + unit.suffix
    return out.rename(columns=ren)


def _write_tables(result: ScreenResult, folder: Path, fmt: str,
                  decimals: Decimals = DEFAULT_DECIMALS) -> dict[str, Path]:
    from .io import write_table

    fmt = str(fmt).lower()
    if fmt not in ("csv", "parquet"):
        raise InputError(f"output format {fmt!r} is not known; use csv or parquet")
    output_folder(folder)
    written = {}
    for name in OUTPUT_FILES:
        df = getattr(result, name)
        path = folder / f"{name}.{fmt}"
        remove_stale_temporaries(path)  # of a run killed while it wrote the tables
        if fmt == "csv":
            write_table(df, path, decimals=decimals)
        else:
            try:
                import pyarrow  # noqa: F401
            except ImportError:
                raise InputError("Parquet output needs pyarrow; install it (pip install "
                                 "'wellfault[parquet]') or write CSV") from None
            typed = round_table(df, decimals)
            write_output(path, lambda fh, df=typed: df.to_parquet(fh, index=False),
                         what=f"the {name} table")
        written[name] = path
    return written


# ------------------------------------------------------------------------------- the run
def screen_wells(
    manifest,
    column,
    *,
    bed_dip=None,
    tolerance: TopsTolerance = TopsTolerance(),
    planes=(),
    type_well=None,
    type_tops=None,
    curves=None,
    max_separation_m: float | None = None,
    neighbours: bool = True,
    neighbour_k: int = 6,
    neighbour_tolerance: TopsTolerance | None = None,
    max_neighbour_distance_m: float | None = None,
    fit: bool = True,
    fault_options: FaultFitOptions = FaultFitOptions(),
    depth_unit: str | None = None,
    unit: DepthUnit | str | None = None,
    workers: int | None = None,
    client=None,
    chunk_size: int | None = None,
    progress: bool = True,
    out_dir: str | os.PathLike | None = None,
    fmt: str = "csv",
    resume: bool = False,
    decimals: Decimals = DEFAULT_DECIMALS,
) -> ScreenResult:
    """Screen every well of a field for fault cuts and assemble the cuts into faults.

    Parameters
    ----------
    manifest : DataFrame or path
        One row per well (:func:`wellfault.io.read_manifest`): ``well``, file paths ``las``,
        ``survey``, ``tops`` (None where absent; a tops file may be shared by many wells),
        ``x_m, y_m, elevation_m`` (they override the LAS header's), optional ``dip`` (an
        attitude such as ``8/070`` or a dip-table file; overrides ``bed_dip`` for that well) and
        ``depth_unit`` (unit of that well's files where they state none).
    column : ReferenceColumn or path
        The field's reference column.
    bed_dip : "dip/azimuth", (dip, azimuth) or BedDip, optional
        Bed attitude for wells without their own; flat beds when omitted.
    tolerance : TopsTolerance
        Tops tolerance against the reference column (without neighbours, and for wells whose
        intervals have no neighbour prediction).
    planes : sequence of FaultPlane, optional
        A mapped fault model given by the user (cuts take their attitude, see
        :class:`~wellfault.measure.FaultAssumptions`).
    type_well, type_tops, curves
        Curve evidence: the type well (LAS path, or a ReferenceColumn that carries a type log)
        and its tops; ``curves`` names the curves (``["GR", "RHOB:0.5"]`` or a CurveSettings;
        default GR). Each well's curves are then aligned to the type log as well, and its
        cuts combine both kinds of evidence.
    max_separation_m : float, optional
        Largest plausible fault separation for the curve alignment [m TST]
        (:class:`~wellfault.curvecuts.CurveSettings`); by default each well's from its inputs,
        then the field's own from its first reading (pass 2b, ``info["max_separation_m"]``).
    neighbours : bool
        Two-pass screening with neighbour-aware thickness (default). False: one pass against
        the column.
    neighbour_k : int
        Neighbours per prediction.
    neighbour_tolerance : TopsTolerance, optional
        Tolerance against the neighbour prediction; default automatic: relative 6 % (or three
        times the field's robust relative leave-one-out scatter, when larger, never looser
        than ``tolerance``) and ``tolerance``'s floor.
    max_neighbour_distance_m : float, optional
        Farther wells are not neighbours.
    fit : bool
        Group the cuts into faults and re-measure them with the fitted planes (default).
    fault_options : FaultFitOptions
        Settings of the fault fit (seeded: the same cuts give the same faults).
    depth_unit : str, optional
        Unit of files that state none (per-well ``depth_unit`` in the manifest wins).
    unit : DepthUnit or str, optional
        Length unit of the output tables. Default: the wells' depth unit (of their LAS files)
        when they all share one, metres when they mix units (``info["unit_note"]`` says so).
    workers : int, optional
        Processes of the local pool (default: all cores); 1 runs serially in this process.
    client : dask.distributed.Client, optional
        Run on this Dask cluster instead (same results).
    chunk_size : int, optional
        Wells per task (default: automatic, at most 256).
    progress : bool
        Show a progress bar (stderr).
    out_dir : path, optional
        Write the tables there (:data:`OUTPUT_FILES`) and checkpoint every finished well.
    fmt : {"csv", "parquet"}
        Format of the written tables.
    resume : bool
        Skip the wells already finished in ``out_dir``'s checkpoint.
    decimals : Decimals
        Precision of the written tables (:mod:`wellfault.precision`); the returned frames keep
        full precision.

    Returns
    -------
    ScreenResult
    """
    t_start = time.perf_counter()
    if resume and out_dir is None:
        raise InputError("resume needs the output folder of the run to resume (out_dir / --out)")
    if str(fmt).lower() not in ("csv", "parquet"):
        raise InputError(f"output format {fmt!r} is not known; use csv or parquet")
    manifest = _as_manifest(manifest, depth_unit)
    curve_settings = None
    if type_well is not None:
        from .curvecuts import CurveSettings
        from .detect import load_column

        if isinstance(type_well, ReferenceColumn):
            col = type_well
        else:
            col = load_column(column=column if isinstance(column, (str, Path)) else None,
                              type_well=type_well, type_tops=type_tops,
                              bed_dip=_as_bed_dip(bed_dip),
                              depth_unit=None if depth_unit is None
                              else parse_depth_unit(depth_unit))
        curve_settings = curves if isinstance(curves, CurveSettings) else \
            CurveSettings.make(curves or None)
        if max_separation_m is not None:
            curve_settings = dataclasses.replace(
                curve_settings, max_separation_m=CurveSettings.make(
                    None, max_separation_m=max_separation_m).max_separation_m)
    elif curves is not None or type_tops is not None or max_separation_m is not None:
        raise InputError("curve evidence needs the type well: give --type-well TYPE.las and "
                         "--type-tops TYPE_TOPS.csv (or type_well=, type_tops=)")
    else:
        col = _as_column(column, depth_unit)
    tasks = _tasks(manifest)
    if not tasks:
        raise InputError("the manifest lists no wells; add one row per well")
    planes = tuple(planes)
    for p in planes:
        if not isinstance(p, FaultPlane):
            raise InputError(f"planes must be FaultPlane objects (got {type(p).__name__})")
    cfg = _Config(col, _as_bed_dip(bed_dip), tolerance, planes,
                  None if depth_unit is None else parse_depth_unit(depth_unit).value,
                  curve_settings)
    if workers is None:
        workers = len(os.sched_getaffinity(0)) if hasattr(os, "sched_getaffinity") else \
            (os.cpu_count() or 1)
    n = len(tasks)
    settings = {"neighbours": bool(neighbours), "k": int(neighbour_k),
                "neighbour_tolerance": None if neighbour_tolerance is None
                else dataclasses.asdict(neighbour_tolerance),
                "max_distance": max_neighbour_distance_m, "fit": bool(fit),
                "fault_options": dataclasses.asdict(fault_options)}
    ckpt = None
    if out_dir is not None:
        out_path = output_folder(out_dir)
        ckpt = _Checkpoint(out_path, _fingerprint(cfg, tasks, settings), bool(resume))

    # per-well state, by manifest index
    seconds = np.zeros(n)
    n_picks = np.zeros(n, dtype=np.int64)
    well_units = np.full(n, "", dtype=object)
    errors: dict[int, list] = {}
    warns: dict[int, list[str]] = defaultdict(list)
    # pass 1, per well: one (5, n) array of column index above, below, drilled TST, x, y
    intervals: dict[int, np.ndarray] = {}
    checked_by = np.full(n, "", dtype=object)
    pick_ix: dict[int, np.ndarray] = {}  # one pass: column index of each pick
    cut_out: dict[int, dict] = {}
    timings: dict[str, float] = {}

    def absorb(o: dict) -> None:
        i = int(o["i"])
        seconds[i] += float(o.get("s", 0.0))
        n_picks[i] = max(n_picks[i], int(o.get("n", 0)))
        well_units[i] = o.get("u", well_units[i])
        for w in o.get("w", []):
            if w not in warns[i]:
                warns[i].append(w)
        if o.get("e"):
            if o["p"] == "remeasure":  # pass 2 worked: keep its cuts, say what failed
                warns[i].append(f"re-measuring with the fitted fault planes failed: {o['e'][2]}")
            else:
                errors.setdefault(i, o["e"])
            return
        if o["p"] == "thickness":
            intervals[i] = np.asarray(o["iv"], dtype=float).reshape(5, -1)
        elif o["p"] in ("detect", "separation"):
            if o["p"] == "separation":
                cut_out.pop(i, None)           # the second reading replaces the first
            checked_by[i] = o["by"]
            if "ix" in o:
                pick_ix[i] = np.asarray(o["ix"], dtype=np.int64)
            if o["c"]:
                cut_out[i] = {"c": o["c"], "b": o["b"]}
        else:  # remeasure: replace the cuts of fitted faults, keep the others
            cut_out[i]["re"] = {"c": o["c"], "b": o["b"]}

    def handler(kind):
        def handle(o):
            absorb(o)
            if ckpt is not None:
                ckpt.append(kind, [o])
        return handle

    runner = _Runner(cfg, workers=workers, client=client, chunk_size=chunk_size,
                     progress=progress)
    info: dict = {"runner": runner.kind, "wells": n}
    try:
        with runner:
            # ---------------------------------------------------------------- pass 1
            model = None
            tol_n = None
            pairs = None
            if neighbours:
                t0 = time.perf_counter()
                done = ckpt.loaded["thickness"] if ckpt is not None else {}
                for rec in done.values():
                    absorb(rec)
                todo = [t for t in tasks if t.index not in done]
                runner.run("thickness", ((t, None) for t in todo), len(todo),
                           "pass 1/2 thickness", handler("thickness"))
                model, flat, pairs = _neighbour_model(col, intervals, neighbour_k,
                                                      max_neighbour_distance_m)
                tol_n = neighbour_tolerance or _auto_tolerance(model, tolerance,
                                                               NEIGHBOUR_TOLERANCE)
                info["neighbour_tolerance"] = dataclasses.asdict(tol_n)
                timings["thickness"] = time.perf_counter() - t0
            # ---------------------------------------------------------------- pass 2
            t0 = time.perf_counter()

            curves_tag = "" if cfg.curves is None else "+curves"

            def extra_for(i: int) -> tuple:
                plain = (None, tolerance, "tops" + curves_tag, (), model is None)
                if model is None or i not in intervals:
                    return plain
                ia = intervals[i][0].astype(np.int64)
                ib = intervals[i][1].astype(np.int64)
                exp = flat.get(i)
                if exp is None or not len(ia) or not np.all(np.isfinite(exp)):
                    return plain
                names = col.names
                expected: dict = {}
                for a, b, v in zip(ia, ib, exp):
                    key = (names[a], names[b])
                    if a != b:
                        expected.setdefault(key, []).append(float(v))
                expected = {k: sum(v) / len(v) for k, v in expected.items()}
                return (expected, tol_n, "tops+neighbours" + curves_tag, (), False)

            done2 = ckpt.loaded["detect"] if ckpt is not None else {}
            for rec in done2.values():
                if int(rec["i"]) not in errors:
                    absorb(rec)
            todo2 = [t for t in tasks if t.index not in errors and t.index not in done2]
            if model is not None and cfg.curves is None:
                # pass 1 measured every interval: wells that tops evidence certainly finds
                # clean need no second reading (the same test find_cuts_from_tops makes)
                dirty, neigh = _dirty_wells(col, pairs, tol_n, tolerance)
                rest = []
                for t in todo2:
                    if t.index in dirty:
                        rest.append(t)
                    else:
                        checked_by[t.index] = "tops+neighbours" if t.index in neigh \
                            else "tops"
                todo2 = rest
            runner.run("detect", ((t, extra_for(t.index)) for t in todo2), len(todo2),
                       "pass 2/2 detection" if neighbours else "detection",
                       handler("detect"))
            timings["detect"] = time.perf_counter() - t0
            # ------------------------------------------------ pass 2b: field separation
            if cfg.curves is not None and cfg.curves.max_separation_m is None:
                t0 = time.perf_counter()
                d_field, again = _field_separation(col, cut_out)
                info["max_separation_m"] = d_field
                if again:
                    curves2 = dataclasses.replace(cfg.curves, max_separation_m=d_field)
                    done2b = ckpt.loaded["separation"] if ckpt is not None else {}
                    for rec in done2b.values():
                        if int(rec["i"]) in again and int(rec["i"]) not in errors:
                            absorb(rec)
                    todo2b = [tasks[i] for i in again if i not in done2b and i not in errors]
                    runner.run("separation",
                               ((t, extra_for(t.index) + (curves2,)) for t in todo2b),
                               len(todo2b), "pass 2b plausible separation",
                               handler("separation"))
                timings["separation"] = time.perf_counter() - t0
            # ---------------------------------------------------------------- faults
            t0 = time.perf_counter()
            records, brackets, owner = _collect(cut_out)
            cuts_m = _cut_frame(records, brackets)
            fmap = None
            if fit and len(cuts_m):
                if model is None:
                    pairs = _pairs_from_picks(pick_ix)
                crossing = _crossing_counts(col, pairs)
                fmap = fit_faults(cuts_m, options=fault_options, column=col,
                                  crossing_counts=crossing)
            timings["faults"] = time.perf_counter() - t0
            # ---------------------------------------------------------------- pass 3
            t0 = time.perf_counter()
            if fmap is not None and fmap.faults:
                planes_by_well: dict[int, list] = {}
                fitted = {f.fault_id: f.plane() for f in fmap.faults}
                for row, fid in enumerate(fmap.fault_id):
                    if fid in fitted:
                        lst = planes_by_well.setdefault(owner[row], [])
                        if fitted[fid] not in lst:
                            lst.append(fitted[fid])
                done3 = ckpt.loaded["remeasure"] if ckpt is not None else {}
                for rec in done3.values():
                    if int(rec["i"]) in planes_by_well and int(rec["i"]) not in errors:
                        absorb(rec)
                todo3 = [tasks[i] for i in sorted(planes_by_well)
                         if i not in done3 and i not in errors]

                def extra3(i):
                    e, tl, by, _p, _c = extra_for(i)
                    return (e, tl, by, tuple(sorted(planes_by_well[i], key=lambda p: p.name)),
                            False, cut_out[i]["c"])

                runner.run("remeasure", ((t, extra3(t.index)) for t in todo3), len(todo3),
                           "re-measure with fitted faults", handler("remeasure"))
                records, brackets, owner, fmap = _remeasured(cut_out, records, brackets,
                                                             owner, fmap)
                cuts_m = _cut_frame(records, brackets)
            timings["remeasure"] = time.perf_counter() - t0
    finally:
        if ckpt is not None:
            ckpt.close()

    # ------------------------------------------------------------------------ tables
    if fmap is not None:
        cuts_m["fault_id"] = fmap.fault_id
        cuts_m["fault_fit"] = fmap.fit
        faults_m, profiles_m = fmap.tables(cuts_m)
    else:
        cuts_m["fault_id"] = ""
        cuts_m["fault_fit"] = "not fitted"
        faults_m, profiles_m = FaultMap([], np.zeros(0, object), np.zeros(0, object)).tables(
            cuts_m)
    out_unit, unit_note = _output_unit(unit, [well_units[t.index] for t in tasks])
    cuts = cuts_to_frame(records, out_unit)
    cuts["fault_id"] = cuts_m["fault_id"].to_numpy(dtype=object)
    cuts["fault_fit"] = cuts_m["fault_fit"].to_numpy(dtype=object)
    for c in BRACKET_COLUMNS:
        cuts[c[:-2] + "_" + out_unit.suffix] = cuts_m[c].to_numpy(float) / out_unit.metres
    err_rows = [{"well": tasks[i].well, "file": e[0], "error_type": e[1], "message": e[2]}
                for i, e in sorted(errors.items())]
    errors_df = pd.DataFrame(err_rows, columns=list(ERROR_COLUMNS))
    counts = pd.Series(owner, dtype=np.int64).value_counts() if owner else pd.Series(
        dtype=np.int64)
    well_rows = []
    for t in tasks:
        i = t.index
        failed = i in errors
        by = "" if failed else (checked_by[i] or "tops")
        well_rows.append({
            "well": t.well, "status": "failed" if failed else "ok", "checked_by": by,
            "cuts_found": 0 if failed else int(counts.get(i, 0)),
            "seconds": float(seconds[i]), "n_picks": int(n_picks[i]),
            "depth_unit": well_units[i],
            "thickness_source": "" if failed else ("neighbours" if "neighbours" in by
                                                   else "column"),
            "warnings": "; ".join(warns[i]),
        })
    wells_df = pd.DataFrame(well_rows, columns=list(WELL_COLUMNS))
    thickness = model.samples.copy() if model is not None else pd.DataFrame()
    if len(thickness):
        thickness.insert(0, "well_name", [tasks[int(w)].well for w in thickness["well"]])
        thickness["surface"] = [col.names[int(u)] for u in thickness["unit"]]
    info.update({
        "runner": runner.kind, "unit": out_unit.value, "unit_note": unit_note,
        "timings": timings,
        "seconds_total": time.perf_counter() - t_start,
        "thickness_mode": (f"neighbours (k={neighbour_k}, tolerance "
                           f"{tol_n.relative:.0%} + {tol_n.floor_m:g} m)" if tol_n
                           else f"reference column (tolerance {tolerance.relative:.0%} + "
                                f"{tolerance.floor_m:g} m)"),
        "column_tolerance": dataclasses.asdict(tolerance),
    })
    result = ScreenResult(cuts=cuts, errors=errors_df, wells=wells_df,
                          faults=_convert_lengths(faults_m, out_unit),
                          fault_profiles=_convert_lengths(profiles_m, out_unit),
                          thickness=thickness, info=info)
    if out_dir is not None:
        result.write(out_dir, fmt, decimals)
    return result


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


def _neighbour_model(col, intervals: dict, k: int, max_distance):
    """The neighbour-thickness model from pass 1, and each well's expected intervals."""
    wells = sorted(intervals)
    parts = [[], [], [], [], [], []]
    for i in wells:
        ia, ib, d, x, y = intervals[i]
        parts[0].append(np.full(ia.size, i, dtype=np.int64))
        for p, v in zip(parts[1:], (ia, ib, d, x, y)):
            p.append(np.asarray(v, dtype=float))
    if wells:
        w = np.concatenate(parts[0])
        ia, ib, d, x, y = (np.concatenate(p) for p in parts[1:])
    else:
        w = np.zeros(0, np.int64)
        ia = ib = d = x = y = np.zeros(0)
    samples = thickness_samples(w, ia.astype(np.int64), ib.astype(np.int64), d, x, y)
    model = NeighbourThickness(col, samples, k=k, max_distance_m=max_distance)
    exp = model.expected_intervals(w, ia.astype(np.int64), ib.astype(np.int64), x, y) \
        if w.size else np.zeros(0)
    flat: dict[int, np.ndarray] = {}
    start = 0
    for i, part in zip(wells, parts[0]):
        flat[i] = exp[start:start + part.size]
        start += part.size
    pairs = (w, ia.astype(np.int64), ib.astype(np.int64), d, exp)
    return model, flat, pairs


def _dirty_wells(col: ReferenceColumn, pairs, tol_n: TopsTolerance, tol_c: TopsTolerance):
    """Wells that tops evidence may find a cut in, from pass 1's intervals (vectorised).

    The comparison of :func:`_clean_by_tops` for every interval of the field at once:
    expected from the neighbours where every interval of the well has a prediction (else the
    column, with the column's tolerance), flagged beyond 90 % of the allowed difference. Wells
    with a surface picked twice are always 'dirty' (certain repeats, repeated keys).
    Returns (dirty well indices, wells judged against their neighbours).
    """
    w, ia, ib, d, exp = pairs
    if w.size == 0:
        return set(), set()
    s = np.asarray(col.s_m, dtype=float)
    sq = np.concatenate([[0.0], np.cumsum(np.nan_to_num(
        np.asarray(col.thicknesses_m, dtype=float)) ** 2)])
    lo, hi = np.minimum(ia, ib), np.maximum(ia, ib)
    col_exp = s[ib] - s[ia]
    col_spread = np.sqrt(np.maximum(sq[hi] - sq[lo], 0.0))
    wells, start = np.unique(w, return_index=True)
    finite = np.isfinite(exp)
    all_finite = np.minimum.reduceat(finite.astype(np.int8), start).astype(bool)
    neigh = np.zeros(w.size, dtype=bool)
    neigh[:] = np.repeat(all_finite, np.diff(np.append(start, w.size)))
    use = neigh & (ia != ib)
    expected = np.where(use, exp, col_exp)
    spread = np.where(use, np.abs(exp), col_spread)
    rel = np.where(neigh, tol_n.relative, tol_c.relative)
    floor = np.where(neigh, tol_n.floor_m, tol_c.floor_m)
    allowed = rel * spread + floor
    flagged = ~(np.abs(expected - d) <= 0.9 * allowed - 1e-9)
    dirty = set(np.unique(w[flagged]).tolist())
    # a surface picked twice: the picks of a well are ia (each pair's upper) + the last ib
    last = np.append(start[1:] - 1, w.size - 1)
    pw = np.concatenate([w, w[last]])
    pidx = np.concatenate([ia, ib[last]])
    order = np.lexsort((pidx, pw))
    same = (pw[order][1:] == pw[order][:-1]) & (pidx[order][1:] == pidx[order][:-1])
    dirty |= set(pw[order][1:][same].tolist())
    return dirty, set(wells[all_finite].tolist())


def _pairs_from_picks(pick_ix: dict):
    """(well, index above, index below) of consecutive picks, from each well's pick indices."""
    w, a, b = [], [], []
    for i in sorted(pick_ix):
        ix = pick_ix[i]
        ix = ix[ix >= 0]
        if ix.size >= 2:
            w.append(np.full(ix.size - 1, i, dtype=np.int64))
            a.append(ix[:-1])
            b.append(ix[1:])
    if not w:
        z = np.zeros(0, dtype=np.int64)
        return z, z, z
    return np.concatenate(w), np.concatenate(a), np.concatenate(b)


def _crossing_counts(col: ReferenceColumn, pairs) -> dict[int, int]:
    """Wells whose consecutive picks bracket each column surface (could show a gap there)."""
    w, ia, ib = pairs[0], pairs[1], pairs[2]
    lo, hi = np.minimum(ia, ib), np.maximum(ia, ib)
    span = hi - lo
    rep = np.repeat(np.arange(w.size), span)
    surface = np.repeat(lo + 1, span) + (np.arange(rep.size) - np.repeat(np.cumsum(span) - span,
                                                                         span))
    key = np.unique(w[rep] * (len(col) + 1) + surface)
    counts = np.bincount(key % (len(col) + 1), minlength=len(col) + 1)
    return {j: int(counts[j]) for j in range(len(col))}


def _collect(cut_out: dict):
    """All cuts of pass 2 (FaultCut, metres) sorted by well then MD, with their bracket-end
    positions and owning well (manifest index)."""
    rows = []
    for i in sorted(cut_out):
        rec = cut_out[i]
        for c, b in zip(rec["c"], rec["b"]):
            rows.append((i, c, b))
    rows.sort(key=lambda r: (r[1]["well"], r[1]["md_m"]))
    return [FaultCut(**r[1]) for r in rows], [r[2] for r in rows], [r[0] for r in rows]


def _remeasured(cut_out: dict, records, brackets, owner, fmap: FaultMap):
    """Cuts of fitted faults replaced by their re-measured versions (pass 3), re-sorted by
    well then MD, the fault map's rows following them."""
    records, brackets = list(records), list(brackets)
    for row, (i, c) in enumerate(zip(owner, records)):
        if fmap.fit[row] != "fault" or "re" not in cut_out.get(i, {}):
            continue
        re = cut_out[i]["re"]
        for c2, b2 in zip(re["c"], re["b"]):
            if c2["md_top_m"] == c.md_top_m and c2["md_base_m"] == c.md_base_m:
                records[row], brackets[row] = FaultCut(**c2), b2
                break
    perm = sorted(range(len(records)), key=lambda r: (records[r].well, records[r].md_m))
    if perm != list(range(len(records))):
        inverse = np.empty(len(perm), dtype=np.int64)
        inverse[np.asarray(perm)] = np.arange(len(perm))
        for f in fmap.fits:
            f.members = np.sort(inverse[f.members])
        fmap.fault_id = fmap.fault_id[perm]
        fmap.fit = fmap.fit[perm]
        records = [records[r] for r in perm]
        brackets = [brackets[r] for r in perm]
        owner = [owner[r] for r in perm]
    return records, brackets, owner, fmap


def _cut_frame(records: list[FaultCut], brackets: list) -> pd.DataFrame:
    df = cuts_to_frame(records, DepthUnit.M)
    b = np.asarray(brackets, dtype=float).reshape(-1, 6)
    for k, c in enumerate(BRACKET_COLUMNS):
        df[c] = b[:, k] if len(df) else pd.Series(dtype=float)
    return df
