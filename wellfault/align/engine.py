"""The alignment engine: map every well sample to a position in the type log, faults included.

Model
-----
Input at the array level: ``ref`` (M, C) type-log curves on a regular strat grid of step
``ds``; ``well`` (N, C) curves; ``step`` (N,) the *predicted* signed strat increment of each well
sample in reference samples (``r·ΔMD/ds`` from trajectory and bed dip; < 1 in high-angle
wells, negative while drilling up-section, may change sign). The result maps each well sample
to a reference position (float index, 0 = first type-log sample); a jump of that position is a
fault cut, and its size Δs (reference samples; × ds = TST) is missing section when its sign is
the direction of travel, repeated section when opposite (DESIGN.md §2).

Discretisation: strat rows, strain-limited moves
------------------------------------------------
A DP over (well sample, reference sample) with integer reference positions cannot honour a
fractional predicted step: with ``step = 0.3`` and stretch ``k = 1.5`` the allowed increment
``[0.2, 0.45]`` holds no integer, so per-sample moves either stall for free (0) or are
forbidden; carrying a fractional position instead multiplies states and traceback bytes. We
therefore first resample the well in predicted stratigraphic arc length (:mod:`.resample`):
rows one reference sample apart, each predicted to move exactly ±1 reference sample (samples
are box-averaged into rows in high-angle wells, shared between rows where the well outruns the
reference grid; a row never straddles a turning point). On these rows the thickness change
``[1/k, k]`` is expressed by strain-limited multi-row moves — the strain limits of Hale's
dynamic warping (2013) — in lag ``ℓ = j − round(predicted position)``:

* FOLLOW — one row, lag unchanged (the path moves exactly as predicted);
* FAST   — ``bf = ceil(1/(k−1))`` rows, lag +1 in the direction of travel: ``bf+1`` reference
  samples in ``bf`` rows, a ratio ``(bf+1)/bf <= k``;
* SLOW   — ``bs = ceil(k/(k−1))`` rows, lag −1: ``(bs−1)/bs >= 1/k``;
* JUMP   — one row, to *any* reference sample, forward or backward, cost ``jump_penalty``
  (plus the jump-size prior's excess, below); without the prior it comes from the best cell
  of the previous row, so its source is one integer per row.

For the default ``k = 1.5``: ``bf = 2``, ``bs = 3``, local slopes 3/2, 1 and 2/3 — the stretch
window holds on every move and over any run of moves; the price is that a lag change is
quantised to one reference sample. Rows inside a multi-row move sit at the new lag and their
misfits are added. FAST/SLOW moves need every row they span to have the same direction (no
stretch across a turning point) and cost ``strain_penalty`` each (a soft preference for the
predicted increment). Where ``|step| < min_rate`` (well nearly parallel to bedding) the arc
length is floored at ``min_rate``: a row then spans more samples and predicts less than one
sample of movement, so the lag may drift by up to about ``(k−1)·min_rate`` per well sample
there — an additive tolerance standing for the dip uncertainty, which dominates in such hole.
Nothing lets the path stall for free: not moving when a move is predicted needs SLOW moves
(limited rate, penalised) or a jump.

Exactness and cost
------------------
The DP is exact: the global minimum over all such paths, with free start and end in the
reference (checked against exhaustive enumeration in tests/test_align_engine.py, with the
jump-size prior and anchors too). Time O(R·M) with O(1) work per cell in a branch-free,
vectorised row pass; memory: one byte per (row, reference sample) for the move codes, plus
O(M) cost rows, O(R + N) per-row/sample arrays and, with the prior, one source per row and
prior bin. ``R`` = total predicted strat arc length in reference samples: ``R <= N`` while
``|step| <= 1``; ``R ≈ N·|step|`` in high-angle wells. The forward pass runs one row at a time
(:class:`~wellfault.align.stream.StreamingAligner`); :meth:`AlignmentEngine.align` is one push.

Standardisation
---------------
Curves are compared after robust standardisation (:mod:`.misfit`). The well's own statistics
are biased when it logs only part of the column, so :meth:`AlignmentEngine.calibrate` first
aligns coarsely, then matches the well's quantiles to those of the type-log samples it covers.
The first coarse pass compares curves standardised by their own running mean and spread over
``calibrate_window`` samples, which no tool gain or offset changes: starting instead from the
well's own median and spread (as before) left the level wrong by half a spread or more in 40 %
of wells on real gamma-ray type logs, and a path over wrongly standardised curves hops between
chance matches (jumps of ±1000 m, tens per well). With it the level is right to 0.02 spread
(90th percentile, 120 wells on the three real logs of benchmarks/bench_curves.py).

Jump-size prior
---------------
With a constant jump cost, a type log with little character lets the path hop to a look-alike
interval anywhere in the column (jumps of 1-2 km of TST where the field's faults have tens of
metres). With ``jump_free = D`` a jump's cost grows with its size beyond D: columns are grouped
in bins of ``B = ceil(D / jump_bins)`` reference samples, ``w = ceil(D / B)`` bins are free, and
a jump from column i to column j costs ``jump_penalty + jump_slope·B·max(0, |i//B − j//B| − w)``
— free up to D (give or take a bin), then ``jump_slope`` per sample (by default
``PRIOR_EXCESS·jump_penalty/D`` = ``jump_penalty/D``: a jump of k·D costs k plain jumps). A
steeper slope buys nothing: a staircase of k jumps of D each, one row apart, costs k jumps
and a few rows of misfit, so the path would split an implausible jump into a staircase of
plausible-looking ones (several false cuts instead of one flagged cut); with this slope the
single jump is never dearer than its staircase.
The size is the reference displacement between the two rows (Δs plus the predicted one-sample
move). The DP stays exact for this cost (oracle-tested): per row, the best cell of every bin
of the previous row (one vectorised minimum over the row), the best source bin of every
landing bin (a minimum over the ``2w + 1`` bins around it, then a two-pass linear distance
transform over the bins with slope ``jump_slope·B``), and the jump cost written per column
— O(M + (M/B)·w) per row; the source column of each landing bin is kept per row (``R·M/B``
int64, an eighth of a byte per cell for B = 64), so the traceback recovers every jump's
source without storing one per cell. Why bins: the per-column prior (windowed minimum of half-
width D, then a linear distance transform, also O(M) per row and exact) was built first and
measured 3-6 times the whole DP's time, its four sequential scans per row do not vectorise;
a prior is a soft preference, and a resolution of D/8 in its size costs it nothing.
``jump_free = None`` (the default of this array-level class) keeps the constant cost. The
calibration pre-pass (:meth:`AlignmentEngine.calibrate`) runs without the prior: with it, the
coarse path of some high-angle wells on real logs ran off the type log and left the well's
level wrong (three real cuts lost in 60 test wells), though it gave fewer absurd jumps on
low-character logs.

Anchors
-------
Picked tops, when given with the curves, constrain the path: an anchor ``(sample, position,
tolerance)`` says that well sample ``sample`` lies at reference position ``position`` within
``tolerance`` samples. On the anchor's row every column whose position for that sample
(``sample_position + column − row centre``) is farther than the tolerance costs
``anchor_cost`` more (default ``ANCHOR_COST_JUMPS·jump_penalty`` = 1.5 jumps), on every move
through that row. The cost is finite on purpose: where the curves are ambiguous the pick
decides (any path honouring it is cheaper by the anchor cost), but a pick the curves clearly
contradict over many rows is not forced — the path then pays the cost, and the well-level
wiring reports the pick as a possible mis-pick instead of bending the alignment into an
absurd detour; less than two jumps, so a detour out and back just to touch a wrong pick never
pays. Anchor costs are in the DP (oracle-tested) and in the cut evidence's window DPs, not in
the local fit quality.

Off the type log
----------------
A type log covers a strat interval; a well can drill rock above its top or below its base (or
be carried there by a fault). With ``off_log = P > 0`` the DP has P extra reference columns on
either side whose misfit is the constant ``off_log_misfit`` for every well row: there the path
follows the well's predicted movement without a reference, instead of being forced into jumps
to chance matches. Positions in these margins are below 0 or beyond M − 1 in
:attr:`Alignment.path` (:attr:`Alignment.on_log` False); a jump with either side there is
flagged :attr:`Jump.off_log` — where the well leaves or re-enters the type log's range, its
size unknown — and the well-level wiring (wellfault.curvecuts) never reports it as a cut. The
constant must lie above the misfit of a true match (noise²/2 and a little more, about 0.01-0.05
for noise of 10-20 % of the spread) and below what chance matches reach with a jump now and
then; 0.06 does both on the benchmark wells (0.25 did not): wells partly outside the column
went from 0.44 to 0.03 false cuts per well, wells inside lost nothing, and a well aligned to an
unrelated type log now runs mostly off the log instead of hopping (about 2 reported cuts per
well instead of 22; 0.02 per well with confidence >= 0.9). A
path longer than the margins hops inside them (such jumps are off-log too). ``off_log = 0``
(the default of this array-level class) keeps the exact behaviour of the plain DP.

Cut evidence
------------
A cut found on rows is placed on the well's own samples by splitting the samples of the rows
around it (up to four either side, not crossing the neighbouring jumps) where the misfit (type
log interpolated at each sample's position, with the lag before or after) is least. For each
jump, on the window of ``evidence_rows`` rows either side not crossing the neighbouring jumps,
two jump-free DPs (forward from the path's cell at the window start, backward from anywhere
near its cell at the window end) give the best cost with one jump landing on each row of the
window — ``bracket``: the rows where it costs at most ``bracket_tolerance`` more than the best —
and the best cost with no jump in the window. ``margin`` = no-jump cost − best one-jump cost
(the jump's own cost included: penalty and any prior excess; anchors cost in both): the evidence that a cut, not stretch, explains the window.
``correlation`` is the smaller of the well/type-log correlations along the path above and
below the cut over the same window; ``run`` (:attr:`Jump.rows_above`, :attr:`Jump.rows_below`,
the smaller) how many rows the well keeps following the type log without another jump.

``confidence`` is calibrated: P(real) = 1 / (1 + exp(−b·[1, ln(1 + margin), correlation,
ln(run)])) with ``b = confidence_coef`` (default :data:`CONFIDENCE_COEF`), fitted by logistic
regression on the cuts reported in 740 forward-modelled calibration wells
(benchmarks/calibrate_confidence.py: real, invented and low-character type logs, normal, noisy,
closely faulted and partly-outside wells, and wells aligned to an unrelated type log, whose
every cut is false). Correlation and run separate real cuts from hops; the margin adds a
little (it weighed nothing when the set had no low-character logs: chance matches of another
type log beat the no-jump path by as much as true cuts do), and it keeps a cut whose
short side has poor correlation — two faults close together on a plain log — from being
taken for a hop. The rows of ``run`` are reference samples: the fit holds for type
logs sampled about every 0.15 m (refit for much coarser or finer grids). With
``confidence_coef=None`` the uncalibrated form of the first version is used:
``logistic((margin − confidence_offset)/confidence_scale)`` times a ramp of the correlation from
``correlation_floor`` (0) to ``correlation_full`` (1).
``size`` is the difference of straight lines fitted to the path's lag on either side
(evaluated at the cut), which removes the one-sample quantisation and the lag the path may
carry into a jump.

Scaling of ``jump_penalty``
---------------------------
Costs are per-row misfits of standardised curves (an unrelated pairing ≈ 0.7, a good match
≈ noise²/2 with the Huber default), so a jump is taken when it improves the fit by more than
``jump_penalty`` summed over the rows it affects — with the default 6, about ten rows of
clearly better match. It does not depend on the number of curves (the misfit is a weighted
mean). Rows are one reference sample of strat each: to keep the same evidence in metres when
the type-log grid ``ds`` is refined by a factor f, multiply ``jump_penalty`` by f.

Limits
------
Without ``off_log`` margins, a well running past either end of ``ref`` is forced into a spurious
jump. Rock outside the type log that resembles rock inside it can still be matched by chance
(the calibrated confidence of such jumps stays low). A small cut in a featureless interval can
be absorbed by stretch moves instead of a jump. Stretch is limited to 1.1 <= k <= 2 (move
lengths).

References
----------
.. [1] D. Hale, "Dynamic warping of seismic images", Geophysics 78(2):S105-S115, 2013,
   doi:10.1190/geo2012-0327.1 (journal details from memory; CWP-723 report, see
   reference/methods.md §5.1): strain-limited warping.
.. [2] M. S. Waterman and R. Raymond, "The match game: new stratigraphic correlation
   algorithms", Mathematical Geology 19:109-127, 1987 (a gap as one weighted event).
"""

from __future__ import annotations

import math
import warnings

import numpy as np

from ..errors import input_error
from .alignment import Alignment
from .misfit import check_misfit, reference_bounds, robust_location_scale
from .running import _CAL_QUANTILES, running_standardise
from .stream import StreamingAligner, _as_curves

__all__ = [
    "AlignmentEngine",
    "stretch_moves",
    "CONFIDENCE_COEF",
    "PRIOR_EXCESS",
    "ANCHOR_COST_JUMPS",
]


#: Coefficients of the calibrated cut confidence (module docstring, "Cut evidence"): the
#: logistic model P(real) = 1 / (1 + exp(-b . [1, ln(1 + margin), correlation, ln(run)])),
#: fitted by benchmarks/calibrate_confidence.py (default arguments) on 740 forward-modelled
#: wells (seeds 10000+, type logs on a 0.1524 m grid, low-character logs included): 922 cuts,
#: 677 real.
CONFIDENCE_COEF: tuple[float, float, float, float] = (-9.924, 0.3421, 5.959, 0.9949)


#: Default slope of the jump-size prior: a jump twice the plausible size costs
#: ``1 + PRIOR_EXCESS`` plain jumps (module docstring, "Jump-size prior").
PRIOR_EXCESS = 1.0


#: Default cost of a row outside its anchor's band, in plain jumps (module docstring,
#: "Anchors").
ANCHOR_COST_JUMPS = 1.5


def stretch_moves(stretch: float) -> tuple[int, int]:
    """Rows spanned by the FAST and SLOW moves for stretch factor ``k``.

    >>> stretch_moves(1.5)
    (2, 3)
    """
    k = float(stretch)
    return math.ceil(1.0 / (k - 1.0) - 1e-9), math.ceil(k / (k - 1.0) - 1e-9)


class AlignmentEngine:
    """Exact dynamic-programming alignment of well curves to a type log, with fault jumps.

    Parameters
    ----------
    ref : (M, C) or (M,) array_like — type-log curves on a regular strat grid, NaN = null.
    weights : (C,) array_like, optional — relative weight of each curve (default equal).
    stretch : float — natural thickness change allowed: the actual strat increment lies in
        ``[step/k, step·k]`` (1.1 <= k <= 2).
    jump_penalty : float — cost of one jump (fault) [per-row misfit units]; see module notes.
    strain_penalty : float — cost of each one-sample lag change (FAST/SLOW move).
    misfit : one of :data:`~wellfault.align.misfit.MISFITS`.
    huber_delta : float — Huber threshold [robust spreads].
    null_misfit : float — misfit of a cell where no curve is valid in both well and reference.
    min_rate : float — floor on ``|step|`` for the strat arc length [reference samples].
    standardise : bool — standardise curves (median and 10–90 % range) before the misfit.
    subsample : bool — measure the misfit to the reference's range within half a sample
        (:func:`~wellfault.align.misfit.reference_bounds`), so that whole-sample positions
        do not pay for sub-sample offsets.
    calibrate_passes, calibrate_factor : well standardisation matched to the covered part of
        the type log (:meth:`calibrate`); 0 passes = the well's own median and spread.
    evidence_rows, bracket_tolerance : cut evidence (module docstring).
    confidence_scale, correlation_floor, correlation_full : the uncalibrated confidence
        (``confidence_coef=None``): logistic of margin / scale times a ramp of the correlation
        (:class:`Jump`) from 0 at the floor to 1 at full.
    smooth_rows : int — half-width of the smoothing of the local confidence [rows].
    off_log : int — reference samples of off-the-type-log margin on either side (module
        docstring, "Off the type log"); 0 = none.
    off_log_misfit : float — per-row misfit of a well row placed off the type log.
    calibrate_window : int — window of the gain/offset-free running standardisation of the
        first calibration pass [reference samples; at most an eighth of the type log]; 0 =
        start from the well's own median and spread.
    calibrate_search : int — rounds of the pattern search of the well's level after the
        calibration passes (:meth:`calibrate`); 0 = none.
    confidence_coef : 4 floats or None — coefficients of the calibrated confidence (module
        docstring); None = the uncalibrated form with ``confidence_scale``,
        ``confidence_offset`` (margin shift) and the correlation ramp.
    confidence_offset : float — margin shift of the uncalibrated form.
    jump_free : int or None — plausible jump size [reference samples]: a larger jump costs
        ``jump_slope`` per sample beyond it on top of ``jump_penalty`` (module docstring,
        "Jump-size prior"); None = every jump costs the same (no prior).
    jump_slope : float or None — cost per reference sample beyond ``jump_free`` (inf forbids
        larger jumps); None = ``PRIOR_EXCESS·jump_penalty/jump_free``.
    jump_bins : int — the prior measures sizes in bins of ``ceil(jump_free/jump_bins)``
        reference samples (module docstring, "Jump-size prior").
    anchor_cost : float or None — cost of a row outside its anchor's band (module docstring,
        "Anchors"); None = ``ANCHOR_COST_JUMPS·jump_penalty``.
    """

    def __init__(
        self,
        ref: np.ndarray,
        *,
        weights: np.ndarray | None = None,
        stretch: float = 1.5,
        jump_penalty: float = 6.0,
        strain_penalty: float = 0.05,
        misfit: str = "huber",
        huber_delta: float = 1.0,
        null_misfit: float = 0.5,
        min_rate: float = 0.1,
        standardise: bool = True,
        subsample: bool = False,
        calibrate_passes: int = 2,
        calibrate_factor: int = 4,
        evidence_rows: int = 200,
        bracket_tolerance: float = 1.0,
        confidence_scale: float = 2.0,
        correlation_floor: float = 0.6,
        correlation_full: float = 0.9,
        smooth_rows: int = 5,
        off_log: int = 0,
        off_log_misfit: float = 0.06,
        calibrate_window: int = 60,
        calibrate_search: int = 2,
        confidence_offset: float = 0.0,
        confidence_coef: tuple[float, float, float, float] | None = CONFIDENCE_COEF,
        jump_free: int | None = None,
        jump_slope: float | None = None,
        jump_bins: int = 8,
        anchor_cost: float | None = None,
    ) -> None:
        self.ref = ref
        self.weights = weights
        self.stretch = stretch
        self.jump_penalty = jump_penalty
        self.strain_penalty = strain_penalty
        self.misfit = misfit
        self.huber_delta = huber_delta
        self.null_misfit = null_misfit
        self.min_rate = min_rate
        self.standardise = standardise
        self.subsample = subsample
        self.calibrate_passes = calibrate_passes
        self.calibrate_factor = calibrate_factor
        self.evidence_rows = evidence_rows
        self.bracket_tolerance = bracket_tolerance
        self.confidence_scale = confidence_scale
        self.correlation_floor = correlation_floor
        self.correlation_full = correlation_full
        self.smooth_rows = smooth_rows
        self.off_log = off_log
        self.off_log_misfit = off_log_misfit
        self.calibrate_window = calibrate_window
        self.calibrate_search = calibrate_search
        self.confidence_offset = confidence_offset
        self.confidence_coef = confidence_coef
        self.jump_free = jump_free
        self.jump_slope = jump_slope
        self.jump_bins = jump_bins
        self.anchor_cost = anchor_cost
        self._check()

    # -- set-up -------------------------------------------------------------------------------
    def _check(self) -> None:
        r = np.asarray(self.ref, dtype=float)
        if r.ndim not in (1, 2) or r.shape[0] < 2:
            raise input_error("reference must be an (M, C) or (M,) array with M >= 2",
                              value=r.shape, fix="pass the type-log curves sample by sample")
        nc = 1 if r.ndim == 1 else r.shape[1]
        if self.weights is not None:
            w = np.asarray(self.weights, dtype=float)
            if w.shape != (nc,) or np.any(~np.isfinite(w)) or np.any(w < 0) or w.sum() <= 0:
                raise input_error("weights must be C finite non-negative numbers, not all 0",
                                  value=w.tolist(), fix=f"pass {nc} weights")
        if not 1.1 <= float(self.stretch) <= 2.0:
            raise input_error("stretch outside [1.1, 2]", value=self.stretch,
                              fix="use e.g. 1.5 (thickness may vary by a factor 1.5)")
        for name in ("jump_penalty", "confidence_scale", "huber_delta"):
            if not float(getattr(self, name)) > 0:
                raise input_error(f"{name} must be positive", value=getattr(self, name))
        for name in ("strain_penalty", "null_misfit", "bracket_tolerance"):
            if not float(getattr(self, name)) >= 0:
                raise input_error(f"{name} must be >= 0", value=getattr(self, name))
        if not 0 <= float(self.correlation_floor) < float(self.correlation_full) <= 1:
            raise input_error("need 0 <= correlation_floor < correlation_full <= 1",
                              value=(self.correlation_floor, self.correlation_full))
        if not 0 < float(self.min_rate) <= 1:
            raise input_error("min_rate outside (0, 1]", value=self.min_rate)
        if not (int(self.off_log) == self.off_log and int(self.off_log) >= 0):
            raise input_error("off_log must be a whole number of reference samples >= 0",
                              value=self.off_log, fix="use 0 (no off-log margin) or e.g. 600")
        if not float(self.off_log_misfit) >= 0:
            raise input_error("off_log_misfit must be >= 0", value=self.off_log_misfit)
        if not (int(self.calibrate_search) == self.calibrate_search
                and int(self.calibrate_search) >= 0):
            raise input_error("calibrate_search must be a whole number >= 0",
                              value=self.calibrate_search, fix="use e.g. 2, or 0 for none")
        if not float(self.calibrate_window) >= 0:
            raise input_error("calibrate_window must be >= 0 reference samples",
                              value=self.calibrate_window, fix="use e.g. 60, or 0 to skip")
        if not math.isfinite(float(self.confidence_offset)):
            raise input_error("confidence_offset must be finite", value=self.confidence_offset)
        if self.confidence_coef is not None:
            cf = np.asarray(self.confidence_coef, dtype=float)
            if cf.shape != (4,) or not np.all(np.isfinite(cf)):
                raise input_error("confidence_coef must be 4 finite numbers",
                                  value=self.confidence_coef,
                                  fix="pass None, or CONFIDENCE_COEF (wellfault.align)")
        if self.jump_free is not None and not (int(self.jump_free) == self.jump_free
                                               and int(self.jump_free) >= 0):
            raise input_error("jump_free must be a whole number of reference samples >= 0",
                              value=self.jump_free,
                              fix="use None (no jump-size prior) or e.g. 1300 (200 m at 0.15 m)")
        if not (int(self.jump_bins) == self.jump_bins and int(self.jump_bins) >= 1):
            raise input_error("jump_bins must be a whole number >= 1", value=self.jump_bins,
                              fix="use e.g. 8")
        for name in ("jump_slope", "anchor_cost"):
            v = getattr(self, name)
            if v is not None and not float(v) >= 0:
                raise input_error(f"{name} must be >= 0 (or None for the default)", value=v)
        check_misfit(self.misfit)

    # -- jump-size prior and anchors -----------------------------------------------------------
    def prior_slope(self) -> float:
        """Cost per reference sample of a jump's size beyond ``jump_free`` (module docstring,
        "Jump-size prior"): ``jump_slope``, by default ``PRIOR_EXCESS·jump_penalty/jump_free``."""
        if self.jump_slope is not None:
            return float(self.jump_slope)
        return PRIOR_EXCESS * float(self.jump_penalty) / max(int(self.jump_free or 0), 1)

    def prior_bins(self) -> tuple[int, int]:
        """(B, w): the prior's bin width [reference samples] and free bins (module docstring,
        "Jump-size prior"); (0, 0) without the prior."""
        if self.jump_free is None:
            return 0, 0
        d = int(self.jump_free)
        b = max(1, math.ceil(d / int(self.jump_bins)))
        return b, math.ceil(d / b)

    def jump_cost(self, i: int, j: int) -> float:
        """Cost of a jump from DP column ``i`` of a row to column ``j`` of the next one
        (``jump_penalty`` plus the prior's excess)."""
        pen = float(self.jump_penalty)
        b, w = self.prior_bins()
        if b == 0:
            return pen
        excess = max(abs(int(j) // b - int(i) // b) - w, 0)
        return pen + self.prior_slope() * b * excess if excess > 0 else pen

    def anchor_penalty(self) -> float:
        """Cost of a row placed outside its anchor's band: ``anchor_cost``, by default
        ``ANCHOR_COST_JUMPS·jump_penalty`` (module docstring, "Anchors")."""
        if self.anchor_cost is not None:
            return float(self.anchor_cost)
        return ANCHOR_COST_JUMPS * float(self.jump_penalty)

    def _prepared(self) -> dict:
        if getattr(self, "prep_", None) is None:
            r = np.asarray(self.ref, dtype=float)
            r = r[:, None] if r.ndim == 1 else r
            c, s = robust_location_scale(r)
            z = (r - c) / s if self.standardise else r
            ref_t = np.ascontiguousarray(z.T)
            lo_t, hi_t = reference_bounds(ref_t, bool(self.subsample))
            off = int(self.off_log)
            dp_t = ref_t
            if off > 0:   # off-log margins: DP columns whose misfit the kernel sets constant
                nc, m = ref_t.shape
                dp_t = np.full((nc, m + 2 * off), np.nan)
                dp_t[:, off:off + m] = ref_t
                for name, a in (("lo", lo_t), ("hi", hi_t)):
                    b = np.zeros((nc, m + 2 * off))
                    b[:, off:off + m] = a
                    if name == "lo":
                        lo_t = np.ascontiguousarray(b)
                    else:
                        hi_t = np.ascontiguousarray(b)
            w = np.ones(r.shape[1]) if self.weights is None else np.asarray(self.weights, float)
            bf, bs = stretch_moves(self.stretch)
            self.prep_ = dict(
                ref_t=ref_t, lo_t=lo_t, hi_t=hi_t, ref_nan=bool(np.isnan(ref_t).any()),
                dp_t=np.ascontiguousarray(dp_t), off=off, m_ref=ref_t.shape[1],
                off_cost=float(self.off_log_misfit),
                w=np.ascontiguousarray(w),
                kind=check_misfit(self.misfit), bf=bf, bs=bs, pad=bs + 2, nb=bs + 1,
                ref_center=c, ref_scale=s, n_curves=r.shape[1],
                jump_bin=self.prior_bins()[0], jump_wbins=self.prior_bins()[1],
                slope_bin=self.prior_slope() * self.prior_bins()[0]
                if self.jump_free is not None else 0.0,
                anchor_cost=self.anchor_penalty(),
            )
        return self.prep_

    # -- public -------------------------------------------------------------------------------
    def stream(self, *, center: np.ndarray | None = None, scale: np.ndarray | None = None,
               anchors=None) -> StreamingAligner:
        """A streaming aligner for a well being drilled (``push`` samples, read ``current``).

        ``center``/``scale`` (C,) standardise the well's curves; while drilling the well's own
        statistics are unknown, so by default the type log's raw median and spread are used
        (tools assumed calibrated alike) — pass values from an offset well or from the first
        part of the hole when that does not hold. ``anchors`` as for :meth:`align` (sample
        numbers count from the first sample pushed).
        """
        p = self._prepared()
        if center is None or scale is None:
            center = p["ref_center"] if center is None else center
            scale = p["ref_scale"] if scale is None else scale
        return StreamingAligner(self, center, scale, anchors)

    def align(self, well: np.ndarray, step: np.ndarray, *, center: np.ndarray | None = None,
              scale: np.ndarray | None = None, anchors=None) -> Alignment:
        """Align a whole well: the optimal path, its jumps and their evidence.

        Parameters
        ----------
        well : (N, C) or (N,) array_like — well curves, NaN = null.
        step : (N,) array_like — predicted signed strat increment of each sample [reference
            samples].
        center, scale : (C,) optional — well standardisation; by default from
            :meth:`calibrate` (the well's quantiles matched to those of the type-log samples it
            covers), or the well's own median and spread when ``calibrate_passes == 0``.
        anchors : (K, 3) array_like, optional — picked surfaces as constraints (module
            docstring, "Anchors"): per row ``(sample, position, tolerance)``, the well sample
            at the surface, the surface's reference position and the tolerance [reference
            samples].
        """
        p = self._prepared()
        x = _as_curves(well, p["n_curves"], "well")
        s = np.asarray(step, dtype=float).ravel()
        if s.shape[0] != x.shape[0] or not np.all(np.isfinite(s)):
            raise input_error("step must be finite, one value per well sample",
                              value=(s.shape[0], x.shape[0]),
                              fix="pass the predicted strat increment of every sample")
        if self.standardise and (center is None or scale is None):
            c0, s0 = self.calibrate(x, s) if self.calibrate_passes > 0 else \
                robust_location_scale(x)
            center = c0 if center is None else center
            scale = s0 if scale is None else scale
        return self._align(x, s, center, scale, evidence=True, anchors=anchors)

    def _align(self, x, s, center, scale, evidence: bool, anchors=None) -> Alignment:
        return self._whole(x, s, lambda al: al._result(evidence), center, scale, anchors)

    def _whole(self, x, s, read, center=None, scale=None, anchors=None):
        """``read`` of a streaming aligner with the whole well pushed; its move codes are
        then given back for the next well (the calibration's coarse passes read only the
        path or the cost: ``StreamingAligner._path_and_score`` / ``_score``)."""
        aligner = StreamingAligner(self, center, scale, anchors)
        try:
            aligner.push(x, s)
            return read(aligner)
        finally:
            aligner.release()

    def calibrate(self, well: np.ndarray, step: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
        """Well standardisation matched to the part of the type log the well covers.

        The well's own median and spread are wrong whenever it logs only part of the column
        (a sand-rich or shale-rich interval), and a coarse alignment of wrongly standardised
        curves hops between chance matches (a level offset of half a spread was enough, on real
        gamma-ray type logs, to make a jump-strewn path cheaper than the true one). So the first
        pass aligns curves that do not depend on the tool's gain and offset at all: well and
        type log each standardised by their own running mean and standard deviation over
        ``calibrate_window`` reference samples (at most an eighth of the type log; for the
        well, that much predicted strat arc length) — invariant to any linear calibration, up to noise and thickness
        change. The coarse alignment (reference box-averaged over ``calibrate_factor`` samples,
        cost 1/factor² of the full one) tells which type-log samples the well covers; the
        well's centre and spread are then set so that its quantiles (10 %, 20 %, … 90 %) fit
        those of the covered type-log samples by a straight line (per curve; least squares on
        the nine quantile pairs). Further passes (``calibrate_passes`` in all) repeat the
        coarse alignment with the well so standardised. ``calibrate_window = 0`` starts from
        the well's own median and spread instead (the behaviour before the running
        standardisation).

        With two passes or more, both starts run through the passes and the standardisation
        whose last coarse path costs less wins (the same coarse type log and penalties, so the
        costs compare: a joint choice of path and level by the model's own cost). The running
        standardisation fails where the type log has little character: in a monotonous
        stretch it divides noise by its own spread, so the first coarse path matches noise to
        noise, and the passes after it leave the level wrong (on calibration wells of the
        low-character logs of wellfault.synth.scenarios, a spread too small by a fifth and 9-13
        spurious jumps per well in some; the well's own median and spread gave the right level
        and the true cuts). On character-rich logs the running start wins where it matters.
        Both starts can still settle on a wrong level (the quantiles of a hopping path's type-log
        samples reinforce the level that made it hop), so the level found is then refined by a
        pattern search on the same coarse cost (:meth:`_level_search`: centres ±0.4 spread,
        halved ``calibrate_search`` times; 2 coarse alignments a round, about a sixteenth of
        the full DP each): on low-character calibration wells it took false
        cuts from 0.056 to 0.014 per well at the same recall; character-rich wells unchanged.

        Returns
        -------
        center, scale : (C,) — pass to :meth:`align` or :meth:`stream`.
        """
        p = self._prepared()
        x = _as_curves(well, p["n_curves"], "well")
        s = np.asarray(step, dtype=float).ravel()
        center, scale = robust_location_scale(x)
        ref_z = p["ref_t"].T
        m = ref_z.shape[0]
        f = int(self.calibrate_factor) if m // int(self.calibrate_factor) >= 8 else 1
        mc = m // f

        def coarse_engine(z: np.ndarray) -> AlignmentEngine:
            with warnings.catch_warnings():                    # all-null blocks stay null
                warnings.simplefilter("ignore", RuntimeWarning)
                cz = np.nanmean(z[: mc * f].reshape(mc, f, -1), axis=1) if f > 1 else z
            return AlignmentEngine(
                cz, weights=self.weights, stretch=self.stretch,
                jump_penalty=self.jump_penalty / f, strain_penalty=self.strain_penalty,
                misfit=self.misfit, huber_delta=self.huber_delta, null_misfit=self.null_misfit,
                min_rate=min(1.0, self.min_rate / f) if f > 1 else self.min_rate,
                standardise=False, subsample=self.subsample, calibrate_passes=0,
                off_log=int(math.ceil(int(self.off_log) / f)),
                off_log_misfit=self.off_log_misfit,
            )

        half = 0.5 * min(float(self.calibrate_window), m / 8.0)
        # the coarse engines depend on the type log and settings only: made once per engine
        made = self.__dict__.setdefault("coarse_", {})
        if "plain" not in made:
            made["plain"] = coarse_engine(ref_z)
            if half > 0:
                made["local"] = coarse_engine(running_standardise(
                    ref_z, np.arange(m, dtype=float), half))
        coarse = made["plain"]
        starts = [None]                        # None: the well's own median and spread
        if half > 0:
            if int(self.calibrate_passes) < 2:  # one pass: its path is not comparable
                starts = []
            arc = np.cumsum(np.maximum(np.abs(s), float(self.min_rate)))
            starts.insert(0, (made["local"], running_standardise(x, arc, half)))
        best = None
        for start in starts:   # each start through the passes; the cheaper last path wins
            c, sc, score = self._calibration_chain(x, s, ref_z, f, coarse, start,
                                                   center.copy(), scale.copy())
            if best is None or score < best[2]:
                best = (c, sc, score)
        return self._level_search(x, s / f, coarse, best[0], best[1])

    def _level_search(self, x, s, coarse, center, scale):
        """Pattern search of the well's level: all curves' centres shifted together by
        ``±δ`` spreads, keeping a move that lowers the coarse path's cost; ``δ`` from 0.4
        spread, halved ``calibrate_search`` times (calibrate's docstring). Spreads are not
        searched: the cost is biased towards a larger spread (a shrunk well misfits less
        wherever the path is off by a little), which flattens the evidence for cuts."""
        def cost(c, sc):
            return coarse._whole((x - c) / sc, s, StreamingAligner._score)

        best = cost(center, scale)
        dc = 0.4
        for _ in range(int(self.calibrate_search)):
            for c in (center + dc * scale, center - dc * scale):
                v = cost(c, scale)
                if v < best:
                    center, best = c, v
            dc = 0.5 * dc
        return center, scale

    def _calibration_chain(self, x, s, ref_z, f, coarse, start, center, scale):
        """The passes of :meth:`calibrate` from one start: ``start`` = (coarse engine, well) of
        the running standardisation, or None for the well's own ``center``/``scale``.
        Returns (center, scale, cost of the last coarse path)."""
        m = ref_z.shape[0]
        score = np.inf
        for k in range(int(self.calibrate_passes)):
            if k == 0 and start is not None:
                path, score = start[0]._whole(start[1], s / f,
                                              StreamingAligner._path_and_score)
            else:
                path, score = coarse._whole((x - center) / scale, s / f,
                                             StreamingAligner._path_and_score)
            pos = path * f + 0.5 * (f - 1)
            on = (pos >= 0) & (pos <= m - 1)
            y = ref_z[np.clip(np.rint(pos), 0, m - 1).astype(np.int64)]
            for c in range(x.shape[1]):
                ok = ~np.isnan(x[:, c]) & ~np.isnan(y[:, c]) & on
                if ok.sum() < 3:
                    continue
                qx = np.quantile(x[ok, c], _CAL_QUANTILES)
                qy = np.quantile(y[ok, c], _CAL_QUANTILES)
                vy = float(np.var(qy))
                if vy > 0:
                    sc = float(np.mean((qx - qx.mean()) * (qy - qy.mean()))) / vy
                    if sc > 0:
                        scale[c] = sc
                        center[c] = float(qx.mean() - sc * qy.mean())
        return center, scale, score
