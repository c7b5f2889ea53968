"""HTML reports: self-contained (no network, figures embedded), the cut table row by row, the
assumptions, the errors and the caution; written atomically; opened in a real headless browser
when one is installed."""

from __future__ import annotations

import base64
import re
import shutil
import subprocess
from html.parser import HTMLParser

import numpy as np
import pandas as pd
import pytest
from test_plots import FIELD, demo_faults, demo_field, demo_well, needs_field

from wellfault import CAUTION
from wellfault.errors import InputError
from wellfault.viz.report import field_report, well_report, write_field_report, write_well_report
from wellfault.evidence.topcuts import TopsTolerance

pytest.importorskip("matplotlib", reason="reports embed matplotlib figures")


class _Scan(HTMLParser):
    """Collects what the tests look at: table rows per table class, images, links, scripts."""

    def __init__(self):
        super().__init__()
        self.tables: list[str] = []
        self.rows: dict[str, int] = {}
        self.in_body = False
        self.imgs: list[dict] = []
        self.tags: list[str] = []
        self.refs: list[str] = []

    def handle_starttag(self, tag, attrs):
        a = dict(attrs)
        self.tags.append(tag)
        for k in ("src", "href", "action", "data"):
            if k in a:
                self.refs.append(a[k])
        if tag == "table":
            self.tables.append(a.get("class", ""))
        elif tag == "tbody":
            self.in_body = True
        elif tag == "tr" and self.in_body and self.tables:
            self.rows[self.tables[-1]] = self.rows.get(self.tables[-1], 0) + 1
        elif tag == "img":
            self.imgs.append(a)

    def handle_endtag(self, tag):
        if tag == "tbody":
            self.in_body = False


def scan(text: str) -> _Scan:
    s = _Scan()
    s.feed(text)
    return s


def assert_self_contained(text: str):
    s = scan(text)
    assert "script" not in s.tags and "link" not in s.tags and "iframe" not in s.tags
    for ref in s.refs:
        assert ref.startswith("data:") or ref.startswith("#"), ref
    assert "http://" not in text and "https://" not in text
    assert "default-src 'none'" in text  # the page itself forbids fetching anything
    for img in s.imgs:
        assert img["src"].startswith("data:image/png;base64,")
        assert base64.b64decode(img["src"].split(",", 1)[1])[:8] == b"\x89PNG\r\n\x1a\n"
        assert img.get("alt")


@pytest.fixture(scope="module")
def vr2():
    if not (FIELD / "field.json").is_file():
        pytest.skip("demo field synthetic_wells/ not in the checkout")
    return demo_well("VR-2")


# ------------------------------------------------------------------------------ well report
def test_well_report_holds_table_figures_assumptions_errors_and_caution(vr2, tmp_path):
    w, traj, tops, dip, cuts, track, col = vr2
    out = write_well_report(tmp_path / "VR-2.html", well=w, column=col, cuts_df=cuts,
                            trajectory=traj, bed_dip=dip, tops=tops,
                            tolerance=TopsTolerance(), errors=["LAS header: no API number"],
                            assumptions={"fault model": "mapped planes of the demo field"})
    text = out.read_text(encoding="utf-8")
    assert_self_contained(text)
    s = scan(text)
    assert s.rows["cuts"] == len(cuts) == 1
    assert len(s.imgs) == 2  # correlation panel and position plot (track built from tops)
    assert CAUTION in text
    # units in the column names (VR-2's LAS is in feet, so is its table)
    for head in ("MD [ft]", "TST [ft]", "vert. separation [ft]", "bracket MD [ft]"):
        assert head in text
    assert "missing" in text and "normal" in text
    # assumptions: bed dip, fault dip and its source, tolerance, well path
    assert "8/070" in text and "fault model F1" in text and "15 % of the expected" in text
    assert "vertical" in text and "mapped planes of the demo field" in text
    # errors met
    assert s.rows["errors"] == 1 and "no API number" in text
    assert not [p for p in tmp_path.iterdir() if p.name != "VR-2.html"]  # no temp file left


def test_well_report_with_no_cut_no_tops_and_no_errors(vr2):
    w, traj, _, dip, cuts, _, col = vr2
    text = well_report(well=w, column=col, cuts_df=cuts.iloc[0:0], trajectory=traj,
                       bed_dip=None)
    assert_self_contained(text)
    assert "No fault cut found." in text and "No error met." in text
    assert "flat beds assumed" in text
    assert len(scan(text).imgs) == 1  # no track: the position plot is left out
    assert "position plot is left out" in text


def test_report_escapes_what_it_is_given(vr2):
    w, traj, tops, dip, cuts, track, col = vr2
    bad = cuts.assign(notes="<script>alert(1)</script>")
    text = well_report(well=w, column=col, cuts_df=bad, trajectory=traj, bed_dip=dip,
                       track=track, errors=[{"well": "<b>x</b>", "message": "a & b"}])
    assert "<script>" not in text and "&lt;script&gt;" in text
    assert "&lt;b&gt;x&lt;/b&gt;" in text and "a &amp; b" in text


def test_a_failing_figure_is_reported_not_fatal(vr2, monkeypatch):
    import wellfault.viz.well_plots as plots

    w, traj, tops, dip, cuts, track, col = vr2

    def boom(*a, **k):
        raise ValueError("broken curve")

    monkeypatch.setattr(plots, "correlation_panel", boom)
    text = well_report(well=w, column=col, cuts_df=cuts, trajectory=traj, bed_dip=dip,
                       track=track)
    assert "figure not drawn" in text and "broken curve" in text
    assert scan(text).rows["errors"] == 1


# ----------------------------------------------------------------------------- field report
@needs_field
def test_field_report_holds_every_cut_error_and_well(tmp_path):
    meta, col, manifest, cuts = demo_field()
    errors = pd.DataFrame([{"well": "VR-99", "source": "VR_99.las", "error_type": "InputError",
                            "message": "VR_99.las: no such file; check the manifest"}])
    tracks = {n: demo_well(n)[5] for n in ("VR-2", "VR-4")}
    out = write_field_report(tmp_path / "field.html", cuts=cuts, errors=errors, wells=manifest,
                             faults=demo_faults(), tracks=tracks, column=col,
                             tolerance=TopsTolerance(), progress=False)
    text = out.read_text(encoding="utf-8")
    assert_self_contained(text)
    s = scan(text)
    assert s.rows["cuts"] == len(cuts) == 9
    assert s.rows["errors"] == 1 and "no such file" in text
    # map, separation along strike, one position plot per well with a track and cuts
    assert len(s.imgs) == 2 + len(tracks)
    assert CAUTION in text
    for name in manifest["well"]:
        assert f">{name}<" in text
    assert ">VR-99<" in text  # a failed well is listed with its status
    assert "failed" in text
    assert "fault model F1" in text  # fault dip source among the assumptions


def test_field_report_without_locations_or_faults():
    cuts = pd.DataFrame({"well": ["A"], "md_m": [1000.0], "section": ["missing"],
                         "method": ["tops"]})
    text = field_report(cuts=cuts, errors=["A.las: bad header"])
    assert_self_contained(text)
    assert "map is left out" in text
    assert scan(text).rows["cuts"] == 1 and scan(text).rows["errors"] == 1


def test_progress_bar_only_for_many_wells(monkeypatch):
    import wellfault.viz.report as report

    few = range(3)
    assert report._progress(few, 3, None, "figures") is few  # few wells: no bar
    many = range(report.PROGRESS_MIN_WELLS)
    bar = report._progress(many, len(many), None, "figures")
    assert bar is not many and list(bar) == list(many)  # a tqdm bar wraps them
    assert report._progress(few, 3, True, "figures") is not few
    assert report._progress(many, len(many), False, "figures") is many

    seen = []
    real = report._progress
    monkeypatch.setattr(report, "_progress",
                        lambda it, total, progress, desc: seen.append(total) or
                        real(it, total, progress, desc))
    track = pd.DataFrame({"md_m": [1.0, 2.0], "s_m": [0.0, 1.0], "unit": ["A", "A"],
                          "confidence": [1.0, 1.0]})
    cuts = pd.DataFrame({"well": ["W1", "W2"], "md_m": [1.5, 1.5], "section": ["missing"] * 2,
                         "delta_s_m": [1.0, 1.0]})
    text = report.field_report(cuts=cuts, tracks={"W1": track, "W2": track})
    assert seen == [2] and len(scan(text).imgs) == 2


# -------------------------------------------------------------------------------- browser
def _browser() -> str | None:
    for name in ("chromium", "chromium-browser", "google-chrome", "google-chrome-stable"):
        path = shutil.which(name)
        if path:
            return path
    return None


def _run_browser(exe, profile, *args, timeout=120):
    cmd = [exe, "--headless", "--no-sandbox", "--disable-gpu", "--disable-quic",
           "--no-first-run", "--disable-background-networking", "--disable-component-update",
           "--disable-sync", f"--user-data-dir={profile}", *args]
    last = None
    for _ in range(3):  # headless start-up occasionally fails on a busy machine: retry
        last = subprocess.run(cmd, capture_output=True, text=True, timeout=timeout)
        if last.returncode == 0 and (last.stdout.strip() or "--screenshot" in " ".join(args)):
            return last
    return last


@needs_field
def test_report_opens_in_a_headless_browser(vr2, tmp_path):
    exe = _browser()
    if exe is None:
        pytest.skip("no headless browser installed (e.g. apt-get install chromium)")
    w, traj, tops, dip, cuts, track, col = vr2
    page = write_well_report(tmp_path / "VR-2.html", well=w, column=col, cuts_df=cuts,
                             trajectory=traj, bed_dip=dip, tops=tops)
    dom = _run_browser(exe, tmp_path / "profile-dom", "--dump-dom", page.as_uri())
    assert dom.returncode == 0, dom.stderr[-2000:]
    s = scan(dom.stdout)
    assert s.rows.get("cuts") == len(cuts)
    assert len(s.imgs) == 2
    assert "qualified geoscientist" in dom.stdout
    assert re.search(r"<td[^>]*>\s*VR-2|>VR-2<", dom.stdout)

    shot = tmp_path / "shot.png"
    res = _run_browser(exe, tmp_path / "profile-shot", f"--screenshot={shot}",
                       "--window-size=1280,2400", "--hide-scrollbars", page.as_uri())
    assert res.returncode == 0 and shot.is_file(), res.stderr[-2000:]
    assert shot.stat().st_size > 20_000
    import matplotlib.image as mpimg

    img = mpimg.imread(shot)
    assert img.shape[0] >= 2000 and img.shape[1] >= 1200
    assert float(img[..., :3].std()) > 0.05  # not a blank page


def test_field_report_scales_and_caps_its_tables():
    import time

    rng = np.random.default_rng(3)
    n_wells, n_cuts = 3000, 800
    wells = pd.DataFrame({"well": [f"W{i}" for i in range(n_wells)],
                          "x_m": rng.uniform(0, 30000, n_wells),
                          "y_m": rng.uniform(0, 30000, n_wells)})
    pick = rng.integers(0, n_wells, n_cuts)
    cuts = pd.DataFrame({"well": wells["well"].to_numpy()[pick], "method": "tops",
                         "md_m": rng.uniform(1000, 3000, n_cuts),
                         "x_m": wells["x_m"].to_numpy()[pick],
                         "y_m": wells["y_m"].to_numpy()[pick],
                         "tvdss_m": rng.uniform(1500, 2500, n_cuts),
                         "section": rng.choice(["missing", "repeated"], n_cuts),
                         "vertical_separation_m": rng.uniform(5, 100, n_cuts),
                         "confidence": rng.uniform(0, 1, n_cuts)})
    errors = pd.DataFrame({"well": [f"W{i}" for i in range(300)], "file": "x.las",
                           "error_type": "InputError", "message": "bad"})
    t0 = time.perf_counter()
    text = field_report(cuts=cuts, errors=errors, wells=wells, max_table_rows=200)
    assert time.perf_counter() - t0 < 60
    s = scan(text)
    assert s.rows["cuts"] == 200 and s.rows["errors"] == 200
    assert "The first 200 of 800 cuts are shown" in text
    assert "200 of 3,000 wells listed" in text
    assert len(s.imgs) == 1  # the map
