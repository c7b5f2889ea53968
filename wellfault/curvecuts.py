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
import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from .column import ReferenceColumn
from .dip import BedDip
from .errors import AlignmentError, InputError
from .measure import FaultAssumptions, measure_cut
from .results import FaultCut

__all__ = ["CurveSettings", "CurveResult", "align_well", "find_cuts_from_curves",
           "combine_evidence", "predicted_steps", "parse_curve_spec"]


@dataclass(frozen=True)
class CurveSettings:
    """How the curves are aligned.

    ``curves`` maps curve mnemonic → weight (``{"GR": 1.0}``); ``min_jump_m`` is the smallest
    jump reported as a cut (smaller jumps absorb local mis-ties; about two to three times the
    gamma-ray vertical resolution, methods.md §7, common practice); ``engine`` holds keyword
    arguments for :class:`wellfault.align.AlignmentEngine` (stretch, jump_penalty, ...).
    """

    curves: tuple[tuple[str, float], ...] = (("GR", 1.0),)
    min_jump_m: float = 2.0
    engine: tuple[tuple[str, object], ...] = ()

    @classmethod
    def make(cls, curves=None, *, min_jump_m: float = 2.0, **engine) -> CurveSettings:
        if curves is None:
            spec: tuple[tuple[str, float], ...] = (("GR", 1.0),)
        elif isinstance(curves, dict):
            spec = tuple((str(k), float(v)) for k, v in curves.items())
        else:
            spec = tuple(parse_curve_spec(c) if isinstance(c, str) else (str(c[0]), float(c[1]))
                         for c in curves)
        if not spec:
            raise InputError("no curves to align; name at least one, e.g. --curve GR")
        return cls(spec, float(min_jump_m), tuple(sorted(engine.items())))


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


def align_well(well, column: ReferenceColumn, trajectory, *, bed_dip: BedDip | None = None,
               settings: CurveSettings = CurveSettings(), picks=None):
    """Align the well's curves to the type log; returns (Alignment, s of every sample [m])."""
    from .align import AlignmentEngine

    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    x, ref, weights, names = _curve_matrix(well, column, settings)
    ds = float(column.type_log_step_m)
    s0 = float(column.type_log.index[0])
    md = well.curves.index.to_numpy(float)
    if md.size < 10:
        raise AlignmentError(f"well {well.name!r} has only {md.size} samples; the curve "
                             "evidence needs a logged interval")
    if np.all(np.isnan(x)):
        raise InputError(f"well {well.name!r}: curves {list(names)} are null everywhere")
    step = predicted_steps(md, trajectory, bed_dip, picks) / ds
    engine = AlignmentEngine(ref, weights=weights, **dict(settings.engine))
    alignment = engine.align(x, step)
    s = s0 + np.asarray(alignment.path, dtype=float) * ds
    return alignment, s, names


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

    Returns the cuts (``method="curves"``) and the well's stratigraphic position track.
    A jump of the alignment smaller than ``settings.min_jump_m`` is not a cut.
    """
    bed_dip = bed_dip or BedDip.constant(0.0, 0.0)
    alignment, s, names = align_well(well, column, trajectory, bed_dip=bed_dip,
                                     settings=settings, picks=picks)
    ds = float(column.type_log_step_m)
    s0 = float(column.type_log.index[0])
    md = well.curves.index.to_numpy(float)
    units = column.unit_at(s)
    track = pd.DataFrame({"md_m": md, "s_m": s, "unit": units,
                          "confidence": np.asarray(alignment.confidence, dtype=float)})
    cuts: list[FaultCut] = []
    for j in alignment.jumps:
        ds_m = float(j.size) * ds
        if abs(ds_m) < settings.min_jump_m:
            continue
        first, last = (int(v) for v in j.bracket)
        md_top = float(md[max(first - 1, 0)])
        md_base = float(md[min(last, md.size - 1)])
        s_above = s0 + float(j.j_before) * ds
        s_below = s0 + float(j.j_after) * ds
        above, below = column.unit_at(np.array([s_above, s_below]))
        cuts.append(measure_cut(
            well=str(well.name), method="curves", md_m=float(md[int(j.sample)]),
            md_top_m=md_top, md_base_m=md_base, delta_s_m=ds_m, trajectory=trajectory,
            bed_dip=bed_dip, assumptions=assumptions, picks=picks,
            surface_above=str(above or ""), surface_below=str(below or ""),
            confidence=float(j.confidence),
            notes=[f"curves {', '.join(names)} aligned to the type log"],
        ))
    return CurveResult(cuts, track, alignment, names)


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
