"""While drilling: alert latency, false alerts, agreement with the batch command, update cost.

Wells are forward-modelled (:func:`wellfault.synth.scenarios.random_scenario`: vertical, deviated and
high-angle; bed dips 0-25°; 0-2 faults, normal and reverse, throws 5-80 m; unit thickness
+-10 %; GR noise 5 API, tool gain 0.8-1.25 and offset +-15 API) through two kinds of reference
column: invented ones (:func:`wellfault.synth.columns.synthetic_column`) and ones whose type log is a
real gamma ray (P-129 Kennetcook 290-1900 m, and Wellington KGS 1-32, from
``../shared/reference_data``, when present). Each well is drilled sample by sample through a
:class:`wellfault.live.watch.WellWatcher` (default settings), then finished (whole-well check).

Reported:

* latency — metres of new hole between the true cut (first sample below it) and the bit MD at
  the alert, by |Δs| band and by trajectory kind (median, 90th percentile); also in strat
  metres (latency × |t·n|);
* recall — true cuts alerted while drilling (an alert matches a true cut of the same sense
  within 10 m of MD);
* false alerts — alerts matching no true cut (per well, per km of hole), retractions;
* batch agreement — the alerts standing when the hole is finished (before the whole-well check)
  against the batch cut table (``find_cuts_from_curves``, confidence >= ``min_confidence``)
  on the finished log: matched / alert only / batch only; after the whole-well check the watcher
  holds the batch table by construction (checked);
* update cost — CPU time per sample of ``feed`` one row at a time, against the type-log length
  (2,000 / 5,000 / 10,000 samples), split into the engine's push and the rest, with the largest
  single call (wall; the calibration re-runs), and the same fed 1 m at a time.

* possible cuts (the break detector, :mod:`wellfault.live.watch_breaks`) on the same wells: the cuts
  |Δs| >= 20 m warned of (a possible cut within 10 m of MD), warned before the correlation's
  alert, the latency in hole and strat by r band; false warnings per km of hole and how far
  below their break they were withdrawn; and the update cost against the same feed without
  the detector (the peer, and the ratio).

Goals (issue 13, restated): latency in strat (hole x r) median <= 5 m, p90 <= 12 m for
|Δs| >= 10 m; in hole p90 <= 20 m where |r| >= 0.7; no alert before the cut; at most 1 in 10
cuts missed (listed). Possible cuts in high-angle wells (|r| < 0.4), |Δs| >= 20 m: latency p90
<= 20 m of hole, >= 80 % warned before the correlation's alert; false warnings <= 0.3 per km,
each withdrawn within 50 m of hole; update <= 1 ms per sample (p50); the correlation's figures
unchanged. ``--calibrate-breaks`` scores the possible-cut rule on calibration wells (seeds
10000+), fits its confidence and prints how many high-angle cuts show a break at all.

What sets the latency: the alert needs enough stratigraphy drilled below the cut for the type
log to tell the fault's two positions apart — a few metres of strat where the log has
character, tens in a plain interval (right after a cut the well often matches both the
hanging-wall continuation and the footwall; see DEVELOPERS.md, "While drilling"). A well
drills r = |t·n| metres of strat per metre of hole, so in metres of hole the latency grows as
1/r. The table's ``TST`` columns (latency × r) and its r bands show it: about 5 m of strat at
the median for every r, so the MD goal holds where r >= 0.7 (vertical and moderately deviated
wells) and cannot hold for a high-angle well at a low angle to bedding (r < 0.2: 20 m of hole
is under 4 m of strat).

Run:  python benchmarks/bench_watch.py [--wells 30] [--real-wells 16] [--sizes 2000 5000 10000]
CPU times are process CPU time (the machine may be shared); the header prints the machine. Not
a test.
"""

from __future__ import annotations

import argparse
import itertools
import os
import platform
import sys
import time
from pathlib import Path

import numpy as np
import pandas as pd

from wellfault.evidence.curve_settings import CurveSettings
from wellfault.evidence.curvecuts import find_cuts_from_curves
from wellfault.synth.structure import Beds, PlanarFault
from wellfault.synth.columns import column_from_real_curve, synthetic_column
from wellfault.synth.forward import simulate_well
from wellfault.synth.scenarios import random_scenario
from wellfault.live.watch import WatchSettings, WellWatcher

REF = Path(os.environ.get("WELLFAULT_REFERENCE_DATA",
                          Path(__file__).resolve().parents[2] / "shared" / "reference_data"))
#: A possible cut whose break lies within this MD of a true cut warned of it.
POSSIBLE_TOL_M = 10.0
BANDS = [(2.0, 5.0), (5.0, 10.0), (10.0, 20.0), (20.0, 40.0), (40.0, np.inf)]


def real_column(file: str, a_m: float, b_m: float, name: str):
    """Type log = the real GR of ``file`` between a and b m (regular grid, gaps bridged)."""
    from wellfault.io import read_las

    well = read_las(REF / file)
    md = well.curves.index.to_numpy(float)
    gr = well.curves["GR"].to_numpy(float)
    sel = (md >= a_m) & (md <= b_m) & np.isfinite(gr)
    md, gr = md[sel], gr[sel]
    ds = float(np.median(np.diff(md)))
    grid = np.arange(md[0], md[-1] + 1e-9, ds)
    return column_from_real_curve(np.interp(grid, md, gr), ds, surfaces_every_m=50.0,
                                  name_prefix=name[:3].upper() + "-", name=name)


def drill(sc, settings: WatchSettings):
    """Feed the scenario's well row by row; returns the per-well records."""
    well = sc.well
    md = well.curves.index.to_numpy(float)
    x = well.curves["GR"].to_numpy(float)
    w = WellWatcher(sc.column, sc.trajectory, sc.bed_dip, settings=settings,
                    well_name=well.name)
    alerts, retracted, possible = [], [], {}

    def note(events, final=False):
        for e in events:
            if e.kind == "cut" and e.possible is not None:
                possible[e.cut_id]["confirmed"] = e.bit_md_m
            if final and e.kind != "possible_cut":
                continue            # the whole-well check's changes are not alerts
            if e.kind == "cut":
                alerts.append((e.cut_id, e.bit_md_m, e.cut))
            elif e.kind == "cut-revised" and e.change == "retracted":
                retracted.append(e.cut_id)
            elif e.kind == "possible_cut" and e.possible.status == "raised":
                possible[e.cut_id] = dict(md=e.possible.break_md_m, bit=e.bit_md_m,
                                          withdrawn=None, confirmed=None)
            elif e.kind == "possible_cut":
                possible[e.cut_id]["withdrawn"] = e.bit_md_m

    t_cpu = time.process_time()
    for i in range(md.size):
        note(w.feed(md[i], [x[i]]))
    cpu = time.process_time() - t_cpu
    standing = list(w.cuts)
    fin = w.finish(reconcile=True)
    note(fin, final=True)
    final_ok = None
    if w.final_cuts is not None:
        final = [c for c in w.cuts]
        conf = w.final_cuts[w.final_cuts["confidence"] >= settings.min_confidence]
        final_ok = len(final) == len(conf) and all(
            abs(a.md_m - b) < 1e-6 for a, b in zip(sorted(final, key=lambda c: c.md_m),
                                                      conf["md_m"].sort_values()))
    del fin
    return dict(md=md, alerts=alerts, retracted=retracted, standing=standing, cpu=cpu,
                final_ok=final_ok, possible=list(possible.values()))


def match(truth: pd.DataFrame, cuts, tol_m: float = 10.0):
    """Greedy: each true cut takes the nearest unused cut of the same sense within tol_m."""
    used, out = set(), {}
    for k, t in truth.iterrows():
        best = None
        for q, c in enumerate(cuts):
            if q in used or np.sign(c.delta_s_m) != np.sign(t["delta_s_m"]):
                continue
            d = abs(c.md_m - t["md_m"])
            if d <= tol_m and (best is None or d < abs(cuts[best].md_m - t["md_m"])):
                best = q
        if best is not None:
            used.add(best)
            out[k] = best
    return out, [q for q in range(len(cuts)) if q not in used]


def _accuracy_one(args):
    label, seed, settings = args
    column = _columns()[label]
    sc = random_scenario(seed, column)
    res = drill(sc, settings)
    truth = sc.truth[sc.truth["tst_m"] >= 2.0].reset_index(drop=True)
    cuts = [a[2] for a in res["alerts"]]
    hit, false = match(truth, cuts)
    rows = []
    pcs = res["possible"]
    warned_true = set()
    for k, t in truth.iterrows():
        qk = hit.get(k)
        lat = res["alerts"][qk][1] - t["md_first_below_m"] if qk is not None else np.nan
        near = [q for q, p in enumerate(pcs) if abs(p["md"] - t["md_m"]) <= POSSIBLE_TOL_M]
        warned_true.update(near)
        p_bit = min((pcs[q]["bit"] for q in near), default=np.nan)
        rows.append(dict(column=label, seed=seed, kind=sc.kind, ds=abs(t["delta_s_m"]),
                         r=abs(t["r"]), latency=lat, found=qk is not None,
                         retracted=qk is not None and res["alerts"][qk][0] in res["retracted"],
                         p_latency=p_bit - t["md_first_below_m"],
                         p_before=bool(np.isfinite(p_bit) and (qk is None or
                                                               p_bit < res["alerts"][qk][1]))))
    p_false = [p for q, p in enumerate(pcs) if q not in warned_true]
    batch = find_cuts_from_curves(sc.well, column, sc.trajectory, bed_dip=sc.bed_dip,
                                  settings=CurveSettings()).cuts
    batch = [c for c in batch if c.confidence >= settings.min_confidence]
    bh, live_only = match(pd.DataFrame({"md_m": [c.md_m for c in batch],
                                        "delta_s_m": [c.delta_s_m for c in batch]}),
                          res["standing"], tol_m=5.0)
    well = dict(column=label, seed=seed, kind=sc.kind, n=res["md"].size,
                km=(res["md"][-1] - res["md"][0]) / 1000.0, false=len(false),
                false_standing=sum(1 for f in false if res["alerts"][f][0]
                                   not in res["retracted"]),
                retractions=len(res["retracted"]), batch=len(batch), batch_matched=len(bh),
                live_only=len(live_only), final_ok=res["final_ok"],
                p_raised=len(pcs), p_false=len(p_false),
                p_true_withdrawn=sum(1 for q in warned_true if pcs[q]["withdrawn"] is not None),
                p_confirmed=sum(p["confirmed"] is not None for p in pcs),
                p_false_withdraw=[(p["withdrawn"] - p["md"]) if p["withdrawn"] is not None
                                  else np.inf for p in p_false],
                cpu_per_sample_ms=1e3 * res["cpu"] / res["md"].size,
                line=f"  {label:<10} seed {seed:4d} {sc.kind:<10} {len(truth)} cut(s), "
                     f"{len(cuts)} alert(s), {len(false)} false, {len(pcs)} possible "
                     f"({len(p_false)} false), batch {len(bh)}/{len(batch)} "
                     f"matched, {1e3 * res['cpu'] / res['md'].size:.2f} ms/sample")
    return rows, well


def accuracy(jobs, settings: WatchSettings, procs: int):
    from multiprocessing import Pool

    with Pool(procs) as pool:
        out = pool.map(_accuracy_one, [(lab, seed, settings) for lab, seed in jobs],
                       chunksize=1)
    for _, well in out:
        print(well.pop("line"))
    return (pd.DataFrame([r for rows, _ in out for r in rows]),
            pd.DataFrame([w for _, w in out]))


def q(v, p):
    v = np.asarray(v, float)
    v = v[np.isfinite(v)]
    return float(np.percentile(v, p)) if v.size else np.nan


def print_accuracy(cuts: pd.DataFrame, wells: pd.DataFrame) -> None:
    print("\nlatency: metres of new hole from the true cut to the alert (alerted cuts)")
    print(f"{'subset':<30}{'cuts':>6}{'recall':>8}{'median m':>10}{'p90 m':>8}{'max m':>8}"
          f"{'TST median':>12}{'TST p90':>9}")

    def line(name, d):
        found = d[d.found]
        print(f"{name:<30}{len(d):>6}{(d.found.mean() if len(d) else np.nan):>8.2f}"
              f"{q(found.latency, 50):>10.1f}{q(found.latency, 90):>8.1f}"
              f"{(found.latency.max() if len(found) else np.nan):>8.1f}"
              f"{q(found.latency * found.r, 50):>12.1f}{q(found.latency * found.r, 90):>9.1f}")

    line("all", cuts)
    for lo, hi in BANDS:
        line(f"|Δs| {lo:g}-{hi:g} m", cuts[(cuts.ds >= lo) & (cuts.ds < hi)])
    big = cuts[cuts.ds >= 10]
    line("|Δs| >= 10 m", big)
    for kind in sorted(cuts.kind.unique()):
        line(f"|Δs| >= 10 m, {kind}", big[big.kind == kind])
    for col in sorted(cuts.column.unique()):
        line(f"|Δs| >= 10 m, {col}", big[big.column == col])
    # r = |t·n|, metres of strat per metre of hole: the log shows r m of stratigraphy for each
    # metre drilled, so the hole needed to see a cut grows as 1/r
    for lo, hi in ((0.7, 1.01), (0.4, 0.7), (0.2, 0.4), (0.0, 0.2)):
        line(f"|Δs| >= 10 m, r {lo:g}-{min(hi, 1):g}", big[(big.r >= lo) & (big.r < hi)])
    early = big[big.found & (big.latency <= 0)]
    print(f"\nalerts at or above the true cut (|Δs| >= 10 m): {len(early)}")
    missed = big[~big.found]
    print(f"missed cuts |Δs| >= 10 m: {len(missed)} of {len(big)}"
          + "".join(f"\n  {m.column:<10} seed {m.seed:4d} {m.kind:<10} |Δs| {m.ds:5.1f} m, "
                    f"r {m.r:.2f}" for m in missed.itertuples()))
    km = wells.km.sum()
    print(f"\nfalse alerts: {wells.false.sum()} on {len(wells)} wells ({km:.1f} km of hole): "
          f"{wells.false.sum() / len(wells):.3f} per well, {wells.false.sum() / km:.3f} per km; "
          f"{wells.false_standing.sum()} still standing at the end; "
          f"{wells.retractions.sum()} retraction(s) in all")
    print(f"batch agreement (standing alerts vs batch cuts with confidence >= threshold, "
          f"5 m): {wells.batch_matched.sum()}/{wells.batch.sum()} batch cuts matched, "
          f"{wells.live_only.sum()} alert(s) not in the batch table; after the whole-well "
          f"check: {int(wells.final_ok.fillna(False).sum())}/{len(wells)} wells hold exactly "
          "the batch cuts")
    print_possible(cuts, wells)
    sizes = {k: len(c.type_log) for k, c in _columns().items()}
    print(f"feed cost on these wells: median {wells.cpu_per_sample_ms.median():.3f} ms/sample, "
          f"90th percentile {q(wells.cpu_per_sample_ms, 90):.3f} (CPU, one row at a time; type "
          f"logs of {', '.join(f'{k} {v}' for k, v in sizes.items())} samples)")


def print_possible(cuts: pd.DataFrame, wells: pd.DataFrame) -> None:
    """The break detector's figures, from the same wells as the correlation's."""
    print("\npossible cuts (breaks much sharper than the type log predicts): latency in metres "
          "of new hole from the true cut to the possible_cut event (and x r: strat)")
    print(f"{'subset':<30}{'cuts':>6}{'warned':>8}{'before':>8}{'median m':>10}{'p90 m':>8}"
          f"{'TST med':>9}{'TST p90':>9}")
    big = cuts[cuts.ds >= 20]

    def line(name, d):
        w = d[np.isfinite(d.p_latency)]
        print(f"{name:<30}{len(d):>6}{np.isfinite(d.p_latency).mean() if len(d) else np.nan:>8.2f}"
              f"{d.p_before.mean() if len(d) else np.nan:>8.2f}{q(w.p_latency, 50):>10.1f}"
              f"{q(w.p_latency, 90):>8.1f}{q(w.p_latency * w.r, 50):>9.1f}"
              f"{q(w.p_latency * w.r, 90):>9.1f}")

    line("|Δs| >= 20 m", big)
    for lo, hi in ((0.7, 1.01), (0.4, 0.7), (0.2, 0.4), (0.0, 0.2), (0.0, 0.4)):
        line(f"|Δs| >= 20 m, r {lo:g}-{min(hi, 1):g}", big[(big.r >= lo) & (big.r < hi)])
    km = wells.km.sum()
    dist = np.array([d for v in wells.p_false_withdraw for d in v], float)
    print(f"possible cuts: {wells.p_raised.sum()} raised, {wells.p_confirmed.sum()} confirmed by "
          f"the correlation; false warnings (no true cut within {POSSIBLE_TOL_M:g} m): "
          f"{wells.p_false.sum()} on {km:.1f} km of hole = {wells.p_false.sum() / km:.3f} per "
          f"km; withdrawn within 50 m of hole: {int(np.sum(dist <= 50.0))}/{dist.size} "
          f"(largest {np.max(dist) if dist.size else np.nan:.1f} m); warnings at a true cut "
          f"withdrawn (the correlation had not raised it in time): "
          f"{wells.p_true_withdrawn.sum()}")


def cost(sizes, n_samples: int = 4000) -> None:
    print(f"\nupdate cost: a vertical well of min({n_samples}, 0.8 M) samples (0.1524 m) with two "
          "faults, fed one row at a time (and 1 m at a time), CPU ms per sample; peer: the "
          "same row-at-a-time feed without the break detector (breaks=False), and the ratio")
    print(f"{'type log M':>10}{'DP cols':>9}{'feed/row':>10}{'push':>8}{'rest':>8}"
          f"{'max call ms':>12}{'feed/1 m':>10}{'no breaks':>12}{'ratio':>7}")
    for m in sizes:
        n = min(n_samples, int(0.8 * m))
        ds = 0.1524
        n_units = 20
        t = m * ds / n_units
        col = synthetic_column(n_units, seed=5, ds=ds, thickness_range_m=(t, t))
        col = col.with_type_log(col.type_log.iloc[:m])
        top = 300.0
        beds = Beds(0.0, 0.0, origin_s_m=-top)
        faults = [PlanarFault.dip_slip(60.0, 90.0, (0.0, 0.0, top + 0.3 * n * ds), 15.0),
                  PlanarFault.dip_slip(30.0, 270.0, (0.0, 0.0, top + 0.7 * n * ds), 12.0,
                                       kind="reverse")]
        syn = simulate_well(col, beds, faults, None, md_top_m=top + 5,
                            md_base_m=top + 5 + (n - 1) * ds, noise_std=3.0, seed=1)
        md = syn.well.curves.index.to_numpy(float)
        x = syn.well.curves["GR"].to_numpy(float)
        w = WellWatcher(col, syn.trajectory, "0/0")
        w.feed(md[:20], x[:20, None])
        push_cpu = [0.0]
        al_push = type(w._al).push

        def timed_push(self, *a, **k):
            t0 = time.process_time()
            al_push(self, *a, **k)
            push_cpu[0] += time.process_time() - t0

        type(w._al).push = timed_push
        worst = 0.0
        t0 = time.process_time()
        for i in range(20, md.size):
            t1 = time.perf_counter()
            w.feed(md[i], [x[i]])
            worst = max(worst, time.perf_counter() - t1)
        cpu = (time.process_time() - t0) / (md.size - 20)
        type(w._al).push = al_push
        w2 = WellWatcher(col, syn.trajectory, "0/0")
        k = int(round(1.0 / ds))
        t0 = time.process_time()
        for i in range(0, md.size, k):
            w2.feed(md[i:i + k], x[i:i + k, None])
        cpu_b = (time.process_time() - t0) / md.size
        # the peer: the same feed without the break detector (correlation alone)
        w3 = WellWatcher(col, syn.trajectory, "0/0", settings=WatchSettings(breaks=False))
        t0 = time.process_time()
        for i in range(md.size):
            w3.feed(md[i], [x[i]])
        cpu_nb = (time.process_time() - t0) / md.size
        cols = w.engine._prepared()["lo_t"].shape[1]
        pu = push_cpu[0] / (md.size - 20)
        print(f"{m:>10}{cols:>9}{1e3 * cpu:>10.3f}{1e3 * pu:>8.3f}{1e3 * (cpu - pu):>8.3f}"
              f"{1e3 * worst:>12.1f}{1e3 * cpu_b:>10.3f}{1e3 * cpu_nb:>12.3f}"
              f"{cpu / cpu_nb:>7.2f}", flush=True)


# ---------------------------------------------------------------------------- calibration
CAL_SEEDS = {"invented": 10000, "invented2": 11000, "P-129 GR": 12000, "Wellington": 13000}


def _log_checks(args):
    """Drill one calibration well logging every evidence check of a due candidate (no alert)."""
    label, seed, jump_penalty = args
    column = _columns()[label]
    log = []

    class Logger(WellWatcher):
        def _strong(self, jmp, stable_rows):
            log.append(dict(bit=float(self._md.a[self._n - 1]), md=jmp.md, ds=jmp.ds_m,
                            margin=jmp.margin, corr=jmp.correlation, conf=jmp.confidence,
                            rows_below=self._al.n_rows - jmp.row, stable=stable_rows,
                            cal=self._calibrated))
            return False

    sc = random_scenario(seed, column)
    md = sc.well.curves.index.to_numpy(float)
    x = sc.well.curves["GR"].to_numpy(float)
    st = WatchSettings(confirm_rows=4, recheck_m=0.5, jump_penalty=jump_penalty)
    w = Logger(sc.column, sc.trajectory, sc.bed_dip, settings=st)
    for i in range(md.size):
        w.feed(md[i], [x[i]])
    truth = [t for t in sc.truth.to_dict("records") if abs(t["delta_s_m"]) >= 2.0]
    return dict(well=f"{label} {seed}", kind=sc.kind, truth=truth, log=log)


_COLS: dict = {}


def _columns() -> dict:
    if not _COLS:
        _COLS["invented"] = synthetic_column(14, seed=3, pad_m=100.0)
        _COLS["invented2"] = synthetic_column(16, seed=8, pad_m=100.0)
        if (REF / "P-129_Kennetcook2.las").is_file():
            _COLS["P-129 GR"] = real_column("P-129_Kennetcook2.las", 290.0, 1900.0, "P-129 GR")
            _COLS["Wellington"] = real_column("Wellington_KGS_1-32.las", 200.0, 1590.0,
                                              "Wellington GR")
    return _COLS


def _first_alerts(run, rule):
    """Alerts a rule would raise on one logged well: the first passing check of each candidate
    (one alert per sense within 10 m of MD)."""
    alerts = []
    for e in run["log"]:
        if not (e["cal"] and rule(e)):
            continue
        if any(np.sign(a["ds"]) == np.sign(e["ds"]) and abs(a["md"] - e["md"]) <= 10.0
               for a in alerts):
            continue
        alerts.append(e)
    return alerts


def calibrate(n_inv: int, n_real: int, jump_penalty, procs: int) -> None:
    """Collect evidence checks on calibration wells, then score alert rules on them."""
    from multiprocessing import Pool

    jobs = [(lab, CAL_SEEDS[lab] + k, jump_penalty) for lab in ("invented", "invented2")
            for k in range(n_inv)]
    if "P-129 GR" in _columns():
        jobs += [(lab, CAL_SEEDS[lab] + k, jump_penalty) for lab in ("P-129 GR", "Wellington")
                 for k in range(n_real)]
    with Pool(procs) as pool:
        runs = pool.map(_log_checks, jobs, chunksize=1)
    pen = jump_penalty or f"{WatchSettings().live_jump_factor:g} x the batch's"
    print(f"calibration: {len(runs)} wells (seeds 10000+), live jump penalty {pen}; "
          f"{sum(len(r['log']) for r in runs)} evidence checks")
    print(f"{'corr >=':>8}{'margin >=':>10}{'stable >=':>10}{'recall':>8}{'median m':>10}"
          f"{'p90 m':>8}{'false':>7}  median by kind")
    for c in (0.8, 0.85, 0.9):
        for m in (0.0, 3.0, 6.0):
            for k in (4, 6, 8, 12):
                def rule(e, c=c, m=m, k=k):
                    return e["corr"] >= c and e["margin"] >= m and e["stable"] >= k
                lat, by, false = [], {}, 0
                for run in runs:
                    alerts = _first_alerts(run, rule)
                    used = set()
                    for t in run["truth"]:
                        hit = [q for q, a in enumerate(alerts) if q not in used and
                               np.sign(a["ds"]) == np.sign(t["delta_s_m"]) and
                               abs(a["md"] - t["md_m"]) <= 10.0]
                        if hit:
                            used.add(hit[0])
                        if abs(t["delta_s_m"]) >= 10.0:
                            v = alerts[hit[0]]["bit"] - t["md_first_below_m"] if hit else np.nan
                            lat.append(v)
                            by.setdefault(run["kind"], []).append(v)
                    false += len(alerts) - len(used)
                lat = np.array(lat)
                kinds = " ".join(f"{kd} {q(v, 50):.1f}" for kd, v in sorted(by.items()))
                print(f"{c:>8.2f}{m:>10.1f}{k:>10d}{np.isfinite(lat).mean():>8.2f}"
                      f"{q(lat, 50):>10.1f}{q(lat, 90):>8.1f}{false:>7d}  {kinds}", flush=True)


def _log_breaks(args):
    """Drill one calibration well logging every break the possible-cut rule judges."""
    label, seed, kinds = args
    column = _columns()[label]
    log = []

    class Logger(WellWatcher):
        def _is_possible_cut(self, brk, r, corr, break_md):
            log.append(dict(md=break_md, bit=float(self._md.a[self._n - 1]), r=r, corr=corr,
                            excess=brk.excess, ratio=brk.ratio, cal=self._calibrated))
            return False

    sc = random_scenario(seed, column, kinds=kinds)
    md = sc.well.curves.index.to_numpy(float)
    x = sc.well.curves["GR"].to_numpy(float)
    w = Logger(sc.column, sc.trajectory, sc.bed_dip)
    for i in range(md.size):
        w.feed(md[i], [x[i]])
    truth = [t for t in sc.truth.to_dict("records") if abs(t["delta_s_m"]) >= 2.0]
    return dict(truth=truth, log=log, km=(md[-1] - md[0]) / 1000.0)


def calibrate_breaks(n_wells: int, procs: int, saved: str | None = None) -> None:
    """Score possible-cut rules (excess, ratio, correlation) on calibration wells (10000+), and
    fit the confidence (logistic) of the breaks the default rule passes. ``saved``: a pickle
    of the judged breaks, written on the first run and read on the next."""
    import pickle
    from multiprocessing import Pool

    if saved and Path(saved).is_file():
        with open(saved, "rb") as f:
            runs = pickle.load(f)
        score_break_rules(runs)
        return

    from wellfault.synth.scenarios import TRAJECTORY_KINDS

    labs = [lab for lab in CAL_SEEDS if lab in _columns()]
    # every kind of well (for the false warnings), and as many high-angle ones (the goal)
    jobs = [(lab, CAL_SEEDS[lab] + 500 + k, TRAJECTORY_KINDS) for lab in labs
            for k in range(n_wells)]
    jobs += [(lab, CAL_SEEDS[lab] + 700 + k, ("high-angle",)) for lab in labs
             for k in range(n_wells)]
    with Pool(procs) as pool:
        runs = pool.map(_log_breaks, jobs, chunksize=1)
    if saved:
        with open(saved, "wb") as f:
            pickle.dump(runs, f)
    score_break_rules(runs)


def score_break_rules(runs) -> None:
    km = sum(r["km"] for r in runs)
    n_big = sum(1 for run in runs for t in run["truth"]
                if abs(t["delta_s_m"]) >= 20 and abs(t["r"]) < 0.4)
    print(f"break calibration: {len(runs)} wells, {km:.1f} km, {n_big} cuts |Δs| >= 20 m at "
          "|r| < 0.4, "
          f"{sum(len(r['log']) for r in runs)} breaks judged (seeds 10000+)")
    print(f"{'excess >=':>10}{'ratio >=':>9}{'corr >=':>7}{'cal':>6}{'warned':>8}{'p90 m':>7}"
          f"{'false/km':>9}   (breaks where r <= {WatchSettings().break_max_r:g})")
    rmax = WatchSettings().break_max_r
    for ex, ra, cmin, cal in itertools.product((4.0, 5.0, 6.0), (1.5, 2.0), (0.0, 0.7, 0.8),
                                               (False, True)):
        warned, lat, false = 0, [], 0
        n_big = 0
        for run in runs:
            ok = [e for e in run["log"] if e["excess"] >= ex and e["ratio"] >= ra
                  and e["r"] <= rmax and e["corr"] >= cmin and (e["cal"] or not cal)]
            used = set()
            for t in run["truth"]:
                near = [q for q, e in enumerate(ok)
                        if abs(e["md"] - t["md_m"]) <= POSSIBLE_TOL_M]
                used.update(near)
                if abs(t["delta_s_m"]) >= 20 and abs(t["r"]) < 0.4:
                    n_big += 1
                    if near:
                        warned += 1
                        lat.append(min(ok[q]["bit"] for q in near)
                                   - t["md_first_below_m"])
            rest = sorted(e["md"] for q, e in enumerate(ok) if q not in used)
            false += sum(1 for i, m in enumerate(rest)
                         if i == 0 or m - rest[i - 1] > POSSIBLE_TOL_M)
        print(f"{ex:>10.1f}{ra:>9.2f}{cmin:>7.1f}{'yes' if cal else 'no':>6}"
              f"{warned / max(n_big, 1):>8.2f}"
              f"{q(lat, 90):>7.1f}{false / km:>9.3f}", flush=True)
    fit_break_confidence(runs)
    break_ceiling()


def break_ceiling(n_wells: int = 200, side: int = 7) -> None:
    """How many high-angle cuts (|r| < 0.4, |Δs| >= 20 m) show a break at all: the step of the
    logged GR over ``side`` samples either side of the true cut (forward model, no detector)
    against the noise of that step, on calibration wells (seeds 10000+, high-angle only)."""
    print(f"\nbreak ceiling: the 1 m step across each true cut |Δs| >= 20 m, |r| < 0.4, in noise "
          f"SDs of the step ({n_wells} high-angle wells per column, seeds 10000+)")
    for lab in ("invented", "invented2"):
        z = []
        for k in range(n_wells):
            sc = random_scenario(CAL_SEEDS[lab] + k, _columns()[lab], kinds=("high-angle",))
            md = sc.well.curves.index.to_numpy(float)
            x = sc.well.curves["GR"].to_numpy(float)
            for t in sc.truth.itertuples():
                if abs(t.delta_s_m) >= 20 and abs(t.r) < 0.4:
                    b = int(np.searchsorted(md, t.md_m))
                    step = x[b:b + side].mean() - x[b - side:b].mean()
                    z.append(abs(step) / (5.0 * np.sqrt(2.0 / side)))   # GR noise 5 API
        z = np.array(z)
        print(f"  {lab:<10} {z.size} cuts: step >= 3 / 4 / 5 / 6 SDs: "
              + " / ".join(f"{np.mean(z >= v):.2f}" for v in (3, 4, 5, 6)))


def fit_break_confidence(runs) -> None:
    """Logistic fit of P(true cut within POSSIBLE_TOL_M) on log1p(excess), log(ratio), over the
    breaks the default rule passes (maximum likelihood with a small ridge, scipy)."""
    from scipy.optimize import minimize

    st = WatchSettings()
    feats, label = [], []
    for run in runs:
        for e in run["log"]:
            if e["r"] <= st.break_max_r and e["excess"] >= st.break_min_excess and \
                    e["ratio"] >= st.break_min_ratio and e["corr"] >= st.break_min_correlation \
                    and e["cal"]:
                feats.append((1.0, np.log1p(max(e["excess"], 0.0)), np.log(max(e["ratio"],
                                                                                 1e-9))))
                label.append(any(abs(e["md"] - t["md_m"]) <= POSSIBLE_TOL_M
                                 for t in run["truth"]))
    X, y = np.array(feats), np.array(label, float)
    if y.sum() < 3 or y.sum() > y.size - 3:
        print("confidence fit: too few breaks of one kind")
        return

    def nll(b):
        t = X @ b
        return float(np.sum(np.logaddexp(0.0, t) - y * t)) + 1e-3 * float(b @ b)

    b = minimize(nll, np.zeros(3), method="BFGS").x
    print(f"confidence fit on the {y.size} breaks the default rule passes "
          f"({int(y.sum())} at true cuts): CONFIDENCE_COEF = "
          f"({b[0]:.2f}, {b[1]:.2f}, {b[2]:.2f})")


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--wells", type=int, default=30,
                    help="wells per invented column (2 columns)")
    ap.add_argument("--real-wells", type=int, default=16, help="wells per real-GR column")
    ap.add_argument("--sizes", type=int, nargs="*", default=[2000, 5000, 10000])
    ap.add_argument("--no-accuracy", action="store_true")
    ap.add_argument("--calibrate", action="store_true",
                    help="score alert rules on calibration wells (seeds 10000+) and stop")
    ap.add_argument("--jump-penalty", type=float, help="live engine jump penalty (calibrate)")
    ap.add_argument("--calibrate-breaks", action="store_true",
                    help="score possible-cut rules on calibration wells (seeds 10000+) and stop")
    ap.add_argument("--saved", metavar="FILE.pkl",
                    help="--calibrate-breaks: keep the judged breaks there (re-scored if present)")
    ap.add_argument("--procs", type=int, default=2)
    a = ap.parse_args()
    if a.calibrate:
        calibrate(a.wells, a.real_wells, a.jump_penalty, a.procs)
        return
    if a.calibrate_breaks:
        calibrate_breaks(a.wells, a.procs, a.saved)
        return
    print(f"bench_watch on {platform.platform()}, {os.cpu_count()} CPUs, Python "
          f"{sys.version.split()[0]}; load average {os.getloadavg()[0]:.1f}")
    settings = WatchSettings()
    print(f"settings: {settings}")
    if not a.no_accuracy:
        jobs = [("invented", k) for k in range(a.wells)]
        jobs += [("invented2", 1000 + k) for k in range(a.wells)]
        if "P-129 GR" in _columns() and a.real_wells:
            jobs += [("P-129 GR", 2000 + k) for k in range(a.real_wells)]
            jobs += [("Wellington", 3000 + k) for k in range(a.real_wells)]
        else:
            print("(real GR columns skipped: ../shared/reference_data not found)")
        t0 = time.perf_counter()
        cuts, wells = accuracy(jobs, settings, a.procs)
        print(f"({len(wells)} wells drilled in {time.perf_counter() - t0:.0f} s, "
              f"{a.procs} process(es))")
        print_accuracy(cuts, wells)
    if a.sizes:
        cost(a.sizes)


if __name__ == "__main__":
    main()
