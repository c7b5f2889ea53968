"""Deprecated: ``wellfault.curvecuts`` is now ``wellfault.evidence.curve_baselines``,
``wellfault.evidence.curve_settings``, ``wellfault.evidence.curvecuts``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .evidence.curve_baselines import find_cuts_dtw_baseline, find_cuts_lag_screen
from .evidence.curve_settings import (
    CurveSettings, parse_curve_spec, plausible_separation_m, shared_curves, CURVE_FAMILIES,
)
from .evidence.curvecuts import (
    CurveResult, align_well, find_cuts_from_curves, combine_evidence, predicted_steps,
)

warn_moved(__name__, "wellfault.evidence.curve_baselines, wellfault.evidence.curve_settings, wellfault.evidence.curvecuts")
