"""The invented demo field end to end: files read as a user's, cuts found beside the truth."""

from __future__ import annotations

import pandas as pd
import pytest

from conftest import REPO_ROOT
from wellfault.cli.app import main
from wellfault.synth.demo import detect_field

FIELD = REPO_ROOT / "synthetic_wells"


@pytest.fixture(scope="module")
def field_result():
    return detect_field(FIELD)


def test_every_true_cut_of_the_demo_field_is_found_and_classified(field_result):
    cuts, truth, meta = field_result
    for tr in truth.itertuples():
        mine = cuts[(cuts.well == tr.well) & (cuts.md_top_m <= tr.md_m)
                    & (tr.md_m <= cuts.md_base_m)]
        assert len(mine) == 1, f"{tr.well}: true cut at {tr.md_m:.1f} m not found"
        c = mine.iloc[0]
        assert c.section == tr.section
        assert c.fault_type == tr.fault_type
        # TST within the tops tolerance: 15 % of the interval between the two picks (expected
        # or drilled, the larger: a repeat's expected interval is 0) plus the 2 m floor (the
        # defaults; natural thickness change in the field is +-10 %)
        interval = max(abs(c.expected_thickness_m), abs(c.observed_thickness_m))
        assert abs(c.tst_m - abs(tr.delta_s_m)) <= 0.15 * interval + 2.0


def test_no_cut_in_the_unfaulted_demo_wells(field_result):
    cuts, truth, meta = field_result
    unfaulted = set(w["name"] for w in meta["wells"]) - set(truth.well)
    assert unfaulted, "the demo field must hold unfaulted wells"
    assert not set(cuts.well) & unfaulted


def test_footwall_to_hanging_wall_crossing_of_a_normal_fault_is_repeated_but_normal(
        field_result):
    cuts, truth, _ = field_result
    fw_hw = truth[(truth.crossing == -1) & (truth.fault_type == "normal")]
    assert len(fw_hw)
    for tr in fw_hw.itertuples():
        c = cuts[cuts.well == tr.well].iloc[0]
        assert (c.section, c.fault_type, c.crossing) == \
            ("repeated", "normal", "footwall -> hanging wall")


def test_demo_command_prints_cuts_beside_truth_and_the_caution(capsys, monkeypatch):
    monkeypatch.chdir(REPO_ROOT)
    assert main(["demo"]) == 0
    out, err = capsys.readouterr()
    assert "true cuts found: 9 of 9" in out
    assert "qualified geoscientist" in err
    # the curve evidence too: which evidence found each cut and what placed it, and the
    # curves without the tops and without the mapped planes (placed by the curves alone)
    assert "found>placed" in out and "tops+curves>F1" in out
    alone = out.split("Curves alone (no tops, no fault planes): ", 1)[1]
    assert alone.startswith("true cuts found 9 of 9, MD error median ")
    assert float(alone.split("median ", 1)[1].split(" m")[0]) < 1.0  # placed, not copied
    assert "other cuts 0" in alone
