"""Field screening at scale: wells per second, speed-up and memory (not a test).

Draws invented fields with the vectorised tops generator (:mod:`wellfault.synth.fieldsim`): wells on
a jittered grid (~300 m spacing), 30 % of them deviated (build-and-hold), 15 planar beds
dipping 2°, nine parallel normal faults (60° toward 090, throws 20-60 m, 3 km apart) and a
lateral thickness trend; then screens them with :func:`wellfault.field.screen.screen_wells` by tops
(two passes with neighbour-aware thickness, fault fitting, re-measuring with the fitted
planes) and prints one table:

* wells per second on 1 and 2 worker processes (speed-up), and through a local Dask cluster
  (``LocalCluster(n_workers=2, threads_per_worker=1, processes=True)``, start-up not counted);
* peak memory: the main process (``ru_maxrss``) and the largest worker (resident set sampled
  every 0.1 s over the process tree with psutil), for 2,000 and 10,000 wells — the workers'
  memory must not grow with the field.

Each configuration runs in a fresh child process, so that peaks are its own. The goal set in the
issue: 10,000 wells by tops in under 60 s on 2 cores, near-linear speed-up.

    python benchmarks/bench_screen.py                 # 2,000 and 10,000 wells
    python benchmarks/bench_screen.py --sizes 2000    # quicker

Curves: ``--curve-wells N`` (default 500) draws N wells with gamma-ray logs through a faulted
model with the forward model (vertical and deviated, 1,200 m of log each) and screens them with
curve evidence (each well aligned to the type log) on 1 and 2 worker processes. It prints
where the time goes (a serial run of 30 wells under cProfile, CPU time: reading, calibration
passes, the DP kernel, resampling, cut evidence, tops evidence, measuring), the CPU time per
well, checks that the x1 and x2 cut tables are identical, compares the x2 speed-up with the
machine's own (the pure-CPU task above, same run) and projects 10,000 wells on 2 cores from the
serial CPU cost per well (the goal of issue 15: under 10 minutes), beside the x2 run's measured
rate (wall clock on a shared machine).

    python benchmarks/bench_screen.py --curves-only --curve-wells 40    # about half a minute
"""

from __future__ import annotations

import argparse
import json
import os
import resource
import shutil
import subprocess
import sys
import tempfile
import threading
import time
from pathlib import Path

HERE = Path(__file__).resolve().parent
sys.path.insert(0, str(HERE.parent))


def make_field(folder: Path, n: int, seed: int = 1) -> dict:
    import numpy as np

    from wellfault.synth.fieldsim import field_tops, plan_wells, write_field
    from wellfault.synth.structure import Beds, PlanarFault
    from wellfault.synth.columns import synthetic_column

    t0 = time.perf_counter()
    side = 300.0 * np.sqrt(n)
    column = synthetic_column(15, seed=seed, curves=(), thickness_range_m=(25.0, 55.0))
    dip = 2.0
    beds = Beds.through(dip, 70.0, (0.0, 0.0, 1500.0), 0.0)
    rng = np.random.default_rng(seed)
    faults = []
    for k, x in enumerate(np.arange(1500.0, side, 3000.0)):
        faults.append(PlanarFault.dip_slip(60.0, 90.0, (x, side / 2, 1800.0),
                                           float(rng.uniform(20, 60)), name=f"D{k + 1}"))
    # deep enough to cross the whole column everywhere (beds deepen down-dip)
    target = 1500.0 + 1.5 * side * np.tan(np.radians(dip)) + column.base_s_m + 150.0
    plan = plan_wells(n, seed=seed, extent_m=(0.0, side, 0.0, side), target_tvdss_m=target)

    def trend(x, y):
        return (0.85 + 0.3 * x / side)[:, None] * np.ones(len(column))

    tops, truth = field_tops(plan, column, beds, faults, thickness_factors=trend,
                             pick_noise_m=0.3, seed=seed + 1)
    gen = time.perf_counter() - t0
    t1 = time.perf_counter()
    manifest = write_field(folder, plan, tops, column, dip=f"{dip:g}/070")
    return {"manifest": str(manifest), "column": str(folder / "column.csv"), "n": n,
            "picks": len(tops), "true_cuts": len(truth), "faults": len(faults),
            "generate_s": gen, "write_s": time.perf_counter() - t1}


class _Sampler:
    """Peak resident memory of this process's descendants (the workers), sampled."""

    def __init__(self, every: float = 0.1) -> None:
        import psutil

        self.me = psutil.Process()
        self.every = every
        self.peak_worker = 0
        self.peak_main = 0
        self.peak_tree = 0
        self.cpu: dict[int, float] = {}
        self._stop = threading.Event()
        self._t = threading.Thread(target=self._run, daemon=True)

    def _run(self):
        import psutil

        while not self._stop.is_set():
            try:
                self.peak_main = max(self.peak_main, self.me.memory_info().rss)
                kids = self.me.children(recursive=True)
                rss = []
                for k in kids:
                    try:
                        rss.append(k.memory_info().rss)
                        t = k.cpu_times()
                        self.cpu[k.pid] = t.user + t.system
                    except psutil.Error:
                        pass
                if rss:
                    self.peak_worker = max(self.peak_worker, max(rss))
                    self.peak_tree = max(self.peak_tree, sum(rss) + self.me.memory_info().rss)
            except psutil.Error:
                pass
            self._stop.wait(self.every)

    def __enter__(self):
        self._t.start()
        return self

    def __exit__(self, *exc):
        self._stop.set()
        self._t.join()


def run_one(args) -> dict:
    """One configuration in this (fresh) process."""
    from wellfault.field.screen import screen_wells

    field = json.loads(args.field)
    client = cluster = None
    start_s = 0.0
    load0 = os.getloadavg()[0]
    with _Sampler() as sampler:
        if args.mode == "dask":
            from distributed import Client, LocalCluster

            t0 = time.perf_counter()
            cluster = LocalCluster(n_workers=args.workers, threads_per_worker=1, processes=True,
                                   dashboard_address=None)
            client = Client(cluster)
            start_s = time.perf_counter() - t0
        t0 = time.perf_counter()
        cpu0 = time.process_time()
        kids0 = sum(sampler.cpu.values())
        out = Path(tempfile.mkdtemp(prefix="bench-screen-out-"))
        res = screen_wells(field["manifest"], field["column"], workers=args.workers,
                           client=client, progress=False, out_dir=out)
        secs = time.perf_counter() - t0
        shutil.rmtree(out, ignore_errors=True)
        main_cpu = time.process_time() - cpu0
        cpu = main_cpu + sum(sampler.cpu.values()) - kids0
        if client is not None:
            client.close()
            cluster.close()
    wells_cut = int((res.wells["cuts_found"] > 0).sum())
    return {
        "mode": args.mode, "workers": args.workers, "n": field["n"], "seconds": secs,
        "wells_per_s": field["n"] / secs, "start_s": start_s,
        "main_maxrss_mb": max(sampler.peak_main / 2**20,
                              resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0),
        "worker_peak_mb": sampler.peak_worker / 2**20, "tree_peak_mb": sampler.peak_tree / 2**20,
        "cuts": int(len(res.cuts)), "wells_with_cuts": wells_cut,
        "faults": int((res.faults["kind"] == "fault").sum()) if len(res.faults) else 0,
        "failed": int(len(res.errors)), "timings": res.info["timings"],
        "cpu_s": cpu, "main_cpu_s": main_cpu, "load": (load0 + os.getloadavg()[0]) / 2,
    }


def _spin(seconds: float) -> int:
    """Pure-Python busy work for about ``seconds`` of one idle core (calibrated count)."""
    n = 0
    for _ in range(int(seconds * 2e7)):
        n += 1
    return n


def calibrate() -> tuple[float, float]:
    """Wall time of a fixed CPU task alone, and of two copies at once in two processes:
    the parallel speed-up this machine offers right now (other work on it lowers it)."""
    from concurrent.futures import ProcessPoolExecutor

    with ProcessPoolExecutor(2) as pool:
        pool.submit(_spin, 0.01).result()
        t0 = time.perf_counter()
        pool.submit(_spin, 1.0).result()
        one = time.perf_counter() - t0
        t0 = time.perf_counter()
        for f in [pool.submit(_spin, 1.0) for _ in range(2)]:
            f.result()
        two = time.perf_counter() - t0
    return one, two


def make_curve_field(folder: Path, n: int, seed: int = 3) -> dict:
    """N wells with GR logs, tops and surveys through a faulted model (forward model)."""
    import numpy as np
    import pandas as pd

    from wellfault.synth.structure import Beds, PlanarFault
    from wellfault.synth.forward import simulate_well
    from wellfault.synth.columns import synthetic_column
    from wellfault.io import write_las, write_survey, write_tops
    from wellfault.synth.scenarios import build_trajectory

    folder.mkdir(parents=True, exist_ok=True)
    t0 = time.perf_counter()
    column = synthetic_column(14, seed=seed, curves=("GR",), pad_m=60.0)
    side = 300.0 * np.sqrt(n)
    beds = Beds.through(2.0, 70.0, (0.0, 0.0, 1500.0), 0.0)
    rng = np.random.default_rng(seed)
    faults = [PlanarFault.dip_slip(60.0, 90.0, (x, side / 2, 1800.0),
                                   float(rng.uniform(20, 60)), name=f"D{k + 1}")
              for k, x in enumerate(np.arange(1500.0, side, 3000.0))]
    rows, tops, true_cuts = [], [], 0
    for i in range(n):
        x, y = rng.uniform(0, side, 2)
        deviated = rng.random() < 0.3
        traj = build_trajectory("deviated" if deviated else "vertical",
                                inclination_deg=float(rng.uniform(20, 45)),
                                azimuth_deg=float(rng.uniform(0, 360)), kickoff_m=800.0,
                                td_m=5000.0, name=f"C{i:04d}")
        from wellfault.geo.trajectory import Trajectory
        st = traj.stations
        traj = Trajectory(st.md_m, st.inc_deg, st.azi_deg, x0_m=x, y0_m=y, ref_elevation_m=0.0,
                          name=f"C{i:04d}")
        md_grid = np.arange(0.0, 5000.0, 2.0)
        s = beds.s(traj.position(md_grid))
        top = float(md_grid[np.searchsorted(s, -30.0)])
        syn = simulate_well(column, beds, faults, traj, md_top_m=top, md_base_m=top + 1200.0,
                            noise_std=4.0, thickness_factors=rng.uniform(0.92, 1.08,
                                                                         len(column)),
                            gain=float(rng.uniform(0.9, 1.1)), offset=float(rng.uniform(-8, 8)),
                            seed=seed * 100000 + i, name=f"C{i:04d}")
        las = folder / f"C{i:04d}.las"
        write_las(syn.well, las)
        survey = ""
        if deviated:
            write_survey(traj.stations[["md_m", "inc_deg", "azi_deg"]],
                         folder / f"C{i:04d}_survey.csv")
            survey = f"C{i:04d}_survey.csv"
        tops.append(syn.tops)
        true_cuts += len(syn.cuts)
        rows.append({"well": f"C{i:04d}", "las": las.name, "survey": survey,
                     "tops": "tops.csv", "dip": "2/070", "x_m": x, "y_m": y,
                     "elevation_m": 0.0})
    write_tops(pd.concat(tops, ignore_index=True), folder / "tops.csv")
    pd.DataFrame(rows).to_csv(folder / "manifest.csv", index=False)
    return {"folder": str(folder), "n": n, "true_cuts": true_cuts,
            "generate_s": time.perf_counter() - t0, "column_seed": seed}


def run_curves(field: dict, workers: int) -> dict:
    from wellfault.synth.columns import synthetic_column
    from wellfault.field.screen import screen_wells

    column = synthetic_column(14, seed=field["column_seed"], curves=("GR",), pad_m=60.0)
    folder = Path(field["folder"])
    t0 = time.perf_counter()
    c0, s0, f0 = _cpu_tree(), _sys_tree(), _faults_tree()
    res = screen_wells(folder / "manifest.csv", column, type_well=column, curves=["GR"],
                       workers=workers, progress=False, fit=False, neighbours=False)
    dt = time.perf_counter() - t0
    return {"workers": workers, "seconds": dt, "wells_per_s": field["n"] / dt,
            "cpu_s": _cpu_tree() - c0, "sys_s": _sys_tree() - s0,
            "faults": _faults_tree() - f0, "cuts": int(len(res.cuts)),
            "by_curves": int(res.cuts.method.isin(["curves", "both"]).sum()),
            "failed": int(res.n_failed), "table": res.cuts,
            "separation_s": res.info["timings"].get("separation", 0.0),
            "maxrss_mb": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024}


def _cpu_tree() -> float:
    """CPU seconds (user + system) of this process and its finished children."""
    a, b = os.times()[:2], os.times()[2:4]
    return sum(a) + sum(b)


def _sys_tree() -> float:
    """System CPU seconds of this process and its finished children (page faults, I/O)."""
    t = os.times()
    return t[1] + t[3]


def _faults_tree() -> int:
    """Minor page faults of this process and its finished children: fresh memory pages
    (the engine's move codes are reused across wells to avoid them, stream.CODE_BLOCKS)."""
    return sum(resource.getrusage(w).ru_minflt
               for w in (resource.RUSAGE_SELF, resource.RUSAGE_CHILDREN))


#: where the time of a curve screening goes: (label, function) whose cumulative time is shown
_PROFILE_PARTS = (
    ("reading (LAS, tops, survey)", "screen_well.py", "_load"),
    ("calibration passes (coarse DPs)", "engine.py", "calibrate"),
    ("engine DP kernel (all DPs)", "_kernels.py", "forward_rows"),
    ("resampling to strat rows", "resample.py", "resample_chunk"),
    ("cut evidence (window DPs, fits)", "evidence.py", "_jump_evidence"),
    ("tops evidence", "topcuts.py", "find_cuts_from_tops"),
    ("measuring cuts", "measure.py", "measure_cut"),
)


def profile_curves(field: dict, n: int) -> None:
    """Serial curve screening of the first ``n`` wells under cProfile: the share of each part."""
    import cProfile
    import pstats

    import pandas as pd

    from wellfault.synth.columns import synthetic_column
    from wellfault.field.screen import screen_wells

    column = synthetic_column(14, seed=field["column_seed"], curves=("GR",), pad_m=60.0)
    man = pd.read_csv(Path(field["folder"]) / "manifest.csv").head(n)
    man["las"] = [str(Path(field["folder"]) / v) for v in man["las"]]
    man["tops"] = [str(Path(field["folder"]) / v) for v in man["tops"]]
    man["survey"] = [str(Path(field["folder"]) / v) if isinstance(v, str) and v else ""
                     for v in man["survey"].fillna("")]
    kw = {"type_well": column, "curves": ["GR"], "workers": 1, "progress": False,
          "fit": False, "neighbours": False}
    screen_wells(man.head(2), column, **kw)                       # compiled kernels loaded
    prof = cProfile.Profile(time.process_time)          # CPU time: the machine is shared
    prof.enable()
    screen_wells(man, column, **kw)
    prof.disable()
    st = pstats.Stats(prof)
    total = max(v[3] for k, v in st.stats.items() if k[2] == "screen_wells")
    print(f"\nprofile of a serial curve screening of {n} wells ({total:.2f} CPU s under cProfile, "
          f"{1000 * total / n:.0f} ms per well):")
    for label, fname, func in _PROFILE_PARTS:
        cum = sum(v[3] for k, v in st.stats.items() if k[0].endswith(fname) and k[2] == func)
        print(f"  {label:<34} {cum:7.2f} s {100 * cum / total:5.1f} %")
    print("  (parts overlap: the DP kernel runs inside the calibration passes and the cut "
          "evidence; the rest is Python bookkeeping, pandas and I/O)")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[2000, 10000])
    ap.add_argument("--no-dask", action="store_true")
    ap.add_argument("--curve-wells", type=int, default=500,
                    help="wells in the curve-evidence field (0: skip)")
    ap.add_argument("--curves-only", action="store_true", help="only the curve part")
    ap.add_argument("--curve-workers", type=int, nargs="+", default=[1, 2],
                    help="worker counts of the curve runs (e.g. 2 alone for a 10,000-well "
                    "field, whose serial run would take twice as long)")
    ap.add_argument("--one", action="store_true", help=argparse.SUPPRESS)
    ap.add_argument("--make", type=int, help=argparse.SUPPRESS)
    ap.add_argument("--folder", help=argparse.SUPPRESS)
    ap.add_argument("--field", help=argparse.SUPPRESS)
    ap.add_argument("--mode", default="pool", help=argparse.SUPPRESS)
    ap.add_argument("--workers", type=int, default=1, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.one:
        print(json.dumps(run_one(args)))
        return
    if args.make:
        print(json.dumps(make_field(Path(args.folder), args.make)))
        return
    root = Path(tempfile.mkdtemp(prefix="bench-screen-"))
    try:
        _run_all(args, root)
    finally:
        shutil.rmtree(root, ignore_errors=True)      # the drawn fields (GBs at 100,000 wells)


def _run_all(args, root: Path) -> None:
    rows = []
    print(f"cores: {os.cpu_count()}; fields in {root}", flush=True)
    one, two = calibrate()
    print(f"machine check: a fixed CPU task takes {one:.2f} s alone and {two:.2f} s as two "
          f"copies in two processes -> the 2 cores give {2 * one / two:.2f}x now "
          f"(load average {os.getloadavg()[0]:.1f})", flush=True)
    for n in ([] if args.curves_only else args.sizes):
        # drawn in a child process: this process stays small, and the runs (its children,
        # which inherit its peak resident size on Linux) measure their own memory
        made = subprocess.run([sys.executable, __file__, "--make", str(n), "--folder",
                               str(root / f"field{n}")], capture_output=True, text=True,
                              check=True)
        field = json.loads(made.stdout.strip().splitlines()[-1])
        print(f"field of {n} wells: {field['picks']} picks, {field['true_cuts']} true cuts, "
              f"{field['faults']} faults; drawn in {field['generate_s']:.1f} s, written in "
              f"{field['write_s']:.1f} s", flush=True)
        configs = [("pool", 1), ("pool", 2)] + ([] if args.no_dask else [("dask", 2)])
        for mode, workers in configs:
            cmd = [sys.executable, __file__, "--one", "--field", json.dumps(field), "--mode",
                   mode, "--workers", str(workers)]
            done = subprocess.run(cmd, capture_output=True, text=True, check=False)
            if done.returncode != 0:
                print(done.stderr[-3000:], file=sys.stderr)
                continue
            row = json.loads(done.stdout.strip().splitlines()[-1])
            rows.append(row)
            print(f"  {mode:>4} x{workers}: {row['seconds']:6.1f} s", flush=True)
    print()
    head = (f"{'wells':>6} {'run':<12} {'seconds':>8} {'wells/s':>8} {'speed-up':>8} "
            f"{'CPU s':>7} {'ms/well':>7} {'main MB':>8} {'worker MB':>9} {'cuts':>6} "
            f"{'wells cut':>9} {'faults':>6} {'failed':>6} {'load':>5}")
    print(head)
    print("-" * len(head))
    for r in rows:
        base = next((b for b in rows if b["n"] == r["n"] and b["mode"] == "pool"
                     and b["workers"] == 1), None)
        speed = base["seconds"] / r["seconds"] if base else float("nan")
        name = ("serial" if r["workers"] == 1 else f"pool x{r['workers']}") \
            if r["mode"] == "pool" else f"dask x{r['workers']}"
        print(f"{r['n']:>6} {name:<12} {r['seconds']:8.1f} {r['wells_per_s']:8.0f} "
              f"{speed:8.2f} {r['cpu_s']:7.1f} {1000 * r['cpu_s'] / r['n']:7.2f} "
              f"{r['main_maxrss_mb']:8.0f} {r['worker_peak_mb']:9.0f} {r['cuts']:>6} "
              f"{r['wells_with_cuts']:>9} {r['faults']:>6} {r['failed']:>6} {r['load']:5.1f}")
    print()
    for r in rows:
        t = r["timings"]
        print(f"{r['n']:>6} {r['mode']} x{r['workers']}: pass 1 {t.get('thickness', 0):.1f} s, "
              f"pass 2 {t.get('detect', 0):.1f} s, faults {t.get('faults', 0):.1f} s, "
              f"re-measure {t.get('remeasure', 0):.1f} s; main process CPU "
              f"{r['main_cpu_s']:.1f} s"
              + (f"; cluster start-up {r['start_s']:.1f} s (not counted)" if r["mode"] == "dask"
                 else ""))
    print("\n'serial' is workers=1 (in-process); CPU s is the CPU time of the main process and "
          "its workers (sampled, psutil); main MB is the main process's peak RSS, worker MB the "
          "largest worker's peak RSS (sampled); load is the machine's 1-minute load average "
          "during the run (other work on the 2 cores slows the wall-clock figures).")
    if args.curve_wells:
        _run_curves(args, root, one, two)


def _run_curves(args, root: Path, one: float, two: float) -> None:
    field = make_curve_field(root / "curves", args.curve_wells)
    print(f"\ncurve field: {field['n']} wells with GR logs, {field['true_cuts']} true cuts; "
          f"drawn and written in {field['generate_s']:.1f} s")
    profile_curves(field, min(field["n"], 30))
    runs = []
    for workers in args.curve_workers:
        r = run_curves(field, workers)
        runs.append(r)
        print(f"  curves x{workers}: {r['seconds']:6.1f} s, {r['wells_per_s']:.1f} wells/s, "
              f"CPU {r['cpu_s']:.1f} s "
              f"({1000 * r['cpu_s'] / field['n']:.0f} ms per well, of which system "
              f"{1000 * r['sys_s'] / field['n']:.0f} ms; {r['faults'] / field['n']:.0f} page "
              f"faults per well), cuts {r['cuts']} "
              f"({r['by_curves']} by curves), failed {r['failed']}, pass 2b "
              f"{r['separation_s']:.1f} s, main peak RSS {r['maxrss_mb']:.0f} MB", flush=True)
    by = {r["workers"]: r for r in runs}
    if 1 in by and 2 in by:
        import pandas as pd

        pd.testing.assert_frame_equal(by[1]["table"].drop(columns=["seconds"], errors="ignore"),
                                      by[2]["table"].drop(columns=["seconds"], errors="ignore"))
        machine = 2 * one / two
        speed = by[1]["seconds"] / by[2]["seconds"]
        print(f"  cut tables of x1 and x2 identical; speed-up x2 {speed:.2f} against the "
              f"machine's {machine:.2f} now (ratio {speed / machine:.2f}, goal >= 0.8)")
    if 1 in by:
        per_well_cpu = by[1]["cpu_s"] / field["n"]
        print(f"  projection for 10,000 wells on 2 cores: {10000 * per_well_cpu / 2 / 60:.1f} "
              f"min from the serial CPU cost ({1000 * per_well_cpu:.0f} ms per well, both cores "
              f"busy with no loss); goal < 10 min")
    if 2 in by:
        print(f"  {field['n']:,} wells on 2 workers: {by[2]['seconds'] / 60:.1f} min measured "
              f"({10000 / by[2]['wells_per_s'] / 60:.1f} min for 10,000 wells at that rate, "
              f"start-up included; load average {os.getloadavg()[0]:.1f}); goal < 10 min")


if __name__ == "__main__":
    main()
