"""While drilling: fault-cut alerts from a growing log, and a re-forecast of the tops to come.

:class:`WellWatcher` follows one well sample by sample (DESIGN.md §1, wellsite geologist). Each
sample is pushed into the streaming forward pass of the curve engine
(:meth:`wellfault.align.AlignmentEngine.stream`, the same DP that ``wellfault detect`` runs in
one push), and the best path's *tail* is read back at short intervals of new hole to decide
which jumps are fault cuts worth an alert. Work per sample does not grow with the hole drilled:

* the DP push is O(M) per sample (M type-log samples), as in the batch engine;
* every ``evaluate_every_m`` of new hole the best path is traced back over only the last
  ``lookback_rows`` rows (O(lookback)), its jumps measured like the batch cut evidence (lag
  lines fitted either side, the cut placed on the well's own samples), and matched with what
  was seen before;
* a candidate's evidence (margin of the best one-jump over the best no-jump explanation of its
  window, and the well/type-log correlation either side — the batch definitions, computed on
  windows of at most ``evidence_rows`` rows) is computed only when it is about to be raised.

Cut confirmation
----------------
A jump of the streaming best path is a *candidate* while it is young: the optimal path to the
bit may still re-route as more hole is drilled (right after a cut the size of the jump flips
between chance matches until enough rows below it pin it down). A candidate is raised as a cut
(event ``cut``) when

1. it has stayed put — same sense, within ``move_rows`` DP rows (one row is one type-log sample
   of stratigraphy) and with its size within ``max(2 m, 20 %)`` — while ``confirm_rows`` rows
   of stratigraphy (and ``confirm_m`` of MD) were drilled below it, and
2. its evidence, computed as the batch engine computes it on the hole drilled so far, is strong
   enough: a margin (how much better the best path with the jump explains its window than any
   path without) of at least ``alert_margin`` with a well/type-log correlation on either side
   of at least ``alert_correlation``. The engine's confidence does not raise a cut while
   drilling: it is calibrated on finished wells, where a short correlated run on one side of a
   jump is a sign of a false cut, but below a young cut the run is short because the hole is;
   and on the benchmark wells it raised jumps of the first, poorly standardised hundreds of
   metres whose margin was under 3 (most of the false alerts). It is reported with each cut.
   Evidence is computed when a candidate is due, and again every ``recheck_m`` while it stays
   below the threshold.

The defaults come from drilling 40 forward-modelled wells (benchmarks/bench_watch.py
``--calibrate``, seeds apart from the benchmark's) with live jump penalties of 6 (the batch's),
3 and 2 and scoring every rule of a grid (correlation 0.8/0.85/0.9, margin 0/3/6, stable rows
4/6/8/12): half the batch's penalty (``live_jump_factor``), correlation >= 0.8, margin >= 3 and
4 stable rows cut the median latency for |Δs| >= 10 m from 9.7 m (the first defaults: batch
penalty, 0.85, 3, 6 rows) to 7.2 m for 3 false alerts instead of 1 on the 40 wells; a penalty
of 2 gained 0.2 m more for 5 false alerts. On the benchmark's 92 wells (seeds 0+) the median
went from 11.6 to 9.6 m, false alerts from 2 to 10 (0.09 per km of hole, 9 of them retracted
while drilling, most in the first few hundred metres before the well's curves are calibrated).
The 90th percentile (about 30 m) did not move with any rule: it is set by wells drilled at a
low angle to bedding, which show r = |t·n| m of stratigraphy per metre of hole; in strat
metres the latency is the same for every r (benchmarks/bench_watch.py).

A raised cut is watched while it lies within the traced tail (``lookback_rows`` rows above the
bit): if the best path moves it by more than ``revise_md_m`` or changes its size by more than
``max(revise_abs_m, revise_rel·|Δs|)``, an event ``cut-revised`` with ``change = "moved"`` or
``"resized"`` gives the new figures; if the path has no jump of that sense within
``match_rows`` rows for ``retract_after_m`` of new hole, ``cut-revised`` with
``change = "retracted"`` withdraws it. Nothing changes silently. Older cuts are no longer
revised while drilling; :meth:`WellWatcher.finish` checks every cut once more against the
whole-well alignment (exactly the batch command's) and reports any difference the same way:
retracted when the batch does not confirm it at ``min_confidence``, revised when it places it
elsewhere or sizes it otherwise, raised when the batch has a confident cut never raised.

Standardisation
---------------
The engine compares standardised curves. Until enough hole is drilled the well's own level and
spread are unknown and the type log's are used (tools assumed calibrated alike); no cut is
raised before the first calibration (``alert_before_calibration``). When the hole reaches
``calibrate_rows`` rows of stratigraphy, and again each time it grows by ``calibrate_growth``,
the engine's calibration (well quantiles matched to the type-log samples it covers) is run on
the hole so far and the alignment re-run with it (one push of everything, a one-off cost that
doubling keeps to at most about twice the total push work); the new standardisation is kept
only when its optimal path is cheaper than the current one (event ``notice``, kind
``calibrated``). ``center``/``scale`` given by the caller are used throughout.

Live feed problems
------------------
* rows at or above the deepest MD already read (a file read again after a rewrite, a re-logged
  interval): rows equal to those already read are skipped (one ``notice`` per run of them);
  from the first row that differs, the samples from that MD down are dropped and the alignment
  re-run on the samples above (notice ``relogged``); cuts below that MD wait until the bit
  passes them again;
* a gap in depth larger than the curve settings' ``gap_m`` (and five sampling steps) is bridged
  with null samples at the usual step, so the strat geometry stays right (notice ``gap``) —
  :func:`wellfault.evidence.curvecuts.gap_fillers`, as the batch command bridges gaps in a finished log;
* nulls are pushed as nulls (the engine gives them a neutral misfit); ``null_run_m`` of hole
  without any valid value is reported once (notice ``nulls``) and so is the return of data;
* a depth that is not a number is skipped (notice ``bad-depth``).

Forecast
--------
:meth:`WellWatcher.forecast` re-forecasts every surface still to come from the bit's current
stratigraphic position (the cuts so far are in it: after missing section Δs the remaining
surfaces come Δs of stratigraphy earlier) along the path ahead — the actual survey, continued
by the plan beyond its last station (:func:`extend_with_plan`): for planar beds
``s(md) = s_bit + n·(P(md) − P(md_bit))`` (DESIGN.md §2), and each surface comes where ``s``
first reaches its ``s``. Its columns give MD, TVD, TVDSS, MD still to drill, and the MD the
surface would have had without the cuts raised so far (the shift they cause).

Modules
-------
:mod:`wellfault.live.events` holds the settings, events and bit state; :mod:`wellfault.live.path_ahead`
the path ahead of the bit (survey continued by the plan) and the forecast's crossing search;
:mod:`wellfault.live.feed` reads a growing file; :mod:`wellfault.live.watch_breaks` (mixed in) raises,
confirms and withdraws *possible cuts* — breaks of the log much sharper than the type log
predicts along the path (:mod:`wellfault.live.breaks`), an early warning in high-angle wells; this
module re-exports the public names.

Coupling with the engine
------------------------
The watcher reads the engine only through public pieces of
:class:`~wellfault.align.StreamingAligner`: ``push``, ``tail`` (the alignment of the last rows,
with the batch definitions of sizes, placement, brackets, margins and confidences),
``best_cost``, ``sample_row`` and ``sample_position``.
"""

from __future__ import annotations

import dataclasses
import inspect
import math
from dataclasses import dataclass
from typing import TYPE_CHECKING

import numpy as np
import pandas as pd

from .._buffers import GrowBuffer
from ..geo.column import ReferenceColumn
from ..evidence.curve_settings import CurveSettings
from ..evidence.curvecuts import gap_fillers
from ..geo.dip import BedDip
from ..errors import InputError, WellfaultError
from ..evidence.measure import FaultAssumptions, measure_cut
from ..evidence.results import FaultCut, cuts_to_frame
from ..geo.trajectory import Trajectory
from ..geo.units import DepthUnit, parse_depth_unit
from .events import (
    EVENT_KINDS, REVISION_CHANGES, BitState, WatchEvent, WatchSettings, _frame_in_unit,
)
from .watch_breaks import PossibleCuts
from .path_ahead import PathCache, extend_with_plan, first_crossing

if TYPE_CHECKING:
    from ..align import TailAlignment

__all__ = ["WellWatcher", "WatchSettings", "WatchEvent", "BitState", "extend_with_plan",
           "EVENT_KINDS", "REVISION_CHANGES"]

def _buf(tail: tuple = (), dtype=float) -> GrowBuffer:
    return GrowBuffer(tail, dtype, capacity=256)


@dataclass
class _Jump:
    row: int
    sample: int
    md: float
    ds_m: float
    confidence: float          # NaN without evidence
    margin: float
    correlation: float
    bracket: tuple[int, int]   # samples
    s_above: float
    s_below: float


@dataclass
class _Candidate:
    row: int
    md: float
    ds_m: float
    since_rows: int
    since_md: float
    checked_md: float = -math.inf


@dataclass
class _Live:
    cut_id: int
    cut: FaultCut
    ds_m: float
    md: float
    absent_md: float | None = None
    frozen: bool = False
    retracted: bool = False


class WellWatcher(PossibleCuts):
    """Fault-cut alerts and a re-forecast of the tops to come for a well being drilled.

    Parameters
    ----------
    column : ReferenceColumn
        The reference column with its type log (e.g. from a type well).
    trajectory : Trajectory, optional
        The actual survey (vertical when omitted); continued by ``plan``.
    bed_dip : BedDip or "dip/azimuth" text, optional
        Bed attitude: one dip, or a table in MD (per-surface dips need picks and are refused).
    curves : CurveSettings
        Curves aligned, their weights, the smallest jump that is a cut and engine options.
    plan : Trajectory or survey frame, optional
        Planned trajectory beyond the bit (:func:`extend_with_plan`).
    assumptions : FaultAssumptions
        Fault attitude for the cut measurement (as ``wellfault detect --fault``).
    settings : WatchSettings
        Confirmation and reporting (module docstring).
    well_name : str
        Name in cut rows.
    depth_unit : DepthUnit or str
        Unit of the well's file (the default unit of :meth:`cut_table`, :meth:`forecast`).
    center, scale : (C,) array_like, optional
        Fixed standardisation of the well's curves (no calibration while drilling).

    Examples
    --------
    >>> watcher = WellWatcher(column, survey, "8/070", plan=plan)       # doctest: +SKIP
    >>> for md, gr in rows:                                             # doctest: +SKIP
    ...     for event in watcher.feed(md, [gr]):
    ...         print(event.to_dict("ft"))
    >>> watcher.forecast("ft")                                          # doctest: +SKIP
    """

    def __init__(
        self,
        column: ReferenceColumn,
        trajectory: Trajectory | None = None,
        bed_dip: BedDip | str | None = None,
        *,
        curves: CurveSettings = CurveSettings(),
        plan: Trajectory | pd.DataFrame | None = None,
        assumptions: FaultAssumptions = FaultAssumptions(),
        settings: WatchSettings = WatchSettings(),
        well_name: str = "well",
        depth_unit: DepthUnit | str = "m",
        center=None,
        scale=None,
    ) -> None:
        from ..align import AlignmentEngine

        tl = column.type_log
        if tl is None or len(tl) == 0:
            raise InputError("the reference column has no type-log curves; build it from a type "
                             "well (--type-well TYPE.las --type-tops TYPE_TOPS.csv)")
        if isinstance(bed_dip, str):
            bed_dip = BedDip.parse(bed_dip, source="bed dip")
        bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
        if bed_dip.kind == "surface":
            raise InputError("a per-surface dip table needs the well's picks, which do not "
                             "exist yet while drilling; give one dip (--dip 12/075) or a dip "
                             "table in MD")
        self.column = column
        self.bed_dip = bed_dip
        self.settings = settings
        self.curve_settings = curves
        self.assumptions = assumptions
        self.well_name = str(well_name)
        self.depth_unit = parse_depth_unit(depth_unit)
        self._survey = trajectory
        self._plan = plan
        self.trajectory = extend_with_plan(trajectory, plan)
        self._pathcache = PathCache(self.trajectory)
        self._plan_end = float(self.trajectory.md_max_m) if plan is not None else None
        ref_cols = {str(c).upper(): c for c in tl.columns}
        names, weights, ref = [], [], []
        for name, w in curves.curves:
            if name.upper() not in ref_cols:
                raise InputError(f"the type log has no curve {name!r}; it has "
                                 f"{list(tl.columns)}; choose with --curve")
            names.append(str(ref_cols[name.upper()]))
            weights.append(float(w))
            ref.append(tl[ref_cols[name.upper()]].to_numpy(float))
        self.curves = tuple(names)
        self._ds = float(column.type_log_step_m)
        kwargs = curves.engine_kwargs(self._ds) if hasattr(curves, "engine_kwargs") else \
            dict(curves.engine)                       # the engine options the batch uses
        # the live engine's own jump penalty (the whole-well check keeps the batch's)
        if settings.jump_penalty is not None:
            kwargs["jump_penalty"] = float(settings.jump_penalty)
        else:
            batch = kwargs.get("jump_penalty", inspect.signature(
                AlignmentEngine.__init__).parameters["jump_penalty"].default)
            kwargs["jump_penalty"] = float(settings.live_jump_factor) * float(batch)
        self.engine = AlignmentEngine(np.stack(ref, axis=1), weights=np.asarray(weights),
                                      **kwargs)
        self._s0 = float(tl.index[0])
        p = self.engine._prepared()
        self._fixed = center is not None and scale is not None
        self._center = np.asarray(center if center is not None else p["ref_center"], float)
        self._scale = np.asarray(scale if scale is not None else p["ref_scale"], float)
        self._al = self.engine.stream(center=self._center, scale=self._scale)
        self._calibrated = self._fixed
        self._cal_next = int(settings.calibrate_rows)
        nc = len(names)
        # history of every sample pushed (filler samples bridging gaps included)
        self._md, self._val = _buf(), _buf((nc,))
        self._step, self._fill = _buf(), _buf((), bool)
        self._n = 0
        self._pending: list[tuple[float, np.ndarray, bool]] = []
        self._last_md = -math.inf
        self._last_pos: np.ndarray | None = None
        self._recent_steps: list[float] = []
        self._nominal = 0.0
        self._normal = bed_dip.normals_at(np.array([0.0]))[0] if bed_dip.is_constant else None
        self._restart_needed = False
        self._next_eval = -math.inf
        self._next_update = -math.inf
        # tail of the best path
        self._tail_cache: TailAlignment | None = None
        self._state: BitState | None = None
        self._state_n = -1
        self._cands: list[_Candidate] = []
        self._live: list[_Live] = []
        self._next_id = 1
        self._dups = 0
        self._dup_range = (math.nan, math.nan)
        self._bad_depths = 0
        self._last_valid_md: float | None = None
        self._null_said = False
        self.final_cuts: pd.DataFrame | None = None
        self.n_revisions = 0
        self.n_retractions = 0
        self._init_breaks()

    # ------------------------------------------------------------------ input
    def set_survey(self, trajectory: Trajectory) -> WatchEvent:
        """Use a newer actual survey (more stations) from now on: for the predicted strat
        steps of the samples still to come and for the forecast (still continued by the plan).
        Samples already pushed keep the steps they were given. Returns a ``notice`` event."""
        if self._pending:
            self._flush([], evaluate=False)
        self._survey = trajectory
        self.trajectory = extend_with_plan(trajectory, self._plan)
        self._pathcache = PathCache(self.trajectory)
        if self._plan is not None:
            self._plan_end = float(self.trajectory.md_max_m)
        if self._n:
            self._last_pos = self._pathcache.position(np.array([self._md.a[self._n - 1]]))[0]
        self._state_n = -1
        return self._notice("survey", f"survey updated ({len(trajectory.stations)} stations, to "
                            f"MD {trajectory.md_max_m:.1f} m): used for the hole from here on "
                            "and for the forecast")

    def _as_values(self, values, n: int) -> np.ndarray:
        nc = len(self.curves)
        if isinstance(values, dict):
            lookup = {str(k).upper(): v for k, v in values.items()}
            missing = [c for c in self.curves if c.upper() not in lookup]
            if missing:
                raise InputError(f"values have no curve {missing[0]!r}; give {list(self.curves)}")
            cols = [np.atleast_1d(np.asarray(lookup[c.upper()], float)).ravel()
                    for c in self.curves]
            x = np.stack(cols, axis=1)
        else:
            x = np.asarray(values, dtype=float)
            if x.ndim == 0 or (x.ndim == 1 and n == 1 and x.size == nc):
                x = x.reshape(1, -1)
            elif x.ndim == 1 and nc == 1:
                x = x[:, None]
        if x.ndim != 2 or x.shape != (n, nc):
            raise InputError(f"values must be {n} row(s) of {nc} curve(s) {list(self.curves)} "
                             f"(got shape {x.shape})")
        return x

    def feed(self, md_m, values) -> list[WatchEvent]:
        """Add samples (one or several, by increasing MD [m]); returns what is to be said.

        ``values``: (C,) for one sample, (n, C) for several, or ``{curve: value(s)}``; NaN is
        a null. Rows at or above the deepest MD read are handled as described in the module
        docstring (duplicates skipped, a changed row restarts the alignment from there).
        """
        md = np.atleast_1d(np.asarray(md_m, dtype=float)).ravel()
        x = self._as_values(values, md.size)
        events: list[WatchEvent] = []
        for i in range(md.size):
            self._add(float(md[i]), x[i], events)
        return events

    def _add(self, m: float, v: np.ndarray, events: list[WatchEvent]) -> None:
        if not math.isfinite(m):
            self._bad_depths += 1
            if self._bad_depths <= 3 or self._bad_depths in (10, 100, 1000):
                events.append(self._notice("bad-depth", f"a row without a usable depth was "
                                           f"skipped ({self._bad_depths} so far)"))
            return
        if m <= self._last_md + 1e-6:
            self._overlap(m, v, events)
            return
        if self._dups:
            events.append(self._notice(
                "duplicates", f"skipped {self._dups} row(s) already read (MD "
                f"{self._dup_range[0]:.2f}-{self._dup_range[1]:.2f} m), unchanged"))
            self._dups = 0
        if math.isfinite(self._last_md):
            gap = m - self._last_md
            nominal = self._nominal if self._nominal > 0 else gap
            fill = gap_fillers(self._last_md, m, nominal, self.curve_settings.gap_m)
            if fill.size:
                nan = np.full(len(self.curves), np.nan)
                self._pending.extend((float(f), nan, True) for f in fill)
                events.append(self._notice(
                    "gap", f"no data between MD {self._last_md:.2f} and {m:.2f} m (gap of "
                    f"{gap:.2f} m): bridged with {fill.size} null sample(s) at the usual step"))
            else:
                self._recent_steps.append(gap)
                if len(self._recent_steps) >= 16 or self._nominal <= 0:
                    self._nominal = float(np.median(self._recent_steps))
                    self._recent_steps = self._recent_steps[-4:]
        self._check_nulls(m, v, events)
        self._pending.append((m, v, False))
        self._last_md = m
        if m >= self._next_eval or m >= self._next_update:
            self._flush(events)

    def _check_nulls(self, m: float, v: np.ndarray, events: list[WatchEvent]) -> None:
        if np.any(np.isfinite(v)):
            if self._null_said:
                events.append(self._notice("nulls", f"valid {'/'.join(self.curves)} values "
                                           f"again from MD {m:.2f} m"))
                self._null_said = False
            self._last_valid_md = m
            return
        start = self._last_valid_md if self._last_valid_md is not None else \
            (self._md.a[0] if self._n else m)
        if not self._null_said and m - start >= self.settings.null_run_m:
            self._null_said = True
            events.append(self._notice(
                "nulls", f"no valid {'/'.join(self.curves)} value for {m - start:.1f} m of "
                f"hole (MD {start:.2f}-{m:.2f} m): the position is carried by the predicted "
                "geometry alone and cuts there cannot be seen"))

    def _overlap(self, m: float, v: np.ndarray, events: list[WatchEvent]) -> None:
        """A row at or above the deepest MD read: a duplicate, or a re-logged interval."""
        self._flush(events, evaluate=False)
        n = self._n
        md = self._md.a[:n]
        k = int(np.searchsorted(md, m - 1e-6))
        if k < n and abs(md[k] - m) <= 1e-6 and not self._fill.a[k]:
            old = self._val.a[k]
            same = np.all((old == v) | (np.isnan(old) & np.isnan(v)))
            if same:
                self._dups += 1
                lo = m if self._dups == 1 else self._dup_range[0]
                self._dup_range = (lo, m)
                return
        dropped = n - k
        self._truncate(k)
        self._withdraw_all(m, events, f"the interval from MD {m:.2f} m was re-logged", k)
        self._assessed = [a for a in self._assessed if a < k]
        events.append(self._notice(
            "relogged", f"a row at MD {m:.2f} m differs from the data read before (re-logged "
            f"or rewritten interval): dropped the {dropped} sample(s) from that MD down and "
            f"re-ran the alignment on the {k} sample(s) above (one-off)"))
        self._add(m, v, events)

    def _truncate(self, k: int) -> None:
        self._n = k
        self._restart_needed = True
        self._cands = []
        if k > 0:
            self._last_md = float(self._md.a[k - 1])
            self._last_pos = self._pathcache.position(np.array([self._last_md]))[0]
            self._last_valid_md = None
        else:
            self._last_md, self._last_pos = -math.inf, None
        self._recent_steps = []
        self._nominal = 0.0
        self._next_eval = self._next_update = -math.inf

    def _steps(self, md: np.ndarray) -> np.ndarray:
        """Predicted strat increment of each new sample [reference samples] (first: 0)."""
        pos = self._pathcache.position(md)
        prev = np.vstack([pos[:1] if self._last_pos is None else self._last_pos[None, :],
                          pos[:-1]])
        if self._normal is not None:
            step = (pos - prev) @ self._normal
        else:
            before = np.concatenate([[md[0] if self._n == 0 else self._md.a[self._n - 1]],
                                     md[:-1]])
            nrm = self.bed_dip.normals_at(0.5 * (md + before))
            step = np.einsum("ij,ij->i", pos - prev, nrm)
        self._last_pos = pos[-1]
        return step / self._ds

    def _flush(self, events: list[WatchEvent], evaluate: bool = True) -> None:
        if self._pending:
            md = np.array([p[0] for p in self._pending])
            x = np.stack([p[1] for p in self._pending])
            fill = np.array([p[2] for p in self._pending])
            self._pending = []
            self._last_pos = None if self._n == 0 else self._last_pos
            step = self._steps(md)
            n0, n1 = self._n, self._n + md.size
            self._md.ensure(n1)[n0:n1] = md
            self._val.ensure(n1)[n0:n1] = x
            self._step.ensure(n1)[n0:n1] = step
            self._fill.ensure(n1)[n0:n1] = fill
            self._n = n1
            if self._restart_needed:
                self._restart(self._center, self._scale)
            else:
                self._al.push(x, step)
            self._maybe_calibrate(events)
        elif self._restart_needed and self._n:
            self._restart(self._center, self._scale)
        if not evaluate or self._n == 0:
            return
        bit = float(self._md.a[self._n - 1])
        if bit >= self._next_eval:
            self._next_eval = bit + self.settings.evaluate_every_m
            self._evaluate(events)
        if bit >= self._next_update:
            self._next_update = bit + self.settings.update_every_m
            st = self.state
            if st is not None:
                events.append(WatchEvent("update", bit, state=st))

    def _restart(self, center, scale) -> None:
        self._al = self.engine.stream(center=center, scale=scale)
        if self._n:
            self._al.push(self._val.a[: self._n], self._step.a[: self._n])
        self._restart_needed = False
        self._tail_cache = None
        self._state_n = -1

    def _maybe_calibrate(self, events: list[WatchEvent]) -> None:
        if self._fixed or self._al.n_rows < self._cal_next:
            return
        self._cal_next = int(math.ceil(self._cal_next * self.settings.calibrate_growth))
        n = self._n
        x, step = self._val.a[:n], self._step.a[:n]
        if np.sum(np.isfinite(x).any(axis=1)) < 50:
            return
        c, s = self.engine.calibrate(x, step)
        cand = self.engine.stream(center=c, scale=s)
        cand.push(x, step)
        old, new = self._al.best_cost, cand.best_cost
        first = not self._calibrated
        self._calibrated = True
        if new < old:
            self._al, self._center, self._scale = cand, c, s
            self._tail_cache = None
            self._state_n = -1
            events.append(self._notice(
                "calibrated", f"{'calibrated' if first else 're-calibrated'} the well's curves "
                f"on {self._md.a[n - 1] - self._md.a[0]:.0f} m of hole (centre "
                f"{', '.join(f'{v:.4g}' for v in c)}, spread {', '.join(f'{v:.4g}' for v in s)})"
                "; re-ran the alignment with it"))
        elif first:
            events.append(self._notice(
                "calibrated", "checked the well's curves on "
                f"{self._md.a[n - 1] - self._md.a[0]:.0f} m of hole: the type log's level and "
                "spread fit them best; kept"))

    # ------------------------------------------------------------------ the path's tail
    def _tail(self, evidence: bool) -> TailAlignment | None:
        """The alignment of the last ``lookback_rows`` rows (cached until the next push):
        :meth:`wellfault.align.StreamingAligner.tail`, whose jumps, sizes, placement, brackets
        and confidences have the batch definitions, at a cost that depends on the tail's
        length, not on the hole drilled."""
        n = self._al.n_rows
        cached = self._tail_cache
        if cached is not None and cached.n_rows == n and (cached.evidence or not evidence):
            return cached
        look = int(self.settings.lookback_rows)
        if evidence:   # the evidence window above a young jump: evidence_rows, as the batch
            look = max(look, int(self.engine.evidence_rows) + 4 * int(self.settings.confirm_rows)
                       + 20)
        self._tail_cache = self._al.tail(look, evidence)
        return self._tail_cache

    def _jumps(self, tail: TailAlignment) -> list[_Jump]:
        """The tail's jumps that would be cut rows in the batch table (same filters)."""
        out = []
        end = len(self.column.type_log) - 1
        for jp in tail.alignment.jumps:
            ds_m = float(jp.size) * self._ds
            if abs(ds_m) < self.curve_settings.min_jump_m:
                continue
            ends = (float(jp.j_before), float(jp.j_after))
            if getattr(jp, "off_log", False) or not all(0.5 <= v <= end - 0.5 for v in ends):
                continue
            sample = int(jp.sample) + tail.sample0
            out.append(_Jump(int(jp.row) + tail.row0, sample, float(self._md.a[sample]), ds_m,
                             float(jp.confidence), float(jp.margin), float(jp.correlation),
                             (int(jp.bracket[0]) + tail.sample0,
                              int(jp.bracket[1]) + tail.sample0),
                             self._s0 + ends[0] * self._ds, self._s0 + ends[1] * self._ds))
        return out

    def _measure(self, jmp: _Jump, note: str) -> FaultCut:
        md = self._md.a
        first, last = jmp.bracket
        above, below = self.column.unit_at(np.array([jmp.s_above, jmp.s_below]))
        conf = jmp.confidence if math.isfinite(jmp.confidence) else 0.0
        cut = measure_cut(
            well=self.well_name, method="curves", md_m=float(md[jmp.sample]),
            md_top_m=float(md[max(first - 1, 0)]), md_base_m=float(md[min(last, self._n - 1)]),
            delta_s_m=jmp.ds_m, trajectory=self.trajectory, bed_dip=self.bed_dip,
            assumptions=self.assumptions, surface_above=str(above or ""),
            surface_below=str(below or ""), confidence=conf,
            notes=[f"curves {', '.join(self.curves)} aligned to the type log while drilling; "
                   + note])
        evidence = {"margin": jmp.margin, "correlation": jmp.correlation,
                    "rows_below": int(self._al.n_rows - jmp.row)}
        return dataclasses.replace(cut, extra={**cut.extra, "live": evidence})

    def _strong(self, jmp: _Jump, stable_rows: int) -> bool:
        """Is the evidence strong enough for an alert (module docstring)? ``stable_rows``:
        rows drilled since the candidate last moved (benchmarks/bench_watch.py --calibrate
        logs it)."""
        s = self.settings
        return jmp.margin >= s.alert_margin and jmp.correlation >= s.alert_correlation

    def _with_evidence(self, jmp: _Jump) -> _Jump | None:
        """The same jump from the tail alignment with evidence (None if it is gone)."""
        tail = self._tail(evidence=True)
        if tail is None:
            return None
        best = None
        for j2 in self._jumps(tail):
            if np.sign(j2.ds_m) == np.sign(jmp.ds_m) and abs(j2.row - jmp.row) <= \
                    self.settings.move_rows and (best is None or
                                                 abs(j2.row - jmp.row) < abs(best.row - jmp.row)):
                best = j2
        return best

    # ------------------------------------------------------------------ confirmation
    def _evaluate(self, events: list[WatchEvent]) -> None:
        tail = self._tail(evidence=False)
        if tail is None:
            return
        s = self.settings
        n = tail.n_rows
        bit = float(self._md.a[self._n - 1])
        jumps = self._jumps(tail)
        srow = self._al.sample_row
        used: set[int] = set()
        changed = False
        # raised cuts: still there? moved? resized?
        for lv in self._live:
            if lv.retracted or lv.frozen or lv.md > bit:
                continue
            k = int(np.searchsorted(self._md.a[: self._n], lv.md - 1e-6))
            if k >= self._n:
                continue
            r_c = int(srow[k])
            if r_c < tail.row0 + 2 and tail.row0 > 0:
                lv.frozen = True             # left the traced tail: final while drilling
                continue
            if n - r_c < s.confirm_rows:
                continue                     # the bit is back above it (re-log): wait
            best = None
            for q, jmp in enumerate(jumps):
                if q in used or np.sign(jmp.ds_m) != np.sign(lv.ds_m):
                    continue
                if abs(jmp.row - r_c) <= s.match_rows and \
                        (best is None or abs(jmp.row - r_c) < abs(jumps[best].row - r_c)):
                    best = q
            if best is None:
                if lv.absent_md is None:
                    lv.absent_md = bit
                if bit - lv.absent_md >= s.retract_after_m:
                    lv.retracted = True
                    self.n_retractions += 1
                    changed = True
                    events.append(WatchEvent(
                        "cut-revised", bit, cut_id=lv.cut_id, cut=lv.cut, change="retracted",
                        previous=lv.cut, message="the best path no longer has this jump after "
                        f"{bit - lv.absent_md:.1f} m of new hole"))
                continue
            used.add(best)
            lv.absent_md = None
            jmp = jumps[best]
            moved = abs(jmp.md - lv.md) > s.revise_md_m
            resized = abs(jmp.ds_m - lv.ds_m) > max(s.revise_abs_m, s.revise_rel * abs(lv.ds_m))
            if moved or resized:
                full = self._with_evidence(jmp) or jmp
                new = self._measure(full, f"revised at bit MD {bit:.2f} m")
                events.append(WatchEvent(
                    "cut-revised", bit, cut_id=lv.cut_id, cut=new,
                    change="moved" if moved else "resized", previous=lv.cut,
                    message=f"the best path now places it at MD {new.md_m:.2f} m with "
                    f"{new.delta_s_m:+.1f} m TST (was {lv.cut.md_m:.2f} m, "
                    f"{lv.cut.delta_s_m:+.1f} m)"))
                self.n_revisions += 1
                lv.cut, lv.md, lv.ds_m = new, jmp.md, jmp.ds_m
                changed = True
        # candidates: young jumps of the path
        cands: list[_Candidate] = []
        due: list[tuple[_Candidate, _Jump]] = []
        for q, jmp in enumerate(jumps):
            if q in used:
                continue
            match = None
            for c in self._cands:
                if np.sign(c.ds_m) == np.sign(jmp.ds_m) and abs(c.row - jmp.row) <= s.match_rows \
                        and (match is None or abs(c.row - jmp.row) < abs(match.row - jmp.row)):
                    match = c
            if match is None:
                cands.append(_Candidate(jmp.row, jmp.md, jmp.ds_m, n, bit))
                continue
            self._cands.remove(match)
            if abs(match.row - jmp.row) > s.move_rows or \
                    abs(match.ds_m - jmp.ds_m) > max(2.0, 0.2 * abs(match.ds_m)):
                match.since_rows, match.since_md = n, bit
            match.row, match.md, match.ds_m = jmp.row, jmp.md, jmp.ds_m
            cands.append(match)
            if n - match.since_rows < s.confirm_rows or bit - match.since_md < s.confirm_m:
                continue
            if not (self._calibrated or s.alert_before_calibration):
                continue
            if bit - match.checked_md < s.recheck_m - 1e-9:
                continue
            due.append((match, jmp))
        self._cands = cands
        for match, jmp in due:
            match.checked_md = bit
            full = self._with_evidence(jmp)
            if full is None or not self._strong(full, n - match.since_rows):
                continue
            cut = self._measure(full, f"raised at bit MD {bit:.2f} m on the evidence so far: "
                                f"margin {full.margin:.1f}, correlation {full.correlation:.2f} "
                                f"over {n - full.row} rows of strat below (the confidence grows "
                                "as the hole below the cut lengthens)")
            self._cands.remove(match)
            cut_id, pc = self._claim_id(full.md)
            lv = _Live(cut_id, cut, full.ds_m, full.md)
            self._live.append(lv)
            events.append(WatchEvent("cut", bit, cut_id=lv.cut_id, cut=cut, possible=pc))
            changed = True
        # possible cuts: breaks much sharper than the type log predicts (watch_breaks.py)
        changed = self._follow_possible(jumps, events) | changed
        changed = self._scan_breaks(tail, jumps, events) | changed
        if changed:
            events.append(self._forecast_event(bit))

    # ------------------------------------------------------------------ results
    @property
    def state(self) -> BitState | None:
        """Where the bit is now (None before the first few samples)."""
        if self._pending:
            self._flush([], evaluate=False)
        if self._state_n == self._n and self._state is not None:
            return self._state
        tail = self._tail(evidence=False)
        if tail is None:
            return None
        al = tail.alignment
        last = self._n - 1
        k = min(last, tail.sample_end - 1) - tail.sample0   # last sample of a committed row
        pos_last = float(al.path[k])
        # the samples after it (unfinished row) move on as predicted
        spos = self._al.sample_position
        pos_last += float(spos[last] - spos[k + tail.sample0])
        on_log = True if getattr(al, "on_log", None) is None else bool(al.on_log[k])
        s_bit = self._s0 + pos_last * self._ds
        md = float(self._md.a[last])
        z = float(self._pathcache.position(np.array([md]))[0, 2])
        elev = self.trajectory.ref_elevation_m
        unit = self.column.unit_at(s_bit) if on_log else None
        top = self.column.s_of(unit) if unit is not None else math.nan
        h = min(10, k + 1)
        fit = float(np.mean(np.asarray(al.confidence)[k + 1 - h:k + 1]))
        self._state = BitState(md, z, z - elev if elev is not None else math.nan,
                               s_bit if on_log else math.nan, unit, s_bit - top, fit,
                               int(np.sum(~self._fill.a[: self._n])), self._calibrated)
        self._state_n = self._n
        return self._state

    @property
    def cuts(self) -> list[FaultCut]:
        """The cuts raised and not retracted, by MD (metres)."""
        return sorted((lv.cut for lv in self._live if not lv.retracted), key=lambda c: c.md_m)

    def cut_table(self, unit: DepthUnit | str | None = None) -> pd.DataFrame:
        """The cuts raised and not retracted as a cut table (default unit: the well's)."""
        return cuts_to_frame(self.cuts, unit if unit is not None else self.depth_unit)

    def forecast(self, unit: DepthUnit | str | None = None) -> pd.DataFrame:
        """Re-forecast of the surfaces still to come (module docstring), lengths in ``unit``.

        Columns: ``surface, s, md, tvd, tvdss, md_to_go, md_without_cuts, shift`` (lengths with
        the unit suffix) and ``note``; by MD; surfaces below the bit that the path ahead does
        not reach have no MD and say so.
        """
        return _frame_in_unit(self._forecast_m(), parse_depth_unit(
            unit if unit is not None else self.depth_unit))

    def _forecast_event(self, bit: float) -> WatchEvent:
        return WatchEvent("forecast", bit, forecast=self._forecast_m(),
                          cases=self._forecast_cases())

    def _forecast_m(self, s_bit: float | None = None) -> pd.DataFrame:
        """The forecast frame in metres, from the bit's position, or from ``s_bit`` [m TST]
        (the cases of a possible cut)."""
        cols = ["surface", "s_m", "md_m", "tvd_m", "tvdss_m", "md_to_go_m", "md_without_cuts_m",
                "shift_m", "note"]
        st = self.state
        if st is None:
            return pd.DataFrame(columns=cols)
        if s_bit is not None:
            st = dataclasses.replace(st, s_m=float(s_bit))
        s = self.settings
        md0 = st.md_m
        end = self._plan_end if self._plan_end is not None and self._plan_end > md0 else \
            max(md0 + s.forecast_horizon_m, float(self.trajectory.md_max_m))
        step = max(s.forecast_step_m, (end - md0) / 50_000)
        grid = np.append(np.arange(md0, end, step), end)
        pos = self.trajectory.position(grid)
        if self.bed_dip.is_constant:
            travel = (pos - pos[0]) @ self.bed_dip.normals_at(np.array([md0]))[0]
        else:
            nrm = self.bed_dip.normals_at(0.5 * (grid[1:] + grid[:-1]))
            travel = np.concatenate([[0.0], np.cumsum(np.einsum("ij,ij->i", np.diff(pos, axis=0),
                                                                 nrm))])
        s_path = st.s_m + travel
        offset = float(sum(c.delta_s_m for c in self.cuts))
        ahead = np.sign(s_path[-1] - s_path[0])       # the way the path ahead goes in strat
        elev = self.trajectory.ref_elevation_m
        rows = []
        for name, sk in zip(self.column.names, self.column.s_m):
            md = first_crossing(grid, s_path, float(sk))
            md_nc = first_crossing(grid, s_path - offset, float(sk))
            if math.isnan(md) and not (ahead != 0 and np.sign(sk - st.s_m) == ahead):
                continue                       # behind the bit and not met again
            if math.isnan(md):
                note = "not reached by the path ahead" + (" (plan)" if self._plan_end else
                                                          " (straight on)")
                tvd = math.nan
            else:
                note = ""
                tvd = float(self.trajectory.tvd(np.array([md]))[0])
            rows.append({"surface": name, "s_m": float(sk), "md_m": md, "tvd_m": tvd,
                         "tvdss_m": tvd - elev if elev is not None else math.nan,
                         "md_to_go_m": md - md0, "md_without_cuts_m": md_nc,
                         "shift_m": md - md_nc, "note": note})
        df = pd.DataFrame(rows, columns=cols)
        return df.sort_values(["md_m", "s_m"], na_position="last").reset_index(drop=True)

    # ------------------------------------------------------------------ the end
    def finish(self, *, reconcile: bool = True) -> list[WatchEvent]:
        """End of input: last evaluation, the whole-well check, and a ``summary`` event.

        With ``reconcile`` the finished well is aligned once more as a whole — exactly what
        ``wellfault detect`` does with the same type log, path and dip (its own calibration) —
        into :attr:`final_cuts` (the batch cut table, every confidence; where the feed had gaps
        the null samples that bridged them are kept, which ``detect`` does not have); each raised
        cut it
        does not confirm at ``min_confidence`` is retracted, each it moves or resizes revised,
        and each confident cut never raised is raised, all as events.
        """
        events: list[WatchEvent] = []
        self._flush(events, evaluate=False)
        if self._n:
            self._next_eval = -math.inf
            self._flush(events)
        check = "not run"
        if reconcile and self._n >= 10:
            try:
                check = self._reconcile(events)
            except WellfaultError as err:
                check = f"failed: {err}"
                events.append(self._notice("final-check", f"the whole-well check could not "
                                           f"run: {err}"))
        bit = float(self._md.a[self._n - 1]) if self._n else math.nan
        self._withdraw_all(bit, events, "end of input: no cut there"
                           + (" in the whole-well check" if check != "not run" else ""))
        summary = {"samples": int(np.sum(~self._fill.a[: self._n])),
                   "n_cuts": len(self.cuts), "revisions": self.n_revisions,
                   "retractions": self.n_retractions, "final_check": check,
                   **{f"possible_cuts_{k}": v for k, v in self.n_possible.items()}}
        events.append(WatchEvent("summary", bit, state=self.state if self._n else None,
                                 forecast=self._forecast_m() if self._n else None,
                                 summary=summary, cuts=tuple(self.cuts)))
        return events

    def _reconcile(self, events: list[WatchEvent]) -> str:
        from ..evidence.detect import analyse_well
        from ..geo.well import Well

        # every sample pushed, the null samples that bridge gaps included: on a log without
        # gaps this is the finished file as `wellfault detect` reads it
        md = self._md.a[: self._n].copy()
        frame = pd.DataFrame(self._val.a[: self._n].copy(), columns=list(self.curves),
                             index=pd.Index(md, name="md_m"))
        well = Well(self.well_name, frame, self.depth_unit,
                    ref_elevation_m=self.trajectory.ref_elevation_m,
                    x_m=self.trajectory.x0_m, y_m=self.trajectory.y0_m, source="<watch>")
        res = analyse_well(well, self.column, trajectory=self.trajectory, bed_dip=self.bed_dip,
                           fault=self.assumptions.fault, pitch=self.assumptions.pitch,
                           planes=self.assumptions.planes, curves=self.curve_settings,
                           unit=self.depth_unit)
        self.final_cuts = res.cuts
        s = self.settings
        bit = float(md[-1])
        final = [c for c in res.records if c.confidence >= s.min_confidence]
        used: set[int] = set()
        n_changed = 0
        for lv in self._live:
            if lv.retracted:
                continue
            best = None
            for q, c in enumerate(final):
                if q in used or np.sign(c.delta_s_m) != np.sign(lv.ds_m):
                    continue
                if abs(c.md_m - lv.md) <= max(s.revise_md_m, 10.0) and \
                        (best is None or abs(c.md_m - lv.md) < abs(final[best].md_m - lv.md)):
                    best = q
            if best is None:
                lv.retracted = True
                self.n_retractions += 1
                n_changed += 1
                events.append(WatchEvent(
                    "cut-revised", bit, cut_id=lv.cut_id, cut=lv.cut, change="retracted",
                    previous=lv.cut, message="the whole-well alignment at the end of input does "
                    f"not confirm it at confidence >= {s.min_confidence:g}"))
                continue
            used.add(best)
            c = final[best]
            moved = abs(c.md_m - lv.md) > s.revise_md_m
            resized = abs(c.delta_s_m - lv.ds_m) > max(s.revise_abs_m, s.revise_rel * abs(lv.ds_m))
            if moved or resized:
                self.n_revisions += 1
                n_changed += 1
                events.append(WatchEvent(
                    "cut-revised", bit, cut_id=lv.cut_id, cut=c,
                    change="moved" if moved else "resized", previous=lv.cut,
                    message="the whole-well alignment at the end of input places it at MD "
                    f"{c.md_m:.2f} m with {c.delta_s_m:+.1f} m TST"))
            lv.cut, lv.md, lv.ds_m = c, c.md_m, c.delta_s_m
        for q, c in enumerate(final):
            if q in used:
                continue
            c = dataclasses.replace(c, notes=c.notes + "; raised by the whole-well alignment at "
                                    "the end of input")
            cut_id, pc = self._claim_id(c.md_m)
            lv = _Live(cut_id, c, c.delta_s_m, c.md_m)
            self._live.append(lv)
            n_changed += 1
            events.append(WatchEvent("cut", bit, cut_id=lv.cut_id, cut=c, possible=pc))
        if n_changed:
            events.append(self._forecast_event(bit))
        return "agrees with the cuts raised while drilling" if not n_changed else \
            f"{n_changed} change(s) to the cuts raised while drilling"

    def _notice(self, kind: str, message: str) -> WatchEvent:
        bit = self._last_md if math.isfinite(self._last_md) else math.nan
        return WatchEvent("notice", bit, notice=kind, message=message)
