"""Deprecated: ``wellfault.precision`` is now ``wellfault.geo.precision``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .geo.precision import (
    DECIMALS_HELP, DEFAULT_DECIMALS, FULL, Decimals, column_decimals, decimals_option,
    format_length, format_table, lengths_in_text, parse_decimals, round_table, round_value,
    table_text,
)

warn_moved(__name__, "wellfault.geo.precision")
