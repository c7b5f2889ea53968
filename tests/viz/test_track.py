"""The stratigraphic position track from tops: s at the picks, drilled travel between, a step
of Δs at each cut (hand-computed cases; the demo field end to end)."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest
from conftest import REPO_ROOT

from wellfault.geo.column import ReferenceColumn
from wellfault.geo.dip import BedDip
from wellfault.errors import InputError
from wellfault.geo.geometry import bed_normal
from wellfault.viz.track import (
    BRACKET_CONFIDENCE, TRACK_COLUMNS, check_track, cuts_in_metres, empty_track, track_from_tops,
    track_steps,
)
from wellfault.geo.trajectory import Trajectory

FIELD = REPO_ROOT / "synthetic_wells"


@pytest.fixture()
def column():
    # four 50 m units: A 0-50, B 50-100, C 100-150, D 150-200
    return ReferenceColumn(["A", "B", "C", "D"], [0.0, 50.0, 100.0, 150.0], base_s_m=200.0)


def picks(rows):
    return pd.DataFrame(rows, columns=["surface", "md_m"])


def at(track, md):
    return float(track.loc[np.isclose(track["md_m"], md), "s_m"].iloc[0])


def test_schema_and_empty_track():
    t = empty_track()
    assert tuple(t.columns) == TRACK_COLUMNS
    assert len(check_track(t)) == 0


def test_unfaulted_vertical_well_flat_beds_is_linear(column):
    # vertical well, flat beds: s = MD - MD(top A) exactly (hand computation)
    p = picks([("A", 1000.0), ("B", 1050.0), ("C", 1100.0), ("D", 1150.0)])
    t = track_from_tops(p, column, Trajectory.vertical(), None, None, step_m=5.0)
    assert tuple(t.columns[:4]) == TRACK_COLUMNS
    np.testing.assert_allclose(t["s_m"], t["md_m"] - 1000.0, atol=1e-9)
    assert t["md_m"].iloc[0] == 1000.0 and t["md_m"].iloc[-1] == 1150.0
    assert at(t, 1020.0) == pytest.approx(20.0)
    assert t.loc[np.isclose(t["md_m"], 1020.0), "unit"].iloc[0] == "A"
    assert t.loc[np.isclose(t["md_m"], 1120.0), "unit"].iloc[0] == "C"
    assert (t["confidence"] == 1.0).all()
    assert len(track_steps(t)) == 0


def test_missing_section_is_a_step_of_delta_s(column):
    # B at 1050 (s 50), D at 1110 (s 150): drilled 60 m, expected 100 m -> 40 m missing;
    # the cut at 1080: above it s = 50 + 30 = 80, below it 80 + 40 = 120, then 150 at D.
    p = picks([("A", 1000.0), ("B", 1050.0), ("D", 1110.0)])
    cuts = pd.DataFrame({"well": ["W"], "md_m": [1080.0], "md_top_m": [1050.0],
                         "md_base_m": [1110.0], "delta_s_m": [40.0]})
    t = track_from_tops(p, column, Trajectory.vertical(), "0/000", cuts, step_m=1.0)
    assert at(t, 1079.0) == pytest.approx(79.0)
    assert at(t, 1080.0) == pytest.approx(120.0)
    assert at(t, 1110.0) == pytest.approx(150.0)
    steps = track_steps(t)
    assert len(steps) == 1
    assert steps["md_m"].iloc[0] == pytest.approx(1080.0)
    assert steps["delta_s_m"].iloc[0] == pytest.approx(40.0, abs=1.01)
    inside = t[(t["md_m"] > 1050.0) & (t["md_m"] < 1110.0)]
    assert (inside["confidence"] == BRACKET_CONFIDENCE).all()
    assert (t.loc[t["md_m"] <= 1050.0, "confidence"] == 1.0).all()
    # the missing section, s 80-120 (lower B and upper C), is nowhere in the well
    assert not ((t["s_m"] > 80.5) & (t["s_m"] < 119.5)).any()


def test_repeated_section_steps_back(column):
    # C at 1100 (s 100), B picked again at 1120 (s 50): drilled 20 m, expected -50 m
    # -> delta_s = -70 m; cut at 1110: above 110, below 40, B at 1120 back at 50.
    p = picks([("A", 1000.0), ("B", 1050.0), ("C", 1100.0), ("B", 1120.0), ("C", 1170.0)])
    cuts = pd.DataFrame({"md_m": [1110.0], "delta_s_m": [-70.0]})
    t = track_from_tops(p, column, Trajectory.vertical(), None, cuts, step_m=1.0)
    assert at(t, 1109.0) == pytest.approx(109.0)
    assert at(t, 1110.0) == pytest.approx(40.0)
    assert at(t, 1120.0) == pytest.approx(50.0)
    assert at(t, 1170.0) == pytest.approx(100.0)
    assert track_steps(t)["delta_s_m"].iloc[0] == pytest.approx(-70.0, abs=1.01)


def test_thickness_change_within_tolerance_is_spread_not_stepped(column):
    # B-C drilled 55 m for 50 expected (no cut): stretched, continuous at the picks
    p = picks([("A", 1000.0), ("B", 1050.0), ("C", 1105.0)])
    t = track_from_tops(p, column, Trajectory.vertical(), None, None, step_m=1.0)
    assert at(t, 1105.0) == pytest.approx(100.0)
    assert at(t, 1077.0) == pytest.approx(50.0 + 27.0 * 50.0 / 55.0)
    assert len(track_steps(t)) == 0


def test_deviated_well_dipping_beds_follows_n_dot_p(column):
    # planar beds: s(P) = n.P + const (DESIGN.md section 2), so between two picks the track is
    # s(pick) + n.(P - P(pick)) exactly, on the minimum-curvature arc
    traj = Trajectory([0.0, 800.0, 1400.0, 2200.0], [0.0, 0.0, 40.0, 55.0],
                      [0.0, 0.0, 120.0, 130.0])
    dip = BedDip.constant(12.0, 75.0)
    n = np.asarray(bed_normal(12.0, 75.0), dtype=float)
    md_a = 1200.0
    s_of = {"A": 0.0, "B": 50.0, "C": 100.0, "D": 150.0}
    # place picks where n.P reaches each surface (unfaulted well)
    grid = np.linspace(md_a, 2200.0, 20001)
    s_grid = (traj.position(grid) - traj.position(np.array([md_a]))) @ n
    mds = [float(np.interp(s_of[k], s_grid, grid)) for k in "ABCD"]
    p = picks(list(zip("ABCD", mds)))
    t = track_from_tops(p, column, traj, dip, None, step_m=2.0)
    expect = (traj.position(t["md_m"].to_numpy()) - traj.position(np.array([md_a]))) @ n
    np.testing.assert_allclose(t["s_m"], expect, atol=0.05)


def test_per_surface_dip_and_extrapolation(column):
    p = picks([("A", 1000.0), ("B", 1050.0), ("C", 1100.0)])
    table = pd.DataFrame({"surface": ["A", "B"], "dip_deg": [0.0, 0.0],
                          "dip_azimuth_deg": [0.0, 0.0]})
    t = track_from_tops(p, column, Trajectory.vertical(), BedDip.per_surface(table), None,
                        md_m=np.arange(950.0, 1301.0, 10.0))
    assert at(t, 950.0) == pytest.approx(-50.0)  # above the first pick: above the column top
    assert pd.isna(t.loc[np.isclose(t["md_m"], 950.0), "unit"].iloc[0])
    assert at(t, 1300.0) == pytest.approx(300.0)  # below the last pick, straight on
    conf = t.set_index("md_m")["confidence"]
    assert conf[1000.0] == 1.0 and conf[1100.0] == 1.0
    assert conf[1200.0] < 1.0 and conf[1300.0] < conf[1200.0]
    assert conf.min() >= 0.2


def test_cut_table_in_feet_is_converted(column):
    p = picks([("A", 1000.0), ("B", 1050.0), ("D", 1110.0)])
    ft = 0.3048
    cuts = pd.DataFrame({"well": ["W"], "md_ft": [1080.0 / ft], "md_top_ft": [1050.0 / ft],
                         "md_base_ft": [1110.0 / ft], "delta_s_ft": [40.0 / ft]})
    m = cuts_in_metres(cuts)
    assert m["md_m"].iloc[0] == pytest.approx(1080.0)
    assert m["delta_s_m"].iloc[0] == pytest.approx(40.0)
    t = track_from_tops(p, column, Trajectory.vertical(), None, cuts, step_m=1.0, well="W")
    assert at(t, 1080.0) == pytest.approx(120.0)
    assert t.attrs["well"] == "W"


def test_bad_inputs_are_named(column):
    with pytest.raises(InputError, match="not in the reference column"):
        track_from_tops(picks([("A", 1000.0), ("Z", 1050.0)]), column, Trajectory.vertical())
    with pytest.raises(InputError, match="md_m"):
        track_from_tops(pd.DataFrame({"surface": ["A"]}), column, Trajectory.vertical())
    with pytest.raises(InputError, match="no tops"):
        track_from_tops(picks([]), column, Trajectory.vertical())
    with pytest.raises(InputError, match="strictly increasing"):
        check_track(pd.DataFrame({"md_m": [2.0, 1.0], "s_m": [0.0, 1.0], "unit": ["A", "A"],
                                  "confidence": [1.0, 1.0]}))
    with pytest.raises(InputError, match="confidence"):
        check_track(pd.DataFrame({"md_m": [1.0, 2.0], "s_m": [0.0, 1.0], "unit": ["A", "A"],
                                  "confidence": [1.0, 1.5]}))
    with pytest.raises(InputError, match="lacks column"):
        check_track(pd.DataFrame({"md_m": [1.0]}))


@pytest.mark.skipif(not (FIELD / "field.json").is_file(), reason="demo field not in checkout")
@pytest.mark.parametrize("name", ["VR-2", "VR-5", "VR-6H"])
def test_demo_wells_step_by_their_cuts(name):
    """On the demo field, the track steps by each found cut's Δs at its MD and sits on the
    column's s at every pick (end to end with find_fault_cuts)."""
    from wellfault.synth.demo import field_planes
    from wellfault.evidence.detect import find_fault_cuts
    from wellfault.io import read_column_table, read_las, read_manifest, read_survey, read_tops
    import json

    meta = json.loads((FIELD / "field.json").read_text())
    col = ReferenceColumn.from_table(read_column_table(FIELD / "column.csv"))
    row = read_manifest(FIELD / "manifest.csv").set_index("well").loc[name]
    well = read_las(row["las"])
    traj = (Trajectory.from_survey(read_survey(row["survey"]), x0_m=well.x_m, y0_m=well.y_m)
            if row["survey"] else Trajectory.vertical(x0_m=well.x_m, y0_m=well.y_m))
    tops = read_tops(row["tops"], well=name)
    cuts = find_fault_cuts(well, col, tops=tops, trajectory=traj, bed_dip=row["dip"],
                           planes=field_planes(meta))  # in the LAS unit (VR-2, VR-6H: feet)
    t = track_from_tops(tops, col, traj, row["dip"], cuts,
                        md_m=well.curves.index.to_numpy()[::3], well=name)
    s_at_picks = np.interp(tops["md_m"], t["md_m"], t["s_m"])
    np.testing.assert_allclose(s_at_picks, [col.s_of(s) for s in tops["surface"]], atol=1e-6)
    cm = cuts_in_metres(cuts)
    steps = track_steps(t)
    assert len(steps) == len(cm) == 1
    assert steps["md_m"].iloc[0] == pytest.approx(cm["md_m"].iloc[0])
    assert steps["delta_s_m"].iloc[0] == pytest.approx(cm["delta_s_m"].iloc[0], abs=1.0)
