"""The vectorised field tops generator agrees with the one-well forward model."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from wellfault.synth.fieldsim import (
    field_tops, plan_wells, survey_stations, well_positions, write_field,
)
from wellfault.synth.structure import Beds, PlanarFault
from wellfault.synth.forward import simulate_well
from wellfault.synth.columns import synthetic_column
from wellfault.io import read_manifest, read_survey, read_tops
from wellfault.geo.trajectory import Trajectory


@pytest.fixture(scope="module")
def model():
    col = synthetic_column(12, seed=3, curves=(), thickness_range_m=(20.0, 50.0))
    beds = Beds.through(6.0, 70.0, (0.0, 0.0, 1500.0), 0.0)
    faults = [PlanarFault.dip_slip(60, 90, (1200, 1500, 1800), 40, name="A"),
              PlanarFault.dip_slip(35, 0, (1500, 2200, 1800), 30, kind="reverse", name="B")]
    return col, beds, faults


def _trajectory(row):
    st = survey_stations(row)
    if st is None:
        return Trajectory.vertical(x0_m=row["x_m"], y0_m=row["y_m"],
                                   ref_elevation_m=row["elevation_m"])
    return Trajectory(st["md_m"], st["inc_deg"], st["azi_deg"], x0_m=row["x_m"],
                      y0_m=row["y_m"], ref_elevation_m=row["elevation_m"])


def test_closed_form_paths_are_the_minimum_curvature_paths():
    plan = plan_wells(40, seed=4, deviated_fraction=0.6, extent_m=(0, 3000, 0, 3000))
    md = np.linspace(0.0, plan["td_m"].min(), 400)
    pos = well_positions(plan, np.broadcast_to(md, (len(plan), md.size)))
    for k, row in plan.iterrows():
        ref = _trajectory(row).position(md)
        ref[:, :2] += 0.0
        np.testing.assert_allclose(pos[k], ref, atol=1e-6)


def test_tops_and_cuts_match_simulate_well(model):
    col, beds, faults = model
    plan = plan_wells(120, seed=1, target_tvdss_m=2300, extent_m=(0, 3000, 0, 3000),
                      deviated_fraction=0.4)

    def trend(x, y):
        return (0.85 + 0.3 * x / 3000.0)[:, None] * np.ones(len(col))

    tops, cuts, factors = field_tops(plan, col, beds, faults, thickness_factors=trend,
                                     return_factors=True)
    assert factors.shape == (len(plan), len(col))
    assert factors.min() < 0.9 and factors.max() > 1.1
    checked = with_cuts = 0
    for k in range(0, len(plan), 5):
        row = plan.iloc[k]
        syn = simulate_well(col, beds, faults, _trajectory(row), md_top_m=0.0,
                            md_base_m=float(row["td_m"]), md_step_m=0.5, curves=(),
                            thickness_factors=factors[k], name=row["well"], datum="sea level")
        mine = tops[tops["well"] == row["well"]]
        assert list(mine["surface"]) == list(syn.tops["surface"])
        np.testing.assert_allclose(mine["md_m"], syn.tops["md_m"], atol=1e-3)
        c = cuts[cuts["well"] == row["well"]]
        assert len(c) == len(syn.cuts)
        if len(c):
            with_cuts += 1
            np.testing.assert_allclose(c["md_m"], syn.cuts["md_m"], atol=5e-3)
            np.testing.assert_allclose(c["delta_s_m"], syn.cuts["delta_s_m"], atol=1e-3)
            assert list(c["fault_name"]) == list(syn.cuts["fault_name"])
        checked += 1
    assert checked >= 20 and with_cuts >= 3


def test_written_field_reads_back(model, tmp_path):
    col, beds, faults = model
    plan = plan_wells(12, seed=2, target_tvdss_m=2300, extent_m=(0, 2000, 0, 2000),
                      deviated_fraction=0.5)
    tops, _ = field_tops(plan, col, beds, faults, pick_noise_m=0.3, seed=5)
    man = read_manifest(write_field(tmp_path, plan, tops, col, dip="6/070"))
    assert list(man["well"]) == list(plan["well"])
    assert man["dip"].iloc[0] == "6/070"
    for row in man.itertuples():
        got = read_tops(row.tops, well=row.well)
        want = tops[tops["well"] == row.well]
        np.testing.assert_array_equal(got["md_m"].to_numpy(), want["md_m"].to_numpy())
        if row.survey:
            sv = read_survey(row.survey)
            assert sv["md_m"].iloc[-1] == pytest.approx(plan.set_index("well").loc[row.well,
                                                                                  "td_m"])
    assert pd.read_csv(tmp_path / "column.csv")["surface"].tolist() == list(col.names)
