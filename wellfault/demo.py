"""Deprecated: ``wellfault.demo`` is now ``wellfault.synth.demo``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .synth.demo import run_demo, field_planes, locate_field, detect_field

warn_moved(__name__, "wellfault.synth.demo")
