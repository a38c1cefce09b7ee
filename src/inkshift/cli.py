"""The ``inkshift`` command line: thin typer commands over the library.

Every command parses its options, calls the library and prints what the
library returned. Errors raised on purpose (:class:`inkshift.errors.InkshiftError`)
are printed as one line on standard error with exit status 2.
"""

from __future__ import annotations

import sys

import typer

from inkshift import __version__
from inkshift.errors import InkshiftError

app = typer.Typer(
    name="inkshift",
    help="Check how a chart drawn on an RGB screen will come out in print.",
    no_args_is_help=True,
    pretty_exceptions_enable=False,
    add_completion=False,
)
profiles_app = typer.Typer(
    help="Inspect, list and build ICC output profiles.",
    no_args_is_help=True,
    pretty_exceptions_enable=False,
)
app.add_typer(profiles_app, name="profiles")


def _print_version(value: bool) -> None:
    if value:
        typer.echo(f"inkshift {__version__}")
        raise typer.Exit()


@app.callback()
def _root(
    version: bool = typer.Option(
        False, "--version", callback=_print_version, is_eager=True, help="Print the version and exit."
    ),
) -> None:
    """Check how a chart drawn on an RGB screen will come out in print."""


# Command modules register themselves on the apps above when imported.
from inkshift.commands import profiles_show  # noqa: E402,F401
from inkshift.commands import profiles_build  # noqa: E402,F401
from inkshift.commands import check  # noqa: E402,F401
from inkshift.commands import compare  # noqa: E402,F401
from inkshift.commands import ramp  # noqa: E402,F401
from inkshift.commands import swatches  # noqa: E402,F401
from inkshift.commands import replace  # noqa: E402,F401


def main() -> None:
    """Console entry point: run the app, turning project errors into exit 2."""
    try:
        app(standalone_mode=True)
    except InkshiftError as exc:
        typer.echo(f"inkshift: error: {exc}", err=True)
        sys.exit(2)
