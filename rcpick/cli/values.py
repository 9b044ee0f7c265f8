"""``rcpick values``: list an E-series in a range, or the values around one value."""

from __future__ import annotations

import typer

from rcpick import series
from rcpick.cli.common import check_format, console, print_csv, print_json, reports_errors, table
from rcpick.errors import BadValue, UnknownName
from rcpick.notation import format_rkm, format_si, parse_quantity

EPILOG = """[bold]Examples[/bold]

  rcpick values E24 --from 1k --to 10k

  rcpick values E96 --around 5k

  rcpick values E12 --from 1n --to 100n --format json
"""

KINDS = {"resistor": ("resistance", "Ω"), "capacitor": ("capacitance", "F")}
DEFAULT_RANGE = {"resistance": ("1k", "10k"), "capacitance": ("1n", "10n")}
_CAPACITOR_MARKS = ("F", "p", "n", "u", "µ", "μ")


def guess_kind(texts: list[str | None]) -> str:
    """``capacitance`` when any given value looks like one (F, p, n, u, µ), else ``resistance``."""
    for text in texts:
        if text and any(mark in text for mark in _CAPACITOR_MARKS):
            return "capacitance"
    return "resistance"


@reports_errors
def command(
    series_name: str = typer.Argument(..., metavar="SERIES", help="E3, E6, E12, E24, E48, E96 or E192."),
    low: str = typer.Option(None, "--from", metavar="VALUE", help="Lowest value (included), e.g. 1k or 1n \\[default: 1k, or 1n for capacitors]."),
    high: str = typer.Option(None, "--to", metavar="VALUE", help="Highest value (included), e.g. 10k \\[default: 10× --from's decade start]."),
    around: str = typer.Option(None, "--around", metavar="VALUE", help="Show the standard values just below and above this value, nearest by ratio (log distance), with their deviation."),
    part: str = typer.Option(None, "--part", metavar="resistor|capacitor", help="resistor or capacitor \\[default: guessed from the values' units; resistor]."),
    fmt: str = typer.Option("table", "--format", metavar="table|json|csv", help="Output: table, json or csv."),
) -> None:
    """List the values of an IEC 60063 E-series, or the neighbours of one value.

    Values are the published IEC 60063 decade values (not 10^(i/n)).
    """
    check_format(fmt)
    try:
        chosen = series.get(series_name)
    except UnknownName as error:
        raise error.for_option("SERIES") from None
    if part is not None and part not in KINDS:
        raise BadValue(f"unknown part {part!r}; accepted: resistor, capacitor", option="--part", value=part)
    kind, unit = KINDS[part] if part else KINDS["capacitor" if guess_kind([low, high, around]) == "capacitance" else "resistor"]
    document: dict = {"series": chosen.name, "tolerance": chosen.tolerance}
    listed = None
    if low is not None or high is not None or around is None:
        lo_text, hi_text = DEFAULT_RANGE[kind]
        lo = parse_quantity(low or lo_text, kind, option="--from")
        hi = parse_quantity(high, kind, option="--to") if high else lo * 10 if low else parse_quantity(hi_text, kind)
        if lo > hi:
            raise BadValue(f"--from {format_si(lo, unit, trim=True)} is above --to {format_si(hi, unit, trim=True)}",
                           option="--from", value=low)
        listed = [float(v) for v in chosen.values(lo, hi)]
    if around is not None:
        centre = parse_quantity(around, kind, option="--around")
        below, above = chosen.neighbours(centre)
        best = series.closest(below, above, centre)
        document.update(below=below, above=above, closest=best, around=centre)
        if listed is None:
            listed = sorted({below, above})
    document["values"] = listed
    if fmt == "json":
        print_json(document)
        return
    rows = [{"value": v, "rkm": format_rkm(v, kind)} for v in listed]
    if around is not None:
        for row in rows:
            row["deviation"] = row["value"] / document["around"] - 1.0
    if fmt == "csv":
        print_csv(rows)
        return
    render(document, rows, kind, unit)


def render(document: dict, rows: list[dict], kind: str, unit: str) -> None:
    """Print the listed values as a table."""
    out = console()
    title = f"{document['series']} (usual tolerance ±{document['tolerance'] * 100:g} %)"
    if "around" in document:
        title += f" around {format_si(document['around'], unit, 4, trim=True)}; nearest by ratio: " \
                 f"{format_rkm(document['closest'], kind)}"
    out.print(f"[bold]{title}[/bold]")
    columns = [("value", "right"), ("RKM", "left")] + ([("deviation", "right")] if "around" in document else [])
    grid = table(*columns)
    for row in rows:
        cells = [format_si(row["value"], unit, 4, trim=True), row["rkm"]]
        if "deviation" in row:
            cells.append(f"{row['deviation'] * 100:+.2f} %")
        grid.add_row(*cells)
    out.print(grid)
    out.print(f"{len(rows)} value(s)")
