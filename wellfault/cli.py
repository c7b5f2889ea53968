"""The ``wellfault`` command.

Data goes to stdout (or ``--out``), diagnostics and the caution to stderr. Exit codes: 0 success,
1 some wells failed (screening), 2 bad usage or bad input (one line, no traceback).
"""

from __future__ import annotations

import argparse
import sys
import warnings
from pathlib import Path

from . import CAUTION, __version__
from .cli_screen import add_screen_parser
from .cli_watch import add_watch_parser
from .errors import WellfaultError, WellfaultWarning

__all__ = ["main"]

EXIT_OK, EXIT_SOME_FAILED, EXIT_BAD_INPUT = 0, 1, 2


class _ArgumentParser(argparse.ArgumentParser):
    def error(self, message):  # exit 2 with a one-line message, like every bad input
        raise _UsageError(f"wellfault: error: {message}; see {self.prog} --help")


class _UsageError(Exception):
    pass


def _add_detect(sub):
    p = sub.add_parser(
        "detect", help="find, classify and measure the fault cuts in one well",
        description="Find the fault cuts in one well by comparing its tops (and, with a type "
                    "well, its log curves) with the reference column. The cut table goes to "
                    "--out or stdout as CSV; a summary and the caution go to stderr.")
    p.add_argument("las", metavar="WELL.las", help="the well's LAS file")
    p.add_argument("--column", metavar="COLUMN.csv",
                   help="reference column: surface, thickness_<unit> [, unconformity]")
    p.add_argument("--tops", metavar="TOPS.csv", help="the well's picks: [well,] surface, md_<unit>")
    p.add_argument("--survey", metavar="SURVEY.csv",
                   help="deviation survey: md, inc, azi (vertical well when omitted)")
    g = p.add_mutually_exclusive_group()
    g.add_argument("--dip", metavar="DIP/AZI", help="one bed dip for the well, e.g. 12/075")
    g.add_argument("--dip-table", metavar="DIPS.csv",
                   help="bed dip per surface (surface, dip, dip_azimuth) or with depth "
                        "(md_<unit>, dip, dip_azimuth)")
    p.add_argument("--fault", metavar="DIP/AZI",
                   help="fault attitude, e.g. 60/090; without it the crossing is assumed "
                        "hanging wall -> footwall and a typical fault dip is used")
    p.add_argument("--pitch", metavar="PITCH/FROM",
                   help="slickenline pitch and the strike-line end it is measured from, "
                        "e.g. 50/200 (needs --fault)")
    p.add_argument("--type-well", metavar="TYPE.las",
                   help="the field's type well: its curves become the type log the well's "
                        "curves are aligned to")
    p.add_argument("--type-tops", metavar="TYPE_TOPS.csv", help="the type well's tops")
    p.add_argument("--type-survey", metavar="SURVEY.csv",
                   help="the type well's survey (vertical when omitted)")
    p.add_argument("--curve", action="append", metavar="NAME[:WEIGHT]",
                   help="curve to align (repeatable, optional weight, e.g. --curve GR:2 "
                        "--curve RHOB); default: every curve family (gamma ray, resistivity, "
                        "density, neutron, sonic) the well and the type well share, each "
                        "weighted by the type log's character in it")
    p.add_argument("--depth-unit", choices=["m", "ft", "usft"],
                   help="depth unit of input files that do not state one")
    p.add_argument("--output-unit", choices=["m", "ft"],
                   help="length unit of the cut table (default: the LAS file's unit)")
    p.add_argument("--tolerance", type=float, default=0.15, metavar="FRACTION",
                   help="relative thickness tolerance for tops (default 0.15)")
    p.add_argument("--tolerance-floor", type=float, default=2.0, metavar="METRES",
                   help="absolute thickness tolerance floor in metres (default 2)")
    p.add_argument("--out", metavar="CUTS.csv", help="write the cut table here (default stdout)")
    p.add_argument("--report", metavar="REPORT.html",
                   help="also write a self-contained HTML report of the well (cut table, "
                        "figures, assumptions, caution)")
    p.set_defaults(func=_cmd_detect)


def _add_survey(sub):
    p = sub.add_parser(
        "survey", help="minimum-curvature positions of a deviation survey",
        description="Compute TVD, north, east and dogleg severity for every station of a "
                    "deviation survey by minimum curvature, written as CSV to stdout.")
    p.add_argument("survey", metavar="SURVEY.csv", help="md, inc, azi table")
    p.add_argument("--depth-unit", choices=["m", "ft", "usft"],
                   help="unit of the MD column when its name does not state it")
    p.add_argument("--output-unit", choices=["m", "ft"],
                   help="unit of the output (default: the survey's unit)")
    p.set_defaults(func=_cmd_survey)


def _add_demo(sub):
    p = sub.add_parser(
        "demo", help="run detection on the built-in invented field",
        description="Run fault-cut detection on every well of the invented demo field and "
                    "print the cuts found beside the field's true cuts.")
    p.add_argument("--field", metavar="DIR",
                   help="folder of the demo field (default: ./synthetic_wells if present, "
                        "else generated afresh in a temporary folder)")
    p.set_defaults(func=_cmd_demo)


def build_parser() -> argparse.ArgumentParser:
    parser = _ArgumentParser(
        prog="wellfault",
        description="Find, classify and measure fault cuts in wells against a reference "
                    "column. " + CAUTION)
    parser.add_argument("--version", action="version", version=f"wellfault {__version__}")
    sub = parser.add_subparsers(dest="command", metavar="COMMAND", parser_class=_ArgumentParser)
    _add_demo(sub)
    _add_detect(sub)
    add_screen_parser(sub)
    add_watch_parser(sub)
    _add_survey(sub)
    return parser


def _write_csv(df, out):
    if out:
        from .io import write_table

        write_table(df, out)
    else:
        df.to_csv(sys.stdout, index=False, float_format="%.3f")


def _cmd_survey(args) -> int:
    from .io import read_survey
    from .trajectory import Trajectory
    from .units import parse_depth_unit

    given = parse_depth_unit(args.depth_unit) if args.depth_unit else None
    df = read_survey(args.survey, depth_unit=given)
    traj = Trajectory.from_survey(df, source=args.survey)
    unit = parse_depth_unit(args.output_unit) if args.output_unit else \
        parse_depth_unit(df.attrs.get("depth_unit", given or "m"))
    _write_csv(traj.survey_table(unit), None)
    return EXIT_OK


def _summarise(df, unit_suffix: str) -> str:
    if len(df) == 0:
        return "no fault cut found"
    lines = [f"{len(df)} fault cut(s):"]
    for r in df.itertuples(index=False):
        d = r._asdict()
        lines.append(
            f"  {d['well']}: {d['section']} section at MD {d['md_' + unit_suffix]:.1f} "
            f"[{d['md_top_' + unit_suffix]:.1f}-{d['md_base_' + unit_suffix]:.1f}] "
            f"{unit_suffix}, {d['tst_' + unit_suffix]:.1f} {unit_suffix} TST, "
            f"VS {d['vertical_separation_' + unit_suffix]:.1f} {unit_suffix}, "
            f"{d['fault_type']} fault ({d['crossing']}), between {d['surface_above']} and "
            f"{d['surface_below']}, confidence {d['confidence']:.2f}")
    return "\n".join(lines)


def _cmd_detect(args) -> int:
    from .detect import detect_files
    from .topcuts import TopsTolerance

    result = detect_files(
        args.las, column=args.column, tops=args.tops, survey=args.survey, dip=args.dip,
        dip_table=args.dip_table, fault=args.fault, pitch=args.pitch,
        type_well=args.type_well, type_tops=args.type_tops, type_survey=args.type_survey,
        curves=args.curve, depth_unit=args.depth_unit, output_unit=args.output_unit,
        tolerance=TopsTolerance(args.tolerance, args.tolerance_floor))
    df = result.cuts
    weak = [n for n in result.notes if n.startswith("curve evidence weak")]
    _write_csv(df, args.out)
    if args.report:
        from .report import write_well_report

        write_well_report(args.report, well=result.well, column=result.column, cuts_df=df,
                          trajectory=result.trajectory, bed_dip=result.bed_dip,
                          tops=result.tops, track=result.track, tolerance=result.tolerance,
                          assumptions={"curve evidence": "; ".join(weak) +
                                       " (the type log cannot tell positions apart there)"}
                          if weak else None)
        print(f"report written to {args.report}", file=sys.stderr)
    suffix = "ft" if any(c.endswith("_ft") for c in df.columns) else "m"
    print(_summarise(df, suffix), file=sys.stderr)
    for note in weak:
        print(f"  {result.well.name}: {note}", file=sys.stderr)
    print(CAUTION, file=sys.stderr)
    return EXIT_OK


def _cmd_demo(args) -> int:
    from .demo import run_demo

    field = Path(args.field) if args.field else None
    print(run_demo(field), file=sys.stdout)
    print(CAUTION, file=sys.stderr)
    return EXIT_OK


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    parser = build_parser()
    try:
        args = parser.parse_args(argv)
        if not getattr(args, "func", None):
            parser.print_help(sys.stderr)
            return EXIT_BAD_INPUT
        with warnings.catch_warnings(record=True) as caught:
            warnings.simplefilter("always", WellfaultWarning)
            try:
                return args.func(args)
            finally:  # what was noticed before a failure helps to explain it: print it too
                for w in caught:
                    if issubclass(w.category, WellfaultWarning):
                        print(f"wellfault: warning: {w.message}", file=sys.stderr)
    except _UsageError as err:
        print(str(err), file=sys.stderr)
        return EXIT_BAD_INPUT
    except WellfaultError as err:
        print(f"wellfault: error: {err}", file=sys.stderr)
        return EXIT_BAD_INPUT
    except FileNotFoundError as err:
        print(f"wellfault: error: file not found: {err.filename}; check the path",
              file=sys.stderr)
        return EXIT_BAD_INPUT
    except KeyboardInterrupt:
        print("wellfault: interrupted", file=sys.stderr)
        return 130


def main_for(command: str, argv: list[str] | None = None) -> int:
    """Run one subcommand (its name may be left out of ``argv``); returns the exit code."""
    argv = list(sys.argv[1:] if argv is None else argv)
    if not argv or argv[0] != command:
        argv = [command, *argv]
    try:
        return main(argv)
    except SystemExit as exc:  # --help and --version
        return int(exc.code or 0)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
