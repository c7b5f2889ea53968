"""While drilling, high-angle wells: possible cuts from breaks of the log much sharper than the
type log predicts — raised early on a faulted well, confirmed by the correlation later, none on
an unfaulted well with sharp lithology changes, withdrawn when the correlation catches up, and
the ``possible_cut`` event schema of the README."""

from __future__ import annotations

import json
import math
from pathlib import Path

import numpy as np
import pytest

from wellfault.live.breaks import assess_break, find_breaks, noise_sigma
from wellfault.evidence.detect import load_column
from wellfault.geo.dip import BedDip
from wellfault.synth.structure import Beds
from wellfault.synth.forward import simulate_well
from wellfault.synth.columns import synthetic_column
from wellfault.synth.scenarios import build_trajectory
from wellfault.live.watch import WatchSettings, WellWatcher

ROOT = Path(__file__).resolve().parents[2]
FIELD = ROOT / "synthetic_wells"
SIDE = 7                         # samples either side of a break (1 m at 0.1524 m)


def replay(w, md, x):
    events = []
    for i in range(md.size):
        events += w.feed(md[i], x[i])
    return events


def largest_step(x, side=SIDE):
    """Largest |mean of `side` samples below − mean of `side` above| along a log."""
    c = np.concatenate([[0.0], np.cumsum(x)])
    k = np.arange(side, x.size - side + 1)
    return float(np.max(np.abs((c[k + side] - c[k]) - (c[k] - c[k - side])) / side))


# ------------------------------------------------------------------ a faulted high-angle well
@pytest.fixture(scope="module")
def sidetrack():
    """A high-angle sidetrack of the demo field (its model, drawn as its wells are): built to
    78° toward 250° from the VR-6H pad area, it crosses the normal fault F1 footwall to hanging
    wall at r = 0.34, where the fault puts shale against sandstone."""
    from wellfault.synth.fieldgen import BED_DIP, WellPlan, _draw_well, field_model

    column, beds, faults = field_model()
    plan = WellPlan("VR-6H ST1", "high-angle", 0.0, 300.0, 39.0, "m", 4500.0, 78.0, 250.0,
                    1000.0, 3.0, max_log_m=2000.0)
    syn = _draw_well(plan, column, beds, faults, np.random.default_rng(5))
    type_column = load_column(column=str(FIELD / "column.csv"), type_well=str(FIELD / "VR_1.las"),
                              type_tops=str(FIELD / "tops.csv"), type_survey=None, bed_dip=None,
                              depth_unit=None)
    return syn, type_column, BedDip.constant(*BED_DIP)


@pytest.fixture(scope="module")
def sidetrack_run(sidetrack):
    syn, column, bed = sidetrack
    md = syn.well.curves.index.to_numpy(float)
    x = syn.well.curves[["GR"]].to_numpy(float)
    w = WellWatcher(column, syn.trajectory, bed, well_name="VR-6H ST1")
    events, standing_before = [], None
    for i in range(md.size):
        new = w.feed(md[i], x[i])
        if standing_before is None and any(e.kind == "possible_cut" for e in new):
            standing_before = list(w.cuts)          # the cut table when the warning came
        events += new
    events += w.finish()
    return w, events, standing_before


def test_the_sidetrack_crosses_a_fault_that_shows_as_a_break(sidetrack):
    syn, _, _ = sidetrack
    truth = syn.cuts
    assert len(truth) == 1 and truth["fault_name"][0] == "F1"
    assert abs(truth["r"][0]) < 0.4 and abs(truth["delta_s_m"][0]) >= 20.0
    md = syn.well.curves.index.to_numpy(float)
    gr = syn.well.curves["GR"].to_numpy(float)
    b = int(np.searchsorted(md, truth["md_m"][0]))
    # the rock either side differs (forward model): 1 m below vs 1 m above, GR noise 3 API
    assert abs(gr[b:b + SIDE].mean() - gr[b - SIDE:b].mean()) > 40.0


def test_possible_cut_raised_within_20_m_and_confirmed_later(sidetrack, sidetrack_run):
    syn, _, _ = sidetrack
    w, events, standing_before = sidetrack_run
    t = syn.cuts.iloc[0]
    raised = [e for e in events if e.kind == "possible_cut" and e.possible.status == "raised"]
    assert raised, "no possible cut raised at a sharp fault"
    first = raised[0]
    assert 0.0 < first.bit_md_m - t["md_first_below_m"] <= 20.0     # issue 13: within 20 m
    assert abs(first.possible.break_md_m - t["md_m"]) <= 2.0
    pc, st = first.possible, w.settings
    assert abs(pc.observed) >= st.break_min_ratio * max(pc.expected, pc.noise)
    assert pc.excess >= st.break_min_excess and pc.r < 0.4
    # confirmed later by the correlation: a cut event with the same identifier
    cuts = [e for e in events if e.kind == "cut"]
    confirm = [e for e in cuts if e.cut_id == first.cut_id]
    assert len(confirm) == 1 and confirm[0].possible.status == "confirmed"
    assert confirm[0].possible.break_md_m == first.possible.break_md_m
    assert confirm[0].bit_md_m > first.bit_md_m
    assert abs(confirm[0].cut.md_m - t["md_m"]) <= 3.0              # the correlation's cut
    # the possible cut never entered the cut table while it stood
    assert standing_before == []
    assert not [e for e in events if e.kind == "possible_cut" and e.cut_id == first.cut_id
                and e.possible.status == "withdrawn"]
    assert w.n_possible["confirmed"] >= 1


def test_forecast_shows_both_cases_while_a_possible_cut_stands(sidetrack_run):
    _, events, _ = sidetrack_run
    k = next(i for i, e in enumerate(events) if e.kind == "possible_cut")
    pc = events[k].possible
    fc = next(e for e in events[k:] if e.kind == "forecast")
    assert len(fc.cases) == 1 and fc.cases[0]["cut_id"] == pc.cut_id
    case = fc.cases[0]
    nf = case["no_fault"].set_index("surface")["md_m"]
    wf = case["with_fault"].set_index("surface")["md_m"]
    assert math.isfinite(case["delta_s_m"]) and abs(case["delta_s_m"]) >= 2.0
    both = [s for s in nf.index if s in wf.index and np.isfinite(nf[s]) and np.isfinite(wf[s])]
    assert both and all(abs(nf[s] - wf[s]) > 1.0 for s in both)
    d = fc.to_dict("ft")
    json.dumps(d, allow_nan=False)
    assert {"cut_id", "break_md_ft", "delta_s_ft", "no_fault", "with_fault"} == set(d["cases"][0])
    assert {"surface", "md_ft", "tvd_ft"} <= set(d["cases"][0]["with_fault"][0])
    # once confirmed, the cases are gone
    conf = next(i for i, e in enumerate(events) if e.kind == "cut" and e.cut_id == pc.cut_id)
    after = [e for e in events[conf:] if e.kind == "forecast"]
    assert after and not after[0].cases


# The schema documented in README.md ("While drilling", possible cuts).
POSSIBLE_KEYS = {"event", "bit_md_{u}", "cut_id", "status", "break_md_{u}", "raised_bit_md_{u}",
                 "evidence", "confidence", "delta_s_{u}", "separation_from"}
EVIDENCE_KEYS = {"curve", "observed_sharpness", "expected_sharpness", "noise", "ratio",
                 "excess", "r", "side_{u}"}


def test_possible_cut_event_schema(sidetrack_run):
    _, events, _ = sidetrack_run
    e = next(e for e in events if e.kind == "possible_cut")
    for u, k in (("m", 1.0), ("ft", 0.3048)):
        d = e.to_dict(u)
        json.dumps(d, allow_nan=False)
        assert set(d) == {s.format(u=u) for s in POSSIBLE_KEYS}
        assert set(d["evidence"]) == {s.format(u=u) for s in EVIDENCE_KEYS}
        assert d["event"] == "possible_cut" and d["status"] == "raised"
        # written at 0.01 m / 0.1 ft (README "Units and precision of what is written")
        assert d[f"break_md_{u}"] == pytest.approx(e.possible.break_md_m / k, abs=0.051)
        # written at 2 decimals (README "Units and precision of what is written")
        assert d["evidence"]["curve"] == "GR" and 0.0 < d["confidence"] <= 1.0
        assert d["confidence"] == pytest.approx(e.possible.confidence, abs=0.005)
        assert abs(d["evidence"]["observed_sharpness"]) > d["evidence"]["expected_sharpness"]
    # the example in README.md has exactly these fields
    text = (ROOT / "README.md").read_text()
    k0 = text.index('{"event": "possible_cut"')
    example = json.loads(text[k0:text.index("```", k0)])
    assert set(example) == set(e.to_dict("m")) and \
        set(example["evidence"]) == set(e.to_dict("m")["evidence"])
    cut = next(x for x in events if x.kind == "cut" and x.cut_id == e.cut_id).to_dict("ft")
    assert cut["possible_cut"]["break_md_ft"] == pytest.approx(e.possible.break_md_m / 0.3048,
                                                               abs=0.051)
    assert set(cut["possible_cut"]) == {"break_md_ft", "raised_bit_md_ft"}


def test_terminal_lines(sidetrack_run, capsys):
    from wellfault.cli.watch import _TextPrinter
    from wellfault.geo.units import parse_depth_unit

    _, events, _ = sidetrack_run
    _TextPrinter(parse_depth_unit("m"), 10.0).emit(events)
    out = capsys.readouterr().out
    assert "??? POSSIBLE FAULT CUT" in out and "awaiting the correlation" in out
    assert "confirms possible fault cut" in out and "MD no fault" in out


# ------------------------------------------------------------------ an unfaulted high-angle well
@pytest.fixture(scope="module")
def unfaulted():
    """No fault; drilled at 80° through flat beds (r = cos 80° = 0.17) across a column whose
    type log has sharp lithology changes (tool resolution 0.3 m; hot shales, limestones)."""
    column = synthetic_column(14, seed=31, pad_m=100.0, resolution_m=0.3)
    traj = build_trajectory("high-angle", inclination_deg=80.0, azimuth_deg=90.0,
                            kickoff_m=300.0, td_m=9000.0)
    beds = Beds(0.0, 0.0, origin_s_m=-600.0)
    syn = simulate_well(column, beds, [], traj, md_top_m=1300.0, md_base_m=2800.0,
                        noise_std=5.0, gain=1.1, offset=6.0, seed=12, name="U-1")
    return syn, column, BedDip.constant(0.0, 0.0)


def test_no_possible_cut_where_the_type_log_predicts_the_sharp_changes(unfaulted):
    syn, column, bed = unfaulted
    md = syn.well.curves.index.to_numpy(float)
    gr = syn.well.curves["GR"].to_numpy(float)
    assert syn.cuts.empty
    # the well has breaks as sharp as a fault's: > 10 noise SDs of a 1 m step
    assert largest_step(gr) > 10.0 * 5.0 * math.sqrt(2.0 / SIDE)
    w = WellWatcher(column, syn.trajectory, bed, well_name="U-1")
    events = replay(w, md, gr[:, None]) + w.finish()
    assert [e for e in events if e.kind == "possible_cut"] == []
    assert events[-1].summary["possible_cuts_raised"] == 0


def test_a_possible_cut_the_correlation_does_not_confirm_is_withdrawn(unfaulted):
    syn, column, bed = unfaulted
    md = syn.well.curves.index.to_numpy(float)
    gr = syn.well.curves["GR"].to_numpy(float)

    class Eager(WellWatcher):            # raises the first break it judges, whatever its size
        def _is_possible_cut(self, brk, r, corr, break_md):
            return not self._possible

    w = Eager(column, syn.trajectory, bed, well_name="U-1")
    events = replay(w, md[:4000], gr[:4000, None])
    poss = [e for e in events if e.kind == "possible_cut"]
    assert [e.to_dict()["status"] for e in poss] == ["raised", "withdrawn"]
    raised, gone = poss
    assert gone.cut_id == raised.cut_id
    assert "no cut there" in gone.message and gone.to_dict()["reason"] == gone.message
    s = w.settings
    assert gone.bit_md_m - raised.possible.break_md_m <= s.possible_withdraw_m + 1.0
    assert not [e for e in events if e.kind == "cut" and e.cut_id == raised.cut_id]
    assert w.cuts == [] or all(c.md_m != raised.possible.break_md_m for c in w.cuts)


# ------------------------------------------------------------------ the pieces
def test_noise_and_change_points_on_a_step():
    """A step of 6 noise SDs in white noise: ruptures finds it at the right sample, the noise
    estimate is within 15 % of the true SD (MAD of differences, Hampel 1974), and a flat
    expected log makes its excess large."""
    rng = np.random.default_rng(0)
    x = rng.normal(0.0, 2.0, (1000, 1))
    x[700:] += 12.0
    sig = noise_sigma(x)
    assert sig[0] == pytest.approx(2.0, rel=0.15)
    bk = find_breaks(x[600:800] / sig, 30.0, 3)
    assert bk.tolist() == [100]
    x = x[630:]
    ref_t = np.zeros((1, 500))
    brk = assess_break(x[70 - SIDE:70 + SIDE], SIDE, SIDE, np.full(2 * SIDE, 250.0), ref_t, sig,
                       5)
    assert brk.expected == 0.0 and brk.observed == pytest.approx(12.0, abs=2.0)
    assert brk.excess > 6.0 and brk.ratio > 3.0


def test_break_settings_are_checked():
    from wellfault.errors import InputError

    with pytest.raises(InputError, match="break_window_m"):
        WatchSettings(break_side_m=3.0, break_window_m=8.0)
    with pytest.raises(InputError, match="break_min_excess"):
        WatchSettings(break_min_excess=0.0)
