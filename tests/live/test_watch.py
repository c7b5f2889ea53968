"""While drilling: alerts row by row, the same cuts as the batch at the end, the re-forecast of
the tops to come, live-feed problems, the JSONL schema and the ``watch`` command."""

from __future__ import annotations

import json
import math
import os
import signal
import subprocess
import sys
import time
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from wellfault import CAUTION
from wellfault.evidence.curve_settings import CurveSettings
from wellfault.evidence.detect import analyse_well
from wellfault.geo.dip import BedDip
from wellfault.synth.structure import Beds, PlanarFault
from wellfault.synth.forward import simulate_well
from wellfault.synth.columns import synthetic_column
from wellfault.evidence.results import CUT_COLUMNS
from wellfault.geo.trajectory import Trajectory
from wellfault.live.watch import WatchSettings, WellWatcher, extend_with_plan

ROOT = Path(__file__).resolve().parents[2]
FIELD = ROOT / "synthetic_wells"


@pytest.fixture(scope="module")
def column():
    return synthetic_column(12, seed=21, pad_m=100.0)


@pytest.fixture(scope="module")
def vertical(column):
    """A vertical well with a normal fault (missing section) and a reverse fault (repeated)."""
    beds = Beds(4.0, 90.0, origin_s_m=-500.0)
    faults = [PlanarFault.dip_slip(60.0, 270.0, (0.0, 0.0, 640.0), 22.0, name="N1"),
              PlanarFault.dip_slip(30.0, 90.0, (0.0, 0.0, 820.0), 18.0, kind="reverse",
                                   name="R1")]
    syn = simulate_well(column, beds, faults, Trajectory.vertical(ref_elevation_m=40.0),
                        md_top_m=520.0, md_base_m=960.0, noise_std=3.0, gain=1.05,
                        offset=-4.0, seed=3, name="W-1")
    return syn, BedDip.constant(4.0, 90.0)


def drill(w, md, x, start=0, stop=None):
    events = []
    for i in range(start, md.size if stop is None else stop):
        events += w.feed(md[i], [x[i]])
    return events


@pytest.fixture(scope="module")
def drilled(column, vertical):
    syn, bed = vertical
    md = syn.well.curves.index.to_numpy(float)
    x = syn.well.curves["GR"].to_numpy(float)
    w = WellWatcher(column, syn.trajectory, bed, well_name="W-1")
    events = drill(w, md, x)
    live = w.cut_table("m")
    events += w.finish()
    return w, events, live


def test_row_by_row_ends_with_the_batch_cut_table(column, vertical, drilled):
    syn, bed = vertical
    w, events, live = drilled
    batch = analyse_well(syn.well, column, trajectory=syn.trajectory, bed_dip=bed,
                         curves=CurveSettings()).cuts
    pd.testing.assert_frame_equal(w.final_cuts, batch)
    confident = batch[batch["confidence"] >= 0.7].reset_index(drop=True)
    # the alerts raised while drilling are the batch's confident cuts, at nearly the same place
    assert len(live) == len(confident) == 2
    assert np.all(np.abs(live["md_m"] - confident["md_m"]) <= 1.0)
    assert np.allclose(live["delta_s_m"], confident["delta_s_m"], rtol=0.10)
    assert live["section"].tolist() == ["missing", "repeated"]
    summary = events[-1]
    assert summary.kind == "summary" and "agrees" in summary.summary["final_check"]
    # raised within tens of feet of new hole after the true cut (vertical well)
    truth = syn.cuts
    raised = [e for e in events if e.kind == "cut"]
    for e, (_, t) in zip(raised, truth.iterrows()):
        assert 0 < e.bit_md_m - t["md_first_below_m"] <= 15.0
        assert abs(e.cut.md_m - t["md_m"]) <= 1.0


def test_position_of_the_bit(column, vertical, drilled):
    syn, _ = vertical
    w, _, _ = drilled
    st = w.state
    td = float(syn.well.curves.index[-1])
    assert st.md_m == pytest.approx(td) and st.tvd_m == pytest.approx(td)
    assert st.tvdss_m == pytest.approx(td - 40.0)
    assert abs(st.s_m - syn.s_m[-1]) < 1.5                 # true s at TD (forward model)
    assert st.unit == column.unit_at(syn.s_m[-1]) and st.calibrated
    assert 0 <= st.below_unit_top_m < column.thickness(st.unit)


def test_work_per_sample_does_not_grow_with_the_hole(drilled):
    w, _, _ = drilled
    tail = w._tail(evidence=False)
    rows = w._al.n_rows
    assert rows > 2500
    # each evaluation traces and measures only the last rows, whatever was drilled before
    assert tail.n_rows - tail.row0 <= w.settings.lookback_rows
    assert tail.sample_end - tail.sample0 <= w.settings.lookback_rows + 8


def test_jsonl_schema(drilled):
    _, events, _ = drilled
    dicts = [e.to_dict("ft") for e in events]
    for d in dicts:
        json.dumps(d, allow_nan=False)
    updates = [d for d in dicts if d["event"] == "update"]
    assert len(updates) > 300
    assert {"bit_md_ft", "bit_tvd_ft", "bit_tvdss_ft", "unit", "s_ft"} <= set(updates[0])
    gaps = np.diff([d["bit_md_ft"] for d in updates]) * 0.3048
    assert gaps.min() >= 1.0 - 1e-6                       # at most once per metre of new hole
    cuts = [d for d in dicts if d["event"] == "cut"]
    assert len(cuts) == 2
    for d in cuts:
        assert set(CUT_COLUMNS("ft")) <= set(d) and {"bit_md_ft", "cut_id"} <= set(d)
        assert d["bit_md_ft"] > d["md_ft"]
    forecast = [d for d in dicts if d["event"] == "forecast"]
    assert forecast
    assert {"surface", "md_ft", "tvd_ft", "shift_ft"} <= set(forecast[0]["surfaces"][0])
    summary = dicts[-1]
    assert summary["event"] == "summary" and len(summary["cut_table"]) == 2
    assert set(summary["cut_table"][0]) == set(CUT_COLUMNS("ft"))


def test_duplicate_rows_skipped_changed_rows_restart(column, vertical, drilled):
    syn, bed = vertical
    md = syn.well.curves.index.to_numpy(float)
    x = syn.well.curves["GR"].to_numpy(float)
    w = WellWatcher(column, syn.trajectory, bed, well_name="W-1")
    n = md.size
    ev = drill(w, md, x, 0, int(0.6 * n))
    aligner = w._al
    ev += drill(w, md, x, int(0.5 * n), int(0.7 * n))      # the file read again: same rows
    notes = [e for e in ev if e.kind == "notice"]
    assert [e.notice for e in notes].count("duplicates") == 1 and w._al is aligner
    assert "unchanged" in [e for e in notes if e.notice == "duplicates"][0].message
    ev += drill(w, md, x, int(0.7 * n))
    ev += w.finish()
    first = [(round(e.cut.md_m, 3), round(e.cut.delta_s_m, 3)) for e in ev if e.kind == "cut"]
    _, ref_events, _ = drilled
    ref = [(round(e.cut.md_m, 3), round(e.cut.delta_s_m, 3)) for e in ref_events
           if e.kind == "cut"]
    assert first == ref                                      # nothing changed by the re-read
    # a re-logged interval: rows from 65 % on come again with other values
    w = WellWatcher(column, syn.trajectory, bed, well_name="W-1")
    drill(w, md, x, 0, int(0.8 * n))
    y = x.copy()
    k = int(0.65 * n)
    y[k:] += np.random.default_rng(1).normal(0.0, 3.0, n - k)
    ev = drill(w, md, y, k)
    relog = [e for e in ev if e.kind == "notice" and e.notice == "relogged"]
    assert len(relog) == 1 and f"{md[k]:.2f}" in relog[0].message
    assert w.state.md_m == pytest.approx(md[-1])
    ev += w.finish()
    assert len(w.cuts) == 2                                  # both faults still seen


def test_gaps_nulls_and_bad_depths_are_said_and_survived(column, vertical):
    syn, bed = vertical
    md = syn.well.curves.index.to_numpy(float)
    x = syn.well.curves["GR"].to_numpy(float).copy()
    keep = (md < 700.0) | (md > 712.0)                       # 12 m of missing rows
    x[(md > 860.0) & (md < 890.0)] = np.nan                  # 30 m of nulls
    md2, x2 = md[keep].copy(), x[keep]
    md2[100] = np.nan                                        # a row without a depth
    w = WellWatcher(column, syn.trajectory, bed, well_name="W-1")
    ev = drill(w, md2, x2) + w.finish()
    kinds = [e.notice for e in ev if e.kind == "notice"]
    assert {"gap", "nulls", "bad-depth"} <= set(kinds) and kinds.count("nulls") == 2
    gap = [e.message for e in ev if e.kind == "notice" and e.notice == "gap"][0]
    assert "bridged" in gap and "699.98 and 712.02" in gap
    assert len(w.cuts) == 2 and w.state.md_m == pytest.approx(md[-1])


def test_feed_accepts_batches_and_curve_mappings(column, vertical, drilled):
    syn, bed = vertical
    md = syn.well.curves.index.to_numpy(float)
    x = syn.well.curves["GR"].to_numpy(float)
    w = WellWatcher(column, syn.trajectory, bed, well_name="W-1")
    ev = []
    for i in range(0, md.size, 37):                          # any batching: the same alerts
        ev += w.feed(md[i:i + 37], {"gr": x[i:i + 37]})
    _, ref_events, _ = drilled
    assert [(e.bit_md_m, e.cut.md_m) for e in ev if e.kind == "cut"] == \
        [(e.bit_md_m, e.cut.md_m) for e in ref_events if e.kind == "cut"]


# ------------------------------------------------------------------ re-forecast with a plan
@pytest.fixture(scope="module")
def planned(column):
    """A well kicked off at 300 m and built to 40° along a plan; a normal fault at MD 700 m."""
    plan = Trajectory([0.0, 300.0, 700.0 - 300.0 + 300.0, 2000.0], [0.0, 0.0, 40.0, 40.0],
                      [0.0, 0.0, 120.0, 120.0], ref_elevation_m=40.0)
    beds = Beds(6.0, 300.0, origin_s_m=-420.0)
    at = plan.position(np.array([640.0]))[0]
    fault = PlanarFault.dip_slip(60.0, 300.0, at, 28.0, name="N1")
    syn = simulate_well(column, beds, [fault], plan, md_top_m=450.0, md_base_m=1000.0,
                        noise_std=3.0, seed=4, name="P-1")
    return syn, plan, BedDip.constant(6.0, 300.0)


def test_forecast_after_missing_section_moves_up_by_its_size(column, planned):
    syn, plan, bed = planned
    md = syn.well.curves.index.to_numpy(float)
    x = syn.well.curves["GR"].to_numpy(float)
    truth = syn.cuts.iloc[0]
    survey = Trajectory(plan.stations["md_m"][:3], plan.stations["inc_deg"][:3],
                        plan.stations["azi_deg"][:3], ref_elevation_m=40.0)
    plan_df = plan.stations[["md_m", "inc_deg", "azi_deg"]]
    w = WellWatcher(column, survey, bed, plan=plan_df, well_name="P-1")
    k_cut = int(np.searchsorted(md, truth["md_m"]))
    drill(w, md, x, 0, k_cut - 20)                     # 3 m above the fault
    before = w.forecast("m").set_index("surface")
    ev = drill(w, md, x, k_cut - 20, k_cut + 200)      # 30 m below: the cut is raised
    assert [e.kind for e in ev].count("cut") == 1
    after = w.forecast("m").set_index("surface")
    assert all(after["shift_m"].dropna() < 0)
    # expected MD shift of a surface: its forecast without the cut, minus with it, along the
    # plan, for the measured jump (r is nearly constant on the 40° hold)
    ds = w.cuts[0].delta_s_m
    assert ds == pytest.approx(truth["delta_s_m"], rel=0.1)
    common = [s for s in after.index if s in before.index and np.isfinite(after.loc[s, "md_m"])
              and after.loc[s, "md_m"] > md[k_cut + 200]][:4]
    assert len(common) >= 3
    t = plan.tangent(np.array([900.0]))[0]
    r = float(t @ bed.normals_at(np.array([900.0]))[0])
    for s in common:
        moved = before.loc[s, "md_m"] - after.loc[s, "md_m"]
        assert moved == pytest.approx(ds / r, rel=0.08, abs=1.5)
        assert after.loc[s, "shift_m"] == pytest.approx(-ds / r, rel=0.08, abs=1.5)
    # and where the forward model's well really crosses them (tops picked along the plan)
    tops = syn.tops.set_index("surface")["md_m"]
    for s in common[:3]:
        assert after.loc[s, "md_m"] == pytest.approx(tops[s], abs=3.0)
        assert after.loc[s, "tvd_m"] == pytest.approx(float(plan.tvd(np.array([tops[s]]))[0]),
                                                      abs=3.0)


def test_extend_with_plan_keeps_the_actual_survey():
    survey = Trajectory([0.0, 500.0, 800.0], [0.0, 10.0, 22.0], [0.0, 45.0, 50.0])
    plan = pd.DataFrame({"md_m": [0.0, 500.0, 700.0, 900.0, 1500.0],
                         "inc_deg": [0.0, 12.0, 20.0, 30.0, 30.0],
                         "azi_deg": [0.0, 40.0, 40.0, 40.0, 40.0]})
    t = extend_with_plan(survey, plan)
    assert t.stations["md_m"].tolist() == [0.0, 500.0, 800.0, 900.0, 1500.0]
    assert t.position(np.array([650.0])) == pytest.approx(survey.position(np.array([650.0])))
    assert extend_with_plan(None, None, x0_m=5.0).position(np.array([100.0]))[0].tolist() == \
        [5.0, 0.0, 100.0]


def test_settings_and_inputs_are_checked(column):
    from wellfault.errors import InputError

    with pytest.raises(InputError, match="min_confidence"):
        WatchSettings(min_confidence=1.5)
    with pytest.raises(InputError, match="per-surface"):
        WellWatcher(column, None, BedDip("surface", 0.0, 0.0, pd.DataFrame(
            {"surface": [], "dip_deg": [], "dip_azimuth_deg": []})))
    w = WellWatcher(column)
    with pytest.raises(InputError, match="1 curve"):
        w.feed([1.0, 2.0], [[1.0, 2.0, 3.0]])
    assert w.state is None and w.forecast().empty and w.cuts == []


# ------------------------------------------------------------------ the command
WATCH_ARGS = ["--type-well", str(FIELD / "VR_1.las"), "--type-tops", str(FIELD / "tops.csv"),
              "--column", str(FIELD / "column.csv"), "--dip", "8/070"]


def test_cli_once_on_a_demo_well_prints_the_cut(capsys):
    from wellfault.cli.watch import main

    assert main(["watch", str(FIELD / "VR_2.las"), *WATCH_ARGS, "--once"]) == 0
    out, err = capsys.readouterr()
    assert CAUTION in err and CAUTION not in out
    assert "*** FAULT CUT 1" in out and "MISSING section at MD 6474" in out
    assert "tops still to come" in out and "Ulvar Sandstone" in out
    assert "end of watch" in out and "1 fault cut(s) standing" in out


def test_cli_jsonl_ends_with_the_cuts_of_detect(capsys, tmp_path):
    from wellfault.cli.app import main as wellfault_main
    from wellfault.cli.watch import main

    out_csv = tmp_path / "cuts.csv"
    # watch follows GR unless told (a live feed's curves are fixed before its header arrives);
    # detect aligns every curve the well shares with the type well unless told: tell it GR
    assert wellfault_main(["detect", str(FIELD / "VR_11.las"), "--survey",
                           str(FIELD / "VR_11_survey.csv"), *WATCH_ARGS, "--curve", "GR",
                           "--out", str(out_csv)]) == 0
    capsys.readouterr()
    assert main(["watch", str(FIELD / "VR_11.las"), "--survey", str(FIELD / "VR_11_survey.csv"),
                 *WATCH_ARGS, "--once", "--jsonl"]) == 0
    out, err = capsys.readouterr()
    lines = [json.loads(s) for s in out.splitlines()]
    assert CAUTION in err and all("event" in d for d in lines)
    detect = pd.read_csv(out_csv)
    detect = detect[detect["confidence"] >= 0.7]
    summary = lines[-1]
    assert summary["event"] == "summary"
    table = pd.DataFrame(summary["cut_table"])
    assert len(table) == len(detect) >= 1
    for col in ("md_ft", "tst_ft", "section", "fault_type", "surface_above", "surface_below"):
        got, want = table[col].tolist(), detect[col].tolist()
        assert got == (pytest.approx(want) if col.endswith("_ft") else want)
    raised = [d for d in lines if d["event"] == "cut"]
    assert raised and raised[0]["bit_md_ft"] > raised[0]["md_ft"]
    # truth of the demo field: VR-11 crosses F1 at MD 2248.6 m (truth_cuts.csv)
    assert abs(raised[0]["md_ft"] * 0.3048 - 2248.557) < 2.0


def _las_head_and_rows(path: Path) -> tuple[str, list[str]]:
    text = path.read_text()
    k = text.index("~A")
    k = text.index("\n", k) + 1
    return text[:k], text[k:].splitlines(keepends=True)


def test_cli_follows_a_growing_file_and_stops_cleanly_on_ctrl_c(tmp_path):
    head, rows = _las_head_and_rows(FIELD / "VR_2.las")
    live = tmp_path / "VR_2_live.las"
    live.write_text(head + "".join(rows[:2000]))
    cmd = [sys.executable, "-m", "wellfault.cli.watch", str(live), *WATCH_ARGS, "--jsonl",
           "--poll", "0.2"]
    proc = subprocess.Popen(cmd, stdout=subprocess.PIPE, stderr=subprocess.PIPE, text=True,
                            cwd=ROOT, env={**os.environ, "PYTHONUNBUFFERED": "1"})
    try:
        k = 2000
        with open(live, "a") as f:
            while k < len(rows):
                time.sleep(0.05)
                f.write("".join(rows[k:k + 400])[:-7])     # a partly written last line ...
                f.flush()
                time.sleep(0.05)
                f.write("".join(rows[k:k + 400])[-7:])     # ... completed later
                f.flush()
                k += 400
        time.sleep(3.0)
        deadline = time.time() + 120
        seen = []
        while time.time() < deadline:                       # wait for the alert
            line = proc.stdout.readline()
            if not line:
                break
            d = json.loads(line)
            seen.append(d)
            if d["event"] == "update" and d["bit_md_ft"] >= 7140.0:
                break
        proc.send_signal(signal.SIGINT)
        out, err = proc.communicate(timeout=120)
    finally:
        if proc.poll() is None:
            proc.kill()
    seen += [json.loads(s) for s in out.splitlines()]
    assert proc.returncode == 0, err
    assert "stopped (Ctrl-C)" in err and CAUTION in err
    assert [d["event"] for d in seen].count("cut") == 1
    cut = [d for d in seen if d["event"] == "cut"][0]
    assert cut["md_ft"] == pytest.approx(6474.0, abs=2.0)
    # stopped while following: everything read up to the last update, at most all of it
    last_bit = max(d["bit_md_ft"] for d in seen if d["event"] == "update")
    read = sum(1 for r in rows if float(r.split()[0]) <= last_bit + 1e-6)
    assert seen[-1]["event"] == "summary" and read <= seen[-1]["samples"] <= len(rows)
    bits = [d["bit_md_ft"] for d in seen if d["event"] == "update"]
    assert bits == sorted(bits) and not math.isnan(bits[-1])


def test_cli_reads_rows_from_standard_input(tmp_path):
    head, rows = _las_head_and_rows(FIELD / "VR_2.las")
    text = "md_ft,GR\n" + "".join(",".join(r.split()[:2]) + "\n" for r in rows)
    res = subprocess.run([sys.executable, "-m", "wellfault.cli.watch", "-", *WATCH_ARGS,
                          "--jsonl", "--no-final-check"], input=text, capture_output=True,
                         text=True, cwd=ROOT, timeout=300)
    assert res.returncode == 0, res.stderr
    lines = [json.loads(s) for s in res.stdout.splitlines()]
    cuts = [d for d in lines if d["event"] == "cut"]
    assert len(cuts) == 1 and cuts[0]["md_ft"] == pytest.approx(6474.0, abs=2.0)
    assert lines[-1]["event"] == "summary" and lines[-1]["final_check"] == "not run"


def test_cli_bad_input_exits_2(tmp_path, capsys):
    from wellfault.cli.watch import main

    assert main(["watch", str(tmp_path / "nothing.las"), *WATCH_ARGS, "--once"]) == 2
    assert "not found" in capsys.readouterr().err
