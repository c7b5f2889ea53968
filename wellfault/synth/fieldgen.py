"""The invented demo field: a dozen wells through dipping beds cut by four planar faults.

Everything here is made up: the field ("Velmora Ridge"), its wells, formations and faults. The
field is drawn with the forward model (:mod:`wellfault.synth.forward`) and written as the files a
geologist would be handed: LAS 2.0 logs (some in feet, some in metres, KB elevation and surface
X/Y in the headers), one tops table, one survey per deviated well, the reference column table, a
type well, a ``field.json`` with the bed dip and fault attitudes, a ``manifest.csv`` for field
screening, and the answer key ``truth_cuts.csv``. The same seed gives the same bytes.

Geometry (local grid origin at E 486000, N 6725000; TVDSS in metres):

* beds dip 8° toward 070; the top of the column lies at 1,550 m TVDSS at the grid origin;
* F1 normal 60°→250, throw 85 m; F2 normal 58°→070, throw 40 m (F1 and F2 bound a horst);
  F3 reverse 30°→160, throw 55 m (inversion in the south); F4 normal 63°→025, throw 18 m.
* wells: a vertical type well, vertical and deviated wells crossing each fault, a high-angle
  well drilled toward 250 that crosses F1 from footwall to hanging wall (a normal fault seen as
  REPEATED section), a deviated well crossing F2 the same way, a high-angle well crossing the
  reverse fault F3 from footwall to hanging wall (a reverse fault seen as MISSING section), and
  unfaulted wells.
"""

from __future__ import annotations

import dataclasses
import json
import math
from dataclasses import dataclass
from pathlib import Path

import numpy as np
import pandas as pd

from ..geo.column import ReferenceColumn
from ..errors import InputError
from .structure import Beds, PlanarFault
from .forward import SyntheticWell, simulate_well
from .columns import synthetic_column
from ..geo.units import DepthUnit, parse_depth_unit

__all__ = ["make_demo_field", "describe_field", "field_model", "DEFAULT_SEED", "FIELD_NAME",
           "WellPlan", "WELL_PLANS", "plan_trajectory"]

FIELD_NAME = "Velmora Ridge field"
DEFAULT_SEED = 7304
#: False easting / northing of the local grid. [m]
ORIGIN_XY = (486_000.0, 6_725_000.0)
BED_DIP = (8.0, 70.0)
TOP_TVDSS_AT_ORIGIN_M = 1550.0
N_UNITS = 15
UNCONFORMITY_INDEX = 6  # this surface is flagged as an unconformity in the column table
LOG_STEP_M = 0.1524  # 0.5 ft, common practice

#: Faults, youngest first (the order the forward model undoes them):
#: name, dip, dip azimuth, point (local x, local y, TVDSS), throw, kind.
FAULTS = (
    ("F3", 30.0, 160.0, (0.0, -2200.0, 2000.0), 55.0, "reverse"),
    ("F1", 60.0, 250.0, (-1200.0, 0.0, 1800.0), 85.0, "normal"),
    ("F2", 58.0, 70.0, (1400.0, 400.0, 2000.0), 40.0, "normal"),
    ("F4", 63.0, 25.0, (-300.0, 1800.0, 1900.0), 18.0, "normal"),
)


@dataclass(frozen=True)
class WellPlan:
    """One demo well: surface location, KB, file unit and a build-and-hold path.

    ``inc_deg == 0`` is a vertical well (no survey file). Otherwise the hole is vertical to
    ``kop`` then builds at ``build_deg_per_30m`` to ``inc_deg`` toward ``azi_deg`` and holds;
    ``drop_at``/``drop_to_deg`` give an S-shaped well. Lengths in the well's unit (``kop``,
    ``drop_at``, ``td``); x, y local grid metres; ``kb_m`` metres above sea level.
    """

    name: str
    kind: str
    x: float
    y: float
    kb_m: float
    unit: str
    td: float
    inc_deg: float = 0.0
    azi_deg: float = 0.0
    kop: float = 0.0
    build_deg_per_30m: float = 2.5
    drop_at: float | None = None
    drop_to_deg: float = 0.0
    log_above_s_m: float = -30.0  # log from where s first reaches this (above the top surface)
    max_log_m: float = 1500.0
    note: str = ""


WELL_PLANS = (
    WellPlan("VR-1", "type well, vertical", 150.0, 350.0, 38.2, "m", 2500.0,
             note="unfaulted; the field's type well"),
    WellPlan("VR-2", "vertical", -1310.0, 80.0, 41.5, "ft", 7400.0),
    WellPlan("VR-3", "vertical", 1520.0, 520.0, 35.9, "m", 2500.0),
    WellPlan("VR-4", "vertical", 240.0, -1975.0, 44.0, "ft", 7000.0),
    WellPlan("VR-5", "deviated", -200.0, -1500.0, 43.1, "m", 2700.0, 40.0, 160.0, 900.0),
    WellPlan("VR-6H", "high-angle", 400.0, 200.0, 39.0, "ft", 13000.0, 78.0, 250.0, 3300.0, 3.0,
             max_log_m=2000.0, note="normal fault F1 crossed footwall -> hanging wall"),
    WellPlan("VR-7", "deviated", -50.0, 250.0, 36.4, "m", 3000.0, 45.0, 70.0, 400.0,
             note="normal fault F2 crossed footwall -> hanging wall"),
    WellPlan("VR-8", "deviated (S-shaped)", -400.0, 700.0, 37.7, "ft", 8000.0, 30.0, 130.0,
             1800.0, 2.0, drop_at=3600.0, drop_to_deg=8.0, note="unfaulted"),
    WellPlan("VR-9", "high-angle", -300.0, -800.0, 42.6, "m", 4200.0, 78.0, 160.0, 1300.0, 3.0,
             max_log_m=2000.0, note="reverse fault F3 crossed footwall -> hanging wall"),
    WellPlan("VR-10", "vertical", -420.0, 1950.0, 36.8, "m", 2300.0),
    WellPlan("VR-11", "deviated", -2300.0, 600.0, 45.2, "ft", 8200.0, 35.0, 70.0, 2600.0),
    WellPlan("VR-12", "vertical", 2100.0, -300.0, 34.5, "m", 2400.0, note="unfaulted"),
)


def field_model(seed: int = DEFAULT_SEED):
    """The field's column, beds and faults (local grid + false origin, TVDSS datum).

    Returns
    -------
    column : ReferenceColumn
        The true column with its type log (GR, RHOB).
    beds : Beds
        Bedding in absolute coordinates (x, y, TVDSS).
    faults : tuple of PlanarFault
        Youngest first, in absolute coordinates.
    """
    column = synthetic_column(N_UNITS, seed=seed, curves=("GR", "RHOB"), pad_m=60.0,
                              thickness_range_m=(12.0, 78.0), name=FIELD_NAME)
    unc = np.zeros(len(column), dtype=bool)
    unc[UNCONFORMITY_INDEX] = True
    column = ReferenceColumn(column.names, column.s_m, unconformity=unc,
                             base_s_m=column.base_s_m, type_log=column.type_log,
                             name=FIELD_NAME)
    x0, y0 = ORIGIN_XY
    beds = Beds.through(*BED_DIP, (x0, y0, TOP_TVDSS_AT_ORIGIN_M), 0.0)
    faults = tuple(
        PlanarFault.dip_slip(dip, azi, (x0 + p[0], y0 + p[1], p[2]), throw, kind, name=name)
        for name, dip, azi, p, throw, kind in FAULTS
    )
    return column, beds, faults


def _survey_stations(plan: WellPlan) -> pd.DataFrame | None:
    """Survey stations in the well's unit: every 30 m / 100 ft, angles to 0.01 degree."""
    if plan.inc_deg == 0:
        return None
    u = parse_depth_unit(plan.unit)
    every = 30.0 if u is DepthUnit.M else 100.0
    rate = plan.build_deg_per_30m * (every * u.metres / 30.0)  # degrees per station interval
    md = np.arange(0.0, plan.td + every / 2, every)
    inc = np.clip((md - plan.kop) / every * rate, 0.0, plan.inc_deg)
    if plan.drop_at is not None:
        drop = np.clip((md - plan.drop_at) / every * rate, 0.0, plan.inc_deg - plan.drop_to_deg)
        inc = inc - drop
    azi = np.where(inc > 0, plan.azi_deg, 0.0)
    return pd.DataFrame({"md": np.round(md, 4), "inc": np.round(inc, 2), "azi": np.round(azi, 2)})


def plan_trajectory(plan: WellPlan):
    """The minimum-curvature path of a planned well (absolute x/y, KB elevation set)."""
    from ..geo.trajectory import Trajectory

    u = parse_depth_unit(plan.unit)
    x0, y0 = ORIGIN_XY[0] + plan.x, ORIGIN_XY[1] + plan.y
    st = _survey_stations(plan)
    if st is None:
        return Trajectory.vertical(x0_m=x0, y0_m=y0, ref_elevation_m=plan.kb_m, name=plan.name)
    return Trajectory(st["md"].to_numpy() * u.metres, st["inc"].to_numpy(), st["azi"].to_numpy(),
                      x0_m=x0, y0_m=y0, ref_elevation_m=plan.kb_m, name=plan.name)


def _log_interval(plan: WellPlan, column: ReferenceColumn, beds: Beds, faults, traj):
    """MD range to log: from where s first reaches ``log_above_s_m`` to below the column base
    (or TD, or ``max_log_m`` of hole), rounded outward to 5 m / 10 ft."""
    u = parse_depth_unit(plan.unit)
    td_m = plan.td * u.metres
    probe = simulate_well(column, beds, faults, traj, md_top_m=0.0, md_base_m=td_m,
                          md_step_m=1.0, curves=(), name=plan.name, datum="sea level")
    md = probe.well.md_m
    s = probe.s_m
    i0 = int(np.flatnonzero(s >= plan.log_above_s_m)[0])
    deep = np.flatnonzero(s <= column.base_s_m + 25.0)
    i1 = int(deep[-1]) if deep.size else len(md) - 1
    grain = 5.0 if u is DepthUnit.M else 10.0 * u.metres
    top = math.floor(md[i0] / grain) * grain
    base = min(math.ceil(md[i1] / grain) * grain, td_m, top + plan.max_log_m)
    # snap to the file unit so the LAS depths are round numbers in that unit
    top = round(top / u.metres, 4) * u.metres
    return top, base


def _draw_well(plan: WellPlan, column, beds, faults, rng: np.random.Generator) -> SyntheticWell:
    traj = plan_trajectory(plan)
    top, base = _log_interval(plan, column, beds, faults, traj)
    seed = int(rng.integers(2**31))
    factors = np.round(rng.uniform(0.9, 1.1, len(column)), 3)  # lateral thickness change
    gain = float(np.round(rng.uniform(0.93, 1.07), 3))
    offset = float(np.round(rng.uniform(-6.0, 6.0), 1))
    unpicked = ()
    if plan.name in ("VR-3", "VR-9"):  # a few surfaces left unpicked, as in real tops tables
        unpicked = (column.names[int(rng.integers(2, len(column) - 2))],)
    pick_noise = 0.3
    if plan.kind.startswith("type"):  # the type well defines the column: exact picks
        factors = np.ones(len(column))
        gain, offset, pick_noise = 1.0, 0.0, 0.0
    syn = simulate_well(
        column, beds, faults, traj, md_top_m=top, md_base_m=base, md_step_m=LOG_STEP_M,
        curves=("GR", "RHOB"), thickness_factors=factors,
        noise_std={"GR": 3.0, "RHOB": 0.012}, gain={"GR": gain, "RHOB": 1.0},
        offset={"GR": offset, "RHOB": 0.0}, unpicked=unpicked, pick_noise_m=pick_noise,
        seed=seed,
        name=plan.name, depth_unit=plan.unit, datum="sea level",
    )
    # round the curves as a logging contractor would deliver them
    curves = syn.well.curves
    syn.well = dataclasses.replace(syn.well, curves=pd.DataFrame(
        {"GR": np.round(curves["GR"].to_numpy(), 2),
         "RHOB": np.round(curves["RHOB"].to_numpy(), 4)}, index=curves.index))
    return syn


def _las_name(plan: WellPlan) -> str:
    return plan.name.replace("-", "_") + ".las"


def make_demo_field(folder: str | Path, *, seed: int = DEFAULT_SEED) -> dict[str, Path]:
    """Write the invented demo field into ``folder`` (created if needed).

    Files: ``<WELL>.las`` per well (``VR_1.las`` ...; LAS 2.0, depth unit per well, EKB and X/Y
    in the header), ``<WELL>_survey.csv`` per deviated well (``md_<unit>, inc_deg, azi_deg``),
    ``tops.csv`` (``well, surface, md_m``; every pick of every well), ``column.csv``
    (``surface, thickness_m, unconformity``), ``field.json`` (bed dip, faults, wells),
    ``manifest.csv`` (``well, las, survey, tops, dip, x_m, y_m, elevation_m``, paths relative
    to it) and ``truth_cuts.csv`` (the true cuts, metres).

    Parameters
    ----------
    folder : str or Path
    seed : int
        Everything random (column, noise, thickness changes, picks) derives from it.

    Returns
    -------
    dict
        Paths written, by name.
    """
    from ..io import write_las, write_table
    from ..io.outputs import output_folder, write_output
    from ..geo.precision import FULL  # the field's input files, written as drawn

    folder = Path(folder)
    output_folder(folder, what="the field folder")
    column, beds, faults = field_model(seed)
    rng = np.random.default_rng(seed + 1)
    written: dict[str, Path] = {}
    tops_parts, truth_parts, manifest_rows, well_meta = [], [], [], []
    for plan in WELL_PLANS:
        syn = _draw_well(plan, column, beds, faults, rng)
        u = parse_depth_unit(plan.unit)
        las = folder / _las_name(plan)
        written[las.name] = write_las(syn.well, las, depth_unit=u)
        survey_name = ""
        st = _survey_stations(plan)
        if st is not None:
            survey_name = plan.name.replace("-", "_") + "_survey.csv"
            out = st.rename(columns={"md": f"md_{u.suffix}", "inc": "inc_deg", "azi": "azi_deg"})
            written[survey_name] = write_table(out, folder / survey_name, decimals=FULL)
        tops_parts.append(syn.tops)
        truth_parts.append(syn.cuts.assign(depth_unit=u.value))
        manifest_rows.append({
            "well": plan.name, "las": las.name, "survey": survey_name, "tops": "tops.csv",
            "dip": f"{BED_DIP[0]:g}/{BED_DIP[1]:03.0f}",
            "x_m": ORIGIN_XY[0] + plan.x, "y_m": ORIGIN_XY[1] + plan.y, "elevation_m": plan.kb_m,
        })
        md_min, md_max = syn.well.md_range_m
        well_meta.append({
            "name": plan.name, "kind": plan.kind, "x_m": ORIGIN_XY[0] + plan.x,
            "y_m": ORIGIN_XY[1] + plan.y, "kb_elevation_m": plan.kb_m,
            "depth_unit": u.value, "td": plan.td, "logged_md_m": [round(md_min, 3),
                                                                  round(md_max, 3)],
            "max_inclination_deg": round(float(syn.trajectory.stations["inc_deg"].max()), 2),
            "las": las.name, "survey": survey_name or None, "note": plan.note,
        })

    tops = pd.concat(tops_parts, ignore_index=True)
    tops_out = pd.DataFrame({"well": tops["well"], "surface": tops["surface"],
                             "md_m": np.round(tops["md_m"].to_numpy(), 2)})
    written["tops.csv"] = write_table(tops_out, folder / "tops.csv", decimals=FULL)

    col = column.to_frame()
    col_out = pd.DataFrame({"surface": col["surface"], "thickness_m": col["thickness_m"].round(2),
                            "unconformity": np.where(col["unconformity"], "yes", "no")})
    written["column.csv"] = write_table(col_out, folder / "column.csv", decimals=FULL)

    truth = pd.concat([c for c in truth_parts if len(c)], ignore_index=True)
    float_cols = [c for c in truth.columns if c.endswith("_m")]
    truth[float_cols] = truth[float_cols].astype(float).round(3)
    truth["r"] = truth["r"].astype(float).round(5)
    written["truth_cuts.csv"] = write_table(truth, folder / "truth_cuts.csv", decimals=FULL)

    written["manifest.csv"] = write_table(pd.DataFrame(manifest_rows), folder / "manifest.csv",
                                          decimals=FULL)

    x0, y0 = ORIGIN_XY
    meta = {
        "field": FIELD_NAME,
        "note": "Invented demo field drawn with wellfault.synth.forward; all names are made up.",
        "seed": seed,
        "coordinates": {"x": "easting [m]", "y": "northing [m]", "z": "TVDSS [m], positive down",
                        "local_grid_origin_xy_m": [x0, y0]},
        "bed_dip": {"dip_deg": BED_DIP[0], "dip_azimuth_deg": BED_DIP[1],
                    "text": f"{BED_DIP[0]:g}/{BED_DIP[1]:03.0f}",
                    "top_surface": column.names[0],
                    "top_surface_tvdss_at_origin_m": TOP_TVDSS_AT_ORIGIN_M},
        "type_well": WELL_PLANS[0].name,
        "column_file": "column.csv",
        "tops_file": "tops.csv",
        "faults": [
            {"name": f.name, "dip_deg": f.dip_deg, "dip_azimuth_deg": f.dip_azimuth_deg,
             "attitude": f"{f.dip_deg:g}/{f.dip_azimuth_deg:03.0f}", "kind": kind,
             "throw_m": throw, "point_x_m": f.point[0], "point_y_m": f.point[1],
             "point_tvdss_m": f.point[2],
             "slip_east_north_down_m": [round(v, 4) for v in f.slip]}
            for f, (_, _, _, _, throw, kind) in zip(faults, FAULTS)
        ],
        "fault_order": "youngest first (the order the forward model undoes them)",
        "wells": well_meta,
    }
    written["field.json"] = write_output(folder / "field.json", json.dumps(meta, indent=2) + "\n",
                                         what="the field description")
    return written


def describe_field(folder: str | Path) -> str:
    """A short text summary of a demo field folder: wells, kinds, TD, inclination, faults crossed.

    Raises
    ------
    InputError
        When ``folder`` holds no ``field.json`` (run ``make_demo_field`` first).
    """
    folder = Path(folder)
    meta_path = folder / "field.json"
    if not meta_path.is_file():
        raise InputError(f"{folder}: no field.json here; write the demo field first "
                         "(python synthetic_wells/make_field.py or make_demo_field(folder))")
    meta = json.loads(meta_path.read_text(encoding="utf-8"))
    truth_path = folder / "truth_cuts.csv"
    truth = pd.read_csv(truth_path) if truth_path.is_file() else pd.DataFrame(
        columns=["well", "fault_name", "section"])
    dip = meta["bed_dip"]
    lines = [
        f"{meta['field']} (invented demo field, seed {meta['seed']}): "
        f"{len(meta['wells'])} wells, beds dip {dip['text']}, type well {meta['type_well']}",
        "faults: " + "; ".join(f"{f['name']} {f['kind']} {f['attitude']} throw {f['throw_m']:g} m"
                               for f in meta["faults"]),
        "",
        f"{'well':<7} {'kind':<24} {'unit':<4} {'TD':>8} {'max inc':>8}  faults crossed (truth)",
    ]
    for w in meta["wells"]:
        cuts = truth[truth["well"] == w["name"]]
        crossed = ", ".join(f"{r.fault_name} ({r.section})" for r in cuts.itertuples()) or "none"
        td = f"{w['td']:g} {w['depth_unit']}"
        lines.append(f"{w['name']:<7} {w['kind']:<24} {w['depth_unit']:<4} {td:>8} "
                     f"{w['max_inclination_deg']:>7.1f}°  {crossed}")
    return "\n".join(lines)
