"""Requests as specs: one per command, owning every default and every check.

A spec is built from *layers* of raw values, highest priority first: the
Python API's keywords, or the command line over a project file
(``rcpick.toml``) over the built-in defaults of :mod:`rcpick.settings`. Each
value is read by its setting's own parser; an error names the setting as the
user wrote it (``r_min`` in Python, ``--r-min`` on the command line,
``rcpick.toml: key 'r-min'`` in a file). The spec then checks how its
settings combine, and :meth:`FindSpec.plan` resolves what a run needs:
the target, the part models, the candidate sets of each position, the
conditions.
"""

from __future__ import annotations

import contextlib
import math
import tomllib
from collections.abc import Iterator, Mapping
from dataclasses import dataclass, field, fields
from pathlib import Path
from typing import Any, ClassVar, TypeVar

from rcpick import combos, models, series, settings
from rcpick import stock as stocks
from rcpick import target as targets
from rcpick.errors import BadValue, ClashingOptions, Namer, RcpickError, parameter_name
from rcpick.notation import Level, format_si
from rcpick.settings import SETTINGS, Setting

FILE_NAME = "rcpick.toml"
#: Monte Carlo units by default: a lone R and C, and a network (each unit costs network solves).
DEFAULT_SAMPLES = 20000
NET_SAMPLES = 2000
#: A bank discharging from above this voltage is modelled as an electrolytic when no dielectric is given.
BANK_VOLTS = 100.0
#: A part model whose value falls below this share of nominal somewhere in the range is refused.
VALID_SHARE = 0.1


# --- layers --------------------------------------------------------------------


@dataclass(frozen=True)
class Layer:
    """Raw values from one place: the API, the command line, or a file."""

    values: Mapping[str, Any]
    source: str
    namer: Namer = parameter_name
    in_file: bool = False


@dataclass(frozen=True)
class Given:
    """A setting as the user gave it."""

    raw: Any
    layer: Layer
    rank: int = 0  # the layer's place, 0 = highest priority


def api_layer(values: Mapping[str, Any]) -> Layer:
    return Layer(values, "API", parameter_name)


def file_key_namer(path: str) -> Namer:
    return lambda setting: f"{path}: key {settings.key_name(setting)!r}"


def read_toml(path: Path) -> dict:
    """A TOML file's table; errors name the file."""
    from rcpick.textfiles import read_text

    text = read_text(path)
    try:
        return tomllib.loads(text)
    except tomllib.TOMLDecodeError as error:
        raise BadValue(f"{path}: not valid TOML ({error})") from None


def file_layer(path: Path, table: Mapping[str, Any] | None = None, *, base: Path | None = None) -> Layer:
    """A project file (``rcpick.toml``) or a board file's defaults as a layer; every key checked by name."""
    raw = read_toml(path) if table is None else table
    values: dict[str, Any] = {}
    for key, value in raw.items():
        setting = settings.BY_KEY.get(key)
        if setting is None or not setting.in_files:
            valid = " ".join(s.key for s in SETTINGS.values() if s.in_files)
            raise BadValue(f"{path}: unknown key {key!r}; valid keys: {valid}")
        text = file_value(f"{path}: key {setting.key!r}", setting, value, base or path.parent)
        try:  # every key is checked when the file is read, whichever command reads it
            setting.read(text)
        except RcpickError as error:
            error.origin = f"{path}: key {setting.key!r}"
            raise
        values[setting.name] = text
    return Layer(values, str(path), file_key_namer(str(path)), in_file=True)


def file_value(where: str, setting: Setting, value: Any, base: Path) -> Any:
    """A file's value as the command line would type it (numbers become text, except counts and switches);
    ``where`` names the key in errors, ``base`` is the folder a relative file name is read from."""
    if isinstance(value, bool):
        if not setting.flag:
            raise BadValue(f'{where} must be text such as "{setting.shown or "a value"}", got {value!r}')
        return value
    if isinstance(value, (int, float)):
        return value if setting.count else str(value)
    if not isinstance(value, str):
        raise BadValue(f"{where} must be text or a number, got {value!r}")
    if setting.name in ("stock", "net") and value != stocks.DEMO and not Path(value).is_absolute():
        return str((base / value).resolve())
    return value


def config_layer(explicit: Path | None, cwd: Path | None = None) -> Layer | None:
    """``--config FILE``, else ``./rcpick.toml`` when present, as a layer."""
    path = explicit if explicit is not None else (cwd or Path.cwd()) / FILE_NAME
    if explicit is None and not path.is_file():
        return None
    return file_layer(path)


# --- specs ---------------------------------------------------------------------


def _field(name: str, setting: Setting | None = None) -> Any:
    chosen = setting or SETTINGS[name]
    return field(default=chosen.default, metadata={"setting": chosen})


S = TypeVar("S", bound="Spec")


class Spec:
    """Shared behaviour of the specs: building from layers, provenance, naming in errors."""

    _given: dict[str, Given]
    primary_namer: ClassVar[Namer] = parameter_name

    @classmethod
    def declared(cls) -> list[Setting]:
        """The settings of this spec, in declaration order."""
        return [f.metadata["setting"] for f in fields(cls) if "setting" in f.metadata]  # type: ignore[arg-type]

    @classmethod
    def names(cls) -> list[str]:
        return [s.name for s in cls.declared()]

    @classmethod
    def build(cls: type[S], *layers: Layer | None, partial: bool = False) -> S:
        """Read every setting from the first layer that gives it, then check how they combine.

        ``partial``: a request that need not be complete (``rcpick config``): no target is required.
        """
        present = [layer for layer in layers if layer is not None]
        values: dict[str, Any] = {}
        given: dict[str, Given] = {}
        for setting in cls.declared():
            name = setting.name
            for layer in present:
                raw = layer.values.get(name)
                if raw is None or (setting.flag and raw is False and not layer.in_file and layer.source != "API"):
                    continue
                try:
                    values[name] = setting.read(raw)
                except RcpickError as error:
                    if layer.in_file:
                        error.origin = f"{layer.source}: key {setting.key!r}"
                    error.namer = layer.namer
                    raise
                given[name] = Given(raw, layer, present.index(layer))
                break
        spec = cls(**values)
        object.__setattr__(spec, "_given", given)
        namer = present[0].namer if present else parameter_name
        object.__setattr__(spec, "_namer", namer)
        object.__setattr__(spec, "_partial", partial)
        with spec.naming():
            spec.check()
        return spec

    def check(self) -> None:
        """Cross-setting checks (each spec adds its own)."""

    def is_given(self, name: str) -> bool:
        return name in getattr(self, "_given", {})

    def _rank(self, name: str) -> int:
        """The priority of the layer that gave ``name`` (0 = highest); a large number when none did."""
        given = getattr(self, "_given", {}).get(name)
        return given.rank if given is not None else 1 << 30

    def typed(self, name: str) -> bool:
        """Given by the user in the request itself (not by a project file)."""
        given = getattr(self, "_given", {}).get(name)
        return given is not None and not given.layer.in_file

    def name_of(self, setting: str) -> str:
        """How the user wrote ``setting``: the layer that gave it, else the request's own spelling."""
        given = getattr(self, "_given", {}).get(setting)
        if given is not None:
            return given.layer.namer(setting)
        return getattr(self, "_namer", parameter_name)(setting)

    def source_of(self, name: str) -> str:
        given = getattr(self, "_given", {}).get(name)
        if given is None:
            return "built-in"
        return "command line" if given.layer.source == "command line" else given.layer.source

    def raw_text(self, name: str) -> str | None:
        given = getattr(self, "_given", {}).get(name)
        return None if given is None else str(given.raw)

    @contextlib.contextmanager
    def naming(self) -> Iterator[None]:
        """Errors raised inside name settings as this request's user wrote them."""
        try:
            yield
        except RcpickError as error:
            if error.namer is parameter_name:
                error.namer = self.name_of
            raise

    def _clash(self, first: str, second: str, why: str) -> ClashingOptions:
        return ClashingOptions(f"{{{first}}} and {{{second}}} cannot be used together: {why}")

    def _one_target(self, allow_none: bool = False) -> str | None:
        kinds = [k for k in ("tau", "cutoff", "delay", "period") if getattr(self, k) is not None]
        if len(kinds) == 1:
            return kinds[0]
        if not kinds and allow_none:
            return None
        names = ", ".join("{" + k + "}" for k in ("tau", "cutoff", "delay", "period"))
        found = "none" if not kinds else " and ".join("{" + k + "}" for k in kinds)
        raise ClashingOptions(f"give exactly one target ({names}); got {found}", setting=None)

    def _check_target(self, kind: str | None) -> None:
        belongs = {"threshold": "delay", "from_level": "delay", "falling": "delay", "thresholds": "period"}
        for name, owner in belongs.items():
            value = getattr(self, name)
            if value not in (None, False) and kind != owner:
                where = f", not {{{kind}}}" if kind else ""
                raise ClashingOptions(f"{{{name}}} belongs to {{{owner}}}{where}")
        if kind == "delay" and self.threshold is None:  # type: ignore[attr-defined]
            raise ClashingOptions("{delay} needs {threshold} (0.7, 70% or a voltage with {supply})", setting="delay")
        if kind == "period" and self.thresholds is None:  # type: ignore[attr-defined]
            raise ClashingOptions("{period} needs {thresholds} LOW:HIGH (33%:67% or 1.1V:2.2V)", setting="period")
        if self.leak is not None and self.supply is None:  # type: ignore[attr-defined]
            raise ClashingOptions(
                "{leak} needs {supply}: the leakage moves the final level by I·R volts", setting="leak"
            )
        if self.leak is not None and kind not in ("delay", "period"):  # type: ignore[attr-defined]
            raise ClashingOptions("{leak} applies to {delay} and {period}", setting="leak")
        limited = self.limit is not None  # type: ignore[attr-defined]
        if limited and self.is_given("window") and self._rank("window") <= self._rank("limit"):
            # a window from a lower layer (a project file's, a board's [defaults]) gives way to the limit
            raise self._clash("limit", "window", "a limit is one-sided, a window two-sided")
        if self.threshold_tol is not None and kind not in ("delay", "period"):  # type: ignore[attr-defined]
            raise ClashingOptions(
                "{threshold_tol} belongs to {delay} or {period} (it spreads the threshold level)",
                setting="threshold_tol",
            )
        if self.r_tcr is not None and self.is_given("r_tech"):  # type: ignore[attr-defined]
            raise self._clash("r_tcr", "r_tech", "both set the resistor's TCR")

    def provenance(self) -> list[tuple[str, str, str]]:
        """(file key, value as used, where it came from) for every setting of this spec."""
        rows = []
        for setting in self.declared():
            name = setting.name
            text = self.raw_text(name)
            if text is None:
                value = getattr(self, name)
                text = setting.shown or ("" if value is None else str(value))
            rows.append((setting.key, text, self.source_of(name)))
        return rows


# --- resolved parts ---------------------------------------------------------------


@dataclass(frozen=True)
class Parts:
    """What one position (R or C) may use, resolved.

    Attributes
    ----------
    combos : Combos
        The candidate set (single parts and pairs), sorted.
    description : str
        One line for the header (``E24 1 kΩ…1 MΩ, singles and pairs``).
    model : PartModel
        The model of a part without a stock line.
    by_value : dict
        Stocked values: the model of the line chosen.
    lines : dict
        Stocked values: the stock line chosen.
    practical : (float, float)
        The practical range of the part family (data/practical.toml).
    """

    combos: combos.Combos
    description: str
    model: models.PartModel
    by_value: dict[float, models.PartModel]
    lines: dict[float, stocks.StockPart]
    practical: tuple[float, float]
    span: tuple[float, float]

    def model_of(self, value: float) -> models.PartModel:
        return self.by_value.get(float(value), self.model)


@dataclass(frozen=True)
class Conditions:
    """Where the design must work and how the Monte Carlo runs."""

    temp_c: tuple[float, float]
    window: tuple[float, float]  # relative; an end is ±inf for a limit
    level_band: tuple[float, float]
    dist: str
    samples: int
    seed: int
    lot_share: float


@dataclass(frozen=True)
class Models:
    """The default part models and what was said about them."""

    r: models.PartModel
    c: models.PartModel
    dielectric: models.Dielectric
    warnings: list[str]
    aging_hours: float | None
    loss: float


def _pct_text(band: tuple[float, float]) -> str:
    lo, hi = band[0] * 100, band[1] * 100
    return f"±{hi:g} %" if abs(lo + hi) < 1e-12 else f"{lo:+g}/{hi:+g} %"


class PartSettings:
    """Shared by the find and spread specs: target, part models, conditions."""

    def target(self) -> targets.Target:
        """The target asked for (the spec's ``_one_target`` has checked there is one)."""
        s: Any = self
        kind = self._kind()  # type: ignore[attr-defined]
        limit = s.limit
        if kind == "tau":
            base = targets.for_tau(s.tau)
        elif kind == "cutoff":
            base = targets.for_cutoff(s.cutoff)
        elif kind == "delay":
            scale = s.supply
            th = targets.level_fraction(
                s.threshold.value, is_volts=s.threshold.volts, scale_v=scale, setting="threshold"
            )
            start = None
            if s.from_level is not None:
                start = targets.level_fraction(
                    s.from_level.value, is_volts=s.from_level.volts, scale_v=scale, setting="from_level"
                )
            base = targets.for_delay(s.delay, th, s.falling, start=start, scale_v=scale, leak_a=s.leak or 0.0)
        else:
            scale = s.supply
            low, high = s.thresholds
            pair = tuple(
                targets.level_fraction(x.value, is_volts=x.volts, scale_v=scale, setting="thresholds")
                for x in (low, high)
            )
            base = targets.for_period(s.period, pair[0], pair[1], scale_v=scale, leak_a=s.leak or 0.0)
        from dataclasses import replace

        if limit is not None:
            base = replace(base, limit=limit)
        if kind in ("tau", "cutoff") and s.supply is not None:
            base = replace(base, scale_v=s.supply)  # the step applied, for the parts' stress
        return base

    def conditions(self, network: bool = False) -> Conditions:
        s: Any = self
        samples = s.samples if s.samples is not None else (NET_SAMPLES if network else DEFAULT_SAMPLES)
        if s.limit == "upper":
            window = (-math.inf, 0.0)
        elif s.limit == "lower":
            window = (0.0, math.inf)
        else:
            window = s.window
        return Conditions(s.temp, window, s.threshold_tol or (0.0, 0.0), s.dist, samples, s.seed, s.lot_share)

    def samples_used(self, network: bool = False) -> int:
        return self.conditions(network).samples

    def dielectric_code(self, target: targets.Target | None) -> tuple[str, str | None]:
        """The dielectric used and, when it was chosen for the user, a warning saying so."""
        s: Any = self
        if s.dielectric is not None:
            return s.dielectric, None
        if (
            target is not None
            and target.kind == "delay"
            and target.falling
            and target.scale_v is not None
            and target.scale_v > BANK_VOLTS
        ):
            return "ELECTROLYTIC", (
                f"a bank discharging from {format_si(target.scale_v, 'V', 3)} is modelled as "
                f"aluminium electrolytic (±20 %); give {{dielectric}} PP (film) or the bank's "
                f"own tolerance with {{c_tol}}"
            )
        return "X7R", None

    def models(self, target: targets.Target | None, r_series_name: str | None = None) -> Models:
        """The default part models from the spread settings, with warnings."""
        s: Any = self
        warnings: list[str] = []
        # resistor
        tech = s.r_tech
        tech_label, r_drift, _ = models.resistor_technology(tech)
        r_name = tech
        if s.r_tcr is not None:
            r_drift, tech_label, r_name = models.linear(*s.r_tcr), "custom TCR", "custom TCR"
        if s.r_tol is not None:
            r_band = s.r_tol
        else:
            usual = series.get(r_series_name or "E24").tolerance
            r_band = (-usual, usual)
        r_model = models.PartModel(
            r_band, r_drift, label=f"{_pct_text(r_band)}, {tech_label} {r_drift.text}", name=r_name
        )
        # capacitor
        code, chosen = self.dielectric_code(target)
        if chosen:
            warnings.append(chosen)
        diel = models.dielectric(code)
        c_drift = diel.drift if s.c_tc is None else models.linear(s.c_tc[0], s.c_tc[1], rated_c=diel.drift.rated_c)
        c_band = s.c_tol if s.c_tol is not None else diel.tolerance
        loss = s.c_bias_loss or 0.0
        aging = (0.0, 0.0)
        if s.c_age is not None:
            aging = models.aging_change(diel.aging_per_decade, s.c_age)
            if diel.aging_per_decade == (0.0, 0.0):
                warnings.append(f"{{c_age}} has no effect on {diel.code}: its ageing is taken as none")
        label = f"{_pct_text(c_band)}, {diel.label} {c_drift.text}"
        if loss:
            label += f", bias loss {loss * 100:g} %"
        if s.c_age is not None:
            label += f", ageing {aging[0] * 100:+.2g}…{aging[1] * 100:+.2g} %"
        c_model = models.PartModel(
            c_band,
            c_drift,
            aging,
            loss,
            label,
            name=diel.code if s.c_tc is None else f"{diel.code}, custom coefficient",
        )
        if diel.poor_for_timing:
            warnings.append(diel.poor_for_timing)
        warnings += rated_range_warnings(diel, s.temp)
        for model, what in ((r_model, "resistor"), (c_model, "capacitor")):
            check_model_validity(model, s.temp, what)
        return Models(r_model, c_model, diel, warnings, s.c_age, loss)

    def ratings(self):
        """Per-part ratings: the settings given, else the resistor technology's usual ones (data/resistors.toml)."""
        from rcpick.stress import Ratings

        s: Any = self
        usual = models.technology_ratings(s.r_tech)
        power = s.r_power if s.r_power is not None else usual["power_w"]
        volts = s.r_voltage if s.r_voltage is not None else usual["voltage_v"]
        given = [
            n
            for n in ("r_power", "r_voltage")
            if s.r_power is not None and n == "r_power" or s.r_voltage is not None and n == "r_voltage"
        ]
        source = (
            "as given"
            if len(given) == 2
            else f"{s.r_tech} usual ({usual['source']})" + (f"; {', '.join(given)} as given" if given else "")
        )
        return Ratings(power, volts, s.c_voltage, s.derate, source)

    def ask(self, kind: str) -> stocks.Ask:
        """What the user asked of stocked parts of one kind (given settings only)."""
        s: Any = self
        if kind == "resistance":
            tol = max(-s.r_tol[0], s.r_tol[1]) if s.r_tol is not None else None
            tcr = max(abs(s.r_tcr[0]), abs(s.r_tcr[1])) if s.r_tcr is not None else None
            return stocks.Ask(tol, tcr, None)
        tol = max(-s.c_tol[0], s.c_tol[1]) if s.c_tol is not None else None
        return stocks.Ask(tol, None, s.dielectric)

    def order_need(self) -> int:
        """Parts of one value needed for the order when one is used per board (boards × (1 + spares))."""
        s: Any = self
        return math.ceil(s.boards * (1 + s.spares) - 1e-9)


def rated_range_warnings(diel: models.Dielectric, temp_c: tuple[float, float], stocked: bool = False) -> list[str]:
    rated = diel.drift.rated_c
    if rated and (temp_c[0] < rated[0] or temp_c[1] > rated[1]):
        where = "stocked " if stocked else ""
        return [
            f"the temperature range {temp_c[0]:g}…{temp_c[1]:g} °C leaves {where}{diel.code}'s rated range "
            f"{rated[0]:g}…{rated[1]:g} °C: the capacitor model is not valid there"
        ]
    return []


def check_model_validity(model: models.PartModel, temp_c: tuple[float, float], what: str) -> None:
    """Refuse a model pushed so far that a part's value falls near zero (or below) in the range."""
    worst = (1 + model.tolerance[0]) * (1 + model.aging[0]) * (1 - model.loss)
    for x in (temp_c[0] - models.ROOM_C, temp_c[1] - models.ROOM_C):
        slope = model.drift.cold[1] if x < 0 else model.drift.hot[0]
        worst_t = worst * (1 + slope * x)
        if worst_t < VALID_SHARE:
            raise BadValue(
                f"the {what} model ({model.label or model.name}) takes a part down to "
                f"{worst_t * 100:.0f} % of nominal at {x + models.ROOM_C:g} °C: outside where it is "
                f"valid; narrow {{temp}} or check {{c_age}}, {{c_bias_loss}} and the tolerances"
            )


def practical_range(kind: str, name: str) -> tuple[float, float]:
    """The practical value range of a dielectric (by code) or resistor technology (data/practical.toml)."""
    from rcpick.datafiles import load_toml

    table = load_toml("practical.toml")
    if kind == "resistance":
        low, high = table["resistance"].get(name, (1.0, 10e6))
        return float(low), float(high)
    caps = table["capacitance"]
    code = name.split(",")[0].strip()
    if code in caps:
        return _pair(caps[code])
    try:
        diel = models.dielectric(code)
    except RcpickError:
        return (1e-12, 1.0)
    if diel.drift.shared and diel.label.startswith("class 1"):
        return _pair(caps["class1"])
    if diel.label.startswith("class 2"):
        wide = diel.drift.hot[1] * (diel.drift.rated_c[1] - models.ROOM_C) > 0.151 if diel.drift.rated_c else False
        narrow_code = code in ("X7R", "X8R")
        return _pair(caps["class2"] if narrow_code or not wide else caps["class2_wide"])
    return (1e-12, 1.0)


def _pair(values) -> tuple[float, float]:
    return float(values[0]), float(values[1])


def position_parts(spec: Any, letter: str, mdl: Models, stock: stocks.Stock | None, *, network: bool = False) -> Parts:
    """The candidate set of one position, from the spec's search-space settings."""
    kind = "resistance" if letter == "r" else "capacitance"
    unit = "Ω" if letter == "r" else "F"
    model = mdl.r if letter == "r" else mdl.c
    practical = practical_range(kind, spec.r_tech if letter == "r" else mdl.dielectric.code)
    fix = getattr(spec, f"fix_{letter}")
    names = [f"{letter}_series", f"{letter}_min", f"{letter}_max", f"{letter}_parts"]
    if fix is not None:
        for name in names:
            if spec.typed(name):
                raise spec._clash(f"fix_{letter}", name, "a fixed value is not searched")
        by_value, lines = _stock_models(spec, stock, kind, [fix], model, mdl)
        return Parts(
            combos.fixed(fix, kind),
            f"fixed at {format_si(fix, unit, 4, trim=True)}",
            model,
            by_value,
            lines,
            practical,
            (fix, fix),
        )
    low = getattr(spec, f"{letter}_min")
    high = getattr(spec, f"{letter}_max")
    if high is None:
        general = 1e6 if letter == "r" else 10e-6
        high = min(general, practical[1]) if practical[1] >= low else general
    if low > high:
        raise BadValue(
            f"{format_si(low, unit, trim=True)} is above {{{letter}_max}} {format_si(high, unit, trim=True)}",
            setting=f"{letter}_min",
        )
    parts = getattr(spec, f"{letter}_parts")
    span = f"{format_si(low, unit, trim=True)}…{format_si(high, unit, trim=True)}"
    pairs = "singles" if parts == 1 else "singles and pairs"
    if stock is not None and stock.covers(kind):
        values = stock.values(kind, low, high, spec.ask(kind))
        if not values:
            raise BadValue(
                f"{stock.path} has no usable {letter.upper()} row inside {span} "
                f"({{{letter}_min}}/{{{letter}_max}}) meeting what was asked of it",
                setting="stock",
            )
        by_value, lines = _stock_models(spec, stock, kind, values, model, mdl)
        import numpy as np

        built = combos.build(np.array(values), kind, parts, low, high)
        return Parts(
            built, f"{len(values)} stocked values {span}, {pairs}", model, by_value, lines, practical, (low, high)
        )
    chosen = series.get(getattr(spec, f"{letter}_series"))
    values_in = chosen.values(low, high)
    if len(values_in) == 0:
        raise BadValue(f"no {chosen.name} value lies in {span}", setting=f"{letter}_min")
    built = combos.build(values_in, kind, parts, low, high)
    return Parts(built, f"{chosen.name} {span}, {pairs}", model, {}, {}, practical, (low, high))


def _stock_models(
    spec: Any, stock: stocks.Stock | None, kind: str, values, model: models.PartModel, mdl: Models
) -> tuple[dict, dict]:
    if stock is None or not stock.covers(kind):
        return {}, {}
    by_value, lines = {}, {}
    need = spec.order_need()
    for value in values:
        line = stock.choose(kind, float(value), need, spec.ask(kind))
        if line is not None:
            lines[float(value)] = line
            by_value[float(value)] = stocks.part_model(line, model, aging_hours=mdl.aging_hours, loss=mdl.loss)
    return by_value, lines


def stock_warnings(stock: stocks.Stock | None, lines: Mapping[float, stocks.StockPart], temp_c) -> list[str]:
    """Warnings for stocked capacitor dielectrics that are poor for timing or used outside their rating."""
    if stock is None:
        return []
    out: list[str] = []
    for code in sorted({p.dielectric for p in lines.values() if p.dielectric}):
        diel = models.dielectric(code)
        if diel.poor_for_timing:
            out.append(f"stocked {diel.poor_for_timing}")
        out += rated_range_warnings(diel, temp_c, stocked=True)
    return out


def load_stock(path: str | None) -> stocks.Stock | None:
    if path is None:
        return None
    try:
        return stocks.load(path)
    except RcpickError as error:
        raise error.about("stock") from None


# --- the specs ---------------------------------------------------------------------

TARGET_NAMES = (
    "tau",
    "cutoff",
    "delay",
    "period",
    "threshold",
    "from_level",
    "thresholds",
    "supply",
    "falling",
    "leak",
    "limit",
)
MODEL_NAMES = (
    "r_tol",
    "r_tcr",
    "r_tech",
    "c_tol",
    "dielectric",
    "c_tc",
    "c_bias_loss",
    "c_age",
    "temp",
    "window",
    "threshold_tol",
    "dist",
    "samples",
    "seed",
    "lot_share",
)
STRESS_NAMES = ("r_power", "r_voltage", "c_voltage", "derate")


@dataclass(frozen=True)
class FindSpec(PartSettings, Spec):
    """A request of ``rcpick find`` / :func:`rcpick.find`: every setting with its built-in default."""

    tau: float | None = _field("tau")
    cutoff: float | None = _field("cutoff")
    delay: float | None = _field("delay")
    period: float | None = _field("period")
    threshold: Level | None = _field("threshold")
    from_level: Level | None = _field("from_level")
    thresholds: tuple[Level, Level] | None = _field("thresholds")
    supply: float | None = _field("supply")
    falling: bool = _field("falling")
    leak: float | None = _field("leak")
    limit: str | None = _field("limit")
    r_series: str = _field("r_series")
    r_min: float = _field("r_min")
    r_max: float | None = _field("r_max")
    r_parts: int = _field("r_parts")
    fix_r: float | None = _field("fix_r")
    c_series: str = _field("c_series")
    c_min: float = _field("c_min")
    c_max: float | None = _field("c_max")
    c_parts: int = _field("c_parts")
    fix_c: float | None = _field("fix_c")
    r_tol: tuple[float, float] | None = _field("r_tol")
    r_tcr: tuple[float, float] | None = _field("r_tcr")
    r_tech: str = _field("r_tech")
    c_tol: tuple[float, float] | None = _field("c_tol")
    dielectric: str | None = _field("dielectric")
    c_tc: tuple[float, float] | None = _field("c_tc")
    c_bias_loss: float = _field("c_bias_loss")
    c_age: float | None = _field("c_age")
    temp: tuple[float, float] = _field("temp")
    window: tuple[float, float] = _field("window")
    threshold_tol: tuple[float, float] | None = _field("threshold_tol")
    dist: str = _field("dist")
    samples: int | None = _field("samples")
    seed: int = _field("seed")
    lot_share: float = _field("lot_share")
    rank: str = _field("rank")
    top: int = _field("top")
    min_yield: float = _field("min_yield")
    r_power: float | None = _field("r_power")
    r_voltage: float | None = _field("r_voltage")
    c_voltage: float | None = _field("c_voltage")
    derate: tuple[float, float] = _field("derate")
    stock: str | None = _field("stock")
    boards: int = _field("boards")
    spares: float = _field("spares")
    net: str | None = _field("net")
    vary: tuple[str, ...] | None = _field("vary")
    node: str | None = _field("node")
    _given: dict = field(default_factory=dict, compare=False, repr=False, init=False)

    def _kind(self) -> str:
        kind = self._one_target()
        assert kind is not None
        return kind

    def check(self) -> None:
        kind = self._one_target(allow_none=getattr(self, "_partial", False))
        self._check_target(kind)
        if self.net is None:
            for name in ("vary", "node"):
                if getattr(self, name) is not None:
                    raise ClashingOptions(f"{{{name}}} belongs to {{net}}", setting=name)
        else:
            for name in ("fix_r", "fix_c"):
                if getattr(self, name) is not None:
                    raise self._clash("net", name, "elements not in the varied list keep their netlist values")
            if self.vary is None:
                raise ClashingOptions("{net} needs {vary} (the elements to search, e.g. R1,C1)", setting="net")

    def plan(self) -> Plan:
        """Resolve the target, models, stock and candidate sets of a plain (not network) search.

        A partial request (``rcpick config`` without a target) resolves everything but the target.
        """
        with self.naming():
            has_target = self._one_target(allow_none=True) is not None
            target = self.target() if has_target else None
            if target is None:
                mdl = self.models(None, self.r_series)
                stock = load_stock(self.stock)
                return Plan(
                    None,
                    position_parts(self, "r", mdl, stock),
                    position_parts(self, "c", mdl, stock),
                    self.conditions(network=self.net is not None),
                    mdl,
                    list(mdl.warnings),
                    stock,
                )
            mdl = self.models(target, self.r_series)
            stock = load_stock(self.stock)
            r = position_parts(self, "r", mdl, stock)
            c = position_parts(self, "c", mdl, stock)
            warnings = list(mdl.warnings) + stock_warnings(stock, c.lines, self.temp)
            conditions = self.conditions(network=self.net is not None)
            if target.kind in ("delay", "period"):
                from rcpick.variation import check_level_band

                check_level_band(target, conditions.level_band)
            return Plan(target, r, c, conditions, mdl, warnings, stock)


@dataclass(frozen=True)
class Plan:
    """A resolved find request: what the search and the spread need."""

    target: targets.Target | None
    r: Parts
    c: Parts
    conditions: Conditions
    models: Models
    warnings: list[str]
    stock: stocks.Stock | None


@dataclass(frozen=True)
class SpreadSpec(PartSettings, Spec):
    """A request of ``rcpick spread`` / :func:`rcpick.spread`: one design and how it is judged."""

    r: tuple[str, list[float]] = _field("r")
    c: tuple[str, list[float]] = _field("c")
    tau: float | None = _field("tau")
    cutoff: float | None = _field("cutoff")
    delay: float | None = _field("delay")
    period: float | None = _field("period")
    threshold: Level | None = _field("threshold")
    from_level: Level | None = _field("from_level")
    thresholds: tuple[Level, Level] | None = _field("thresholds")
    supply: float | None = _field("supply")
    falling: bool = _field("falling")
    leak: float | None = _field("leak")
    limit: str | None = _field("limit")
    r_tol: tuple[float, float] | None = _field("r_tol")
    r_tcr: tuple[float, float] | None = _field("r_tcr")
    r_tech: str = _field("r_tech")
    c_tol: tuple[float, float] | None = _field("c_tol")
    dielectric: str | None = _field("dielectric")
    c_tc: tuple[float, float] | None = _field("c_tc")
    c_bias_loss: float = _field("c_bias_loss")
    c_age: float | None = _field("c_age")
    temp: tuple[float, float] = _field("temp")
    window: tuple[float, float] = _field("window")
    threshold_tol: tuple[float, float] | None = _field("threshold_tol")
    dist: str = _field("dist")
    samples: int | None = _field("samples")
    seed: int = _field("seed")
    lot_share: float = _field("lot_share")
    r_power: float | None = _field("r_power")
    r_voltage: float | None = _field("r_voltage")
    c_voltage: float | None = _field("c_voltage")
    derate: tuple[float, float] = _field("derate")
    stock: str | None = _field("stock")
    boards: int = _field("boards")
    spares: float = _field("spares")
    _given: dict = field(default_factory=dict, compare=False, repr=False, init=False)

    def _kind(self) -> str:
        return self._one_target(allow_none=True) or "tau"

    @property
    def has_target(self) -> bool:
        return any(getattr(self, k) is not None for k in ("tau", "cutoff", "delay", "period"))

    def check(self) -> None:
        if self.r is None or self.c is None:
            missing = "r" if self.r is None else "c"
            raise ClashingOptions(
                "required: the design to analyse (one part, or two wired in series or parallel)", setting=missing
            )
        kind = self._one_target(allow_none=True)
        self._check_target(kind)
        if kind is None:
            for name in ("window", "limit"):
                if self.is_given(name):
                    raise ClashingOptions(
                        f"{{{name}}} needs a target ({{tau}}, {{cutoff}}, {{delay}} or {{period}})", setting=name
                    )


@dataclass(frozen=True)
class NetworkSpec(Spec):
    """A request of ``rcpick net`` / :func:`rcpick.nodal`."""

    file: str = _field("file")
    node: str | None = _field("node", settings.NETWORK_NODE)
    threshold: Level | None = _field("threshold", settings.NETWORK_THRESHOLD)
    _given: dict = field(default_factory=dict, compare=False, repr=False, init=False)

    def check(self) -> None:
        if self.file is None:
            raise ClashingOptions("required: the netlist to analyse", setting="file")
        if self.threshold is not None and self.node is None:
            raise ClashingOptions("{threshold} needs {node} (the node whose crossing is timed)", setting="threshold")
