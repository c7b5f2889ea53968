"""wellfault: find, classify and measure fault cuts in wells.

Results are interpretation aids for a qualified geoscientist to confirm against the logs, other
wells and seismic; follow local regulations and company practice.
"""

CAUTION = (
    "CAUTION: fault cuts are interpretations. These results are aids for a qualified "
    "geoscientist, to be checked against the logs, other wells and seismic; they are not the "
    "sole basis for drilling, well-control or completion decisions. Follow local regulations "
    "and company practice."
)

__version__ = "0.1.0"

from .errors import (
    AlignmentError,
    ColumnError,
    InputError,
    SurveyError,
    UnitError,
    WellfaultError,
    WellfaultWarning,
)
from .units import DepthUnit, parse_depth_unit
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
from .well import Well

__version__ = "0.1.0"


__all__ = [
    "CAUTION",
    "find_fault_cuts",
    "analyse_well",
    "detect_files",
    "WellAnalysis",
    "ReferenceColumn",
    "Trajectory",
    "BedDip",
    "Well",
    "FaultCut",
    "FaultAssumptions",
    "FaultPlane",
    "TopsTolerance",
    "CurveSettings",
    "CUT_COLUMNS",
    "cuts_to_frame",
    "read_las",
    "read_tops",
    "read_survey",
    "read_column_table",
    "read_dip_table",
    "read_manifest",
    "write_las",
    "write_table",
    "DepthUnit",
    "parse_depth_unit",
    "WellfaultError",
    "InputError",
    "UnitError",
    "SurveyError",
    "ColumnError",
    "AlignmentError",
    "WellfaultWarning",
]
