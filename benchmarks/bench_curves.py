"""Accuracy of the curve evidence on wells forward-modelled from REAL gamma-ray type logs.

Run:  python benchmarks/bench_curves.py [--per-log 70] [--invented 40] [--procs 2]
      [--methods engine dtw lag] [--stress 15] [--low 10] [--low-logs 3] [--save PREFIX]
      [--max-separation METRES]

The issue "Fault cuts from log curves" sets the goals this script checks: on >= 200
forward-modelled wells from type logs built on the real gamma-ray curves of
../shared/reference_data (P-129 Kennetcook, F03-02 North Sea, Wellington KGS 1-32; intervals and
why in wellfault.synth.real_logs.REAL_GR_LOGS), with noise 10-20 % of the log's robust spread, +-15 %
unit thickness, tool gain 0.8-1.25 and offset +-0.35 spread, vertical, deviated and high-angle
wells (wellfault.synth.real_logs.curve_scenario), 0-2 normal or reverse faults:

* recall >= 0.9 for |Δs| >= 5 m;
* cut depth error median <= 1 m, 90th percentile <= 3 m;
* |Δs| error median <= max(10 %, 1 m) (read per cut as error / max(0.1 |Δs|, 1 m), median <= 1);
* <= 0.1 false cuts per well;
* section and fault type right in >= 98 % of found cuts (fault type with the crossed fault's
  attitude given, where the well does not run within 0.5° of the fault plane);
* confidence calibrated: among cuts with confidence >= 0.9, at least 90 % real.

Three methods, scored by the same code (wellfault.synth.evaluation.score_scenario):

* ``engine`` — wellfault.evidence.curvecuts.find_cuts_from_curves (the DP alignment engine);
* ``dtw``    — the published baseline: monotone open-ended DTW of the same standardised, strat-
  resampled curves, cuts read from runs of skipped or stalled path steps
  (wellfault.evidence.curve_baselines.find_cuts_dtw_baseline). It cannot represent a repeat;
* ``lag``    — the cheap screen: tracked windowed-correlation lag + PELT change points
  (wellfault.evidence.curve_baselines.find_cuts_lag_screen), a cross-check.

Evaluation seeds are 0.. (the confidence was fitted on seeds 10000+ by
benchmarks/calibrate_confidence.py; tests/test_curve_accuracy.py uses seeds 500+). An invented
column (wellfault.synth.columns.synthetic_column) is run for contrast and reported apart. A stress
section reports, for the engine, wells aligned against an UNRELATED real type log (every cut is
false: how many are reported, how many confidently) and wells with two faults 10-60 m apart.
Times are wall seconds per well of each method alone on this machine (the header says which).

Low-character type logs (the issue "Curve evidence on logs with little character"): each real
log degraded ``--low-logs`` times (wellfault.synth.low_character.low_character_log: thick shales and
monotonous carbonates, casing attenuation, old-tool response, counting noise; degradation seeds
0+) with ``--low`` wells each (at most 100; seeds 40000 + 100 k + 0.. on the k-th degraded log,
its own wells; two-close-fault wells 30000 + 100 k + 0..; throws 5-110 m, |Δs| about
5-140 m), printed beside the
character-rich figures of the same run: curves alone; curves with tops (``wellfault detect
--tops --type-well``; recall counted where the cut lies between the first and last pick);
two faults 10-60 m apart; false cuts with confidence >= 0.9 and with |Δs| beyond the plausible
range (over 200 m here: 1.4 x the largest throw drawn; and beyond the plausible separation in
force, given with --max-separation or derived, CurveSettings); the confidence reliability table.
Not a test.
"""

from __future__ import annotations

import argparse
import os
import platform
import sys
import time
from multiprocessing import Pool
from pathlib import Path

import numpy as np
import pandas as pd

sys.path.insert(0, str(Path(__file__).resolve().parent))
import _curvecases as cc  # noqa: E402

BANDS = ((2.0, 5.0), (5.0, 10.0), (10.0, 20.0), (20.0, 40.0), (40.0, np.inf))
NAMES = {"engine": "ours (DP engine)", "dtw": "DTW baseline", "lag": "lag screen"}


def _one(args):
    case, methods, kw = args
    from wellfault.evidence.curve_settings import CurveSettings

    return case, cc.run_case(case, methods, CurveSettings.make(None, **kw) if kw else None)


def figures(rows: pd.DataFrame, det: pd.DataFrame, wells: int, secs: list[float],
            calibrated: bool = True) -> dict:
    """The issue's figures over a set of wells (rows/det concatenated over wells)."""
    f: dict = {"wells": wells}
    big = rows[rows["true_delta_s_m"].abs() >= 5.0] if len(rows) else rows
    f["true cuts |Δs|>=5 m"] = len(big)
    f["recall |Δs|>=5 m"] = big["found"].mean() if len(big) else np.nan
    for lo, hi in BANDS:
        b = rows[(rows["true_delta_s_m"].abs() >= lo) & (rows["true_delta_s_m"].abs() < hi)] \
            if len(rows) else rows
        name = f"  recall {lo:g}-{hi:g} m" if np.isfinite(hi) else f"  recall >= {lo:g} m"
        f[name] = f"{b['found'].mean():.3f} ({len(b)})" if len(b) else "-"
    found = big[big["found"]] if len(big) else big
    if len(found):
        md_err = (found["md_m"] - found["true_md_m"]).abs()
        ds_err = (found["delta_s_m"].abs() - found["true_delta_s_m"].abs()).abs()
        allowed = np.maximum(0.1 * found["true_delta_s_m"].abs(), 1.0)
        f["depth error median [m]"] = md_err.median()
        f["depth error p90 [m]"] = md_err.quantile(0.9)
        f["|Δs| error median [m]"] = ds_err.median()
        f["|Δs| error median [%]"] = 100 * (ds_err / found["true_delta_s_m"].abs()).median()
        f["|Δs| error / max(10%,1m), median"] = (ds_err / allowed).median()
        f["section right"] = (found["section"] == found["true_section"]).mean()
        clear = found[found["crossing_clear"].astype(bool)]
        f["fault type right (attitude given)"] = (clear["fault_type"] ==
                                                  clear["true_fault_type"]).mean()
        inside = (found["md_top_m"] <= found["true_md_m"]) & \
                 (found["true_md_m"] <= found["md_base_m"])
        f["bracket holds the true cut"] = inside.mean()
        f["bracket width median [m]"] = (found["md_base_m"] - found["md_top_m"]).median()
    f["false cuts / well"] = (~det["real"]).sum() / wells if len(det) else 0.0
    conf = det["confidence"].to_numpy(float) if len(det) and calibrated else np.zeros(0)
    hi = conf >= 0.9
    f["cuts with conf >= 0.9: real"] = (f"{det['real'][hi].mean():.3f} ({int(hi.sum())})"
                                        if hi.any() else "-")
    f["time / well [s]"] = float(np.mean(secs))
    return f


GOALS = [  # (figure, test, text)
    ("recall |Δs|>=5 m", lambda v: v >= 0.9, ">= 0.9"),
    ("depth error median [m]", lambda v: v <= 1.0, "<= 1 m"),
    ("depth error p90 [m]", lambda v: v <= 3.0, "<= 3 m"),
    ("|Δs| error / max(10%,1m), median", lambda v: v <= 1.0, "<= 1"),
    ("false cuts / well", lambda v: v <= 0.1, "<= 0.1"),
    ("section right", lambda v: v >= 0.98, ">= 0.98"),
    ("fault type right (attitude given)", lambda v: v >= 0.98, ">= 0.98"),
]


def _fmt(v) -> str:
    if isinstance(v, str):
        return v
    if isinstance(v, (int, np.integer)):
        return str(int(v))
    return "nan" if not np.isfinite(v) else f"{v:.3f}"


def table(figs: dict[str, dict], goals: bool = True) -> str:
    keys = list(next(iter(figs.values())).keys())
    for f in figs.values():
        keys += [k for k in f if k not in keys]
    w0 = max(len(k) for k in keys) + 2
    cols = list(figs)
    head = "".ljust(w0) + "".join(NAMES.get(c, c).rjust(20) for c in cols)
    head += "   goal" if goals else ""
    lines = [head, "-" * len(head)]
    for k in keys:
        line = k.ljust(w0) + "".join(_fmt(figs[c].get(k, "-")).rjust(20) for c in cols)
        g = [gg for gg in GOALS if gg[0] == k]
        if goals and g:
            v = figs[cols[0]].get(k, np.nan)
            ok = isinstance(v, (float, int, np.floating)) and np.isfinite(v) and g[0][1](v)
            line += f"   {g[0][2]} ({'met' if ok else 'NOT met'} by {NAMES.get(cols[0], cols[0])})"
        lines.append(line)
    return "\n".join(lines)


def collect(results, method):
    rows = [r[method][0] for _, r in results if method in r and len(r[method][0])]
    dets = [r[method][1] for _, r in results if method in r and len(r[method][1])]
    secs = [r[method][2] for _, r in results if method in r]
    rows = pd.concat(rows, ignore_index=True) if rows else pd.DataFrame(
        columns=["true_delta_s_m", "found"])
    det = pd.concat(dets, ignore_index=True) if dets else pd.DataFrame(
        columns=["real", "confidence"])
    return rows, det, secs


def main(argv=None) -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--per-log", type=int, default=70, help="wells per real type log")
    ap.add_argument("--invented", type=int, default=40, help="wells on the invented column")
    ap.add_argument("--stress", type=int, default=15, help="stress wells per real log and kind")
    ap.add_argument("--methods", nargs="+", default=["engine", "dtw", "lag"])
    ap.add_argument("--low", type=int, default=10, help="wells per low-character type log")
    ap.add_argument("--low-logs", type=int, default=3,
                    help="low-character type logs per real log")
    ap.add_argument("--procs", type=int, default=2)
    ap.add_argument("--save", default="", help="write the per-cut tables as PREFIX_*.csv")
    ap.add_argument("--max-separation", type=float, default=None, metavar="METRES",
                    help="the plausible separation given, as a user who knows the field "
                         "would (default: derived, CurveSettings)")
    a = ap.parse_args(argv)
    from wellfault.synth.evaluation import reliability_table

    methods = tuple(a.methods)
    real = cc.cases("real", cc.REAL, range(a.per_log))
    inv = cc.cases("invented", [cc.INVENTED], range(a.invented))
    unrel = cc.cases("unrelated", cc.REAL, range(20000, 20000 + a.stress), dst=cc.unrelated)
    close = cc.cases("close", cc.REAL, range(21000, 21000 + a.stress), min_faults=2,
                     fault_gap_m=(10.0, 60.0), fault_clearance_m=15.0)
    # each degraded log its own wells (stride 100): until 2026-12-05 every degraded log of a real
    # log took the same wells 0.. (and the close-fault wells 30000..), 30 geometries in 90 wells
    low = cc.low_cases("low", range(a.low_logs), range(40000, 40000 + a.low), stride=100)
    lowclose = cc.low_cases("lowclose", range(a.low_logs), range(30000, 30000 + a.low // 2),
                            stride=100, close_faults=True)
    kw = {} if a.max_separation is None else {"max_separation_m": a.max_separation}
    jobs = [(c, methods, kw) for c in real + inv]
    jobs += [(c, ("engine",), kw) for c in unrel + close]
    jobs += [(c, ("engine", "tops"), kw) for c in low] + [(c, ("engine",), kw) for c in lowclose]
    t0 = time.time()
    with Pool(a.procs) as pool:
        results = pool.map(_one, jobs, chunksize=1)
    wall = time.time() - t0
    by = {lab: [(c, r) for c, r in results if c[0] == lab]
          for lab in ("real", "invented", "unrelated", "close", "low", "lowclose")}

    print(f"wellfault curve evidence benchmark — {platform.platform()}, "
          f"{os.cpu_count()} CPUs, {a.procs} processes, {wall:.0f} s wall"
          + ("" if a.max_separation is None else
             f"; plausible separation given: {a.max_separation:g} m"))
    print(f"real gamma-ray type logs: {', '.join(cc.REAL)} ({a.per_log} wells each, "
          f"seeds 0-{a.per_log - 1}); cut counted found when its bracket (+-1 m) holds the "
          "true cut\n")
    figs = {}
    for m in methods:
        rows, det, secs = collect(by["real"], m)
        figs[m] = figures(rows, det, len(by["real"]), secs, calibrated=m == "engine")
    print(f"== {len(by['real'])} wells on the three REAL gamma-ray type logs ==")
    print(table(figs))

    rows, det, secs = collect(by["real"], "engine")
    print("\n== ours, by type log and by trajectory ==")
    per = {}
    for log in cc.REAL:
        r = rows[rows["log"] == log]
        d = det[det["log"] == log] if len(det) else det
        per[log] = figures(r, d, a.per_log, secs)
    for kind in ("vertical", "deviated", "high-angle"):
        r = rows[rows["kind"] == kind]
        d = det[det["kind"] == kind] if len(det) else det
        n = sum(1 for c, res in by["real"]
                if len(res["engine"][0]) and res["engine"][0]["kind"].iloc[0] == kind
                or len(res["engine"][1]) and res["engine"][1]["kind"].iloc[0] == kind)
        per[kind] = figures(r, d, max(n, 1), secs)
    keep = ["true cuts |Δs|>=5 m", "recall |Δs|>=5 m", "depth error median [m]",
            "depth error p90 [m]", "|Δs| error median [m]", "false cuts / well",
            "section right", "fault type right (attitude given)", "bracket holds the true cut"]
    print(table({k: {kk: v[kk] for kk in keep if kk in v} for k, v in per.items()},
                goals=False))

    print("\n== confidence reliability, ours, real-log evaluation wells "
          "(calibrated on seeds 10000+) ==")
    print(reliability_table(det["confidence"], det["real"].astype(bool)).to_string(index=False))

    if by["invented"]:
        figs_i = {}
        for m in methods:
            r, d, s = collect(by["invented"], m)
            figs_i[m] = figures(r, d, len(by["invented"]), s, calibrated=m == "engine")
        print(f"\n== contrast: {len(by['invented'])} wells on the INVENTED column ==")
        print(table(figs_i, goals=False))

    if by["low"]:
        low_section(by, figs.get("engine"))
    if not by["close"] or not by["unrelated"]:
        _save(a.save, methods, by)
        return
    print("\n== stress, ours ==")
    r, d, s = collect(by["close"], "engine")
    fc = figures(r, d, len(by["close"]), s)
    print(f"two faults 10-60 m of MD apart ({len(by['close'])} wells): recall |Δs|>=5 m "
          f"{_fmt(fc['recall |Δs|>=5 m'])} of {fc['true cuts |Δs|>=5 m']}, false cuts/well "
          f"{_fmt(fc['false cuts / well'])}, depth error median "
          f"{_fmt(fc.get('depth error median [m]', np.nan))} m, cuts with conf >= 0.9 real: "
          f"{fc['cuts with conf >= 0.9: real']}")
    print(block_split(r, "two faults 10-60 m of MD apart, recall by the block's section"))
    _, du, _ = collect(by["unrelated"], "engine")
    nu = len(by["unrelated"])
    conf = du["confidence"].to_numpy(float) if len(du) else np.zeros(0)
    print(f"wells aligned to an UNRELATED real type log ({nu} wells; every cut is false): "
          f"{len(du) / nu:.1f} cuts/well reported, {np.sum(conf >= 0.5) / nu:.2f}/well with "
          f"confidence >= 0.5, {np.sum(conf >= 0.9) / nu:.2f}/well with confidence >= 0.9")
    both = pd.concat([det[["confidence", "real"]], du[["confidence", "real"]]],
                     ignore_index=True)
    print("reliability, real-log evaluation wells + unrelated wells together:")
    print(reliability_table(both["confidence"], both["real"].astype(bool))
          .to_string(index=False))

    _save(a.save, methods, by)


def block_split(rows: pd.DataFrame, title: str) -> str:
    """Recall (|Δs| >= 5 m) of close-fault wells split by the section of the block between the
    two faults (_curvecases.block_section_m): under 20 m of section it costs less misfit than
    a second jump (DEVELOPERS.md, known limits)."""
    if "block_m" not in rows:
        return f"{title}: -"
    big = rows[rows["true_delta_s_m"].abs() >= 5.0]
    parts = []
    for name, keep in (("< 20 m", big["block_m"] < 20.0), (">= 20 m", big["block_m"] >= 20.0)):
        b = big[keep]
        parts.append(f"block {name}: {b['found'].mean():.3f} of {len(b)}" if len(b)
                     else f"block {name}: -")
    return f"{title}: " + ", ".join(parts)


PLAUSIBLE_M = 200.0    # |Δs| beyond this is implausible for these wells (1.4 x the largest throw)

LOW_GOALS = [  # (figure, test, text) of the issue "Curve evidence on logs with little character"
    ("recall |Δs|>=5 m", lambda v: v >= 0.85, ">= 0.85 (curves alone)"),
    ("false cuts / well", lambda v: v <= 0.1, "<= 0.1 (curves alone)"),
    ("false cuts with conf >= 0.9", lambda v: v == 0, "none"),
    ("false cuts beyond the range in force", lambda v: v == 0,
     "none beyond the plausible separation in force"),
]


def low_figures(rows, det, wells, secs) -> dict:
    f = figures(rows, det, wells, secs)
    false = det[~det["real"].astype(bool)] if len(det) else det
    f["false cuts with conf >= 0.9"] = int((false["confidence"] >= 0.9).sum()) if len(det) else 0
    f["false cuts |Δs| > 200 m"] = int((false["delta_s_m"].abs() > PLAUSIBLE_M).sum()) \
        if len(det) else 0
    f["false cuts beyond the range in force"] = int(false["beyond"].sum()) \
        if len(det) and "beyond" in false else 0
    return f


def low_section(by, rich: dict | None) -> None:
    """The low-character figures beside the character-rich ones of the same run."""
    from wellfault.synth.evaluation import reliability_table

    nl = len(by["low"])
    cols = {}
    if rich is not None:
        cols["rich, curves"] = rich
    r, d, s = collect(by["low"], "engine")
    cols["low, curves"] = low_figures(r, d, nl, s)
    rt, dt, st = collect(by["low"], "tops")
    cols["low, curves+tops"] = low_figures(rt, dt, nl, st)
    if by["lowclose"]:
        rc, dc, sc = collect(by["lowclose"], "engine")
        cols["low, 2 close faults"] = low_figures(rc, dc, len(by["lowclose"]), sc)
    print(f"\n== LOW-CHARACTER type logs: {nl} wells ({nl // len(cc.REAL)} per real log, "
          "degraded; curves+tops recall counted between the first and last pick) ==")
    keep = ["wells", "true cuts |Δs|>=5 m", "recall |Δs|>=5 m", "  recall 5-10 m",
            "  recall 10-20 m", "  recall 20-40 m", "  recall >= 40 m", "depth error median [m]",
            "|Δs| error / max(10%,1m), median", "false cuts / well",
            "false cuts with conf >= 0.9", "false cuts |Δs| > 200 m",
            "false cuts beyond the range in force",
            "cuts with conf >= 0.9: real", "time / well [s]"]
    print(table({k: {kk: v.get(kk, "-") for kk in keep} for k, v in cols.items()},
                goals=False))
    low = cols["low, curves"]
    for k, test, text in LOW_GOALS:
        v = low[k]
        print(f"  goal {k}: {text} -> {_fmt(v)} ({'met' if test(v) else 'NOT met'})")
    v = cols["low, curves+tops"]
    rec = v["recall |Δs|>=5 m"]
    print(f"  goal curves+tops recall |Δs|>=5 m between picks >= 0.95 -> "
          f"{_fmt(rec)} ({'met' if rec >= 0.95 else 'NOT met'})"
          f"; false cuts/well <= 0.05 -> {_fmt(v['false cuts / well'])} "
          f"({'met' if v['false cuts / well'] <= 0.05 else 'NOT met'})")
    if by["lowclose"]:
        v = cols["low, 2 close faults"]["recall |Δs|>=5 m"]
        print(f"  goal two close faults recall >= 0.9 -> {_fmt(v)} "
              f"({'met' if v >= 0.9 else 'NOT met'})")
        print("  " + block_split(rc, "low, two close faults, recall by the block's section"))
    false = d[~d["real"].astype(bool)] if len(d) else d
    if len(false):
        print("  false cuts (curves alone), |Δs| m: "
              + ", ".join(f"{abs(x):.0f}" for x in sorted(false["delta_s_m"].abs())))
    print("\nreliability, low-character wells, curves alone (predicted confidence bins vs "
          "observed fraction real):")
    print(reliability_table(d["confidence"], d["real"].astype(bool)).to_string(index=False))


def _save(prefix, methods, by):
    if prefix:
        for m in methods:
            r, d, _ = collect(by["real"], m)
            r.to_csv(f"{prefix}_{m}_rows.csv", index=False)
            d.to_csv(f"{prefix}_{m}_cuts.csv", index=False)


if __name__ == "__main__":
    main()
