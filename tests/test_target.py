"""Targets → tau and back, checked against published worked examples."""

import math

import numpy as np
import pytest

from rcpick import target as targets
from rcpick.errors import BadValue


def test_step_response_percentages():
    # Charging 1 − e^(−n) (OpenStax College Physics 2e §21.6, eqs. 21.77–21.80):
    # 63.212, 86.466, 95.021, 98.168, 99.326 %.
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
    fraction = targets.level_fraction(497.87, is_volts=True, scale_v=10.0e3, setting="threshold")
    assert targets.for_delay(24.0e-3, fraction, falling=True).tau_s == pytest.approx(8.00e-3, rel=1e-5)


def test_kuphaldt_charging_curve():
    # Kuphaldt, Lessons in Electric Circuits Vol. I ch. 16: 15 V, 10 kΩ, 100 µF (τ = 1 s).
    volts = {0.5: 5.902, 1: 9.482, 2: 12.970, 3: 14.253, 4: 14.725, 5: 14.899, 6: 14.963, 10: 14.999}
    for t, v in volts.items():
        fraction = targets.level_fraction(v, is_volts=True, scale_v=15.0, setting="threshold")
        if fraction < 0.9999:
            assert targets.for_delay(t, fraction).tau_s == pytest.approx(1.0, rel=2e-3)
    # Time to reach 12.970 V from 0 → 2.000 s.
    target = targets.for_delay(2.0, 12.970 / 15.0)
    assert float(target.quantity(10e3, 100e-6)) == pytest.approx(2.000, abs=5e-4)
    # I(0) = 1500 µA (Ohm's law at the step)
    assert 15.0 / 10e3 == pytest.approx(1500e-6)


def test_cutoff_10k_100n():
    # 10 kΩ with 100 nF → fc = 159.155 Hz (common practice arithmetic: 1/(2π·1 ms)).
    target = targets.for_cutoff(159.155)
    assert float(target.quantity(10e3, 100e-9)) == pytest.approx(159.155, abs=5e-4)
    assert target.tau_s == pytest.approx(1e-3, rel=1e-5)


def test_error_is_signed_relative():
    target = targets.for_tau(1e-3)
    assert float(target.error(1.1e-3)) == pytest.approx(0.1)
    cutoff = targets.for_cutoff(1000.0)
    # a longer tau gives a lower corner: negative error
    assert float(cutoff.error(cutoff.of_tau(cutoff.tau_s * 1.25))) == pytest.approx(-0.2)
    assert np.all(targets.for_tau(1.0).error(np.array([0.5, 2.0])) == np.array([-0.5, 1.0]))


@pytest.mark.parametrize("fraction", [0.0, 1.0, -0.1, 1.5])
def test_threshold_outside_open_interval(fraction):
    with pytest.raises(BadValue):
        targets.delay_factor(fraction, falling=False)


def test_voltage_threshold_rules():
    with pytest.raises(BadValue, match="in volts needs supply"):
        targets.level_fraction(2.0, is_volts=True, scale_v=None, setting="threshold")
    with pytest.raises(BadValue, match="5 V must lie between 0 and the supply"):
        targets.for_delay(
            1.0, targets.level_fraction(5.0, is_volts=True, scale_v=5.0, setting="threshold"), scale_v=5.0
        )
    assert targets.level_fraction(2.5, is_volts=True, scale_v=5.0, setting="threshold") == 0.5


def test_bleeder_time_constant_bound():
    # Derived from the IEC 60204-1 §6.2.4 summary (parts holding more than 60 V must fall to 60 V within 5 s):
    # from 325 V, tau ≤ 5 / ln(325/60) = 2.959 s (0.592 s for 1 s).
    fraction = targets.level_fraction(60.0, is_volts=True, scale_v=325.0, setting="threshold")
    assert targets.for_delay(5.0, fraction, falling=True).tau_s == pytest.approx(2.959, abs=5e-4)
    assert targets.for_delay(1.0, fraction, falling=True).tau_s == pytest.approx(0.592, abs=5e-4)


def test_delay_between_two_levels():
    # Kuphaldt, Lessons in Electric Circuits Vol. I ch. 16: t = τ·ln((V∞ − V0)/(V∞ − V1)).
    # Charging towards 15 V from 5.902 V (0.5 τ) to 12.970 V (2 τ) takes 1.5 τ.
    target = targets.for_delay(1.5, 12.970 / 15, start=5.902 / 15, scale_v=15.0)
    assert float(target.per_tau()) == pytest.approx(1.5, abs=1e-3)
    # Falling from 80 % to 20 %: ln(0.8/0.2) = 1.3863 τ.
    falling = targets.for_delay(1.0, 0.2, True, start=0.8)
    assert float(falling.per_tau()) == pytest.approx(math.log(4))
    with pytest.raises(BadValue, match="start below"):
        targets.for_delay(1.0, 0.3, start=0.5)
    with pytest.raises(BadValue, match="start above"):
        targets.for_delay(1.0, 0.6, True, start=0.5)


def test_oscillator_period_at_thirds():
    # Thresholds at Vs/3 and 2Vs/3: each half-period is τ·ln 2, the period 2·ln 2·τ = 1.386 τ
    # (time between two levels, as above).
    target = targets.for_period(1.0, 1 / 3, 2 / 3)
    assert float(target.per_tau()) == pytest.approx(2 * math.log(2))
    charge, discharge = target.half_periods(1.0)
    assert float(charge) == pytest.approx(math.log(2)) and float(discharge) == pytest.approx(math.log(2))
    # unequal thresholds: charge ln((1 − L)/(1 − H)), discharge ln(H/L)
    uneven = targets.for_period(1.0, 0.2, 0.5)
    assert float(uneven.per_tau()) == pytest.approx(math.log(0.8 / 0.5) + math.log(0.5 / 0.2))
    with pytest.raises(BadValue, match="0 < low < high"):
        targets.for_period(1.0, 0.6, 0.5)


def test_leakage_moves_the_final_level():
    # A constant current I drawn at the node moves the final level to Vs − I·R (Thevenin, any circuits text).
    # 3.3 V, 1 µA drawn, R = 1 MΩ: V∞ = 2.3 V; time to 1.65 V = τ·ln(2.3 / 0.65).
    target = targets.for_delay(1.0, 0.5, scale_v=3.3, leak_a=1e-6)
    assert float(target.per_tau(1e6)) == pytest.approx(math.log(2.3 / 0.65))
    assert target.tau_s is None  # no single time constant once leakage is in
    # the quantity for R and C, and the C a given R needs, agree
    c = float(target.partner(np.array([1e6]), 0.5, True)[0])
    assert float(target.quantity(1e6, c)) == pytest.approx(0.5)
    # leakage that keeps the node below the threshold: never reached (NaN)
    assert np.isnan(target.per_tau(2e6))
