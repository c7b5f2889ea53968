"""Reference column: building from a table or a type well, look-ups, and input errors."""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest

from wellfault.geo.column import ReferenceColumn
from wellfault.errors import ColumnError
from wellfault.synth.structure import Beds
from wellfault.synth.forward import simulate_well
from wellfault.synth.columns import synthetic_column
from wellfault.geo.trajectory import Trajectory


def _table(thicknesses, unconformity=None):
    df = pd.DataFrame({"surface": [f"S{i}" for i in range(len(thicknesses))],
                       "thickness_m": thicknesses})
    if unconformity is not None:
        df["unconformity"] = unconformity
    return df


def test_table_thicknesses_stack_into_positions():
    col = ReferenceColumn.from_table(_table([10.0, 25.5, 40.0], ["no", "yes", ""]))
    assert col.names == ("S0", "S1", "S2")
    assert col.s_m.tolist() == [0.0, 10.0, 35.5]
    assert col.base_s_m == 75.5
    assert col.unconformity.tolist() == [False, True, False]
    assert col.thickness("S1") == 25.5
    assert col.index("S2") == 2 and col.s_of("S2") == 35.5


def test_unknown_last_thickness_leaves_the_last_unit_open():
    col = ReferenceColumn.from_table(_table([10.0, 20.0, np.nan]))
    assert math.isnan(col.base_s_m)
    assert math.isnan(col.thickness("S2"))
    assert col.unit_at(1e6) == "S2"
    assert "base open" in repr(col)


def test_unit_at_is_vectorised_and_none_outside_the_column():
    col = ReferenceColumn.from_table(_table([10.0, 20.0, 5.0]))
    got = col.unit_at([-0.1, 0.0, 9.999, 10.0, 34.9, 35.0, np.nan])
    assert got.tolist() == [None, "S0", "S0", "S1", "S2", None, None]
    assert col.unit_at(12.0) == "S1"


def test_surfaces_between_are_those_a_jump_skips_over():
    col = ReferenceColumn.from_table(_table([10.0, 20.0, 5.0, 5.0]))
    assert col.surfaces_between(5.0, 32.0) == ("S1", "S2")
    assert col.surfaces_between(32.0, 5.0) == ("S1", "S2")
    assert col.surfaces_between(10.0, 30.0) == ("S2",)  # lo < s <= hi
    assert col.surfaces_between(1.0, 2.0) == ()


def test_to_frame_round_trips_through_from_table():
    col = ReferenceColumn.from_table(_table([10.0, 20.0, 5.0], [False, True, False]))
    df = col.to_frame()
    assert list(df.columns) == ["surface", "s_m", "thickness_m", "unconformity"]
    assert ReferenceColumn.from_table(df) == col.renamed("column table")


@pytest.mark.parametrize("thicknesses, match", [
    ([10.0, 0.0, 5.0], "zero or negative thickness"),
    ([10.0, -3.0, 5.0], "zero or negative thickness"),
    ([10.0, np.nan, 5.0], "only the last unit"),
])
def test_bad_thicknesses_raise(thicknesses, match):
    with pytest.raises(ColumnError, match=match):
        ReferenceColumn.from_table(_table(thicknesses))


def test_repeated_names_and_unknown_names_raise_with_the_valid_list():
    df = pd.DataFrame({"surface": ["A", "B", "A"], "thickness_m": [1.0, 2.0, 3.0]})
    with pytest.raises(ColumnError, match=r"'A' appears twice \(rows 0 and 2\)"):
        ReferenceColumn.from_table(df)
    col = ReferenceColumn.from_table(_table([10.0, 20.0]))
    with pytest.raises(ColumnError, match="unknown surface 'X'; valid surfaces are S0, S1"):
        col.thickness("X")
    with pytest.raises(ColumnError, match="thickness_m"):
        ReferenceColumn.from_table(pd.DataFrame({"surface": ["A"]}))


def test_type_log_must_be_on_a_regular_s_grid():
    col = ReferenceColumn.from_table(_table([10.0, 20.0]))
    ok = col.with_type_log(pd.DataFrame({"s_m": [0.0, 0.5, 1.0], "GR": [1.0, 2.0, 3.0]}))
    assert ok.type_log.index.name == "s_m" and ok.type_log_step_m == 0.5
    with pytest.raises(ColumnError, match="regular step"):
        col.with_type_log(pd.DataFrame({"s_m": [0.0, 0.5, 1.2], "GR": [1.0, 2.0, 3.0]}))
    with pytest.raises(ColumnError, match="'s_m'"):
        col.with_type_log(pd.DataFrame({"GR": [1.0, 2.0, 3.0]}))


def test_repr_lists_every_surface():
    col = synthetic_column(5, seed=1)
    text = repr(col)
    assert all(n in text for n in col.names)
    assert "type log ['GR']" in text


def _type_well(inc, azi, dip, dip_azi):
    """A type well drawn by the forward model through an unfaulted synthetic column."""
    col = synthetic_column(8, seed=11, thickness_range_m=(15.0, 40.0))
    if inc == 0:
        traj = Trajectory.vertical()
    else:
        traj = Trajectory([0.0, 500.0, 500.0 + inc * 10, 9000.0], [0, 0, inc, inc],
                          [azi] * 4)
    md0 = float(traj.md_at_tvd(900.0))
    beds = Beds.through(dip, dip_azi, traj.position([md0])[0], -5.0)
    t = traj.tangent([md0])[0]
    length = (col.base_s_m + 10.0) / float(t @ beds.normal)
    syn = simulate_well(col, beds, [], traj, md_top_m=md0, md_base_m=md0 + length,
                        name="TYPE-1")
    return col, syn, traj


@pytest.mark.parametrize("inc, azi, dip, dip_azi", [(0, 0, 0, 0), (0, 0, 9, 60),
                                                    (40, 240, 9, 60), (55, 10, 6, 100)])
def test_type_well_gives_back_the_column_it_was_drawn_from(inc, azi, dip, dip_azi):
    col, syn, traj = _type_well(inc, azi, dip, dip_azi)
    got = ReferenceColumn.from_type_well(syn.well, syn.tops, traj, (dip, dip_azi),
                                         unconformities=[col.names[3]])
    assert got.names == col.names
    np.testing.assert_allclose(got.s_m, col.s_m, atol=1e-4)
    assert got.unconformity.tolist() == [i == 3 for i in range(len(col))]
    # the type log comes back on its s grid: compare with the generating type log
    tl = got.type_log
    want = np.interp(tl.index.to_numpy(), col.type_log.index.to_numpy(),
                     col.type_log["GR"].to_numpy())
    inside = (tl.index > 1.0) & (tl.index < col.base_s_m - 1.0)
    assert np.median(np.abs(tl["GR"].to_numpy()[inside] - want[inside])) < 0.5
    assert got.type_log_step_m == pytest.approx(0.1524 * float(
        traj.tangent([2000.0])[0] @ Beds(dip, dip_azi).normal), rel=1e-3)


def test_type_well_drilling_up_section_is_refused():
    col = synthetic_column(6, seed=2, thickness_range_m=(15, 30))
    traj = Trajectory([0.0, 300.0, 1200.0, 9000.0], [0, 0, 89, 89], [90, 90, 90, 90])
    beds = Beds.through(10.0, 90.0, traj.position([1500.0])[0], 60.0)  # r < 0 on the hold
    syn = simulate_well(col, beds, [], traj, md_top_m=1300.0, md_base_m=2200.0, curves=())
    assert len(syn.tops) >= 2
    with pytest.raises(ColumnError, match="drills up-section"):
        ReferenceColumn.from_type_well(syn.well, syn.tops, traj, (10.0, 90.0))


def test_type_well_with_a_repeated_pick_is_refused():
    col, syn, traj = _type_well(0, 0, 0, 0)
    tops = pd.concat([syn.tops, syn.tops.iloc[[2]]], ignore_index=True)
    with pytest.raises(ColumnError, match="picked twice"):
        ReferenceColumn.from_type_well(syn.well, tops, traj, (0.0, 0.0))
    with pytest.raises(ColumnError, match="not among the tops; valid surfaces"):
        ReferenceColumn.from_type_well(syn.well, syn.tops, traj, (0.0, 0.0),
                                       unconformities=["Nowhere"])
    with pytest.raises(ColumnError, match="dip"):
        ReferenceColumn.from_type_well(syn.well, syn.tops, traj, (120.0, 0.0))


def test_type_well_without_trajectory_is_taken_as_vertical():
    col, syn, _ = _type_well(0, 0, 5, 30)
    got = ReferenceColumn.from_type_well(syn.well, syn.tops, None, (5.0, 30.0))
    np.testing.assert_allclose(got.s_m, col.s_m, atol=1e-4)
