"""The warning an old module path gives: kept for one release after the package was
laid out along its data flow (DEVELOPERS.md, "Architecture map")."""

import warnings


def warn_moved(old: str, new: str) -> None:
    """Warn, as the importer's own line, that module ``old`` now lives at ``new``."""
    warnings.warn(f"{old} is deprecated and will be removed in the next release; import from "
                  f"{new} instead", DeprecationWarning, stacklevel=3)
