"""``rcpick values``: list an E-series in a range, or the values around one value (parse → API → render)."""

from __future__ import annotations

import typer

from rcpick.cli import options as o
from rcpick.notation import format_rkm, format_si

EPILOG = """[bold]Examples[/bold]

  rcpick values E24 --from 1k --to 10k

  rcpick values E96 --around 5k

  rcpick values E12 --from 1n --to 100n --format json
"""


@o.reports_errors
def command(
    series_name: str = typer.Argument(..., metavar="SERIES", help="E3, E6, E12, E24, E48, E96 or E192."),
    low: str = typer.Option(
        None,
        "--from",
        metavar="VALUE",
        show_default=False,
        help="Lowest value (included), e.g. 1k or 1n. Default: 1k, or 1n for capacitors.",
    ),
    high: str = typer.Option(
        None,
        "--to",
        metavar="VALUE",
        show_default=False,
        help="Highest value (included), e.g. 10k. Default: 10 times --from.",
    ),
    around: str = typer.Option(
        None,
        "--around",
        metavar="VALUE",
        show_default=False,
        help="Show the standard values just below and above this value, nearest by ratio "
        "(log distance), with their deviation.",
    ),
    part: str = typer.Option(
        None,
        "--part",
        metavar="resistor|capacitor",
        show_default=False,
        help="resistor or capacitor. Default: guessed from the values' units; resistor.",
    ),
    fmt: str = typer.Option(
        None,
        "--format",
        metavar="table|json|csv",
        show_default=False,
        help="Output: table, json or csv. Default: table.",
    ),
) -> None:
    """List the values of an IEC 60063 E-series, or the neighbours of one value.

    Values are the published IEC 60063 decade values (not 10^(i/n)).
    """
    from rcpick.series import series_values

    chosen_fmt = o.check_format(fmt)
    document = series_values(series_name, low=low, high=high, around=around, part=part)
    kind = document["kind"]
    if chosen_fmt == "json":
        o.print_json({k: v for k, v in document.items() if k != "kind"})
        return
    rows = [{"value": v, "rkm": format_rkm(v, kind)} for v in document["values"]]
    if around is not None:
        for row in rows:
            row["deviation"] = row["value"] / document["around"] - 1.0
    if chosen_fmt == "csv":
        o.print_csv(rows)
        return
    render(document, rows, kind)


def render(document: dict, rows: list[dict], kind: str) -> None:
    """Print the listed values as a table."""
    from rcpick.cli.render import print_table

    out = o.console()
    unit = "Ω" if kind == "resistance" else "F"
    title = f"{document['series']} (usual tolerance ±{document['tolerance'] * 100:g} %)"
    if "around" in document:
        title += (
            f" around {format_si(document['around'], unit, 4, trim=True)}; nearest by ratio: "
            f"{format_rkm(document['closest'], kind)}"
        )
    out.print(f"[bold]{title}[/bold]")
    columns = [{"name": "value", "justify": "right", "drop": None}, {"name": "RKM", "justify": "left", "drop": None}]
    if "around" in document:
        columns.append({"name": "deviation", "justify": "right", "drop": None})
    cells = []
    for row in rows:
        line = [format_si(row["value"], unit, 4, trim=True), row["rkm"]]
        if "deviation" in row:
            line.append(f"{row['deviation'] * 100:+.2f} %")
        cells.append(line)
    print_table(out, columns, cells)
    out.print(f"{len(rows)} value(s)")


app = typer.Typer(add_completion=False, rich_markup_mode="rich", pretty_exceptions_enable=False)
o.register(app, "values", command, EPILOG)
