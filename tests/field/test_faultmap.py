"""Cuts assembled into faults: robust plane fits, uncertainty, unconformities, a whole field."""

from __future__ import annotations

import collections
import math

import numpy as np
import pandas as pd
import pytest

from wellfault.geo.column import ReferenceColumn
from wellfault.field.faultmap import FaultFitOptions, fit_faults, plane_attitude
from wellfault.synth.fieldsim import field_tops, plan_wells, write_field
from wellfault.synth.structure import Beds, PlanarFault
from wellfault.synth.columns import synthetic_column
from wellfault.geo.geometry import fault_normal_up
from wellfault.field.screen import screen_wells


def _angle_diff(a, b):
    return (a - b + 180.0) % 360.0 - 180.0


def test_plane_attitude_follows_the_design_convention():
    # upward normal m = (sin θ sin β, sin θ cos β, −cos θ)  (DESIGN.md §2)
    for dip, azi in ((60.0, 90.0), (35.0, 200.0), (80.0, 355.0), (10.0, 0.0)):
        m = fault_normal_up(dip, azi)
        got = plane_attitude(m)
        assert got[0] == pytest.approx(dip)
        assert _angle_diff(got[1], azi) == pytest.approx(0.0, abs=1e-9)
        got = plane_attitude(-np.asarray(m))  # either sign of the normal
        assert got[0] == pytest.approx(dip)


def _cuts_on_plane(rng, dip, azi, point, n, *, well0=0, half_bracket=20.0, sense="normal"):
    """Vertical wells crossing a plane: cut at the crossing, bracket ±half_bracket in TVD,
    the reported point somewhere inside the bracket (as tops place it)."""
    m = fault_normal_up(dip, azi)
    rows = []
    for k in range(n):
        x = point[0] + rng.uniform(-1500, 1500)
        y = point[1] + rng.uniform(-1500, 1500)
        # plane: m·(P − point) = 0 → z
        z = point[2] + (m[0] * (x - point[0]) + m[1] * (y - point[1])) / -m[2]
        off = rng.uniform(-0.8, 0.8) * half_bracket
        top, base = z - half_bracket + off, z + half_bracket + off
        rows.append({"well": f"W{well0 + k:04d}", "x_m": x, "y_m": y,
                     "tvdss_m": 0.5 * (top + base), "x_top_m": x, "y_top_m": y,
                     "tvdss_top_m": top, "x_base_m": x, "y_base_m": y, "tvdss_base_m": base,
                     "section": "missing", "fault_type": sense, "vertical_separation_m": 30.0,
                     "throw_m": 30.0, "delta_s_m": 30.0, "surface_above": "S2",
                     "surface_below": "S4", "bed_dip_deg": 5.0, "bed_dip_azimuth_deg": 70.0})
    return rows


def test_two_planes_and_scattered_cuts():
    rng = np.random.default_rng(3)
    rows = _cuts_on_plane(rng, 60, 90, (0, 0, 2000), 14)
    rows += _cuts_on_plane(rng, 40, 200, (6000, 0, 2000), 10, well0=100, sense="reverse")
    for k in range(5):  # lone cuts far apart: no plane holds them
        x, y = rng.uniform(-20000, 20000, 2)
        rows.append({**rows[0], "well": f"L{k}", "x_m": x, "y_m": y, "x_top_m": x,
                     "y_top_m": y, "x_base_m": x, "y_base_m": y,
                     "tvdss_m": 2000 + rng.uniform(-300, 300)})
        rows[-1]["tvdss_top_m"] = rows[-1]["tvdss_m"] - 20
        rows[-1]["tvdss_base_m"] = rows[-1]["tvdss_m"] + 20
    cuts = pd.DataFrame(rows)
    fmap = fit_faults(cuts, options=FaultFitOptions(seed=1))
    faults, profiles = fmap.tables(cuts)
    assert list(faults["kind"]) == ["fault", "fault"]
    by_size = faults.sort_values("n_cuts", ascending=False).reset_index(drop=True)
    assert list(by_size["n_cuts"]) == [14, 10]
    assert by_size.loc[0, "dip_deg"] == pytest.approx(60, abs=3)
    assert _angle_diff(by_size.loc[0, "dip_azimuth_deg"], 90) == pytest.approx(0, abs=3)
    assert by_size.loc[0, "strike_deg"] == pytest.approx(0, abs=3)
    assert by_size.loc[1, "dip_deg"] == pytest.approx(40, abs=3)
    assert _angle_diff(by_size.loc[1, "dip_azimuth_deg"], 200) == pytest.approx(0, abs=3)
    assert by_size.loc[1, "sense"] == "reverse"
    assert (faults["dip_sd_deg"] > 0).all() and (faults["dip_sd_deg"] < 3).all()
    assert (faults["azimuth_sd_deg"] < 5).all()
    assert list(fmap.fit[-5:]) == ["no fault"] * 5 and list(fmap.fault_id[-5:]) == [""] * 5
    assert len(profiles) == 24 and set(profiles["fault_id"]) == set(faults["fault_id"])
    assert profiles.groupby("fault_id")["along_strike_m"].apply(
        lambda s: s.is_monotonic_increasing).all()
    # seeded: the same input gives the same faults
    again = fit_faults(cuts, options=FaultFitOptions(seed=1)).tables(cuts)[0]
    pd.testing.assert_frame_equal(faults, again)


def test_no_fault_from_a_handful_of_cuts():
    rng = np.random.default_rng(5)
    cuts = pd.DataFrame(_cuts_on_plane(rng, 60, 90, (0, 0, 2000), 3))
    fmap = fit_faults(cuts)
    assert fmap.faults == [] and set(fmap.fit) == {"no fault"}


def test_missing_section_at_one_level_is_a_possible_unconformity():
    col = ReferenceColumn.from_table(pd.DataFrame({
        "surface": [f"S{i}" for i in range(8)], "thickness_m": [40.0] * 8}))
    rng = np.random.default_rng(2)
    n = 12
    x, y = rng.uniform(0, 4000, n), rng.uniform(0, 4000, n)
    bed = np.array([-math.sin(math.radians(5)) * math.sin(math.radians(70)),
                    -math.sin(math.radians(5)) * math.cos(math.radians(70)),
                    math.cos(math.radians(5))])
    # the eroded level S5 lies at s = 200 m: n·P = const on it
    z = (1700.0 - bed[0] * x - bed[1] * y) / bed[2]
    rows = [{"well": f"U{k}", "x_m": x[k], "y_m": y[k], "tvdss_m": z[k], "x_top_m": x[k],
             "y_top_m": y[k], "tvdss_top_m": z[k] - 15, "x_base_m": x[k], "y_base_m": y[k],
             "tvdss_base_m": z[k] + 15, "section": "missing", "fault_type": "normal",
             "vertical_separation_m": 25.0, "throw_m": np.nan, "delta_s_m": 25.0,
             "surface_above": "S4", "surface_below": "S6", "bed_dip_deg": 5.0,
             "bed_dip_azimuth_deg": 70.0} for k in range(n)]
    rows += _cuts_on_plane(rng, 60, 90, (2000, 2000, 1800), 8, well0=50)
    cuts = pd.DataFrame(rows)
    fmap = fit_faults(cuts, column=col, crossing_counts={j: 16 for j in range(8)})
    faults, _ = fmap.tables(cuts)
    unc = faults[faults["kind"] == "possible unconformity"]
    assert len(unc) == 1 and unc.iloc[0]["level"] == "S4 to S5"
    assert unc.iloc[0]["dip_deg"] == pytest.approx(5.0, abs=1.0)
    assert list(fmap.fit[:n]) == ["possible unconformity"] * n
    assert (faults["kind"] == "fault").sum() == 1
    assert list(fmap.fit[n:]) == ["fault"] * 8
    # too few of the wells that crossed the level: not an unconformity
    fmap2 = fit_faults(cuts, column=col, crossing_counts={j: 100 for j in range(8)})
    assert "possible unconformity" not in set(fmap2.fit)


# -- a forward-modelled field with three faults of known attitude --------------------------------
TRUE_FAULTS = {"A": (60.0, 85.0, "normal", 45.0), "B": (50.0, 75.0, "normal", 35.0),
               "C": (35.0, 95.0, "reverse", 40.0)}


@pytest.fixture(scope="module")
def three_fault_field(tmp_path_factory):
    col = synthetic_column(15, seed=3, curves=(), thickness_range_m=(20.0, 50.0))
    beds = Beds.through(5.0, 70.0, (0.0, 0.0, 1500.0), 0.0)
    faults = [PlanarFault.dip_slip(60, 85, (1000, 2500, 1800), 45, name="A"),
              PlanarFault.dip_slip(50, 75, (4300, 2500, 1800), 35, name="B"),
              PlanarFault.dip_slip(35, 95, (2400, 2500, 1800), 40, kind="reverse", name="C")]
    plan = plan_wells(250, seed=3, target_tvdss_m=2400.0)

    def trend(x, y):
        return (0.9 + 0.2 * x / 5000.0)[:, None] * np.ones(len(col))

    tops, truth = field_tops(plan, col, beds, faults, pick_noise_m=0.3, seed=13,
                             thickness_factors=trend)
    folder = tmp_path_factory.mktemp("three")
    man = write_field(folder, plan, tops, col, dip="5/070")
    result = screen_wells(man, folder / "column.csv", workers=1, progress=False)
    return result, truth


def test_three_faults_recovered_with_their_attitude(three_fault_field):
    result, truth = three_fault_field
    faults = result.faults[result.faults["kind"] == "fault"]
    cuts = result.cuts
    matched = {}
    for f in faults.itertuples():
        names = []
        for c in cuts[cuts["fault_id"] == f.fault_id].itertuples():
            t = truth[(truth["well"] == c.well) & (truth["md_m"] >= c.md_top_m)
                      & (truth["md_m"] <= c.md_base_m)]
            names += list(t["fault_name"])
        # every cut of a fitted fault is a true cut of that one fault: nothing spurious
        assert len(names) == f.n_cuts and len(set(names)) == 1, (f.fault_id, names)
        matched[names[0]] = f
    assert sorted(matched) == ["A", "B", "C"]  # each fault found once, no other fault
    for name, f in matched.items():
        dip, azi, sense, throw = TRUE_FAULTS[name]
        assert f.n_cuts >= 6
        assert f.dip_deg == pytest.approx(dip, abs=5.0), name
        assert _angle_diff(f.strike_deg, azi - 90.0) == pytest.approx(0.0, abs=5.0), name
        assert f.sense == sense
        assert f.throw_mean_m == pytest.approx(throw, rel=0.15), name  # re-measured, fitted
        assert f.dip_sd_deg < 3.0 and f.azimuth_sd_deg < 3.0
    # re-measured with the fitted planes: crossing known, attitude from the fault model
    on = cuts[cuts["fault_fit"] == "fault"]
    assert on["fault_dip_source"].str.startswith("fault model F").all()
    assert (on["fault_name"] == on["fault_id"]).all()
    assert not on["crossing"].str.startswith("assumed").any()
    assert collections.Counter(result.fault_profiles["fault_id"]) == \
        dict(zip(faults["fault_id"], faults["n_cuts"]))


def test_unfaulted_wells_make_no_cut(three_fault_field):
    result, truth = three_fault_field
    faulted = set(truth["well"])
    assert set(result.cuts["well"]) <= faulted
    assert len(result.errors) == 0


def test_eroded_unit_is_flagged_end_to_end(tmp_path):
    """A unit thinned to 35 % over the western two thirds of a field (eroded): against the
    column every western well misses section at that level; it is a possible unconformity,
    and the one real fault is still fitted."""
    col = synthetic_column(12, seed=4, curves=(), thickness_range_m=(30.0, 50.0))
    beds = Beds.through(3.0, 70.0, (0.0, 0.0, 1500.0), 0.0)
    fault = PlanarFault.dip_slip(60, 85, (1200, 1500, 1800), 40, name="A")

    def eroded(x, y):
        f = np.ones((len(x), len(col)))
        f[x < 2200, 6] = 0.35
        return f

    plan = plan_wells(120, seed=3, target_tvdss_m=2300.0, extent_m=(0, 3000, 0, 3000),
                      deviated_fraction=0.2)
    tops, _ = field_tops(plan, col, beds, [fault], pick_noise_m=0.3, seed=5,
                         thickness_factors=eroded)
    man = write_field(tmp_path, plan, tops, col, dip="3/070")
    r = screen_wells(man, tmp_path / "column.csv", workers=1, progress=False,
                     neighbours=False)
    unc = r.faults[r.faults["kind"] == "possible unconformity"]
    assert len(unc) == 1
    assert unc.iloc[0]["level"] == f"{col.names[6]} to {col.names[7]}"
    assert unc.iloc[0]["n_wells"] >= 50
    flagged = r.cuts[r.cuts["fault_fit"] == "possible unconformity"]
    assert (flagged["section"] == "missing").all()
    # the eroded unit lies inside every flagged bracket
    index = {n: i for i, n in enumerate(col.names)}
    above = flagged["surface_above"].map(index)
    below = flagged["surface_below"].map(index)
    assert ((above <= 6) & (below >= 7)).all()
    assert (above == 6).mean() > 0.9
    faults = r.faults[r.faults["kind"] == "fault"]
    assert len(faults) == 1 and faults.iloc[0]["dip_deg"] == pytest.approx(60, abs=5)
