"""Spread of a design over tolerance, temperature, ageing, bias and threshold: worst case and Monte Carlo.

Everything is vectorised over M designs at once (the shortlist of ``find``,
or one design for ``spread``). A design has an R position and a C position,
each one part or a pair (series or parallel), and every physical part has its
own :class:`~rcpick.models.PartModel`.

Worst case (extreme-value analysis, RIAC Desk Reference "Worst Case
Analysis"): every part at its band limits and coefficient bounds, at every
temperature in the range. Each part's value is linear in T − 25 °C on each
side of 25 °C, and the effective value of a pair is a sum or a harmonic
combination of its parts, so on each side log(tau) is a concave function of
T: its minimum lies at an end of the side, and its maximum is found exactly by
a golden-section search (docs/model.md).

Monte Carlo: each unit draws every part's deviation, coefficient and ageing
rate within its band, and (for a delay) the threshold; the unit is evaluated
at a grid of temperatures. The same draws serve every design (common random
numbers), so designs are compared on the same simulated units and ``spread``
of a design repeats ``find``'s figures for it.

References
----------
JCGM 100:2008 (GUM) §4.3: a uniform band of half-width a has σ = a/√3.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from rcpick.combos import PARALLEL, SERIES, SINGLE, parallel_value, series_value
from rcpick.models import ROOM_C, PartModel
from rcpick.errors import BadValue
from rcpick.target import Target

#: Normal distribution: the band is ±3σ, truncated at the band.
SIGMAS_IN_BAND = 3.0
DISTRIBUTIONS = ("uniform", "normal")
#: Percentile points reported, the ±3σ equivalents of a normal distribution.
P_LOW, P_HIGH = 0.00135, 0.99865
#: Units simulated at once; bounds working memory (about 0.3 kB per unit in a batch of designs).
CHUNK_UNITS = 65536
#: Working values never fall below this fraction of nominal (a model pushed past its rated range).
FLOOR = 1e-6
SOURCES = ("R tolerance", "R temperature", "C tolerance", "C temperature", "bias loss", "ageing", "threshold")


@dataclass(frozen=True)
class Position:
    """One position (R or C) of M designs: up to two parts each.

    Attributes
    ----------
    kind : str
        ``resistance`` or ``capacitance``.
    parts : ndarray, shape (M, 2)
        Nominal part values (SI); the second is 0 for a single part.
    wiring : ndarray, shape (M,)
        SINGLE, SERIES or PARALLEL.
    models : list of list of PartModel
        ``models[m][k]`` is the model of part k of design m.
    """

    kind: str
    parts: np.ndarray
    wiring: np.ndarray
    models: list[list[PartModel]]

    @classmethod
    def of(cls, kind: str, parts: list[list[float]], wiring, models: list[list[PartModel]] | PartModel) -> "Position":
        """Build from part lists (one or two values per design) and one model or a model per part."""
        arr = np.zeros((len(parts), 2))
        for m, values in enumerate(parts):
            arr[m, : len(values)] = values
        if isinstance(models, PartModel):
            models = [[models, models] for _ in parts]
        return cls(kind, arr, np.asarray(wiring, dtype=np.int8), models)

    def __len__(self) -> int:
        return len(self.wiring)

    @property
    def nominal(self) -> np.ndarray:
        return combine(self.parts[:, 0], self.parts[:, 1], self.wiring, self.kind)

    def params(self, field: str) -> np.ndarray:
        """A model parameter for every part as an array of shape (M, 2, …), built once."""
        cache = self.__dict__.setdefault("_params", {})
        if field not in cache:
            cache[field] = np.array([[_param(model, field) for model in row] for row in self.models], dtype=float)
        return cache[field]

    def restrict(self, source: str) -> "Position":
        """The same designs with every spread source but ``source`` removed from every part."""
        return Position(self.kind, self.parts, self.wiring, [[m.only(source) for m in row] for row in self.models])


def _param(model: PartModel, field: str):
    if field == "tolerance":
        return model.tolerance
    if field == "cold":
        return model.drift.cold
    if field == "hot":
        return model.drift.hot
    if field == "shared":
        return float(model.drift.shared)
    if field == "aging":
        return model.aging
    if field == "loss":
        return model.loss
    raise KeyError(field)


def combine(a: np.ndarray, b: np.ndarray, wiring: np.ndarray, kind: str) -> np.ndarray:
    """Effective value of parts a and b (b ignored for a single part), broadcasting ``wiring``."""
    with np.errstate(invalid="ignore", divide="ignore"):
        out = np.where(wiring == SERIES, series_value(a, b, kind), np.where(wiring == PARALLEL, parallel_value(a, b, kind), a))
    return out


@dataclass(frozen=True)
class Threshold:
    """A delay's threshold and its spread: fraction of the step, relative tolerance band."""

    fraction: float
    falling: bool
    band: tuple[float, float] = (0.0, 0.0)

    def factors(self, deviation: np.ndarray) -> np.ndarray:
        """Delay per tau, ln(1/(1 − f)) or ln(1/f), at f = fraction·(1 + deviation)."""
        f = self.fraction * (1.0 + deviation)
        return np.log(1.0 / f) if self.falling else np.log(1.0 / (1.0 - f))

    def check(self) -> None:
        """The threshold must stay strictly inside (0, 1) of the step over its whole band."""
        lo, hi = self.fraction * (1 + self.band[0]), self.fraction * (1 + self.band[1])
        if not (0 < lo and hi < 1):
            raise BadValue(f"the threshold {self.fraction:.6g} of the step spread by {self.band[0]:+.1%}…{self.band[1]:+.1%} "
                           f"leaves (0, 1): {lo:.4g}…{hi:.4g}; narrow --threshold-tol", option="--threshold-tol")


@dataclass(frozen=True)
class Study:
    """What to analyse: designs, temperature range and the quantity.

    Attributes
    ----------
    r, c : Position
        The designs' resistor and capacitor positions (same M).
    temp_c : (float, float)
        Temperature range, °C (both ends may be equal).
    target : Target
        Turns tau into the quantity analysed (tau itself, a corner frequency or a delay).
    threshold : Threshold or None
        For a delay: the threshold and its spread.
    """

    r: Position
    c: Position
    temp_c: tuple[float, float]
    target: Target
    threshold: Threshold | None = None

    def quantity(self, tau_s: np.ndarray, delay_per_tau: np.ndarray | float | None = None) -> np.ndarray:
        """The analysed quantity for time constants ``tau_s`` (s) and delay factors."""
        if self.target.kind == "cutoff":
            return 1.0 / (2.0 * math.pi * tau_s)
        if self.target.kind == "delay":
            return tau_s * (self.target.delay_per_tau if delay_per_tau is None else delay_per_tau)
        return tau_s

    @property
    def nominal(self) -> np.ndarray:
        return self.quantity(self.r.nominal * self.c.nominal)


# --- worst case --------------------------------------------------------------

def _sides(temp_c: tuple[float, float]) -> list[tuple[float, float]]:
    """The range split at 25 °C, as offsets x = T − 25 (each side has one sign of x)."""
    lo, hi = temp_c[0] - ROOM_C, temp_c[1] - ROOM_C
    if hi <= 0 or lo >= 0:
        return [(lo, hi)]
    return [(lo, 0.0), (0.0, hi)]


def _extreme_values(pos: Position, x: np.ndarray, upper: bool) -> np.ndarray:
    """Effective value with every part at its upper (or lower) limit at offsets x (shape (M, P))."""
    tol = pos.params("tolerance")[..., 1 if upper else 0]
    age = pos.params("aging")[..., 1 if upper else 0]
    loss = pos.params("loss")
    cold, hot = pos.params("cold"), pos.params("hot")
    xb = x[:, None, :]  # (M, 1, P) against parts (M, 2, 1)
    negative = xb < 0
    # For x < 0 the upper value takes the smallest slope, for x > 0 the largest.
    slope = np.where(negative, cold[..., 0 if upper else 1][..., None], hot[..., 1 if upper else 0][..., None])
    factor = np.maximum(1.0 + slope * xb, FLOOR)
    parts = pos.parts[..., None] * ((1 + tol) * (1 + age) * (1 - loss))[..., None] * factor
    return combine(parts[:, 0], parts[:, 1], pos.wiring[:, None], pos.kind)


def _tau_extreme(study: Study, x: np.ndarray, upper: bool) -> np.ndarray:
    return _extreme_values(study.r, x, upper) * _extreme_values(study.c, x, upper)


def tau_range(study: Study, iterations: int = 80) -> tuple[np.ndarray, np.ndarray]:
    """Worst-case minimum and maximum of tau (s) over the bands and the temperature range, per design."""
    m = len(study.r)
    lows, highs = [], []
    for a, b in _sides(study.temp_c):
        ends = np.tile(np.array([a, b]), (m, 1))
        lows.append(_tau_extreme(study, ends, upper=False).min(axis=1))
        # log tau_max is concave in x on this side: golden-section search for its maximum.
        lo, hi = np.full(m, a), np.full(m, b)
        ratio = (math.sqrt(5) - 1) / 2
        for _ in range(iterations if b > a else 0):
            x1 = hi - ratio * (hi - lo)
            x2 = lo + ratio * (hi - lo)
            f = _tau_extreme(study, np.stack([x1, x2], axis=1), upper=True)
            left_better = f[:, 0] >= f[:, 1]
            hi = np.where(left_better, x2, hi)
            lo = np.where(left_better, lo, x1)
        probe = np.column_stack([ends, (lo + hi) / 2])
        highs.append(_tau_extreme(study, probe, upper=True).max(axis=1))
    return np.min(lows, axis=0), np.max(highs, axis=0)


def _quantity_corners(study: Study, tau_lo: np.ndarray, tau_hi: np.ndarray, band=None) -> tuple[np.ndarray, np.ndarray]:
    """Min and max of the quantity over [tau_lo, tau_hi] and the threshold band (monotone in each)."""
    if study.target.kind == "delay" and study.threshold is not None:
        band = study.threshold.band if band is None else band
        factors = study.threshold.factors(np.array(band))
    else:
        factors = np.array([study.target.delay_per_tau] * 2)
    corners = np.stack([study.quantity(t, f) for t in (tau_lo, tau_hi) for f in factors])
    return corners.min(axis=0), corners.max(axis=0)


def worst_case(study: Study) -> tuple[np.ndarray, np.ndarray]:
    """Worst-case minimum and maximum of the quantity, per design (target's unit)."""
    tau_lo, tau_hi = tau_range(study)
    return _quantity_corners(study, tau_lo, tau_hi)


def contributions(study: Study) -> list[dict[str, float]]:
    """Share of the worst-case spread due to each source, per design (shares add up to 1).

    Each source's weight is the worst-case span of log(quantity) with only that
    source active; a fixed shift (bias loss) counts by its size.
    """
    nominal_tau = study.r.nominal * study.c.nominal
    only_r = {"R tolerance": "tolerance", "R temperature": "drift"}
    only_c = {"C tolerance": "tolerance", "C temperature": "drift", "bias loss": "loss", "ageing": "aging"}
    weights = {}
    for source in SOURCES:
        if source == "threshold":
            if study.target.kind != "delay" or study.threshold is None:
                weights[source] = np.zeros(len(nominal_tau))
                continue
            lo, hi = _quantity_corners(study, nominal_tau, nominal_tau)
        else:
            r = study.r.restrict(only_r.get(source, "none"))
            c = study.c.restrict(only_c.get(source, "none"))
            sub = Study(r, c, study.temp_c, study.target, study.threshold)
            tau_lo, tau_hi = tau_range(sub)
            lo, hi = _quantity_corners(sub, np.minimum(tau_lo, nominal_tau), np.maximum(tau_hi, nominal_tau), band=(0.0, 0.0))
        weights[source] = np.log(hi) - np.log(lo)
    total = sum(weights.values())
    out = []
    for m in range(len(nominal_tau)):
        t = float(total[m])
        out.append({s: (float(w[m]) / t if t > 0 else 0.0) for s, w in weights.items()})
    return out


# --- Monte Carlo -------------------------------------------------------------

def temperature_grid(temp_c: tuple[float, float], per_side: int = 1) -> np.ndarray:
    """Temperatures checked per unit, °C: the range ends, 25 °C when inside, and ``per_side`` points between."""
    points = []
    for a, b in _sides(temp_c):
        points.extend(np.linspace(a, b, per_side + 2))
    return np.unique(np.array(points)) + ROOM_C


def band_draws(rng: np.random.Generator, shape: tuple[int, ...], dist: str) -> np.ndarray:
    """Positions within a band, in [-1, 1]: uniform, or normal with the band at ±3σ, truncated."""
    if dist == "uniform":
        return rng.uniform(-1.0, 1.0, shape)
    z = rng.standard_normal(shape) / SIGMAS_IN_BAND
    outside = np.abs(z) > 1.0
    while outside.any():
        z[outside] = rng.standard_normal(int(outside.sum())) / SIGMAS_IN_BAND
        outside = np.abs(z) > 1.0
    return z


@dataclass(frozen=True)
class Draws:
    """Band positions in [-1, 1] for one chunk of units; slots: R part 1, R part 2, C part 1, C part 2."""

    tolerance: np.ndarray  # (4, n)
    cold: np.ndarray       # (4, n)
    hot: np.ndarray        # (4, n)
    aging: np.ndarray      # (4, n)
    threshold: np.ndarray  # (n,)

    @property
    def units(self) -> int:
        return self.threshold.shape[0]


def draw_chunks(samples: int, seed: int | None, dist: str):
    """Draws for every unit, chunk by chunk, from one seeded generator (same seed, same units)."""
    rng = np.random.default_rng(seed)
    for start in range(0, samples, CHUNK_UNITS):
        n = min(CHUNK_UNITS, samples - start)
        yield Draws(*(band_draws(rng, (4, n), dist) for _ in range(4)), band_draws(rng, (n,), dist))


def _mid_half(band: np.ndarray) -> tuple[np.ndarray, np.ndarray]:
    return (band[..., 0] + band[..., 1]) / 2, (band[..., 1] - band[..., 0]) / 2


def _unit_values(pos: Position, rows: np.ndarray, draws: Draws, slots: tuple[int, int], x: np.ndarray) -> np.ndarray:
    """Effective values, shape (designs, temperatures, units), of designs ``rows`` (all wired alike)."""
    wiring = int(pos.wiring[rows[0]])
    parts = pos.parts[rows]
    tol_mid, tol_half = _mid_half(pos.params("tolerance")[rows])
    age_mid, age_half = _mid_half(pos.params("aging")[rows])
    cold_mid, cold_half = _mid_half(pos.params("cold")[rows])
    hot_mid, hot_half = _mid_half(pos.params("hot")[rows])
    shared = pos.params("shared")[rows].astype(bool)
    loss = pos.params("loss")[rows]
    # Offsets below and above 25 °C as separate columns: 1 + s_cold·min(x, 0) + s_hot·max(x, 0).
    x_cold = np.minimum(x, 0.0)[None, :, None]
    x_hot = np.maximum(x, 0.0)[None, :, None]
    values = []
    for k, slot in enumerate(slots[: 1 if wiring == SINGLE else 2]):
        # When every design's part k has the same model (no stock file), its relative factor is the same
        # array for all of them: compute it once and scale by each design's nominal value.
        shared_model = len(rows) > 1 and _same_model(pos, rows, k)
        model_rows = slice(0, 1) if shared_model else slice(None)
        zt, zc, zh, za = (d[slot][None, :] for d in (draws.tolerance, draws.cold, draws.hot, draws.aging))
        zh = np.where(shared[model_rows, k, None], zc, zh)
        scale = (1 + tol_mid[model_rows, k, None] + tol_half[model_rows, k, None] * zt)
        scale = scale * (1 + age_mid[model_rows, k, None] + age_half[model_rows, k, None] * za)
        scale *= 1 - loss[model_rows, k, None]
        if not shared_model:
            scale *= parts[:, k, None]
        slope_c = (cold_mid[model_rows, k, None] + cold_half[model_rows, k, None] * zc)[:, None, :]
        slope_h = (hot_mid[model_rows, k, None] + hot_half[model_rows, k, None] * zh)[:, None, :]
        factor = slope_c * x_cold
        factor += slope_h * x_hot
        factor += 1.0
        np.maximum(factor, FLOOR, out=factor)
        factor *= scale[:, None, :]
        values.append(factor * parts[:, k, None, None] if shared_model else factor)
    if wiring == SINGLE:
        return values[0]
    a, b = values
    adds = (wiring == SERIES) == (pos.kind == "resistance")
    return a + b if adds else a * b / (a + b)


def _same_model(pos: Position, rows: np.ndarray, k: int) -> bool:
    """Whether part k of every design in ``rows`` has the same model parameters."""
    for field in ("tolerance", "aging", "cold", "hot", "shared", "loss"):
        values = pos.params(field)[rows, k]
        if not np.all(values == values[:1]):
            return False
    return True


def _batches(study: Study, batch: int) -> list[np.ndarray]:
    """Design indices in batches of at most ``batch``, each batch wired alike (R and C)."""
    key = study.r.wiring.astype(int) * 3 + study.c.wiring.astype(int)
    out = []
    for value in np.unique(key):
        rows = np.flatnonzero(key == value)
        out.extend(rows[i:i + batch] for i in range(0, len(rows), batch))
    return out


@dataclass(frozen=True)
class MonteCarlo:
    """Monte Carlo results per design (arrays of shape (M,), target's unit)."""

    p_low: np.ndarray      # 0.135 % point of each unit's minimum over the temperature range
    p_median: np.ndarray   # median of the units' values at the reference temperature
    p_high: np.ndarray     # 99.865 % point of each unit's maximum over the temperature range
    sigma: np.ndarray      # standard deviation of the units' values at the reference temperature
    yield_: np.ndarray | None  # share of units inside the window at every checked temperature
    samples: int
    temperatures_c: np.ndarray
    reference_c: float
    histogram: tuple[np.ndarray, np.ndarray] | None = None  # (counts, edges) over all unit × temperature values
    evaluations: int = 0


def monte_carlo(
    study: Study,
    samples: int,
    seed: int | None,
    dist: str = "uniform",
    window: tuple[float, float] | None = None,
    histogram_range: tuple[float, float] | None = None,
    bins: int = 40,
    progress: Callable[[int], None] | None = None,
    batch: int = 8,
) -> MonteCarlo:
    """Simulate ``samples`` units of every design; see :class:`MonteCarlo` for what is returned.

    Parameters
    ----------
    window : (low, high), optional
        Acceptance window in the quantity's unit; gives the yield.
    histogram_range : (low, high), optional
        With one design: also count every unit × temperature value into ``bins`` bins over this range.
    progress : callable, optional
        Called with the number of unit-evaluations just done (one unit at one temperature).
    batch : int
        Designs evaluated at once (working memory: about batch × units per chunk × temperatures × 8 bytes
        per array). The units are drawn again for each batch from the same seed, so every design sees
        the same units; results need 24 bytes per unit per design.
    """
    if dist not in DISTRIBUTIONS:
        raise ValueError(f"dist must be one of {DISTRIBUTIONS}")
    temps = temperature_grid(study.temp_c)
    x = temps - ROOM_C
    ref_index = int(np.argmin(np.abs(x)))
    m = len(study.r)
    lows = np.empty((m, samples))
    highs = np.empty((m, samples))
    refs = np.empty((m, samples))
    counts = np.zeros(bins, dtype=np.int64) if histogram_range is not None else None
    edges = np.linspace(*histogram_range, bins + 1) if histogram_range is not None else None
    # The same seed gives the same units for every batch of designs (common random numbers); a run that
    # fits in one chunk draws them once, a longer one draws them again per batch to keep memory bounded.
    cached = list(draw_chunks(samples, seed, dist)) if samples <= CHUNK_UNITS else None
    for rows in _batches(study, batch):
        start = 0
        for draws in cached if cached is not None else draw_chunks(samples, seed, dist):
            n = draws.units
            per_tau = None
            if study.target.kind == "delay" and study.threshold is not None:
                mid, half = _mid_half(np.array(study.threshold.band))
                per_tau = study.threshold.factors(mid + half * draws.threshold)[None, None, :]
            tau = _unit_values(study.r, rows, draws, (0, 1), x) * _unit_values(study.c, rows, draws, (2, 3), x)
            q = study.quantity(tau, per_tau)
            lows[rows, start:start + n] = q.min(axis=1)
            highs[rows, start:start + n] = q.max(axis=1)
            refs[rows, start:start + n] = q[:, ref_index, :]
            if counts is not None and rows[0] == 0:
                counts += np.histogram(np.clip(q[0], edges[0], edges[-1]), edges)[0]
            if progress is not None:
                progress(len(rows) * n * len(temps))
            start += n
    p_low = np.quantile(lows, P_LOW, axis=1)
    p_high = np.quantile(highs, P_HIGH, axis=1)
    p_median = np.median(refs, axis=1)
    sigma = np.std(refs, axis=1, ddof=1)
    yield_ = None
    if window is not None:
        yield_ = np.mean((lows >= window[0]) & (highs <= window[1]), axis=1)
    return MonteCarlo(p_low, p_median, p_high, sigma, yield_, samples, temps, float(temps[ref_index]),
                      (counts, edges) if counts is not None else None, m * samples * len(temps))
