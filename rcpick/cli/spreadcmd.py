"""``rcpick spread``: worst case, Monte Carlo, yield and contributions of one design."""

from __future__ import annotations

from pathlib import Path

import numpy as np
import typer

from rcpick import assess, report, spread
from rcpick import target as targets
from rcpick.cli import config as cfg
from rcpick.cli import exportopts as xo
from rcpick.cli import spreadopts as so
from rcpick.cli.common import check_format, console, print_json, progress_reporter, reports_errors, table
from rcpick.cli.find import build_target, percent_text, target_line
from rcpick.combos import ARRANGEMENTS, Combos
from rcpick.errors import BadValue
from rcpick.notation import format_si, parse_arrangement
from rcpick.search import Shortlist

EPILOG = """[bold]Examples[/bold]

  rcpick spread --r 10k --c 100n

  rcpick spread --r 4k7+330 --c 47n//47n --tau 240us --dielectric C0G --temp -40:85

  rcpick spread --r 10k//10k --c 1u --delay 3.5ms --threshold 0.5 --window -5%:+10% --dist normal

[bold]Caution[/bold]: estimates only; verify on hardware. Where the timing matters to safety
(reset, discharge of stored charge), follow the standard in force, local codes and licensed practice.
"""

HISTOGRAM_ROWS = 24
BAR_WIDTH = 50


def _design(text: str, kind: str, option: str) -> Combos:
    arrangement, parts = parse_arrangement(text, kind, option=option)
    code = ARRANGEMENTS.index(arrangement)
    a, b = parts[0], parts[1] if len(parts) > 1 else float("nan")
    value = spread.combine(np.array([a]), np.array([b if len(parts) > 1 else 0.0]), np.array([code]), kind)
    return Combos(kind, value, np.array([code], dtype=np.int8), np.array([a]), np.array([b]))


def histogram_lines(counts: np.ndarray, edges: np.ndarray, marks: dict[str, float], unit: str) -> list[str]:
    """Rows of a horizontal histogram, with named values marked on the row holding them."""
    peak = max(int(counts.max()), 1)
    lines = []
    for i, count in enumerate(counts):
        lo, hi = edges[i], edges[i + 1]
        here = [name for name, value in marks.items() if lo <= value < hi or (i == len(counts) - 1 and value == hi)]
        bar = "█" * int(round(count / peak * BAR_WIDTH))
        label = f"{format_si((lo + hi) / 2, unit, 4):>10}"
        tag = f"  ◄ {', '.join(here)}" if here else ""
        lines.append(f"{label} │{bar:<{BAR_WIDTH}}│{tag}")
    return lines


@reports_errors
def command(
    ctx: typer.Context,
    r: str = typer.Option(..., "--r", metavar="PARTS", help="Resistor position: 4k7, 4k7+330 (series) or 10k//10k (parallel; || too)."),
    c: str = typer.Option(..., "--c", metavar="PARTS", help="Capacitor position: 100n, 47n+47n (series) or 47n//47n (parallel)."),
    tau: str = typer.Option(None, "--tau", metavar="TIME", help="Target time constant; without a target the spread is of tau, relative to nominal.", rich_help_panel="Target (optional)"),
    cutoff: str = typer.Option(None, "--cutoff", metavar="FREQ", help="Target first-order corner frequency.", rich_help_panel="Target (optional)"),
    delay: str = typer.Option(None, "--delay", metavar="TIME", help="Target delay to --threshold.", rich_help_panel="Target (optional)"),
    threshold: str = typer.Option(None, "--threshold", metavar="LEVEL", help="Level for --delay: 0.7, 70% or 2.3V with --supply.", rich_help_panel="Target (optional)"),
    supply: str = typer.Option(None, "--supply", metavar="VOLTS", help="Step size in volts (start value with --falling).", rich_help_panel="Target (optional)"),
    falling: bool = typer.Option(False, "--falling", help="The node discharges down to --threshold.", rich_help_panel="Target (optional)"),
    r_tol: str = so.R_TOL, r_tcr: str = so.R_TCR, r_tech: str = so.R_TECH,
    c_tol: str = so.C_TOL, dielectric: str = so.DIELECTRIC, c_tc: str = so.C_TC,
    c_bias_loss: str = so.C_BIAS_LOSS, c_age: str = so.C_AGE, temp: str = so.TEMP, window: str = so.WINDOW,
    threshold_tol: str = so.THRESHOLD_TOL, dist: str = so.DIST, samples: int = so.SAMPLES, seed: int = so.SEED,
    fmt: str = typer.Option("table", "--format", metavar="table|json", help="Output: table or json."),
    stock: str = xo.STOCK, out: str = xo.OUT, sheet: str = xo.SHEET, boards: int = xo.BOARDS,
    spares: str = xo.SPARES, force: bool = xo.FORCE, plot: str = xo.PLOT, config: Path = cfg.CONFIG_OPTION,
) -> None:
    """Analyse one design: worst case, Monte Carlo spread, yield, and what each source contributes."""
    check_format(fmt)
    if fmt == "csv":
        raise BadValue("spread prints table or json", option="--format", value=fmt)
    xo.check_outputs(out, sheet, plot, force)
    xo.order_settings(boards, spares)
    stocked = xo.load_stock(stock)
    r_set = _design(r, "resistance", "--r")
    c_set = _design(c, "capacitance", "--c")
    nominal_tau = float(r_set.value[0] * c_set.value[0])
    has_target = any(v is not None for v in (tau, cutoff, delay))
    target = build_target(tau, cutoff, delay, threshold, supply, falling) if has_target else targets.for_tau(nominal_tau)
    settings = so.read_spread_options(
        r_series=None, r_tol=r_tol, r_tcr=r_tcr, r_tech=r_tech, c_tol=c_tol, dielectric=dielectric, c_tc=c_tc,
        c_bias_loss=c_bias_loss, c_age=c_age, temp=temp, window=window if has_target else None,
        threshold_tol=threshold_tol, dist=dist, samples=samples, seed=seed, delay_target=target.kind == "delay")
    r_parts = [v for v in (r_set.part_a[0], r_set.part_b[0]) if not np.isnan(v)]
    c_parts = [v for v in (c_set.part_a[0], c_set.part_b[0]) if not np.isnan(v)]
    cond = assess.Conditions(settings.r_model, settings.c_model, settings.temp_c, settings.window,
                             settings.threshold_band, settings.dist, settings.samples, settings.seed,
                             xo.stock_models(stocked, "resistance", r_parts, settings.r_model, settings),
                             xo.stock_models(stocked, "capacitance", c_parts, settings.c_model, settings))
    warnings = settings.warnings + xo.stock_warnings(stocked, c_parts, settings.temp_c)
    shortlist = Shortlist(r_set, c_set, np.array([0]), np.array([0]))
    study = assess.study(shortlist, target, cond)
    worst_min, worst_max = (float(v[0]) for v in spread.worst_case(study))
    window_abs = assess.window_of(target, settings.window) if has_target else None
    low_edge = min(worst_min, window_abs[0]) if window_abs else worst_min
    high_edge = max(worst_max, window_abs[1]) if window_abs else worst_max
    pad = (high_edge - low_edge) * 0.02 or abs(high_edge) * 1e-6
    with progress_reporter(assess.evaluations(1, cond), "Monte Carlo") as step:
        mc = spread.monte_carlo(study, cond.samples, cond.seed, cond.dist, window=window_abs,
                                histogram_range=(low_edge - pad, high_edge + pad), bins=HISTOGRAM_ROWS, progress=step)
    shares = spread.contributions(study)[0]
    nominal = float(study.nominal[0])
    document = {
        "schema": report.SCHEMA_VERSION,
        "design": {"r": report.position_dict(r_set, 0, "ohm", study.r.models[0]),
                   "c": report.position_dict(c_set, 0, "farad", study.c.models[0])},
        "target": report.target_dict(target) if has_target else None,
        "quantity": target.kind if has_target else "tau",
        "unit": target.unit,
        "nominal": nominal,
        "tau_s": nominal_tau,
        "spread": {
            "worst_min": worst_min, "worst_max": worst_max,
            "p_low": float(mc.p_low[0]), "p_median": float(mc.p_median[0]), "p_high": float(mc.p_high[0]),
            "sigma": float(mc.sigma[0]),
            "yield": float(mc.yield_[0]) if mc.yield_ is not None else None,
        },
        "contributions": shares,
        "histogram": {"edges": mc.histogram[1].tolist(), "counts": mc.histogram[0].tolist()},
        "temperatures_c": mc.temperatures_c.tolist(),
        "reference_c": mc.reference_c,
        "settings": settings.as_dict(),
        "warnings": warnings,
        "stock": stocked.path if stocked else None,
    }
    if has_target:
        document["target"]["window"] = {"low": window_abs[0], "high": window_abs[1]}
        document["error"] = nominal / target.value - 1.0
    if fmt == "json":
        print_json(document)
    else:
        render(document, target, has_target, settings)
    xo.write_outputs(as_shortlist(document), out=out, sheet=sheet, order=None, boards=boards, spares=spares,
                     force=force, stock=stocked, provenance_rows=xo.provenance(ctx, settings.seed), quiet=fmt != "table")
    if plot is not None:
        from rcpick.plot import spread_png

        spread_png(document, Path(plot), force)
        typer.echo(f"Wrote {plot}", err=fmt != "table")


def as_shortlist(doc: dict) -> dict:
    """The analysed design as a one-candidate shortlist document, for export."""
    r, c = doc["design"]["r"], doc["design"]["c"]
    candidate = {"rank": 1, "r": r, "c": c, "tau_s": doc["tau_s"], "value": doc["nominal"],
                 "error": doc.get("error", 0.0), "parts": len(r["parts_ohm"]) + len(c["parts_farad"]),
                 "spread": {k: v for k, v in doc["spread"].items()}}
    target = doc["target"] or {"kind": "tau", "value": doc["nominal"], "unit": "s", "tau_s": doc["tau_s"]}
    return {"target": target, "unit": doc["unit"], "candidates": [candidate]}


def render(doc: dict, target: targets.Target, has_target: bool, settings) -> None:
    """Print the analysis of one design."""
    out = console()
    unit = doc["unit"]
    ref = target.value if has_target else doc["nominal"]
    ref_name = "target" if has_target else "nominal"
    out.print(f"[bold]Design[/bold] R = {doc['design']['r']['text']} ({format_si(doc['design']['r']['ohm'], 'Ω', 4, trim=True)}; "
              f"{settings.r_model.label})")
    out.print(f"       C = {doc['design']['c']['text']} ({format_si(doc['design']['c']['farad'], 'F', 4, trim=True)}; "
              f"{settings.c_model.label})")
    line = f"[bold]Over[/bold] {settings.temp_c[0]:g}…{settings.temp_c[1]:g} °C, {settings.samples:,} units ({settings.dist}, seed {settings.seed})"
    out.print(line)
    if has_target:
        w = doc["target"]["window"]
        out.print(f"[bold]Target[/bold] {target_line(target)}, window {format_si(w['low'], unit, 4)} … {format_si(w['high'], unit, 4)}")
    else:
        out.print("[bold]Quantity[/bold] tau (no target given: spread relative to nominal)")
    for message in doc["warnings"]:
        out.print(f"[yellow]Warning:[/yellow] {message}")
    sp = doc["spread"]
    grid = table(("", "left"), ("value", "right"), (f"vs {ref_name}", "right"))
    rows = [("nominal", doc["nominal"]), ("worst-case min", sp["worst_min"]), ("worst-case max", sp["worst_max"]),
            ("MC 0.135 %", sp["p_low"]), ("MC median", sp["p_median"]), ("MC 99.865 %", sp["p_high"])]
    for name, value in rows:
        grid.add_row(name, format_si(value, unit, 4), percent_text(value / ref - 1, 2))
    grid.add_row(f"MC σ at {doc['reference_c']:g} °C", format_si(sp["sigma"], unit, 3), f"{sp['sigma'] / ref * 100:.2f} %")
    if sp["yield"] is not None:
        grid.add_row("yield", f"{sp['yield'] * 100:.2f} %", "")
    out.print(grid)
    if sp["yield"] is not None:
        out.print("[dim]Yield: share of units inside the window at every checked temperature.[/dim]")
    out.print("[bold]Contributions[/bold] to the worst-case spread:")
    shares = table(("source", "left"), ("share", "right"), ("", "left"))
    for source, share in doc["contributions"].items():
        shares.add_row(source, f"{share * 100:.1f} %", "▇" * int(round(share * 40)))
    out.print(shares)
    marks = {"worst-case min": sp["worst_min"], "worst-case max": sp["worst_max"], "nominal": doc["nominal"]}
    if has_target:
        marks.update({"window low": doc["target"]["window"]["low"], "window high": doc["target"]["window"]["high"]})
    out.print(f"[bold]Monte Carlo distribution[/bold] (every unit at every checked temperature: "
              f"{', '.join(f'{t:g}' for t in doc['temperatures_c'])} °C)")
    for text in histogram_lines(np.array(doc["histogram"]["counts"]), np.array(doc["histogram"]["edges"]), marks, unit):
        out.print(text, highlight=False)
    out.print("[dim]Estimates only: verify on hardware.[/dim]")
