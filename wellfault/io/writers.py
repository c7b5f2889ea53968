"""Table writers: CSV written atomically, lengths in the caller's unit with the unit in the
column name."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import pandas as pd

from ..errors import InputError
from ..geo.precision import DEFAULT_DECIMALS, FULL, Decimals, table_text
from ..geo.units import DepthUnit, parse_depth_unit
from .outputs import write_output
from .sniff import PathLike

__all__ = ["write_table", "write_tops", "write_survey"]


# --------------------------------------------------------------------------------------------
# writers


def write_table(df: pd.DataFrame, path: PathLike, *, index: bool = False,
                float_format: str | None = None, decimals: Decimals = DEFAULT_DECIMALS) -> Path:
    """Write a DataFrame as UTF-8 CSV (:func:`~wellfault.io.outputs.write_output`).

    Numbers are written at the precision they carry (:mod:`wellfault.geo.precision`: 0.01 m or
    0.1 ft for lengths, 0.1 degree for angles, 2 decimals for confidences); ``df`` itself is
    not changed.

    Parameters
    ----------
    df : DataFrame
        Table to write.
    path : str or PathLike
        Target file, ``-`` for standard output; a plain file is replaced in one step, so
        readers never see a half-written file.
    index : bool, default False
        Write the index as the first column.
    float_format : str, optional
        One format for every float, e.g. ``"%.3f"``, instead of the per-column rules.
    decimals : Decimals, optional
        The per-column rules (:class:`wellfault.geo.precision.Decimals`; ``precision.FULL`` writes
        full precision).

    Returns
    -------
    Path
        The path written.

    Raises
    ------
    InputError
        The folder does not exist or is not writable.
    """
    if float_format is not None:
        text = df.to_csv(index=index, float_format=float_format, lineterminator="\n")
    else:
        text = table_text(df, decimals, index=index)
    return write_output(path, text, what="the table")


def _unit_of(depth_unit: DepthUnit | str) -> DepthUnit:
    return parse_depth_unit(depth_unit, source="output unit")


def write_tops(tops: pd.DataFrame, path: PathLike, *,
               depth_unit: DepthUnit | str = DepthUnit.M,
               decimals: Decimals = FULL) -> Path:
    """Write tops (``well, surface, md_m``) as ``well, surface, md_<unit>``.

    Parameters
    ----------
    tops : DataFrame
        Columns ``surface`` and ``md_m`` [m], optionally ``well``.
    path : str or PathLike
        Target CSV (:func:`~wellfault.io.outputs.write_output`).
    depth_unit : DepthUnit or str, default "m"
        Unit of the written MD column; its suffix goes in the column name.
    decimals : Decimals, optional
        Written precision (:func:`write_table`); default full precision, so that the file
        reads back exactly as the input of another run.

    Returns
    -------
    Path
        The path written.
    """
    unit = _unit_of(depth_unit)
    missing = [c for c in ("surface", "md_m") if c not in tops.columns]
    if missing:
        raise InputError(f"tops to write lack column(s) {missing} (have {list(tops.columns)}); "
                         "give surface and md_m")
    out = pd.DataFrame()
    if "well" in tops.columns:
        out["well"] = tops["well"].astype(str).to_numpy()
    out["surface"] = tops["surface"].astype(str).to_numpy()
    out[f"md_{unit.suffix}"] = np.asarray(tops["md_m"], dtype=float) / unit.metres
    return write_table(out, path, decimals=decimals)


def write_survey(survey: pd.DataFrame, path: PathLike, *,
                 depth_unit: DepthUnit | str = DepthUnit.M,
                 decimals: Decimals = FULL) -> Path:
    """Write a survey with the length unit in the column names (``md_ft``, ``tvd_ft``, ...).

    Parameters
    ----------
    survey : DataFrame
        Columns ``md_m`` [m], ``inc_deg``, ``azi_deg`` [°]; ``tvd_m``, ``north_m``, ``east_m``
        [m] are written too when present.
    path : str or PathLike
        Target CSV (:func:`~wellfault.io.outputs.write_output`).
    depth_unit : DepthUnit or str, default "m"
        Unit of the written length columns (``md_ft``, ``tvd_ft``, ...).
    decimals : Decimals, optional
        Written precision (:func:`write_table`); default full precision, so that the file
        reads back exactly as the input of another run.

    Returns
    -------
    Path
        The path written.
    """
    unit = _unit_of(depth_unit)
    missing = [c for c in ("md_m", "inc_deg", "azi_deg") if c not in survey.columns]
    if missing:
        raise InputError(f"survey to write lacks column(s) {missing} (have "
                         f"{list(survey.columns)}); give md_m, inc_deg, azi_deg")
    out = pd.DataFrame({f"md_{unit.suffix}": np.asarray(survey["md_m"], float) / unit.metres,
                        "inc_deg": np.asarray(survey["inc_deg"], float),
                        "azi_deg": np.asarray(survey["azi_deg"], float)})
    for name in ("tvd", "north", "east"):
        if f"{name}_m" in survey.columns:
            out[f"{name}_{unit.suffix}"] = np.asarray(survey[f"{name}_m"], float) / unit.metres
    return write_table(out, path, decimals=decimals)
