"""Curve evidence wired to wells (wellfault.evidence.curvecuts): the demo field end to end, merging with
tops, curve specs, off-the-type-log handling and the input errors."""

from __future__ import annotations

import functools
import json
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from conftest import load_manifest_well

from wellfault.geo.column import ReferenceColumn
from wellfault.evidence.curve_settings import CurveSettings, parse_curve_spec
from wellfault.evidence.curvecuts import align_well, combine_evidence, find_cuts_from_curves
from wellfault.evidence.curve_baselines import find_cuts_dtw_baseline, find_cuts_lag_screen
from wellfault.geo.dip import BedDip
from wellfault.errors import InputError, WellfaultWarning
from wellfault.synth.structure import Beds, PlanarFault
from wellfault.synth.forward import simulate_well
from wellfault.synth.columns import synthetic_column
from wellfault.evidence.measure import FaultAssumptions, measure_cut
from wellfault.geo.trajectory import Trajectory
from wellfault.geo.well import Well

FIELD = Path(__file__).resolve().parents[2] / "synthetic_wells"
needs_field = pytest.mark.skipif(not (FIELD / "field.json").is_file(),
                                 reason="demo field synthetic_wells/ not in the checkout")


# -- the invented demo field: type well VR-1 makes the type log ---------------------------------
@functools.lru_cache(maxsize=None)
def _field():
    from wellfault.io import read_manifest

    meta = json.loads((FIELD / "field.json").read_text(encoding="utf-8"))
    manifest = read_manifest(FIELD / "manifest.csv").set_index("well")
    w, traj, tops, dip = load_manifest_well(manifest, meta["type_well"])
    col = ReferenceColumn.from_type_well(w, tops, traj, (dip.dip_deg, dip.dip_azimuth_deg))
    return meta, manifest, col


@needs_field
def test_demo_field_every_true_cut_found_from_the_curves_with_the_attitude_given():
    """Each demo well aligned to the type log of VR-1 (GR and RHOB) gives its true cut
    (synthetic_wells/truth_cuts.csv, the forward model's truth) within 1 m of MD with the
    right section and fault type when the crossed fault's attitude is given (field.json), and
    the unfaulted wells give none. VR-6H is allowed 1.5 m: it crosses its fault in a
    featureless shale, where the alternatives within the bracket tolerance span 15 m of hole
    (the bracket says so and holds the truth)."""
    meta, manifest, col = _field()
    truth = pd.read_csv(FIELD / "truth_cuts.csv")
    attitude = {f["name"]: (f["dip_deg"], f["dip_azimuth_deg"]) for f in meta["faults"]}
    for name in manifest.index:
        w, traj, tops, dip = load_manifest_well(manifest, name)
        t = truth[truth["well"] == name]
        fa = FaultAssumptions(fault=attitude[t["fault_name"].iloc[0]]) if len(t) else \
            FaultAssumptions()
        cuts = find_cuts_from_curves(w, col, traj, bed_dip=dip,
                                     settings=CurveSettings.make(["GR", "RHOB"]),
                                     assumptions=fa).cuts
        assert len(cuts) == len(t), (name, cuts)
        for tr, cut in zip(t.itertuples(), cuts):
            wide = cut.md_base_m - cut.md_top_m > 10.0
            assert abs(cut.md_m - tr.md_m) <= (1.5 if wide else 1.0), (name, cut.md_m, tr.md_m)
            assert cut.md_top_m <= tr.md_m <= cut.md_base_m
            assert (cut.section, cut.fault_type) == (tr.section, tr.fault_type), name
            assert cut.delta_s_m == pytest.approx(tr.delta_s_m, abs=max(1.0, 0.1 * abs(
                tr.delta_s_m))), name
            assert cut.confidence > 0.9 and cut.method == "curves"


# -- a small forward-modelled well for the wiring ------------------------------------------------
@functools.lru_cache(maxsize=None)
def _model():
    col = synthetic_column(8, seed=3, curves=("GR", "RHOB"), thickness_range_m=(20.0, 40.0))
    traj = Trajectory.vertical()
    beds = Beds.through(0.0, 0.0, (0.0, 0.0, 1000.0), 0.0)
    fault = PlanarFault.dip_slip(60.0, 90.0, (0.0, 0.0, 1100.0), 20.0, kind="normal")
    syn = simulate_well(col, beds, [fault], traj, md_top_m=1010.0, md_base_m=1200.0,
                        curves=("GR", "RHOB"), noise_std={"GR": 3.0, "RHOB": 0.01}, seed=1,
                        name="W-1")
    return col, syn


def test_a_modelled_cut_is_found_placed_measured_and_carries_its_evidence():
    col, syn = _model()
    res = find_cuts_from_curves(syn.well, col, syn.trajectory)
    (cut,) = res.cuts
    true = syn.cuts.iloc[0]
    assert abs(cut.md_m - true.md_m) < 0.5
    assert cut.delta_s_m == pytest.approx(true.delta_s_m, abs=0.5)
    assert cut.section == "missing" and cut.method == "curves"
    assert {"margin", "correlation", "rows_above", "rows_below"} <= set(cut.extra)
    assert list(res.track.columns) == ["md_m", "s_m", "unit", "confidence"]
    assert res.curves == ("GR",)


def test_curve_weights_reach_the_engine_and_names_are_case_blind():
    col, syn = _model()
    res = find_cuts_from_curves(syn.well, col, syn.trajectory,
                                settings=CurveSettings.make(["gr:2", "Rhob"]))
    assert res.curves == ("GR", "RHOB")
    assert len(res.cuts) == 1


def test_the_track_is_not_placed_off_the_type_log():
    """A well logged from 40 m above the top of the type log, through rock the type log does
    not cover (drawn from a longer log of the same column): the samples above are placed
    nowhere (s NaN, confidence 0) and the way onto the type log is no cut."""
    long = synthetic_column(8, seed=3, curves=("GR",), thickness_range_m=(20.0, 40.0),
                            pad_m=60.0)
    tl = long.type_log
    col = long.with_type_log(tl[tl.index >= -1e-9])
    traj = Trajectory.vertical()
    beds = Beds.through(0.0, 0.0, (0.0, 0.0, 1000.0), 0.0)
    syn = simulate_well(long, beds, [], traj, md_top_m=960.0, md_base_m=1150.0,
                        curves=("GR",), noise_std=3.0, seed=2, name="W-2")
    res = find_cuts_from_curves(syn.well, col, traj)
    assert res.cuts == [] and res.alignment.jumps == ()
    above = res.track["md_m"] < 998.0
    assert res.track.loc[above, "s_m"].isna().all()
    assert (res.track.loc[res.track["s_m"].isna(), "confidence"] == 0).all()
    below = res.track["md_m"] > 1010.0
    err = res.track.loc[below, "s_m"] - (res.track.loc[below, "md_m"] - 1000.0)
    assert np.nanmedian(np.abs(err)) < 0.5


def test_baselines_run_on_the_same_inputs():
    col, syn = _model()
    dtw = find_cuts_dtw_baseline(syn.well, col, syn.trajectory)
    lag = find_cuts_lag_screen(syn.well, col, syn.trajectory, window=60)
    true = syn.cuts.iloc[0]
    for res, tol in ((dtw, 5.0), (lag, 10.0)):
        assert any(abs(c.md_m - true.md_m) < tol and c.section == "missing" for c in res.cuts)


def test_align_well_returns_positions_in_metres():
    col, syn = _model()
    al, s, names = align_well(syn.well, col, syn.trajectory)
    ok = np.isfinite(s) & (syn.well.curves.index.to_numpy() < 1095.0)
    assert np.median(np.abs(s[ok] - syn.s_m[ok])) < 0.3
    assert names == ("GR",)


# -- merging with tops ---------------------------------------------------------------------------
def _cut(method, md, top, base, ds, conf):
    return measure_cut(well="W", method=method, md_m=md, md_top_m=top, md_base_m=base,
                       delta_s_m=ds, trajectory=Trajectory.vertical(),
                       bed_dip=BedDip.constant(0.0, 0.0), confidence=conf, notes=["n"])


def test_combine_evidence_merges_a_curve_cut_inside_a_tops_bracket_of_the_same_sense():
    tops = [_cut("tops", 1020.0, 1000.0, 1040.0, 25.0, 0.8)]
    curves = [_cut("curves", 1012.3, 1012.0, 1013.0, 24.1, 0.9)]
    (both,) = combine_evidence(tops, curves)
    assert both.method == "both"
    assert both.md_m == 1012.3 and both.delta_s_m == 24.1          # placed by the curves
    assert both.confidence == pytest.approx(1 - 0.2 * 0.1)          # independent evidence
    assert "tops agree" in both.notes and "1000.0-1040.0" in both.notes


def test_combine_evidence_keeps_cuts_of_opposite_sense_or_outside_the_bracket_apart():
    tops = [_cut("tops", 1020.0, 1000.0, 1040.0, 25.0, 0.8)]
    opposite = [_cut("curves", 1012.0, 1011.0, 1013.0, -24.0, 0.9)]
    outside = [_cut("curves", 1100.0, 1099.0, 1101.0, 24.0, 0.9)]
    for curves in (opposite, outside):
        out = combine_evidence(tops, curves)
        assert sorted(c.method for c in out) == ["curves", "tops"]
        assert [c.md_m for c in out] == sorted(c.md_m for c in out)


def test_combine_evidence_uses_each_tops_cut_once():
    tops = [_cut("tops", 1020.0, 1000.0, 1040.0, 25.0, 0.8)]
    curves = [_cut("curves", 1010.0, 1009.0, 1011.0, 12.0, 0.9),
              _cut("curves", 1030.0, 1029.0, 1031.0, 13.0, 0.9)]
    out = combine_evidence(tops, curves)
    assert [c.method for c in out] == ["both", "curves"]


def test_combine_evidence_with_nothing_from_one_side():
    tops = [_cut("tops", 1020.0, 1000.0, 1040.0, 25.0, 0.8)]
    assert combine_evidence(tops, []) == tops
    assert combine_evidence([], tops) == tops
    assert combine_evidence([], []) == []


def test_combine_evidence_leaves_tops_cuts_kept_apart_as_they_are():
    tops = [_cut("tops", 1020.0, 1000.0, 1040.0, 25.0, 0.8)]
    curves = [_cut("curves", 1012.3, 1012.0, 1013.0, 24.1, 0.9)]
    out = combine_evidence(tops, curves, apart={0})
    assert [c.method for c in out] == ["curves", "tops"]
    assert out[1] == tops[0]


def _interval(top, base, seen, spread):
    return pd.DataFrame({"surface_above": ["A"], "surface_below": ["B"], "md_top_m": [top],
                         "md_base_m": [base], "expected_m": [spread], "spread_m": [spread],
                         "drilled_m": [spread - seen], "delta_s_m": [seen]})


def test_tops_and_curves_that_disagree_between_two_picks_are_not_merged():
    """Between two picks the tops measure the net jump (expected minus drilled interval,
    methods.md §7); a curve jump that explains only part of it is a hop of the alignment, not
    the cut: the tops cut keeps its bracket and size (noted) and the curve cut is withheld.
    Where the two agree within both tolerances they merge as before (common practice: a pick
    pair is the more direct measurement of the net separation)."""
    from wellfault.evidence.detect import _IntervalChecks
    from wellfault.evidence.topcuts import TopsTolerance

    intervals = _interval(3178.1, 3437.2, 101.8, 250.0)   # allowed: 0.15 * 250 + 2 = 39.5 m
    tops = [_cut("tops", 3307.0, 3178.1, 3437.2, 101.8, 0.9)]
    partial = [_cut("curves", 3318.3, 3317.0, 3319.0, 39.1, 0.95)]
    checks = _IntervalChecks.of(intervals, TopsTolerance(), partial)
    assert checks.tol[0] == pytest.approx(39.5 + 3.91)
    kept, apart = checks.tops_kept_apart(tops)
    assert apart == {0} and "placed by the tops alone" in kept[0].notes
    assert "+101.8 m TST" in kept[0].notes and "+39.1 m" in kept[0].notes
    merged = combine_evidence(kept, partial, apart=apart)
    reported, withheld = checks.withhold_contradicted(merged)
    assert [(c.method, c.delta_s_m) for c in reported] == [("tops", 101.8)]
    assert [c.md_m for c in withheld] == [3318.3] and "; withheld: the picks A and B" in \
        withheld[0].notes

    agreeing = [_cut("curves", 3318.3, 3317.0, 3319.0, 80.0, 0.95)]   # 21.8 m off, within
    checks = _IntervalChecks.of(intervals, TopsTolerance(), agreeing)
    kept, apart = checks.tops_kept_apart(tops)
    assert apart == set() and kept == tops
    reported, withheld = checks.withhold_contradicted(combine_evidence(kept, agreeing))
    assert [c.method for c in reported] == ["both"] and withheld == []

    outside = [_cut("curves", 3500.0, 3499.0, 3501.0, 39.1, 0.95)]    # not between the picks
    checks = _IntervalChecks.of(intervals, TopsTolerance(), outside)
    assert checks.tops_kept_apart(tops) == (tops, set())       # nothing of the curves to merge
    assert checks.withhold_contradicted(outside) == (outside, [])


# -- curve specs and settings --------------------------------------------------------------------
@pytest.mark.parametrize(("text", "want"), [("GR", ("GR", 1.0)), ("RHOB:0.5", ("RHOB", 0.5)),
                                            (" nphi : 2 ", ("nphi", 2.0))])
def test_curve_spec_parsing(text, want):
    assert parse_curve_spec(text) == want


@pytest.mark.parametrize(("text", "match"), [(":2", "write NAME"), ("GR:x", "not a number"),
                                             ("GR:-1", "must be positive"),
                                             ("GR:nan", "must be positive")])
def test_bad_curve_specs_say_how_to_write_them(text, match):
    with pytest.raises(InputError, match=match):
        parse_curve_spec(text)


def test_settings_from_dict_list_and_default():
    assert CurveSettings.make().curves == (("GR", 1.0),)
    assert CurveSettings.make({"GR": 2, "RHOB": 1}).curves == (("GR", 2.0), ("RHOB", 1.0))
    assert CurveSettings.make([("DT", 3)]).curves == (("DT", 3.0),)
    with pytest.raises(InputError, match="no curves"):
        CurveSettings.make([])
    kw = CurveSettings.make(jump_penalty=9.0, off_log_m=30.0).engine_kwargs(0.15)
    assert kw["jump_penalty"] == 9.0 and kw["off_log"] == 200 and kw["calibrate_window"] == 60
    assert CurveSettings.make(off_log_m=0.0).engine_kwargs(0.15)["off_log"] == 0


# -- errors --------------------------------------------------------------------------------------
def test_missing_curve_names_the_available_ones():
    col, syn = _model()
    with pytest.raises(InputError, match=r"no curve 'DT'.*\['GR', 'RHOB'\].*--curve"):
        find_cuts_from_curves(syn.well, col, syn.trajectory, settings=CurveSettings.make(["DT"]))
    well = Well("W-3", syn.well.curves.rename(columns={"GR": "CGR"}), "m")
    with pytest.raises(InputError, match=r"type log has no curve 'CGR'.*\['GR', 'RHOB'\]"):
        find_cuts_from_curves(well, col, syn.trajectory, settings=CurveSettings.make(["CGR"]))


def test_column_without_type_log_says_how_to_get_one():
    col, syn = _model()
    bare = ReferenceColumn(col.names, col.s_m, base_s_m=col.base_s_m)
    with pytest.raises(InputError, match="no type-log curves.*--type-well"):
        find_cuts_from_curves(syn.well, bare, syn.trajectory)


def test_null_curves_and_too_short_wells_are_refused():
    from wellfault.errors import AlignmentError

    col, syn = _model()
    nulls = Well("W-4", syn.well.curves.assign(GR=np.nan), "m")
    with pytest.raises(InputError, match="null everywhere"):
        find_cuts_from_curves(nulls, col, syn.trajectory)
    short = Well("W-5", syn.well.curves.iloc[:5], "m")
    with pytest.raises(AlignmentError, match="only 5 samples"):
        find_cuts_from_curves(short, col, syn.trajectory)


# -- depth gaps in a finished log ----------------------------------------------------------------
def _with_gap(well, lo_m, hi_m):
    import dataclasses

    md = well.curves.index.to_numpy()
    return dataclasses.replace(well, curves=well.curves[(md < lo_m) | (md > hi_m)])


@pytest.mark.parametrize("gap", [(1040.0, 1052.0), (1120.0, 1135.0)])
def test_a_gap_in_the_log_is_bridged_not_read_as_a_fault(gap):
    """Rows missing over 12-15 m of hole (a log spliced from two runs): bridged with nulls at
    the usual step, the alignment keeps the strat geometry across the gap and finds only the
    true cut; without bridging (``gap_m=inf``) the single step across the gap asks the path for
    the whole gap's strat in one row and it reads a jump there (the defect this guards)."""
    col, syn = _model()
    well = _with_gap(syn.well, *gap)
    with pytest.warns(WellfaultWarning, match=r"1 depth gap\(s\) in the log .* bridged with null "
                      "samples"):
        res = find_cuts_from_curves(well, col, syn.trajectory)
    (cut,) = res.cuts
    assert abs(cut.md_m - syn.cuts.iloc[0].md_m) < 0.5
    assert cut.delta_s_m == pytest.approx(syn.cuts.iloc[0].delta_s_m, abs=0.5)
    np.testing.assert_array_equal(res.track["md_m"], well.curves.index)   # the log's samples
    raw = find_cuts_from_curves(well, col, syn.trajectory,
                                settings=CurveSettings.make(gap_m=np.inf))
    assert len(raw.cuts) >= 2 and any(gap[0] <= c.md_m <= gap[1] + 1 for c in raw.cuts)


def test_a_cut_inside_a_gap_is_bracketed_by_the_gap():
    """The true cut (MD 1100 m) lies in 11 m of unlogged hole: it is reported at the first
    logged sample below (DESIGN.md: a cut sits at the first sample below it) with a bracket
    from the last logged sample above the gap, and its size is still measured."""
    col, syn = _model()
    well = _with_gap(syn.well, 1095.0, 1106.0)
    with pytest.warns(WellfaultWarning, match="bridged with null samples"):
        (cut,) = find_cuts_from_curves(well, col, syn.trajectory).cuts
    md = well.curves.index.to_numpy()
    assert cut.md_m == pytest.approx(md[md > 1106.0][0])
    assert cut.md_top_m <= md[md < 1095.0][-1] and cut.md_base_m >= cut.md_m
    assert cut.md_top_m <= syn.cuts.iloc[0].md_m <= cut.md_base_m
    assert cut.delta_s_m == pytest.approx(syn.cuts.iloc[0].delta_s_m, abs=1.0)


def test_gap_fillers_follow_the_usual_step():
    from wellfault.evidence.curvecuts import gap_fillers

    assert gap_fillers(100.0, 101.5, 0.5, 2.0).size == 0              # within gap_m
    assert gap_fillers(100.0, 102.4, 0.5, 2.0).size == 0              # within 5 steps
    fill = gap_fillers(100.0, 112.0, 0.1524, 2.0)
    assert np.diff(fill).max() == pytest.approx(np.diff(fill).min())
    assert abs(np.diff(fill)[0] - 0.1524) < 0.1524 / 10
    assert 100.0 < fill[0] < fill[-1] < 112.0
    with pytest.raises(InputError, match="gap_m"):
        CurveSettings.make(gap_m=0)
