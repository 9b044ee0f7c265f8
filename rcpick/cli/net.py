"""``rcpick net``: order, natural time constants and step response of an RC network (parse → API → render)."""

from __future__ import annotations

import typer

from rcpick.cli import options as o
from rcpick.errors import NotReached
from rcpick.notation import format_si
from rcpick.specs import NetworkSpec

EPILOG = """[bold]Examples[/bold]

  rcpick net docs/examples/reset-divider.cir

  rcpick net docs/examples/debounce.cir --node key --threshold 2.0V

  rcpick net docs/examples/two-stage.cir --format json

Netlist lines: R1 a b 10k 1% 100ppm, C1 b 0 100n X7R 10%, V1 in 0 5 (a step 0 → 5 V at
t = 0), I1 a b 1m; @2.5V on a C line is its voltage at t = 0; * comments; node 0 is ground.
In rcpick's notation M is mega (also Meg); SPICE's M (milli) is not used.
[bold]Caution[/bold]: estimates only; verify on hardware.
"""


@o.reports_errors
def command(ctx: typer.Context, **values) -> None:
    """Order, natural time constants and step response of an RC network from a netlist.

    Sources are zeroed (V shorted, I opened) for the order and time constants;
    for the step response every source steps from 0 to its value at t = 0, and
    each capacitor starts at 0 V or at the voltage its line gives.
    """
    from rcpick.api import run_network

    fmt = o.check_format(values.pop("fmt"), ("table", "json"))
    spec = NetworkSpec.build(o.cli_layer(values))
    result = run_network(spec)
    doc = result.to_dict()
    if fmt == "json":
        o.print_json(doc)
    else:
        render({**doc, "warnings": [w for w in doc["warnings"] if w != result.unreached]})
    if result.unreached:
        o.say_error(NotReached(result.unreached, setting="threshold"))
        raise typer.Exit(2)


def render(doc: dict) -> None:
    out = o.console()
    out.print(f"[bold]Netlist[/bold] {doc['netlist']}: {doc['capacitors']} capacitor(s) drawn")
    for message in doc["warnings"]:
        out.print(f"[yellow]Warning:[/yellow] {message}")
    out.print(
        f"[bold]Order[/bold] {doc['order']} (finite nonzero natural frequencies, sources zeroed: "
        f"V shorted, I opened; parallel/series capacitors and capacitor-only loops or cutsets merge)"
    )
    if doc["time_constants_s"]:
        out.print("[bold]Time constants[/bold] " + ", ".join(format_si(t, "s", 4) for t in doc["time_constants_s"]))
    if "c_eq_farad" in doc:
        a, b = doc["port"]
        out.print(
            f"[bold]First order[/bold] C_eq = {format_si(doc['c_eq_farad'], 'F', 4)} across {a}–{b}, "
            f"R_th = {format_si(doc['r_th_ohm'], 'Ω', 4)} seen there; tau = R_th·C_eq = "
            f"{format_si(doc['r_th_ohm'] * doc['c_eq_farad'], 's', 4)}"
        )
    step = doc.get("step")
    if step:
        line = (
            f"[bold]Step at {step['node']}[/bold] v(0+) = {format_si(step['v0'], 'V', 4)}, "
            f"final {format_si(step['v_final'], 'V', 4)}"
        )
        if step["threshold_v"] is not None and step["t_threshold_s"] is not None:
            line += f"; reaches {format_si(step['threshold_v'], 'V', 4)} at {format_si(step['t_threshold_s'], 's', 4)}"
        out.print(line)
    out.print("[dim]Estimates only: verify on hardware.[/dim]")


command.__signature__ = o.signature(NetworkSpec.declared(), [o.FORMAT_NO_CSV], arguments=("file",))  # type: ignore[attr-defined]

app = typer.Typer(add_completion=False, rich_markup_mode="rich", pretty_exceptions_enable=False)
o.register(app, "net", command, EPILOG)
