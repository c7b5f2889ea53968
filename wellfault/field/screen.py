"""Field screening: every well of a field, its cuts, the failures, and the faults they make.

:func:`screen_wells` runs the same per-well function on every well of a manifest (DESIGN.md §6):

* **pass 1 — thickness** (tops only, cheap): each well's consecutive picks give the
  stratigraphic distance drilled between them (``n·ΔP``, as tops evidence computes it); the
  field's unit thicknesses follow (:mod:`wellfault.neighbours`);
* **pass 2 — detection**: tops evidence (:func:`wellfault.topcuts.find_cuts_from_tops`, what
  :func:`wellfault.evidence.detect.find_fault_cuts` runs for tops) with each well's expected intervals
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
to :func:`wellfault.evidence.detect.analyse_well` when it is set. Without a given plausible separation
(``max_separation_m``), a pass 2b derives the field's own from the cuts of pass 2
(:func:`_field_separation`) and reads again the wells with a curve cut beyond it.
"""

from __future__ import annotations

import dataclasses
import math
import os
import time
from collections import defaultdict
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import InputError
from ..evidence.measure import FaultPlane
from ..evidence.results import cuts_to_frame
from ..evidence.topcuts import TopsTolerance
from ..geo.column import ReferenceColumn
from ..geo.precision import DEFAULT_DECIMALS, Decimals
from ..geo.units import DepthUnit, parse_depth_unit
from ..io.outputs import output_folder
from .checkpoint import _Checkpoint, _fingerprint
from .faultmap import BRACKET_COLUMNS, FaultFitOptions, FaultMap, fit_faults
from .screen_inputs import _as_bed_dip, _as_column, _as_manifest, _output_unit, _tasks
from .screen_output import (
    ERROR_COLUMNS,
    WELL_COLUMNS,
    ScreenResult,
    _collect,
    _convert_lengths,
    _cut_frame,
    _remeasured,
)
from .screen_pool import _Runner
from .screen_thickness import (
    _auto_tolerance,
    _crossing_counts,
    _dirty_wells,
    _neighbour_model,
    _pairs_from_picks,
)
from .screen_well import _Config

__all__ = ["screen_wells", "NEIGHBOUR_TOLERANCE"]


#: Default tolerance of neighbour-aware tops evidence: 6 % of the local interval + 2 m.
NEIGHBOUR_TOLERANCE = TopsTolerance(relative=0.06, floor_m=2.0)


#: Least number of confident cuts (confidence >= 0.5) for the field's own separations.
FIELD_MIN_CUTS = 5


def _field_separation(column: ReferenceColumn, cut_out: dict) -> tuple[float, list[int]]:
    """The field's plausible separation [m] and the wells to read again with it.

    From the first reading (each well against its own default,
    :func:`wellfault.evidence.curve_settings.plausible_separation_m`): 1.5 times the 90th percentile of
    |Δs| over the field's cuts with confidence >= 0.5, within the floor of
    ``plausible_separation_m`` and that default (screening only narrows the prior, with at
    least FIELD_MIN_CUTS such cuts). The wells with a curve cut beyond 85 % of it (the prior's
    bins, engine.py "Jump-size prior") are read again with it; the others keep their reading,
    whose path has no reported jump the narrower prior would price.
    """
    from ..evidence.curve_settings import SEPARATION_FLOOR_M, plausible_separation_m

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
        :class:`~wellfault.evidence.measure.FaultAssumptions`).
    type_well, type_tops, curves
        Curve evidence: the type well (LAS path, or a ReferenceColumn that carries a type log)
        and its tops; ``curves`` names the curves (``["GR", "RHOB:0.5"]`` or a CurveSettings;
        default GR). Each well's curves are then aligned to the type log as well, and its
        cuts combine both kinds of evidence.
    max_separation_m : float, optional
        Largest plausible fault separation for the curve alignment [m TST]
        (:class:`~wellfault.evidence.curve_settings.CurveSettings`); by default each well's from its inputs,
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
        Precision of the written tables (:mod:`wellfault.geo.precision`); the returned frames keep
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
        from ..evidence.curve_settings import CurveSettings
        from ..evidence.detect import load_column

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
    withheld = np.zeros(n, dtype=np.int64)   # candidate cuts withheld, per well
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
            withheld[i] = int(o.get("h", 0))
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
            "candidates_withheld": 0 if failed else int(withheld[i]),
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
