"""LAS reading and writing: the real open wells, every bad-input case, and the round trip."""

from __future__ import annotations

import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from wellfault.errors import InputError, UnitError, WellfaultWarning
from wellfault.io import read_las, write_las
from wellfault.geo.units import METRES_PER_FOOT, METRES_PER_US_SURVEY_FOOT, DepthUnit
from wellfault.geo.well import Well


def las_text(
    rows: str = "100.0 50 2.30\n100.1 55 2.40\n100.2 60 2.50\n100.3 65 2.60\n",
    *,
    index_unit: str = "M",
    strt: str = "100.0",
    stop: str = "100.3",
    step: str = "0.1",
    strt_unit: str | None = None,
    null: str = "-999.25",
    wrap: str = "NO",
    well_items: str = "",
    params: str = "",
    curves: str = "GR  .GAPI : gamma ray\nRHOB.G/CC : density\n",
) -> str:
    """A small hand-made LAS 2.0 file; every test changes one thing."""
    su = index_unit if strt_unit is None else strt_unit
    return (
        "~Version\n"
        "VERS.  2.0 : CWLS LAS 2.0\n"
        f"WRAP.  {wrap} : one line per depth\n"
        "~Well\n"
        f"STRT.{su} {strt} : start\n"
        f"STOP.{su} {stop} : stop\n"
        f"STEP.{su} {step} : step\n"
        f"NULL.  {null} : null\n"
        "WELL.  TEST-1 : well name\n"
        f"{well_items}"
        "~Curve\n"
        f"DEPT.{index_unit} : depth\n"
        f"{curves}"
        "~Parameter\n"
        f"{params}"
        "~A\n"
        f"{rows}"
    )


def write(tmp_path: Path, text: str | bytes, name: str = "test.las") -> Path:
    p = tmp_path / name
    if isinstance(text, bytes):
        p.write_bytes(text)
    else:
        p.write_text(text)
    return p


def read_quiet(path: Path, **kwargs) -> Well:
    with warnings.catch_warnings():
        warnings.simplefilter("error", WellfaultWarning)
        return read_las(path, **kwargs)


# ---------------------------------------------------------------------------- the real wells


@pytest.fixture(scope="module")
def p129(refdata: Path) -> Well:
    return read_quiet(refdata / "P-129_Kennetcook2.las")


@pytest.fixture(scope="module")
def f0302(refdata: Path) -> Well:
    return read_quiet(refdata / "F03-02_NorthSea.las")


@pytest.fixture(scope="module")
def wellington(refdata: Path) -> Well:
    return read_quiet(refdata / "Wellington_KGS_1-32.las")


def test_p129_log_reads_in_metres_with_its_depth_range_and_step(p129: Well) -> None:
    # unit, depth range 1.07-1939.1 m and step 0.1524 m: reference_data/README.md
    # (welly 0.5.2 sdist)
    assert p129.depth_unit is DepthUnit.M
    assert p129.md_range_m[0] == pytest.approx(1.07, abs=0.005)
    assert p129.md_range_m[1] == pytest.approx(1939.1, abs=0.05)
    assert np.diff(p129.md_m) == pytest.approx(0.1524, abs=1e-4)
    assert p129.curve_names == ("GR", "DT", "RHOB", "RLA5")


def test_p129_kelly_bushing_elevation_comes_from_the_header(p129: Well) -> None:
    # KB 94.8 m: reference_data/README.md (welly 0.5.2 sdist); depth reference "KELLY BUSHING"
    assert p129.ref_name == "KB"
    assert p129.ref_elevation_m == pytest.approx(94.8)
    assert p129.name == "Kennetcook #2"


def test_f0302_bottom_up_log_becomes_increasing_and_keeps_irregular_steps(f0302: Well) -> None:
    # bottom-up 2153.9 -> 9.9 m, irregular 0.151-0.154, STEP 0: reference_data/README.md
    # (welly 0.5.2 sdist)
    assert f0302.depth_unit is DepthUnit.M
    # (the README rounds to 0.1 m, so half of that is the tolerance)
    assert f0302.md_range_m[0] == pytest.approx(9.9, abs=0.05)
    assert f0302.md_range_m[1] == pytest.approx(2153.9, abs=0.05)
    steps = np.diff(f0302.md_m)
    assert (steps > 0).all()
    assert steps.min() == pytest.approx(0.151, abs=5e-4)
    assert steps.max() == pytest.approx(0.154, abs=5e-4)


def test_f0302_nulls_become_nan_and_rhob_is_mostly_null(f0302: Well) -> None:
    # "RHOB mostly null", NULL -999.25: reference_data/README.md (welly 0.5.2 sdist)
    assert not (f0302.curves == -999.25).any().any()
    assert f0302.curve("RHOB").isna().mean() > 0.5
    assert f0302.curve("GR").notna().mean() > 0.5


def test_f0302_curves_stay_attached_to_their_depths_after_reversal(refdata: Path,
                                                                 f0302: Well) -> None:
    # the last line of the file (9.9060 m) holds nulls only; the first (2153.8647 m) too:
    # compare a mid-log sample read straight from the file text instead
    lines = (refdata / "F03-02_NorthSea.las").read_text().splitlines()
    data = [ln.split() for ln in lines[lines.index(next(ln for ln in lines
                                                          if ln.startswith("~A"))) + 1:]]
    row = next(r for r in data[5000:] if float(r[1]) != -999.25)
    md, gr = float(row[0]), float(row[1])
    k = int(np.argmin(np.abs(f0302.md_m - md)))
    assert f0302.md_m[k] == pytest.approx(md)
    assert f0302.curve("GR").iloc[k] == pytest.approx(gr)


def test_wellington_feet_are_converted_to_metres_once(wellington: Well) -> None:
    # ft, 580-5247.5, step 0.5, KB 1272 ft: reference_data/README.md (welly 0.5.2 sdist)
    assert wellington.depth_unit is DepthUnit.FT
    assert wellington.md_range_m == pytest.approx((580 * 0.3048, 5247.5 * 0.3048))
    assert np.diff(wellington.md_m) == pytest.approx(0.5 * 0.3048)
    assert wellington.ref_name == "KB"
    assert wellington.ref_elevation_m == pytest.approx(1272 * 0.3048)


def test_wellington_surface_location_is_read_from_utm_header_items(wellington: Well) -> None:
    # X/Y items of the file's ~Well section, HZCS = UTM (metres by definition of UTM)
    assert wellington.x_m == pytest.approx(638021.23)
    assert wellington.y_m == pytest.approx(4130799.98)


def test_real_logs_hold_no_null_markers(p129: Well, f0302: Well, wellington: Well) -> None:
    for w in (p129, f0302, wellington):
        assert not np.isin(w.curves.to_numpy(), [-999.25, -9999.0]).any()
        assert w.curves.index.name == "md_m"


def test_us_survey_foot_is_used_only_when_asked(refdata: Path) -> None:
    w = read_quiet(refdata / "Wellington_KGS_1-32.las", us_survey_foot=True)
    assert w.depth_unit is DepthUnit.USFT
    assert w.md_range_m[0] == pytest.approx(580 * METRES_PER_US_SURVEY_FOOT)
    assert w.ref_elevation_m == pytest.approx(1272 * METRES_PER_US_SURVEY_FOOT)


# ---------------------------------------------------------------------------- depth units


def test_depth_unit_is_taken_from_the_index_curve(tmp_path: Path) -> None:
    w = read_quiet(write(tmp_path, las_text(index_unit="F")))
    assert w.depth_unit is DepthUnit.FT
    assert w.md_m[0] == pytest.approx(100.0 * METRES_PER_FOOT)


def test_missing_depth_unit_raises_unit_error_naming_file_and_fix(tmp_path: Path) -> None:
    p = write(tmp_path, las_text(index_unit="", strt_unit=""), "nounit.las")
    with pytest.raises(UnitError, match=r"nounit\.las.*no depth unit.*depth_unit=.*--depth-unit"):
        read_las(p)


def test_missing_depth_unit_can_be_given_by_the_caller(tmp_path: Path) -> None:
    p = write(tmp_path, las_text(index_unit="", strt_unit=""))
    w = read_quiet(p, depth_unit="ft")
    assert w.depth_unit is DepthUnit.FT
    assert w.md_m[0] == pytest.approx(30.48)


def test_unknown_depth_unit_is_not_guessed(tmp_path: Path) -> None:
    p = write(tmp_path, las_text(index_unit="FEETBELOWKB"), "odd.las")
    with pytest.raises(UnitError, match=r"odd\.las: unknown depth unit 'FEETBELOWKB'.*depth_unit"):
        read_las(p)
    assert read_quiet(p, depth_unit="ft").depth_unit is DepthUnit.FT


def test_caller_unit_that_conflicts_with_the_file_raises(tmp_path: Path) -> None:
    p = write(tmp_path, las_text(index_unit="M"), "metres.las")
    with pytest.raises(UnitError, match=r"metres\.las: depth unit conflict.*says m.*'ft'"):
        read_las(p, depth_unit="ft")


def test_caller_us_survey_foot_refines_a_feet_file(tmp_path: Path) -> None:
    p = write(tmp_path, las_text(index_unit="FT"))
    assert read_quiet(p, depth_unit="usft").depth_unit is DepthUnit.USFT


def test_index_and_strt_units_that_disagree_raise(tmp_path: Path) -> None:
    p = write(tmp_path, las_text(index_unit="M", strt_unit="FT"), "mixed.las")
    with pytest.raises(UnitError, match=r"mixed\.las: the header disagrees about the depth unit"):
        read_las(p)


# ---------------------------------------------------------------------------- bad files


def test_missing_file_is_named(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"nothere\.las: file not found"):
        read_las(tmp_path / "nothere.las")


def test_empty_file_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"empty\.las: file is empty"):
        read_las(write(tmp_path, "", "empty.las"))


def test_binary_file_is_an_input_error(tmp_path: Path) -> None:
    p = write(tmp_path, b"PK\x03\x04\x00\x00binary\x00stuff", "log.las")
    with pytest.raises(InputError, match=r"log\.las: looks binary.*give the exported text file"):
        read_las(p)


def test_text_that_is_not_las_is_an_input_error(tmp_path: Path) -> None:
    p = write(tmp_path, "md,gr\n100,50\n", "table.las")
    with pytest.raises(InputError, match=r"table\.las: not a LAS file: line 1.*~Version"):
        read_las(p)


def test_file_without_ascii_section_is_an_input_error(tmp_path: Path) -> None:
    text = las_text().split("~A")[0]
    with pytest.raises(InputError, match=r"head\.las: no ~A \(data\) section.*export the log"):
        read_las(write(tmp_path, text, "head.las"))


def test_ascii_section_without_rows_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"norows\.las: the ~A section \(line \d+\) has no data"):
        read_las(write(tmp_path, las_text(rows=""), "norows.las"))


def test_truncated_last_line_is_an_input_error(tmp_path: Path) -> None:
    text = las_text(rows="100.0 50 2.3\n100.1 55 2.4\n100.2 60")
    with pytest.raises(InputError, match=r"cut\.las: the last data line \(line 18\) has 2 of 3 "
                                         r"values.*cut off"):
        read_las(write(tmp_path, text, "cut.las"))


def test_wrapped_lines_in_an_unwrapped_file_are_an_input_error(tmp_path: Path) -> None:
    text = las_text(rows="100.0 50\n2.3\n100.1 55\n2.4\n")
    with pytest.raises(InputError, match=r"wrap\.las, line 16: 2 values where the ~Curve section "
                                         r"lists 3 curves.*WRAP\. NO"):
        read_las(write(tmp_path, text, "wrap.las"))


def test_extra_data_column_is_an_input_error(tmp_path: Path) -> None:
    text = las_text(rows="100.0 50 2.3 9\n100.1 55 2.4 9\n")
    with pytest.raises(InputError, match=r"extra\.las, line 16: 4 values but the ~Curve section "
                                         r"lists only 3.*add the missing curve"):
        read_las(write(tmp_path, text, "extra.las"))


def test_declared_wrapped_file_is_read(tmp_path: Path) -> None:
    text = las_text(rows="100.0\n50 2.3\n100.1\n55 2.4\n", wrap="YES", stop="100.1")
    w = read_quiet(write(tmp_path, text))
    assert w.md_m == pytest.approx([100.0, 100.1])
    assert w.curve("RHOB").tolist() == pytest.approx([2.3, 2.4])


def test_truncated_wrapped_file_is_an_input_error(tmp_path: Path) -> None:
    text = las_text(rows="100.0\n50 2.3\n100.1\n55\n", wrap="YES")
    with pytest.raises(InputError, match=r"wcut\.las: the wrapped ~A section holds 5 values"):
        read_las(write(tmp_path, text, "wcut.las"))


def test_missing_curve_section_is_an_input_error(tmp_path: Path) -> None:
    text = las_text().replace("~Curve\n", "~Other\n")
    with pytest.raises(InputError, match=r"nocurve\.las: no ~Curve section"):
        read_las(write(tmp_path, text, "nocurve.las"))


def test_header_line_lasio_cannot_parse_is_wrapped_in_an_input_error(tmp_path: Path) -> None:
    text = las_text().replace("WELL.  TEST-1 : well name\n", "WELL TEST-1 no separators\n")
    with pytest.raises(InputError, match=r"badhead\.las: cannot be parsed as LAS") as info:
        read_las(write(tmp_path, text, "badhead.las"))
    assert info.value.__cause__ is not None


def test_duplicated_depth_names_the_depth_rows_and_fix(tmp_path: Path) -> None:
    text = las_text(rows="100.0 50 2.3\n100.1 55 2.4\n100.1 55 2.4\n100.2 60 2.5\n")
    with pytest.raises(InputError, match=r"dup\.las: depth 100\.1 m appears twice \(data row 2 "
                                         r"\(line 17\) and data row 3 \(line 18\)\); remove the "
                                         r"duplicated rows"):
        read_las(write(tmp_path, text, "dup.las"))


def test_depth_jumping_back_in_an_increasing_log_is_an_input_error(tmp_path: Path) -> None:
    text = las_text(rows="100.0 1 1\n100.1 1 1\n100.2 1 1\n100.05 1 1\n100.3 1 1\n")
    with pytest.raises(InputError, match=r"jump\.las: depth jumps backwards from 100\.2 to 100\.05"
                                         r" m \(data row 3 \(line 18\).*re-sort"):
        read_las(write(tmp_path, text, "jump.las"))


def test_decreasing_log_is_sorted_with_its_values(tmp_path: Path) -> None:
    text = las_text(rows="100.3 65 2.6\n100.2 60 2.5\n100.1 55 2.4\n100.0 50 2.3\n",
                    strt="100.3", stop="100.0", step="-0.1")
    w = read_quiet(write(tmp_path, text))
    assert w.md_m == pytest.approx([100.0, 100.1, 100.2, 100.3])
    assert w.curve("GR").tolist() == [50.0, 55.0, 60.0, 65.0]


def test_irregular_steps_are_kept(tmp_path: Path) -> None:
    text = las_text(rows="100.0 1 1\n100.1 2 2\n100.35 3 3\n101.0 4 4\n", step="0",
                    stop="101.0")
    w = read_quiet(write(tmp_path, text))
    assert w.md_m == pytest.approx([100.0, 100.1, 100.35, 101.0])


def test_step_that_disagrees_with_the_data_warns_and_the_data_is_used(tmp_path: Path) -> None:
    p = write(tmp_path, las_text(step="0.5"), "step.las")
    with pytest.warns(WellfaultWarning, match=r"step\.las: STEP 0\.5 m in the header, but the "
                                              r"data spacing is 0\.1.*used the depths"):
        w = read_las(p)
    assert w.md_m == pytest.approx([100.0, 100.1, 100.2, 100.3])


def test_stop_that_disagrees_with_the_data_warns(tmp_path: Path) -> None:
    with pytest.warns(WellfaultWarning, match=r"STOP 120 m in the header.*ends at 100\.3"):
        read_las(write(tmp_path, las_text(stop="120")))


def test_declared_null_becomes_nan(tmp_path: Path) -> None:
    w = read_quiet(write(tmp_path, las_text(rows="100.0 -999.25 2.3\n100.1 55 2.4\n",
                                            stop="100.1")))
    assert np.isnan(w.curve("GR").iloc[0])
    assert w.curve("GR").iloc[1] == 55.0


def test_other_declared_null_value_is_honoured(tmp_path: Path) -> None:
    text = las_text(rows="100.0 -1 2.3\n100.1 55 -1\n", null="-1", stop="100.1")
    w = read_quiet(write(tmp_path, text))
    assert np.isnan(w.curve("GR").iloc[0]) and np.isnan(w.curve("RHOB").iloc[1])


@pytest.mark.parametrize("marker", ["-9999", "-999", "-999.25"])
def test_undeclared_common_null_warns_and_becomes_nan(tmp_path: Path, marker: str) -> None:
    text = las_text(rows=f"100.0 {marker} 2.3\n100.1 55 2.4\n", null="-1", stop="100.1")
    p = write(tmp_path, text, "nulls.las")
    with pytest.warns(WellfaultWarning, match=rf"nulls\.las: value {float(marker):g} appears 1 "
                                              r"time\(s\) in GR but the declared NULL is -1"):
        w = read_las(p)
    assert np.isnan(w.curve("GR").iloc[0])


def test_all_null_curve_warns(tmp_path: Path) -> None:
    text = las_text(rows="100.0 -999.25 2.3\n100.1 -999.25 2.4\n", stop="100.1")
    with pytest.warns(WellfaultWarning, match=r"allnull\.las: curve\(s\) GR hold only nulls"):
        w = read_las(write(tmp_path, text, "allnull.las"))
    assert w.curve("GR").isna().all()


def test_text_cells_in_a_numeric_curve_warn_with_curve_and_count(tmp_path: Path) -> None:
    text = las_text(rows="100.0 50 2.3\n100.1 abc 2.4\n100.2 xyz 2.5\n100.3 65 2.6\n")
    with pytest.warns(WellfaultWarning, match=r"text\.las: text in numeric curves set to NaN: "
                                              r"GR \(2\) cell"):
        w = read_las(write(tmp_path, text, "text.las"))
    assert w.curve("GR").isna().tolist() == [False, True, True, False]
    assert w.curve("RHOB").tolist() == pytest.approx([2.3, 2.4, 2.5, 2.6])


def test_curve_that_is_all_text_is_an_input_error(tmp_path: Path) -> None:
    text = las_text(rows="100.0 sand 2.3\n100.1 shale 2.4\n", stop="100.1")
    with pytest.raises(InputError, match=r"alltext\.las: curve 'GR' holds text.*remove the curve"):
        read_las(write(tmp_path, text, "alltext.las"))


def test_text_depth_is_an_input_error_naming_the_row(tmp_path: Path) -> None:
    text = las_text(rows="100.0 50 2.3\nabc 55 2.4\n", stop="100.1")
    with pytest.raises(InputError, match=r"tdepth\.las, data row 2 \(line 17\): depth 'abc'"):
        read_las(write(tmp_path, text, "tdepth.las"))


def test_null_depth_is_an_input_error_naming_the_row(tmp_path: Path) -> None:
    text = las_text(rows="100.0 50 2.3\n-999.25 55 2.4\n", stop="100.1")
    with pytest.raises(InputError, match=r"ndepth\.las, data row 2 \(line 17\): depth is null"):
        read_las(write(tmp_path, text, "ndepth.las"))


def test_utf8_bom_and_windows_line_endings_are_read(tmp_path: Path) -> None:
    p = write(tmp_path, b"\xef\xbb\xbf" + las_text().replace("\n", "\r\n").encode())
    assert read_quiet(p).md_m == pytest.approx([100.0, 100.1, 100.2, 100.3])


# ---------------------------------------------------------------------------- header facts


def test_well_name_falls_back_to_the_file_stem(tmp_path: Path) -> None:
    text = las_text().replace("WELL.  TEST-1 : well name\n", "WELL.   : well name\n")
    assert read_quiet(write(tmp_path, text, "B-7.las")).name == "B-7"


def test_missing_elevation_is_none_not_an_error(tmp_path: Path) -> None:
    w = read_quiet(write(tmp_path, las_text()))
    assert w.ref_elevation_m is None and w.ref_name == "KB"
    assert w.x_m is None and w.y_m is None


def test_kelly_bushing_elevation_in_feet_is_converted(tmp_path: Path) -> None:
    w = read_quiet(write(tmp_path, las_text(params="EKB .FT 100.0 : kb elevation\n")))
    assert w.ref_name == "KB" and w.ref_elevation_m == pytest.approx(30.48)


def test_derrick_floor_reference_uses_its_own_elevation(tmp_path: Path) -> None:
    params = ("DREF.  DERRICK FLOOR : depth reference\nEKB .M 51.0 : kb\nEDF .M 50.0 : df\n"
              "EGL .M 45.0 : gl\n")
    w = read_quiet(write(tmp_path, las_text(params=params)))
    assert (w.ref_name, w.ref_elevation_m) == ("DF", pytest.approx(50.0))


def test_permanent_datum_plus_height_above_it_gives_the_elevation(tmp_path: Path) -> None:
    # LAS 2.0 convention: log-measured-from elevation = EPD + APD (common practice)
    params = "LMF .  KB : log measured from\nEPD .M 90.3 : pd elevation\nAPD .M 4.5 : above pd\n"
    w = read_quiet(write(tmp_path, las_text(params=params)))
    assert (w.ref_name, w.ref_elevation_m) == ("KB", pytest.approx(94.8))


def test_only_ground_elevation_for_a_kb_log_warns_and_leaves_it_unknown(tmp_path: Path) -> None:
    params = "DREF.  KB : depth reference\nEGL .M 45.0 : ground level\n"
    with pytest.warns(WellfaultWarning, match=r"only the ground elevation EGL.*manifest"):
        w = read_las(write(tmp_path, las_text(params=params)))
    assert w.ref_elevation_m is None and w.ref_name == "KB"


def test_ground_level_reference_uses_ground_elevation(tmp_path: Path) -> None:
    params = "DREF.  GROUND LEVEL : depth reference\nEGL .M 45.0 : ground level\n"
    w = read_quiet(write(tmp_path, las_text(params=params)))
    assert (w.ref_name, w.ref_elevation_m) == ("GL", pytest.approx(45.0))


def test_elevation_without_unit_takes_the_depth_unit_and_warns(tmp_path: Path) -> None:
    with pytest.warns(WellfaultWarning, match=r"elevation EKB = 100 has no unit.*\(ft\)"):
        w = read_las(write(tmp_path, las_text(index_unit="FT", params="EKB . 100 : kb\n")))
    assert w.ref_elevation_m == pytest.approx(30.48)


def test_coordinates_with_units_are_converted(tmp_path: Path) -> None:
    items = "XCOORD.FT 1000.0 : x\nYCOORD.FT 2000.0 : y\n"
    w = read_quiet(write(tmp_path, las_text(well_items=items)))
    assert (w.x_m, w.y_m) == (pytest.approx(304.8), pytest.approx(609.6))


def test_coordinates_without_unit_or_utm_warn_and_stay_unknown(tmp_path: Path) -> None:
    items = "X   .  1000.0 : x\nY   .  2000.0 : y\n"
    with pytest.warns(WellfaultWarning, match=r"surface location X=1000, Y=2000 has no usable"):
        w = read_las(write(tmp_path, las_text(well_items=items)))
    assert w.x_m is None and w.y_m is None


# ---------------------------------------------------------------------------- writing


def test_written_las_reads_back_with_header_facts(tmp_path: Path) -> None:
    curves = pd.DataFrame({"GR": [50.0, np.nan, 70.0], "RHOB": [2.3, 2.4, np.nan]},
                          index=[1000.0, 1000.5, 1001.0])
    well = Well("W 1", curves, DepthUnit.FT, ref_elevation_m=300.0, ref_name="KB",
                x_m=1234.5, y_m=6789.25, source="<memory>")
    p = write_las(well, tmp_path / "out.las")
    back = read_quiet(p)
    assert back.name == "W 1"
    assert back.depth_unit is DepthUnit.FT
    assert back.md_m == pytest.approx(well.md_m)
    assert back.ref_elevation_m == pytest.approx(300.0) and back.ref_name == "KB"
    assert (back.x_m, back.y_m) == (pytest.approx(1234.5), pytest.approx(6789.25))
    pd.testing.assert_frame_equal(back.curves, well.curves, check_exact=False, rtol=1e-9)
    assert not list(tmp_path.glob("*.tmp"))


def test_irregular_log_is_written_with_step_zero(tmp_path: Path) -> None:
    well = Well("W", pd.DataFrame({"GR": [1.0, 2.0, 3.0]}, index=[10.0, 10.5, 12.0]), "m")
    text = write_las(well, tmp_path / "irr.las").read_text()
    assert "STEP.M" in text and " 0 : STEP" in text
    assert read_quiet(tmp_path / "irr.las").md_m == pytest.approx([10.0, 10.5, 12.0])


depth_steps = st.lists(st.floats(0.01, 5.0, allow_nan=False), min_size=1, max_size=40)


@settings(max_examples=40, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(steps=depth_steps, start=st.floats(0.0, 5000.0),
       unit=st.sampled_from(["m", "ft"]),
       elevation=st.one_of(st.none(), st.floats(-500.0, 3000.0)),
       seed=st.integers(0, 2**32 - 1))
def test_write_then_read_las_round_trips_depths_units_and_values(
    tmp_path: Path, steps: list[float], start: float, unit: str, elevation: float | None,
    seed: int,
) -> None:
    rng = np.random.default_rng(seed)
    md = start + np.concatenate([[0.0], np.cumsum(steps)])
    values = rng.normal(100.0, 30.0, size=(md.size, 2))
    values[rng.random(values.shape) < 0.2] = np.nan
    well = Well("RT", pd.DataFrame(values, index=md, columns=["GR", "DT"]), unit,
                ref_elevation_m=elevation)
    with warnings.catch_warnings():
        warnings.simplefilter("ignore", WellfaultWarning)  # an all-null column may occur
        back = read_las(write_las(well, tmp_path / "rt.las"))
    assert back.depth_unit is DepthUnit(unit)
    assert back.md_m == pytest.approx(md, abs=1e-6)
    np.testing.assert_allclose(back.curves.to_numpy(), values, rtol=1e-9, atol=1e-9)
    if elevation is None:
        assert back.ref_elevation_m is None
    else:
        assert back.ref_elevation_m == pytest.approx(elevation, abs=1e-6)


def test_las_version_3_is_refused_with_the_fix(tmp_path: Path) -> None:
    text = las_text().replace("VERS.  2.0", "VERS.  3.0")
    with pytest.raises(InputError, match=r"v3\.las: LAS version 3\.0 is not supported; export the "
                                         r"log as LAS 2\.0"):
        read_las(write(tmp_path, text, "v3.las"))
