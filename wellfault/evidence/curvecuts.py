"""Fault cuts from log curves: a well's curves aligned to the type log (DESIGN.md §4).

This module wires the array-level engine (:mod:`wellfault.align`) to wells: it takes the
well's curves, its trajectory and the bed dip, predicts the stratigraphic increment of every
sample (r·ΔMD with r = t·n), aligns the curves to the reference column's type log, and turns
each jump of the alignment into a measured :class:`~wellfault.results.FaultCut`. It also returns
the well's stratigraphic position track (``md_m, s_m, unit, confidence``), the schema of
:mod:`wellfault.track`.

:func:`combine_evidence` merges cuts from tops and from curves: a tops cut whose bracket holds a
curve cut of the same sense becomes one ``method="both"`` cut, placed and measured by the curves
(a log pins the cut to the sample; tops only bracket it) with the tops' figures in its notes,
unless the caller keeps that tops cut apart (``apart``: the curves' net jump between the two
picks disagrees with the tops', :class:`wellfault.evidence.detect._IntervalChecks`).
"""

from __future__ import annotations

import dataclasses
import hashlib
import math
import warnings
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..errors import AlignmentError, InputError, WellfaultWarning
from ..geo.column import ReferenceColumn
from ..geo.dip import BedDip
from .curve_settings import CurveSettings, _log_scale, shared_curves
from .measure import FaultAssumptions, measure_cut
from .results import FaultCut

__all__ = [
    "CurveResult",
    "align_well",
    "find_cuts_from_curves",
    "combine_evidence",
    "predicted_steps",
]


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
    #: jumps measured as cuts but not reported: confidence under ``settings.min_confidence``,
    #: or beyond the plausible separation under ``settings.min_confidence_beyond``; the
    #: reason ends their notes
    withheld: list[FaultCut] = dataclasses.field(default_factory=list)
    #: MD of every jump of the alignment of at least ``settings.min_jump_m`` [m], reported or
    #: not, off the type log included (where the curves saw a break)
    jump_md_m: tuple[float, ...] = ()

    def crossed_without_jump(self, md_top_m: float, md_base_m: float) -> bool:
        """Whether the curves placed the well on the type log all the way from ``md_top_m``
        to ``md_base_m`` without a jump: there they correlate with the type log and see no
        cut."""
        md = self.track["md_m"].to_numpy(float)
        inside = (md >= md_top_m) & (md <= md_base_m)
        if not inside.any() or not np.isfinite(self.track["s_m"].to_numpy(float)[inside]).all():
            return False
        return not any(md_top_m <= m <= md_base_m for m in self.jump_md_m)


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


#: what was made from the last type logs: engines with their prepared arrays, character maps
_PER_TYPE_LOG: dict = {}


def _per_type_log(make, ref: np.ndarray, weights: np.ndarray, *extra):
    """``make()`` for this type log, these weights and ``extra`` (what is made, and the
    settings it depends on), made once per process.

    A field screening aligns every well to the same type log: what depends on nothing else
    (the engine's prepared arrays and the calibration's coarse engines, the type log's
    character) is made for the first well and reused; a few are kept, by content."""
    key = (hashlib.blake2b(np.ascontiguousarray(ref).tobytes(), digest_size=16).digest(),
           ref.shape, tuple(np.asarray(weights, float)), *extra)
    made = _PER_TYPE_LOG.get(key)
    if made is None:
        if len(_PER_TYPE_LOG) >= 8:
            _PER_TYPE_LOG.pop(next(iter(_PER_TYPE_LOG)))
        made = _PER_TYPE_LOG[key] = make()
    return made


def _engine(ref: np.ndarray, weights: np.ndarray, kw: dict):
    """The alignment engine for this type log and these settings (:func:`_per_type_log`)."""
    from ..align import AlignmentEngine

    return _per_type_log(lambda: AlignmentEngine(ref.copy(), weights=weights, **kw), ref,
                         weights, "engine", tuple(sorted(kw.items())))


def _character(inp: _Inputs):
    """The type log's character map (:func:`_per_type_log`)."""
    from ..align.character import CharacterMap

    return _per_type_log(lambda: CharacterMap.from_type_log(inp.ref, inp.s0, inp.ds,
                                                            weights=inp.weights),
                         inp.ref, inp.weights, "character", inp.s0, inp.ds)


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


def _mispicks(anchors: list[_Anchor], s: np.ndarray, inp: _Inputs, settings: CurveSettings
              ) -> list[tuple[str, float, str]]:
    """Picks the aligned path does not honour (outside the tolerance and a sample), each with
    a note saying where the curves place the surface (in metres, like every note: outputs
    restate lengths in their unit, :func:`wellfault.geo.precision.lengths_in_text`). When most
    of them (and at least three) are not honoured, one note says so instead: the curves do not
    correlate with the picks, which is no finding about any one pick."""
    out = []
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
            where = f"; the curves place it at MD {md_c:.1f} m"
        else:
            where = "; the curves do not find it in this well"
        note = f"possible mis-pick: {a.surface} picked at MD {a.md_m:.1f} m"
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
    confidence is under ``settings.min_confidence`` (or, for a jump larger than the plausible
    separation, under ``settings.min_confidence_beyond``): those are measured and kept in
    ``CurveResult.withheld``, the reason in their notes. Each cut's ``extra``
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
    from ..align.character import weigh_confidence

    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    inp = _inputs(well, column, trajectory, bed_dip, settings, picks)
    anchors = _anchors(picks, column, inp)
    alignment, s, plausible = _align(inp, column, settings, anchors)
    mis = _mispicks(anchors, s, inp, settings)
    if mis and not mis[0][0]:          # the curves follow too few picks: anchors only detour
        alignment, s, plausible = _align(inp, column, settings, [])
    ds, names = inp.ds, inp.names
    conf = np.asarray(alignment.confidence, dtype=float)
    track = inp.track(s, column.unit_at(s), np.where(np.isfinite(s), conf, 0.0))
    cmap = _character(inp)
    end = len(column.type_log) - 1
    cuts: list[FaultCut] = []
    withheld: list[FaultCut] = []
    jump_md: list[float] = []
    for j in alignment.jumps:
        ds_m = float(j.size) * ds
        if abs(ds_m) < settings.min_jump_m:
            continue
        jump_md.append(float(inp.md[int(j.sample)]))
        ends = (float(j.j_before), float(j.j_after))
        if getattr(j, "off_log", False) or not all(0.5 <= v <= end - 0.5 for v in ends):
            continue
        if _on_log_strat(alignment.on_log, inp.step, int(j.sample)) * ds < _MIN_SIDE_M:
            continue
        kappa = float(np.min(cmap.at(inp.s0 + np.asarray(ends) * ds)))
        confidence = weigh_confidence(float(j.confidence), kappa)
        beyond = abs(ds_m) > plausible
        floor = max(settings.min_confidence, settings.min_confidence_beyond if beyond else 0.0)
        first, last = (int(v) for v in j.bracket)
        cut = _measured(well, column, trajectory, bed_dip, assumptions, picks, inp,
                        sample=int(j.sample), first=first, last=last, delta_s_m=ds_m,
                        j_before=ends[0], j_after=ends[1], confidence=confidence,
                        method="curves",
                        note=f"curves {', '.join(names)} aligned to the type log")
        if beyond:
            cut = dataclasses.replace(cut, notes=cut.notes + (
                f"; jump of {abs(ds_m):.0f} m TST is beyond the plausible separation "
                f"({plausible:.0f} m): check it against other evidence"))
        cut.extra.update(margin=float(j.margin), correlation=float(j.correlation),
                         rows_above=int(j.rows_above), rows_below=int(j.rows_below),
                         beyond_plausible=bool(beyond), character=kappa,
                         engine_confidence=float(j.confidence))
        if confidence >= floor:
            cuts.append(cut)
        else:
            withheld.append(dataclasses.replace(cut, notes=cut.notes + (
                f"; withheld: confidence {confidence:.2f} under {floor:g}"
                + (" (beyond the plausible separation)" if beyond else ""))))
    cuts, weak = _character_notes(cuts, cmap, track, column)
    return CurveResult(cuts, track, alignment, names, mis, plausible, weak, withheld,
                       tuple(jump_md))


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


def _character_notes(cuts: list[FaultCut], cmap, track: pd.DataFrame, column
                     ) -> tuple[list[FaultCut], list[str]]:
    """Say where the curve evidence is weak (:mod:`wellfault.align.character`): one note per
    MD span of the well placed where the type log cannot tell positions apart, added to the
    cuts inside it; a cut with either side on such a position says so, with its confidence
    before and after the character weighting."""
    from ..align.character import WEAK_BELOW

    spans = cmap.weak_spans(track["md_m"].to_numpy(float), track["s_m"].to_numpy(float))
    notes = []
    for md_top, md_base, s_a, s_b in spans:
        units = column.unit_at(np.array([s_a, s_b]))
        notes.append(cmap.note(md_top, md_base, surfaces=(str(units[0] or ""),
                                                          str(units[1] or ""))))
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


def _same_sense(a: FaultCut, b: FaultCut) -> bool:
    return np.sign(a.delta_s_m) == np.sign(b.delta_s_m)


def combine_evidence(tops_cuts: list[FaultCut], curve_cuts: list[FaultCut], *,
                     apart=frozenset()) -> list[FaultCut]:
    """Merge tops and curve cuts of one well (see the module docstring).

    ``apart``: indices of tops cuts never merged with a curve cut (the caller found that the
    curves' net jump in their bracket disagrees with the tops', :func:`wellfault.evidence.detect
    .analyse_well`); they are returned as they are."""
    used: set[int] = set()
    out: list[FaultCut] = []
    for c in curve_cuts:
        match = None
        for k, t in enumerate(tops_cuts):
            if k in used or k in apart or not _same_sense(t, c):
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
