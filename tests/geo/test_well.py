"""The Well container: its index rules and its small helpers."""

from __future__ import annotations

import numpy as np
import pandas as pd
import pytest

from wellfault.errors import InputError
from wellfault.geo.units import DepthUnit
from wellfault.geo.well import Well


def make(index=(100.0, 100.5, 101.0), **curves) -> Well:
    curves = curves or {"GR": [50.0, 60.0, 70.0], "RHOB": [2.3, 2.4, 2.5]}
    return Well("A-1", pd.DataFrame(curves, index=list(index)), "ft")


def test_curve_lookup_ignores_case() -> None:
    assert make().curve("rhob").tolist() == [2.3, 2.4, 2.5]


def test_unknown_curve_lists_the_available_curves() -> None:
    with pytest.raises(InputError, match=r"'A-1'.*no curve named 'NPHI'; available curves: GR, "
                                         r"RHOB"):
        make().curve("NPHI")


def test_md_range_is_first_and_last_depth() -> None:
    assert make().md_range_m == (100.0, 101.0)


def test_index_is_named_md_m_and_curves_are_float() -> None:
    w = make(GR=[1, 2, 3])
    assert w.curves.index.name == "md_m"
    assert w.curves["GR"].dtype == np.float64
    assert w.depth_unit is DepthUnit.FT


def test_well_keeps_its_own_copy_of_the_curves() -> None:
    frame = pd.DataFrame({"GR": [1.0, 2.0]}, index=[1.0, 2.0])
    w = Well("A", frame, "m")
    frame.iloc[0, 0] = 99.0
    assert w.curve("GR").iloc[0] == 1.0


def test_depths_that_do_not_increase_are_rejected() -> None:
    with pytest.raises(InputError, match=r"must increase strictly.*sort by depth"):
        make(index=(100.0, 100.0, 101.0))


def test_non_finite_depth_is_rejected() -> None:
    with pytest.raises(InputError, match=r"sample 1 is not a finite number"):
        make(index=(100.0, np.nan, 101.0))
