"""`wellfault detect` with both kinds of evidence and a report, on the invented demo field."""

from __future__ import annotations

import pandas as pd

from conftest import REPO_ROOT
from wellfault.cli.app import main

FIELD = REPO_ROOT / "synthetic_wells"


def test_detect_with_curves_and_tops_writes_the_cut_and_a_report(tmp_path, capsys):
    out, report = tmp_path / "cuts.csv", tmp_path / "VR_6H.html"
    code = main([
        "detect", str(FIELD / "VR_6H.las"), "--tops", str(FIELD / "tops.csv"),
        "--survey", str(FIELD / "VR_6H_survey.csv"), "--dip", "8/070",
        "--type-well", str(FIELD / "VR_1.las"), "--type-tops", str(FIELD / "tops.csv"),
        "--column", str(FIELD / "column.csv"), "--fault", "60/250",
        "--out", str(out), "--report", str(report)])
    assert code == 0
    cuts = pd.read_csv(out)
    truth = pd.read_csv(FIELD / "truth_cuts.csv").query("well == 'VR-6H'").iloc[0]
    (cut,) = cuts.itertuples()
    # the high-angle well crosses the normal fault from footwall to hanging wall: repeated
    assert (cut.method, cut.section, cut.fault_type) == ("both", "repeated", "normal")
    # within its bracket and 2 m of the truth (a 78° well: 1 m of strat is ~5 m of hole)
    assert cut.md_top_ft * 0.3048 <= truth.md_m <= cut.md_base_ft * 0.3048
    assert abs(cut.md_ft * 0.3048 - truth.md_m) < 2.0
    html = report.read_text()
    assert "VR-6H" in html and "qualified geoscientist" in html and "<img" in html
    assert "qualified geoscientist" in capsys.readouterr().err


def test_screen_is_a_subcommand():
    from wellfault.cli.app import build_parser

    assert "screen" in build_parser().format_help()
