"""RC relaxation oscillator periods (``period`` with ``thresholds``) against ngspice and the closed form.

Source of the simulations: ngspice 39.x (Debian package ngspice), two ways.

- Two intervals: the charging half as R from a constant source at the supply
  with the capacitor starting at LOW (``.ic v(out)=LOW``), measured to HIGH;
  the discharging half as R to 0 V with the capacitor starting at HIGH,
  measured to LOW (``.meas tran ... WHEN v(out)=... RISE=1``/``FALL=1``).
- A running oscillator: ngspice's voltage-controlled switch with hysteresis
  (model ``sw``, on above vt + vh, off below vt − vh) toggles the node that
  drives R between the supply and 0 V; the period and both halves are measured
  from the drive node's edges after the first full cycle.

Each simulated half must agree with rcpick's ``charge_s``/``discharge_s`` and
their sum with rcpick's period within 0.5 %. A leakage is an ngspice ``I``
element from the node to ground.

Closed form: T. Kuphaldt, *Lessons in Electric Circuits* Vol. I ch. 16,
t = τ·ln((V∞ − V0)/(V∞ − V1)) for each half (V∞ the supply while charging, 0 V
while discharging, each less I·R with a leakage: common practice); with
thresholds at Vs/3 and 2Vs/3 each half is τ·ln 2 and the period 2·ln 2·τ ≈
1.386 τ (arithmetic of that formula).
"""

import math

import pytest

import rcpick
from tests.external.spice import (
    effective_value,
    pick_with_pairs,
    rc_level_netlist,
    relaxation_netlist,
    run_measure,
    run_measures,
)

SIM_REL = 5e-3  # ngspice against rcpick
FORM_REL = 1e-9  # closed form against rcpick: the same arithmetic, rounding only


def kuphaldt_halves(tau: float, r_ohm: float, supply: float, low: float, high: float, leak_a: float = 0.0):
    """T. Kuphaldt, Lessons in Electric Circuits Vol. I ch. 16, t = τ·ln((V∞ − V0)/(V∞ − V1)) for each half,
    V∞ = supply − I·R charging and −I·R discharging."""
    drop = leak_a * r_ohm
    return (
        tau * math.log((supply - drop - low) / (supply - drop - high)),
        tau * math.log((0 - drop - high) / (0 - drop - low)),
    )


def _two_intervals(
    r: dict,
    c: dict,
    supply: float,
    low: float,
    high: float,
    expected: tuple[float, float],
    tmp_path,
    leak_a: float = 0.0,
) -> tuple[float, float]:
    """ngspice 39.x (Debian package ngspice): charge LOW → HIGH from the supply, discharge HIGH → LOW to 0 V."""
    charge = run_measure(
        rc_level_netlist(
            r, c, supply, low, 2 * expected[0], [f".meas tran thalf WHEN v(out)={high!r} RISE=1"], leak_a=leak_a
        ),
        tmp_path,
        "thalf",
    )
    discharge = run_measure(
        rc_level_netlist(
            r, c, 0.0, high, 2 * expected[1], [f".meas tran thalf WHEN v(out)={low!r} FALL=1"], leak_a=leak_a
        ),
        tmp_path,
        "thalf",
    )
    return charge, discharge


def _oscillator(
    r: dict, c: dict, supply: float, low: float, high: float, period: float, tmp_path, leak_a: float = 0.0
) -> dict[str, float]:
    """ngspice 39.x (Debian package ngspice), a switch with hysteresis: period and halves after the first cycle.

    The run starts at LOW, charging, so the drive node falls at HIGH (FALL=1), rises at LOW (RISE=1), and so on:
    FALL=2 → RISE=2 is a discharge, RISE=2 → FALL=3 a charge, RISE=2 → RISE=3 a period.
    """
    mid = supply / 2
    names = ["f2", "r2", "f3", "r3", "vhigh", "vlow"]
    measures = [
        f".meas tran f2 WHEN v(drv)={mid!r} FALL=2",
        f".meas tran r2 WHEN v(drv)={mid!r} RISE=2",
        f".meas tran f3 WHEN v(drv)={mid!r} FALL=3",
        f".meas tran r3 WHEN v(drv)={mid!r} RISE=3",
        f".meas tran vhigh MAX v(out) FROM={period!r} TO={4 * period!r}",
        f".meas tran vlow MIN v(out) FROM={period!r} TO={4 * period!r}",
    ]
    got = run_measures(
        relaxation_netlist(r, c, supply, low, high, 4.5 * period, measures, leak_a=leak_a), tmp_path, names
    )
    assert got["f2"] < got["r2"] < got["f3"] < got["r3"], got
    # the harness itself: the switch toggles at the thresholds asked (within 0.1 % of the swing)
    assert got["vhigh"] == pytest.approx(high, abs=1e-3 * (high - low))
    assert got["vlow"] == pytest.approx(low, abs=1e-3 * (high - low))
    return {"charge": got["f3"] - got["r2"], "discharge": got["r2"] - got["f2"], "period": got["r3"] - got["r2"]}


def test_thirds_give_two_ln2_tau(tmp_path):
    """Thresholds at Vs/3 and 2Vs/3: period 2·ln 2·τ = 1.386 τ, halves τ·ln 2 (arithmetic of Kuphaldt Vol. I
    ch. 16's t = τ·ln((V∞ − V0)/(V∞ − V1))); and ngspice 39.x (Debian package ngspice) agrees within 0.5 %."""
    result = rcpick.spread(r="10k", c="100n", period="1.4ms", thresholds="1.1V:2.2V", supply="3.3V")
    tau = 10e3 * 100e-9
    assert result.nominal == pytest.approx(2 * math.log(2) * tau, rel=FORM_REL)
    assert result.nominal == pytest.approx(1.386 * tau, rel=1e-3)
    halves = result.to_dict()["period"]
    assert halves["charge_s"] == pytest.approx(math.log(2) * tau, rel=FORM_REL)
    assert halves["discharge_s"] == pytest.approx(math.log(2) * tau, rel=FORM_REL)
    assert halves["duty_cycle"] == pytest.approx(0.5, rel=FORM_REL)
    doc = result.to_dict()["design"]
    osc = _oscillator(doc["r"], doc["c"], 3.3, 1.1, 2.2, result.nominal, tmp_path)
    assert osc["period"] == pytest.approx(2 * math.log(2) * tau, rel=SIM_REL)


PERIOD_DESIGNS = [
    # (r, c, supply, low, high, leak A)
    ("10k", "100n", 3.3, 1.1, 2.2, 0.0),
    ("4k7+330", "47n//47n", 5.0, 1.0, 2.5, 0.0),  # asymmetric thresholds: duty cycle well off 50 %
    ("22k//22k", "1u+1u", 12.0, 4.0, 9.0, 0.0),
    ("47k", "22n", 3.3, 1.1, 2.2, 10e-6),  # 10 µA drawn out of the node
    ("47k", "22n", 3.3, 1.1, 2.2, -10e-6),  # 10 µA injected into it
]


@pytest.mark.parametrize("design", PERIOD_DESIGNS, ids=lambda d: f"{d[0]}|{d[1]}|{d[3]:g}:{d[4]:g}V|{d[5]:g}A")
def test_spread_period_matches_ngspice(design, tmp_path):
    """ngspice 39.x (Debian package ngspice): two intervals and a switch-with-hysteresis oscillator, within
    0.5 % of rcpick's halves and period; the halves also against Kuphaldt Vol. I ch. 16."""
    r, c, supply, low, high, leak_a = design
    keywords = dict(leak=f"{leak_a!r}A") if leak_a else {}
    result = rcpick.spread(r=r, c=c, period="1ms", thresholds=f"{low!r}V:{high!r}V", supply=f"{supply!r}V", **keywords)
    doc = result.to_dict()
    halves = doc["period"]
    r_ohm = effective_value(doc["design"]["r"], "r")
    tau = r_ohm * effective_value(doc["design"]["c"], "c")
    charge, discharge = kuphaldt_halves(tau, r_ohm, supply, low, high, leak_a)
    assert (halves["charge_s"], halves["discharge_s"]) == pytest.approx((charge, discharge), rel=FORM_REL)
    assert result.nominal == pytest.approx(charge + discharge, rel=FORM_REL)
    assert halves["duty_cycle"] == pytest.approx(charge / (charge + discharge), rel=FORM_REL)

    sim_charge, sim_discharge = _two_intervals(
        doc["design"]["r"], doc["design"]["c"], supply, low, high, (charge, discharge), tmp_path, leak_a
    )
    assert sim_charge == pytest.approx(halves["charge_s"], rel=SIM_REL)
    assert sim_discharge == pytest.approx(halves["discharge_s"], rel=SIM_REL)
    assert sim_charge + sim_discharge == pytest.approx(result.nominal, rel=SIM_REL)

    osc = _oscillator(doc["design"]["r"], doc["design"]["c"], supply, low, high, result.nominal, tmp_path, leak_a)
    assert osc["charge"] == pytest.approx(halves["charge_s"], rel=SIM_REL)
    assert osc["discharge"] == pytest.approx(halves["discharge_s"], rel=SIM_REL)
    assert osc["period"] == pytest.approx(result.nominal, rel=SIM_REL)


@pytest.mark.parametrize("leak", [None, "5uA"])
def test_find_period_candidates_match_ngspice(leak, tmp_path):
    """ngspice 39.x (Debian package ngspice), switch-with-hysteresis oscillator: the period of rank-error
    candidates (incl. series and parallel pairs) within 0.5 % of rcpick's; Kuphaldt Vol. I ch. 16 exactly."""
    supply, low, high = 5.0, 1.0, 2.5
    leak_a = 5e-6 if leak else 0.0
    keywords = dict(leak=leak, r_max="100k") if leak else {}
    result = rcpick.find(period="2ms", thresholds="1.0V:2.5V", supply="5V", rank="error", top=40, **keywords)
    for cand in pick_with_pairs([c.to_dict() for c in result.candidates]):
        r_ohm = effective_value(cand["r"], "r")
        tau = r_ohm * effective_value(cand["c"], "c")
        assert cand["value"] == pytest.approx(
            sum(kuphaldt_halves(tau, r_ohm, supply, low, high, leak_a)), rel=FORM_REL
        ), cand
        osc = _oscillator(cand["r"], cand["c"], supply, low, high, cand["value"], tmp_path, leak_a)
        assert osc["period"] == pytest.approx(cand["value"], rel=SIM_REL), cand
