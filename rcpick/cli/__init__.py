"""The ``rcpick`` command line: one module per command, this one ties them together."""

from __future__ import annotations

import typer

from rcpick import __version__
from rcpick.cli import configcmd, find, net, spreadcmd, values

CAUTION = (
    "Estimates only: verify every timing on real hardware before relying on it. "
    "Where timing matters to safety (reset, discharge of stored charge, hazardous "
    "voltage), follow the standard in force, local codes and licensed practice."
)

app = typer.Typer(
    name="rcpick",
    help=(
        "Pick standard resistor and capacitor values (IEC 60063 E-series) for an RC timing: "
        "a time constant, a corner frequency, or a delay to a threshold.\n\n" + CAUTION
    ),
    no_args_is_help=True,
    add_completion=False,
    rich_markup_mode="rich",
    pretty_exceptions_show_locals=False,
    context_settings={"help_option_names": ["-h", "--help"]},
)


def _version(show: bool) -> None:
    if show:
        typer.echo(f"rcpick {__version__}")
        raise typer.Exit()


@app.callback()
def _root(
    version: bool = typer.Option(False, "--version", callback=_version, is_eager=True, help="Print the version and exit."),
) -> None:
    """Pick standard R and C values for an RC timing."""


app.command("find", epilog=find.EPILOG)(find.command)
app.command("spread", epilog=spreadcmd.EPILOG)(spreadcmd.command)
app.command("values", epilog=values.EPILOG)(values.command)
app.command("net", epilog=net.EPILOG)(net.command)
app.command("config", epilog=configcmd.EPILOG)(configcmd.command)


def main() -> None:
    """Entry point of the ``rcpick`` console script."""
    app()
