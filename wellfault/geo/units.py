"""Depth units: one alias table, exact matching, conversion done once on reading.

Canonical internal length unit is the metre. The international foot is 0.3048 m exactly; the
US survey foot (1200/3937 m) is used only when the caller asks for it (``"usft"``).
"""

from __future__ import annotations

import enum
from typing import TYPE_CHECKING

if TYPE_CHECKING:  # numpy is loaded where lengths are converted, not by `wellfault --help`
    import numpy as np
    from numpy.typing import ArrayLike, NDArray

from ..errors import UnitError

__all__ = [
    "DepthUnit",
    "METRES_PER_FOOT",
    "METRES_PER_US_SURVEY_FOOT",
    "parse_depth_unit",
    "to_metres",
    "from_metres",
]

#: International foot (1959 agreement), exact.
METRES_PER_FOOT = 0.3048
#: US survey foot, exact by definition (1200/3937 m).
METRES_PER_US_SURVEY_FOOT = 1200.0 / 3937.0


class DepthUnit(enum.Enum):
    """A length unit for depths and thicknesses. ``value`` is the column-name suffix."""

    M = "m"
    FT = "ft"
    USFT = "usft"

    @property
    def metres(self) -> float:
        """Length of one unit in metres."""
        return {"m": 1.0, "ft": METRES_PER_FOOT, "usft": METRES_PER_US_SURVEY_FOOT}[self.value]

    @property
    def suffix(self) -> str:
        """Suffix for column names (``md_ft``); both foot kinds print as ``ft``."""
        return "m" if self is DepthUnit.M else "ft"


# Exact (case-insensitive, whitespace-stripped) spellings seen in LAS headers and CSV columns.
# Matching is exact on purpose: "f" or "meters below" are not guessed.
_ALIASES: dict[str, DepthUnit] = {
    **dict.fromkeys(["m", "m.", "meter", "meters", "metre", "metres", "mtr", "mtrs"], DepthUnit.M),
    **dict.fromkeys(
        ["ft", "ft.", "f", "feet", "foot", "fts", "'", "intl ft", "international foot"],
        DepthUnit.FT,
    ),
    **dict.fromkeys(["usft", "us ft", "us-ft", "ftus", "us survey foot", "us survey feet",
                     "survey ft", "sft"], DepthUnit.USFT),
}

VALID_UNITS = ("m", "ft", "usft")


def parse_depth_unit(text: str | DepthUnit | None, *, source: object = None) -> DepthUnit:
    """Return the :class:`DepthUnit` named by ``text``, matched exactly on the alias table.

    Raises
    ------
    UnitError
        When ``text`` is empty or not an exact alias; the message names ``source``.

    Examples
    --------
    >>> parse_depth_unit("FT")
    <DepthUnit.FT: 'ft'>
    >>> parse_depth_unit(" Metres ")
    <DepthUnit.M: 'm'>
    """
    if isinstance(text, DepthUnit):
        return text
    where = f"{source}: " if source is not None else ""
    if text is None or str(text).strip() == "":
        raise UnitError(
            f"{where}no depth unit given; pass the unit explicitly "
            f"(--depth-unit {'|'.join(VALID_UNITS)}, or depth_unit=...)"
        )
    key = " ".join(str(text).strip().lower().split())
    try:
        return _ALIASES[key]
    except KeyError:
        raise UnitError(
            f"{where}unknown depth unit {str(text)!r}; use one of {', '.join(VALID_UNITS)} "
            "or pass the unit explicitly"
        ) from None


def to_metres(values: ArrayLike, unit: DepthUnit | str) -> NDArray[np.float64]:
    """Convert lengths in ``unit`` to metres."""
    import numpy as np

    return np.asarray(values, dtype=float) * parse_depth_unit(unit).metres


def from_metres(values: ArrayLike, unit: DepthUnit | str) -> NDArray[np.float64]:
    """Convert lengths in metres to ``unit``."""
    import numpy as np

    return np.asarray(values, dtype=float) / parse_depth_unit(unit).metres
