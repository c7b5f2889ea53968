"""Mutated inputs at volume: damaged real and demo files through `wellfault detect` and `screen`.

Each case takes a valid set of inputs — a demo well of the invented field (LAS, tops, survey,
column), the real Wellington KGS 1-32 log with its published tops (and a column made from them),
the real P-129 and F03-02 logs with tops placed inside their logged depths, or one of the real
deviation surveys — damages one file with :func:`wellfault.synth.mutations.mutate` (seeded edits of the
kinds users' files suffer), and runs the command in this process as a user would:
``wellfault detect`` (tops evidence; every ``--curves-every``-th demo case also with the type
well's curves), ``wellfault survey``, and every ``--screen-every`` cases a ``wellfault screen``
over a manifest of the damaged demo wells.

Every outcome is sorted into: a result (exit 0; 1 for screen with failed wells), a clean
``wellfault`` error (exit 2, one ``wellfault: error:`` line), or an escaped exception (anything
else: an exception leaving ``main``, a traceback on stderr, another exit code, or an
``internal error`` row in screen's error table). Goal: 0 escaped. Escaped cases are saved with
their seed, so each can become a regression test (tests/test_fuzz.py).

Seeds: benchmark seeds 0+ (the fuzz tests draw their own with hypothesis).

Usage::

    python benchmarks/bench_mutations.py                 # 10,000 cases on all cores
    python benchmarks/bench_mutations.py --n 500 --workers 1
"""

from __future__ import annotations

import argparse
import contextlib
import io
import json
import os
import shutil
import sys
import tempfile
import time
import traceback
import warnings
from multiprocessing import Pool
from pathlib import Path

import numpy as np
import pandas as pd
from _curvecases import reference_data  # benchmarks/: one place says where the real wells are

REPO = Path(__file__).resolve().parents[1]
DEMO = REPO / "synthetic_wells"


# ------------------------------------------------------------------------------ valid bases
def _prepare(folder: Path) -> list[dict]:
    """Write the valid input sets into ``folder``; return them as dicts of role -> path."""
    bases = []
    man = pd.read_csv(DEMO / "manifest.csv")
    for row in man.itertuples(index=False):
        b = {"kind": "demo", "las": DEMO / row.las, "tops": DEMO / row.tops,
             "column": DEMO / "column.csv", "dip": row.dip}
        if isinstance(row.survey, str) and row.survey:
            b["survey"] = DEMO / row.survey
        bases.append(b)
    ref = reference_data()
    if not ref.is_dir():
        print(f"reference data not found at {ref}: demo files only", file=sys.stderr)
        return bases
    # Wellington KGS 1-32: its published tops, a column from their spacing (feet)
    wt = pd.read_csv(ref / "Wellington_KGS_1-32_tops.csv")
    wt = wt.drop_duplicates("top_ft").drop_duplicates("name").sort_values("top_ft")
    tops = pd.DataFrame({"well": "Wellington KGS 1-32", "surface": wt["name"],
                         "md_ft": wt["top_ft"]})
    tops.to_csv(folder / "wellington_tops.csv", index=False)
    thick = np.append(np.diff(wt["top_ft"].to_numpy()), np.nan)
    pd.DataFrame({"surface": wt["name"], "thickness_ft": thick}).to_csv(
        folder / "wellington_column.csv", index=False)
    bases.append({"kind": "real", "las": ref / "Wellington_KGS_1-32.las",
                  "tops": folder / "wellington_tops.csv",
                  "column": folder / "wellington_column.csv", "dip": "1/270"})
    # P-129 (with its survey) and F03-02: the demo column's surfaces placed inside the log
    col = pd.read_csv(DEMO / "column.csv")
    for name, las, top_m, survey in (("Kennetcook #2", "P-129_Kennetcook2.las", 300.0,
                                      "P-129_survey.csv"),
                                     ("F/3-2", "F03-02_NorthSea.las", 500.0, None)):
        md = top_m + np.concatenate([[0.0], np.cumsum(col["thickness_m"].to_numpy()[:-1])])
        keep = md < top_m + 1200.0
        stem = las.split("_")[0]
        pd.DataFrame({"well": name, "surface": col["surface"][keep], "md_m": md[keep]}).to_csv(
            folder / f"{stem}_tops.csv", index=False)
        b = {"kind": "real", "las": ref / las, "tops": folder / f"{stem}_tops.csv",
             "column": DEMO / "column.csv", "dip": "3/045"}
        if survey:
            # the provider's survey names no unit in its header: a metre copy with md_m
            s = pd.read_csv(ref / survey).rename(columns={"md": "md_m"})[["md_m", "inc", "azi"]]
            s.to_csv(folder / f"{stem}_survey.csv", index=False)
            b["survey"] = folder / f"{stem}_survey.csv"
        bases.append(b)
    for survey, unit in (("deviation_m_survey.csv", "m"), ("Well_1515_survey.csv", "ft")):
        bases.append({"kind": "survey", "survey": ref / survey, "unit": unit})
    return bases


# ------------------------------------------------------------------------------ one case
_STATE: dict = {}


def _init(folder: str) -> None:
    warnings.simplefilter("ignore")
    work = Path(tempfile.mkdtemp(prefix="cases_", dir=folder))
    _STATE.update(bases=_prepare(Path(folder)) if not _STATE.get("bases") else _STATE["bases"],
                  work=work)


def _run_cli(argv: list[str]) -> tuple[int | None, str, str | None]:
    from wellfault.cli.app import main

    out, err = io.StringIO(), io.StringIO()
    try:
        with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
            code = main([str(a) for a in argv])
    except BaseException:  # noqa: BLE001 - whatever escapes main is what is counted
        return None, err.getvalue(), traceback.format_exc()
    return code, err.getvalue(), None


def _verdict(code, err: str, tb: str | None, ok_codes=(0,)) -> str:
    if tb is not None or "Traceback" in err:
        return "escaped"
    if code in ok_codes:
        return "result"
    if code == 2 and err.rstrip().splitlines()[-1:] and \
            err.rstrip().splitlines()[-1].startswith("wellfault: error: "):
        return "error"
    return "escaped"


def _mutated_copy(src: Path, seed: int, tag: str) -> tuple[Path, list]:
    from wellfault.synth.mutations import draw_edits, mutate

    rng = np.random.default_rng(seed)
    edits = draw_edits(rng)
    dst = _STATE["work"] / f"{tag}{src.suffix}"
    dst.write_bytes(mutate(src.read_bytes(), edits))
    return dst, edits


def _case(seed: int, curves_every: int) -> dict:
    bases = _STATE["bases"]
    rng = np.random.default_rng([seed, 7])
    base = bases[int(rng.integers(len(bases)))]
    roles = [r for r in ("las", "tops", "survey", "column") if r in base]
    role = roles[int(rng.integers(len(roles)))]
    files = dict(base)
    files[role], edits = _mutated_copy(base[role], seed, role)
    argv = _base_argv(files)
    if base["kind"] != "survey":
        if base["kind"] == "demo" and curves_every and seed % curves_every == 0:
            argv += ["--type-well", DEMO / "VR_1.las", "--type-tops", DEMO / "tops.csv"]
    code, err, tb = _run_cli(argv)
    return {"seed": seed, "command": argv[0], "base": str(base.get("las", base.get("survey"))),
            "role": role, "edits": edits, "verdict": _verdict(code, err, tb), "code": code,
            "traceback": tb, "stderr_tail": err[-400:]}


def _screen_case(seed: int, n_wells: int = 12) -> dict:
    """A manifest of damaged demo wells (one file each) through `wellfault screen`."""
    man = pd.read_csv(DEMO / "manifest.csv")
    rng = np.random.default_rng([seed, 11])
    rows = []
    for k in range(n_wells):
        row = man.iloc[int(rng.integers(len(man)))].copy()
        row["well"] = f"{row['well']}-m{k}"
        for role in ("las", "tops", "survey"):
            if isinstance(row[role], str) and row[role]:
                row[role] = str(DEMO / row[role])
        role = ("las", "tops")[int(rng.integers(2))]
        path, _ = _mutated_copy(Path(row[role]), seed * 100 + k, f"s{k}_{role}")
        row[role] = str(path)
        rows.append(row)
    manifest = _STATE["work"] / "manifest.csv"
    pd.DataFrame(rows).to_csv(manifest, index=False)
    out = _STATE["work"] / "screen_out"
    code, err, tb = _run_cli(["screen", manifest, "--column", DEMO / "column.csv", "--out", out,
                              "--workers", "1", "--no-progress"])
    verdict = _verdict(code, err, tb, ok_codes=(0, 1))
    if verdict == "result" and (out / "errors.csv").is_file():
        errors = pd.read_csv(out / "errors.csv")
        if errors["message"].astype(str).str.contains("internal error").any() or \
                errors.get("error_type", pd.Series(dtype=str)).astype(str).eq("internal").any():
            verdict = "escaped"
    shutil.rmtree(out, ignore_errors=True)
    return {"seed": seed, "command": "screen", "base": "demo manifest", "role": "las/tops",
            "edits": [], "verdict": verdict, "code": code, "traceback": tb,
            "stderr_tail": err[-400:]}


def _base_argv(base: dict) -> list:
    if base["kind"] == "survey":
        return ["survey", base["survey"], "--depth-unit", base["unit"]]
    argv = ["detect", base["las"], "--column", base["column"], "--tops", base["tops"],
            "--dip", base["dip"], "--out", _STATE["work"] / "cuts.csv"]
    return argv + (["--survey", base["survey"]] if "survey" in base else [])


def _chunk(args: tuple) -> list[dict]:
    seeds, curves_every, screen_every = args
    out = []
    for s in seeds:
        out.append(_case(s, curves_every))
        if screen_every and s % screen_every == 0:
            out.append(_screen_case(s))
    return out


# ------------------------------------------------------------------------------ the run
def main() -> int:
    ap = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    ap.add_argument("--n", type=int, default=10_000, help="cases (default 10,000)")
    ap.add_argument("--seed", type=int, default=0, help="first seed (benchmark seeds 0+)")
    ap.add_argument("--workers", type=int, default=len(os.sched_getaffinity(0)))
    ap.add_argument("--curves-every", type=int, default=50,
                    help="every Nth demo case also aligns curves (default 50)")
    ap.add_argument("--screen-every", type=int, default=200,
                    help="every Nth case also screens 12 damaged demo wells (default 200)")
    ap.add_argument("--save", metavar="DIR", help="write the escaped cases here as JSON")
    args = ap.parse_args()

    folder = tempfile.mkdtemp(prefix="wellfault_mutations_")
    _init(folder)
    valid = [_verdict(*_run_cli(_base_argv(b))) for b in _STATE["bases"]]
    print(f"undamaged inputs: {valid.count('result')} of {len(valid)} sets give a result "
          "(each damaged case starts from one of them)")
    t0 = time.perf_counter()
    seeds = list(range(args.seed, args.seed + args.n))
    chunks = [(seeds[i:i + 50], args.curves_every, args.screen_every)
              for i in range(0, len(seeds), 50)]
    try:
        if args.workers > 1:
            with Pool(args.workers, initializer=_init, initargs=(folder,)) as pool:
                results = [r for part in pool.imap_unordered(_chunk, chunks) for r in part]
        else:
            results = [r for c in chunks for r in _chunk(c)]
    finally:
        shutil.rmtree(folder, ignore_errors=True)
    seconds = time.perf_counter() - t0

    df = pd.DataFrame(results)
    print(f"{len(df)} runs ({args.n} mutated files, {int((df.command == 'screen').sum())} "
          f"screen runs) in {seconds:.0f} s on {args.workers} worker(s)")
    table = df.pivot_table(index="command", columns="verdict", values="seed", aggfunc="count",
                           fill_value=0)
    for col in ("result", "error", "escaped"):
        if col not in table.columns:
            table[col] = 0
    print(table[["result", "error", "escaped"]].to_string())
    print("\nby damaged file:")
    print(df.pivot_table(index="role", columns="verdict", values="seed", aggfunc="count",
                         fill_value=0).to_string())
    escaped = df[df.verdict == "escaped"]
    print(f"\nescaped exceptions: {len(escaped)} (goal 0)")
    for r in escaped.head(10).itertuples(index=False):
        last = (r.traceback or r.stderr_tail).strip().splitlines()[-1:]
        print(f"  seed {r.seed} {r.command} {Path(r.base).name} [{r.role}] {r.edits}: {last}")
    if args.save and len(escaped):
        Path(args.save).mkdir(parents=True, exist_ok=True)
        path = Path(args.save) / "escaped.json"
        path.write_text(json.dumps(escaped.to_dict("records"), indent=1, default=str))
        print(f"saved to {path}")
    return 0 if escaped.empty else 1


if __name__ == "__main__":
    sys.exit(main())
