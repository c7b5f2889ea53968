"""A whole field's formation tops at once: many wells through planar beds and planar faults.

:func:`wellfault.synth.forward.simulate_well` draws one well's curves, tops and true cuts sample by
sample; drawing 10,000 wells that way takes minutes. This module draws only the tops (and the
true cuts) of many wells at once, with numpy arrays over (well, sample), for the field-screening
tests and benchmarks. The model is the same (DESIGN.md §4, "Synthetic wells"):

* beds ``s = n·P + origin`` in (x, y, TVDSS) — a sea-level datum, so wells with different
  elevations share one model;
* faults undone in list order (youngest first): a point in a fault's hanging wall
  (``m·(P − point) > 0``) is moved back by the fault's slip;
* a per-well lateral thickness change (``thickness_factors``: local TST of unit i = factor ×
  reference), picks where the well's local s crosses the local surface positions, truth cuts
  where the set of hanging walls holding the well changes.

Wells are vertical, or build-and-hold (vertical to a kick-off point, a constant build to the
hold inclination at a constant azimuth, then straight). Their paths are evaluated in closed
form; the survey stations written for them (every 30 m plus the kick-off and end-of-build
points) reproduce the same path exactly by minimum curvature, so the screening reads back the
geometry the tops were drawn on. ``tests/test_fieldsim.py`` checks the tops and cuts against
:func:`~wellfault.synth.forward.simulate_well` well by well.

Everything here is invented test data: names are ``W00001`` ...
"""

from __future__ import annotations

import math
import os
from collections.abc import Callable, Sequence
from pathlib import Path

import numpy as np
import pandas as pd
from numpy.typing import NDArray

from ..geo.column import ReferenceColumn
from ..errors import InputError
from .structure import Beds, PlanarFault
from .forward import first_state_change

__all__ = ["plan_wells", "well_positions", "survey_stations", "field_tops", "write_field",
           "PLAN_COLUMNS"]

#: Columns of a well plan (:func:`plan_wells`).
PLAN_COLUMNS = ("well", "x_m", "y_m", "elevation_m", "inc_deg", "azi_deg", "kop_m",
                "build_deg_per_30m", "td_m")


def plan_wells(
    n: int,
    *,
    seed: int = 0,
    extent_m: tuple[float, float, float, float] = (0.0, 5000.0, 0.0, 5000.0),
    deviated_fraction: float = 0.3,
    inc_range_deg: tuple[float, float] = (20.0, 50.0),
    kop_range_m: tuple[float, float] = (300.0, 900.0),
    build_deg_per_30m: float = 2.5,
    elevation_range_m: tuple[float, float] = (30.0, 50.0),
    target_tvdss_m: float = 2500.0,
    jitter: float = 0.35,
    prefix: str = "W",
) -> pd.DataFrame:
    """Invent ``n`` wells on a jittered grid over ``extent_m = (x0, x1, y0, y1)``.

    A fraction ``deviated_fraction`` are build-and-hold wells (random hold inclination in
    ``inc_range_deg`` toward a random azimuth); the rest are vertical. Each well is drilled to
    ``target_tvdss_m`` TVDSS. Returns a frame with :data:`PLAN_COLUMNS`.
    """
    n = int(n)
    if n < 1:
        raise InputError(f"plan_wells needs at least one well (got {n})")
    rng = np.random.default_rng(seed)
    x0, x1, y0, y1 = (float(v) for v in extent_m)
    aspect = (x1 - x0) / max(y1 - y0, 1e-9)
    nx = max(1, int(math.ceil(math.sqrt(n * aspect))))
    ny = max(1, int(math.ceil(n / nx)))
    dx, dy = (x1 - x0) / nx, (y1 - y0) / ny
    cells = rng.permutation(nx * ny)[:n]
    cells.sort()
    ix, iy = cells % nx, cells // nx
    x = x0 + (ix + 0.5 + rng.uniform(-jitter, jitter, n)) * dx
    y = y0 + (iy + 0.5 + rng.uniform(-jitter, jitter, n)) * dy
    elev = rng.uniform(*elevation_range_m, n).round(1)
    deviated = rng.random(n) < deviated_fraction
    inc = np.where(deviated, rng.uniform(*inc_range_deg, n), 0.0).round(1)
    azi = np.where(deviated, rng.uniform(0.0, 360.0, n), 0.0).round(1)
    kop = np.where(deviated, rng.uniform(*kop_range_m, n), 0.0).round(0)
    build = np.where(deviated, float(build_deg_per_30m), 0.0)
    plan = pd.DataFrame({
        "well": [f"{prefix}{i + 1:05d}" for i in range(n)], "x_m": x.round(1),
        "y_m": y.round(1), "elevation_m": elev, "inc_deg": inc, "azi_deg": azi, "kop_m": kop,
        "build_deg_per_30m": build, "td_m": 0.0,
    })
    plan["td_m"] = np.ceil(_md_at_tvd(plan, target_tvdss_m + elev))
    return plan


def _arrays(plan: pd.DataFrame):
    inc = np.radians(plan["inc_deg"].to_numpy(float))
    azi = np.radians(plan["azi_deg"].to_numpy(float))
    kop = plan["kop_m"].to_numpy(float)
    k = np.radians(plan["build_deg_per_30m"].to_numpy(float)) / 30.0  # build rate [rad/m]
    radius = np.where(k > 0, 1.0 / np.where(k > 0, k, 1.0), 0.0)
    eob = kop + np.where(k > 0, inc / np.where(k > 0, k, 1.0), 0.0)
    return inc, azi, kop, k, radius, eob


def _md_at_tvd(plan: pd.DataFrame, tvd: NDArray[np.float64]) -> NDArray[np.float64]:
    inc, _azi, kop, _k, radius, eob = _arrays(plan)
    tvd = np.broadcast_to(np.asarray(tvd, dtype=float), inc.shape)
    tvd_eob = kop + radius * np.sin(inc)
    hold = eob + (tvd - tvd_eob) / np.maximum(np.cos(inc), 1e-9)
    build = kop + np.where(radius > 0, np.arcsin(np.clip((tvd - kop) / np.where(
        radius > 0, radius, 1.0), -1.0, 1.0)) * radius, 0.0)
    return np.where(inc == 0, tvd, np.where(tvd <= kop, tvd, np.where(tvd <= tvd_eob, build,
                                                                       hold)))


def well_positions(plan: pd.DataFrame, md_m: NDArray[np.float64]) -> NDArray[np.float64]:
    """Positions (x, y, TVD) of every well of ``plan`` at MDs ``md_m`` (shape (W, S)).

    Closed form of vertical / constant-build / hold (the path minimum curvature reproduces from
    :func:`survey_stations`): in the build, inclination θ = k (md − kop), horizontal
    displacement R (1 − cos θ), TVD kop + R sin θ with R = 1/k.
    """
    inc, azi, kop, k, radius, eob = (a[:, None] for a in _arrays(plan))
    md = np.asarray(md_m, dtype=float)
    theta = np.clip(k * (md - kop), 0.0, inc)
    in_hold = md > eob
    h_build = radius * (1.0 - np.cos(theta))
    z_build = np.minimum(md, kop) + radius * np.sin(theta)
    along = np.where(in_hold, md - eob, 0.0)
    h = h_build + along * np.sin(inc)
    z = z_build + along * np.cos(inc)
    x = plan["x_m"].to_numpy(float)[:, None] + h * np.sin(azi)
    y = plan["y_m"].to_numpy(float)[:, None] + h * np.cos(azi)
    return np.stack([x, y, z], axis=-1)


def survey_stations(row) -> pd.DataFrame | None:
    """Survey stations (``md_m, inc_deg, azi_deg``) of one planned well; None when vertical.

    Stations every 30 m plus the kick-off point and the end of the build, so minimum curvature
    rebuilds the planned path exactly (a constant build between stations is an arc).
    """
    inc = float(row["inc_deg"])
    if inc <= 0:
        return None
    kop, td = float(row["kop_m"]), float(row["td_m"])
    k = math.radians(float(row["build_deg_per_30m"])) / 30.0
    eob = kop + math.radians(inc) / k
    md = np.unique(np.concatenate([np.arange(0.0, td, 30.0), [kop, eob, td]]))
    md = md[md <= td]
    incs = np.degrees(np.clip(k * (md - kop), 0.0, math.radians(inc)))
    azi = np.where(incs > 0, float(row["azi_deg"]), 0.0)
    return pd.DataFrame({"md_m": md, "inc_deg": incs, "azi_deg": azi})


def _factor_matrix(plan: pd.DataFrame, column: ReferenceColumn, factors) -> NDArray[np.float64]:
    n_w, n_u = len(plan), len(column)
    if factors is None:
        return np.ones((n_w, n_u))
    if callable(factors):
        f = np.asarray(factors(plan["x_m"].to_numpy(float), plan["y_m"].to_numpy(float)),
                       dtype=float)
    else:
        f = np.asarray(factors, dtype=float)
    f = np.broadcast_to(f, (n_w, n_u)).astype(float)
    if not np.all(np.isfinite(f) & (f > 0)):
        raise InputError("thickness factors must be positive numbers (1 keeps the reference "
                         "thickness)")
    return f


def field_tops(
    plan: pd.DataFrame,
    column: ReferenceColumn,
    beds: Beds,
    faults: Sequence[PlanarFault] = (),
    *,
    thickness_factors: Callable | NDArray[np.float64] | None = None,
    pick_noise_m: float = 0.0,
    unpicked_fraction: float = 0.0,
    seed: int = 0,
    step_m: float = 2.0,
    chunk: int = 256,
    return_factors: bool = False,
):
    """Tops and true cuts of every well of ``plan``, drawn at once.

    Parameters
    ----------
    plan : DataFrame
        :data:`PLAN_COLUMNS` (from :func:`plan_wells`).
    column : ReferenceColumn
        Surfaces (a defined base gives the base's crossing no pick, as in ``simulate_well``).
    beds, faults
        The model in (x, y, TVDSS); faults youngest first.
    thickness_factors : callable (x, y) -> (W, U), array (W, U) or (U,), optional
        Lateral thickness change per well and unit. A callable is a map: it is read where
        each well is in the middle of the column (not at its surface location, which a
        high-angle well leaves kilometres behind).
    pick_noise_m : float
        Standard deviation of the Gaussian error added to each pick's MD. [m]
    unpicked_fraction : float
        Chance that a pick is left out of the table (an unpicked surface).
    step_m : float
        Sample step along the holes; picks and cuts are interpolated between samples (exact on
        straight hole, within a millimetre on a 2.5°/30 m build at 2 m).

    Returns
    -------
    tops : DataFrame
        ``well, surface, md_m`` ordered by well then MD.
    cuts : DataFrame
        ``well, md_m, x_m, y_m, tvdss_m, fault, fault_name, delta_s_m, crossing`` (Δs in
        reference-column TST; crossing +1 hanging wall → footwall).
    factors : ndarray (W, U)
        With ``return_factors=True``: the thickness factors each well was drawn with.
    """
    faults = tuple(faults)
    rng = np.random.default_rng(seed)
    f_all = None if callable(thickness_factors) else \
        _factor_matrix(plan, column, thickness_factors)
    f_used = np.ones((len(plan), len(column)))
    ref = np.asarray(column.s_m, dtype=float)
    has_base = not math.isnan(column.base_s_m)
    ref_knots = np.append(ref, column.base_s_m) if has_base else ref
    th = np.diff(ref_knots)
    n_pick = len(column)  # the base is not a pick
    names = np.asarray(column.names, dtype=object)
    n_vec = beds.normal
    tops_w, tops_md, tops_k = [], [], []
    cut_rows: list[dict] = []
    for start in range(0, len(plan), chunk):
        sub = plan.iloc[start:start + chunk].reset_index(drop=True)
        td = sub["td_m"].to_numpy(float)
        n_s = int(math.ceil(td.max() / step_m)) + 1
        md = np.minimum(np.arange(n_s)[None, :] * step_m, td[:, None])
        valid = np.concatenate([np.ones((len(sub), 1), bool),
                                np.diff(md, axis=1) > 0], axis=1)
        p = well_positions(sub, md)
        p[..., 2] -= sub["elevation_m"].to_numpy(float)[:, None]
        q = p.copy()
        mem = np.zeros(p.shape[:2] + (len(faults),), dtype=bool)
        for j, flt in enumerate(faults):
            mem[..., j] = (q - np.asarray(flt.point)) @ flt.normal_up > 0.0
            q[mem[..., j]] -= np.asarray(flt.slip)
        s = q @ n_vec + beds.origin_s_m
        if f_all is None:
            # thickness is a property of the place: read the map where the well is in the
            # middle of the column (one factor set per well, as simulate_well takes it)
            mid_s = 0.5 * (ref_knots[0] + ref_knots[-1])
            k_mid = np.argmin(np.where(valid, np.abs(s - mid_s), np.inf), axis=1)
            at = p[np.arange(len(sub)), k_mid]
            f = _factor_matrix(pd.DataFrame({"x_m": at[:, 0], "y_m": at[:, 1]}), column,
                               thickness_factors)
        else:
            f = f_all[start:start + chunk]
        f_used[start:start + chunk] = f
        loc_knots = ref_knots[0] + np.concatenate(
            [np.zeros((len(sub), 1)), np.cumsum(th[None, :] * f[:, :len(th)], axis=1)], axis=1)
        pair_ok = valid[:, 1:]
        changed = (np.any(mem[:, 1:] != mem[:, :-1], axis=-1) if faults
                   else np.zeros_like(pair_ok)) & pair_ok
        ok = pair_ok & ~changed
        s0, s1, m0, m1 = s[:, :-1], s[:, 1:], md[:, :-1], md[:, 1:]
        for k in range(n_pick):
            sk = loc_knots[:, k][:, None]
            hit = ok & (((s0 < sk) & (s1 >= sk)) | ((s1 < sk) & (s0 >= sk)))
            w_i, j_i = np.nonzero(hit)
            frac = (sk[w_i, 0] - s0[w_i, j_i]) / (s1[w_i, j_i] - s0[w_i, j_i])
            tops_w.append(w_i + start)
            tops_md.append(m0[w_i, j_i] + frac * (m1[w_i, j_i] - m0[w_i, j_i]))
            tops_k.append(np.full(w_i.size, k))
        for w, i in zip(*np.nonzero(changed)):
            picks, rows = _jump_interval(sub.iloc[w], faults, beds, float(md[w, i]),
                                         float(md[w, i + 1]), mem[w, i], mem[w, i + 1],
                                         float(s[w, i]), float(s[w, i + 1]), loc_knots[w],
                                         ref_knots, n_pick)
            for md_pick, k in picks:
                tops_w.append(np.array([w + start]))
                tops_md.append(np.array([md_pick]))
                tops_k.append(np.array([k]))
            cut_rows.extend(rows)
    w_all = np.concatenate(tops_w) if tops_w else np.zeros(0, int)
    md_all = np.concatenate(tops_md) if tops_md else np.zeros(0)
    k_all = np.concatenate(tops_k) if tops_k else np.zeros(0, int)
    keep = rng.random(w_all.size) >= unpicked_fraction if unpicked_fraction > 0 else \
        np.ones(w_all.size, bool)
    if pick_noise_m > 0:
        md_all = md_all + rng.normal(0.0, float(pick_noise_m), md_all.size)
    w_all, md_all, k_all = w_all[keep], md_all[keep], k_all[keep]
    order = np.lexsort((md_all, w_all))
    well_names = plan["well"].to_numpy(dtype=object)
    tops = pd.DataFrame({"well": well_names[w_all[order]], "surface": names[k_all[order]],
                         "md_m": md_all[order]})
    cuts = pd.DataFrame(cut_rows, columns=["well", "md_m", "x_m", "y_m", "tvdss_m", "fault",
                                           "fault_name", "delta_s_m", "crossing"])
    if len(cuts):
        cuts = cuts.sort_values(["well", "md_m"], kind="stable").reset_index(drop=True)
    if return_factors:
        return tops, cuts, f_used
    return tops, cuts


def _to_reference(s_loc: float, loc_knots, ref_knots) -> float:
    if s_loc < loc_knots[0]:
        return float(ref_knots[0] + (s_loc - loc_knots[0]))
    if s_loc > loc_knots[-1]:
        return float(ref_knots[-1] + (s_loc - loc_knots[-1]))
    return float(np.interp(s_loc, loc_knots, ref_knots))


def _restore_one(p, faults, state=None):
    """Restore one point through ``faults`` given as (points, normals, slips) arrays."""
    points, normals, slips = faults
    q = np.array(p, dtype=float)
    mem = np.zeros(len(points), dtype=bool) if state is None else state
    for j in range(len(points)):
        if state is None:
            mem[j] = float((q - points[j]) @ normals[j]) > 0.0
        if mem[j]:
            q = q - slips[j]
    return q, mem


def _position_one(row, md: float) -> NDArray[np.float64]:
    """Scalar :func:`well_positions` (x, y, TVDSS) of one planned well (a plan row)."""
    inc = math.radians(float(row["inc_deg"]))
    azi = math.radians(float(row["azi_deg"]))
    kop = float(row["kop_m"])
    k = math.radians(float(row["build_deg_per_30m"])) / 30.0
    if k > 0:
        radius, eob = 1.0 / k, kop + inc / k
    else:
        radius, eob = 0.0, kop
    theta = min(max(k * (md - kop), 0.0), inc)
    along = md - eob if md > eob else 0.0
    h = radius * (1.0 - math.cos(theta)) + along * math.sin(inc)
    z = min(md, kop) + radius * math.sin(theta) + along * math.cos(inc)
    return np.array([float(row["x_m"]) + h * math.sin(azi), float(row["y_m"]) + h * math.cos(azi),
                     z - float(row["elevation_m"])])


def _jump_interval(row, faults, beds, md_a, md_b, state_a, state_b, s_a, s_b, loc_knots,
                   ref_knots, n_pick):
    """Cut(s) between two samples: crossing MD, jump, and the picks on either side."""
    row = {k: row[k] for k in PLAN_COLUMNS}

    def pos(m):
        return _position_one(row, m)

    arrays = (np.array([f.point for f in faults], dtype=float),
              np.array([f.normal_up for f in faults], dtype=float),
              np.array([f.slip for f in faults], dtype=float))

    def state(m):
        return _restore_one(pos(m), arrays)[1]

    n_vec = beds.normal
    picks, rows = [], []
    lo_md, lo_state, lo_s = md_a, state_a.copy(), s_a
    while not np.array_equal(lo_state, state_b):
        changing = np.flatnonzero(lo_state != state_b)
        if lo_md == md_a and changing.size == 1:
            # one fault changes: its side function, read in coordinates restored through the
            # (unchanged) earlier faults, is linear along straight hole -> interpolate
            k = int(changing[0])
            ends = []
            for m in (md_a, md_b):
                q = pos(m)
                for j in range(k):
                    if lo_state[j]:
                        q = q - arrays[2][j]
                ends.append(float((q - arrays[0][k]) @ arrays[1][k]))
            c_md = md_a + ends[0] / (ends[0] - ends[1]) * (md_b - md_a)
            b_state = state_b.copy()
        else:
            c_md, b = first_state_change(state, lo_md, md_b, lo_state)   # as simulate_well
            b_state = state(b)
        pc = pos(c_md)
        s_above = float(_restore_one(pc, arrays, lo_state.copy())[0] @ n_vec + beds.origin_s_m)
        s_below = float(_restore_one(pc, arrays, b_state.copy())[0] @ n_vec + beds.origin_s_m)
        _segment_picks(lo_md, c_md, lo_s, s_above, loc_knots, n_pick, picks)
        k = int(np.flatnonzero(lo_state != b_state)[0])
        ref_above = _to_reference(s_above, loc_knots, ref_knots)
        ref_below = _to_reference(s_below, loc_knots, ref_knots)
        rows.append({"well": row["well"], "md_m": c_md, "x_m": float(pc[0]),
                     "y_m": float(pc[1]), "tvdss_m": float(pc[2]), "fault": k,
                     "fault_name": faults[k].name, "delta_s_m": ref_below - ref_above,
                     "crossing": 1 if lo_state[k] else -1})
        lo_md, lo_state, lo_s = c_md, b_state, s_below
    _segment_picks(lo_md, md_b, lo_s, s_b, loc_knots, n_pick, picks)
    return picks, rows


def _segment_picks(m0, m1, s0, s1, loc_knots, n_pick, out):
    for k in range(n_pick):
        sk = loc_knots[k]
        if (s0 < sk <= s1) or (s1 < sk <= s0):
            frac = (sk - s0) / (s1 - s0)
            out.append((m0 + frac * (m1 - m0), k))


def write_field(
    folder: str | os.PathLike,
    plan: pd.DataFrame,
    tops: pd.DataFrame,
    column: ReferenceColumn,
    *,
    dip: str | None = None,
    subfolders: bool = True,
) -> Path:
    """Write a field for screening: per-well tops and surveys, the column and a manifest.

    Files: ``tops/<well>.csv`` (``surface,md_m``), ``surveys/<well>.csv`` (``md_m,inc_deg,
    azi_deg``, deviated wells only), ``column.csv`` (``surface,thickness_m``) and
    ``manifest.csv`` (``well,tops,survey,dip,x_m,y_m,elevation_m``; no LAS: wells screened by
    tops). Plain text written directly (fast for 10,000 wells). Returns the manifest's path.
    """
    folder = Path(folder)
    (folder / "tops").mkdir(parents=True, exist_ok=True)
    (folder / "surveys").mkdir(parents=True, exist_ok=True)
    groups = {name: g for name, g in tops.groupby("well", sort=False)}
    lines = ["well,tops,survey,dip,x_m,y_m,elevation_m"]
    for row in plan.itertuples(index=False):
        g = groups.get(row.well)
        body = "".join(f"{s},{m!r}\n" for s, m in zip(g["surface"], g["md_m"])) \
            if g is not None else ""
        (folder / "tops" / f"{row.well}.csv").write_text("surface,md_m\n" + body,
                                                          encoding="utf-8")
        st = survey_stations(row._asdict())
        survey = ""
        if st is not None:
            survey = f"surveys/{row.well}.csv"
            text = "md_m,inc_deg,azi_deg\n" + "".join(
                f"{a!r},{b!r},{c!r}\n" for a, b, c in zip(st["md_m"], st["inc_deg"],
                                                          st["azi_deg"]))
            (folder / survey).write_text(text, encoding="utf-8")
        lines.append(f"{row.well},tops/{row.well}.csv,{survey},{dip or ''},{row.x_m!r},"
                     f"{row.y_m!r},{row.elevation_m!r}")
    col = column.to_frame()
    col_text = "surface,thickness_m\n" + "".join(
        f"{s},{repr(t) if np.isfinite(t) else ''}\n"
        for s, t in zip(col["surface"], col["thickness_m"]))
    (folder / "column.csv").write_text(col_text, encoding="utf-8")
    path = folder / "manifest.csv"
    path.write_text("\n".join(lines) + "\n", encoding="utf-8")
    return path
