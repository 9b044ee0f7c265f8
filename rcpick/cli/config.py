"""``rcpick config``: every effective setting of a search and where it came from."""

from __future__ import annotations

import typer

from rcpick.cli import options as o
from rcpick.specs import FILE_NAME, FindSpec

EPILOG = f"""[bold]Examples[/bold]

  rcpick config

  rcpick config --config team.toml --temp -40:85

  rcpick config --r-series E96 --dielectric C0G

Settings come from the command line, then the project file ({FILE_NAME} in the working
directory, or --config FILE), then rcpick's built-in defaults. Every value is checked
exactly as find checks it.
"""


@o.reports_errors
def command(ctx: typer.Context, **values) -> None:
    """Show every effective setting of find (and spread), and where it came from: built-in, file, command line."""
    from rcpick.api import resolved_settings

    fmt = o.check_format(values.pop("fmt"), ("table", "json"))
    config = values.pop("config")
    layer_list = o.layers(values, config)
    spec = FindSpec.build(*layer_list, partial=True)
    rows = resolved_settings(spec, spec.plan())
    config_file = layer_list[1].source if layer_list[1] is not None else None
    if fmt == "json":
        o.print_json(
            {"config_file": config_file, "settings": [{"key": k, "value": v, "source": s} for k, v, s in rows]}
        )
        return
    from rcpick.cli.render import print_table

    out = o.console()
    out.print(f"[bold]Project file[/bold] {config_file or f'none (no ./{FILE_NAME})'}")
    print_table(
        out,
        [
            {"name": "setting", "justify": "left", "drop": None},
            {"name": "value", "justify": "left", "drop": None},
            {"name": "source", "justify": "left", "drop": 1},
        ],
        [[k, "" if v is None else str(v), s] for k, v, s in rows],
    )


command.__signature__ = o.signature(FindSpec.declared(), [o.FORMAT_NO_CSV, o.CONFIG])  # type: ignore[attr-defined]

app = typer.Typer(add_completion=False, rich_markup_mode="rich", pretty_exceptions_enable=False)
o.register(app, "config", command, EPILOG)
