"""Curve evidence, the settings: which curves, how far a jump may plausibly reach, and which
curves the well and the type log share."""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np
import pandas as pd

from ..errors import InputError

__all__ = [
    "CurveSettings",
    "parse_curve_spec",
    "plausible_separation_m",
    "shared_curves",
    "CURVE_FAMILIES",
]


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
      prior, ``jump_free``), needs overwhelming curve evidence (``min_confidence_beyond``) and is flagged in its row's
      notes. None (default): :func:`plausible_separation_m` from the inputs (the type log's
      thickness, and in :func:`wellfault.evidence.detect.analyse_well` the separations the tops show);
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
    correlate with the type log there, e.g. rock the type log does not cover — is not
    reported). ``min_confidence_beyond`` is the least confidence of a cut larger than the
    plausible separation (default 0.9, "overwhelming": on the calibration set of
    benchmarks/calibrate_confidence.py, seeds 10000+, 28 cuts beyond 250 m were false, the
    most confident at 0.78, against 1 real one, at 0.32 and with its size wrong). A cut under
    either level is not lost: it is kept, measured, in ``CurveResult.withheld`` with the
    reason in its notes (and in ``WellAnalysis.notes``); a higher floor trades real cuts for
    fewer false ones (on low-character calibration wells, cuts under 0.1 were 13 real of
    two faults close together — short runs between them — against none false).
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
    min_confidence_beyond: float = 0.9

    @classmethod
    def make(cls, curves=None, *, min_jump_m: float = 2.0, off_log_m: float = 150.0,
             calibrate_window_m: float = 9.0, min_confidence: float = 0.01,
             gap_m: float = 2.0, max_separation_m: float | None = None,
             pick_tolerance_m: float = 2.0, min_confidence_beyond: float = 0.9,
             **engine) -> CurveSettings:
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
        for name, v in (("min_confidence", min_confidence),
                        ("min_confidence_beyond", min_confidence_beyond)):
            if not 0.0 <= float(v) <= 1.0:
                raise InputError(f"{name} must lie in [0, 1] (got {v!r}); e.g. 0.5 reports "
                                 "only cuts the evidence makes more likely real than not")
        return cls(spec, float(min_jump_m), tuple(sorted(engine.items())), float(off_log_m),
                   float(calibrate_window_m), float(min_confidence), float(gap_m),
                   None if max_separation_m is None else float(max_separation_m),
                   float(pick_tolerance_m), shared=curves is None,
                   min_confidence_beyond=float(min_confidence_beyond))

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
    from ..align.character import curve_character

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
