"""Deprecated: ``wellfault.report`` is now ``wellfault.viz.html``, ``wellfault.viz.report``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .viz.html import cut_table_html, error_table_html
from .viz.report import (
    well_report, write_well_report, field_report, write_field_report, PROGRESS_MIN_WELLS,
)

warn_moved(__name__, "wellfault.viz.html, wellfault.viz.report")
