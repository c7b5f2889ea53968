"""``wellfault survey``: a deviation survey by minimum curvature."""

from __future__ import annotations

from ..geo.precision import add_decimals_option
from .runner import EXIT_OK, _write_csv


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
    add_decimals_option(p)
    p.set_defaults(func=_cmd_survey)


def _cmd_survey(args) -> int:
    from ..geo.trajectory import Trajectory
    from ..geo.units import parse_depth_unit
    from ..io import read_survey

    given = parse_depth_unit(args.depth_unit) if args.depth_unit else None
    df = read_survey(args.survey, depth_unit=given)
    traj = Trajectory.from_survey(df, source=args.survey)
    unit = parse_depth_unit(args.output_unit) if args.output_unit else \
        parse_depth_unit(df.attrs.get("depth_unit", given or "m"))
    _write_csv(traj.survey_table(unit), None, args.decimals)
    return EXIT_OK
