"""Slickenline pitch, slip line, net slip and Rickard classes (wellfault.geo.slip).

Check values from /work/shared/reference/methods.md section 4 and 8; the source of each is named
beside it ("derived" = recomputed from the cited formulas).
"""

from __future__ import annotations

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from wellfault.errors import InputError
from wellfault.geo.slip import (
    classify_pitch, hanging_wall_rake, net_slip, parse_pitch, rhr_pitch, slip_line,
)

# Nelson (Colorado School of Mines) rake -> trend/plunge spreadsheet rows, methods.md 4.1:
# (RHR strike, dip, pitch as entered, end it is measured from, RHR pitch,
#  published trend/plunge, recomputed trend/plunge [derived])
NELSON = [
    (287, 81, 17, 107, 163, (104, 17), (104.3, 16.8)),
    (30, 79, 50, 210, 130, (197, 49), (197.2, 48.8)),
    (20, 30, 20, 200, 160, (183, 10), (182.5, 9.8)),
    (90, 30, 40, 90, 40, (126, 19), (126.0, 18.7)),
    (90, 30, 60, 90, 60, (146, 26), (146.3, 25.7)),
]


@pytest.mark.parametrize(("strike", "dip", "pitch", "end", "rhr", "published", "recomputed"),
                         NELSON)
def test_slip_line_matches_the_nelson_rows(strike, dip, pitch, end, rhr, published, recomputed):
    dip_azi = (strike + 90) % 360
    r = rhr_pitch(pitch, end, fault_dip_azimuth_deg=dip_azi)
    assert r == pytest.approx(rhr)
    trend, plunge = slip_line(dip, dip_azi, r)
    assert (trend, plunge) == pytest.approx(recomputed, abs=0.06)  # derived, 0.1 deg
    assert (trend, plunge) == pytest.approx(published, abs=0.5)  # Nelson, printed to 1 deg


def test_rickard_notation_example():
    # Rickard 1972 notation D60/270:P60N, "right-normal-slip"; values derived (methods.md 4.1)
    pitch, end = parse_pitch("60/000", fault_dip_azimuth_deg=270)
    r = rhr_pitch(pitch, end, fault_dip_azimuth_deg=270)
    assert r == pytest.approx(120.0)
    trend, plunge = slip_line(60, 270, r)
    assert trend == pytest.approx(319.1, abs=0.05)
    assert plunge == pytest.approx(48.59, abs=0.01)
    rake = hanging_wall_rake(r, sense="normal")
    assert -180 < rake < -90  # normal (rake < 0) with a right-lateral (dextral) part


def test_net_slip_worked_example():
    # derived (methods.md 4.3, worked example 6): fault strike 060 dip 60 (dip azimuth 150),
    # pitch 70 from the NE end, normal, throw 100
    r = rhr_pitch(*parse_pitch("70/060"), fault_dip_azimuth_deg=150)
    assert r == pytest.approx(70.0)
    got = net_slip(100.0, fault_dip_deg=60, rhr_pitch_deg=r)
    assert got.net_slip == pytest.approx(122.881, abs=1e-3)
    assert got.dip_slip == pytest.approx(115.470, abs=1e-3)
    assert got.strike_slip == pytest.approx(42.028, abs=1e-3)
    # heave S sin r cos theta = 57.735 (derived)
    assert got.dip_slip * np.cos(np.radians(60)) == pytest.approx(57.735, abs=1e-3)
    trend, plunge = slip_line(60, 150, r)
    assert (plunge, trend) == pytest.approx((54.469, 113.948), abs=1e-3)
    assert hanging_wall_rake(r, sense="normal") == pytest.approx(-70.0)  # Aki-Richards
    assert classify_pitch(r) == "oblique"
    # pure dip slip: S = 115.470 (derived)
    assert net_slip(100.0, fault_dip_deg=60, rhr_pitch_deg=90).net_slip == pytest.approx(
        115.470, abs=1e-3)


def test_pitch_from_either_end_of_the_strike_line():
    # derived (methods.md 4.3): pitch 30 on 060/60 from the NE end -> 25.659 -> 076.1,
    # from the SW end -> 25.659 -> 223.9
    ne = slip_line(60, 150, rhr_pitch(30, 60, fault_dip_azimuth_deg=150))
    sw = slip_line(60, 150, rhr_pitch(30, 240, fault_dip_azimuth_deg=150))
    assert ne == pytest.approx((76.1, 25.659), abs=0.05)
    assert sw == pytest.approx((223.9, 25.659), abs=0.05)


def test_fifty_from_200_is_not_fifty_from_020():
    # common practice: the named end decides the line (methods.md 4.1)
    a = rhr_pitch(50, 200, fault_dip_azimuth_deg=290)
    b = rhr_pitch(50, 20, fault_dip_azimuth_deg=290)
    assert (a, b) == pytest.approx((50.0, 130.0))
    ta, _ = slip_line(60, 290, a)
    tb, _ = slip_line(60, 290, b)
    assert abs(ta - tb) > 30


def test_an_azimuth_that_is_not_a_strike_line_end_is_rejected():
    with pytest.raises(InputError, match=r"'50 from 200' and '50 from 020' are different"):
        parse_pitch("50/110", fault_dip_azimuth_deg=290, source="--pitch")
    with pytest.raises(InputError, match="not from an end of the fault's strike line"):
        rhr_pitch([50, 50], [200, 290], fault_dip_azimuth_deg=290)
    # within the tolerance it is accepted
    assert rhr_pitch(50, 210, fault_dip_azimuth_deg=290) == pytest.approx(50.0)


@pytest.mark.parametrize("text", ["50", "50-200", "fifty/200", "50/200/3"])
def test_unreadable_pitch_text_shows_the_expected_form(text):
    with pytest.raises(InputError, match=r"expected pitch/from-azimuth, e\.g\. 50/200"):
        parse_pitch(text)


def test_pitch_text_forms_and_ranges():
    assert parse_pitch("50 from 200") == (50.0, 200.0)
    assert parse_pitch("50/360") == (50.0, 0.0)
    with pytest.raises(InputError, match="pitch outside 0-180"):
        parse_pitch("190/200")
    with pytest.raises(InputError, match="outside 0-360"):
        parse_pitch("50/400")


@pytest.mark.parametrize(("pitch", "cls"), [(5, "strike-slip"), (45, "oblique"),
                                            (70, "oblique"), (85, "dip-slip"),
                                            (10, "strike-slip"), (80, "dip-slip"),
                                            (90, "dip-slip"), (0, "strike-slip"),
                                            (170, "strike-slip"), (95, "dip-slip")])
def test_rickard_pitch_classes(pitch, cls):
    # Rickard 1972: dip slip 80-90, strike slip 0-10, oblique between
    assert classify_pitch(pitch) == cls


def test_pitch_classes_vectorise_and_reject_bad_pitch():
    assert classify_pitch([5, 45, 85]).tolist() == ["strike-slip", "oblique", "dip-slip"]
    with pytest.raises(InputError, match="pitch outside 0-180"):
        classify_pitch([45, 200])


def test_rake_conventions():
    # Aki & Richards (1980) via OpenSHA glossary / Wikipedia "Rake (geology)":
    # -90 pure normal, +90 pure reverse
    assert hanging_wall_rake(90, sense="normal") == -90
    assert hanging_wall_rake(90, sense="reverse") == 90
    assert hanging_wall_rake(180, sense="normal") == 180
    with pytest.raises(InputError, match="normal' or 'reverse"):
        hanging_wall_rake(90, sense="sinistral")


def test_horizontal_slip_line_has_no_net_slip_from_throw():
    # documented: throw carries no information on pure strike slip -> NaN
    assert np.isnan(net_slip(10.0, fault_dip_deg=60, rhr_pitch_deg=0).net_slip)


@settings(max_examples=100, deadline=None)
@given(dip=st.floats(1, 89), dip_azi=st.floats(0, 360), r=st.floats(0.5, 179.5),
       throw=st.floats(1, 1000))
def test_slip_vector_has_the_throw_as_its_vertical_part_and_lies_in_the_fault(dip, dip_azi,
                                                                              r, throw):
    trend, plunge = slip_line(dip, dip_azi, r)
    s = net_slip(throw, fault_dip_deg=dip, rhr_pitch_deg=r).net_slip
    t, p = np.radians(trend), np.radians(plunge)
    v = np.array([np.cos(p) * np.sin(t), np.cos(p) * np.cos(t), np.sin(p)])
    assert s * v[2] == pytest.approx(throw, rel=1e-9)
    d, b = np.radians(dip), np.radians(dip_azi)
    normal = np.array([np.sin(d) * np.sin(b), np.sin(d) * np.cos(b), -np.cos(d)])
    assert v @ normal == pytest.approx(0.0, abs=1e-12)
