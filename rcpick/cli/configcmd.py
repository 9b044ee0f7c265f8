"""``rcpick config``: every effective setting and where it came from."""

from __future__ import annotations

import typer

from rcpick.cli import config as cfg
from rcpick.cli import find
from rcpick.cli.common import check_format, console, print_json, reports_errors, table

EPILOG = f"""[bold]Examples[/bold]

  rcpick config

  rcpick config --config team.toml --temp -40:85

Settings come from the command line, then the project file ({cfg.FILE_NAME} in the working
directory, or --config FILE), then rcpick's built-in defaults.
"""

_KEEP = {cfg.param_name(key) for key in cfg.SETTINGS} | {"config", "fmt"}


@reports_errors
def command(ctx: typer.Context, **values) -> None:
    """Show every effective setting of find and spread, and where it came from (built-in, file, command line)."""
    fmt = values.pop("fmt", "table")
    check_format(fmt)
    rows = cfg.provenance(ctx, values)
    if fmt == "json":
        print_json({"config_file": ctx.meta.get("rcpick.config"),
                    "settings": [{"key": k, "value": v, "source": s} for k, v, s in rows]})
        return
    out = console()
    out.print(f"[bold]Project file[/bold] {ctx.meta.get('rcpick.config') or f'none (no ./{cfg.FILE_NAME})'}")
    grid = table(("setting", "left"), ("value", "left"), ("source", "left"))
    for key, value, source in rows:
        grid.add_row(key, "" if value is None else str(value), source)
    out.print(grid)


command.__signature__ = cfg.signature_like(find.command, _KEEP)
