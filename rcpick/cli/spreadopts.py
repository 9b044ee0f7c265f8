"""Options shared by ``find`` and ``spread``: part models, temperature, window, Monte Carlo settings."""

from __future__ import annotations

from dataclasses import dataclass, field

import typer

from rcpick import models, series
from rcpick.errors import BadValue, ClashingOptions, RcpickError
from rcpick.notation import parse_band, parse_percent, parse_ppm_band, parse_temperature_range
from rcpick.spread import DISTRIBUTIONS

PANEL = "Spread (tolerance, temperature, Monte Carlo)"
DEFAULT_R_TECH = "thick-film"
DEFAULT_DIELECTRIC = "X7R"
DEFAULT_TEMP = "0:70"
DEFAULT_WINDOW = "10%"
DEFAULT_DIST = "uniform"
DEFAULT_SAMPLES = 20000
DEFAULT_SEED = 1
MIN_SAMPLES, MAX_SAMPLES = 100, 10_000_000

# Option declarations, reused by both commands' signatures.
R_TOL = typer.Option(None, "--r-tol", metavar="PCT", help="Resistor tolerance: 1% or -2%:+1% \\[default: the R series' usual, E24 5 %].", rich_help_panel=PANEL)
R_TCR = typer.Option(None, "--r-tcr", metavar="PPM", help="Resistor TCR bound: 100ppm (±100 ppm/°C) or a range -250ppm:-50ppm.", rich_help_panel=PANEL)
R_TECH = typer.Option(None, "--r-tech", metavar="NAME", help="Resistor technology: thick-film, thin-film, metal-film, carbon-film \\[default: thick-film].", rich_help_panel=PANEL)
C_TOL = typer.Option(None, "--c-tol", metavar="PCT", help="Capacitor tolerance: 5% or -20%:+80% \\[default: the dielectric's usual].", rich_help_panel=PANEL)
DIELECTRIC = typer.Option(None, "--dielectric", metavar="CODE", help="Capacitor dielectric: EIA code (C0G, NP0, U2J, X7R, X5R, Y5V …), PP, PET, PPS or ELECTROLYTIC \\[default: X7R].", rich_help_panel=PANEL)
C_TC = typer.Option(None, "--c-tc", metavar="PPM", help="Custom linear capacitor coefficient, replacing the dielectric's: 30ppm or -870ppm:-630ppm.", rich_help_panel=PANEL)
C_BIAS_LOSS = typer.Option(None, "--c-bias-loss", metavar="PCT", help="Capacitance lost at the working DC bias, read off the part's own curve, e.g. 30%.", rich_help_panel=PANEL)
C_AGE = typer.Option(None, "--c-age", metavar="HOURS", help="Hours since the capacitor's last de-ageing (class 2 ageing, against the 1000 h reference), e.g. 87600.", rich_help_panel=PANEL)
TEMP = typer.Option(None, "--temp", metavar="MIN:MAX", help="Temperature range MIN:MAX in °C, or one temperature \\[default: 0:70].", rich_help_panel=PANEL)
WINDOW = typer.Option(None, "--window", metavar="PCT", help="Acceptance window around the target: 10% (±10 %) or -5%:+10% \\[default: 10%].", rich_help_panel=PANEL)
THRESHOLD_TOL = typer.Option(None, "--threshold-tol", metavar="PCT", help="Tolerance of the --threshold level, e.g. 3% (delay targets).", rich_help_panel=PANEL)
DIST = typer.Option(None, "--dist", metavar="uniform|normal", help="Distribution inside each band: uniform, or normal with the band at ±3σ, truncated \\[default: uniform].", rich_help_panel=PANEL)
SAMPLES = typer.Option(None, "--samples", metavar="N", help=f"Monte Carlo units ({MIN_SAMPLES}…{MAX_SAMPLES:,}) \\[default: {DEFAULT_SAMPLES}].", rich_help_panel=PANEL)
SEED = typer.Option(None, "--seed", metavar="N", help=f"Random seed; the same seed gives the same numbers \\[default: {DEFAULT_SEED}].", rich_help_panel=PANEL)


@dataclass(frozen=True)
class SpreadSettings:
    """Parsed spread options."""

    r_model: models.PartModel
    c_model: models.PartModel
    dielectric: models.Dielectric
    temp_c: tuple[float, float]
    window: tuple[float, float]
    threshold_band: tuple[float, float]
    dist: str
    samples: int
    seed: int
    warnings: list[str] = field(default_factory=list)
    aging_hours: float | None = None
    loss: float = 0.0

    def as_dict(self) -> dict:
        """Settings for JSON output and provenance."""
        return {
            "r_model": self.r_model.label, "c_model": self.c_model.label,
            "temp_c": list(self.temp_c), "window": list(self.window), "dist": self.dist,
            "samples": self.samples, "seed": self.seed, "threshold_band": list(self.threshold_band),
        }


def _tolerance(text: str, option: str) -> tuple[float, float]:
    low, high = parse_band(text, option=option)
    if not (-1.0 < low <= 0.0 <= high < 1.0) or high - low <= 0:
        raise BadValue(f"tolerance {text!r} must be greater than 0 % and less than 100 % on each side", option=option, value=text)
    return low, high


def _pct_text(band: tuple[float, float]) -> str:
    lo, hi = band[0] * 100, band[1] * 100
    return f"±{hi:g} %" if abs(lo + hi) < 1e-12 else f"{lo:+g}/{hi:+g} %"


def read_spread_options(
    *, r_series: str | None, r_tol, r_tcr, r_tech, c_tol, dielectric, c_tc, c_bias_loss, c_age, temp, window,
    threshold_tol, dist, samples, seed, delay_target: bool,
) -> SpreadSettings:
    """Turn the spread options (text or None) into part models and Monte Carlo settings."""
    warnings: list[str] = []
    # Resistor
    if r_tcr is not None and r_tech is not None:
        raise ClashingOptions("--r-tcr and --r-tech cannot be used together: both set the resistor's TCR")
    try:
        tech_label, r_drift, _ = models.resistor_technology(r_tech or DEFAULT_R_TECH)
    except RcpickError as error:
        raise error.for_option("--r-tech") from None
    if r_tcr is not None:
        lo, hi = parse_ppm_band(r_tcr, option="--r-tcr")
        r_drift, tech_label = models.linear(lo, hi), "custom TCR"
    r_band = _tolerance(r_tol, "--r-tol") if r_tol is not None else _series_tolerance(r_series)
    r_name = "custom TCR" if r_tcr is not None else (r_tech or DEFAULT_R_TECH)
    r_model = models.PartModel(r_band, r_drift, label=f"{_pct_text(r_band)}, {tech_label} {r_drift.text}", name=r_name)

    # Capacitor
    try:
        diel = models.dielectric(dielectric or DEFAULT_DIELECTRIC)
    except RcpickError as error:
        raise error.for_option("--dielectric") from None
    c_drift = diel.drift
    if c_tc is not None:
        lo, hi = parse_ppm_band(c_tc, option="--c-tc")
        c_drift = models.linear(lo, hi, rated_c=diel.drift.rated_c)
    c_band = _tolerance(c_tol, "--c-tol") if c_tol is not None else diel.tolerance
    loss = 0.0
    if c_bias_loss is not None:
        loss = parse_percent(c_bias_loss, option="--c-bias-loss")
        if not 0.0 <= loss < 1.0:
            raise BadValue(f"must lie in 0 %…100 % (excluded), got {c_bias_loss!r}", option="--c-bias-loss", value=c_bias_loss)
    aging = (0.0, 0.0)
    if c_age is not None:
        try:
            hours = float(c_age.strip().removesuffix("h").strip())
        except ValueError:
            raise BadValue(f"cannot read {c_age!r}; expected hours such as 87600", option="--c-age", value=c_age) from None
        try:
            aging = models.aging_change(diel.aging_per_decade, hours)
        except RcpickError as error:
            raise error.for_option("--c-age") from None
        if diel.aging_per_decade == (0.0, 0.0):
            warnings.append(f"--c-age has no effect on {diel.code}: its ageing is taken as none")
    label = f"{_pct_text(c_band)}, {diel.label} {c_drift.text}"
    if loss:
        label += f", bias loss {loss * 100:g} %"
    if c_age is not None:
        label += f", ageing {aging[0] * 100:+.2g}…{aging[1] * 100:+.2g} %"
    c_model = models.PartModel(c_band, c_drift, aging, loss, label,
                               name=diel.code if c_tc is None else f"{diel.code}, custom coefficient")
    if diel.poor_for_timing:
        warnings.append(diel.poor_for_timing)

    # Conditions
    temp_c = parse_temperature_range(temp or DEFAULT_TEMP, option="--temp")
    rated = c_drift.rated_c
    if rated and (temp_c[0] < rated[0] or temp_c[1] > rated[1]):
        warnings.append(f"the temperature range {temp_c[0]:g}…{temp_c[1]:g} °C leaves {diel.code}'s rated range "
                        f"{rated[0]:g}…{rated[1]:g} °C: the capacitor model is not valid there")
    win = parse_band(window or DEFAULT_WINDOW, option="--window")
    if win[0] > 0 or win[1] < 0:
        raise BadValue(f"window {window!r} excludes the target itself; it must run from ≤ 0 % to ≥ 0 %", option="--window", value=window)
    if win[0] <= -1.0 or win[1] - win[0] <= 0:
        raise BadValue(f"window {window!r} must be wider than 0 % and its low side above -100 %", option="--window", value=window)
    threshold_band = (0.0, 0.0)
    if threshold_tol is not None:
        if not delay_target:
            raise ClashingOptions("--threshold-tol belongs to --delay (it spreads the threshold level)")
        threshold_band = _tolerance(threshold_tol, "--threshold-tol")
    chosen_dist = dist or DEFAULT_DIST
    if chosen_dist not in DISTRIBUTIONS:
        raise BadValue(f"unknown distribution {dist!r}; accepted: {', '.join(DISTRIBUTIONS)}", option="--dist", value=dist)
    n = DEFAULT_SAMPLES if samples is None else samples
    if not MIN_SAMPLES <= n <= MAX_SAMPLES:
        raise BadValue(f"must be between {MIN_SAMPLES} and {MAX_SAMPLES:,} (results take 24 bytes per unit per design), got {n}",
                       option="--samples", value=n)
    chosen_seed = DEFAULT_SEED if seed is None else seed
    if chosen_seed < 0:
        raise BadValue(f"must be 0 or more, got {seed}", option="--seed", value=seed)
    return SpreadSettings(r_model, c_model, diel, temp_c, win, threshold_band, chosen_dist, n, chosen_seed, warnings,
                          hours if c_age is not None else None, loss)


def _series_tolerance(name: str | None) -> tuple[float, float]:
    tol = series.get(name or "E24").tolerance
    return -tol, tol
