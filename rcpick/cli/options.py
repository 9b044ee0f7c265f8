"""What every command shares: options made from the settings registry, errors, output, progress.

A command's options are declared once, in :mod:`rcpick.settings`; this module
turns them into typer options (all read as text, so that rcpick's own parser
and its one-line messages apply), collects what was typed into a layer for
:mod:`rcpick.specs`, and prints results.
"""

from __future__ import annotations

import functools
import inspect
import json
import math
import os
import re
import shlex
import sys
from collections.abc import Callable
from pathlib import Path
from typing import Any

import typer
from typer.core import TyperCommand

from rcpick.errors import BadValue, ClashingOptions, RcpickError, parameter_name
from rcpick.settings import Setting, option_name

OUTPUT = "Output"


def _escape(text: str) -> str:
    """Help text safe from rich markup: square brackets are shown as typed."""
    return text.replace("[", "\\[")


def help_text(setting: Setting) -> str:
    text = setting.help
    if setting.shown and not setting.flag:
        text += f" Default: {setting.shown}."
    return _escape(text)


def parameter(setting: Setting) -> inspect.Parameter:
    """A typer option for one setting (text, or a switch)."""
    if setting.flag:
        default = typer.Option(
            False,
            setting.flag_name,
            help=help_text(setting),
            rich_help_panel=setting.panel or None,
            show_default=False,
            metavar="",
        )
        return inspect.Parameter(setting.name, inspect.Parameter.KEYWORD_ONLY, default=default, annotation=bool)
    default = typer.Option(
        None,
        setting.flag_name,
        metavar=setting.metavar,
        help=help_text(setting),
        rich_help_panel=setting.panel or None,
        show_default=False,
    )
    return inspect.Parameter(setting.name, inspect.Parameter.KEYWORD_ONLY, default=default, annotation=str | None)


def argument(setting: Setting) -> inspect.Parameter:
    default = typer.Argument(..., metavar=setting.metavar, help=_escape(setting.help), show_default=False)
    return inspect.Parameter(setting.name, inspect.Parameter.KEYWORD_ONLY, default=default, annotation=str)


def cli_only(name: str, flag: str, help: str, metavar: str = "", switch: bool = False) -> inspect.Parameter:
    if switch:
        default = typer.Option(False, flag, help=_escape(help), rich_help_panel=OUTPUT, show_default=False, metavar="")
        return inspect.Parameter(name, inspect.Parameter.KEYWORD_ONLY, default=default, annotation=bool)
    default = typer.Option(None, flag, metavar=metavar, help=_escape(help), rich_help_panel=OUTPUT, show_default=False)
    return inspect.Parameter(name, inspect.Parameter.KEYWORD_ONLY, default=default, annotation=str | None)


FORMAT = cli_only("fmt", "--format", "Output: table, json or csv. Default: table.", "table|json|csv")
FORMAT_NO_CSV = cli_only("fmt", "--format", "Output: table or json. Default: table.", "table|json")
OUT = cli_only(
    "out", "--out", "Write the result: .xlsx (sheets shortlist, order, query) or .csv (one sheet, see --sheet).", "FILE"
)
SHEET = cli_only(
    "sheet", "--sheet", "Which table a .csv --out holds: shortlist or order. Default: shortlist.", "shortlist|order"
)
ORDER = cli_only("order", "--order", "Candidates whose parts go on the order sheet, e.g. 1,3. Default: 1.", "RANKS")
FORCE = cli_only("force", "--force", "Overwrite an existing --out or --plot file.", switch=True)
PLOT = cli_only("plot", "--plot", "Draw a PNG; needs matplotlib: pip install 'rcpick[plot]'.", "FILE.png")
CONFIG = cli_only(
    "config",
    "--config",
    "Project defaults file. Default: ./rcpick.toml when present; options on the command line win.",
    "FILE",
)


def signature(
    declared: list[Setting], extra: list[inspect.Parameter], arguments: tuple[str, ...] = ()
) -> inspect.Signature:
    """A command's signature: a typer Context, its arguments, the settings' options, then the command's own."""
    ctx = inspect.Parameter("ctx", inspect.Parameter.POSITIONAL_OR_KEYWORD, annotation=typer.Context)
    params = [argument(s) for s in declared if s.name in arguments]
    params += [parameter(s) for s in declared if s.name not in arguments]
    return inspect.Signature([ctx, *params, *extra])


class Command(TyperCommand):
    """A command whose --help shows no type placeholder (switches take no value)."""

    def get_help_option(self, ctx):
        option = super().get_help_option(ctx)
        if option is not None:
            option.metavar = ""
            if hasattr(option, "_runtime_param"):
                option._runtime_param = _AsTyped()  # type: ignore[assignment]
        return option


class _AsTyped:
    """Hands an option's text (or a switch's bool) on as typed: rcpick's own parsers read it."""

    def coerce(self, value: Any, param: Any = None, ctx: Any = None) -> Any:
        return value


def plain_coercion(command: Any) -> Any:
    """Skip typer's per-option type adapters (they import pydantic and cost a build per option): every rcpick
    option is text or a switch, read afterwards by rcpick's own parsers. Where typer keeps no such hook the
    command is left as it is (only slower)."""
    for param in getattr(command, "params", []):
        if hasattr(param, "_runtime_param"):
            param._runtime_param = _AsTyped()
    return command


def register(app: typer.Typer, name: str, command: Callable, epilog: str) -> None:
    """Add ``command`` to a one-command typer app, as rcpick's commands are declared."""
    app.command(name, cls=Command, epilog=epilog, context_settings={"help_option_names": ["-h", "--help"]})(command)


# --- errors ------------------------------------------------------------------------


def say_error(error: RcpickError) -> None:
    namer = option_name if error.namer is parameter_name else error.namer
    text = " ".join(error.render(namer).split())
    typer.echo(f"rcpick: error: {text}", err=True)


def reports_errors(func: Callable) -> Callable:
    """Turn an :class:`RcpickError` into one line on stderr and exit code 2."""

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        try:
            return func(*args, **kwargs)
        except RcpickError as error:
            say_error(error)
            raise typer.Exit(2) from None

    return wrapper


def check_format(fmt: str | None, allowed: tuple[str, ...] = ("table", "json", "csv")) -> str:
    chosen = (fmt or "table").strip().lower()
    if chosen not in allowed:
        raise BadValue(f"unknown format {fmt!r}; accepted: {', '.join(allowed)}", setting="format")
    return chosen


# --- layers ------------------------------------------------------------------------


def cli_layer(values: dict[str, Any]):
    from rcpick.specs import Layer

    return Layer({k: v for k, v in values.items() if v is not None}, "command line", option_name)


def layers(values: dict[str, Any], config: str | None) -> list:
    from rcpick.specs import config_layer

    return [cli_layer(values), config_layer(Path(config) if config else None)]


# --- output ------------------------------------------------------------------------

#: Width used when stdout is not a terminal and COLUMNS is not set (a pipe or a file): tables are not folded there.
PIPE_WIDTH = 160


def width() -> int:
    """The width to render at: COLUMNS when set, the terminal's when stdout is one, else PIPE_WIDTH."""
    env = os.environ.get("COLUMNS", "")
    if env.isdigit() and int(env) > 0:
        return int(env)
    if sys.stdout.isatty():
        return os.get_terminal_size(sys.stdout.fileno()).columns
    return PIPE_WIDTH


_STYLES = {"bold": "\x1b[1m", "dim": "\x1b[2m", "yellow": "\x1b[33m"}
_TAG = re.compile(r"\[(/?)(bold|dim|yellow)\]")


class Console:
    """Lines on stdout at a width: ``[bold]``, ``[dim]`` and ``[yellow]`` shown on a colour terminal, dropped
    elsewhere (a pipe, a file, NO_COLOR, TERM=dumb); text wrapped at the width unless it is a table line."""

    def __init__(self, width: int, colour: bool):
        self.width = width
        self.colour = colour

    def print(self, text: str = "", *, soft_wrap: bool = False, markup: bool = True, **_: Any) -> None:
        text = str(text)
        if not markup:
            sys.stdout.write(text + "\n")
            return
        out = []
        for line in text.split("\n"):
            if soft_wrap or len(_TAG.sub("", line)) <= self.width:
                out.append(self._styled(line))
                continue
            words = _styled_words(line)
            current: list[tuple[str, str | None]] = []
            used = 0
            for word, style in words:
                if current and used + 1 + len(word) > self.width:
                    out.append(self._join(current))
                    current, used = [], 0
                used += len(word) + (1 if current else 0)
                current.append((word, style))
            out.append(self._join(current))
        sys.stdout.write("\n".join(out) + "\n")

    def _styled(self, line: str) -> str:
        """One line as it is, its tags turned into terminal styles (or dropped)."""
        if not self.colour:
            return _TAG.sub("", line)
        return _TAG.sub(lambda m: "\x1b[0m" if m.group(1) else _STYLES[m.group(2)], line)

    def _join(self, words: list[tuple[str, str | None]]) -> str:
        if not self.colour:
            return " ".join(w for w, _ in words)
        parts = []
        for word, style in words:
            parts.append(f"{_STYLES[style]}{word}\x1b[0m" if style else word)
        return " ".join(parts)


def _styled_words(line: str) -> list[tuple[str, str | None]]:
    """Words of a line with the style each is in (``[bold]…[/bold]`` and the like)."""
    words: list[tuple[str, str | None]] = []
    style: str | None = None
    pos = 0
    pending = ""
    for match in _TAG.finditer(line):
        pending += line[pos : match.start()]
        pieces = pending.split(" ")
        for k, piece in enumerate(pieces):
            if k < len(pieces) - 1 or piece:
                words.append((piece, style))
        pending = ""
        style = None if match.group(1) else match.group(2)
        pos = match.end()
    for piece in (pending + line[pos:]).split(" "):
        words.append((piece, style))
    # glue back the empty pieces a split at a tag boundary leaves (keeps "Head rest" spacing right)
    return [w for w in words if w[0] != ""] or [("", None)]


def console() -> Console:
    """Where commands print their results (see :class:`Console`)."""
    colour = sys.stdout.isatty() and "NO_COLOR" not in os.environ and os.environ.get("TERM") != "dumb"
    return Console(width(), colour)


def print_json(document: object) -> None:
    """Write a JSON document to stdout; never NaN or infinity (they are not JSON)."""
    sys.stdout.write(json.dumps(document, indent=2, ensure_ascii=False, allow_nan=False) + "\n")


def print_csv(rows: list[dict]) -> None:
    """Write rows (dicts with the same keys) as CSV to stdout; missing values are empty cells."""
    import csv
    import io

    buffer = io.StringIO()
    if rows:
        writer = csv.DictWriter(buffer, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        for row in rows:
            writer.writerow(
                {k: ("" if v is None or (isinstance(v, float) and not math.isfinite(v)) else v) for k, v in row.items()}
            )
    sys.stdout.write(buffer.getvalue())


def warn(message: str) -> None:
    """A warning line on stderr (used where stdout carries data)."""
    typer.echo(f"rcpick: warning: {message}", err=True)


#: The arguments of the command being run, as the shell split them (set by the group's main).
TYPED: list[str] = []


def command_line() -> str:
    """The command as typed, for the query sheet."""
    return shlex.join(["rcpick", *TYPED])


# --- outputs to files ---------------------------------------------------------------


def check_outputs(out: str | None, sheet: str | None, order: str | None, plot: str | None, force: bool) -> None:
    """Reject a bad --out/--sheet/--order/--plot before any work is done."""
    if out is None and plot is None and sheet is None and order is None:
        return
    from rcpick import export

    if sheet is not None and sheet not in ("shortlist", "order"):
        raise BadValue(f"unknown sheet {sheet!r}; accepted: shortlist, order", setting="sheet")
    if out is not None:
        export.check_target(Path(out), force, sheet, setting="out")
    else:
        if sheet is not None:
            raise ClashingOptions("needs {out} FILE.csv", setting="sheet")
        if order is not None:
            raise ClashingOptions(
                "{order} needs {out} FILE (it picks the candidates for the order sheet)", setting="order"
            )
    if plot is not None:
        if Path(plot).suffix.lower() != ".png":
            raise BadValue(f"{plot!r} must end in .png", setting="plot")
        export.check_writable(Path(plot), force, "plot")


def parse_order(text: str | None) -> list[int] | None:
    if text is None:
        return None
    try:
        ranks = [int(p) for p in text.split(",") if p.strip()]
    except ValueError:
        raise BadValue(f"cannot read {text!r}; expected ranks such as 1 or 1,3", setting="order") from None
    if not ranks:
        raise BadValue(f"cannot read {text!r}; expected ranks such as 1 or 1,3", setting="order")
    return ranks


def write_files(
    result, *, out: str | None, sheet: str | None, order: str | None, plot: str | None, force: bool, quiet: bool
) -> None:
    """Write --out and --plot from a result; say what was written (on stderr when stdout carries data)."""
    if out is not None:
        try:
            path = result.save(out, order=parse_order(order), sheet=sheet, force=force)
        except RcpickError as error:
            raise (error.about("out") if error.setting is None else error) from None
        written = "shortlist, order, query" if path.suffix.lower() == ".xlsx" else (sheet or "shortlist")
        typer.echo(f"Wrote {path} ({written})", err=quiet)
    if plot is not None:
        result.plot(plot, force=force)
        typer.echo(f"Wrote {plot}", err=quiet)


# --- progress --------------------------------------------------------------------------

#: Unit-evaluations above which a progress bar is worth showing (about a second of work).
PROGRESS_THRESHOLD = 10_000_000


class ProgressBar:
    """A callback for the API's ``progress``: a rich bar on stderr for long Monte Carlo runs in a terminal."""

    def __init__(self, label: str = "Monte Carlo"):
        self.label = label
        self.bar: Any = None
        self.task: Any = None

    def start(self, total: int) -> None:
        """Announce ``total`` more unit-evaluations (a board announces one batch per analysis)."""
        if self.bar is not None:
            task = self.bar.tasks[0]
            self.bar.update(self.task, total=(task.total or 0) + total)
            return
        if total < PROGRESS_THRESHOLD or not sys.stderr.isatty():
            return
        from rich.console import Console
        from rich.progress import BarColumn, Progress, TimeRemainingColumn

        self.bar = Progress(
            f"[bold]{self.label}[/bold]",
            BarColumn(),
            "{task.percentage:>3.0f} %",
            TimeRemainingColumn(),
            console=Console(stderr=True),
            transient=True,
        )
        self.bar.start()
        self.task = self.bar.add_task(self.label, total=total)

    def __call__(self, done: int) -> None:
        if self.bar is not None:
            self.bar.advance(self.task, done)

    def stage(self, text: str) -> None:
        """Say on a terminal which step a long run is in (the bar, if any, is done by then)."""
        if not sys.stderr.isatty():
            return
        if self.bar is not None:
            self.bar.stop()
            self.bar = None
        sys.stderr.write(f"\r\x1b[K{text}")
        sys.stderr.flush()
        self.staged = True

    def __enter__(self) -> ProgressBar:
        return self

    def __exit__(self, *exc) -> None:
        if self.bar is not None:
            self.bar.stop()
        if getattr(self, "staged", False):
            sys.stderr.write("\r\x1b[K")
            sys.stderr.flush()
