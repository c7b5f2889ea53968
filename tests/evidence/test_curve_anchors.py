"""Picks as anchors of the curve alignment, the jump-size prior, and the possible mis-pick note,
on wells forward-modelled from the real gamma-ray logs of ../shared/reference_data (provenance
in wellfault.synth.real_logs.REAL_GR_LOGS; the ``refdata`` fixture skips without them). Seeds 500+
(tests), apart from calibration (10000+) and benchmarks (0+)."""

from __future__ import annotations

import warnings

import numpy as np
import pandas as pd
import pytest

from conftest import REPO_ROOT
from wellfault.evidence.curve_settings import CurveSettings, plausible_separation_m
from wellfault.evidence.curvecuts import find_cuts_from_curves
from wellfault.evidence.detect import analyse_well
from wellfault.errors import InputError, WellfaultWarning
from wellfault.synth.real_logs import curve_scenario, real_gr_column


@pytest.fixture(scope="module")
def column(refdata):
    return real_gr_column("F03-02", refdata)


def _picks(sc):
    return sc.tops.assign(well=str(sc.well.name))


@pytest.mark.parametrize("seed", [500, 501, 502])
def test_a_pick_that_contradicts_the_curves_is_reported_as_a_possible_mis_pick(column, seed):
    # common practice: a top picked 25 m of hole away from where a character-rich log puts it
    # is a mis-pick to check, not a reason to bend the correlation
    sc = curve_scenario(seed, column, kinds=("vertical",), max_faults=0)
    picks = _picks(sc)
    inside = picks[(picks["md_m"] > sc.well.curves.index[0] + 50)
                   & (picks["md_m"] < sc.well.curves.index[-1] - 50)]
    k = inside.index[len(inside) // 2]
    wrong = picks.copy()
    wrong.loc[k, "md_m"] += 25.0
    res = find_cuts_from_curves(sc.well, column, sc.trajectory, bed_dip=sc.bed_dip,
                                picks=wrong)
    flagged = {s for s, _, _ in res.mispicks}
    assert flagged == {str(picks.loc[k, "surface"])}
    (note,) = [n for _, _, n in res.mispicks]
    assert note.startswith("possible mis-pick") and "the curves place it at MD" in note
    # ... where the surface really is (within the pick tolerance of 2 m and a sample)
    md_curves = float(note.split("place it at MD ")[1].split()[0])
    assert abs(md_curves - picks.loc[k, "md_m"]) < 2.5
    assert not res.cuts                      # and no cut is invented to honour the pick


def test_correct_picks_are_honoured_and_noted_nowhere(column):
    sc = curve_scenario(503, column)
    res = find_cuts_from_curves(sc.well, column, sc.trajectory, bed_dip=sc.bed_dip,
                                picks=_picks(sc))
    assert res.mispicks == []


def test_the_mis_pick_note_reaches_the_tops_cut_it_explains(column):
    sc = curve_scenario(504, column, kinds=("vertical",), max_faults=0)
    picks = _picks(sc)
    k = picks.index[len(picks) // 2]
    wrong = picks.copy()
    wrong.loc[k, "md_m"] += 25.0             # thins one unit and thickens the next: tops cuts
    with pytest.warns(WellfaultWarning, match="possible mis-pick"):
        an = analyse_well(sc.well, column, tops=wrong, trajectory=sc.trajectory,
                          bed_dip=sc.bed_dip, curves=CurveSettings())
    assert any("possible mis-pick" in n for n in an.notes)
    tops_rows = an.cuts[an.cuts["method"] == "tops"]
    assert len(tops_rows) and tops_rows["notes"].str.contains("possible mis-pick").all()


def test_a_jump_beyond_the_plausible_separation_needs_strong_evidence_and_is_flagged(column):
    sc = curve_scenario(505, column, kinds=("vertical",), min_faults=1, max_faults=1,
                        throw_range_m=(25.0, 40.0))
    true_ds = float(sc.truth["delta_s_m"].iloc[0])
    # plausible up to 20 m: the 25-40 m jump costs about two jumps; a character-rich log
    # carries it all the same (much smaller, and a staircase of plausible jumps with stretch
    # in between becomes the cheaper path: engine.py, "Jump-size prior")
    res = find_cuts_from_curves(sc.well, column, sc.trajectory, bed_dip=sc.bed_dip,
                                settings=CurveSettings.make(["GR"], max_separation_m=20.0))
    (cut,) = res.cuts
    assert cut.delta_s_m == pytest.approx(true_ds, abs=2.0)
    assert cut.extra["beyond_plausible"] and "beyond the plausible separation" in cut.notes
    plain = find_cuts_from_curves(sc.well, column, sc.trajectory, bed_dip=sc.bed_dip)
    assert not plain.cuts[0].extra["beyond_plausible"]
    assert res.alignment.score > plain.alignment.score      # the prior priced the jump


def test_default_plausible_separation_follows_the_inputs():
    assert plausible_separation_m(100.0) == 50.0          # floor
    assert plausible_separation_m(600.0) == 150.0         # a quarter of the type log
    assert plausible_separation_m(4000.0) == 250.0        # cap
    assert plausible_separation_m(600.0, [-40.0, 180.0]) == 270.0   # the tops' own faults
    with pytest.raises(InputError, match="max-separation"):
        CurveSettings.make(["GR"], max_separation_m=0.0)


def test_detect_command_takes_the_separation_in_the_input_unit(tmp_path):
    from wellfault.cli.app import main

    field = REPO_ROOT / "synthetic_wells"
    out = tmp_path / "cuts.csv"
    args = ["detect", str(field / "VR_6H.las"), "--survey", str(field / "VR_6H_survey.csv"),
            "--dip", "8/070", "--type-well", str(field / "VR_1.las"), "--type-tops",
            str(field / "tops.csv"), "--column", str(field / "column.csv"), "--out", str(out)]
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", WellfaultWarning)
        assert main(args) == 0
        (cut,) = pd.read_csv(out).itertuples()
        assert "beyond the plausible" not in str(cut.notes)
        small = abs(cut.delta_s_ft) / 2                  # the LAS is in feet
        assert main(args + ["--max-separation", f"{small:g}"]) == 0
    (flagged,) = pd.read_csv(out).itertuples()
    assert "beyond the plausible separation" in flagged.notes
    assert np.isclose(flagged.md_ft, cut.md_ft, atol=5.0)


def test_picks_of_another_well_give_one_note_not_a_mis_pick_per_pick(column):
    # common practice: when a well's log follows none of its picks, the picks or the log are
    # wrong as a whole; blaming each pick would bury the finding
    sc = curve_scenario(506, column, kinds=("vertical",), max_faults=0)
    picks = _picks(sc)
    shifted = picks.assign(md_m=picks["md_m"] + 40.0)
    res = find_cuts_from_curves(sc.well, column, sc.trajectory, bed_dip=sc.bed_dip,
                                picks=shifted)
    (only,) = res.mispicks
    assert only[0] == "" and "the curves honour only" in only[2]
    plain = find_cuts_from_curves(sc.well, column, sc.trajectory, bed_dip=sc.bed_dip)
    assert res.alignment.score == plain.alignment.score     # no detours to touch them
