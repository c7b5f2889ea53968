"""wellfault: find, classify and measure fault cuts in wells.

Results are interpretation aids for a qualified geoscientist to confirm against the logs, other
wells and seismic; follow local regulations and company practice.
"""

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

__version__ = "0.1.0"

CAUTION = (
    "CAUTION: fault cuts are interpretations. These results are aids for a qualified "
    "geoscientist, to be checked against the logs, other wells and seismic; they are not the "
    "sole basis for drilling, well-control or completion decisions. Follow local regulations "
    "and company practice."
)

__all__ = [
    "CAUTION",
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
