"""Field screening: every well, failures recorded, same tables serial / pool / Dask, resume."""

from __future__ import annotations

import json
import warnings

import numpy as np
import pandas as pd
import pytest

from wellfault import CAUTION
from wellfault.io import fastpath as _fastio
import wellfault.field.screen_well as screen_mod
import wellfault.field.screen_pool as screen_pool
import wellfault.field.screen as screen_mod_screen
from wellfault.cli.screen import main as screen_main
from wellfault.errors import InputError, UnitError, WellfaultWarning
from wellfault.synth.fieldsim import field_tops, plan_wells, write_field
from wellfault.synth.structure import Beds, PlanarFault
from wellfault.synth.columns import synthetic_column
from wellfault.io import read_survey, read_tops
from wellfault.field.screen_output import ERROR_COLUMNS, WELL_COLUMNS
from wellfault.field.screen import screen_wells


# -- fields ------------------------------------------------------------------------------------
def _model():
    col = synthetic_column(12, seed=3, curves=(), thickness_range_m=(20.0, 50.0))
    beds = Beds.through(5.0, 70.0, (0.0, 0.0, 1500.0), 0.0)
    faults = [PlanarFault.dip_slip(60, 85, (900, 1500, 1800), 45, name="A"),
              PlanarFault.dip_slip(35, 95, (1900, 1500, 1800), 40, kind="reverse", name="C")]
    return col, beds, faults


@pytest.fixture(scope="module")
def small_field(tmp_path_factory):
    """70 wells over 3 x 3 km, 40 % deviated, two faults; per-well tops and surveys."""
    col, beds, faults = _model()
    plan = plan_wells(70, seed=1, target_tvdss_m=2300.0, extent_m=(0, 3000, 0, 3000),
                      deviated_fraction=0.4)
    tops, truth = field_tops(plan, col, beds, faults, pick_noise_m=0.3, seed=2)
    folder = tmp_path_factory.mktemp("small")
    man = write_field(folder, plan, tops, col, dip="5/070")
    return man, folder / "column.csv", truth


def _same(a, b):
    for name in ("cuts", "errors", "faults", "fault_profiles"):
        pd.testing.assert_frame_equal(getattr(a, name), getattr(b, name))
    pd.testing.assert_frame_equal(a.wells.drop(columns="seconds"),
                                  b.wells.drop(columns="seconds"))


@pytest.fixture(scope="module")
def serial_result(small_field):
    man, column, _ = small_field
    return screen_wells(man, column, workers=1, progress=False)


def test_serial_run_finds_the_cuts(serial_result, small_field):
    _man, _col, truth = small_field
    r = serial_result
    assert list(r.wells.columns) == list(WELL_COLUMNS)
    assert list(r.errors.columns) == list(ERROR_COLUMNS)
    assert len(r.wells) == 70 and (r.wells["status"] == "ok").all()
    assert (r.wells["checked_by"] == "tops+neighbours").all()
    assert len(r.cuts) >= 10
    assert set(r.cuts["well"]) <= set(truth["well"])
    assert r.cuts["md_m"].is_monotonic_increasing or \
        r.cuts.groupby("well")["md_m"].apply(lambda s: s.is_monotonic_increasing).all()
    assert list(r.cuts["well"]) == sorted(r.cuts["well"])
    for c in ("fault_id", "fault_fit", "x_top_m", "tvdss_base_m"):
        assert c in r.cuts.columns
    assert r.wells["cuts_found"].sum() == len(r.cuts)
    assert (r.wells["candidates_withheld"] == 0).all()      # tops alone withhold nothing
    assert "F001" in set(r.faults["fault_id"])


def test_pool_and_dask_give_the_same_tables(small_field, serial_result):
    man, column, _ = small_field
    pool = screen_wells(man, column, workers=2, chunk_size=4, progress=False)
    assert pool.info["runner"].startswith("process pool")
    _same(serial_result, pool)
    distributed = pytest.importorskip("distributed")
    with distributed.LocalCluster(n_workers=2, processes=True, threads_per_worker=1,
                                  dashboard_address=None) as cluster, \
            distributed.Client(cluster) as client:
        dask = screen_wells(man, column, client=client, chunk_size=5, progress=False)
    assert dask.info["runner"] == "dask"
    _same(serial_result, dask)


def test_outputs_written_atomically_in_either_format(small_field, serial_result, tmp_path):
    man, column, _ = small_field
    r = screen_wells(man, column, workers=1, progress=False, out_dir=tmp_path / "csv")
    for name in ("cuts", "errors", "wells", "faults", "fault_profiles"):
        assert (tmp_path / "csv" / f"{name}.csv").is_file()
    back = pd.read_csv(tmp_path / "csv" / "cuts.csv")
    assert len(back) == len(r.cuts)
    # written to 0.01 m (wellfault.geo.precision), the frame keeps full precision
    np.testing.assert_allclose(back["md_m"], r.cuts["md_m"], rtol=0, atol=0.005 + 1e-9)
    assert not list((tmp_path / "csv").glob("*.tmp"))
    pytest.importorskip("pyarrow")
    ft = screen_wells(man, column, workers=1, progress=False, out_dir=tmp_path / "pq",
                      fmt="parquet", unit="ft")
    cuts = pd.read_parquet(tmp_path / "pq" / "cuts.parquet")
    assert "md_ft" in cuts.columns and "md_m" not in cuts.columns
    np.testing.assert_allclose(cuts["md_ft"] * 0.3048, serial_result.cuts["md_m"], rtol=0,
                               atol=0.05 * 0.3048 + 1e-9)  # written to 0.1 ft
    np.testing.assert_allclose(ft.faults["vs_mean_ft"] * 0.3048,
                               serial_result.faults["vs_mean_m"])
    assert "along_strike_ft" in pd.read_parquet(tmp_path / "pq" /
                                                "fault_profiles.parquet").columns


def test_column_mode_is_one_pass(small_field):
    man, column, _ = small_field
    r = screen_wells(man, column, workers=1, progress=False, neighbours=False, fit=False)
    assert (r.wells["checked_by"] == "tops").all()
    assert (r.cuts["fault_fit"] == "not fitted").all() and len(r.faults) == 0
    assert "reference column" in r.info["thickness_mode"]


# -- resume -------------------------------------------------------------------------------------
def _counting(monkeypatch):
    calls = {"thickness": 0, "detect": 0, "remeasure": 0}
    real = screen_mod._run_one

    def counted(cfg, kind, task, extra):
        calls[kind] += 1
        return real(cfg, kind, task, extra)

    monkeypatch.setattr(screen_pool, "_run_one", counted)
    return calls


def test_resume_skips_finished_wells_and_gives_the_same_tables(small_field, serial_result,
                                                               tmp_path, monkeypatch):
    man, column, _ = small_field
    out = tmp_path / "run"
    first = screen_wells(man, column, workers=1, progress=False, out_dir=out)
    _same(serial_result, first)
    ck = out / ".wells"
    # an interrupted run: half of pass 2 done, the last line cut short, no tables yet
    lines = (ck / "detect.jsonl").read_text().splitlines()
    assert len(lines) >= 10
    keep = len(lines) // 2
    (ck / "detect.jsonl").write_text("\n".join(lines[:keep]) + "\n" + lines[keep][:25])
    (ck / "remeasure.jsonl").unlink()
    for p in out.glob("*.csv"):
        p.unlink()
    calls = _counting(monkeypatch)
    again = screen_wells(man, column, workers=1, progress=False, out_dir=out, resume=True)
    assert calls["thickness"] == 0
    assert calls["detect"] == len(lines) - keep
    assert calls["remeasure"] > 0
    _same(first, again)
    assert (out / "cuts.csv").is_file()
    # everything done: nothing runs again
    calls2 = _counting(monkeypatch)
    third = screen_wells(man, column, workers=1, progress=False, out_dir=out, resume=True)
    assert calls2 == {"thickness": 0, "detect": 0, "remeasure": 0}
    _same(first, third)
    # a different run is not resumed from this checkpoint
    with pytest.raises(InputError, match="different run"):
        screen_wells(man, column, workers=1, progress=False, out_dir=out, resume=True,
                     neighbours=False)
    with pytest.raises(InputError, match="resume needs"):
        screen_wells(man, column, workers=1, progress=False, resume=True)


# -- bad files among good ones ---------------------------------------------------------------
@pytest.fixture(scope="module")
def bad_field(tmp_path_factory):
    col, beds, faults = _model()
    plan = plan_wells(12, seed=7, target_tvdss_m=2300.0, extent_m=(0, 2000, 0, 2000),
                      deviated_fraction=0.5)
    tops, _ = field_tops(plan, col, beds, faults, pick_noise_m=0.3, seed=3)
    folder = tmp_path_factory.mktemp("bad")
    manifest = write_field(folder, plan, tops, col, dip="5/070")
    text = manifest.read_text().splitlines()
    good = list(plan["well"])
    (folder / "corrupt.las").write_bytes(bytes(range(256)) * 8)
    (folder / "empty.csv").write_bytes(b"")
    (folder / "nounit.csv").write_text("surface,md\n" + "".join(
        f"{s},{m}\n" for s, m in zip(col.names, np.arange(1500.0, 1800.0, 25.0))))
    (folder / "badsurvey.csv").write_text("md_m,inc_deg,azi_deg\n0,0,0\n500,200,10\n")
    (folder / "stranger.csv").write_text("surface,md_m\nNowhere Shale,1500\n")
    (folder / "nounit.las").write_text(
        "~Version\nVERS. 2.0 :\nWRAP. NO :\n~Well\nSTRT. 1000.0 :\nSTOP. 1001.0 :\n"
        "STEP. 0.5 :\nNULL. -999.25 :\nWELL. NOUNIT :\n~Curve\nDEPT. :\nGR.API :\n~ASCII\n"
        "1000.0 50\n1000.5 51\n1001.0 52\n")
    x0 = plan.iloc[0]
    extra = [
        f"CORRUPT,tops/{good[0]}.csv,,5/070,{x0.x_m},{x0.y_m},40",
        f"EMPTY,empty.csv,,5/070,{x0.x_m},{x0.y_m},40",
        f"NOUNIT,nounit.csv,,5/070,{x0.x_m},{x0.y_m},40",
        f"BADSURVEY,tops/{good[1]}.csv,badsurvey.csv,5/070,{x0.x_m},{x0.y_m},40",
        f"MISSING,no_such_tops.csv,,5/070,{x0.x_m},{x0.y_m},40",
        f"STRANGER,stranger.csv,,5/070,{x0.x_m},{x0.y_m},40",
        f"NOTOPS,,,5/070,{x0.x_m},{x0.y_m},40",
    ]
    header = text[0].split(",")
    rows = [dict(zip(header, line.split(","))) for line in text[1:]]
    df = pd.DataFrame(rows)
    df.insert(1, "las", "")
    bad = pd.DataFrame([dict(zip(header, line.split(","))) for line in extra])
    bad.insert(1, "las", "")
    bad.loc[bad["well"] == "CORRUPT", "las"] = "corrupt.las"
    lasrow = bad[bad["well"] == "EMPTY"].copy()
    lasrow["well"], lasrow["las"], lasrow["tops"] = "NOUNITLAS", "nounit.las", f"tops/{good[2]}.csv"
    noxy = df.iloc[[3]].copy()
    noxy["well"], noxy["x_m"], noxy["y_m"], noxy["elevation_m"] = "NOXY", "", "", ""
    df = pd.concat([df, bad, lasrow, noxy], ignore_index=True)
    path = folder / "manifest_bad.csv"
    df.to_csv(path, index=False)
    return path, folder / "column.csv", good


def test_bad_files_are_reported_and_the_rest_screened(bad_field):
    man, column, good = bad_field
    r = screen_wells(man, column, workers=1, progress=False)
    assert list(r.wells["well"][:len(good)]) == good
    assert (r.wells.set_index("well").loc[good, "status"] == "ok").all()
    err = r.errors.set_index("well")
    assert set(err.index) == {"CORRUPT", "EMPTY", "NOUNIT", "BADSURVEY", "MISSING", "STRANGER",
                              "NOTOPS", "NOUNITLAS"}
    assert err.loc["CORRUPT", "file"].endswith("corrupt.las")
    assert "binary" in err.loc["CORRUPT", "message"] or "LAS" in err.loc["CORRUPT", "message"]
    assert err.loc["EMPTY", "file"].endswith("empty.csv")
    assert "empty" in err.loc["EMPTY", "message"]
    assert err.loc["NOUNIT", "error_type"] == "UnitError"
    assert "no depth unit" in err.loc["NOUNIT", "message"]
    assert err.loc["NOUNITLAS", "error_type"] == "UnitError"
    assert err.loc["BADSURVEY", "error_type"] == "SurveyError"
    assert "inclination" in err.loc["BADSURVEY", "message"]
    assert "not found" in err.loc["MISSING", "message"]
    assert "Nowhere Shale" in err.loc["STRANGER", "message"]
    assert "no tops file" in err.loc["NOTOPS", "message"]
    assert not err["message"].str.startswith("internal error").any()
    failed = r.wells.set_index("well").loc[list(err.index)]
    assert (failed["status"] == "failed").all() and (failed["checked_by"] == "").all()
    # a well without surface location is screened against the column, not its neighbours
    noxy = r.wells.set_index("well").loc["NOXY"]
    assert noxy["status"] == "ok" and noxy["thickness_source"] == "column"


def test_an_unexpected_exception_is_an_internal_error_row(small_field, monkeypatch):
    man, column, _ = small_field
    real = screen_mod._pick_geometry

    def boom(cfg, inp):
        if inp.task.well == "W00005":
            raise ZeroDivisionError("synthetic failure")
        return real(cfg, inp)

    monkeypatch.setattr(screen_mod, "_pick_geometry", boom)
    r = screen_wells(man, column, workers=1, progress=False, fit=False)
    assert list(r.errors["well"]) == ["W00005"]
    row = r.errors.iloc[0]
    assert row["error_type"] == "ZeroDivisionError"
    assert row["message"] == "internal error: ZeroDivisionError: synthetic failure"
    assert (r.wells["status"] == "ok").sum() == 69


def test_cli_exit_codes_summary_and_caution(bad_field, small_field, tmp_path, capsys):
    man, column, _ = bad_field
    code = screen_main([str(man), "--column", str(column), "--out", str(tmp_path / "bad"),
                        "--workers", "1", "--no-progress"])
    err = capsys.readouterr().err
    assert code == 1
    assert "8 failed" in err and CAUTION in err
    assert len(pd.read_csv(tmp_path / "bad" / "errors.csv")) == 8
    man2, column2, _ = small_field
    code = screen_main([str(man2), "--column", str(column2), "--out", str(tmp_path / "ok"),
                        "--workers", "1", "--no-progress", "--output-unit", "ft",
                        "--no-neighbours"])
    err = capsys.readouterr().err
    assert code == 0 and CAUTION in err and "0 failed" in err
    assert "md_ft" in pd.read_csv(tmp_path / "ok" / "cuts.csv").columns
    # bad usage: exit 2 with one line
    assert screen_main([str(man2), "--column", str(tmp_path / "nope.csv"), "--out",
                        str(tmp_path / "x"), "--no-progress"]) == 2
    assert "nope.csv" in capsys.readouterr().err
    assert screen_main([str(man2), "--out", str(tmp_path / "x")]) == 2
    assert screen_main([str(man2), "--column", str(column2)]) == 2  # --out is required
    # curves without a type well: bad usage, naming what is missing
    code = screen_main([str(man2), "--column", str(column2), "--out", str(tmp_path / "c"),
                        "--workers", "1", "--no-progress", "--curve", "GR", "--no-faults"])
    assert code == 2 and "--type-well" in capsys.readouterr().err


def test_cli_report_holds_the_run(small_field, tmp_path, capsys):
    """``--report`` writes the field report of the run: every cut and well of the tables, the
    map with the deviated paths, the caution."""
    import re

    man, column, _ = small_field
    out = tmp_path / "run"
    code = screen_main([str(man), "--column", str(column), "--out", str(out), "--workers", "1",
                        "--no-progress", "--no-neighbours", "--report",
                        str(tmp_path / "field.html")])
    assert code == 0 and "report written" in capsys.readouterr().err
    text = (tmp_path / "field.html").read_text(encoding="utf-8")
    cuts = pd.read_csv(out / "cuts.csv")
    assert len(cuts) > 0 and CAUTION in text
    assert "http://" not in text and "https://" not in text            # self-contained
    assert len(re.findall(r"data:image/png;base64,", text)) >= 1      # the map
    for name in pd.read_csv(out / "wells.csv")["well"]:
        assert f">{name}<" in text


def test_manifest_and_argument_errors(tmp_path, small_field):
    man, column, _ = small_field
    with pytest.raises(InputError, match="format"):
        screen_wells(man, column, fmt="xlsx", workers=1, progress=False)
    empty = tmp_path / "m.csv"
    empty.write_text("well,tops\n")
    with pytest.raises(InputError, match="no wells"):
        screen_wells(empty, column, workers=1, progress=False)
    with pytest.raises(InputError):
        screen_wells(man, column, bed_dip="95/010", workers=1, progress=False)


# -- the fast readers agree with the canonical ones ---------------------------------------------
TOPS_FILES = {
    "per_well_m.csv": "surface,md_m\nA,1000.5\nC,1100\nB,1050.25\n",
    "per_well_ft.csv": "Surface , MD_FT\r\nA,3000\r\nB,3100.5\r\n",
    "shared.csv": "well,surface,md_m\nW1,A,1000\nW2,A,990\nW1,B,1040.5\nW2,B,1035\n",
    "spaces.csv": "surface,md_m\nMarrin Shale , 1000\n Rusk Sandstone,1.0e3\n",
    "semicolon.csv": "surface;md_m\nA;1000,5\nB;1040\n",
    "bom.csv": "\ufeffsurface,md_m\nA,1000\nB,1040\n",
    "comment.csv": "# picks\nsurface,md_m\nA,1000\nB,1040\n",
    "dup.csv": "surface,md_m\nA,1000\nA,1000\nB,1040\n",
    "quoted.csv": 'surface,md_m\n"A, upper",1000\nB,1040\n',
    "top_col.csv": "name,top_m\nA,1000\nB,1040\n",
}


@pytest.mark.parametrize("name", sorted(TOPS_FILES))
def test_fast_tops_reader_is_the_canonical_reader(tmp_path, name):
    p = tmp_path / name
    p.write_bytes(TOPS_FILES[name].encode("utf-8"))
    _fastio.clear_cache()
    for well in (["W1", "W2"] if name == "shared.csv" else ["W1"]):
        with warnings.catch_warnings(record=True) as w1:
            warnings.simplefilter("always")
            want = read_tops(p, well=well)
        with warnings.catch_warnings(record=True) as w2:
            warnings.simplefilter("always")
            got = _fastio.load_picks(p, well).frame()
        pd.testing.assert_frame_equal(got, want.reset_index(drop=True))
        assert got.attrs.get("source") == want.attrs.get("source", got.attrs.get("source"))
        assert [str(w.message) for w in w1 if issubclass(w.category, WellfaultWarning)] == \
            [str(w.message) for w in w2 if issubclass(w.category, WellfaultWarning)]
    if name == "per_well_ft.csv":
        got = _fastio.load_picks(p, "W1", "usft").frame()
        pd.testing.assert_frame_equal(got, read_tops(p, well="W1", depth_unit="usft"))


def _outcome(fn):
    try:
        return "ok", fn()
    except InputError as err:
        return type(err).__name__, str(err)


def test_fast_readers_raise_the_canonical_errors(tmp_path):
    p = tmp_path / "t.csv"
    cases = ("surface,md\nA,1000\n", "surface,md_m\n", "surface,md_m\nA,abc\n", "",
             "surface,md_m\nA,1e400\n", "surface,md_m\nA,\n", "surface,md_m\n,1000\n")
    for text in cases:
        p.write_text(text)
        _fastio.clear_cache()
        want = _outcome(lambda: read_tops(p, well="W1"))
        got = _outcome(lambda: _fastio.load_picks(p, "W1").frame())
        assert want[0] == got[0], text
        if want[0] == "ok":
            pd.testing.assert_frame_equal(got[1], want[1])
        else:
            assert want[1] == got[1]
    assert _outcome(lambda: read_tops(tmp_path / "t.csv", well="W1"))[0] != "ok"
    shared = tmp_path / "s.csv"
    shared.write_text("well,surface,md_m\nW1,A,1000\nW2,A,990\n")
    with pytest.raises(InputError) as a:
        read_tops(shared, well="W9")
    with pytest.raises(InputError) as b:
        _fastio.load_picks(shared, "W9")
    assert str(a.value) == str(b.value)


SURVEYS = {
    "plain.csv": "md_m,inc_deg,azi_deg\n0,0,0\n500,10.5,360\n1000,20,45\n",
    "ft.csv": "md_ft,inc,azi\n0,0,0\n1000,5,100\n",
    "extra.csv": "md_m,inc_deg,azi_deg,tvd_m\n0,0,0,0\n500,10,20,498\n",
    "backwards.csv": "md_m,inc_deg,azi_deg\n0,0,0\n500,10,20\n400,10,20\n",
}


@pytest.mark.parametrize("name", sorted(SURVEYS))
def test_fast_survey_reader_is_the_canonical_reader(tmp_path, name):
    p = tmp_path / name
    p.write_text(SURVEYS[name])
    try:
        want = read_survey(p)
    except InputError as err:
        with pytest.raises(type(err), match="backwards"):
            _fastio.load_survey_arrays(p)
        return
    got = _fastio.load_survey_arrays(p)
    for a, c in zip(got, ("md_m", "inc_deg", "azi_deg")):
        np.testing.assert_array_equal(a, want[c].to_numpy())


def test_checkpoint_lines_are_json(small_field, tmp_path):
    man, column, _ = small_field
    screen_wells(man, column, workers=1, progress=False, out_dir=tmp_path, fit=False)
    for line in (tmp_path / ".wells" / "thickness.jsonl").read_text().splitlines():
        rec = json.loads(line)
        assert {"p", "i", "s", "e", "iv"} <= set(rec)


def test_shortcuts_change_nothing(small_field, serial_result, monkeypatch):
    """Wells judged clean from pass 1 (no second reading) or by the worker's pre-test would
    show no cut in find_cuts_from_tops either: switching both off gives the same tables."""
    man, column, _ = small_field
    every = {t: True for t in range(70)}
    monkeypatch.setattr(screen_mod_screen, "_dirty_wells",
                        lambda col, pairs, tn, tc: (set(every), set(pairs[0].tolist())))
    monkeypatch.setattr(screen_mod, "_clean_by_tops", lambda *a, **k: False)
    _same(serial_result, screen_wells(man, column, workers=1, progress=False))
    plain = screen_wells(man, column, workers=1, progress=False, neighbours=False, fit=False)
    monkeypatch.undo()
    _same(plain, screen_wells(man, column, workers=1, progress=False, neighbours=False,
                              fit=False))


def test_resume_refuses_changed_inputs(small_field, tmp_path):
    man, column, _ = small_field
    out = tmp_path / "run"
    screen_wells(man, column, workers=1, progress=False, out_dir=out, fit=False)
    tops = sorted((man.parent / "tops").glob("*.csv"))[0]
    text = tops.read_text()
    tops.write_text(text + "\n")  # same picks, but the file changed since the run
    try:
        with pytest.raises(InputError, match="different run"):
            screen_wells(man, column, workers=1, progress=False, out_dir=out, fit=False,
                         resume=True)
    finally:
        tops.write_text(text)


def test_remeasuring_without_detecting_again_changes_nothing(small_field, serial_result,
                                                             monkeypatch):
    """Pass 3 measures the pass-2 cuts again with the fitted planes (checked against a
    repeat of the pass-2 measurement); detecting again with the planes gives the same."""
    man, column, _ = small_field
    monkeypatch.setattr(screen_mod, "_remeasure", lambda *a, **k: None)
    again = screen_wells(man, column, workers=1, progress=False)
    pd.testing.assert_frame_equal(serial_result.cuts, again.cuts, rtol=1e-9)
    for name in ("errors", "faults", "fault_profiles"):
        pd.testing.assert_frame_equal(getattr(serial_result, name), getattr(again, name),
                                      rtol=1e-9)


def test_screening_with_curves_finds_every_demo_cut_on_the_sample():
    """Curve evidence in screening: the invented field's type well VR-1 as type log; every
    true cut (synthetic_wells/truth_cuts.csv) is found by curves (method curves or both),
    placed within its bracket."""
    from conftest import REPO_ROOT

    field = REPO_ROOT / "synthetic_wells"
    res = screen_wells(field / "manifest.csv", field / "column.csv",
                       type_well=field / "VR_1.las", type_tops=field / "tops.csv",
                       workers=1, progress=False, fit=False)
    assert len(res.errors) == 0
    assert 50.0 <= res.info["max_separation_m"] <= 250.0      # pass 2b ran
    truth = pd.read_csv(field / "truth_cuts.csv")
    cuts = res.cuts
    for tr in truth.itertuples():
        mine = cuts[(cuts.well == tr.well) & cuts.method.isin(["curves", "both"])
                    & (cuts.md_top_m <= tr.md_m) & (tr.md_m <= cuts.md_base_m)]
        assert len(mine) == 1, tr.well
        assert mine.iloc[0].section == tr.section
    # weak curve candidates are counted per well, not lost (detect lists them with reasons)
    withheld = res.wells["candidates_withheld"]
    assert withheld.dtype.kind == "i" and (withheld >= 0).all() and withheld.sum() >= 1


def test_field_separation_narrows_the_prior_and_picks_the_wells_to_read_again():
    """Pass 2b: the field's plausible separation is 1.5 x the 90th percentile of its confident
    cuts' |Δs| (within the column's default), and only wells with a curve cut beyond it are
    read again."""
    from wellfault.synth.columns import synthetic_column
    from wellfault.field.screen import _field_separation

    col = synthetic_column(24, seed=5, curves=("GR",))     # a type log of ~1000 m: 250 m
    cut = {"method": "tops", "confidence": 0.9, "delta_s_m": 20.0}
    out = {i: {"c": [dict(cut, delta_s_m=10.0 + i)]} for i in range(10)}
    out[10] = {"c": [{"method": "curves", "confidence": 0.3, "delta_s_m": -600.0}]}
    out[11] = {"c": [{"method": "both", "confidence": 0.8, "delta_s_m": 15.0}]}
    d, again = _field_separation(col, out)
    seps = [10.0 + i for i in range(10)] + [15.0]
    assert d == pytest.approx(max(50.0, 1.5 * np.quantile(seps, 0.9)))
    assert again == [10]
    few = {i: out[i] for i in (0, 1, 10)}                   # too few confident cuts: default
    assert _field_separation(col, few) == (pytest.approx(250.0), [])
