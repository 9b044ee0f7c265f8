"""Searching standard values for chosen elements of a network, and the spread of each result.

The quantity of a network is its dominant (longest) natural time constant,
the delay until a node crosses a threshold after the step, or the node's
−3 dB corner frequency. All are evaluated on stacks of networks at once
(``rcpick.network`` works on batches).

Exactness: the dominant time constant grows with every R and every C
(Courant–Fischer; see ``rcpick.network``), so for each combination of the
other varied elements the error is monotone on each side of the crossing in
the largest candidate set: a batched bisection finds the crossing and the N
nearest values on each side hold the best N, as in the plain search. A delay
or a corner frequency is not monotone in general, so for those every
combination is evaluated (up to ``ENUMERATION_CAP``), which is exact too.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass

import numpy as np

from rcpick import network
from rcpick.combos import SERIES, SINGLE, Combos, parallel_value, series_value
from rcpick.errors import BadValue, Unreachable
from rcpick.models import ROOM_C, PartModel
from rcpick.netlist import Netlist
from rcpick.search import ERROR_DECIMALS, REACH_LIMIT

ENUMERATION_CAP = 300_000
BATCH = 20_000
HORIZON_TAUS = 30.0


@dataclass(frozen=True)
class Quantity:
    """What is measured on the network: ``tau``, ``delay`` (at ``node`` to ``level``) or ``cutoff`` (at ``node``).

    ``level`` is a voltage when ``level_is_volts``, else a fraction of the node's final value
    (of its value just after the step when it decays towards 0).
    """

    kind: str
    node: str | None = None
    level: float | None = None
    level_is_volts: bool = False

    def evaluate(self, net: Netlist, values: dict[str, np.ndarray], batch: int,
                 level_scale: np.ndarray | None = None) -> np.ndarray:
        """The quantity (s or Hz) for each network of the batch."""
        out = np.empty(batch)
        for start in range(0, batch, BATCH):
            part = {k: v[start:start + BATCH] for k, v in values.items()}
            n = min(BATCH, batch - start)
            scale = None if level_scale is None else level_scale[start:start + BATCH]
            out[start:start + n] = self._evaluate(net, part, n, scale)
        return out

    def _evaluate(self, net, values, batch, level_scale):
        tau = network.dominant_tau(net, values, batch)
        if self.kind == "tau":
            return tau
        if self.kind == "cutoff":
            return corner_frequency(net, values, batch, self.node, tau)
        resp = network.step_response(net, values, batch)
        v0, v_final = resp.initial(self.node), resp.final(self.node)
        if self.level_is_volts:
            level = np.full(batch, self.level)
        else:
            level = network.fractional_level(self.level, v0, v_final)
        if level_scale is not None:
            level = level * level_scale
        horizon = HORIZON_TAUS * np.where(tau > 0, tau, 1.0)
        return network.crossing_time(resp, self.node, level, horizon)


def corner_frequency(net: Netlist, values: dict[str, np.ndarray], batch: int, node: str, tau: np.ndarray) -> np.ndarray:
    """−3 dB frequency (Hz) of the node's response to the sources, relative to its DC value.

    Found by bisection on log frequency between 1e-4 and 1e4 times 1/(2π·tau_dominant); NaN where the
    response never falls to 1/√2 of its DC value there.
    """
    st = network.structure(net)
    g_mat, c_mat, r, h = network.matrices(st, values, batch)
    row = st.row_of[node]
    offset = st.offset[node]

    def gain(omega):
        system = g_mat + 1j * omega[:, None, None] * c_mat
        rhs = r - 1j * omega[:, None] * h
        x = np.linalg.solve(system, rhs[..., None])[..., 0]
        return np.abs((x[:, row] if row is not None else 0.0) + offset)

    base = 1.0 / np.where(tau > 0, tau, 1.0)
    dc = gain(base * 1e-9)
    lo, hi = np.log(base * 1e-4), np.log(base * 1e4)
    target = dc / math.sqrt(2)
    valid = gain(np.exp(hi)) < target
    for _ in range(42):
        mid = (lo + hi) / 2
        below = gain(np.exp(mid)) > target
        lo = np.where(below, mid, lo)
        hi = np.where(below, hi, mid)
    return np.where(valid, np.exp((lo + hi) / 2) / (2 * math.pi), np.nan)


@dataclass(frozen=True)
class Varied:
    """An element whose value is searched, with its candidate set."""

    name: str
    combos: Combos


@dataclass(frozen=True)
class NetShortlist:
    """Results: for each varied element the candidate index; quantity and error; best first."""

    varied: tuple[Varied, ...]
    index: np.ndarray  # (N, len(varied))
    value: np.ndarray  # (N,)
    error: np.ndarray  # (N,)

    def values_of(self, rows: np.ndarray | None = None) -> dict[str, np.ndarray]:
        rows = np.arange(len(self.value)) if rows is None else rows
        return {v.name: v.combos.value[self.index[rows, k]] for k, v in enumerate(self.varied)}

    @property
    def parts(self) -> np.ndarray:
        return sum(v.combos.parts[self.index[:, k]] for k, v in enumerate(self.varied))


def _rank(index, value, target_value, varied, top):
    error = value / target_value - 1.0
    ok = np.isfinite(error)
    index, value, error = index[ok], value[ok], error[ok]
    parts = sum(v.combos.parts[index[:, k]] for k, v in enumerate(varied))
    keys = [v.combos.value[index[:, k]] for k, v in reversed(list(enumerate(varied)))]
    order = np.lexsort((*keys, parts, np.round(np.abs(error), ERROR_DECIMALS)))
    # distinct effective values only
    seen, keep = set(), []
    for i in order:
        key = tuple(index[i])
        if key not in seen:
            seen.add(key)
            keep.append(i)
        if len(keep) == top:
            break
    keep = np.array(keep, dtype=np.intp)
    return index[keep], value[keep], error[keep]


def search(net: Netlist, varied: list[Varied], quantity: Quantity, target_value: float, top: int) -> NetShortlist:
    """The ``top`` best combinations of the varied elements' candidates for ``target_value`` (s or Hz)."""
    sizes = [len(v.combos) for v in varied]
    if quantity.kind == "tau":
        inner = int(np.argmax(sizes))
        others = [k for k in range(len(varied)) if k != inner]
        if others:
            outer = np.array(list(itertools.product(*[range(sizes[k]) for k in others])), dtype=np.intp)
        else:
            outer = np.zeros((1, 0), dtype=np.intp)  # one varied element: a single bisection
        if len(outer) > ENUMERATION_CAP:
            raise BadValue(f"{len(outer):,} combinations of the other varied elements is too many; narrow their ranges",
                           option="--vary")
        m = len(outer)
        inner_values = varied[inner].combos.value

        def values_for(rows, inner_idx):
            vals = {varied[k].name: varied[k].combos.value[outer[rows, j]] for j, k in enumerate(others)}
            vals[varied[inner].name] = inner_values[inner_idx]
            return vals

        lo = np.zeros(m, dtype=np.intp)
        hi = np.full(m, sizes[inner], dtype=np.intp)
        rows = np.arange(m)
        while np.any(lo < hi):  # first inner index whose tau reaches the target (tau grows with the value)
            active = lo < hi
            mid = (lo + hi) // 2
            tau = quantity.evaluate(net, values_for(rows[active], mid[active]), int(active.sum()))
            reach = np.zeros(m, dtype=bool)
            reach[active] = tau >= target_value
            hi = np.where(active & reach, mid, hi)
            lo = np.where(active & ~reach, mid + 1, lo)
        offsets = np.arange(-top, top)
        inner_idx = lo[:, None] + offsets[None, :]
        valid = (inner_idx >= 0) & (inner_idx < sizes[inner])
        rows_flat = np.broadcast_to(rows[:, None], inner_idx.shape)[valid]
        inner_flat = inner_idx[valid]
        value = quantity.evaluate(net, values_for(rows_flat, inner_flat), len(rows_flat))
        index = np.zeros((len(rows_flat), len(varied)), dtype=np.intp)
        index[:, inner] = inner_flat
        for j, k in enumerate(others):
            index[:, k] = outer[rows_flat, j]
    else:
        total = math.prod(sizes)
        if total > ENUMERATION_CAP:
            raise BadValue(f"a {quantity.kind} target is searched by trying every combination, and "
                           f"{total:,} exceeds {ENUMERATION_CAP:,}: use --r-parts 1/--c-parts 1 or narrower ranges",
                           option="--vary")
        index = np.array(list(itertools.product(*[range(s) for s in sizes])), dtype=np.intp).reshape(-1, len(varied))
        values = {v.name: v.combos.value[index[:, k]] for k, v in enumerate(varied)}
        value = quantity.evaluate(net, values, len(index))
    index, value, error = _rank(index, value, target_value, varied, top)
    if len(value) == 0 or abs(error[0]) > REACH_LIMIT:
        closest = f" (closest is {error[0]:+.0%})" if len(value) else ""
        raise Unreachable(f"no allowed combination comes within {REACH_LIMIT:.0%} of the target{closest}; "
                          f"widen the ranges of the varied elements")
    return NetShortlist(tuple(varied), index, value, error)


# --- spread ---------------------------------------------------------------------

@dataclass(frozen=True)
class NetPart:
    """One physical part of the network for the spread: which element, its nominal value and model."""

    element: str
    value: float
    model: PartModel


def _element_values(parts_by_element: dict[str, list[NetPart]], wiring: dict[str, int], kinds: dict[str, str],
                    factors: dict[int, np.ndarray], flat: list[NetPart]) -> dict[str, np.ndarray]:
    out = {}
    index = {id(p): i for i, p in enumerate(flat)}
    for name, parts in parts_by_element.items():
        vals = [p.value * factors[index[id(p)]] for p in parts]
        if len(vals) == 1:
            out[name] = vals[0]
        else:
            rule = series_value if wiring[name] == SERIES else parallel_value
            out[name] = rule(vals[0], vals[1], kinds[name])
    return out


def temperatures(temp_c: tuple[float, float], points: int = 21) -> np.ndarray:
    """Temperatures checked for a network (°C): evenly over the range, plus 25 °C when inside."""
    grid = np.linspace(temp_c[0], temp_c[1], points if temp_c[1] > temp_c[0] else 1)
    if temp_c[0] < ROOM_C < temp_c[1]:
        grid = np.unique(np.append(grid, ROOM_C))
    return grid


def _factor_bounds(model: PartModel, x: np.ndarray, upper: bool) -> np.ndarray:
    tol = model.tolerance[1 if upper else 0]
    age = model.aging[1 if upper else 0]
    slope = np.where(x < 0, model.drift.cold[0 if upper else 1], model.drift.hot[1 if upper else 0])
    return (1 + tol) * (1 + age) * (1 - model.loss) * np.maximum(1 + slope * x, 1e-6)


def spread_of(net: Netlist, parts_by_element: dict[str, list[NetPart]], wiring: dict[str, int], quantity: Quantity,
              temp_c, samples: int, seed: int, dist: str, window: tuple[float, float] | None,
              corner_limit: int = 8):
    """Worst case (band corners over a temperature grid) and Monte Carlo of one network design.

    Returns dict with worst_min, worst_max, p_low, p_median, p_high, sigma, yield (target's unit).
    """
    from rcpick.spread import P_HIGH, P_LOW, band_draws

    flat = [p for parts in parts_by_element.values() for p in parts]
    kinds = {name: ("resistance" if name[0].upper() == "R" else "capacitance") for name in parts_by_element}
    temps = temperatures(temp_c)
    x = temps - ROOM_C
    # Worst case: every corner of the parts' bands (all at once when there are many), at every checked temperature.
    if len(flat) <= corner_limit:
        corners = np.array(list(itertools.product([False, True], repeat=len(flat))))
    else:
        corners = np.array([[False] * len(flat), [True] * len(flat)])
    batch = len(corners) * len(x)
    factors = {}
    for i, part in enumerate(flat):
        up = _factor_bounds(part.model, x, True)
        down = _factor_bounds(part.model, x, False)
        factors[i] = np.where(corners[:, i][:, None], up[None, :], down[None, :]).ravel()
    corner_values = quantity.evaluate(net, _element_values(parts_by_element, wiring, kinds, factors, flat), batch)
    worst_min, worst_max = float(np.nanmin(corner_values)), float(np.nanmax(corner_values))
    # Monte Carlo: every part drawn within its bands, each unit at the Monte Carlo temperatures.
    from rcpick.spread import temperature_grid

    mc_temps = temperature_grid(temp_c)
    mx = mc_temps - ROOM_C
    rng = np.random.default_rng(seed)
    z = {kind: band_draws(rng, (len(flat), samples), dist) for kind in ("tol", "cold", "hot", "age")}
    factors = {}
    for i, part in enumerate(flat):
        m = part.model
        mid = lambda band: (band[0] + band[1]) / 2  # noqa: E731
        half = lambda band: (band[1] - band[0]) / 2  # noqa: E731
        tol = mid(m.tolerance) + half(m.tolerance) * z["tol"][i]
        age = mid(m.aging) + half(m.aging) * z["age"][i]
        zc = z["cold"][i]
        zh = zc if m.drift.shared else z["hot"][i]
        s_cold = mid(m.drift.cold) + half(m.drift.cold) * zc
        s_hot = mid(m.drift.hot) + half(m.drift.hot) * zh
        slope = np.where(mx[None, :] < 0, s_cold[:, None], s_hot[:, None])
        factors[i] = ((1 + tol) * (1 + age) * (1 - m.loss))[:, None] * np.maximum(1 + slope * mx[None, :], 1e-6)
        factors[i] = factors[i].ravel()
    values = quantity.evaluate(net, _element_values(parts_by_element, wiring, kinds, factors, flat), samples * len(mx))
    values = values.reshape(samples, len(mx))
    lows, highs = np.nanmin(values, axis=1), np.nanmax(values, axis=1)
    ref = values[:, int(np.argmin(np.abs(mx)))]
    result = {
        "worst_min": min(worst_min, float(np.nanmin(lows))),
        "worst_max": max(worst_max, float(np.nanmax(highs))),
        "p_low": float(np.quantile(lows, P_LOW)),
        "p_median": float(np.median(ref)),
        "p_high": float(np.quantile(highs, P_HIGH)),
        "sigma": float(np.std(ref, ddof=1)),
        "yield": None,
    }
    if window is not None:
        result["yield"] = float(np.mean((lows >= window[0]) & (highs <= window[1])))
    return result


def design_parts(net: Netlist, shortlist: NetShortlist, row: int, model_for) -> tuple[dict, dict]:
    """Physical parts of result ``row``: every R and C of the netlist, varied ones as their candidate's parts."""
    varied = {v.name.upper(): (v, int(shortlist.index[row, k])) for k, v in enumerate(shortlist.varied)}
    parts: dict[str, list[NetPart]] = {}
    wiring: dict[str, int] = {}
    for e in net.elements:
        if e.letter not in "RC":
            continue
        if e.name.upper() in varied:
            v, i = varied[e.name.upper()]
            parts[e.name] = [NetPart(e.name, value, model_for(e, value)) for value in v.combos.parts_of(i)]
            wiring[e.name] = int(v.combos.wiring[i])
        else:
            parts[e.name] = [NetPart(e.name, e.value, model_for(e, e.value))]
            wiring[e.name] = SINGLE
    return parts, wiring

