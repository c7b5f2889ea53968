"""Bed dip along a well: one attitude, one per surface, or varying with depth.

A :class:`BedDip` answers one question for the rest of the package: which way is down-section
at a given MD? It returns the down-section bed normal n (east, north, down) there, and the
stratigraphic distance a well travels between two MDs, ``∫ t·n dMD`` (DESIGN.md §2), computed
from the trajectory's coordinates so that curved holes are handled exactly for planar beds.
"""

from __future__ import annotations

from dataclasses import dataclass, field

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray

from ..errors import InputError, input_error
from .geometry import bed_normal, check_attitude, parse_attitude

__all__ = ["BedDip", "bed_normal_vector"]


def bed_normal_vector(dip_deg: ArrayLike, dip_azimuth_deg: ArrayLike) -> NDArray[np.float64]:
    """Down-section unit normal, shape (..., 3); see :func:`wellfault.geo.geometry.bed_normal`."""
    return np.asarray(bed_normal(dip_deg, dip_azimuth_deg), dtype=float)


@dataclass(frozen=True)
class BedDip:
    """Bed attitude along a well.

    Build with :meth:`constant`, :meth:`per_surface` or :meth:`from_md_table`. ``kind`` is
    ``"constant"``, ``"surface"`` (the dip of the unit below each surface applies from that
    surface's pick down to the next pick) or ``"md"`` (a dipmeter-style table interpolated in MD:
    the normals are interpolated and renormalised, so azimuths wrap correctly through north).
    """

    kind: str
    dip_deg: float = 0.0
    dip_azimuth_deg: float = 0.0
    table: pd.DataFrame | None = field(default=None, compare=False)

    # -- constructors -------------------------------------------------------------------------
    @classmethod
    def constant(cls, dip_deg: float = 0.0, dip_azimuth_deg: float = 0.0) -> BedDip:
        """One dip and dip azimuth for the whole well [°]."""
        check_attitude(float(dip_deg), float(dip_azimuth_deg))
        return cls("constant", float(dip_deg), float(dip_azimuth_deg) % 360.0)

    @classmethod
    def parse(cls, text: str, *, source: object = None) -> BedDip:
        """``BedDip.parse("12/075")``; ``source`` names the text's origin in messages."""
        return cls.constant(*parse_attitude(text, what="dip", source=source))

    @classmethod
    def per_surface(cls, table: pd.DataFrame, *, default: tuple[float, float] = (0.0, 0.0),
                    source: object = None) -> BedDip:
        """Dip per surface: columns ``surface, dip_deg, dip_azimuth_deg``.

        Surfaces not in the table use ``default``.
        """
        t = table.reset_index(drop=True)
        for i, row in t.iterrows():
            check_attitude(float(row["dip_deg"]), float(row["dip_azimuth_deg"]),
                            source=source, row=i + 1)
        return cls("surface", float(default[0]), float(default[1]), t.copy())

    @classmethod
    def from_md_table(cls, table: pd.DataFrame, *, source: object = None) -> BedDip:
        """Dipmeter-style table: columns ``md_m, dip_deg, dip_azimuth_deg``, sorted by MD."""
        t = table.sort_values("md_m").reset_index(drop=True)
        if len(t) == 0:
            raise input_error("dip table has no rows", source=source,
                              fix="give at least one md, dip, dip azimuth row")
        for i, row in t.iterrows():
            check_attitude(float(row["dip_deg"]), float(row["dip_azimuth_deg"]),
                            source=source, row=i + 1)
        if t["md_m"].duplicated().any():
            md = float(t.loc[t["md_m"].duplicated(), "md_m"].iloc[0])
            raise input_error("dip table has two rows at the same MD", source=source,
                              value=md, fix="keep one dip per depth")
        return cls("md", float(t["dip_deg"].iloc[0]), float(t["dip_azimuth_deg"].iloc[0]), t)

    # -- queries ------------------------------------------------------------------------------
    @property
    def is_constant(self) -> bool:
        return self.kind == "constant"

    def describe(self) -> str:
        """Short human text for reports and notes."""
        if self.kind == "constant":
            return f"{self.dip_deg:g}/{self.dip_azimuth_deg:03.0f}"
        if self.kind == "surface":
            return f"per surface ({len(self.table)} surfaces)"
        return f"dip table ({len(self.table)} rows, MD {self.table['md_m'].min():.1f}-" \
               f"{self.table['md_m'].max():.1f} m)"

    def attitude_at(self, md_m: ArrayLike, picks: pd.DataFrame | None = None
                    ) -> tuple[NDArray[np.float64], NDArray[np.float64]]:
        """(dip, dip azimuth) at each MD [°], from the normals at those depths."""
        n = self.normals_at(md_m, picks)
        dip = np.degrees(np.arccos(np.clip(n[..., 2], -1.0, 1.0)))
        azi = np.degrees(np.arctan2(-n[..., 0], -n[..., 1])) % 360.0
        azi = np.where(dip < 1e-9, 0.0, azi)
        return dip, azi

    def normals_at(self, md_m: ArrayLike, picks: pd.DataFrame | None = None
                   ) -> NDArray[np.float64]:
        """Down-section bed normal at each MD, shape (N, 3).

        ``picks`` (columns ``surface, md_m``) is needed for ``kind == "surface"``.
        """
        md = np.atleast_1d(np.asarray(md_m, dtype=float))
        if self.kind == "constant":
            return np.broadcast_to(bed_normal_vector(self.dip_deg, self.dip_azimuth_deg),
                                   (md.size, 3)).copy()
        if self.kind == "md":
            t = self.table
            nv = bed_normal_vector(t["dip_deg"].to_numpy(float),
                                   t["dip_azimuth_deg"].to_numpy(float))
            x = t["md_m"].to_numpy(float)
            out = np.stack([np.interp(md, x, nv[:, k]) for k in range(3)], axis=-1)
            return out / np.linalg.norm(out, axis=-1, keepdims=True)
        # per surface: the unit the well is in is the last pick at or above md
        if picks is None or len(picks) == 0:
            raise InputError("a per-surface dip table needs the well's tops to know which unit "
                             "each depth is in; give --tops, or give one dip with --dip")
        lookup = {str(r.surface): (float(r.dip_deg), float(r.dip_azimuth_deg))
                  for r in self.table.itertuples()}
        p = picks.sort_values("md_m")
        pmd = p["md_m"].to_numpy(float)
        att = np.array([lookup.get(str(s), (self.dip_deg, self.dip_azimuth_deg))
                        for s in p["surface"]], dtype=float).reshape(-1, 2)
        idx = np.clip(np.searchsorted(pmd, md, side="right") - 1, 0, len(pmd) - 1)
        return bed_normal_vector(att[idx, 0], att[idx, 1])

    def strat_travel(self, trajectory, md_a: ArrayLike, md_b: ArrayLike,
                     picks: pd.DataFrame | None = None, *, max_step_m: float = 1.0
                     ) -> NDArray[np.float64]:
        """Signed stratigraphic distance ``∫ t·n dMD`` a well travels from ``md_a`` to ``md_b``.

        For constant dip this is exactly n·(P(b) − P(a)) (planar beds: s = n·P + const,
        DESIGN.md §2). For varying dip the interval is cut into steps of at most ``max_step_m``
        and each step contributes n(mid)·ΔP, with positions taken on the minimum-curvature arc.
        Positive when the well drills down-section.
        """
        a = np.atleast_1d(np.asarray(md_a, dtype=float))
        b = np.atleast_1d(np.asarray(md_b, dtype=float))
        if self.kind == "constant":
            n = bed_normal_vector(self.dip_deg, self.dip_azimuth_deg)
            return (trajectory.position(b) - trajectory.position(a)) @ n
        out = np.empty(a.size)
        for k, (lo, hi) in enumerate(zip(a, b)):
            # at most 1e5 steps: a longer interval is a bad depth, not a well (bounded memory)
            steps = int(np.clip(np.ceil(abs(hi - lo) / max_step_m), 1, 100_000))
            md = np.linspace(lo, hi, steps + 1)
            pos = trajectory.position(md)
            n = self.normals_at(0.5 * (md[1:] + md[:-1]), picks)
            out[k] = float(np.sum(np.einsum("ij,ij->i", np.diff(pos, axis=0), n)))
        return out
