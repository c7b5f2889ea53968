"""The ``wellfault`` command: one parser with every subcommand."""

from __future__ import annotations

import argparse
import gc
import sys

from ..about import CAUTION, __version__
from .demo import _add_demo
from .detect import _add_detect
from .runner import _ArgumentParser, run
from .screen import add_screen_parser
from .survey import _add_survey
from .watch import add_watch_parser

__all__ = ["main", "console"]


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


def main(argv: list[str] | None = None) -> int:
    """Run the command line; returns the exit code."""
    return run(build_parser(), argv)


def main_for(command: str, argv: list[str] | None = None) -> int:
    """Run one subcommand (its name may be left out of ``argv``); returns the exit code."""
    argv = list(sys.argv[1:] if argv is None else argv)
    if not argv or argv[0] != command:
        argv = [command, *argv]
    try:
        return main(argv)
    except SystemExit as exc:  # --help and --version
        return int(exc.code or 0)


def console() -> None:
    """The installed ``wellfault`` command: :func:`main`, then exit.

    Before the interpreter shuts down, the objects still alive are frozen out of the garbage
    collector (``gc.freeze``): the collections run at shutdown would otherwise walk all of
    pandas' and numba's objects once more, about a third of a second of a command that takes
    one and a half. Nothing is lost: the process ends, standard streams are flushed as usual,
    and every file the command writes is closed before :func:`main` returns.
    """
    code = main()
    gc.freeze()
    sys.exit(code)


if __name__ == "__main__":  # pragma: no cover
    console()
