"""A planned board on the terminal: a table of timings, a table of line items, the saving, what was not met."""

from __future__ import annotations

import math

from rcpick.cli.options import console
from rcpick.cli.render import CAUTION, WIRING_LEGEND, print_table
from rcpick.notation import format_si


def _window_text(t) -> str:
    target = t.target
    if target is None:
        return "–"
    if target.limit == "upper":
        return f"≤ {format_si(target.value, target.unit, 3, trim=True)}"
    if target.limit == "lower":
        return f"≥ {format_si(target.value, target.unit, 3, trim=True)}"
    low, high = t.window[0] / target.value - 1, t.window[1] / target.value - 1
    if abs(low + high) < 1e-9:
        return f"±{high * 100:g} %"
    return f"{low * 100:+g}…{high * 100:+g} %"


def _target_text(t) -> str:
    target = t.target
    if target is None:
        return "–"
    return f"{target.kind} {format_si(target.value, target.unit, 3, trim=True)}"


def _percent(value: float | None, signed: bool = False) -> str:
    if value is None or not math.isfinite(value):
        return "never"
    return f"{value * 100:+.1f}" if signed else f"{value * 100:.1f}"


def _worst_text(design, t) -> str:
    sp = design.candidate.spread
    if sp.worst_min is None or sp.worst_max is None:
        return "never"
    v = t.target.value
    return f"{(sp.worst_min / v - 1) * 100:+.1f}…{(sp.worst_max / v - 1) * 100:+.1f}"


def _pieces(text: str, room: int, sep: str = " ") -> list[str]:
    """``text`` in lines of at most ``room`` characters, broken at spaces (a longer word is cut)."""
    import textwrap

    return textwrap.wrap(text, room, break_on_hyphens=False) or [""]


def _wrap_column(rows: list[list[str]], columns: list[dict], index: int, width: int, sep: str = " ") -> list[list[str]]:
    """Rows whose cells in column ``index`` are wrapped onto continuation rows so the table's fixed columns (those
    never left out) fit ``width``; unchanged when they fit already or too little room is left (16 characters)."""
    from rcpick.cli.render import GAP

    fixed = [i for i, c in enumerate(columns) if c["drop"] is None]
    widths = {i: max([len(columns[i]["name"])] + [len(r[i]) for r in rows]) for i in fixed}
    if sum(widths.values()) + GAP * (len(fixed) - 1) <= width:
        return rows
    room = width - sum(w for i, w in widths.items() if i != index) - GAP * (len(fixed) - 1)
    if room < 16:
        return rows
    out = []
    for row in rows:
        lines = _pieces(row[index], room, sep)
        out.append(row[:index] + [lines[0]] + row[index + 1 :])
        for line in lines[1:]:
            extra = [""] * len(row)
            extra[index] = line
            out.append(extra)
    return out


def _wrap_last(rows: list[list[str]], columns: list[dict], width: int) -> list[list[str]]:
    """Rows whose last cell (a list joined by ", ") is wrapped onto continuation rows to fit ``width``."""
    from rcpick.cli.render import GAP

    others = sum(max([len(columns[i]["name"])] + [len(r[i]) for r in rows]) for i in range(len(columns) - 1))
    room = width - others - GAP * (len(columns) - 1)
    if room < 16:
        return rows  # too narrow to wrap usefully: the table leaves the column out instead
    out = []
    for row in rows:
        lines = _pieces(row[-1], room, ", ")
        out.append(row[:-1] + [lines[0]])
        out += [[""] * (len(row) - 1) + [line] for line in lines[1:]]
    return out


def board_report(result) -> None:
    """Print a planned board."""
    out = console()
    board = result.board
    title = f"[bold]Board[/bold] {board.name + ' — ' if board.name else ''}{board.path}"
    out.print(title)
    specs = [(t, t.pool.timing.spec) for t in result.timings]
    if board.require == "worst-case":
        need = "every timing's worst case inside its window or limit"
    else:
        levels: dict[float, list[str]] = {}
        for t, spec in specs:
            levels.setdefault(spec.min_yield, []).append(t.name)
        common = max(levels, key=lambda y: len(levels[y]))
        need = f"yield at or above {common * 100:g} %"
        others = [f"{y * 100:g} % for {', '.join(names)}" for y, names in levels.items() if y != common]
        if others:
            need += f" ({'; '.join(others)})"
    plain = sorted({spec.conditions().samples for _, spec in specs if spec.net is None})
    nets = sorted({spec.conditions(network=True).samples for _, spec in specs if spec.net is not None})
    units = ", ".join(f"{n:,}" for n in plain or nets)
    if plain and nets and nets != plain:
        units += f" ({', '.join(f'{n:,}' for n in nets)} for netlist timings)"
    out.print(
        f"[bold]Requirement[/bold] {need}; Monte Carlo {units} units per design; "
        f"pools of up to {board.pool} designs per source (docs/board.md)"
    )
    out.print()
    columns: list[dict] = [
        {"name": "Timing", "justify": "left", "drop": None},
        {"name": "Target", "justify": "left", "drop": None},
        {"name": "Window", "justify": "left", "drop": 3},
        {"name": "Design", "justify": "left", "drop": None},
        {"name": "Yield %", "justify": "right", "drop": None},
        {"name": "Worst case %", "justify": "right", "drop": 1},
        {"name": "Margin %", "justify": "right", "drop": 2},
        {"name": "Parts", "justify": "right", "drop": None},
    ]
    rows = []
    for t in result.timings:
        shown = t.design or t.closest
        name = t.name if t.count == 1 else f"{t.name} ×{t.count}"
        if shown is None:
            rows.append([name, _target_text(t), _window_text(t), "none", "–", "–", "–", "–"])
            continue
        design = shown.candidate.wiring + ("" if t.met else " (not met)")
        rows.append(
            [
                name,
                _target_text(t),
                _window_text(t),
                design,
                _percent(shown.candidate.spread.yield_),
                _worst_text(shown, t),
                _percent(shown.margin, signed=True),
                str(len(shown.parts) * t.count),
            ]
        )
    dropped = print_table(out, columns, _wrap_column(rows, columns, 0, out.width))
    if dropped:
        out.print(
            f"[dim](not shown at this width: {', '.join(dropped)}; widen the terminal or use --format json)[/dim]"
        )
    span = "worst case" if board.require == "worst-case" else "Monte Carlo 0.135 %…99.865 % span"
    out.print(
        f"[dim]Parts: on the board (× count, a netlist's fixed parts included). Margin: the {span}'s distance "
        f"from the nearer end of the window, % of the target.[/dim]"
    )
    out.print()
    have_count = sum(1 for item in result.line_items if item.have)
    head = f"[bold]Line items[/bold] {result.distinct_line_items}"
    if have_count:
        head += f" ({have_count} already on the board)"
    out.print(head)
    item_columns: list[dict] = [
        {"name": "Kind", "justify": "left", "drop": None},
        {"name": "Value", "justify": "left", "drop": None},
        {"name": "Model", "justify": "left", "drop": 2},
        {"name": "Per board", "justify": "right", "drop": None},
        {"name": "Used by", "justify": "left", "drop": 1},
    ]
    from rcpick.boardplan import model_text

    item_rows = []
    for item in result.line_items:
        used = ", ".join(n if q == 1 else f"{n} ({q})" for n, q in item.used_by.items())
        item_rows.append(
            [
                item.kind_letter,
                item.part.rkm + (" *" if item.have else ""),
                model_text(item.rated),
                str(item.per_board),
                used,
            ]
        )
    dropped = print_table(out, item_columns, _wrap_last(item_rows, item_columns, out.width))
    if dropped:
        out.print(f"[dim](not shown at this width: {', '.join(dropped)})[/dim]")
    if have_count:
        out.print("[dim]* already on the board (have): no new line item[/dim]")
    out.print()
    saving = result.greedy_items - result.distinct_line_items
    margin = result.smallest_margin
    summary = (
        f"[bold]Joint choice[/bold] {result.distinct_line_items} line items"
        + (f" ({result.new_line_items} new)" if have_count else "")
        + f", {result.parts_per_board} parts per board"
    )
    if margin is not None and math.isfinite(margin):
        summary += f", smallest margin {margin * 100:+.1f} %"
    summary += (
        f". Each timing's own rank 1 would take {result.greedy_items} line items and "
        f"{result.greedy_parts} parts"
        + (f": {saving} line item{'s' if saving != 1 else ''} saved." if saving > 0 else ".")
    )
    out.print(summary)
    if result.choice is not None and result.choice.proven:
        out.print(
            "[dim]Optimal within the pools: an integer program (scipy's HiGHS MILP), one stage per objective: "
            "new line items, then parts, then the smallest margin.[/dim]"
        )
    elif result.choice is not None:
        out.print(
            "[yellow]Not proven optimal:[/yellow] the solver stopped at its time limit; this is the best choice it "
            "found. A smaller --pool proves faster."
        )
    for t in result.unmet:
        why = t.pool.unreachable or (t.closest.why_not if t.closest else "no design in the pool")
        closest = f"; closest {t.closest.candidate.wiring}" if t.closest is not None else ""
        hint = (
            ""
            if t.pool.unreachable
            else "; a wider window, tighter tolerances (r-tol, c-tol) or a stabler dielectric (C0G) may meet it"
        )
        out.print(f"[yellow]Not met[/yellow] {t.name}: {why}{closest}. The other timings are planned without it{hint}.")
    for message in result.warnings:
        out.print(f"[yellow]Warning[/yellow] {message}")
    out.print(f"[dim]{WIRING_LEGEND}[/dim]")
    out.print(f"[dim]{CAUTION}[/dim]")
