"""``rcpick spread``: one design's worst case, Monte Carlo, yield and contributions (parse → API → render)."""

from __future__ import annotations

import typer

from rcpick.cli import options as o
from rcpick.cli import render
from rcpick.specs import SpreadSpec

EPILOG = """[bold]Examples[/bold]

  rcpick spread --r 10k --c 100n

  rcpick spread --r 4k7+330 --c 47n//47n --tau 470us --dielectric C0G --temp -40:85

  rcpick spread --r 10k//10k --c 1u --delay 3.5ms --threshold 0.5 --window -5%:+10% --dist normal

[bold]Caution[/bold]: estimates only; verify on hardware. Where the timing matters to safety
(reset, discharge of stored charge), follow the standard in force, local codes and licensed practice.
"""

EXTRA = [o.FORMAT_NO_CSV, o.OUT, o.SHEET, o.FORCE, o.PLOT, o.CONFIG]


@o.reports_errors
def command(ctx: typer.Context, **values) -> None:
    """Analyse one design: worst case, Monte Carlo spread, yield, and what each source contributes."""
    from rcpick.api import run_spread

    fmt = o.check_format(values.pop("fmt"), ("table", "json"))
    out, sheet, force, plot, config = (values.pop(k) for k in ("out", "sheet", "force", "plot", "config"))
    o.check_outputs(out, sheet, None, plot, force)
    spec = SpreadSpec.build(*o.layers(values, config))
    with o.ProgressBar() as bar:
        result = run_spread(spec, progress=bar, query_extra=[("command line", o.command_line(), "rcpick")])
    if fmt == "json":
        o.print_json(result.to_dict())
    else:
        render.spread_report(result)
    o.write_files(result, out=out, sheet=sheet, order=None, plot=plot, force=force, quiet=fmt != "table")


command.__signature__ = o.signature(SpreadSpec.declared(), EXTRA)  # type: ignore[attr-defined]

app = typer.Typer(add_completion=False, rich_markup_mode="rich", pretty_exceptions_enable=False)
o.register(app, "spread", command, EPILOG)
