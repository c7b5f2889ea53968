"""Fuzzing the readers and detection: mutated LAS, tops, survey, column and dip files.

Each property starts from a small valid file, applies a random list of mutations of the kinds
users' files suffer (lines deleted, repeated or swapped, bytes flipped, text typed into numbers,
truncation, unit strings changed, other separators, a byte-order mark, odd numbers: nan, inf,
huge, negative), then reads it and, when it reads, runs detection on it. The only exceptions
allowed to escape are :class:`wellfault.errors.WellfaultError` subclasses: anything else
(IndexError, ZeroDivisionError, KeyError, lasio/numpy/pandas internals) is a bug.

``WELLFAULT_FUZZ_EXAMPLES`` raises the number of examples per property for a longer hunt; the
default keeps the whole file under a minute.
"""

from __future__ import annotations

import os
import shutil
import tempfile
import warnings
from collections.abc import Callable
from pathlib import Path

import numpy as np
import pandas as pd
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

from wellfault.geo.column import ReferenceColumn
from wellfault.evidence.detect import find_fault_cuts
from wellfault.geo.dip import BedDip
from wellfault.errors import WellfaultError, WellfaultWarning
from wellfault.io import read_column_table, read_dip_table, read_las, read_survey, read_tops
from wellfault.synth.mutations import (
    KINDS, ODD_NUMBERS, SEPARATORS, STRAY_LINES, TYPO_ALPHABET, UNIT_SWAPS, mutate,
)
from wellfault.geo.trajectory import Trajectory

EXAMPLES = int(os.environ.get("WELLFAULT_FUZZ_EXAMPLES", "60"))
FUZZ = settings(max_examples=EXAMPLES, deadline=None, derandomize=False,
                suppress_health_check=[HealthCheck.too_slow, HealthCheck.data_too_large])

# ---------------------------------------------------------------------------- valid inputs

_MD = np.round(np.arange(1000.0, 1100.0 + 1e-9, 0.5), 1)
LAS = (
    "~Version Information\n"
    " VERS.   2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0\n"
    " WRAP.   NO  : ONE LINE PER DEPTH STEP\n"
    "~Well Information\n"
    " STRT.M  1000.0 : START DEPTH\n"
    " STOP.M  1100.0 : STOP DEPTH\n"
    " STEP.M  0.5    : STEP\n"
    " NULL.   -999.25 : NULL VALUE\n"
    " WELL.   F-1    : WELL\n"
    " X   .M  1000.0 : SURFACE X\n"
    " Y   .M  2000.0 : SURFACE Y\n"
    "~Curve Information\n"
    " DEPT.M      : MEASURED DEPTH\n"
    " GR  .GAPI   : GAMMA RAY\n"
    " RHOB.G/CC   : DENSITY\n"
    "~Parameter Information\n"
    " DREF.   KB : DEPTH REFERENCE\n"
    " EKB .M  30.0 : KB ELEVATION\n"
    "~ASCII DEPT GR RHOB\n"
    + "".join(f"{m:.1f} {60 + 10 * np.sin(m / 7):.2f} {2.4 + 0.1 * np.cos(m / 5):.3f}\n"
              for m in _MD)
)
TOPS = ("well,surface,md_m\nF-1,A,1010\nF-1,B,1030.5\nF-1,C,1061\nF-1,B,1070\nF-1,C,1080\n"
        "F-1,D,1095\n")
SURVEY = "md_m,inc_deg,azi_deg\n0,0,0\n500,0,0\n800,4.5,90\n1000,6,95\n1100,6,95\n"
COLUMN = "surface,thickness_m,unconformity\nA,20,no\nB,30,no\nC,25,yes\nD,,\n"
DIPS = "md_m,dip,dip_azimuth\n1000,5,90\n1050,7.5,100\n1100,6,80\n"

# ---------------------------------------------------------------------------- mutations

@st.composite
def mutations(draw) -> list[tuple]:
    """A short list of (kind, a, b) edits (wellfault.synth.mutations); a and b are positions or
    payloads."""
    out = []
    for _ in range(draw(st.integers(1, 4))):
        kind = draw(st.sampled_from(KINDS))
        a = draw(st.integers(0, 10**6))
        if kind == "number":
            b = draw(st.one_of(st.sampled_from(ODD_NUMBERS),
                               st.floats(allow_nan=True, allow_infinity=True).map(repr),
                               st.integers(-10**12, 10**12).map(str)))
        elif kind == "typo":
            b = draw(st.text(alphabet=TYPO_ALPHABET, min_size=1, max_size=3))
        elif kind == "flip":
            b = draw(st.integers(1, 255))
        elif kind == "unit":
            b = draw(st.sampled_from(range(len(UNIT_SWAPS))))
        elif kind == "separator":
            b = draw(st.sampled_from(SEPARATORS))
        elif kind == "insert_line":
            b = draw(st.sampled_from(STRAY_LINES))
        else:
            b = draw(st.integers(0, 10**6))
        out.append((kind, a, b))
    return out


# ---------------------------------------------------------------------------- harness


@pytest.fixture(scope="module")
def folder():
    d = Path(tempfile.mkdtemp(prefix="wellfault-fuzz-"))
    yield d
    shutil.rmtree(d, ignore_errors=True)


def _write(folder: Path, name: str, data: bytes | str) -> Path:
    p = folder / name
    p.write_bytes(data.encode("utf-8") if isinstance(data, str) else data)
    return p


def only_wellfault_errors(step: Callable[[], object]) -> object:
    """Run ``step``; return its result, or None when it raised a WellfaultError."""
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        try:
            return step()
        except WellfaultError as err:
            assert str(err).strip(), "an error without a message"
            assert "Traceback" not in str(err)
            return None


def _valid(folder: Path):
    """The valid inputs, read once per call (cheap)."""
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        well = read_las(_write(folder, "ok.las", LAS))
        column = ReferenceColumn.from_table(read_column_table(_write(folder, "ok_col.csv",
                                                                     COLUMN)))
        tops = read_tops(_write(folder, "ok_tops.csv", TOPS))
        traj = Trajectory.from_survey(read_survey(_write(folder, "ok_survey.csv", SURVEY)))
    return well, column, tops, traj


def _detect(well, column, tops, traj, bed_dip=BedDip.constant(6.0, 90.0)):
    out = find_fault_cuts(well, column, tops=tops, trajectory=traj, bed_dip=bed_dip)
    assert isinstance(out, pd.DataFrame)
    return out


def test_the_valid_inputs_read_cleanly_and_show_their_two_cuts(folder: Path) -> None:
    well, column, tops, traj = _valid(folder)
    cuts = _detect(well, column, tops, traj)
    # B and C are picked twice (1030.5/1070, 1061/1080): a repeat of known size, by
    # construction of TOPS above
    assert "repeated" in set(cuts["section"])


# ---------------------------------------------------------------------------- properties


@FUZZ
@given(edits=mutations())
def test_mutated_las_reads_or_raises_a_wellfault_error(folder: Path, edits) -> None:
    path = _write(folder, "m.las", mutate(LAS.encode(), edits))
    well = only_wellfault_errors(lambda: read_las(path))
    if well is None:
        return
    _, column, tops, traj = _valid(folder)
    only_wellfault_errors(lambda: _detect(well, column, tops.assign(well=well.name), traj))


@FUZZ
@given(edits=mutations(), unit=st.sampled_from([None, "m", "ft"]))
def test_mutated_tops_read_or_raise_a_wellfault_error(folder: Path, edits, unit) -> None:
    path = _write(folder, "m_tops.csv", mutate(TOPS.encode(), edits))
    tops = only_wellfault_errors(lambda: read_tops(path, depth_unit=unit))
    if tops is None:
        return
    well, column, _, traj = _valid(folder)
    only_wellfault_errors(lambda: _detect(well, column, tops, traj))


@FUZZ
@given(edits=mutations(), unit=st.sampled_from([None, "m", "ft"]))
def test_mutated_survey_reads_or_raises_a_wellfault_error(folder: Path, edits, unit) -> None:
    path = _write(folder, "m_survey.csv", mutate(SURVEY.encode(), edits))
    survey = only_wellfault_errors(lambda: read_survey(path, depth_unit=unit))
    if survey is None:
        return
    traj = only_wellfault_errors(lambda: Trajectory.from_survey(survey, source=str(path)))
    if traj is None:
        return
    well, column, tops, _ = _valid(folder)
    only_wellfault_errors(lambda: _detect(well, column, tops, traj))
    only_wellfault_errors(lambda: traj.survey_table("ft"))


@FUZZ
@given(edits=mutations(), unit=st.sampled_from([None, "m"]))
def test_mutated_column_reads_or_raises_a_wellfault_error(folder: Path, edits, unit) -> None:
    path = _write(folder, "m_col.csv", mutate(COLUMN.encode(), edits))
    table = only_wellfault_errors(lambda: read_column_table(path, depth_unit=unit))
    if table is None:
        return
    column = only_wellfault_errors(lambda: ReferenceColumn.from_table(table, source=path))
    if column is None:
        return
    well, _, tops, traj = _valid(folder)
    only_wellfault_errors(lambda: _detect(well, column, tops, traj))


@FUZZ
@given(edits=mutations())
def test_mutated_dip_table_reads_or_raises_a_wellfault_error(folder: Path, edits) -> None:
    path = _write(folder, "m_dips.csv", mutate(DIPS.encode(), edits))
    table = only_wellfault_errors(lambda: read_dip_table(path, depth_unit="m"))
    if table is None:
        return

    def build():
        if "md_m" in table.columns:
            return BedDip.from_md_table(table, source=path)
        return BedDip.per_surface(table, source=path)

    bed = only_wellfault_errors(build)
    if bed is None:
        return
    well, column, tops, traj = _valid(folder)
    only_wellfault_errors(lambda: _detect(well, column, tops, traj, bed))


_TOP_NUMBERS = st.one_of(st.floats(allow_nan=True, allow_infinity=True),
                         st.floats(-1e6, 1e6), st.sampled_from([0.0, -0.0, 1e308, -1e308]))


@FUZZ
@given(md=st.lists(_TOP_NUMBERS, min_size=1, max_size=8),
       names=st.lists(st.sampled_from(["A", "B", "C", "D", "E", " ", "a"]), min_size=8,
                      max_size=8),
       survey=st.lists(st.tuples(_TOP_NUMBERS, _TOP_NUMBERS, _TOP_NUMBERS), min_size=1,
                       max_size=6),
       dip=st.tuples(_TOP_NUMBERS, _TOP_NUMBERS))
def test_random_numbers_in_tables_read_or_raise_a_wellfault_error(folder: Path, md, names,
                                                                  survey, dip) -> None:
    tops_text = "surface,md_m\n" + "".join(f"{n},{m!r}\n" for n, m in zip(names, md))
    survey_text = "md_m,inc,azi\n" + "".join(f"{a!r},{b!r},{c!r}\n" for a, b, c in survey)
    well, column, _, _ = _valid(folder)
    tops = only_wellfault_errors(lambda: read_tops(_write(folder, "n_tops.csv", tops_text),
                                                   well=well.name))
    s = only_wellfault_errors(lambda: read_survey(_write(folder, "n_survey.csv", survey_text)))
    traj = None if s is None else only_wellfault_errors(lambda: Trajectory.from_survey(s))
    bed = only_wellfault_errors(lambda: BedDip.parse(f"{dip[0]!r}/{dip[1]!r}"))
    if tops is not None:
        only_wellfault_errors(lambda: _detect(well, column, tops, traj, bed))


# ---------------------------------------------------------------------------- the command line

_FILE_NAMES = {"las": "c.las", "tops": "c_tops.csv", "survey": "c_survey.csv",
               "column": "c_col.csv", "dips": "c_dips.csv"}
_VALID = {"las": LAS, "tops": TOPS, "survey": SURVEY, "column": COLUMN, "dips": DIPS}


@FUZZ
@given(which=st.sampled_from(sorted(_VALID)), edits=mutations(),
       unit=st.sampled_from([None, "m", "ft"]), command=st.sampled_from(["detect", "survey"]))
def test_mutated_files_through_the_command_line_exit_0_or_2(folder: Path, which, edits, unit,
                                                             command) -> None:
    import contextlib
    import io

    from wellfault.cli.app import main

    paths = {}
    for key, text in _VALID.items():
        data = mutate(text.encode(), edits) if key == which else text.encode()
        paths[key] = _write(folder, _FILE_NAMES[key], data)
    if command == "survey":
        argv = ["survey", str(paths["survey"])]
    else:
        argv = ["detect", str(paths["las"]), "--column", str(paths["column"]), "--tops",
                str(paths["tops"]), "--survey", str(paths["survey"]), "--dip-table",
                str(paths["dips"]), "--out", str(folder / "c_cuts.csv")]
    if unit:
        argv += ["--depth-unit", unit]
    err = io.StringIO()
    with contextlib.redirect_stderr(err), contextlib.redirect_stdout(io.StringIO()):
        code = main(argv)
    assert code in (0, 2), err.getvalue()
    if code == 2:
        assert err.getvalue().rstrip("\n").splitlines()[-1].startswith("wellfault: error: ")


_ATTITUDE_TEXT = st.one_of(
    st.text(alphabet="0123456789./-+eE naif,°", max_size=12),
    st.tuples(_TOP_NUMBERS, _TOP_NUMBERS).map(lambda t: f"{t[0]!r}/{t[1]!r}"),
)


@FUZZ
@given(dip=_ATTITUDE_TEXT, fault=_ATTITUDE_TEXT, pitch=_ATTITUDE_TEXT)
def test_any_attitude_text_is_read_or_refused_with_a_wellfault_error(folder: Path, dip, fault,
                                                                     pitch) -> None:
    from wellfault.geo.geometry import parse_attitude
    from wellfault.geo.slip import parse_pitch

    only_wellfault_errors(lambda: BedDip.parse(dip))
    only_wellfault_errors(lambda: parse_attitude(fault))
    only_wellfault_errors(lambda: parse_pitch(pitch))
    well, column, tops, traj = _valid(folder)
    only_wellfault_errors(lambda: find_fault_cuts(well, column, tops=tops, trajectory=traj,
                                                  bed_dip=dip, fault=fault, pitch=pitch))


# ---------------------------------------------------------------------------- regressions
# Bugs the fuzzer (and the hand-made odd files beside it) found, each fixed in the library.


def _peak_mib(step: Callable[[], object]) -> float:
    import tracemalloc

    tracemalloc.start()
    try:
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            step()
        return tracemalloc.get_traced_memory()[1] / 2**20
    finally:
        tracemalloc.stop()


def test_regression_tops_billions_of_metres_deep_are_refused_not_run_out_of_memory(
    folder: Path,
) -> None:
    # fuzz: edits=[('number', 975, '9147022395.0')] on TOPS: the repeat check sampled the
    # interval every 5 m (1.8e9 samples, 13.6 GiB) and the process was killed
    well, column, _, traj = _valid(folder)
    text = TOPS.replace("1095", "9147022395.0")
    tops = read_tops(_write(folder, "deep_tops.csv", text))
    with pytest.raises(WellfaultError, match=r"pick 'D' at MD 9\.14702e\+09 m lies .* outside "
                                             r"the log"):
        _detect(well, column, tops, traj)


def test_regression_a_far_repeat_through_the_api_uses_bounded_memory() -> None:
    # the same at the root, for callers of find_cuts_from_tops: the sampling of a repeat
    # interval is capped (topcuts._certain_repeats), and so is the stepping of a varying dip
    # (BedDip.strat_travel)
    from wellfault.evidence.topcuts import find_cuts_from_tops

    column = ReferenceColumn.from_table(pd.DataFrame({"surface": ["A", "B", "C"],
                                                      "thickness_m": [20.0, 30.0, np.nan]}))
    tops = pd.DataFrame({"surface": ["A", "B", "A", "C"], "md_m": [1000.0, 1020.0, 1e8, 2e8]})
    vertical = Trajectory.vertical()
    assert _peak_mib(lambda: find_cuts_from_tops(tops, column, vertical)) < 64
    dips = BedDip.from_md_table(pd.DataFrame({"md_m": [0.0, 1e9], "dip_deg": [5.0, 6.0],
                                              "dip_azimuth_deg": [90.0, 90.0]}))
    assert _peak_mib(lambda: dips.strat_travel(vertical, [0.0], [1e9])) < 64


def test_regression_a_number_that_overflows_a_float_is_refused(folder: Path) -> None:
    # fuzz: '1e400' in an MD cell read as inf and went on into detection
    p = _write(folder, "inf_tops.csv", TOPS.replace("1030.5", "1e400"))
    with pytest.raises(WellfaultError, match=r"row 3: MD in column 'md_m' is too large to be a "
                                             r"number \(got '1e400'\)"):
        read_tops(p)


def test_regression_data_after_a_second_section_marker_is_not_dropped(folder: Path) -> None:
    # odd file: a second ~A block (or any section after ~A) was ignored with its rows
    p = _write(folder, "two_blocks.las", LAS + "~A\n1100.5 50 2.4\n1101.0 51 2.4\n")
    with pytest.raises(WellfaultError, match=r"section '~A' follows the ~A \(data\) section"):
        read_las(p)


def test_regression_old_mac_line_ends_are_read(folder: Path) -> None:
    # odd file: CR-only line ends made the whole LAS one line ("no ~A section")
    well = read_las(_write(folder, "cr.las", LAS.replace("\n", "\r")))
    assert well.md_m.tolist() == pytest.approx(_MD.tolist())


def test_regression_infinite_curve_values_become_nan_with_a_warning(folder: Path) -> None:
    # odd file: 'inf' or '1e400' in a curve was kept as an infinite log value
    lines = LAS.splitlines()
    k = lines.index(next(ln for ln in lines if ln.startswith("1000.5 ")))
    lines[k] = "1000.5 inf 2.4"
    p = _write(folder, "inf.las", "\n".join(lines) + "\n")
    with pytest.warns(WellfaultWarning, match=r"infinite or overflowing values .*GR \(1\)"):
        well = read_las(p)
    assert np.isnan(well.curve("GR").iloc[1])
    assert np.isfinite(well.curves.to_numpy()[~np.isnan(well.curves.to_numpy())]).all()


def test_regression_lasio_log_lines_do_not_reach_stderr(folder: Path, capfd) -> None:
    # lasio logged "Could not convert curve #1 to <class 'float'>" through Python's last-resort
    # handler, a raw third-party line beside wellfault's own warning
    lines = LAS.splitlines()
    k = lines.index(next(ln for ln in lines if ln.startswith("1001.0 ")))
    lines[k] = "1001.0 abc 2.4"
    p = _write(folder, "textcell.las", "\n".join(lines) + "\n")
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        read_las(p)
    assert capfd.readouterr().err == ""
