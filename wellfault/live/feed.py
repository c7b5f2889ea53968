"""Follow a log that grows while the well is drilled: a LAS 2.0 or CSV file, or lines of text.

:class:`LogLineParser` turns complete text lines into depth rows: for LAS it reads the header
once (up to the ``~A`` line: depth unit, NULL value, curve names, well facts — through
:func:`wellfault.io.read_las`, so units and elevations are resolved exactly as for a finished
file), then splits the ``~A`` rows; for CSV it reads the header line (delimiter, depth column and
its unit from the name, ``md_ft`` / ``depth [m]``, or the given unit), then the rows. Depths are
converted to metres here, once.

:class:`GrowingFile` follows a file on disk by polling: each :meth:`GrowingFile.poll` reads the
bytes appended since the last one and hands only *complete* lines (ending in a line feed) to the
parser; a partly written last line stays unread until its line end arrives (at the end of input,
``poll(final=True)``, it is used when it holds a whole row, else reported and ignored). It also
notices a file that was rewritten — replaced by a new file, shrunk, or changed in place where it
was last read — and then reads it again from the top (the rows come again; the watcher compares
them with what it has, see :mod:`wellfault.live.watch`).

What is odd in the data never stops the feed; it is reported in :attr:`FeedRows.notices`, each
kind of problem a few times and then at growing counts (no flood of messages): rows with the
wrong number of values or no depth (skipped), text cells and undeclared null markers
(-999.25, -9999, -999: read as null), a header that cannot be used after a rewrite (waits for a
usable one). Declared nulls are not reported: they are normal.
"""

from __future__ import annotations

import math
import os
import queue
import re
import tempfile
import threading
import warnings
from collections.abc import Iterable, Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np

from ..errors import InputError, UnitError, WellfaultError
from ..io.headers import split_unit_suffix
from ..geo.units import DepthUnit, parse_depth_unit

__all__ = ["FeedRows", "LogLineParser", "GrowingFile", "LineStream", "COMMON_NULLS"]

#: Null markers read as missing in any curve, declared or not.
COMMON_NULLS = (-999.25, -9999.0, -999.0)
_NULL_TEXT = {"", "nan", "na", "n/a", "null", "none", "-", "--"}
_DEPTH_NAMES = ("md", "depth", "dept", "measured depth", "measured_depth", "tdep", "md depth")


@dataclass
class FeedRows:
    """Rows read by one poll: ``md_m`` (n,), ``values`` (n, C) in the order of
    :attr:`LogLineParser.curves`, NaN = null; ``notices``: what was odd, in words;
    ``restarted``: the source was rewritten and is being read again from the top."""

    md_m: np.ndarray
    values: np.ndarray
    notices: list[str] = field(default_factory=list)
    restarted: bool = False

    def __len__(self) -> int:
        return int(self.md_m.shape[0])


class _Throttle:
    """Counts one kind of problem; says so at the 1st-5th, 10th, 100th, 1000th... time."""

    def __init__(self) -> None:
        self.count = 0

    def hit(self) -> bool:
        self.count += 1
        c = self.count
        return c <= 5 or (c >= 10 and 10 ** round(math.log10(c)) == c)


class LogLineParser:
    """Complete text lines of a LAS 2.0 or CSV log in, depth rows out (see module docstring).

    Parameters
    ----------
    source : str
        Name of the source, used in messages.
    curves : sequence of str, optional
        Curves to return, matched case-insensitively (default: every curve).
    depth_unit : DepthUnit or str, optional
        Unit of a file that states none (never guessed); when the file states one they must
        agree.
    kind : {"las", "csv"}, optional
        Format; by default the first non-blank line decides (``~`` starts a LAS file).
    """

    def __init__(self, source: str, *, curves: Sequence[str] | None = None,
                 depth_unit: DepthUnit | str | None = None, kind: str | None = None) -> None:
        self.source = str(source)
        self.wanted = None if curves is None else [str(c) for c in curves]
        self.given_unit = parse_depth_unit(depth_unit) if depth_unit is not None else None
        self.kind = kind
        self.ready = False               # header parsed
        self.depth_unit: DepthUnit | None = None
        self.curve_names: tuple[str, ...] = ()   # every curve of the file (depth excluded)
        self.curves: tuple[str, ...] = ()        # the curves returned, in order
        self.well_name = Path(self.source).stem if self.source not in ("-", "<stdin>") else "well"
        self.ref_elevation_m: float | None = None
        self.x_m: float | None = None
        self.y_m: float | None = None
        self._header: list[str] = []
        self._line_no = 0
        self._cols: list[int] = []
        self._width = 0
        self._null: float | None = None
        self._delim: str | None = None
        self._decimal_comma = False
        self._units_row_checked = False
        self._order: list[int] | None = None
        self._bad = _Throttle()
        self._text = _Throttle()
        self._nulls_seen: set[float] = set()

    # -- header -------------------------------------------------------------------------------
    def _finish_las_header(self, a_line: str) -> None:
        text = "\n".join(self._header)
        sections = re.findall(r"^[ \t]*~(\w)", text, flags=re.MULTILINE)
        if "C" not in [s.upper() for s in sections]:
            raise InputError(f"{self.source}: no ~Curve section before the ~A line, so the "
                             "columns have no names or depth unit; add a ~Curve section")
        m = re.search(r"^[ \t]*WRAP\s*\.\s*([^\s:]*)", text, flags=re.MULTILINE | re.IGNORECASE)
        if m and m.group(1).upper() in ("YES", "Y", "TRUE"):
            raise InputError(f"{self.source}: a wrapped LAS file (WRAP. YES) cannot be followed "
                             "row by row; have the logging software write it unwrapped")
        curve_body = _section_body(text, "C")
        mnems = [ln.split(".", 1)[0].strip() for ln in curve_body
                 if ln.strip() and not ln.lstrip().startswith("#")]
        if len(mnems) < 2:
            raise InputError(f"{self.source}: the ~Curve section lists {len(mnems)} curve(s); "
                             "it needs the depth curve and at least one log curve")
        well = _read_las_header(text + "\n" + a_line + "\n", len(mnems), self.source,
                                self.given_unit)
        self.depth_unit = well.depth_unit
        self.well_name = well.name if well.name else self.well_name
        self.ref_elevation_m, self.x_m, self.y_m = well.ref_elevation_m, well.x_m, well.y_m
        names = [str(c) for c in well.curves.columns]
        nm = re.search(r"^[ \t]*NULL\s*\.\S*\s+([-+0-9.eE]+)", "\n".join(_section_body(text, "W")),
                       flags=re.MULTILINE | re.IGNORECASE)
        self._null = float(nm.group(1)) if nm else None
        self._width = len(names) + 1
        self._select(names, offset=1)

    def _finish_csv_header(self, line: str) -> None:
        text = line.replace("\ufeff", "")
        counts = {d: text.count(d) for d in (",", ";", "\t")}
        best = max(counts, key=lambda d: counts[d])
        self._delim = best if counts[best] > 0 else None      # None: whitespace
        self._decimal_comma = self._delim == ";"
        cells = [c.strip().strip('"') for c in _split(text, self._delim)]
        low = [" ".join(c.lower().split()) for c in cells]
        depth_k, unit_text = None, None
        for k, name in enumerate(low):
            base, unit = split_unit_suffix(name, angles=False)
            if base in _DEPTH_NAMES:
                depth_k, unit_text = k, unit
                break
        if depth_k is None:
            raise InputError(f"{self.source}: no depth column in the header {cells}; name it "
                             "md_m or md_ft (or depth [m] ...)")
        if depth_k != 0:
            cells.insert(0, cells.pop(depth_k))
            self._order = [depth_k] + [k for k in range(len(low)) if k != depth_k]
        else:
            self._order = None
        self.depth_unit = self._resolve_unit(unit_text)
        self._width = len(cells)
        self._select([split_unit_suffix(c, angles=False)[0] for c in cells[1:]], offset=1)

    def _resolve_unit(self, unit_text: str | None) -> DepthUnit:
        if unit_text is None:
            if self.given_unit is None:
                raise UnitError(f"{self.source}: the depth column has no unit; name it md_m or "
                                "md_ft, or pass --depth-unit m|ft|usft")
            return self.given_unit
        unit = parse_depth_unit(unit_text, source=self.source)
        if self.given_unit is not None:
            if self.given_unit is DepthUnit.USFT and unit is DepthUnit.FT:
                return self.given_unit
            if self.given_unit is not unit:
                raise UnitError(f"{self.source}: the depth column is in {unit.value} but "
                                f"{self.given_unit.value} was given; drop --depth-unit or fix it")
        return unit

    def _select(self, names: list[str], offset: int) -> None:
        self.curve_names = tuple(names)
        if self.wanted is None:
            self._cols = [k + offset for k in range(len(names))]
            self.curves = tuple(names)
        else:
            upper = [n.upper() for n in names]
            cols = []
            for w in self.wanted:
                if w.upper() not in upper:
                    raise InputError(f"{self.source}: no curve {w!r}; the file has "
                                     f"{list(names)}; choose with --curve")
                cols.append(upper.index(w.upper()) + offset)
            self._cols = cols
            self.curves = tuple(names[c - offset] for c in cols)
        self.ready = True

    # -- rows ---------------------------------------------------------------------------------
    def feed(self, lines: Iterable[str]) -> tuple[list[float], list[np.ndarray], list[str]]:
        """Parse complete lines; returns (depths [m], value rows, notices)."""
        mds: list[float] = []
        rows: list[np.ndarray] = []
        notes: list[str] = []
        for raw in lines:
            self._line_no += 1
            line = raw.rstrip("\r\n")
            if not self.ready:
                self._header_line(line)
                continue
            if not line.strip() or line.lstrip().startswith("#"):
                continue
            got = self._row(line, notes)
            if got is not None:
                mds.append(got[0])
                rows.append(got[1])
        return mds, rows, notes

    def _header_line(self, line: str) -> None:
        if self.kind is None:
            if not line.strip():
                return
            self.kind = "las" if line.lstrip().startswith("~") else "csv"
        if self.kind == "las":
            if line.lstrip().upper().startswith("~A"):
                self._finish_las_header(line)
            else:
                self._header.append(line)
        elif line.strip():
            self._finish_csv_header(line)

    def _row(self, line: str, notes: list[str]) -> tuple[float, np.ndarray] | None:
        cells = line.split() if self.kind == "las" else _split(line, self._delim)
        if self._order is not None:
            if len(cells) == len(self._order):
                cells = [cells[k] for k in self._order]
        if len(cells) != self._width:
            if self._bad.hit():
                notes.append(f"{self.source}, line {self._line_no}: {len(cells)} values where "
                             f"{self._width} were expected; skipped the row "
                             f"({line.strip()[:60]!r}; {self._bad.count} so far)")
            return None
        depth = self._number(cells[0])
        if depth is None or not math.isfinite(depth) or depth in COMMON_NULLS or \
                (self._null is not None and depth == self._null):
            if self.kind == "csv" and not self._units_row_checked and self._line_no <= 3:
                self._units_row_checked = True      # a row of units under the header
                return None
            if self._bad.hit():
                notes.append(f"{self.source}, line {self._line_no}: no usable depth "
                             f"({cells[0][:20]!r}); skipped the row ({self._bad.count} so far)")
            return None
        self._units_row_checked = True
        vals = np.empty(len(self._cols))
        for i, c in enumerate(self._cols):
            v = self._number(cells[c])
            if v is None:
                if cells[c].strip().lower() not in _NULL_TEXT and self._text.hit():
                    notes.append(f"{self.source}, line {self._line_no}: text "
                                 f"{cells[c].strip()[:20]!r} in curve {self.curves[i]}; read as "
                                 f"null ({self._text.count} so far)")
                v = math.nan
            elif not math.isfinite(v) or (self._null is not None and v == self._null):
                v = math.nan
            elif v in COMMON_NULLS:
                if v not in self._nulls_seen:
                    self._nulls_seen.add(v)
                    declared = f"the declared NULL is {self._null:g}" if self._null is not None \
                        else "no NULL is declared"
                    notes.append(f"{self.source}: value {v:g} in curve {self.curves[i]} read as "
                                 f"null ({declared}); said once")
                v = math.nan
            vals[i] = v
        return depth * self.depth_unit.metres, vals

    def _number(self, cell: str) -> float | None:
        c = cell.strip().strip('"')
        if self._decimal_comma:
            c = c.replace(",", ".")
        try:
            return float(c)
        except ValueError:
            return None


def _split(line: str, delim: str | None) -> list[str]:
    return line.split() if delim is None else [c.strip() for c in line.split(delim)]


def _section_body(text: str, letter: str) -> list[str]:
    out, inside = [], False
    for ln in text.splitlines():
        s = ln.lstrip()
        if s.startswith("~"):
            inside = s[1:2].upper() == letter
            continue
        if inside:
            out.append(ln)
    return out


def _read_las_header(header: str, n_curves: int, source: str, unit: DepthUnit | None):
    """The header's facts through read_las (one dummy row of nulls after the ~A line)."""
    from ..io import read_las

    dummy = " ".join(["1"] + ["-999.25"] * (n_curves - 1))
    fd, tmp = tempfile.mkstemp(suffix=".las", prefix="wellfault_header_")
    try:
        with os.fdopen(fd, "w", encoding="utf-8") as f:
            f.write(header + dummy + "\n")
        with warnings.catch_warnings():
            warnings.simplefilter("ignore")
            try:
                well = read_las(tmp, depth_unit=unit)
            except WellfaultError as err:
                raise type(err)(str(err).replace(tmp, source)) from None
    finally:
        try:
            os.unlink(tmp)
        except OSError:
            pass
    if well.name == Path(tmp).stem:
        well.name = Path(source).stem
    return well


class GrowingFile:
    """Follow a LAS or CSV file that grows (see the module docstring).

    Parameters are those of :class:`LogLineParser`. The header is read on the first poll that
    finds it complete; :attr:`parser` then holds the depth unit, curves and well facts.
    """

    #: bytes of the last line read that are checked again at each poll (in-place rewrites)
    CHECK_BYTES = 256

    def __init__(self, path: str | Path, *, curves: Sequence[str] | None = None,
                 depth_unit: DepthUnit | str | None = None) -> None:
        self.path = Path(path)
        self._curves = curves
        self._unit = depth_unit
        self.parser = LogLineParser(str(self.path), curves=curves, depth_unit=depth_unit)
        self._offset = 0
        self._ident: tuple[int, int] | None = None
        self._check: tuple[int, bytes] | None = None   # (offset, bytes) of the last line read
        self._missing_said = False
        self._header_error: str | None = None
        self._ever_ready = False

    def _restart(self) -> None:
        self.parser = LogLineParser(str(self.path), curves=self._curves,
                                    depth_unit=self._unit)
        self._offset = 0
        self._check = None

    def poll(self, *, final: bool = False) -> FeedRows:
        """Rows appended since the last poll (see :class:`FeedRows`).

        ``final``: the input has ended (``--once``): a last line without its line end is used
        when it holds a whole row, otherwise reported and ignored.
        """
        notes: list[str] = []
        restarted = False
        try:
            st = os.stat(self.path)
        except FileNotFoundError:
            if not self._missing_said:
                notes.append(f"{self.path}: not there (moved, or being replaced); waiting for it")
                self._missing_said = True
            return _empty(self.parser, notes)
        if self._missing_said:
            notes.append(f"{self.path}: is back; reading it again from the top")
            self._missing_said = False
            self._restart()
            restarted = True
        ident = (st.st_dev, st.st_ino)
        reason = None
        if self._ident is not None and ident != self._ident:
            reason = "was replaced by a new file"
        elif st.st_size < self._offset:
            reason = f"shrank from {self._offset} to {st.st_size} bytes"
        elif self._check is not None and self._read(*self._check[:1], len(self._check[1])) \
                != self._check[1]:
            reason = "was rewritten in place (the last line read has changed)"
        self._ident = ident
        if reason:
            notes.append(f"{self.path}: {reason}; reading it again from the top (rows already "
                         "seen are compared, not counted twice)")
            self._restart()
            restarted = True
        data = self._read(self._offset, None)
        end = data.rfind(b"\n")
        complete, partial = (data[: end + 1], data[end + 1:]) if end >= 0 else (b"", data)
        lines = complete.decode("utf-8", errors="replace").split("\n")[:-1] if complete else []
        try:
            mds, rows, more = self.parser.feed(lines)
            if final and partial.strip():
                mds, rows, more = self._final_line(partial, mds, rows, more)
        except WellfaultError as err:
            if not self._ever_ready:
                raise                     # the file was unusable from the start: bad input
            # a (rewritten) header that cannot be used: wait for a usable one
            msg = str(err)
            if msg != self._header_error:
                notes.append(f"cannot use the header: {msg}; waiting for the file to be fixed")
                self._header_error = msg
            self._restart()
            return _empty(self.parser, notes, restarted)
        self._header_error = None
        notes += more
        if complete:
            k = complete.rfind(b"\n", 0, len(complete) - 1)
            last = complete[k + 1:]
            start = self._offset + k + 1
            take = last[-self.CHECK_BYTES:]
            self._check = (start + len(last) - len(take), take)
        self._offset += len(complete) + (len(partial) if final else 0)
        self._ever_ready = self._ever_ready or self.parser.ready
        if not self.parser.ready and final:
            notes.append(f"{self.path}: no complete header yet (no ~A line or CSV header)")
        return FeedRows(np.asarray(mds, float),
                        np.asarray(rows, float).reshape(len(rows), len(self.parser.curves)),
                        notes, restarted)

    def _final_line(self, partial: bytes, mds, rows, notes):
        """The input has ended on a line without a line end: use it if it is a whole row."""
        line = partial.decode("utf-8", errors="replace").rstrip("\r\n")
        if not self.parser.ready:
            m2, r2, n2 = self.parser.feed([line])
            return mds + m2, rows + r2, notes + n2
        got = self.parser._row(line, []) if line.strip() and \
            not line.lstrip().startswith("#") else None
        if got is None:
            notes = notes + [f"{self.path}: the last line has no line end and does not hold a "
                             f"whole row ({line.strip()[:60]!r}); ignored it"]
            return mds, rows, notes
        return mds + [got[0]], rows + [got[1]], notes

    def _read(self, offset: int, size: int | None) -> bytes:
        try:
            with open(self.path, "rb") as f:
                f.seek(offset)
                return f.read() if size is None else f.read(size)
        except OSError:
            return b""


def _empty(parser: LogLineParser, notes: list[str], restarted: bool = False) -> FeedRows:
    return FeedRows(np.zeros(0), np.zeros((0, max(len(parser.curves), 1))), notes, restarted)


class LineStream:
    """Rows from a text stream (standard input): LAS or CSV lines as they arrive.

    A background thread reads the stream line by line; :meth:`poll` returns the rows of the
    lines read since the last call, waiting at most ``wait`` seconds for the first one.
    :attr:`eof` is True once the stream has ended and every line has been handed out.
    """

    def __init__(self, stream, *, curves: Sequence[str] | None = None,
                 depth_unit: DepthUnit | str | None = None, source: str = "<stdin>") -> None:
        self.parser = LogLineParser(source, curves=curves, depth_unit=depth_unit)
        self._q: queue.Queue = queue.Queue()
        self._ended = False
        self.eof = False
        threading.Thread(target=self._read, args=(stream,), daemon=True).start()

    def _read(self, stream) -> None:
        try:
            for line in stream:
                self._q.put(line)
        finally:
            self._q.put(None)

    def poll(self, *, final: bool = False, wait: float = 0.0) -> FeedRows:
        """Rows of the lines that have arrived (``final`` is accepted for symmetry)."""
        lines: list[str] = []
        block = wait > 0
        while not self._ended:
            try:
                item = self._q.get(block=block, timeout=wait if block else None)
            except queue.Empty:
                break
            block = False
            if item is None:
                self._ended = True
                break
            lines.append(item)
        self.eof = self._ended
        mds, rows, notes = self.parser.feed(lines)
        return FeedRows(np.asarray(mds, float),
                        np.asarray(rows, float).reshape(len(rows), max(len(self.parser.curves),
                                                                       1)), notes)
