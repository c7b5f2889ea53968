"""Figures of a field: the fault map and the separation along strike."""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np
import pandas as pd

from ..errors import InputError
from .style import (
    FAULT,
    FAULT_COLOURS,
    INK,
    LOW_CONFIDENCE,
    SECTION_STYLE,
    _figure,
    _len,
    _place_labels,
    _style,
    display_unit,
    length_axis,
)
from .track import cuts_in_metres

__all__ = ["field_map", "separation_along_strike"]


# ------------------------------------------------------------------------------- field map
def _faults_table(faults) -> pd.DataFrame:
    """One row per fault: fault_id, dip_deg, dip_azimuth_deg, strike_deg, sense, x_m, y_m,
    tvdss_m (the mean of the rows given for the fault)."""
    if faults is None:
        return pd.DataFrame(columns=["fault_id", "dip_deg", "dip_azimuth_deg", "strike_deg",
                                     "sense", "x_m", "y_m", "tvdss_m"])
    f = pd.DataFrame(faults).copy()
    if "fault_id" not in f.columns:
        for alt in ("fault", "name", "fault_name"):
            if alt in f.columns:
                f = f.rename(columns={alt: "fault_id"})
                break
    if "fault_id" not in f.columns:
        raise InputError(f"faults table needs a 'fault_id' column (have {list(f.columns)})")
    if "dip_azimuth_deg" not in f.columns and "strike_deg" in f.columns:
        f["dip_azimuth_deg"] = (pd.to_numeric(f["strike_deg"]) + 90.0) % 360.0
    if "strike_deg" not in f.columns and "dip_azimuth_deg" in f.columns:
        f["strike_deg"] = (pd.to_numeric(f["dip_azimuth_deg"]) - 90.0) % 360.0
    for col in ("dip_deg", "dip_azimuth_deg", "x_m", "y_m"):
        if col not in f.columns:
            raise InputError(f"faults table needs column {col!r} (have {list(f.columns)}): "
                             "fault_id, strike_deg, dip_deg, dip_azimuth_deg, sense and a "
                             "point x_m, y_m, tvdss_m")
    if "tvdss_m" not in f.columns:
        f["tvdss_m"] = np.nan
    if "sense" not in f.columns:
        f["sense"] = ""
    rows = []
    for fid, g in f.groupby("fault_id", sort=False):
        rows.append({"fault_id": str(fid),
                     "dip_deg": float(pd.to_numeric(g["dip_deg"]).iloc[0]),
                     "dip_azimuth_deg": float(pd.to_numeric(g["dip_azimuth_deg"]).iloc[0]),
                     "strike_deg": float(pd.to_numeric(g["strike_deg"]).iloc[0]),
                     "sense": str(g["sense"].iloc[0]) if pd.notna(g["sense"].iloc[0]) else "",
                     "x_m": float(pd.to_numeric(g["x_m"]).mean()),
                     "y_m": float(pd.to_numeric(g["y_m"]).mean()),
                     "tvdss_m": float(pd.to_numeric(g["tvdss_m"]).mean())})
    return pd.DataFrame(rows)


def fault_trace(fault: Mapping, tvdss_m: float) -> tuple[np.ndarray, np.ndarray] | None:
    """A point on the fault's trace at ``tvdss_m`` and the unit strike vector, in map (x, y).

    The plane through (x, y, tvdss) dipping ``dip_deg`` toward ``dip_azimuth_deg`` cuts the
    horizontal at depth z along the strike line through
    ``(x, y) + (z − tvdss) / tan(dip) · (sin β, cos β)`` (deeper levels lie down-dip).
    None for a horizontal fault or an unknown reference depth.
    """
    dip = math.radians(float(fault["dip_deg"]))
    beta = math.radians(float(fault["dip_azimuth_deg"]))
    z0 = float(fault.get("tvdss_m", np.nan))
    if dip < 1e-6:
        return None
    shift = 0.0 if not math.isfinite(z0) else (tvdss_m - z0) / math.tan(dip)
    p = np.array([float(fault["x_m"]) + shift * math.sin(beta),
                  float(fault["y_m"]) + shift * math.cos(beta)])
    strike = beta - math.pi / 2
    return p, np.array([math.sin(strike), math.cos(strike)])


def _clip_line(p, u, box):
    """Parameter range of p + t·u inside box (xmin, xmax, ymin, ymax); None when outside."""
    lo, hi = -np.inf, np.inf
    for k, (a, b) in enumerate(((box[0], box[1]), (box[2], box[3]))):
        if abs(u[k]) < 1e-12:
            if not (a <= p[k] <= b):
                return None
            continue
        t1, t2 = (a - p[k]) / u[k], (b - p[k]) / u[k]
        lo, hi = max(lo, min(t1, t2)), min(hi, max(t1, t2))
    return (lo, hi) if hi > lo else None


def _path_xy(path, head) -> np.ndarray | None:
    if path is None:
        return None
    if hasattr(path, "position"):
        lo = float(getattr(path, "md_min_m", 0.0))
        hi = float(getattr(path, "md_max_m", lo))
        md = np.linspace(lo, hi, 200)
        pos = np.asarray(path.position(md), dtype=float)
        return pos[:, :2]
    df = pd.DataFrame(path)
    if {"x_m", "y_m"} <= set(df.columns):
        return df[["x_m", "y_m"]].to_numpy(float)
    if {"east_m", "north_m"} <= set(df.columns) and head is not None:
        return np.column_stack([head[0] + df["east_m"].to_numpy(float),
                                head[1] + df["north_m"].to_numpy(float)])
    raise InputError("a well path must be a Trajectory or a table with x_m, y_m (or east_m, "
                     "north_m relative to the well head)")


def field_map(wells_xy: pd.DataFrame, cuts: pd.DataFrame | None, faults=None, *,
              paths: Mapping | None = None, tvdss_m: float | None = None,
              title: str | None = None, label_wells: bool | None = None, unit=None):
    """Map of the wells, their cut points and the fault traces at one depth.

    Parameters
    ----------
    wells_xy : DataFrame
        One row per well: ``well`` (or ``name``), ``x_m``, ``y_m`` (surface location).
    cuts : DataFrame or None
        The cut table (``x_m``, ``y_m`` of each cut; metres or feet); missing section is an
        orange circle, repeated a blue square (open when its confidence is below
        ``LOW_CONFIDENCE``), each posted with its vertical separation (− missing, + repeated).
    faults : DataFrame, optional
        Fault planes: ``fault_id, strike_deg, dip_deg, dip_azimuth_deg, sense`` and a point on
        the plane ``x_m, y_m, tvdss_m`` (several rows per fault, e.g. its cut points, are
        averaged). Each trace is drawn where the plane cuts ``tvdss_m``, with ticks (normal) or
        triangles (reverse) on the hanging-wall side.
    paths : mapping well -> Trajectory or table, optional
        Deviated well paths, drawn in plan from the surface location.
    tvdss_m : float, optional
        Depth of the fault traces [m TVDSS]; default the median depth of the cuts.
    label_wells : bool, optional
        Write well names (default: when at most 60 wells).
    unit : "m" or "ft", optional
        Unit of the axes, the posted separations and the trace depth (default: the cut
        table's, else metres).
    """
    from matplotlib.lines import Line2D

    w = pd.DataFrame(wells_xy).copy()
    if "well" not in w.columns and "name" in w.columns:
        w = w.rename(columns={"name": "well"})
    for col in ("well", "x_m", "y_m"):
        if col not in w.columns:
            raise InputError(f"wells table needs columns well, x_m, y_m (have {list(w.columns)})")
    w["x_m"] = pd.to_numeric(w["x_m"], errors="coerce")
    w["y_m"] = pd.to_numeric(w["y_m"], errors="coerce")
    w = w.dropna(subset=["x_m", "y_m"])
    du = display_unit(unit, cuts)
    c = cuts_in_metres(cuts)
    f = _faults_table(faults)
    paths = dict(paths or {})
    if label_wells is None:
        label_wells = len(w) <= 60

    fig = _figure(9.5, 9.5)
    ax = fig.add_axes([0.11, 0.19, 0.84, 0.72])
    xs = [w["x_m"].to_numpy(float)]
    ys = [w["y_m"].to_numpy(float)]
    heads = {str(r.well): (float(r.x_m), float(r.y_m)) for r in w.itertuples(index=False)}
    obstacles = list(heads.values())
    labels = []
    for wname, path in paths.items():
        xy = _path_xy(path, heads.get(str(wname)))
        if xy is None or len(xy) == 0:
            continue
        ax.plot(xy[:, 0], xy[:, 1], color=INK, lw=1.0, alpha=0.8, gid="well-path", zorder=2)
        ax.plot(xy[-1, 0], xy[-1, 1], marker="o", ms=2.5, color=INK, zorder=2)
        xs.append(xy[:, 0])
        ys.append(xy[:, 1])
    # symbols shrink as the field fills up, so that a map of thousands of wells stays legible
    head_size = float(np.clip(36.0 * math.sqrt(80.0 / max(len(w), 1)), 4.0, 36.0))
    cut_size = float(np.clip(70.0 * math.sqrt(60.0 / max(len(c), 1)), 12.0, 70.0))
    ax.scatter(w["x_m"], w["y_m"], s=head_size, facecolor="white", edgecolor=INK,
               lw=1.2 if head_size > 20 else 0.6, zorder=2.5, gid="well-head")
    if label_wells:
        labels += [dict(x=r.x_m, y=r.y_m, text=str(r.well), size=8.5)
                   for r in w.itertuples(index=False)]
    any_weak = False
    if len(c) and {"x_m", "y_m"} <= set(c.columns):
        xs.append(c["x_m"].to_numpy(float))
        ys.append(c["y_m"].to_numpy(float))
        for sec in SECTION_STYLE:
            g = c[c["section"].astype(str) == sec] if "section" in c.columns else c.iloc[0:0]
            if len(g) == 0:
                continue
            st = _style(sec)
            conf = pd.to_numeric(g["confidence"], errors="coerce").to_numpy(float) \
                if "confidence" in g.columns else np.ones(len(g))
            weak = conf < LOW_CONFIDENCE
            any_weak = any_weak or bool(weak.any())
            # firm cuts filled, weak ones open: one collection each, the same gid
            for sel, face, edge in ((~weak, st["colour"], "white"), (weak, "white", st["colour"])):
                if sel.any():
                    ax.scatter(g["x_m"].to_numpy(float)[sel], g["y_m"].to_numpy(float)[sel],
                               marker=st["marker"], s=cut_size, facecolor=face,
                               edgecolor=edge, lw=(0.9 if face != "white" else 1.8)
                               * math.sqrt(cut_size / 70.0), zorder=5, gid=f"cut-{sec}")
            obstacles += list(zip(g["x_m"].to_numpy(float), g["y_m"].to_numpy(float)))
            if "vertical_separation_m" in g.columns and len(c) <= 300:
                for r in g.itertuples(index=False):
                    vs = float(r.vertical_separation_m)
                    if np.isfinite(vs):
                        labels.append(dict(x=r.x_m, y=r.y_m,
                                           text=f"{st['sign']}{vs / du.metres:.0f}",
                                           colour=st["colour"], weight="bold", size=8.5))
    x_all = np.concatenate(xs) if xs else np.zeros(0)
    y_all = np.concatenate(ys) if ys else np.zeros(0)
    x_all, y_all = x_all[np.isfinite(x_all)], y_all[np.isfinite(y_all)]
    if x_all.size == 0:
        raise InputError("no well has a location: nothing to map")
    span = max(np.ptp(x_all), np.ptp(y_all), 200.0)
    cx, cy = 0.5 * (x_all.min() + x_all.max()), 0.5 * (y_all.min() + y_all.max())
    half = 0.5 * span * 1.2
    box = (cx - half, cx + half, cy - half, cy + half)

    if tvdss_m is None:
        if len(c) and "tvdss_m" in c.columns and np.isfinite(c["tvdss_m"]).any():
            tvdss_m = float(np.nanmedian(c["tvdss_m"].to_numpy(float)))
        elif len(f) and np.isfinite(f["tvdss_m"]).any():
            tvdss_m = float(np.nanmedian(f["tvdss_m"]))
        else:
            tvdss_m = 0.0
    n_traces = 0
    fault_labels = []
    for r in f.to_dict("records"):
        tr = fault_trace(r, tvdss_m)
        if tr is None:
            continue
        p, u = tr
        rng = _clip_line(p, u, box)
        if rng is None:
            continue
        a, b = rng
        pts = np.array([p + a * u, p + b * u])
        ax.plot(pts[:, 0], pts[:, 1], color=FAULT, lw=2.0, zorder=4, gid="fault-trace")
        n_traces += 1
        beta = math.radians(r["dip_azimuth_deg"])
        dvec = np.array([math.sin(beta), math.cos(beta)])
        reverse = "rev" in str(r.get("sense", "")).lower() or "thrust" in \
            str(r.get("sense", "")).lower()
        n_ticks = max(3, int((b - a) / (span / 7.0)))
        tick_len = 0.022 * span
        for tt in np.linspace(a, b, n_ticks + 2)[1:-1]:
            q = p + tt * u
            if reverse:
                tri = np.array([q - 0.6 * tick_len * u, q + 0.6 * tick_len * u,
                                q + 1.1 * tick_len * dvec])
                ax.fill(tri[:, 0], tri[:, 1], color=FAULT, lw=0, zorder=4)
            else:
                e = q + tick_len * dvec
                ax.plot([q[0], e[0]], [q[1], e[1]], color=FAULT, lw=1.6, zorder=4)
        # name near one end of the trace, on the footwall side
        lab = p + (a + 0.05 * (b - a)) * u - 0.035 * span * dvec
        fault_labels.append((lab, str(r["fault_id"])))
    ax.set_xlim(box[0], box[1])
    ax.set_ylim(box[2], box[3])
    ax.set_aspect("equal", adjustable="box")
    for lab, text in fault_labels:
        ax.text(lab[0], lab[1], text, fontsize=10, fontweight="bold", color=FAULT,
                ha="center", va="center", zorder=6,
                bbox=dict(boxstyle="round,pad=0.15", fc="white", ec="none", alpha=0.8))
        obstacles.append(tuple(lab))
    _place_labels(ax, labels, obstacles, marker_pt=5.5)
    length_axis(ax.xaxis, du, "easting x")
    length_axis(ax.yaxis, du, "northing y")
    ax.tick_params(labelsize=8)
    ax.grid(color="#d9dde2", lw=0.5)
    ax.set_facecolor("#fbfaf7")
    # north arrow
    ax.annotate("N", xy=(0.965, 0.965), xytext=(0.965, 0.89), xycoords="axes fraction",
                ha="center", va="center", fontsize=10, fontweight="bold", color=INK,
                arrowprops=dict(arrowstyle="-|>", color=INK, lw=1.2))

    handles = [Line2D([], [], ls="", marker="o", mfc="white", mec=INK, ms=7,
                      label="well (surface location)")]
    if paths:
        handles.append(Line2D([], [], color=INK, lw=1.0, label="deviated well path in plan"))
    for sec in ("missing", "repeated"):
        st = _style(sec)
        handles.append(Line2D([], [], ls="", marker=st["marker"], color=st["colour"], ms=8,
                              mec="white", label=f"cut: {st['words']}"))
    if n_traces:
        handles.append(Line2D([], [], color=FAULT, lw=2.0,
                              label=f"fault trace at {_len(tvdss_m, du)} TVDSS; ticks (normal)\n"
                                    "or triangles (reverse) on the hanging wall"))
    if any_weak:
        handles.append(Line2D([], [], ls="", marker="o", mfc="white", mec="#8a8f96", mew=1.8,
                              ms=8, label=f"open symbol: cut with confidence below "
                                          f"{LOW_CONFIDENCE:g}"))
    if any(lab.get("weight") == "bold" for lab in labels):
        handles.append(Line2D([], [], ls="", label=f"posted: vertical separation "
                                                    f"[{du.suffix}], \u2212 missing, "
                                                    "+ repeated"))
    fig.legend(handles=handles, loc="lower center", ncol=2, frameon=False, fontsize=8.5,
               bbox_to_anchor=(0.5, 0.005))
    n = len(c)
    fig.suptitle(title or f"Field map: {len(w)} wells, {n} cut{'s' if n != 1 else ''}"
                 + (f", {n_traces} fault trace{'s' if n_traces != 1 else ''}" if n_traces
                    else ""), fontsize=11.5, y=0.975)
    return fig


# ------------------------------------------------------------------ separation along strike
def _cut_fault_column(c: pd.DataFrame) -> str | None:
    for col in ("fault_id", "fault_name", "fault"):
        if col in c.columns and c[col].astype(str).str.strip().ne("").any():
            return col
    return None


def separation_along_strike(faults, cuts: pd.DataFrame | None, *, title: str | None = None,
                            unit=None):
    """Each fault's vertical separation against distance along its strike.

    Cuts are matched to faults by the cut table's ``fault_id`` (or ``fault_name``) column.
    Distance is measured along the fault's strike (right-hand rule, dip azimuth − 90°) from
    the fault's reference point; each cut is a point at its vertical separation, circles for
    missing section and squares for repeated, joined along the fault and labelled with its
    well. A fault whose separation dies out along strike, or changes fast between wells,
    shows at a glance.

    Parameters
    ----------
    faults : DataFrame
        ``fault_id, strike_deg, dip_deg, dip_azimuth_deg, sense, x_m, y_m[, tvdss_m]``.
    cuts : DataFrame
        The cut table with ``x_m, y_m, vertical_separation`` and a fault column.
    unit : "m" or "ft", optional
        Unit of the axes (default: the cut table's, else metres).
    """
    from matplotlib.lines import Line2D

    f = _faults_table(faults)
    du = display_unit(unit, cuts)
    c = cuts_in_metres(cuts)
    fig = _figure(9.5, 6.5)
    ax = fig.add_axes([0.1, 0.24, 0.86, 0.66])
    fcol = _cut_fault_column(c) if len(c) else None
    drawn = 0
    handles = []
    points: list = []
    labels: list = []
    if fcol is not None and len(f):
        for k, r in enumerate(f.to_dict("records")):
            g = c[c[fcol].astype(str) == str(r["fault_id"])]
            if len(g) == 0:
                continue
            colour = FAULT_COLOURS[k % len(FAULT_COLOURS)]
            strike = math.radians(r["strike_deg"])
            u = np.array([math.sin(strike), math.cos(strike)])
            d = (g["x_m"].to_numpy(float) - r["x_m"]) * u[0] + \
                (g["y_m"].to_numpy(float) - r["y_m"]) * u[1]
            vs = g["vertical_separation_m"].to_numpy(float)
            order = np.argsort(d)
            ax.plot(d[order], vs[order], color=colour, lw=1.3, alpha=0.8, zorder=2,
                    gid="fault-separation")
            secs = g["section"].astype(str).to_numpy() if "section" in g.columns else \
                np.array(["undetermined"] * len(g))
            for sec in SECTION_STYLE:
                sel = secs == sec
                if sel.any():
                    st = _style(sec)
                    ax.scatter(d[sel], vs[sel], marker=st["marker"], s=64, color=colour,
                               edgecolor="white", lw=1.0, zorder=4, gid=f"cut-{sec}")
            points += list(zip(d, vs))
            if "well" in g.columns and len(c) <= 200:
                labels += [dict(x=x, y=y, text=wn, colour=colour, size=8)
                           for x, y, wn in zip(d, vs, g["well"].astype(str))]
            sense = f", {r['sense']}" if r.get("sense") else ""
            handles.append(Line2D([], [], color=colour, lw=1.3,
                                  label=f"fault {r['fault_id']} ({r['dip_deg']:.0f}/"
                                        f"{r['dip_azimuth_deg']:03.0f}{sense})"))
            drawn += 1
    if drawn == 0:
        ax.text(0.5, 0.5, "no cut is assigned to a fault of the table", ha="center",
                va="center", transform=ax.transAxes, color=INK)
    ax.axhline(0, color=INK, lw=0.6)
    if points:
        pts = np.array(points, dtype=float)
        xr = np.nanmax(pts[:, 0]) - np.nanmin(pts[:, 0])
        xr = xr if xr > 0 else 100.0
        ax.set_xlim(np.nanmin(pts[:, 0]) - 0.08 * xr, np.nanmax(pts[:, 0]) + 0.08 * xr)
        ax.set_ylim(0, 1.15 * max(np.nanmax(pts[:, 1]), 1.0))
    else:
        ax.set_ylim(bottom=0)
    _place_labels(ax, labels, points, marker_pt=5.0)
    length_axis(ax.xaxis, du, "distance along strike from the fault's reference point")
    ax.set_xlabel(ax.xaxis.get_label_text() + " (strike = dip azimuth \u2212 90\u00b0)")
    length_axis(ax.yaxis, du, "vertical separation")
    ax.grid(color="#d9dde2", lw=0.5)
    for sec in ("missing", "repeated"):
        st = _style(sec)
        handles.append(Line2D([], [], ls="", marker=st["marker"], color="#8a8f96", ms=8,
                              mec="white", label=f"{'circle' if sec == 'missing' else 'square'}"
                                                 f": cut with {sec} section"))
    fig.legend(handles=handles, loc="lower center", ncol=3, frameon=False, fontsize=8.5,
               bbox_to_anchor=(0.5, 0.005))
    fig.suptitle(title or f"Vertical separation along strike ({drawn} "
                 f"fault{'s' if drawn != 1 else ''} with cuts)", fontsize=11.5, y=0.975)
    return fig
