"""Spread of a design over tolerance, temperature, ageing, bias and threshold: worst case and Monte Carlo.

Everything is vectorised over M designs at once (the pool of ``find``, or one
design for ``spread``). A design has an R position and a C position, each one
part or a pair (series or parallel), and every physical part has its own
:class:`~rcpick.models.PartModel`. The network search evaluates its parts
with the same law (:func:`relative_factor`) and the same draws
(:mod:`rcpick.sampling`).

Worst case (extreme-value analysis, RIAC Desk Reference "Worst Case
Analysis"): every part at its band limits and coefficient bounds, at the worst
temperature. On each side of 25 °C each part's extreme value is linear in
T − 25 °C, so log(R·C) is concave there: its minimum is at an end of the
side and its maximum is found by a golden-section search (docs/model.md).

Monte Carlo: each unit draws each part's deviation, coefficient and ageing
rate within its band, and the threshold(s); it is evaluated at a grid of
temperatures. The same draws serve every design (common random numbers).

References
----------
JCGM 100:2008 (GUM) §4.3: a uniform band of half-width a has σ = a/√3.
E. B. Wilson, "Probable inference, the law of succession, and statistical
inference", J. Am. Stat. Assoc. 22 (1927) 209–212 (the score interval).
"""

from __future__ import annotations

import math
from collections.abc import Callable, Iterator
from dataclasses import dataclass, field

import numpy as np

from rcpick.combos import PARALLEL, SERIES, SINGLE, distinct, parallel_value, series_value
from rcpick.models import ROOM_C, PartModel
from rcpick.sampling import Draws, Sampler
from rcpick.target import Target

#: Percentile points reported, the ±3σ equivalents of a normal distribution.
P_LOW, P_HIGH = 0.00135, 0.99865
#: The histogram counts the units of the chunks that start below this many (all of them up to about 1 M): its
#: shape has long settled by then, and binning is a large share of the cost of a longer run.
HISTOGRAM_UNITS = 1_000_000
#: Working values never fall below this fraction of nominal; a model pushed that far is refused earlier.
FLOOR = 1e-6
#: Bytes of per-unit results kept at once (three floats per unit per design); designs are done in groups.
RESULT_BUDGET = 256 * 2**20
#: Designs evaluated together in one array operation.
BATCH = 8
#: Units worked on at once within a chunk of draws: arrays of a few temperatures × this many stay in the CPU's
#: cache (measured about twice as fast as whole 65,536-unit chunks; benchmarks/bench_montecarlo.py).
BLOCK_UNITS = 8192
#: z of a two-sided 95 % interval.
Z95 = 1.959963984540054
SOURCES = ("R tolerance", "R temperature", "C tolerance", "C temperature", "bias loss", "ageing", "threshold")


# --- designs ----------------------------------------------------------------------


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
    _cache: dict = field(default_factory=dict, compare=False, repr=False)

    @classmethod
    def of(cls, kind: str, parts: list[list[float]], wiring, models: list[list[PartModel]] | PartModel) -> Position:
        """Build from part lists (one or two values per design) and one model or a model per part."""
        arr = np.zeros((len(parts), 2))
        for m, values in enumerate(parts):
            arr[m, : len(values)] = values
        if isinstance(models, PartModel):
            models = [[models, models] for _ in parts]
        return cls(kind, arr, np.asarray(wiring, dtype=np.int8), models)

    def __len__(self) -> int:
        return len(self.wiring)

    def take(self, rows) -> Position:
        rows = np.asarray(rows, dtype=np.intp)
        return Position(self.kind, self.parts[rows], self.wiring[rows], [self.models[i] for i in rows])

    @property
    def nominal(self) -> np.ndarray:
        return combine(self.parts[:, 0], self.parts[:, 1], self.wiring, self.kind)

    @property
    def same_lot(self) -> np.ndarray:
        """Per design: whether its two parts are one value of one model (one reel)."""
        if "lot" not in self._cache:
            self._cache["lot"] = np.array(
                [
                    w != SINGLE and p[0] == p[1] and m[0] == m[1]
                    for w, p, m in zip(self.wiring, self.parts, self.models)
                ],
                dtype=bool,
            )
        return self._cache["lot"]

    def params(self, name: str) -> np.ndarray:
        """A model parameter for every part as an array of shape (M, 2, …), built once."""
        key = ("param", name)
        if key not in self._cache:
            self._cache[key] = np.array([[_param(model, name) for model in row] for row in self.models], dtype=float)
        return self._cache[key]

    def restrict(self, source: str) -> Position:
        """The same designs with every spread source but ``source`` removed from every part."""
        return Position(self.kind, self.parts, self.wiring, [[m.only(source) for m in row] for row in self.models])


def _param(model: PartModel, name: str):
    return {
        "tolerance": model.tolerance,
        "cold": model.drift.cold,
        "hot": model.drift.hot,
        "aging": model.aging,
        "loss": model.loss,
    }[name]


def combine(a: np.ndarray, b: np.ndarray, wiring, kind: str) -> np.ndarray:
    """Effective value of parts a and b (b ignored for a single part), broadcasting ``wiring``."""
    with np.errstate(invalid="ignore", divide="ignore"):
        return np.where(
            wiring == SERIES, series_value(a, b, kind), np.where(wiring == PARALLEL, parallel_value(a, b, kind), a)
        )


@dataclass(frozen=True)
class Study:
    """What to analyse: designs, temperature range, the quantity, and the threshold tolerance.

    Attributes
    ----------
    r, c : Position
        The designs' resistor and capacitor positions (same M).
    temp_c : (float, float)
        Temperature range, °C (both ends may be equal).
    target : Target
        Turns R and C into the quantity analysed.
    level_band : (float, float)
        Relative tolerance band of the threshold(s) of a delay or a period.
    """

    r: Position
    c: Position
    temp_c: tuple[float, float]
    target: Target
    level_band: tuple[float, float] = (0.0, 0.0)

    @property
    def nominal(self) -> np.ndarray:
        return self.target.quantity(self.r.nominal, self.c.nominal)

    @property
    def level_streams(self) -> int:
        """How many threshold levels are spread: 0, 1 (a delay) or 2 (an oscillator's two)."""
        if self.level_band == (0.0, 0.0):
            return 0
        return {"delay": 1, "period": 2}.get(self.target.kind, 0)

    def level_corners(self) -> list:
        """Deviation corners of the threshold band (None: no band)."""
        lo, hi = self.level_band
        if self.level_streams == 1:
            return [lo, hi]
        if self.level_streams == 2:
            return [(a, b) for a in (lo, hi) for b in (lo, hi)]
        return [None]


def check_level_band(target: Target, band: tuple[float, float]) -> None:
    """Every threshold inside its band must keep the timing defined (levels between start and final)."""
    from rcpick.errors import BadValue

    if band == (0.0, 0.0) or target.kind not in ("delay", "period"):
        return
    study = Study(
        Position.of("resistance", [[1.0]], [SINGLE], PartModel((0.0, 0.0))),
        Position.of("capacitance", [[1.0]], [SINGLE], PartModel((0.0, 0.0))),
        (25.0, 25.0),
        target,
        band,
    )
    for corner in study.level_corners():
        factor = target.per_tau(None if not target.leak_a else np.array([0.0]), corner)
        if not np.all(np.isfinite(factor)):
            raise BadValue(
                f"the threshold spread by {band[0]:+.1%}…{band[1]:+.1%} leaves the levels the node passes "
                f"between; narrow it",
                setting="threshold_tol",
            )


# --- one part --------------------------------------------------------------------


def relative_factor(model: PartModel, chunk: Draws, stream: str, lot: str | None, x: np.ndarray) -> np.ndarray:
    """Units' values of one part relative to nominal at temperature offsets ``x`` (°C from 25), shape (T, n).

    v/v₀ = (1 + δ)·(1 + a)·(1 − ℓ)·max(1 + s_cold·min(x, 0) + s_hot·max(x, 0), FLOOR), each of δ, a
    and the slopes drawn within its band (docs/model.md). Only the fields the model spreads are drawn.
    """

    def drawn(band: tuple[float, float], name: str) -> np.ndarray | float:
        mid, half = (band[0] + band[1]) / 2, (band[1] - band[0]) / 2
        return mid + half * chunk.band(stream, name, lot) if half else mid

    scale = 1.0 + drawn(model.tolerance, "tol")
    if model.aging != (0.0, 0.0):
        scale = scale * (1.0 + drawn(model.aging, "age"))
    if model.loss:
        scale = scale * (1.0 - model.loss)
    drift = model.drift
    cold = drawn(drift.cold, "cold")
    hot = cold if drift.shared else drawn(drift.hot, "hot")
    factor = np.empty((len(x), chunk.units))
    for t, xt in enumerate(np.asarray(x, dtype=float)):
        row = factor[t]
        slope, band = (cold, drift.cold) if xt < 0 else (hot, drift.cold if drift.shared else drift.hot)
        if xt == 0.0:
            row[...] = 1.0
        else:  # row by row, in place: the cold slope below 25 °C, the hot one above
            np.multiply(slope, xt, out=row)
            row += 1.0
            if 1.0 + min(xt * band[0], xt * band[1]) < FLOOR:  # only when the band can reach the floor
                np.maximum(row, FLOOR, out=row)
        row *= scale
    return factor


def _position_values(
    pos: Position, rows: np.ndarray, chunk: Draws, slots: tuple[str, str], x: np.ndarray
) -> np.ndarray:
    """Effective values, shape (len(rows), T, n), of designs ``rows`` (all wired alike)."""
    wiring = int(pos.wiring[rows[0]])
    lot = pos.same_lot[rows]
    values = []
    for k in range(1 if wiring == SINGLE else 2):
        out = np.empty((len(rows), len(x), chunk.units))
        groups: dict[tuple[PartModel, bool], list[int]] = {}
        for i, row in enumerate(rows):
            groups.setdefault((pos.models[row][k], bool(lot[i])), []).append(i)
        for (model, in_lot), members in groups.items():
            rel = relative_factor(model, chunk, slots[k], slots[0] if in_lot else None, x)
            index = np.asarray(members)
            if len(index) == len(rows):
                np.multiply(pos.parts[rows, k][:, None, None], rel[None, :, :], out=out)
            else:
                out[index] = pos.parts[rows[index], k][:, None, None] * rel[None, :, :]
        values.append(out)
    if wiring == SINGLE:
        return values[0]
    a, b = values
    return series_value(a, b, pos.kind) if wiring == SERIES else parallel_value(a, b, pos.kind)


# --- worst case -------------------------------------------------------------------


def _sides(temp_c: tuple[float, float]) -> list[tuple[float, float]]:
    """The range split at 25 °C, as offsets x = T − 25 (each side has one sign of x)."""
    lo, hi = temp_c[0] - ROOM_C, temp_c[1] - ROOM_C
    if hi <= 0 or lo >= 0:
        return [(lo, hi)]
    return [(lo, 0.0), (0.0, hi)]


def limit_factor(tol, age, loss, cold, hot, x, upper: bool):
    """Relative value of parts at their upper (or lower) band limits at offsets x (°C from 25).

    ``tol``, ``age``, ``cold`` and ``hot`` are (low, high) bands along their last axis; arrays broadcast with x.
    For x < 0 the upper value takes the smallest cold slope, for x > 0 the largest hot slope.
    """
    side = 1 if upper else 0
    slope = np.where(x < 0, cold[..., 1 - side], hot[..., side])
    return (1 + tol[..., side]) * (1 + age[..., side]) * (1 - loss) * np.maximum(1.0 + slope * x, FLOOR)


def model_limit_factor(model: PartModel, x, upper: bool):
    """:func:`limit_factor` of one part model at offsets x."""
    arr = np.asarray
    return limit_factor(
        arr(model.tolerance),
        arr(model.aging),
        model.loss,
        arr(model.drift.cold),
        arr(model.drift.hot),
        np.asarray(x, dtype=float),
        upper,
    )


def _extreme_values(pos: Position, x: np.ndarray, upper: bool) -> np.ndarray:
    """Effective value with every part at its upper (or lower) limit at offsets x (shape (M, P))."""
    xb = x[:, None, :]  # (M, 1, P) against parts (M, 2, 1)
    factor = limit_factor(
        pos.params("tolerance")[..., None, :],
        pos.params("aging")[..., None, :],
        pos.params("loss")[..., None],
        pos.params("cold")[..., None, :],
        pos.params("hot")[..., None, :],
        xb,
        upper,
    )
    parts = pos.parts[..., None] * factor
    return combine(parts[:, 0], parts[:, 1], pos.wiring[:, None], pos.kind)


def _quantity_extreme(study: Study, x: np.ndarray, upper: bool) -> np.ndarray:
    """The quantity's upper (or lower) extreme over parts and threshold band at offsets x, shape (M, P).

    The quantity grows with R and C (or falls, for a corner frequency) and is monotone in each threshold,
    so its extremes are at the corners; a level never reached counts as an infinitely long time.
    """
    high_rc = upper == study.target.rises_with_tau
    r = _extreme_values(study.r, x, high_rc)
    c = _extreme_values(study.c, x, high_rc)
    values = [study.target.quantity(r, c, corner) for corner in study.level_corners()]
    stacked = np.where(np.isnan(values), np.inf, values)
    return stacked.max(axis=0) if upper else stacked.min(axis=0)


def extremes_over_temperature(
    func: Callable[[np.ndarray, bool], np.ndarray],
    m: int,
    temp_c: tuple[float, float],
    grid: int = 9,
    iterations: int = 32,
) -> tuple[np.ndarray, np.ndarray]:
    """Per design, min of ``func(x, False)`` and max of ``func(x, True)`` over the temperature range.

    ``func(x, upper)`` takes offsets x (°C from 25) of shape (M, P) and returns values (M, P). On each
    side of 25 °C a grid (ends included) is refined by a golden-section search around its best point:
    exact for a function concave in x on each side (docs/model.md), a careful search otherwise.
    """
    ratio = (math.sqrt(5) - 1) / 2
    found = {False: np.full(m, np.inf), True: np.full(m, -np.inf)}
    for a, b in _sides(temp_c):
        points = np.linspace(a, b, grid if b > a else 1)
        xs = np.tile(points, (m, 1))
        for upper in (False, True):
            sign = 1.0 if upper else -1.0
            values = sign * func(xs, upper)
            best = np.argmax(values, axis=1)
            top = values[np.arange(m), best]
            if b > a:
                lo = points[np.maximum(best - 1, 0)]
                hi = points[np.minimum(best + 1, len(points) - 1)]
                for _ in range(iterations):
                    x1 = hi - ratio * (hi - lo)
                    x2 = lo + ratio * (hi - lo)
                    f = sign * func(np.stack([x1, x2], axis=1), upper)
                    left = f[:, 0] >= f[:, 1]
                    top = np.maximum(top, np.where(left, f[:, 0], f[:, 1]))
                    hi = np.where(left, x2, hi)
                    lo = np.where(left, lo, x1)
            found[upper] = np.maximum(found[upper], top) if upper else np.minimum(found[upper], -top)
    return found[False], found[True]


def worst_case(study: Study) -> tuple[np.ndarray, np.ndarray]:
    """Worst-case minimum and maximum of the quantity, per design (target's unit; inf if never reached)."""
    return extremes_over_temperature(lambda x, upper: _quantity_extreme(study, x, upper), len(study.r), study.temp_c)


def contributions(study: Study) -> list[dict[str, float | None]]:
    """Share of the worst-case spread due to each source, per design (shares add up to 1; None when the worst
    case never reaches the level, so that no share is defined).

    Each source's weight is the worst-case span of log(quantity) with only that
    source active; a fixed shift (bias loss) counts by its size.
    """
    nominal = study.nominal
    only_r = {"R tolerance": "tolerance", "R temperature": "drift"}
    only_c = {"C tolerance": "tolerance", "C temperature": "drift", "bias loss": "loss", "ageing": "aging"}
    weights = {}
    for source in SOURCES:
        if source == "threshold":
            sub = Study(
                study.r.restrict("none"), study.c.restrict("none"), study.temp_c, study.target, study.level_band
            )
        else:
            sub = Study(
                study.r.restrict(only_r.get(source, "none")),
                study.c.restrict(only_c.get(source, "none")),
                study.temp_c,
                study.target,
            )
        lo, hi = worst_case(sub)
        with np.errstate(divide="ignore", invalid="ignore"):
            weights[source] = np.log(np.maximum(hi, nominal)) - np.log(np.minimum(lo, nominal))
    total = sum(weights.values())
    out: list[dict[str, float | None]] = []
    for m in range(len(nominal)):
        t = float(total[m])
        if not math.isfinite(t):  # some corner never reaches the level: shares are not defined
            out.append(dict.fromkeys(weights))
            continue
        out.append({s: (float(w[m]) / t if t > 0 else 0.0) for s, w in weights.items()})
    return out


# --- Monte Carlo -------------------------------------------------------------------


def temperature_grid(temp_c: tuple[float, float], per_side: int = 1) -> np.ndarray:
    """Temperatures checked per unit, °C: the range ends, 25 °C when inside, and ``per_side`` points between."""
    points: list[float] = []
    for a, b in _sides(temp_c):
        points.extend(np.linspace(a, b, per_side + 2))
    return distinct(np.array(points)) + ROOM_C


def wilson_interval(passed, samples: int, z: float = Z95) -> tuple[np.ndarray, np.ndarray]:
    """Wilson score interval of a binomial proportion (E. B. Wilson 1927), elementwise over ``passed``."""
    k = np.asarray(passed, dtype=float)
    p = k / samples
    denom = 1.0 + z * z / samples
    centre = (p + z * z / (2 * samples)) / denom
    half = z * np.sqrt(p * (1 - p) / samples + z * z / (4 * samples * samples)) / denom
    return np.clip(centre - half, 0.0, 1.0), np.clip(centre + half, 0.0, 1.0)


@dataclass(frozen=True)
class MonteCarlo:
    """Monte Carlo results per design (arrays of shape (M,), target's unit)."""

    p_low: np.ndarray  # 0.135 % point of each unit's minimum over the temperature range
    p_median: np.ndarray  # median of the units' values at the reference temperature
    p_high: np.ndarray  # 99.865 % point of each unit's maximum over the temperature range
    sigma: np.ndarray  # standard deviation of the units' values at the reference temperature
    yield_: np.ndarray | None  # share of units inside the window at every checked temperature
    yield_low: np.ndarray | None  # Wilson 95 % interval of the yield
    yield_high: np.ndarray | None
    never: np.ndarray  # units that never reach the level (delays and periods)
    samples: int
    temperatures_c: np.ndarray
    reference_c: float
    histogram: tuple[np.ndarray, np.ndarray] | None = None  # (counts, edges) over unit × temperature values
    evaluations: int = 0
    histogram_units: int = 0  # the units the histogram counts (see HISTOGRAM_UNITS)


def unit_summary(
    lows: np.ndarray,
    highs: np.ndarray,
    refs: np.ndarray,
    window: tuple[float, float] | None,
    *,
    all_finite: bool = False,
) -> dict[str, np.ndarray]:
    """Per design (rows): percentiles, σ, passing and never-reaching counts of per-unit results.

    ``lows``/``highs`` are each unit's minimum and maximum over the checked temperatures, ``refs`` its value
    at the reference temperature; a level never reached is +inf. The arrays are reordered in place (the
    percentiles partition them); ``all_finite`` says no unit can be +inf, which skips those checks.
    """
    out = {
        "passed": (
            np.sum((lows >= window[0]) & (highs <= window[1]), axis=1).astype(float)
            if window is not None
            else np.zeros(len(lows))
        ),
        "never": np.zeros(len(lows)) if all_finite else np.sum(~np.isfinite(highs), axis=1).astype(float),
    }
    if all_finite:
        out["sigma"] = np.std(refs, axis=1, ddof=1)
    else:
        finite = np.isfinite(refs).all(axis=1)
        with np.errstate(invalid="ignore"):
            out["sigma"] = np.where(finite, np.std(np.where(np.isfinite(refs), refs, 0.0), axis=1, ddof=1), np.inf)
    with np.errstate(invalid="ignore"):  # inf − inf between neighbours of a never-reached unit: that point is inf
        out["p_low"] = quantile_in_place(lows, P_LOW)
        out["p_high"] = quantile_in_place(highs, P_HIGH)
        out["p_median"] = quantile_in_place(refs, 0.5)
    for name in ("p_low", "p_high", "p_median"):
        out[name] = np.where(np.isnan(out[name]), np.inf, out[name])
    return out


def quantile_in_place(values: np.ndarray, q: float) -> np.ndarray:
    """Per row, the ``q`` quantile of ``values`` (2-D) as numpy's default (linear) method gives it, found by
    partitioning the rows in place instead of sorting a copy."""
    n = values.shape[1]
    h = (n - 1) * q
    lower = int(math.floor(h))
    upper = min(lower + 1, n - 1)
    values.partition([lower, upper] if upper != lower else lower, axis=1)
    below, above = values[:, lower], values[:, upper]
    return below + (h - lower) * (above - below)


def _groups(study: Study, samples: int) -> Iterator[np.ndarray]:
    """Design indices in groups whose per-unit results fit :data:`RESULT_BUDGET`."""
    size = max(1, RESULT_BUDGET // (24 * samples))
    m = len(study.r)
    for start in range(0, m, size):
        yield np.arange(start, min(start + size, m))


def _batches(study: Study, rows: np.ndarray) -> list[np.ndarray]:
    """``rows`` in batches of at most :data:`BATCH`, each batch wired alike (R and C)."""
    key = study.r.wiring[rows].astype(int) * 3 + study.c.wiring[rows].astype(int)
    out: list[np.ndarray] = []
    for value in distinct(key):
        same = rows[key == value]
        out.extend(same[i : i + BATCH] for i in range(0, len(same), BATCH))
    return out


def level_deviations(study: Study, chunk: Draws):
    """Threshold deviations of the units of a chunk (None without a threshold band)."""
    count = study.level_streams
    if not count:
        return None
    lo, hi = study.level_band
    mid, half = (lo + hi) / 2, (hi - lo) / 2
    draws = [mid + half * chunk.band(f"level{i + 1}", "level") for i in range(count)]
    return draws[0] if count == 1 else (draws[0], draws[1])


def monte_carlo(
    study: Study,
    samples: int,
    seed: int | None,
    dist: str = "uniform",
    window: tuple[float, float] | None = None,
    *,
    lot_share: float = 1.0,
    histogram_range: tuple[float, float] | None = None,
    bins: int = 40,
    progress: Callable[[int], None] | None = None,
) -> MonteCarlo:
    """Simulate ``samples`` units of every design; see :class:`MonteCarlo` for what is returned.

    Parameters
    ----------
    window : (low, high), optional
        Acceptance window in the quantity's unit (an end may be ±inf for a limit); gives the yield.
    lot_share : float
        Share of a same-value pair's deviation common to its reel, 0 … 1 (rcpick.sampling).
    histogram_range : (low, high), optional
        With one design: also count every unit × temperature value into ``bins`` bins over this range.
    progress : callable, optional
        Called with the number of unit-evaluations just done (one unit at one temperature).
    """
    sampler = Sampler(seed, dist, lot_share)
    temps = temperature_grid(study.temp_c)
    x = temps - ROOM_C
    ref_index = int(np.argmin(np.abs(x)))
    m = len(study.r)
    out = {name: np.empty(m) for name in ("p_low", "p_median", "p_high", "sigma", "passed", "never")}
    counts = np.zeros(bins, dtype=np.int64) if histogram_range is not None else None
    edges = np.linspace(*histogram_range, bins + 1) if histogram_range is not None else None
    # Designs that follow one relative law are simulated once and scaled (see same_laws).
    rep_of, scale = same_laws(study)
    reps = distinct(rep_of)
    members = {int(k): np.flatnonzero(rep_of == rep) for k, rep in enumerate(reps)}
    laws = Study(study.r.take(reps), study.c.take(reps), study.temp_c, study.target, study.level_band)
    binned = 0
    for group in _groups(laws, samples):
        lows, highs, refs = (np.empty((len(group), samples)) for _ in range(3))
        place = {int(row): i for i, row in enumerate(group)}
        start = 0
        for index, n in sampler.chunks(samples):
            chunk = sampler.chunk(index, n)
            for b0 in range(0, n, BLOCK_UNITS):  # the chunk's draws, worked through in cache-sized blocks
                b1 = min(n, b0 + BLOCK_UNITS)
                block = chunk.view(b0, b1)
                deviation = level_deviations(laws, block)
                span = slice(start + b0, start + b1)
                for rows in _batches(laws, group):
                    r = _position_values(laws.r, rows, block, ("R1", "R2"), x)
                    c = _position_values(laws.c, rows, block, ("C1", "C2"), x)
                    q = laws.target.quantity(r, c, deviation)
                    if laws.target.leak_a:  # only leakage can keep a node from its level (NaN): never reached
                        q = np.where(np.isnan(q), np.inf, q)
                    at = [place[int(row)] for row in rows]
                    lows[at, span] = q.min(axis=1)
                    highs[at, span] = q.max(axis=1)
                    refs[at, span] = q[:, ref_index, :]
                    if counts is not None and edges is not None and rows[0] == 0 and start < HISTOGRAM_UNITS:
                        counts += _bin_counts(q[0], float(edges[0]), float(edges[-1]), bins)
                        binned += b1 - b0
                    if progress is not None:
                        progress(sum(len(members[int(k)]) for k in rows) * (b1 - b0) * len(temps))
            start += n
        # designs scaled from a representative count their own passing units (before the rows are reordered)
        for i, k in enumerate(group):
            for design in members[int(k)]:
                s_ = scale[design]
                if window is not None and s_ != 1.0:
                    out["passed"][design] = np.sum((lows[i] * s_ >= window[0]) & (highs[i] * s_ <= window[1]))
        summary = unit_summary(lows, highs, refs, window, all_finite=not laws.target.leak_a)
        for i, k in enumerate(group):
            for design in members[int(k)]:
                s_ = scale[design]
                for name in ("p_low", "p_median", "p_high", "sigma"):
                    out[name][design] = summary[name][i] * s_
                out["never"][design] = summary["never"][i]
                if window is not None and s_ == 1.0:
                    out["passed"][design] = summary["passed"][i]
    yield_ = low = high = None
    if window is not None:
        yield_ = out["passed"] / samples
        low, high = wilson_interval(out["passed"], samples)
    return MonteCarlo(
        out["p_low"],
        out["p_median"],
        out["p_high"],
        out["sigma"],
        yield_,
        low,
        high,
        out["never"].astype(int),
        samples,
        temps,
        float(temps[ref_index]),
        (counts, edges) if counts is not None and edges is not None else None,
        m * samples * len(temps),
        binned,
    )


def _bin_counts(values: np.ndarray, low: float, high: float, bins: int) -> np.ndarray:
    """Counts of ``values`` in ``bins`` equal bins over [low, high], values outside counted in the end bins
    (as numpy.histogram of the clipped values, in fewer passes over the data)."""
    index = np.subtract(values, low)
    index *= bins / (high - low)
    np.clip(index, 0, bins - 1, out=index)
    return np.bincount(index.astype(np.intp).ravel(), minlength=bins)[:bins]


def same_laws(study: Study) -> tuple[np.ndarray, np.ndarray]:
    """Per design: the first design with the same relative law, and the factor between their quantities.

    Two designs follow one law when their positions are wired alike, their parts have the same models and
    reel sharing, and each pair has the same ratio of its two values: every unit's quantity is then the same
    multiple of nominal, so one simulation serves both (exactly, but for the last bits of rounding). Leakage
    makes the quantity depend on R itself, so then every design is its own law.
    """
    m = len(study.r)
    if study.target.leak_a:
        return np.arange(m), np.ones(m)
    keys: dict[tuple, int] = {}
    rep_of = np.empty(m, dtype=np.intp)
    for i in range(m):
        key = []
        for pos in (study.r, study.c):
            w = int(pos.wiring[i])
            count = 1 if w == SINGLE else 2
            ratio = round(float(pos.parts[i, 1] / pos.parts[i, 0]), 12) if count == 2 else 0.0
            key.append((w, tuple(pos.models[i][:count]), bool(pos.same_lot[i]), ratio))
        rep_of[i] = keys.setdefault(tuple(key), i)
    nominal = study.nominal
    return rep_of, nominal / nominal[rep_of]


def evaluations(designs: int, samples: int, temp_c: tuple[float, float]) -> int:
    """Unit-evaluations a Monte Carlo of ``designs`` will make (for progress bars)."""
    return designs * samples * len(temperature_grid(temp_c))
