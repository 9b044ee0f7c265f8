"""Timing targets (time constant, corner frequency, threshold delay) and their tau.

A target of any kind becomes one required time constant ``tau_s`` at the
start; candidates' time constants are turned back into the target's own
quantity at the end.

References
----------
OpenStax, *College Physics 2e*, §21.6, eqs. 21.77–21.80 (charging
V∞(1 − e^(−t/RC)), discharging V0·e^(−t/RC)).
T. Kuphaldt, *Lessons in Electric Circuits* Vol. I, ch. 16 (time to a
threshold, t = τ·ln((V∞ − V0)/(V∞ − Vth))).
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from rcpick.errors import BadValue

KINDS = ("tau", "cutoff", "delay")


@dataclass(frozen=True)
class Target:
    """What the engineer asked for.

    Attributes
    ----------
    kind : str
        ``tau`` (seconds), ``cutoff`` (first-order corner, hertz) or ``delay``
        (seconds to cross a threshold).
    value : float
        The requested value in ``unit``.
    unit : str
        ``"s"`` or ``"Hz"``.
    tau_s : float
        The time constant that meets the target exactly, in seconds.
    threshold : float or None
        For a delay: the threshold as a fraction of the final value (rising)
        or of the start value (falling).
    falling : bool
        For a delay: the node discharges instead of charging.
    """

    kind: str
    value: float
    unit: str
    tau_s: float
    threshold: float | None = None
    falling: bool = False

    @property
    def delay_per_tau(self) -> float:
        """Delay divided by tau: ln(1/(1 − f)) rising, ln(1/f) falling."""
        return delay_factor(self.threshold, self.falling) if self.kind == "delay" else 1.0

    def quantity(self, tau_s: np.ndarray | float) -> np.ndarray:
        """The target's quantity (s or Hz) for time constant(s) ``tau_s``."""
        tau_s = np.asarray(tau_s, dtype=float)
        if self.kind == "cutoff":
            return 1.0 / (2.0 * math.pi * tau_s)
        return tau_s * self.delay_per_tau

    def tau_for_error(self, error: float) -> float:
        """The time constant (s) whose quantity has relative error ``error`` against the target."""
        if self.kind == "cutoff":
            return self.tau_s / (1.0 + error)
        return self.tau_s * (1.0 + error)

    def error(self, tau_s: np.ndarray | float) -> np.ndarray:
        """Signed relative error of the quantity: quantity/target − 1."""
        return self.quantity(tau_s) / self.value - 1.0


def delay_factor(threshold: float, falling: bool) -> float:
    """Delay in units of tau to reach ``threshold`` (fraction, 0 < f < 1)."""
    if not 0.0 < threshold < 1.0:
        raise BadValue(f"threshold must lie strictly between 0 and 1 of the step, got {threshold:g}")
    return math.log(1.0 / threshold) if falling else math.log(1.0 / (1.0 - threshold))


def for_tau(tau_s: float) -> Target:
    """A time-constant target."""
    return Target("tau", tau_s, "s", tau_s)


def for_cutoff(frequency_hz: float) -> Target:
    """A first-order corner-frequency target, fc = 1/(2πRC)."""
    return Target("cutoff", frequency_hz, "Hz", 1.0 / (2.0 * math.pi * frequency_hz))


def for_delay(delay_s: float, threshold: float, falling: bool = False) -> Target:
    """A delay target: time from the step to the node crossing ``threshold``."""
    return Target("delay", delay_s, "s", delay_s / delay_factor(threshold, falling), threshold, falling)


def threshold_fraction(level: float, *, is_voltage: bool, supply_v: float | None, falling: bool) -> float:
    """Turn a threshold given as a fraction or as a voltage into a fraction of the step.

    Parameters
    ----------
    level : float
        A fraction (0.7) or a voltage (volts) when ``is_voltage``.
    supply_v : float, optional
        The final value when charging, or the start value when falling (volts).
    """
    if is_voltage:
        if supply_v is None:
            raise BadValue("a threshold in volts needs --supply (the step's final value, or the start value with --falling)")
        if level >= supply_v:
            raise BadValue(f"threshold {level:g} V must be below the supply {supply_v:g} V")
        level = level / supply_v
    if not 0.0 < level < 1.0:
        raise BadValue(f"threshold must lie strictly between 0 and 1 (or 0 % and 100 %), got {level:g}")
    return level
