"""Deprecated: ``wellfault.trajectory`` is now ``wellfault.geo.mincurve``,
``wellfault.geo.trajectory``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .geo.mincurve import minimum_curvature, ratio_factor, dogleg
from .geo.trajectory import Trajectory

warn_moved(__name__, "wellfault.geo.mincurve, wellfault.geo.trajectory")
