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
