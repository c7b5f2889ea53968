"""The ``wellfault`` command: exit codes, where things are printed, atomic --out, the survey
command on real surveys.

Exit codes (README "Inputs and common errors"): 0 success; 2 bad usage (unknown option,
missing argument, bad option text) or bad input files, with one ``wellfault: error: ...`` line
and no traceback; 130 interrupted. Data goes to stdout or ``--out``, everything else to stderr.
"""

from __future__ import annotations

import contextlib
import io
import os
import re
import stat
from pathlib import Path

import numpy as np
import pandas as pd
import pytest

from wellfault.cli.app import main
from wellfault.io import write_las, write_table
from wellfault.geo.well import Well

LAS = (
    "~Version\nVERS.  2.0 : CWLS LAS 2.0\nWRAP.  NO : one line per depth\n"
    "~Well\nSTRT.M 1000.0 : start\nSTOP.M 1100.0 : stop\nSTEP.M 0.5 : step\n"
    "NULL.  -999.25 : null\nWELL.  C-1 : well name\n"
    "~Curve\nDEPT.M : measured depth\nGR  .GAPI : gamma ray\n~A\n"
    + "".join(f"{m:.1f} {60 + 10 * np.sin(m / 7):.2f}\n" for m in np.arange(1000.0, 1100.1, 0.5))
)
TOPS = "well,surface,md_m\nC-1,A,1010\nC-1,B,1030\nC-1,C,1045\nC-1,D,1070\n"
COLUMN = "surface,thickness_m\nA,20\nB,30\nC,25\nD,\n"


@pytest.fixture
def files(tmp_path: Path) -> dict[str, Path]:
    out = {}
    for key, name, text in (("las", "well.las", LAS), ("tops", "tops.csv", TOPS),
                            ("column", "column.csv", COLUMN)):
        out[key] = tmp_path / name
        out[key].write_text(text)
    return out


def run(*argv: str) -> tuple[int, str, str]:
    out, err = io.StringIO(), io.StringIO()
    with contextlib.redirect_stdout(out), contextlib.redirect_stderr(err):
        code = main([str(a) for a in argv])
    return code, out.getvalue(), err.getvalue()


def detect_args(files: dict[str, Path], *extra: object) -> list[str]:
    return ["detect", files["las"], "--column", files["column"], "--tops", files["tops"],
            *map(str, extra)]


def last_error(err: str) -> str:
    lines = err.rstrip("\n").splitlines()
    assert lines and lines[-1].startswith("wellfault: ") and "error: " in lines[-1], err
    assert "Traceback" not in err
    return lines[-1]


# ---------------------------------------------------------------------------- exit codes


def test_success_exits_0_with_the_table_on_stdout_and_the_rest_on_stderr(files) -> None:
    code, out, err = run(*detect_args(files))
    assert code == 0
    table = pd.read_csv(io.StringIO(out))
    assert table["section"].tolist() == ["missing"]
    assert "1 fault cut(s)" in err and "qualified geoscientist" in err
    assert "qualified geoscientist" not in out


@pytest.mark.parametrize("argv,match", [
    (["detect", "{las}", "--column", "{column}", "--bogus"],
     r"wellfault: error: unrecognized arguments: --bogus"),
    (["detect"], r"wellfault: error: the following arguments are required: WELL\.las; see "
                 r"wellfault detect --help"),
    (["detect", "{las}", "--column"], r"argument --column: expected one argument"),
    (["detect", "{las}", "--column", "{column}", "--tops", "{tops}", "--dip", "95/010"],
     r"wellfault: error: --dip: dip outside 0-90 degrees \(got 95\.0\)"),
    (["detect", "{las}", "--column", "{column}", "--tops", "{tops}", "--dip", "steep"],
     r"wellfault: error: --dip: cannot read dip 'steep'; write it as dip/dip-azimuth"),
    (["detect", "{las}", "--column", "{column}", "--tops", "{tops}", "--fault", "60-090"],
     r"wellfault: error: --fault: cannot read fault dip '60-090'; write it as dip/dip-azimuth"),
    (["detect", "{las}", "--column", "{column}", "--tops", "{tops}", "--tolerance", "lots"],
     r"argument --tolerance: invalid float value: 'lots'"),
    (["detect", "{las}", "--column", "{column}", "--tops", "{tops}", "--depth-unit", "yd"],
     r"argument --depth-unit: invalid choice: 'yd'"),
    (["detect", "{las}", "--column", "{column}", "--tops", "{tops}", "--dip", "5/090",
      "--dip-table", "{tops}"], r"argument --dip-table: not allowed with argument --dip"),
    (["frobnicate"], r"invalid choice: 'frobnicate'"),
    (["detect", "{las}", "--column", "{column}"],
     r"wellfault: error: no evidence to work on: give --tops TOPS\.csv"),
    (["detect", "{las}", "--tops", "{tops}"], r"wellfault: error: no reference column: give "
                                              r"--column COLUMN\.csv"),
    (["detect", "{missing}", "--column", "{column}", "--tops", "{tops}"],
     r"wellfault: error: .*nothere\.las: file not found; check the path"),
    (["detect", "{folder}", "--column", "{column}", "--tops", "{tops}"],
     r"wellfault: error: .*: is a folder, not a file"),
    (["survey", "{missing}"], r"wellfault: error: .*nothere\.las: file not found"),
], ids=["unknown-option", "missing-argument", "option-without-value", "dip-over-90",
        "dip-text", "fault-text", "tolerance-text", "unknown-unit-choice", "dip-and-dip-table",
        "unknown-command", "no-tops", "no-column", "missing-file", "folder-as-file",
        "survey-missing-file"])
def test_bad_usage_and_bad_files_exit_2_with_one_error_line(files, argv, match) -> None:
    names = {**{k: str(v) for k, v in files.items()},
             "missing": str(files["las"].parent / "nothere.las"),
             "folder": str(files["las"].parent)}
    code, out, err = run(*(a.format(**names) for a in argv))
    assert code == 2
    assert out == ""
    assert re.search(match, last_error(err)), err
    assert len(err.splitlines()) == 1, err  # one line: no usage block, no traceback


def test_no_command_prints_the_help_and_exits_2() -> None:
    code, out, err = run()
    assert code == 2 and "COMMAND" in err and out == ""


def test_help_and_version_exit_0_on_stdout() -> None:
    for argv in (["--help"], ["--version"], ["detect", "--help"]):
        out = io.StringIO()
        with contextlib.redirect_stdout(out), pytest.raises(SystemExit) as info:
            main(argv)
        assert info.value.code == 0 and out.getvalue()


def test_warnings_are_printed_before_the_error_when_the_command_fails(files) -> None:
    # a warning (STEP disagrees with the data) is raised while reading the LAS, then the tops
    # name a surface the column lacks: both reach the user, the error last
    files["las"].write_text(LAS.replace("STEP.M 0.5", "STEP.M 0.25"))
    files["tops"].write_text(TOPS + "C-1,Zed,1090\n")
    code, out, err = run(*detect_args(files))
    assert code == 2 and out == ""
    assert "wellfault: warning: " in err and "STEP 0.25 m in the header" in err
    assert "surface 'Zed' in the tops is not in the reference column" in last_error(err)


def test_warnings_go_to_stderr_when_the_command_succeeds(files) -> None:
    files["las"].write_text(LAS.replace("STEP.M 0.5", "STEP.M 0.25"))
    code, out, err = run(*detect_args(files))
    assert code == 0 and "warning" not in out
    assert "wellfault: warning: " in err and "STEP 0.25 m" in err


def test_interrupt_exits_130(files, monkeypatch) -> None:
    import wellfault.evidence.detect

    def interrupted(*args, **kwargs):
        raise KeyboardInterrupt

    monkeypatch.setattr(wellfault.evidence.detect, "analyse_well", interrupted)
    code, out, err = run(*detect_args(files))
    assert code == 130 and "interrupted" in err and out == ""


# ---------------------------------------------------------------------------- --out


def test_out_gets_the_table_and_stdout_stays_empty(files, tmp_path) -> None:
    target = tmp_path / "cuts.csv"
    code, out, err = run(*detect_args(files, "--out", target))
    assert code == 0 and out == ""
    assert pd.read_csv(target)["section"].tolist() == ["missing"]
    assert "1 fault cut(s)" in err


def test_out_into_a_missing_folder_exits_2_naming_it(files, tmp_path) -> None:
    code, out, err = run(*detect_args(files, "--out", tmp_path / "no" / "cuts.csv"))
    assert code == 2
    assert re.search(r"cannot write the table '.*no/cuts\.csv': folder '.*/no' does not exist; "
                     r"create it", last_error(err))


@pytest.mark.parametrize("old", [None, "well,md_m\nOLD,1\n"], ids=["new-file", "replacing"])
def test_out_interrupted_while_the_table_is_formatted_leaves_no_half_file(
    files, tmp_path, monkeypatch, old
) -> None:
    target = tmp_path / "cuts.csv"
    if old is not None:
        target.write_text(old)
    real = pd.DataFrame.to_csv

    def half_then_interrupt(self, path_or_buf=None, *args, **kwargs):
        text = real(self, None, *args, **kwargs)
        if path_or_buf is not None and not hasattr(path_or_buf, "write"):
            Path(path_or_buf).write_text(text[: len(text) // 2])
        elif path_or_buf is not None:
            path_or_buf.write(text[: len(text) // 2])
        raise KeyboardInterrupt

    monkeypatch.setattr(pd.DataFrame, "to_csv", half_then_interrupt)
    code, out, err = run(*detect_args(files, "--out", target))
    assert code == 130
    if old is None:
        assert not target.exists()
    else:
        assert target.read_text() == old
    assert sorted(p.name for p in tmp_path.iterdir()) == sorted(
        ["well.las", "tops.csv", "column.csv"] + ([] if old is None else ["cuts.csv"]))


@pytest.mark.parametrize("failure", [KeyboardInterrupt, OSError(28, "No space left on device")],
                         ids=["interrupted", "disk-full"])
@pytest.mark.parametrize("old", [None, "well,md_m\nOLD,1\n"], ids=["new-file", "replacing"])
def test_out_failing_half_way_through_the_file_leaves_the_old_one(
    files, tmp_path, monkeypatch, old, failure
) -> None:
    import wellfault.io.outputs as outputs

    target = tmp_path / "cuts.csv"
    if old is not None:
        target.write_text(old)
    real_fdopen = os.fdopen

    class HalfWriter:
        def __init__(self, fh):
            self.fh = fh

        def __enter__(self):
            return self

        def __exit__(self, *exc):
            self.fh.close()
            return False

        def write(self, text):
            self.fh.write(text[: len(text) // 2])
            self.fh.flush()
            raise failure

    monkeypatch.setattr(outputs.os, "fdopen", lambda *a, **k: HalfWriter(real_fdopen(*a, **k)))
    code, out, err = run(*detect_args(files, "--out", target))
    if failure is KeyboardInterrupt:
        assert code == 130
    else:
        assert code == 2
        assert re.search(r"cannot write the table '.*cuts\.csv': no space left on device",
                         last_error(err))
    assert target.read_text() == old if old is not None else not target.exists()
    assert not [p for p in tmp_path.iterdir() if p.name.endswith(".tmp")]


# ---------------------------------------------------------------------------- file modes


@pytest.fixture
def umask_022():
    old = os.umask(0o022)
    yield
    os.umask(old)


def _mode(path: Path) -> int:
    return stat.S_IMODE(path.stat().st_mode)


@pytest.mark.skipif(os.name != "posix", reason="POSIX file modes")
def test_written_files_get_normal_permissions_not_private_ones(tmp_path, umask_022) -> None:
    # regression: the temporary file of an atomic write is created 0600 by mkstemp
    table = write_table(pd.DataFrame({"a": [1]}), tmp_path / "t.csv")
    well = Well("W", pd.DataFrame({"GR": [1.0, 2.0]}, index=[10.0, 10.5]), "m")
    las = write_las(well, tmp_path / "w.las")
    assert _mode(table) == 0o644
    assert _mode(las) == 0o644


@pytest.mark.skipif(os.name != "posix", reason="POSIX file modes")
def test_written_files_follow_the_umask_and_keep_the_mode_of_a_replaced_file(tmp_path) -> None:
    old = os.umask(0o077)
    try:
        assert _mode(write_table(pd.DataFrame({"a": [1]}), tmp_path / "private.csv")) == 0o600
    finally:
        os.umask(old)
    shared = tmp_path / "shared.csv"
    shared.write_text("x\n")
    shared.chmod(0o664)
    assert _mode(write_table(pd.DataFrame({"a": [1]}), shared)) == 0o664


@pytest.mark.skipif(os.name != "posix", reason="POSIX file modes")
def test_detect_out_file_is_readable_by_others(files, tmp_path, umask_022) -> None:
    target = tmp_path / "cuts.csv"
    assert run(*detect_args(files, "--out", target))[0] == 0
    assert _mode(target) == 0o644


# ---------------------------------------------------------------------------- wellfault survey


def _survey_stdout(*argv: object, decimals: str = "full") -> pd.DataFrame:
    # full precision by default: these tests check the computation against the provider to
    # 0.006, finer than the 0.01 m / 0.1 ft the table is written at by default
    code, out, err = run("survey", *argv, "--decimals", decimals)
    assert code == 0, err
    return pd.read_csv(io.StringIO(out))


def test_survey_command_gives_the_provider_tvd_of_a_metre_survey(refdata: Path) -> None:
    path = refdata / "deviation_m_survey.csv"
    got = _survey_stdout(path)
    provider = pd.read_csv(path)
    assert len(got) == len(provider)
    dz = np.abs(got["tvd_m"].to_numpy() - provider["tvd"].to_numpy())
    # provider-computed minimum-curvature TVD, deviation_m_survey.csv (welly 0.5.2 sdist):
    # 0.006 m on all stations but the last two, 0.05 m with them (reference_data/README.md)
    assert dz[:-2].max() < 0.006
    assert dz.max() < 0.05


def test_survey_command_gives_the_provider_tvd_of_a_feet_survey_when_told_the_unit(
    refdata: Path,
) -> None:
    path = refdata / "Well_1515_survey.csv"
    got = _survey_stdout(path, "--depth-unit", "ft")
    provider = pd.read_csv(path)
    assert "tvd_ft" in got.columns
    # provider-computed minimum-curvature TVD, Well_1515_survey.csv (welly 0.5.2 sdist):
    # 0.006 on TVD, N, E (reference_data/README.md)
    assert np.abs(got["tvd_ft"].to_numpy() - provider["tvd"].to_numpy()).max() < 0.006
    assert np.abs(got["north_ft"].to_numpy() - provider["north"].to_numpy()).max() < 0.006
    assert np.abs(got["east_ft"].to_numpy() - provider["east"].to_numpy()).max() < 0.006


def test_survey_command_on_a_unitless_survey_exits_2_naming_the_fix(refdata: Path) -> None:
    # Well_1515_survey.json: length unit "not stated; feet likely" (welly 0.5.2 sdist)
    code, out, err = run("survey", refdata / "Well_1515_survey.csv")
    assert code == 2 and out == ""
    line = last_error(err)
    assert "Well_1515_survey.csv: no depth unit" in line and "--depth-unit m|ft|usft" in line


def test_survey_command_writes_in_the_survey_own_unit_by_default(tmp_path: Path) -> None:
    # regression: the default output unit was metres whatever the survey's unit
    p = tmp_path / "s.csv"
    p.write_text("md_ft,inc,azi\n0,0,0\n1000,10,45\n")
    got = _survey_stdout(p, decimals="1")
    assert list(got.columns[:4]) == ["md_ft", "inc_deg", "azi_deg", "tvd_ft"]
    assert got["md_ft"].tolist() == [0.0, 1000.0]
    assert list(_survey_stdout(p, "--output-unit", "m").columns[:1]) == ["md_m"]
