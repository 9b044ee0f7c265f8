"""Timing targets: time constant, corner frequency, delay between two levels, oscillator period.

A target turns the effective R and C of a design into the quantity asked
for (seconds or hertz). Without leakage the quantity depends on R·C alone, so
the target has one required time constant ``tau_s``; with a leakage current at
the node it depends on R and C separately (the final level is V∞ − I·R), and
the search asks the target for the capacitance each resistance needs.

Levels are fractions of the *scale*: the supply the node charges towards
(rising), or the start value when a discharge gives no supply.

References
----------
OpenStax, *College Physics 2e*, §21.6, eqs. 21.77–21.80 (charging
V∞(1 − e^(−t/RC)), discharging V0·e^(−t/RC)), generalised to
v(t) = V∞ + (V0 − V∞)·e^(−t/τ).
T. Kuphaldt, *Lessons in Electric Circuits* Vol. I, ch. 16 (time between two
levels, t = τ·ln((V∞ − V0)/(V∞ − V1))).
"""

from __future__ import annotations

import math
from dataclasses import dataclass
from typing import Any

import numpy as np

from rcpick.errors import BadValue

KINDS = ("tau", "cutoff", "delay", "period")
LIMITS = ("upper", "lower")


@dataclass(frozen=True)
class Target:
    """What the engineer asked for.

    Attributes
    ----------
    kind : str
        ``tau`` (s), ``cutoff`` (first-order corner, Hz), ``delay`` (s from a
        start level to a threshold) or ``period`` (s, RC relaxation oscillator).
    value : float
        The requested value in ``unit``.
    unit : str
        ``"s"`` or ``"Hz"``.
    threshold : float or None
        Delay: the level crossed, a fraction of the scale.
    start : float or None
        Delay: the level at t = 0, a fraction of the scale (0 rising, 1 falling when not given).
    falling : bool
        Delay: the node discharges towards 0 instead of charging towards the scale.
    thresholds : (float, float) or None
        Period: the oscillator's lower and upper switching levels, fractions of the supply.
    scale_v : float or None
        The supply (or start value when falling) in volts, when given.
    leak_a : float
        Constant current drawn out of the node, A (negative: into it); needs ``scale_v``.
    limit : str or None
        ``upper`` (every unit at or below the value), ``lower`` (at or above), or None (a window).
    """

    kind: str
    value: float
    unit: str
    threshold: float | None = None
    start: float | None = None
    falling: bool = False
    thresholds: tuple[float, float] | None = None
    scale_v: float | None = None
    leak_a: float = 0.0
    limit: str | None = None

    # --- levels ---------------------------------------------------------------

    @property
    def start_level(self) -> float:
        """Delay: the start level as a fraction of the scale."""
        if self.start is not None:
            return self.start
        return 1.0 if self.falling else 0.0

    @property
    def times_per_tau(self) -> bool:
        """True for targets measured in seconds that scale with R·C (tau, delay, period)."""
        return self.kind != "cutoff"

    def _leak_fraction(self, r_ohm):
        """I·R as a fraction of the scale (0 without leakage)."""
        if not self.leak_a:
            return 0.0
        assert self.scale_v is not None
        return self.leak_a * np.asarray(r_ohm, dtype=float) / self.scale_v

    def per_tau(self, r_ohm=None, deviation=None) -> np.ndarray | float:
        """The quantity divided by tau (delay and period; 1 for tau).

        Parameters
        ----------
        r_ohm : array, optional
            Effective resistance, needed only with leakage.
        deviation : array or (array, array), optional
            Relative deviations of the threshold (delay) or of the low and high thresholds (period).

        Returns NaN where the node never reaches the level asked.
        """
        if self.kind in ("tau", "cutoff"):
            return 1.0
        leak = self._leak_fraction(r_ohm) if self.leak_a else 0.0
        with np.errstate(divide="ignore", invalid="ignore"):
            if self.kind == "delay":
                assert self.threshold is not None
                th = self.threshold if deviation is None else self.threshold * (1.0 + np.asarray(deviation))
                final = -leak if self.falling else 1.0 - leak
                ratio = (final - self.start_level) / (final - np.asarray(th))
                return np.where(ratio > 1.0, np.log(np.where(ratio > 1.0, ratio, 2.0)), np.nan)
            assert self.thresholds is not None
            low: Any = self.thresholds[0]
            high: Any = self.thresholds[1]
            if deviation is not None:
                low, high = low * (1.0 + np.asarray(deviation[0])), high * (1.0 + np.asarray(deviation[1]))
            charge = ((1.0 - leak) - low) / ((1.0 - leak) - np.asarray(high))
            discharge = (high + leak) / (np.asarray(low) + leak)
            ok = (charge > 1.0) & (discharge > 1.0) & (np.asarray(low) < high)
            return np.where(ok, np.log(np.where(ok, charge, 2.0)) + np.log(np.where(ok, discharge, 2.0)), np.nan)

    def half_periods(self, tau_s, r_ohm=None) -> tuple[np.ndarray, np.ndarray]:
        """Period targets: (charging time, discharging time), s."""
        assert self.thresholds is not None
        low, high = self.thresholds
        leak = self._leak_fraction(r_ohm) if self.leak_a else 0.0
        tau = np.asarray(tau_s, dtype=float)
        return tau * np.log(((1.0 - leak) - low) / ((1.0 - leak) - high)), tau * np.log((high + leak) / (low + leak))

    # --- quantity ---------------------------------------------------------------

    def quantity(self, r_ohm, c_farad, deviation=None) -> np.ndarray:
        """The target's quantity (s or Hz) of effective R and C (arrays broadcast)."""
        tau = np.asarray(r_ohm, dtype=float) * np.asarray(c_farad, dtype=float)
        if self.kind == "cutoff":
            return 1.0 / (2.0 * math.pi * tau)
        if self.kind == "tau":
            return tau
        return tau * self.per_tau(r_ohm if self.leak_a else None, deviation)

    def of_tau(self, tau_s) -> np.ndarray:
        """The quantity for time constants ``tau_s`` (targets without leakage)."""
        tau = np.asarray(tau_s, dtype=float)
        if self.kind == "cutoff":
            return 1.0 / (2.0 * math.pi * tau)
        return tau * self.per_tau()

    def error(self, quantity) -> np.ndarray:
        """Signed relative error: quantity/target − 1."""
        return np.asarray(quantity, dtype=float) / self.value - 1.0

    @property
    def tau_s(self) -> float | None:
        """The time constant that meets the target exactly; None when leakage makes it depend on R."""
        if (
            self.leak_a
            or (self.kind == "delay" and self.threshold is None)
            or (self.kind == "period" and self.thresholds is None)
        ):
            return None  # leakage, or a level defined by a network node rather than by a fraction of the step
        return self.tau_of(self.value)

    def tau_of(self, quantity: float) -> float:
        """The time constant whose quantity is ``quantity`` (targets without leakage)."""
        if self.kind == "cutoff":
            return 1.0 / (2.0 * math.pi * quantity)
        return quantity / float(self.per_tau())

    def partner(self, outer, quantity: float, outer_is_r: bool) -> np.ndarray:
        """The inner value (C for an outer R, R for an outer C) giving ``quantity`` exactly.

        With leakage the outer set must be the resistances: for a fixed R the quantity is
        linear in C. NaN where an outer value cannot reach the quantity at all.
        """
        outer = np.asarray(outer, dtype=float)
        if not self.leak_a:
            return self.tau_of(quantity) / outer
        if not outer_is_r:
            raise ValueError("with leakage the search iterates over resistances")
        with np.errstate(divide="ignore", invalid="ignore"):
            return quantity / (outer * self.per_tau(outer))

    @property
    def rises_with_tau(self) -> bool:
        """Whether the quantity grows with R and C (times do; a corner frequency falls)."""
        return self.kind != "cutoff"

    def describe(self) -> str:
        """One line naming the target (without the value's spread)."""
        from rcpick.notation import format_si

        text = f"{self.kind} = {format_si(self.value, self.unit)}"
        if self.kind == "delay" and self.threshold is not None:
            way = "falling" if self.falling else "rising"
            text += f", {way} from {self._level_text(self.start_level)} to {self._level_text(self.threshold)}"
        elif self.kind == "period" and self.thresholds is not None:
            text += f", between {self._level_text(self.thresholds[0])} and {self._level_text(self.thresholds[1])}"
        if self.leak_a:
            text += f", leakage {format_si(self.leak_a, 'A')} out of the node"
        tau = self.tau_s
        if self.kind != "tau" and tau is not None:
            text += f" (tau {format_si(tau, 's')})"
        return text

    def typed_level(self, fraction: float) -> str:
        """A level for a message, to six figures so it reads as typed (``3.2999 V``, ``0.7 of the step``)."""
        from rcpick.notation import format_si

        if self.scale_v is not None:
            return format_si(fraction * self.scale_v, "V", 6, trim=True)
        return f"{fraction:.6g} of the step"

    def _level_text(self, fraction: float) -> str:
        from rcpick.notation import format_si

        if self.scale_v is not None:
            return format_si(fraction * self.scale_v, "V", 4)
        return f"{fraction:.4g} of the step"


def for_tau(tau_s: float) -> Target:
    """A time-constant target."""
    return Target("tau", tau_s, "s")


def for_cutoff(frequency_hz: float) -> Target:
    """A first-order corner-frequency target, fc = 1/(2πRC)."""
    return Target("cutoff", frequency_hz, "Hz")


def for_delay(
    delay_s: float,
    threshold: float,
    falling: bool = False,
    *,
    start: float | None = None,
    scale_v: float | None = None,
    leak_a: float = 0.0,
) -> Target:
    """A delay target: time from the start level (0, or 1 when falling) to ``threshold`` (fractions of the scale)."""
    target = Target("delay", delay_s, "s", threshold, start, falling, scale_v=scale_v, leak_a=leak_a)
    check_levels(target)
    return target


def for_period(
    period_s: float, low: float, high: float, *, scale_v: float | None = None, leak_a: float = 0.0
) -> Target:
    """An RC relaxation oscillator's period: charging from ``low`` to ``high`` towards the supply,
    discharging from ``high`` to ``low`` towards 0 through the same R (fractions of the supply)."""
    target = Target("period", period_s, "s", thresholds=(low, high), scale_v=scale_v, leak_a=leak_a)
    check_levels(target)
    return target


def check_levels(target: Target) -> None:
    """Refuse levels the node cannot pass between (without leakage; leakage is checked per design).

    The message shows the levels as typed (volts when there is a supply) and blames the
    setting that is out of place: the threshold when it lies outside the step, the start
    level (``from_level``) when only the start is on the wrong side of the threshold.
    """
    if target.kind == "delay":
        th, start = target.threshold, target.start_level
        assert th is not None
        shown = target.typed_level
        top = "the supply" if target.scale_v is not None else "1 of the step"
        if not 0.0 < th < 1.0:
            raise BadValue(
                f"threshold {shown(th)} must lie between 0 and {top}, both ends excluded", setting="threshold"
            )
        if target.falling and not th < start:
            raise BadValue(
                f"a falling node must start above its threshold (start {shown(start)}, threshold {shown(th)})",
                setting="from_level",
            )
        if not target.falling and not start < th:
            raise BadValue(
                f"a rising node must start below its threshold (start {shown(start)}, threshold {shown(th)})",
                setting="from_level",
            )
    elif target.kind == "period":
        assert target.thresholds is not None
        low, high = target.thresholds
        if not 0.0 < low < high < 1.0:
            shown = target.typed_level
            raise BadValue(
                f"the thresholds must satisfy 0 < low < high < supply, got {shown(low)} and {shown(high)}",
                setting="thresholds",
            )


def delay_factor(threshold: float, falling: bool) -> float:
    """Delay from the step in units of tau to reach ``threshold`` (fraction, 0 < f < 1)."""
    return float(for_delay(1.0, threshold, falling).per_tau())


def level_fraction(level: float, *, is_volts: bool, scale_v: float | None, setting: str) -> float:
    """A level typed as a fraction or as volts, as a fraction of the scale."""
    if not is_volts:
        return level
    if scale_v is None:
        raise BadValue(
            "a level in volts needs {supply} (the step's final value, or the start value when falling)", setting=setting
        )
    return level / scale_v
