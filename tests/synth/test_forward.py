"""Forward model: fault cuts, tops and curves drawn through planar beds and planar faults.

The missing/repeated checks reproduce, end to end through the model and real minimum-curvature
trajectories, the truth table and worked example 5 of reference/methods.md section 3.4 and the
check values of its section 8 (marked [derived] there: computed from the 3-D geometry).
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest

from wellfault.geo.column import ReferenceColumn
from wellfault.errors import ColumnError, InputError, WellfaultWarning
from wellfault.synth.structure import Beds, PlanarFault
from wellfault.synth.columns import column_from_real_curve, synthetic_column
from wellfault.synth.forward import simulate_well
from wellfault.geo.trajectory import Trajectory

BUILD_DEG_PER_30M = 3.0
KOP_M = 300.0


def build_and_hold(inc_deg: float, azi_deg: float, *, x0_m: float = 0.0,
                   y0_m: float = 0.0) -> tuple[Trajectory, float]:
    """Vertical to a kick-off, a build at 3 deg/30 m to (inc, azi), then a long hold.

    Returns the trajectory and the MD where the hold (straight section) begins.
    """
    if inc_deg == 0:
        return Trajectory.vertical(x0_m=x0_m, y0_m=y0_m), 0.0
    eob = KOP_M + inc_deg / BUILD_DEG_PER_30M * 30.0
    traj = Trajectory([0.0, KOP_M, eob, eob + 20000.0], [0.0, 0.0, inc_deg, inc_deg],
                      [azi_deg] * 4, x0_m=x0_m, y0_m=y0_m)
    return traj, eob


def _column(n: int = 60, thickness: float = 23.0) -> ReferenceColumn:
    """Uniform units, 23 m thick (not a divisor of the 100 m jumps)."""
    df = pd.DataFrame({"surface": [f"U{i:02d}" for i in range(n)],
                       "thickness_m": [thickness] * n})
    return ReferenceColumn.from_table(df)


def _cross(fault_dip, fault_azi, kind, throw, inc, azi, *, bed_dip=(0.0, 0.0), curves=(),
           before_m=250.0, after_m=150.0):
    """One well through one fault; the fault crosses the well ``before_m`` into its hold."""
    col = _column()
    traj, eob = build_and_hold(inc, azi)
    md_c = eob + before_m
    p_c = traj.position([md_c])[0]
    fault = PlanarFault.dip_slip(fault_dip, fault_azi, p_c, throw, kind, name="F")
    beds = Beds.through(*bed_dip, p_c, 700.0)
    syn = simulate_well(col, beds, [fault], traj, md_top_m=eob + 1.0, md_base_m=md_c + after_m,
                        md_step_m=0.1524, curves=curves, name=f"I{inc}A{azi}")
    return syn, md_c


NORMAL_60_090_MISSING = [(0, 0), (45, 270), (29, 90), (20, 90)]
NORMAL_60_090_REPEATED = [(31, 90), (45, 90), (80, 90)]


@pytest.mark.parametrize("inc, azi", NORMAL_60_090_MISSING)
def test_normal_fault_crossed_hanging_wall_to_footwall_is_missing_section(inc, azi):
    # reference/methods.md 3.4 worked example 5 / section 8: normal 60->090, flat beds, throw
    # 100; vertical, I 45 A 270, I 20/29 A 090 -> missing 100
    syn, md_c = _cross(60, 90, "normal", 100.0, inc, azi)
    assert len(syn.cuts) == 1
    cut = syn.cuts.iloc[0]
    assert cut.section == "missing"
    assert cut.crossing == 1
    assert cut.fault_type == "normal"
    assert cut.delta_s_m == pytest.approx(100.0, abs=1e-6)
    assert cut.md_m == pytest.approx(md_c, abs=1e-6)


@pytest.mark.parametrize("inc, azi", NORMAL_60_090_REPEATED)
def test_normal_fault_crossed_footwall_to_hanging_wall_is_repeated_section(inc, azi):
    # reference/methods.md 3.4 worked example 5 / section 8: I 31/45/80 toward 090 -> FW->HW,
    # repeated 100 (a normal fault seen as repeated section)
    syn, md_c = _cross(60, 90, "normal", 100.0, inc, azi)
    assert len(syn.cuts) == 1
    cut = syn.cuts.iloc[0]
    assert cut.section == "repeated"
    assert cut.crossing == -1
    assert cut.fault_type == "normal"
    assert cut.delta_s_m == pytest.approx(-100.0, abs=1e-6)
    assert cut.md_m == pytest.approx(md_c, abs=1e-6)


@pytest.mark.parametrize("inc, azi, section, crossing", [
    (0, 0, "repeated", 1), (30, 90, "repeated", 1), (59, 90, "repeated", 1),
    (61, 90, "missing", -1), (75, 90, "missing", -1),
])
def test_reverse_fault_section_depends_on_crossing_direction(inc, azi, section, crossing):
    # reference/methods.md 3.4 worked example 5 / section 8: reverse 30->090, throw 100;
    # vertical and I <= 59 toward 090 -> repeated 100; I 61/75 -> missing 100
    syn, _ = _cross(30, 90, "reverse", 100.0, inc, azi)
    assert len(syn.cuts) == 1
    cut = syn.cuts.iloc[0]
    assert (cut.section, cut.crossing, cut.fault_type) == (section, crossing, "reverse")
    assert cut.tst_m == pytest.approx(100.0, abs=1e-6)


def _throw_from_vs(vs, fault_dip, apparent_bed_dip):
    """T = VS sin(theta) cos(delta) / sin(theta - delta) (reference/methods.md 3.2)."""
    t, d = math.radians(fault_dip), math.radians(apparent_bed_dip)
    return vs * math.sin(t) * math.cos(d) / math.sin(t - d)


@pytest.mark.parametrize("inc, azi, section", [(0, 0, "missing"), (60, 90, "missing"),
                                               (85, 90, "repeated")])
def test_well_drilling_up_section_sees_a_normal_fault_as_repeated(inc, azi, section):
    # reference/methods.md 3.4 worked example 5, up-section case: normal 60->270, beds 10->090,
    # VS 100 (T 90.760); I 0 and I 60 A 090 -> missing 98.48 TST; I 85 A 090 (r = -0.087)
    # crosses HW->FW but sees REPEATED 98.48 TST
    throw = _throw_from_vs(100.0, 60.0, -10.0)
    assert throw == pytest.approx(90.760, abs=1e-3)  # methods.md section 8 (T 90.760)
    syn, _ = _cross(60, 270, "normal", throw, inc, azi, bed_dip=(10.0, 90.0))
    cut = syn.cuts.iloc[0]
    assert len(syn.cuts) == 1
    assert cut.crossing == 1
    assert cut.section == section
    assert cut.tst_m == pytest.approx(98.48, abs=0.01)
    assert cut.vertical_separation_m == pytest.approx(100.0, abs=1e-6)
    if inc == 85:
        assert cut.r == pytest.approx(-0.087, abs=1e-3)


@pytest.mark.parametrize("inc, azi", [(0, 0), (45, 270), (70, 0)])
def test_missing_section_in_tst_does_not_depend_on_well_deviation(inc, azi):
    # reference/methods.md 3.3 and section 8: normal 60->090, beds 10->090, VS 100; wells I 0,
    # I 45 A 270, I 70 A 000 -> 98.48 TST = 100.00 TVT each
    throw = _throw_from_vs(100.0, 60.0, 10.0)
    assert throw == pytest.approx(111.334, abs=1e-3)  # methods.md section 8 (T 111.334)
    syn, _ = _cross(60, 90, "normal", throw, inc, azi, bed_dip=(10.0, 90.0))
    cut = syn.cuts.iloc[0]
    assert cut.section == "missing"
    assert cut.tst_m == pytest.approx(98.48, abs=0.01)
    assert cut.vertical_separation_m == pytest.approx(100.0, abs=0.01)


def test_horizontal_well_in_flat_beds_is_undetermined():
    # reference/methods.md 3.4: I = 90 in flat beds is the degenerate r = 0 case
    syn, _ = _cross(60, 90, "normal", 100.0, 90, 90)
    assert syn.cuts.iloc[0].section == "undetermined"
    assert syn.cuts.iloc[0].delta_s_m == pytest.approx(-100.0, abs=1e-6)


def test_missing_surfaces_are_not_picked_and_the_rest_are():
    syn, md_c = _cross(60, 90, "normal", 100.0, 0, 0)
    col = _column()
    cut = syn.cuts.iloc[0]
    missing = set(col.surfaces_between(cut.s_above_m, cut.s_below_m))
    assert len(missing) == 4  # 100 m of 23 m units: 4 or 5 surfaces; here s 674->774
    picked = set(syn.tops["surface"])
    assert not (missing & picked)
    assert not syn.tops["surface"].duplicated().any()


def test_repeated_section_gives_duplicate_picks():
    syn, md_c = _cross(30, 90, "reverse", 100.0, 0, 0)
    col = _column()
    cut = syn.cuts.iloc[0]
    dup = syn.tops.loc[syn.tops["surface"].duplicated(), "surface"].tolist()
    assert set(dup) == set(col.surfaces_between(cut.s_above_m, cut.s_below_m))
    assert len(dup) == 4
    first = syn.tops.groupby("surface")["md_m"].min()
    assert (first[dup] < md_c).all()  # first picks above the cut, repeats below


def test_repeated_section_in_a_high_angle_well_gives_duplicate_picks():
    # 800 m of hold at I 80 on either side of the cut: 139 m TST (r = cos 80)
    syn, _ = _cross(60, 90, "normal", 100.0, 80, 90, before_m=800.0, after_m=800.0)
    cut = syn.cuts.iloc[0]
    dup = syn.tops.loc[syn.tops["surface"].duplicated(), "surface"].tolist()
    assert set(dup) == set(_column().surfaces_between(cut.s_above_m, cut.s_below_m))
    assert len(dup) == 4


@pytest.mark.parametrize("inc, azi, dip, dip_azi", [
    (0, 0, 0, 0), (0, 0, 8, 75), (40, 200, 8, 75), (60, 45, 10, 225), (85, 0, 5, 180),
])
def test_unfaulted_straight_well_sees_tst_equal_md_times_t_dot_n(inc, azi, dip, dip_azi):
    # TST = MT (t . n) (Bateman & Konen 1979, via reference/methods.md section 2)
    col = _column()
    traj = Trajectory([0.0, 20000.0], [inc, inc], [azi, azi])
    t = traj.tangent([1000.0])[0]
    beds = Beds.through(dip, dip_azi, traj.position([1000.0])[0], 5.0)
    r = float(t @ beds.normal)
    length = 1000.0 / r
    syn = simulate_well(col, beds, [], traj, md_top_m=1000.0, md_base_m=1000.0 + length,
                        curves=(), name="straight")
    assert syn.cuts.empty
    tops = syn.tops.set_index("surface")["md_m"]
    assert len(tops) >= 40
    got = np.diff(tops.to_numpy()) * r
    want = np.array([col.thickness(n) for n in tops.index[:-1]])
    np.testing.assert_allclose(got, want, atol=1e-6)


def test_unfaulted_curved_well_tops_lie_at_their_column_position():
    # TST from coordinates n . dP for curved holes (Berg 2012, via methods.md section 2)
    col = _column()
    traj, _ = build_and_hold(50, 300)
    beds = Beds(7.0, 120.0, origin_s_m=-100.0)
    syn = simulate_well(col, beds, [], traj, md_top_m=150.0, md_base_m=1400.0, curves=())
    p = traj.position(syn.tops["md_m"].to_numpy())
    s = beds.s(p)
    want = np.array([col.s_of(n) for n in syn.tops["surface"]])
    np.testing.assert_allclose(s, want, atol=1e-4)  # linear MD interpolation on a 0.15 m step


def test_thickness_factors_scale_the_drilled_units():
    col = _column(10, 30.0)
    factors = {"U03": 1.15, "U04": 0.85}
    syn = simulate_well(col, Beds(0, 0, -1000.0), [], None, md_top_m=990.0, md_base_m=1310.0,
                        curves=(), thickness_factors=factors)
    md = syn.tops.set_index("surface")["md_m"]
    assert md["U04"] - md["U03"] == pytest.approx(34.5, abs=1e-6)
    assert md["U05"] - md["U04"] == pytest.approx(25.5, abs=1e-6)
    assert md["U06"] - md["U05"] == pytest.approx(30.0, abs=1e-6)
    # s_m is the reference position: the surfaces still read at their reference s
    i = np.searchsorted(syn.well.md_m, md["U05"])
    assert syn.s_m[i] == pytest.approx(col.s_of("U05"), abs=0.2)


def test_curves_read_the_type_log_at_the_model_position():
    col = synthetic_column(12, seed=3)
    syn = simulate_well(col, Beds(0, 0, -1000.0), [], None, md_top_m=1010.0,
                        md_base_m=1300.0, gain=1.1, offset=5.0, name="T")
    tl = col.type_log
    want = 1.1 * np.interp(syn.s_m, tl.index.to_numpy(), tl["GR"].to_numpy()) + 5.0
    np.testing.assert_allclose(syn.well.curves["GR"].to_numpy(), want)
    assert syn.well.curves.index.name == "md_m"


def test_noise_is_seeded():
    col = synthetic_column(8, seed=1)
    kw = dict(md_top_m=1010.0, md_base_m=1200.0, noise_std=4.0, pick_noise_m=0.3)
    a = simulate_well(col, Beds(0, 0, -1000.0), [], None, seed=7, **kw)
    b = simulate_well(col, Beds(0, 0, -1000.0), [], None, seed=7, **kw)
    c = simulate_well(col, Beds(0, 0, -1000.0), [], None, seed=8, **kw)
    pd.testing.assert_frame_equal(a.well.curves, b.well.curves)
    pd.testing.assert_frame_equal(a.tops, b.tops)
    assert not np.allclose(a.well.curves["GR"], c.well.curves["GR"])
    resid = a.well.curves["GR"].to_numpy() - np.interp(
        a.s_m, col.type_log.index.to_numpy(), col.type_log["GR"].to_numpy())
    assert np.std(resid) == pytest.approx(4.0, rel=0.1)


def test_unpicked_surfaces_are_left_out_of_the_tops():
    col = _column(10, 30.0)
    syn = simulate_well(col, Beds(0, 0, -1000.0), [], None, md_top_m=990.0, md_base_m=1310.0,
                        curves=(), unpicked=("U02", "U07"))
    assert "U02" not in set(syn.tops["surface"]) and "U07" not in set(syn.tops["surface"])
    with pytest.raises(ColumnError, match="valid surfaces are U00"):
        simulate_well(col, Beds(0, 0, -1000.0), [], None, md_top_m=990.0, md_base_m=1310.0,
                      curves=(), unpicked=("U99",))


def test_two_faults_give_two_cuts_in_md_order():
    col = _column()
    f1 = PlanarFault.dip_slip(60, 90, (0, 0, 1100), 40.0, "normal", name="A")
    f2 = PlanarFault.dip_slip(55, 270, (0, 0, 1300), 60.0, "normal", name="B")
    syn = simulate_well(col, Beds(0, 0, -800.0), [f1, f2], None, md_top_m=1000.0,
                        md_base_m=1500.0, curves=())
    assert syn.cuts["fault_name"].tolist() == ["A", "B"]
    np.testing.assert_allclose(syn.cuts["md_m"], [1100.0, 1300.0], atol=1e-6)
    np.testing.assert_allclose(syn.cuts["delta_s_m"], [40.0, 60.0], atol=1e-6)
    assert (syn.cuts["md_first_below_m"] > syn.cuts["md_m"]).all()
    assert (syn.cuts["md_first_below_m"] - syn.cuts["md_m"] < 0.1524 + 1e-9).all()


def test_fault_from_pitch_matches_published_net_slip():
    # reference/methods.md 4.3 / section 8: 060/60 (dip azimuth 150), pitch 70 from the NE end,
    # T 100 -> S 122.881 on a slip line plunging 54.469 toward 113.948 [derived there]
    f = PlanarFault.from_pitch(60, 150, (0, 0, 0), 100.0, 70.0, "normal")
    u = np.asarray(f.slip)
    assert np.linalg.norm(u) == pytest.approx(122.881, abs=1e-3)
    assert math.degrees(math.asin(u[2] / np.linalg.norm(u))) == pytest.approx(54.469, abs=1e-3)
    assert math.degrees(math.atan2(u[0], u[1])) % 360 == pytest.approx(113.948, abs=1e-3)
    assert f.throw_m == pytest.approx(100.0)
    r = PlanarFault.from_pitch(60, 150, (0, 0, 0), 100.0, 70.0, "reverse")
    np.testing.assert_allclose(r.slip, -u)


def test_dip_slip_fault_moves_the_hanging_wall_down_dip_in_the_plane():
    f = PlanarFault.dip_slip(60, 90, (0, 0, 0), 100.0)
    assert f.normal_up @ np.asarray(f.slip) == pytest.approx(0.0, abs=1e-12)
    assert f.slip[2] == pytest.approx(100.0)
    assert f.slip[0] == pytest.approx(100.0 / math.tan(math.radians(60)))  # heave, flat beds
    assert f.in_hanging_wall([[10.0, 0.0, 0.0], [-10.0, 0.0, 0.0]]).tolist() == [True, False]
    assert f.separation(Beds(0, 0)) == "normal"
    # beds dipping the fault's way more steeply than it: normal slip, reverse separation
    # (reference/methods.md 3.4)
    assert f.separation(Beds(70, 90)) == "reverse"


def test_bad_fault_and_interval_inputs_raise_with_the_fix():
    with pytest.raises(InputError, match="kind"):
        PlanarFault.dip_slip(60, 90, (0, 0, 0), 10.0, "sinistral")
    with pytest.raises(InputError, match="dip"):
        PlanarFault.dip_slip(0, 90, (0, 0, 0), 10.0)
    with pytest.raises(InputError, match="positive"):
        PlanarFault.dip_slip(60, 90, (0, 0, 0), -10.0)
    with pytest.warns(WellfaultWarning, match="not in the fault plane"):
        PlanarFault(60, 90, (0, 0, 0), (0, 0, 10))
    col = _column(5)
    with pytest.raises(InputError, match="md_base_m > md_top_m"):
        simulate_well(col, Beds(), [], None, md_top_m=100.0, md_base_m=50.0, curves=())
    with pytest.raises(ColumnError, match="no type log"):
        simulate_well(col, Beds(), [], None, md_top_m=0.0, md_base_m=50.0)
    with pytest.raises(InputError, match="beyond"):
        simulate_well(col, Beds(), [], None, md_top_m=0.0, md_base_m=50.0, curves=(),
                      beyond="wrap")


def test_type_log_beyond_the_column_is_clipped_or_mirrored():
    col = synthetic_column(4, seed=2, thickness_range_m=(10, 20))
    end = col.type_log.index[-1]
    kw = dict(md_top_m=0.0, md_base_m=end + 20.0, md_step_m=0.5)
    clip = simulate_well(col, Beds(), [], None, **kw)
    mirror = simulate_well(col, Beds(), [], None, beyond="mirror", **kw)
    gr = col.type_log["GR"]
    below = clip.well.md_m > end
    assert np.all(clip.well.curves["GR"].to_numpy()[below] == gr.iloc[-1])
    md = mirror.well.md_m[below][5]
    assert mirror.well.curves["GR"].to_numpy()[below][5] == pytest.approx(
        np.interp(2 * end - md, gr.index.to_numpy(), gr.to_numpy()))


def test_synthetic_column_is_seeded_and_realistic():
    a = synthetic_column(14, seed=5, curves=("GR", "RHOB", "NPHI", "DT"))
    b = synthetic_column(14, seed=5, curves=("GR", "RHOB", "NPHI", "DT"))
    assert a == b
    assert synthetic_column(14, seed=6) != synthetic_column(14, seed=5)
    th = a.thicknesses_m
    assert len(a) == 14 and np.all((th >= 10) & (th <= 80))
    gr = a.type_log["GR"]
    # common practice: GR in API units spans clean (~20-40) to shale (~100-150) and hot shale
    assert 5 <= gr.min() < 45 and 95 < gr.quantile(0.9) and gr.max() < 300
    assert a.type_log.index[1] == pytest.approx(0.1524)
    assert 1.3 < a.type_log["RHOB"].min() and a.type_log["RHOB"].max() < 2.9
    with pytest.raises(InputError, match="cannot draw"):
        synthetic_column(5, curves=("SP",))


def test_column_from_a_real_gamma_ray_curve(refdata):
    # real GR of Wellington KGS 1-32 (welly 0.5.2 tutorial data; ../shared/reference_data)
    import lasio

    las = lasio.read(refdata / "Wellington_KGS_1-32.las")
    gr = las["GR"]
    ds = 0.5 * 0.3048
    col = column_from_real_curve(gr, ds, surfaces_every_m=40.0, name_prefix="W")
    assert col.names[0] == "W01" and len(col) > 20
    assert np.all(np.diff(col.s_m) > 0)
    assert col.type_log["GR"].notna().all()
    syn = simulate_well(col, Beds(5, 90, origin_s_m=-500.0), [], None, md_top_m=600.0,
                        md_base_m=900.0, name="REAL-GR")
    assert syn.well.curves["GR"].notna().all()


def test_column_from_a_curve_fills_gaps_and_drops_null_ends():
    v = np.r_[np.nan, np.nan, np.linspace(10, 100, 200), np.nan]
    v[50] = np.nan
    col = column_from_real_curve(v, 0.5, surfaces_every_m=20.0, snap=False)
    assert len(col.type_log) == 200
    assert col.type_log["GR"].iloc[48] == pytest.approx(10 + 90 * 48 / 199)
    assert col.s_m.tolist() == [0.0, 20.0, 40.0, 60.0, 80.0]


def test_synthetic_well_writes_files_the_readers_take_back(tmp_path):
    from wellfault.io import read_las, read_survey, read_tops

    col = synthetic_column(8, seed=4)
    traj, eob = build_and_hold(30, 120)
    traj = Trajectory.from_survey(traj.stations, x0_m=1000.0, y0_m=2000.0, ref_elevation_m=30.0)
    syn = simulate_well(col, Beds(5, 45, origin_s_m=-900.0), [], traj, md_top_m=1000.0,
                        md_base_m=1400.0, name="W-1", depth_unit="ft", noise_std=2.0, seed=1)
    paths = syn.to_files(tmp_path)
    well = read_las(paths["las"])
    assert well.depth_unit.value == "ft" and well.ref_elevation_m == pytest.approx(30.0)
    np.testing.assert_allclose(well.md_m, syn.well.md_m, atol=1e-6)
    np.testing.assert_allclose(well.curves["GR"], syn.well.curves["GR"], rtol=1e-8)
    tops = read_tops(paths["tops"])
    np.testing.assert_allclose(tops["md_m"], syn.tops["md_m"], atol=1e-6)
    survey = read_survey(paths["survey"])
    back = Trajectory.from_survey(survey)
    np.testing.assert_allclose(back.tvd(1300.0), traj.tvd(1300.0), atol=1e-6)


def test_model_in_tvdss_shifts_by_the_kb_elevation():
    col = _column(10, 30.0)
    beds = Beds(0, 0, origin_s_m=-1000.0)  # column top at 1000 m TVDSS
    traj = Trajectory.vertical(ref_elevation_m=40.0)
    syn = simulate_well(col, beds, [], traj, md_top_m=1000.0, md_base_m=1100.0, curves=(),
                        datum="sea level")
    assert syn.tops["md_m"].iloc[0] == pytest.approx(1040.0)
    with pytest.raises(InputError, match="ref_elevation_m"):
        simulate_well(col, beds, [], Trajectory.vertical(), md_top_m=1000.0, md_base_m=1100.0,
                      curves=(), datum="sea level")
