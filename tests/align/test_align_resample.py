"""Resampling a well onto rows one reference sample apart in predicted strat distance."""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from wellfault.align import resample_strat
from wellfault.align.resample import max_new_rows, new_resampler_state, resample_chunk

steps_st = st.lists(
    st.one_of(st.floats(-2.5, 2.5), st.sampled_from([0.0, 1.0, -1.0, 0.05, -0.05])),
    min_size=1, max_size=40,
)


@settings(max_examples=60, deadline=None)
@given(steps=steps_st, seed=st.integers(0, 10_000))
def test_rows_conserve_arc_length_displacement_and_curve_integral(steps, seed):
    step = np.array(steps)
    x = np.random.default_rng(seed).normal(size=(step.size, 2))
    rows = resample_strat(x, step, min_rate=0.1)
    arc = np.maximum(np.abs(step), 0.1)
    assert rows.arc.sum() == pytest.approx(arc.sum(), rel=1e-9)
    assert rows.displacement.sum() == pytest.approx(step.sum(), abs=1e-9)
    # box resampling: arc-weighted integral of each curve is kept
    np.testing.assert_allclose((rows.values * rows.arc[:, None]).sum(axis=0),
                               (x * arc[:, None]).sum(axis=0), rtol=1e-9, atol=1e-9)
    assert np.all(rows.arc <= 1 + 1e-9) and np.all(np.abs(rows.displacement) <= rows.arc + 1e-9)
    assert np.all(np.diff(rows.sample_row) >= 0)
    assert np.all(np.abs(np.diff(rows.centre)) <= 1 + 1e-9)


@settings(max_examples=40, deadline=None)
@given(steps=steps_st, cuts=st.lists(st.integers(0, 40), max_size=6))
def test_feeding_in_chunks_gives_bit_identical_rows(steps, cuts):
    step = np.array(steps)
    x = np.random.default_rng(len(steps)).normal(size=(step.size, 1))
    whole = resample_strat(x, step, min_rate=0.1)
    st_, acc = new_resampler_state(1)
    cap = max_new_rows(step, 0.1)
    rows, meta = np.empty((cap, 1)), np.empty((cap, 5))
    spos, srow = np.empty(step.size), np.empty(step.size, np.int64)
    edges = sorted({0, step.size, *[c for c in cuts if c < step.size]})
    nr = 0
    for a, b in zip(edges[:-1], edges[1:]):
        nr = resample_chunk(x[a:b], step[a:b], 0.1, st_, acc, rows, meta, spos, srow, False)
    nr = resample_chunk(x[:0], step[:0], 0.1, st_, acc, rows, meta, spos, srow, True)
    assert nr == whole.n_rows
    np.testing.assert_array_equal(rows[:nr], whole.values)
    np.testing.assert_array_equal(meta[:nr, 2], whole.centre)
    np.testing.assert_array_equal(srow, whole.sample_row)


def test_a_row_never_straddles_a_turning_point():
    step = np.array([0.7, 0.7, 0.7, -0.7, -0.7, -0.7, 0.7])
    rows = resample_strat(np.arange(7.0), step, min_rate=0.1)
    assert rows.direction.tolist() == [1, 1, 1, -1, -1, -1, 1]
    assert rows.arc.round(3).tolist() == [1.0, 1.0, 0.1, 1.0, 1.0, 0.1, 0.7]
    # the turning rows are short, and each row holds samples of one direction only
    assert rows.values[:, 0].round(3).tolist() == [0.3, 1.6, 2.0, 3.3, 4.6, 5.0, 6.0]


def test_high_angle_samples_are_averaged_and_up_section_moves_backwards():
    rows = resample_strat(np.arange(10.0), np.full(10, -0.5), min_rate=0.1)
    assert rows.n_rows == 5
    np.testing.assert_allclose(rows.values[:, 0], [0.5, 2.5, 4.5, 6.5, 8.5])
    np.testing.assert_allclose(rows.centre, [-0.5, -1.5, -2.5, -3.5, -4.5])
    assert rows.direction.tolist() == [-1] * 5
    assert rows.first_sample.tolist() == [0, 2, 4, 6, 8]


def test_nearly_bed_parallel_samples_use_the_arc_floor():
    rows = resample_strat(np.ones(30), np.zeros(30), min_rate=0.1)
    assert rows.n_rows == 3
    np.testing.assert_allclose(rows.displacement, 0.0)


def test_null_values_are_skipped_and_all_null_rows_stay_null():
    x = np.array([[1.0, np.nan], [3.0, np.nan], [np.nan, np.nan], [np.nan, 2.0]])
    rows = resample_strat(x, np.full(4, 0.5), min_rate=0.1)
    assert rows.values[0].tolist()[0] == 2.0 and np.isnan(rows.values[0, 1])
    assert np.isnan(rows.values[1, 0]) and rows.values[1, 1] == 2.0
