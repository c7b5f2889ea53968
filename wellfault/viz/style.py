"""What every figure shares: colours, section styles, legend patches, label placement, and what
tests read back from a figure."""

from __future__ import annotations

import math

import numpy as np
import pandas as pd

from ..geo.units import DepthUnit, parse_depth_unit
from .track import cuts_in_metres

__all__ = [
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
