"""``wellfault detect``: one well's fault cuts."""

from __future__ import annotations

import sys

from ..about import CAUTION
from ..geo.precision import (
    DEFAULT_DECIMALS,
    Decimals,
    add_decimals_option,
    lengths_in_text,
)
from .runner import EXIT_OK, _UsageError, _write_csv, where


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
    add_separation_option(p)
    p.add_argument("--pick-tolerance", type=float, metavar="LENGTH",
                   help="with --tops and a type well, each pick anchors the curve alignment "
                        "within this much section (TST, input depth unit; default 2 m); a "
                        "pick the curves cannot honour is noted as a possible mis-pick")
    p.add_argument("--depth-unit", choices=["m", "ft", "usft"],
                   help="depth unit of input files that do not state one")
    p.add_argument("--output-unit", choices=["m", "ft"],
                   help="length unit of the cut table, the summary and the report (default: "
                        "the LAS file's unit)")
    add_decimals_option(p)
    p.add_argument("--tolerance", type=float, default=0.15, metavar="FRACTION",
                   help="relative thickness tolerance for tops (default 0.15)")
    p.add_argument("--tolerance-floor", type=float, default=2.0, metavar="METRES",
                   help="absolute thickness tolerance floor in metres (default 2)")
    p.add_argument("--out", metavar="CUTS.csv",
                   help="write the cut table here (default or -: stdout)")
    p.add_argument("--report", metavar="REPORT.html",
                   help="also write a self-contained HTML report of the well (cut table, "
                        "figures, assumptions, caution); - writes it to stdout")
    p.set_defaults(func=_cmd_detect)


def add_separation_option(p) -> None:
    """The ``--max-separation`` option of the commands that align curves."""
    p.add_argument("--max-separation", type=float, metavar="LENGTH",
                   help="largest plausible fault separation (TST, input depth unit): a larger "
                        "jump of the curve alignment needs overwhelming evidence (reported "
                        "at confidence >= 0.9, flagged in its row; else listed as a withheld "
                        "candidate) (default: from the type log's thickness and the tops)")


def _summarise(df, unit_suffix: str, decimals: Decimals = DEFAULT_DECIMALS) -> str:
    """One line per cut, lengths in the table's unit at the table's precision."""
    from ..geo.precision import column_decimals

    if len(df) == 0:
        return "no fault cut found"

    def v(d, stem):
        name = f"{stem}_{unit_suffix}"
        nd = column_decimals(name, decimals)
        x = float(d[name])
        return str(x) if nd is None else f"{x:.{nd}f}"

    nc = column_decimals("confidence", decimals)
    lines = [f"{len(df)} fault cut(s), lengths in {unit_suffix}:"]
    for r in df.itertuples(index=False):
        d = r._asdict()
        conf = float(d["confidence"])
        lines.append(
            f"  {d['well']}: {d['section']} section at MD {v(d, 'md')} "
            f"[{v(d, 'md_top')}-{v(d, 'md_base')}] {unit_suffix}, {v(d, 'tst')} {unit_suffix} "
            f"TST, VS {v(d, 'vertical_separation')} {unit_suffix}, {d['fault_type']} fault "
            f"({d['crossing']}), between {d['surface_above']} and {d['surface_below']}, "
            f"confidence {conf if nc is None else f'{conf:.{nc}f}'}")
    return "\n".join(lines)


def _cmd_detect(args) -> int:
    from ..evidence.detect import detect_files
    from ..evidence.topcuts import TopsTolerance
    from ..io.outputs import is_stream

    if args.report and is_stream(args.report) and (not args.out or is_stream(args.out)):
        raise _UsageError("wellfault detect: error: --report " + args.report + " and the cut "
                          "table would both go to standard output; give --out CUTS.csv (or "
                          "--out /dev/null)")

    result = detect_files(
        args.las, column=args.column, tops=args.tops, survey=args.survey, dip=args.dip,
        dip_table=args.dip_table, fault=args.fault, pitch=args.pitch,
        type_well=args.type_well, type_tops=args.type_tops, type_survey=args.type_survey,
        curves=args.curve, depth_unit=args.depth_unit, output_unit=args.output_unit,
        tolerance=TopsTolerance(args.tolerance, args.tolerance_floor),
        max_separation=args.max_separation, pick_tolerance=args.pick_tolerance)
    df = result.cuts
    _write_csv(df, args.out, args.decimals)
    suffix = "ft" if any(c.endswith("_ft") for c in df.columns) else "m"
    weak = [lengths_in_text(n, suffix, args.decimals) for n in result.notes
            if n.startswith("curve evidence weak")]
    if args.report:
        from ..viz.report import write_well_report

        write_well_report(args.report, well=result.well, column=result.column, cuts_df=df,
                          trajectory=result.trajectory, bed_dip=result.bed_dip,
                          tops=result.tops, track=result.track, tolerance=result.tolerance,
                          unit=suffix, decimals=args.decimals,
                          assumptions={"curve evidence": "; ".join(weak) +
                                       " (the type log cannot tell positions apart there)"}
                          if weak else None)
        print(f"report written to {where(args.report)}", file=sys.stderr)
    print(_summarise(df, suffix, args.decimals), file=sys.stderr)
    for note in weak:
        print(f"  {result.well.name}: {note}", file=sys.stderr)
    if result.withheld:
        print(f"{len(result.withheld)} weak candidate cut(s) not reported (not in the table):",
              file=sys.stderr)
        for note in result.notes:
            if note.startswith("candidate cut withheld"):
                print(f"  {result.well.name}: "
                      f"{lengths_in_text(note, suffix, args.decimals)}", file=sys.stderr)
    print(CAUTION, file=sys.stderr)
    return EXIT_OK
