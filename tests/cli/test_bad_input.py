"""The catalogue of bad input: what a user meets for each, through the CLI and through Python.

One table, one row per case (its id names it). Every case starts from a clean set of small
files for one well (LAS, tops, survey, reference column) that shows one missing-section cut, and
spoils one thing. Each row says what wellfault does about it:

* ``error``: the Python API raises the named :mod:`wellfault.errors` type with a message
  matching ``match``; ``wellfault detect`` exits 2 with one ``wellfault: error: ...`` line on
  stderr that names the file (or option) and matches too, and no traceback;
* ``warning``: there is a sensible reading; the API does it and warns (WellfaultWarning
  matching ``match``); the CLI exits 0 and prints ``wellfault: warning: ...``;
* ``same``: the input is good in another form (a byte-order mark, semicolons, decimal commas,
  another unit); both paths give the clean files' cut table, without a warning.

The reader-level details of many of these (exact line numbers, more spellings) are tested in
tests/test_io_las.py and tests/test_io_tables.py; this catalogue checks what reaches the user.
"""

from __future__ import annotations

import contextlib
import io
import re
import warnings
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from wellfault.cli.app import main
from wellfault.geo.column import ReferenceColumn
from wellfault.evidence.detect import find_fault_cuts
from wellfault.geo.dip import BedDip
from wellfault.errors import (
    ColumnError,
    InputError,
    SurveyError,
    UnitError,
    WellfaultError,
    WellfaultWarning,
)
from wellfault.io import read_column_table, read_dip_table, read_las, read_survey, read_tops
from wellfault.geo.trajectory import Trajectory

# ---------------------------------------------------------------------------- the clean files

MD = np.round(np.arange(1000.0, 1100.0 + 1e-9, 0.5), 1)


def las_rows(md=MD, gr=None, rhob=None) -> str:
    gr = [f"{60 + 10 * np.sin(m / 7):.2f}" for m in md] if gr is None else gr
    rhob = [f"{2.4 + 0.1 * np.cos(m / 5):.3f}" for m in md] if rhob is None else rhob
    return "".join(f"{m:.1f} {g} {r}\n" for m, g, r in zip(md, gr, rhob))


def las_text(rows: str | None = None, *, unit: str = "M", step: str = "0.5",
             null: str = "-999.25", wrap: str = "NO") -> str:
    rows = las_rows() if rows is None else rows
    return (
        "~Version\n"
        "VERS.  2.0 : CWLS LAS 2.0\n"
        f"WRAP.  {wrap} : one line per depth\n"
        "~Well\n"
        f"STRT.{unit} 1000.0 : start\n"
        f"STOP.{unit} 1100.0 : stop\n"
        f"STEP.{unit} {step} : step\n"
        f"NULL.  {null} : null\n"
        "WELL.  C-1 : well name\n"
        "~Curve\n"
        f"DEPT.{unit} : measured depth\n"
        "GR  .GAPI : gamma ray\n"
        "RHOB.G/CC : bulk density\n"
        "~Parameter\n"
        "DREF.  KB : depth reference\n"
        "EKB .M 30.0 : kb elevation\n"
        "~A\n"
        f"{rows}"
    )


LAS = las_text()
# flat beds, a near-vertical well: A-B 20 m as expected, B-C 15 m where the column has 30 m (a
# missing-section cut of about 15 m), C-D 25 m as expected
TOPS = "well,surface,md_m\nC-1,A,1010\nC-1,B,1030\nC-1,C,1045\nC-1,D,1070\n"
SURVEY = "md_m,inc,azi\n0,0,0\n500,0,0\n800,4.5,90\n1100,4.5,90\n"
COLUMN = "surface,thickness_m,unconformity\nA,20,no\nB,30,no\nC,25,no\nD,,no\n"
FILES = {"las": ("well.las", LAS), "tops": ("tops.csv", TOPS), "survey": ("survey.csv", SURVEY),
         "column": ("column.csv", COLUMN)}


def _feet(text: str) -> str:
    """The tops with their MDs written in feet under an md_ft header."""
    lines = text.splitlines()
    out = [lines[0].replace("md_m", "md_ft")]
    for ln in lines[1:]:
        w, s, md = ln.split(",")
        out.append(f"{w},{s},{float(md) / 0.3048!r}")
    return "\n".join(out) + "\n"


def _semicolons(text: str) -> str:
    return text.replace(",", ";")


def _decimal_commas(text: str) -> str:
    """';' delimiter and every whole number written with a decimal comma ('1030' -> '1030,0')."""
    lines = [ln.split(",") for ln in text.splitlines()]
    return "\n".join(";".join(c + ",0" if c.isdigit() else c for c in ln) for ln in lines) + "\n"


# ---------------------------------------------------------------------------- the catalogue


@dataclass(frozen=True)
class Case:
    id: str
    outcome: str  # "error", "warning" or "same"
    match: str = ""  # regex the message must match (error / warning)
    error: type[WellfaultError] | None = None
    files: dict[str, str | bytes] = field(default_factory=dict)  # replaced files, by key
    names: str | None = None  # key of the file (or the option) the CLI line must name
    dip: str | None = None  # --dip text
    dips: str | None = None  # a --dip-table file
    depth_unit: str | None = None  # --depth-unit


_dup = las_rows(np.r_[MD[:100], MD[99:]])
_back = las_rows(np.r_[MD[:100], MD[50], MD[100:]])
_wrapped = "".join(f"{m:.1f} 55.0\n2.45\n" for m in MD)
_text_cell = las_rows(gr=["abc" if k == 3 else "55.0" for k in range(MD.size)])
_text_depth = las_rows().replace("1001.5 ", "1OO1.5 ", 1)
_null_999 = las_rows(gr=["-999.25" if k % 50 == 7 else "55.0" for k in range(MD.size)])
_overflow = las_rows(gr=["1e400" if k == 4 else "55.0" for k in range(MD.size)])
_all_null = las_rows(gr=["-999.25"] * MD.size, rhob=["-999.25"] * MD.size)

CASES = [
    # ------------------------------------------------------------------ LAS
    Case("las-empty", "error", r"file is empty; give a LAS 2\.0 file", InputError,
         {"las": ""}, "las"),
    Case("las-truncated", "error", r"the last data line \(line \d+\) has 1 of 3 values: the file "
         r"looks cut off; export it again", InputError, {"las": LAS[: LAS.rindex("1099.5") + 3]},
         "las"),
    Case("las-truncated-in-header", "error", r"no ~A \(data\) section: the file is header-only "
         r"or was cut off", InputError, {"las": LAS[: LAS.index("~Curve") + 20]}, "las"),
    Case("las-binary", "error", r"looks binary \(contains NUL bytes\).*give the exported text",
         InputError, {"las": b"\x89PNG\r\n\x1a\n\x00\x00\x00\rIHDR\x00\x00"}, "las"),
    Case("las-missing-ascii-section", "error", r"no ~A \(data\) section.*export the log again "
         "with its data", InputError, {"las": LAS.split("~A")[0]}, "las"),
    Case("las-wrapped-lines", "error", r"line 18: 2 values where the ~Curve section lists 3 "
         r"curves.*WRAP\. NO; export the log unwrapped", InputError,
         {"las": las_text(_wrapped)}, "las"),
    Case("las-text-in-numeric-curve", "warning", r"text in numeric curves set to NaN: GR \(1\) "
         "cell", files={"las": las_text(_text_cell)}, names="las"),
    Case("las-text-depth", "error", r"data row 4 \(line 21\): depth '1OO1\.5' is not a number; "
         "fix or delete that row", InputError, {"las": las_text(_text_depth)}, "las"),
    Case("las-undeclared-null", "warning", r"value -999\.25 appears 4 time\(s\) in GR but the "
         r"declared NULL is -9999.*treated it as null", files={"las": las_text(_null_999,
                                                                               null="-9999")},
         names="las"),
    Case("las-step-disagrees", "warning", r"STEP 0\.25 m in the header, but the data spacing is "
         r"0\.5.*used the depths in the data", files={"las": las_text(step="0.25")},
         names="las"),
    Case("las-duplicate-depth", "error", r"depth 1049\.5 m appears twice \(data row 100 \(line "
         r"117\) and data row 101 \(line 118\)\); remove the duplicated rows", InputError,
         {"las": las_text(_dup)}, "las"),
    Case("las-depth-backwards", "error", r"depth jumps backwards from 1049\.5 to 1025 m \(data "
         r"row 100 \(line 117\).*remove or re-sort the out-of-order rows", InputError,
         {"las": las_text(_back)}, "las"),
    Case("las-no-depth-unit", "error", r"no depth unit: the index curve and STRT/STOP carry no "
         r"unit; pass depth_unit=\.\.\. \(--depth-unit m\|ft\|usft\)", UnitError,
         {"las": las_text(unit="")}, "las"),
    Case("las-no-depth-unit-given-by-the-user", "same", files={"las": las_text(unit="")},
         depth_unit="m"),
    Case("las-unknown-depth-unit", "error", r"unknown depth unit 'FURLONG' on index curve "
         r"'DEPT'; pass depth_unit=.*or correct the unit in the header", UnitError,
         {"las": las_text(unit="FURLONG")}, "las"),
    Case("las-curves-all-null", "warning", r"curve\(s\) GR, RHOB hold only nulls",
         files={"las": las_text(_all_null)}, names="las"),
    Case("las-infinite-values", "warning", r"infinite or overflowing values \(e\.g\. inf, "
         r"1e400\) set to NaN: GR \(1\) cell", files={"las": las_text(_overflow)}, names="las"),
    Case("las-section-after-the-data", "error", r"line 219: section '~A' follows the ~A \(data\) "
         r"section of line 17, which must be the last section.*would be lost", InputError,
         {"las": LAS + "~A\n1100.5 55.0 2.4\n"}, "las"),
    Case("las-old-mac-line-ends", "same", files={"las": LAS.replace("\n", "\r")}),
    Case("las-windows-line-ends", "same", files={"las": LAS.replace("\n", "\r\n")}),
    # ------------------------------------------------------------------ tops
    Case("tops-unknown-surface", "error", r"row 6: surface 'Zed' in the tops is not in the "
         r"reference column; the column has \['A', 'B', 'C', 'D'\]; rename the pick",
         InputError, {"tops": TOPS + "C-1,Zed,1090\n"}, "tops"),
    Case("tops-duplicate-row", "warning", r"1 row\(s\) repeat an earlier pick exactly \(rows "
         r"\[6\]\); kept the first", files={"tops": TOPS + "C-1,B,1030\n"}, names="tops"),
    Case("tops-a-little-outside-the-log", "warning", r"1 pick\(s\) outside the logged interval, "
         r"the furthest pick 'A' at MD 960 m, 40 m outside \(the log .*well\.las covers MD "
         r"1000-1100 m\); used them as given", files={"tops": TOPS.replace("A,1010", "A,960")},
         names="tops"),
    Case("tops-far-outside-the-log", "error", r"row 5: pick 'D' at MD 3500 m lies 2400 m outside "
         r"the log .*check that the tops belong to this well and that their depth unit is right",
         InputError, {"tops": TOPS.replace("D,1070", "D,3500")}, "tops"),
    Case("tops-in-feet-log-in-metres", "same", files={"tops": _feet(TOPS)}),
    Case("tops-feet-labelled-metres", "error", r"pick 'D' at MD 3510\.5 m lies 2410\.5 m outside "
         r"the log.*depth unit is right \(md_m or md_ft", InputError,
         {"tops": _feet(TOPS).replace("md_ft", "md_m")}, "tops"),
    Case("tops-number-overflows", "error", r"row 3: MD in column 'md_m' is too large to be a "
         r"number \(got '1e400'\)", InputError, {"tops": TOPS.replace("B,1030", "B,1e400")},
         "tops"),
    Case("tops-without-unit", "error", r"no depth unit: the MD column 'md' has no unit suffix; "
         r"add the unit to the column name \(e\.g\. md_m, md_ft\)", UnitError,
         {"tops": TOPS.replace("md_m", "md")}, "tops"),
    # ------------------------------------------------------------------ surveys
    Case("survey-md-decreasing", "error", r"survey MD goes backwards between rows 3 and 4 \(500 "
         r"-> 400 m\); sort stations by MD", SurveyError,
         {"survey": SURVEY.replace("800,4.5", "400,4.5")}, "survey"),
    Case("survey-inclination-over-180", "error", r"row 4: inclination outside 0-180 degrees "
         r"\(got 185\.0\); check the column order", SurveyError,
         {"survey": SURVEY.replace("800,4.5", "800,185")}, "survey"),
    Case("survey-azimuth-over-360", "error", r"row 5: azimuth outside 0-360 degrees \(got "
         r"400\.0\); give azimuths in degrees clockwise from north", SurveyError,
         {"survey": SURVEY.replace("1100,4.5,90", "1100,4.5,400")}, "survey"),
    Case("survey-azimuth-negative", "error", r"row 4: azimuth outside 0-360 degrees \(got "
         r"-10\.0\)", SurveyError, {"survey": SURVEY.replace("800,4.5,90", "800,4.5,-10")},
         "survey"),
    Case("survey-stops-a-little-above-the-log-bottom", "warning", r"the survey ends at MD 1050 "
         r"m, 50 m above the log bottom \(MD 1100 m\); extended the path straight along the last "
         r"station \(inc 4\.5, azi 90 deg\)",
         files={"survey": SURVEY.replace("1100,4.5,90", "1050,4.5,90")}, names="survey"),
    Case("survey-stops-far-above-the-log-bottom", "error", r"the survey ends at MD 700 m, 400 m "
         r"above the log bottom \(MD 1100 m\); give the survey down to total depth .*at most "
         r"150 m", SurveyError, {"survey": "md_m,inc,azi\n0,0,0\n500,0,0\n700,3,90\n"},
         "survey"),
    # ------------------------------------------------------------------ reference column
    Case("column-zero-thickness", "error", r"row 3: thickness must be positive in column "
         r"'thickness_m' \(got 0\.0\); give the true stratigraphic thickness", ColumnError,
         {"column": COLUMN.replace("B,30", "B,0")}, "column"),
    Case("column-negative-thickness", "error", r"row 4: thickness must be positive in column "
         r"'thickness_m' \(got -25\.0\)", ColumnError, {"column": COLUMN.replace("C,25", "C,-25")},
         "column"),
    Case("column-repeated-surface", "error", r"row 4: surface 'A' appears twice \(first on row "
         r"2\); give each surface once, top down", ColumnError,
         {"column": COLUMN.replace("C,25", "A,25")}, "column"),
    # ------------------------------------------------------------------ CSV forms read correctly
    Case("csv-byte-order-mark", "same", files={k: "\ufeff" + FILES[k][1]
                                               for k in ("tops", "survey", "column")}),
    Case("csv-semicolons", "same", files={k: _semicolons(FILES[k][1])
                                          for k in ("tops", "survey", "column")}),
    Case("csv-decimal-commas", "same", files={k: _decimal_commas(FILES[k][1])
                                              for k in ("tops", "survey", "column")}),
    Case("csv-windows-line-ends", "same", files={k: FILES[k][1].replace("\n", "\r\n")
                                                 for k in ("tops", "survey", "column")}),
    # ------------------------------------------------------------------ dips
    Case("dip-option-over-90", "error", r"dip outside 0-90 degrees \(got 95\.0\); dip is "
         "measured down from horizontal", InputError, names="--dip", dip="95/010"),
    Case("dip-option-unreadable", "error", r"cannot read dip '12-075'; write it as "
         r"dip/dip-azimuth in degrees, e\.g\. 12/075", InputError, names="--dip", dip="12-075"),
    Case("dip-table-over-90", "error", r"row 3: dip outside 0-90 degrees \(got 95\.0\); give the "
         "dip angle from horizontal", InputError, names="dips",
         dips="surface,dip,dip_azimuth\nA,5,90\nB,95,10\n"),
    Case("dip-table-unknown-surface", "error", r"row 3: surface 'Bee' in the dip table is not "
         r"in the reference column; the column has \['A', 'B', 'C', 'D'\]", InputError,
         names="dips", dips="surface,dip,dip_azimuth\nA,5,90\nBee,3,10\n"),
    Case("dip-table-azimuth-over-360", "error", r"row 2: dip azimuth outside 0-360 degrees \(got "
         r"370\.0\)", InputError, names="dips", dips="md_m,dip,dip_azimuth\n1000,5,370\n"),
]


def _write_files(folder: Path, case: Case) -> dict[str, Path]:
    paths = {}
    for key, (name, text) in FILES.items():
        data = case.files.get(key, text)
        p = folder / name
        p.write_bytes(data if isinstance(data, bytes) else data.encode("utf-8"))
        paths[key] = p
    if case.dips is not None:
        paths["dips"] = folder / "dips.csv"
        paths["dips"].write_text(case.dips, encoding="utf-8")
    return paths


def run_api(p: dict[str, Path], case: Case) -> pd.DataFrame:
    """What a Python user writes (the README's "From Python")."""
    unit = case.depth_unit
    well = read_las(p["las"], depth_unit=unit)
    column = ReferenceColumn.from_table(read_column_table(p["column"], depth_unit=unit))
    tops = read_tops(p["tops"], depth_unit=unit, well=well.name)
    traj = Trajectory.from_survey(read_survey(p["survey"], depth_unit=unit))
    bed = None
    if case.dip is not None:
        bed = BedDip.parse(case.dip)
    if "dips" in p:
        t = read_dip_table(p["dips"], depth_unit=unit)
        bed = BedDip.from_md_table(t) if "md_m" in t.columns else BedDip.per_surface(t)
    return find_fault_cuts(well, column, tops=tops, trajectory=traj, bed_dip=bed)


def run_cli(p: dict[str, Path], case: Case) -> tuple[int, str, str]:
    argv = ["detect", str(p["las"]), "--column", str(p["column"]), "--tops", str(p["tops"]),
            "--survey", str(p["survey"])]
    if case.dip is not None:
        argv += ["--dip", case.dip]
    if "dips" in p:
        argv += ["--dip-table", str(p["dips"])]
    if case.depth_unit is not None:
        argv += ["--depth-unit", case.depth_unit]
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main(argv)
    return code, out.getvalue(), err.getvalue()


@pytest.fixture(scope="module")
def clean(tmp_path_factory) -> tuple[pd.DataFrame, str]:
    """The clean files' cut table through the API and the CLI's stdout."""
    p = _write_files(tmp_path_factory.mktemp("clean"), Case("clean", "same"))
    with warnings.catch_warnings():
        warnings.simplefilter("error", WellfaultWarning)
        api = run_api(p, Case("clean", "same"))
    code, out, err = run_cli(p, Case("clean", "same"))
    assert code == 0 and "warning" not in err, err
    return api, out


def test_the_clean_files_show_one_missing_section_cut_of_about_15_m(clean) -> None:
    api, out = clean
    # by construction of TOPS/COLUMN: B-C drilled 15 m MD at 4.5 deg (14.95 m TST) where the
    # column has 30 m
    assert api["section"].tolist() == ["missing"]
    assert api["tst_m"].iloc[0] == pytest.approx(30.0 - 15.0 * np.cos(np.radians(4.5)), abs=0.01)
    assert pd.read_csv(io.StringIO(out))["section"].tolist() == ["missing"]


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_bad_input_through_the_python_api(tmp_path: Path, case: Case, clean) -> None:
    p = _write_files(tmp_path, case)
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        if case.outcome == "error":
            with pytest.raises(case.error, match=case.match) as info:
                run_api(p, case)
            if case.names in p:  # the message names the file
                assert p[case.names].name in str(info.value)
            return
        result = run_api(p, case)
    ours = [str(w.message) for w in caught if issubclass(w.category, WellfaultWarning)]
    if case.outcome == "warning":
        assert any(re.search(case.match, m) for m in ours), ours
        assert any(p[case.names].name in m for m in ours), ours
    else:
        assert ours == []
        pd.testing.assert_frame_equal(result, clean[0], check_exact=False, rtol=1e-9)


@pytest.mark.parametrize("case", CASES, ids=[c.id for c in CASES])
def test_bad_input_through_the_command_line(tmp_path: Path, case: Case, clean) -> None:
    p = _write_files(tmp_path, case)
    code, out, err = run_cli(p, case)
    assert "Traceback" not in err
    lines = [ln for ln in err.splitlines() if ln.startswith("wellfault: ")]
    errors = [ln for ln in lines if ln.startswith("wellfault: error: ")]
    warned = [ln for ln in lines if ln.startswith("wellfault: warning: ")]
    if case.outcome == "error":
        assert code == 2
        assert out == ""  # no half table on stdout
        assert len(errors) == 1 and err.rstrip("\n").splitlines()[-1] == errors[0], err
        assert len(err.splitlines()) == len(warned) + 1  # nothing else: no usage, no traceback
        line = errors[0]
        named = case.names if case.names.startswith("--") else str(p[case.names])
        assert named in line, line
        assert re.search(case.match, line), line
        return
    assert code == 0, err
    assert errors == []
    # nothing else: no third-party log lines (regression: lasio printed "Could not convert
    # curve #1 ..." on stderr beside wellfault's own warning)
    for ln in err.splitlines():
        assert ln.startswith(("wellfault: ", "CAUTION", "  ")) or "fault cut" in ln, ln
    if case.outcome == "warning":
        assert any(re.search(case.match, ln) and str(p[case.names]) in ln for ln in warned), err
    else:
        assert warned == [], err
        pd.testing.assert_frame_equal(pd.read_csv(io.StringIO(out)),
                                      pd.read_csv(io.StringIO(clean[1])))


def test_every_case_id_is_unique_and_every_error_names_its_place() -> None:
    assert len({c.id for c in CASES}) == len(CASES)
    for c in CASES:
        assert c.outcome in ("error", "warning", "same"), c.id
        if c.outcome != "same":
            assert c.match and c.names, c.id
        if c.outcome == "error":
            assert c.error is not None and issubclass(c.error, WellfaultError), c.id
