"""Tables and texts on the terminal, fitted to its width.

Part values, the rank, the error, the worst case, the yield and the part
count are never cut: when a table is wider than the terminal, the least
important columns are left out first (R eff and C eff, then tau, then the
Monte Carlo span) and a note under the table says which.
"""

from __future__ import annotations

import math

from rcpick.cli.options import console
from rcpick.notation import format_percent, format_si

GAP = 2  # spaces between columns
WIRING_LEGEND = "Wiring: a + b in series, a ∥ b in parallel, in the IEC 60062 RKM code (4K7 = 4.7 kΩ, 2u2 = 2.2 µF)."
CAUTION = "Estimates only: verify on hardware."


def _rel(value: float | None, target: float) -> str:
    if value is None:
        return "never"
    return f"{(value / target - 1) * 100:+.1f}"


def _span(lo: float | None, hi: float | None, target: float) -> str:
    return f"{_rel(lo, target)}…{_rel(hi, target)}"


def yield_text(sp: dict) -> str:
    """``90.3 (89.9–90.7)``: the yield and its 95 % interval, in percent."""
    if sp.get("yield") is None:
        return "–"
    ci = sp.get("yield_ci")
    text = f"{sp['yield'] * 100:.1f}"
    if ci:
        text += f" ({ci[0] * 100:.1f}–{ci[1] * 100:.1f})"
    return text


def cell_width(text: str) -> int:
    """Columns a text takes in a terminal (every character rcpick prints is one column wide)."""
    return len(text)


def fit(columns: list[dict], rows: list[list[str]], width: int) -> tuple[list[int], list[str]]:
    """Indices of the columns to show at ``width``, and the names of those left out.

    Each column dict has ``name``, ``justify`` and ``drop`` (the order in which it may be left out; None for a
    column that is always shown).
    """

    def need(keep: list[int]) -> int:
        total = 0
        for i in keep:
            total += max([cell_width(columns[i]["name"])] + [cell_width(r[i]) for r in rows])
        return total + GAP * (len(keep) - 1)

    keep = list(range(len(columns)))
    dropped: list[str] = []
    for _, i in sorted((c["drop"], i) for i, c in enumerate(columns) if c["drop"] is not None):
        if need(keep) <= width:
            break
        keep.remove(i)
        dropped.append(columns[i]["name"])
    return keep, dropped


def print_table(out, columns: list[dict], rows: list[list[str]]) -> list[str]:
    """Print rows under the columns that fit the console, aligned, never cut; return the columns left out."""
    keep, dropped = fit(columns, rows, out.width)
    widths = [max([cell_width(columns[i]["name"])] + [cell_width(r[i]) for r in rows]) for i in keep]

    def line(cells: list[str]) -> str:
        parts = []
        for w, i, text in zip(widths, keep, cells):
            pad = " " * (w - cell_width(text))
            parts.append(pad + text if columns[i]["justify"] == "right" else text + pad)
        return (" " * GAP).join(parts).rstrip()

    out.print("[bold]" + line([columns[i]["name"] for i in keep]) + "[/bold]", soft_wrap=True)
    out.print("─" * (sum(widths) + GAP * (len(widths) - 1)), soft_wrap=True, markup=False)
    for row in rows:
        out.print(line([row[i] for i in keep]), soft_wrap=True, markup=False, highlight=False)
    return dropped


def find_table(result) -> None:
    """Print a search's shortlist: header, table, notes, ranking rule and recommendation."""
    out = console()
    doc = result.to_dict()
    target = result.target
    unit = target.unit
    window = doc["target"].get("window") or {}
    head = f"[bold]Target[/bold] {target.describe()}"
    if target.limit is not None:
        head += f"; every unit {'at or below' if target.limit == 'upper' else 'at or above'} it"
    elif window.get("low") is not None:
        head += f", window {format_si(window['low'], unit, 4)} … {format_si(window['high'], unit, 4)}"
    out.print(head)
    searched = doc["searched"]
    if result.network is not None:
        n = result.network
        out.print(
            f"[bold]Network[/bold] {n['netlist']}, varying {', '.join(n['vary'])}"
            + (f", timed at node {n['node']}" if n.get("node") else "")
        )
        out.print("[bold]Searched[/bold] " + " × ".join(f"{v:,} {k.split('_')[0]}" for k, v in searched.items()))
    else:
        total = searched["r_combinations"] * searched["c_combinations"]
        out.print(
            f"[bold]Searched[/bold] {searched['r_combinations']:,} R ({result.descriptions['r']}) × "
            f"{searched['c_combinations']:,} C ({result.descriptions['c']}) = {total:,} combinations"
        )
    out.print(f"[bold]Parts[/bold] R {result.descriptions['r_model']}; C {result.descriptions['c_model']}")
    for note in result.notes:
        out.print(note)
    for message in doc["warnings"]:
        out.print(f"[yellow]Warning:[/yellow] {message}")
    cands = doc["candidates"]
    rel = target.limit is None
    columns: list[dict] = [{"name": "#", "justify": "right", "drop": None}]
    if result.network is not None:
        for name in result.network["vary"]:
            columns.append({"name": name, "justify": "left", "drop": None})
    else:
        columns += [
            {"name": "R", "justify": "left", "drop": None},
            {"name": "C", "justify": "left", "drop": None},
            {"name": "R eff", "justify": "right", "drop": 1},
            {"name": "C eff", "justify": "right", "drop": 2},
            {"name": "tau", "justify": "right", "drop": 3},
        ]
    if target.kind != "tau" or result.network is not None:
        columns.append({"name": target.kind, "justify": "right", "drop": 5})
    columns += [
        {"name": "error, %" if rel else "vs limit, %", "justify": "right", "drop": None},
        {"name": "worst case, %", "justify": "right", "drop": None},
        {"name": "MC 99.73 %, %", "justify": "right", "drop": 4},
        {"name": "yield % (95 % CI)", "justify": "right", "drop": None},
        {"name": "parts", "justify": "right", "drop": None},
    ]
    if not rel:
        columns.insert(-2, {"name": "margin, %", "justify": "right", "drop": None})
    # a ratings column only when some design is over a derated rating (else the footer says all are within)
    rated = any(c.get("stress") and not c["stress"]["within_ratings"] for c in cands)
    if rated:
        columns.append({"name": "ratings", "justify": "left", "drop": None})
    priced = any(c.get("cost_per_board") is not None for c in cands)
    if priced:
        columns.append({"name": "cost", "justify": "right", "drop": 6})
    rows = []
    for cand in cands:
        sp = cand["spread"]
        row = [str(cand["rank"])]
        if result.network is not None:
            row += [cand["elements"][name]["text"] for name in result.network["vary"]]
        else:
            row += [
                cand["r"]["text"],
                cand["c"]["text"],
                format_si(cand["r"]["ohm"], "Ω", 4, trim=True),
                format_si(cand["c"]["farad"], "F", 4, trim=True),
                format_si(cand["tau_s"], "s", 4),
            ]
        if target.kind != "tau" or result.network is not None:
            row.append(format_si(cand["value"], unit, 4) if cand["value"] is not None else "never")
        mark = " !" if any("worst case" in f for f in cand["flags"]) else ""
        row += [
            format_percent(cand["error"], 3, signed=True)[:-2] if cand["error"] is not None else "–",
            _span(sp["worst_min"], sp["worst_max"], target.value) + mark,
            _span(sp["p_low"], sp["p_high"], target.value),
        ]
        if not rel:
            row.append(margin_text(sp, target))
        row += [yield_text(sp), str(cand["parts"])]
        if rated:
            found = cand.get("stress")
            row.append("–" if not found else ("ok" if found["within_ratings"] else "over"))
        if priced:
            row.append(f"{cand['cost_per_board']:.4g}" if cand.get("cost_per_board") is not None else "–")
        rows.append(row)
    dropped = print_table(out, columns, rows)
    foot = []
    if any(" !" in r[columns.index(next(c for c in columns if c["name"] == "worst case, %"))] for r in rows):
        foot.append("! the worst case leaves the window." if rel else "! the worst case does not meet the limit.")
    notes = [(c["rank"], f) for c in cands for f in c["flags"] if "worst case" not in f]
    for rank, flag in notes[:6]:
        foot.append(f"Rank {rank}: {flag}.")
    if len(notes) > 6:
        foot.append(f"… and {len(notes) - 6} more notes (--format json lists them).")
    if dropped:
        foot.append(f"Not shown at this width: {', '.join(dropped)} (widen the terminal, or use --format csv).")
    for cand in cands[:3]:
        stocked = [
            f"{d['rkm']} line {d['stock']['line']} ({d['part_number'] or 'no part number'})"
            for pos in ("r", "c")
            if cand.get(pos)
            for d in cand[pos]["parts_detail"]
            if d.get("stock")
        ]
        if stocked:
            foot.append(f"Rank {cand['rank']} from stock: {', '.join(stocked)}.")
    if cands and cands[0].get("stress"):
        if not rated:
            foot.append("Every listed design is within its derated ratings.")
        foot.append(stress_line(cands[0]))
    if not rel:
        foot.append("Margin: how far the worst case stays inside the limit, in % of the limit (negative: it misses).")
    legend = (
        WIRING_LEGEND + " Spread columns in % of the target: worst case over tolerance and temperature; "
        "Monte Carlo 0.135 %…99.865 % span; yield = units inside the window at every temperature checked, "
        "with its 95 % Wilson interval."
    )
    for line in foot:
        out.print(line)
    out.print(f"[dim]{legend}[/dim]")
    out.print(f"[dim]{result.rule}[/dim]")
    out.print(f"[bold]Recommendation[/bold] {result.recommendation}")
    out.print(f"[dim]{CAUTION}[/dim]")


def margin_text(sp: dict, target) -> str:
    """The worst case's margin to a one-sided limit, in % of the limit (positive: met)."""
    edge = sp["worst_max"] if target.limit == "upper" else sp["worst_min"]
    if edge is None:
        return "never"
    margin = (1 - edge / target.value) if target.limit == "upper" else (edge / target.value - 1)
    return f"{margin * 100:+.1f}"


def stress_line(cand: dict) -> str:
    """Rank 1's part stress in words: each part's power and voltage, the capacitor's voltage, stored energy."""
    st = cand["stress"]
    r_parts = cand["r"]["parts_detail"]
    bits = [f"{p['rkm']} {w:.3g} W at {v:.4g} V" for p, w, v in zip(r_parts, st["r_power_w"], st["r_voltage_v"])]
    c_bits = [f"{p['rkm']} at {v:.4g} V" for p, v in zip(cand["c"]["parts_detail"], st["c_voltage_v"])]
    text = f"Stress of rank 1 (at the first instant): R {', '.join(bits)}; C {', '.join(c_bits)}"
    if "energy_j" in st:
        text += f"; stored energy ½CV² = {st['energy_j']:.3g} J"
    ratings = st["ratings"]
    p_share, v_share = ratings["derate"]
    known = []
    if ratings["r_power_w"] is not None:
        known.append(f"{ratings['r_power_w']:g} W")
    if ratings["r_voltage_v"] is not None:
        known.append(f"{ratings['r_voltage_v']:g} V")
    if known:
        text += (
            f". Resistor ratings {' and '.join(known)} ({ratings['source']}), used to {p_share:.0%} of power "
            f"and {v_share:.0%} of voltage"
        )
    return text + " (--r-power, --r-voltage, --c-voltage, --derate)."


# --- one design -------------------------------------------------------------------

HISTOGRAM_ROWS = 24


def histogram_lines(counts, edges, marks: dict[str, float | None], unit: str, bar_width: int) -> list[str]:
    """Rows of a horizontal histogram, with named values marked on the row holding them."""
    peak = max(int(max(counts)), 1)
    lines = []
    for i, count in enumerate(counts):
        lo, hi = edges[i], edges[i + 1]
        here = [
            name
            for name, value in marks.items()
            if value is not None and (lo <= value < hi or (i == len(counts) - 1 and value == hi))
        ]
        bar = "█" * int(round(count / peak * bar_width))
        label = f"{format_si((lo + hi) / 2, unit, 4):>10}"
        tag = f"  ◄ {', '.join(here)}" if here else ""
        lines.append(f"{label} │{bar:<{bar_width}}│{tag}")
    return lines


def spread_report(result) -> None:
    """Print the analysis of one design."""
    out = console()
    doc = result.to_dict()
    unit = doc["unit"]
    target = result.target
    has_target = result.has_target
    ref = target.value if has_target else doc["nominal"]
    ref_name = "target" if has_target else "nominal"
    d = doc["design"]
    out.print(
        f"[bold]Design[/bold] R = {d['r']['text']} ({format_si(d['r']['ohm'], 'Ω', 4, trim=True)}; "
        f"{result.model_text['r']})"
    )
    out.print(
        f"       C = {d['c']['text']} ({format_si(d['c']['farad'], 'F', 4, trim=True)}; {result.model_text['c']})"
    )
    for pos, sym in (("r", "R"), ("c", "C")):
        for part in d[pos]["parts_detail"]:
            if part.get("part_number"):
                tol = part["tolerance"]
                out.print(
                    f"       {sym} {part['rkm']}: stock line {part['stock']['line'] if part.get('stock') else '?'}"
                    f" {part['part_number']}, {tol[0] * 100:+g}/{tol[1] * 100:+g} %"
                )
    cond = doc["analysis"]["settings"]
    out.print(
        f"[bold]Over[/bold] {cond['temp_c'][0]:g}…{cond['temp_c'][1]:g} °C, {cond['samples']:,} units "
        f"({cond['dist']}, seed {cond['seed']}, lot share {cond['lot_share']:g})"
    )
    if has_target:
        w = doc["target"]["window"]
        line = f"[bold]Target[/bold] {target.describe()}"
        if target.limit is None:
            line += f", window {format_si(w['low'], unit, 4)} … {format_si(w['high'], unit, 4)}"
        else:
            line += f"; every unit {'at or below' if target.limit == 'upper' else 'at or above'} it"
        out.print(line)
    else:
        out.print("[bold]Quantity[/bold] tau (no target given: spread relative to nominal)")
    for message in doc["warnings"]:
        out.print(f"[yellow]Warning:[/yellow] {message}")
    sp = doc["spread"]
    columns = [
        {"name": "", "justify": "left", "drop": None},
        {"name": "value", "justify": "right", "drop": None},
        {"name": f"vs {ref_name}", "justify": "right", "drop": None},
    ]
    rows = []
    for name, value in (
        ("nominal", doc["nominal"]),
        ("worst-case min", sp["worst_min"]),
        ("worst-case max", sp["worst_max"]),
        ("MC 0.135 %", sp["p_low"]),
        ("MC median", sp["p_median"]),
        ("MC 99.865 %", sp["p_high"]),
    ):
        if value is None:
            rows.append([name, "never", ""])
        else:
            rows.append([name, format_si(value, unit, 4), format_percent(value / ref - 1, 2, signed=True)])
    if sp["sigma"] is not None:
        rows.append(
            [f"MC σ at {doc['reference_c']:g} °C", format_si(sp["sigma"], unit, 3), f"{sp['sigma'] / ref * 100:.2f} %"]
        )
    if sp["yield"] is not None:
        ci = sp["yield_ci"]
        rows.append(["yield", f"{sp['yield'] * 100:.2f} %", f"95 %: {ci[0] * 100:.2f}…{ci[1] * 100:.2f} %"])
    if doc.get("period"):
        p = doc["period"]
        rows += [
            ["charging time", format_si(p["charge_s"], "s", 4), ""],
            ["discharging time", format_si(p["discharge_s"], "s", 4), ""],
            ["duty cycle (charging)", f"{p['duty_cycle'] * 100:.1f} %", ""],
        ]
    print_table(out, columns, rows)
    for flag in result.design.flags:
        out.print(f"Note: {flag}.")
    if doc.get("stress"):
        out.print(
            stress_line({"stress": doc["stress"], "r": doc["design"]["r"], "c": doc["design"]["c"]}).replace(
                "Stress of rank 1", "Stress"
            )
        )
    if sp["yield"] is not None:
        out.print(
            "[dim]Yield: share of units inside the window (or meeting the limit) at every checked temperature, "
            "with its 95 % Wilson interval.[/dim]"
        )
    out.print("[bold]Contributions[/bold] to the worst-case spread:")
    share_rows = [
        [
            source,
            "–" if share is None else f"{share * 100:.1f} %",
            "" if share is None else "▇" * int(round(share * 40)),
        ]
        for source, share in doc["contributions"].items()
    ]
    print_table(
        out,
        [
            {"name": "source", "justify": "left", "drop": None},
            {"name": "share", "justify": "right", "drop": None},
            {"name": "", "justify": "left", "drop": 1},
        ],
        share_rows,
    )
    marks = {"worst-case min": sp["worst_min"], "worst-case max": sp["worst_max"], "nominal": doc["nominal"]}
    if has_target:
        w = doc["target"]["window"]
        marks.update({"window low": w.get("low"), "window high": w.get("high")})
    temps = ", ".join(f"{t:g}" for t in doc["temperatures_c"])
    out.print(f"[bold]Monte Carlo distribution[/bold] (every unit at every checked temperature: {temps} °C)")
    bar_width = max(10, min(50, out.width - 44))
    for text in histogram_lines(doc["histogram"]["counts"], doc["histogram"]["edges"], marks, unit, bar_width):
        out.print(text, highlight=False, crop=False)
    out.print(f"[dim]{CAUTION}[/dim]")


def finite_or(value: float | None, text: str = "–") -> str:
    return text if value is None or not math.isfinite(value) else f"{value:g}"
