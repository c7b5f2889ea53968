"""Figures of one well: the correlation panel and the stratigraphic position plot."""

from __future__ import annotations

import math

import numpy as np
import pandas as pd

from ..errors import InputError
from .style import (
    INK,
    TIE,
    _column_units,
    _curve_name,
    _cuts_for,
    _figure,
    _legend_patch,
    _len,
    _rgba,
    _s_across,
    _style,
    _unit_runs,
    display_unit,
    length_axis,
    unit_colours,
)
from .track import check_track, track_steps

__all__ = ["correlation_panel", "strat_position_plot"]


# ------------------------------------------------------------------------ correlation panel
def correlation_panel(well, column, track: pd.DataFrame | None, cuts: pd.DataFrame | None, *,
                      curve: str = "GR", tie_every_m: float | None = None,
                      md_range: tuple[float, float] | None = None, title: str | None = None,
                      unit=None):
    """The well's curve beside the type log, tied by stratigraphic position.

    Four tracks, left to right: the well's ``curve`` against MD (shaded by the unit the track
    places each depth in); the tie gap; the column's type log against s (TST below the top of
    the column); the column itself, units shaded and named. Tie lines join each depth where the
    track crosses a surface to that surface in the column, so a repeated surface has two ties
    meeting at one point and a missing surface none. Each cut is a line across the well track
    with its bracket on the track's right edge, a wedge from the cut to the interval of the
    column it removes (missing, orange, hatched ``////``) or repeats (repeated, blue, dotted),
    and that interval marked on the type log.

    Parameters
    ----------
    well : Well
        The well (its curves indexed by MD in metres, its name).
    column : ReferenceColumn
        The reference column; its ``type_log`` (when present) gives the right-hand curve.
    track : DataFrame or None
        The well's stratigraphic position track (:mod:`wellfault.viz.track`); without one no ties
        or column intervals can be drawn.
    cuts : DataFrame or None
        The cut table (``find_fault_cuts``), in metres or feet; rows of other wells ignored.
    curve : str
        Curve to show (matched without regard to case); the well's first curve if it lacks it.
    tie_every_m : float, optional
        Also tie the well to the column every this many metres of MD (thin dotted lines).
    md_range : (float, float), optional
        MD window [m]; default the track's extent (else the logged interval).
    title : str, optional
        Figure title.
    unit : "m" or "ft", optional
        Unit of the axes and labels (default: the cut table's, else the well's).
    """
    from matplotlib.lines import Line2D
    from matplotlib.patches import Polygon
    from matplotlib.transforms import blended_transform_factory

    name = str(getattr(well, "name", "well"))
    curves = getattr(well, "curves", None)
    du = display_unit(unit, cuts, well)
    c = _cuts_for(cuts, name)
    t = check_track(track) if track is not None else None
    cname = _curve_name(curves, curve)
    if cname is None and curves is not None and curves.shape[1]:
        cname = curves.columns[0]

    # ---- windows
    if md_range is not None:
        md_lo, md_hi = (float(v) for v in md_range)
    elif t is not None and len(t):
        md_lo, md_hi = float(t["md_m"].min()), float(t["md_m"].max())
    elif curves is not None and len(curves):
        md_lo, md_hi = float(curves.index.min()), float(curves.index.max())
    else:
        raise InputError(f"{name}: nothing to draw: the well has no curves and no track")
    pad = 0.02 * max(md_hi - md_lo, 1.0)
    md_lo, md_hi = md_lo - pad, md_hi + pad
    units = _column_units(column)
    if t is not None and len(t):
        win = t[(t["md_m"] >= md_lo) & (t["md_m"] <= md_hi)]
        s_vals = win["s_m"].to_numpy(float)
        s_vals = s_vals[np.isfinite(s_vals)]
        s_lo, s_hi = (float(s_vals.min()), float(s_vals.max())) if s_vals.size else \
            (units[0][1], units[-1][2])
    else:
        s_lo, s_hi = units[0][1], units[-1][2]
    spad = 0.04 * max(s_hi - s_lo, 1.0)
    s_lo, s_hi = s_lo - spad, s_hi + spad

    fig = _figure(10.5, 11.5)
    gs = fig.add_gridspec(1, 4, width_ratios=[3.0, 1.5, 3.0, 1.7], left=0.08, right=0.90,
                          top=0.905, bottom=0.085, wspace=0.0)
    ax_w = fig.add_subplot(gs[0, 0])
    ax_t = fig.add_subplot(gs[0, 1])
    ax_r = fig.add_subplot(gs[0, 2])
    ax_c = fig.add_subplot(gs[0, 3], sharey=ax_r)
    colours = unit_colours(column.names)

    # ---- well track
    ax_w.set_ylim(md_hi, md_lo)
    if t is not None:
        for band, a, b in _unit_runs(t):
            ax_w.axhspan(a, b, color=colours.get(band, "#eeeeee"), lw=0, zorder=0)
    if cname is not None:
        sel = (curves.index >= md_lo) & (curves.index <= md_hi)
        ax_w.plot(curves[cname].to_numpy(float)[sel], curves.index.to_numpy(float)[sel],
                  color=INK, lw=0.6, zorder=2)
        ax_w.set_xlabel(f"{cname} (well)")
    else:
        ax_w.text(0.5, 0.5, "no curves in the well", transform=ax_w.transAxes, ha="center")
    length_axis(ax_w.yaxis, du, "MD")
    ax_w.set_title(f"well {name}\nagainst measured depth", fontsize=9)
    ax_w.xaxis.set_label_position("top")
    ax_w.xaxis.tick_top()
    ax_w.grid(axis="y", color="#ffffff", lw=0.6, alpha=0.7)

    # ---- type log and column
    ax_r.set_ylim(s_hi, s_lo)
    tl = getattr(column, "type_log", None)
    for band, a, b in units:
        ax_r.axhspan(a, b, color=colours[band], lw=0, zorder=0)
        ax_c.axhspan(a, b, facecolor=colours[band], edgecolor=INK, lw=0.6, zorder=0)
        ax_r.axhline(a, color=INK, lw=0.4, alpha=0.6, zorder=1)
    tname = _curve_name(tl, cname if cname is not None else curve) if tl is not None else None
    if tl is not None and tname is None and tl.shape[1]:
        tname = tl.columns[0]
    if tname is not None:
        ts = tl.index.to_numpy(float)
        sel = (ts >= s_lo) & (ts <= s_hi)
        ax_r.plot(tl[tname].to_numpy(float)[sel], ts[sel], color=INK, lw=0.6, zorder=2)
        ax_r.set_xlabel(f"{tname} (type log)")
        if cname is not None and curves is not None:
            wv = curves[cname].to_numpy(float)
            tv = tl[tname].to_numpy(float)
            lo = np.nanmin([np.nanpercentile(wv, 1), np.nanpercentile(tv, 1)])
            hi = np.nanmax([np.nanpercentile(wv, 99), np.nanpercentile(tv, 99)])
            if np.isfinite(lo) and np.isfinite(hi) and hi > lo:
                span = hi - lo
                ax_w.set_xlim(lo - 0.05 * span, hi + 0.05 * span)
                ax_r.set_xlim(lo - 0.05 * span, hi + 0.05 * span)
    else:
        ax_r.text(0.5, 0.5, "no type log\nin the column", transform=ax_r.transAxes,
                  ha="center", va="center", color=INK, fontsize=9)
        ax_r.set_xticks([])
    ax_r.set_title("type log\nagainst stratigraphic position", fontsize=9)
    ax_r.xaxis.set_label_position("top")
    ax_r.xaxis.tick_top()
    ax_r.tick_params(axis="y", left=False, labelleft=False)
    # column strip: names in the units, s on the right
    ax_c.set_xlim(0, 1)
    ax_c.set_xticks([])
    ax_c.set_title("reference\ncolumn", fontsize=9)
    ax_c.yaxis.tick_right()
    ax_c.yaxis.set_label_position("right")
    length_axis(ax_c.yaxis, du, "s: TST below the top of the column")
    ax_c.tick_params(axis="y", labelright=True, labelleft=False, left=False)
    fig_h_pt = fig.get_figheight() * 72 * (0.905 - 0.085)
    pt_per_m = fig_h_pt / (s_hi - s_lo)
    for band, a, b in units:
        lo, hi = max(a, s_lo), min(b, s_hi)
        if hi - lo <= 0:
            continue
        size = 7.5 if (hi - lo) * pt_per_m >= 9 else 6.0
        if (hi - lo) * pt_per_m < 6.5:
            continue
        ax_c.text(0.5, 0.5 * (lo + hi), band, ha="center", va="center", fontsize=size,
                  color=INK, clip_on=True, wrap=False)

    # ---- tie gap (its own 0..1 coordinates; y maps to both tracks' windows)
    ax_t.set_xlim(0, 1)
    ax_t.set_ylim(0, 1)
    ax_t.axis("off")

    def fy_w(md):
        return 1.0 - (md - md_lo) / (md_hi - md_lo)

    def fy_r(s):
        return 1.0 - (s - s_lo) / (s_hi - s_lo)

    n_surface_ties = 0
    if t is not None and len(t) > 1:
        tmd = t["md_m"].to_numpy(float)
        ts = t["s_m"].to_numpy(float)
        step_md = set(np.round(track_steps(t)["md_m"].to_numpy(float), 9))
        for _, a, _b in units:
            d = ts - a
            cross = np.flatnonzero(((d[:-1] < 0) & (d[1:] >= 0)) | ((d[:-1] >= 0) & (d[1:] < 0)))
            for i in cross:
                if round(tmd[i + 1], 9) in step_md:
                    continue  # the track jumps across this surface at a fault: no tie
                f = d[i] / (d[i] - d[i + 1]) if d[i] != d[i + 1] else 0.0
                mdx = tmd[i] + f * (tmd[i + 1] - tmd[i])
                if not (md_lo <= mdx <= md_hi and s_lo <= a <= s_hi):
                    continue
                ax_t.plot([0, 1], [fy_w(mdx), fy_r(a)], color=TIE, lw=0.9, alpha=0.9,
                          gid="tie-surface", solid_capstyle="butt")
                ax_w.axhline(mdx, color=TIE, lw=0.6, alpha=0.9, zorder=1)
                n_surface_ties += 1
        if tie_every_m:
            for mdx in np.arange(math.ceil(md_lo / tie_every_m) * tie_every_m, md_hi,
                                 tie_every_m):
                sx = float(np.interp(mdx, tmd, ts, left=np.nan, right=np.nan))
                if np.isfinite(sx) and s_lo <= sx <= s_hi:
                    ax_t.plot([0, 1], [fy_w(mdx), fy_r(sx)], color="#8a8f96", lw=0.5,
                              ls=":", gid="tie-regular")

    # ---- cuts
    blend_w = blended_transform_factory(ax_w.transAxes, ax_w.transData)
    marks: dict[str, list[tuple[float, float]]] = {}
    for row in c.itertuples(index=False):
        sec = str(getattr(row, "section", "undetermined"))
        st = _style(sec)
        md = float(row.md_m)
        ax_w.axhline(md, color=st["colour"], lw=2.0, zorder=3, gid=f"cut-{sec}-line")
        marks.setdefault(sec, []).append((0.965, md))
        top = float(getattr(row, "md_top_m", md))
        base = float(getattr(row, "md_base_m", md))
        if np.isfinite(top) and np.isfinite(base) and base > top:
            ax_w.plot([0.985, 0.985], [top, base], transform=blend_w, color=st["colour"],
                      lw=5, alpha=0.55, solid_capstyle="butt", gid="cut-bracket", zorder=3)
        tst = float(getattr(row, "tst_m", np.nan))
        label = f"{sec} {_len(tst, du)} TST" if np.isfinite(tst) else sec
        ax_w.text(0.03, md, label, transform=blend_w, ha="left", va="bottom", fontsize=8,
                  color=st["colour"], fontweight="bold", zorder=4,
                  bbox=dict(boxstyle="round,pad=0.15", fc="white", ec="none", alpha=0.8))
        if t is None or not (md_lo <= md <= md_hi):
            continue
        s_a, s_b = _s_across(t, md)
        if not (np.isfinite(s_a) and np.isfinite(s_b)):
            continue
        lo, hi = sorted((s_a, s_b))
        ax_r.axhspan(lo, hi, facecolor=_rgba(st["colour"], 0.22), edgecolor=st["colour"],
                     hatch=st["hatch"], lw=1.0, zorder=1.5, gid=f"cut-{sec}-interval")
        ax_r.text(0.97, 0.5 * (lo + hi), f"{sec}\n{_len(hi - lo, du)}", ha="right", va="center",
                  transform=blended_transform_factory(ax_r.transAxes, ax_r.transData),
                  fontsize=8, color=st["colour"], fontweight="bold", zorder=4,
                  bbox=dict(boxstyle="round,pad=0.15", fc="white", ec="none", alpha=0.8))
        ax_t.add_patch(Polygon([(0, fy_w(md)), (1, fy_r(s_a)), (1, fy_r(s_b))], closed=True,
                               facecolor=_rgba(st["colour"], 0.25), edgecolor=st["colour"],
                               lw=1.0, gid=f"cut-{sec}-tie"))
    for sec, pts in marks.items():
        st = _style(sec)
        xy = np.array(pts)
        ax_w.scatter(xy[:, 0], xy[:, 1], transform=blend_w, marker=st["marker"], s=55,
                     color=st["colour"], edgecolor="white", lw=0.8, zorder=5, gid=f"cut-{sec}",
                     clip_on=False)

    handles = [_legend_patch(s) for s in ("missing", "repeated") ]
    handles += [Line2D([], [], color=TIE, lw=1.0,
                       label="tie: a surface in the well joined to the same surface in the "
                             "column"),
                Line2D([], [], color="#8a8f96", lw=5, alpha=0.7,
                       label="cut bracket (right edge of the well, in the cut's colour): the "
                             "MD interval holding the cut")]
    if tie_every_m:
        handles.append(Line2D([], [], color="#8a8f96", lw=0.6, ls=":",
                              label=f"tie every {tie_every_m / du.metres:g} {du.suffix} "
                                    "of MD"))
    fig.legend(handles=handles, loc="lower center", ncol=2, frameon=False, fontsize=8.5,
               bbox_to_anchor=(0.5, 0.005))
    n_cuts = len(c)
    fig.suptitle(title or f"{name}: {cname or curve} beside the type log, tied by "
                 f"stratigraphic position ({n_cuts} cut{'s' if n_cuts != 1 else ''})",
                 fontsize=11.5, y=0.985)
    return fig


# ------------------------------------------------------------------- stratigraphic position
def strat_position_plot(track: pd.DataFrame, cuts: pd.DataFrame | None = None, *,
                        column=None, well: str | None = None, title: str | None = None,
                        unit=None):
    """Stratigraphic position s against MD: a fault is a step.

    MD runs down the page; s (TST below the top of the column) runs to the right, down-section.
    The column's units are vertical bands, named at the top. Each cut is an arrow across its
    step from the position above the cut to the position below, orange for missing section,
    blue for repeated, with its bracket shaded across the plot. A narrow panel on the right
    shows the track's confidence.

    Parameters
    ----------
    track : DataFrame
        A track (schema in :mod:`wellfault.viz.track`).
    cuts : DataFrame, optional
        The cut table (metres or feet); only this well's rows are drawn when ``well`` or
        ``track.attrs["well"]`` names it.
    column : ReferenceColumn, optional
        Gives exact unit boundaries; without it the bands span the s each unit covers in the
        track.
    well : str, optional
        Well name for the title and to select cuts.
    unit : "m" or "ft", optional
        Unit of the axes and labels (default: the cut table's, else metres).
    """
    from matplotlib.lines import Line2D
    from matplotlib.patches import Patch

    t = check_track(track, source="track")
    if len(t) == 0:
        raise InputError("the track is empty: nothing to plot")
    name = well or t.attrs.get("well")
    du = display_unit(unit, cuts)
    c = _cuts_for(cuts, name)
    md = t["md_m"].to_numpy(float)
    s = t["s_m"].to_numpy(float)
    # break the line at the steps (and at cut MDs)
    breaks = set(np.round(track_steps(t)["md_m"].to_numpy(float), 9))
    if len(c) and "md_m" in c.columns:
        breaks |= set(np.round(c["md_m"].to_numpy(float), 9))
    idx = [i for i in range(1, len(md)) if round(md[i], 9) in breaks]
    md_l = np.insert(md, idx, np.nan)
    s_l = np.insert(s, idx, np.nan)

    s_fin = s[np.isfinite(s)]
    s_lo, s_hi = float(s_fin.min()), float(s_fin.max())
    sp = 0.06 * max(s_hi - s_lo, 1.0)
    s_lo, s_hi = s_lo - sp, s_hi + sp
    mp = 0.02 * max(md[-1] - md[0], 1.0)
    md_lo, md_hi = md[0] - mp, md[-1] + mp

    fig = _figure(9.0, 9.5)
    gs = fig.add_gridspec(1, 2, width_ratios=[5.0, 0.9], left=0.1, right=0.97, top=0.82,
                          bottom=0.15, wspace=0.06)
    ax = fig.add_subplot(gs[0, 0])
    ax_c = fig.add_subplot(gs[0, 1], sharey=ax)
    ax.set_ylim(md_hi, md_lo)
    ax.set_xlim(s_lo, s_hi)

    if column is not None:
        bands = _column_units(column)
        colours = unit_colours(column.names)
    else:
        bands = []
        u = t.dropna(subset=["s_m"])
        u = u[u["unit"].notna()]
        for band, g in u.groupby("unit", sort=False):
            bands.append((str(band), float(g["s_m"].min()), float(g["s_m"].max())))
        bands.sort(key=lambda b: b[1])
        colours = unit_colours([b[0] for b in bands])
    width_pt = fig.get_figwidth() * 72 * (0.97 - 0.1) * 5.0 / 5.9
    pt_per_m = width_pt / (s_hi - s_lo)
    for band, a, b in bands:
        lo, hi = max(a, s_lo), min(b, s_hi)
        if hi <= lo:
            continue
        ax.axvspan(a, b, color=colours.get(band, "#eeeeee"), lw=0, zorder=0)
        ax.axvline(a, color=INK, lw=0.4, alpha=0.5, zorder=0.5)
        if (hi - lo) * pt_per_m >= 8:
            ax.text(0.5 * (lo + hi), 1.008, band, rotation=90, ha="center", va="bottom",
                    fontsize=7.5, color=INK, transform=ax.get_xaxis_transform())
    ax.plot(s_l, md_l, color=INK, lw=1.4, zorder=3, label="_track")

    marks: dict[str, list[tuple[float, float]]] = {}
    for row in c.itertuples(index=False):
        sec = str(getattr(row, "section", "undetermined"))
        st = _style(sec)
        cmd = float(row.md_m)
        s_a, s_b = _s_across(t, cmd)
        top = float(getattr(row, "md_top_m", cmd))
        base = float(getattr(row, "md_base_m", cmd))
        if np.isfinite(top) and np.isfinite(base) and base > top:
            ax.axhspan(top, base, color=st["colour"], alpha=0.10, lw=0, zorder=1,
                       gid="cut-bracket")
        ax.annotate("", xy=(s_b, cmd), xytext=(s_a, cmd), zorder=4,
                    arrowprops=dict(arrowstyle="-|>", color=st["colour"], lw=2.0,
                                    shrinkA=0, shrinkB=0, mutation_scale=14))
        marks.setdefault(sec, []).append((s_a, cmd))
        tst = float(getattr(row, "tst_m", abs(s_b - s_a)))
        txt = f"{sec} {_len(tst, du)} TST\nMD {_len(cmd, du)}"
        # write the label on the side of the step where the track leaves more room
        near = np.abs(md - cmd) <= 0.06 * (md[-1] - md[0] + 1.0)
        s_near = s[near & np.isfinite(s)]
        left_room = (np.nanmin(s_near) if s_near.size else min(s_a, s_b)) - s_lo
        right_room = s_hi - (np.nanmax(s_near) if s_near.size else max(s_a, s_b))
        if right_room >= left_room:
            x, ha = (np.nanmax(s_near) if s_near.size else max(s_a, s_b)) + \
                0.04 * (s_hi - s_lo), "left"
        else:
            x, ha = (np.nanmin(s_near) if s_near.size else min(s_a, s_b)) - \
                0.04 * (s_hi - s_lo), "right"
        ax.text(x, cmd, txt, ha=ha, va="center", fontsize=8.5, color=st["colour"],
                fontweight="bold", zorder=5,
                bbox=dict(boxstyle="round,pad=0.2", fc="white", ec=st["colour"], lw=0.6,
                          alpha=0.9))
    for sec, pts in marks.items():
        st = _style(sec)
        xy = np.array(pts)
        ax.scatter(xy[:, 0], xy[:, 1], marker=st["marker"], s=40, color=st["colour"],
                   edgecolor="white", lw=0.8, zorder=5, gid=f"cut-{sec}")
    length_axis(ax.xaxis, du, "s: stratigraphic position, TST below the top of the column",
                prune="upper")
    ax.set_xlabel(ax.xaxis.get_label_text() + "   (down-section \u2192)")
    length_axis(ax.yaxis, du, "MD")
    ax.grid(color="white", lw=0.6, alpha=0.8)

    conf = t["confidence"].to_numpy(float)
    ax_c.fill_betweenx(md, 0, conf, color="#9fb3a8", lw=0, step="mid")
    ax_c.plot(conf, md, color=INK, lw=0.6, drawstyle="steps-mid")
    ax_c.set_xlim(0, 1.05)
    ax_c.set_xticks([0, 0.5, 1])
    ax_c.set_xlabel("confidence")
    ax_c.tick_params(axis="y", labelleft=False)

    handles = [Line2D([], [], color=INK, lw=1.4, label="position of the well in the column")]
    for sec in ("missing", "repeated"):
        st = _style(sec)
        words = {"missing": "missing section: s jumps ahead in the drilling direction",
                 "repeated": "repeated section: s jumps back against the drilling "
                             "direction"}[sec]
        handles.append(Line2D([], [], color=st["colour"], lw=2, marker=">", markersize=6,
                              label=words))
    handles.append(Patch(color="#8a8f96", alpha=0.25,
                         label="cut bracket: MD interval holding the cut (cut's colour)"))
    fig.legend(handles=handles, loc="lower center", ncol=2, frameon=False, fontsize=8.5,
               bbox_to_anchor=(0.5, 0.005))
    n = len(c)
    fig.suptitle(title or f"{name or 'well'}: stratigraphic position along the well "
                 f"({n} cut{'s' if n != 1 else ''}; a fault is a step)", fontsize=11.5,
                 y=0.985)
    return fig
