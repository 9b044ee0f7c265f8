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
from dataclasses import dataclass
from decimal import Decimal, InvalidOperation

from rcpick.errors import BadValue

#: SI prefix → power of ten.
PREFIXES: dict[str, int] = {
    "f": -15,
    "p": -12,
    "n": -9,
    "u": -6,
    "µ": -6,
    "μ": -6,
    "m": -3,
    "": 0,
    "k": 3,
    "K": 3,
    "M": 6,
    "Meg": 6,
    "MEG": 6,
    "meg": 6,
    "G": 9,
    "T": 12,
}

#: Quantity kind → (unit symbol for output, accepted unit spellings).
UNITS: dict[str, tuple[str, tuple[str, ...]]] = {
    # U+03A9 GREEK CAPITAL LETTER OMEGA and U+2126 OHM SIGN both read as ohm.
    "resistance": ("Ω", ("\u03a9", "\u2126", "ohm", "ohms", "Ohm", "Ohms", "OHM")),
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
_SI_OUT: dict[int, str] = {
    -18: "a",
    -15: "f",
    -12: "p",
    -9: "n",
    -6: "µ",
    -3: "m",
    0: "",
    3: "k",
    6: "M",
    9: "G",
    12: "T",
    15: "P",
}

# Digits are ASCII 0-9 only (re.ASCII): other scripts' digits are refused with a message.
_NUMBER = r"[+-]?(?:[0-9]+(?:\.[0-9]*)?|\.[0-9]+)(?:[eE][+-]?[0-9]+)?"
_SI_RE = re.compile(rf"^(?P<num>{_NUMBER})\s*(?P<rest>.*?)\s*$", re.ASCII)
_RKM_RE = re.compile(r"^(?P<int>[0-9]*)(?P<letter>[^0-9\s.])(?P<frac>[0-9]*)$", re.ASCII)

#: The range of each quantity rcpick accepts (SI units); outside it a value is refused, not computed with.
LIMITS: dict[str, tuple[float, float]] = {
    "resistance": (1e-6, 1e15),  # 1 µΩ … 1 PΩ
    "capacitance": (1e-15, 1e3),  # 1 fF … 1 kF
    "time": (1e-12, 1e9),  # 1 ps … about 32 years
    "frequency": (1e-9, 1e12),  # 1 nHz … 1 THz
    "voltage": (1e-9, 1e7),  # 1 nV … 10 MV (in size)
    "current": (1e-15, 1e3),  # 1 fA … 1 kA (in size)
}


#: Temperatures rcpick accepts, °C.
TEMPERATURE_LIMITS = (-273.15, 1000.0)
#: Largest coefficient accepted, in size: 10 %/°C (1e5 ppm/°C).
PPM_LIMIT = 1e5
#: Largest percentage accepted, in size (a tolerance or window is checked more tightly by its setting).
PERCENT_LIMIT = 1e6


def _refuse_foreign_digits(text: str) -> None:
    """Digits of other scripts (Arabic-Indic, full-width …) are refused, not silently read."""
    foreign = [ch for ch in text if ch.isdigit() and not ch.isascii()]
    if foreign:
        raise BadValue(f"{text!r} contains the digit {foreign[0]!r}; type the digits 0-9", value=text)


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
        unit = rest[len(prefix) :].strip()
        if unit == "" or _unit_kind(unit) is not None:
            return PREFIXES[prefix], unit
    return None


def _decimal_to_float(mantissa: str, exp10: int) -> float:
    """Exact decimal text × 10**exp10, rounded once to the nearest float (inf when it overflows)."""
    try:
        return float(Decimal(mantissa).scaleb(exp10))
    except (InvalidOperation, OverflowError):  # pragma: no cover - the patterns admit only numbers
        return math.inf


#: Plural names used in messages ("outside the frequencies rcpick handles").
PLURALS = {"frequency": "frequencies"}


def _in_limits(value: float, kind: str, raw: object) -> float:
    """Refuse a value outside the range rcpick handles for its kind (zero is left to the caller)."""
    low, high = LIMITS[kind]
    symbol = UNITS[kind][0]
    if not math.isfinite(value):
        raise BadValue(f"{raw!r} is not a finite {kind}", value=raw)
    if value != 0 and not low <= abs(value) <= high:
        raise BadValue(
            f"{raw!r} is outside the {PLURALS.get(kind, kind + 's')} rcpick handles "
            f"({format_si(low, symbol, trim=True)} … {format_si(high, symbol, trim=True)})",
            value=raw,
        )
    return value


def parse_quantity(text: str, kind: str, *, positive: bool = True) -> float:
    """Read a value of one kind of quantity and return it in SI units.

    Parameters
    ----------
    text : str
        The value as typed, e.g. ``"4K7"``, ``"100nF"``, ``"10ms"``.
    kind : str
        One of ``resistance``, ``capacitance``, ``time``, ``frequency``,
        ``voltage``, ``current``. A unit of another kind (``1kHz`` for a time) is an error.
    positive : bool
        Require a value greater than zero; otherwise any sign (and zero) is accepted.

    Returns
    -------
    float
        The value in ohm, farad, second, hertz, volt or ampere, inside :data:`LIMITS`.
    """
    symbol, _ = UNITS[kind]
    raw = text
    text = text.strip().replace(" ", "") if text else ""
    hint = f"expected a {kind} such as {EXAMPLES[kind]}"
    if not text:
        raise BadValue(f"empty value; {hint}", value=raw)
    _refuse_foreign_digits(text)
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
                value=raw,
            )
    if value is None:
        match = _SI_RE.match(text)
        split = _split_prefix_unit(match["rest"]) if match else None
        if match is None or split is None:
            raise BadValue(f"cannot read {raw!r}; {hint}", value=raw)
        exp10, unit = split
        unit_kind = _unit_kind(unit) if unit else kind
        if unit_kind != kind:
            raise BadValue(f"{raw!r} is a {unit_kind}, not a {kind}; {hint}", value=raw)
        value = _decimal_to_float(match["num"], exp10)
    if positive and value <= 0:
        raise BadValue(f"{raw!r} must be greater than 0 {symbol}", value=raw)
    return _in_limits(value, kind, raw)


def _plain_number(text: str, what: str, example: str) -> Decimal:
    _refuse_foreign_digits(text)
    if not re.fullmatch(_NUMBER, text or "x", re.ASCII):
        raise BadValue(f"cannot read {text!r}; expected {what} such as {example}", value=text)
    return Decimal(text)


def parse_percent(text: str, *, bare_is_percent: bool = True) -> float:
    """Read ``'5%'`` (or ``'5'`` when ``bare_is_percent``) and return the fraction 0.05."""
    raw = text
    text = text.strip().replace(" ", "")
    has_sign = text.endswith("%")
    body = text[:-1] if has_sign else text
    if not (has_sign or bare_is_percent):
        raise BadValue(f"cannot read {raw!r}; expected a percentage such as 5%", value=raw)
    number = _plain_number(body, "a percentage", "5%")
    if abs(number) > PERCENT_LIMIT:
        raise BadValue(f"{raw!r} is not a sensible percentage", value=raw)
    return float(number.scaleb(-2))


def parse_ppm(text: str) -> float:
    """Read ``'100ppm'``, ``'100 ppm/°C'`` or ``'100'`` and return the coefficient in 1/°C (1e-4)."""
    raw = text
    text = text.strip().replace(" ", "")
    body = re.sub(r"ppm(/(°C|C|K|°K))?$", "", text)
    number = _plain_number(body, "a coefficient", "100ppm")
    if abs(number) > PPM_LIMIT:
        raise BadValue(f"{raw!r} is beyond ±{PPM_LIMIT:g} ppm/°C, not a part's coefficient", value=raw)
    return float(number.scaleb(-6))


def parse_count(text: str, *, what: str = "a whole number") -> int:
    """Read a count: ``20000``, ``2e4``, ``20k``, ``1M`` (k = 10³, M = 10⁶)."""
    raw = text
    text = text.strip().replace(" ", "").replace("_", "")
    _refuse_foreign_digits(text)
    scale = {"k": 3, "K": 3, "M": 6}.get(text[-1:], 0) if text else 0
    body = text[:-1] if scale else text
    if not re.fullmatch(_NUMBER, body or "x", re.ASCII):
        raise BadValue(f"{raw!r} is not {what}", value=raw)
    number = Decimal(body).scaleb(scale)
    if abs(number) > Decimal(10) ** 18 or number != number.to_integral_value():
        raise BadValue(f"{raw!r} is not {what}", value=raw)
    return int(number)


@dataclass(frozen=True)
class Level:
    """A level typed as a fraction of a step (``0.7``, ``70%``) or a voltage (``2.3V``)."""

    value: float
    volts: bool

    def text(self) -> str:
        return format_si(self.value, "V", 4) if self.volts else f"{self.value:.6g}"


def parse_level(text: str, *, signed_volts: bool = False) -> Level:
    """``'0.7'`` or ``'70%'`` → a fraction; ``'2.3V'`` → volts (a negative voltage only when ``signed_volts``)."""
    stripped = text.strip()
    if stripped[-1:] in ("V", "v"):
        return Level(parse_quantity(stripped, "voltage", positive=not signed_volts), True)
    try:
        fraction = (
            parse_percent(stripped) if stripped.endswith("%") else float(_plain_number(stripped, "a level", "0.7"))
        )
    except BadValue:
        raise BadValue(
            f"cannot read {text!r}; expected a fraction (0.7), a percent (70%) or a voltage (2.3V)", value=text
        ) from None
    return Level(fraction, False)


def _sig_digits(value: float, digits: int) -> tuple[str, int]:
    """Significant digits of ``|value|`` rounded to ``digits`` figures, and its decade exponent."""
    mantissa, exponent = f"{abs(value):.{digits - 1}e}".split("e")
    return mantissa.replace(".", ""), int(exponent)


def _place_point(figures: str, shift: int) -> tuple[str, str]:
    """Integer and fraction text of ``d.ddd × 10**shift`` written from ``figures``."""
    if shift < 0:
        return "", "0" * (-shift - 1) + figures
    figures = figures.ljust(shift + 1, "0")
    return figures[: shift + 1], figures[shift + 1 :]


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
    if not -18 <= exponent < 18:  # beyond the prefixes: plain scientific notation, never a long string
        return f"{value:.{digits - 1}e} {unit}".strip()
    group = max(min(3 * math.floor(exponent / 3), 15), -18)
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
    if len(whole) > 4 or len(frac) > 6:  # beyond the letters' range: SI notation keeps it short
        return format_si(value, UNITS[kind][0], digits, trim=True).replace(" ", "")
    return f"{whole}{letters[group]}{frac.rstrip('0')}"


def format_ppm(coefficient: float) -> float:
    """A coefficient (1/°C) as the decimal ppm/°C an engineer writes: 1e-4 → 100.0, not 99.99999999999999."""
    return float(f"{coefficient * 1e6:.12g}")


def format_percent(fraction: float, decimals: int = 1, *, signed: bool = False) -> str:
    """A fraction as percent text, ``'90.6 %'`` (``'+1.2 %'`` when signed), never ``-0.0``."""
    text = f"{fraction * 100:+.{decimals}f}" if signed else f"{fraction * 100:.{decimals}f}"
    if float(text) == 0:
        text = text.replace("-", "+" if signed else "")
    return f"{text} %"


def _split_range(text: str) -> list[str]:
    """``'a:b'`` → ['a', 'b']; ``'a'`` → ['a']."""
    return [part.strip() for part in text.split(":")] if ":" in text else [text.strip()]


def parse_band(text: str) -> tuple[float, float]:
    """A relative band: ``'5%'`` → (-0.05, 0.05); ``'-20%:+80%'`` → (-0.2, 0.8). Bare numbers are percent."""
    parts = _split_range(text)
    if len(parts) == 1:
        half = parse_percent(parts[0])
        return -abs(half), abs(half)
    if len(parts) != 2:
        raise BadValue(f"cannot read {text!r}; expected 5% or a range such as -20%:+80%", value=text)
    low, high = (parse_percent(p) for p in parts)
    return low, high


def parse_ppm_band(text: str) -> tuple[float, float]:
    """A coefficient bound: ``'30ppm'`` → ±30e-6 /°C; ``'-870ppm:-630ppm'`` → (-870e-6, -630e-6)."""
    parts = _split_range(text)
    if len(parts) == 1:
        half = abs(parse_ppm(parts[0]))
        return -half, half
    if len(parts) != 2:
        raise BadValue(f"cannot read {text!r}; expected 100ppm or a range such as -870ppm:-630ppm", value=text)
    low, high = (parse_ppm(p) for p in parts)
    if low > high:
        raise BadValue(f"range {text!r} runs backwards; write the lower coefficient first", value=text)
    return low, high


def parse_temperature_range(text: str) -> tuple[float, float]:
    """``'0:70'``, ``'-40:85'``, ``'25'`` (°C, an optional ``°C``/``C`` suffix) → (min, max) in °C."""
    parts = _split_range(text)
    values = []
    for part in parts:
        body = re.sub(r"\s*(°C|C|degC)$", "", part)
        _refuse_foreign_digits(body)
        if not re.fullmatch(_NUMBER, body or "x", re.ASCII):
            raise BadValue(
                f"cannot read {text!r}; expected MIN:MAX in °C such as 0:70 or -40:85, or one temperature", value=text
            )
        values.append(float(Decimal(body)))
    if len(values) == 1:
        values.append(values[0])
    if len(values) != 2:
        raise BadValue(f"cannot read {text!r}; expected MIN:MAX in °C such as -40:85", value=text)
    return check_temperature_range(values[0], values[1], text)


def check_temperature_range(low: float, high: float, raw: object) -> tuple[float, float]:
    """A checked (min, max) in °C: finite, ordered, from absolute zero to 1000 °C."""
    if not (math.isfinite(low) and math.isfinite(high)):
        raise BadValue(f"{raw!r} is not a finite temperature range", value=raw)
    if low > high:
        raise BadValue(f"minimum {low:g} °C is above maximum {high:g} °C", value=raw)
    if low < TEMPERATURE_LIMITS[0]:
        raise BadValue(f"{low:g} °C is below absolute zero (−273.15 °C)", value=raw)
    if high > TEMPERATURE_LIMITS[1]:
        raise BadValue(f"{high:g} °C is beyond the {TEMPERATURE_LIMITS[1]:g} °C rcpick models", value=raw)
    return float(low), float(high)


_JOINERS = {"+": "series", "//": "parallel", "||": "parallel", "∥": "parallel"}


def parse_arrangement(text: str, kind: str) -> tuple[str, list[float]]:
    """One part or a wired pair: ``4k7`` → ('single', [4700]); ``4k7+330`` → ('series', …);
    ``10k//10k``, ``10k||10k``, ``10k∥10k`` → ('parallel', …)."""
    found = [(j, name) for j, name in _JOINERS.items() if j in text]
    if not found:
        return "single", [parse_quantity(text, kind)]
    joiner, name = found[0]
    pieces = text.split(joiner)
    if len(found) > 1 or len(pieces) != 2:
        raise BadValue(
            f"cannot read {text!r}; give one part (4k7) or two wired in series (4k7+330) or parallel (10k//10k)",
            value=text,
        )
    return name, [parse_quantity(p, kind) for p in pieces]
