"""The ``rcpick`` command line: one module per command, loaded only when that command runs.

``rcpick --help`` lists the commands from the short summaries below without
importing them, so it starts without numpy; ``rcpick find`` imports only what
``find`` needs. Every usage error, the option parser's included, is printed as
one line in rcpick's form and exits with code 2.
"""

from __future__ import annotations

import importlib
import re
import sys
import warnings
from typing import Any

import typer
from typer.core import TyperCommand, TyperGroup

from rcpick import __version__
from rcpick.cli import options

CAUTION = (
    "Estimates only: verify every timing on real hardware before relying on it. "
    "Where timing matters to safety (reset, discharge of stored charge, hazardous "
    "voltage), follow the standard in force, local codes and licensed practice."
)

#: command → (module, one-line summary shown by rcpick --help)
COMMANDS = {
    "find": (
        "rcpick.cli.find",
        "Find the standard R and C values (single parts or pairs) that best hit a timing target.",
    ),
    "spread": ("rcpick.cli.spread", "Analyse one design: worst case, Monte Carlo spread, yield, contributions."),
    "board": (
        "rcpick.cli.board",
        "Pick one design per timing of a whole board, jointly, so the timings share part values.",
    ),
    "net": ("rcpick.cli.net", "Order, natural time constants and step response of an RC network from a netlist."),
    "values": ("rcpick.cli.values", "List the values of an IEC 60063 E-series, or the neighbours of one value."),
    "config": ("rcpick.cli.config", "Show every effective setting of find and spread, and where it came from."),
}


def _one_line(message: str) -> str:
    return " ".join(str(message).split())


class LazyGroup(TyperGroup):
    """A group whose commands are imported on first use; usage errors printed as one line."""

    _resolving = False

    def list_commands(self, ctx) -> list[str]:
        return list(COMMANDS)

    def get_help_option(self, ctx):
        option = super().get_help_option(ctx)
        if option is not None:
            option.metavar = ""  # a switch: no type placeholder in the help
            options.plain_coercion(type("Holder", (), {"params": [option]}))
        return option

    def get_command(self, ctx, cmd_name: str):
        if cmd_name not in COMMANDS:
            return None
        module_name, summary = COMMANDS[cmd_name]
        if not self._resolving:  # listing for --help: a light stand-in with the summary
            return TyperCommand(name=cmd_name, help=summary, short_help=summary)
        module = importlib.import_module(module_name)
        return options.plain_coercion(typer.main.get_command(module.app))

    def resolve_command(self, ctx, args):
        self._resolving = True
        try:
            return super().resolve_command(ctx, args)
        finally:
            self._resolving = False

    def main(self, args=None, prog_name=None, complete_var=None, standalone_mode=True, **extra: Any):  # type: ignore[override]
        argv = list(sys.argv[1:] if args is None else args)
        options.TYPED[:] = argv
        options.plain_coercion(self)
        code: Any = 0
        with warnings.catch_warnings():
            # no library's warning reaches the user: rcpick says what matters in its own words
            warnings.simplefilter("ignore")
            try:
                result = super().main(
                    args=argv,
                    prog_name=prog_name or "rcpick",
                    complete_var=complete_var,
                    standalone_mode=False,
                    **extra,
                )
                code = result if isinstance(result, int) else 0
            except typer.Exit as stop:
                code = stop.exit_code
            except typer.Abort:
                typer.echo("rcpick: stopped", err=True)
                code = 1
            except Exception as error:  # the option parser's own usage errors: one line, exit 2
                if getattr(error, "exit_code", None) != 2 or not hasattr(error, "format_message"):
                    raise
                typer.echo(f"rcpick: error: {_usage_text(error)}", err=True)
                code = 2
        if standalone_mode:
            sys.exit(code)
        return code


_REWORDED = [
    (re.compile(r"No such option: (\S+)"), "{0}: no such option{hint}"),
    (re.compile(r"Option '(\S+)' requires an argument"), "{0}: needs a value{hint}"),
    (re.compile(r"Option '(\S+)' does not take a value"), "{0}: is a switch and takes no value{hint}"),
    (re.compile(r"No such command '(\S+)'"), "{0!r} is not a command; the commands are " + ", ".join(COMMANDS)),
    (re.compile(r"Got unexpected extra argument(?:s|\(s\))? \((.*)\)"), "unexpected argument(s) {0!r}{hint}"),
    (re.compile(r"Missing argument '(\S+)'"), "{0}: required{hint}"),
    (re.compile(r"Missing option '(\S+)'"), "{0}: required{hint}"),
]


def _usage_text(error: Any) -> str:
    """The option parser's usage error in rcpick's own words, on one line."""
    message = _one_line(error.format_message())
    typed = options.TYPED
    path = f"rcpick {typed[0]}" if typed and typed[0] in COMMANDS else "rcpick"
    possible = [p for p in (getattr(error, "possibilities", None) or []) if p]
    hint = f"; did you mean {' or '.join(possible[:3])}?" if possible else f" (see {path} --help)"
    for pattern, text in _REWORDED:
        found = pattern.search(message)
        if found:
            return text.format(*found.groups(), hint=hint)
    return f"{message.rstrip('.')} (see {path} --help)"


app = typer.Typer(
    name="rcpick",
    cls=LazyGroup,
    help=(
        "Pick standard resistor and capacitor values (IEC 60063 E-series) for an RC timing: "
        "a time constant, a corner frequency, a delay between two levels or an oscillator period.\n\n" + CAUTION
    ),
    no_args_is_help=True,
    add_completion=False,
    rich_markup_mode="rich",
    pretty_exceptions_enable=False,
    context_settings={"help_option_names": ["-h", "--help"]},
)


def _version(show: bool) -> None:
    if show:
        typer.echo(f"rcpick {__version__}")
        raise typer.Exit()


@app.callback()
def _root(
    version: bool = typer.Option(
        False, "--version", callback=_version, is_eager=True, metavar="", help="Print the version and exit."
    ),
) -> None:
    """Pick standard R and C values for an RC timing."""


def main() -> None:
    """Entry point of the ``rcpick`` console script."""
    app()
