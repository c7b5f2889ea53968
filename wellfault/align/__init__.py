"""Curve evidence: align well logs to a type log in stratigraphic coordinates, faults included.

Array-level API (the caller resamples/standardises in strat coordinates and supplies the
predicted strat increment of every well sample):

* :class:`AlignmentEngine` — exact DP alignment with fault jumps; ``.align(well, step)`` for a
  whole well, ``.stream()`` for a well being drilled (``push``/``current``).
* :class:`Alignment`, :class:`Jump` — results.
* :func:`standardise`, :func:`robust_location_scale` — robust curve standardisation.
* :func:`resample_strat` — the well on rows one reference sample apart in predicted strat.
* :func:`dtw_baseline` — plain monotone DTW, the accuracy baseline.
* :func:`lag_changepoints` — cheap screen: change points of the windowed cross-correlation lag.
"""

from .dtw import dtw_baseline
from .engine import Alignment, AlignmentEngine, Jump, StreamingAligner, stretch_moves
from .lagcp import LagCut, LagTrack, lag_changepoints
from .misfit import MISFITS, misfit_matrix, robust_location_scale, standardise
from .resample import StratRows, resample_strat

__all__ = [
    "AlignmentEngine",
    "StreamingAligner",
    "Alignment",
    "Jump",
    "stretch_moves",
    "standardise",
    "robust_location_scale",
    "misfit_matrix",
    "MISFITS",
    "resample_strat",
    "StratRows",
    "dtw_baseline",
    "lag_changepoints",
    "LagTrack",
    "LagCut",
]
