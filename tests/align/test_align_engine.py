"""The alignment engine's DP: exact optimum (oracle), streaming = batch, inputs, bookkeeping."""

from __future__ import annotations

import math

import numpy as np
import pytest

from wellfault.align import AlignmentEngine, resample_strat, stretch_moves
from wellfault.errors import AlignmentError, InputError

# ---------------------------------------------------------------------------------------------
# Oracle: every allowed path enumerated in plain Python, with the cost definition written out
# again here (engine.py module docstring; misfit.py). Rows come from resample_strat, which has
# its own tests (test_align_resample.py).


def _plain_misfit(x, y_lo, y_hi, w, kind, delta, null_misfit):
    num = den = 0.0
    for c in range(len(x)):
        if math.isnan(x[c]) or math.isnan(y_lo[c]):
            continue
        d = max(y_lo[c] - x[c], x[c] - y_hi[c], 0.0)
        rho = d if kind == "abs" else (0.5 * d * d if d <= delta else delta * (d - 0.5 * delta))
        num += w[c] * rho
        den += w[c]
    return num / den if den > 0 else null_misfit


def _plain_bounds(ref, subsample):
    m, nc = ref.shape
    lo, hi = ref.copy(), ref.copy()
    if subsample:
        for j in range(m):
            for c in range(nc):
                vals = [ref[j, c]]
                if j > 0 and not math.isnan(ref[j - 1, c]):
                    vals.append(0.5 * (ref[j - 1, c] + ref[j, c]))
                if j + 1 < m and not math.isnan(ref[j + 1, c]):
                    vals.append(0.5 * (ref[j, c] + ref[j + 1, c]))
                lo[j, c], hi[j, c] = min(vals), max(vals)
    return lo, hi


def _oracle_best(rows, ref, *, w, stretch, jump, strain, kind, delta, null_misfit, subsample):
    """Minimum cost over every path: each row visited once; moves FOLLOW, FAST, SLOW, JUMP."""
    R, M = rows.n_rows, ref.shape[0]
    lo, hi = _plain_bounds(ref, subsample)
    e = [[_plain_misfit(rows.values[r], lo[j], hi[j], w, kind, delta, null_misfit)
          for j in range(M)] for r in range(R)]
    return _oracle_over_costs(rows, e, stretch=stretch, jump=jump, strain=strain)


def _oracle_over_costs(rows, e, *, stretch, jump, strain, jump_free=None, jump_slope=0.0,
                       jump_bins=8):
    """Exhaustive minimum over every path through the cost table ``e[row][column]``.

    A jump from column j to jn costs ``jump``, plus, when ``jump_free`` is given, ``jump_slope``
    per column of bin distance beyond the free bins: columns in bins of
    ``B = max(1, ceil(jump_free / jump_bins))``, ``w = ceil(jump_free / B)`` bins free
    (engine.py, "Jump-size prior")."""
    R, M = rows.n_rows, len(e[0])
    Rr = [math.floor(c + 0.5) for c in rows.centre]
    sig = list(rows.direction)
    bf = math.ceil(1 / (stretch - 1) - 1e-9)
    bs = math.ceil(stretch / (stretch - 1) - 1e-9)
    best = math.inf

    def rec(r, j, cost):
        nonlocal best
        if r == R - 1:
            best = min(best, cost)
            return
        jn = j + Rr[r + 1] - Rr[r]                                   # FOLLOW
        if 0 <= jn < M:
            rec(r + 1, jn, cost + e[r + 1][jn])
        for b, faster in ((bf, +1), (bs, -1)):                       # FAST, SLOW
            rl = r + b
            if rl > R - 1 or any(sig[t] != sig[rl] for t in range(r + 1, rl + 1)):
                continue
            jl = j + Rr[rl] - Rr[r] + faster * sig[rl]
            cells = [(t, jl - (Rr[rl] - Rr[t])) for t in range(r + 1, rl + 1)]
            if all(0 <= c < M for _, c in cells):
                rec(rl, jl, cost + strain + sum(e[t][c] for t, c in cells))
        for jn in range(M):                                          # JUMP (anywhere)
            extra = 0.0
            if jump_free is not None:
                b = max(1, math.ceil(jump_free / jump_bins))
                over = abs(jn // b - j // b) - math.ceil(jump_free / b)
                extra = jump_slope * b * over if over > 0 else 0.0
            rec(r + 1, jn, cost + jump + extra + e[r + 1][jn])

    for j in range(M):
        rec(0, j, e[0][j])
    return best


def _random_case(seed):
    rng = np.random.default_rng(seed)
    choices = [1.0, 0.4, 0.3, 0.7, -1.0, -0.45, 0.05, -0.02, 1.6, 2.2, -1.3]
    while True:
        n = int(rng.integers(1, 7))
        m = int(rng.integers(2, 7))
        nc = int(rng.integers(1, 3))
        step = rng.choice(choices, size=n) * rng.uniform(0.8, 1.2, size=n)
        rows = resample_strat(np.zeros((n, nc)), step, min_rate=0.1)
        if rows.n_rows <= 6 and (m + 3) ** (rows.n_rows - 1) * m <= 40_000:
            break
    well = rng.normal(size=(n, nc)).round(1)
    ref = rng.normal(size=(m, nc)).round(1)
    if rng.random() < 0.3:
        well[rng.integers(n), rng.integers(nc)] = np.nan
    if rng.random() < 0.3:
        ref[rng.integers(m), rng.integers(nc)] = np.nan
    params = dict(
        stretch=float(rng.choice([1.25, 1.5, 2.0])),
        jump_penalty=float(rng.uniform(0.2, 3.0)),
        strain_penalty=float(rng.choice([0.0, 0.1, 0.4])),
        misfit=str(rng.choice(["huber", "abs"])),
        huber_delta=float(rng.choice([0.5, 1.0])),
        null_misfit=0.5,
        subsample=bool(rng.random() < 0.3),
        weights=rng.uniform(0.5, 2.0, size=nc),
    )
    return well, ref, step, params


@pytest.mark.parametrize("seed", list(range(80)))
def test_engine_score_equals_exhaustive_search_over_all_paths(seed):
    well, ref, step, prm = _random_case(seed)
    eng = AlignmentEngine(ref, standardise=False, min_rate=0.1, **prm)
    al = eng.align(well, step)
    rows = resample_strat(well, step, min_rate=0.1)
    want = _oracle_best(rows, ref, w=prm["weights"], stretch=prm["stretch"],
                        jump=prm["jump_penalty"], strain=prm["strain_penalty"],
                        kind=prm["misfit"], delta=prm["huber_delta"], null_misfit=0.5,
                        subsample=prm["subsample"])
    assert al.score == pytest.approx(want, rel=1e-9, abs=1e-9)


def test_oracle_cases_cover_jumps_stretch_moves_and_turning_points():
    """Guard against a vacuous oracle test: the random cases exercise every feature."""
    seen = {"jump": 0, "flip": 0, "partial": 0, "floor": 0}
    for seed in range(80):
        well, ref, step, prm = _random_case(seed)
        rows = resample_strat(well, step, min_rate=0.1)
        seen["flip"] += int(np.any(np.diff(rows.direction) != 0))
        seen["partial"] += int(np.any(rows.arc < 1 - 1e-9))
        seen["floor"] += int(np.any(np.abs(step) < 0.1))
        al = AlignmentEngine(ref, standardise=False, **prm).align(well, step)
        seen["jump"] += int(len(al.jumps) > 0)
    assert all(v >= 5 for v in seen.values()), seen


def _with_anchors(e, rows, anchors, cost):
    """The cost table with ``cost`` added on each anchor's row outside its band: sample i at
    column j lies at position sample_position[i] + j − centre[row] (engine.py, "Anchors")."""
    e = [list(r) for r in e]
    for i, pos, tol in anchors:
        r = int(rows.sample_row[int(i)])
        for j in range(len(e[r])):
            p = rows.sample_position[int(i)] + j - rows.centre[r]
            if abs(p - pos) > tol + 1e-9:
                e[r][j] += cost
    return e


def _prior_anchor_case(seed):
    well, ref, step, prm = _random_case(seed)
    rng = np.random.default_rng(seed + 1000)
    m = ref.shape[0]
    prm.update(jump_penalty=float(rng.uniform(0.02, 0.5)),   # cheap jumps: many to price
               jump_free=int(rng.integers(0, 3)), jump_bins=int(rng.choice([1, 2, 8])),
               jump_slope=float(rng.choice([0.5, 2.0, math.inf])),
               anchor_cost=float(rng.choice([0.5, 2.0])))
    anchors = [(int(rng.integers(well.shape[0])), float(rng.uniform(-0.5, m - 0.5)),
                float(rng.choice([0.0, 0.5, 1.0]))) for _ in range(int(rng.integers(0, 3)))]
    return well, ref, step, prm, anchors


@pytest.mark.parametrize("seed", list(range(80)))
def test_engine_with_prior_and_anchors_equals_exhaustive_search(seed):
    """The jump-size prior and the anchor bands keep the DP exact."""
    well, ref, step, prm, anchors = _prior_anchor_case(seed)
    eng = AlignmentEngine(ref, standardise=False, min_rate=0.1, **prm)
    al = eng.align(well, step, anchors=anchors or None)
    rows = resample_strat(well, step, min_rate=0.1)
    lo, hi = _plain_bounds(ref, prm["subsample"])
    e = [[_plain_misfit(rows.values[r], lo[j], hi[j], prm["weights"], prm["misfit"],
                        prm["huber_delta"], 0.5) for j in range(ref.shape[0])]
         for r in range(rows.n_rows)]
    want = _oracle_over_costs(rows, _with_anchors(e, rows, anchors, prm["anchor_cost"]),
                              stretch=prm["stretch"], jump=prm["jump_penalty"],
                              strain=prm["strain_penalty"], jump_free=prm["jump_free"],
                              jump_slope=prm["jump_slope"], jump_bins=prm["jump_bins"])
    assert al.score == pytest.approx(want, rel=1e-9, abs=1e-9)


def test_prior_and_anchor_cases_are_not_vacuous():
    """The prior changes the optimum in some cases, anchors in others, and the traceback
    recovers jump sources beyond the free size (checked by the path cost test below)."""
    changed = {"prior": 0, "anchors": 0}
    for seed in range(80):
        well, ref, step, prm, anchors = _prior_anchor_case(seed)
        plain = {k: v for k, v in prm.items() if k not in ("jump_free", "jump_slope",
                                                             "jump_bins", "anchor_cost")}
        s0 = AlignmentEngine(ref, standardise=False, **plain).align(well, step).score
        s1 = AlignmentEngine(ref, standardise=False, **prm).align(well, step).score
        s2 = AlignmentEngine(ref, standardise=False, **prm).align(
            well, step, anchors=anchors or None).score
        changed["prior"] += int(s1 > s0 + 1e-9)
        changed["anchors"] += int(s2 > s1 + 1e-9)
    assert all(v >= 5 for v in changed.values()), changed


def test_path_with_prior_costs_the_reported_score():
    """Jumps beyond the free size are traced back to their true source: the returned path's
    own cost (misfits, strain, jump penalty and prior excess per jump) is the score."""
    rng = np.random.default_rng(4)
    ref = rng.normal(size=(400, 2))
    well = np.vstack([ref[5:65], ref[300:360], ref[150:210]]) + 0.05 * rng.normal(size=(180, 2))
    eng = AlignmentEngine(ref, standardise=False, jump_penalty=1.0, jump_free=20,
                          jump_slope=0.01, jump_bins=20)
    al = eng.align(well, np.ones(180))
    e = np.abs(well - ref[al.row_path])
    mis = np.where(e <= 1.0, 0.5 * e**2, e - 0.5).mean(axis=1)
    lag = al.row_path - np.arange(180)
    d = np.diff(al.row_path)
    jumps = np.flatnonzero(np.abs(d - 1) > 1)
    n_strain = int(np.count_nonzero(np.diff(lag))) - len(jumps)
    prior = sum(0.01 * max(abs(int(d[k])) - 20, 0) for k in jumps)
    assert len(al.jumps) == 2 and prior > 1.0
    assert al.score == pytest.approx(mis.sum() + len(jumps) * 1.0 + n_strain * 0.05 + prior)


def test_returned_path_costs_the_reported_score():
    rng = np.random.default_rng(3)
    ref = rng.normal(size=(60, 2))
    well = np.vstack([ref[5:25], ref[40:55], ref[30:45]]) + 0.05 * rng.normal(size=(50, 2))
    eng = AlignmentEngine(ref, standardise=False, jump_penalty=1.0)
    al = eng.align(well, np.ones(50))
    e = np.abs(well - ref[al.row_path])                   # step 1: one row per sample
    mis = np.where(e <= 1.0, 0.5 * e**2, e - 0.5).mean(axis=1)
    lag = al.row_path - np.arange(50)
    n_jumps = len(al.jumps)
    n_strain = int(np.count_nonzero(np.diff(lag))) - n_jumps
    assert n_jumps == 2
    assert al.score == pytest.approx(mis.sum() + n_jumps * 1.0 + n_strain * 0.05)


def _turning_well():
    """A well that drills down, turns and drills up through a fault (a 35-sample jump at sample
    200), with fractional steps and three nulls; its engine, standardisation and batch result."""
    rng = np.random.default_rng(7)
    ref = np.cumsum(rng.normal(size=400))
    ref = (ref - ref.mean()) / ref.std() + 0.3 * rng.normal(size=400)
    step = np.concatenate([np.full(120, 0.6), np.linspace(0.6, -0.8, 40), np.full(140, -0.8)])
    pos = 150 + np.cumsum(step)
    pos[200:] += 35.0
    well = np.interp(pos, np.arange(400), ref) + 0.05 * rng.normal(size=300)
    well[50:53] = np.nan
    eng = AlignmentEngine(ref)
    c, s = eng.calibrate(well, step)
    return well, step, eng, c, s, eng.align(well, step, center=c, scale=s)


def test_streaming_sample_by_sample_equals_batch():
    well, step, eng, c, s, batch = _turning_well()
    st = eng.stream(center=c, scale=s)
    for i in range(well.shape[0]):
        st.push(well[i], step[i])
        if i == 180:
            part = st.current()
            prefix = eng.align(well[:181], step[:181], center=c, scale=s)
            assert part.score == prefix.score
            np.testing.assert_array_equal(part.path, prefix.path)
    live = st.current()
    assert live.score == batch.score
    np.testing.assert_array_equal(live.path, batch.path)
    assert live.jumps == batch.jumps
    assert [j.sample for j in batch.jumps] == [200]


def test_reused_move_code_blocks_give_the_same_alignment():
    """Whole-well alignments give their move codes back for reuse (stream.CODE_BLOCKS,
    unzeroed): a well aligned after another well has dirtied the pooled blocks gets the same
    path and jumps as on fresh memory, and a released aligner refuses further use."""
    from wellfault.align import stream

    well, step, eng, c, s, batch = _turning_well()
    fresh = eng.stream(center=c, scale=s)               # streaming: blocks of its own
    fresh.push(well, step)
    rng = np.random.default_rng(7)
    eng.align(rng.normal(size=well.shape[0]), step, center=c, scale=s)   # dirties the pool
    again = eng.align(well, step, center=c, scale=s)
    assert stream.CODE_BLOCKS._bytes > 0                 # the pool was used
    assert again.score == batch.score == fresh.current().score
    np.testing.assert_array_equal(again.path, fresh.current().path)
    assert again.jumps == batch.jumps
    spent = stream.StreamingAligner(eng, c, s)
    spent.push(well[:50], step[:50])
    spent.release()
    with pytest.raises(AlignmentError, match="released"):
        spent.push(well[50:60], step[50:60])
    with pytest.raises(AlignmentError, match="released"):
        spent.current()


def test_calibration_reads_the_same_path_and_cost_as_a_full_alignment():
    """The calibration's coarse passes read only the path and the cost, without the jumps'
    evidence (StreamingAligner._path_and_score / _score): the same numbers as the full
    result's path and score."""
    from wellfault.align.stream import StreamingAligner

    well, step, eng, c, s, batch = _turning_well()
    path, score = eng._whole(well, step, StreamingAligner._path_and_score, c, s)
    np.testing.assert_array_equal(path, batch.path)
    assert score == batch.score
    assert eng._whole(well, step, StreamingAligner._score, c, s) == batch.score


def test_streaming_with_prior_and_anchors_equals_batch():
    """Anchors are placed on rows as the rows are made, and jump sources are kept per row:
    pushing sample by sample, with the prior and anchors (one of them contradicting the
    curves), gives the batch result, the tail included."""
    well, step, _, c, s, _ = _turning_well()
    eng = AlignmentEngine(_turning_well()[2].ref, jump_free=28, jump_bins=8)
    pos = 150 + np.cumsum(step)                      # the true positions (_turning_well)
    pos[200:] += 35.0
    anchors = [(60, pos[60], 1.0), (150, pos[150], 2.0), (250, pos[250] + 30.0, 1.0)]
    batch = eng.align(well, step, center=c, scale=s, anchors=anchors)
    st = eng.stream(center=c, scale=s, anchors=anchors)
    for i in range(well.shape[0]):
        st.push(well[i], step[i])
    live = st.current()
    assert live.score == batch.score
    np.testing.assert_array_equal(live.path, batch.path)
    assert live.jumps == batch.jumps
    assert len(batch.jumps) == 1 and abs(batch.jumps[0].sample - 200) <= 6
    tail = st.tail(120)
    np.testing.assert_array_equal(tail.alignment.path,
                                  batch.path[tail.sample0:tail.sample_end])
    with pytest.raises(InputError, match="anchors must be finite"):
        eng.align(well, step, anchors=[(0, 1.0, -1.0)])


def test_tail_of_the_stream_is_the_batch_alignment_of_its_rows():
    """``StreamingAligner.tail`` traces only the last rows, yet gives the optimal path's own
    positions and jump there (the property a well being drilled relies on)."""
    well, step, eng, c, s, batch = _turning_well()
    st = eng.stream(center=c, scale=s)
    st.push(well, step)
    assert 0 < st.best_cost <= batch.score          # committed rows (the last may be unfinished)
    tail = st.tail(120)
    assert tail is not None and tail.n_rows == st.n_rows
    assert st.n_rows - 130 <= tail.row0 <= st.n_rows - 110      # about 120 rows, no more
    seg = slice(tail.sample0, tail.sample_end)
    np.testing.assert_array_equal(tail.alignment.path, batch.path[seg])
    np.testing.assert_array_equal(tail.alignment.sample_row + tail.row0, st.sample_row[seg])
    (jt,) = tail.alignment.jumps
    (jb,) = batch.jumps
    assert jt.sample + tail.sample0 == jb.sample == 200
    assert jt.size == pytest.approx(jb.size, abs=0.5) and abs(jt.size) == pytest.approx(35, abs=1)
    assert np.isfinite(jt.margin) and 0.0 <= jt.confidence <= 1.0
    with pytest.raises(ValueError):
        st.sample_row[0] = 5                                      # read-only views
    assert eng.stream().tail(50) is None                          # nothing pushed yet


def test_stream_accepts_chunks_and_default_standardisation():
    rng = np.random.default_rng(2)
    ref = rng.normal(size=(100, 1))
    eng = AlignmentEngine(ref)
    st = eng.stream()
    st.push(ref[10:30], np.ones(20))
    st.push(ref[30, :], 1.0)
    al = st.current()
    assert al.path.shape == (21,)
    np.testing.assert_allclose(al.path, np.arange(10, 31), atol=0.6)
    np.testing.assert_array_equal(al.center, eng.prep_["ref_center"])


def test_stretch_moves_meet_the_stretch_window_exactly():
    for k in (1.1, 1.25, 1.5, 2.0):
        bf, bs = stretch_moves(k)
        assert (bf + 1) / bf <= k + 1e-12 and (bs - 1) / bs >= 1 / k - 1e-12
        assert bf == 1 or bf / (bf - 1) > k            # the shortest such moves
        assert bs == 2 or (bs - 2) / (bs - 1) < 1 / k
    assert stretch_moves(1.5) == (2, 3)


def test_traceback_memory_is_one_byte_per_row_and_reference_sample():
    rng = np.random.default_rng(0)
    ref = rng.normal(size=3000)
    st = AlignmentEngine(ref).stream()
    st.push(rng.normal(size=2500), np.ones(2500))
    code_bytes = sum(b.nbytes for b in st._blocks)
    assert all(b.dtype == np.uint8 for b in st._blocks)
    assert code_bytes <= st.n_rows * 3000 + st._block_rows * 3000
    assert st._F.nbytes + st._E.nbytes < 10 * 3000 * 8           # O(M) cost rows


@pytest.mark.parametrize(
    ("kwargs", "match"),
    [
        ({"stretch": 1.0}, "stretch outside"),
        ({"stretch": 3.0}, "stretch outside"),
        ({"jump_penalty": 0.0}, "jump_penalty must be positive"),
        ({"misfit": "l2"}, "unknown misfit"),
        ({"weights": [1.0, 2.0]}, "weights"),
        ({"min_rate": 0.0}, "min_rate"),
        ({"jump_free": -1}, "jump_free must be a whole number"),
        ({"jump_free": 2.5}, "jump_free must be a whole number"),
        ({"jump_free": 10, "jump_bins": 0}, "jump_bins"),
        ({"jump_slope": -1.0}, "jump_slope must be >= 0"),
        ({"anchor_cost": -1.0}, "anchor_cost must be >= 0"),
    ],
)
def test_bad_engine_arguments_are_named_in_the_error(kwargs, match):
    with pytest.raises(InputError, match=match):
        AlignmentEngine(np.zeros((10, 1)), **kwargs)


def test_bad_well_inputs_are_rejected_with_the_fix():
    eng = AlignmentEngine(np.random.default_rng(0).normal(size=(30, 2)))
    with pytest.raises(InputError, match=r"shape \(N, 2\)"):
        eng.align(np.zeros((5, 3)), np.ones(5))
    with pytest.raises(InputError, match="one value per well sample"):
        eng.align(np.zeros((5, 2)), np.ones(4))
    with pytest.raises(InputError, match="finite"):
        eng.align(np.zeros((2, 2)), [1.0, np.nan])
    with pytest.raises(AlignmentError, match="no well samples"):
        eng.stream().current()
    with pytest.raises(InputError, match="M >= 2"):
        AlignmentEngine(np.zeros(1))
