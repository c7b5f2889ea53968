"""CSV tables: the real tops and surveys, the forgiving parser, every bad-input case, writers."""

from __future__ import annotations

import json
import warnings
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from wellfault.errors import ColumnError, InputError, SurveyError, UnitError, WellfaultWarning
from wellfault.io import (
    read_column_table,
    read_dip_table,
    read_manifest,
    read_survey,
    read_table,
    read_tops,
    write_survey,
    write_table,
    write_tops,
)
from wellfault.geo.units import METRES_PER_FOOT


def write(tmp_path: Path, text: str | bytes, name: str = "t.csv") -> Path:
    p = tmp_path / name
    if isinstance(text, bytes):
        p.write_bytes(text)
    else:
        p.write_text(text, encoding="utf-8")
    return p


# ---------------------------------------------------------------------------- the real files


def test_wellington_tops_table_is_read_with_name_as_surface_and_top_ft_as_md(
    refdata: Path,
) -> None:
    tops = read_tops(refdata / "Wellington_KGS_1-32_tops.csv", well="Wellington KGS 1-32")
    # 17 tops, the first "Heebner Shale" at 2406.0 ft and the last "Granite" at 5163.7 ft:
    # reference_data/README.md and the rows of Wellington_KGS_1-32_tops.csv (welly 0.5.2 sdist)
    assert len(tops) == 17
    assert list(tops.columns) == ["well", "surface", "md_m", "row"]
    assert tops["well"].unique().tolist() == ["Wellington KGS 1-32"]
    assert tops["surface"].iloc[0] == "Heebner Shale"
    assert tops["md_m"].iloc[0] == pytest.approx(2406.0 * METRES_PER_FOOT)
    assert tops["surface"].iloc[-1] == "Granite"
    assert tops["md_m"].iloc[-1] == pytest.approx(5163.7 * METRES_PER_FOOT)
    assert tops["row"].iloc[0] == 2


def test_deviation_survey_in_metres_is_read_with_provider_columns(refdata: Path) -> None:
    s = read_survey(refdata / "deviation_m_survey.csv")
    # unit m (side file deviation_m_survey.json), 80 stations, MD 0-2267, max inc 36.0:
    # reference_data/README.md and the side file (welly 0.5.2 sdist)
    assert len(s) == 80
    assert s["md_m"].iloc[[0, -1]].tolist() == pytest.approx([0.0, 2267.0])
    assert s["inc_deg"].max() == pytest.approx(36.0)
    assert {"tvd_m", "north_m", "east_m"} <= set(s.columns)
    # second station "76.29,0.9,7.19,76.29,0.59,0.07" of deviation_m_survey.csv
    assert s.iloc[1].tolist() == pytest.approx([76.29, 0.9, 7.19, 76.29, 0.59, 0.07])


def test_p129_survey_is_read_in_metres_without_provider_columns(refdata: Path) -> None:
    s = read_survey(refdata / "P-129_survey.csv")
    # unit m, 45 stations, MD 32-1872, max inc 5.6, no provider TVD/N/E: P-129_survey.json
    # and reference_data/README.md (welly 0.5.2 sdist)
    assert len(s) == 45
    assert s["md_m"].iloc[[0, -1]].tolist() == pytest.approx([32.0, 1872.0])
    assert s["inc_deg"].max() == pytest.approx(5.6)
    assert list(s.columns) == ["md_m", "inc_deg", "azi_deg"]


def test_well_1515_survey_needs_a_unit_because_its_side_file_states_none(refdata: Path) -> None:
    # length unit "not stated; feet likely": Well_1515_survey.json (welly 0.5.2 sdist)
    with pytest.raises(UnitError, match=r"Well_1515_survey\.csv: no depth unit.*--depth-unit"):
        read_survey(refdata / "Well_1515_survey.csv")


def test_well_1515_survey_reads_in_feet_when_told(refdata: Path) -> None:
    s = read_survey(refdata / "Well_1515_survey.csv", depth_unit="ft")
    # 83 stations, MD 0-4800, max inc 31.48: Well_1515_survey.json (welly 0.5.2 sdist)
    assert len(s) == 83
    assert s["md_m"].iloc[-1] == pytest.approx(4800 * METRES_PER_FOOT)
    assert s["inc_deg"].max() == pytest.approx(31.48)
    assert s["tvd_m"].iloc[1] == pytest.approx(250 * METRES_PER_FOOT)


def test_side_file_unit_that_conflicts_with_the_caller_raises(refdata: Path) -> None:
    with pytest.raises(UnitError, match=r"deviation_m_survey\.csv: depth unit conflict: side file "
                                        r"deviation_m_survey\.json.*says m but depth_unit='ft'"):
        read_survey(refdata / "deviation_m_survey.csv", depth_unit="ft")


# ---------------------------------------------------------------------------- the parser


def test_semicolon_table_with_decimal_commas_and_bom_is_read(tmp_path: Path) -> None:
    p = write(tmp_path, "\ufeffWell; Surface ;MD_m\nA;Top one;1234,5\nA;Top two;1300\n")
    t = read_table(p)
    assert list(t.columns) == ["well", "surface", "md_m"]
    assert t["md_m"].tolist() == [1234.5, 1300.0]
    assert t.index.tolist() == [2, 3]


def test_tab_separated_utf16_excel_export_is_read(tmp_path: Path) -> None:
    p = write(tmp_path, "md_ft\tinc\tazi\n0\t0\t0\n100\t1.5\t45\n".encode("utf-16"))
    assert read_table(p)["inc"].tolist() == [0.0, 1.5]


def test_text_columns_stay_text_and_numbers_become_float(tmp_path: Path) -> None:
    t = read_table(write(tmp_path, "well,md_m\n15,100\n16,\n"))
    assert t["md_m"].dtype == np.float64 and np.isnan(t["md_m"].iloc[1])
    assert t["well"].tolist() == [15.0, 16.0]  # read_table is generic; read_tops keeps "15"


def test_comment_lines_before_the_header_and_blank_lines_are_skipped(tmp_path: Path) -> None:
    p = write(tmp_path, "# exported 2024\n\nsurface,md_m\nA,10\n\nB,20\n")
    t = read_table(p)
    assert t["surface"].tolist() == ["A", "B"]
    assert t.index.tolist() == [4, 6]


def test_row_longer_than_the_header_names_the_line(tmp_path: Path) -> None:
    p = write(tmp_path, "surface,md_m\nA,10\nB,20,5\n", "long.csv")
    with pytest.raises(InputError, match=r"long\.csv, row 3: line has 3 fields but the header has "
                                         r"2; quote text"):
        read_table(p)


def test_repeated_column_name_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"column name 'md_m' appears twice"):
        read_table(write(tmp_path, "md_m,MD_m\n1,2\n"))


def test_empty_table_file_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"empty\.csv: file is empty"):
        read_tops(write(tmp_path, "", "empty.csv"))


def test_binary_table_file_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"tops\.xlsx: looks binary"):
        read_tops(write(tmp_path, b"PK\x03\x04\x00\x00\x00", "tops.xlsx"))


def test_missing_table_file_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"gone\.csv: file not found"):
        read_survey(tmp_path / "gone.csv")


def test_latin1_file_is_read_with_a_warning(tmp_path: Path) -> None:
    p = write(tmp_path, "surface,md_m\nGrès,10\n".encode("cp1252"), "latin.csv")
    with pytest.warns(WellfaultWarning, match=r"latin\.csv: not valid UTF-8"):
        t = read_tops(p)
    assert t["surface"].tolist() == ["Grès"]


# ---------------------------------------------------------------------------- tops


def test_tops_unit_comes_from_the_column_suffix(tmp_path: Path) -> None:
    t = read_tops(write(tmp_path, "well,surface,md_ft\nA,X,1000\n"))
    assert t["md_m"].tolist() == pytest.approx([304.8])


@pytest.mark.parametrize("header", ["md (ft)", "MD [ft]", "depth_ft", "top_ft", "Depth ft"])
def test_tops_unit_suffix_spellings_are_accepted(tmp_path: Path, header: str) -> None:
    t = read_tops(write(tmp_path, f"surface,{header}\nX,1000\n"))
    assert t["md_m"].tolist() == pytest.approx([304.8])


def test_tops_unit_can_be_given_by_the_caller(tmp_path: Path) -> None:
    t = read_tops(write(tmp_path, "surface,md\nX,1000\n"), depth_unit="m")
    assert t["md_m"].tolist() == [1000.0]


def test_tops_without_any_unit_raise_unit_error(tmp_path: Path) -> None:
    with pytest.raises(UnitError, match=r"nounit\.csv: no depth unit: the MD column 'md' has no "
                                        r"unit suffix.*md_ft.*depth_unit="):
        read_tops(write(tmp_path, "surface,md\nX,1000\n", "nounit.csv"))


def test_tops_unit_conflict_raises_unit_error(tmp_path: Path) -> None:
    with pytest.raises(UnitError, match=r"column 'md_ft' says ft but depth_unit='m'"):
        read_tops(write(tmp_path, "surface,md_ft\nX,1000\n"), depth_unit="m")


def test_unknown_unit_suffix_in_brackets_raises_unit_error(tmp_path: Path) -> None:
    with pytest.raises(UnitError, match=r"column 'md \(fathoms\)'.*unknown depth unit 'fathoms'"):
        read_tops(write(tmp_path, "surface,md (fathoms)\nX,10\n"))


def test_tops_without_well_column_take_the_argument_or_the_file_stem(tmp_path: Path) -> None:
    p = write(tmp_path, "surface,md_m\nX,10\n", "B-7_tops.csv")
    assert read_tops(p)["well"].tolist() == ["B-7_tops"]
    assert read_tops(p, well="B-7")["well"].tolist() == ["B-7"]


def test_tops_of_one_well_are_picked_from_a_field_file(tmp_path: Path) -> None:
    p = write(tmp_path, "well,surface,md_m\nA,X,10\nB,X,12\nA,Y,20\n", "field.csv")
    t = read_tops(p, well="A")
    assert t["surface"].tolist() == ["X", "Y"] and t["row"].tolist() == [2, 4]
    with pytest.raises(InputError, match=r"field\.csv: no picks for well 'C'; the file names "
                                         r"\['A', 'B'\]"):
        read_tops(p, well="C")


def test_well_names_that_look_like_numbers_stay_text(tmp_path: Path) -> None:
    t = read_tops(write(tmp_path, "well,surface,md_m\n015,X,10\n"))
    assert t["well"].tolist() == ["015"]


def test_tops_are_ordered_by_md_within_each_well(tmp_path: Path) -> None:
    t = read_tops(write(tmp_path, "well,surface,md_m\nB,X,30\nA,Y,20\nB,W,10\nA,Z,5\n"))
    assert t["well"].tolist() == ["B", "B", "A", "A"]
    assert t["md_m"].tolist() == [10.0, 30.0, 5.0, 20.0]


def test_identical_duplicate_tops_rows_warn_and_one_is_kept(tmp_path: Path) -> None:
    p = write(tmp_path, "well,surface,md_m\nA,X,10\nA,Y,20\nA,X,10\n", "dups.csv")
    with pytest.warns(WellfaultWarning, match=r"dups\.csv: 1 row\(s\) repeat an earlier pick "
                                              r"exactly \(rows \[4\]\)"):
        t = read_tops(p)
    assert t["surface"].tolist() == ["X", "Y"]


def test_a_surface_picked_twice_at_different_depths_is_kept(tmp_path: Path) -> None:
    t = read_tops(write(tmp_path, "surface,md_m\nX,10\nY,20\nX,30\n"))
    assert t["surface"].tolist() == ["X", "Y", "X"]


def test_non_numeric_tops_md_names_the_row_and_value(tmp_path: Path) -> None:
    p = write(tmp_path, "surface,md_m\nX,10\nY,12O0\n", "typo.csv")
    with pytest.raises(InputError, match=r"typo\.csv, row 3: MD in column 'md_m' is not a number "
                                         r"\(got '12O0'\); write the MD as a plain number"):
        read_tops(p)


def test_missing_tops_md_names_the_row(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"gap\.csv, row 3: MD in column 'md_m' is missing"):
        read_tops(write(tmp_path, "surface,md_m\nX,10\nY,\n", "gap.csv"))


def test_empty_surface_name_names_the_row(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"row 2: empty surface name in column 'surface'"):
        read_tops(write(tmp_path, "surface,md_m\n,10\n"))


def test_tops_file_without_md_column_lists_its_columns(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"no MD column \(columns are \['surface', 'tvdss_m'\]\)"):
        read_tops(write(tmp_path, "surface,tvdss_m\nX,10\n"))


# ---------------------------------------------------------------------------- surveys


def survey_csv(tmp_path: Path, rows: str, header: str = "md_m,inc,azi",
               name: str = "s.csv") -> Path:
    return write(tmp_path, f"{header}\n{rows}", name)


@pytest.mark.parametrize("header", ["md_m,inc,azi", "MD (m),Incl,Az", "md_m,inclination,azimuth",
                                    "md_m,inc_deg,azi_deg"])
def test_survey_header_spellings_are_accepted(tmp_path: Path, header: str) -> None:
    s = read_survey(survey_csv(tmp_path, "0,0,0\n100,2,45\n", header))
    assert list(s.columns) == ["md_m", "inc_deg", "azi_deg"]
    assert s["azi_deg"].tolist() == [0.0, 45.0]


def test_survey_side_file_states_the_unit(tmp_path: Path) -> None:
    p = survey_csv(tmp_path, "0,0,0\n100,2,45\n", "md,inc,azi", "w_survey.csv")
    (tmp_path / "w_survey.json").write_text(json.dumps({"length_unit": "ft"}))
    assert read_survey(p)["md_m"].tolist() == pytest.approx([0.0, 30.48])


def test_survey_column_and_side_file_that_disagree_raise(tmp_path: Path) -> None:
    p = survey_csv(tmp_path, "0,0,0\n", "md_m,inc,azi", "w_survey.csv")
    (tmp_path / "w_survey.json").write_text(json.dumps({"length_unit": "ft"}))
    with pytest.raises(UnitError, match=r"column 'md_m' says m but side file w_survey\.json"):
        read_survey(p)


def test_broken_side_file_is_an_input_error(tmp_path: Path) -> None:
    p = survey_csv(tmp_path, "0,0,0\n", "md_m,inc,azi", "w_survey.csv")
    (tmp_path / "w_survey.json").write_text("{not json")
    with pytest.raises(InputError, match=r"w_survey\.json: side file of w_survey\.csv is not "
                                         r"readable JSON"):
        read_survey(p)


def test_survey_azimuth_360_becomes_0(tmp_path: Path) -> None:
    assert read_survey(survey_csv(tmp_path, "0,0,360\n"))["azi_deg"].tolist() == [0.0]


def test_survey_md_going_backwards_names_rows_and_values(tmp_path: Path) -> None:
    p = survey_csv(tmp_path, "0,0,0\n200,1,10\n150,2,20\n", name="back.csv")
    with pytest.raises(SurveyError, match=r"back\.csv: survey MD goes backwards between rows 3 "
                                          r"and 4 \(200 -> 150 m\); sort stations"):
        read_survey(p)


def test_survey_repeated_md_names_rows(tmp_path: Path) -> None:
    with pytest.raises(SurveyError, match=r"survey MD repeats between rows 2 and 3 \(0 -> 0 m\)"):
        read_survey(survey_csv(tmp_path, "0,0,0\n0,0,0\n"))


def test_survey_inclination_outside_0_180_is_an_error(tmp_path: Path) -> None:
    p = survey_csv(tmp_path, "0,0,0\n100,181,0\n", name="inc.csv")
    with pytest.raises(SurveyError, match=r"inc\.csv, row 3: inclination outside 0-180 degrees "
                                          r"\(got 181\.0\); check the column order"):
        read_survey(p)


def test_survey_azimuth_outside_0_360_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(SurveyError, match=r"row 2: azimuth outside 0-360 degrees \(got -5\.0\)"):
        read_survey(survey_csv(tmp_path, "0,0,-5\n"))


def test_survey_missing_value_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(SurveyError, match=r"row 3: inclination in column 'inc' is missing"):
        read_survey(survey_csv(tmp_path, "0,0,0\n100,,0\n"))


def test_survey_without_stations_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(SurveyError, match=r"no survey stations.*at least one station"):
        read_survey(survey_csv(tmp_path, ""))


def test_survey_angles_in_radians_are_refused(tmp_path: Path) -> None:
    with pytest.raises(UnitError, match=r"column 'inc \(rad\)': angle unit 'rad'"):
        read_survey(survey_csv(tmp_path, "0,0,0\n", "md_m,inc (rad),azi"))


def test_one_station_survey_is_accepted(tmp_path: Path) -> None:
    assert len(read_survey(survey_csv(tmp_path, "0,0,0\n"))) == 1


# ---------------------------------------------------------------------------- dips


def test_dipmeter_table_is_read_and_sorted_by_md(tmp_path: Path) -> None:
    t = read_dip_table(write(tmp_path, "md_ft,dip,dip_azimuth\n2000,5,90\n1000,3,360\n"))
    assert list(t.columns) == ["md_m", "dip_deg", "dip_azimuth_deg"]
    assert t["md_m"].tolist() == pytest.approx([304.8, 609.6])
    assert t["dip_azimuth_deg"].tolist() == [0.0, 90.0]


def test_per_surface_dip_table_is_read(tmp_path: Path) -> None:
    t = read_dip_table(write(tmp_path, "surface,dip_deg,dip_azi_deg\nA,10,45\nB,0,\n"))
    assert list(t.columns) == ["surface", "dip_deg", "dip_azimuth_deg"]
    assert t["dip_azimuth_deg"].tolist() == [45.0, 0.0]


def test_dip_outside_0_90_is_an_input_error(tmp_path: Path) -> None:
    p = write(tmp_path, "surface,dip,dip_azimuth\nA,95,10\n", "dips.csv")
    with pytest.raises(InputError, match=r"dips\.csv, row 2: dip outside 0-90 degrees \(got 95\.0"
                                         r"\); give the dip angle from horizontal"):
        read_dip_table(p)


def test_dip_azimuth_missing_for_a_dipping_bed_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"row 2: dip azimuth in column 'dip_azimuth' is missing"):
        read_dip_table(write(tmp_path, "surface,dip,dip_azimuth\nA,5,\n"))


def test_dip_table_surface_repeated_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"row 3: surface 'A' appears twice \(first on row 2\)"):
        read_dip_table(write(tmp_path, "surface,dip,dip_azimuth\nA,5,10\nA,6,10\n"))


def test_dipmeter_table_needs_a_depth_unit(tmp_path: Path) -> None:
    with pytest.raises(UnitError, match=r"no depth unit: the MD column 'md'"):
        read_dip_table(write(tmp_path, "md,dip,dip_azimuth\n100,5,10\n"))


def test_dip_table_of_neither_layout_is_an_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"neither an MD column nor a surface column"):
        read_dip_table(write(tmp_path, "dip,dip_azimuth\n5,10\n"))


# ---------------------------------------------------------------------------- columns


def test_column_table_is_read_top_down_with_unconformities(tmp_path: Path) -> None:
    p = write(tmp_path, "surface,thickness_ft,unconformity\nA,100,no\nB,50,YES\nC,,\n")
    t = read_column_table(p)
    assert list(t.columns) == ["surface", "thickness_m", "unconformity"]
    assert t["surface"].tolist() == ["A", "B", "C"]
    assert t["thickness_m"].iloc[:2].tolist() == pytest.approx([30.48, 15.24])
    assert np.isnan(t["thickness_m"].iloc[2])
    assert t["unconformity"].tolist() == [False, True, False]


def test_column_table_last_row_zero_thickness_marks_the_base(tmp_path: Path) -> None:
    t = read_column_table(write(tmp_path, "surface,thickness_m\nA,10\nBase,0\n"))
    assert np.isnan(t["thickness_m"].iloc[-1])


def test_column_table_unit_given_by_caller(tmp_path: Path) -> None:
    t = read_column_table(write(tmp_path, "surface,thickness\nA,10\nB,\n"), depth_unit="m")
    assert t["thickness_m"].iloc[0] == 10.0


def test_zero_thickness_above_the_last_row_is_a_column_error(tmp_path: Path) -> None:
    p = write(tmp_path, "surface,thickness_m\nA,10\nB,0\nC,5\n", "col.csv")
    with pytest.raises(ColumnError, match=r"col\.csv, row 3: thickness must be positive in column "
                                          r"'thickness_m' \(got 0\.0\)"):
        read_column_table(p)


def test_negative_thickness_is_a_column_error(tmp_path: Path) -> None:
    with pytest.raises(ColumnError, match=r"row 2: thickness must be positive.*\(got -5\.0\)"):
        read_column_table(write(tmp_path, "surface,thickness_m\nA,-5\nB,\n"))


def test_missing_thickness_above_the_last_row_is_a_column_error(tmp_path: Path) -> None:
    with pytest.raises(ColumnError, match=r"row 2: thickness in column 'thickness_m' is missing"):
        read_column_table(write(tmp_path, "surface,thickness_m\nA,\nB,\n"))


def test_repeated_surface_in_the_column_is_a_column_error(tmp_path: Path) -> None:
    with pytest.raises(ColumnError, match=r"row 4: surface 'A' appears twice \(first on row 2\)"):
        read_column_table(write(tmp_path, "surface,thickness_m\nA,1\nB,2\nA,3\n"))


def test_unreadable_unconformity_flag_is_a_column_error(tmp_path: Path) -> None:
    with pytest.raises(ColumnError, match=r"row 2: unconformity flag.*\(got 'maybe'\); write "
                                          r"yes/no"):
        read_column_table(write(tmp_path, "surface,thickness_m,unconformity\nA,1,maybe\n"))


# ---------------------------------------------------------------------------- manifest


def test_manifest_paths_resolve_next_to_the_manifest_and_blanks_are_none(tmp_path: Path) -> None:
    (tmp_path / "field").mkdir()
    p = write(tmp_path, "well,las,survey,tops,x_m,y_m,elevation_ft,dip\n"
                        "A,logs/a.las,a_survey.csv,,100,200,1000,12/075\n"
                        "B,logs/b.las,,tops.csv,,,,dips.csv\n", "field/manifest.csv")
    m = read_manifest(p)
    base = (tmp_path / "field").resolve()
    assert m["las"].tolist() == [str(base / "logs/a.las"), str(base / "logs/b.las")]
    assert m["survey"].tolist() == [str(base / "a_survey.csv"), None]
    assert m["tops"].tolist() == [None, str(base / "tops.csv")]
    assert m["dip"].tolist() == ["12/075", str(base / "dips.csv")]
    assert m["x_m"].iloc[0] == 100.0 and np.isnan(m["x_m"].iloc[1])
    assert m["elevation_m"].iloc[0] == pytest.approx(304.8)


def test_manifest_bare_lengths_need_a_unit(tmp_path: Path) -> None:
    p = write(tmp_path, "well,las,x,y\nA,a.las,1,2\n")
    with pytest.raises(UnitError, match=r"column 'x' has no unit suffix"):
        read_manifest(p)
    assert read_manifest(p, length_unit="m")["y_m"].tolist() == [2.0]


def test_manifest_repeated_well_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"row 3: well 'A' listed twice \(first on row 2\)"):
        read_manifest(write(tmp_path, "well,las\nA,a.las\nA,b.las\n"))


# ---------------------------------------------------------------------------- writers


def test_write_table_replaces_the_file_in_one_step(tmp_path: Path) -> None:
    target = tmp_path / "out.csv"
    target.write_text("old\n")
    write_table(pd.DataFrame({"a": [1, 2]}), target)
    assert target.read_text() == "a\n1\n2\n"
    assert [p.name for p in tmp_path.iterdir()] == ["out.csv"]


def test_write_table_to_a_missing_folder_is_an_input_error(tmp_path: Path) -> None:
    with pytest.raises(InputError, match=r"cannot write the table .*folder .* does not exist"):
        write_table(pd.DataFrame({"a": [1]}), tmp_path / "nope" / "out.csv")


def test_written_tops_carry_the_unit_in_the_column_name_and_read_back(tmp_path: Path) -> None:
    tops = pd.DataFrame({"well": ["A", "A"], "surface": ["X", "Y"], "md_m": [304.8, 609.6]})
    p = write_tops(tops, tmp_path / "tops.csv", depth_unit="ft")
    assert p.read_text().splitlines()[0] == "well,surface,md_ft"
    back = read_tops(p)
    assert back["md_m"].tolist() == pytest.approx([304.8, 609.6])


@settings(max_examples=30, deadline=None,
          suppress_health_check=[HealthCheck.function_scoped_fixture])
@given(steps=st.lists(st.floats(0.5, 500.0), min_size=1, max_size=30),
       unit=st.sampled_from(["m", "ft", "usft"]), seed=st.integers(0, 2**32 - 1))
def test_written_survey_reads_back_in_metres(tmp_path: Path, steps: list[float], unit: str,
                                             seed: int) -> None:
    rng = np.random.default_rng(seed)
    md = np.concatenate([[0.0], np.cumsum(steps)])
    survey = pd.DataFrame({"md_m": md, "inc_deg": rng.uniform(0, 180, md.size),
                           "azi_deg": rng.uniform(0, 359.9, md.size),
                           "tvd_m": md * 0.9})
    p = write_survey(survey, tmp_path / "s.csv", depth_unit=unit)
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        back = read_survey(p, depth_unit=unit)
    pd.testing.assert_frame_equal(back, survey, rtol=1e-12)


def test_quoted_names_holding_the_delimiter_are_read_with_their_line_numbers(
    tmp_path: Path,
) -> None:
    p = write(tmp_path, 'surface,md_m\n"Sand, upper",100\n\n"Shale ""B""",120\n')
    t = read_tops(p)
    assert t["surface"].tolist() == ["Sand, upper", 'Shale "B"']
    assert t["row"].tolist() == [2, 4]
