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
    """Path of ngspice. Missing ngspice fails under CI (CI set, as .ci/run does) and skips, with the reason, elsewhere."""
    path = shutil.which("ngspice")
    if path is None:
        if os.environ.get("CI"):
            pytest.fail("ngspice is required for the external checks in CI (apt-get install -y ngspice; .ci/run does this)")
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
