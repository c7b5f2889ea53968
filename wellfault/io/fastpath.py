"""Fast paths for the small per-well tables field screening reads thousands of times.

:func:`wellfault.io.read_tops` and :func:`wellfault.io.read_survey` are forgiving parsers (BOMs,
``;`` delimiters, decimal commas, many column-name spellings, side files) built on pandas; each
call costs milliseconds, most of it pandas overhead on a 15-row file. Screening 100,000 wells
calls them twice per well, so this module parses the plain, common layout directly:

* UTF-8 without BOM, ``,`` delimited, first line the header, no quotes, no blank or ``#`` lines;
* tops: header exactly ``surface, md_<m|ft>`` or ``well, surface, md_<m|ft>`` (any order);
* surveys: header exactly ``md_<m|ft>, inc[_deg], azi[_deg]`` and no JSON side file;
* every cell a plain number where a number is due, and values the canonical reader accepts
  (no duplicated pick, MD increasing along the survey, angles in range).

Anything else — or any doubt — goes to the canonical reader, so the result (values, dtypes,
order, and every error or warning) is the canonical reader's. ``tests/test_screen.py`` checks
the two agree.

A tops table shared by many wells (a ``well`` column) is parsed once per process and kept (the
most recent file only), so screening a field from one tops file is linear, not quadratic.
"""

from __future__ import annotations

import re
import warnings
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from ..geo.units import DepthUnit, parse_depth_unit

__all__ = ["Picks", "load_picks", "load_survey_arrays", "clear_cache"]

#: Characters of plain numbers: under this set numpy's float parsing accepts exactly the
#: canonical reader's number pattern ``[+-]?(\d+\.?\d*|\.\d+)([eE][+-]?\d+)?``.
_NUMCHARS = frozenset("0123456789.+-eE")
_BAD_CHARS = re.compile('["\x00\x0b\x0c\x1c\x1d\x1e\x85\u2028\u2029]')
_UNITS = {"m": DepthUnit.M, "ft": DepthUnit.FT}


@dataclass
class Picks:
    """One well's picks as arrays; :meth:`frame` is what ``read_tops(path, well=...)`` returns."""

    well: str
    surface: np.ndarray  # object array of str
    md_m: np.ndarray
    row: np.ndarray
    source: str = ""
    warnings: tuple[str, ...] = ()

    def __len__(self) -> int:
        return int(self.md_m.size)

    def frame(self) -> pd.DataFrame:
        df = pd.DataFrame({
            "well": pd.Series([self.well] * len(self), dtype=object),
            "surface": pd.Series(list(self.surface), dtype=object),
            "md_m": np.asarray(self.md_m, dtype=float),
            "row": np.asarray(self.row, dtype=np.int64),
        })
        df.attrs["source"] = self.source
        return df

    @classmethod
    def from_frame(cls, df: pd.DataFrame, well: str, notes=(), source: str = "") -> Picks:
        return cls(str(well), df["surface"].astype(str).to_numpy(dtype=object),
                   df["md_m"].to_numpy(dtype=float), df["row"].to_numpy(dtype=np.int64),
                   str(df.attrs.get("source", source)), tuple(notes))


def _table(path: Path) -> tuple[list[str], list[str], int] | None:
    """(normalised header, flat list of stripped body cells, width) of a plain comma table,
    or None when the file is not plain (the canonical reader then reads it)."""
    try:
        data = path.read_bytes()
    except OSError:
        return None
    if not data or data.startswith((b"\xef\xbb\xbf", b"\xff\xfe", b"\xfe\xff")):
        return None
    try:
        text = data.decode("utf-8")
    except UnicodeDecodeError:
        return None
    if "\r" in text:
        text = text.replace("\r\n", "\n")
        if "\r" in text:
            return None
    if _BAD_CHARS.search(text) or "#" in text:
        return None
    lines = text.split("\n")
    if lines[-1] == "":
        lines.pop()
    if len(lines) < 2 or ";" in lines[0] or "\t" in lines[0]:
        return None
    commas = lines[0].count(",")
    for line in lines:
        if line.count(",") != commas:
            return None  # blank lines, ragged rows: the canonical reader words it
    cells = [c.strip() for c in ",".join(lines[1:]).split(",")]
    head = [" ".join(c.lower().split()) for c in lines[0].split(",")]
    return head, cells, commas + 1


def _numbers(values: list[str]) -> np.ndarray | None:
    """Floats of cells that are all plain numbers (the canonical reader's pattern), or None."""
    if not _NUMCHARS.issuperset("".join(values)):
        return None
    try:
        out = np.array(values, dtype=float)
    except ValueError:
        return None
    return out if np.all(np.isfinite(out)) else None  # 1e400: the canonical reader refuses


def _unit(suffix: str, given: DepthUnit | None) -> DepthUnit | None:
    found = _UNITS.get(suffix)
    if found is None:
        return None
    if given is None:
        return found
    feet = {DepthUnit.FT, DepthUnit.USFT}
    if given is found or (given in feet and found in feet):
        return given
    return None  # a conflict: the canonical reader words the error


def _parse_tops(path: Path, given: DepthUnit | None):
    """{well or None: (surfaces, md_m, rows)} from a plain tops table, or None."""
    t = _table(path)
    if t is None:
        return None
    head, cells, width = t
    md_cols = [k for k, h in enumerate(head) if h.startswith("md_")]
    if len(md_cols) != 1 or "surface" not in head:
        return None
    allowed = {"surface", head[md_cols[0]]} | ({"well"} if "well" in head else set())
    if set(head) != allowed or len(head) != len(allowed):
        return None
    unit = _unit(head[md_cols[0]][3:], given)
    if unit is None:
        return None
    md = _numbers(cells[md_cols[0]::width])
    if md is None:
        return None
    md = md * unit.metres
    surfaces = cells[head.index("surface")::width]
    if not all(surfaces):
        return None
    if "well" in head:
        wells = cells[head.index("well")::width]
        if not all(wells):
            return None
    else:
        wells = [None] * len(surfaces)
    if len(set(zip(wells, surfaces, md.tolist()))) != len(surfaces):
        return None  # repeated picks: the canonical reader warns and drops them
    line = np.arange(2, len(surfaces) + 2, dtype=np.int64)
    s_arr = np.array(surfaces, dtype=object)
    if "well" not in head:
        order = np.argsort(md, kind="stable")
        return {None: (s_arr[order], md[order], line[order])}
    groups: dict[str | None, list[int]] = {}
    for k, w in enumerate(wells):
        groups.setdefault(w, []).append(k)
    out = {}
    for w, idx in groups.items():
        idx = np.asarray(idx)
        order = idx[np.argsort(md[idx], kind="stable")]
        out[w] = (s_arr[order], md[order], line[order])
    return out


_CACHE: dict = {"key": None, "value": None}


def clear_cache() -> None:
    """Forget the cached shared tops table (tests use this)."""
    _CACHE["key"] = None
    _CACHE["value"] = None


def _file_key(path: Path, given):
    st = path.stat()
    return (str(path), st.st_mtime_ns, st.st_size, given)


def load_picks(path, well: str, depth_unit: DepthUnit | str | None = None) -> Picks:
    """One well's picks from a tops table (per-well file or one shared by many wells).

    Same result as ``read_tops(path, depth_unit=depth_unit, well=well)``; warnings the canonical
    reader raises are re-emitted (and listed in :attr:`Picks.warnings`).
    """
    from . import read_tops

    p = Path(path)
    given = parse_depth_unit(depth_unit) if depth_unit is not None else None
    try:
        key = _file_key(p, given)
    except OSError:
        key = None
    if key is not None and _CACHE["key"] == key:
        table = _CACHE["value"]
    else:
        table = _parse_tops(p, given) if key is not None else None
        if table is not None and None not in table and len(table) > 1:
            _CACHE["key"], _CACHE["value"] = key, ("fast", table)
            table = ("fast", table)
        elif table is not None:
            table = ("fast", table)
        else:
            table = None
    if table is not None and table[0] == "fast":
        groups = table[1]
        if None in groups:  # no well column: every pick is this well's
            s, md, line = groups[None]
            return Picks(str(well), s, md, line, str(p))
        if str(well) in groups:
            s, md, line = groups[str(well)]
            return Picks(str(well), s, md, line, str(p))
        # not in the table: the canonical reader raises the error
        return Picks.from_frame(read_tops(p, depth_unit=given, well=well), well)
    if table is not None and table[0] == "frame":
        frames, notes = table[1]
        if str(well) in frames:
            return Picks.from_frame(frames[str(well)], well, source=str(p))
        return Picks.from_frame(read_tops(p, depth_unit=given, well=well), well)
    # the canonical reader; a shared table is read whole once and kept
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        whole = read_tops(p, depth_unit=given)
    notes = tuple(str(w.message) for w in caught)
    names = list(dict.fromkeys(whole["well"].astype(str)))
    if len(names) > 1 and key is not None:
        frames = {n: g.reset_index(drop=True) for n, g in whole.groupby("well", sort=False)}
        _CACHE["key"], _CACHE["value"] = key, ("frame", (frames, notes))
        if str(well) in frames:
            _reemit(notes)
            return Picks.from_frame(frames[str(well)], well, notes, str(p))
    with warnings.catch_warnings(record=True) as caught:
        warnings.simplefilter("always")
        df = read_tops(p, depth_unit=given, well=well)
    notes = tuple(str(w.message) for w in caught)
    _reemit(notes)
    return Picks.from_frame(df, well, notes, str(p))


def _reemit(notes) -> None:
    from ..errors import WellfaultWarning

    for n in notes:
        warnings.warn(n, WellfaultWarning, stacklevel=3)


def load_survey_arrays(path, depth_unit: DepthUnit | str | None = None
                       ) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """(md_m, inc_deg, azi_deg) of a survey; the same values as ``read_survey``."""
    from . import read_survey

    p = Path(path)
    given = parse_depth_unit(depth_unit) if depth_unit is not None else None
    fast = None
    if not p.with_suffix(".json").exists():
        fast = _parse_survey(p, given)
    if fast is not None:
        return fast
    df = read_survey(p, depth_unit=given)
    return (df["md_m"].to_numpy(float), df["inc_deg"].to_numpy(float),
            df["azi_deg"].to_numpy(float))


def _parse_survey(path: Path, given: DepthUnit | None):
    t = _table(path)
    if t is None:
        return None
    head, cells, width = t
    if width != 3:
        return None
    md_cols = [k for k, h in enumerate(head) if h.startswith("md_")]
    inc_cols = [k for k, h in enumerate(head) if h in ("inc", "inc_deg")]
    azi_cols = [k for k, h in enumerate(head) if h in ("azi", "azi_deg")]
    if not (len(md_cols) == len(inc_cols) == len(azi_cols) == 1):
        return None
    unit = _unit(head[md_cols[0]][3:], given)
    if unit is None:
        return None
    values = _numbers(cells)
    if values is None:
        return None
    values = values.reshape(-1, 3)
    md, inc, azi = values[:, md_cols[0]], values[:, inc_cols[0]], values[:, azi_cols[0]]
    if (md.size > 1 and np.any(np.diff(md) <= 0)) or np.any((inc < 0) | (inc > 180)) or \
            np.any((azi < 0) | (azi > 360)):
        return None
    azi = np.where(azi == 360.0, 0.0, azi)
    return md * unit.metres, inc.copy(), azi
