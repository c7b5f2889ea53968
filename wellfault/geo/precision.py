"""How many decimals written files and printed text carry: the precision the numbers hold.

The DataFrames wellfault returns keep full precision; everything turned into text for a person
or a file (CSV and Parquet tables, JSON lines, HTML reports, terminal lines) is rounded here,
by one rule per kind of number, read from the column name:

==================================  ============================  ==========================
column                              kind                          decimals (default)
==================================  ============================  ==========================
``*_m``                             depth, length, coordinate     2 (0.01 m)
``*_ft``, ``*_usft``                depth, length, coordinate     1 (0.1 ft)
``*_deg``                           angle                         1 (0.1°)
``dls_deg_per_30m``/``_per_100ft``  dogleg severity               2
``confidence``, ``fit``             a value in [0, 1]             2
``seconds``                         run time                      3
==================================  ============================  ==========================

A pick or a log sample is good to a few centimetres or a tenth of a foot (common practice: logs
are sampled every 0.1-0.15 m or 0.5 ft, survey MDs are given to 0.01 m or 0.1 ft), a survey angle
to a tenth of a degree; more digits only make a table harder to read and to compare. Columns of
other kinds (counts, names, text) are written as they are. :class:`Decimals` changes the length
rule (``--decimals N``) or switches rounding off (``--decimals full``).

Lengths inside free text that wellfault writes (cut notes, watch messages, report sentences) are
written as ``<number> m`` (ranges ``a-b m``, ``MD a and b m``) in metres;
:func:`lengths_in_text` restates them in the output unit.
"""

from __future__ import annotations

import math
import numbers
import re
from dataclasses import dataclass

from ..errors import InputError
from .units import DepthUnit, parse_depth_unit

__all__ = ["DECIMALS_HELP", "DEFAULT_DECIMALS", "FULL", "Decimals", "add_decimals_option",
           "column_decimals", "decimals_option", "format_length", "format_table",
           "lengths_in_text", "parse_decimals", "round_table", "round_value", "table_text"]

#: Length decimals by unit suffix: 0.01 m, 0.1 ft.
LENGTH_DECIMALS = {"m": 2, "ft": 1, "usft": 1}
_UNIT_SUFFIX = re.compile(r"_(m|ft|usft)$")


@dataclass(frozen=True)
class Decimals:
    """Decimals of written numbers (see the module docstring for the rules).

    Attributes
    ----------
    length : int or None
        Decimals of depths, lengths and coordinates; None: 2 in metres, 1 in feet.
    angle : int
        Decimals of angles in degrees.
    fraction : int
        Decimals of confidences and other values in [0, 1].
    full : bool
        Write every number at full precision (no rounding at all).
    """

    length: int | None = None
    angle: int = 1
    fraction: int = 2
    full: bool = False

    def __post_init__(self) -> None:
        for name in ("length", "angle", "fraction"):
            v = getattr(self, name)
            if v is not None and not (isinstance(v, numbers.Integral) and 0 <= int(v) <= 12):
                raise InputError(f"decimals for {name} must be a whole number from 0 to 12 "
                                 f"(got {v!r}); e.g. --decimals 2, or --decimals full")

    def for_length(self, unit: DepthUnit | str) -> int:
        """Decimals of a length in ``unit``."""
        if self.length is not None:
            return int(self.length)
        return LENGTH_DECIMALS[parse_depth_unit(unit).value]


#: Full precision: nothing rounded.
FULL = Decimals(full=True)
#: The default rules (0.01 m, 0.1 ft, 0.1 degree, confidence 2 decimals).
DEFAULT_DECIMALS = Decimals()


def parse_decimals(text: str | int | Decimals | None) -> Decimals:
    """``--decimals`` text: a whole number (decimals of lengths) or ``full``; None: defaults."""
    if text is None:
        return Decimals()
    if isinstance(text, Decimals):
        return text
    t = str(text).strip().lower()
    if t == "full":
        return FULL
    if not t.isdigit():
        raise InputError(f"--decimals: expected a whole number of decimals for lengths or "
                         f"'full' (got {text!r}); e.g. --decimals 3")
    return Decimals(length=int(t))


def column_decimals(name: str, decimals: Decimals = DEFAULT_DECIMALS) -> int | None:
    """Decimals of the numbers in column ``name``; None: written as they are."""
    if decimals.full:
        return None
    n = str(name).strip().lower()
    if n.startswith("dls_deg_per"):
        return 2
    if n.endswith("_deg"):
        return decimals.angle
    m = _UNIT_SUFFIX.search(n)
    if m:
        return decimals.for_length(m.group(1))
    if n in ("confidence", "fit") or n.endswith("_confidence"):
        return decimals.fraction
    if n == "seconds":
        return 3
    return None


def round_value(value, nd: int | None):
    """A number rounded to ``nd`` decimals (None: as it is); -0.0 becomes 0.0."""
    if nd is None or not isinstance(value, numbers.Real) or isinstance(value, numbers.Integral):
        return value
    v = float(value)
    return round(v, nd) + 0.0 if math.isfinite(v) else v


def round_table(df, decimals: Decimals = DEFAULT_DECIMALS):
    """A copy of DataFrame ``df``, each float column rounded by its rule (for typed formats)."""
    import pandas as pd

    out = df.copy()
    for c in out.columns:
        nd = column_decimals(c, decimals)
        if nd is not None and pd.api.types.is_float_dtype(out[c]):
            out[c] = out[c].round(nd) + 0.0
    return out


def _fixed(values, nd: int):
    import numpy as np
    import pandas as pd

    arr = values.to_numpy(dtype=float)
    ok = np.isfinite(arr)
    text = np.full(arr.shape, "", dtype=object)
    if ok.any():
        text[ok] = np.char.mod(f"%.{nd}f", np.round(arr[ok], nd) + 0.0)
    return pd.Series(text, index=values.index, dtype=object)


def format_table(df, decimals: Decimals = DEFAULT_DECIMALS):
    """A copy of DataFrame ``df``, each float column with a rule turned into text with that
    rule's fixed decimals (missing values: empty text); other columns as they are."""
    import pandas as pd

    out = df.copy()
    for c in out.columns:
        nd = column_decimals(c, decimals)
        if nd is not None and pd.api.types.is_float_dtype(out[c]):
            out[c] = _fixed(out[c], nd)
    return out


def table_text(df, decimals: Decimals = DEFAULT_DECIMALS, *, index: bool = False) -> str:
    """CSV text of DataFrame ``df``, numbers at the precision they carry (:func:`format_table`).

    This is where a table becomes text: the one place its precision is set.
    """
    return format_table(df, decimals).to_csv(index=index, lineterminator="\n")


def format_length(value_m, unit: DepthUnit | str, decimals: Decimals = DEFAULT_DECIMALS, *,
                  sign: bool = False, label: bool = True) -> str:
    """A length given in metres, written in ``unit`` with its decimals (``"9536.5 ft"``).

    ``sign``: always write the sign; ``label``: append the unit. Not finite: ``"-"``.
    """
    u = parse_depth_unit(unit)
    if value_m is None or not math.isfinite(float(value_m)):
        return "-"
    v = float(value_m) / u.metres
    nd = None if decimals.full else decimals.for_length(u)
    text = repr(v) if nd is None else f"{round(v, nd) + 0.0:{'+' if sign else ''}.{nd}f}"
    if sign and nd is None and v >= 0:
        text = "+" + text
    return f"{text} {u.suffix}" if label else text


_NUM = r"[+-]?\d+(?:\.\d+)?"
_LENGTHS = re.compile(
    rf"(?<=MD )(?P<a1>{_NUM})(?P<sep>\s+(?:and|to)\s+)(?P<b1>{_NUM}) m\b(?![/²³])"
    rf"|(?<![\w.])(?P<a>{_NUM})(?:-(?P<b>{_NUM}))? m\b(?![/²³])")


def _restate(num: str, unit: DepthUnit, decimals: Decimals) -> str:
    given = len(num.split(".")[1]) if "." in num else 0
    nd = given if decimals.full else min(given, decimals.for_length(unit)) if given else 0
    v = float(num) / unit.metres
    return f"{round(v, nd) + 0.0:{'+' if num.startswith('+') else ''}.{nd}f}"


def lengths_in_text(text: str, unit: DepthUnit | str, decimals: Decimals = DEFAULT_DECIMALS) -> str:
    """Restate the lengths in a sentence wellfault wrote (``"MD 2907.12 m"``) in ``unit``.

    wellfault's sentences state lengths in metres as ``<number> m``, ranges as ``a-b m`` or
    ``MD a and b m``; each number is converted and written with no more decimals than it had
    (nor than ``unit`` carries). In metres the text is returned unchanged.
    """
    u = parse_depth_unit(unit)
    if u is DepthUnit.M or not text or " m" not in text:
        return text

    def sub(m: re.Match) -> str:
        if m.group("a1") is not None:
            return (f"{_restate(m.group('a1'), u, decimals)}{m.group('sep')}"
                    f"{_restate(m.group('b1'), u, decimals)} {u.suffix}")
        a = _restate(m.group("a"), u, decimals)
        if m.group("b") is not None:
            return f"{a}-{_restate(m.group('b'), u, decimals)} {u.suffix}"
        return f"{a} {u.suffix}"

    return _LENGTHS.sub(sub, str(text))


#: Help text of the ``--decimals`` option (detect, screen, watch, survey).
DECIMALS_HELP = ("decimals of lengths in written tables and printed text (default 2 in metres, "
                 "1 in feet; angles 0.1 degree, confidence 2 decimals), or 'full' for full "
                 "precision")


def decimals_option(text: str) -> Decimals:
    """argparse type of ``--decimals`` (see :func:`parse_decimals`)."""
    import argparse

    try:
        return parse_decimals(text)
    except InputError as err:
        raise argparse.ArgumentTypeError(str(err).removeprefix("--decimals: ")) from None


def add_decimals_option(parser) -> None:
    """The ``--decimals N|full`` option of every command that writes numbers."""
    parser.add_argument("--decimals", type=decimals_option, default=DEFAULT_DECIMALS,
                        metavar="N|full", help=DECIMALS_HELP)
