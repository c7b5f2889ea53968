"""A LAS file's text scanned before lasio reads it: sections, data shape, the fast data path,
header items and the depth unit."""

from __future__ import annotations

import functools
import io
import math
import re
from dataclasses import dataclass

import lasio
import numpy as np
import pandas as pd
from numpy.typing import NDArray

from ..errors import InputError

# --------------------------------------------------------------------------------------------
# reading


@dataclass
class _Scan:
    """What a plain text pass finds before lasio parses the file."""

    source: str
    header_text: str  # everything before the ~A line
    data_text: str  # the ~A section's body
    a_line: int  # 1-based line number of the ~A marker
    wrapped: bool
    n_curves: int  # non-comment lines of the ~Curve section

    @functools.cached_property
    def data_lines(self) -> list[int]:
        """1-based file line number of each data line (blank and # lines skipped)."""
        return [self.a_line + 1 + k for k, ln in enumerate(self.data_text.splitlines())
                if _is_data_line(ln)]

    def data_rows(self) -> list[tuple[int, str]]:
        lines = self.data_text.splitlines()
        return [(n, lines[n - self.a_line - 1]) for n in self.data_lines]


def _is_data_line(line: str) -> bool:
    """A line of the ~A section that holds values (not blank, not a # comment)."""
    return bool(line.strip()) and not line.lstrip().startswith("#")


_SECTION = re.compile(r"^[ \t]*~(.?)", flags=re.MULTILINE)


_FIRST_CONTENT = re.compile(r"^[ \t]*([^\s#].*)$", flags=re.MULTILINE)


_RUN_ON = re.compile(r"\d-\d|\.\d*\.")


def _scan(text: str, source: str) -> _Scan:
    """Check the section layout and split the file into header and ~A body."""
    first = _FIRST_CONTENT.search(text)
    if first is None:
        raise InputError(f"{source}: file has no content (only blank or comment lines); give a "
                         "LAS 2.0 file")
    if not first.group(1).startswith("~"):
        line = text.count("\n", 0, first.start()) + 1
        raise InputError(
            f"{source}: not a LAS file: line {line} should start a section such as "
            f"~Version (got {first.group(1).strip()[:40]!r}); give a LAS 2.0 file, or read tables "
            "with read_table"
        )
    sections = [(m.start(), m.group(1).upper()) for m in _SECTION.finditer(text)]
    letters = [sec for _, sec in sections]
    if "A" not in letters:
        raise InputError(
            f"{source}: no ~A (data) section: the file is header-only or was cut off; export the "
            "log again with its data"
        )
    if "C" not in letters:
        raise InputError(
            f"{source}: no ~Curve section, so the columns have no names or depth unit; add a "
            "~Curve section listing the depth curve (with its unit) and each log curve"
        )

    def body(letter: str) -> str:
        idx = letters.index(letter)
        start = text.find("\n", sections[idx][0])
        start = len(text) if start < 0 else start + 1
        end = sections[idx + 1][0] if idx + 1 < len(sections) else len(text)
        return text[start:end] if start < end else ""

    def content(chunk: str) -> list[str]:
        return [ln for ln in chunk.splitlines() if ln.strip() and not ln.lstrip().startswith("#")]

    wrapped = False
    if "V" in letters:
        for ln in content(body("V")):
            m = re.match(r"\s*WRAP\s*\.\s*([^\s:]*)", ln, flags=re.IGNORECASE)
            if m:
                wrapped = m.group(1).upper() in ("YES", "Y", "TRUE")
            m = re.match(r"\s*VERS\s*\.\s*([^\s:]*)", ln, flags=re.IGNORECASE)
            if m and m.group(1).startswith("3"):
                raise InputError(
                    f"{source}: LAS version {m.group(1)} is not supported; export the log as "
                    "LAS 2.0 (or 1.2)"
                )
    n_curves = len(content(body("C")))
    if n_curves == 0:
        raise InputError(f"{source}: the ~Curve section is empty; list the depth curve and each "
                         "log curve")
    a_idx = letters.index("A")
    a_pos = sections[a_idx][0]
    a_line = text.count("\n", 0, a_pos) + 1
    if a_idx + 1 < len(sections):  # LAS 2.0: ~A is the last section; rows after are lost
        after = sections[a_idx + 1][0]
        if _FIRST_CONTENT.search(_SECTION.sub("#", text[after:])):
            line = text.count("\n", 0, after) + 1
            marker = text[after:].split("\n", 1)[0]
            raise InputError(
                f"{source}, line {line}: section {marker.strip()[:30]!r} follows the ~A (data) "
                f"section of line {a_line}, which must be the last section of a LAS file, so "
                "what follows it would be lost; move that section above ~A, or join a second "
                "data block into the first"
            )
    scan = _Scan(source, text[:a_pos], body("A"), a_line, wrapped, n_curves)
    # stops at the first data line: the line numbers are only needed for messages
    if not any(_is_data_line(ln) for ln in scan.data_text.splitlines()):
        raise InputError(f"{source}: the ~A section (line {a_line}) has no data rows; the file "
                         "is header-only or was cut off; export the log again with its data")
    return scan


def _check_data_shape(scan: _Scan) -> None:
    """Raise on truncated, ragged or wrapped-but-undeclared data (the slow, exact check)."""
    source, n_curves = scan.source, scan.n_curves
    rows = scan.data_rows()
    if scan.wrapped:
        total = sum(len(ln.split()) for _, ln in rows)
        if total % n_curves:
            raise InputError(
                f"{source}: the wrapped ~A section holds {total} values, not a whole number of "
                f"depth steps of {n_curves} curves; the file looks cut off (last line "
                f"{rows[-1][0]}); export it again or delete the incomplete last step"
            )
        return
    if any('"' in ln for _, ln in rows[:50]):
        return  # quoted text cells: leave the splitting to lasio
    for k, (line, ln) in enumerate(rows):
        got = len(ln.split())
        if got == n_curves:
            continue
        if _RUN_ON.search(ln):
            return  # numbers run together in fixed-width columns: lasio's read policy splits them
        if k == len(rows) - 1 and got < n_curves:
            raise InputError(
                f"{source}: the last data line (line {line}) has {got} of {n_curves} values: the "
                "file looks cut off; export it again or delete the incomplete last line"
            )
        if got < n_curves:
            raise InputError(
                f"{source}, line {line}: {got} values where the ~Curve section lists {n_curves} "
                "curves; the data lines look wrapped or ragged while the header says WRAP. NO; "
                "export the log unwrapped (one line per depth) or set WRAP. YES"
            )
        raise InputError(
            f"{source}, line {line}: {got} values but the ~Curve section lists only {n_curves} "
            "curves; add the missing curve definitions to ~Curve or remove the extra column"
        )


def _fast_data(scan: _Scan, n_curves: int) -> NDArray[np.float64] | None:
    """The ~A block as a float array when it is plain numbers in tidy rows, else None."""
    if scan.wrapped or n_curves != scan.n_curves:
        return None
    try:
        data = np.loadtxt(io.StringIO(scan.data_text), dtype=np.float64, comments="#", ndmin=2)
    except ValueError:
        return None
    if data.ndim != 2 or data.shape[1] != n_curves:
        return None
    return data


def _items(las: lasio.LASFile) -> dict[str, lasio.HeaderItem]:
    """Header items of ~Well then ~Parameter by upper-case mnemonic (~Well wins)."""
    out: dict[str, lasio.HeaderItem] = {}
    for section in ("Well", "Parameter"):
        sec = las.sections.get(section)
        if sec is None:
            continue
        for item in sec:
            out.setdefault(str(item.mnemonic).strip().upper(), item)
    return out


def _number(value: object) -> float | None:
    try:
        x = float(str(value).strip())
    except (TypeError, ValueError):
        return None
    return x if math.isfinite(x) else None


def _is_text_cell(values: pd.Series) -> pd.Series:
    s = values.astype(object)
    text = s.fillna("").astype(str).str.strip().str.lower()
    return s.notna() & ~text.isin(["", "nan"])


def _row_where(scan: _Scan, k: int) -> str:
    """'data row k+1 (line L)' for messages."""
    if not scan.wrapped and k < len(scan.data_lines):
        return f"data row {k + 1} (line {scan.data_lines[k]})"
    return f"data row {k + 1}"


def _curve_values(curve: lasio.CurveItem, *, source: str, is_index: bool,
                  scan: _Scan) -> tuple[NDArray[np.float64], int]:
    """Float values of a curve and how many text cells became NaN."""
    data = np.asarray(curve.data)
    if data.dtype.kind in "fiu":
        return data.astype(np.float64, copy=True), 0
    raw = pd.Series(data, dtype=object)
    num = pd.to_numeric(raw, errors="coerce")
    text = num.isna() & _is_text_cell(raw)
    if is_index and text.any():
        k = int(np.argmax(text.to_numpy()))
        raise InputError(
            f"{source}, {_row_where(scan, k)}: depth {str(raw.iloc[k])!r} is not a number; fix "
            "or delete that row"
        )
    if text.any() and not num.notna().any():
        raise InputError(
            f"{source}: curve {curve.mnemonic!r} holds text, not numbers (e.g. "
            f"{str(raw[text].iloc[0])!r}); remove the curve or convert it to numbers"
        )
    return num.to_numpy(dtype=np.float64, copy=True), int(text.sum())
