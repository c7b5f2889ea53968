"""Shared fixtures: where the real open reference wells live, and skipping when absent."""

from __future__ import annotations

import os
from pathlib import Path

import pytest

REPO_ROOT = Path(__file__).resolve().parents[1]


def reference_data_dir() -> Path:
    """``$WELLFAULT_REFERENCE_DATA`` or ``../shared/reference_data`` beside the checkout."""
    env = os.environ.get("WELLFAULT_REFERENCE_DATA")
    return Path(env) if env else REPO_ROOT.parent / "shared" / "reference_data"


@pytest.fixture(scope="session")
def refdata() -> Path:
    """Folder of real open wells and surveys (see its README for provenance)."""
    d = reference_data_dir()
    if not (d / "README.md").is_file():
        pytest.skip(f"real reference wells not found at {d} (set WELLFAULT_REFERENCE_DATA)")
    return d


def load_manifest_well(manifest, name: str):
    """(well, trajectory, tops, bed dip) of one well of a field manifest (``read_manifest``
    frame, indexed by well or not): the inputs a test runs detection on. A well without a
    survey is vertical at its surface location."""
    from wellfault.geo.dip import BedDip
    from wellfault.io import read_las, read_survey, read_tops
    from wellfault.geo.trajectory import Trajectory

    rows = manifest if manifest.index.name == "well" else manifest.set_index("well")
    row = rows.loc[name]
    w = read_las(row["las"])
    if row["survey"]:
        traj = Trajectory.from_survey(read_survey(row["survey"]), x0_m=w.x_m, y0_m=w.y_m,
                                      ref_elevation_m=w.ref_elevation_m)
    else:
        traj = Trajectory.vertical(x0_m=w.x_m, y0_m=w.y_m, ref_elevation_m=w.ref_elevation_m)
    return w, traj, read_tops(row["tops"], well=name), BedDip.parse(row["dip"])
