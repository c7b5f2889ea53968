"""Shared case lists for bench_curves.py and calibrate_confidence.py (not a module users need).

A *case* is (label, source log, type-log column, seed, scenario keywords): the well is drawn by
:func:`wellfault.synth.real_logs.curve_scenario` from the source log's column and aligned against the
type-log column (the same one, except for the "unrelated" cases, where it is another log's:
every cut found there is false).
"""

from __future__ import annotations

import os
import time
from functools import lru_cache
from pathlib import Path

import numpy as np
import pandas as pd

REAL = ("P-129", "F03-02", "Wellington")
INVENTED = "invented"


def reference_data() -> Path:
    env = os.environ.get("WELLFAULT_REFERENCE_DATA")
    return Path(env) if env else Path(__file__).resolve().parents[2] / "shared" / "reference_data"


LOW = "low"


def low_name(log: str, seed: int) -> str:
    """Case source name of the low-character type log ``seed`` of a real log."""
    return f"{LOW}:{log}:{seed}"


@lru_cache(maxsize=None)
def low_log(name: str):
    from wellfault.synth.low_character import low_character_log

    _, log, seed = name.split(":")
    return low_character_log(log, reference_data(), int(seed))


@lru_cache(maxsize=None)
def column(name: str):
    from wellfault.synth.columns import synthetic_column
    from wellfault.synth.real_logs import real_gr_column

    if name.startswith(LOW + ":"):
        return low_log(name).type_log
    if name == INVENTED:   # an invented column of about the same length, for contrast
        return synthetic_column(24, seed=5, curves=("GR",), name="invented column")
    return real_gr_column(name, reference_data())


def run_case(case, methods=("engine",), settings=None):
    """Run the named methods on one case; returns {method: (rows, detected, seconds)}."""
    from wellfault.evidence.curve_settings import CurveSettings
    from wellfault.evidence.curve_baselines import find_cuts_dtw_baseline, find_cuts_lag_screen
    from wellfault.evidence.curvecuts import find_cuts_from_curves
    from wellfault.synth.evaluation import score_scenario
    from wellfault.synth.real_logs import curve_scenario
    from wellfault.synth.low_character import low_character_scenario

    label, src, dst, seed, kw = case
    if src.startswith(LOW + ":"):
        sc = low_character_scenario(seed, low_log(src), **kw)
    else:
        sc = curve_scenario(seed, column(src), **kw)
    col = column(dst)
    settings = settings or CurveSettings()
    fns = {"engine": find_cuts_from_curves, "dtw": find_cuts_dtw_baseline,
           "lag": find_cuts_lag_screen, "tops": _with_tops(sc.tops)}
    out = {}
    for m in methods:
        t0 = time.perf_counter()
        res = fns[m](sc.well, col, sc.trajectory, bed_dip=sc.bed_dip, settings=settings)
        dt = time.perf_counter() - t0
        if src == dst:
            rows, det = score_scenario(res.cuts, sc)
            if len(rows):
                rows["block_m"] = block_section_m(sc.truth)
            if m == "tops" and len(rows):      # counted where the cut lies between two picks
                md = sc.tops["md_m"].dropna()
                rows = rows[(rows["true_md_m"] > md.min()) & (rows["true_md_m"] < md.max())]
        else:                              # unrelated type log: nothing can be right
            rows = pd.DataFrame()
            det = pd.DataFrame({
                "md_m": [c.md_m for c in res.cuts], "delta_s_m": [c.delta_s_m for c in res.cuts],
                "confidence": [c.confidence for c in res.cuts], "real": False,
                "margin": [c.extra.get("margin", np.nan) for c in res.cuts],
                "correlation": [c.extra.get("correlation", np.nan) for c in res.cuts]})
        det["character"] = [c.extra.get("character", np.nan) for c in res.cuts]
        det["delta_s_m"] = [c.delta_s_m for c in res.cuts]
        # flagged in its row as beyond the plausible separation in force (given or derived)
        det["beyond"] = [bool(c.extra.get("beyond_plausible", False)) for c in res.cuts]
        for t in (rows, det):
            if len(t):
                t["case"], t["log"], t["seed"], t["kind"] = label, src, seed, sc.kind
        det["run"] = [min(c.extra.get("rows_above", np.nan), c.extra.get("rows_below", np.nan))
                      for c in res.cuts]
        out[m] = (rows, det, dt)
    return out


def block_section_m(truth: pd.DataFrame) -> np.ndarray:
    """Per true cut (truth order), the section [m TST] of the fault block between it and its
    nearest neighbouring cut along the well (NaN for a lone cut): what the alignment has to
    place between two close faults."""
    s_above = truth["s_above_m"].to_numpy(float)
    s_below = truth["s_below_m"].to_numpy(float)
    order = np.argsort(truth["md_m"].to_numpy(float))
    out = np.full(len(truth), np.nan)
    for i, k in enumerate(order):
        sides = [abs(s_above[order[i + 1]] - s_below[k])] if i + 1 < order.size else []
        sides += [abs(s_above[k] - s_below[order[i - 1]])] if i > 0 else []
        out[k] = min(sides) if sides else np.nan
    return out


def _with_tops(tops):
    """Curves and tops together (what ``wellfault detect --tops --type-well`` runs), with the
    engine's call signature."""
    def run(well, col, trajectory, *, bed_dip, settings):
        from types import SimpleNamespace

        from wellfault.evidence.detect import analyse_well

        # a well that reaches no picked surface has no tops to give: curves alone, as a user
        # would run it
        res = analyse_well(well, col, tops=tops if len(tops) else None, trajectory=trajectory,
                           bed_dip=bed_dip, curves=settings)
        return SimpleNamespace(cuts=res.records)
    return run


def low_cases(label: str, log_seeds, seeds, *, stride: int = 0, **kw):
    """Cases on the low-character type logs ``log_seeds`` of each real log, wells ``seeds``.

    With ``stride`` the wells of the i-th degraded log are ``seeds`` + i * stride: each degraded
    log gets its own well geometries (the same seeds on every degraded log of a real log draw
    the same wells, so the cases are fewer independent samples than they look)."""
    seeds = list(seeds)
    if stride and len(seeds) > stride:
        raise ValueError(f"{len(seeds)} wells per degraded log: at most {stride} with "
                         f"stride {stride}")
    return [(label, low_name(log, k), low_name(log, k), int(s) + i * stride, kw)
            for log in REAL for i, k in enumerate(log_seeds) for s in seeds]


def cases(label: str, logs, seeds, dst=None, **kw):
    return [(label, log, dst(log) if dst else log, int(s), kw) for log in logs for s in seeds]


def unrelated(log: str) -> str:
    return REAL[(REAL.index(log) + 1) % len(REAL)]
