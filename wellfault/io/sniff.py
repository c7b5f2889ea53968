"""CSV text as found in the wild: bytes, encodings, delimiters, decimal commas, null cells,
numbers."""

from __future__ import annotations

import csv
import io
import os
import re
import warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd
from numpy.typing import NDArray

from ..errors import InputError, WellfaultWarning, input_error

__all__ = ["read_table"]


PathLike = str | os.PathLike


_NULL_TEXT = frozenset(["", "nan", "na", "n/a", "null", "none", "-"])


_NUMBER = r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?"


_COMMA_NUMBER = re.compile(r"^([+-]?\d*),(\d+(?:[eE][+-]?\d+)?)$")


_TRUE_TEXT = frozenset(["yes", "y", "true", "t", "1", "x"])


_FALSE_TEXT = frozenset(["no", "n", "false", "f", "0", ""])


# --------------------------------------------------------------------------------------------
# the parser


@dataclass
class _RawTable:
    """All cells as stripped strings ('' when empty); index = 1-based line number in the file."""

    frame: pd.DataFrame
    source: str
    path: Path
    delimiter: str
    decimal_comma: bool


def _read_bytes(path: PathLike) -> tuple[Path, bytes]:
    p = Path(path)
    if not p.exists():
        raise InputError(f"{p}: file not found; check the path")
    if p.is_dir():
        raise InputError(f"{p}: is a folder, not a file; give the path of the file")
    try:
        return p, p.read_bytes()
    except OSError as err:
        raise InputError(f"{p}: cannot be read ({err.strerror}); check the permissions") from err


def _decode(data: bytes, source: object) -> str:
    """Text of a file: BOMs honoured, UTF-8 first, Windows-1252 as a warned fallback."""
    if data.startswith((b"\xff\xfe", b"\xfe\xff")):
        try:
            return data.decode("utf-16")
        except UnicodeDecodeError as err:
            raise InputError(
                f"{source}: starts with a UTF-16 byte-order mark but is not valid UTF-16; "
                "save it again as UTF-8 text"
            ) from err
    if b"\x00" in data[:65536]:
        raise InputError(
            f"{source}: looks binary (contains NUL bytes), not text; give the exported text file "
            "(CSV or LAS), not a spreadsheet or compressed file"
        )
    if data.startswith(b"\xef\xbb\xbf"):
        data = data[3:]
    try:
        return data.decode("utf-8")
    except UnicodeDecodeError:
        warnings.warn(
            f"{source}: not valid UTF-8; read as Windows-1252 (Latin-1) text. Save the file as "
            "UTF-8 to silence this",
            WellfaultWarning,
            stacklevel=3,
        )
        return data.decode("cp1252", errors="replace")


def _sniff_delimiter(header_line: str) -> str:
    """The delimiter used in the header line: the most frequent of ``,`` ``;`` tab."""
    unquoted = re.sub(r'"[^"]*"', "", header_line)
    counts = {d: unquoted.count(d) for d in (",", ";", "\t")}
    best = max(counts, key=lambda d: counts[d])
    return best if counts[best] > 0 else ","


def _normalise_name(name: str) -> str:
    return " ".join(name.replace("\ufeff", "").strip().lower().split())


def _cells_fast(text: str, delimiter: str, header_line: int, width: int) -> pd.DataFrame | None:
    """Cells after the header through pandas' C parser, or None to use the exact csv path.

    Used only when the text has no quote characters, so that every physical line is one row
    and the row's line number is known. Rows longer than the header, or any parser error, fall
    back to the csv path, which names the offending line.
    """
    if '"' in text:
        return None
    try:
        frame = pd.read_csv(io.StringIO(text), sep=delimiter, header=None, dtype=str,
                            na_filter=False, skip_blank_lines=False, skiprows=header_line,
                            engine="c", quoting=csv.QUOTE_NONE)
    except pd.errors.EmptyDataError:
        return pd.DataFrame({k: pd.Series([], dtype=object) for k in range(width)},
                            index=pd.Index([], name="line", dtype=np.int64))
    except (pd.errors.ParserError, ValueError):
        return None
    if frame.shape[1] > width:
        extra = frame.iloc[:, width:].astype(object)
        if (extra.apply(lambda c: c.str.strip()) != "").any().any():
            return None
        frame = frame.iloc[:, :width]
    for k in range(frame.shape[1], width):
        frame[k] = ""
    frame.columns = range(width)
    frame.index = pd.Index(header_line + 1 + np.arange(len(frame)), name="line", dtype=np.int64)
    return frame


def _read_raw(path: PathLike) -> _RawTable:
    p, data = _read_bytes(path)
    source = str(p)
    if not data.strip():
        raise InputError(f"{source}: file is empty; give a table with a header line and rows")
    text = _decode(data, source)
    first = re.search(r"^[ \t]*([^\s#].*)$", text, flags=re.MULTILINE)
    if first is None:
        raise InputError(f"{source}: no header line (only blank or # comment lines); add one")
    delimiter = _sniff_delimiter(first.group(1))
    reader = csv.reader(io.StringIO(text, newline=""), delimiter=delimiter)
    header: list[str] | None = None
    header_line = 1
    rows: list[list[str]] = []
    line_numbers: list[int] = []
    try:
        for cells in reader:
            stripped = [c.strip() for c in cells]
            if any(stripped) and not stripped[0].startswith("#"):
                header, header_line = stripped, reader.line_num
                break
        if header is None:
            raise InputError(f"{source}: no header line found; add a header line naming the "
                             "columns")
        width = len(header)
        fast = _cells_fast(text, delimiter, header_line, width)
        keep, number = rows.append, line_numbers.append
        for cells in ([] if fast is not None else reader):
            n = len(cells)
            if n != width:
                if n > width:
                    if any(c.strip() for c in cells[width:]):
                        raise input_error(
                            f"line has {n} fields but the header has {width}",
                            source=source,
                            row=reader.line_num,
                            fix=f"quote text that contains the delimiter {delimiter!r} or fix "
                                "the row",
                        )
                    cells = cells[:width]
                else:
                    cells = cells + [""] * (width - n)
            keep(cells)
            number(reader.line_num)
    except csv.Error as err:
        raise input_error(
            f"cannot be parsed as a table ({err})", source=source, row=reader.line_num,
            fix="check the quoting of that line",
        ) from err
    names = [_normalise_name(h) or f"unnamed_{k + 1}" for k, h in enumerate(header)]
    seen: set[str] = set()
    for name in names:
        if name in seen:
            raise input_error(
                f"column name {name!r} appears twice in the header", source=source,
                row=header_line, fix="give every column a unique name",
            )
        seen.add(name)
    if fast is not None and len(fast):
        frame = fast
        frame.columns = names
    elif rows:
        frame = pd.DataFrame(rows, columns=names, dtype=object)
        frame.index = pd.Index(line_numbers, name="line", dtype=np.int64)
    else:
        frame = None
    if frame is not None:
        for name in names:
            frame[name] = frame[name].astype(object).str.strip()
        frame = frame[(frame != "").any(axis=1)]
    else:
        frame = pd.DataFrame({n: pd.Series([], dtype=object) for n in names},
                             index=pd.Index([], name="line", dtype=np.int64))
    return _RawTable(frame, source, p, delimiter, delimiter == ";")


def _numeric_mask(values: pd.Series, decimal_comma: bool) -> tuple[pd.Series, pd.Series]:
    """Cleaned text and a mask of cells that are numbers (blank/NaN-like cells excluded)."""
    text = values.astype(object).fillna("").astype(str)
    if decimal_comma:
        text = text.str.replace(_COMMA_NUMBER, r"\1.\2", regex=True)
    is_number = text.str.fullmatch(_NUMBER)
    return text, is_number.fillna(False).astype(bool)


def _is_null_text(values: pd.Series) -> pd.Series:
    return values.astype(object).fillna("").astype(str).str.strip().str.lower().isin(_NULL_TEXT)


def _to_float(
    raw: _RawTable,
    col: str,
    *,
    what: str,
    required: bool = True,
    cls: type[InputError] = InputError,
    fix: str | None = None,
) -> NDArray[np.float64]:
    """Numbers of one column; text raises naming the line and value, blanks are NaN or raise."""
    values = raw.frame[col]
    text, is_number = _numeric_mask(values, raw.decimal_comma)
    is_null = _is_null_text(values)
    bad = ~is_number & ~is_null
    if bad.any():
        line = bad.index[int(np.argmax(bad.to_numpy()))]
        raise input_error(
            f"{what} in column {col!r} is not a number",
            source=raw.source,
            row=line,
            value=str(values.loc[line]),
            fix=fix or "write plain numbers (decimal point, or decimal comma with ';' delimiter)",
            cls=cls,
        )
    if required and is_null.any():
        line = is_null.index[int(np.argmax(is_null.to_numpy()))]
        raise input_error(
            f"{what} in column {col!r} is missing",
            source=raw.source,
            row=line,
            fix="fill in the value or delete the row",
            cls=cls,
        )
    out = np.full(len(values), np.nan)
    mask = is_number.to_numpy()
    out[mask] = text.to_numpy()[mask].astype(float)
    huge = mask & ~np.isfinite(out)
    if huge.any():  # digits that overflow a float, e.g. 1e400
        line = values.index[int(np.argmax(huge))]
        raise input_error(
            f"{what} in column {col!r} is too large to be a number", source=raw.source,
            row=line, value=str(values.loc[line]), fix="correct the value", cls=cls,
        )
    return out


def _text(raw: _RawTable, col: str) -> list[str]:
    return [str(v) for v in raw.frame[col].tolist()]


def read_table(path: PathLike) -> pd.DataFrame:
    """Read a CSV-like table robustly.

    Parameters
    ----------
    path : str or PathLike
        Text table. UTF-8 with or without BOM (UTF-16 with a BOM), delimiter ``,`` ``;`` or tab
        (taken from the header line), decimal commas accepted when the delimiter is ``;``.

    Returns
    -------
    DataFrame
        Column names stripped and lower-cased. Columns whose every non-blank cell is a number are
        float (NaN for blanks); the others keep the text. The index, named ``line``, is the
        1-based line number of each row in the file, for messages.

    Raises
    ------
    InputError
        File missing, empty, binary, with a row longer than the header, or repeated column
        names.
    """
    raw = _read_raw(path)
    out = {}
    for col in raw.frame.columns:
        values = raw.frame[col]
        text, is_number = _numeric_mask(values, raw.decimal_comma)
        is_null = _is_null_text(values)
        if len(values) and bool((is_number | is_null).all()) and bool(is_number.any()):
            out[col] = _to_float(raw, col, what=col, required=False)
        else:
            out[col] = values.where(values != "", None)
    return pd.DataFrame(out, index=raw.frame.index)
