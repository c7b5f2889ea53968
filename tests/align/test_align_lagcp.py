"""The cheap screen: steps of the windowed cross-correlation lag (ruptures PELT)."""

from __future__ import annotations

import numpy as np
import pytest

from test_align_recovery import CASES, blocky_log, synthetic_well
from wellfault.align import lag_changepoints
from wellfault.errors import InputError


@pytest.mark.parametrize("step", list(CASES))
def test_lag_steps_mark_the_cuts_with_their_size(step):
    s0, cuts, n = CASES[step]
    hop = 10                                           # default: window 40 // 4 [rows]
    tol = 2 * hop / abs(step) + 5                      # position known to about a hop
    for seed in range(4):
        rng = np.random.default_rng(seed)
        ref = blocky_log(800, rng)
        well, steps, s = synthetic_well(ref, step, s0, cuts, n, rng)
        track = lag_changepoints(well, ref, steps)
        assert len(track.cuts) == 2
        for found, (sample, size) in zip(track.cuts, cuts):
            assert abs(found.sample - sample) <= tol
            assert found.size == pytest.approx(size, rel=0.25)


@pytest.mark.parametrize("step", list(CASES))
def test_unfaulted_wells_have_a_step_free_lag(step):
    s0, cuts, n = CASES[step]
    for seed in range(4):
        rng = np.random.default_rng(50 + seed)
        ref = blocky_log(800, rng)
        well, steps, s = synthetic_well(ref, step, s0, cuts, n, rng, faulted=False)
        track = lag_changepoints(well, ref, steps)
        assert track.cuts == ()
        # the lag is the true position minus the predicted one (origin: first sample at 0)
        good = track.correlation > 0.8
        want = s[track.sample] - (np.cumsum(steps) - 0.5 * steps)[track.sample]
        assert np.median(np.abs(track.lag_filtered[good] - want[good])) <= 2.0


def test_penalty_follows_the_c_sigma2_log_n_rule():
    rng = np.random.default_rng(1)
    ref = blocky_log(600, rng)
    well, steps, _ = synthetic_well(ref, 1.0, 100.0, [], 400, rng, faulted=False)
    track = lag_changepoints(well, ref, steps, penalty_factor=3.0)
    n = track.lag.size
    d = np.diff(track.lag)
    sigma = max(np.median(np.abs(d - np.median(d))) / (0.6745 * np.sqrt(2)), 0.5)
    assert track.penalty == pytest.approx(3.0 * sigma**2 * np.log(n))


def test_unknown_model_and_short_window_are_rejected():
    with pytest.raises(InputError, match="unknown lag change-point model"):
        lag_changepoints(np.zeros(50), np.zeros(80), np.ones(50), model="rbf")
    with pytest.raises(InputError, match="window too short"):
        lag_changepoints(np.zeros(50), np.zeros(80), np.ones(50), window=2)


@pytest.mark.parametrize("model", ["l2", "l1"])
def test_constant_lag_models_also_find_a_clean_step(model):
    rng = np.random.default_rng(5)
    ref = blocky_log(800, rng)
    s0, cuts, n = CASES[1.0]
    well = 30.0 * np.interp(np.r_[np.arange(100.0, 250.0), np.arange(310.0, 460.0)],
                            np.arange(800), ref) + 0.1 * rng.normal(size=300)
    track = lag_changepoints(well, ref, np.ones(300), model=model)
    assert [(abs(c.sample - 150) <= 25, round(c.size)) for c in track.cuts] == [(True, 60)]
