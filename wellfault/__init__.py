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

CAUTION = (
    "CAUTION: fault cuts are interpretations. These results are aids for a qualified "
    "geoscientist, to be checked against the logs, other wells and seismic; they are not the "
    "sole basis for drilling, well-control or completion decisions. Follow local regulations "
    "and company practice."
)

__version__ = "0.1.0"

if TYPE_CHECKING:  # what the lazy names below are, for type checkers (tests keep them equal)
    from .column import ReferenceColumn
    from .curvecuts import CurveSettings
    from .detect import WellAnalysis, analyse_well, detect_files, find_fault_cuts
    from .dip import BedDip
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
    from .measure import FaultAssumptions, FaultPlane
    from .results import CUT_COLUMNS, FaultCut, cuts_to_frame
    from .topcuts import TopsTolerance
    from .trajectory import Trajectory
    from .units import DepthUnit, parse_depth_unit
    from .well import Well

__getattr__, __dir__, _LAZY = lazy_exports(__name__, globals(), {
    ".detect": ("find_fault_cuts", "analyse_well", "detect_files", "WellAnalysis"),
    ".column": ("ReferenceColumn",),
    ".trajectory": ("Trajectory",),
    ".dip": ("BedDip",),
    ".well": ("Well",),
    ".results": ("FaultCut", "CUT_COLUMNS", "cuts_to_frame"),
    ".measure": ("FaultAssumptions", "FaultPlane"),
    ".topcuts": ("TopsTolerance",),
    ".curvecuts": ("CurveSettings",),
    ".io": ("read_las", "read_tops", "read_survey", "read_column_table", "read_dip_table",
            "read_manifest", "write_las", "write_table"),
    ".units": ("DepthUnit", "parse_depth_unit"),
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
