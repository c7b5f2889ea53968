"""The ``wellfault`` command: one module per subcommand, the shared runner in
:mod:`wellfault.cli.runner` (the commands import it, never the reverse), the parser that joins
them in :mod:`wellfault.cli.app`. ``python -m wellfault.cli`` is the ``wellfault`` command.

The entry points below import the commands only when called, so that ``python -m
wellfault.cli.<command>`` runs one command module as ``__main__`` without importing it first.
"""


def main(*args, **kwargs):
    """:func:`wellfault.cli.app.main` (imported when called)."""
    from .app import main as _main

    return _main(*args, **kwargs)


def console(*args, **kwargs):
    """:func:`wellfault.cli.app.console` (imported when called)."""
    from .app import console as _console

    return _console(*args, **kwargs)
