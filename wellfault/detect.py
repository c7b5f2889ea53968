"""Deprecated: ``wellfault.detect`` is now ``wellfault.evidence.detect``.

Kept for one release; import from the new place."""

from ._moved import warn_moved
from .evidence.detect import WellAnalysis, analyse_well, find_fault_cuts, detect_files, load_column

warn_moved(__name__, "wellfault.evidence.detect")
