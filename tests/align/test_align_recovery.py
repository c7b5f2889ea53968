"""Recovering known fault cuts from synthetic wells read off a synthetic type log.

The type log is blocky (beds 4-30 samples thick at random levels, an AR(1) texture, a 3-sample
tool response) — the kind of curve well logs are. A well reads it along a known stratigraphic
position: thickness scaled by a stretch in [0.9, 1.1] (the engine is told only the predicted
step), one forward jump (missing section) and one backward jump (repeated section), noise,
tool gain and offset. Vertical (step 1), high-angle (step 0.4) and up-section (step -1) wells.
"""

from __future__ import annotations

import numpy as np
import pytest

from wellfault.align import AlignmentEngine

CASES = {  # step: (first strat position, [(first sample below the cut, Δs)], samples)
    1.0: (100.0, [(150, 60.0), (300, -40.0)], 500),
    0.4: (100.0, [(300, 50.0), (700, -40.0)], 1000),
    -1.0: (700.0, [(150, -60.0), (300, 40.0)], 500),
}


def blocky_log(m: int, rng: np.random.Generator) -> np.ndarray:
    levels: list[float] = []
    while len(levels) < m:
        levels += [rng.normal()] * int(rng.integers(4, 30))
    x = np.array(levels[:m])
    a = np.zeros(m)
    e = rng.standard_normal(m)
    for t in range(1, m):
        a[t] = 0.8 * a[t - 1] + e[t]
    x = np.convolve(x + 0.3 * a / a.std(), np.ones(3) / 3, "same")
    return (x - x.mean()) / x.std()


def synthetic_well(ref, step, s0, cuts, n, rng, *, faulted=True):
    """Curve, predicted steps and true strat position of each sample."""
    stretch = rng.uniform(0.9, 1.1)
    jumps = dict(cuts) if faulted else {}
    s = np.empty(n)
    pos = s0
    for i in range(n):
        pos += jumps.get(i, 0.0)
        s[i] = pos
        pos += step * stretch
    curve = 30.0 * np.interp(s, np.arange(ref.size), ref) + 50.0 + 0.15 * rng.normal(size=n)
    return curve, np.full(n, step), s


def fields(seed0):
    """Six seeded (generator, type log) pairs; each test draws its own, in a fixed order."""
    for seed in range(seed0, seed0 + 6):
        rng = np.random.default_rng(seed)
        yield rng, blocky_log(800, rng)


@pytest.mark.parametrize("step", list(CASES))
@pytest.mark.parametrize("seed", [0, 1])
def test_cuts_are_found_at_the_right_sample_with_the_right_size(step, seed):
    rng = np.random.default_rng(100 + seed)
    ref = blocky_log(800, rng)
    s0, cuts, n = CASES[step]
    well, steps, s = synthetic_well(ref, step, s0, cuts, n, rng)
    al = AlignmentEngine(ref).align(well, steps)
    assert len(al.jumps) == 2
    for jump, (sample, _) in zip(al.jumps, cuts):
        true_size = s[sample] - s[sample - 1] - step          # Δs beyond the predicted step
        assert abs(jump.sample - sample) <= 2
        assert jump.size == pytest.approx(true_size, rel=0.10)
        assert jump.bracket[0] <= sample <= jump.bracket[1]
        assert 0.5 < jump.confidence <= 1.0
    # the mapped position is right away from the cuts (thickness change absorbed)
    away = np.ones(n, bool)
    for sample, _ in cuts:
        away[sample - 5 : sample + 5] = False
    assert np.median(np.abs(al.path - s)[away]) < 1.0
    # missing section when the jump goes the way the well travels, repeated when opposite
    kinds = ["missing" if np.sign(j.size) == np.sign(step) else "repeated" for j in al.jumps]
    assert kinds == ["missing", "repeated"]


@pytest.mark.parametrize("step", list(CASES))
def test_no_jump_is_reported_in_unfaulted_wells(step):
    s0, cuts, n = CASES[step]
    for rng, ref in fields(200):
        well, steps, s = synthetic_well(ref, step, s0, cuts, n, rng, faulted=False)
        al = AlignmentEngine(ref).align(well, steps)
        assert al.jumps == ()
        assert np.median(np.abs(al.path - s)) < 1.0


def test_recovery_rate_over_many_random_wells():
    """Aggregate over 36 cuts: nearly all within ±2 samples, all inside their bracket."""
    hits = inside = sized = total = 0
    for rng, ref in fields(0):
        for step, (s0, cuts, n) in CASES.items():
            well, steps, s = synthetic_well(ref, step, s0, cuts, n, rng)
            al = AlignmentEngine(ref).align(well, steps)
            for sample, _ in cuts:
                total += 1
                near = [j for j in al.jumps if abs(j.sample - sample) <= 20]
                if not near:
                    continue
                j = min(near, key=lambda j: abs(j.sample - sample))
                hits += abs(j.sample - sample) <= 2
                inside += j.bracket[0] - 2 <= sample <= j.bracket[1] + 2
                sized += abs(j.size - (s[sample] - s[sample - 1] - step)) <= 0.1 * abs(
                    s[sample] - s[sample - 1])
    assert total == 36
    assert hits >= 32 and inside >= 35 and sized >= 35, (hits, inside, sized)


def test_a_well_unrelated_to_the_type_log_gets_no_confident_cut():
    """Jumps between chance matches in a well that does not match the type log at all."""
    for rng, ref in fields(300):
        noise = np.convolve(rng.normal(size=500), np.ones(3) / 3, "same")
        al = AlignmentEngine(ref).align(noise, np.ones(500))
        assert al.correlation < 0.75
        assert all(j.confidence < 0.5 for j in al.jumps)
        s0, cuts, n = CASES[1.0]
        well, steps, s = synthetic_well(ref, 1.0, s0, cuts, n, rng)
        assert AlignmentEngine(ref).align(well, steps).correlation > 0.9
