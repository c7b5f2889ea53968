"""Fit the calibrated cut confidence of the alignment engine (wellfault.align.CONFIDENCE_COEF).

Run:  python benchmarks/calibrate_confidence.py [--per-log 40] [--procs 2]

The engine's confidence of a cut is a logistic model of three pieces of evidence
(wellfault/align/engine.py, "Cut evidence"): ``ln(1 + margin)`` (how much better the best path
with the jump explains its window than any without), the well/type-log ``correlation`` along the
path either side, and ``ln(run)``, the jump-free rows on the shorter side (how far the well keeps
correlating with the type log without another jump). This script collects every cut the curves
report on a CALIBRATION set — seeds 10000+, disjoint from the evaluation seeds of
bench_curves.py (0+) and tests/test_curve_accuracy.py — and fits P(real) by maximum likelihood
(logistic regression with a small ridge), then prints the coefficients to store as
``CONFIDENCE_COEF`` and the reliability of the fit on its own set.

Calibration set (cases in _curvecases.py):

* ``goal``      — wells of the issue's goal conditions (curve_scenario defaults) on the three real
  gamma-ray type logs and the invented column;
* ``hard``      — noise 20-40 % of the log's spread, thickness +-20 %;
* ``off``       — wells allowed to drill past the type log's ends (no inside margin);
* ``close``     — two faults 10-60 m of MD apart where a well has two (short correlated runs
  between cuts are not a sign of a false cut);
* ``unrelated`` — wells drawn from one real log aligned to another's type log: every cut false;
* ``low``       — wells on low-character type logs degraded from the real logs (thick shales,
  casing attenuation, old-tool response, counting noise; wellfault.synth.low_character.low_character_log,
  degradation seeds 10000+), and ``lowclose``, the same with two faults 10-60 m apart.

Then the down-weighting of cuts where the type log has little character
(``wellfault.align.character.CHARACTER_COEF``) is fitted the same way, with the refitted engine
confidence as an offset: logit P = logit(confidence) + coef * min(ln((κ + 0.05) / 1.05), 0),
coef >= 0. Store both printed values.

A cut is real when it matches a true cut (wellfault.synth.evaluation.match_detected, 1 m slack).
"""

from __future__ import annotations

import argparse
import sys
from multiprocessing import Pool
from pathlib import Path

import numpy as np
import pandas as pd
from scipy.optimize import minimize

sys.path.insert(0, str(Path(__file__).resolve().parent))
import _curvecases as cc  # noqa: E402


def calibration_cases(per_log: int) -> list:
    s0 = 10000
    out = cc.cases("goal", cc.REAL, range(s0, s0 + per_log))
    out += cc.cases("goal", [cc.INVENTED], range(s0, s0 + per_log // 2))
    out += cc.cases("hard", cc.REAL, range(s0 + 1000, s0 + 1000 + per_log // 2),
                    noise_rel=(0.2, 0.4), thickness_variation=0.2)
    out += cc.cases("off", cc.REAL, range(s0 + 2000, s0 + 2000 + per_log // 2),
                    inside_margin_m=None)
    out += cc.cases("close", cc.REAL, range(s0 + 4000, s0 + 4000 + per_log // 2),
                    min_faults=2, fault_gap_m=(10.0, 60.0), fault_clearance_m=15.0)
    out += cc.cases("unrelated", cc.REAL, range(s0 + 3000, s0 + 3000 + per_log // 2),
                    dst=cc.unrelated)
    low = range(s0, s0 + max(per_log // 10, 1))            # degraded type logs per real log
    out += cc.low_cases("low", low, range(s0 + 5000, s0 + 5000 + per_log // 2))
    out += cc.low_cases("lowclose", low, range(s0 + 6000, s0 + 6000 + per_log // 4),
                        close_faults=True)
    return out


def _one(case):
    from wellfault.evidence.curve_settings import CurveSettings

    # every jump the curves would report, the confidence floors aside (they read this fit)
    return cc.run_case(case, ("engine",), CurveSettings.make(
        min_confidence=0.0, min_confidence_beyond=0.0))["engine"][1]


def features(det: pd.DataFrame) -> np.ndarray:
    from wellfault.align.evidence import confidence_features

    return np.array([confidence_features(m, c, r) for m, c, r in
                     zip(det["margin"], det["correlation"], det["run"])])


def fit(X: np.ndarray, y: np.ndarray, ridge: float = 1e-2) -> np.ndarray:
    def nll(b):
        z = X @ b
        return float(np.sum(np.logaddexp(0.0, z) - y * z) + ridge * b[1:] @ b[1:])

    def grad(b):
        p = 1.0 / (1.0 + np.exp(-(X @ b)))
        g = X.T @ (p - y)
        g[1:] += 2 * ridge * b[1:]
        return g

    return minimize(nll, np.zeros(X.shape[1]), jac=grad, method="BFGS").x


def fit_character(p: np.ndarray, kappa: np.ndarray, y: np.ndarray) -> float:
    """The character coefficient (module docstring) by maximum likelihood, ``p`` the engine's
    fitted confidence of each cut."""
    from scipy.optimize import minimize_scalar

    q = np.clip(p, 1e-9, 1 - 1e-9)
    off = np.log(q / (1 - q))
    drop = np.minimum(np.log((np.nan_to_num(kappa, nan=1e9) + 0.05) / 1.05), 0.0)

    def nll(c):
        z = off + c * drop
        return float(np.sum(np.logaddexp(0.0, z) - y * z))

    return float(minimize_scalar(nll, bounds=(0.0, 10.0), method="bounded").x)


def main(argv=None) -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--per-log", type=int, default=40)
    ap.add_argument("--procs", type=int, default=2)
    ap.add_argument("--save", type=str, default="", help="write the cut table (CSV) here")
    a = ap.parse_args(argv)
    from wellfault.synth.evaluation import reliability_table

    todo = calibration_cases(a.per_log)
    with Pool(a.procs) as pool:
        dets = pool.map(_one, todo, chunksize=2)
    det = pd.concat([d for d in dets if len(d)], ignore_index=True)
    det["case"] = det["case"].fillna("unrelated")
    if a.save:
        det.to_csv(a.save, index=False)
    X, y = features(det), det["real"].to_numpy(float)
    b = fit(X, y)
    p = 1.0 / (1.0 + np.exp(-(X @ b)))
    coef = fit_character(p, det["character"].to_numpy(float), y)
    drop = np.minimum(np.log((det["character"].to_numpy(float) + 0.05) / 1.05), 0.0)
    pw = 1.0 / (1.0 + np.exp(-(np.log(p / (1 - p)) + coef * drop)))
    print(f"calibration set: {len(todo)} wells, {len(det)} reported cuts, "
          f"{int(y.sum())} real; by case:")
    print(det.groupby("case")["real"].agg(["count", "sum"]).to_string())
    print("\nCONFIDENCE_COEF = (" + ", ".join(f"{v:.4g}" for v in b) + ")")
    print("  [1, ln(1 + margin), correlation, ln(run rows)]\n")
    print(f"CHARACTER_COEF = {coef:.4g}")
    print("  log-odds lowered by CHARACTER_COEF * min(ln((character + 0.05) / 1.05), 0)\n")
    print("reliability on the calibration set (fitted, character weighting applied):")
    print(reliability_table(pw, y.astype(bool)).to_string(index=False))
    low = det["case"].astype(str).str.startswith("low").to_numpy()
    print("\n... its low-character wells alone:")
    print(reliability_table(pw[low], y[low].astype(bool)).to_string(index=False))


if __name__ == "__main__":
    main()
