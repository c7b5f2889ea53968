"""Field screening, outputs: the result, and the cut, well and error tables in the caller's
unit."""

from __future__ import annotations

import os
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import InputError
from ..evidence.results import FaultCut, cuts_to_frame
from ..geo.precision import DEFAULT_DECIMALS, Decimals, lengths_in_text, round_table
from ..geo.units import DepthUnit
from ..io.outputs import output_folder, remove_stale_temporaries, write_output
from .faultmap import BRACKET_COLUMNS, FaultMap

__all__ = ["ScreenResult", "ERROR_COLUMNS", "WELL_COLUMNS", "OUTPUT_FILES"]


#: Columns of the error table.
ERROR_COLUMNS = ("well", "file", "error_type", "message")


#: Columns of the well table.
WELL_COLUMNS = ("well", "status", "checked_by", "cuts_found", "candidates_withheld", "seconds",
                "n_picks", "depth_unit", "thickness_source", "warnings")


#: Files written into ``out_dir`` (``.csv`` or ``.parquet``).
OUTPUT_FILES = ("cuts", "errors", "wells", "faults", "fault_profiles")


@dataclass
class ScreenResult:
    """Tables of a screening run (lengths in the run's output unit).

    Attributes
    ----------
    cuts : DataFrame
        Every cut of every well (``wellfault.evidence.results.CUT_COLUMNS`` plus ``fault_id``,
        ``fault_fit`` and the bracket-end positions), sorted by well then MD.
    errors : DataFrame
        ``well, file, error_type, message``: one row per well that could not be screened.
    wells : DataFrame
        :data:`WELL_COLUMNS`, one row per manifest well, in manifest order.
    faults : DataFrame
        The fitted faults and possible unconformities (:data:`wellfault.field.faultmap.FAULT_COLUMNS`).
    fault_profiles : DataFrame
        Vertical separation along strike of each fault.
    thickness : DataFrame
        Neighbour-thickness samples (well, unit, thickness, position, outlier, leave-one-out
        prediction); empty without neighbours.
    info : dict
        Run facts: tolerances used, timings per pass, worker kind, counts.
    """

    cuts: pd.DataFrame
    errors: pd.DataFrame
    wells: pd.DataFrame
    faults: pd.DataFrame
    fault_profiles: pd.DataFrame
    thickness: pd.DataFrame = field(default_factory=pd.DataFrame)
    info: dict = field(default_factory=dict)

    @property
    def n_failed(self) -> int:
        return int(len(self.errors))

    def summary(self) -> str:
        """A few lines for the command line."""
        i = self.info
        n = len(self.wells)
        ok = n - int(self.wells["status"].eq("failed").sum()) if n else 0
        kinds = self.faults["kind"].value_counts() if len(self.faults) else pd.Series(dtype=int)
        fit = self.cuts["fault_fit"].value_counts() if len(self.cuts) else pd.Series(dtype=int)
        lines = [
            f"screened {n} well(s) in {i.get('seconds_total', float('nan')):.1f} s "
            f"({i.get('runner', '?')}): {ok} ran, {n - ok} failed"
            + (" (see errors)" if n - ok else ""),
            f"{len(self.cuts)} cut(s): {int(fit.get('fault', 0))} on "
            f"{int(kinds.get('fault', 0))} fitted fault(s), {int(fit.get('no fault', 0))} "
            f"fit no fault, {int(fit.get('possible unconformity', 0))} flagged as possible "
            f"unconformity ({int(kinds.get('possible unconformity', 0))} level(s))",
            f"thickness: {lengths_in_text(i.get('thickness_mode', '?'), i.get('unit', 'm'))}",
        ]
        if i.get("unit_note"):
            lines.append(i["unit_note"])
        return "\n".join(lines)

    def write(self, out_dir: str | os.PathLike, fmt: str = "csv",
              decimals: Decimals = DEFAULT_DECIMALS) -> dict[str, Path]:
        """Write the tables (:data:`OUTPUT_FILES`) into ``out_dir``, each replaced atomically,
        numbers at the precision they carry (:mod:`wellfault.geo.precision`)."""
        return _write_tables(self, Path(out_dir), fmt, decimals)


def _convert_lengths(df: pd.DataFrame, unit: DepthUnit) -> pd.DataFrame:
    if unit is DepthUnit.M or len(df.columns) == 0:
        return df
    out = df.copy()
    ren = {}
    for c in df.columns:
        if c.endswith("_m"):
            out[c] = out[c].astype(float) / unit.metres
            ren[c] = c[:-2] + "_" + unit.suffix
    return out.rename(columns=ren)


def _write_tables(result: ScreenResult, folder: Path, fmt: str,
                  decimals: Decimals = DEFAULT_DECIMALS) -> dict[str, Path]:
    from ..io import write_table

    fmt = str(fmt).lower()
    if fmt not in ("csv", "parquet"):
        raise InputError(f"output format {fmt!r} is not known; use csv or parquet")
    output_folder(folder)
    written = {}
    for name in OUTPUT_FILES:
        df = getattr(result, name)
        path = folder / f"{name}.{fmt}"
        remove_stale_temporaries(path)  # of a run killed while it wrote the tables
        if fmt == "csv":
            write_table(df, path, decimals=decimals)
        else:
            try:
                import pyarrow  # noqa: F401
            except ImportError:
                raise InputError("Parquet output needs pyarrow; install it (pip install "
                                 "'wellfault[parquet]') or write CSV") from None
            typed = round_table(df, decimals)
            write_output(path, lambda fh, df=typed: df.to_parquet(fh, index=False),
                         what=f"the {name} table")
        written[name] = path
    return written


def _collect(cut_out: dict):
    """All cuts of pass 2 (FaultCut, metres) sorted by well then MD, with their bracket-end
    positions and owning well (manifest index)."""
    rows = []
    for i in sorted(cut_out):
        rec = cut_out[i]
        for c, b in zip(rec["c"], rec["b"]):
            rows.append((i, c, b))
    rows.sort(key=lambda r: (r[1]["well"], r[1]["md_m"]))
    return [FaultCut(**r[1]) for r in rows], [r[2] for r in rows], [r[0] for r in rows]


def _remeasured(cut_out: dict, records, brackets, owner, fmap: FaultMap):
    """Cuts of fitted faults replaced by their re-measured versions (pass 3), re-sorted by
    well then MD, the fault map's rows following them."""
    records, brackets = list(records), list(brackets)
    for row, (i, c) in enumerate(zip(owner, records)):
        if fmap.fit[row] != "fault" or "re" not in cut_out.get(i, {}):
            continue
        re = cut_out[i]["re"]
        for c2, b2 in zip(re["c"], re["b"]):
            if c2["md_top_m"] == c.md_top_m and c2["md_base_m"] == c.md_base_m:
                records[row], brackets[row] = FaultCut(**c2), b2
                break
    perm = sorted(range(len(records)), key=lambda r: (records[r].well, records[r].md_m))
    if perm != list(range(len(records))):
        inverse = np.empty(len(perm), dtype=np.int64)
        inverse[np.asarray(perm)] = np.arange(len(perm))
        for f in fmap.fits:
            f.members = np.sort(inverse[f.members])
        fmap.fault_id = fmap.fault_id[perm]
        fmap.fit = fmap.fit[perm]
        records = [records[r] for r in perm]
        brackets = [brackets[r] for r in perm]
        owner = [owner[r] for r in perm]
    return records, brackets, owner, fmap


def _cut_frame(records: list[FaultCut], brackets: list) -> pd.DataFrame:
    df = cuts_to_frame(records, DepthUnit.M)
    b = np.asarray(brackets, dtype=float).reshape(-1, 6)
    for k, c in enumerate(BRACKET_COLUMNS):
        df[c] = b[:, k] if len(df) else pd.Series(dtype=float)
    return df
