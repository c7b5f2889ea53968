"""The engine's additions for real type logs: off-the-type-log margins (exact, against an
exhaustive oracle), the gain/offset-free calibration pass, the calibrated confidence, and the
open-ended DTW baseline's cut reading."""

from __future__ import annotations

import math

import numpy as np
import pytest

from test_align_engine import _oracle_over_costs, _plain_bounds, _plain_misfit, _random_case
from wellfault.align import (
    CONFIDENCE_COEF,
    AlignmentEngine,
    dtw_cuts,
    dtw_subsequence,
    resample_strat,
    running_standardise,
)
from wellfault.align.evidence import confidence_features
from wellfault.errors import InputError


def _oracle_with_margins(rows, ref, pad, off_cost, *, w, stretch, jump, strain, kind, delta,
                         null_misfit, subsample):
    """Every path over the type log plus ``pad`` off-log columns on either side, whose misfit
    is ``off_cost`` for every row with a valid value and ``null_misfit`` for a row without
    any, like every column (engine.py, "Off the type log"); moves as the plain DP."""
    R, M = rows.n_rows, ref.shape[0]
    lo, hi = _plain_bounds(ref, subsample)
    Mp = M + 2 * pad

    def e(r, j):
        if j < pad or j >= pad + M:
            return null_misfit if np.isnan(rows.values[r]).all() else off_cost
        return _plain_misfit(rows.values[r], lo[j - pad], hi[j - pad], w, kind, delta,
                             null_misfit)

    E = [[e(r, j) for j in range(Mp)] for r in range(R)]
    return _oracle_over_costs(rows, E, stretch=stretch, jump=jump, strain=strain)


@pytest.mark.parametrize("seed", list(range(40)))
def test_engine_with_off_log_margins_equals_exhaustive_search(seed):
    well, ref, step, prm = _random_case(seed)
    rows = resample_strat(well, step, min_rate=0.1)
    if (ref.shape[0] + 5) ** rows.n_rows > 200_000:
        pytest.skip("case too large for the oracle with margins")
    off_cost = [0.05, 0.3, 1.0][seed % 3]
    eng = AlignmentEngine(ref, standardise=False, min_rate=0.1, off_log=1,
                          off_log_misfit=off_cost, **prm)
    al = eng.align(well, step)
    want = _oracle_with_margins(rows, ref, 1, off_cost, w=prm["weights"],
                                stretch=prm["stretch"], jump=prm["jump_penalty"],
                                strain=prm["strain_penalty"], kind=prm["misfit"],
                                delta=prm["huber_delta"], null_misfit=0.5,
                                subsample=prm["subsample"])
    assert al.score == pytest.approx(want, rel=1e-9, abs=1e-9)


def test_oracle_cases_with_margins_do_use_them():
    """Guard against a vacuous oracle test: about half the cases put rows off the log."""
    used = 0
    for seed in range(40):
        well, ref, step, prm = _random_case(seed)
        al = AlignmentEngine(ref, standardise=False, min_rate=0.1, off_log=1,
                             off_log_misfit=[0.05, 0.3, 1.0][seed % 3], **prm).align(well, step)
        used += int((~al.on_log).any())
    assert used >= 10


def test_a_well_running_past_the_base_goes_off_the_log_not_into_a_jump():
    rng = np.random.default_rng(4)
    ref = np.repeat(rng.normal(size=60), 8) + 0.1 * rng.normal(size=480)
    # the well reads the type log from 300 to its end (479), then 120 samples of other rock
    tail = rng.normal(size=120) * 0.2 + 3.0
    well = np.r_[ref[300:], tail] + 0.05 * rng.normal(size=300)
    step = np.ones(300)
    plain = AlignmentEngine(ref).align(well, step)
    margin = AlignmentEngine(ref, off_log=150).align(well, step)
    assert plain.on_log is not None and plain.on_log.all()       # no margins: always placed
    assert margin.on_log[:170].all() and not margin.on_log[190:].any()
    assert np.all(margin.path[190:] > ref.size - 1)               # beyond the base
    assert all(j.off_log for j in margin.jumps)
    assert np.abs(margin.path[:170] - np.arange(300, 470)).max() <= 1


def test_off_log_parameters_are_checked():
    with pytest.raises(InputError, match="off_log"):
        AlignmentEngine(np.zeros(10), off_log=-1)
    with pytest.raises(InputError, match="off_log_misfit"):
        AlignmentEngine(np.zeros(10), off_log_misfit=-0.1)
    with pytest.raises(InputError, match="confidence_coef"):
        AlignmentEngine(np.zeros(10), confidence_coef=(1.0, 2.0))


# -- calibration ---------------------------------------------------------------------------------
def test_running_standardisation_ignores_gain_and_offset():
    rng = np.random.default_rng(0)
    x = np.cumsum(rng.normal(size=400))
    arc = np.cumsum(rng.uniform(0.5, 1.5, size=400))
    a = running_standardise(x, arc, 20.0)
    b = running_standardise(3.7 * x - 120.0, arc, 20.0)
    np.testing.assert_allclose(a, b, atol=1e-9)


def test_calibration_recovers_gain_and_offset_of_a_well_covering_a_shaly_part():
    """The well logs only the upper, high-level half of a two-regime type log, through a tool
    with gain 1.3 and offset +40: the quantile match over the covered part recovers the
    standardisation (centre and spread of the well in its own units) to a few per cent."""
    rng = np.random.default_rng(2)
    levels = np.r_[rng.normal(2.0, 1.0, size=60), rng.normal(-1.0, 0.6, size=60)]
    ref = np.repeat(levels, 12) + 0.1 * rng.normal(size=1440)
    true = 100.0 + np.arange(500) * 1.0                      # inside the upper half
    well = 1.3 * np.interp(true, np.arange(ref.size), ref) + 40.0 + 0.05 * rng.normal(size=500)
    eng = AlignmentEngine(ref)
    c, s = eng.calibrate(well, np.ones(500))
    rc, rs = eng.prep_["ref_center"], eng.prep_["ref_scale"]
    assert c[0] == pytest.approx(1.3 * rc[0] + 40.0, abs=0.05 * 1.3 * rs[0])
    assert s[0] == pytest.approx(1.3 * rs[0], rel=0.05)


# -- confidence ----------------------------------------------------------------------------------
def test_confidence_is_the_calibrated_logistic_of_the_evidence():
    rng = np.random.default_rng(11)
    ref = np.repeat(rng.normal(size=80), 6) + 0.15 * rng.normal(size=480)
    true = np.r_[np.arange(100, 220), np.arange(260, 400)]             # 40 samples missing
    well = ref[true] + 0.1 * rng.normal(size=true.size)
    (j,) = AlignmentEngine(ref).align(well, np.ones(true.size)).jumps
    x = float(np.dot(CONFIDENCE_COEF, confidence_features(j.margin, j.correlation,
                                                          min(j.rows_above, j.rows_below))))
    assert j.confidence == pytest.approx(1 / (1 + math.exp(-x)))
    assert (j.rows_above, j.rows_below) == (120, 140)
    old = AlignmentEngine(ref, confidence_coef=None).align(well, np.ones(true.size)).jumps[0]
    ramp = min(max((old.correlation - 0.6) / 0.3, 0.0), 1.0)
    assert old.confidence == pytest.approx(ramp / (1 + math.exp(-old.margin / 2.0)))


# -- DTW baseline --------------------------------------------------------------------------------
def test_open_ended_dtw_reads_a_missing_section_as_a_skip_and_a_repeat_as_stalls():
    rng = np.random.default_rng(0)
    ref = np.repeat(rng.normal(size=200), 5) + 0.1 * rng.normal(size=1000)
    true = np.r_[np.arange(100, 300), np.arange(340, 500), np.arange(450, 600)]
    well = ref[true] + 0.05 * rng.normal(size=true.size)
    res = dtw_subsequence(well, ref)
    assert res.path[0, 1] >= 95 and res.path[-1, 1] <= 605        # open begin and end
    assert np.all(np.diff(res.path, axis=0) >= 0)                  # monotone
    _, cuts = dtw_cuts(res.path, well.size, min_size=8)
    skip = [c for c in cuts if c.size > 0]
    stall = [c for c in cuts if c.size < 0]
    assert len(skip) == 1 and abs(skip[0].row - 200) <= 5 and skip[0].size == pytest.approx(
        40, abs=3)
    # the repeat (50 samples from row 360) can only be waited through: smeared, split, late
    assert stall and sum(c.size for c in stall) < -30
    assert all(c.first_row >= 300 for c in stall)
