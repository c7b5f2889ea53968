"""Fault cuts from log curves: a well's curves aligned to the type log (DESIGN.md §4).

This module wires the array-level engine (:mod:`wellfault.align`) to wells: it takes the
well's curves, its trajectory and the bed dip, predicts the stratigraphic increment of every
sample (r·ΔMD with r = t·n), aligns the curves to the reference column's type log, and turns
each jump of the alignment into a measured :class:`~wellfault.results.FaultCut`. It also returns
the well's stratigraphic position track (``md_m, s_m, unit, confidence``), the schema of
:mod:`wellfault.track`.

:func:`combine_evidence` merges cuts from tops and from curves: a tops cut whose bracket holds a
curve cut of the same sense becomes one ``method="both"`` cut, placed and measured by the curves
(a log pins the cut to the sample; tops only bracket it) with the tops' figures in its notes.
"""

from __future__ import annotations

import dataclasses
import hashlib
import math
import warnings
from dataclasses import dataclass

import numpy as np
import pandas as pd

from .column import ReferenceColumn
from .dip import BedDip
from .errors import AlignmentError, InputError, WellfaultWarning
from .measure import FaultAssumptions, measure_cut
from .results import FaultCut

__all__ = ["CurveSettings", "CurveResult", "align_well", "find_cuts_from_curves",
           "find_cuts_dtw_baseline", "find_cuts_lag_screen", "combine_evidence",
           "predicted_steps", "parse_curve_spec", "plausible_separation_m", "shared_curves",
           "CURVE_FAMILIES"]


@dataclass(frozen=True)
class CurveSettings:
    """How the curves are aligned.

    ``curves`` maps curve mnemonic → weight (``{"GR": 1.0}``); ``min_jump_m`` is the smallest
    jump reported as a cut (smaller jumps absorb local mis-ties; about two to three times the
    gamma-ray vertical resolution, methods.md §7, common practice); ``engine`` holds keyword
    arguments for :class:`wellfault.align.AlignmentEngine` (stretch, jump_penalty, ...), which
    override the lengths below once converted to type-log samples:

    * ``off_log_m`` — strat length of the off-the-type-log margins above the type log's top
      and below its base (engine ``off_log``): where the well drills rock the type log does
      not cover, its path runs there at a constant misfit instead of being forced into
      spurious jumps; a jump with either side off the log is never reported as a cut. 0 turns
      the margins off.
    * ``calibrate_window_m`` — window of the gain/offset-free running standardisation of the
      calibration pre-pass (engine ``calibrate_window``).
    * ``gap_m`` — a depth gap in the log longer than this (and than five sampling steps) is
      bridged with null samples at the usual step before the alignment
      (:func:`gap_fillers`): the strat geometry across it stays right and the path is carried
      by the predicted geometry alone there (a single sample spanning the gap would ask the
      alignment for a strat increment of the whole gap in one row, and unlogged rock cannot
      be placed). ``inf`` turns it off. ``wellfault watch`` bridges gaps the same way.

    * ``max_separation_m`` — the largest fault separation |Δs| the field makes plausible (TST):
      a larger jump of the alignment costs more the larger it is (the engine's jump-size
      prior, ``jump_free``), needs overwhelming curve evidence and is flagged in its row's
      notes. None (default): :func:`plausible_separation_m` from the inputs (the type log's
      thickness, and in :func:`wellfault.detect.analyse_well` the separations the tops show);
      ``inf`` turns the prior off.
    * ``pick_tolerance_m`` — with picks, each picked surface anchors the alignment: the well's
      sample at the pick must lie within this strat distance (TST) of the surface in the type
      log, or the path pays the engine's ``anchor_cost`` (engine.py, "Anchors"). A pick the
      curves do not honour is reported as a possible mis-pick (:attr:`CurveResult.mispicks`).
    ``shared`` (what ``make()`` without curves gives, and the commands' default): align every
    curve family the well and the type log share — gamma ray, resistivity, density, neutron,
    sonic (:data:`CURVE_FAMILIES`) — each weighted by the type log's character in it
    (:func:`shared_curves`); ``curves`` then only says what to use when they share none of
    them. Curves named with ``--curve`` (``make(curves=[...])``) are used as given.

    ``min_confidence`` is the least calibrated confidence of a reported cut (default 0.01: a
    jump the evidence gives under 1 % of being real — in practice a well that does not
    correlate with the type log there, e.g. rock the type log does not cover — is left in
    ``CurveResult.alignment.jumps`` but not reported).
    """

    curves: tuple[tuple[str, float], ...] = (("GR", 1.0),)
    min_jump_m: float = 2.0
    engine: tuple[tuple[str, object], ...] = ()
    off_log_m: float = 150.0
    calibrate_window_m: float = 9.0
    min_confidence: float = 0.01
    gap_m: float = 2.0
    max_separation_m: float | None = None
    pick_tolerance_m: float = 2.0
    shared: bool = False

    @classmethod
    def make(cls, curves=None, *, min_jump_m: float = 2.0, off_log_m: float = 150.0,
             calibrate_window_m: float = 9.0, min_confidence: float = 0.01,
             gap_m: float = 2.0, max_separation_m: float | None = None,
             pick_tolerance_m: float = 2.0, **engine) -> CurveSettings:
        if curves is None:
            spec: tuple[tuple[str, float], ...] = (("GR", 1.0),)
        elif isinstance(curves, dict):
            spec = tuple((str(k), float(v)) for k, v in curves.items())
        else:
            spec = tuple(parse_curve_spec(c) if isinstance(c, str) else (str(c[0]), float(c[1]))
                         for c in curves)
        if not spec:
            raise InputError("no curves to align; name at least one, e.g. --curve GR")
        if not float(gap_m) > 0:
            raise InputError(f"gap_m must be a positive length in metres (got {gap_m!r})")
        if max_separation_m is not None and not float(max_separation_m) > 0:
            raise InputError("the plausible fault separation must be a positive length "
                             f"(got {max_separation_m!r}); e.g. --max-separation 200, or "
                             "leave it out to derive it from the inputs")
        if not float(pick_tolerance_m) >= 0:
            raise InputError(f"the pick tolerance must be >= 0 m (got {pick_tolerance_m!r})")
        return cls(spec, float(min_jump_m), tuple(sorted(engine.items())), float(off_log_m),
                   float(calibrate_window_m), float(min_confidence), float(gap_m),
                   None if max_separation_m is None else float(max_separation_m),
                   float(pick_tolerance_m), shared=curves is None)

    def engine_kwargs(self, ds_m: float, column_m: float | None = None) -> dict:
        """Keyword arguments for the engine on a type log of step ``ds_m`` and thickness
        ``column_m`` (for the default plausible separation; without it and without
        ``max_separation_m`` the engine runs without the jump-size prior)."""
        kw = dict(off_log=int(math.ceil(max(self.off_log_m, 0.0) / ds_m)),
                  calibrate_window=int(round(max(self.calibrate_window_m, 0.0) / ds_m)))
        d = self.max_separation_m
        if d is None and column_m is not None:
            d = plausible_separation_m(column_m)
        if d is not None and math.isfinite(d):
            kw["jump_free"] = math.ceil(d / ds_m)
        kw.update(dict(self.engine))
        return kw


#: Bounds of the default plausible separation [m TST] (:func:`plausible_separation_m`).
SEPARATION_FLOOR_M, SEPARATION_CAP_M = 50.0, 250.0


def plausible_separation_m(column_m: float, tops_separations_m=()) -> float:
    """The default largest plausible fault separation |Δs| [m TST] of a field.

    A quarter of the type log's thickness ``column_m``, kept within 50-250 m (from memory:
    the faults a single well crosses mostly have separations of metres to a couple of hundred
    metres; a jump over much of the column is a chance match on a log with little character),
    raised to 1.5 times the largest separation the tops show (``tops_separations_m``) when
    that is larger: the field's own faults are plausible by definition.

    >>> plausible_separation_m(1400.0), plausible_separation_m(1400.0, [-300.0])
    (250.0, 450.0)
    """
    d = min(max(0.25 * float(column_m), SEPARATION_FLOOR_M), SEPARATION_CAP_M)
    seps = np.abs(np.asarray(tops_separations_m, dtype=float))
    seps = seps[np.isfinite(seps)]
    return max(d, 1.5 * float(seps.max())) if seps.size else d


def parse_curve_spec(text: str) -> tuple[str, float]:
    """``"GR"`` → ("GR", 1.0); ``"RHOB:0.5"`` → ("RHOB", 0.5).

    >>> parse_curve_spec("RHOB:0.5")
    ('RHOB', 0.5)
    """
    name, _, w = str(text).partition(":")
    name = name.strip()
    if not name:
        raise InputError(f"cannot read curve {text!r}; write NAME or NAME:WEIGHT, e.g. GR:2")
    try:
        weight = float(w) if w.strip() else 1.0
    except ValueError:
        raise InputError(f"curve weight in {text!r} is not a number; write NAME:WEIGHT, "
                         "e.g. GR:2") from None
    if not (weight > 0 and math.isfinite(weight)):
        raise InputError(f"curve weight in {text!r} must be positive")
    return name, weight


@dataclass
class CurveResult:
    """The curve evidence for one well."""

    cuts: list[FaultCut]
    track: pd.DataFrame
    alignment: object  # wellfault.align.Alignment
    curves: tuple[str, ...]
    #: picks the curves do not honour: (surface, pick MD [m], note); one entry with surface
    #: "" when the curves honour too few picks to single any out
    mispicks: list[tuple[str, float, str]] = dataclasses.field(default_factory=list)
    #: the plausible separation the jump-size prior used [m TST] (inf: no prior)
    max_separation_m: float = math.inf
    weak: list[str] = dataclasses.field(default_factory=list)  # "curve evidence weak ..." notes


def gap_fillers(md_above: float, md_below: float, nominal_m: float, gap_m: float
                ) -> np.ndarray:
    """MDs of the null samples that bridge a depth gap in a log (empty when there is none).

    A step ``md_below - md_above`` longer than ``gap_m`` and than five nominal sampling steps
    is a gap; it is filled with ``int(gap / nominal) - 1`` samples (at most 100,000) evenly
    spaced, about the nominal step apart. Shared by the batch inputs and the live watcher so
    that both see the same samples.

    >>> gap_fillers(100.0, 101.0, 0.5, 2.0).size, gap_fillers(100.0, 103.0, 0.5, 2.0).tolist()
    (0, [100.5, 101.0, 101.5, 102.0, 102.5])
    """
    gap = float(md_below) - float(md_above)
    if not (nominal_m > 0 and gap > max(float(gap_m), 5.0 * float(nominal_m))):
        return np.empty(0)
    k = min(int(gap / nominal_m) - 1, 100_000)
    return float(md_above) + np.arange(1, k + 1) * (gap / (k + 1))


def _bridge_gaps(md: np.ndarray, x: np.ndarray, gap_m: float
                 ) -> tuple[np.ndarray, np.ndarray, np.ndarray, list[tuple[float, float]]]:
    """(md, x, real, gaps) with the log's depth gaps bridged by null samples
    (:func:`gap_fillers`); ``real`` marks the samples of the log, ``gaps`` lists the MDs
    either side of each gap bridged."""
    real = np.ones(md.size, bool)
    if md.size < 3 or not math.isfinite(gap_m):
        return md, x, real, []
    d = np.diff(md)
    nominal = float(np.median(d))
    big = np.flatnonzero(d > max(gap_m, 5.0 * nominal))
    if big.size == 0:
        return md, x, real, []
    parts_md, parts_x, parts_r, start = [], [], [], 0
    for i in big:
        fill = gap_fillers(md[i], md[i + 1], nominal, gap_m)
        parts_md += [md[start:i + 1], fill]
        parts_x += [x[start:i + 1], np.full((fill.size, x.shape[1]), np.nan)]
        parts_r += [real[start:i + 1], np.zeros(fill.size, bool)]
        start = i + 1
    parts_md.append(md[start:])
    parts_x.append(x[start:])
    parts_r.append(real[start:])
    return (np.concatenate(parts_md), np.concatenate(parts_x), np.concatenate(parts_r),
            [(float(md[i]), float(md[i + 1])) for i in big])


def predicted_steps(md_m: np.ndarray, trajectory, bed_dip: BedDip, picks=None) -> np.ndarray:
    """Predicted stratigraphic increment of each sample, r·ΔMD [m TST] (first sample: 0).

    Uses the exact strat travel between consecutive samples on the minimum-curvature arc,
    n·ΔP for planar beds (DESIGN.md §2), so curved holes need no tangent approximation.
    """
    md = np.asarray(md_m, dtype=float)
    out = np.zeros(md.size)
    if md.size > 1:
        pos = trajectory.position(md)
        n = bed_dip.normals_at(0.5 * (md[1:] + md[:-1]), picks)
        out[1:] = np.einsum("ij,ij->i", np.diff(pos, axis=0), n)
    return out


#: Curve families aligned by default when the well and the type log share them, each with the
#: mnemonics recognised (first match wins; case-insensitive) and whether it is correlated on a
#: log scale (resistivity spans decades and is read on a logarithmic scale, common practice).
CURVE_FAMILIES: dict[str, tuple[tuple[str, ...], bool]] = {
    "gamma ray": (("GR", "GRC", "SGR", "CGR", "GRD", "GAM"), False),
    "resistivity": (("RT", "RT90", "ILD", "LLD", "RLA5", "RDEP", "RD", "RILD", "RES", "ILM",
                     "LLS"), True),
    "density": (("RHOB", "RHOZ", "DEN", "ZDEN"), False),
    "neutron": (("NPHI", "TNPH", "NPOR", "PHIN", "CNC"), False),
    "sonic": (("DT", "DTC", "DTCO", "AC"), False),
}
_MIN_COVER = 0.5      # a shared curve is used where at least half its samples are valid
_MIN_WEIGHT = 0.1     # ... and its character is at least this fraction of the best curve's


def _log_scale(v: np.ndarray) -> np.ndarray:
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(v > 0, np.log10(np.where(v > 0, v, 1.0)), np.nan)


def shared_curves(well_curves: pd.DataFrame, type_log: pd.DataFrame, ds_m: float
                  ) -> list[tuple[str, str, bool, float]]:
    """The curve families of :data:`CURVE_FAMILIES` both logs carry, as (well mnemonic,
    type-log mnemonic, log scale, weight).

    A family is used when each log has a mnemonic of it with at least half its samples valid;
    its weight is the type log's median character in it (:mod:`wellfault.align.character`)
    over the best family's, and a family under a tenth of the best is left out (it would add
    noise, not evidence).
    """
    from .align.character import curve_character

    wl = {c.upper(): c for c in well_curves.columns}
    rl = {c.upper(): c for c in type_log.columns}
    found = []
    for aliases, log_scale in CURVE_FAMILIES.values():
        w = next((wl[a] for a in aliases if a in wl), None)
        r = next((rl[a] for a in aliases if a in rl), None)
        if w is None or r is None:
            continue
        wv, rv = well_curves[w].to_numpy(float), type_log[r].to_numpy(float)
        if log_scale:
            wv, rv = _log_scale(wv), _log_scale(rv)
        if np.isfinite(wv).mean() < _MIN_COVER or np.isfinite(rv).mean() < _MIN_COVER:
            continue
        kappa = float(np.median(curve_character(rv, ds_m)))
        found.append((w, r, log_scale, kappa))
    if not found:
        return []
    best = max(k for *_, k in found)
    if best <= 0:
        return [(w, r, ls, 1.0) for w, r, ls, _ in found[:1]]
    return [(w, r, ls, k / best) for w, r, ls, k in found if k / best >= _MIN_WEIGHT]


def _curve_matrix(well, column: ReferenceColumn, settings: CurveSettings
                  ) -> tuple[np.ndarray, np.ndarray, np.ndarray, tuple[str, ...]]:
    tl = column.type_log
    if tl is None or len(tl) == 0:
        raise InputError("the reference column has no type-log curves; build it from a type "
                         "well (--type-well TYPE.las --type-tops TYPE_TOPS.csv)")
    if settings.shared:
        found = shared_curves(well.curves, tl, float(column.type_log_step_m))
        if found:
            wv = [well.curves[w].to_numpy(float) for w, *_ in found]
            rv = [tl[r].to_numpy(float) for _, r, *_ in found]
            wv = [_log_scale(v) if f[2] else v for v, f in zip(wv, found)]
            rv = [_log_scale(v) if f[2] else v for v, f in zip(rv, found)]
            return (np.stack(wv, axis=1), np.stack(rv, axis=1),
                    np.array([f[3] for f in found]), tuple(f[0] for f in found))
    well_cols = {c.upper(): c for c in well.curves.columns}
    ref_cols = {c.upper(): c for c in tl.columns}
    names, weights, wv, rv = [], [], [], []
    for name, w in settings.curves:
        key = name.upper()
        if key not in well_cols:
            raise InputError(f"well {well.name!r} has no curve {name!r}; it has "
                             f"{list(well.curves.columns)}; choose with --curve")
        if key not in ref_cols:
            raise InputError(f"the type log has no curve {name!r}; it has {list(tl.columns)}; "
                             "choose with --curve")
        names.append(well_cols[key])
        weights.append(w)
        wv.append(well.curves[well_cols[key]].to_numpy(float))
        rv.append(tl[ref_cols[key]].to_numpy(float))
    return (np.stack(wv, axis=1), np.stack(rv, axis=1), np.asarray(weights, float),
            tuple(names))


@dataclass(frozen=True)
class _Inputs:
    x: np.ndarray          # (N, C) well curves
    ref: np.ndarray        # (M, C) type-log curves
    weights: np.ndarray
    names: tuple[str, ...]
    md: np.ndarray         # (N,) [m]
    step: np.ndarray       # (N,) predicted strat increment [reference samples]
    ds: float              # type-log step [m]
    s0: float              # s of the first type-log sample [m]
    real: np.ndarray       # (N,) bool: a sample of the log (False: a null bridging a gap)

    def track(self, s: np.ndarray, unit, confidence) -> pd.DataFrame:
        """The position track on the log's own samples (gap fillers dropped)."""
        conf = np.broadcast_to(np.asarray(confidence, float), s.shape)
        return pd.DataFrame({"md_m": self.md[self.real], "s_m": s[self.real],
                             "unit": np.asarray(unit, dtype=object)[self.real],
                             "confidence": conf[self.real]})


def _inputs(well, column, trajectory, bed_dip, settings, picks) -> _Inputs:
    x, ref, weights, names = _curve_matrix(well, column, settings)
    ds = float(column.type_log_step_m)
    s0 = float(column.type_log.index[0])
    md = well.curves.index.to_numpy(float)
    if md.size < 10:
        raise AlignmentError(f"well {well.name!r} has only {md.size} samples; the curve "
                             "evidence needs a logged interval")
    if np.all(np.isnan(x)):
        raise InputError(f"well {well.name!r}: curves {list(names)} are null everywhere")
    md, x, real, gaps = _bridge_gaps(md, x, float(settings.gap_m))
    if gaps:
        u = well.depth_unit
        first = f"{gaps[0][0] / u.metres:g}-{gaps[0][1] / u.metres:g} {u.suffix}"
        warnings.warn(
            f"{well.source if well.source != '<memory>' else 'well ' + repr(well.name)}: "
            f"{len(gaps)} depth gap(s) in the log (the first at MD {first}): bridged with null "
            "samples at the usual step for the curve alignment; a cut inside a gap is "
            "reported at the first logged sample below it, bracketed by the gap",
            WellfaultWarning, stacklevel=3)
    step = predicted_steps(md, trajectory, bed_dip, picks) / ds
    return _Inputs(x, ref, weights, names, md, step, ds, s0, real)


@dataclass(frozen=True)
class _Anchor:
    surface: str
    md_m: float
    sample: int
    position: float        # the surface in the type log [reference samples]


def _anchors(picks, column: ReferenceColumn, inp: _Inputs) -> list[_Anchor]:
    """The picks that can anchor the alignment: surfaces of the column inside the type log,
    picked within the logged interval; each at the first sample at or below the pick."""
    if picks is None or len(picks) == 0:
        return []
    names = set(column.names)
    m = inp.ref.shape[0]
    out = []
    for surface, md in zip(picks["surface"].astype(str), picks["md_m"].to_numpy(float)):
        if surface not in names or not inp.md[0] <= md <= inp.md[-1]:
            continue
        pos = (column.s_of(surface) - inp.s0) / inp.ds
        if 0.0 <= pos <= m - 1:
            i = min(int(np.searchsorted(inp.md, md, "left")), inp.md.size - 1)
            out.append(_Anchor(surface, float(md), i, float(pos)))
    return out


#: engines of the last type logs and settings, with their prepared arrays (:func:`_engine`)
_ENGINES: dict = {}


def _engine(ref: np.ndarray, weights: np.ndarray, kw: dict):
    """The alignment engine for this type log and these settings, made once per process.

    A field screening aligns every well to the same type log: the engine's prepared arrays
    (standardised type log, its bounds, the calibration's coarse engines) are made for the
    first well and reused (they depend on nothing else); a few are kept, by content."""
    from .align import AlignmentEngine

    key = (hashlib.blake2b(np.ascontiguousarray(ref).tobytes(), digest_size=16).digest(),
           ref.shape, tuple(np.asarray(weights, float)), tuple(sorted(kw.items())))
    engine = _ENGINES.get(key)
    if engine is None:
        if len(_ENGINES) >= 4:
            _ENGINES.pop(next(iter(_ENGINES)))
        engine = _ENGINES[key] = AlignmentEngine(ref.copy(), weights=weights, **kw)
    return engine


def _align(inp: _Inputs, column: ReferenceColumn, settings: CurveSettings,
           anchors: list[_Anchor]):
    """(alignment, s of every sample [m], plausible separation [m]) for the prepared inputs."""
    kw = settings.engine_kwargs(inp.ds, column_m=inp.ref.shape[0] * inp.ds)
    engine = _engine(inp.ref, inp.weights, kw)
    tol = float(settings.pick_tolerance_m) / inp.ds
    alignment = engine.align(inp.x, inp.step, anchors=[(a.sample, a.position, tol)
                                                       for a in anchors] or None)
    s = inp.s0 + np.asarray(alignment.path, dtype=float) * inp.ds
    if alignment.on_log is not None:
        s = np.where(alignment.on_log, s, np.nan)        # off the type log: not placed
    free = engine.jump_free
    return alignment, s, math.inf if free is None else int(free) * inp.ds


def _mispicks(anchors: list[_Anchor], s: np.ndarray, inp: _Inputs, settings: CurveSettings,
              unit) -> list[tuple[str, float, str]]:
    """Picks the aligned path does not honour (outside the tolerance and a sample), each with
    a note saying where the curves place the surface, in the well's depth unit. When most of
    them (and at least three) are not honoured, one note says so instead: the curves do not
    correlate with the picks, which is no finding about any one pick."""
    out = []
    k = 1.0 / unit.metres
    for a in anchors:
        s_pick = inp.s0 + a.position * inp.ds
        tol = float(settings.pick_tolerance_m) + inp.ds
        if abs(s[a.sample] - s_pick) <= tol:              # NaN (off the log) is not honoured
            continue
        miss = np.abs(s - s_pick)
        where = ""
        if np.isfinite(miss).any() and np.nanmin(miss) <= tol:
            ok = miss <= tol
            near = np.flatnonzero(ok)
            c = int(near[np.argmin(np.abs(near - a.sample))])   # the nearest crossing:
            lo, hi = c, c                                        # its run's best sample
            while lo > 0 and ok[lo - 1]:
                lo -= 1
            while hi + 1 < ok.size and ok[hi + 1]:
                hi += 1
            md_c = float(inp.md[lo + int(np.argmin(miss[lo:hi + 1]))])
            where = f"; the curves place it at MD {md_c * k:.1f} {unit.suffix}"
        else:
            where = "; the curves do not find it in this well"
        note = f"possible mis-pick: {a.surface} picked at MD {a.md_m * k:.1f} {unit.suffix}"
        out.append((a.surface, a.md_m, note + where))
    if len(out) >= 3 and len(out) > len(anchors) // 2:
        # most picks contradicted: the curves do not correlate here, the picks are not at fault
        note = (f"the curves honour only {len(anchors) - len(out)} of {len(anchors)} picks: "
                "the curve alignment does not follow this well's picks (curve evidence "
                "unreliable here, or the picks belong to another column)")
        return [("", a.md_m, note) for a in anchors[:1]]
    return out


def align_well(well, column: ReferenceColumn, trajectory, *, bed_dip: BedDip | None = None,
               settings: CurveSettings = CurveSettings(), picks=None):
    """Align the well's curves to the type log; returns (Alignment, s of every sample [m],
    curve names). ``s`` is NaN where the path runs off the type log. Picks anchor the
    alignment as in :func:`find_cuts_from_curves`."""
    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    inp = _inputs(well, column, trajectory, bed_dip, settings, picks)
    alignment, s, _ = _align(inp, column, settings, _anchors(picks, column, inp))
    return alignment, s[inp.real], inp.names


def _measured(well, column, trajectory, bed_dip, assumptions, picks, inp: _Inputs, *,
              sample: int, first: int, last: int, delta_s_m: float, j_before: float,
              j_after: float, confidence: float, method: str, note: str) -> FaultCut:
    """A FaultCut at well sample ``sample`` (first below), bracket samples ``first..last``,
    reference positions ``j_before``/``j_after`` of the samples either side.

    Samples that bridge a gap in the log are not logged rock: a cut or bracket end on one is
    moved to the log's own samples (the cut to the first logged sample below, the bracket out
    to the logged samples either side of the gap), so a cut in a gap is bracketed by it."""
    md, real = inp.md, inp.real
    n = md.size
    if not real.all():
        logged = np.flatnonzero(real)
        below = logged[np.searchsorted(logged, sample):]
        sample = int(below[0]) if below.size else int(logged[-1])
        above = logged[logged <= max(first - 1, 0)]
        first = int(above[-1]) + 1 if above.size else 0
        after = logged[np.searchsorted(logged, max(last, sample)):]
        last = int(after[0]) if after.size else n - 1
        first = min(first, sample)
    md_top = float(md[max(first - 1, 0)])
    md_base = float(md[min(last, n - 1)])
    above, below = column.unit_at(np.array([inp.s0 + j_before * inp.ds,
                                            inp.s0 + j_after * inp.ds]))
    return measure_cut(
        well=str(well.name), method=method, md_m=float(md[int(sample)]),
        md_top_m=md_top, md_base_m=md_base, delta_s_m=float(delta_s_m), trajectory=trajectory,
        bed_dip=bed_dip, assumptions=assumptions, picks=picks,
        surface_above=str(above or ""), surface_below=str(below or ""),
        confidence=float(confidence), notes=[note])


def find_cuts_from_curves(
    well,
    column: ReferenceColumn,
    trajectory,
    *,
    bed_dip: BedDip | None = None,
    settings: CurveSettings = CurveSettings(),
    assumptions: FaultAssumptions = FaultAssumptions(),
    picks=None,
) -> CurveResult:
    """Find, classify and measure the fault cuts that a well's curves show.

    Returns the cuts (``method="curves"``) and the well's stratigraphic position track
    (``s_m`` NaN and confidence 0 where the well is off the type log).
    A jump of the alignment smaller than ``settings.min_jump_m`` is not a cut, nor is a jump
    with either side off the type log or on its first or last sample (the well leaves the
    strat range the type log covers there; the jump's size is unknown), nor one whose
    confidence is under ``settings.min_confidence``. Each cut's ``extra``
    holds the engine's evidence: ``margin``, ``correlation``, ``rows_above``, ``rows_below``,
    ``beyond_plausible`` (True for a cut larger than the plausible separation, which its
    notes flag too), ``character`` (the type log's character at the cut,
    :mod:`wellfault.align.character`) and ``engine_confidence`` (before the character
    weighting).

    With ``picks``, each picked surface of the column that the type log covers anchors the
    alignment (``settings.pick_tolerance_m``); a pick the aligned path does not honour is
    listed in ``CurveResult.mispicks`` with a "possible mis-pick" note. When the path honours
    too few of them to single any out (:func:`_mispicks`), the curves do not correlate with
    the picks: the anchors would only pull the path into detours (spurious jumps), so the
    curves are aligned again without them and the one note stays.
    """
    from .align.character import CharacterMap, weigh_confidence

    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    inp = _inputs(well, column, trajectory, bed_dip, settings, picks)
    anchors = _anchors(picks, column, inp)
    alignment, s, plausible = _align(inp, column, settings, anchors)
    mis = _mispicks(anchors, s, inp, settings, well.depth_unit)
    if mis and not mis[0][0]:          # the curves follow too few picks: anchors only detour
        alignment, s, plausible = _align(inp, column, settings, [])
    ds, names = inp.ds, inp.names
    conf = np.asarray(alignment.confidence, dtype=float)
    track = inp.track(s, column.unit_at(s), np.where(np.isfinite(s), conf, 0.0))
    cmap = CharacterMap.from_type_log(inp.ref, inp.s0, ds, weights=inp.weights)
    end = len(column.type_log) - 1
    cuts: list[FaultCut] = []
    for j in alignment.jumps:
        ds_m = float(j.size) * ds
        if abs(ds_m) < settings.min_jump_m:
            continue
        ends = (float(j.j_before), float(j.j_after))
        if getattr(j, "off_log", False) or not all(0.5 <= v <= end - 0.5 for v in ends):
            continue
        if _on_log_strat(alignment.on_log, inp.step, int(j.sample)) * ds < _MIN_SIDE_M:
            continue
        kappa = float(np.min(cmap.at(inp.s0 + np.asarray(ends) * ds)))
        confidence = weigh_confidence(float(j.confidence), kappa)
        if not confidence >= settings.min_confidence:
            continue
        first, last = (int(v) for v in j.bracket)
        cut = _measured(well, column, trajectory, bed_dip, assumptions, picks, inp,
                        sample=int(j.sample), first=first, last=last, delta_s_m=ds_m,
                        j_before=ends[0], j_after=ends[1], confidence=confidence,
                        method="curves",
                        note=f"curves {', '.join(names)} aligned to the type log")
        beyond = abs(ds_m) > plausible
        if beyond:
            u = well.depth_unit
            cut = dataclasses.replace(cut, notes=cut.notes + (
                f"; jump of {abs(ds_m) / u.metres:.0f} {u.suffix} TST is beyond the plausible "
                f"separation ({plausible / u.metres:.0f} {u.suffix}): check it against "
                "other evidence"))
        cut.extra.update(margin=float(j.margin), correlation=float(j.correlation),
                         rows_above=int(j.rows_above), rows_below=int(j.rows_below),
                         beyond_plausible=bool(beyond), character=kappa,
                         engine_confidence=float(j.confidence))
        cuts.append(cut)
    cuts, weak = _character_notes(cuts, cmap, track, column, well.depth_unit)
    return CurveResult(cuts, track, alignment, names, mis, plausible, weak)


#: Least strat [m] the well must be placed on the type log either side of a cut: a side placed
#: over less (the path hops onto the log's end and off again) has no correlation to speak of
#: (common practice: no correlation without character); one calibration window (9 m).
_MIN_SIDE_M = 9.0


def _on_log_strat(on_log, step: np.ndarray, sample: int) -> float:
    """Strat length [type-log samples] placed on the type log without a break, on the shorter
    side of ``sample`` (inf when the engine has no off-log margins)."""
    if on_log is None:
        return math.inf
    on = np.asarray(on_log, bool)
    st = np.abs(np.asarray(step, float))
    above = on[:sample][::-1]
    below = on[sample:]
    na = int(np.argmin(above)) if not above.all() else above.size
    nb = int(np.argmin(below)) if not below.all() else below.size
    return float(min(st[sample - na:sample].sum(), st[sample:sample + nb].sum()))


def _character_notes(cuts: list[FaultCut], cmap, track: pd.DataFrame, column, unit
                     ) -> tuple[list[FaultCut], list[str]]:
    """Say where the curve evidence is weak (:mod:`wellfault.align.character`): one note per
    MD span of the well placed where the type log cannot tell positions apart, added to the
    cuts inside it; a cut with either side on such a position says so, with its confidence
    before and after the character weighting."""
    from .align.character import WEAK_BELOW

    spans = cmap.weak_spans(track["md_m"].to_numpy(float), track["s_m"].to_numpy(float))
    notes = []
    for md_top, md_base, s_a, s_b in spans:
        units = column.unit_at(np.array([s_a, s_b]))
        notes.append(cmap.note(md_top, md_base, unit.suffix, unit.metres,
                               (str(units[0] or ""), str(units[1] or ""))))
    out = []
    for c in cuts:
        add = [n for n, (a, b, _, _) in zip(notes, spans) if a - 1.0 <= c.md_m <= b + 1.0]
        k = c.extra.get("character", np.inf)
        if k < WEAK_BELOW:
            add.append(f"type log without character at this cut (character {k:.2f} < "
                       f"{WEAK_BELOW:g}; confidence weighted for it: "
                       f"{c.extra.get('engine_confidence', np.nan):.3f} -> {c.confidence:.3f})")
        if add:
            c = dataclasses.replace(c, notes="; ".join([c.notes, *add]))
        out.append(c)
    return out, notes


def find_cuts_dtw_baseline(
    well,
    column: ReferenceColumn,
    trajectory,
    *,
    bed_dip: BedDip | None = None,
    settings: CurveSettings = CurveSettings(),
    assumptions: FaultAssumptions = FaultAssumptions(),
    picks=None,
) -> CurveResult:
    """The published baseline: monotone DTW of the well against the type log, cuts read from
    its path (:func:`wellfault.align.dtw_cuts`). For benchmarks, not for use.

    Same inputs as :func:`find_cuts_from_curves` and the same preparation — the engine's
    calibrated standardisation, the well resampled on rows one type-log sample apart in
    predicted strat (:func:`wellfault.align.resample_strat`), the engine's Huber misfit —
    so only the alignment model differs: open-begin/open-end DTW
    (:func:`wellfault.align.dtw_subsequence`) instead of the jump DP. The type log is read
    backwards for a well drilling mostly up-section (a monotone path has one direction).
    Cuts of at least ``settings.min_jump_m`` are reported with confidence NaN (DTW has no
    evidence measure); ``alignment`` holds the DTW result.
    """
    from .align import AlignmentEngine, dtw_cuts, dtw_subsequence, resample_strat

    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    inp = _inputs(well, column, trajectory, bed_dip, settings, picks)
    kw = settings.engine_kwargs(inp.ds)
    kw["off_log"] = 0
    engine = AlignmentEngine(inp.ref, weights=inp.weights, **kw)
    center, scale = engine.calibrate(inp.x, inp.step)
    zr = engine._prepared()["ref_t"].T
    m = zr.shape[0]
    orient = 1.0 if float(np.sum(inp.step)) >= 0 else -1.0
    rows = resample_strat((inp.x - center) / scale, orient * inp.step,
                          min_rate=float(engine.min_rate))
    ref_o = zr if orient > 0 else zr[::-1]
    res = dtw_subsequence(np.nan_to_num(rows.values, nan=np.nan), np.ascontiguousarray(ref_o),
                          weights=inp.weights, huber_delta=float(engine.huber_delta))
    lag, found = dtw_cuts(res.path, rows.n_rows, min_size=settings.min_jump_m / inp.ds,
                          stretch=float(engine.stretch))
    jrow = lag + np.arange(rows.n_rows)                       # oriented reference position
    jpos = jrow if orient > 0 else (m - 1) - jrow
    srow = rows.sample_row
    s = inp.s0 + jpos[srow] * inp.ds
    track = inp.track(s, column.unit_at(s), np.nan)
    cuts = []
    for c in found:
        sample = int(np.clip(np.searchsorted(srow, c.row, "left"), 1, inp.md.size - 1))
        first = int(np.clip(np.searchsorted(srow, c.first_row, "left"), 1, inp.md.size - 1))
        last = int(np.clip(np.searchsorted(srow, c.last_row + 1, "left"), sample,
                           inp.md.size - 1))
        cuts.append(_measured(
            well, column, trajectory, bed_dip, assumptions, picks, inp, sample=sample,
            first=first, last=last, delta_s_m=orient * c.size * inp.ds,
            j_before=float(jpos[srow[sample - 1]]), j_after=float(jpos[srow[sample]]),
            confidence=math.nan, method="dtw", note="monotone DTW baseline"))
    return CurveResult(cuts, track, res, inp.names)


_LAG_WINDOW_M = 6.0    # lag-screen window [m of strat]; 9-20 m did no better on real logs


def find_cuts_lag_screen(
    well,
    column: ReferenceColumn,
    trajectory,
    *,
    bed_dip: BedDip | None = None,
    settings: CurveSettings = CurveSettings(),
    assumptions: FaultAssumptions = FaultAssumptions(),
    picks=None,
    **screen,
) -> CurveResult:
    """The cheap screen: steps of the tracked windowed cross-correlation lag
    (:func:`wellfault.align.lag_changepoints`; ``screen`` holds its keyword arguments; the
    window is 6 m of strat unless given).

    Cuts of at least ``settings.min_jump_m`` are measured like the engine's, placed at the
    change point and bracketed by the windows around it; confidence is the smaller of the
    tracked correlations either side. The windowed correlation is gain/offset free, so no
    calibration is needed. ``alignment`` holds the :class:`~wellfault.align.LagTrack`.
    """
    from .align import lag_changepoints

    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    inp = _inputs(well, column, trajectory, bed_dip, settings, picks)
    opts = dict(min_step=settings.min_jump_m / inp.ds,
                window=max(8, int(round(_LAG_WINDOW_M / inp.ds))))
    opts.update(screen)
    tr = lag_changepoints(inp.x, inp.ref, inp.step, weights=inp.weights, **opts)
    n = inp.md.size
    pred = np.cumsum(inp.step) - 0.5 * inp.step            # lagcp's predicted positions
    if tr.sample.size:
        lag = np.interp(np.arange(n), tr.sample, tr.lag_filtered)
    else:
        lag = np.full(n, np.nan)
    s = inp.s0 + (pred + lag) * inp.ds
    track = inp.track(s, column.unit_at(s), np.nan)
    cuts = []
    nw = tr.sample.size
    for c in tr.cuts:
        if abs(c.size) * inp.ds < settings.min_jump_m:
            continue
        b = int(c.window)
        first = int(np.clip(tr.sample[max(b - 2, 0)], 1, n - 1))
        last = int(np.clip(tr.sample[min(b + 1, nw - 1)], 1, n - 1))
        sample = int(np.clip(c.sample, first, last))
        corr = tr.correlation[max(b - 2, 0):min(b + 2, nw)]
        conf = float(np.nanmin(corr)) if np.isfinite(corr).any() else math.nan
        cuts.append(_measured(
            well, column, trajectory, bed_dip, assumptions, picks, inp, sample=sample,
            first=first, last=last, delta_s_m=float(c.size) * inp.ds,
            j_before=float(pred[sample - 1] + c.lag_before),
            j_after=float(pred[sample] + c.lag_after), confidence=max(conf, 0.0),
            method="lag screen", note="lag change-point screen"))
    return CurveResult(cuts, track, tr, inp.names)


def _same_sense(a: FaultCut, b: FaultCut) -> bool:
    return np.sign(a.delta_s_m) == np.sign(b.delta_s_m)


def combine_evidence(tops_cuts: list[FaultCut], curve_cuts: list[FaultCut]) -> list[FaultCut]:
    """Merge tops and curve cuts of one well (see the module docstring)."""
    used: set[int] = set()
    out: list[FaultCut] = []
    for c in curve_cuts:
        match = None
        for k, t in enumerate(tops_cuts):
            if k in used or not _same_sense(t, c):
                continue
            if t.md_top_m <= c.md_m <= t.md_base_m:
                match = k
                break
        if match is None:
            out.append(c)
            continue
        used.add(match)
        t = tops_cuts[match]
        conf = 1.0 - (1.0 - c.confidence) * (1.0 - t.confidence)
        note = (f"tops agree: {t.surface_above} -> {t.surface_below} bracket "
                f"{t.md_top_m:.1f}-{t.md_base_m:.1f} m, jump {t.delta_s_m:+.1f} m TST")
        out.append(dataclasses.replace(
            c, method="both", confidence=conf, notes=c.notes + "; " + note,
            expected_thickness_m=t.expected_thickness_m,
            observed_thickness_m=t.observed_thickness_m))
    out += [t for k, t in enumerate(tops_cuts) if k not in used]
    return sorted(out, key=lambda c: c.md_m)
