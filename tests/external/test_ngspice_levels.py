"""Delays between two levels (``from_level``) and with a leakage current (``leak``) against ngspice.

Source of the simulations: ngspice 39.x (Debian package ngspice), transient
analysis of R from a constant source and C to ground, the capacitor starting at
the start level (``.ic v(out)=V0``, or ``IC=`` on the capacitor with ``uic``), a
leakage as an ngspice ``I`` element from the node to ground, and the crossing
measured with ``.meas tran ... WHEN v(out)=... RISE=1`` / ``FALL=1``. Each
simulated crossing must agree with rcpick's nominal delay within 0.5 %.

Source of the closed form: T. Kuphaldt, *Lessons in Electric Circuits* Vol. I
ch. 16, t = τ·ln((V∞ − V0)/(V∞ − V1)); with a constant current I drawn out of
the node through R the final level is V∞' = V∞ − I·R (the node's Thevenin
equivalent: common practice). The effective R and C of a pair are computed by
the test helpers from the parts (series R and parallel C add, OpenStax
*College Physics 2e* §21.1 and Ex. 19.9), not taken from rcpick.
"""

import math

import pytest

import rcpick
from tests.external.spice import effective_value, pick_with_pairs, rc_level_netlist, run_measure

SIM_REL = 5e-3  # ngspice against rcpick
FORM_REL = 1e-9  # closed form against rcpick: the same arithmetic, rounding only


def kuphaldt_delay(tau: float, v_final: float, v0: float, v1: float) -> float:
    """T. Kuphaldt, Lessons in Electric Circuits Vol. I ch. 16: t = τ·ln((V∞ − V0)/(V∞ − V1))."""
    return tau * math.log((v_final - v0) / (v_final - v1))


def _simulate(cand: dict, v_source: float, v0: float, v1: float, tmp_path, *, leak_a=0.0, start="ic") -> float:
    """ngspice 39.x (Debian package ngspice): time for v(out) to go from v0 to v1, source at v_source."""
    direction = "RISE" if v1 > v0 else "FALL"
    netlist = rc_level_netlist(
        cand["r"],
        cand["c"],
        v_source,
        v0,
        2 * cand["value"],
        [f".meas tran tcross WHEN v(out)={v1!r} {direction}=1"],
        leak_a=leak_a,
        start=start,
    )
    return run_measure(netlist, tmp_path, "tcross")


# --- from a start level to a threshold -------------------------------------------------------------

FROM_CASES = {
    # name: (find keywords, source volts, start volts, threshold volts)
    "rising 1.1 V to 2.2 V of 3.3 V": (
        dict(delay="1ms", threshold="2.2V", from_level="1.1V", supply="3.3V"),
        3.3,
        1.1,
        2.2,
    ),
    "rising 0.5 V to 4.0 V of 5 V": (
        dict(delay="22ms", threshold="4.0V", from_level="0.5V", supply="5V"),
        5.0,
        0.5,
        4.0,
    ),
    "falling 300 V to 50 V": (
        dict(
            delay="1.5s",
            threshold="50V",
            from_level="300V",
            supply="400V",
            falling=True,
            c_min="10u",
            c_max="100u",
            r_max="1Meg",
        ),
        0.0,
        300.0,
        50.0,
    ),
    "falling 3.0 V to 1.0 V": (
        dict(delay="4.7ms", threshold="1.0V", from_level="3.0V", supply="3.3V", falling=True),
        0.0,
        3.0,
        1.0,
    ),
}


@pytest.mark.parametrize("name", FROM_CASES)
def test_from_level_candidates_match_ngspice(name, tmp_path):
    """ngspice 39.x (Debian package ngspice), .ic v(out)=V0; closed form of Kuphaldt Vol. I ch. 16."""
    keywords, v_source, v0, v1 = FROM_CASES[name]
    result = rcpick.find(**keywords, rank="error", top=40)
    for cand in pick_with_pairs([c.to_dict() for c in result.candidates]):
        tau = effective_value(cand["r"], "r") * effective_value(cand["c"], "c")
        assert cand["value"] == pytest.approx(kuphaldt_delay(tau, v_source, v0, v1), rel=FORM_REL), cand
        simulated = _simulate(cand, v_source, v0, v1, tmp_path)
        assert simulated == pytest.approx(cand["value"], rel=SIM_REL), cand


SPREAD_DESIGNS = [
    # (r, c, spread keywords, source volts, start volts, threshold volts)
    ("4k7+330", "47n//47n", dict(delay="330us", threshold="2.2V", from_level="1.1V", supply="3.3V"), 3.3, 1.1, 2.2),
    ("100k", "220n+220n", dict(delay="10ms", threshold="2.5V", from_level="0.3V", supply="3.3V"), 3.3, 0.3, 2.5),
    (
        "150k//150k",
        "10u",
        dict(delay="0.8s", threshold="1.0V", from_level="3.0V", supply="3.3V", falling=True),
        0.0,
        3.0,
        1.0,
    ),
]


@pytest.mark.parametrize("design", SPREAD_DESIGNS, ids=lambda d: f"{d[0]}|{d[1]}")
def test_from_level_spread_designs_match_ngspice(design, tmp_path):
    """ngspice 39.x (Debian package ngspice), IC= on the capacitor parts with uic; Kuphaldt Vol. I ch. 16."""
    r, c, keywords, v_source, v0, v1 = design
    result = rcpick.spread(r=r, c=c, **keywords, temp=25, dielectric="C0G")
    doc = result.to_dict()["design"]
    cand = {"r": doc["r"], "c": doc["c"], "value": result.nominal}
    tau = effective_value(doc["r"], "r") * effective_value(doc["c"], "c")
    assert result.nominal == pytest.approx(kuphaldt_delay(tau, v_source, v0, v1), rel=FORM_REL)
    simulated = _simulate(cand, v_source, v0, v1, tmp_path, start="uic")
    assert simulated == pytest.approx(result.nominal, rel=SIM_REL)


def test_start_level_changes_the_delay():
    """The start level must matter: 1.1 V → 2.2 V of 3.3 V is ln 2·τ, from 0 V it is ln 3·τ (Kuphaldt Vol. I
    ch. 16); a check that rcpick does not ignore from_level."""
    started = rcpick.spread(r="10k", c="100n", delay="1ms", threshold="2.2V", from_level="1.1V", supply="3.3V")
    plain = rcpick.spread(r="10k", c="100n", delay="1ms", threshold="2.2V", supply="3.3V")
    assert started.nominal == pytest.approx(1e-3 * math.log(2), rel=FORM_REL)
    assert plain.nominal == pytest.approx(1e-3 * math.log(3), rel=FORM_REL)


# --- a leakage current at the node -----------------------------------------------------------------

# r_max keeps V∞' = V∞ − I·R clear of the threshold for every unit of the spread (a level some units never
# reach is outside this check).
LEAK_CASES = {
    # name: (find keywords, source volts, start volts, threshold volts, leak A)
    "rising, 20 uA drawn out": (
        dict(delay="1ms", threshold="2.2V", from_level="1.1V", supply="3.3V", leak="20uA", r_max="33k"),
        3.3,
        1.1,
        2.2,
        20e-6,
    ),
    "rising, 20 uA injected": (
        dict(delay="1ms", threshold="2.2V", from_level="1.1V", supply="3.3V", leak="-20uA"),
        3.3,
        1.1,
        2.2,
        -20e-6,
    ),
    "falling, 5 uA drawn out": (
        dict(delay="50ms", threshold="1.0V", supply="3.3V", falling=True, leak="5uA"),
        0.0,
        3.3,
        1.0,
        5e-6,
    ),
    "falling, 5 uA injected": (
        dict(delay="50ms", threshold="1.0V", supply="3.3V", falling=True, leak="-5uA", r_max="100k"),
        0.0,
        3.3,
        1.0,
        -5e-6,
    ),
}


@pytest.mark.parametrize("name", LEAK_CASES)
def test_leak_candidates_match_ngspice(name, tmp_path):
    """ngspice 39.x (Debian package ngspice), an I element drawing the leakage; Kuphaldt Vol. I ch. 16 with
    V∞' = V∞ − I·R."""
    keywords, v_source, v0, v1, leak_a = LEAK_CASES[name]
    result = rcpick.find(**keywords, rank="error", top=40)
    effects = []
    for cand in pick_with_pairs([c.to_dict() for c in result.candidates], largest_r=True):
        r_ohm = effective_value(cand["r"], "r")
        tau = r_ohm * effective_value(cand["c"], "c")
        with_leak = kuphaldt_delay(tau, v_source - leak_a * r_ohm, v0, v1)
        effects.append(abs(with_leak / kuphaldt_delay(tau, v_source, v0, v1) - 1))
        assert cand["value"] == pytest.approx(with_leak, rel=FORM_REL), cand
        simulated = _simulate(cand, v_source, v0, v1, tmp_path, leak_a=leak_a)
        assert simulated == pytest.approx(cand["value"], rel=SIM_REL), cand
    assert max(effects) > 4 * SIM_REL, "the leakage must change at least one checked delay well beyond the tolerance"


LEAK_DESIGNS = [
    # (r, c, spread keywords, source volts, start volts, threshold volts, leak A)
    (
        "47k",
        "22n",
        dict(delay="1ms", threshold="2.2V", from_level="1.1V", supply="3.3V", leak="10uA"),
        3.3,
        1.1,
        2.2,
        10e-6,
    ),
    (
        "47k",
        "22n",
        dict(delay="1ms", threshold="2.2V", from_level="1.1V", supply="3.3V", leak="-10uA"),
        3.3,
        1.1,
        2.2,
        -10e-6,
    ),
    ("1M", "4u7", dict(delay="3s", threshold="50V", supply="400V", falling=True, leak="40uA"), 0.0, 400.0, 50.0, 40e-6),
]


@pytest.mark.parametrize("design", LEAK_DESIGNS, ids=lambda d: f"{d[0]}|{d[1]}|{d[6]:g}A")
def test_leak_spread_designs_match_ngspice(design, tmp_path):
    """ngspice 39.x (Debian package ngspice), an I element drawing the leakage, IC= with uic; Kuphaldt Vol. I
    ch. 16 with V∞' = V∞ − I·R."""
    r, c, keywords, v_source, v0, v1, leak_a = design
    result = rcpick.spread(r=r, c=c, **keywords)
    doc = result.to_dict()["design"]
    r_ohm = effective_value(doc["r"], "r")
    tau = r_ohm * effective_value(doc["c"], "c")
    assert result.nominal == pytest.approx(kuphaldt_delay(tau, v_source - leak_a * r_ohm, v0, v1), rel=FORM_REL)
    cand = {"r": doc["r"], "c": doc["c"], "value": result.nominal}
    simulated = _simulate(cand, v_source, v0, v1, tmp_path, leak_a=leak_a, start="uic")
    assert simulated == pytest.approx(result.nominal, rel=SIM_REL)
