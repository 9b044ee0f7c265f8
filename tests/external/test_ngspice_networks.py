"""Step responses of networks against ngspice transient runs (Debian package ngspice 39.x).

The same netlists are simulated with every source stepping from 0 at t = 0
(a 1 ps ramp); the simulated threshold crossing must agree with rcpick's exact
step response within 0.5 %, and the coupled node's jump v(0+) likewise.
"""

import math

import numpy as np
import pytest

from rcpick import nodal
from rcpick.netlist import parse
from tests.external.spice import run_measure
from tests.external.test_lcapy_networks import NETWORKS


def spice_text(text: str, stop_s: float, measures: list[str]) -> str:
    net = parse(text)
    lines = ["* rcpick network check"]
    for e in net.elements:
        if e.letter == "V":
            lines.append(f"{e.name} {e.a} {e.b} PWL(0 0 1e-12 {e.value!r})")
        else:
            lines.append(f"{e.name} {e.a} {e.b} {e.value!r}")
    lines += [
        ".options reltol=1e-6",
        f".tran {stop_s / 20000!r} {stop_s!r} 0 {stop_s / 20000!r}",
        *measures,
        ".end",
        "",
    ]
    return "\n".join(lines)


@pytest.mark.parametrize("name", NETWORKS)
def test_crossing_times_match_ngspice(name, tmp_path):
    text, node = NETWORKS[name]
    net = parse(text)
    resp = nodal.step_response(net)
    v0, v_final = float(resp.initial(node)[0]), float(resp.final(node)[0])
    level = v0 + 0.6 * (v_final - v0)
    tau = float(nodal.time_constants(net)[0][0])
    ours = float(nodal.crossing_time(resp, node, np.array([level]), np.array([30 * tau]))[0])
    direction = "RISE" if v_final > v0 else "FALL"
    spice = run_measure(
        spice_text(text, 4 * ours, [f".meas tran tx WHEN v({node})={level!r} {direction}=1"]), tmp_path, "tx"
    )
    assert spice == pytest.approx(ours, rel=5e-3)


def test_coupled_jump_matches_ngspice(tmp_path):
    text, node = NETWORKS["coupled"]
    resp = nodal.step_response(parse(text))
    ours = float(resp.initial(node)[0])
    assert ours == pytest.approx(5 * 22 / 122, rel=1e-12)  # Vs·C1/(C + C1), Desoer and Kuh, Basic Circuit Theory
    spice = run_measure(spice_text(text, 1e-3, [f".meas tran vjump FIND v({node}) AT=1e-9"]), tmp_path, "vjump")
    # 1 ns after the step the node has relaxed by only about 1e-9 / 1.22e-3 of the jump
    assert spice == pytest.approx(ours, rel=5e-3)
    assert math.isfinite(spice)
