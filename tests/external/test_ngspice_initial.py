"""Netlists with a capacitor's voltage at t = 0 (``@400V``) against ngspice transients.

Source of the simulations: ngspice 39.x (Debian package ngspice). The same
netlists are simulated with each capacitor's start voltage as ``IC=`` (first
node minus second, as ngspice reads it) and ``uic`` on ``.tran``, every source
stepping from 0 at t = 0 (a 1 ps ramp). The node's value just after t = 0
(``.meas tran ... FIND ... AT=``) and its threshold crossing (``.meas tran ...
WHEN``) must agree with ``rcpick.network`` within 0.5 %, and the crossing of
the best candidates of ``rcpick.find(net=...)`` with their parts written into
the deck likewise.

Closed form for the bank: T. Kuphaldt, *Lessons in Electric Circuits* Vol. I
ch. 16, t = τ·ln((V∞ − V0)/(V∞ − V1)) with V∞ = 0, τ = C·((R1 + R2) ∥ RL)
(series and parallel resistors, OpenStax *College Physics 2e* §21.1).
"""

import math

import pytest

import rcpick
from tests.external.spice import network_netlist, run_measures

SIM_REL = 5e-3  # ngspice against rcpick
FORM_REL = 1e-9  # closed form against rcpick (rcpick solves the network numerically: rounding only)

BANK = """* a 47 uF bank charged to 400 V; a bleeder R1 + R2 in series, and the load RL across the bank
C1 bank 0 47u @400V
R1 bank mid 100k
R2 mid 0 100k
RL bank 0 470k
"""

NETWORKS = {
    # name: (netlist, node, threshold)
    "bank at 400 V": (BANK, "bank", "50V"),
    "bank at 400 V, bleeder tap": (BANK, "mid", "25V"),
    # precharged to 3 V, charged towards 12·47/57 V through 10k ∥ 47k
    "precharged, source": ("V1 in 0 12\nR1 in x 10k\nC1 x 0 10u @3V\nR2 x 0 47k\n", "x", "8V"),
    # a capacitor between two nodes above ground holding 2 V (a minus b): v(b) jumps to (5 − 2)·22/32 V
    "floating capacitor": ("V1 in 0 5\nR1 in a 10k\nC1 a b 1u @2V\nR2 b 0 22k\n", "b", "1.0V"),
    # charge shared at the step: C1 to ground at 1 V, C2 from the source at −1 V (in minus y, consistent at t = 0)
    "coupled, precharged": ("V1 in 0 5\nR1 in y 10k\nC1 y 0 100n @1V\nC2 in y 22n @-1V\nR2 y 0 47k\n", "y", "3.5V"),
}


def _simulate(text: str, node: str, level: float, v0: float, t_ours: float, tmp_path, replace=None):
    """ngspice 39.x (Debian package ngspice), IC= and uic: (v(node) just after t = 0, crossing time of level).

    "Just after" is 1e-5 of the run (2 × the expected crossing): with ``uic`` ngspice prints no point at t = 0,
    and the node moves by about 1e-5·(run / fastest time constant) of its swing by then, far inside 0.5 %.
    """
    direction = "RISE" if level > v0 else "FALL"
    stop = 2 * t_ours
    measures = [
        f".meas tran vstart FIND v({node}) AT={stop * 1e-5!r}",
        f".meas tran tx WHEN v({node})={level!r} {direction}=1",
    ]
    got = run_measures(network_netlist(text, stop, measures, replace), tmp_path, ["vstart", "tx"])
    return got["vstart"], got["tx"]


@pytest.mark.parametrize("name", NETWORKS)
def test_network_with_initial_voltage_matches_ngspice(name, tmp_path):
    """ngspice 39.x (Debian package ngspice): v(0+) and the crossing time within 0.5 % of rcpick.network."""
    text, node, threshold = NETWORKS[name]
    path = tmp_path / "net.cir"
    path.write_text(text)
    step = rcpick.network(path, node=node, threshold=threshold).to_dict()["step"]
    assert step["t_threshold_s"] is not None, step
    v_start, t_cross = _simulate(text, node, step["threshold_v"], step["v0"], step["t_threshold_s"], tmp_path)
    assert v_start == pytest.approx(step["v0"], rel=SIM_REL)
    assert t_cross == pytest.approx(step["t_threshold_s"], rel=SIM_REL)


def test_floating_capacitor_sign(tmp_path):
    """A capacitor's @V is first node minus second: v(b) just after the step is (5 V − 2 V)·22k/(10k + 22k)
    (the capacitor as a 2 V source in the loop, Kirchhoff's voltage law: common practice), not (5 V + 2 V)·…"""
    text, node, threshold = NETWORKS["floating capacitor"]
    path = tmp_path / "net.cir"
    path.write_text(text)
    step = rcpick.network(path, node=node, threshold=threshold).to_dict()["step"]
    assert step["v0"] == pytest.approx((5 - 2) * 22 / 32, rel=1e-9)
    assert step["v_final"] == pytest.approx(0.0, abs=1e-9)


def test_bank_closed_form(tmp_path):
    """Kuphaldt Vol. I ch. 16 (t = τ·ln(V0/V1) towards 0) with τ = C·((R1 + R2) ∥ RL), OpenStax College
    Physics 2e §21.1."""
    path = tmp_path / "bank.cir"
    path.write_text(BANK)
    step = rcpick.network(path, node="bank", threshold="50V").to_dict()["step"]
    tau = 47e-6 / (1 / (100e3 + 100e3) + 1 / 470e3)
    assert step["v0"] == pytest.approx(400.0, rel=FORM_REL)
    assert step["t_threshold_s"] == pytest.approx(tau * math.log(400 / 50), rel=1e-6)


def _pairs_included(candidates: list[dict]) -> None:
    wirings = {pos["arrangement"] for cand in candidates for pos in cand["elements"].values()}
    assert {"series", "parallel"} <= wirings, "the check must include a series and a parallel pair"


def test_find_in_bank_matches_ngspice(tmp_path):
    """ngspice 39.x (Debian package ngspice): the best candidates of find(net=...) for the bank's bleeder,
    their parts (pairs as pairs, a series C1 sharing the 400 V) in the deck, cross 50 V within 0.5 % of the
    nominal delay; the delay also against Kuphaldt Vol. I ch. 16 with OpenStax §21.1's series/parallel rules."""
    path = tmp_path / "bank.cir"
    path.write_text(BANK)
    result = rcpick.find(
        net=path,
        vary="R1,C1",
        delay="10s",
        threshold="50V",
        node="bank",
        rank="error",
        top=3,
        samples=200,
        r_min="10k",
        r_max="1Meg",
        c_min="10u",
        c_max="100u",
    )
    candidates = [c.to_dict() for c in result.candidates]
    _pairs_included(candidates)
    for cand in candidates:
        r1, c1 = cand["elements"]["R1"], cand["elements"]["C1"]
        tau = c1["farad"] / (1 / (r1["ohm"] + 100e3) + 1 / 470e3)
        assert cand["value"] == pytest.approx(tau * math.log(400 / 50), rel=1e-6), cand
        _, t_cross = _simulate(BANK, "bank", 50.0, 400.0, cand["value"], tmp_path, replace=cand["elements"])
        assert t_cross == pytest.approx(cand["value"], rel=SIM_REL), cand


def test_find_in_precharged_network_matches_ngspice(tmp_path):
    """ngspice 39.x (Debian package ngspice): the best single-part candidates of find(net=...) for a node
    precharged to 3 V cross 8 V within 0.5 % of the nominal delay."""
    text, node, _ = NETWORKS["precharged, source"]
    path = tmp_path / "pre.cir"
    path.write_text(text)
    result = rcpick.find(
        net=path,
        vary="R1,C1",
        delay="50ms",
        threshold="8V",
        node=node,
        rank="error",
        top=3,
        samples=200,
        r_parts=1,
        c_parts=1,
        r_min="1k",
        r_max="22k",
    )
    for cand in (c.to_dict() for c in result.candidates):
        _, t_cross = _simulate(text, node, 8.0, 3.0, cand["value"], tmp_path, replace=cand["elements"])
        assert t_cross == pytest.approx(cand["value"], rel=SIM_REL), cand
