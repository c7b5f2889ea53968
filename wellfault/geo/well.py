"""A well's log curves indexed by measured depth, with the header facts wellfault uses.

Lengths are metres inside the package: :func:`wellfault.io.read_las` converts once on reading and
keeps the file's unit in :attr:`Well.depth_unit` as the default for output tables.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
import pandas as pd
from numpy.typing import NDArray

from ..errors import InputError
from .units import DepthUnit, parse_depth_unit

__all__ = ["Well"]


@dataclass(eq=False)
class Well:
    """Log curves of one well, indexed by measured depth in metres, plus header facts.

    Parameters
    ----------
    name : str
        Well name (LAS ``WELL`` item, or the file stem when the header has none).
    curves : DataFrame
        Index named ``"md_m"``: measured depth below the depth reference, float, finite and
        strictly increasing. [m] One float column per curve; NaN marks a null sample.
    depth_unit : DepthUnit or str
        Depth unit of the source file; the default unit of output tables.
    ref_elevation_m : float or None
        Elevation of the depth reference above sea level (None when unknown). [m]
    ref_name : str
        Name of the depth reference: ``"KB"``, ``"DF"``, ``"GL"``, ...
    x_m, y_m : float or None
        Surface location, easting and northing (None when unknown). [m]
    source : str
        Path of the file read, or ``"<memory>"``.

    Raises
    ------
    InputError
        When the index is not finite and strictly increasing or a curve is not numeric.

    Notes
    -----
    ``__post_init__`` names the index ``md_m`` and stores float64 copies of index and curves, so
    a ``Well`` never shares its frame with the caller.

    Examples
    --------
    >>> w = Well("A-1", pd.DataFrame({"GR": [50.0, 60.0]}, index=[100.0, 100.5]), "m")
    >>> w.md_range_m
    (100.0, 100.5)
    >>> w.curve("gr").tolist()
    [50.0, 60.0]
    """

    name: str
    curves: pd.DataFrame
    depth_unit: DepthUnit
    ref_elevation_m: float | None = None
    ref_name: str = "KB"
    x_m: float | None = None
    y_m: float | None = None
    source: str = "<memory>"

    def __post_init__(self) -> None:
        self.name = str(self.name)
        self.source = str(self.source)
        self.depth_unit = parse_depth_unit(self.depth_unit, source=self.source)
        if not isinstance(self.curves, pd.DataFrame):
            raise InputError(
                f"well {self.name!r}: curves must be a pandas DataFrame indexed by MD in metres "
                f"(got {type(self.curves).__name__})"
            )
        try:
            md = np.asarray(self.curves.index, dtype=float)
        except (TypeError, ValueError) as err:
            raise InputError(
                f"well {self.name!r} ({self.source}): the curve index must be measured depth in "
                "metres (numbers)"
            ) from err
        if not np.all(np.isfinite(md)):
            i = int(np.flatnonzero(~np.isfinite(md))[0])
            raise InputError(
                f"well {self.name!r} ({self.source}): measured depth at sample {i} is not a "
                f"finite number (got {md[i]}); drop samples without depth"
            )
        if md.size > 1:
            bad = np.flatnonzero(np.diff(md) <= 0)
            if bad.size:
                i = int(bad[0])
                raise InputError(
                    f"well {self.name!r} ({self.source}): measured depth must increase strictly "
                    f"(sample {i} at {md[i]} m, sample {i + 1} at {md[i + 1]} m); sort by depth "
                    "and remove duplicated depths"
                )
        columns = {}
        for col in self.curves.columns:
            try:
                columns[str(col)] = np.asarray(self.curves[col], dtype=np.float64)
            except (TypeError, ValueError) as err:
                raise InputError(
                    f"well {self.name!r} ({self.source}): curve {col!r} is not numeric; "
                    "convert it to numbers with NaN for nulls"
                ) from err
        frame = pd.DataFrame(columns, index=pd.Index(md, name="md_m", dtype=np.float64))
        if frame.columns.duplicated().any():
            dup = frame.columns[frame.columns.duplicated()].tolist()
            raise InputError(
                f"well {self.name!r} ({self.source}): curve names repeat {dup}; give each curve "
                "a unique name"
            )
        self.curves = frame
        for attr in ("ref_elevation_m", "x_m", "y_m"):
            value = getattr(self, attr)
            if value is not None:
                value = float(value)
                setattr(self, attr, value if np.isfinite(value) else None)

    @property
    def md_m(self) -> NDArray[np.float64]:
        """Measured depths of the samples. [m]"""
        return self.curves.index.to_numpy(dtype=np.float64)

    @property
    def md_range_m(self) -> tuple[float, float]:
        """First and last measured depth ``(top, bottom)``; ``(nan, nan)`` when empty. [m]"""
        if len(self.curves.index) == 0:
            return (float("nan"), float("nan"))
        return (float(self.curves.index[0]), float(self.curves.index[-1]))

    @property
    def curve_names(self) -> tuple[str, ...]:
        """Names of the curves, in file order."""
        return tuple(str(c) for c in self.curves.columns)

    def curve(self, name: str) -> pd.Series:
        """Return the curve called ``name`` (case-insensitive), indexed by ``md_m``.

        Raises
        ------
        InputError
            When no curve has that name; the message lists the curves the well has.
        """
        if name in self.curves.columns:
            return self.curves[name]
        wanted = str(name).strip().lower()
        matches = [c for c in self.curves.columns if str(c).strip().lower() == wanted]
        if len(matches) == 1:
            return self.curves[matches[0]]
        if len(matches) > 1:
            raise InputError(
                f"well {self.name!r} ({self.source}): curve name {name!r} is ambiguous "
                f"(matches {matches}); use the exact name"
            )
        raise InputError(
            f"well {self.name!r} ({self.source}): no curve named {name!r}; available curves: "
            f"{', '.join(map(str, self.curves.columns)) or '(none)'}"
        )

    def __repr__(self) -> str:
        top, base = self.md_range_m
        elev = "unknown" if self.ref_elevation_m is None else f"{self.ref_elevation_m:g} m"
        return (
            f"Well({self.name!r}, {len(self.curves)} samples, MD {top:g}-{base:g} m, "
            f"curves {list(self.curve_names)}, {self.ref_name} elevation {elev}, "
            f"unit {self.depth_unit.value}, source {self.source!r})"
        )
