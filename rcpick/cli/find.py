"""``rcpick find``: search standard parts for a timing target."""

from __future__ import annotations

from dataclasses import dataclass

from pathlib import Path

import numpy as np
import typer

from rcpick import assess, combos, export, report, search, series
from rcpick.cli import config as cfg
from rcpick import target as targets
from rcpick.cli import exportopts as xo
from rcpick.cli import spreadopts as so
from rcpick.cli.common import (check_format, console, one_of, print_csv, print_json, progress_reporter, quantity,
                               reports_errors, table, warn)
from rcpick.errors import BadValue, ClashingOptions, UnknownName, Unreachable
from rcpick.notation import format_si, parse_percent, parse_quantity
from rcpick.stock import Stock

EPILOG = """[bold]Examples[/bold]

  rcpick find --tau 10ms

  rcpick find --cutoff 1.5kHz --r-series E96 --c-series E6

  rcpick find --delay 200ms --threshold 70% --fix-c 1u

  rcpick find --delay 2s --threshold 2.0V --supply 3.3V --r-parts 1

  rcpick find --delay 3s --threshold 50V --supply 400V --falling --c-min 10u --c-max 100u

  rcpick find --tau 1ms --dielectric C0G --r-tech thin-film --temp -40:85 --window 2%

  rcpick find --cutoff 10kHz --rank error --format json

[bold]Caution[/bold]: estimates only; verify on hardware. For discharge of stored
charge and hazardous-voltage work, follow the standard in force, local codes and
licensed practice.
"""

RANKINGS = assess.RANKINGS
MAX_TOP = 200


@dataclass(frozen=True)
class PositionDefaults:
    """Built-in search space of one position; the docs (docs/search.md) say why."""

    kind: str
    series: str
    low: str
    high: str


R_DEFAULTS = PositionDefaults("resistance", "E24", "1k", "1Meg")
C_DEFAULTS = PositionDefaults("capacitance", "E12", "100p", "10u")


def build_position(
    defaults: PositionDefaults, letter: str, series_name: str | None, low_text: str | None,
    high_text: str | None, max_parts: int | None, fix_text: str | None, stock: Stock | None = None,
) -> tuple[combos.Combos, str]:
    """Candidate set of one position and a one-line description of it.

    Options left at None take the built-in defaults; with a stock file that
    covers this kind of part, the stocked values replace the series.
    """
    unit = "Ω" if defaults.kind == "resistance" else "F"
    if fix_text is not None:
        given = {f"--{letter}-series": series_name, f"--{letter}-min": low_text,
                 f"--{letter}-max": high_text, f"--{letter}-parts": max_parts}
        for flag, value in given.items():
            if value is not None:
                raise ClashingOptions(f"--fix-{letter} and {flag} cannot be used together: a fixed value is not searched")
        value = parse_quantity(fix_text, defaults.kind, option=f"--fix-{letter}")
        return combos.fixed(value, defaults.kind), f"fixed at {format_si(value, unit, 4, trim=True)}"
    low = parse_quantity(low_text or defaults.low, defaults.kind, option=f"--{letter}-min")
    high = parse_quantity(high_text or defaults.high, defaults.kind, option=f"--{letter}-max")
    if low > high:
        raise BadValue(
            f"{format_si(low, unit, trim=True)} is above --{letter}-max {format_si(high, unit, trim=True)}",
            option=f"--{letter}-min")
    parts = 2 if max_parts is None else max_parts
    if parts not in (1, 2):
        raise BadValue(f"must be 1 or 2 (most parts per position), got {parts}", option=f"--{letter}-parts")
    span = f"{format_si(low, unit, trim=True)}…{format_si(high, unit, trim=True)}"
    pairs = "singles" if parts == 1 else "singles and pairs"
    if stock is not None and stock.covers(defaults.kind):
        values = np.array(sorted(stock.by_value(defaults.kind, low, high)))
        if len(values) == 0:
            raise BadValue(f"{stock.path} has no usable {letter.upper()} row inside {span} "
                           f"(--{letter}-min/--{letter}-max)", option="--stock")
        return combos.build(values, defaults.kind, parts, low, high), f"{len(values)} stocked values {span}, {pairs}"
    try:
        chosen = series.get(series_name or defaults.series)
    except UnknownName as error:
        raise error.for_option(f"--{letter}-series") from None
    values = chosen.values(low, high)
    if len(values) == 0:
        raise BadValue(f"no {chosen.name} value lies in {span}", option=f"--{letter}-min")
    return combos.build(values, defaults.kind, parts, low, high), f"{chosen.name} {span}, {pairs}"


def read_threshold(text: str, supply_v: float | None, falling: bool) -> float:
    """``--threshold`` as a fraction of the step: ``0.7``, ``70%`` or ``2.3V`` (with --supply)."""
    stripped = text.strip()
    try:
        if stripped.endswith("%"):
            level, is_voltage = parse_percent(stripped, option="--threshold"), False
        elif stripped[-1:] in ("V", "v"):
            level, is_voltage = parse_quantity(stripped, "voltage", option="--threshold"), True
        else:
            level, is_voltage = float(stripped), False
    except ValueError:
        raise BadValue(f"cannot read {text!r}; expected a fraction (0.7), a percent (70%) or a voltage (2.3V) with --supply",
                       option="--threshold", value=text) from None
    try:
        return targets.threshold_fraction(level, is_voltage=is_voltage, supply_v=supply_v, falling=falling)
    except BadValue as error:
        raise error.for_option("--threshold") from None


def build_target(tau, cutoff, delay, threshold, supply, falling, *, in_network: bool = False) -> targets.Target:
    """The target from the target options (exactly one kind).

    ``in_network``: a delay's threshold is read later against the network's own node (``findnet``),
    so it is only required here, and --supply/--falling are left to the network search to reject.
    """
    kind = one_of({"--tau": tau, "--cutoff": cutoff, "--delay": delay}, "target")
    if kind != "--delay":
        for flag, value in (("--threshold", threshold), ("--supply", supply), ("--falling", falling or None)):
            if value is not None:
                raise ClashingOptions(f"{flag} belongs to --delay, not {kind}")
    if kind == "--tau":
        return targets.for_tau(quantity(tau, "time", "--tau"))
    if kind == "--cutoff":
        return targets.for_cutoff(quantity(cutoff, "frequency", "--cutoff"))
    if threshold is None:
        raise ClashingOptions("--delay needs --threshold (0.7, 70% or a voltage with --supply)")
    delay_s = quantity(delay, "time", "--delay")
    if in_network:
        return targets.Target("delay", delay_s, "s", float("nan"))
    supply_v = quantity(supply, "voltage", "--supply")
    return targets.for_delay(delay_s, read_threshold(threshold, supply_v, falling), falling)


def target_line(target: targets.Target) -> str:
    """One line naming the target, e.g. ``delay 2.00 s to 86.5 % rising (tau 1.00 s)``."""
    if target.kind == "tau":
        return f"tau = {format_si(target.value, 's')}"
    if target.kind == "cutoff":
        return f"cutoff = {format_si(target.value, 'Hz')} (tau {format_si(target.tau_s, 's')})"
    direction = f"falling to {target.threshold:.4g} of the start" if target.falling else f"rising to {target.threshold:.4g} of the step"
    return f"delay = {format_si(target.value, 's')}, {direction} (tau {format_si(target.tau_s, 's')})"


def percent_text(error: float, decimals: int = 3) -> str:
    """Signed error in percent, with no "-0.000"."""
    text = f"{error * 100:+.{decimals}f} %"
    return text.replace("-", "+", 1) if float(text[:-2]) == 0 else text


def _rel(value: float, target: float) -> str:
    return f"{(value / target - 1) * 100:+.1f}"


def render_table(document: dict, target: targets.Target, r_desc: str, c_desc: str, notes: list[str]) -> None:
    """Print the shortlist as a rich table with a header line."""
    out = console()
    searched = document["searched"]
    total = searched["r_combinations"] * searched["c_combinations"]
    out.print(f"[bold]Target[/bold] {target_line(target)}", end="")
    if "window" in document["target"]:
        w = document["target"]["window"]
        out.print(f", window {format_si(w['low'], target.unit, 4)} … {format_si(w['high'], target.unit, 4)}")
    else:
        out.print()
    out.print(f"[bold]Searched[/bold] {searched['r_combinations']:,} R ({r_desc}) × "
              f"{searched['c_combinations']:,} C ({c_desc}) = {total:,} combinations")
    for note in notes:
        out.print(note)
    for message in document["warnings"]:
        out.print(f"[yellow]Warning:[/yellow] {message}")
    columns = [("#", "right"), ("R", "left"), ("C", "left"), ("R eff", "right"), ("C eff", "right"), ("tau", "right")]
    if target.kind != "tau":
        columns.append((target.kind, "right"))
    columns += [("error", "right"), ("worst case, %", "right"), ("MC 99.73 %, %", "right"), ("yield", "right"), ("parts", "right")]
    grid = table(*columns)
    for cand in document["candidates"]:
        cells = [str(cand["rank"]), cand["r"]["text"], cand["c"]["text"],
                 format_si(cand["r"]["ohm"], "Ω", 4, trim=True), format_si(cand["c"]["farad"], "F", 4, trim=True),
                 format_si(cand["tau_s"], "s", 4)]
        if target.kind != "tau":
            cells.append(format_si(cand["value"], target.unit, 4))
        sp = cand["spread"]
        cells += [percent_text(cand["error"]),
                  f"{_rel(sp['worst_min'], target.value)} … {_rel(sp['worst_max'], target.value)}",
                  f"{_rel(sp['p_low'], target.value)} … {_rel(sp['p_high'], target.value)}",
                  f"{sp['yield'] * 100:.1f} %", str(cand["parts"])]
        grid.add_row(*cells)
    out.print(grid)
    out.print("[dim]Wiring: a + b = in series, a ∥ b = in parallel, in the IEC 60062 RKM code (4K7 = 4.7 kΩ, 2u2 = 2.2 µF). "
              "Spread columns in % of the target: worst case over tolerance and temperature; Monte Carlo 0.135 %…99.865 % "
              "span; yield = units inside the window at every temperature checked.[/dim]")
    out.print("[dim]Estimates only: verify on hardware.[/dim]")


@reports_errors
def command(
    ctx: typer.Context,
    tau: str = typer.Option(None, "--tau", metavar="TIME", help="Target time constant R·C, e.g. 10ms.", rich_help_panel="Target (give one)"),
    cutoff: str = typer.Option(None, "--cutoff", metavar="FREQ", help="Target first-order corner frequency 1/(2πRC), e.g. 1.5kHz.", rich_help_panel="Target (give one)"),
    delay: str = typer.Option(None, "--delay", metavar="TIME", help="Target time from the step until the node crosses --threshold, e.g. 200ms.", rich_help_panel="Target (give one)"),
    threshold: str = typer.Option(None, "--threshold", metavar="LEVEL", help="Level for --delay: a fraction (0.7), a percent (70%) or a voltage (2.3V, needs --supply).", rich_help_panel="Target (give one)"),
    supply: str = typer.Option(None, "--supply", metavar="VOLTS", help="Step size in volts: the final value when charging, the start value with --falling.", rich_help_panel="Target (give one)"),
    falling: bool = typer.Option(False, "--falling", help="The node discharges from its start value down to --threshold.", rich_help_panel="Target (give one)"),
    r_series: str = typer.Option(None, "--r-series", metavar="SERIES", help="E-series for resistors \\[default: E24].", rich_help_panel="Resistor"),
    r_min: str = typer.Option(None, "--r-min", metavar="OHMS", help="Smallest resistor and smallest combined R \\[default: 1k].", rich_help_panel="Resistor"),
    r_max: str = typer.Option(None, "--r-max", metavar="OHMS", help="Largest resistor and largest combined R \\[default: 1Meg].", rich_help_panel="Resistor"),
    r_parts: int = typer.Option(None, "--r-parts", metavar="1|2", help="Most resistors in the R position: 1, or 2 for series/parallel pairs \\[default: 2].", rich_help_panel="Resistor"),
    fix_r: str = typer.Option(None, "--fix-r", metavar="OHMS", help="Use exactly this R (standard or not) and search only C.", rich_help_panel="Resistor"),
    c_series: str = typer.Option(None, "--c-series", metavar="SERIES", help="E-series for capacitors \\[default: E12].", rich_help_panel="Capacitor"),
    c_min: str = typer.Option(None, "--c-min", metavar="FARADS", help="Smallest capacitor and smallest combined C \\[default: 100p].", rich_help_panel="Capacitor"),
    c_max: str = typer.Option(None, "--c-max", metavar="FARADS", help="Largest capacitor and largest combined C \\[default: 10u].", rich_help_panel="Capacitor"),
    c_parts: int = typer.Option(None, "--c-parts", metavar="1|2", help="Most capacitors in the C position: 1 or 2 \\[default: 2].", rich_help_panel="Capacitor"),
    fix_c: str = typer.Option(None, "--fix-c", metavar="FARADS", help="Use exactly this C (standard or not) and search only R.", rich_help_panel="Capacitor"),
    r_tol: str = so.R_TOL, r_tcr: str = so.R_TCR, r_tech: str = so.R_TECH,
    c_tol: str = so.C_TOL, dielectric: str = so.DIELECTRIC, c_tc: str = so.C_TC,
    c_bias_loss: str = so.C_BIAS_LOSS, c_age: str = so.C_AGE, temp: str = so.TEMP, window: str = so.WINDOW,
    threshold_tol: str = so.THRESHOLD_TOL, dist: str = so.DIST, samples: int = so.SAMPLES, seed: int = so.SEED,
    rank: str = typer.Option("yield", "--rank", metavar="yield|error|spread", help="yield: highest yield (to 0.1 %) first, then fewer parts, then smaller |error|; error: smallest |nominal error|, then fewer parts, then lower R; spread: narrowest worst-case span."),
    top: int = typer.Option(10, "--top", metavar="N", help=f"How many candidates to list (1…{MAX_TOP})."),
    fmt: str = typer.Option("table", "--format", metavar="table|json|csv", help="Output: table, json or csv."),
    stock: str = xo.STOCK, out: str = xo.OUT, sheet: str = xo.SHEET, order: str = xo.ORDER,
    boards: int = xo.BOARDS, spares: str = xo.SPARES, force: bool = xo.FORCE, plot: str = xo.PLOT,
    config: Path = cfg.CONFIG_OPTION,
    net: str = typer.Option(None, "--net", metavar="FILE", help="Search inside a network: a netlist of R, C, V, I lines (see rcpick net).", rich_help_panel="Network"),
    vary: str = typer.Option(None, "--vary", metavar="NAMES", help="With --net: the elements to search, e.g. R1,C1 (one R and/or one C); the others keep their values.", rich_help_panel="Network"),
    node: str = typer.Option(None, "--node", metavar="NODE", help="With --net and --delay or --cutoff: the node whose response is timed.", rich_help_panel="Network"),
) -> None:
    """Find the standard R and C values (single parts or pairs) that best hit a timing target.

    The nominal search is exact. Each listed candidate gets its worst case and
    Monte Carlo spread over tolerance and temperature, and its yield inside the
    acceptance window; by default the list is ranked by yield.
    """
    check_format(fmt)
    if rank not in RANKINGS:
        raise BadValue(f"unknown ranking {rank!r}; accepted: {', '.join(RANKINGS)}", option="--rank", value=rank)
    if not 1 <= top <= MAX_TOP:
        raise BadValue(f"must be between 1 and {MAX_TOP}, got {top}", option="--top", value=top)
    xo.check_outputs(out, sheet, plot, force)
    xo.order_settings(boards, spares)
    if net is None and (vary is not None or node is not None):
        raise ClashingOptions(f"{'--vary' if vary is not None else '--node'} belongs to --net FILE")
    if net is not None:
        for flag, value in (("--fix-r", fix_r), ("--fix-c", fix_c)):
            if value is not None:
                raise ClashingOptions(f"--net and {flag} cannot be used together: elements not in --vary keep their netlist values")
    target = build_target(tau, cutoff, delay, threshold, supply, falling, in_network=net is not None)
    stocked = xo.load_stock(stock)
    # Project defaults never clash with --fix-r/--fix-c: only what was typed does.
    typed = {name: value if cfg.from_command_line(ctx, name) else None
             for name, value in dict(r_series=r_series, r_min=r_min, r_max=r_max, r_parts=r_parts,
                                     c_series=c_series, c_min=c_min, c_max=c_max, c_parts=c_parts).items()}
    if fix_r is None:
        typed.update(r_series=r_series, r_min=r_min, r_max=r_max, r_parts=r_parts)
    if fix_c is None:
        typed.update(c_series=c_series, c_min=c_min, c_max=c_max, c_parts=c_parts)
    r_set, r_desc = build_position(R_DEFAULTS, "r", typed["r_series"], typed["r_min"], typed["r_max"],
                                   typed["r_parts"], fix_r, stocked)
    c_set, c_desc = build_position(C_DEFAULTS, "c", typed["c_series"], typed["c_min"], typed["c_max"],
                                   typed["c_parts"], fix_c, stocked)
    settings = so.read_spread_options(
        r_series=r_series, r_tol=r_tol, r_tcr=r_tcr, r_tech=r_tech, c_tol=c_tol, dielectric=dielectric, c_tc=c_tc,
        c_bias_loss=c_bias_loss, c_age=c_age, temp=temp, window=window, threshold_tol=threshold_tol, dist=dist,
        samples=samples, seed=seed, delay_target=target.kind == "delay")
    if net is not None:
        from rcpick.cli import findnet

        document = findnet.run(net_file=net, vary=vary, target=target, node=node, threshold=threshold, supply=supply,
                               falling=falling, positions={"r": r_set, "c": c_set}, settings=settings,
                               stocked=stocked, rank=rank, top=top, threshold_tol=threshold_tol,
                               samples_given=samples is not None)
        show, csv_rows = (lambda: findnet.render(document)), export.shortlist_rows
    else:
        document, notes = plain_search(r_set, c_set, target, settings, stocked, rank, top)
        show, csv_rows = (lambda: render_table(document, target, r_desc, c_desc, notes)), report.flat_rows
    xo.check_order(order, out, len(document["candidates"]))
    if fmt == "json":
        print_json(document)
    elif fmt == "csv":
        for message in document["warnings"]:
            warn(message)
        print_csv(csv_rows(document))
    else:
        show()
    xo.write_outputs(document, out=out, sheet=sheet, order=order, boards=boards, spares=spares, force=force,
                     stock=stocked, provenance_rows=xo.provenance(ctx, settings.seed), quiet=fmt != "table")
    if plot is not None:
        from rcpick.plot import shortlist_png

        shortlist_png(document, Path(plot), force)
        typer.echo(f"Wrote {plot}", err=fmt != "table")


def plain_search(r_set, c_set, target, settings, stocked, rank: str, top: int) -> tuple[dict, list[str]]:
    """Search one R and one C position, analyse the spread, rank: the JSON document and notes for the table."""
    r_stocked = np.unique(np.concatenate([r_set.part_a, r_set.part_b[~np.isnan(r_set.part_b)]]))
    c_stocked = np.unique(np.concatenate([c_set.part_a, c_set.part_b[~np.isnan(c_set.part_b)]]))
    cond = assess.Conditions(settings.r_model, settings.c_model, settings.temp_c, settings.window,
                             settings.threshold_band, settings.dist, settings.samples, settings.seed,
                             xo.stock_models(stocked, "resistance", r_stocked, settings.r_model, settings),
                             xo.stock_models(stocked, "capacitance", c_stocked, settings.c_model, settings))
    warnings = settings.warnings + xo.stock_warnings(stocked, c_stocked, settings.temp_c)
    notes = []
    pool_info = None
    if rank == "error":
        candidates = search.best(r_set, c_set, target, top)
    else:
        pool = search.window_pool(r_set, c_set, target, settings.window)
        if len(pool.shortlist) == 0:
            raise Unreachable(f"no allowed combination has its nominal value inside the window "
                              f"{settings.window[0] * 100:+g} %…{settings.window[1] * 100:+g} %; widen --window or the "
                              f"ranges, or use --rank error")
        candidates = pool.shortlist
        pool_info = {"in_window": pool.in_window, "analysed": len(pool.shortlist), "capped": pool.capped,
                     "cap": search.POOL_CAP}
        if pool.capped:
            notes.append(f"[bold]Analysed[/bold] {len(pool.shortlist)} of {pool.in_window:,} combinations inside the "
                         f"window (cap {search.POOL_CAP}: an equal share per part count, smallest |error| first)")
    mc_count = len(candidates) if rank == "yield" else min(top, len(candidates))
    with progress_reporter(assess.evaluations(mc_count, cond), "Monte Carlo") as step:
        assessed = assess.assess(candidates, target, cond, rank, top, progress=step)
    analysis = {"rank": rank, "pool": pool_info, "settings": settings.as_dict(),
                "stock": stocked.path if stocked else None}
    return report.find_document(candidates, target, assessed, analysis, warnings), notes
