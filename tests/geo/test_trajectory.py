"""Minimum curvature and the Trajectory class.

Check values come from /work/shared/reference/methods.md (sections 1.1, 1.4 and 8); the source of
each is named beside it. "derived" means recomputed from the published formulas, not printed in a
source.
"""

from __future__ import annotations

import math

import numpy as np
import pandas as pd
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from wellfault.errors import InputError, SurveyError
from wellfault.geo.trajectory import Trajectory
from wellfault.geo.mincurve import dogleg, minimum_curvature, ratio_factor
from wellfault.geo.units import METRES_PER_FOOT

# ---------------------------------------------------------------------------- published cases


def test_worked_example_matches_published_minimum_curvature_values():
    # drillingformulas.com "Minimum Curvature Method" worked example (3500/15/20 -> 3600/25/45):
    # published N 27.22, E 19.45, TVD 94.01 ft, dogleg 12.95 deg (0.22605 rad);
    # 27.218 / 19.451 / 94.012 and 12.95165 deg are the derived values of methods.md section 8.
    tvd, north, east, dl = minimum_curvature([3500.0, 3600.0], [15.0, 25.0], [20.0, 45.0])
    assert north[1] == pytest.approx(27.218, abs=0.01)
    assert east[1] == pytest.approx(19.451, abs=0.01)
    assert tvd[1] == pytest.approx(94.012, abs=0.01)
    assert dl[1] == pytest.approx(12.95165, abs=1e-4)
    assert math.radians(dl[1]) == pytest.approx(0.22605, abs=1e-5)  # page: 0.22605 rad
    # DLS 12.95 deg/100 ft (derived from the page)
    assert dl[1] * 100 / 100.0 == pytest.approx(12.95, abs=0.01)


def test_ratio_factor_is_the_corrected_value_not_the_misprint():
    # derived RF 1.00428 (the drillingformulas.com page prints 1.00408, a misprint: its own
    # N/E/TVD only reproduce with 1.00428)
    beta = dogleg(15.0, 20.0, 25.0, 45.0)
    assert ratio_factor(beta) == pytest.approx(1.00428, abs=1e-5)
    assert abs(ratio_factor(beta) - 1.00408) > 1e-4


def test_ratio_factor_at_quarter_turn_is_four_over_pi():
    # derived: RF(90 deg) = 4/pi = 1.273240 (methods.md section 8)
    assert ratio_factor(math.pi / 2) == pytest.approx(4 / math.pi, abs=1e-9)


def test_ratio_factor_series_joins_the_exact_form():
    # Taylor series tan x = x + x^3/3 + 2x^5/15 (common practice); both sides of the switch
    b = np.array([1e-3 * (1 - 1e-9), 1e-3 * (1 + 1e-9), 1e-12, 0.0])
    assert ratio_factor(b) == pytest.approx(1 + b**2 / 12 + b**4 / 120, rel=1e-15)
    assert ratio_factor(0.5) == pytest.approx(2 / 0.5 * math.tan(0.25), rel=1e-15)


@pytest.mark.parametrize("step", [100.0, 250.0, 1000.0, 3000.0])
def test_circular_arc_is_exact_for_any_station_spacing(step):
    # derived (methods.md section 1.4): build 0 -> 90 deg at 3 deg/100 ft on azimuth 45;
    # R = 18000/(3 pi) = 1909.859 ft; TVD gain = R, N = E = R/sqrt(2) = 1350.474
    md = np.arange(0.0, 3000.0 + step / 2, step)
    inc = md * 3.0 / 100.0
    tvd, north, east, _ = minimum_curvature(md, inc, np.full_like(md, 45.0))
    r = 18000.0 / (3.0 * math.pi)
    assert tvd[-1] == pytest.approx(r, rel=1e-12)
    assert north[-1] == pytest.approx(r / math.sqrt(2), rel=1e-12)
    assert east[-1] == pytest.approx(1350.474, abs=1e-3)


def test_balanced_tangential_error_on_the_single_step_arc():
    # derived: balanced tangential (RF = 1) over one 3000-ft step gives TVD 1500, H 1500;
    # minimum curvature recovers R = 1909.859 because RF = 4/pi
    tvd, north, east, _ = minimum_curvature([0.0, 3000.0], [0.0, 90.0], [45.0, 45.0])
    assert tvd[1] / ratio_factor(math.pi / 2) == pytest.approx(1500.0, abs=1e-9)
    assert math.hypot(north[1], east[1]) / ratio_factor(math.pi / 2) == pytest.approx(1500.0)


def test_straight_hole_displacements():
    # derived (methods.md section 1.4): I 30, A 120, 1000 ft -> TVD 866.025, N -250, E 433.013
    tvd, north, east, dl = minimum_curvature([0.0, 1000.0], [30.0, 30.0], [120.0, 120.0])
    assert (tvd[1], north[1], east[1]) == pytest.approx((866.025, -250.0, 433.013), abs=1e-3)
    assert dl[1] == 0.0


MULTI = ([0.0, 1000.0, 1500.0, 2000.0, 3000.0], [0.0, 0.0, 15.0, 30.0, 30.0],
         [0.0, 0.0, 45.0, 45.0, 45.0])


def test_multi_station_regression_case():
    # derived (methods.md section 1.4 / 8): matches the analytic arc R sin 30 = 954.93
    tvd, north, east, dl = minimum_curvature(*MULTI)
    assert tvd[1:] == pytest.approx([1000.0, 1494.308, 1954.930, 2820.955], abs=1e-3)
    assert north == pytest.approx([0.0, 0.0, 46.016, 180.929, 534.483], abs=1e-3)
    assert east == pytest.approx(north, abs=1e-12)
    # DLS 3.0 deg/100 ft in the build (derived)
    dls = dl[1:] * 100.0 / np.diff(MULTI[0])
    assert dls[1:3] == pytest.approx([3.0, 3.0], abs=1e-9)


def test_azimuth_wrap_through_north():
    # derived (methods.md section 1.4): (1000, 20, 350) -> (1100, 20, 10)
    tvd, north, east, dl = minimum_curvature([1000.0, 1100.0], [20.0, 20.0], [350.0, 10.0])
    assert dl[1] == pytest.approx(6.8097, abs=1e-3)
    assert (north[1], east[1], tvd[1]) == pytest.approx((33.722, 0.0, 94.080), abs=1e-3)


def test_mc_on_the_radius_of_curvature_example():
    # derived (methods.md section 1.3/8): minimum curvature on (7500,45,130)->(7595,52,139)
    tvd, north, east, dl = minimum_curvature([7500.0, 7595.0], [45.0, 52.0], [130.0, 139.0])
    assert (north[1], east[1], tvd[1]) == pytest.approx((-49.958, 50.407, 62.982), abs=0.01)
    assert dl[1] == pytest.approx(9.7059, abs=1e-3)
    assert dl[1] * 100 / 95.0 == pytest.approx(10.217, abs=1e-3)


def test_dls_per_30m_equals_per_100ft_converted():
    # derived: 3 deg/100 ft = 2.9528 deg/30 m
    traj = Trajectory(np.array(MULTI[0]) * METRES_PER_FOOT, MULTI[1], MULTI[2])
    assert traj.stations["dls_deg_per_30m"].iloc[2] == pytest.approx(2.9528, abs=1e-4)
    out = traj.survey_out("ft")
    assert out["dls_deg_per_100ft"].iloc[2] == pytest.approx(3.0, abs=1e-12)


# ---------------------------------------------------------------------------- real surveys


def _read_provider(path):
    return pd.read_csv(path)


def test_reproduces_provider_minimum_curvature_of_well_1515(refdata):
    # provider-computed minimum-curvature TVD/N/E/DLS, Well_1515_survey.csv (welly 0.5.2 sdist);
    # tolerances from reference_data/README.md: 0.006 on TVD/N/E, 0.006 deg/100 on DLS
    import json

    df = _read_provider(refdata / "Well_1515_survey.csv")
    meta = json.loads((refdata / "Well_1515_survey.json").read_text())
    tvd, north, east, dl = minimum_curvature(df["md"], df["inc"], df["azi"])
    assert np.abs(tvd - df["tvd"]).max() <= 0.006
    assert np.abs(north - df["north"]).max() <= 0.006
    assert np.abs(east - df["east"]).max() <= 0.006
    dls = np.concatenate([[0.0], dl[1:] * 100.0 / np.diff(df["md"])])
    assert np.abs(dls - np.array(meta["provider_dls_per_100"])).max() <= 0.006
    # the same through the Trajectory class (feet -> metres -> feet)
    traj = Trajectory(df["md"] * METRES_PER_FOOT, df["inc"], df["azi"])
    out = traj.survey_out("ft")
    assert np.abs(out["tvd_ft"] - df["tvd"]).max() <= 0.006
    assert np.abs(out["dls_deg_per_100ft"] - np.array(meta["provider_dls_per_100"])).max() <= 0.006


def test_reproduces_provider_minimum_curvature_of_deviation_m(refdata):
    # provider-computed TVD/N/E, deviation_m_survey.csv (welly 0.5.2 sdist, tutorial data);
    # README tolerance: 0.006 m except the last two stations (values do not fit their angles),
    # 0.05 m with them
    df = _read_provider(refdata / "deviation_m_survey.csv")
    traj = Trajectory.from_survey(df.rename(columns={"md": "md_m", "inc": "inc_deg",
                                                     "azi": "azi_deg"}))
    st_ = traj.stations
    for ours, theirs in (("tvd_m", "tvd"), ("north_m", "north"), ("east_m", "east")):
        err = np.abs(st_[ours].to_numpy() - df[theirs].to_numpy())
        assert err[:-2].max() <= 0.006, ours
        assert err.max() <= 0.05, ours


def test_agrees_with_an_independent_minimum_curvature_implementation(refdata):
    # wellpathpy 0.5.2 (independent library) as an oracle, to 1e-9
    wellpathpy = pytest.importorskip("wellpathpy")
    for name, per in (("Well_1515_survey.csv", 100), ("deviation_m_survey.csv", 30),
                      ("P-129_survey.csv", 30)):
        df = pd.read_csv(refdata / name)
        dev = wellpathpy.deviation(df["md"].to_numpy(float), df["inc"].to_numpy(float),
                                   df["azi"].to_numpy(float))
        pos = dev.minimum_curvature(course_length=per)
        tvd, north, east, dl = minimum_curvature(df["md"], df["inc"], df["azi"])
        assert tvd == pytest.approx(pos.depth, abs=1e-9), name
        assert north == pytest.approx(pos.northing, abs=1e-9), name
        assert east == pytest.approx(pos.easting, abs=1e-9), name


def test_agrees_with_wellpathpy_on_random_surveys():
    # wellpathpy 0.5.2 as an oracle on seeded random surveys with wide angle changes
    from wellpathpy.mincurve import minimum_curvature as wp_mc

    rng = np.random.default_rng(7)
    md = np.concatenate([[0.0], np.cumsum(rng.uniform(5, 60, 200))])
    inc = np.clip(np.cumsum(rng.normal(0, 3, md.size)), 0, 120)
    azi = np.mod(np.cumsum(rng.normal(0, 8, md.size)), 360)
    ours = minimum_curvature(md, inc, azi)
    theirs = wp_mc(md, inc, azi, course_length=30)
    for a, b in zip(ours[:3], theirs[:3]):
        assert a == pytest.approx(b, abs=1e-9)


# ---------------------------------------------------------------------------- Trajectory


def test_position_inside_a_course_lies_on_the_circular_arc():
    # analytic circle (derived): build at 3 deg/100 m from vertical on azimuth 30; at arc length
    # s from the kick-off: TVD = KOP + R sin(s/R), horizontal = R (1 - cos(s/R))
    r = 18000.0 / (3.0 * math.pi)
    traj = Trajectory([0.0, 500.0, 2000.0], [0.0, 0.0, 45.0], [30.0, 30.0, 30.0],
                      x0_m=1000.0, y0_m=2000.0)
    s = np.array([0.0, 333.0, 750.0, 1234.5, 1500.0])
    pos = traj.position(500.0 + s)
    h = r * (1 - np.cos(s / r))
    assert pos[:, 2] == pytest.approx(500.0 + r * np.sin(s / r), abs=1e-9)
    assert pos[:, 0] == pytest.approx(1000.0 + h * math.sin(math.radians(30)), abs=1e-9)
    assert pos[:, 1] == pytest.approx(2000.0 + h * math.cos(math.radians(30)), abs=1e-9)
    inc, azi = traj.inclination_azimuth(500.0 + s[1:])
    assert inc == pytest.approx(np.degrees(s[1:] / r), abs=1e-9)
    assert azi == pytest.approx(30.0, abs=1e-9)


def test_interpolation_differs_from_linear_between_stations():
    # mid-MD of a single 90 deg step: arc point (R sin 45, R(1-cos 45)), not the chord midpoint
    r = 3000.0 / (math.pi / 2)
    traj = Trajectory([0.0, 3000.0], [0.0, 90.0], [0.0, 0.0])
    p = traj.position(1500.0)[0]
    assert p[2] == pytest.approx(r * math.sin(math.pi / 4), abs=1e-9)
    assert p[1] == pytest.approx(r * (1 - math.cos(math.pi / 4)), abs=1e-9)
    assert abs(p[2] - traj.tvd(3000.0) / 2) > 100


def test_turning_course_midpoint_is_on_the_arc():
    # 3-D arc (inclination and azimuth both change): the mid-MD point must be equidistant
    # (chord-wise) from both stations and its tangent the normalised bisector of t1 and t2
    traj = Trajectory([0.0, 100.0, 400.0], [0.0, 20.0, 70.0], [0.0, 10.0, 130.0])
    t1, t2 = traj.tangent([100.0, 400.0])
    tm = traj.tangent(250.0)[0]
    bis = (t1 + t2) / np.linalg.norm(t1 + t2)
    assert tm == pytest.approx(bis, abs=1e-12)
    p1, pm, p2 = traj.position([100.0, 250.0, 400.0])
    assert np.linalg.norm(pm - p1) == pytest.approx(np.linalg.norm(p2 - pm), rel=1e-12)


def test_extrapolation_beyond_last_station_and_above_surface():
    traj = Trajectory([0.0, 1000.0], [0.0, 30.0], [0.0, 90.0])
    p_last = traj.position(1000.0)[0]
    p = traj.position(1100.0)[0]
    t = np.array([math.sin(math.radians(30)), 0.0, math.cos(math.radians(30))])
    assert p - p_last == pytest.approx(100.0 * t, abs=1e-9)
    assert traj.position(-20.0)[0] == pytest.approx([0.0, 0.0, -20.0])
    assert traj.md_max_m == 1000.0


def test_tie_on_station_is_added_when_survey_starts_below_md_zero():
    # common practice: a vertical tie-on at MD 0 when the first station is deeper
    traj = Trajectory([100.0, 200.0], [0.0, 10.0], [0.0, 0.0])
    st_ = traj.stations
    assert traj.tie_on_added
    assert st_["md_m"].tolist() == [0.0, 100.0, 200.0]
    assert st_["tvd_m"].iloc[1] == pytest.approx(100.0)


def test_vertical_well_has_tvd_equal_to_md():
    traj = Trajectory.vertical(x0_m=5.0, y0_m=6.0, ref_elevation_m=30.0)
    md = np.array([0.0, 12.5, 3000.0])
    assert traj.tvd(md) == pytest.approx(md)
    assert traj.tvdss(md) == pytest.approx(md - 30.0)
    assert traj.position(md)[:, :2] == pytest.approx(np.array([[5.0, 6.0]] * 3))
    assert traj.md_at_tvd(1234.0) == pytest.approx(1234.0)


def test_azimuth_is_irrelevant_when_vertical():
    a = Trajectory([0.0, 100.0, 200.0], [0.0, 0.0, 10.0], [0.0, 0.0, 80.0])
    b = Trajectory([0.0, 100.0, 200.0], [0.0, 0.0, 10.0], [217.0, 33.0, 80.0])
    md = np.linspace(0, 300, 31)
    assert a.position(md) == pytest.approx(b.position(md), abs=1e-12)


def test_tvdss_without_reference_elevation_says_how_to_fix():
    with pytest.raises(InputError, match="ref_elevation_m"):
        Trajectory.vertical().tvdss(100.0)


def test_shapes_of_query_results():
    traj = Trajectory(*MULTI)
    assert isinstance(traj.tvd(1200.0), float)
    assert traj.tvd(np.zeros((2, 3))).shape == (2, 3)
    assert traj.position(1200.0).shape == (1, 3)
    assert traj.tangent([1.0, 2.0]).shape == (2, 3)
    assert np.isnan(traj.tvd([np.nan, 10.0])[0])


def test_many_queries_are_vectorised():
    traj = Trajectory(*MULTI)
    md = np.linspace(0.0, 3500.0, 100_000)
    z = traj.tvd(md)
    assert np.all(np.diff(z) > 0)
    assert traj.md_at_tvd(z) == pytest.approx(md, abs=1e-7)


def test_from_survey_ignores_extra_columns_and_names_missing_ones():
    df = pd.DataFrame({"md_m": [0.0, 100.0], "inc_deg": [0.0, 5.0], "azi_deg": [0.0, 90.0],
                       "tvd_m": [0.0, 99.0]})
    traj = Trajectory.from_survey(df, name="W-1")
    assert traj.name == "W-1"
    with pytest.raises(SurveyError, match="inc_deg"):
        Trajectory.from_survey(df.drop(columns="inc_deg"))


@pytest.mark.parametrize(
    ("md", "inc", "azi", "match"),
    [
        ([0, 100, 100], [0, 1, 2], [0, 0, 0], r"row 3: MD is not strictly increasing"),
        ([0, 100, 50], [0, 1, 2], [0, 0, 0], r"sort the stations"),
        ([0, 100], [0, 181], [0, 0], r"row 2: inclination outside 0-180"),
        ([0, 100], [0, -1], [0, 0], r"inclination outside"),
        ([0, 100], [0, 10], [0, 361], r"row 2: azimuth outside 0-360"),
        ([0, 100], [0, 10], [0, -5], r"add 360"),
        ([0, np.nan], [0, 10], [0, 0], r"MD is not a finite number"),
        ([-5, 100], [0, 10], [0, 0], r"MD below zero"),
        ([0, 100], [0, 10], [0], r"different lengths"),
        ([], [], [], r"no stations"),
        ([0, 100], [0, 180], [0, 0], r"back on itself"),
    ],
)
def test_bad_surveys_are_rejected_with_row_value_and_fix(md, inc, azi, match):
    with pytest.raises(SurveyError, match=match):
        Trajectory(md, inc, azi, source="s.csv")


def test_survey_error_names_the_file():
    with pytest.raises(SurveyError, match=r"^dev\.csv, row 2"):
        Trajectory([0, 100], [0, 200], [0, 0], source="dev.csv")


def test_md_at_tvd_refuses_a_tvd_in_a_horizontal_or_upward_section():
    # well builds to 95 deg (upward): TVDs near the landing are reached twice
    traj = Trajectory([0, 1000, 1600, 2500], [0, 0, 95, 95], [0, 0, 0, 0])
    z_land = traj.stations["tvd_m"].max()
    assert traj.md_at_tvd(500.0) == pytest.approx(500.0)
    with pytest.raises(SurveyError, match=r"TVD .* not increasing"):
        traj.md_at_tvd(z_land - 1e-3)
    with pytest.raises(SurveyError, match=r"never reached"):
        traj.md_at_tvd(z_land + 10.0)


def test_md_at_tvd_on_a_well_that_holds_horizontal_then_drops():
    # exact 90 deg at a station joins two strictly descending courses: still one-to-one
    traj = Trajectory([0, 1000, 2000, 2500], [0, 0, 90, 60], [0, 0, 45, 45])
    md = np.array([1500.0, 1999.0, 2200.0, 2600.0])
    assert traj.md_at_tvd(traj.tvd(md)) == pytest.approx(md, abs=1e-6)


def test_survey_out_columns_carry_units():
    traj = Trajectory(*MULTI, ref_elevation_m=25.0, x0_m=100.0, y0_m=200.0)
    m = traj.survey_out("m")
    assert list(m.columns) == ["md_m", "inc_deg", "azi_deg", "tvd_m", "tvdss_m", "north_m",
                               "east_m", "x_m", "y_m", "dls_deg_per_30m"]
    ft = traj.survey_out("ft")
    assert Trajectory.survey_table is Trajectory.survey_out  # one method, two names
    assert ft["md_ft"].to_numpy() == pytest.approx(m["md_m"].to_numpy() / 0.3048)
    assert ft["x_ft"].iloc[0] == pytest.approx(100.0 / 0.3048)


# ---------------------------------------------------------------------------- properties


@st.composite
def _descending_surveys(draw):
    n = draw(st.integers(2, 12))
    steps = draw(st.lists(st.floats(1.0, 300.0), min_size=n - 1, max_size=n - 1))
    md = np.concatenate([[0.0], np.cumsum(steps)])
    inc = np.array(draw(st.lists(st.floats(0.0, 85.0), min_size=n, max_size=n)))
    azi = np.array(draw(st.lists(st.floats(0.0, 360.0), min_size=n, max_size=n)))
    return md, inc, azi


@settings(max_examples=60, deadline=None)
@given(survey=_descending_surveys(), frac=st.lists(st.floats(-0.1, 1.2), min_size=1,
                                                   max_size=20))
def test_md_to_tvd_to_md_round_trip_on_descending_surveys(survey, frac):
    md, inc, azi = survey
    traj = Trajectory(md, inc, azi)
    q = np.array(frac) * md[-1]
    assert traj.md_at_tvd(traj.tvd(q)) == pytest.approx(q, abs=1e-6)


@settings(max_examples=60, deadline=None)
@given(survey=_descending_surveys())
def test_arc_interpolation_reproduces_the_stations(survey):
    md, inc, azi = survey
    traj = Trajectory(md, inc, azi)
    st_ = traj.stations
    pos = traj.position(md)
    assert pos[:, 2] == pytest.approx(st_["tvd_m"].to_numpy(), abs=1e-8)
    t = traj.tangent(md)
    assert np.linalg.norm(t, axis=1) == pytest.approx(1.0, abs=1e-12)
    # the path is smooth: a central difference of the position is the tangent
    mid = (md[:-1] + md[1:]) / 2
    h = 1e-4 * np.diff(md).min()
    fd = (traj.position(mid + h) - traj.position(mid - h)) / (2 * h)
    assert fd == pytest.approx(traj.tangent(mid), abs=1e-6)
