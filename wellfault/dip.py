"""Deprecated: ``wellfault.dip`` is now ``wellfault.geo.dip``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .geo.dip import BedDip, bed_normal_vector

warn_moved(__name__, "wellfault.geo.dip")
