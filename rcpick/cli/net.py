"""``rcpick net``: order, natural time constants and step response of an RC network."""

from __future__ import annotations

import numpy as np
import typer

from rcpick import network
from rcpick.cli.common import check_format, console, print_json, reports_errors
from rcpick.errors import BadValue
from rcpick.netlist import Netlist, read
from rcpick.notation import format_si, parse_percent, parse_quantity

EPILOG = """[bold]Examples[/bold]

  rcpick net docs/examples/reset-divider.cir

  rcpick net docs/examples/debounce.cir --node key --threshold 2.0V

  rcpick net docs/examples/two-stage.cir --format json

Netlist lines: R1 a b 10k, C1 b 0 100n, V1 in 0 5 (a step 0 → 5 V at t = 0), I1 a b 1m;
* comments; node 0 is ground. In rcpick's notation M is mega (also Meg); SPICE's
M (milli) is not used. [bold]Caution[/bold]: estimates only; verify on hardware.
"""


def read_level(text: str) -> tuple[float, bool]:
    """``--threshold`` for a network node: (volts, True) for ``2.0V``, (fraction, False) for ``0.7`` or ``70%``."""
    stripped = text.strip()
    if stripped[-1:] in ("V", "v"):
        return parse_quantity(stripped, "voltage", option="--threshold", positive=False), True
    try:
        fraction = parse_percent(stripped, option="--threshold") if stripped.endswith("%") else float(stripped)
    except ValueError:
        raise BadValue(f"cannot read {text!r}; expected 0.7, 70% or a voltage such as 2.0V", option="--threshold",
                       value=text) from None
    if not 0 < fraction < 1:
        raise BadValue(f"a fractional threshold must lie strictly between 0 and 1, got {fraction:g}", option="--threshold")
    return fraction, False


def threshold_volts(text: str, v0: float, v_final: float) -> float:
    """``--threshold`` as volts: ``2.0V``, or a fraction/percent of the node's final value
    (of its value just after the step when it decays towards 0)."""
    level, is_volts = read_level(text)
    if is_volts:
        return level
    return float(network.fractional_level(level, v0, v_final))


def node_step(net: Netlist, node: str, threshold: str | None) -> dict:
    """The ``step`` member: v(0+), final value and the threshold crossing at ``node``."""
    if node not in net.nodes:
        raise BadValue(f"no node {node!r} in {net.path}; nodes: {', '.join(net.nodes)}", option="--node", value=node)
    resp = network.step_response(net)
    v0 = float(resp.initial(node)[0])
    v_final = float(resp.final(node)[0])
    out = {"node": node, "v0": v0, "v_final": v_final, "threshold_v": None, "t_threshold_s": None}
    if threshold is not None:
        level = threshold_volts(threshold, v0, v_final)
        taus = network.time_constants(net)[0]
        horizon = 30 * (float(taus[0]) if len(taus) else 1.0)
        t = float(network.crossing_time(resp, node, np.array([level]), np.array([horizon]))[0])
        out["threshold_v"] = level
        out["t_threshold_s"] = None if np.isnan(t) else t
    return out


def analyse(net: Netlist, node: str | None = None, threshold: str | None = None) -> dict:
    """The JSON document of ``rcpick net`` (docs/json.md)."""
    taus = network.time_constants(net)[0]
    doc = {
        "netlist": net.path,
        "capacitors": len(net.of("C")),
        "order": int(len(taus)),
        "time_constants_s": [float(t) for t in taus],
        "warnings": list(net.warnings),
    }
    first = network.first_order(net) if len(taus) == 1 else None
    if first is not None:
        doc.update(c_eq_farad=first.c_eq_farad, r_th_ohm=first.r_th_ohm, port=list(first.port))
    if node is not None:
        doc["step"] = node_step(net, node, threshold)
    elif threshold is not None:
        raise BadValue("--threshold needs --node (the node whose crossing is timed)", option="--threshold")
    return doc


@reports_errors
def command(
    file: str = typer.Argument(..., metavar="FILE", help="Netlist of R, C, V and I element lines."),
    node: str = typer.Option(None, "--node", metavar="NODE", help="Report the step response at this node."),
    threshold: str = typer.Option(None, "--threshold", metavar="LEVEL", help="With --node: time to reach this level: 2.0V, or 0.7 / 70% of the node's final value."),
    fmt: str = typer.Option("table", "--format", metavar="table|json", help="Output: table or json."),
) -> None:
    """Order, natural time constants and step response of an RC network from a netlist.

    Sources are zeroed (V shorted, I opened) for the order and time constants;
    for the step response every source steps from 0 to its value at t = 0.
    """
    check_format(fmt)
    if fmt == "csv":
        raise BadValue("net prints table or json", option="--format", value=fmt)
    net = read(file)
    doc = analyse(net, node, threshold)
    if fmt == "json":
        print_json(doc)
        return
    out = console()
    out.print(f"[bold]Netlist[/bold] {net.path}: {len(net.elements)} elements, {doc['capacitors']} capacitor(s) drawn")
    for message in doc["warnings"]:
        out.print(f"[yellow]Warning:[/yellow] {message}")
    out.print(f"[bold]Order[/bold] {doc['order']} (finite nonzero natural frequencies, sources zeroed: "
              f"V shorted, I opened; parallel/series capacitors and capacitor-only loops or cutsets merge)")
    if doc["time_constants_s"]:
        out.print("[bold]Time constants[/bold] " + ", ".join(format_si(t, "s", 4) for t in doc["time_constants_s"]))
    if "c_eq_farad" in doc:
        a, b = doc["port"]
        out.print(f"[bold]First order[/bold] C_eq = {format_si(doc['c_eq_farad'], 'F', 4)} across {a}–{b}, "
                  f"R_th = {format_si(doc['r_th_ohm'], 'Ω', 4)} seen there; tau = R_th·C_eq = "
                  f"{format_si(doc['r_th_ohm'] * doc['c_eq_farad'], 's', 4)}")
    step = doc.get("step")
    if step:
        line = (f"[bold]Step at {step['node']}[/bold] v(0+) = {format_si(step['v0'], 'V', 4)}, "
                f"final {format_si(step['v_final'], 'V', 4)}")
        if step["threshold_v"] is not None:
            when = format_si(step["t_threshold_s"], "s", 4) if step["t_threshold_s"] is not None else "never"
            line += f"; reaches {format_si(step['threshold_v'], 'V', 4)} at {when}"
        out.print(line)
    out.print("[dim]Estimates only: verify on hardware.[/dim]")
