"""Options shared by ``find`` and ``spread`` for stock files, exports and pictures."""

from __future__ import annotations

import datetime
import shlex
from pathlib import Path

import typer

from rcpick import __version__, export, models
from rcpick import stock as stocks
from rcpick.cli import config as cfg
from rcpick.errors import BadValue, ClashingOptions, RcpickError
from rcpick.notation import parse_percent

PANEL = "Stock and export"

STOCK = typer.Option(None, "--stock", metavar="FILE", help="CSV or XLSX of stocked/approved parts (columns kind, value; optional tolerance, tcr, dielectric, part_number, unit_price, on_hand, package, voltage). Its values replace the series for the kinds it lists.", rich_help_panel=PANEL)
OUT = typer.Option(None, "--out", metavar="FILE", help="Write the result: .xlsx (sheets shortlist, order, query) or .csv (one sheet, see --sheet).", rich_help_panel=PANEL)
SHEET = typer.Option(None, "--sheet", metavar="shortlist|order", help="Which table a .csv --out holds \\[default: shortlist].", rich_help_panel=PANEL)
ORDER = typer.Option(None, "--order", metavar="RANKS", help="Candidates whose parts go on the order sheet, e.g. 1,3 \\[default: 1].", rich_help_panel=PANEL)
BOARDS = typer.Option(None, "--boards", metavar="N", help="Boards to build, for order quantities \\[default: 1].", rich_help_panel=PANEL)
SPARES = typer.Option(None, "--spares", metavar="PCT", help="Extra parts ordered, e.g. 5%; totals are rounded up \\[default: 0%].", rich_help_panel=PANEL)
FORCE = typer.Option(False, "--force", help="Overwrite an existing --out or --plot file.", rich_help_panel=PANEL)
PLOT = typer.Option(None, "--plot", metavar="FILE.png", help="Draw a PNG (needs matplotlib: pip install 'rcpick[plot]').", rich_help_panel=PANEL)


def load_stock(path: str | None) -> stocks.Stock | None:
    if path is None:
        return None
    try:
        return stocks.load(path)
    except RcpickError as error:
        raise error.for_option("--stock") from None


def stock_models(stock: stocks.Stock | None, kind: str, values, default: models.PartModel, settings) -> dict:
    """PartModel of every stocked value used for a position (empty without stock)."""
    if stock is None or not stock.covers(kind):
        return {}
    out = {}
    for value in values:
        part = stock.find(kind, float(value))
        if part is not None:
            out[float(value)] = stocks.part_model(part, default, aging_hours=settings.aging_hours, loss=settings.loss)
    return out


def stock_warnings(stock: stocks.Stock | None, values, temp_c) -> list[str]:
    """Warnings for stocked capacitor dielectrics that are poor for timing or used outside their rating."""
    if stock is None:
        return []
    out = []
    codes = {p.dielectric for v in values for p in [stock.find("capacitance", float(v))] if p and p.dielectric}
    for code in sorted(codes):
        diel = models.dielectric(code)
        if diel.poor_for_timing:
            out.append(f"stocked {diel.poor_for_timing}")
        rated = diel.drift.rated_c
        if rated and (temp_c[0] < rated[0] or temp_c[1] > rated[1]):
            out.append(f"the temperature range {temp_c[0]:g}…{temp_c[1]:g} °C leaves stocked {code}'s rated range "
                       f"{rated[0]:g}…{rated[1]:g} °C: the capacitor model is not valid there")
    return out


def parse_order(text: str | None, count: int) -> list[int]:
    """``'1,3'`` → [1, 3]; each rank must be one of the ``count`` listed."""
    if text is None:
        return [1]
    try:
        ranks = [int(p) for p in text.split(",") if p.strip()]
    except ValueError:
        raise BadValue(f"cannot read {text!r}; expected ranks such as 1 or 1,3", option="--order", value=text) from None
    bad = [r for r in ranks if not 1 <= r <= count]
    if not ranks or bad:
        raise BadValue(f"rank {bad[0] if bad else text} is not listed; {count} candidate(s) are (1…{count})",
                       option="--order", value=text)
    return list(dict.fromkeys(ranks))


def order_settings(boards: int | None, spares: str | None) -> tuple[int, float]:
    n = 1 if boards is None else boards
    if n < 1:
        raise BadValue(f"must be at least 1, got {n}", option="--boards", value=boards)
    extra = 0.0 if spares is None else parse_percent(spares, option="--spares")
    if not 0.0 <= extra <= 10.0:
        raise BadValue(f"must lie in 0 %…1000 %, got {spares!r}", option="--spares", value=spares)
    return n, extra


def check_outputs(out: str | None, sheet: str | None, plot: str | None, force: bool) -> None:
    """Reject a bad --out/--sheet/--plot before any work is done."""
    if sheet is not None and sheet not in ("shortlist", "order"):
        raise BadValue(f"unknown sheet {sheet!r}; accepted: shortlist, order", option="--sheet", value=sheet)
    if out is not None:
        suffix = Path(out).suffix.lower()
        if suffix not in (".xlsx", ".csv"):
            raise BadValue(f"{out!r} must end in .xlsx or .csv", option="--out", value=out)
        if sheet is not None and suffix != ".csv":
            raise ClashingOptions("--sheet applies to a .csv --out (a .xlsx holds every sheet)")
        _check_writable(Path(out), force, "--out")
    elif sheet is not None:
        raise ClashingOptions("--sheet needs --out FILE.csv")
    if plot is not None:
        if Path(plot).suffix.lower() != ".png":
            raise BadValue(f"{plot!r} must end in .png", option="--plot", value=plot)
        _check_writable(Path(plot), force, "--plot")


def _check_writable(path: Path, force: bool, option: str) -> None:
    if path.exists() and not force:
        raise BadValue(f"{path} exists; add --force to overwrite it", option=option, value=str(path))
    parent = path.parent if str(path.parent) else Path(".")
    if not parent.is_dir():
        raise BadValue(f"cannot write {path}: folder {parent} does not exist", option=option, value=str(path))


def command_line(ctx: typer.Context) -> str:
    """The command as typed, rebuilt from the options given on the command line (in declaration order)."""
    words = ["rcpick", ctx.info_name or ""]
    for param in ctx.command.params:
        if cfg.source_of(ctx, param.name) != "command line":
            continue
        value = ctx.params.get(param.name)
        flag = max(param.opts, key=len) if param.opts else param.name
        if not flag.startswith("-"):
            words.append(str(value))
        elif isinstance(value, bool):
            if value:
                words.append(flag)
        elif value is not None:
            words += [flag, str(value)]
    return shlex.join(words)


def provenance(ctx: typer.Context, seed: int, extra: list[tuple[str, object, str]] = ()) -> list[tuple[str, object, str]]:
    """Rows of the ``query`` sheet: version, command line, date, seed and every setting with its source."""
    rows = [("rcpick version", __version__, "rcpick"),
            ("command line", command_line(ctx), "rcpick"),
            ("date", datetime.datetime.now(datetime.timezone.utc).isoformat(timespec="seconds"), "rcpick"),
            ("seed used", seed, "rcpick")]
    rows += [(f"target: {name}", value, cfg.source_of(ctx, name)) for name, value in ctx.params.items()
             if name in ("tau", "cutoff", "delay", "threshold", "supply", "falling", "r", "c") and value not in (None, False)]
    rows += cfg.provenance(ctx, ctx.params)
    rows += list(extra)
    config_path = ctx.meta.get("rcpick.config")
    rows.append(("config file", config_path or "none", "rcpick"))
    return rows


def check_order(order: str | None, out: str | None, count: int) -> None:
    """--order needs --out, and every rank it names must be listed."""
    if order is not None and out is None:
        raise ClashingOptions("--order needs --out FILE (it picks the candidates for the order sheet)")
    parse_order(order, count)


def write_outputs(document: dict, *, out: str | None, sheet: str | None, order: str | None, boards: int | None,
                  spares: str | None, force: bool, stock, provenance_rows, quiet: bool) -> None:
    """Write --out (xlsx or csv) from the result document."""
    if out is None:
        return
    picks = parse_order(order, len(document["candidates"]))
    n_boards, extra = order_settings(boards, spares)
    sheets = {
        "shortlist": export.shortlist_rows(document),
        "order": export.order_rows(document, picks, n_boards, extra, stock),
        "query": export.query_rows(provenance_rows),
    }
    path = Path(out)
    if path.suffix.lower() == ".xlsx":
        export.write_xlsx(path, sheets, force)
        written = "shortlist, order, query"
    else:
        export.write_csv(path, sheets[sheet or "shortlist"], force)
        written = sheet or "shortlist"
    message = f"Wrote {path} ({written})"
    typer.echo(message, err=quiet)
