"""Neighbour-aware thickness: robust, leave-one-out, spatial; and what it finds in a field."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from wellfault.geo.column import ReferenceColumn
from wellfault.synth.fieldsim import field_tops, plan_wells, write_field
from wellfault.synth.structure import Beds, PlanarFault
from wellfault.synth.columns import synthetic_column
from wellfault.field.neighbours import NeighbourThickness, thickness_samples, weighted_median_rows
from wellfault.field.screen import screen_wells


def _column(n=4, t=50.0):
    return ReferenceColumn.from_table(pd.DataFrame({
        "surface": [f"S{i}" for i in range(n)], "thickness_m": [t] * n}))


def test_weighted_median_rows():
    v = np.array([[1.0, 2.0, 10.0], [5.0, np.nan, 1.0], [np.nan, np.nan, np.nan]])
    w = np.array([[1.0, 1.0, 1.0], [1.0, 9.0, 3.0], [1.0, 1.0, 1.0]])
    out = weighted_median_rows(v, w)
    assert out[0] == 2.0
    assert out[1] == 1.0  # weight 3 of 4 on the value 1 (the NaN's weight is ignored)
    assert np.isnan(out[2])
    # a heavy weight wins
    assert weighted_median_rows(np.array([[1.0, 2.0, 3.0]]), np.array([[1.0, 1.0, 5.0]]))[0] \
        == 3.0


def test_samples_keep_adjacent_unfaulted_intervals_either_way_up():
    # well 0 down-section S0->S1->S2; well 1 up-section S2->S1 (drilled negative);
    # well 2 skips S1 (not adjacent) and well 3 crosses a repeat S2->S1 drilling down
    s = thickness_samples(well=[0, 0, 1, 2, 3], idx_above=[0, 1, 2, 0, 2],
                          idx_below=[1, 2, 1, 2, 1], drilled_m=[48.0, 51.0, -49.0, 90.0, 20.0],
                          x_m=[0, 0, 100, 200, 300], y_m=[0, 0, 0, 0, 0])
    got = {(int(r.well), int(r.unit)): r.thickness_m for r in s.itertuples()}
    assert got == {(0, 0): 48.0, (0, 1): 51.0, (1, 1): 49.0}


def test_prediction_follows_a_trend_and_leaves_the_well_out():
    rng = np.random.default_rng(0)
    n = 200
    x, y = rng.uniform(0, 5000, n), rng.uniform(0, 5000, n)
    h = 40.0 + 0.004 * x + 0.002 * y  # 40 -> 70 m across the field
    samples = pd.DataFrame({"well": np.arange(n), "unit": 0, "thickness_m": h, "x_m": x,
                            "y_m": y})
    model = NeighbourThickness(_column(), samples, k=6)
    pred = model.predict(np.zeros(n, int), x, y, np.arange(n))
    np.testing.assert_allclose(pred, h, atol=0.05)  # a plane is predicted exactly, edges too
    # leaving the well out matters when the well is odd: make well 7 thick and predict it
    h2 = h.copy()
    h2[7] += 12.0
    model2 = NeighbourThickness(_column(), samples.assign(thickness_m=h2), k=6)
    assert model2.predict([0], [x[7]], [y[7]], [7])[0] == pytest.approx(h[7], abs=0.1)
    assert bool(model2.samples.loc[7, "outlier"])
    assert int(model2.samples["outlier"].sum()) == 1


def test_a_faulted_neighbour_does_not_move_the_prediction():
    # a ring of six wells around a target; one neighbour lost 15 m to a fault
    ang = np.radians(np.arange(6) * 60.0)
    x, y = 300 * np.cos(ang), 300 * np.sin(ang)
    h = np.full(6, 50.0) + np.array([0.2, -0.3, 0.1, 0.0, -0.1, 0.3])
    h[2] -= 15.0
    samples = pd.DataFrame({"well": np.arange(6), "unit": 0, "thickness_m": h, "x_m": x,
                            "y_m": y})
    model = NeighbourThickness(_column(), samples, k=6, trend=False)
    assert model.predict([0], [0.0], [0.0], [99])[0] == pytest.approx(50.0, abs=0.35)


def test_expected_interval_sums_units_with_the_column_sign():
    n = 30
    rng = np.random.default_rng(1)
    x, y = rng.uniform(0, 2000, n), rng.uniform(0, 2000, n)
    rows = []
    for u, t in enumerate((30.0, 40.0, 50.0)):
        rows.append(pd.DataFrame({"well": np.arange(n), "unit": u, "thickness_m": t,
                                  "x_m": x, "y_m": y}))
    model = NeighbourThickness(_column(), pd.concat(rows, ignore_index=True))
    e = model.expected_intervals([99, 99, 99, 99], [0, 2, 1, 3], [2, 0, 1, 0],
                                 [1000] * 4, [1000] * 4)
    np.testing.assert_allclose(e, [70.0, -70.0, 0.0, -120.0])
    assert np.isnan(model.expected_intervals([99], [3], [4], [0], [0])[0])  # no samples


def test_too_few_neighbours_give_no_prediction():
    samples = pd.DataFrame({"well": [0, 1], "unit": 0, "thickness_m": [50.0, 51.0],
                            "x_m": [0.0, 100.0], "y_m": [0.0, 0.0]})
    model = NeighbourThickness(_column(), samples, k=6, min_neighbours=3)
    assert np.isnan(model.predict([0], [50.0], [0.0], [5])[0])


# -- the point of it: a partial missing section the column tolerance hides ---------------------
@pytest.fixture(scope="module")
def trend_field(tmp_path_factory):
    """Units 40-60 m thick in the column, 0.8x in the west to 1.25x in the east; one normal
    fault of 10 m throw in the east. Vertical wells, picks with 0.3 m noise."""
    col = synthetic_column(14, seed=5, curves=(), thickness_range_m=(40.0, 60.0))
    beds = Beds.through(3.0, 120.0, (0.0, 0.0, 1500.0), 0.0)
    fault = PlanarFault.dip_slip(60.0, 90.0, (4000.0, 2500.0, 1900.0), 10.0, name="small")
    plan = plan_wells(260, seed=0, target_tvdss_m=2500.0, deviated_fraction=0.0)

    def trend(x, y):
        return (0.8 + 0.45 * x / 5000.0)[:, None] * np.ones(len(col))

    tops, truth = field_tops(plan, col, beds, [fault], pick_noise_m=0.3, seed=10,
                             thickness_factors=trend)
    folder = tmp_path_factory.mktemp("trend")
    man = write_field(folder, plan, tops, col, dip="3/120")
    first = tops.groupby("well")["md_m"].min()
    last = tops.groupby("well")["md_m"].max()
    inside = truth[(truth["md_m"] > truth["well"].map(first))
                   & (truth["md_m"] < truth["well"].map(last))]
    return man, folder / "column.csv", inside


def _hits(cuts, truth):
    found = 0
    for t in truth.itertuples():
        c = cuts[(cuts["well"] == t.well) & (cuts["md_top_m"] <= t.md_m)
                 & (cuts["md_base_m"] >= t.md_m)]
        found += int(len(c) > 0)
    return found


def _false(cuts, truth):
    bad = 0
    for c in cuts.itertuples():
        t = truth[(truth["well"] == c.well) & (truth["md_m"] >= c.md_top_m)
                  & (truth["md_m"] <= c.md_base_m)]
        bad += int(len(t) == 0)
    return bad


def test_neighbour_thickness_catches_what_the_column_tolerance_hides(trend_field):
    man, column, truth = trend_field
    assert len(truth) >= 15
    by_column = screen_wells(man, column, neighbours=False, fit=False, workers=1,
                             progress=False)
    by_neighbours = screen_wells(man, column, fit=False, workers=1, progress=False)
    assert by_neighbours.info["neighbour_tolerance"]["relative"] == pytest.approx(0.06)
    # against the column (15 % + 2 m) the 10 m gaps vanish in the thick east ...
    assert _hits(by_column.cuts, truth) <= 0.2 * len(truth)
    # ... the local thickness from neighbours (6 % + 2 m) finds them, and nothing else
    assert _hits(by_neighbours.cuts, truth) >= 0.85 * len(truth)
    assert _false(by_neighbours.cuts, truth) == 0
    c = by_neighbours.cuts
    assert (c["section"] == "missing").all()
    np.testing.assert_allclose(c["tst_m"], 10.0 * np.cos(np.radians(3.0)), atol=1.5)
    # the cut rows carry the local expected and the observed interval
    np.testing.assert_allclose(c["expected_thickness_m"] - c["observed_thickness_m"],
                               c["tst_m"], atol=1e-9)
    assert (by_neighbours.wells["thickness_source"] == "neighbours").all()
    # the column run shows why: the trend alone makes 'cuts' where there is no fault
    assert _false(by_column.cuts, truth) > 50


def test_a_well_without_location_has_no_neighbours():
    samples = pd.DataFrame({"well": np.arange(10), "unit": 0, "thickness_m": 50.0,
                            "x_m": np.arange(10) * 100.0, "y_m": 0.0})
    model = NeighbourThickness(_column(), samples)
    out = model.predict([0, 0], [np.nan, 450.0], [np.nan, 0.0], [99, 99])
    assert np.isnan(out[0]) and out[1] == pytest.approx(50.0)
