"""IEC 60063 preferred number series (E3 … E192): values in a range, neighbours of a value.

The decade values are read from ``data/eseries.toml`` exactly as published;
nothing here derives them from 10^(i/n).

References
----------
IEC 60063:2015, Preferred number series for resistors and capacitors.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from rcpick.datafiles import load_toml
from rcpick.errors import BadValue, RcpickError, UnknownName

#: Relative slack when deciding whether a value lies on a range end.
RANGE_SLACK = 1e-9


@dataclass(frozen=True)
class Series:
    """One E-series: its name, decade significant figures and usual tolerance."""

    name: str
    digits: tuple[int, ...]  # e.g. (10, 11, 12, ...) for E24; (100, 102, ...) for E192
    tolerance: float  # usual tolerance as a fraction, e.g. 0.05 for E24
    note: str = ""

    @property
    def figures(self) -> int:
        """Significant figures of each value (2 for E3…E24, 3 for E48…E192)."""
        return len(str(self.digits[0]))

    def values(self, low: float, high: float) -> np.ndarray:
        """Every value of the series in [low, high] (both ends included), ascending, in SI units."""
        if not (low > 0 and high > 0 and math.isfinite(low) and math.isfinite(high)):
            raise BadValue(f"range ends must be finite and > 0, got {low!r}…{high!r}")
        if low > high:
            raise BadValue(f"range is empty: minimum {low!r} is above maximum {high!r}")
        first = math.floor(math.log10(low)) - 1
        last = math.ceil(math.log10(high)) + 1
        shift = self.figures - 1
        out = [
            float(f"{d}e{decade - shift}")  # decimal text → nearest float, as the parser does
            for decade in range(first, last + 1)
            for d in self.digits
        ]
        arr = np.array(out)
        keep = (arr >= low * (1 - RANGE_SLACK)) & (arr <= high * (1 + RANGE_SLACK))
        return arr[keep]

    def neighbours(self, value: float) -> tuple[float, float]:
        """Series values just below-or-equal and just above-or-equal ``value`` (SI)."""
        around = self.values(value / 100, value * 100)
        below = around[around <= value * (1 + RANGE_SLACK)][-1]
        above = around[around >= value * (1 - RANGE_SLACK)][0]
        return float(below), float(above)


def names() -> list[str]:
    """Series names in the data file, coarsest first (E3, E6, …, E192)."""
    return list(load_toml("eseries.toml"))


def get(name: str) -> Series:
    """Look up a series by name (``E24``, ``e24`` or ``24``)."""
    table = load_toml("eseries.toml")
    key = name.strip().upper()
    if not key.startswith("E"):
        key = "E" + key
    if key not in table:
        raise UnknownName(f"unknown series {name!r}; accepted: {', '.join(table)}", value=name)
    entry = table[key]
    return Series(key, tuple(entry["digits"]), entry["tolerance_pct"] / 100, entry.get("note", ""))


def closest(below: float, above: float, value: float) -> float:
    """The nearer of two neighbours by ratio (log distance), the lower one on a tie."""
    return below if value / below <= above / value else above


_CAPACITOR_MARKS = ("F", "p", "n", "u", "µ", "μ")
_DEFAULT_RANGE = {"resistance": ("1k", "10k"), "capacitance": ("1n", "10n")}


def series_values(series_name: str, *, low=None, high=None, around=None, part: str | None = None) -> dict:
    """The values of an IEC 60063 series in a range (both ends included), or the two around one value.

    ``part`` is ``resistor`` or ``capacitor`` (guessed from the values' units when not given). Returns the
    JSON document of ``rcpick values`` plus ``kind``.
    """
    from rcpick import settings
    from rcpick.notation import format_si

    try:
        chosen = get(series_name)
    except RcpickError as error:
        raise error.about("series") from None
    kinds = {"resistor": "resistance", "capacitor": "capacitance"}
    if part is not None and part not in kinds:
        raise BadValue(f"unknown part {part!r}; accepted: resistor, capacitor", setting="part", value=part)
    guessed = any(isinstance(t, str) and any(m in t for m in _CAPACITOR_MARKS) for t in (low, high, around))
    kind = kinds[part] if part else ("capacitance" if guessed else "resistance")

    def read(raw, name: str) -> float:
        try:
            return settings.quantity(kind)(raw)
        except RcpickError as error:
            raise error.about(name) from None

    document: dict = {"series": chosen.name, "tolerance": chosen.tolerance}
    listed = None
    if low is not None or high is not None or around is None:
        lo = read(low if low is not None else _DEFAULT_RANGE[kind][0], "from")
        hi = (
            read(high, "to")
            if high is not None
            else (lo * 10 if low is not None else read(_DEFAULT_RANGE[kind][1], "to"))
        )
        unit = "Ω" if kind == "resistance" else "F"
        if lo > hi:
            raise BadValue(
                f"{format_si(lo, unit, trim=True)} is above {{to}} {format_si(hi, unit, trim=True)}",
                setting="from",
                value=low,
            )
        if hi / lo > 1e9:
            raise BadValue("lists at most nine decades; narrow {from}…{to}", setting="to", value=high)
        listed = [float(v) for v in chosen.values(lo, hi)]
    if around is not None:
        centre = read(around, "around")
        below, above = chosen.neighbours(centre)
        document.update(below=below, above=above, closest=closest(below, above, centre), around=centre)
        if listed is None:
            listed = sorted({below, above})
    document["values"] = listed
    document["kind"] = kind
    return document
