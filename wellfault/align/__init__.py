"""Curve evidence: align well logs to a type log in stratigraphic coordinates, faults included.

Array-level API (the caller resamples/standardises in strat coordinates and supplies the
predicted strat increment of every well sample):

* :class:`AlignmentEngine` — exact DP alignment with fault jumps; ``.align(well, step)`` for a
  whole well, ``.stream()`` for a well being drilled (``push``/``current``).
* :class:`Alignment`, :class:`Jump` — results.
* :func:`standardise`, :func:`robust_location_scale` — robust curve standardisation.
* :func:`resample_strat` — the well on rows one reference sample apart in predicted strat.
* :func:`dtw_baseline`, :func:`dtw_subsequence`, :func:`dtw_cuts` — plain monotone DTW, the
  accuracy baseline (both ends anchored, or open-ended with cuts read from its path).
* :func:`lag_changepoints` — cheap screen: change points of the windowed cross-correlation lag.

Each name is imported from its module when first used (DEVELOPERS.md, "Imports"): the engine
never loads the lag screen's change-point library (ruptures, scipy.stats) or the DTW baseline.
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from .._lazy import lazy_exports

if TYPE_CHECKING:  # what the lazy names below are, for type checkers (tests keep them equal)
    from .dtw import DTWCut, dtw_baseline, dtw_cuts, dtw_subsequence
    from .engine import CONFIDENCE_COEF, AlignmentEngine, stretch_moves
    from .alignment import Alignment, Jump
    from .stream import StreamingAligner
    from .running import running_standardise
    from .lagcp import LagCut, LagTrack, lag_changepoints
    from .misfit import MISFITS, misfit_matrix, robust_location_scale, standardise
    from .resample import StratRows, resample_strat
    from .stream import TailAlignment

__getattr__, __dir__, _LAZY = lazy_exports(__name__, globals(), {
    ".engine": ("AlignmentEngine", "stretch_moves", "CONFIDENCE_COEF"),
    ".stream": ("StreamingAligner", "TailAlignment"),
    ".alignment": ("Alignment", "Jump"),
    ".running": ("running_standardise",),
    ".misfit": ("standardise", "robust_location_scale", "misfit_matrix", "MISFITS"),
    ".resample": ("resample_strat", "StratRows"),
    ".dtw": ("dtw_baseline", "dtw_subsequence", "dtw_cuts", "DTWCut"),
    ".lagcp": ("lag_changepoints", "LagTrack", "LagCut"),
})

__all__ = list(_LAZY)
