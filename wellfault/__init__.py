"""wellfault: find, classify and measure fault cuts in wells.

Results are interpretation aids for a qualified geoscientist to confirm against the logs, other
wells and seismic; follow local regulations and company practice.

The public names below are imported when first used (``wf.analyse_well`` imports
:mod:`wellfault.detect` then): ``import wellfault`` alone loads neither numpy nor pandas, so the
command line answers ``--help`` at once (DEVELOPERS.md, "Imports").
"""

from __future__ import annotations

from typing import TYPE_CHECKING

from ._lazy import lazy_exports
from .errors import (
    AlignmentError,
    ColumnError,
    InputError,
    SurveyError,
    UnitError,
    WellfaultError,
    WellfaultWarning,
)
from .about import CAUTION, __version__

if TYPE_CHECKING:  # what the lazy names below are, for type checkers (tests keep them equal)
    from .geo.column import ReferenceColumn
    from .evidence.curve_settings import CurveSettings
    from .evidence.detect import WellAnalysis, analyse_well, detect_files, find_fault_cuts
    from .geo.dip import BedDip
    from .io import (
        read_column_table,
        read_dip_table,
        read_las,
        read_manifest,
        read_survey,
        read_tops,
        write_las,
        write_table,
    )
    from .evidence.measure import FaultAssumptions, FaultPlane
    from .evidence.results import CUT_COLUMNS, FaultCut, cuts_to_frame
    from .evidence.topcuts import TopsTolerance
    from .geo.trajectory import Trajectory
    from .geo.units import DepthUnit, parse_depth_unit
    from .geo.well import Well


__getattr__, __dir__, _LAZY = lazy_exports(__name__, globals(), {
    ".evidence.detect": ("find_fault_cuts", "analyse_well", "detect_files", "WellAnalysis"),
    ".geo.column": ("ReferenceColumn",),
    ".geo.trajectory": ("Trajectory",),
    ".geo.dip": ("BedDip",),
    ".geo.well": ("Well",),
    ".evidence.results": ("FaultCut", "CUT_COLUMNS", "cuts_to_frame"),
    ".evidence.measure": ("FaultAssumptions", "FaultPlane"),
    ".evidence.topcuts": ("TopsTolerance",),
    ".evidence.curve_settings": ("CurveSettings",),
    ".io": (
        "read_las",
        "read_tops",
        "read_survey",
        "read_column_table",
        "read_dip_table",
        "read_manifest",
        "write_las",
        "write_table",
    ),
    ".geo.units": ("DepthUnit", "parse_depth_unit"),
})


__all__ = [
    "CAUTION",
    *_LAZY,
    "WellfaultError",
    "InputError",
    "UnitError",
    "SurveyError",
    "ColumnError",
    "AlignmentError",
    "WellfaultWarning",
]
