"""Following a log file that grows while drilling: partial lines, rewrites, nulls, bad rows."""

from __future__ import annotations

import io
import os

import numpy as np
import pytest

from wellfault.errors import InputError, UnitError
from wellfault.live.feed import GrowingFile, LineStream, LogLineParser
from wellfault.geo.units import DepthUnit

LAS_HEADER = """~Version Information
 VERS.          2.0 : CWLS LOG ASCII STANDARD - VERSION 2.0
 WRAP.           NO : ONE LINE PER DEPTH STEP
~Well Information
 STRT.FT     1000.0 : START DEPTH
 STOP.FT     1010.0 : STOP DEPTH
 STEP.FT        0.5 : STEP
 NULL.      -999.25 : NULL VALUE
 WELL.        LIVE-1 : WELL
~Curve Information
 DEPT.FT    : MEASURED DEPTH
 GR  .GAPI  : GAMMA RAY
 RHOB.G/C3  : DENSITY
~Parameter Information
 DREF.          KB : DEPTH REFERENCE
 EKB .FT     100.0 : ELEVATION OF DEPTH REFERENCE
~ASCII DEPT GR RHOB
"""


def rows_text(start_ft: float, n: int, gr0: float = 50.0) -> str:
    return "".join(f"{start_ft + 0.5 * k:.1f} {gr0 + k:.2f} 2.4\n" for k in range(n))


def test_las_header_read_once_then_rows_in_metres(tmp_path):
    f = tmp_path / "live.las"
    f.write_text(LAS_HEADER)
    feed = GrowingFile(f, curves=["gr"])
    r = feed.poll()
    assert len(r) == 0 and feed.parser.ready
    p = feed.parser
    assert p.depth_unit is DepthUnit.FT and p.well_name == "LIVE-1" and p.curves == ("GR",)
    assert p.ref_elevation_m == pytest.approx(30.48)
    with open(f, "a") as fh:
        fh.write(rows_text(1000.0, 4))
    r = feed.poll()
    assert r.md_m.tolist() == pytest.approx([1000 * 0.3048 + 0.1524 * k for k in range(4)])
    assert r.values[:, 0].tolist() == [50.0, 51.0, 52.0, 53.0]
    assert len(feed.poll()) == 0                      # nothing new


def test_partial_last_line_waits_for_its_line_end(tmp_path):
    f = tmp_path / "live.las"
    f.write_text(LAS_HEADER + rows_text(1000.0, 2) + "1001.0 5")   # being written
    feed = GrowingFile(f, curves=["GR"])
    assert len(feed.poll()) == 2
    assert len(feed.poll()) == 0                      # still partial: not consumed
    with open(f, "a") as fh:
        fh.write("5.5 2.41\n1001.5 56 2.4\n")
    r = feed.poll()
    assert r.values[:, 0].tolist() == [55.5, 56.0] and not r.notices


def test_partial_last_line_at_the_end_of_input(tmp_path):
    f = tmp_path / "done.las"
    f.write_text(LAS_HEADER + rows_text(1000.0, 2) + "1001.0 52 2.4")   # no final line end
    r = GrowingFile(f, curves=["GR"]).poll(final=True)
    assert len(r) == 3 and r.values[-1, 0] == 52.0
    f.write_text(LAS_HEADER + rows_text(1000.0, 2) + "1001.0 5")
    r = GrowingFile(f, curves=["GR"]).poll(final=True)
    assert len(r) == 2 and any("does not hold a whole row" in n for n in r.notices)


def test_nulls_text_and_bad_rows_are_reported_not_fatal(tmp_path):
    f = tmp_path / "live.las"
    body = ("1000.0 -999.25 2.4\n"          # declared null: silent
            "1000.5 -9999 2.4\n"            # undeclared marker: said once
            "1001.0 -9999 2.4\n"
            "1001.5 abc 2.4\n"              # text
            "1002.0 55\n"                   # too few values
            "1002.5 56 2.4\n")
    f.write_text(LAS_HEADER + body)
    r = GrowingFile(f, curves=["GR"]).poll()
    assert r.md_m.size == 5
    assert np.isnan(r.values[:4, 0]).all() and r.values[4, 0] == 56.0
    text = " | ".join(r.notices)
    assert text.count("-9999") == 1 and "text 'abc'" in text and "2 values where 3" in text


def test_bad_row_notices_are_throttled():
    p = LogLineParser("x.csv", curves=["GR"], depth_unit="m")
    _, _, notes = p.feed(["md,GR"] + ["1,2,3"] * 200)
    assert 5 <= len(notes) <= 8                      # 1st-5th, 10th, 100th


def test_rewritten_file_is_read_again_from_the_top(tmp_path):
    f = tmp_path / "live.las"
    f.write_text(LAS_HEADER + rows_text(1000.0, 10))
    feed = GrowingFile(f, curves=["GR"])
    assert len(feed.poll()) == 10
    f.write_text(LAS_HEADER + rows_text(1000.0, 4))          # shrunk (re-exported)
    r = feed.poll()
    assert r.restarted and len(r) == 4 and "shrank" in r.notices[0]
    with open(f, "r+") as fh:                                 # same size, last line changed
        text = fh.read()
        fh.seek(0)
        fh.write(text.replace("53.00", "99.00"))
    r = feed.poll()
    assert r.restarted and "rewritten in place" in r.notices[0] and r.values[-1, 0] == 99.0
    tmp = tmp_path / "new.las"                                # replaced by a new file
    tmp.write_text(LAS_HEADER + rows_text(1000.0, 6))
    os.replace(tmp, f)
    r = feed.poll()
    assert r.restarted and "replaced" in r.notices[0] and len(r) == 6


def test_missing_file_waits_and_comes_back(tmp_path):
    f = tmp_path / "later.las"
    feed = GrowingFile(f, curves=["GR"])
    r = feed.poll()
    assert len(r) == 0 and "not there" in r.notices[0]
    assert feed.poll().notices == []                          # said once
    f.write_text(LAS_HEADER + rows_text(1000.0, 3))
    r = feed.poll()
    assert len(r) == 3


def test_csv_depth_unit_from_the_name_or_given(tmp_path):
    f = tmp_path / "live.csv"
    f.write_text("Depth (ft);GR;RHOB\n1000;50,5;2,4\n1000,5;;2,4\n")
    r = GrowingFile(f, curves=["GR"]).poll()
    assert r.md_m.tolist() == pytest.approx([304.8, 304.9524])
    assert r.values[0, 0] == 50.5 and np.isnan(r.values[1, 0])
    g = tmp_path / "nounit.csv"
    g.write_text("GR,md\n50,1000\n")
    with pytest.raises(UnitError, match="no unit"):
        GrowingFile(g, curves=["GR"]).poll()
    r = GrowingFile(g, curves=["GR"], depth_unit="m").poll()
    assert r.md_m.tolist() == [1000.0] and r.values[0, 0] == 50.0


def test_header_problems_are_input_errors(tmp_path):
    f = tmp_path / "wrapped.las"
    f.write_text(LAS_HEADER.replace("WRAP.           NO", "WRAP.          YES"))
    with pytest.raises(InputError, match="wrapped"):
        GrowingFile(f).poll()
    g = tmp_path / "nogr.las"
    g.write_text(LAS_HEADER)
    with pytest.raises(InputError, match="no curve 'NPHI'.*GR"):
        GrowingFile(g, curves=["NPHI"]).poll()


def test_a_rewritten_header_that_cannot_be_used_waits(tmp_path):
    f = tmp_path / "live.las"
    f.write_text(LAS_HEADER + rows_text(1000.0, 3))
    feed = GrowingFile(f, curves=["GR"])
    assert len(feed.poll()) == 3
    f.write_text(LAS_HEADER.replace(" GR  .GAPI  : GAMMA RAY\n", "") + "1000 2.4\n")
    r = feed.poll()
    assert len(r) == 0 and "waiting" in r.notices[-1]
    f.write_text(LAS_HEADER + rows_text(1000.0, 5))
    assert len(feed.poll()) == 5


def test_rows_from_a_text_stream():
    stream = io.StringIO("md_m,GR\n1000,50\n1000.1,51\n")
    feed = LineStream(stream, curves=["GR"])
    got = []
    while not feed.eof:
        got += feed.poll(wait=0.5).values[:, 0].tolist()
    assert got == [50.0, 51.0] and feed.parser.depth_unit is DepthUnit.M
