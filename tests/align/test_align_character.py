"""The type-log character measure (wellfault.align.character) and the curves chosen by it
(wellfault.evidence.curve_settings.shared_curves)."""

from __future__ import annotations

import numpy as np
import pytest

from wellfault.align import robust_location_scale
from wellfault.align.character import (CharacterSettings, curve_character, log_character,
                                       noise_variance, weak_runs)


def test_white_noise_has_no_character():
    # positions of a white-noise log differ only by the noise: the signal's semivariogram is
    # zero at every lag (Isaaks & Srivastava 1989, ch. 7: a pure nugget effect)
    z = np.random.default_rng(500).normal(0.0, 1.0, 20000)
    k = log_character(z, 0.1524)
    assert np.median(k) < 0.1
    assert noise_variance(z) == pytest.approx(1.0, rel=0.05)


def test_character_of_a_periodic_log_follows_its_semivariogram():
    # semivariogram of A sin(2 pi u / P): gamma(h) = A^2 / 2 (1 - cos(2 pi h / P)) (a textbook
    # result for a periodic signal, e.g. Isaaks & Srivastava 1989, ch. 7 "hole effect")
    ds, period, amp = 0.1524, 30.0, 40.0
    u = np.arange(0.0, 1500.0, ds)
    x = 60.0 + amp * np.sin(2 * np.pi * u / period)
    st = CharacterSettings(window_m=60.0)
    scale = robust_location_scale(x)[1][0]
    a = amp / scale
    nug = noise_variance((x - x.mean()) / scale)
    gam = [a * a / 2 * (1 - np.cos(2 * np.pi * round(h / ds) * ds / period)) for h in st.lags_m]
    expect = np.mean([max(g - nug, 0.0) for g in gam]) / (nug + st.floor ** 2)
    k = curve_character(x, ds, st)[:, 0]
    inner = slice(int(100 / ds), int(1400 / ds))
    assert np.median(k[inner]) == pytest.approx(expect, rel=0.05)


def test_flat_stretch_is_reported_weak():
    rng = np.random.default_rng(501)
    ds = 0.1524
    u = np.arange(0.0, 600.0, ds)
    x = 60.0 + 30.0 * np.sin(2 * np.pi * u / 17.0) + rng.normal(0.0, 2.0, u.size)
    flat = (u >= 200.0) & (u < 320.0)
    x[flat] = 60.0 + rng.normal(0.0, 2.0, flat.sum())
    runs = weak_runs(log_character(x, ds), 0.0, ds)
    assert len(runs) == 1
    # inside the flat stretch, shrunk at each end by at most (window + largest lag) / 2 = 20 m:
    # pairs straddling an end still see the log's variation
    assert 200.0 <= runs[0].s_top_m <= 220.0
    assert 300.0 <= runs[0].s_base_m <= 320.0


def test_shared_curves_chosen_by_default_and_curve_option_still_chooses():
    from wellfault.evidence.curve_settings import CurveSettings
    from wellfault.evidence.curvecuts import find_cuts_from_curves
    from wellfault.synth.columns import synthetic_column
    from wellfault.synth.scenarios import random_scenario

    col = synthetic_column(12, seed=502, curves=("GR", "RHOB", "DT"))
    sc = random_scenario(503, col, curves=("GR", "RHOB", "DT"), noise_std=2.0)
    auto = find_cuts_from_curves(sc.well, col, sc.trajectory, bed_dip=sc.bed_dip,
                                 settings=CurveSettings.make())
    assert auto.curves == ("GR", "RHOB", "DT")
    given = find_cuts_from_curves(sc.well, col, sc.trajectory, bed_dip=sc.bed_dip,
                                  settings=CurveSettings.make(["GR"]))
    assert given.curves == ("GR",)
    # a type-log curve without character (pure noise) adds noise, not evidence: left out
    tl = col.type_log.copy()
    tl["DT"] = np.random.default_rng(504).normal(80.0, 10.0, len(tl))
    noisy = find_cuts_from_curves(sc.well, col.with_type_log(tl), sc.trajectory,
                                  bed_dip=sc.bed_dip, settings=CurveSettings.make())
    assert noisy.curves == ("GR", "RHOB")
