"""``wellfault screen``: every well of a field, its cuts, the failures and the faults.

Registered in :mod:`wellfault.cli` with :func:`add_screen_parser` (the sub-command) and
:func:`cmd_screen` (its action). Also runnable alone: ``python -m wellfault.cli.screen ...``.

Exit codes: 0 every well ran, 1 some wells failed (they are in ``errors.csv``), 2 bad usage or
bad input (raised as :class:`~wellfault.errors.InputError`; ``wellfault.cli.app.main`` prints it on
one line).
"""

from __future__ import annotations

import argparse
import sys

from ..about import CAUTION
from ..errors import InputError, WellfaultError
from ..geo.precision import add_decimals_option
from ..geo.units import parse_depth_unit
from .runner import run_command, where

__all__ = ["add_screen_parser", "cmd_screen", "main"]

EXIT_OK, EXIT_SOME_FAILED, EXIT_BAD_INPUT = 0, 1, 2


def add_screen_parser(subparsers) -> argparse.ArgumentParser:
    """Add the ``screen`` sub-command to ``subparsers`` (from ``add_subparsers``)."""
    p = subparsers.add_parser(
        "screen", help="screen every well of a field and assemble the cuts into faults",
        description="Screen every well listed in a manifest for fault cuts (tops evidence "
                    "against the thickness predicted from neighbouring wells, or against the "
                    "reference column), group the cuts into faults with fitted planes, and "
                    "write cuts, errors, wells, faults and fault_profiles tables into --out. "
                    "A failing well is recorded in errors and never stops the rest. " + CAUTION)
    p.add_argument("manifest", metavar="MANIFEST.csv",
                   help="one row per well: well, las, survey, tops (paths relative to the "
                        "manifest), x_m, y_m, elevation_m, optional dip (8/070 or a dip "
                        "table) and depth_unit")
    p.add_argument("--column", metavar="COLUMN.csv",
                   help="reference column: surface, thickness_<unit> [, unconformity]")
    p.add_argument("--type-well", metavar="TYPE.las",
                   help="type well: each well's curves are also aligned to its type log "
                        "(curve evidence beside the tops)")
    p.add_argument("--type-tops", metavar="TYPE_TOPS.csv", help="the type well's tops")
    p.add_argument("--curve", action="append", metavar="NAME[:WEIGHT]",
                   help="curve to align, repeatable with weights (default GR; needs "
                        "--type-well)")
    p.add_argument("--max-separation", type=float, metavar="LENGTH",
                   help="largest plausible fault separation (TST, in --depth-unit, metres "
                        "without it) for the curve alignment; larger jumps need overwhelming "
                        "evidence (confidence >= 0.9) and are flagged (default: from the type log and each "
                        "well's tops, then from the field's own cuts in a second reading)")
    p.add_argument("--dip", metavar="DIP/AZI",
                   help="bed dip for wells without their own in the manifest, e.g. 12/075")
    p.add_argument("--out", metavar="DIR", required=True,
                   help="folder for cuts, errors, wells, faults and fault_profiles tables "
                        "(created if needed) and the per-well checkpoint (.wells/)")
    p.add_argument("--format", choices=["csv", "parquet"], default="csv",
                   help="table format (default csv)")
    p.add_argument("--workers", type=int, metavar="N",
                   help="worker processes (default: all cores; 1 runs in this process)")
    p.add_argument("--scheduler", metavar="ADDRESS",
                   help="run on this Dask scheduler (e.g. tcp://10.0.0.5:8786) instead of a "
                        "local process pool")
    p.add_argument("--resume", action="store_true",
                   help="skip the wells already finished in --out (after an interruption)")
    p.add_argument("--output-unit", choices=["m", "ft"],
                   help="length unit of the tables, the summary and the report (default: the "
                        "wells' unit when their LAS files share one, else m; a field in mixed "
                        "units says so)")
    add_decimals_option(p)
    p.add_argument("--depth-unit", choices=["m", "ft", "usft"],
                   help="depth unit of files that state none (the manifest's depth_unit "
                        "column wins for its well)")
    p.add_argument("--no-neighbours", action="store_true",
                   help="compare with the reference column only (one pass), not with the "
                        "thickness predicted from neighbouring wells")
    p.add_argument("--tolerance", type=float, default=0.15, metavar="FRACTION",
                   help="relative thickness tolerance against the column (default 0.15)")
    p.add_argument("--tolerance-floor", type=float, default=2.0, metavar="METRES",
                   help="absolute thickness tolerance floor in metres (default 2)")
    p.add_argument("--no-faults", action="store_true",
                   help="do not group the cuts into faults")
    p.add_argument("--no-progress", action="store_true", help="no progress bar")
    p.add_argument("--report", metavar="FIELD.html",
                   help="also write a self-contained HTML report of the field: map of cuts and "
                        "fitted fault traces, separation along strike, the cut, well and error "
                        "tables")
    p.set_defaults(func=cmd_screen)
    return p


def cmd_screen(args) -> int:
    """Run ``wellfault screen``; returns the exit code (0 all ran, 1 some failed)."""
    from ..field.screen import screen_wells
    from ..evidence.topcuts import TopsTolerance

    if args.column is None:
        raise InputError("no reference column: give --column COLUMN.csv")
    if args.workers is not None and args.workers < 1:
        raise InputError(f"--workers must be at least 1 (got {args.workers})")
    client = None
    if args.scheduler:
        try:
            from distributed import Client
        except ImportError:
            raise InputError("--scheduler needs dask.distributed; install it (pip install "
                             "'wellfault[cluster]') or run without --scheduler") from None
        try:
            client = Client(args.scheduler, timeout="20s")
        except (OSError, TimeoutError) as err:
            raise InputError(f"cannot reach the Dask scheduler at {args.scheduler!r} ({err}); "
                             "check the address, or run without --scheduler") from None
    try:
        result = screen_wells(
            args.manifest, args.column, bed_dip=args.dip,
            tolerance=TopsTolerance(args.tolerance, args.tolerance_floor),
            type_well=args.type_well, type_tops=args.type_tops, curves=args.curve,
            max_separation_m=None if args.max_separation is None else
            args.max_separation * parse_depth_unit(args.depth_unit or "m").metres,
            neighbours=not args.no_neighbours, fit=not args.no_faults,
            depth_unit=args.depth_unit, unit=args.output_unit, workers=args.workers,
            client=client, progress=not args.no_progress, out_dir=args.out,
            fmt=args.format, resume=args.resume, decimals=args.decimals)
    finally:
        if client is not None:
            client.close()
    print(result.summary(), file=sys.stderr)
    print(f"tables written to {args.out}: " + ", ".join(
        f"{n}.{args.format}" for n in ("cuts", "errors", "wells", "faults", "fault_profiles")),
        file=sys.stderr)
    if args.report:
        print(f"report written to {where(_write_report(args, result))}", file=sys.stderr)
    print(CAUTION, file=sys.stderr)
    return EXIT_SOME_FAILED if result.n_failed else EXIT_OK


#: Deviated well paths are drawn on the report's map for fields up to this many wells (each
#: survey is read again); larger fields show well locations only.
REPORT_MAX_PATHS = 2000


def _write_report(args, result):
    """The field report of a screening run (``--report``)."""
    from pathlib import Path

    from ..io import read_manifest, read_survey
    from ..viz.report import write_field_report
    from ..evidence.topcuts import TopsTolerance
    from ..geo.trajectory import Trajectory

    manifest = read_manifest(args.manifest)
    wells = manifest.copy()
    for c in ("x_m", "y_m"):
        if c not in wells.columns:
            wells[c] = float("nan")
    status = result.wells.set_index("well")["status"] if len(result.wells) else None
    paths = {}
    if "survey" in manifest.columns and len(manifest) <= REPORT_MAX_PATHS:
        for row in manifest.itertuples(index=False):
            if not row.survey or (status is not None and status.get(row.well) == "failed"):
                continue
            try:
                paths[row.well] = Trajectory.from_survey(
                    read_survey(row.survey), x0_m=float(row.x_m), y0_m=float(row.y_m))
            except (WellfaultError, OSError, ValueError, AttributeError):
                continue      # the well's own error is in the error table already
    faults = result.faults
    if len(faults) and "kind" in faults.columns:
        faults = faults[faults["kind"] == "fault"]
    name = Path(args.manifest).resolve().parent.name or Path(args.manifest).stem
    return write_field_report(
        args.report, cuts=result.cuts, errors=result.errors, wells=wells, faults=faults,
        paths=paths, tolerance=TopsTolerance(args.tolerance, args.tolerance_floor),
        progress=not args.no_progress, unit=result.info.get("unit"),
        unit_note=result.info.get("unit_note"), decimals=args.decimals,
        title=f"Fault cuts screened in {len(manifest)} wells of {name}")


def main(argv: list[str] | None = None) -> int:
    """Stand-alone entry (``python -m wellfault.cli.screen``): ``wellfault screen ...``."""
    return run_command("screen", add_screen_parser, argv)


if __name__ == "__main__":  # pragma: no cover
    sys.exit(main())
