"""One unit and the precision numbers carry, in everything a geologist reads: the written tables
(detect, survey, screen; CSV and Parquet), the HTML reports and their figures, the terminal
summaries and the watch events (wellfault.geo.precision)."""

from __future__ import annotations

import html
import io
import json
import re
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from test_plots import FIELD, demo_well, needs_field, texts

from wellfault.cli.app import main
from wellfault.geo.precision import (
    DEFAULT_DECIMALS, FULL, Decimals, column_decimals, format_length, lengths_in_text,
    parse_decimals, table_text,
)

#: A length labelled in metres: "12.5 m", "2,907 m", "[m]", "metres".
METRE_LABEL = re.compile(r"(?<![\w.])\d[\d,]*(?:\.\d+)?\s?m\b(?![/²³])|\[m\]|\bmet(?:re|er)s?\b")
#: A length labelled in feet.
FEET_LABEL = re.compile(r"\bft\b|\bfeet\b|\bfoot\b")


def _field() -> Path:
    """The demo field's folder (the test is skipped without it)."""
    if not (FIELD / "field.json").is_file():
        pytest.skip("demo field synthetic_wells/ not in the checkout")
    return FIELD


def _run(*argv) -> tuple[int, str, str]:
    import contextlib

    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main([str(a) for a in argv])
    return code, out.getvalue(), err.getvalue()


def _decimals_of(cell: str) -> int:
    return len(cell.split(".")[1]) if "." in cell else 0


def assert_columns_at_their_precision(text: str, decimals: Decimals = DEFAULT_DECIMALS) -> int:
    """Every non-empty cell of every column with a rule has exactly the rule's decimals;
    returns how many columns were checked."""
    table = pd.read_csv(io.StringIO(text), dtype=str, keep_default_na=False)
    checked = 0
    for col in table.columns:
        nd = column_decimals(col, decimals)
        cells = [c for c in table[col] if c != ""]
        if nd is None or not cells:
            continue
        if not all(re.fullmatch(r"-?\d+(?:\.\d+)?", c) for c in cells):
            continue  # a text column whose name looks like a number's (none today)
        assert {_decimals_of(c) for c in cells} == {nd}, (col, cells[:5])
        checked += 1
    return checked


# ------------------------------------------------------------------------------- the rules
def test_each_kind_of_number_has_its_precision():
    # common practice: depths and lengths to 0.01 m or 0.1 ft, angles to 0.1 degree,
    # a probability to two decimals (the precision table)
    assert column_decimals("md_m") == 2 and column_decimals("tvdss_m") == 2
    assert column_decimals("md_ft") == 1 and column_decimals("x_usft") == 1
    assert column_decimals("x_m") == 2 and column_decimals("along_strike_ft") == 1
    assert column_decimals("fault_dip_deg") == 1 and column_decimals("dip_sd_deg") == 1
    assert column_decimals("dls_deg_per_30m") == 2 == column_decimals("dls_deg_per_100ft")
    assert column_decimals("confidence") == 2 == column_decimals("fit")
    assert column_decimals("well") is None and column_decimals("n_cuts") is None
    assert column_decimals("md_ft", Decimals(length=3)) == 3
    assert column_decimals("md_m", Decimals(length=0)) == 0
    assert column_decimals("md_m", FULL) is None and column_decimals("inc_deg", FULL) is None
    assert parse_decimals("full") is FULL and parse_decimals("3") == Decimals(length=3)
    with pytest.raises(ValueError, match="whole number"):
        parse_decimals("two")


def test_a_table_is_written_at_fixed_decimals_and_the_frame_keeps_full_precision():
    df = pd.DataFrame({"well": ["A", "B", "C"], "md_ft": [9536.54321, np.nan, -0.04],
                       "inc_deg": [12.345, 0.0, 90.0], "confidence": [0.99951, 0.5, 1.0],
                       "n": [1, 2, 3]})
    before = df.copy()
    text = table_text(df)
    assert text.splitlines() == ["well,md_ft,inc_deg,confidence,n", "A,9536.5,12.3,1.00,1",
                                 "B,,0.0,0.50,2", "C,0.0,90.0,1.00,3"]
    pd.testing.assert_frame_equal(df, before)  # nothing rounded in the frame
    assert "9536.54321" in table_text(df, FULL)


def test_lengths_in_sentences_are_restated_in_feet():
    # international foot = 0.3048 m exactly (1959 agreement; NIST SP 811 appendix B.8)
    said = "tops agree: A -> B bracket 304.80-609.60 m, jump -30.5 m TST"
    assert lengths_in_text(said, "ft") == \
        "tops agree: A -> B bracket 1000.0-2000.0 ft, jump -100.1 ft TST"
    assert lengths_in_text("no data between MD 30.48 and 60.96 m (gap of 30.48 m)", "ft") == \
        "no data between MD 100.0 and 200.0 ft (gap of 100.0 ft)"
    assert lengths_in_text("places it at MD 3048.00 m with +30.5 m TST", "ft") == \
        "places it at MD 10000.0 ft with +100.1 ft TST"
    assert lengths_in_text("calibrated on 305 m of hole", "ft") == "calibrated on 1001 ft of hole"
    for untouched in ("3 rows and 5 surfaces", "dogleg 3.1 deg/30m", "Unit 2m", ""):
        assert lengths_in_text(untouched, "ft") == untouched
    assert lengths_in_text(said, "m") == said
    assert format_length(3048.0, "ft") == "10000.0 ft"
    assert format_length(-0.001, "m", sign=True) == "+0.00 m"


# ------------------------------------------------------------------ detect and the summary
@pytest.fixture(scope="module")
def vr6h():
    d = _field()
    return ["detect", d / "VR_6H.las", "--tops", d / "tops.csv", "--survey",
            d / "VR_6H_survey.csv", "--dip", "8/070", "--column", d / "column.csv",
            "--fault", "60/250"]


def test_detect_table_read_back_carries_each_column_at_its_precision(vr6h, tmp_path):
    out = tmp_path / "cuts.csv"
    code, _, err = _run(*vr6h, "--out", out)
    assert code == 0, err
    text = out.read_text()
    assert "md_ft" in text.splitlines()[0]
    assert assert_columns_at_their_precision(text) >= 20
    # stdout gets the same text
    code, stdout, _ = _run(*vr6h)
    assert code == 0 and stdout == text
    # the terminal summary: feet only, at the table's precision
    assert "lengths in ft" in err and not METRE_LABEL.search(err.split("CAUTION")[0])
    md = pd.read_csv(out)["md_ft"].iloc[0]
    assert f"MD {md:.1f} [" in err
    # in metres and with chosen decimals
    code, stdout, _ = _run(*vr6h, "--output-unit", "m")
    assert "md_m" in stdout.splitlines()[0] and assert_columns_at_their_precision(stdout) >= 20
    code, stdout, _ = _run(*vr6h, "--decimals", "3")
    assert assert_columns_at_their_precision(stdout, Decimals(length=3)) >= 20
    code, stdout, _ = _run(*vr6h, "--decimals", "full")
    full = pd.read_csv(io.StringIO(stdout))
    assert max(_decimals_of(repr(v)) for v in full["tvd_ft"]) > 3


def test_the_python_frame_keeps_full_precision(vr6h):
    from wellfault.evidence.detect import detect_files

    args = dict(zip(["tops", "survey", "dip", "column", "fault"], vr6h[3::2]))
    df = detect_files(vr6h[1], **args).cuts
    written = pd.read_csv(io.StringIO(table_text(df)))
    assert (np.abs(written["tvd_ft"] - df["tvd_ft"]) <= 0.05 + 1e-9).all()
    assert (written["tvd_ft"] != df["tvd_ft"]).any()  # the frame was not rounded


def test_bad_decimals_is_a_usage_error(vr6h):
    code, _, err = _run(*vr6h, "--decimals", "two")
    assert code == 2 and "--decimals" in err and "whole number" in err


# ------------------------------------------------------------------------------ screening
@pytest.fixture(scope="module")
def screened(tmp_path_factory):
    from wellfault.field.screen import screen_wells

    _field()
    out = tmp_path_factory.mktemp("screen")
    r = screen_wells(FIELD / "manifest.csv", FIELD / "column.csv", workers=1, progress=False,
                     out_dir=out)
    return r, out


def test_screen_tables_carry_each_column_at_its_precision(screened):
    r, out = screened
    for name in ("cuts", "wells", "faults", "fault_profiles"):
        frame = getattr(r, name)
        floats = [c for c in frame.columns if pd.api.types.is_float_dtype(frame[c])]
        # every float column a screening writes has a rule
        assert [c for c in floats if column_decimals(c) is None] == [], name
        text = (out / f"{name}.csv").read_text()
        if len(frame):
            assert assert_columns_at_their_precision(text) >= len(floats) - 3, name
    back = pd.read_csv(out / "cuts.csv")
    np.testing.assert_allclose(back["md_m"], r.cuts["md_m"], rtol=0, atol=0.005 + 1e-9)


def test_screen_of_a_field_in_mixed_units_says_so(screened):
    r, _ = screened
    units = dict(zip(r.wells["well"], r.wells["depth_unit"]))
    assert units["VR-6H"] == "ft" and units["VR-5"] == "m"  # as the LAS files state
    assert r.info["unit"] == "m" and "mixed units" in r.info["unit_note"]
    assert "ft: 5 wells" in r.info["unit_note"] and "m: 7 wells" in r.summary()


def test_screen_in_feet_writes_parquet_at_the_same_precision(tmp_path):
    pytest.importorskip("pyarrow")
    from wellfault.field.screen import screen_wells

    _field()
    r = screen_wells(FIELD / "manifest.csv", FIELD / "column.csv", workers=1, progress=False,
                     out_dir=tmp_path, fmt="parquet", unit="ft", neighbours=False)
    cuts = pd.read_parquet(tmp_path / "cuts.parquet")
    assert "md_ft" in cuts.columns and "as chosen" in r.info["unit_note"]
    np.testing.assert_array_equal(cuts["md_ft"], r.cuts["md_ft"].round(1))
    np.testing.assert_array_equal(cuts["confidence"], r.cuts["confidence"].round(2))
    assert "ft" in r.summary().splitlines()[2] and not METRE_LABEL.search(r.summary())


# ------------------------------------------------------------------------ reports, figures
def _page_text(page: str) -> str:
    page = re.sub(r"<style>.*?</style>", " ", page, flags=re.DOTALL)
    page = re.sub(r"<img[^>]*>", " ", page)
    return html.unescape(re.sub(r"<[^>]+>", " ", page))


def _report_with_figures(monkeypatch, make) -> tuple[str, list[str]]:
    """The report's text, and every text drawn on its figures (tick labels included)."""
    from matplotlib.backends.backend_agg import FigureCanvasAgg

    import wellfault.viz.html as report

    drawn: list[str] = []

    def keep(fig, caption, alt, dpi=96):
        FigureCanvasAgg(fig).draw()
        drawn.extend(texts(fig))
        drawn.append(caption)
        return f"<figure><figcaption>{html.escape(caption)}</figcaption></figure>"

    monkeypatch.setattr(report, "_figure_html", keep)
    page = make()
    assert "figure not drawn" not in page
    return _page_text(page), drawn


def _well_report(name: str, unit=None) -> str:
    from wellfault.viz.report import well_report

    w, traj, tops, dip, cuts, track, col = demo_well(name)
    return well_report(well=w, column=col, cuts_df=cuts, trajectory=traj, bed_dip=dip,
                       tops=tops, track=track, unit=unit)


@needs_field
def test_report_of_a_feet_well_has_no_metre_label(monkeypatch):
    pytest.importorskip("matplotlib")
    text, drawn = _report_with_figures(monkeypatch, lambda: _well_report("VR-6H"))
    assert "Lengths in ft" in text and "ft above sea level" in text
    assert not METRE_LABEL.search(text), METRE_LABEL.search(text)
    assert len(drawn) > 50 and "MD [ft]" in drawn
    bad = [t for t in drawn if METRE_LABEL.search(t)]
    assert bad == []
    # cut labels on the figures in feet, ticks round numbers of feet
    assert any(re.search(r"repeated \d+ ft TST", t) for t in drawn)
    ticks = [float(t.replace("\u2212", "-")) for t in drawn if re.fullmatch(r"\d{4,5}", t)]
    assert ticks and all(v % 50 == 0 for v in ticks), ticks


@needs_field
def test_report_of_a_metre_well_has_no_feet_label(monkeypatch):
    pytest.importorskip("matplotlib")
    text, drawn = _report_with_figures(monkeypatch, lambda: _well_report("VR-5"))
    assert "Lengths in m" in text
    assert not FEET_LABEL.search(text), FEET_LABEL.search(text)
    assert "MD [m]" in drawn and [t for t in drawn if FEET_LABEL.search(t)] == []


@needs_field
def test_report_in_a_chosen_unit_converts_the_table_and_the_figures(monkeypatch):
    pytest.importorskip("matplotlib")
    text, drawn = _report_with_figures(monkeypatch, lambda: _well_report("VR-5", unit="ft"))
    assert not METRE_LABEL.search(text) and [t for t in drawn if METRE_LABEL.search(t)] == []
    md_m = demo_well("VR-5")[4]["md_m"].iloc[0]
    assert f"{md_m / 0.3048:,.1f}" in text  # international foot, 0.3048 m


@needs_field
def test_field_report_of_mixed_units_says_which_unit_and_draws_in_it(monkeypatch, screened):
    pytest.importorskip("matplotlib")
    from wellfault.io import read_manifest
    from wellfault.viz.report import field_report

    r, _ = screened
    wells = read_manifest(FIELD / "manifest.csv")
    faults = r.faults[r.faults["kind"] == "fault"]
    text, drawn = _report_with_figures(monkeypatch, lambda: field_report(
        cuts=r.cuts, wells=wells, faults=faults, errors=r.errors, unit=r.info["unit"],
        unit_note=r.info["unit_note"]))
    assert "mixed units (ft: 5 wells, m: 7 wells), all converted to m" in text
    assert "easting x [m]" in drawn and "vertical separation [m]" in drawn
    # in feet, every axis and posted number follows
    ft = r.cuts.copy()
    text, drawn = _report_with_figures(monkeypatch, lambda: field_report(
        cuts=ft, wells=wells, faults=faults, unit="ft"))
    assert "easting x [ft]" in drawn and "vertical separation [ft]" in drawn
    assert [t for t in drawn if METRE_LABEL.search(t)] == []
    assert not METRE_LABEL.search(text)


# ---------------------------------------------------------------------------------- watch
@pytest.fixture(scope="module")
def watch_args():
    d = _field()
    return ["watch", d / "VR_6H.las", "--type-well", d / "VR_1.las", "--type-tops",
            d / "tops.csv", "--column", d / "column.csv", "--survey", d / "VR_6H_survey.csv",
            "--dip", "8/070", "--once"]


def test_watch_events_of_a_feet_well_are_in_feet_at_their_precision(watch_args):
    code, out, err = _run(*watch_args, "--jsonl")
    assert code == 0, err
    events = [json.loads(line) for line in out.splitlines()]
    assert {"cut", "summary"} <= {e["event"] for e in events}

    def walk(obj, key=""):
        if isinstance(obj, dict):
            for k, v in obj.items():
                yield from walk(v, k)
        elif isinstance(obj, list):
            for v in obj:
                yield from walk(v, key)
        else:
            yield key, obj

    pairs = list(walk(events))
    assert not [k for k, _ in pairs if k.endswith("_m")]
    for key, v in pairs:
        nd = column_decimals(key)
        if nd is not None and isinstance(v, float):
            assert round(v, nd) == v, (key, v)
        if isinstance(v, str):
            assert not METRE_LABEL.search(v), (key, v)
    assert not METRE_LABEL.search(err.split("\n", 1)[1])  # after the caution


def test_watch_text_of_a_feet_well_says_feet_only(watch_args):
    code, out, err = _run(*watch_args)
    assert code == 0, err
    assert "FAULT CUT 1" in out and "MD ft" in out
    assert not METRE_LABEL.search(out), METRE_LABEL.search(out)
    assert not METRE_LABEL.search(err.split("\n", 1)[1])


def test_watch_in_metres_writes_metres(watch_args):
    code, out, err = _run(*watch_args, "--output-unit", "m", "--jsonl")
    assert code == 0, err
    cut = next(json.loads(line) for line in out.splitlines() if '"cut"' in line)
    assert "md_m" in cut and "md_ft" not in cut and round(cut["md_m"], 2) == cut["md_m"]


def test_demo_prints_in_the_unit_asked_for():
    _field()
    code, out, _ = _run("demo", "--field", FIELD, "--output-unit", "ft")
    assert code == 0 and "All lengths in ft" in out and "MD [bracket] ft" in out
    assert not METRE_LABEL.search(out)
    code, out, _ = _run("demo", "--field", FIELD)
    assert "All lengths in m" in out and "wells logged in ft and m" in out
    assert not FEET_LABEL.search(out.split("All lengths")[0].split("\n", 1)[1])
