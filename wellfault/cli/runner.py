"""What every command shares: the parser class, exit codes, the run loop that turns errors and
warnings into one line each, and the table printer."""

from __future__ import annotations

import argparse
import sys
import warnings

from ..errors import WellfaultError, WellfaultWarning
from ..geo.precision import (
    Decimals,
)

EXIT_OK, EXIT_SOME_FAILED, EXIT_BAD_INPUT = 0, 1, 2


class _ArgumentParser(argparse.ArgumentParser):
    def error(self, message):  # exit 2 with a one-line message, like every bad input
        raise _UsageError(f"wellfault: error: {message}; see {self.prog} --help")


class _UsageError(Exception):
    pass


def _write_csv(df, out, decimals: Decimals):
    """The table to ``out`` (or stdout), at the precision its numbers carry."""
    if out and out != "-":
        from ..io import write_table

        write_table(df, out, decimals=decimals)
    else:
        from ..geo.precision import table_text

        sys.stdout.write(table_text(df, decimals))


def where(path) -> str:
    """How a command names an output it wrote: its path, or "standard output"."""
    from ..io.outputs import is_stream

    return "standard output" if is_stream(path) else str(path)


def run(parser: argparse.ArgumentParser, argv: list[str] | None = None) -> int:
    """Parse ``argv`` with ``parser`` and run the chosen command; returns the exit code."""
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


def run_command(command: str, add_parser, argv: list[str] | None = None) -> int:
    """Run one subcommand on its own (``python -m wellfault.cli.<command>``); returns the exit
    code. ``add_parser`` adds the command's parser; its name may be left out of ``argv``."""
    parser = _ArgumentParser(prog="wellfault")
    add_parser(parser.add_subparsers(dest="command", metavar="COMMAND",
                                     parser_class=_ArgumentParser))
    argv = list(sys.argv[1:] if argv is None else argv)
    if not argv or argv[0] != command:
        argv = [command, *argv]
    try:
        return run(parser, argv)
    except SystemExit as exc:  # --help
        return int(exc.code or 0)
