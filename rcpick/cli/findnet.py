"""``rcpick find --net FILE --vary R1,C1``: standard values for chosen elements of a network."""

from __future__ import annotations

import numpy as np

from rcpick import models, netsearch
from rcpick import stock as stocks
from rcpick.cli.common import console, progress_reporter, table
from rcpick.cli.net import read_level
from rcpick.combos import ARRANGEMENTS
from rcpick.errors import BadValue, ClashingOptions
from rcpick.netlist import Netlist, read
from rcpick.notation import format_si
from rcpick.report import SCHEMA_VERSION, part_detail, wiring_text

#: Candidates given a spread analysis when ranking a network search by yield or spread.
NET_POOL = 12
#: Monte Carlo units per candidate with --net unless --samples is given (each unit costs network solves).
NET_SAMPLES = 2000


def parse_vary(text: str | None, net: Netlist) -> list[str]:
    """``R1,C1`` → element names; one or two, at most one resistor and one capacitor."""
    if not text:
        raise ClashingOptions("--net needs --vary NAMES (the elements to search, e.g. R1,C1)")
    names = [n.strip() for n in text.split(",") if n.strip()]
    found = []
    for name in names:
        element = net.get(name)
        if element is None:
            listed = ", ".join(e.name for e in net.elements if e.letter in "RC")
            raise BadValue(f"no element {name!r} in {net.path}; its R and C elements: {listed}", option="--vary", value=text)
        if element.letter not in "RC":
            raise BadValue(f"{element.name} is a source; only R and C elements can be varied", option="--vary", value=text)
        found.append(element)
    letters = [e.letter for e in found]
    if not 1 <= len(found) <= 2 or len(set(letters)) != len(letters):
        raise BadValue(f"give one or two elements, at most one R and one C, got {text!r}", option="--vary", value=text)
    return [e.name for e in found]


def quantity_for(target, node: str | None, threshold: str | None, supply, falling, net: Netlist) -> netsearch.Quantity:
    """What to measure on the network for the target options."""
    if supply is not None or falling:
        raise ClashingOptions("--supply and --falling do not apply with --net: the netlist's sources set the step")
    if target.kind != "delay" and threshold is not None:
        raise ClashingOptions(f"--threshold belongs to --delay, not --{target.kind}")
    if target.kind == "tau":
        if node is not None:
            raise ClashingOptions("--node applies to --cutoff and --delay with --net; --tau is the network's dominant time constant")
        return netsearch.Quantity("tau")
    if node is None:
        raise ClashingOptions(f"--{target.kind} with --net needs --node (the node whose response is timed)")
    if node not in net.nodes:
        raise BadValue(f"no node {node!r} in {net.path}; nodes: {', '.join(net.nodes)}", option="--node", value=node)
    if target.kind == "cutoff":
        return netsearch.Quantity("cutoff", node)
    level, is_volts = read_level(threshold)
    return netsearch.Quantity("delay", node, level, is_volts)


def model_maker(settings, stocked: stocks.Stock | None, varied: set[str]):
    """A function (element, part value) → PartModel: the netlist's own parameters, then stock, then defaults."""

    def model_for(element, value):
        if element.name.upper() in varied and stocked is not None:
            kind = "resistance" if element.letter == "R" else "capacitance"
            part = stocked.find(kind, float(value))
            if part is not None:
                base = settings.r_model if element.letter == "R" else settings.c_model
                return stocks.part_model(part, base, aging_hours=settings.aging_hours, loss=settings.loss)
        p = element.params
        if element.letter == "R":
            drift = settings.r_model.drift
            name = settings.r_model.name
            if "tech" in p:
                _, drift, _ = models.resistor_technology(p["tech"])
                name = p["tech"]
            if "tcr" in p:
                drift, name = models.linear(*p["tcr"]), "netlist TCR"
            return models.PartModel(p.get("tol", settings.r_model.tolerance), drift, label=element.name, name=name)
        if "dielectric" in p:
            diel = models.dielectric(p["dielectric"])
            aging = models.aging_change(diel.aging_per_decade, settings.aging_hours) if settings.aging_hours else (0.0, 0.0)
            drift = models.linear(*p["tc"], rated_c=diel.drift.rated_c) if "tc" in p else diel.drift
            return models.PartModel(p.get("tol", diel.tolerance), drift, aging, settings.loss, label=element.name,
                                    name=diel.code)
        base = settings.c_model
        drift = models.linear(*p["tc"]) if "tc" in p else base.drift
        return models.PartModel(p.get("tol", base.tolerance), drift, base.aging, base.loss, label=element.name,
                                name=base.name)

    return model_for


def pooled_search(net, varied, quantity, target_value, size):
    """The best candidates by |error| with an equal share for each mix of single parts and pairs,
    so single-part designs are never crowded out by pairs (the candidates then ranked by spread)."""
    import itertools

    from rcpick.errors import Unreachable
    from rcpick.search import subset

    groups = list(itertools.product([True, False], repeat=len(varied)))
    share = max(1, size // len(groups))
    found = []
    for singles in groups:
        subsets, maps = [], []
        for v, single in zip(varied, singles):
            sub, index = subset(v.combos, (v.combos.parts == 1) == single)
            subsets.append(netsearch.Varied(v.name, sub))
            maps.append(index)
        if any(len(s.combos) == 0 for s in subsets):
            continue
        try:
            part = netsearch.search(net, subsets, quantity, target_value, share)
        except Unreachable:
            continue
        index = np.column_stack([maps[k][part.index[:, k]] for k in range(len(varied))])
        found.append((index, part.value, part.error))
    if not found:
        return netsearch.search(net, varied, quantity, target_value, size)
    index = np.concatenate([f[0] for f in found])
    return netsearch.NetShortlist(tuple(varied), index, np.concatenate([f[1] for f in found]),
                                  np.concatenate([f[2] for f in found]))


def run(*, net_file: str, vary: str | None, target, node, threshold, supply, falling, positions, settings, stocked,
        rank: str, top: int, threshold_tol, samples_given: bool = False):
    """Search and analyse; returns the JSON document (the same shape as plain ``find``'s, see docs/json.md)."""
    if threshold_tol is not None:
        raise ClashingOptions("--threshold-tol is not supported with --net")
    net = read(net_file)
    names = parse_vary(vary, net)
    if not samples_given:
        from dataclasses import replace

        settings = replace(settings, samples=NET_SAMPLES)
    quantity = quantity_for(target, node, threshold, supply, falling, net)
    varied = []
    for name in names:
        element = net.get(name)
        varied.append(netsearch.Varied(element.name, positions["r" if element.letter == "R" else "c"]))
    if rank == "error":
        shortlist = netsearch.search(net, varied, quantity, target.value, top)
    else:
        shortlist = pooled_search(net, varied, quantity, target.value, max(top, NET_POOL))
    model_for = model_maker(settings, stocked, {n.upper() for n in names})
    window = (target.value * (1 + settings.window[0]), target.value * (1 + settings.window[1]))
    rows = list(range(len(shortlist.value)))
    if rank == "error":
        rows = rows[:top]
    spreads = {}
    total = len(rows) * settings.samples * 5
    with progress_reporter(total, "Monte Carlo") as step:
        for i in rows:
            parts, wiring = netsearch.design_parts(net, shortlist, i, model_for)
            spreads[i] = netsearch.spread_of(net, parts, wiring, quantity, settings.temp_c, settings.samples,
                                             settings.seed, settings.dist, window)
            if step:
                step(settings.samples * 5)
    abs_err = np.round(np.abs(shortlist.error), 12)
    parts_count = shortlist.parts
    if rank == "yield":
        rows.sort(key=lambda i: (-round(spreads[i]["yield"], 3), int(parts_count[i]), abs_err[i]))
    elif rank == "spread":
        rows.sort(key=lambda i: (round((spreads[i]["worst_max"] - spreads[i]["worst_min"]) / target.value, 9),
                                 int(parts_count[i]), abs_err[i]))
    rows = rows[:top]
    candidates = []
    for rank_no, i in enumerate(rows, start=1):
        cand = {"rank": rank_no, "value": float(shortlist.value[i]), "error": float(shortlist.error[i]),
                "parts": int(parts_count[i]), "elements": {}, "spread": spreads[i]}
        design, _ = netsearch.design_parts(net, shortlist, i, model_for)
        for k, v in enumerate(shortlist.varied):
            idx = int(shortlist.index[i, k])
            kind = v.combos.kind
            unit_key = "ohm" if kind == "resistance" else "farad"
            entry = {unit_key: float(v.combos.value[idx]), "arrangement": ARRANGEMENTS[int(v.combos.wiring[idx])],
                     f"parts_{unit_key}": v.combos.parts_of(idx), "text": wiring_text(v.combos, idx),
                     "parts_detail": [part_detail(kind, p.value, p.model) for p in design[v.name]]}
            cand["elements"][v.name] = entry
            cand["r" if kind == "resistance" else "c"] = entry
        candidates.append(cand)
    doc = {
        "schema": SCHEMA_VERSION,
        "target": {"kind": target.kind, "value": target.value, "unit": target.unit,
                   "window": {"low": window[0], "high": window[1]}},
        "network": {"netlist": net.path, "vary": names, "node": node, "quantity": quantity.kind,
                    "level": quantity.level, "level_is_volts": quantity.level_is_volts},
        "searched": {f"{v.name}_combinations": len(v.combos) for v in varied},
        "analysis": {"rank": rank, "analysed": len(spreads), "settings": settings.as_dict(),
                     "stock": stocked.path if stocked else None},
        "warnings": list(net.warnings) + list(settings.warnings),
        "candidates": candidates,
    }
    return doc


def render(doc: dict) -> None:
    """Print a network search's shortlist."""
    out = console()
    t = doc["target"]
    n = doc["network"]
    what = {"tau": "dominant time constant", "delay": f"delay at node {n['node']}", "cutoff": f"−3 dB corner at node {n['node']}"}
    out.print(f"[bold]Network[/bold] {n['netlist']}, varying {', '.join(n['vary'])}: {what[n['quantity']]} = "
              f"{format_si(t['value'], t['unit'])}, window {format_si(t['window']['low'], t['unit'], 4)} … "
              f"{format_si(t['window']['high'], t['unit'], 4)}")
    out.print("[bold]Searched[/bold] " + " × ".join(f"{v:,} {k.split('_')[0]}" for k, v in doc["searched"].items()))
    for message in doc["warnings"]:
        out.print(f"[yellow]Warning:[/yellow] {message}")
    columns = [("#", "right")] + [(name, "left") for name in n["vary"]] + [
        (doc["network"]["quantity"], "right"), ("error", "right"), ("worst case, %", "right"), ("MC 99.73 %, %", "right"),
        ("yield", "right"), ("parts", "right")]
    grid = table(*columns)
    for cand in doc["candidates"]:
        sp = cand["spread"]
        rel = lambda v: f"{(v / t['value'] - 1) * 100:+.1f}"  # noqa: E731
        grid.add_row(str(cand["rank"]), *[cand["elements"][name]["text"] for name in n["vary"]],
                     format_si(cand["value"], t["unit"], 4), f"{cand['error'] * 100:+.3f} %",
                     f"{rel(sp['worst_min'])} … {rel(sp['worst_max'])}", f"{rel(sp['p_low'])} … {rel(sp['p_high'])}",
                     f"{sp['yield'] * 100:.1f} %", str(cand["parts"]))
    out.print(grid)
    out.print("[dim]Other elements keep their netlist values. Estimates only: verify on hardware.[/dim]")
