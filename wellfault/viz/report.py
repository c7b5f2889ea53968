"""Self-contained HTML reports: one file per well or per field, to open in any browser.

A report holds the cut table (readable, units in the column names), the figures to check each
cut (PNG images embedded as base64 data, so the file needs no other file and no network), the
assumptions the numbers rest on (bed dip, fault dip given or assumed, thickness tolerance), the
errors met on the way and the caution text. Files are written by
:func:`wellfault.io.outputs.write_output`: a plain file is replaced in one step (a reader never
sees half a report), ``-`` is standard output, a device or pipe is written straight through.

Entry points
------------
:func:`write_well_report` (``wellfault detect --report PATH``) and :func:`write_field_report`
(``wellfault screen --report PATH``); :func:`well_report` and :func:`field_report` return the
HTML text without writing it.
"""

from __future__ import annotations

import math
import os
from collections.abc import Mapping
from pathlib import Path

import numpy as np
import pandas as pd

from ..geo.precision import (
    DEFAULT_DECIMALS,
    Decimals,
)
from ..io.outputs import write_output
from .html import (
    _assumptions_html,
    _bed_dip_text,
    _cell,
    _errors_frame,
    _esc,
    _fault_dip_text,
    _figure_or_error,
    _length,
    _page,
    _summary,
    _table,
    _tolerance_text,
    _trajectory_text,
    cut_table_html,
    error_table_html,
)

__all__ = [
    "well_report",
    "write_well_report",
    "field_report",
    "write_field_report",
    "PROGRESS_MIN_WELLS",
]


#: Progress bars appear when a report draws figures for at least this many wells.
PROGRESS_MIN_WELLS = 20


# ------------------------------------------------------------------------------ well report
def well_report(*, well, column, cuts_df: pd.DataFrame | None, trajectory=None, bed_dip=None,
                tops: pd.DataFrame | None = None, track: pd.DataFrame | None = None,
                assumptions=None, errors=None, tolerance=None, curve: str = "GR",
                title: str | None = None, unit=None, decimals: Decimals = DEFAULT_DECIMALS) -> str:
    """HTML text of one well's report (see :func:`write_well_report`)."""
    from . import style
    from . import well_plots as plots
    from .track import cuts_in_unit, track_from_tops

    name = str(getattr(well, "name", "well"))
    cuts = cuts_df if cuts_df is not None else pd.DataFrame()
    du = style.display_unit(unit, cuts if len(cuts.columns) else None, well)
    if len(cuts.columns):
        cuts = cuts_in_unit(cuts, du)
    problems: list[str] = []
    if track is None and tops is not None:
        try:
            md = None
            curves = getattr(well, "curves", None)
            if curves is not None and len(curves) > 1:
                md = curves.index.to_numpy(float)
                md = md[:: max(1, len(md) // 4000)]
            track = track_from_tops(tops, column, trajectory, bed_dip, cuts, md_m=md,
                                    well=name if "well" in tops.columns else None)
        except Exception as exc:  # noqa: BLE001 - report what failed, keep the rest
            problems.append(f"stratigraphic position track not built from the tops "
                            f"({type(exc).__name__}: {exc})")
    n_missing = int((cuts.get("section", pd.Series(dtype=str)) == "missing").sum())
    n_repeated = int((cuts.get("section", pd.Series(dtype=str)) == "repeated").sum())
    body = [_summary([("cuts", len(cuts)), ("missing section", n_missing),
                      ("repeated section", n_repeated),
                      ("errors met", len(_errors_frame(errors)) + len(problems))])]
    body.append("<h2 id=\"cuts\">Fault cuts</h2>")
    body.append(f'<p class="sub">Lengths in {_esc(du.suffix)}, in the table, the figures and '
                "the text; the bracket is the MD interval in which the evidence places the cut. "
                "Missing section: strata cut out by the fault; repeated: strata drilled "
                "twice.</p>")
    body.append(cut_table_html(cuts, decimals=decimals))
    body.append("<h2 id=\"figures\">Figures</h2>")
    body.append(_figure_or_error(
        lambda: plots.correlation_panel(well, column, track, cuts, curve=curve, unit=du),
        "The well's curve (left, against MD) beside the type log and the column (right, "
        "against stratigraphic position s). Green tie lines join each surface in the well to "
        "the same surface in the column; each cut's wedge points at the interval of the column "
        "it removes (missing, orange) or repeats (repeated, blue).",
        f"correlation panel of {name}", problems))
    if track is not None:
        body.append(_figure_or_error(
            lambda: plots.strat_position_plot(track, cuts, column=column, well=name, unit=du),
            "Stratigraphic position s against MD: a fault is a step, an arrow from the position "
            "above the cut to the position below. The right panel shows how firmly the evidence "
            "places each depth.", f"stratigraphic position of {name}", problems))
    else:
        body.append('<p class="sub">No stratigraphic position track (no tops and none given): '
                    "the position plot is left out.</p>")
    body.append("<h2 id=\"assumptions\">Assumptions used</h2>")
    methods = sorted(set(cuts["method"].astype(str))) if "method" in cuts.columns and len(cuts) \
        else []
    items = [
        ("well", f"{name} ({getattr(well, 'source', '<memory>')}), depth unit "
                 f"{getattr(getattr(well, 'depth_unit', None), 'value', '?')}, depth reference "
                 f"{getattr(well, 'ref_name', '?')} at "
                 + (f"{_length(well.ref_elevation_m, du, decimals)} above sea level"
                    if getattr(well, "ref_elevation_m", None) is not None
                    else "unknown elevation")),
        ("reference column", f"{len(column)} surfaces ({column.names[0]} to "
                             f"{column.names[-1]}), "
                             + ("with a type log" if column.type_log is not None
                                else "without a type log")),
        ("well path", _trajectory_text(trajectory, du)),
        ("bed dip", _bed_dip_text(bed_dip, du)),
        ("fault dip", _fault_dip_text(cuts)),
        ("thickness tolerance", _tolerance_text(tolerance, du, decimals)),
        ("evidence", (", ".join(methods) if methods else "none reported a cut")
         + (f"; {len(tops)} tops" if tops is not None else "")),
    ]
    body.append(_assumptions_html(items, assumptions))
    body.append("<h2 id=\"errors\">Errors met</h2>")
    errs = _errors_frame(errors)
    if problems:
        errs = pd.concat([errs, pd.DataFrame({"message": problems})], ignore_index=True)
    body.append(error_table_html(errs))
    return _page(title or f"Fault cuts in well {name}",
                 f"{len(cuts)} cut{'s' if len(cuts) != 1 else ''} found; report of one well",
                 "".join(body))


def write_well_report(path: str | os.PathLike, *, well, column, cuts_df: pd.DataFrame | None,
                      trajectory=None, bed_dip=None, tops: pd.DataFrame | None = None,
                      track: pd.DataFrame | None = None, assumptions=None, errors=None,
                      tolerance=None, curve: str = "GR", title: str | None = None, unit=None,
                      decimals: Decimals = DEFAULT_DECIMALS) -> Path:
    """Write one well's self-contained HTML report to ``path`` (atomically) and return the path.

    Parameters
    ----------
    path : path-like
        The HTML file to write (its folder must exist; an existing file is replaced).
    well : Well
        The well read from its LAS file.
    column : ReferenceColumn
        The reference column (with a type log when one is known: the correlation panel then
        shows it beside the well's curve).
    cuts_df : DataFrame or None
        The cut table ``find_fault_cuts`` returned (any length unit).
    trajectory : Trajectory, optional
        The well path (None: vertical).
    bed_dip : BedDip or "dip/azimuth" text, optional
        The bed attitude used.
    tops : DataFrame, optional
        The well's picks; with them the stratigraphic position track is built
        (:func:`wellfault.viz.track.track_from_tops`) when ``track`` is not given.
    track : DataFrame, optional
        The track from the curve engine, when it ran.
    assumptions : str, mapping or list of str, optional
        Further assumptions to state (e.g. ``{"fault": "60/090 given with --fault"}``).
    errors : DataFrame, list of str/dict/exception, optional
        Errors and warnings met, shown in the error table.
    tolerance : TopsTolerance, optional
        The thickness tolerance used.
    curve : str
        Curve for the correlation panel (default GR).
    unit : "m" or "ft", optional
        Unit of every length in the report: table, figures and text (default: the cut table's,
        else the well's depth unit).
    decimals : Decimals, optional
        Precision of the numbers shown (:mod:`wellfault.geo.precision`).
    """
    text = well_report(well=well, column=column, cuts_df=cuts_df, trajectory=trajectory,
                       bed_dip=bed_dip, tops=tops, track=track, assumptions=assumptions,
                       errors=errors, tolerance=tolerance, curve=curve, title=title, unit=unit,
                       decimals=decimals)
    return write_output(path, text, what="the report")


# ----------------------------------------------------------------------------- field report
def _n_faults(faults) -> int:
    if faults is None:
        return 0
    f = pd.DataFrame(faults)
    for col in ("fault_id", "fault", "name", "fault_name"):
        if col in f.columns:
            return int(f[col].nunique())
    return len(f)


def _progress(iterable, total: int, progress: bool | None, desc: str):
    show = progress if progress is not None else total >= PROGRESS_MIN_WELLS
    if not show:
        return iterable
    from tqdm import tqdm  # a text bar: the report is written from scripts and commands

    return tqdm(iterable, total=total, desc=desc, unit="well", leave=False)


def field_report(*, cuts: pd.DataFrame | None, errors=None, wells: pd.DataFrame | None = None,
                 faults: pd.DataFrame | None = None, paths: Mapping | None = None,
                 tracks: Mapping[str, pd.DataFrame] | None = None, column=None,
                 assumptions=None, tolerance=None, bed_dip=None, tvdss_m: float | None = None,
                 max_well_figures: int = 40, max_table_rows: int = 5000,
                 progress: bool | None = None, title: str | None = None, unit=None,
                 unit_note: str | None = None, decimals: Decimals = DEFAULT_DECIMALS) -> str:
    """HTML text of a field's report (see :func:`write_field_report`)."""
    from . import field_plots, style
    from . import well_plots as plots
    from .track import cuts_in_unit

    c = cuts if cuts is not None else pd.DataFrame()
    du = style.display_unit(unit, c if len(c.columns) else None)
    if len(c.columns):
        c = cuts_in_unit(c, du)
    if faults is not None:  # the figures read fault positions in metres
        faults = cuts_in_unit(pd.DataFrame(faults), "m")
    problems: list[str] = []
    errs = _errors_frame(errors)
    wl = pd.DataFrame(wells).copy() if wells is not None else None
    if wl is not None and "well" not in wl.columns and "name" in wl.columns:
        wl = wl.rename(columns={"name": "well"})
    well_names: list[str] = []
    if wl is not None and "well" in wl.columns:
        well_names = [str(w) for w in wl["well"]]
    for w in (c["well"].astype(str).unique() if "well" in c.columns and len(c) else []):
        if w not in well_names:
            well_names.append(w)
    for w in (errs["well"].astype(str).unique() if "well" in errs.columns else []):
        if w not in well_names:
            well_names.append(w)
    failed = set(errs["well"].astype(str)) if "well" in errs.columns else set()
    sec = c["section"].astype(str) if "section" in c.columns else pd.Series(dtype=str)
    with_cuts = set(c["well"].astype(str)) if "well" in c.columns else set()
    body = [_summary([("wells", len(well_names)), ("wells with cuts", len(with_cuts)),
                      ("cuts", len(c)), ("missing section", int((sec == "missing").sum())),
                      ("repeated section", int((sec == "repeated").sum())),
                      ("wells that failed", len(failed)),
                      ("faults", _n_faults(faults))])]

    body.append("<h2 id=\"map\">Map</h2>")
    if wl is not None and {"well", "x_m", "y_m"} <= set(wl.columns):
        body.append(_figure_or_error(
            lambda: field_plots.field_map(wl, c, faults, paths=paths, tvdss_m=tvdss_m, unit=du),
            "Wells (open circles, deviated paths in plan), cut points (orange circles: missing "
            "section; blue squares: repeated), posted with their vertical separation, and the "
            "fault traces at one depth with ticks or triangles on the hanging wall.",
            "field map", problems))
    else:
        body.append('<p class="sub">No well locations given (a table with well, x_m, y_m): '
                    "the map is left out.</p>")
    if faults is not None and len(faults) and len(c):
        body.append(_figure_or_error(
            lambda: field_plots.separation_along_strike(faults, c, unit=du),
            "Vertical separation of each cut against its distance along the strike of its "
            "fault: separation should change smoothly along a fault; a cut far off its "
            "neighbours deserves a second look.", "separation along strike", problems))
        fdf = cuts_in_unit(pd.DataFrame(faults), du)
        body.append("<h3>Faults</h3>")
        body.append(_table(list(fdf.columns),
                           [[(_esc(_cell(v, col, decimals)),
                              isinstance(v, (int, float, np.floating)))
                             for col, v in zip(fdf.columns, r)]
                            for r in fdf.itertuples(index=False)]))

    body.append("<h2 id=\"cuts\">Fault cuts</h2>")
    body.append(f'<p class="sub">One row per cut in every well; '
                f'{_esc(unit_note or f"lengths in {du.suffix}")}, in the tables, the '
                "figures and the text.</p>")
    body.append(cut_table_html(c, max_rows=max_table_rows, decimals=decimals))

    body.append("<h2 id=\"wells\">Wells</h2>")
    rows = []
    counts = c.groupby(c["well"].astype(str))["section"].value_counts().unstack(fill_value=0) \
        if len(c) and {"well", "section"} <= set(c.columns) else pd.DataFrame()
    err_by_well = errs.groupby(errs["well"].astype(str)).size() if "well" in errs.columns \
        else pd.Series(dtype=int)
    # failed wells first, then wells with cuts, then the rest (as many as max_table_rows)
    order = sorted(well_names, key=lambda w: (w not in failed, w not in with_cuts))
    for w in order[:max_table_rows]:
        nm = int(counts.loc[w].get("missing", 0)) if w in counts.index else 0
        nr = int(counts.loc[w].get("repeated", 0)) if w in counts.index else 0
        ne = int(err_by_well.get(w, 0))
        status = "failed" if w in failed and w not in with_cuts else "ok"
        rows.append([(_esc(w), False), (str(nm), True), (str(nr), True), (str(ne), True),
                     (_esc(status), False)])
    body.append(_table(["well", "cuts with missing section", "cuts with repeated section",
                        "errors", "status"], rows))
    if len(order) > max_table_rows:
        body.append(f'<p class="sub">{max_table_rows:,} of {len(order):,} wells listed: those '
                    "that failed first, then those with cuts.</p>")

    if tracks:
        names = [w for w in well_names if w in tracks and w in with_cuts][:max_well_figures]
        body.append("<h3>Stratigraphic position of the wells with cuts</h3>")
        if len([w for w in tracks if w in with_cuts]) > len(names):
            body.append(f'<p class="sub">The first {len(names)} wells with cuts are drawn.</p>')
        for w in _progress(names, len(names), progress, "report figures"):
            body.append(_figure_or_error(
                lambda w=w: plots.strat_position_plot(tracks[w], c, column=column, well=w,
                                                      unit=du),
                f"{w}: stratigraphic position against MD; a fault is a step.",
                f"stratigraphic position of {w}", problems))

    body.append("<h2 id=\"assumptions\">Assumptions used</h2>")
    methods = sorted(set(c["method"].astype(str))) if "method" in c.columns and len(c) else []
    items = [("bed dip", _bed_dip_text(bed_dip) if bed_dip is not None else
              ("per well, as given in the inputs" if not len(c) or "bed_dip_deg" not in c.columns
               else "per well; at the cuts "
               + ", ".join(sorted({f"{d:.0f}/{a:03.0f}" for d, a in
                                   zip(c["bed_dip_deg"], c["bed_dip_azimuth_deg"])
                                   if math.isfinite(d) and math.isfinite(a)})[:12]))),
             ("fault dip", _fault_dip_text(c)),
             ("thickness tolerance", _tolerance_text(tolerance, du, decimals)),
             ("evidence", ", ".join(methods) if methods else "no cut reported")]
    if unit_note:
        items.append(("length unit", unit_note))
    body.append(_assumptions_html(items, assumptions))
    body.append("<h2 id=\"errors\">Errors met</h2>")
    if problems:
        errs = pd.concat([errs, pd.DataFrame({"message": problems})], ignore_index=True)
    body.append(error_table_html(errs, max_rows=max_table_rows))
    return _page(title or "Fault cuts in the field",
                 f"{len(c)} cut{'s' if len(c) != 1 else ''} in {len(with_cuts)} of "
                 f"{len(well_names)} wells; {len(failed)} well{'s' if len(failed) != 1 else ''} "
                 "failed", "".join(body))


def write_field_report(path: str | os.PathLike, *, cuts: pd.DataFrame | None, errors=None,
                       wells: pd.DataFrame | None = None, faults: pd.DataFrame | None = None,
                       paths: Mapping | None = None,
                       tracks: Mapping[str, pd.DataFrame] | None = None, column=None,
                       assumptions=None, tolerance=None, bed_dip=None,
                       tvdss_m: float | None = None, max_well_figures: int = 40,
                       max_table_rows: int = 5000, progress: bool | None = None,
                       title: str | None = None, unit=None, unit_note: str | None = None,
                       decimals: Decimals = DEFAULT_DECIMALS) -> Path:
    """Write a field's self-contained HTML report to ``path`` (atomically) and return the path.

    Parameters
    ----------
    path : path-like
        The HTML file to write (its folder must exist).
    cuts : DataFrame or None
        The field's cut table (every well; any length unit).
    errors : DataFrame or list, optional
        The error table (``well, source, error_type, message``) or messages.
    wells : DataFrame, optional
        ``well, x_m, y_m`` of every well (the manifest will do): the map and the well list.
    faults : DataFrame, optional
        ``fault_id, strike_deg, dip_deg, dip_azimuth_deg, sense, x_m, y_m, tvdss_m``: fault
        traces on the map and the separation-along-strike plot (cuts matched by the cut
        table's ``fault_id`` or ``fault_name``).
    paths : mapping well -> Trajectory or table, optional
        Deviated well paths for the map.
    tracks : mapping well -> track, optional
        Stratigraphic position tracks: a position plot for each well with cuts (at most
        ``max_well_figures``; a progress bar when there are ``PROGRESS_MIN_WELLS`` or more,
        or as ``progress`` says).
    column : ReferenceColumn, optional
        For the unit bands of the position plots.
    assumptions, tolerance, bed_dip : optional
        What the numbers rest on (see :func:`write_well_report`).
    tvdss_m : float, optional
        Depth of the fault traces on the map (default the median depth of the cuts).
    max_table_rows : int
        At most this many rows in each table of the page (cuts, wells, errors); the page says
        how many are left out. The CSV/Parquet tables of the run hold them all.
    unit : "m" or "ft", optional
        Unit of every length in the report (default: the cut table's, else metres).
    unit_note : str, optional
        A sentence on the unit, shown with the cut table and the assumptions (a screening's
        ``info["unit_note"]``: it says when the wells were logged in mixed units).
    decimals : Decimals, optional
        Precision of the numbers shown (:mod:`wellfault.geo.precision`).
    """
    text = field_report(cuts=cuts, errors=errors, wells=wells, faults=faults, paths=paths,
                        tracks=tracks, column=column, assumptions=assumptions,
                        tolerance=tolerance, bed_dip=bed_dip, tvdss_m=tvdss_m,
                        max_well_figures=max_well_figures, max_table_rows=max_table_rows,
                        progress=progress, title=title, unit=unit, unit_note=unit_note,
                        decimals=decimals)
    return write_output(path, text, what="the report")
