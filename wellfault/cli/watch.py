"""``wellfault watch``: fault-cut alerts while drilling, and a re-forecast of the tops to come.

Registered in :mod:`wellfault.cli` with :func:`add_watch_parser` (the sub-command) and
:func:`cmd_watch` (its action). Also runnable alone: ``python -m wellfault.cli.watch ...``.

It follows a LAS or CSV file that grows as the well is drilled (or rows on standard input,
``-``), feeding every new sample to a :class:`~wellfault.live.watch.WellWatcher`. On stdout, either
readable lines — the bit's MD, TVD, unit and stratigraphic position every ``--print-every`` of
new hole, each fault cut as it is raised (and any revision or retraction) with the re-forecast
of the tops still to come — or, with ``--jsonl``, one JSON object per line (events ``update`` at
most once per metre of new hole, ``cut``, ``cut-revised``, ``possible_cut``, ``forecast``,
``notice``, ``summary``; see :class:`~wellfault.live.watch.WatchEvent`). A possible cut (a break of
the log much sharper than the type log predicts, :mod:`wellfault.live.watch_breaks`) is a line
starting ``??? POSSIBLE FAULT CUT``, with the tops ahead in both cases while it stands. The caution and what was done about
problems in the feed go to stderr. With ``--once`` it stops at the end of the input; otherwise
it polls the file every ``--poll`` seconds until Ctrl-C, which ends cleanly (exit 0) with the
whole-well check and a summary.

Exit codes: 0 the watch ended (end of input, ``--once``, or Ctrl-C); 2 bad usage or bad input at
the start (raised as :class:`~wellfault.errors.InputError`; ``wellfault.cli.app.main`` prints it on
one line). Problems in the feed once it runs never stop it.
"""

from __future__ import annotations

import argparse
import json
import math
import os
import sys
import time
import warnings

from ..about import CAUTION
from ..errors import InputError, WellfaultError, WellfaultWarning
from ..geo.precision import (
    DEFAULT_DECIMALS, Decimals, add_decimals_option, format_length, lengths_in_text,
)
from .runner import run_command

__all__ = ["add_watch_parser", "cmd_watch", "main"]

EXIT_OK, EXIT_BAD_INPUT = 0, 2


def add_watch_parser(subparsers) -> argparse.ArgumentParser:
    """Add the ``watch`` sub-command to ``subparsers`` (from ``add_subparsers``)."""
    p = subparsers.add_parser(
        "watch", help="follow a well being drilled: fault-cut alerts and tops re-forecast",
        description="Follow a LAS or CSV log that grows while the well is drilled (or rows on "
                    "standard input, '-'), align it to the type log sample by sample, raise "
                    "each fault cut as soon as the evidence is strong enough, and re-forecast "
                    "the MD and TVD of the tops still to come along the planned path. " + CAUTION)
    p.add_argument("well", metavar="WELL.las|WELL.csv|-",
                   help="the growing log (LAS 2.0 unwrapped, or CSV with a depth column such as "
                        "md_ft), or '-' for rows on standard input")
    p.add_argument("--type-well", metavar="TYPE.las", required=True,
                   help="the field's type well: its curves are the type log")
    p.add_argument("--type-tops", metavar="TYPE_TOPS.csv", required=True,
                   help="the type well's tops")
    p.add_argument("--type-survey", metavar="SURVEY.csv",
                   help="the type well's survey (vertical when omitted)")
    p.add_argument("--column", metavar="COLUMN.csv",
                   help="reference column table (its unconformity flags are kept)")
    p.add_argument("--survey", metavar="SURVEY.csv",
                   help="the actual survey so far: md, inc, azi (re-read when the file changes)")
    p.add_argument("--plan", metavar="PLAN.csv",
                   help="the planned trajectory (md, inc, azi like a survey): continues the "
                        "actual survey beyond its last station, for the forecast")
    g = p.add_mutually_exclusive_group()
    g.add_argument("--dip", metavar="DIP/AZI", help="bed dip, e.g. 12/075 (default flat)")
    g.add_argument("--dip-table", metavar="DIPS.csv",
                   help="bed dip with depth (md_<unit>, dip, dip_azimuth)")
    p.add_argument("--fault", metavar="DIP/AZI",
                   help="fault attitude for measuring the cuts (as for detect)")
    p.add_argument("--pitch", metavar="PITCH/FROM", help="slickenline pitch (needs --fault)")
    p.add_argument("--curve", action="append", metavar="NAME[:WEIGHT]",
                   help="curve to align (repeatable; default GR)")
    p.add_argument("--depth-unit", choices=["m", "ft", "usft"],
                   help="depth unit of files that do not state one")
    p.add_argument("--output-unit", choices=["m", "ft"],
                   help="length unit of the output (default: the log's)")
    add_decimals_option(p)
    p.add_argument("--jsonl", action="store_true",
                   help="write one JSON object per line to stdout instead of text")
    p.add_argument("--once", action="store_true",
                   help="read what the file holds now, then stop (no waiting for growth)")
    p.add_argument("--poll", type=float, default=2.0, metavar="SECONDS",
                   help="how often to look for new data (default 2 s)")
    p.add_argument("--print-every", type=float, metavar="LENGTH",
                   help="text output: a position line every LENGTH of new hole, in the output "
                        "unit (default 10 m or 30 ft)")
    p.add_argument("--min-confidence", type=float, default=0.7, metavar="C",
                   help="raise a cut only at this confidence or more (default 0.7)")
    p.add_argument("--no-final-check", action="store_true",
                   help="at the end, do not re-check the cuts against the whole-well alignment")
    p.set_defaults(func=cmd_watch)
    return p


# -------------------------------------------------------------------------------- printers
class _JsonPrinter:
    def __init__(self, unit, decimals: Decimals = DEFAULT_DECIMALS) -> None:
        self.unit = unit
        self.decimals = decimals

    def start(self, text: str) -> None:
        print(text, file=sys.stderr, flush=True)

    def text(self, message: str) -> str:
        """A sentence of the watcher with its lengths in the output unit."""
        return lengths_in_text(message, self.unit, self.decimals)

    def emit(self, events) -> None:
        for e in events:
            if e.kind == "notice":
                print(f"wellfault watch: {self.text(e.message)}", file=sys.stderr, flush=True)
            sys.stdout.write(json.dumps(e.to_dict(self.unit, self.decimals), allow_nan=False)
                             + "\n")
        sys.stdout.flush()


class _TextPrinter(_JsonPrinter):
    def __init__(self, unit, every_m: float, decimals: Decimals = DEFAULT_DECIMALS) -> None:
        super().__init__(unit, decimals)
        self.k = 1.0 / unit.metres
        self.sx = unit.suffix
        self.every_m = every_m
        self.next_m = -math.inf

    def L(self, v: float) -> str:  # noqa: N802 - a length in the output unit
        """A length given in metres, in the output unit at its precision (no unit)."""
        return format_length(v, self.unit, self.decimals, label=False)

    def position(self, st) -> str:
        where = (f"in {st.unit}, {self.L(st.below_unit_top_m)} {self.sx} below its top"
                 if st.unit else "outside the column's units")
        return (f"MD {self.L(st.md_m)} {self.sx}  TVD {self.L(st.tvd_m)} {self.sx}  {where}  "
                f"(s {self.L(st.s_m)} {self.sx}, fit {st.fit:.2f})")

    def cut_text(self, c) -> str:
        sx = self.sx
        live = c.extra.get("live") if isinstance(c.extra, dict) else None
        evidence = (f" (live evidence: margin {live['margin']:.1f}, correlation "
                    f"{live['correlation']:.2f} over {live['rows_below']} rows below)"
                    if live else "")
        return (f"{c.section.upper()} section at MD {self.L(c.md_m)} {sx} "
                f"[{self.L(c.md_top_m)}-{self.L(c.md_base_m)}], TVD {self.L(c.tvd_m)} {sx}: "
                f"{self.L(c.tst_m)} {sx} TST, VS {self.L(c.vertical_separation_m)} {sx}, "
                f"{c.surface_above or '?'} -> {c.surface_below or '?'}, {c.fault_type} fault "
                f"({c.crossing}), confidence {c.confidence:.2f}{evidence}")

    def forecast(self, df) -> list[str]:
        if df is None or len(df) == 0:
            return ["    no surface still to come"]
        sx = self.sx
        w = max(12, max(len(str(s)) for s in df["surface"]))
        lines = ["    tops still to come (re-forecast along the path ahead):",
                 f"      {'surface':<{w}} {'MD ' + sx:>10} {'TVD ' + sx:>10} {'to go':>9} "
                 f"{'shift':>9}"]
        for r in df.itertuples(index=False):
            lines.append(f"      {str(r.surface):<{w}} {self.L(r.md_m):>10} {self.L(r.tvd_m):>10} "
                         f"{self.L(r.md_to_go_m):>9} {self.L(r.shift_m):>9}"
                         + (f"  {r.note}" if r.note else ""))
        return lines

    # possible cuts (breaks of the log much sharper than the type log predicts)
    def possible_text(self, e) -> str:
        pc, sx = e.possible, self.sx
        if pc.status == "withdrawn":
            return (f"??? POSSIBLE FAULT CUT {pc.cut_id} WITHDRAWN at bit MD "
                    f"{self.L(e.bit_md_m)} {sx}: {e.message}")
        sep = (f"; most likely {self.L(pc.delta_s_m)} {sx} TST ({pc.separation_from})"
               if math.isfinite(pc.delta_s_m) else "")
        return (f"??? POSSIBLE FAULT CUT {pc.cut_id} at MD {self.L(pc.break_md_m)} {sx} "
                f"(bit MD {self.L(e.bit_md_m)} {sx}): {pc.curve} steps by {pc.observed:+.1f} "
                f"across {self.L(pc.side_m)} {sx} of hole either side where the type log along "
                f"the path predicts at most {pc.expected:.1f} (noise {pc.noise:.1f}); "
                f"confidence {pc.confidence:.2f}{sep}; awaiting the correlation")

    def possible_confirmed(self, pc) -> str:
        return (f"    confirms possible fault cut {pc.cut_id} (break at MD "
                f"{self.L(pc.break_md_m)} {self.sx}, warned at bit MD "
                f"{self.L(pc.raised_bit_md_m)} {self.sx})")

    def cases(self, case) -> list[str]:
        nf, wf = case["no_fault"], case["with_fault"].set_index("surface")
        sx = self.sx
        lines = [f"    while possible fault cut {case['cut_id']} stands: tops ahead with no fault "
                 f"/ with {self.L(case['delta_s_m'])} {sx} TST of separation:",
                 f"      {'surface':<24} {'MD no fault':>12} {'MD fault':>12}"]
        for r in nf.itertuples(index=False):
            md_f = wf["md_m"].get(r.surface, math.nan) if r.surface in wf.index else math.nan
            lines.append(f"      {str(r.surface):<24} {self.L(r.md_m):>12} {self.L(md_f):>12}")
        return lines

    def emit(self, events) -> None:
        out: list[str] = []
        for e in events:
            if e.kind == "update" and e.state is not None:
                if e.state.md_m >= self.next_m:
                    self.next_m = e.state.md_m + self.every_m
                    out.append(self.position(e.state))
            elif e.kind == "cut":
                out.append(f"*** FAULT CUT {e.cut_id} (raised at bit MD {self.L(e.bit_md_m)} "
                           f"{self.sx}): {self.cut_text(e.cut)}")
                if e.possible is not None:
                    out.append(self.possible_confirmed(e.possible))
            elif e.kind == "possible_cut":
                out.append(self.possible_text(e))
            elif e.kind == "cut-revised":
                what = "RETRACTED" if e.change == "retracted" else f"REVISED ({e.change})"
                line = f"*** FAULT CUT {e.cut_id} {what} at bit MD {self.L(e.bit_md_m)} " \
                       f"{self.sx}: {self.text(e.message)}"
                if e.change != "retracted":
                    line += f"\n    now: {self.cut_text(e.cut)}"
                out.append(line)
            elif e.kind == "forecast":
                out += self.forecast(e.forecast)
                for case in e.cases:
                    out += self.cases(case)
            elif e.kind == "notice":
                print(f"wellfault watch: {self.text(e.message)}", file=sys.stderr, flush=True)
            elif e.kind == "summary":
                out.append(self.summary(e))
        if out:
            print("\n".join(out), flush=True)

    def summary(self, e) -> str:
        s = e.summary
        lines = ["", f"=== end of watch: {s.get('samples', 0)} samples read"]
        if e.state is not None:
            lines.append("    bit: " + self.position(e.state))
        lines.append(f"    {s.get('n_cuts', 0)} fault cut(s) standing, {s.get('revisions', 0)} "
                     f"revision(s), {s.get('retractions', 0)} retraction(s); whole-well check: "
                     f"{s.get('final_check')}")
        for c in e.cuts:
            lines.append("    " + self.cut_text(c))
        lines += self.forecast(e.forecast)
        return "\n".join(lines)


# -------------------------------------------------------------------------------- command
def _survey(path, unit_given, facts):
    from ..evidence.detect import survey_trajectory

    return survey_trajectory(path, depth_unit=unit_given, x_m=facts.x_m, y_m=facts.y_m,
                             ref_elevation_m=facts.ref_elevation_m, name=facts.well_name)


def _mtime(path) -> float | None:
    try:
        return os.stat(path).st_mtime_ns
    except OSError:
        return None


def cmd_watch(args) -> int:
    """Run ``wellfault watch``; returns the exit code (0 when the watch ended normally)."""
    with warnings.catch_warnings():      # a long run: say each warning when it happens
        warnings.simplefilter("always", WellfaultWarning)
        warnings.showwarning = _show_warning
        return _watch(args)


def _show_warning(message, category, filename, lineno, file=None, line=None) -> None:
    if issubclass(category, WellfaultWarning):
        print(f"wellfault: warning: {message}", file=sys.stderr, flush=True)


def _watch(args) -> int:
    from ..evidence.curve_settings import CurveSettings
    from ..evidence.detect import load_column
    from ..geo.dip import BedDip
    from ..geo.geometry import parse_attitude
    from ..io import read_dip_table, read_survey
    from ..live.feed import GrowingFile, LineStream
    from ..evidence.measure import FaultAssumptions
    from ..geo.trajectory import Trajectory
    from ..geo.units import parse_depth_unit
    from ..live.watch import WatchSettings, WellWatcher

    print(CAUTION, file=sys.stderr, flush=True)
    if not args.poll > 0:
        raise InputError(f"--poll must be a positive number of seconds (got {args.poll})")
    unit_given = parse_depth_unit(args.depth_unit) if args.depth_unit else None
    bed = BedDip.parse(args.dip, source="--dip") if args.dip else None
    if args.dip_table:
        t = read_dip_table(args.dip_table, depth_unit=unit_given)
        if "md_m" not in t.columns:
            raise InputError(f"{args.dip_table}: while drilling the dip must be given with depth "
                             "(md_<unit>, dip, dip_azimuth), not per surface (no picks yet)")
        bed = BedDip.from_md_table(t, source=args.dip_table)
    fault = parse_attitude(args.fault, what="fault dip", source="--fault") if args.fault else None
    pitch = None
    if args.pitch:
        from ..geo.slip import parse_pitch

        pitch = parse_pitch(args.pitch, source="--pitch")
    assumptions = FaultAssumptions(fault=fault, pitch=pitch)
    curves = CurveSettings.make(args.curve or ["GR"])
    settings = WatchSettings(min_confidence=float(args.min_confidence))
    column = load_column(column=args.column, type_well=args.type_well,
                         type_tops=args.type_tops, type_survey=args.type_survey, bed_dip=bed,
                         depth_unit=unit_given)
    names = [n for n, _ in curves.curves]
    plan = read_survey(args.plan, depth_unit=unit_given) if args.plan else None
    if args.well == "-":
        feed = LineStream(sys.stdin, curves=names, depth_unit=unit_given)
    else:
        if not os.path.exists(args.well) and args.once:
            raise InputError(f"{args.well}: file not found; check the path")
        feed = GrowingFile(args.well, curves=names, depth_unit=unit_given)

    def poll(final: bool):
        if isinstance(feed, LineStream):
            return feed.poll(wait=args.poll)
        return feed.poll(final=final)

    # the header first: depth unit, well name, location and elevation
    pending = []
    try:
        while True:
            rows = poll(final=args.once)
            for n in rows.notices:
                print(f"wellfault watch: {n}", file=sys.stderr, flush=True)
            if feed.parser.ready:
                pending.append(rows)
                break
            if args.once or getattr(feed, "eof", False):
                raise InputError(f"{args.well}: no usable header (LAS ~A line, or CSV header "
                                 "line) in the input")
            time.sleep(0 if isinstance(feed, LineStream) else args.poll)
    except KeyboardInterrupt:
        print("wellfault watch: stopped before any data arrived", file=sys.stderr)
        return EXIT_OK
    facts = feed.parser
    if args.survey:
        survey = _survey(args.survey, unit_given, facts)
        survey_mtime = _mtime(args.survey)
    else:
        survey = Trajectory.vertical(x0_m=facts.x_m or 0.0, y0_m=facts.y_m or 0.0,
                                     ref_elevation_m=facts.ref_elevation_m)
        survey_mtime = None
    watcher = WellWatcher(column, survey, bed, curves=curves, plan=plan,
                          assumptions=assumptions, settings=settings,
                          well_name=facts.well_name, depth_unit=facts.depth_unit)
    unit = parse_depth_unit(args.output_unit) if args.output_unit else facts.depth_unit
    every = args.print_every * unit.metres if args.print_every else \
        (30 * 0.3048 if unit.suffix == "ft" else 10.0)
    printer = _JsonPrinter(unit, args.decimals) if args.jsonl else \
        _TextPrinter(unit, every, args.decimals)
    path_text = (f"survey to MD {survey.md_max_m / unit.metres:.1f} {unit.suffix}"
                 if args.survey else "vertical (no survey)")
    if plan is not None:
        path_text += f", then the plan to MD {watcher.trajectory.md_max_m / unit.metres:.1f} " \
                     f"{unit.suffix}"
    printer.start(f"wellfault watch: {facts.well_name} ({args.well}, {facts.kind.upper()}, "
                  f"depths in {facts.depth_unit.value}), curves {', '.join(watcher.curves)} "
                  f"against the type log of {args.type_well}; bed dip "
                  f"{printer.text(watcher.bed_dip.describe())}; path: {path_text}")

    def feed_rows(rows):
        events = []
        for n in rows.notices:
            events.append(watcher._notice("feed", n))
        if len(rows):
            events += watcher.feed(rows.md_m, rows.values)
        printer.emit(events)

    idle_since = time.monotonic()
    idle_said = False
    try:
        for rows in pending:
            feed_rows(rows)
        while not args.once and not getattr(feed, "eof", False):
            if args.survey:
                mt = _mtime(args.survey)
                if mt is not None and mt != survey_mtime:
                    survey_mtime = mt
                    try:
                        printer.emit([watcher.set_survey(_survey(args.survey, unit_given,
                                                                 facts))])
                    except WellfaultError as err:
                        print(f"wellfault watch: the updated survey {args.survey} cannot be "
                              f"used ({err}); kept the previous one", file=sys.stderr)
            rows = poll(final=False)
            feed_rows(rows)
            if len(rows):
                idle_since, idle_said = time.monotonic(), False
            else:
                idle = time.monotonic() - idle_since
                if not idle_said and idle >= max(60.0, 12 * args.poll):
                    idle_said = True
                    print(f"wellfault watch: no new data for {idle:.0f} s; still watching "
                          "(Ctrl-C to stop)", file=sys.stderr, flush=True)
                if not isinstance(feed, LineStream):
                    time.sleep(args.poll)
    except KeyboardInterrupt:
        print("wellfault watch: stopped (Ctrl-C)", file=sys.stderr, flush=True)
    try:
        events = watcher.finish(reconcile=not args.no_final_check)
    except KeyboardInterrupt:
        events = watcher.finish(reconcile=False)
    printer.emit(events)
    return EXIT_OK


def main(argv: list[str] | None = None) -> int:
    """Stand-alone entry (``python -m wellfault.cli.watch``): ``wellfault watch ...``."""
    return run_command("watch", add_watch_parser, argv)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
