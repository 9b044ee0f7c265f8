"""Write small SPICE netlists for rcpick's candidates and run them in ngspice (batch mode).

Source of the check: ngspice (Debian package ``ngspice``, 39.x), a circuit
simulator independent of rcpick. ``.ci/run`` installs it and sets CI, where a
missing ngspice fails these tests; on a developer's machine without it they
are skipped with the reason shown.
"""

from __future__ import annotations

import os
import re
import shutil
import subprocess
from pathlib import Path

import pytest

LEAK_OHM = 1e15  # gives the node between two series capacitors a DC path; negligible in time


def ngspice() -> str:
    """Path of ngspice. Missing ngspice fails under CI (CI set, as .ci/run does); elsewhere it skips, saying why."""
    path = shutil.which("ngspice")
    if path is None:
        if os.environ.get("CI"):
            pytest.fail(
                "ngspice is required for the external checks in CI (apt-get install -y ngspice; .ci/run does this)"
            )
        pytest.skip("ngspice not installed: apt-get install -y ngspice to run the simulator cross-checks")
    return path


def position_lines(prefix: str, arrangement: str, parts: list[float], a: str, b: str) -> list[str]:
    """Element lines for one position between nodes a and b."""
    if arrangement == "single":
        return [f"{prefix}1 {a} {b} {parts[0]!r}"]
    if arrangement == "parallel":
        return [f"{prefix}1 {a} {b} {parts[0]!r}", f"{prefix}2 {a} {b} {parts[1]!r}"]
    mid = f"mid_{prefix.lower()}"
    lines = [f"{prefix}1 {a} {mid} {parts[0]!r}", f"{prefix}2 {mid} {b} {parts[1]!r}"]
    if prefix == "C":
        lines += [f"RL1 {a} {mid} {LEAK_OHM!r}", f"RL2 {mid} {b} {LEAK_OHM!r}"]
    return lines


def rc_step_netlist(r: dict, c: dict, v_start: float, v_end: float, stop_s: float, measure: str) -> str:
    """R from the source to node ``out``, C from ``out`` to ground, source stepping v_start → v_end at t = 0."""
    lines = ["* rcpick candidate check", f"V1 in 0 PWL(0 {v_start!r} 1e-12 {v_end!r})"]
    lines += position_lines("R", r["arrangement"], r["parts_ohm"], "in", "out")
    lines += position_lines("C", c["arrangement"], c["parts_farad"], "out", "0")
    lines += [".options reltol=1e-6", f".tran {stop_s / 20000!r} {stop_s!r} 0 {stop_s / 20000!r}", measure, ".end", ""]
    return "\n".join(lines)


def run_measure(netlist: str, workdir: Path, name: str) -> float:
    """Run ngspice in batch mode and return the value of the ``.meas`` called ``name``."""
    cir = workdir / "check.cir"
    log = workdir / "check.log"
    cir.write_text(netlist)
    subprocess.run([ngspice(), "-b", "-o", str(log), str(cir)], check=True, capture_output=True, timeout=120)
    text = log.read_text()
    found = re.search(rf"^\s*{name}\s*=\s*([-+0-9.eE]+)", text, re.M)
    assert found, f"ngspice printed no {name}:\n{text[-2000:]}"
    return float(found.group(1))


# --- helpers for start levels, leakage, oscillators and netlists with initial voltages ----------------


def run_measures(netlist: str, workdir: Path, names: list[str]) -> dict[str, float]:
    """Run ngspice in batch mode once and return the values of several ``.meas`` results by name."""
    cir = workdir / "check.cir"
    log = workdir / "check.log"
    cir.write_text(netlist)
    subprocess.run([ngspice(), "-b", "-o", str(log), str(cir)], check=True, capture_output=True, timeout=120)
    text = log.read_text()
    out = {}
    for name in names:
        found = re.search(rf"^\s*{name}\s*=\s*([-+0-9.eE]+)", text, re.M)
        assert found, f"ngspice printed no {name}:\n{text[-2000:]}"
        out[name] = float(found.group(1))
    return out


def _with_initial_voltages(lines: list[str], v0: float) -> list[str]:
    """Capacitor lines of one position carrying ``IC=`` so that the position holds v0 in total.

    A series pair shares v0 as if charged as one part (inversely to capacitance); a
    parallel pair holds v0 on each part. Other lines pass unchanged.
    """
    caps = [line for line in lines if line[0] == "C"]
    if len(caps) == 2 and caps[0].split()[2] == caps[1].split()[1]:  # series: a-mid, mid-b
        c1, c2 = (float(line.split()[3]) for line in caps)
        share = {caps[0]: v0 * c2 / (c1 + c2), caps[1]: v0 * c1 / (c1 + c2)}
    else:
        share = {line: v0 for line in caps}
    return [f"{line} IC={share[line]!r}" if line in share else line for line in lines]


def rc_level_netlist(
    r: dict,
    c: dict,
    v_source: float,
    v0: float,
    stop_s: float,
    measures: list[str],
    *,
    leak_a: float = 0.0,
    start: str = "ic",
) -> str:
    """R from a constant source ``v_source`` to node ``out``, C from ``out`` to ground holding v0 at t = 0.

    ``start="ic"``: ``.ic v(out)=v0`` (ngspice solves the operating point with the node held at v0,
    then releases it); ``start="uic"``: ``IC=`` on the capacitor parts and ``uic`` on ``.tran``.
    ``leak_a``: an ngspice ``I`` element from ``out`` to ground, i.e. a current drawn out of the node
    (negative: injected into it).
    """
    lines = ["* rcpick start-level check", f"V1 in 0 DC {v_source!r}"]
    lines += position_lines("R", r["arrangement"], r["parts_ohm"], "in", "out")
    c_lines = position_lines("C", c["arrangement"], c["parts_farad"], "out", "0")
    lines += _with_initial_voltages(c_lines, v0) if start == "uic" else c_lines
    if leak_a:
        lines.append(f"IL out 0 DC {leak_a!r}")
    step = stop_s / 20000
    lines.append(".options reltol=1e-6")
    if start == "uic":
        lines.append(f".tran {step!r} {stop_s!r} 0 {step!r} uic")
    elif start == "ic":
        lines += [f".ic v(out)={v0!r}", f".tran {step!r} {stop_s!r} 0 {step!r}"]
    else:
        raise ValueError(start)
    return "\n".join(lines + list(measures) + [".end", ""])


def relaxation_netlist(
    r: dict, c: dict, supply: float, low: float, high: float, stop_s: float, measures: list[str], *, leak_a: float = 0.0
) -> str:
    """An RC relaxation oscillator: node ``drv`` is ``supply`` while the capacitor charges and 0 V while it
    discharges, switching where v(out) reaches ``high`` and ``low``.

    The comparator is ngspice's voltage-controlled switch with hysteresis (model ``sw``: on above vt + vh,
    off below vt − vh, state kept in between). It pulls node ``sw`` (1 kΩ up to the supply) to ground,
    and an ideal unity buffer (``E``) drives the timing resistor from ``sw``: ``drv`` is within 4 nV of
    the supply or of 0 V. The run starts at v(out) = low, charging.
    """
    vt, vh = (high + low) / 2, (high - low) / 2
    lines = [
        "* rcpick relaxation oscillator check",
        f"VS vdd 0 DC {supply!r}",
        "RPU sw vdd 1e3",
        "S1 sw 0 out 0 hyst",
        f".model hyst sw vt={vt!r} vh={vh!r} ron=1e-6 roff=1e12",
        "EDRV drv 0 sw 0 1",
    ]
    lines += position_lines("R", r["arrangement"], r["parts_ohm"], "drv", "out")
    lines += position_lines("C", c["arrangement"], c["parts_farad"], "out", "0")
    if leak_a:
        lines.append(f"IL out 0 DC {leak_a!r}")
    step = stop_s / 40000
    lines += [
        ".options reltol=1e-6",
        f".ic v(out)={low!r} v(sw)={supply!r} v(drv)={supply!r}",
        f".tran {step!r} {stop_s!r} 0 {step!r} uic",
    ]
    return "\n".join(lines + list(measures) + [".end", ""])


def network_netlist(text: str, stop_s: float, measures: list[str], replace: dict[str, dict] | None = None) -> str:
    """An rcpick netlist as an ngspice deck, keeping each capacitor's voltage at t = 0 (``@V``).

    Sources step from 0 at t = 0 (a 1 ps ramp), as rcpick reads them. A capacitor's ``@V``
    becomes ``IC=`` (first node minus second, as in ngspice) with ``uic`` on ``.tran``.
    ``replace`` maps an element name to a position (``arrangement`` and ``parts_ohm`` or
    ``parts_farad``, as in rcpick's JSON), written as that single part or pair; a pair
    gets the element's name with ``a``/``b`` appended.
    """
    from rcpick.netlist import parse

    net = parse(text)
    replace = {k.upper(): v for k, v in (replace or {}).items()}
    lines = ["* rcpick network check with initial voltages"]
    for e in net.elements:
        if e.letter in "VI":
            lines.append(f"{e.name} {e.a} {e.b} PWL(0 0 1e-12 {e.value!r})")
            continue
        pos = replace.get(e.name.upper())
        if pos is None:
            pos = {"arrangement": "single", "parts": [e.value]}
        else:
            pos = {"arrangement": pos["arrangement"], "parts": pos["parts_ohm" if e.letter == "R" else "parts_farad"]}
        if pos["arrangement"] == "single":
            own = [f"{e.name} {e.a} {e.b} {pos['parts'][0]!r}"]
        elif pos["arrangement"] == "parallel":
            own = [f"{e.name}a {e.a} {e.b} {pos['parts'][0]!r}", f"{e.name}b {e.a} {e.b} {pos['parts'][1]!r}"]
        else:
            mid = f"mid_{e.name.lower()}"
            own = [f"{e.name}a {e.a} {mid} {pos['parts'][0]!r}", f"{e.name}b {mid} {e.b} {pos['parts'][1]!r}"]
            if e.letter == "C":
                own += [f"RL{e.name}a {e.a} {mid} {LEAK_OHM!r}", f"RL{e.name}b {mid} {e.b} {LEAK_OHM!r}"]
        if e.letter == "C":
            own = _with_initial_voltages(own, float(e.params.get("v0", 0.0)))
        lines += own
    step = stop_s / 20000
    lines += [".options reltol=1e-6", f".tran {step!r} {stop_s!r} 0 {step!r} uic"]
    return "\n".join(lines + list(measures) + [".end", ""])


def effective_value(pos: dict, kind: str) -> float:
    """Effective value of a position from its parts, computed here rather than taken from rcpick.

    Series resistors and parallel capacitors add; parallel resistors and series capacitors add as
    reciprocals (OpenStax *College Physics 2e* §21.1 and Ex. 19.9). ``kind`` is ``"r"`` or ``"c"``.
    """
    parts = pos["parts_ohm" if kind == "r" else "parts_farad"]
    if pos["arrangement"] == "single":
        return parts[0]
    adds = (pos["arrangement"] == "series") == (kind == "r")
    return parts[0] + parts[1] if adds else 1.0 / (1.0 / parts[0] + 1.0 / parts[1])


def pick_with_pairs(candidates: list[dict], largest_r: bool = False) -> list[dict]:
    """Rank 1, the best candidates with a series and with a parallel pair, and (optionally) the one with the
    largest R; fails when the chosen ones hold no series or no parallel pair."""
    chosen = [candidates[0]]
    for wiring in ("series", "parallel"):
        for cand in candidates:
            if wiring in (cand["r"]["arrangement"], cand["c"]["arrangement"]) and cand not in chosen:
                chosen.append(cand)
                break
    if largest_r:
        biggest = max(candidates, key=lambda cand: cand["r"]["ohm"])
        if biggest not in chosen:
            chosen.append(biggest)
    wirings = {cand[pos]["arrangement"] for cand in chosen for pos in ("r", "c")}
    assert {"series", "parallel"} <= wirings, "the check must include a series and a parallel pair"
    return chosen
