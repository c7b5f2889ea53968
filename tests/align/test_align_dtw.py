"""The monotone DTW baseline: published toy values, and what it cannot represent."""

from __future__ import annotations

import numpy as np
import pytest

from wellfault.align import AlignmentEngine, dtw_baseline
from wellfault.errors import InputError


@pytest.mark.parametrize(
    ("a", "b", "want"),
    [
        # reference/methods.md §5.1, "Toy DTW values for unit tests" [derived there]:
        # absolute-difference local cost, steps (1,0), (0,1), (1,1)
        ([1, 2, 3], [1, 2, 2, 3], 0.0),
        ([0, 0, 1, 1, 0], [0, 1, 0], 0.0),
        ([1, 3, 4, 9, 8, 2, 1, 5, 7, 3], [1, 6, 2, 3, 0, 9, 4, 3, 6, 3], 15.0),
    ],
)
def test_dtw_matches_the_toy_values_of_methods_md(a, b, want):
    res = dtw_baseline(a, b)
    assert res.distance == want
    # the path is a valid warping path whose cost is the distance
    p = res.path
    assert p[0].tolist() == [0, 0] and p[-1].tolist() == [len(a) - 1, len(b) - 1]
    assert set(map(tuple, np.diff(p, axis=0))) <= {(1, 0), (0, 1), (1, 1)}
    assert np.abs(np.asarray(a)[p[:, 0]] - np.asarray(b)[p[:, 1]]).sum() == want


def test_monotone_dtw_cannot_follow_a_repeated_section_but_the_engine_can():
    rng = np.random.default_rng(11)
    ref = np.repeat(rng.normal(size=80), 6) + 0.15 * rng.normal(size=480)
    true = np.r_[np.arange(100, 220), np.arange(170, 300)]           # 50 samples repeated
    well = ref[true] + 0.1 * rng.normal(size=true.size)
    d = dtw_baseline(well, ref[100:300])
    dtw_pos = np.zeros(true.size)
    for i, j in d.path:
        dtw_pos[i] = j + 100
    assert np.all(np.diff(d.path[:, 1]) >= 0)                        # monotone by design
    al = AlignmentEngine(ref).align(well, np.ones(true.size))
    # true jump: from 219 to 170 where 220 was predicted, Δs = -50 samples
    assert [(j.sample, round(j.size)) for j in al.jumps] == [(120, -50)]
    repeated = slice(120, 170)
    assert np.median(np.abs(al.path[repeated] - true[repeated])) <= 1
    assert np.median(np.abs(dtw_pos[repeated] - true[repeated])) > 10


def test_dtw_rejects_nulls_and_mismatched_curves():
    with pytest.raises(InputError, match="nulls"):
        dtw_baseline([1.0, np.nan], [1.0, 2.0])
    with pytest.raises(InputError, match="same number of curves"):
        dtw_baseline(np.zeros((3, 2)), np.zeros((3, 1)))
