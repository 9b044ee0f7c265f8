"""``rcpick board``: one design per timing of a board, chosen jointly (parse → :func:`rcpick.api.run_board` →
render)."""

from __future__ import annotations

from pathlib import Path

import typer

from rcpick.cli import options as o
from rcpick.settings import SETTINGS

EPILOG = """[bold]Examples[/bold]

  rcpick board docs/examples/sensor-board.toml

  rcpick board docs/examples/sensor-board.toml --require worst-case

  rcpick board docs/examples/sensor-board.toml --min-yield 99% --out board.xlsx --boards 500

  rcpick board docs/examples/sensor-board.toml --format json

The board file (TOML) has \\[defaults] (any rcpick.toml key), one \\[\\[timing]] table per
timing (a name, an optional count, one target, any override) and an optional have
list of parts already on the board; see docs/board.md. Exit code 0: every timing met;
1: planned, but some timing could not be met (named in the output); 2: bad input.

[bold]Caution[/bold]: estimates only; verify every timing on hardware. Where a timing matters
to safety (reset, discharge of stored charge, hazardous voltage), follow the standard in
force, local codes and licensed practice.
"""

DECLARED = [SETTINGS[n] for n in ("board_file", "require", "pool", "min_yield", "samples", "seed", "boards", "spares")]
OUT = o.cli_only(
    "out", "--out", "Write the plan: .xlsx (sheets timings, order, query) or .csv (one sheet, see --sheet).", "FILE"
)
SHEET = o.cli_only("sheet", "--sheet", "Which table a .csv --out holds: timings or order. Default: timings.", "NAME")
FORCE = o.cli_only("force", "--force", "Overwrite an existing --out file.", switch=True)
EXTRA = [o.FORMAT_NO_CSV, OUT, SHEET, FORCE, o.CONFIG]


@o.reports_errors
def command(ctx: typer.Context, **values) -> None:
    """Pick one design for every RC timing of a board so they share part values: fewest line items on the bill
    of materials, then fewest parts, then the widest margin, each timing meeting its requirement.
    """
    from rcpick import export
    from rcpick.api import run_board
    from rcpick.cli.boardview import board_report
    from rcpick.errors import BadValue, ClashingOptions
    from rcpick.specs import config_layer

    fmt = o.check_format(values.pop("fmt"), ("table", "json"))
    out, sheet, force, config = (values.pop(k) for k in ("out", "sheet", "force", "config"))
    if sheet is not None and sheet not in ("timings", "order"):
        raise BadValue(f"unknown sheet {sheet!r}; accepted: timings, order", setting="sheet")
    if out is not None:
        export.check_target(Path(out), force, sheet, setting="out")
    elif sheet is not None:
        raise ClashingOptions("needs {out} FILE.csv", setting="sheet")
    board_values = {k: values.pop(k) for k in ("board_file", "require", "pool")}
    result_layers = (o.cli_layer(board_values), o.cli_layer(values), config_layer(Path(config) if config else None))
    with o.ProgressBar() as bar:
        result = run_board(*result_layers, progress=bar, query_extra=[("command line", o.command_line(), "rcpick")])
    if fmt == "json":
        o.print_json(result.to_dict())
    else:
        board_report(result)
    if out is not None:
        try:
            path = result.save(out, force=force, sheet=sheet)
        except Exception as error:
            from rcpick.errors import RcpickError

            if isinstance(error, RcpickError):
                raise (error.about("out") if error.setting is None else error) from None
            raise
        written = "timings, order, query" if path.suffix.lower() == ".xlsx" else (sheet or "timings")
        typer.echo(f"Wrote {path} ({written})", err=fmt != "table")
    if result.unmet:
        raise typer.Exit(1)


command.__signature__ = o.signature(DECLARED, EXTRA, arguments=("board_file",))  # type: ignore[attr-defined]

app = typer.Typer(add_completion=False, rich_markup_mode="rich", pretty_exceptions_enable=False)
o.register(app, "board", command, EPILOG)
