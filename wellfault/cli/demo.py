"""``wellfault demo``: the invented field, end to end."""

from __future__ import annotations

import sys
from pathlib import Path

from ..about import CAUTION
from .runner import EXIT_OK


def _add_demo(sub):
    p = sub.add_parser(
        "demo", help="run detection on the built-in invented field",
        description="Run fault-cut detection on every well of the invented demo field and "
                    "print the cuts found beside the field's true cuts.")
    p.add_argument("--field", metavar="DIR",
                   help="folder of the demo field (default: ./synthetic_wells if present, "
                        "else generated afresh in a temporary folder)")
    p.add_argument("--output-unit", choices=["m", "ft"], default="m",
                   help="length unit of the printed table (default m; the field's wells "
                        "are logged in metres and in feet)")
    p.set_defaults(func=_cmd_demo)


def _cmd_demo(args) -> int:
    from ..synth.demo import run_demo

    field = Path(args.field) if args.field else None
    print(run_demo(field, unit=args.output_unit), file=sys.stdout)
    print(CAUTION, file=sys.stderr)
    return EXIT_OK
