"""Reading and writing values: SI prefixes, the IEC 60062 RKM code, percent, ppm.

Everything inside rcpick is an SI float (ohm, farad, second, hertz, volt);
this module is the only place that turns text into numbers and back.

Accepted input, by example:

* SI prefix, with or without the unit: ``4.7k``, ``4.7kΩ``, ``4.7 kohm``,
  ``100n``, ``100nF``, ``0.1u``, ``0.1µF``, ``1e-7``, ``10ms``, ``2.5 s``,
  ``1.5kHz``, ``3.3V``. ``m`` is milli and ``M`` mega; ``Meg``/``MEG`` is
  also mega.
* IEC 60062 RKM code, for resistors and capacitors only: the letter stands
  where the decimal point would (``4K7``, ``R47``, ``4R7``, ``470R``,
  ``2M2``, ``4n7``, ``2u2``, ``1µ0``, ``100n``). Resistor letters are
  L (×10⁻³), R, K, M, G, T; capacitor letters p, n, u/µ, m, F.
* Percent (``5%``) and ppm (``100ppm``, ``100 ppm/°C``).

References
----------
IEC 60062:2016, Marking codes for resistors and capacitors (RKM code).
"""

from __future__ import annotations

import math
import re
from decimal import Decimal, InvalidOperation

from rcpick.errors import BadValue

#: SI prefix → power of ten.
PREFIXES: dict[str, int] = {
    "f": -15, "p": -12, "n": -9, "u": -6, "µ": -6, "μ": -6, "m": -3,
    "": 0, "k": 3, "K": 3, "M": 6, "Meg": 6, "MEG": 6, "meg": 6, "G": 9, "T": 12,
}

#: Quantity kind → (unit symbol for output, accepted unit spellings).
UNITS: dict[str, tuple[str, tuple[str, ...]]] = {
    "resistance": ("Ω", ("Ω", "Ω", "ohm", "ohms", "Ohm", "Ohms", "OHM")),
    "capacitance": ("F", ("F",)),
    "time": ("s", ("s", "sec")),
    "frequency": ("Hz", ("Hz", "hz", "HZ")),
    "voltage": ("V", ("V", "v")),
    "current": ("A", ("A",)),
}

EXAMPLES: dict[str, str] = {
    "resistance": "4.7k, 4K7, 4.7kΩ, 470R, 2M2",
    "capacitance": "100n, 100nF, 4n7, 0.1µF, 2u2",
    "time": "10ms, 2.5s, 1e-3",
    "frequency": "1.5kHz, 159Hz",
    "voltage": "3.3V, 12.97V, 10kV",
    "current": "1mA, 10uA",
}

_RKM_LETTERS: dict[str, dict[str, int]] = {
    "resistance": {"L": -3, "R": 0, "K": 3, "k": 3, "M": 6, "G": 9, "T": 12},
    "capacitance": {"p": -12, "n": -9, "u": -6, "µ": -6, "μ": -6, "m": -3, "F": 0},
}
_RKM_OUT: dict[str, dict[int, str]] = {
    "resistance": {-3: "L", 0: "R", 3: "K", 6: "M", 9: "G", 12: "T"},
    "capacitance": {-12: "p", -9: "n", -6: "u", -3: "m", 0: "F"},
}
_SI_OUT: dict[int, str] = {-15: "f", -12: "p", -9: "n", -6: "µ", -3: "m", 0: "", 3: "k", 6: "M", 9: "G", 12: "T"}

_NUMBER = r"[+-]?(?:\d+(?:\.\d*)?|\.\d+)(?:[eE][+-]?\d+)?"
_SI_RE = re.compile(rf"^(?P<num>{_NUMBER})\s*(?P<rest>.*?)\s*$")
_RKM_RE = re.compile(r"^(?P<int>\d*)(?P<letter>[^\d\s.])(?P<frac>\d*)$")


def _unit_kind(unit: str) -> str | None:
    for kind, (_, spellings) in UNITS.items():
        if unit in spellings:
            return kind
    return None


def _split_prefix_unit(rest: str) -> tuple[int, str] | None:
    """Split ``'kΩ'`` into (3, 'Ω'); ``'m'`` into (-3, ''); None if unreadable."""
    for prefix in sorted(PREFIXES, key=len, reverse=True):
        if not rest.startswith(prefix):
            continue
        unit = rest[len(prefix):].strip()
        if unit == "" or _unit_kind(unit) is not None:
            return PREFIXES[prefix], unit
    return None


def _decimal_to_float(mantissa: str, exp10: int) -> float:
    """Exact decimal text × 10**exp10, rounded once to the nearest float."""
    return float(Decimal(mantissa).scaleb(exp10))


def parse_quantity(text: str, kind: str, *, option: str | None = None, positive: bool = True) -> float:
    """Read a value of one kind of quantity and return it in SI units.

    Parameters
    ----------
    text : str
        The value as typed, e.g. ``"4K7"``, ``"100nF"``, ``"10ms"``.
    kind : str
        One of ``resistance``, ``capacitance``, ``time``, ``frequency``,
        ``voltage``. A unit of another kind (``1kHz`` for a time) is an error.
    option : str, optional
        Name of the option, used in error messages.
    positive : bool
        Require a finite value greater than zero.

    Returns
    -------
    float
        The value in ohm, farad, second, hertz or volt.
    """
    symbol, _ = UNITS[kind]
    raw = text
    text = text.strip().replace(" ", "") if text else ""
    hint = f"expected a {kind} such as {EXAMPLES[kind]}"
    if not text:
        raise BadValue(f"empty value; {hint}", option=option, value=raw)
    value = None
    rkm = _RKM_RE.match(text) if kind in _RKM_LETTERS else None
    if rkm and (rkm["int"] or rkm["frac"]):
        letter = rkm["letter"]
        if letter in _RKM_LETTERS[kind]:
            value = _decimal_to_float(f"{rkm['int'] or '0'}.{rkm['frac'] or '0'}", _RKM_LETTERS[kind][letter])
        elif kind == "resistance" and letter == "m" and rkm["frac"]:
            raise BadValue(
                f"{raw!r} is ambiguous: write {rkm['int']}M{rkm['frac']} for "
                f"{rkm['int']}.{rkm['frac']} MΩ or {rkm['int']}L{rkm['frac']} for milliohm",
                option=option, value=raw)
    if value is None:
        match = _SI_RE.match(text)
        split = _split_prefix_unit(match["rest"]) if match else None
        if match is None or split is None:
            raise BadValue(f"cannot read {raw!r}; {hint}", option=option, value=raw)
        exp10, unit = split
        unit_kind = _unit_kind(unit) if unit else kind
        if unit_kind != kind:
            raise BadValue(f"{raw!r} is a {unit_kind}, not a {kind}; {hint}", option=option, value=raw)
        try:
            value = _decimal_to_float(match["num"], exp10)
        except (InvalidOperation, OverflowError):  # pragma: no cover - regex admits only numbers
            raise BadValue(f"cannot read {raw!r}; {hint}", option=option, value=raw) from None
    if not math.isfinite(value):
        raise BadValue(f"{raw!r} is not a finite {kind}", option=option, value=raw)
    if positive and value <= 0:
        raise BadValue(f"{raw!r} must be greater than 0 {symbol}", option=option, value=raw)
    return value


def parse_percent(text: str, *, option: str | None = None, bare_is_percent: bool = True) -> float:
    """Read ``'5%'`` (or ``'5'`` when ``bare_is_percent``) and return the fraction 0.05."""
    raw = text
    text = text.strip().replace(" ", "")
    has_sign = text.endswith("%")
    body = text[:-1] if has_sign else text
    if not re.fullmatch(_NUMBER, body or "x") or not (has_sign or bare_is_percent):
        raise BadValue(f"cannot read {raw!r}; expected a percentage such as 5%", option=option, value=raw)
    return float(Decimal(body).scaleb(-2))


def parse_ppm(text: str, *, option: str | None = None) -> float:
    """Read ``'100ppm'``, ``'100 ppm/°C'`` or ``'100'`` and return the coefficient in 1/°C (1e-4)."""
    raw = text
    text = text.strip().replace(" ", "")
    body = re.sub(r"ppm(/(°C|C|K|°K))?$", "", text)
    if not re.fullmatch(_NUMBER, body or "x"):
        raise BadValue(f"cannot read {raw!r}; expected a coefficient such as 100ppm", option=option, value=raw)
    return float(Decimal(body).scaleb(-6))


def _sig_digits(value: float, digits: int) -> tuple[str, int]:
    """Significant digits of ``|value|`` rounded to ``digits`` figures, and its decade exponent."""
    mantissa, exponent = f"{abs(value):.{digits - 1}e}".split("e")
    return mantissa.replace(".", ""), int(exponent)


def _place_point(figures: str, shift: int) -> tuple[str, str]:
    """Integer and fraction text of ``d.ddd × 10**shift`` written from ``figures``."""
    if shift < 0:
        return "", "0" * (-shift - 1) + figures
    figures = figures.ljust(shift + 1, "0")
    return figures[: shift + 1], figures[shift + 1:]


def format_si(value: float, unit: str, digits: int = 3, *, trim: bool = False) -> str:
    """Write a value in engineering notation: ``4.70 ms``, ``159 Hz``, ``4.7 kΩ``.

    Parameters
    ----------
    value : float
        SI value.
    unit : str
        Unit symbol to append (``"s"``, ``"Ω"``, ...), may be empty.
    digits : int
        Significant figures.
    trim : bool
        Drop trailing zeros (for part values: ``4.7 kΩ`` rather than ``4.70 kΩ``).
    """
    if value == 0 or not math.isfinite(value):
        return f"{value:g} {unit}".strip()
    figures, exponent = _sig_digits(value, digits)
    group = max(min(3 * math.floor(exponent / 3), 12), -15)
    whole, frac = _place_point(figures, exponent - group)
    if trim:
        frac = frac.rstrip("0")
    text = f"{whole or '0'}.{frac}" if frac else whole
    sign = "-" if value < 0 else ""
    return f"{sign}{text} {_SI_OUT[group]}{unit}".rstrip()


def format_rkm(value: float, kind: str, digits: int = 4) -> str:
    """Write a part value in the IEC 60062 RKM code: ``4K7``, ``R47``, ``470R``, ``100n``, ``2u2``.

    Parameters
    ----------
    value : float
        Resistance in ohm or capacitance in farad (> 0).
    kind : str
        ``resistance`` or ``capacitance``.
    digits : int
        Most significant figures kept (trailing zeros are dropped).
    """
    letters = _RKM_OUT[kind]
    figures, exponent = _sig_digits(value, digits)
    figures = figures.rstrip("0") or "0"
    lowest, highest = min(letters), max(letters)
    group = max(min(3 * math.floor(exponent / 3), highest), lowest)
    if kind == "resistance" and group == -3 and exponent == -1:
        group = 0  # 0.47 Ω reads R47, the usual form, rather than 470L
    whole, frac = _place_point(figures, exponent - group)
    return f"{whole}{letters[group]}{frac.rstrip('0')}"


def _split_range(text: str) -> list[str]:
    """``'a:b'`` → ['a', 'b']; ``'a'`` → ['a']."""
    return [part.strip() for part in text.split(":")] if ":" in text else [text.strip()]


def parse_band(text: str, *, option: str | None = None) -> tuple[float, float]:
    """A relative band: ``'5%'`` → (-0.05, 0.05); ``'-20%:+80%'`` → (-0.2, 0.8). Bare numbers are percent."""
    parts = _split_range(text)
    if len(parts) == 1:
        half = parse_percent(parts[0], option=option)
        return -abs(half), abs(half)
    if len(parts) != 2:
        raise BadValue(f"cannot read {text!r}; expected 5% or a range such as -20%:+80%", option=option, value=text)
    low, high = (parse_percent(p, option=option) for p in parts)
    return low, high


def parse_ppm_band(text: str, *, option: str | None = None) -> tuple[float, float]:
    """A coefficient bound: ``'30ppm'`` → ±30e-6 /°C; ``'-870ppm:-630ppm'`` → (-870e-6, -630e-6)."""
    parts = _split_range(text)
    if len(parts) == 1:
        half = abs(parse_ppm(parts[0], option=option))
        return -half, half
    if len(parts) != 2:
        raise BadValue(f"cannot read {text!r}; expected 100ppm or a range such as -870ppm:-630ppm", option=option, value=text)
    low, high = (parse_ppm(p, option=option) for p in parts)
    if low > high:
        raise BadValue(f"range {text!r} runs backwards; write the lower coefficient first", option=option, value=text)
    return low, high


def parse_temperature_range(text: str, *, option: str | None = None) -> tuple[float, float]:
    """``'0:70'``, ``'-40:85'``, ``'25'`` (°C, an optional ``°C``/``C`` suffix) → (min, max) in °C."""
    parts = _split_range(text)
    values = []
    for part in parts:
        body = re.sub(r"\s*(°C|C|degC)$", "", part)
        if not re.fullmatch(_NUMBER, body or "x"):
            raise BadValue(f"cannot read {text!r}; expected MIN:MAX in °C such as 0:70 or -40:85, or one temperature",
                           option=option, value=text)
        values.append(float(body))
    if len(values) == 1:
        values.append(values[0])
    if len(values) != 2:
        raise BadValue(f"cannot read {text!r}; expected MIN:MAX in °C such as -40:85", option=option, value=text)
    low, high = values
    if low > high:
        raise BadValue(f"minimum {low:g} °C is above maximum {high:g} °C", option=option, value=text)
    if low < -273.15:
        raise BadValue(f"{low:g} °C is below absolute zero (−273.15 °C)", option=option, value=text)
    return low, high


_JOINERS = {"+": "series", "//": "parallel", "||": "parallel", "∥": "parallel"}


def parse_arrangement(text: str, kind: str, *, option: str | None = None) -> tuple[str, list[float]]:
    """One part or a wired pair: ``4k7`` → ('single', [4700]); ``4k7+330`` → ('series', …);
    ``10k//10k``, ``10k||10k``, ``10k∥10k`` → ('parallel', …)."""
    found = [(j, name) for j, name in _JOINERS.items() if j in text]
    if not found:
        return "single", [parse_quantity(text, kind, option=option)]
    joiner, name = found[0]
    pieces = text.split(joiner)
    if len(found) > 1 or len(pieces) != 2:
        raise BadValue(f"cannot read {text!r}; give one part (4k7) or two wired in series (4k7+330) or parallel "
                       f"(10k//10k)", option=option, value=text)
    return name, [parse_quantity(p, kind, option=option) for p in pieces]
