"""Robust standardisation and the engine's misfit (gain/offset, nulls, several curves)."""

from __future__ import annotations

import numpy as np
import pytest

from wellfault.align import AlignmentEngine, misfit_matrix, robust_location_scale, standardise
from wellfault.align.misfit import reference_bounds
from wellfault.errors import InputError


def test_standardised_curves_do_not_depend_on_tool_gain_and_offset():
    x = np.random.default_rng(0).normal(size=(200, 2))
    y = x * [3.0, 0.2] + [50.0, -7.0]
    np.testing.assert_allclose(standardise(x), standardise(y), atol=1e-12)


def test_spread_is_stable_for_two_level_blocky_curves():
    """The MAD of a two-level curve collapses when one level passes 50 %; our spread does not."""
    a = np.r_[np.zeros(45), np.ones(55)]
    b = np.r_[np.zeros(55), np.ones(45)]
    mad = [np.median(np.abs(v - np.median(v))) for v in (a, b)]
    assert mad == [0.0, 0.0]                                          # MAD: useless here
    sa, sb = robust_location_scale(a)[1][0], robust_location_scale(b)[1][0]
    assert sa == pytest.approx(sb) and sa == pytest.approx(1 / 2.5631, rel=1e-3)


def test_spikes_do_not_move_the_standardisation():
    x = np.random.default_rng(1).normal(size=1000)
    spiked = x.copy()
    spiked[::50] = 1e4                                                # 2 % spikes
    c0, s0 = robust_location_scale(x)
    c1, s1 = robust_location_scale(spiked)
    assert abs(c1[0] - c0[0]) < 0.05 and abs(s1[0] / s0[0] - 1) < 0.1     # not 1e4-fold


def test_null_curve_contributes_nothing_and_all_null_costs_the_constant():
    ref = np.array([[0.0, 0.0], [1.0, 5.0]])
    well = np.array([[1.0, np.nan], [np.nan, np.nan]])
    e = misfit_matrix(well, ref, misfit="abs", null_misfit=0.25)
    np.testing.assert_allclose(e, [[1.0, 0.0], [0.25, 0.25]])


def test_weights_and_huber():
    ref = np.array([[0.0, 0.0]])
    e = misfit_matrix(np.array([[0.5, 3.0]]), ref, weights=[3.0, 1.0], huber_delta=1.0)
    assert e[0, 0] == pytest.approx((3 * 0.125 + 1 * 2.5) / 4)


def test_subsample_bounds_forgive_half_a_sample_only():
    ref = np.array([0.0, 2.0, 4.0, 6.0])
    lo, hi = reference_bounds(ref[None, :], True)
    np.testing.assert_allclose(lo[0], [0.0, 1.0, 3.0, 5.0])
    np.testing.assert_allclose(hi[0], [1.0, 3.0, 5.0, 6.0])
    e = misfit_matrix(np.array([2.9, 3.5]), ref, misfit="abs", subsample=True)
    assert e[0, 1] == 0.0 and e[1, 1] == pytest.approx(0.5)


def test_engine_path_is_the_same_for_any_tool_gain_and_offset():
    rng = np.random.default_rng(4)
    ref = np.repeat(rng.normal(size=60), 8) + 0.1 * rng.normal(size=480)
    well = ref[50:350] + 0.1 * rng.normal(size=300)
    eng = AlignmentEngine(ref)
    a = eng.align(well, np.ones(300))
    b = eng.align(40.0 * well + 75.0, np.ones(300))
    np.testing.assert_array_equal(a.path, b.path)
    assert abs(np.median(a.path - np.arange(50, 350))) <= 1


def test_scale_must_be_positive():
    with pytest.raises(InputError, match="scale must be positive"):
        standardise(np.ones((3, 1)), center=[0.0], scale=[0.0])
