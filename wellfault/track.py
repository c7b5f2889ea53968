"""Deprecated: ``wellfault.track`` is now ``wellfault.viz.track``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .viz.track import (
    TRACK_COLUMNS, check_track, empty_track, track_from_tops, track_steps, cuts_in_metres,
    cuts_in_unit,
)

warn_moved(__name__, "wellfault.viz.track")
