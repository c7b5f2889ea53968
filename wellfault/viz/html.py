"""HTML building blocks of the reports: page, tables, chips, figures, the texts of the
assumptions, and the atomic file write."""

from __future__ import annotations

import base64
import datetime as _dt
import html
import io
import math
from collections.abc import Mapping, Sequence

import numpy as np
import pandas as pd

from ..about import CAUTION, __version__
from ..geo.precision import (
    DEFAULT_DECIMALS,
    Decimals,
    column_decimals,
    format_length,
    format_table,
    lengths_in_text,
)
from ..geo.units import DepthUnit

__all__ = ["cut_table_html", "error_table_html"]


_CSS = """
:root { --ink:#2f3640; --muted:#69707a; --line:#d9dde2; --bg:#fbfaf7; --missing:#c4622d;
        --repeated:#2b6a99; --undet:#7d7d7d; --accent:#4d7a66; }
* { box-sizing: border-box; }
body { font-family: "DejaVu Sans", "Segoe UI", Helvetica, Arial, sans-serif; color: var(--ink);
       background: var(--bg); margin: 0; line-height: 1.45; }
main { max-width: 1380px; margin: 0 auto; padding: 1.2rem 1.6rem 3rem; }
h1 { font-size: 1.55rem; margin: .4rem 0 .2rem; }
h2 { font-size: 1.2rem; margin: 2rem 0 .6rem; border-bottom: 2px solid var(--line);
     padding-bottom: .2rem; }
h3 { font-size: 1.02rem; margin: 1.2rem 0 .4rem; }
p.sub { color: var(--muted); margin: 0 0 1rem; }
.caution { border-left: 5px solid var(--missing); background: #fff4ec; padding: .7rem 1rem;
           margin: 1rem 0; font-size: .93rem; }
.summary { display: flex; flex-wrap: wrap; gap: .7rem; margin: .8rem 0; }
.summary div { background: white; border: 1px solid var(--line); border-radius: 6px;
               padding: .45rem .8rem; min-width: 8.5rem; }
.summary b { display: block; font-size: 1.3rem; }
table { border-collapse: collapse; font-size: .84rem; background: white; margin: .4rem 0 1rem; }
th, td { border: 1px solid var(--line); padding: .28rem .5rem; text-align: left;
         vertical-align: top; }
th { background: #eef1ee; font-weight: 600; }
td.num { text-align: right; font-variant-numeric: tabular-nums; white-space: nowrap; }
tr:nth-child(even) td { background: #fafbfa; }
.wide { overflow-x: auto; max-width: 100%; }
.chip { display: inline-block; padding: 0 .45rem; border-radius: 9px; color: white;
        font-size: .8rem; font-weight: 600; }
.chip.missing { background: var(--missing); }
.chip.repeated { background: var(--repeated); }
.chip.undetermined { background: var(--undet); }
figure { margin: 1rem 0 1.6rem; background: white; border: 1px solid var(--line);
         border-radius: 6px; padding: .6rem; }
figure img { max-width: 100%; height: auto; display: block; margin: 0 auto; }
figcaption { color: var(--muted); font-size: .86rem; margin-top: .4rem; }
dl.assume { display: grid; grid-template-columns: max-content 1fr; gap: .25rem 1rem;
            background: white; border: 1px solid var(--line); border-radius: 6px;
            padding: .7rem 1rem; }
dl.assume dt { font-weight: 600; }
dl.assume dd { margin: 0; }
details { margin: .5rem 0 1rem; }
summary { cursor: pointer; color: var(--accent); font-weight: 600; }
.ok { color: var(--accent); font-weight: 600; }
.nw { white-space: nowrap; }
ul.notes { font-size: .86rem; padding-left: 1.2rem; }
td small { color: var(--muted); }
table.cuts { font-size: .8rem; }
table.cuts td { padding: .25rem .4rem; }
footer { color: var(--muted); font-size: .8rem; margin-top: 2.5rem; border-top: 1px solid
         var(--line); padding-top: .6rem; }
"""


# ------------------------------------------------------------------------------ utilities
def _esc(v) -> str:
    return html.escape("" if v is None else str(v), quote=True)


def _figure_html(fig, caption: str, alt: str, *, dpi: int = 96) -> str:
    buf = io.BytesIO()
    fig.savefig(buf, format="png", dpi=dpi, facecolor="white")
    data = base64.b64encode(buf.getvalue()).decode("ascii")
    return (f'<figure><img alt="{_esc(alt)}" src="data:image/png;base64,{data}">'
            f"<figcaption>{_esc(caption)}</figcaption></figure>")


def _figure_or_error(make, caption: str, alt: str, problems: list[str]) -> str:
    """Draw a figure; a failure goes into ``problems`` (and the report) instead of stopping."""
    try:
        fig = make()
    except Exception as exc:  # noqa: BLE001 - a failed figure must not lose the report
        problems.append(f"{alt}: figure not drawn ({type(exc).__name__}: {exc})")
        return f'<p class="sub">{_esc(alt)}: figure not drawn: {_esc(exc)}</p>'
    return _figure_html(fig, caption, alt)


def _unit_of(cuts: pd.DataFrame) -> str:
    for u in ("m", "ft", "usft"):
        if f"md_{u}" in cuts.columns:
            return u
    return "m"


def _fmt(v, nd: int | None = 1) -> str:
    """A cell as text: floats with ``nd`` decimals and thousands separators (None: as is)."""
    if v is None:
        return ""
    if isinstance(v, (float, np.floating)):
        if not math.isfinite(float(v)):
            return ""
        return repr(float(v)) if nd is None else f"{float(v):,.{nd}f}"
    return str(v)


def _cell(v, column: str, decimals: Decimals) -> str:
    """A cell of column ``column`` at the precision its rule gives (1 decimal without one)."""
    nd = column_decimals(column, decimals)
    return _fmt(v, nd if nd is not None or decimals.full else 1)


def _length(value_m, unit: DepthUnit, decimals: Decimals, *, nd: int | None = None) -> str:
    """A length in metres as report text in ``unit`` (``"2.0 ft"``)."""
    if nd is not None:
        return f"{float(value_m) / unit.metres:.{nd}f} {unit.suffix}"
    return format_length(value_m, unit, decimals)


def _chip(section) -> str:
    sec = str(section)
    cls = sec if sec in ("missing", "repeated") else "undetermined"
    return f'<span class="chip {cls}">{_esc(sec)}</span>'


def _table(headers: Sequence[str], rows: Sequence[Sequence[tuple[str, bool]]],
           *, cls: str = "") -> str:
    """HTML table from already-escaped cells ``(html, numeric)``."""
    out = [f'<div class="wide"><table class="{cls}"><thead><tr>']
    out += [f"<th>{_esc(h)}</th>" for h in headers]
    out.append("</tr></thead><tbody>")
    for r in rows:
        out.append("<tr>" + "".join(f'<td class="num">{c}</td>' if num else f"<td>{c}</td>"
                                    for c, num in r) + "</tr>")
    out.append("</tbody></table></div>")
    return "".join(out)


def cut_table_html(cuts: pd.DataFrame | None, *, full: bool = True,
                   max_rows: int | None = None, decimals: Decimals = DEFAULT_DECIMALS) -> str:
    """The cut table as readable HTML: one row per cut, units in the column names.

    The headline table shows what a geologist checks first; with ``full`` every column of the
    cut table follows in a collapsible section, as the program wrote it. ``max_rows`` keeps a
    huge field's page readable: the first rows are shown and the page says how many are left
    out (the CSV or Parquet cut table holds them all). Numbers are shown at the precision the
    written tables carry (``decimals``, :mod:`wellfault.geo.precision`).
    """
    if cuts is None or len(cuts) == 0:
        return '<p class="ok">No fault cut found.</p>'
    n_all = len(cuts)
    if max_rows is not None and n_all > max_rows:
        cuts = cuts.iloc[:max_rows]
    u = _unit_of(cuts)
    lu = "ft" if u in ("ft", "usft") else "m"

    def col(row, stem):
        return _cell(row.get(f"{stem}_{u}", np.nan), f"{stem}_{u}", decimals)

    headers = ["well", "evidence", f"MD [{lu}]", f"bracket MD [{lu}]", f"TVDSS [{lu}]",
               "section", "fault type", f"TST [{lu}]", f"TVT [{lu}]",
               f"vert. separation [{lu}]", f"throw [{lu}]", f"heave [{lu}]",
               "fault dip/azimuth [deg]", "crossing", "surfaces above / below the cut",
               "confidence [0-1]"]
    rows = []
    notes = []
    for k, row in enumerate(cuts.to_dict("records"), start=1):
        fd, fa = row.get("fault_dip_deg", np.nan), row.get("fault_dip_azimuth_deg", np.nan)
        dip_txt = (f"{fd:.0f}/{fa:03.0f}" if isinstance(fd, (int, float)) and math.isfinite(fd)
                   and isinstance(fa, (int, float)) and math.isfinite(fa) else "")
        src = str(row.get("fault_dip_source", "") or "")
        rows.append([
            (f'<span class="nw">{_esc(row.get("well", ""))}</span>', False),
            (_esc(row.get("method", "")), False),
            (col(row, "md"), True),
            (f"{col(row, 'md_top')} \u2013 {col(row, 'md_base')}", True),
            (col(row, "tvdss"), True), (_chip(row.get("section", "")), False),
            (_esc(row.get("fault_type", "")), False), (col(row, "tst"), True),
            (col(row, "tvt"), True), (col(row, "vertical_separation"), True),
            (col(row, "throw"), True), (col(row, "heave"), True),
            (f'<span class="nw">{_esc(dip_txt)}</span><br><small>{_esc(src)}</small>', False),
            (_esc(str(row.get("crossing", "")).replace(" -> ", " \u2192 ")), False),
            (f"{_esc(row.get('surface_above', ''))} / {_esc(row.get('surface_below', ''))}",
             False),
            (_cell(row.get("confidence", np.nan), "confidence", decimals), True),
        ])
        note = str(row.get("notes", "") or "").strip()
        if note and note.lower() != "nan":
            notes.append(f"<li><b>{_esc(row.get('well', ''))}, MD {col(row, 'md')} "
                         f"{lu}</b>: {_esc(note)}</li>")
    out = _table(headers, rows, cls="cuts")
    if len(cuts) < n_all:
        out += (f'<p class="sub">The first {len(cuts):,} of {n_all:,} cuts are shown; the cut '
                "table written beside this report holds them all.</p>")
    if notes:
        out += '<h3>Notes on the cuts</h3><ul class="notes">' + "".join(notes) + "</ul>"
    if full:
        body = format_table(cuts, decimals).to_html(index=False, escape=True, na_rep="", border=0,
                                     classes="full")
        out += (f"<details><summary>Every column of the cut table ({len(cuts.columns)} "
                f"columns, as written to CSV)</summary><div class=\"wide\">{body}</div>"
                "</details>")
    return out


def _errors_frame(errors) -> pd.DataFrame:
    if errors is None:
        return pd.DataFrame(columns=["message"])
    if isinstance(errors, pd.DataFrame):
        return errors.reset_index(drop=True)
    rows = []
    for e in errors:
        if isinstance(e, Mapping):
            rows.append(dict(e))
        elif isinstance(e, BaseException):
            rows.append({"error_type": type(e).__name__, "message": str(e)})
        else:
            rows.append({"message": str(e)})
    return pd.DataFrame(rows)


def error_table_html(errors, *, max_rows: int | None = None) -> str:
    """The errors met, as an HTML table (a screening error table, or messages)."""
    df = _errors_frame(errors)
    if len(df) == 0:
        return '<p class="ok">No error met.</p>'
    n_all = len(df)
    if max_rows is not None and n_all > max_rows:
        df = df.iloc[:max_rows]
    headers = list(df.columns)
    rows = [[(_esc(v if not (isinstance(v, float) and math.isnan(v)) else ""), False)
             for v in r] for r in df.itertuples(index=False)]
    out = _table(headers, rows, cls="errors")
    if len(df) < n_all:
        out += (f'<p class="sub">The first {len(df):,} of {n_all:,} errors are shown; the error '
                "table written beside this report holds them all.</p>")
    return out


def _assumptions_html(items: list[tuple[str, str]], extra) -> str:
    if extra:
        if isinstance(extra, str):
            items = items + [("stated by the caller", extra)]
        elif isinstance(extra, Mapping):
            items = items + [(str(k), str(v)) for k, v in extra.items()]
        else:
            items = items + [("stated by the caller", str(v)) for v in extra]
    body = "".join(f"<dt>{_esc(k)}</dt><dd>{_esc(v)}</dd>" for k, v in items)
    return f'<dl class="assume">{body}</dl>'


def _fault_dip_text(cuts: pd.DataFrame) -> str:
    if cuts is None or len(cuts) == 0 or "fault_dip_source" not in cuts.columns:
        return "no cut, so no fault dip was used"
    parts = []
    for src, g in cuts.groupby(cuts["fault_dip_source"].astype(str), sort=False):
        dips = sorted({f"{d:.0f}/{a:03.0f}" for d, a in zip(g.get("fault_dip_deg", []),
                                                            g.get("fault_dip_azimuth_deg", []))
                       if isinstance(d, (int, float)) and math.isfinite(d)
                       and isinstance(a, (int, float)) and math.isfinite(a)})
        parts.append(f"{len(g)} cut{'s' if len(g) != 1 else ''}: {src}"
                     + (f" ({', '.join(dips)})" if dips else ""))
    return "; ".join(parts)


def _tolerance_text(tolerance, unit: DepthUnit = DepthUnit.M,
                    decimals: Decimals = DEFAULT_DECIMALS) -> str:
    def ln(v):
        return _length(v, unit, decimals)

    if tolerance is None:
        return ("not passed to the report; tops evidence defaults are 15 % of the expected "
                f"interval plus a {ln(2.0)} floor, picks uncertain by {ln(1.0)}")
    rel = getattr(tolerance, "relative", None)
    floor = getattr(tolerance, "floor_m", None)
    pick = getattr(tolerance, "pick_uncertainty_m", None)
    if rel is None:
        return str(tolerance)
    txt = f"{100 * rel:g} % of the expected interval plus a {ln(floor)} floor"
    if pick is not None:
        txt += f"; picks uncertain by {ln(pick)} (brackets widened by it)"
    return txt


def _bed_dip_text(bed_dip, unit: DepthUnit = DepthUnit.M) -> str:
    if bed_dip is None:
        return "none given: flat beds assumed"
    if isinstance(bed_dip, str):
        return f"{bed_dip} (dip/dip azimuth, degrees)"
    if hasattr(bed_dip, "describe"):
        return f"{lengths_in_text(bed_dip.describe(), unit)} (dip/dip azimuth, degrees)"
    return str(bed_dip)


def _trajectory_text(trajectory, unit: DepthUnit = DepthUnit.M) -> str:
    if trajectory is None:
        return "no survey: vertical well below the surface location"
    st = getattr(trajectory, "stations", None)
    if st is None or len(st) == 0:
        return str(trajectory)
    inc = float(np.nanmax(st["inc_deg"]))
    if inc == 0.0:
        return "vertical (no deviation)"
    lo, hi = (float(v) / unit.metres for v in (st["md_m"].min(), st["md_m"].max()))
    return (f"{len(st)} survey stations, MD {lo:.0f}-{hi:.0f} {unit.suffix}, "
            f"inclination up to {inc:.1f} deg (minimum curvature)")


def _page(title: str, subtitle: str, body: str) -> str:
    now = _dt.datetime.now(_dt.timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    return (
        "<!DOCTYPE html>\n<html lang=\"en\"><head><meta charset=\"utf-8\">"
        "<meta http-equiv=\"Content-Security-Policy\" content=\"default-src 'none'; "
        "img-src data:; style-src 'unsafe-inline'\">"
        "<meta name=\"viewport\" content=\"width=device-width, initial-scale=1\">"
        f"<meta name=\"generator\" content=\"wellfault {_esc(__version__)}\">"
        f"<title>{_esc(title)}</title><style>{_CSS}</style></head><body><main>"
        f"<h1>{_esc(title)}</h1><p class=\"sub\">{_esc(subtitle)}</p>"
        f"<div class=\"caution\" id=\"caution\">{_esc(CAUTION)}</div>"
        f"{body}"
        f"<footer>Written by wellfault {_esc(__version__)} on {now}. This file is complete in "
        "itself: figures are embedded, nothing is fetched from a network. "
        f"{_esc(CAUTION)}</footer></main></body></html>\n")


def _summary(cards: Sequence[tuple[str, object]]) -> str:
    return '<div class="summary">' + "".join(
        f"<div><b>{_esc(v)}</b>{_esc(k)}</div>" for k, v in cards) + "</div>"
