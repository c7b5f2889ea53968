"""Deprecated: ``wellfault.screen`` is now ``wellfault.field.screen``,
``wellfault.field.screen_output``, ``wellfault.field.screen_well``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .field.screen import screen_wells, NEIGHBOUR_TOLERANCE
from .field.screen_output import ScreenResult, ERROR_COLUMNS, WELL_COLUMNS, OUTPUT_FILES
from .field.screen_well import WellTask

warn_moved(__name__, "wellfault.field.screen, wellfault.field.screen_output, wellfault.field.screen_well")
