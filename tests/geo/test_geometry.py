"""Thickness, separation, crossing and fault-type geometry (wellfault.geo.geometry).

Check values from /work/shared/reference/methods.md sections 2, 3 and 8; the source of each is
named beside it ("derived" = recomputed from the cited formulas, not printed in the source).
"""

from __future__ import annotations

import math

import numpy as np
import pytest
from hypothesis import assume, given, settings
from hypothesis import strategies as st

from wellfault.errors import InputError
from wellfault.geo.geometry import (
    DEFAULT_MIN_COS, andersonian_fault_dip, bed_normal, classify_fault, crossing_direction,
    expected_md_span, fault_normal_up, parse_attitude, section_kind, well_tangent,
)
from wellfault.geo.thickness import (
    apparent_dip, bed_dip_in_fault_section, fault_dip_from_throw_and_heave,
    stratigraphic_separation, stratigraphic_thickness, stratigraphic_thickness_from_coordinates,
    throw_and_heave, true_vertical_thickness, vertical_separation,
)

# ----------------------------------------------------------------------------- vectors


def test_vectors_follow_the_project_conventions():
    # DEVELOPERS.md conventions (east, north, down)
    assert well_tangent(90, 90) == pytest.approx([1, 0, 0], abs=1e-15)
    assert well_tangent(90, 0) == pytest.approx([0, 1, 0], abs=1e-15)
    assert well_tangent(0, 123) == pytest.approx([0, 0, 1], abs=1e-15)
    # a bed dipping east: its down-section normal tilts west
    assert bed_normal(30, 90) == pytest.approx([-0.5, 0, math.cos(math.radians(30))], abs=1e-15)
    # a fault dipping east: upward normal into the hanging wall points east and up
    assert fault_normal_up(60, 90) == pytest.approx([math.sin(math.radians(60)), 0, -0.5])
    assert well_tangent([0, 10], [0, 20]).shape == (2, 3)


# ----------------------------------------------------------------------------- thickness

# methods.md section 2, worked example 3: MT 100, I 30, A 090, dip 20.
# Formula: Bateman & Konen 1979 (via Crain's handbook, spec2000.net); values derived.
TST_TABLE = [
    # (inc, azi, dip_azi, tst, tvt)
    (30, 90, 270, 98.481, 104.801),  # drilling up-dip
    (30, 90, 90, 64.279, 68.404),  # drilling down-dip
    (30, 90, 0, 81.380, 86.603),  # along strike
    (0, 0, 90, 93.969, 100.000),  # vertical well
]


@pytest.mark.parametrize(("inc", "azi", "dip_azi", "tst", "tvt"), TST_TABLE)
def test_tst_and_tvt_match_the_worked_example(inc, azi, dip_azi, tst, tvt):
    got = stratigraphic_thickness(100.0, inclination_deg=inc, azimuth_deg=azi, dip_deg=20,
                                  dip_azimuth_deg=dip_azi)
    assert got == pytest.approx(tst, abs=1e-3)
    assert true_vertical_thickness(got, dip_deg=20) == pytest.approx(tvt, abs=1e-3)


def test_tst_vectorises_over_the_table():
    inc, azi, dip_azi, tst, _ = map(np.array, zip(*TST_TABLE))
    got = stratigraphic_thickness(np.full(4, 100.0), inclination_deg=inc, azimuth_deg=azi,
                                  dip_deg=20, dip_azimuth_deg=dip_azi)
    assert got == pytest.approx(tst, abs=1e-3)


def test_tst_sign_of_a_horizontal_well_shows_the_drilling_direction():
    # Bateman's sign note (hole entering the bed from underneath gives a negative value);
    # values derived (methods.md section 2): I 90, A 000, dip 5 toward 180 / toward 000
    up_dip = stratigraphic_thickness(100, inclination_deg=90, azimuth_deg=0, dip_deg=5,
                                     dip_azimuth_deg=180)
    down_dip = stratigraphic_thickness(100, inclination_deg=90, azimuth_deg=0, dip_deg=5,
                                       dip_azimuth_deg=0)
    assert up_dip == pytest.approx(8.716, abs=1e-3)
    assert true_vertical_thickness(up_dip, dip_deg=5) == pytest.approx(8.749, abs=1e-3)
    assert down_dip == pytest.approx(-8.716, abs=1e-3)


def test_tst_other_worked_case():
    # derived (methods.md section 2): MT 100, I 60, A 045, dip 10 toward 225
    tst = stratigraphic_thickness(100, inclination_deg=60, azimuth_deg=45, dip_deg=10,
                                  dip_azimuth_deg=225)
    assert tst == pytest.approx(64.279, abs=1e-3)
    assert true_vertical_thickness(tst, dip_deg=10) == pytest.approx(65.270, abs=1e-3)


def test_coordinate_form_matches_the_boak_example():
    # AAPG wiki (Boak) coordinate form; derived values: dTVD 86.603, dH 50 toward 090,
    # beds 20 toward 270 -> apparent dip -20, TST 98.481
    assert apparent_dip(20, 270, 90) == pytest.approx(-20.0, abs=1e-9)
    tst = stratigraphic_thickness_from_coordinates(50.0, 0.0, 86.603, dip_deg=20,
                                                   dip_azimuth_deg=270)
    assert tst == pytest.approx(98.481, abs=1e-3)


@settings(max_examples=100, deadline=None)
@given(length=st.floats(0.1, 5000), dip=st.floats(0, 89), dip_azi=st.floats(0, 360))
def test_well_drilled_normal_to_bedding_sees_its_md_length_as_tst(length, dip, dip_azi):
    # common practice (STYLE.md example): a hole along the bed normal cuts TST = MD
    got = stratigraphic_thickness(length, inclination_deg=dip, azimuth_deg=dip_azi + 180,
                                  dip_deg=dip, dip_azimuth_deg=dip_azi)
    assert got == pytest.approx(length, rel=1e-9)


@settings(max_examples=100, deadline=None)
@given(length=st.floats(0.1, 1000), inc=st.floats(0, 180), azi=st.floats(0, 360),
       dip=st.floats(0, 89), dip_azi=st.floats(0, 360))
def test_coordinate_form_equals_segment_form_on_a_straight_hole(length, inc, azi, dip, dip_azi):
    d = length * well_tangent(inc, azi)
    a = stratigraphic_thickness_from_coordinates(d[0], d[1], d[2], dip_deg=dip,
                                                 dip_azimuth_deg=dip_azi)
    b = stratigraphic_thickness(length, inclination_deg=inc, azimuth_deg=azi, dip_deg=dip,
                                dip_azimuth_deg=dip_azi)
    assert a == pytest.approx(b, abs=1e-9 * length)


def test_flat_beds_vertical_well_tst_is_md():
    # common practice: vertical well in flat beds, TST = TVT = MT
    assert stratigraphic_thickness(37.5, inclination_deg=0, azimuth_deg=0, dip_deg=0,
                                   dip_azimuth_deg=0) == pytest.approx(37.5)


# ----------------------------------------------------------------------------- separation


def test_vertical_and_stratigraphic_separation():
    # Groshong 2006 eq. 7.3: VS 100 with bed dip 10 -> SS 98.481 (value derived)
    assert stratigraphic_separation(100, dip_deg=10) == pytest.approx(98.481, abs=1e-3)
    assert vertical_separation(-98.4808, dip_deg=10) == pytest.approx(100.0, abs=1e-3)
    assert vertical_separation(50.0, dip_deg=0) == 50.0


# methods.md section 3.2, worked example 4 (derived; equivalent to Groshong eqs. 8.1-8.2)
THROW_TABLE = [
    # (fault dip, apparent bed dip, throw, heave, dip separation)
    (60, 0, 100.000, 57.735, 115.470),
    (60, 10, 111.334, 64.279, 128.558),
    (60, -10, 90.760, 52.401, 104.801),
    (60, 30, 150.000, 86.603, 173.205),
    (60, -30, 75.000, 43.301, 86.603),
    (30, 0, 100.000, 173.205, 200.000),
    (30, 10, 143.969, 249.362, 287.939),
    (30, -10, 76.604, 132.683, 153.209),
]


@pytest.mark.parametrize(("theta", "alpha", "throw", "heave", "ds"), THROW_TABLE)
def test_throw_heave_and_dip_separation_from_vertical_separation(theta, alpha, throw, heave, ds):
    got = throw_and_heave(100.0, fault_dip_deg=theta, apparent_bed_dip_deg=alpha)
    assert got.throw == pytest.approx(throw, abs=1e-3)
    assert got.heave == pytest.approx(heave, abs=1e-3)
    assert got.dip_separation == pytest.approx(ds, abs=1e-3)


def test_throw_heave_vectorised_and_unpackable():
    theta, alpha, throw, heave, _ = map(np.array, zip(*THROW_TABLE))
    t, h, _ = throw_and_heave(np.full(8, 100.0), fault_dip_deg=theta, apparent_bed_dip_deg=alpha)
    assert t == pytest.approx(throw, abs=1e-3)
    assert h == pytest.approx(heave, abs=1e-3)


def test_beds_steeper_than_the_fault_reverse_the_separation_sign():
    # derived (methods.md section 3.4): delta > theta with the fault -> negative throw
    assert throw_and_heave(100, fault_dip_deg=30, apparent_bed_dip_deg=40).throw < 0


def test_fault_dip_from_throw_and_heave():
    # Groshong 2006 eq. 8.3 with his Fig. 8.3 values T 32, H 25.6 -> 51.34 deg (derived)
    assert fault_dip_from_throw_and_heave(32, 25.6) == pytest.approx(51.34, abs=0.01)


def test_apparent_bed_dip_is_positive_when_beds_dip_with_the_fault():
    # common practice: sign convention of methods.md section 3.2
    assert bed_dip_in_fault_section(10, 90, fault_dip_azimuth_deg=90) == pytest.approx(10)
    assert bed_dip_in_fault_section(10, 270, fault_dip_azimuth_deg=90) == pytest.approx(-10)
    assert bed_dip_in_fault_section(10, 0, fault_dip_azimuth_deg=90) == pytest.approx(0, abs=1e-12)
    # true dip 45 at 60 deg to the section: atan(tan 45 cos 60) = 26.565 (derived)
    assert apparent_dip(45, 30, 90) == pytest.approx(26.565, abs=1e-3)
    assert apparent_dip(90, 90, [90, 270]) == pytest.approx([90, -90])


def _slip(theta, dip_azi, throw, kind):
    """Hanging-wall displacement of pure dip slip (down-dip for normal, up-dip for reverse)."""
    th, b = math.radians(theta), math.radians(dip_azi)
    down = np.array([math.sin(b) * math.cos(th), math.cos(b) * math.cos(th), math.sin(th)])
    u = throw / math.sin(th) * down
    return u if kind == "normal" else -u


def test_missing_amount_is_independent_of_well_path_and_equals_vs():
    # derived 3-D check (methods.md sections 3.3, 8): normal fault 60 -> 090, beds 10 -> 090,
    # VS 100 -> throw 111.334; every crossing well sees ds = n.u = 98.48 TST = 100 TVT
    alpha = bed_dip_in_fault_section(10, 90, fault_dip_azimuth_deg=90)
    th = throw_and_heave(100, fault_dip_deg=60, apparent_bed_dip_deg=alpha)
    u = _slip(60, 90, th.throw, "normal")
    n = bed_normal(10, 90)
    for inc, azi in [(0, 0), (45, 270), (70, 0)]:
        c = crossing_direction(well_tangent(inc, azi), fault_dip_deg=60, fault_dip_azimuth_deg=90)
        ds = c * float(n @ u)
        assert ds == pytest.approx(98.48, abs=0.01)
        assert vertical_separation(ds, dip_deg=10) == pytest.approx(100.0, abs=0.01)


def test_expected_md_span_of_missing_strata():
    # derived (methods.md sections 3.3, 8): VS 100, beds 10 -> 090, SS 98.481
    ss = stratigraphic_separation(100, dip_deg=10)
    r = np.sum(well_tangent([0, 60, 60, 85], [0, 90, 270, 90]) * bed_normal(10, 90), axis=-1)
    span = expected_md_span(ss, r)
    assert span == pytest.approx([100.00, 287.94, 153.21, 1129.94], abs=0.01)
    assert expected_md_span(10.0, 0.0) == np.inf


# ----------------------------------------------------------------------------- crossing


@pytest.mark.parametrize(("inc", "expected"), [(0, 1), (20, 1), (29, 1), (31, -1), (45, -1),
                                               (80, -1)])
def test_well_flatter_than_the_fault_toward_its_dip_crosses_footwall_to_hanging_wall(inc,
                                                                                      expected):
    # derived (methods.md section 3.4): threshold I > 90 - theta toward the dip direction
    t = well_tangent(inc, 90)
    got = crossing_direction(t, fault_dip_deg=60, fault_dip_azimuth_deg=90, min_abs_cos=0.01)
    assert got == expected


def test_well_in_the_fault_plane_is_degenerate():
    # derived: I 30 toward the dip of a 60 deg fault runs in the plane (t.m = 0)
    t = well_tangent([30, 31, 45], [90, 90, 90])
    got = crossing_direction(t, fault_dip_deg=60, fault_dip_azimuth_deg=90)
    assert got.tolist() == [0, 0, -1]  # 31 deg is within the default 2 deg of the plane
    assert DEFAULT_MIN_COS == pytest.approx(math.sin(math.radians(2)))


@settings(max_examples=200, deadline=None)
@given(theta=st.floats(5, 85), inc=st.floats(0, 89))
def test_crossing_threshold_for_wells_drilled_toward_the_fault_dip(theta, inc):
    # derived (methods.md section 3.4): FW -> HW iff tan I cos(A - phi) > cot theta
    assume(abs(inc - (90 - theta)) > 0.1)
    got = crossing_direction(well_tangent(inc, 200), fault_dip_deg=theta,
                             fault_dip_azimuth_deg=200, min_abs_cos=1e-6)
    assert got == (-1 if inc > 90 - theta else 1)


# ----------------------------------------------------------------------------- fault type


def _case(kind, theta, fault_azi, bed_dip, bed_azi, inc, azi, throw=100.0):
    t = well_tangent(inc, azi)
    n = bed_normal(bed_dip, bed_azi)
    u = _slip(theta, fault_azi, throw, kind)
    c = int(crossing_direction(t, fault_dip_deg=theta, fault_dip_azimuth_deg=fault_azi,
                               min_abs_cos=0.01))
    ds = c * float(n @ u)  # DESIGN.md section 3: ds = c (n.u)
    r = float(t @ n)
    return ds, r, c


# methods.md section 3.4 worked example 5 and truth table (derived, 3-D model)
TRUTH = [
    # (fault, theta, fault azi, bed dip, bed azi, inc, azi, section, amount)
    ("normal", 60, 90, 0, 0, 0, 0, "missing", 100.0),
    ("normal", 60, 90, 0, 0, 20, 90, "missing", 100.0),
    ("normal", 60, 90, 0, 0, 29, 90, "missing", 100.0),
    ("normal", 60, 90, 0, 0, 45, 270, "missing", 100.0),
    ("normal", 60, 90, 0, 0, 31, 90, "repeated", 100.0),
    ("normal", 60, 90, 0, 0, 45, 90, "repeated", 100.0),
    ("normal", 60, 90, 0, 0, 80, 90, "repeated", 100.0),
    ("reverse", 30, 90, 0, 0, 0, 0, "repeated", 100.0),
    ("reverse", 30, 90, 0, 0, 59, 90, "repeated", 100.0),
    ("reverse", 30, 90, 0, 0, 61, 90, "missing", 100.0),
    ("reverse", 30, 90, 0, 0, 75, 90, "missing", 100.0),
]


@pytest.mark.parametrize(("kind", "theta", "fazi", "bdip", "bazi", "inc", "azi", "section",
                          "amount"), TRUTH)
def test_missing_or_repeated_and_fault_type_follow_the_truth_table(kind, theta, fazi, bdip,
                                                                   bazi, inc, azi, section,
                                                                   amount):
    ds, r, c = _case(kind, theta, fazi, bdip, bazi, inc, azi)
    assert abs(ds) == pytest.approx(amount, abs=1e-9)
    assert section_kind(ds, r) == section
    fault_type, reason = classify_fault(ds, r=r, crossing=c)
    assert (fault_type, reason) == (kind, "")


def test_up_section_well_sees_a_normal_fault_as_repeated_section():
    # derived (methods.md section 3.4): normal 60 -> 270, beds 10 -> 090, VS 100
    alpha = bed_dip_in_fault_section(10, 90, fault_dip_azimuth_deg=270)
    throw = throw_and_heave(100, fault_dip_deg=60, apparent_bed_dip_deg=alpha).throw
    assert throw == pytest.approx(90.760, abs=1e-3)
    for inc, azi, section in [(0, 0, "missing"), (60, 90, "missing"), (85, 90, "repeated")]:
        ds, r, c = _case("normal", 60, 270, 10, 90, inc, azi, throw=throw)
        assert abs(ds) == pytest.approx(98.48, abs=0.01)
        assert c == 1
        assert section_kind(ds, r) == section
        assert classify_fault(ds, r=r, crossing=c)[0] == "normal"


def test_truth_table_at_the_level_of_signs():
    # methods.md section 3.4 truth table: (fault sense, crossing, r) -> section
    rows = [(+1, +1, +1, "missing"), (+1, +1, -1, "repeated"), (+1, -1, +1, "repeated"),
            (+1, -1, -1, "missing"), (-1, +1, +1, "repeated"), (-1, +1, -1, "missing"),
            (-1, -1, +1, "missing"), (-1, -1, -1, "repeated")]
    sense, cross, r, expected = map(np.array, zip(*rows))
    ds = sense * cross * 50.0  # ds = c (n.u), n.u > 0 for normal separation
    assert section_kind(ds, 0.5 * r).tolist() == expected.tolist()
    ftype, _ = classify_fault(ds, r=0.5 * r, crossing=cross)
    assert ftype.tolist() == np.where(sense > 0, "normal", "reverse").tolist()


def test_degenerate_geometry_is_reported_not_guessed():
    # common practice (DESIGN.md section 3): |t.m| or |r| small -> undetermined with a reason
    assert section_kind(30.0, 0.0) == "undetermined"
    ftype, reason = classify_fault(30.0, r=0.01, crossing=1)
    assert ftype == "undetermined" and "parallel to bedding" in reason
    ftype, reason = classify_fault(30.0, r=0.8, crossing=0)
    assert ftype == "undetermined" and "parallel to the fault" in reason
    ftype, reason = classify_fault(0.0, r=0.8, crossing=1)
    assert ftype == "undetermined" and "no stratigraphic jump" in reason
    ftype, reason = classify_fault([30.0, -30.0, np.nan], r=[0.8, 0.8, 0.8], crossing=[1, 1, 1])
    assert ftype.tolist() == ["normal", "reverse", "undetermined"]
    assert reason.tolist()[:2] == ["", ""] and "NaN" in reason[2]


# ----------------------------------------------------------------------------- text, defaults


def test_attitude_text_is_parsed():
    assert parse_attitude("12/075") == (12.0, 75.0)
    assert parse_attitude(" 7.5 / 360 ") == (7.5, 0.0)
    assert parse_attitude("0/0") == (0.0, 0.0)


@pytest.mark.parametrize(
    ("text", "match"),
    [
        ("95/010", r"--fault: dip outside 0-90 degrees \(got 95\.0\); dip is measured down"),
        ("12/075/3", r"cannot read dip '12/075/3'; write it as dip/dip-azimuth.*e\.g\. 12/075"),
        ("-5/010", r"dip outside 0-90"),
        ("12/400", r"dip azimuth outside 0-360"),
        ("12-075", r"cannot read.*e\.g\. 12/075"),
        ("NE", r"cannot read"),
    ],
)
def test_bad_attitudes_are_rejected_with_the_expected_form(text, match):
    with pytest.raises(InputError, match=match):
        parse_attitude(text, source="--fault")


def test_dip_outside_range_is_rejected_by_the_equations():
    # common practice: dips are 0-90 with a dip azimuth
    with pytest.raises(InputError, match="outside 0-90"):
        bed_normal(100, 0)
    with pytest.raises(InputError, match="fault_dip_deg outside 0-90"):
        throw_and_heave(100, fault_dip_deg=-10, apparent_bed_dip_deg=0)
    with pytest.raises(InputError, match="outside 0-90"):
        true_vertical_thickness([1.0, 2.0], dip_deg=[10, 91])


def test_andersonian_default_dips():
    # Anderson (1951), course notes summarised in methods.md section 7: ~60 normal, ~30 reverse
    assert andersonian_fault_dip("normal") == 60.0
    assert andersonian_fault_dip("Reverse") == 30.0
    assert andersonian_fault_dip("thrust") == 30.0
    with pytest.raises(InputError, match="use one of normal, reverse"):
        andersonian_fault_dip("listric")


def test_vertical_beds_give_infinite_vertical_thickness():
    assert true_vertical_thickness(10.0, dip_deg=90) == np.inf
