"""How fast ``wellfault detect`` answers from a cold process, and whether its cut tables changed.

Run:  python benchmarks/bench_cli.py [--seeds 0 1 2] [--repeat 5] [--reference main]
                                     [--install-check]

The test well (benchmark seeds 0+): a reference column of 24 invented units (``synthetic_column``,
seed 0, 100-160 m each: a type log of about 20,900 samples at 0.1524 m) logged by a vertical
type well; a deviated well of about 6,000 samples drawn through it by
:func:`wellfault.synth.real_logs.curve_scenario` (seeded, 1-2 faults, noise, tool gain and offset),
written as LAS, tops and survey files like a user's.

Printed, each command run ``--repeat`` times as a new process (numba's on-disk cache warm; the
median and the best):

* wall and user+sys CPU time of ``wellfault detect`` by curves (``--type-well``), by tops alone
  (``--tops --column``) and ``wellfault --help``, beside two peers measured in the same run
  (``python -c pass`` and ``python -c "import numpy"``) and the same commands run on the
  ``--reference`` code (default: the ``main`` branch, extracted once per commit under the
  temporary folder), with the ratios;
* for one cold process, where the time goes: interpreter start, imports (wherever they
  happen), reading, tops evidence, curve alignment (first call: loading the compiled kernels
  from the cache; of it, the two coarse passes of ``AlignmentEngine.calibrate``), writing, the
  rest — beside the same call repeated in that process
  (in-process time: imports done, kernels loaded);
* whether each seed's cut table (``--out`` CSV) is byte-identical to the reference's.

``--install-check`` installs the package (not editable) into a temporary folder with pip and
runs the curve detection there twice: the first run compiles the kernels and writes numba's
cache beside the installed modules (or into ``NUMBA_CACHE_DIR`` / a user cache folder where
that is not writable), the second must load every kernel from it (numba's cache hit/miss
counts are printed). Its first run is what a new installation costs once.

Goals (issue "A command that answers in about a second", 2-core machine): detect by curves
<= 2 s wall, by tops alone <= 1 s, ``--help`` <= 0.5 s, tables unchanged. On a shared machine
read the CPU times and the ratios to the peers. Not a test.
"""

from __future__ import annotations

import argparse
import json
import os
import platform
import resource
import statistics
import subprocess
import sys
import tempfile
import time
from pathlib import Path

REPO = Path(__file__).resolve().parents[1]
#: Children run here: ``python -c`` puts its folder first on sys.path, which must not be a
#: checkout (PYTHONPATH chooses the code).
NEUTRAL = tempfile.gettempdir()
#: The installed command: ``wellfault.cli.app.console`` (``main`` in code from before it existed).
MAIN = ("import sys, wellfault.cli as c\n"
        "(getattr(c, 'console', None) or (lambda: sys.exit(c.main())))()")

#: Run inside the child: ``wellfault.cli.app.main(argv)`` with the time of every import (at any
#: depth of the call, counted once at the outermost) and of the readers, evidence and writer
#: kept apart; then the same call again (in-process). Prints one JSON line.
CHILD = r"""
import builtins, json, sys, time

def now():
    return time.perf_counter(), time.process_time()

T0 = now()
acc = {"imports": [0.0, 0.0]}               # [wall, CPU] seconds
_import, _depth = builtins.__import__, [0]

def add(name, t, i0=None):                   # time since t, less the imports since i0
    n, a = now(), acc.setdefault(name, [0.0, 0.0])
    d = [n[k] - t[k] - (acc["imports"][k] - i0[k] if i0 else 0.0) for k in (0, 1)]
    for k in (0, 1):
        a[k] += d[k]

def _timed_import(*a, **k):
    if _depth[0]:
        return _import(*a, **k)
    _depth[0], t = 1, now()
    try:
        return _import(*a, **k)
    finally:
        _depth[0] = 0
        add("imports", t)

builtins.__import__ = _timed_import

def phase(name, fn):
    def run(*a, **k):
        t, i0 = now(), tuple(acc["imports"])
        try:
            return fn(*a, **k)
        finally:
            add(name, t, i0)
    return run

import wellfault.cli as cli, wellfault.cli.detect as cli_detect
import wellfault.evidence.detect as detect, wellfault.io as io
import wellfault.align.engine as engine
for name in ("read_las", "read_tops", "read_survey", "read_column_table", "read_dip_table"):
    setattr(io, name, phase("reading", getattr(io, name)))
detect.find_cuts_from_tops = phase("tops evidence", detect.find_cuts_from_tops)
detect.find_cuts_from_curves = phase("curve alignment", detect.find_cuts_from_curves)
cli_detect._write_csv = phase("writing", cli_detect._write_csv)
engine.AlignmentEngine.calibrate = phase("calibration", engine.AlignmentEngine.calibrate)
argv = json.loads(sys.argv[1])
assert cli.main(argv) == 0
add("script", T0)
first = acc
acc = {"imports": [0.0, 0.0]}
t = now()
assert cli.main(argv) == 0
add("main", t)
print(json.dumps({"cold": first, "again": acc, "child": [x - y for x, y in zip(now(), T0)]}))
import gc
gc.freeze()                 # as wellfault.cli.app.console does
"""


# ----------------------------------------------------------------------------- the test case
def make_case(seed: int, folder: Path) -> dict:
    """Write the type well, the well and the column of one seed; the argv of each command."""
    from wellfault.synth.structure import Beds
    from wellfault.synth.forward import simulate_well
    from wellfault.synth.columns import synthetic_column
    from wellfault.io import write_table
    from wellfault.synth.real_logs import curve_scenario

    col = synthetic_column(24, seed=0, thickness_range_m=(100.0, 160.0), name="bench column")
    folder.mkdir(parents=True, exist_ok=True)
    if not (folder / "type.las").is_file():
        top = 500.0
        tw = simulate_well(col, Beds.through(0.0, 0.0, (0.0, 0.0, top), 0.0), [], None,
                           md_top_m=top - 5.0, md_base_m=top + col.base_s_m + 5.0,
                           noise_std=2.0, seed=1, name="BENCH-TYPE")
        tw.to_files(folder, stem="type")
        write_table(col.to_frame()[["surface", "thickness_m"]], folder / "column.csv")
    sc = curve_scenario(seed, col, kinds=("deviated",), max_logged_m=6000 * 0.1524,
                        min_faults=1)
    stem = f"well{seed}"
    paths = sc.synthetic.to_files(folder, stem=stem)
    dip = f"{sc.bed_dip.dip_deg:.4f}/{sc.bed_dip.dip_azimuth_deg:.4f}"
    base = ["detect", str(paths["las"]), "--survey", str(paths["survey"]), "--dip", dip]
    return {
        "curves": base + ["--type-well", str(folder / "type.las"), "--type-tops",
                          str(folder / "type_tops.csv"), "--curve", "GR",
                          "--out", str(folder / f"{stem}_cuts_{{code}}.csv")],
        "tops": base + ["--tops", str(paths["tops"]), "--column", str(folder / "column.csv"),
                        "--out", str(folder / f"{stem}_tops_cuts_{{code}}.csv")],
        "samples": len(sc.well.curves),
    }


def reference_checkout(ref: str) -> Path:
    """The code of git revision ``ref``, extracted once per commit (its numba cache kept)."""
    commit = subprocess.run(["git", "rev-parse", ref], cwd=REPO, capture_output=True,
                            text=True, check=True).stdout.strip()
    dest = Path(tempfile.gettempdir()) / f"wellfault-bench-ref-{commit[:12]}"
    if not (dest / "wellfault").is_dir():
        dest.mkdir(parents=True, exist_ok=True)
        archive = subprocess.run(["git", "archive", commit, "wellfault"], cwd=REPO,
                                 capture_output=True, check=True).stdout
        subprocess.run(["tar", "-x", "-C", str(dest)], input=archive, check=True)
    return dest


# ----------------------------------------------------------------------------- measuring
def timed(cmd: list[str], env: dict | None = None, cwd=NEUTRAL
          ) -> tuple[subprocess.CompletedProcess, float, float]:
    """Run one new process; (its result, wall seconds, user+sys CPU seconds)."""
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    t = time.perf_counter()
    done = subprocess.run(cmd, env=env, cwd=cwd, check=True, capture_output=True, text=True)
    wall = time.perf_counter() - t
    after = resource.getrusage(resource.RUSAGE_CHILDREN)
    return done, wall, (after.ru_utime - before.ru_utime) + (after.ru_stime - before.ru_stime)


def env_for(code: Path) -> dict:
    return dict(os.environ, PYTHONPATH=str(code), MPLBACKEND="Agg")


def argv_for(argv: list[str], code: str) -> list[str]:
    return [a.replace("{code}", code) for a in argv]


def summary(runs: list[tuple[float, float]]) -> dict:
    walls, cpus = [r[0] for r in runs], [r[1] for r in runs]
    return {"wall_med": statistics.median(walls), "wall_min": min(walls),
            "cpu_med": statistics.median(cpus), "cpu_min": min(cpus)}


def row(label: str, s: dict, peer: dict | None = None, goal: str = "") -> str:
    ratio = f"{s['wall_med'] / peer['wall_med']:6.1f}x" if peer else "       "
    return (f"  {label:<34} {s['wall_med']:6.2f} {s['wall_min']:6.2f}   {s['cpu_med']:6.2f} "
            f"{s['cpu_min']:6.2f}  {ratio}  {goal}")


def breakdown(argv: list[str], code: Path) -> dict:
    """Phases of one cold process running ``argv`` (the CHILD script); with the process's
    wall and user+sys time."""
    out, wall, cpu = timed([sys.executable, "-c", CHILD, json.dumps(argv)], env_for(code))
    res = json.loads(out.stdout.strip().splitlines()[-1])
    res["process"] = [wall, cpu]
    return res


def install_check(argv: list[str]) -> None:
    """pip-install the package (not editable) into a temporary folder; run it twice there."""
    with tempfile.TemporaryDirectory() as tmp:
        site = Path(tmp) / "site"
        subprocess.run([sys.executable, "-m", "pip", "install", "-q", "--no-deps",
                        "--target", str(site), str(REPO)], check=True,
                       stdout=subprocess.DEVNULL)
        probe = ("import gc, sys\nfrom wellfault.cli import main\nmain()\n"
                 "from numba.core.registry import CPUDispatcher\n"
                 "kernels = [f for n, m in list(sys.modules.items())\n"
                 "           if n.startswith('wellfault.align.') for f in vars(m).values()\n"
                 "           if isinstance(f, CPUDispatcher)]\n"
                 "print(sum(sum(f.stats.cache_hits.values()) for f in kernels),\n"
                 "      sum(sum(f.stats.cache_misses.values()) for f in kernels),\n"
                 "      sys.modules['wellfault'].__file__, file=sys.stderr)\n"
                 "gc.freeze()")
        env = dict(os.environ, PYTHONPATH=str(site))
        env.pop("NUMBA_CACHE_DIR", None)
        print("\ninstalled (pip install --target, not editable), curves, two new processes:")
        for k in range(2):
            out, wall, cpu = timed([sys.executable, "-c", probe, *argv_for(argv, "installed")],
                                   env, cwd=tmp)
            hits, misses, where = out.stderr.strip().splitlines()[-1].split(" ", 2)
            print(f"  run {k + 1}: {wall:6.2f} s wall, {cpu:6.2f} s user+sys; numba cache hits "
                  f"{hits}, misses (compiled) {misses}; package {where}")
        caches = sorted(p.name for p in (site / "wellfault" / "align").glob("__pycache__/*.nbi"))
        print(f"  cache beside the installed modules: {len(caches)} kernel index files")


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--seeds", type=int, nargs="+", default=[0, 1, 2])
    ap.add_argument("--repeat", type=int, default=5)
    ap.add_argument("--reference", default="main",
                    help="git revision to compare tables and times with ('' to skip)")
    ap.add_argument("--install-check", action="store_true")
    ap.add_argument("--folder", type=Path, default=Path(NEUTRAL) / "wellfault-bench-cli",
                    help="where the test wells are written")
    args = ap.parse_args()

    sys.path.insert(0, str(REPO))
    cases = {s: make_case(s, args.folder) for s in args.seeds}
    ref = reference_checkout(args.reference) if args.reference else None
    codes = {"this": REPO} | ({"ref": ref} if ref else {})
    py = [sys.executable, "-c"]
    first = cases[args.seeds[0]]
    print(f"wellfault command, cold processes ({platform.machine()}, {os.cpu_count()} CPUs, "
          f"load {os.getloadavg()[0]:.2f}; python {platform.python_version()})")
    print(f"well: {first['samples']} samples (seed {args.seeds[0]}), type log: "
          f"{args.folder / 'type.las'}; reference code: {args.reference or '-'} ({ref})")
    for code, where in codes.items():    # compile/load once so that every timed run is warm
        timed(py + [MAIN, *argv_for(first["curves"], code)], env_for(where))
    runs: dict[str, list] = {}
    for _ in range(args.repeat):      # interleaved, so that load changes hit every command alike
        runs.setdefault("python -c pass", []).append(timed(py + ["pass"])[1:])
        runs.setdefault("python -c 'import numpy'", []).append(
            timed(py + ["import numpy"])[1:])
        for code, where in codes.items():
            for kind in ("curves", "tops"):
                runs.setdefault(f"detect by {kind} [{code}]", []).append(
                    timed(py + [MAIN, *argv_for(first[kind], code)], env_for(where))[1:])
            runs.setdefault(f"--help [{code}]", []).append(
                timed(py + [MAIN, "--help"], env_for(where))[1:])
    s = {k: summary(v) for k, v in runs.items()}
    peer = s["python -c 'import numpy'"]
    print(f"\n  {'command':<34} {'wall s (med, min)':>13}   {'user+sys s':>13}  /numpy")
    goals = {"detect by curves [this]": "goal <= 2 s", "detect by tops [this]": "goal <= 1 s",
             "--help [this]": "goal <= 0.5 s"}
    for k, v in s.items():
        print(row(k, v, peer, goals.get(k, "")))
    if ref:
        for kind in ("detect by curves", "detect by tops", "--help"):
            a, b = s[f"{kind} [this]"], s[f"{kind} [ref]"]
            print(f"  {kind}: this / reference = {a['wall_med'] / b['wall_med']:.2f} (wall), "
                  f"{a['cpu_med'] / b['cpu_med']:.2f} (CPU)")

    b = breakdown(argv_for(first["curves"], "this"), REPO)
    cold, again = b["cold"], b["again"]
    phases = ("imports", "reading", "tops evidence", "curve alignment", "writing")
    zero = [0.0, 0.0]
    start = [p - c for p, c in zip(b["process"], b["child"])]     # interpreter start, exit
    rest = [cold["script"][k] - sum(cold.get(p, zero)[k] for p in phases) for k in (0, 1)]
    rest_again = [again["main"][k] - sum(again.get(p, zero)[k] for p in phases)
                  for k in (0, 1)]
    print("\none cold process, detect by curves (this code): seconds of wall | user+sys")
    print(f"  {'phase':<42} {'cold':>13}   {'in-process':>13}")
    lines = [("interpreter start and exit", start, None)]
    lines += [(p, cold.get(p, zero), again.get(p, zero)) for p in phases]
    lines.insert(5, ("  of which the calibration's coarse passes", cold.get("calibration", zero),
                     again.get("calibration", zero)))
    lines += [("the rest (arguments, type log, measuring)", rest, rest_again),
              ("total", [start[k] + cold["script"][k] for k in (0, 1)], again["main"])]
    for label, c, a in lines:
        right = f"{a[0]:6.3f} | {a[1]:5.3f}" if a else ""
        print(f"  {label:<42} {c[0]:6.3f} | {c[1]:5.3f}   {right}")

    if ref:
        print("\ncut tables against the reference code (--out CSV; a reference from before the "
              "written-precision rules is rounded by them first):")
        for seed, case in cases.items():
            for kind in ("curves", "tops"):
                files = []
                for code, where in codes.items():
                    argv = argv_for(case[kind], code)
                    timed(py + [MAIN, *argv], env_for(where))
                    files.append(Path(argv[argv.index("--out") + 1]).read_bytes())
                n = max(len(files[0].splitlines()) - 1, 0)
                same = "identical" if files[0] == files[1] else \
                    _same_when_written(files[0], files[1])
                print(f"  seed {seed} ({case['samples']} samples), {kind}: {n} cut(s), {same}")
    if args.install_check:
        install_check(first["curves"])


def _same_when_written(this: bytes, ref: bytes) -> str:
    """'identical at the written precision' when the reference table, written at full
    precision by older code, rounds to this one (wellfault.geo.precision's rules), else
    'DIFFERENT'."""
    import io

    import pandas as pd

    from wellfault.geo.precision import round_table

    a = pd.read_csv(io.BytesIO(this))
    b = pd.read_csv(io.BytesIO(ref))
    if list(a.columns) != list(b.columns) or len(a) != len(b):
        return "DIFFERENT"
    b = round_table(b)
    for c in a.columns:
        x, y = a[c], b[c]
        if pd.api.types.is_float_dtype(x) and pd.api.types.is_numeric_dtype(y):
            # one unit of the last written decimal: rounding a value that was itself computed
            # to more digits can land either side of a half
            tol = 10.0 ** -max(len(t.split(".")[1]) if "." in t else 0
                               for t in x.dropna().astype(str)) if x.notna().any() else 0.0
            if not ((x - y).abs().le(tol * 1.01) | (x.isna() & y.isna())).all():
                return f"DIFFERENT ({c})"
        elif not x.astype(str).equals(y.astype(str)):
            return f"DIFFERENT ({c})"
    return "identical at the written precision"


if __name__ == "__main__":
    main()
