"""Network analysis against circuit-theory results and its own invariants.

Source of the circuit theory: C. A. Desoer, E. S. Kuh, *Basic Circuit Theory* (natural frequencies, order).
"""

import math

import numpy as np
import pytest
from hypothesis import given, settings
from hypothesis import strategies as st

from rcpick import nodal
from rcpick.netlist import parse


def test_coupled_node_first_order():
    # Circuits texts (Desoer and Kuh): R from source to node, C to ground, C1 source–node: zeroing the
    # source puts C and C1 in parallel, tau = R(C + C1); the node jumps to Vs·C1/(C + C1).
    net = parse("V1 in 0 5\nR1 in out 10k\nC1 out 0 100n\nC2 in out 22n\n")
    (taus,) = nodal.time_constants(net)
    assert list(taus) == pytest.approx([10e3 * 122e-9], rel=1e-12)
    resp = nodal.step_response(net)
    assert resp.initial("out")[0] == pytest.approx(5 * 22 / 122, rel=1e-12)
    assert resp.node("out", np.array([0.0]))[0, 0] == pytest.approx(5 * 22 / 122, rel=1e-9)
    assert resp.final("out")[0] == pytest.approx(5.0, rel=1e-12)
    first = nodal.first_order(net)
    assert first.c_eq_farad == pytest.approx(122e-9, rel=1e-12) and first.r_th_ohm == pytest.approx(10e3, rel=1e-12)


def test_divider_thevenin():
    # A divider R1/R2 feeding C: tau = (R1 ∥ R2)·C (Thevenin; OpenStax CP2e eq. 21.20 for the parallel rule).
    net = parse("V1 in 0 3.3\nR1 in out 10k\nR2 out 0 22k\nC1 out 0 1u\n")
    assert nodal.time_constants(net)[0] == pytest.approx([10e3 * 22e3 / 32e3 * 1e-6], rel=1e-12)
    resp = nodal.step_response(net)
    assert resp.initial("out")[0] == pytest.approx(0.0, abs=1e-12)
    assert resp.final("out")[0] == pytest.approx(3.3 * 22 / 32, rel=1e-12)


def test_kuphaldt_charging_crossing():
    # Kuphaldt, Lessons in Electric Circuits Vol. I ch. 16: 15 V, 10 kΩ, 100 µF reaches 12.970 V at 2.000 s.
    net = parse("V1 in 0 15\nR1 in c 10k\nC1 c 0 100u\n")
    resp = nodal.step_response(net)
    t = nodal.crossing_time(resp, "c", np.array([12.970]), np.array([20.0]))
    assert t[0] == pytest.approx(2.000, abs=5e-4)
    volts = resp.node("c", np.array([0.5, 1, 3, 5]))[0]
    assert volts == pytest.approx([5.902, 9.482, 14.253, 14.899], abs=5e-4)


@pytest.mark.parametrize(
    ("text", "order"),
    [
        # Order = capacitors left after zeroing sources and merging (circuits texts: Desoer and Kuh).
        ("V1 in 0 1\nR1 in a 1k\nC1 a 0 1u\nC2 a 0 2u\n", 1),  # parallel capacitors merge
        ("V1 in 0 1\nR1 in a 1k\nC1 a m 1u\nC2 m 0 1u\n", 1),  # series: a capacitor-only cutset at m
        ("V1 in 0 1\nC1 in m 1u\nC2 m 0 3u\nR1 m 0 1Meg\n", 1),  # V–C–C loop: C1 ∥ C2 once V is shorted
        ("V1 in 0 1\nR1 in a 1k\nC1 a 0 1u\nR2 a b 10k\nC2 b 0 100n\n", 2),  # a ladder
        ("V1 in 0 1\nR1 in a 1k\nC1 a 0 1u\nC2 a b 1u\nC3 b 0 1u\nR2 b 0 1k\n", 2),
        ("V1 in 0 1\nR1 in a 1k\nR2 a 0 1k\n", 0),  # no capacitor
        ("V1 in 0 1\nC1 in a 1u\nC2 a 0 1u\n", 0),  # capacitor-only: no finite nonzero frequency
    ],
)
def test_order_rule(text, order):
    assert len(nodal.time_constants(parse(text))[0]) == order


def test_series_capacitors_merge_exactly():
    net = parse("V1 in 0 1\nR1 in a 1k\nC1 a m 1u\nC2 m 0 3u\n")
    assert nodal.time_constants(net)[0] == pytest.approx([1e3 * 0.75e-6], rel=1e-12)
    first = nodal.first_order(net)
    assert first.c_eq_farad == pytest.approx(0.75e-6, rel=1e-12) and first.port == ("a", "0")
    resp = nodal.step_response(net)
    assert resp.final("m")[0] == pytest.approx(0.25, rel=1e-9)  # capacitive divider: v_a·C1/(C1 + C2)


def test_voltage_source_offsets_and_current_sources():
    # A floating source inside a supernode, and a current source into a resistive node.
    net = parse("V1 a 0 2\nV2 b a 3\nR1 b c 1k\nC1 c 0 1u\nI1 0 c 1m\nR2 c 0 1k\n")
    resp = nodal.step_response(net)
    # final: (5 V via 1 kΩ) ∥ 1 kΩ with 1 mA injected: v = (5/1k + 1m)/(2/1k) = 3 V
    assert resp.final("c")[0] == pytest.approx(3.0, rel=1e-12)
    assert resp.final("b")[0] == pytest.approx(5.0)
    assert nodal.time_constants(net)[0] == pytest.approx([500 * 1e-6], rel=1e-12)


@settings(max_examples=40, deadline=None)
@given(st.floats(1e2, 1e6), st.floats(1e2, 1e6), st.floats(1e-10, 1e-5), st.floats(1e-10, 1e-5), st.floats(1.01, 3.0))
def test_time_constants_grow_with_every_r_and_c(r1, r2, c1, c2, factor):
    # Courant–Fischer: every natural time constant of an RC network is nondecreasing in each R and C.
    text = "V1 in 0 1\nR1 in a {r1!r}\nC1 a 0 {c1!r}\nR2 a b {r2!r}\nC2 b 0 {c2!r}\n"
    base = nodal.time_constants(parse(text.format(r1=r1, r2=r2, c1=c1, c2=c2)))[0]
    for bigger in ({"r1": r1 * factor}, {"r2": r2 * factor}, {"c1": c1 * factor}, {"c2": c2 * factor}):
        values = {**dict(r1=r1, r2=r2, c1=c1, c2=c2), **bigger}
        grown = nodal.time_constants(parse(text.format(**values)))[0]
        assert np.all(grown >= base * (1 - 1e-9))


def test_batch_equals_one_at_a_time():
    net = parse("V1 in 0 1\nR1 in a 1k\nC1 a 0 1u\nR2 a b 10k\nC2 b 0 100n\n")
    r1 = np.array([1e3, 2.2e3, 4.7e3])
    c2 = np.array([100e-9, 47e-9, 220e-9])
    batch = nodal.dominant_tau(net, {"R1": r1, "C2": c2}, 3)
    for k in range(3):
        single = nodal.time_constants(net.with_values({"R1": r1[k], "C2": c2[k]}))[0][0]
        assert batch[k] == pytest.approx(single, rel=1e-12)
    resp = nodal.step_response(net, {"R1": r1, "C2": c2}, 3)
    times = nodal.crossing_time(resp, "b", np.full(3, 0.5), np.full(3, 0.1))
    for k in range(3):
        one = nodal.step_response(net.with_values({"R1": r1[k], "C2": c2[k]}))
        assert times[k] == pytest.approx(nodal.crossing_time(one, "b", np.array([0.5]), np.array([0.1]))[0], rel=1e-9)


def test_never_reached_and_already_past():
    net = parse("V1 in 0 1\nR1 in a 1k\nR2 a 0 1k\nC1 a 0 1u\n")
    resp = nodal.step_response(net)
    assert math.isnan(nodal.crossing_time(resp, "a", np.array([0.9]), np.array([0.1]))[0])
    assert nodal.crossing_time(resp, "a", np.array([0.0]), np.array([0.1]))[0] == 0.0


def test_cli_net(run_json, run):
    doc = run_json("net", "docs/examples/coupled.cir", "--node", "node", "--threshold", "70%")
    assert doc["capacitors"] == 2 and doc["order"] == 1
    assert doc["time_constants_s"] == pytest.approx([33e3 * 78e-9], rel=1e-12)
    assert doc["c_eq_farad"] == pytest.approx(78e-9) and doc["r_th_ohm"] == pytest.approx(33e3)
    step = doc["step"]
    assert step["v0"] == pytest.approx(5 * 10 / 78) and step["v_final"] == pytest.approx(5.0)
    tau = 33e3 * 78e-9
    # 70 % of the way from v(0+) to the final value (the node rises from its jump)
    level = step["v0"] + 0.7 * (5 - step["v0"])
    assert step["threshold_v"] == pytest.approx(level, rel=1e-12)
    assert step["t_threshold_s"] == pytest.approx(tau * math.log((5 - step["v0"]) / (5 - level)), rel=1e-9)
    two = run_json("net", "docs/examples/two-stage.cir")
    assert two["order"] == 2 and "c_eq_farad" not in two
    table = run("net", "docs/examples/reset-divider.cir", "--node", "rst", "--threshold", "2.0V")
    assert table.exit_code == 0 and "reaches 2.000 V" in table.stdout and "R_th" in table.stdout
    bad = run("net", "docs/examples/two-stage.cir", "--node", "nowhere")
    assert bad.exit_code == 2 and "no node 'nowhere'" in bad.stderr
