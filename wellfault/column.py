"""Deprecated: ``wellfault.column`` is now ``wellfault.geo.column``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .geo.column import ReferenceColumn

warn_moved(__name__, "wellfault.geo.column")
