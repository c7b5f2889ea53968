"""The invented demo field: reproducible from its seed, geologically sensible, readable back."""

from __future__ import annotations

import json
import math
import warnings

import numpy as np
import pandas as pd
import pytest
from conftest import REPO_ROOT

from wellfault.geo.column import ReferenceColumn
from wellfault.errors import InputError
from wellfault.synth.fieldgen import (
    DEFAULT_SEED, WELL_PLANS, describe_field, field_model, make_demo_field, plan_trajectory,
)
from wellfault.synth.forward import simulate_well
from wellfault.io import read_column_table, read_las, read_manifest, read_survey, read_tops
from wellfault.geo.trajectory import Trajectory

COMMITTED = REPO_ROOT / "synthetic_wells"


@pytest.fixture(scope="module")
def field(tmp_path_factory):
    folder = tmp_path_factory.mktemp("field")
    written = make_demo_field(folder, seed=DEFAULT_SEED)
    return folder, written


@pytest.fixture(scope="module")
def meta(field):
    return json.loads((field[0] / "field.json").read_text())


@pytest.fixture(scope="module")
def truth(field):
    return pd.read_csv(field[0] / "truth_cuts.csv")


def test_regenerating_reproduces_the_committed_files_byte_for_byte(field):
    folder, written = field
    committed = sorted(p.name for p in COMMITTED.iterdir()
                       if p.is_file() and p.name != "make_field.py")
    assert committed == sorted(written)
    for name in committed:
        assert (folder / name).read_bytes() == (COMMITTED / name).read_bytes(), name


def test_files_are_small(field):
    folder, written = field
    sizes = {n: p.stat().st_size for n, p in written.items()}
    assert max(sizes.values()) < 2_000_000
    assert sum(sizes.values()) < 5_000_000


def test_field_has_the_required_kinds_of_wells(meta, truth):
    wells = meta["wells"]
    assert 10 <= len(wells) <= 16
    max_inc = {w["name"]: w["max_inclination_deg"] for w in wells}
    assert sum(v == 0 for v in max_inc.values()) >= 3  # vertical
    assert sum(0 < v < 60 for v in max_inc.values()) >= 3  # deviated
    assert sum(v >= 70 for v in max_inc.values()) >= 1  # high-angle
    assert {w["depth_unit"] for w in wells} == {"ft", "m"}
    unfaulted = set(max_inc) - set(truth["well"])
    assert len(unfaulted) >= 1 and meta["type_well"] in unfaulted


def test_cuts_of_both_kinds_on_normal_and_reverse_faults(meta, truth):
    faults = {f["name"]: f for f in meta["faults"]}
    assert len(faults) >= 3
    assert {f["kind"] for f in faults.values()} == {"normal", "reverse"}
    assert set(truth["section"]) == {"missing", "repeated"}
    assert set(truth["fault_type"]) == {"normal", "reverse"}
    assert set(truth["fault_name"]) == set(faults)  # every fault is crossed somewhere
    # a normal fault crossed by a high-angle well from footwall to hanging wall: REPEATED
    # (reference/methods.md 3.4 truth table)
    max_inc = {w["name"]: w["max_inclination_deg"] for w in meta["wells"]}
    fw_hw = truth[(truth["crossing"] == -1) & (truth["fault_type"] == "normal")]
    assert (fw_hw["section"] == "repeated").all()
    assert any(max_inc[w] >= 70 for w in fw_hw["well"])
    # and a reverse fault crossed footwall -> hanging wall: MISSING
    rev = truth[(truth["crossing"] == -1) & (truth["fault_type"] == "reverse")]
    assert len(rev) >= 1 and (rev["section"] == "missing").all()


def test_section_follows_the_sign_rule(truth):
    # DESIGN.md section 2: missing when sign(delta_s) = sign(r), repeated otherwise
    same = np.sign(truth["delta_s_m"]) == np.sign(truth["r"])
    assert (truth.loc[same, "section"] == "missing").all()
    assert (truth.loc[~same, "section"] == "repeated").all()


def test_geometry_is_geologically_sensible(meta, field):
    bed = meta["bed_dip"]
    assert 5 <= bed["dip_deg"] <= 12
    for f in meta["faults"]:
        assert 15 <= f["throw_m"] <= 120
        if f["kind"] == "normal":
            assert 55 <= f["dip_deg"] <= 65
        else:
            assert 25 <= f["dip_deg"] <= 35
    col = read_column_table(field[0] / "column.csv")
    assert 10 <= len(col) <= 16
    assert col["thickness_m"].between(10, 80).all()
    assert col["unconformity"].sum() == 1
    tops = read_tops(field[0] / "tops.csv")
    elev = {w["name"]: w["kb_elevation_m"] for w in meta["wells"]}
    for well, picks in tops.groupby("well"):
        plan = next(p for p in WELL_PLANS if p.name == well)
        tvdss = plan_trajectory(plan).tvd(picks["md_m"].to_numpy()) - elev[well]
        assert np.all((tvdss > 1000) & (tvdss < 3000)), well


def test_every_file_reads_back_with_the_readers(field, meta):
    folder = field[0]
    with warnings.catch_warnings():
        warnings.simplefilter("error")
        manifest = read_manifest(folder / "manifest.csv")
        tops = read_tops(folder / "tops.csv")
        column = ReferenceColumn.from_table(read_column_table(folder / "column.csv"))
        wells_meta = {w["name"]: w for w in meta["wells"]}
        assert list(manifest["well"]) == list(wells_meta)
        for row in manifest.itertuples():
            w = read_las(row.las)
            m = wells_meta[row.well]
            assert w.name == row.well
            assert w.depth_unit.value == m["depth_unit"]
            assert w.ref_elevation_m == pytest.approx(m["kb_elevation_m"], abs=1e-5)
            assert (w.x_m, w.y_m) == pytest.approx((m["x_m"], m["y_m"]), abs=1e-3)
            assert (row.x_m, row.y_m, row.elevation_m) == pytest.approx(
                (m["x_m"], m["y_m"], m["kb_elevation_m"]))
            assert list(w.curves.columns) == ["GR", "RHOB"]
            assert w.md_range_m == pytest.approx(tuple(m["logged_md_m"]), abs=1e-3)
            assert (row.survey is None) == (m["max_inclination_deg"] == 0)
            if row.survey is not None:
                read_survey(row.survey)
            assert set(tops.loc[tops["well"] == row.well, "surface"]) <= set(column.names)


def test_truth_positions_agree_with_the_written_survey_and_las(field, truth, meta):
    # the files alone reproduce the truth's positions (minimum curvature of the written
    # survey) and its reporting convention (first LAS sample below the cut)
    folder = field[0]
    wells = {w["name"]: w for w in meta["wells"]}
    for cut in truth.itertuples():
        m = wells[cut.well]
        if m["survey"]:
            traj = Trajectory.from_survey(read_survey(folder / m["survey"]), x0_m=m["x_m"],
                                          y0_m=m["y_m"], ref_elevation_m=m["kb_elevation_m"])
        else:
            traj = Trajectory.vertical(x0_m=m["x_m"], y0_m=m["y_m"])
        p = traj.position([cut.md_m])[0]
        np.testing.assert_allclose(p, [cut.x_m, cut.y_m, cut.tvd_m], atol=2e-3)
        md = read_las(folder / m["las"]).md_m
        first_below = md[np.searchsorted(md, cut.md_m)]
        assert first_below == pytest.approx(cut.md_first_below_m, abs=1e-3)


def test_tops_show_the_truth(field, truth):
    column = ReferenceColumn.from_table(read_column_table(field[0] / "column.csv"))
    tops = read_tops(field[0] / "tops.csv")
    for cut in truth.itertuples():
        counts = tops.loc[tops["well"] == cut.well, "surface"].value_counts()
        between = column.surfaces_between(cut.s_above_m, cut.s_below_m)
        want = 0 if cut.section == "missing" else 2
        assert all(counts.get(s, 0) == want for s in between), (cut.well, between)
    repeated_wells = set(truth.loc[truth["section"] == "repeated", "well"])
    dup_wells = {w for w, g in tops.groupby("well") if g["surface"].duplicated().any()}
    assert dup_wells <= repeated_wells and len(dup_wells) >= 3


def test_each_truth_cut_is_its_fault_alone(truth):
    # every cut is a clean crossing of one fault: the same MD with that fault alone
    column, beds, faults = field_model(DEFAULT_SEED)
    by_name = {f.name: f for f in faults}
    plans = {p.name: p for p in WELL_PLANS}
    for cut in truth.itertuples():
        traj = plan_trajectory(plans[cut.well])
        syn = simulate_well(column, beds, [by_name[cut.fault_name]], traj,
                            md_top_m=cut.md_m - 5.0, md_base_m=cut.md_m + 5.0, curves=(),
                            datum="sea level")
        assert len(syn.cuts) == 1
        assert syn.cuts.iloc[0].md_m == pytest.approx(cut.md_m, abs=1e-3)
        assert syn.cuts.iloc[0].crossing == cut.crossing


def test_type_well_gives_the_column_table(field, meta):
    folder = field[0]
    table = ReferenceColumn.from_table(read_column_table(folder / "column.csv"))
    tops = read_tops(folder / "tops.csv")
    tw = meta["type_well"]
    well = read_las(folder / next(w["las"] for w in meta["wells"] if w["name"] == tw))
    bed = meta["bed_dip"]
    got = ReferenceColumn.from_type_well(well, tops, None, (bed["dip_deg"],
                                                           bed["dip_azimuth_deg"]))
    assert got.names == table.names
    np.testing.assert_allclose(got.s_m, table.s_m, atol=0.02)  # picks and table to 0.01 m
    assert got.type_log is not None and got.type_log.index[0] < 0 < got.type_log.index[-1]


def test_describe_field_lists_every_well_and_its_faults(field, meta, truth):
    text = describe_field(field[0])
    for w in meta["wells"]:
        assert w["name"] in text
    assert "F1 (repeated)" in text and "F3 (missing)" in text
    assert "Velmora Ridge" in text


def test_describe_field_needs_a_field_folder(tmp_path):
    with pytest.raises(InputError, match="make_demo_field"):
        describe_field(tmp_path)


def test_another_seed_gives_another_field(tmp_path):
    make_demo_field(tmp_path, seed=DEFAULT_SEED + 1)
    a = (tmp_path / "VR_1.las").read_bytes()
    b = (COMMITTED / "VR_1.las").read_bytes()
    assert a != b
    assert not math.isnan(pd.read_csv(tmp_path / "truth_cuts.csv")["md_m"].iloc[0])
