"""Figures to check every cut: the correlation panel, the position track, the field map and
the separation along each fault's strike.

Every function returns a :class:`matplotlib.figure.Figure` built without pyplot (no global
figure state, nothing shown; save it with ``fig.savefig`` or let a notebook display it).
matplotlib is imported inside the functions, so ``import wellfault`` never pays for it.

Lengths are drawn in metres (tables in feet are converted once,
:func:`wellfault.track.cuts_in_metres`) and shown in the figure's unit: every length axis is
ticked and labelled in ``unit`` (default: the cut table's unit, else the well's), and every
length written on a figure is in that unit too (:func:`length_axis`).

Checking figures in code
------------------------
Artists carry a ``gid`` so that tests and scripts can check a figure's content without reading
pixels: ``cut-missing``, ``cut-repeated`` and ``cut-undetermined`` are the cut markers (one
point per cut, in scatter collections), ``cut-<section>-interval`` the interval of the column
a cut removes or repeats, ``cut-<section>-tie`` the wedge tying the cut to that interval,
``cut-bracket`` the MD bracket of a cut, ``tie-surface`` and ``tie-regular`` the tie lines,
``fault-trace`` the fault traces and ``well-head``/``well-path`` the wells on the map,
``fault-separation`` each fault's line on the separation plot.
:func:`count_cut_markers` counts the cuts a figure marks.
"""

from __future__ import annotations

import math
from collections.abc import Mapping

import numpy as np
import pandas as pd

from .errors import InputError
from .track import check_track, cuts_in_metres, track_steps
from .units import DepthUnit, parse_depth_unit

__all__ = [
    "correlation_panel",
    "strat_position_plot",
    "field_map",
    "separation_along_strike",
    "count_cut_markers",
    "artists_with_gid",
    "SECTION_STYLE",
    "unit_colours",
    "length_axis",
    "display_unit",
]

# ---------------------------------------------------------------------------------- style
#: Ink for curves, text and well symbols.
INK = "#2f3640"
#: Tie lines between the well and the column.
TIE = "#4d7a66"
#: Fault traces on maps.
FAULT = "#6a3d6a"
#: How each observed section is drawn: colour, hatch of its column interval, marker, words.
SECTION_STYLE = {
    "missing": {"colour": "#c4622d", "hatch": "////", "marker": "o",
                "words": "missing section (strata cut out by the fault)", "sign": "\u2212"},
    "repeated": {"colour": "#2b6a99", "hatch": "....", "marker": "s",
                 "words": "repeated section (strata drilled twice)", "sign": "+"},
    "undetermined": {"colour": "#7d7d7d", "hatch": "", "marker": "D",
                     "words": "jump of undetermined kind (well along bedding)", "sign": "\u00b1"},
}
#: Calm fills for the column's units, cycled top down (neighbours always differ).
UNIT_FILLS = ("#efe6cf", "#d6e5dc", "#e4ddee", "#f4ddcc", "#d5e2ee", "#e9e8d2", "#dcead3",
              "#eddbe0")
#: Cuts with a confidence below this are drawn as open symbols on the map.
LOW_CONFIDENCE = 0.5
#: Colours of faults on the separation plot (cycled).
FAULT_COLOURS = ("#6a3d6a", "#3f7f5f", "#b08a2e", "#5a6b7b", "#2f7f86", "#a3506b", "#6f7a2e",
                 "#7a5c4a")


def display_unit(unit=None, cuts: pd.DataFrame | None = None, well=None) -> DepthUnit:
    """The unit a figure shows lengths in: ``unit`` when given, else the cut table's (its
    column names), else the well's depth unit, else metres."""
    if unit is not None:
        return parse_depth_unit(unit)
    if cuts is not None:
        for c in cuts.columns:
            if str(c).endswith(("_ft", "_usft")):
                return DepthUnit.FT
            if str(c) == "md_m":
                return DepthUnit.M
    wu = getattr(well, "depth_unit", None)
    return parse_depth_unit(wu) if wu is not None else DepthUnit.M


def _length_locator(per_m: float, prune: str | None = None):
    from matplotlib.ticker import MaxNLocator

    class _Locator(MaxNLocator):
        """Round ticks in the shown unit for data plotted in metres."""

        def tick_values(self, vmin, vmax):
            return np.asarray(super().tick_values(vmin * per_m, vmax * per_m)) / per_m

    return _Locator(nbins="auto", steps=[1, 2, 2.5, 5, 10], prune=prune)


def _tick_text(x: float) -> str:
    text = f"{x:.6f}".rstrip("0").rstrip(".")
    return "0" if text in ("-0", "") else text


def length_axis(axis, unit: DepthUnit, label: str, *, prune: str | None = None) -> None:
    """Tick and label a matplotlib axis whose data are metres in ``unit``: round ticks in
    ``unit`` and ``label [unit]`` (``prune="upper"`` leaves out the last tick, where a panel
    beside the axis would write over it)."""
    from matplotlib.ticker import FuncFormatter

    per_m = 1.0 / unit.metres
    axis.set_major_locator(_length_locator(per_m, prune))
    axis.set_major_formatter(FuncFormatter(lambda v, _pos: _tick_text(v * per_m)))
    axis.set_label_text(f"{label} [{unit.suffix}]")


def _len(value_m: float, unit: DepthUnit, nd: int = 0) -> str:
    """A length in metres as text in ``unit``, ``nd`` decimals, unit appended."""
    return f"{value_m / unit.metres:.{nd}f} {unit.suffix}"


def _style(section: str) -> dict:
    return SECTION_STYLE.get(str(section), SECTION_STYLE["undetermined"])


def unit_colours(names) -> dict[str, str]:
    """Fill colour of each unit name, in column order (top down)."""
    return {str(n): UNIT_FILLS[i % len(UNIT_FILLS)] for i, n in enumerate(names)}


def _figure(width: float, height: float):
    from matplotlib.figure import Figure

    fig = Figure(figsize=(width, height), dpi=100)
    return fig


def artists_with_gid(fig, gid: str) -> list:
    """Every artist in ``fig`` whose gid is ``gid``."""
    return list(fig.findobj(lambda a: a.get_gid() == gid))


def count_cut_markers(fig, section: str | None = None) -> int:
    """How many cuts ``fig`` marks (of one ``section``, or all).

    Counts the points of the artists with gid ``cut-<section>`` (scatter collections count their
    points, lines their vertices).
    """
    sections = [section] if section else list(SECTION_STYLE)
    n = 0
    for sec in sections:
        for a in artists_with_gid(fig, f"cut-{sec}"):
            if hasattr(a, "get_offsets"):
                n += len(a.get_offsets())
            elif hasattr(a, "get_xdata"):
                n += len(np.atleast_1d(a.get_xdata()))
    return n


def _cuts_for(cuts, well_name: str | None) -> pd.DataFrame:
    c = cuts_in_metres(cuts)
    if len(c) == 0:
        return c
    if well_name is not None and "well" in c.columns:
        c = c[c["well"].astype(str) == str(well_name)]
    if "md_m" in c.columns:
        c = c.sort_values("md_m", kind="stable")
    return c.reset_index(drop=True)


def _curve_name(curves: pd.DataFrame, want: str) -> str | None:
    if curves is None or curves.shape[1] == 0:
        return None
    for c in curves.columns:
        if str(c).strip().lower() == str(want).strip().lower():
            return c
    return None


def _s_across(track: pd.DataFrame, md: float) -> tuple[float, float]:
    """s just above and just below ``md`` on a track (the sample before / at-or-after)."""
    tmd = track["md_m"].to_numpy(float)
    ts = track["s_m"].to_numpy(float)
    j = int(np.searchsorted(tmd, md, side="left"))
    if j <= 0:
        return float(ts[0]), float(ts[0])
    if j >= len(tmd):
        return float(ts[-1]), float(ts[-1])
    return float(ts[j - 1]), float(ts[j])


def _unit_runs(track: pd.DataFrame):
    """Contiguous runs of one unit along a track: (unit, md_top, md_base)."""
    units = track["unit"].to_numpy(object)
    md = track["md_m"].to_numpy(float)
    if len(md) == 0:
        return []
    edges = np.concatenate([[md[0]], 0.5 * (md[1:] + md[:-1]), [md[-1]]])
    runs = []
    start = 0
    for i in range(1, len(units) + 1):
        if i == len(units) or units[i] != units[start]:
            if units[start] is not None and not (isinstance(units[start], float)
                                                 and math.isnan(units[start])):
                runs.append((str(units[start]), edges[start], edges[i]))
            start = i
    return runs


def _column_units(column) -> list[tuple[str, float, float]]:
    s = np.asarray(column.s_m, dtype=float)
    base = float(column.base_s_m)
    if not math.isfinite(base):
        last = float(np.nanmedian(np.diff(s))) if len(s) > 1 else 50.0
        base = float(s[-1]) + last
    ends = np.append(s[1:], base)
    return [(str(n), float(a), float(b)) for n, a, b in zip(column.names, s, ends)]


def _legend_patch(section: str, alpha: float = 0.25):
    from matplotlib.patches import Patch

    st = _style(section)
    return Patch(facecolor=_rgba(st["colour"], alpha), edgecolor=st["colour"],
                 hatch=st["hatch"], label=st["words"])


def _rgba(colour: str, alpha: float):
    from matplotlib.colors import to_rgba

    return to_rgba(colour, alpha)


_OFFSETS = ((5, 5, "left", "bottom"), (5, -5, "left", "top"), (-5, 5, "right", "bottom"),
            (-5, -5, "right", "top"), (8, 0, "left", "center"), (-8, 0, "right", "center"),
            (0, 9, "center", "bottom"), (0, -9, "center", "top"), (12, 14, "left", "bottom"),
            (12, -14, "left", "top"), (-12, 14, "right", "bottom"), (-12, -14, "right", "top"),
            (20, 0, "left", "center"), (-20, 0, "right", "center"))


def _place_labels(ax, labels, obstacles=(), *, marker_pt: float = 5.0, zorder: float = 6):
    """Write point labels where they overlap each other and the markers least.

    ``labels``: dicts with ``x, y, text`` and optional ``colour, size, weight``. Greedy: each
    label takes the first of a few offsets around its point that hits nothing placed so far
    (else the one that overlaps least). Text extents are estimated from the character count,
    which is close enough for the sans-serif font at these sizes.
    """
    from matplotlib import patheffects

    halo = patheffects.withStroke(linewidth=2.5, foreground="white")
    ax.apply_aspect()
    trans = ax.transData
    k = ax.figure.dpi / 72.0
    boxes = []
    for x, y in obstacles:
        px, py = trans.transform((x, y))
        r = marker_pt * k
        boxes.append((px - r, py - r, px + r, py + r))
    frame = ax.bbox
    out = []

    def overlap(b):
        tot = 0.0
        for o in boxes:
            w = min(b[2], o[2]) - max(b[0], o[0])
            h = min(b[3], o[3]) - max(b[1], o[1])
            if w > 0 and h > 0:
                tot += w * h
        outside = max(0, frame.x0 - b[0]) + max(0, b[2] - frame.x1) + \
            max(0, frame.y0 - b[1]) + max(0, b[3] - frame.y1)
        return tot + 50.0 * outside * (b[3] - b[1])

    for lab in labels:
        size = float(lab.get("size", 8))
        bold = lab.get("weight") == "bold"
        lines = str(lab["text"]).split("\n")
        w = (0.62 if bold else 0.56) * size * max(len(t) for t in lines) * k
        h = 1.25 * size * len(lines) * k
        px, py = trans.transform((lab["x"], lab["y"]))
        best, best_cost = None, np.inf
        for dx, dy, ha, va in _OFFSETS:
            x0 = px + dx * k - (0 if ha == "left" else w if ha == "right" else w / 2)
            y0 = py + dy * k - (0 if va == "bottom" else h if va == "top" else h / 2)
            b = (x0, y0, x0 + w, y0 + h)
            cost = overlap(b)
            if cost < best_cost:
                best, best_cost = (dx, dy, ha, va, b), cost
            if cost == 0:
                break
        dx, dy, ha, va, b = best
        boxes.append(b)
        out.append(ax.annotate(lab["text"], (lab["x"], lab["y"]), xytext=(dx, dy),
                               textcoords="offset points", ha=ha, va=va, fontsize=size,
                               fontweight=lab.get("weight", "normal"),
                               color=lab.get("colour", INK), zorder=zorder,
                               path_effects=[halo]))
    return out


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
        The well's stratigraphic position track (:mod:`wellfault.track`); without one no ties
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
        A track (schema in :mod:`wellfault.track`).
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
