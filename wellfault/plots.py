"""Deprecated: ``wellfault.plots`` is now ``wellfault.viz.field_plots``,
``wellfault.viz.style``, ``wellfault.viz.well_plots``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .viz.field_plots import field_map, separation_along_strike
from .viz.style import (
    count_cut_markers, artists_with_gid, SECTION_STYLE, unit_colours, length_axis, display_unit,
)
from .viz.well_plots import correlation_panel, strat_position_plot

warn_moved(__name__, "wellfault.viz.field_plots, wellfault.viz.style, wellfault.viz.well_plots")
