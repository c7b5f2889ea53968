"""Forward model: what a well would log through planar dipping beds cut by planar faults.

The model (DESIGN.md section 4, "Synthetic wells"): a reference column with a type log, planar
beds (``s(P) = n . P + origin``), planar faults each with a rigid slip vector, and a trajectory.
For every MD sample the point is moved back through each fault whose hanging wall holds it, its
stratigraphic position s is taken, mapped through an optional lateral thickness change onto the
reference column, and the type log is read there. The model returns the curves, the tops as a
geologist would pick them (repeats included) and the true fault cuts.

Frame and signs follow DEVELOPERS.md: (x, y, z) = (east, north, TVD down); bed normal n points
down-section; fault normal m points up into the hanging wall; Δs = s below the cut − s above;
MISSING when sign(Δs) = sign(r), r = t . n, REPEATED otherwise.
"""

from __future__ import annotations

import math
import re
from collections.abc import Callable, Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from pathlib import Path

import numpy as np
import pandas as pd
from numpy.typing import ArrayLike, NDArray

from ..errors import ColumnError, InputError, input_error
from ..geo.column import ReferenceColumn
from ..geo.units import DepthUnit, parse_depth_unit
from .structure import Beds, PlanarFault

__all__ = ["SyntheticWell", "simulate_well", "TRUTH_COLUMNS", "BEYOND_COLUMN", "MODEL_DATUMS"]


#: How the type log is read beyond its ends: hold the end value, or reflect the log.
BEYOND_COLUMN = ("clip", "mirror")


#: Vertical datum of the model (beds and faults): the well's depth reference, or sea level.
MODEL_DATUMS = ("reference", "sea level")


#: Columns of :attr:`SyntheticWell.cuts`, in order.
TRUTH_COLUMNS = (
    "well", "md_m", "md_first_below_m", "tvd_m", "tvdss_m", "x_m", "y_m", "fault", "fault_name",
    "delta_s_m", "s_above_m", "s_below_m", "tst_m", "vertical_separation_m", "section",
    "fault_type", "crossing", "r", "surface_above", "surface_below",
)


# ---------------------------------------------------------------------------------- model
def _restore(points: NDArray[np.float64], faults: Sequence[PlanarFault],
             member: NDArray[np.bool_] | None = None):
    """Move points back through each fault whose hanging wall holds them, in list order.

    Returns the restored points and the (N, F) hanging-wall membership used. With ``member``
    given, that membership is applied instead of being tested.
    """
    q = np.array(points, dtype=float, copy=True).reshape(-1, 3)
    mem = np.zeros((len(q), len(faults)), dtype=bool) if member is None else member
    for k, f in enumerate(faults):
        if member is None:
            mem[:, k] = (q - np.asarray(f.point)) @ f.normal_up > 0.0
        q[mem[:, k]] -= np.asarray(f.slip)
    return q, mem


class _ThicknessMap:
    """Piecewise-linear map between local (laterally thickened) s and reference-column s.

    Local unit i has thickness ``f_i h_i``; above the column top, and below a defined base, the
    map has slope 1; an open last unit keeps its factor down to infinity.
    """

    def __init__(self, column: ReferenceColumn, factors: object) -> None:
        ref = np.asarray(column.s_m, dtype=float)
        f = _factor_array(column, factors)
        base = column.base_s_m
        ref_knots = ref if math.isnan(base) else np.append(ref, base)
        th = np.diff(ref_knots)
        loc_knots = ref_knots[0] + np.concatenate([[0.0], np.cumsum(th * f[: len(th)])])
        self.ref = ref_knots
        self.loc = loc_knots
        self.f = f
        self.tail = float(f[-1]) if math.isnan(base) else 1.0
        self.identity = bool(np.all(f == 1.0))

    def to_reference(self, s_local: NDArray[np.float64]) -> NDArray[np.float64]:
        if self.identity:
            return np.asarray(s_local, dtype=float)
        s = np.asarray(s_local, dtype=float)
        out = np.interp(s, self.loc, self.ref)
        lo, hi = s < self.loc[0], s > self.loc[-1]
        out[lo] = self.ref[0] + (s[lo] - self.loc[0])
        out[hi] = self.ref[-1] + (s[hi] - self.loc[-1]) / self.tail
        return out


def _factor_array(column: ReferenceColumn, factors: object) -> NDArray[np.float64]:
    n = len(column)
    if factors is None:
        return np.ones(n)
    if isinstance(factors, Mapping):
        f = np.ones(n)
        for name, v in factors.items():
            f[column.index(name)] = float(v)
    else:
        f = np.asarray(factors, dtype=float).reshape(-1)
        if len(f) != n:
            raise ColumnError(f"thickness_factors has {len(f)} values for {n} units of "
                              f"{column.name!r}; give one per unit or a {{surface: factor}} map")
    if not np.all(np.isfinite(f) & (f > 0)):
        bad = int(np.flatnonzero(~(np.isfinite(f) & (f > 0)))[0])
        raise ColumnError(f"thickness factor for unit {column.names[bad]!r} must be a positive "
                          f"number (got {f[bad]}); 1 keeps the reference thickness")
    return f


def _per_curve(value: object, curve: str, what: str) -> float:
    if isinstance(value, Mapping):
        return float(value.get(curve, 0.0 if what == "noise_std" else
                               (1.0 if what == "gain" else 0.0)))
    return float(value)  # type: ignore[arg-type]


def _read_type_log(grid: NDArray[np.float64], values: NDArray[np.float64],
                   s: NDArray[np.float64], beyond: str) -> NDArray[np.float64]:
    if beyond == "mirror":
        lo, hi = grid[0], grid[-1]
        length = hi - lo
        u = np.mod(s - lo, 2.0 * length)
        s = lo + length - np.abs(u - length)
    return np.interp(s, grid, values)


@dataclass
class SyntheticWell:
    """What :func:`simulate_well` returns.

    Attributes
    ----------
    well : Well
        Curves indexed by ``md_m`` with the header facts.
    tops : DataFrame
        ``well, surface, md_m``: every surface crossing as picked (repeats included), by MD.
    cuts : DataFrame
        The true fault cuts, columns :data:`TRUTH_COLUMNS` (see :func:`simulate_well`).
    trajectory : Trajectory
    s_m : ndarray
        Reference-column s at every MD sample (after faults and thickness change). [m TST]
    """

    well: object
    tops: pd.DataFrame
    cuts: pd.DataFrame
    trajectory: object
    s_m: NDArray[np.float64]
    column: ReferenceColumn | None = None
    beds: Beds | None = None
    faults: tuple[PlanarFault, ...] = field(default_factory=tuple)

    @property
    def name(self) -> str:
        return str(getattr(self.well, "name", ""))

    def to_files(self, folder: str | Path, *, depth_unit: DepthUnit | str | None = None,
                 stem: str | None = None) -> dict[str, Path]:
        """Write ``<stem>.las``, ``<stem>_tops.csv`` and ``<stem>_survey.csv`` into ``folder``.

        Lengths are written in ``depth_unit`` (default: the well's ``depth_unit``), with the unit
        in the LAS header and in the CSV column names (``md_ft``). Returns the paths by kind.
        """
        from ..io import write_las, write_survey, write_tops

        unit = parse_depth_unit(depth_unit if depth_unit is not None
                                else getattr(self.well, "depth_unit", "m"))
        folder = Path(folder)
        folder.mkdir(parents=True, exist_ok=True)
        stem = stem or _file_stem(self.name)
        paths = {"las": folder / f"{stem}.las", "tops": folder / f"{stem}_tops.csv",
                 "survey": folder / f"{stem}_survey.csv"}
        write_las(self.well, paths["las"], depth_unit=unit)
        write_tops(self.tops, paths["tops"], depth_unit=unit)
        write_survey(self.trajectory.stations, paths["survey"],  # type: ignore[attr-defined]
                     depth_unit=unit)
        return paths


def _file_stem(name: str) -> str:
    return re.sub(r"[^A-Za-z0-9_.-]+", "_", name).strip("_") or "well"


def first_state_change(state: Callable[[float], np.ndarray], lo_md: float, hi_md: float,
                       lo_state: np.ndarray) -> tuple[float, float]:
    """Bisect ``[lo_md, hi_md]`` for the first MD where ``state(md)`` (which fault blocks the
    point is in) stops equalling ``lo_state``; returns (crossing MD, an MD just past it), to
    1e-9 m."""
    a, b = float(lo_md), float(hi_md)
    for _ in range(200):
        if b - a <= 1e-9:
            break
        c = 0.5 * (a + b)
        if np.array_equal(state(c), lo_state):
            a = c
        else:
            b = c
    return 0.5 * (a + b), b


def simulate_well(
    column: ReferenceColumn,
    beds: Beds,
    faults: Sequence[PlanarFault],
    trajectory: object | None,
    *,
    md_top_m: float,
    md_base_m: float,
    md_step_m: float = 0.1524,
    curves: Iterable[str] = ("GR",),
    thickness_factors: Mapping[str, float] | Sequence[float] | None = None,
    noise_std: float | Mapping[str, float] = 0.0,
    gain: float | Mapping[str, float] = 1.0,
    offset: float | Mapping[str, float] = 0.0,
    unpicked: Iterable[str] = (),
    pick_noise_m: float = 0.0,
    seed: int | None = None,
    name: str = "SYN-1",
    beyond: str = "clip",
    depth_unit: DepthUnit | str = "m",
    ref_name: str = "KB",
    datum: str = "reference",
) -> SyntheticWell:
    """Draw the logs, picked tops and true fault cuts of a well through a faulted model.

    Parameters
    ----------
    column : ReferenceColumn
        Surfaces and type log (needed when ``curves`` is not empty).
    beds : Beds
        Bedding attitude and position: ``s = n . P + origin`` before faulting.
    faults : sequence of PlanarFault
        Faults, undone in the order given: list the YOUNGEST first. Each later fault's plane is
        read in the coordinates restored by the earlier ones (for faults that do not intersect
        in the modelled volume the order does not matter).
    trajectory : Trajectory or None
        Well path (None: vertical at x = y = 0). Its surface location and reference elevation
        become the well's header facts.
    md_top_m, md_base_m, md_step_m : float
        Sampled MD interval and step; samples at ``md_top_m + k * md_step_m``. [m]
    curves : iterable of str
        Type-log curves to draw.
    thickness_factors : mapping or sequence, optional
        Lateral change of unit thickness at this well: local TST of unit i = factor × reference
        (e.g. 0.85-1.15). Beds.s is the LOCAL position; it is mapped onto the reference column.
    noise_std, gain, offset : float or {curve: float}
        Measurement model ``value = gain * type_log + offset + N(0, noise_std²)``.
    unpicked : iterable of str
        Surfaces the geologist did not pick (omitted from ``tops``).
    pick_noise_m : float
        Standard deviation of Gaussian MD error added to every pick. [m]
    seed : int, optional
        Seed of the one random generator used (curve noise in curve order, then pick noise).
    name : str
        Well name.
    beyond : {"clip", "mirror"}
        Reading the type log beyond its ends: ``"clip"`` holds the end value (cannot fake a
        section); ``"mirror"`` reflects the log at its ends (keeps texture).
    depth_unit : DepthUnit or str
        The well's file unit (used when writing files); the curves stay in metres.
    ref_name : str
        Name of the well's depth reference (``"KB"``, ``"DF"``, ...).
    datum : {"reference", "sea level"}
        Vertical datum of the beds' and faults' z: the well's depth reference (TVD, default), or
        sea level (TVDSS = TVD − the trajectory's ``ref_elevation_m``), which lets one model
        serve wells with different KB elevations.

    Returns
    -------
    SyntheticWell

    Notes
    -----
    * Restoration: for each sample P and each fault in order, if ``m . (P - point) > 0``
      (hanging wall) then ``P <- P - slip``; then ``s = n . P + origin`` (DESIGN.md section 4).
    * A truth cut is where the set of hanging walls holding the point changes. Its MD is found by
      bisection along the arc between the two samples (to 1e-9 m); the jump is
      ``Δs = s_below - s_above`` from the restored crossing point with the memberships of either
      side, in reference-column TST. It equals ``c (n . u)`` (c = +1 hanging wall → footwall)
      without thickness change (DESIGN.md section 3; reference/methods.md section 3.3).
      ``section`` follows the rule of reference/methods.md section 3.4 with ``r = t . n`` at the
      crossing; ``fault_type`` is the separation sense (``c Δs > 0`` normal); ``crossing`` is +1
      hanging wall → footwall, −1 footwall → hanging wall for the fault whose plane is crossed
      (``fault``: its index in ``faults``); ``md_first_below_m`` is the first sample below (the
      reporting convention of DEVELOPERS.md); ``vertical_separation_m = |Δs| / cos δ``
      (Groshong 2006, eq. 7.3); ``surface_above``/``surface_below`` name the units on either
      side.
    * A top is where the well's s crosses a surface's s between two samples that are not
      separated by a cut (the cut points are inserted in the sequence); its MD is interpolated
      linearly in MD between them (exact on straight hole, within ~1e-5 m on a 3°/30 m build at
      a 0.15 m step).
    """
    from ..geo.trajectory import Trajectory
    from ..geo.well import Well

    if beyond not in BEYOND_COLUMN:
        raise InputError(f"beyond={beyond!r} is not known; use one of {', '.join(BEYOND_COLUMN)}")
    if datum not in MODEL_DATUMS:
        raise InputError(f"datum={datum!r} is not known; use one of {', '.join(MODEL_DATUMS)}")
    faults = tuple(faults)
    for f in faults:
        if not isinstance(f, PlanarFault):
            raise InputError(f"faults must be PlanarFault objects (got {type(f).__name__})")
    top, base, step = float(md_top_m), float(md_base_m), float(md_step_m)
    if not (math.isfinite(top) and math.isfinite(base) and base > top and step > 0):
        raise input_error("MD interval must have md_base_m > md_top_m and md_step_m > 0",
                          source=f"well {name!r}", value=(top, base, step),
                          fix="give a positive step and an interval going down-hole")
    if trajectory is None:
        trajectory = Trajectory.vertical(name=name)
    dz = 0.0
    if datum == "sea level":
        elev = getattr(trajectory, "ref_elevation_m", None)
        if elev is None:
            raise InputError(f"well {name!r}: datum='sea level' needs the trajectory's "
                             "ref_elevation_m (elevation of the depth reference); give it")
        dz = float(elev)

    def model_position(m_: ArrayLike) -> NDArray[np.float64]:
        p_ = np.array(trajectory.position(m_), dtype=float)  # type: ignore[attr-defined]
        p_[:, 2] -= dz
        return p_
    curves = tuple(curves)
    if curves:
        if column.type_log is None:
            raise ColumnError(f"{column.name}: no type log to draw curves {list(curves)} from; "
                              "attach one with with_type_log() or pass curves=()")
        missing = [c for c in curves if c not in column.type_log.columns]
        if missing:
            raise ColumnError(f"{column.name}: type log has no curve(s) {missing}; available: "
                              f"{', '.join(map(str, column.type_log.columns))}")
    unpicked = {str(u) for u in unpicked}
    for u in sorted(unpicked):
        column.index(u)  # raises with the valid names
    tmap = _ThicknessMap(column, thickness_factors)
    n_vec = beds.normal

    nsamp = int(math.floor((base - top) / step + 1e-9)) + 1
    md = top + step * np.arange(nsamp)
    q, mem = _restore(model_position(md), faults)
    s_loc = q @ n_vec + beds.origin_s_m
    s_ref = tmap.to_reference(s_loc)

    # ---- truth cuts: changes of hanging-wall membership between samples
    cut_rows = []
    jumps: list[tuple[int, float, float, float]] = []  # (sample i, md, s_above, s_below)
    changed = np.flatnonzero(np.any(mem[1:] != mem[:-1], axis=1)) if faults else np.zeros(0, int)

    def state(m_: float):
        return _restore(model_position([m_]), faults)[1][0]

    for i in changed:
        lo_md, hi_md = float(md[i]), float(md[i + 1])
        lo_state, end_state = mem[i].copy(), mem[i + 1].copy()
        while not np.array_equal(lo_state, end_state):
            c_md, b = first_state_change(state, lo_md, hi_md, lo_state)
            b_state = state(b)
            p_c = model_position([c_md])
            q_above = _restore(p_c, faults, lo_state[None, :].copy())[0]
            q_below = _restore(p_c, faults, b_state[None, :].copy())[0]
            loc_above = float((q_above @ n_vec)[0] + beds.origin_s_m)
            loc_below = float((q_below @ n_vec)[0] + beds.origin_s_m)
            s_above = float(tmap.to_reference(np.array([loc_above]))[0])
            s_below = float(tmap.to_reference(np.array([loc_below]))[0])
            k = int(np.flatnonzero(lo_state != b_state)[0])
            crossing = 1 if lo_state[k] else -1
            t_c = np.asarray(trajectory.tangent([c_md]),  # type: ignore[attr-defined]
                             dtype=float)[0]
            r = float(t_c @ n_vec)
            ds = s_below - s_above
            if ds == 0.0 or abs(r) < 1e-12:
                section = "undetermined"
            else:
                section = "missing" if (ds > 0) == (r > 0) else "repeated"
            fault_type = ("undetermined" if ds == 0.0
                          else ("normal" if crossing * ds > 0 else "reverse"))
            tvd_c = float(p_c[0, 2]) + dz
            ref_el = getattr(trajectory, "ref_elevation_m", None)
            first_below = float(md[i + 1])
            cut_rows.append({
                "well": name, "md_m": c_md, "md_first_below_m": first_below,
                "tvd_m": tvd_c,
                "tvdss_m": (tvd_c - ref_el) if ref_el is not None else math.nan,
                "x_m": float(p_c[0, 0]), "y_m": float(p_c[0, 1]), "fault": k,
                "fault_name": faults[k].name, "delta_s_m": ds, "s_above_m": s_above,
                "s_below_m": s_below, "tst_m": abs(ds),
                "vertical_separation_m": abs(ds) / math.cos(math.radians(beds.dip_deg))
                if beds.dip_deg < 90 else math.inf,
                "section": section, "fault_type": fault_type, "crossing": crossing, "r": r,
                "surface_above": column.unit_at(s_above), "surface_below": column.unit_at(s_below),
            })
            jumps.append((int(i), c_md, loc_above, loc_below))
            lo_md, lo_state = b, b_state
    cuts = pd.DataFrame(cut_rows, columns=list(TRUTH_COLUMNS))
    if len(cuts):
        cuts = cuts.astype({"fault": int, "crossing": int})

    # ---- tops: crossings of surfaces on the sample sequence with the cut points inserted,
    # found in local s (linear along the hole) against the surfaces' local positions
    md_aug, s_aug, is_jump = _augment(md, s_loc, jumps)
    picks_md: list[float] = []
    picks_name: list[str] = []
    s0, s1 = s_aug[:-1], s_aug[1:]
    m0, m1 = md_aug[:-1], md_aug[1:]
    ok = ~is_jump
    for nm, sk in zip(column.names, tmap.loc[: len(column)]):
        if nm in unpicked:
            continue
        hit = ok & (((s0 < sk) & (s1 >= sk)) | ((s1 < sk) & (s0 >= sk)))
        for j in np.flatnonzero(hit):
            frac = (sk - s0[j]) / (s1[j] - s0[j])
            picks_md.append(float(m0[j] + frac * (m1[j] - m0[j])))
            picks_name.append(nm)

    rng = np.random.default_rng(seed)
    # ---- curves
    data: dict[str, NDArray[np.float64]] = {}
    if curves:
        tl = column.type_log
        grid = tl.index.to_numpy(dtype=float)  # type: ignore[union-attr]
        for c in curves:
            values = tl[c].to_numpy(dtype=float)  # type: ignore[index]
            v = _read_type_log(grid, values, s_ref, beyond)
            v = _per_curve(gain, c, "gain") * v + _per_curve(offset, c, "offset")
            sd = _per_curve(noise_std, c, "noise_std")
            if sd > 0:
                v = v + rng.normal(0.0, sd, size=v.shape)
            data[c] = v
    if pick_noise_m > 0 and picks_md:
        picks_md = list(np.asarray(picks_md) + rng.normal(0.0, float(pick_noise_m),
                                                          size=len(picks_md)))
    tops = pd.DataFrame({"well": [name] * len(picks_md), "surface": picks_name,
                         "md_m": np.asarray(picks_md, dtype=float)})
    tops = tops.sort_values("md_m", kind="stable").reset_index(drop=True)

    well = Well(
        name=name,
        curves=pd.DataFrame(data, index=pd.Index(md, name="md_m")),
        depth_unit=parse_depth_unit(depth_unit),
        ref_elevation_m=getattr(trajectory, "ref_elevation_m", None),
        ref_name=ref_name,
        x_m=getattr(trajectory, "x0_m", 0.0),
        y_m=getattr(trajectory, "y0_m", 0.0),
        source="<synthetic>",
    )
    return SyntheticWell(well=well, tops=tops, cuts=cuts, trajectory=trajectory, s_m=s_ref,
                         column=column, beds=beds, faults=faults)


def _augment(md: NDArray[np.float64], s: NDArray[np.float64],
             jumps: list[tuple[int, float, float, float]]):
    """Insert each cut as two points (md, s_above), (md, s_below) joined by a jump link."""
    if not jumps:
        return md, s, np.zeros(len(md) - 1, dtype=bool)
    md_parts, s_parts = [], []
    start = 0
    for i, c_md, s_a, s_b in sorted(jumps, key=lambda j: j[1]):
        md_parts.append(md[start:i + 1])
        s_parts.append(s[start:i + 1])
        md_parts.append(np.array([c_md, c_md]))
        s_parts.append(np.array([s_a, s_b]))
        start = i + 1
    md_parts.append(md[start:])
    s_parts.append(s[start:])
    md_aug = np.concatenate(md_parts)
    s_aug = np.concatenate(s_parts)
    is_jump = np.zeros(len(md_aug) - 1, dtype=bool)
    pos = 0
    for k, part in enumerate(md_parts):  # parts alternate: samples, pair, samples, pair, ...
        if k % 2 == 1:
            is_jump[pos] = True  # the link from s_above to s_below
        pos += len(part)
    return md_aug, s_aug, is_jump
