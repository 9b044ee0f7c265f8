"""Targets → tau and back, checked against published worked examples."""

import math

import numpy as np
import pytest

from rcpick import target as targets
from rcpick.errors import BadValue


def test_step_response_percentages():
    # Charging 1 − e^(−n) (facts.md §6; OpenStax CP2e §21.6): 63.212, 86.466, 95.021, 98.168, 99.326 %.
    for n, percent in zip(range(1, 6), [63.212, 86.466, 95.021, 98.168, 99.326]):
        assert round(100 * (1 - math.exp(-n)), 3) == percent
        assert targets.delay_factor(percent / 100, falling=False) == pytest.approx(n, abs=1e-3)
    # Discharging: remaining 36.788, 13.534, 4.979, 1.832, 0.674 %.
    for n, percent in zip(range(1, 6), [36.788, 13.534, 4.979, 1.832, 0.674]):
        assert round(100 * math.exp(-n), 3) == percent
        assert targets.delay_factor(percent / 100, falling=True) == pytest.approx(n, abs=1e-3)


def test_openstax_defibrillator_discharge():
    # OpenStax College Physics 2e §21.6: 1.00 kΩ, 8.00 µF from 10.0 kV → τ = 8.00 ms, 498 V (497.87 V) at 24.0 ms.
    tau = 1.00e3 * 8.00e-6
    assert tau == pytest.approx(8.00e-3)
    assert 10.0e3 * math.exp(-24.0e-3 / tau) == pytest.approx(497.87, abs=0.01)
    fraction = targets.threshold_fraction(497.87, is_voltage=True, supply_v=10.0e3, falling=True)
    assert targets.for_delay(24.0e-3, fraction, falling=True).tau_s == pytest.approx(8.00e-3, rel=1e-5)


def test_kuphaldt_charging_curve():
    # Kuphaldt, Lessons in Electric Circuits Vol. I ch. 16: 15 V, 10 kΩ, 100 µF (τ = 1 s).
    volts = {0.5: 5.902, 1: 9.482, 2: 12.970, 3: 14.253, 4: 14.725, 5: 14.899, 6: 14.963, 10: 14.999}
    for t, v in volts.items():
        fraction = targets.threshold_fraction(v, is_voltage=True, supply_v=15.0, falling=False)
        if fraction < 0.9999:
            assert targets.for_delay(t, fraction).tau_s == pytest.approx(1.0, rel=2e-3)
    # Time to reach 12.970 V from 0 → 2.000 s.
    target = targets.for_delay(2.0, 12.970 / 15.0)
    assert float(target.quantity(1.0)) == pytest.approx(2.000, abs=5e-4)
    # I(0) = 1500 µA (Ohm's law at the step)
    assert 15.0 / 10e3 == pytest.approx(1500e-6)


def test_cutoff_10k_100n():
    # 10 kΩ with 100 nF → fc = 159.155 Hz (common practice arithmetic: 1/(2π·1 ms)).
    target = targets.for_cutoff(159.155)
    assert float(target.quantity(10e3 * 100e-9)) == pytest.approx(159.155, abs=5e-4)
    assert target.tau_s == pytest.approx(1e-3, rel=1e-5)


def test_error_is_signed_relative():
    target = targets.for_tau(1e-3)
    assert float(target.error(1.1e-3)) == pytest.approx(0.1)
    cutoff = targets.for_cutoff(1000.0)
    # a longer tau gives a lower corner: negative error
    assert float(cutoff.error(cutoff.tau_s * 1.25)) == pytest.approx(-0.2)
    assert np.all(targets.for_tau(1.0).error(np.array([0.5, 2.0])) == np.array([-0.5, 1.0]))


@pytest.mark.parametrize("fraction", [0.0, 1.0, -0.1, 1.5])
def test_threshold_outside_open_interval(fraction):
    with pytest.raises(BadValue):
        targets.delay_factor(fraction, falling=False)


def test_voltage_threshold_rules():
    with pytest.raises(BadValue, match="needs --supply"):
        targets.threshold_fraction(2.0, is_voltage=True, supply_v=None, falling=False)
    with pytest.raises(BadValue, match="below the supply"):
        targets.threshold_fraction(5.0, is_voltage=True, supply_v=5.0, falling=False)
    assert targets.threshold_fraction(2.5, is_voltage=True, supply_v=5.0, falling=False) == 0.5


def test_bleeder_time_constant_bound():
    # Derived from the IEC 60204-1 §6.2.4 summary (facts.md §8): 325 V must fall to 60 V within 5 s,
    # so tau ≤ 5 / ln(325/60) = 2.959 s (0.592 s for 1 s).
    fraction = targets.threshold_fraction(60.0, is_voltage=True, supply_v=325.0, falling=True)
    assert targets.for_delay(5.0, fraction, falling=True).tau_s == pytest.approx(2.959, abs=5e-4)
    assert targets.for_delay(1.0, fraction, falling=True).tau_s == pytest.approx(0.592, abs=5e-4)
