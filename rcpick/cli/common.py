"""Helpers shared by the commands: error reporting, option parsing, output."""

from __future__ import annotations

import contextlib
import csv
import functools
import io
import json
import sys
from collections.abc import Callable

import typer

from rcpick.errors import BadValue, ClashingOptions, RcpickError
from rcpick.notation import parse_quantity

FORMATS = ("table", "json", "csv")


def reports_errors(func: Callable) -> Callable:
    """Turn an :class:`RcpickError` into one line on stderr and exit code 2."""

    @functools.wraps(func)
    def wrapper(*args, **kwargs):
        try:
            return func(*args, **kwargs)
        except RcpickError as error:
            typer.echo(f"rcpick: error: {error}", err=True)
            raise typer.Exit(2) from None

    return wrapper


def quantity(text: str | None, kind: str, option: str) -> float | None:
    """Parse an optional quantity option (None stays None)."""
    return None if text is None else parse_quantity(text, kind, option=option)


def check_format(fmt: str) -> str:
    """Validate ``--format``."""
    if fmt not in FORMATS:
        raise BadValue(f"unknown format {fmt!r}; accepted: {', '.join(FORMATS)}", option="--format", value=fmt)
    return fmt


def one_of(options: dict[str, object], what: str) -> str:
    """Exactly one of ``options`` (name → value or None) must be given; return its name."""
    given = [name for name, value in options.items() if value is not None]
    if len(given) != 1:
        names = ", ".join(options)
        found = "none" if not given else " and ".join(given)
        raise ClashingOptions(f"give exactly one {what} ({names}); got {found}")
    return given[0]


def print_json(document: object) -> None:
    """Write a JSON document to stdout."""
    sys.stdout.write(json.dumps(document, indent=2, ensure_ascii=False) + "\n")


def print_csv(rows: list[dict]) -> None:
    """Write rows (dicts with the same keys) as CSV to stdout."""
    buffer = io.StringIO()
    if rows:
        writer = csv.DictWriter(buffer, fieldnames=list(rows[0]), lineterminator="\n")
        writer.writeheader()
        writer.writerows(rows)
    sys.stdout.write(buffer.getvalue())


#: Width used when stdout is not a terminal (a pipe or a file), so tables never wrap there.
PIPE_WIDTH = 160


def console():
    """A rich console on stdout (imported late to keep start-up short)."""
    from rich.console import Console

    out = Console(highlight=False)
    if not out.is_terminal:
        out = Console(highlight=False, width=PIPE_WIDTH)
    return out


def table(*columns: tuple[str, str]):
    """A compact rich table with columns (name, justify) that never wrap inside a cell."""
    from rich import box
    from rich.table import Table

    out = Table(box=box.SIMPLE_HEAD, padding=(0, 1), show_edge=False, pad_edge=False)
    for name, justify in columns:
        out.add_column(name, justify=justify, no_wrap=True)
    return out


def warn(message: str) -> None:
    """A warning line on stderr (used where stdout carries data)."""
    typer.echo(f"rcpick: warning: {message}", err=True)


#: Unit-evaluations above which a progress bar is worth showing (about a second of work).
PROGRESS_THRESHOLD = 10_000_000


@contextlib.contextmanager
def progress_reporter(total: int, label: str):
    """Yield a callback ``step(n)``; shows a rich progress bar on stderr for long work in a terminal."""
    from rich.console import Console

    err = Console(stderr=True)
    if total < PROGRESS_THRESHOLD or not err.is_terminal:
        yield None
        return
    from rich.progress import BarColumn, Progress, TimeRemainingColumn

    with Progress(f"[bold]{label}[/bold]", BarColumn(), "{task.percentage:>3.0f} %", TimeRemainingColumn(),
                  console=err, transient=True) as bar:
        task = bar.add_task(label, total=total)
        yield lambda n: bar.advance(task, n)
