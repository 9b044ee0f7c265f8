"""Part models: tolerance band, temperature behaviour, ageing and bias loss of one part.

Models are data: resistor technologies come from ``data/resistors.toml`` and
dielectrics from ``data/dielectrics.toml``, where each figure carries its
source. Ceramic codes are decoded by the EIA grammar, so any valid code works
(``U2J``, ``P3K``, ``X6S`` …), not only a fixed list.

Temperature behaviour (see docs/model.md): a part's relative change at
temperature T is s·(T − 25 °C), where the slope s of each unit lies in a
range, one range for T below 25 °C and one above. A linear-coefficient part
(TCR, class 1 ceramic) has one coefficient for both sides; a band part (class 2
ceramic, film, electrolytic) reaches a change drawn from its band at each rated
extreme, the two sides independently.

References
----------
EIA-198 / IEC 60384-1x ceramic temperature characteristic codes.
IEC 60115-1:2020 §6.2 (TCR test method).
"""

from __future__ import annotations

import math
from dataclasses import dataclass, replace

from rcpick.datafiles import load_toml
from rcpick.errors import BadValue, UnknownName

ROOM_C = 25.0
#: Reference age of class 2 capacitance limits, hours since de-ageing (EIA-198-1, IEC 60384-22 Annex B).
AGING_REFERENCE_H = 1000.0


@dataclass(frozen=True)
class Drift:
    """Temperature behaviour of one part.

    Attributes
    ----------
    cold, hot : (float, float)
        Range of the slope s (1/°C) below and above 25 °C; the relative change
        at T is s·(T − 25).
    shared : bool
        True for a linear coefficient: one slope per unit on both sides.
    rated_c : (float, float) or None
        Rated temperature range, °C, where the model is valid.
    text : str
        Short description for output, e.g. ``±100 ppm/°C``.
    """

    cold: tuple[float, float]
    hot: tuple[float, float]
    shared: bool
    rated_c: tuple[float, float] | None = None
    text: str = ""


NO_DRIFT = Drift((0.0, 0.0), (0.0, 0.0), True, None, "0 ppm/°C")


def linear(low: float, high: float, rated_c=None, text: str | None = None) -> Drift:
    """A linear temperature coefficient α in [low, high] (1/°C)."""
    if text is None:
        lo_ppm, hi_ppm = low * 1e6, high * 1e6
        text = f"±{hi_ppm:g} ppm/°C" if math.isclose(-lo_ppm, hi_ppm) else f"{lo_ppm:+g}…{hi_ppm:+g} ppm/°C"
    return Drift((low, high), (low, high), True, rated_c, text)


def band(
    cold_change: tuple[float, float], hot_change: tuple[float, float], rated_c: tuple[float, float], text: str
) -> Drift:
    """A change within ``cold_change`` at the cold rated extreme and ``hot_change`` at the hot one (fractions)."""
    t_lo, t_hi = rated_c
    if not t_lo < ROOM_C < t_hi:
        raise ValueError(f"rated range {rated_c} must contain 25 °C")
    c1, c2 = sorted((cold_change[0] / (t_lo - ROOM_C), cold_change[1] / (t_lo - ROOM_C)))
    h1, h2 = sorted((hot_change[0] / (t_hi - ROOM_C), hot_change[1] / (t_hi - ROOM_C)))
    return Drift((c1, c2), (h1, h2), False, rated_c, text)


@dataclass(frozen=True)
class PartModel:
    """Everything that moves one part away from its nominal value.

    Attributes
    ----------
    tolerance : (float, float)
        Initial deviation band at 25 °C, fractions, e.g. (-0.05, 0.05).
    drift : Drift
        Temperature behaviour.
    aging : (float, float)
        Relative change from ageing (class 2 ceramics), fractions.
    loss : float
        Fixed relative loss, e.g. capacitance lost at the working DC bias.
    label : str
        Description for output.
    name : str
        Resistor technology or dielectric code (``thick-film``, ``X7R`` …), for part lists.
    part_number : str
        The stocked part's number, when the part comes from a stock file.
    """

    tolerance: tuple[float, float]
    drift: Drift = NO_DRIFT
    aging: tuple[float, float] = (0.0, 0.0)
    loss: float = 0.0
    label: str = ""
    name: str = ""
    part_number: str = ""

    def only(self, source: str) -> PartModel:
        """This model with every source but one (``tolerance``, ``drift``, ``aging``, ``loss``) set to nothing."""
        return PartModel(
            self.tolerance if source == "tolerance" else (0.0, 0.0),
            self.drift if source == "drift" else replace(NO_DRIFT, rated_c=self.drift.rated_c),
            self.aging if source == "aging" else (0.0, 0.0),
            self.loss if source == "loss" else 0.0,
            self.label,
            self.name,
            self.part_number,
        )


# --- resistors -------------------------------------------------------------


def technology_names() -> list[str]:
    return list(load_toml("resistors.toml"))


def technology_key(name: str) -> str:
    """The data file's name of a resistor technology: ``thin-film`` for ``thin film``, ``thin`` or ``THIN_FILM``."""
    table = load_toml("resistors.toml")
    key = name.strip().lower().replace("_", "-").replace(" ", "-")
    for candidate in (key, f"{key}-film"):
        if candidate in table:
            return candidate
    raise UnknownName(f"unknown resistor technology {name!r}; accepted: {', '.join(table)}", value=name)


def resistor_technology(name: str) -> tuple[str, Drift, float]:
    """Look up a resistor technology: (label, drift, usual tolerance as a fraction)."""
    entry = load_toml("resistors.toml")[technology_key(name)]
    lo, hi = entry["tcr_ppm_per_c"]
    return entry["label"], linear(lo * 1e-6, hi * 1e-6), entry["tolerance_pct"] / 100


def technology_ratings(name: str) -> dict:
    """A technology's usual ratings per part: ``power_w``, ``voltage_v`` and where they come from."""
    entry = load_toml("resistors.toml")[technology_key(name)]
    return {
        "power_w": entry.get("power_w"),
        "voltage_v": entry.get("voltage_v"),
        "source": entry.get("rating_source", ""),
    }


# --- capacitors ------------------------------------------------------------


@dataclass(frozen=True)
class Dielectric:
    """A capacitor dielectric decoded from its code."""

    code: str
    label: str
    drift: Drift
    tolerance: tuple[float, float]
    aging_per_decade: tuple[float, float]  # k range, fraction per decade-hour
    poor_for_timing: str | None = None


ACCEPTED_CODES = (
    "class 1 EIA codes such as C0G (NP0), U2J, P3K (figure letter C B L A M P R S T V U, multiplier digit 0-9, "
    "tolerance letter G H J K L M N); class 2 EIA codes such as X7R, X5R, X7S, X7T, X6S, Y5V, Z5U (low letter "
    "X Y Z, high digit 2 4 5 6 7 8 9, change letter A C D E F P R S T U V); film PP, PET, PPS; ELECTROLYTIC"
)


def _class1(code: str, table: dict) -> Dielectric:
    figure = table["figure"][code[0]]
    multiplier = table["multiplier"][code[1]]
    spread = table["tolerance_ppm"][code[2]]
    centre = figure * multiplier
    lo, hi = (centre - spread) * 1e-6, (centre + spread) * 1e-6
    text = f"{centre:+g} ± {spread:g} ppm/°C" if centre else f"0 ± {spread:g} ppm/°C"
    tol = table["tolerance_pct"] / 100
    aging = tuple(k / 100 for k in table["aging_pct_per_decade"])
    rated = tuple(table["rated_c"])
    return Dielectric(code, f"class 1 ceramic {code}", linear(lo, hi, rated, text), (-tol, tol), aging)


def _class2(code: str, table: dict) -> Dielectric:
    t_lo = table["low_c"][code[0]]
    t_hi = table["high_c"][code[1]]
    change = tuple(p / 100 for p in table["change_pct"][code[2]])
    text = (
        f"±{change[1] * 100:g} %"
        if math.isclose(-change[0], change[1])
        else f"{change[1] * 100:+g}/{change[0] * 100:+g} %"
    ) + f" over {t_lo:+g}…{t_hi:+g} °C"
    tol_pct = table["tolerance_pct_by_change"].get(code[2])
    tolerance = (
        (tol_pct[0] / 100, tol_pct[1] / 100)
        if tol_pct
        else (-table["tolerance_pct"] / 100, table["tolerance_pct"] / 100)
    )
    aging = tuple(k / 100 for k in table["aging_pct_per_decade"][code[2]])
    poor = None
    if code[2] in ("U", "V"):
        poor = f"{code} capacitors lose most of their capacitance over temperature and bias: poor timing parts"
    return Dielectric(code, f"class 2 ceramic {code}", band(change, change, (t_lo, t_hi), text), tolerance, aging, poor)


def _other(key: str, entry: dict) -> Dielectric:
    cold = tuple(p / 100 for p in entry["cold_change_pct"])
    hot = tuple(p / 100 for p in entry["hot_change_pct"])
    rated = tuple(entry["rated_c"])
    text = (
        f"cold {cold[0] * 100:+g}…{cold[1] * 100:+g} %, hot {hot[0] * 100:+g}…{hot[1] * 100:+g} % "
        f"over {rated[0]:+g}…{rated[1]:+g} °C"
    )
    tol = entry["tolerance_pct"] / 100
    return Dielectric(
        key, entry["label"], band(cold, hot, rated, text), (-tol, tol), (0.0, 0.0), entry.get("poor_for_timing")
    )


#: Family words that name several dielectrics: the error lists the codes to choose from.
FAMILIES = {
    "FILM": "PP (polypropylene), PET (polyester) or PPS (polyphenylene sulphide)",
    "CERAMIC": "a class 1 code such as C0G (NP0) or a class 2 code such as X7R or X5R",
    "MLCC": "a class 1 code such as C0G (NP0) or a class 2 code such as X7R or X5R",
}


def dielectric(code: str) -> Dielectric:
    """Decode a dielectric code: ``C0G``, ``NP0``, ``U2J``, ``X7R``, ``Y5V``, ``PP``, ``ELECTROLYTIC`` …"""
    table = load_toml("dielectrics.toml")
    key = code.strip().upper().replace(" ", "").replace("_", "-")
    if key in FAMILIES:
        raise UnknownName(f"{code!r} names a family, not one dielectric: give {FAMILIES[key]}", value=code)
    key = table["class1"]["aliases"].get(key, key)
    for name, entry in table["other"].items():
        if key == name or key in entry.get("aliases", []):
            return _other(name, entry)
    if len(key) == 3:
        c1, c2 = table["class1"], table["class2"]
        if key[0] in c2["low_c"] and key[1] in c2["high_c"] and key[2] in c2["change_pct"]:
            return _class2(key, c2)
        if key[0] in c1["figure"] and key[1] in c1["multiplier"] and key[2] in c1["tolerance_ppm"]:
            return _class1(key, c1)
    raise UnknownName(f"unknown dielectric {code!r}; accepted: {ACCEPTED_CODES}", value=code)


def aging_change(aging_per_decade: tuple[float, float], hours: float) -> tuple[float, float]:
    """Relative capacitance change after ``hours`` since de-ageing, against the 1000 h reference.

    C(t) = C(1000 h)·(1 − k·log10(t / 1000 h)), k within ``aging_per_decade``.
    """
    if not (hours > 0 and math.isfinite(hours)):
        raise BadValue(f"ageing time must be a positive number of hours, got {hours!r}")
    decades = math.log10(hours / AGING_REFERENCE_H)
    ends = sorted((-aging_per_decade[0] * decades, -aging_per_decade[1] * decades))
    return ends[0], ends[1]


def annotated(
    letter: str,
    params: dict,
    label: str,
    base_r: PartModel,
    base_c: PartModel,
    *,
    aging_hours: float | None,
    loss: float,
) -> PartModel:
    """A part's model from its own annotations (a netlist line's, a board's ``have`` entry's:
    ``tol``, ``tcr``/``tc``, ``tech``, ``dielectric``), the request's defaults ``base_r``/``base_c`` otherwise."""
    if letter == "R":
        drift, name = base_r.drift, base_r.name
        if "tech" in params:
            _, drift, _ = resistor_technology(params["tech"])
            name = params["tech"]
        if "tcr" in params:  # a TCR given for the part: its technology stays (a line item names both)
            drift = linear(*params["tcr"])
        return PartModel(params.get("tol", base_r.tolerance), drift, label=label, name=name)
    if "dielectric" in params:
        diel = dielectric(params["dielectric"])
        aging = aging_change(diel.aging_per_decade, aging_hours) if aging_hours else (0.0, 0.0)
        drift = linear(params["tc"][0], params["tc"][1], rated_c=diel.drift.rated_c) if "tc" in params else diel.drift
        return PartModel(params.get("tol", diel.tolerance), drift, aging, loss, label=label, name=diel.code)
    drift = linear(*params["tc"]) if "tc" in params else base_c.drift
    return PartModel(
        params.get("tol", base_c.tolerance), drift, base_c.aging, base_c.loss, label=label, name=base_c.name
    )
