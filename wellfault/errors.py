"""The exception and warning types wellfault raises on purpose.

Every message says what is wrong, where (file, row, item, depth), the bad value, and the fix.
The command line catches :class:`WellfaultError` and prints its message on one line; any other
exception reaching the user is a bug.
"""

from __future__ import annotations

__all__ = [
    "WellfaultError",
    "InputError",
    "UnitError",
    "SurveyError",
    "ColumnError",
    "AlignmentError",
    "WellfaultWarning",
    "input_error",
]


class WellfaultError(Exception):
    """Base class for every error wellfault raises on purpose."""


class InputError(WellfaultError, ValueError):
    """A file, table or argument that cannot be read or used as given."""


class UnitError(InputError):
    """A depth unit that is missing, unknown or in conflict with another."""


class SurveyError(InputError):
    """A deviation survey or trajectory that cannot be used."""


class ColumnError(InputError):
    """A reference column (surface table or type well) that cannot be used."""


class AlignmentError(WellfaultError, RuntimeError):
    """The log alignment could not be run on the inputs given."""


class WellfaultWarning(UserWarning):
    """A recoverable data problem; wellfault did something sensible and says what."""


def input_error(
    what: str,
    *,
    source: object = None,
    row: object = None,
    value: object = None,
    fix: str | None = None,
    cls: type[InputError] = InputError,
) -> InputError:
    """Build an error whose message names the source, row, bad value and fix.

    >>> str(input_error("inclination outside 0-180", source="s.csv", row=4, value=181.0,
    ...                 fix="check the column order (md, inc, azi)", cls=SurveyError))
    's.csv, row 4: inclination outside 0-180 (got 181.0); check the column order (md, inc, azi)'
    """
    where = []
    if source is not None:
        where.append(str(source))
    if row is not None:
        where.append(f"row {row}")
    text = ", ".join(where)
    text = f"{text}: {what}" if text else what
    if value is not None:
        text += f" (got {value!r})" if isinstance(value, str) else f" (got {value})"
    if fix:
        text += f"; {fix}"
    return cls(text)
