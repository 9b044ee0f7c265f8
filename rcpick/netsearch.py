"""Searching standard values for chosen elements of a network, and the spread of each result.

The quantity of a network is its dominant (longest) natural time constant,
the delay until a node crosses a threshold after the step, or the node's
−3 dB corner frequency. All are evaluated on stacks of networks at once
(``rcpick.nodal`` works on batches).

Exactness: the dominant time constant grows with every R and every C
(Courant–Fischer; see ``rcpick.nodal``), so for each combination of the
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

from rcpick import nodal
from rcpick.combos import Combos
from rcpick.errors import BadValue, Unreachable
from rcpick.netlist import Netlist
from rcpick.search import ERROR_DECIMALS, REACH_LIMIT

ENUMERATION_CAP = 300_000
#: Bytes the stacked nodal matrices of one slice of networks may take (about a dozen n × n arrays each).
MATRIX_BUDGET = 128 * 2**20


def batch_size(net: Netlist) -> int:
    """Networks solved at once: up to BATCH, fewer for a large network so memory stays within MATRIX_BUDGET."""
    unknowns = max(1, len(net.nodes))
    return int(max(1, min(BATCH, MATRIX_BUDGET // (12 * 8 * unknowns * unknowns))))


BATCH = 20_000
HORIZON_TAUS = 30.0


@dataclass(frozen=True)
class Quantity:
    """What is measured on the network: ``tau``, ``delay`` (at ``node`` to ``level``) or ``cutoff`` (at ``node``).

    ``level`` is a voltage when ``level_is_volts``, else a fraction of the way from the node's lower to its
    higher end value (v(0+) and the final value): :func:`rcpick.nodal.fractional_level`.
    """

    kind: str
    node: str | None = None
    level: float | None = None
    level_is_volts: bool = False

    def evaluate(
        self, net: Netlist, values: dict[str, np.ndarray], batch: int, level_scale: np.ndarray | None = None
    ) -> np.ndarray:
        """The quantity (s or Hz) for each network of the batch, solved in slices that fit MATRIX_BUDGET."""
        out = np.empty(batch)
        step = batch_size(net)
        for start in range(0, batch, step):
            part = {k: v[start : start + step] for k, v in values.items()}
            n = min(step, batch - start)
            scale = None if level_scale is None else level_scale[start : start + step]
            out[start : start + n] = self._evaluate(net, part, n, scale)
        return out

    def _evaluate(self, net, values, batch, level_scale):
        tau = nodal.dominant_tau(net, values, batch)
        if self.kind == "tau":
            return tau
        assert self.node is not None  # a delay or a corner is timed at a node
        if self.kind == "cutoff":
            return corner_frequency(net, values, batch, self.node, tau)
        resp = nodal.step_response(net, values, batch)
        v0, v_final = resp.initial(self.node), resp.final(self.node)
        if self.level_is_volts:
            level = np.full(batch, self.level)
        else:
            level = nodal.fractional_level(self.level, v0, v_final)
        if level_scale is not None:
            level = level * level_scale
        horizon = HORIZON_TAUS * np.where(tau > 0, tau, 1.0)
        t = nodal.crossing_time(resp, self.node, level, horizon)
        return np.where(np.isnan(t), np.inf, t)  # never reached: an infinitely long delay


def corner_frequency(net: Netlist, values: dict[str, np.ndarray], batch: int, node: str, tau: np.ndarray) -> np.ndarray:
    """−3 dB frequency (Hz) of the node's response to the sources, relative to its DC value.

    Found by bisection on log frequency between 1e-4 and 1e4 times 1/(2π·tau_dominant); NaN where the
    response never falls to 1/√2 of its DC value there.
    """
    st = nodal.structure(net)
    g_mat, c_mat, r, h = nodal.matrices(st, values, batch)
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
    rows = np.array(keep, dtype=np.intp)
    return index[rows], value[rows], error[rows]


def check_enumeration(varied: list[Varied], quantity: Quantity) -> None:
    """Refuse a delay or corner search that would try more than ``ENUMERATION_CAP`` combinations."""
    if quantity.kind == "tau":
        return
    total = math.prod(len(v.combos) for v in varied)
    if total > ENUMERATION_CAP:
        raise BadValue(
            f"a {quantity.kind} target is searched by trying every combination, and "
            f"{total:,} exceeds {ENUMERATION_CAP:,}: use {{r_parts}} 1/{{c_parts}} 1 or narrower ranges",
            setting="vary",
        )


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
            raise BadValue(
                f"{len(outer):,} combinations of the other varied elements is too many; narrow their ranges",
                setting="vary",
            )
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
        check_enumeration(varied, quantity)
        index = np.array(list(itertools.product(*[range(s) for s in sizes])), dtype=np.intp).reshape(-1, len(varied))
        values = {v.name: v.combos.value[index[:, k]] for k, v in enumerate(varied)}
        value = quantity.evaluate(net, values, len(index))
    index, value, error = _rank(index, value, target_value, varied, top)
    if len(value) == 0 or abs(error[0]) > REACH_LIMIT:
        closest = f" (closest is {error[0]:+.0%})" if len(value) else ""
        raise Unreachable(
            f"no allowed combination comes within {REACH_LIMIT:.0%} of the target{closest}; "
            f"widen the ranges of the varied elements"
        )
    return NetShortlist(tuple(varied), index, value, error)
