"""Every setting rcpick takes, declared once: its default, its check, its help text.

The Python API (``rcpick.find(r_min="1k")``), the command line (``--r-min 1k``),
project files (``r-min = "1k"`` in ``rcpick.toml``) and ``rcpick config`` all
read these declarations, so a default or a check cannot drift between them.

A value may be text in rcpick's notation (as typed on the command line) or,
from Python, a number in SI units: ohms, farads, seconds, hertz, volts,
amperes, and fractions for percentages (0.05 = 5 %). Bands may also be
given as a (low, high) pair of fractions; temperature ranges as (min, max) °C.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass
from pathlib import Path
from typing import Any

from rcpick import notation
from rcpick.errors import BadValue, UnknownName
from rcpick.notation import Level

MAX_TOP = 200
MIN_SAMPLES, MAX_SAMPLES = 100, 10_000_000
#: Tolerances rcpick accepts on each side of nominal (a stock file states the same rule).
TOLERANCE_RANGE = (0.00001, 0.5)


@dataclass(frozen=True)
class Setting:
    """One setting.

    Attributes
    ----------
    name : str
        Its Python name (``r_min``); the option is ``--r-min`` and the file key ``r-min``
        unless ``option`` says otherwise.
    parse : callable
        Text or a Python value → the checked value; raises :class:`rcpick.errors.RcpickError`.
    default : object
        The built-in value (already parsed); None when there is none or it is derived from others.
    shown : str
        How the default reads in help, ``rcpick config`` and the query sheet.
    """

    name: str
    parse: Callable[[Any], Any]
    default: Any = None
    shown: str = ""
    help: str = ""
    metavar: str = "TEXT"
    panel: str = ""
    flag: bool = False
    option: str = ""
    in_files: bool = True
    count: bool = False

    @property
    def flag_name(self) -> str:
        """The command-line option, ``--r-min``."""
        return self.option or "--" + self.name.replace("_", "-")

    @property
    def key(self) -> str:
        """The key in ``rcpick.toml`` and board files, ``r-min``."""
        return self.flag_name.removeprefix("--")

    def read(self, raw: Any) -> Any:
        """``raw`` checked by this setting, with the setting named in any error."""
        try:
            return self.parse(raw)
        except (BadValue, UnknownName) as error:
            raise error.about(self.name) from None


# --- readers -------------------------------------------------------------------


def _is_number(raw: Any) -> bool:
    return isinstance(raw, (int, float)) and not isinstance(raw, bool)


def _text(raw: Any) -> str:
    if not isinstance(raw, str):
        raise BadValue(f"expected text, got {raw!r}", value=raw)
    return raw


def _finite(raw: Any) -> float:
    value = float(raw)
    if not math.isfinite(value):
        raise BadValue(f"{raw!r} is not a finite number", value=raw)
    return value


def quantity(kind: str, *, signed: bool = False) -> Callable[[Any], float]:
    """A quantity in rcpick's notation, or a number in SI units."""

    def parse(raw: Any) -> float:
        if _is_number(raw):
            value = _finite(raw)
            if not signed and value <= 0:
                raise BadValue(f"{raw!r} must be greater than 0 {notation.UNITS[kind][0]}", value=raw)
            return notation._in_limits(value, kind, raw)
        return notation.parse_quantity(_text(raw), kind, positive=not signed)

    return parse


def series_name(raw: Any) -> str:
    from rcpick import series

    return series.get(str(raw)).name


def technology_name(raw: Any) -> str:
    from rcpick import models

    return models.technology_key(_text(raw))


def dielectric_code(raw: Any) -> str:
    from rcpick import models

    return models.dielectric(_text(raw)).code


def part_count(raw: Any) -> int:
    value = count(1, 2, "1 or 2 (most parts per position)")(raw)
    return value


def count(low: int, high: int, what: str | None = None) -> Callable[[Any], int]:
    """A whole number in [low, high], typed as 20000, 2e4 or 20k."""
    text = what or f"a whole number ({low:,}…{high:,})"

    def parse(raw: Any) -> int:
        if isinstance(raw, bool):
            raise BadValue(f"{raw!r} is not {text}", value=raw)
        if _is_number(raw):
            if not (math.isfinite(raw) and raw == int(raw)):
                raise BadValue(f"{raw!r} is not {text}", value=raw)
            value = int(raw)
        else:
            value = notation.parse_count(_text(raw), what=text)
        if not low <= value <= high:
            if what:
                raise BadValue(f"{raw!r} is not {what}", value=raw)
            raise BadValue(f"{raw!r} must be between {low:,} and {high:,}", value=raw)
        return value

    return parse


def band(raw: Any) -> tuple[float, float]:
    """A relative band: '5%', '-20%:+80%', 0.05 (±5 %) or (low, high) fractions."""
    if _is_number(raw):
        half = abs(_finite(raw))
        return -half, half
    if isinstance(raw, (tuple, list)) and len(raw) == 2:
        return _finite(raw[0]), _finite(raw[1])
    return notation.parse_band(_text(raw))


def tolerance(raw: Any) -> tuple[float, float]:
    """A part tolerance: '1%', 0.01 or a range '-20%:+80%'.

    A symmetric tolerance lies between ±0.001 % and ±50 % (a wider one is almost always a slip, 50 for 5);
    a range typed on purpose may reach −100 % (excluded) below and +100 % (excluded) above nominal.
    """
    low, high = band(raw)
    lo, hi = TOLERANCE_RANGE
    symmetric = not (isinstance(raw, (tuple, list)) or (isinstance(raw, str) and ":" in raw))
    widest = max(-low, high)
    if not (low <= 0 <= high):
        raise BadValue(f"tolerance {raw!r} must run from ≤ 0 % to ≥ 0 % of nominal", value=raw)
    if widest < lo:
        raise BadValue(f"tolerance {raw!r} must be greater than 0 % (at least ±{lo:.3%})", value=raw)
    if symmetric and widest > hi:
        raise BadValue(
            f"tolerance {raw!r} is more than ±{hi:.0%}; write a range such as -20%:+80% if you mean it", value=raw
        )
    if low <= -1.0 or high >= 1.0:
        raise BadValue(f"tolerance {raw!r} must be less than 100 % on each side", value=raw)
    return low, high


def window(raw: Any) -> tuple[float, float]:
    """An acceptance window around the target: it must contain the target and its low side stay above −100 %."""
    low, high = band(raw)
    if low > 0 or high < 0:
        raise BadValue(f"window {raw!r} excludes the target itself; it must run from ≤ 0 % to ≥ 0 %", value=raw)
    if low <= -1.0 or high - low <= 0 or high > 10.0:
        raise BadValue(
            f"window {raw!r} must be wider than 0 %, its low side above −100 % and its high side at most +1000 %",
            value=raw,
        )
    return low, high


def fraction(
    low: float, high: float, *, low_open: bool = False, high_open: bool = False, what: str = "a percentage"
) -> Callable[[Any], float]:
    """A fraction typed as '30%' or 0.3, within [low, high] (ends excluded where open)."""

    def parse(raw: Any) -> float:
        value = _finite(raw) if _is_number(raw) else _percent_or_fraction(_text(raw))
        below = value <= low if low_open else value < low
        above = value >= high if high_open else value > high
        if below or above:
            lo_text = f"{low:.0%}" + (" (excluded)" if low_open else "")
            hi_text = f"{high:.0%}" + (" (excluded)" if high_open else "")
            raise BadValue(f"{raw!r} must lie in {lo_text}…{hi_text} ({what})", value=raw)
        return value

    return parse


def _percent_or_fraction(text: str) -> float:
    return notation.parse_percent(text)


def share(raw: Any) -> float:
    """A fraction 0…1 typed as 0.8 or 80%."""
    if _is_number(raw):
        value = _finite(raw)
    else:
        text = _text(raw).strip()
        value = (
            notation.parse_percent(text)
            if text.endswith("%")
            else float(notation._plain_number(text, "a fraction", "0.8"))
        )
    if not 0.0 <= value <= 1.0:
        raise BadValue(f"{raw!r} must lie between 0 and 1 (or 0 % and 100 %)", value=raw)
    return value


def ppm_band(raw: Any) -> tuple[float, float]:
    """A temperature coefficient bound: '100ppm', '-250ppm:-50ppm', 1e-4 (1/°C) or (low, high) in 1/°C."""
    if _is_number(raw):
        half = abs(_finite(raw))
        values = (-half, half)
    elif isinstance(raw, (tuple, list)) and len(raw) == 2:
        values = (_finite(raw[0]), _finite(raw[1]))
    else:
        return notation.parse_ppm_band(_text(raw))
    if max(abs(v) for v in values) * 1e6 > notation.PPM_LIMIT:
        raise BadValue(f"{raw!r} is beyond ±{notation.PPM_LIMIT:g} ppm/°C, not a part's coefficient", value=raw)
    return values


def temperature(raw: Any) -> tuple[float, float]:
    """'0:70', '-40:85', '25', 25 or (min, max) in °C."""
    if _is_number(raw):
        return notation.check_temperature_range(_finite(raw), _finite(raw), raw)
    if isinstance(raw, (tuple, list)) and len(raw) == 2:
        return notation.check_temperature_range(_finite(raw[0]), _finite(raw[1]), raw)
    return notation.parse_temperature_range(_text(raw))


def choice(*names: str) -> Callable[[Any], str]:
    def parse(raw: Any) -> str:
        text = str(raw).strip().lower()
        if text not in names:
            raise BadValue(f"{raw!r} is not one of {', '.join(names)}", value=raw)
        return text

    return parse


def level(raw: Any) -> Level:
    """A level: a fraction (0.7 or '70%') or a voltage ('2.3V')."""
    if isinstance(raw, Level):
        return raw
    if _is_number(raw):
        return Level(_finite(raw), False)
    return notation.parse_level(_text(raw))


def level_pair(raw: Any) -> tuple[Level, Level]:
    """Two levels LOW:HIGH, e.g. '1/3:2/3' is not accepted; '33%:67%' or '1.1V:2.2V' is."""
    if isinstance(raw, (tuple, list)) and len(raw) == 2:
        pair = (level(raw[0]), level(raw[1]))
    else:
        text = _text(raw)
        pieces = text.split(":")
        if len(pieces) != 2:
            raise BadValue(f"cannot read {raw!r}; expected LOW:HIGH such as 33%:67% or 1.1V:2.2V", value=raw)
        pair = (notation.parse_level(pieces[0]), notation.parse_level(pieces[1]))
    if pair[0].volts != pair[1].volts:
        raise BadValue(f"give both levels of {raw!r} alike: both in volts or both as fractions", value=raw)
    if pair[0].value >= pair[1].value:
        raise BadValue(f"the low level of {raw!r} must be below the high one", value=raw)
    return pair


def flag(raw: Any) -> bool:
    if isinstance(raw, bool):
        return raw
    text = str(raw).strip().lower()
    if text in ("true", "yes", "1", "on"):
        return True
    if text in ("false", "no", "0", "off"):
        return False
    raise BadValue(f"{raw!r} is not true or false", value=raw)


def path_text(raw: Any) -> str:
    if isinstance(raw, Path):
        return str(raw)
    return _text(raw).strip()


def names(raw: Any) -> tuple[str, ...]:
    """Element names: 'R1,C1' or a list."""
    items = [str(n).strip() for n in raw] if isinstance(raw, (tuple, list)) else _text(raw).split(",")
    found = tuple(n.strip() for n in items if n.strip())
    if not found:
        raise BadValue("give at least one element name, e.g. R1,C1", value=raw)
    return found


def hours(raw: Any) -> float:
    """Hours since de-ageing: 87600 or '87600h'; from 1 h to 10⁷ h (about 1,100 years)."""
    if _is_number(raw):
        value = _finite(raw)
    else:
        text = _text(raw).strip().removesuffix("h").strip()
        try:
            value = float(notation._plain_number(text, "hours", "87600"))
        except BadValue:
            raise BadValue(f"cannot read {raw!r}; expected hours such as 87600", value=raw) from None
    if not 1.0 <= value <= 1e7:
        raise BadValue(f"{raw!r} must lie between 1 h and 10,000,000 h", value=raw)
    return value


def derating(raw: Any) -> tuple[float, float]:
    """Share of the rating used: '50%:80%' (power : voltage), one value for both, or a (power, voltage) pair."""
    if _is_number(raw):
        pair = (_finite(raw), _finite(raw))
    elif isinstance(raw, (tuple, list)) and len(raw) == 2:
        pair = (_finite(raw[0]), _finite(raw[1]))
    else:
        pieces = _text(raw).split(":")
        if len(pieces) not in (1, 2):
            raise BadValue(f"cannot read {raw!r}; expected POWER%:VOLTAGE% such as 50%:80%", value=raw)
        values = [notation.parse_percent(p) for p in pieces]
        pair = (values[0], values[-1])
    if not all(0.0 < v <= 1.0 for v in pair):
        raise BadValue(f"{raw!r}: each share must lie in 0 % (excluded)…100 %", value=raw)
    return pair


# --- declarations ---------------------------------------------------------------

TARGET = "Target (give one)"
RESISTOR = "Resistor"
CAPACITOR = "Capacitor"
SPREAD = "Spread (tolerance, temperature, Monte Carlo)"
RANKING = "Ranking"
STRESS = "Part stress"
STOCK = "Stock and export"
NETWORK = "Network"
BOARD = "Board"
#: Designs per timing and source that a board plan analyses (docs/board.md).
MIN_POOL, MAX_POOL = 2, 100

_DECLARED = [
    # target
    Setting(
        "tau",
        quantity("time"),
        help="Target time constant R·C, e.g. 10ms.",
        metavar="TIME",
        panel=TARGET,
        in_files=False,
    ),
    Setting(
        "cutoff",
        quantity("frequency"),
        help="Target first-order corner frequency 1/(2πRC), e.g. 1.5kHz.",
        metavar="FREQ",
        panel=TARGET,
        in_files=False,
    ),
    Setting(
        "delay",
        quantity("time"),
        metavar="TIME",
        panel=TARGET,
        in_files=False,
        help="Target time from the start (the step, or --from) until the node crosses --threshold, e.g. 200ms.",
    ),
    Setting(
        "period",
        quantity("time"),
        metavar="TIME",
        panel=TARGET,
        in_files=False,
        help="Target period of an RC relaxation oscillator switching at --thresholds LOW:HIGH, e.g. 1ms.",
    ),
    Setting(
        "threshold",
        level,
        metavar="LEVEL",
        panel=TARGET,
        in_files=False,
        help="Level for --delay: a fraction (0.7), a percent (70%) or a voltage (2.3V, needs --supply).",
    ),
    Setting(
        "from_level",
        level,
        option="--from",
        metavar="LEVEL",
        panel=TARGET,
        in_files=False,
        help="With --delay: the node's level at the start, as --threshold reads it (default: 0, or the "
        "supply with --falling).",
    ),
    Setting(
        "thresholds",
        level_pair,
        metavar="LOW:HIGH",
        panel=TARGET,
        in_files=False,
        help="For --period: the lower and upper switching levels, e.g. 33%:67% or 1.1V:2.2V.",
    ),
    Setting(
        "supply",
        quantity("voltage"),
        metavar="VOLTS",
        panel=TARGET,
        help="Step size in volts: the final value when charging, the start value with --falling.",
    ),
    Setting(
        "falling",
        flag,
        default=False,
        shown="off",
        flag=True,
        panel=TARGET,
        in_files=False,
        help="The node discharges from its start value down to --threshold.",
    ),
    Setting(
        "leak",
        quantity("current", signed=True),
        metavar="AMPS",
        panel=TARGET,
        in_files=False,
        help="Constant current drawn out of the node (negative: into it), e.g. 1uA; needs --supply.",
    ),
    Setting(
        "limit",
        choice("upper", "lower"),
        metavar="upper|lower",
        panel=TARGET,
        help="A one-sided requirement instead of --window: upper, every unit at or below the target (a "
        "discharge within 3 s); lower, at or above it (a reset of at least 50 ms).",
    ),
    # search space
    Setting(
        "r_series",
        series_name,
        default="E24",
        shown="E24",
        metavar="SERIES",
        panel=RESISTOR,
        help="E-series for resistors.",
    ),
    Setting(
        "r_min",
        quantity("resistance"),
        default=1e3,
        shown="1k",
        metavar="OHMS",
        panel=RESISTOR,
        help="Smallest resistor and smallest combined R.",
    ),
    Setting(
        "r_max",
        quantity("resistance"),
        shown="1Meg (less for a technology whose practical range ends lower)",
        metavar="OHMS",
        panel=RESISTOR,
        help="Largest resistor and largest combined R.",
    ),
    Setting(
        "r_parts",
        part_count,
        default=2,
        shown="2",
        count=True,
        metavar="1|2",
        panel=RESISTOR,
        help="Most resistors in the R position: 1, or 2 for series/parallel pairs.",
    ),
    Setting(
        "fix_r",
        quantity("resistance"),
        metavar="OHMS",
        panel=RESISTOR,
        help="Use exactly this R (standard or not) and search only C.",
    ),
    Setting(
        "c_series",
        series_name,
        default="E12",
        shown="E12",
        metavar="SERIES",
        panel=CAPACITOR,
        help="E-series for capacitors.",
    ),
    Setting(
        "c_min",
        quantity("capacitance"),
        default=100e-12,
        shown="100p",
        metavar="FARADS",
        panel=CAPACITOR,
        help="Smallest capacitor and smallest combined C.",
    ),
    Setting(
        "c_max",
        quantity("capacitance"),
        shown="10u, or the dielectric's practical largest value if lower",
        metavar="FARADS",
        panel=CAPACITOR,
        help="Largest capacitor and largest combined C.",
    ),
    Setting(
        "c_parts",
        part_count,
        default=2,
        shown="2",
        count=True,
        metavar="1|2",
        panel=CAPACITOR,
        help="Most capacitors in the C position: 1 or 2.",
    ),
    Setting(
        "fix_c",
        quantity("capacitance"),
        metavar="FARADS",
        panel=CAPACITOR,
        help="Use exactly this C (standard or not) and search only R.",
    ),
    # part models
    Setting(
        "r_tol",
        tolerance,
        shown="the R series' usual",
        metavar="PCT",
        panel=SPREAD,
        help="Resistor tolerance: 1% or -2%:+1%.",
    ),
    Setting(
        "r_tcr",
        ppm_band,
        shown="from --r-tech",
        metavar="PPM",
        panel=SPREAD,
        help="Resistor TCR bound: 100ppm (±100 ppm/°C) or a range -250ppm:-50ppm.",
    ),
    Setting(
        "r_tech",
        lambda raw: technology_name(raw),
        default="thick-film",
        shown="thick-film",
        metavar="NAME",
        panel=SPREAD,
        help="Resistor technology: thick-film, thin-film, metal-film, carbon-film.",
    ),
    Setting(
        "c_tol",
        tolerance,
        shown="the dielectric's usual",
        metavar="PCT",
        panel=SPREAD,
        help="Capacitor tolerance: 5% or -20%:+80%.",
    ),
    Setting(
        "dielectric",
        lambda raw: dielectric_code(raw),
        shown="X7R (ELECTROLYTIC for a bank discharging from above 100 V)",
        metavar="CODE",
        panel=SPREAD,
        help="Capacitor dielectric: an EIA code (C0G, NP0, U2J, X7R, X5R, Y5V …), PP, PET, PPS or ELECTROLYTIC.",
    ),
    Setting(
        "c_tc",
        ppm_band,
        shown="from --dielectric",
        metavar="PPM",
        panel=SPREAD,
        help="Custom linear capacitor coefficient, replacing the dielectric's: 30ppm or -870ppm:-630ppm.",
    ),
    Setting(
        "c_bias_loss",
        fraction(0.0, 0.9, what="capacitance lost at the working bias"),
        default=0.0,
        shown="0%",
        metavar="PCT",
        panel=SPREAD,
        help="Capacitance lost at the working DC bias, read off the part's own curve, e.g. 30%.",
    ),
    Setting(
        "c_age",
        hours,
        shown="none (parts at the 1000 h reference age)",
        metavar="HOURS",
        panel=SPREAD,
        help="Hours since the capacitor's last de-ageing (class 2 ageing against the 1000 h reference), e.g. 87600.",
    ),
    Setting(
        "temp",
        temperature,
        default=(0.0, 70.0),
        shown="0:70",
        metavar="MIN:MAX",
        panel=SPREAD,
        help="Temperature range MIN:MAX in °C, or one temperature.",
    ),
    Setting(
        "window",
        window,
        default=(-0.1, 0.1),
        shown="10%",
        metavar="PCT",
        panel=SPREAD,
        help="Acceptance window around the target: 10% (±10 %) or -5%:+10%.",
    ),
    Setting(
        "threshold_tol",
        tolerance,
        shown="none",
        metavar="PCT",
        panel=SPREAD,
        help="Tolerance of the threshold level(s), e.g. 3% (delay and period targets).",
    ),
    Setting(
        "dist",
        choice("uniform", "normal"),
        default="uniform",
        shown="uniform",
        metavar="uniform|normal",
        panel=SPREAD,
        help="Distribution inside each band: uniform, or normal with the band at ±3σ, truncated.",
    ),
    Setting(
        "samples",
        count(MIN_SAMPLES, MAX_SAMPLES),
        count=True,
        shown="20000 (2000 for a network)",
        metavar="N",
        panel=SPREAD,
        help=f"Monte Carlo units, {MIN_SAMPLES}…{MAX_SAMPLES:,}; 2e4 and 20k read too.",
    ),
    Setting(
        "seed",
        count(0, 10**18, "a whole number from 0 to 1e18"),
        count=True,
        default=1,
        shown="1",
        metavar="N",
        panel=SPREAD,
        help="Random seed; the same seed gives the same numbers.",
    ),
    Setting(
        "lot_share",
        share,
        default=1.0,
        shown="1 (parts of one value from one reel move together)",
        metavar="FRACTION",
        panel=SPREAD,
        help="How much of a part's deviation and temperature curve it shares with the other parts of its value "
        "in the design: 1, one reel; 0, independent parts.",
    ),
    # ranking
    Setting(
        "rank",
        choice("yield", "error", "spread", "cost"),
        default="yield",
        shown="yield",
        metavar="yield|error|spread|cost",
        panel=RANKING,
        help="yield: highest yield, designs tied within their 95 % intervals ordered by fewer parts, narrower "
        "worst case, smaller error; error: smallest nominal error; spread: narrowest worst case; cost: "
        "cheapest design meeting --min-yield.",
    ),
    Setting(
        "top",
        count(1, MAX_TOP),
        count=True,
        default=10,
        shown="10",
        metavar="N",
        panel=RANKING,
        help=f"How many candidates to list (1…{MAX_TOP}).",
    ),
    Setting(
        "min_yield",
        fraction(0.0, 1.0, low_open=True, what="a yield"),
        default=0.95,
        shown="95%",
        metavar="PCT",
        panel=RANKING,
        help="Yield a design must reach for --rank cost, and each timing of a board.",
    ),
    # stress
    Setting(
        "r_power",
        lambda raw: _power(raw),
        shown="the technology's usual rating",
        metavar="WATTS",
        panel=STRESS,
        help="Resistor power rating per part, e.g. 0.25W, 250mW or 1/4W.",
    ),
    Setting(
        "r_voltage",
        quantity("voltage"),
        shown="the technology's usual rating",
        metavar="VOLTS",
        panel=STRESS,
        help="Resistor limiting element voltage per part, e.g. 200V.",
    ),
    Setting(
        "c_voltage",
        quantity("voltage"),
        shown="none (not checked)",
        metavar="VOLTS",
        panel=STRESS,
        help="Capacitor rated voltage per part, e.g. 50V.",
    ),
    Setting(
        "derate",
        derating,
        default=(0.5, 0.8),
        shown="50%:80%",
        metavar="POWER:VOLTAGE",
        panel=STRESS,
        help="Share of each rating a part may use: power : voltage.",
    ),
    # stock and export
    Setting(
        "stock",
        path_text,
        shown="none (E-series)",
        metavar="FILE",
        panel=STOCK,
        help="CSV or XLSX of stocked/approved parts (columns kind, value; optional tolerance, tcr, dielectric, "
        "part_number, unit_price, on_hand, package, voltage). Its values replace the series for the kinds "
        "it lists; demo names an invented demo stock.",
    ),
    Setting(
        "boards",
        count(1, 10_000_000),
        count=True,
        default=1,
        shown="1",
        metavar="N",
        panel=STOCK,
        help="Boards to build, for order quantities.",
    ),
    Setting(
        "spares",
        fraction(0.0, 10.0, what="extra parts ordered"),
        default=0.0,
        shown="0%",
        metavar="PCT",
        panel=STOCK,
        help="Extra parts ordered, e.g. 5%; totals are rounded up.",
    ),
    # network
    Setting(
        "net",
        path_text,
        metavar="FILE",
        panel=NETWORK,
        in_files=False,
        help="Search inside a network: a netlist of R, C, V, I lines (see rcpick net).",
    ),
    Setting(
        "vary",
        names,
        metavar="NAMES",
        panel=NETWORK,
        in_files=False,
        help="With --net: the elements to search, e.g. R1,C1 (one R and/or one C); the others keep their values.",
    ),
    Setting(
        "node",
        lambda raw: _text(raw).strip(),
        metavar="NODE",
        panel=NETWORK,
        in_files=False,
        help="With --net and --delay or --cutoff: the node whose response is timed.",
    ),
    # one design (rcpick spread) and one netlist (rcpick net)
    Setting(
        "r",
        lambda raw: arrangement("resistance", raw),
        metavar="PARTS",
        in_files=False,
        help="Resistor position: 4k7, 4k7+330 (series) or 10k//10k (parallel; || too).",
    ),
    Setting(
        "c",
        lambda raw: arrangement("capacitance", raw),
        metavar="PARTS",
        in_files=False,
        help="Capacitor position: 100n, 47n+47n (series) or 47n//47n (parallel).",
    ),
    Setting(
        "file",
        lambda raw: path_text(raw),
        metavar="FILE",
        in_files=False,
        option="FILE",
        help="Netlist of R, C, V and I element lines.",
    ),
    # a whole board (rcpick board)
    Setting(
        "board_file",
        lambda raw: path_text(raw),
        metavar="BOARD.toml",
        in_files=False,
        option="BOARD",
        help="Board file: [defaults], one [[timing]] table per timing, optional have (docs/board.md).",
    ),
    Setting(
        "require",
        choice("yield", "worst-case"),
        default="yield",
        shown="yield",
        metavar="yield|worst-case",
        panel=BOARD,
        in_files=False,
        help="What each timing's design must meet: yield at or above --min-yield, or a worst case wholly "
        "inside its window or limit.",
    ),
    Setting(
        "pool",
        count(MIN_POOL, MAX_POOL),
        count=True,
        default=10,
        shown="10 (100 ÷ the timings on a board of more than ten)",
        metavar="N",
        panel=BOARD,
        in_files=False,
        help=f"Designs per timing offered to the joint choice: find's best N, and N more made of values other "
        f"timings or the board use ({MIN_POOL}…{MAX_POOL}; a larger pool may find fewer line items, and takes "
        f"longer to prove).",
    ),
]


def arrangement(kind: str, raw: Any) -> tuple[str, list[float]]:
    """One part or a wired pair: '4k7', '4k7+330', '10k//10k', or a number in SI units."""
    if _is_number(raw):
        return "single", [quantity(kind)(raw)]
    return notation.parse_arrangement(_text(raw), kind)


def _signed_level(raw: Any) -> Level:
    if isinstance(raw, Level):
        return raw
    if _is_number(raw):
        return Level(_finite(raw), False)
    return notation.parse_level(_text(raw), signed_volts=True)


#: A network node's threshold may be a negative voltage, and its fraction reads against the node's own swing.
NETWORK_THRESHOLD = Setting(
    "threshold",
    _signed_level,
    metavar="LEVEL",
    in_files=False,
    help="With --node: time to reach this level: a voltage (2.0V), or a fraction or percent "
    "of the way from the node's lower to its higher end value (0.7, 70%).",
)
NETWORK_NODE = Setting(
    "node",
    lambda raw: _text(raw).strip(),
    metavar="NODE",
    in_files=False,
    help="Report the step response at this node.",
)


def _power(raw: Any) -> float:
    """Watts: 0.25, '0.25W', '250mW', '1/4W'."""
    if _is_number(raw):
        value = _finite(raw)
    else:
        text = _text(raw).strip().replace(" ", "")
        body = text.removesuffix("W")
        if "/" in body:
            num, _, den = body.partition("/")
            try:
                value = float(num) / float(den)
            except (ValueError, ZeroDivisionError):
                raise BadValue(
                    f"cannot read {raw!r}; expected a power such as 0.25W, 250mW or 1/4W", value=raw
                ) from None
        else:
            prefix = {"m": 1e-3, "k": 1e3, "M": 1e6, "u": 1e-6, "µ": 1e-6}.get(body[-1:], 1.0)
            digits = body[:-1] if prefix != 1.0 else body
            try:
                value = float(notation._plain_number(digits, "a power", "0.25W")) * prefix
            except BadValue:
                raise BadValue(
                    f"cannot read {raw!r}; expected a power such as 0.25W, 250mW or 1/4W", value=raw
                ) from None
    if not 1e-6 <= value <= 1e6:
        raise BadValue(f"{raw!r} is outside 1 µW … 1 MW", value=raw)
    return value


SETTINGS: dict[str, Setting] = {s.name: s for s in _DECLARED}
BY_KEY: dict[str, Setting] = {s.key: s for s in SETTINGS.values()}


def named(*names: str) -> list[Setting]:
    return [SETTINGS[n] for n in names]


# --- names as the user wrote them ------------------------------------------------

#: Arguments (not options) of the commands, as their help names them.
ARGUMENTS = {"series": "SERIES", "file": "FILE", "board_file": "BOARD", "format": "--format"}


def option_name(setting: str) -> str:
    """The command line's name for a setting, ``--r-min``."""
    if setting in ARGUMENTS:
        return ARGUMENTS[setting]
    found = SETTINGS.get(setting)
    return found.flag_name if found else "--" + setting.replace("_", "-")


def key_name(setting: str) -> str:
    """A project file's name for a setting, ``r-min``."""
    found = SETTINGS.get(setting)
    return found.key if found else setting.replace("_", "-")
