"""Stress on the parts of a design: the highest power and voltage each resistor sees, the voltage on each capacitor.

Known only when a voltage is (``supply``). The worst instant is the first
one: a resistor charging a node from V0 towards Vs sees Vs − V0, one
discharging a node from V0 sees V0; an oscillator's resistor sees the larger of
Vs − V_low and V_high. A series pair of resistors shares the voltage in
proportion to resistance, a parallel pair sees it whole; a series pair of
capacitors shares theirs in inverse proportion to capacitance (the split just
after a step; at DC it is set by the parts' leakage unless balancing resistors
are fitted). Ratings are derated: a part is within them when its power is at
most ``derate[0]`` of its rated power and its voltage at most ``derate[1]`` of
its rated voltage.

References
----------
P = V²/R and E = ½CV² (OpenStax *College Physics 2e* §21.1 and §19.7, eq. 19.73).
Rated power and limiting element voltage of resistors: IEC 60115-1 (definitions).
Derating to 50 % of power and 80 % of voltage: common practice (NASA EEE-INST-002 gives derating tables).
"""

from __future__ import annotations

from dataclasses import dataclass

#: The usual touch-safety boundary for ripple-free DC: ES1 of IEC 62368-1 (from memory; SELV in IEC 60950-1).
EXTRA_LOW_VOLTAGE = 60.0


@dataclass(frozen=True)
class Ratings:
    """Per-part ratings (None where unknown) and the share of each a part may use."""

    r_power_w: float | None
    r_voltage_v: float | None
    c_voltage_v: float | None
    derate: tuple[float, float]
    source: str


def r_voltage(target) -> float | None:
    """Highest voltage across the R position (V), or None without a supply."""
    vs = target.scale_v
    if vs is None:
        return None
    if target.kind == "delay":
        start = target.start_level * vs
        return start if target.falling else vs - start
    if target.kind == "period":
        assert target.thresholds is not None
        low, high = target.thresholds
        return max(vs * (1 - low), vs * high)
    return vs  # a step from 0 to the supply


def c_voltage(target) -> float | None:
    """Highest voltage across the C position (V), or None without a supply."""
    vs = target.scale_v
    if vs is None:
        return None
    if target.kind == "delay" and target.falling:
        return target.start_level * vs
    if target.kind == "period":
        assert target.thresholds is not None
        return target.thresholds[1] * vs
    return max(vs, target.start_level * vs) if target.kind == "delay" else vs


def split(total: float, parts: list[float], arrangement: str, kind: str) -> list[float]:
    """Each part's share of the voltage across its position."""
    if arrangement != "series":
        return [total] * len(parts)
    if kind == "resistance":
        whole = sum(parts)
        return [total * p / whole for p in parts]
    a, b = parts
    return [total * b / (a + b), total * a / (a + b)]


def of_design(
    target,
    r_parts: list[float],
    r_arrangement: str,
    c_parts: list[float],
    c_arrangement: str,
    c_farad: float,
    ratings: Ratings,
    line_voltages: list[float | None] | None = None,
) -> dict | None:
    """The ``stress`` member of a candidate: per part powers and voltages, whether all are within ratings."""
    v_r = r_voltage(target)
    v_c = c_voltage(target)
    if v_r is None or v_c is None:
        return None
    r_volts = split(v_r, r_parts, r_arrangement, "resistance")
    r_power = [v * v / r for v, r in zip(r_volts, r_parts)]
    c_volts = split(v_c, c_parts, c_arrangement, "capacitance")
    p_share, v_share = ratings.derate
    checks = []
    if ratings.r_power_w is not None:
        checks += [p <= p_share * ratings.r_power_w for p in r_power]
    if ratings.r_voltage_v is not None:
        checks += [v <= v_share * ratings.r_voltage_v for v in r_volts]
    c_ratings = [(line or ratings.c_voltage_v) for line in (line_voltages or [None] * len(c_parts))]
    checks += [v <= v_share * rating for v, rating in zip(c_volts, c_ratings) if rating is not None]
    out = {
        "r_power_w": r_power,
        "r_voltage_v": r_volts,
        "c_voltage_v": c_volts,
        "within_ratings": all(checks),
        "peak_power_w": v_r * v_r / _effective(r_parts, r_arrangement),
        "ratings": {
            "r_power_w": ratings.r_power_w,
            "r_voltage_v": ratings.r_voltage_v,
            "c_voltage_v": [r for r in c_ratings],
            "derate": list(ratings.derate),
            "source": ratings.source,
        },
    }
    if target.kind == "delay" and target.falling:
        out["energy_j"] = 0.5 * c_farad * v_c * v_c
    if r_arrangement == "series":
        # one part failing short leaves the whole voltage on the other
        out["single_fault_voltage_v"] = v_r
    return out


def _effective(parts: list[float], arrangement: str) -> float:
    if arrangement == "series":
        return sum(parts)
    if arrangement == "parallel":
        return parts[0] * parts[1] / (parts[0] + parts[1])
    return parts[0]


def flags(stress: dict | None) -> list[str]:
    """Notes for the table: what exceeds its derated rating."""
    if not stress or stress["within_ratings"]:
        return []
    r = stress["ratings"]
    p_share, v_share = r["derate"]
    notes = []
    if r["r_power_w"] is not None and max(stress["r_power_w"]) > p_share * r["r_power_w"]:
        notes.append(
            f"a resistor dissipates {max(stress['r_power_w']):.3g} W, over {p_share:.0%} of its "
            f"{r['r_power_w']:g} W rating"
        )
    if r["r_voltage_v"] is not None and max(stress["r_voltage_v"]) > v_share * r["r_voltage_v"]:
        notes.append(
            f"a resistor sees {max(stress['r_voltage_v']):.4g} V, over {v_share:.0%} of its "
            f"{r['r_voltage_v']:g} V rating"
        )
    for v, rating in zip(stress["c_voltage_v"], r["c_voltage_v"]):
        if rating is not None and v > v_share * rating:
            notes.append(f"a capacitor sees {v:.4g} V, over {v_share:.0%} of its {rating:g} V rating")
            break
    return notes


def safety_caution(target) -> str | None:
    """The caution a discharge of stored energy from above extra-low voltage carries."""
    if target.kind != "delay" or not target.falling or target.scale_v is None:
        return None
    start = target.start_level * target.scale_v
    if start <= EXTRA_LOW_VOLTAGE:
        return None
    return (
        f"Safety: this discharge starts at {start:.4g} V, above the {EXTRA_LOW_VOLTAGE:g} V DC extra-low-voltage "
        f"limit (ES1 of IEC 62368-1), so the bleeder is a safety function. Design, rate and verify it to the "
        f"standard in force (IEC 60204-1, IEC 60335-1 or IEC 61010-1 as applicable), local codes and licensed "
        f"practice. Build the resistor as a series chain rated so that one part failing short leaves the rest "
        f"within rating (with two in series the survivor sees the full {start:.4g} V); one failing open stops the "
        f"discharge, so a second, independent bleeder is common practice. rcpick gives estimates only."
    )
