"""``rcpick find``: search standard parts for a timing target (parse → :func:`rcpick.api.run_find` → render)."""

from __future__ import annotations

import typer

from rcpick.cli import options as o
from rcpick.cli import render
from rcpick.specs import FindSpec

EPILOG = """[bold]Examples[/bold]

  rcpick find --tau 10ms

  rcpick find --cutoff 1.5kHz --r-series E96 --c-series E6

  rcpick find --delay 200ms --threshold 70% --fix-c 1u

  rcpick find --delay 50ms --threshold 2.0V --supply 3.3V --r-parts 1

  rcpick find --delay 3s --threshold 50V --supply 400V --falling --limit upper --fix-c 47u --r-max 10Meg

  rcpick find --tau 1ms --dielectric C0G --r-tech thin-film --r-tol 0.1% --temp -40:85 --window 2%

  rcpick find --cutoff 10kHz --rank error --format json

[bold]Caution[/bold]: estimates only; verify on hardware. For discharge of stored
charge and hazardous-voltage work, follow the standard in force, local codes and
licensed practice.
"""

EXTRA = [o.FORMAT, o.OUT, o.SHEET, o.ORDER, o.FORCE, o.PLOT, o.CONFIG]


@o.reports_errors
def command(ctx: typer.Context, **values) -> None:
    """Find the standard R and C values (single parts or pairs) that best hit a timing target.

    The nominal search is exact. Each listed candidate gets its worst case and
    Monte Carlo spread over tolerance and temperature, and its yield (with a 95 %
    interval) inside the acceptance window or against a limit; by default the
    list is ranked by yield, ties within the intervals going to fewer parts.
    """
    from rcpick.api import run_find

    fmt = o.check_format(values.pop("fmt"))
    out, sheet, order, force, plot, config = (
        values.pop(k) for k in ("out", "sheet", "order", "force", "plot", "config")
    )
    o.check_outputs(out, sheet, order, plot, force)
    spec = FindSpec.build(*o.layers(values, config))
    with o.ProgressBar() as bar:
        result = run_find(spec, progress=bar, query_extra=[("command line", o.command_line(), "rcpick")])
    document = result.to_dict()
    if order is not None:  # before any output: the ranks must be listed
        from rcpick.export import check_ranks

        check_ranks(o.parse_order(order) or [], len(document["candidates"]))
    if fmt == "json":
        o.print_json(document)
    elif fmt == "csv":
        from rcpick.results import flat_rows

        for message in document["warnings"]:
            o.warn(message)
        o.print_csv(flat_rows(document))
    else:
        render.find_table(result)
    o.write_files(result, out=out, sheet=sheet, order=order, plot=plot, force=force, quiet=fmt != "table")


command.__signature__ = o.signature(FindSpec.declared(), EXTRA)  # type: ignore[attr-defined]

app = typer.Typer(add_completion=False, rich_markup_mode="rich", pretty_exceptions_enable=False)
o.register(app, "find", command, EPILOG)
