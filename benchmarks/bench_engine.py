"""Speed and memory of the alignment engine against dtaidistance's C DTW (warping path).

Run:  python benchmarks/bench_engine.py [--sizes 2000 5000 10000] [--big 20000] [--repeat 3]

For each size N = M the script measures, each in a fresh child process (clean peak RSS):

* ``engine``  — :class:`wellfault.align.AlignmentEngine` DP + traceback + cut evidence on a
  vertical well (step 1: N rows) with given standardisation (``align(..., center, scale)``);
* ``engine+cal`` — the same with the default coarse calibration pre-pass;
* ``dtai``    — ``dtaidistance.dtw.warping_path(a, b, use_c=True)``: the C implementation
  computing the full warping-paths matrix and its optimal path (squared-difference DTW).

Reported: wall time (best of ``--repeat``), ns per cell (N·M cells), the engine/dtai ratio,
engine traceback bytes (the move-code blocks actually allocated) per cell, and the child's peak
RSS growth. The ``--big`` size (default 20000: a 3,000 m well at 0.15 m against a
20,000-sample type log) is run for the engine only unless ``--big-dtai`` is given. Figures
depend on the machine; the table header prints what it ran on. Not a test.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import resource
import subprocess
import sys
import time

import numpy as np


def _data(n: int, seed: int = 0) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    rng = np.random.default_rng(seed)
    lv: list[float] = []
    while len(lv) < n + 400:
        lv += [rng.normal()] * int(rng.integers(4, 30))
    ref = np.convolve(np.array(lv[: n + 400]), np.ones(3) / 3, "same")
    ref = ref + 0.1 * rng.standard_normal(ref.size)
    # well: the reference read with a missing and a repeated section, gain, offset, noise
    s = 0.9 * np.arange(n, dtype=float) + 100.0     # thinner than predicted (stretch 0.9)
    s[n // 3 :] += 60.0
    s[2 * n // 3 :] -= 90.0
    well = 30.0 * np.interp(s, np.arange(ref.size), ref) + 50.0 + rng.standard_normal(n)
    return ref[:n], well, np.ones(n)


def _rss_mb() -> float:
    return resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 1024.0


def _one(method: str, n: int, repeat: int) -> dict:
    ref, well, step = _data(n)
    out: dict = {"method": method, "n": n}
    if method.startswith("engine"):
        from wellfault.align import AlignmentEngine, robust_location_scale

        eng = AlignmentEngine(ref)
        eng.align(well[:64], step[:64])                 # load compiled kernels
        base = _rss_mb()
        c, s = robust_location_scale(well)
        kw = {} if method == "engine+cal" else {"center": c, "scale": s}
        times = []
        for _ in range(repeat):
            t = time.perf_counter()
            al = eng.align(well, step, **kw)
            times.append(time.perf_counter() - t)
        m = ref.shape[0]
        block_rows = int(np.clip(2**22 // m, 16, 4096))
        nblocks = -(-al.n_rows // block_rows)
        out["traceback_bytes"] = nblocks * block_rows * m
        out["rows"] = al.n_rows
        out["jumps"] = [(j.sample, round(j.size, 1)) for j in al.jumps]
    else:
        from dtaidistance import dtw

        dtw.warping_path(well[:64], ref[:64], use_c=True)
        base = _rss_mb()
        times = []
        for _ in range(repeat):
            t = time.perf_counter()
            path = dtw.warping_path(well, ref, use_c=True)
            times.append(time.perf_counter() - t)
        out["path_len"] = len(path)
    out["seconds"] = min(times)
    out["rss_growth_mb"] = _rss_mb() - base
    return out


def _child(method: str, n: int, repeat: int) -> dict:
    cmd = [sys.executable, __file__, "--one", method, str(n), "--repeat", str(repeat)]
    res = subprocess.run(cmd, capture_output=True, text=True, env={**os.environ,
                         "OMP_NUM_THREADS": "1", "NUMBA_NUM_THREADS": "1"})
    if res.returncode != 0:
        return {"method": method, "n": n, "error": res.stderr.strip().splitlines()[-1:]}
    return json.loads(res.stdout.strip().splitlines()[-1])


def main(argv: list[str] | None = None) -> int:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="*", default=[2000, 5000, 10000])
    ap.add_argument("--big", type=int, default=20000)
    ap.add_argument("--big-dtai", action="store_true")
    ap.add_argument("--repeat", type=int, default=3)
    ap.add_argument("--one", nargs=2, metavar=("METHOD", "N"))
    a = ap.parse_args(argv)
    if a.one:
        print(json.dumps(_one(a.one[0], int(a.one[1]), a.repeat)))
        return 0
    print(f"# {platform.processor() or platform.machine()}, {os.cpu_count()} cpus, "
          f"python {platform.python_version()}, one core per run, best of {a.repeat}")
    hdr = (f"{'N=M':>7} {'engine s':>9} {'ns/cell':>8} {'+cal s':>8} {'dtai s':>8} "
           f"{'ns/cell':>8} {'ratio':>6} {'tb B/cell':>9} {'eng RSS MB':>10} {'dtai RSS MB':>11}")
    print(hdr)
    sizes = list(a.sizes) + ([a.big] if a.big else [])
    for n in sizes:
        e = _child("engine", n, a.repeat)
        ec = _child("engine+cal", n, 1 if n == a.big else a.repeat)
        d = _child("dtai", n, 1 if n == a.big else a.repeat) if (n != a.big or a.big_dtai) \
            else {"error": "skipped"}
        cells = float(n) * n
        es = e.get("seconds", float("nan"))
        ds = d.get("seconds", float("nan"))
        print(f"{n:>7} {es:>9.3f} {es / cells * 1e9:>8.2f} {ec.get('seconds', float('nan')):>8.3f} "
              f"{ds:>8.3f} {ds / cells * 1e9:>8.2f} {es / ds:>6.2f} "
              f"{e.get('traceback_bytes', 0) / cells:>9.3f} {e.get('rss_growth_mb', 0):>10.0f} "
              f"{d.get('rss_growth_mb', float('nan')):>11.0f}")
        for r in (e, ec, d):
            if "error" in r and r["error"] != "skipped":
                print(f"  {r.get('method')}: {r['error']}")
        if "jumps" in e:
            print(f"  engine jumps found (sample, size): {e['jumps']} "
                  f"(true: {n // 3}, +60 and {2 * n // 3}, -90)")
    return 0


if __name__ == "__main__":
    raise SystemExit(main())
