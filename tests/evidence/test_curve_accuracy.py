"""Accuracy of the curve evidence on wells forward-modelled from REAL gamma-ray type logs.

The issue "Fault cuts from log curves" sets the goals; benchmarks/bench_curves.py measures them
on 210 wells beside the DTW baseline and the lag screen. Here a smaller seeded set (seeds 500+,
disjoint from the benchmark's 0+ and from the confidence calibration's 10000+) checks them in CI.
Type logs are the real gamma-ray curves of ../shared/reference_data (the ``refdata`` fixture
skips without them), each cut to the interval wellfault.synth.real_logs.REAL_GR_LOGS gives:

* P-129 — Windsor-Kennetcook sub-basin, Nova Scotia (welly 0.5.2 sdist,
  tests/assets/P-129_out.LAS), 290-1900 m;
* F03-02 — Dutch North Sea block F3 (welly 0.5.2 sdist, tests/assets/F03-02.las),
  400-1650 m;
* Wellington KGS 1-32 — Sumner County, Kansas (welly 0.5.2 sdist,
  tutorial/data/Wellington_KGS-1-32-wDST2_LASv2.las; feet, read as metres), 180-1575 m.

Wells: wellfault.synth.real_logs.curve_scenario — noise 10-20 % of the log's spread, +-15 % thickness,
gain 0.8-1.25, offset +-0.35 spread, vertical/deviated/high-angle, 0-2 normal or reverse faults,
kept inside the type log.
"""

from __future__ import annotations

import functools

import numpy as np
import pandas as pd
import pytest

from wellfault.evidence.curvecuts import find_cuts_from_curves
from wellfault.synth.evaluation import reliability_table, score_scenario, summarise
from wellfault.synth.real_logs import REAL_GR_LOGS, curve_scenario, real_gr_column

LOGS = tuple(REAL_GR_LOGS)


@functools.lru_cache(maxsize=None)
def _column(name: str, folder: str):
    return real_gr_column(name, folder)


def _run(refdata, seeds, *, dst=None):
    """Rows (true cuts) and detected cuts over the wells (seed, log) in ``seeds``."""
    all_rows, all_det = [], []
    for log in LOGS:
        col = _column(dst(log) if dst else log, str(refdata))
        for seed in seeds:
            sc = curve_scenario(seed, _column(log, str(refdata)))
            cuts = find_cuts_from_curves(sc.well, col, sc.trajectory, bed_dip=sc.bed_dip).cuts
            rows, det = score_scenario(cuts, sc)
            if dst is not None:
                det["real"] = False
            for t in (rows, det):
                t["log"], t["seed"], t["kind"] = log, seed, sc.kind
            all_rows.append(rows)
            all_det.append(det)
    rows = pd.concat([r for r in all_rows if len(r)], ignore_index=True) if any(
        len(r) for r in all_rows) else pd.DataFrame(columns=["true_delta_s_m", "found"])
    det = pd.concat([d for d in all_det if len(d)], ignore_index=True) if any(
        len(d) for d in all_det) else pd.DataFrame(columns=["real", "confidence"])
    return rows, det


def _figures(rows, det, wells):
    s = summarise(rows, int((~det["real"].astype(bool)).sum()), wells, min_abs_delta_s_m=5.0,
                  fault_type_mask=rows["crossing_clear"].astype(bool))
    found = rows[(rows["true_delta_s_m"].abs() >= 5.0) & rows["found"]]
    err = (found["delta_s_m"].abs() - found["true_delta_s_m"].abs()).abs()
    ratio = float((err / np.maximum(0.1 * found["true_delta_s_m"].abs(), 1.0)).median())
    hi = det["confidence"].to_numpy(float) >= 0.9
    real_hi = float(det["real"][hi].mean()) if hi.any() else np.nan
    print("\n" + s.as_text())
    print(f"|Δs| error / max(10 %, 1 m): median {ratio:.3f}; cuts with confidence >= 0.9: "
          f"{int(hi.sum())}, real {real_hi:.3f}")
    print(reliability_table(det["confidence"], det["real"].astype(bool)).to_string(index=False))
    return s, ratio, real_hi, int(hi.sum())


def test_real_gamma_ray_type_logs_quick_recovery(refdata):
    """Unmarked, about 10-20 s: 12 wells (4 per real log). The true cuts of |Δs| >= 5 m are
    found (one of the 12, an 8.7 m repeat in a deviated F03-02 well, is absorbed by stretch:
    recall >= 0.9 here, as the goal), each with its section, no false cut is reported, and the
    depth and |Δs| errors meet the goals."""
    rows, det = _run(refdata, range(500, 504))
    s, ratio, _, _ = _figures(rows, det, 12)
    assert s.counted_cuts >= 8
    assert s.recall >= 0.9
    assert s.false_per_well == 0.0
    assert s.section_right == 1.0
    assert not (~det["real"].astype(bool) & (det["confidence"] >= 0.5)).any()
    assert s.md_error_median_m <= 1.0 and s.md_error_p90_m <= 3.0
    assert ratio <= 1.0


@pytest.mark.slow
def test_real_gamma_ray_type_logs_meet_the_issue_goals(refdata):
    """60 wells (20 per real log), about 30 s: the issue's goals as stated — recall >= 0.9
    for |Δs| >= 5 m, depth error median <= 1 m and p90 <= 3 m, |Δs| error median within
    max(10 %, 1 m), <= 0.1 false cuts per well, section and fault type (attitude given, crossing
    not degenerate) right in >= 98 % of found cuts, and >= 90 % of the cuts reported with
    confidence >= 0.9 real. None is relaxed for the smaller sample; the confidence goal needs
    at least 20 such cuts to be read."""
    rows, det = _run(refdata, range(510, 530))
    s, ratio, real_hi, n_hi = _figures(rows, det, 60)
    assert s.counted_cuts >= 45
    assert s.recall >= 0.9
    assert s.md_error_median_m <= 1.0
    assert s.md_error_p90_m <= 3.0
    assert ratio <= 1.0
    assert s.false_per_well <= 0.1
    assert s.section_right >= 0.98
    assert s.fault_type_right >= 0.98 and s.fault_type_cases >= 40
    assert n_hi >= 20 and real_hi >= 0.9
    assert s.bracket_holds >= 0.95


def test_wells_against_an_unrelated_real_type_log_get_no_confident_cut(refdata):
    """A well drawn from one real log and aligned to another's type log: the path runs mostly
    off the type log, and the jumps it still makes (all false) get confidences below 0.9,
    mostly far below."""
    def other(log):
        return LOGS[(LOGS.index(log) + 1) % len(LOGS)]

    _, det = _run(refdata, range(540, 541), dst=other)
    conf = det["confidence"].to_numpy(float)
    print(f"\n{len(conf)} cuts reported in 3 unrelated wells, confidences {np.round(conf, 2)}")
    assert np.all(conf < 0.9)
    assert np.mean(conf) < 0.4


def test_curve_scenarios_stay_inside_the_type_log_and_keep_their_cuts_clear_of_the_ends(refdata):
    """The benchmark wells never leave the real type log (10 m margin, after faults and
    thickness change) and every true cut lies at least 40 m of MD from either end of the log."""
    for log in LOGS:
        col = _column(log, str(refdata))
        for seed in range(600, 620):
            sc = curve_scenario(seed, col)
            s = sc.synthetic.s_m
            assert s.min() >= 10.0 - 1e-6 and s.max() <= col.base_s_m - 10.0 + 1e-6
            md = sc.well.curves.index.to_numpy()
            for cut in sc.truth.itertuples():
                assert md[0] + 40.0 - 0.5 <= cut.md_m <= md[-1] - 40.0 + 0.5
