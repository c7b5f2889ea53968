"""What an alignment gives: the path, its jumps and their evidence (built by
:mod:`~wellfault.align.evidence`, read by the engine and the streaming aligner)."""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

__all__ = ["Alignment", "Jump"]


@dataclass(frozen=True)
class Jump:
    """One jump of the alignment path: a candidate fault cut.

    Attributes
    ----------
    sample : first well sample below the cut (DESIGN.md: a cut is reported at the first sample
        below it).
    row : DP row on which the jump lands.
    j_before, j_after : reference position [reference samples] of the last sample above and of
        the first sample below.
    size : signed stratigraphic jump Δs = s(below) − s(above) minus the predicted increment
        between the two samples [reference samples; multiply by ds for TST], from lines fitted
        to the lag on either side (module docstring). Missing section when its sign equals
        the direction of travel, repeated when opposite.
    margin : evidence for the cut (see module docstring) [misfit units].
    correlation : the smaller, above and below the cut, of the correlation between the well and
        the type log read along the path over the evidence window — is there a match at all?
    confidence : in [0, 1]: the calibrated probability that the cut is real (module
        docstring, "Cut evidence").
    bracket : (first, last) well sample that may be the first below the cut (placements
        costing at most ``bracket_tolerance`` more than the best).
    off_log : True when the sample above or below the jump is placed off the type log (in the
        ``off_log`` margins): the jump is where the well leaves or re-enters the strat range
        the type log covers, its size is unknown and it is not a measured cut.
    rows_above, rows_below : DP rows from the previous jump (or the first row) to this one,
        and from this one to the next (or past the last row): how far the well correlates
        with the type log without a jump on either side.
    """

    sample: int
    row: int
    j_before: float
    j_after: float
    size: float
    margin: float
    correlation: float
    confidence: float
    bracket: tuple[int, int]
    off_log: bool = False
    rows_above: int = 0
    rows_below: int = 0


@dataclass(frozen=True)
class Alignment:
    """Result of aligning a well against the type log.

    Attributes
    ----------
    path : (N,) float — reference position of every well sample [reference samples].
    score : total cost of the optimal path (misfits + jump and strain penalties).
    jumps : the jumps of the path, in well order.
    confidence : (N,) float in [0, 1] — local fit quality: 1 − misfit at the path / mean misfit
        of the row, smoothed over ``smooth_rows`` rows.
    correlation : correlation between the whole well and the type log read along the path
        (weighted mean over curves): low values mean the well does not match the type log and
        its jumps mean little.
    row_path : (R,) int — reference column of each DP row (negative or >= M: off the log).
    sample_row : (N,) int — DP row of each well sample.
    center, scale : (C,) — the well standardisation used.
    on_log : (N,) bool — the sample's position lies within the type log (always True with
        ``off_log = 0``); positions off it are below 0 or beyond M − 1.
    """

    path: np.ndarray
    score: float
    jumps: tuple[Jump, ...]
    confidence: np.ndarray
    correlation: float
    row_path: np.ndarray
    sample_row: np.ndarray
    center: np.ndarray
    scale: np.ndarray
    on_log: np.ndarray | None = None

    @property
    def n_rows(self) -> int:
        return int(self.row_path.shape[0])
