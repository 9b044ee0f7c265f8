"""Candidate values for one position (R or C): single parts, series pairs, parallel pairs.

A :class:`Combos` is a few parallel numpy arrays sorted by effective value,
so the search can bisect it. Pairs are unordered (part_a <= part_b) and may
repeat a value (10K ∥ 10K). Each effective value appears once, as the
arrangement with the fewest parts.

References
----------
OpenStax, *College Physics 2e*, eqs. 19.63 (capacitors in series,
1/Cs = Σ 1/Ci) and 21.20 (resistors in parallel, 1/Rp = Σ 1/Ri).
"""

from __future__ import annotations

import functools
from dataclasses import dataclass

import numpy as np

from rcpick.series import RANGE_SLACK

SINGLE, SERIES, PARALLEL = 0, 1, 2
ARRANGEMENTS = ("single", "series", "parallel")
KINDS = ("resistance", "capacitance")

#: Significant figures to which two effective values count as the same.
SAME_VALUE_DIGITS = 12


def distinct(values) -> np.ndarray:
    """The distinct values of a 1-D array, sorted (as ``np.unique``, which in numpy 2 imports numpy.ma, about
    10 ms of start-up)."""
    found = np.sort(np.asarray(values).ravel())
    if len(found) < 2:
        return found
    keep = np.empty(len(found), dtype=bool)
    keep[0] = True
    np.not_equal(found[1:], found[:-1], out=keep[1:])
    return found[keep]


def series_value(a: np.ndarray, b: np.ndarray, kind: str) -> np.ndarray:
    """Value of two parts wired in series (resistors add; capacitors a·b/(a+b))."""
    return a + b if kind == "resistance" else a * b / (a + b)


def parallel_value(a: np.ndarray, b: np.ndarray, kind: str) -> np.ndarray:
    """Value of two parts wired in parallel (capacitors add; resistors a·b/(a+b))."""
    return a * b / (a + b) if kind == "resistance" else a + b


@dataclass(frozen=True)
class Combos:
    """Candidate values of one position, ascending by ``value``.

    Attributes
    ----------
    kind : str
        ``resistance`` (ohm) or ``capacitance`` (farad).
    value : ndarray
        Effective value of each candidate, SI units, ascending.
    wiring : ndarray of int8
        SINGLE, SERIES or PARALLEL.
    table : ndarray
        The distinct part values the candidates are made of (SI), ascending.
    first, second : ndarray of int16 or int32
        Each candidate's parts as indices into ``table``; ``second`` is −1 for a single part. (Indices keep a
        wide space small: 13 bytes a candidate, where two float part values would take 25.)
    """

    kind: str
    value: np.ndarray
    wiring: np.ndarray
    table: np.ndarray
    first: np.ndarray
    second: np.ndarray

    def __len__(self) -> int:
        return len(self.value)

    @functools.cached_property
    def parts(self) -> np.ndarray:
        """Number of physical parts of each candidate (1 or 2), computed once."""
        return np.where(self.wiring == SINGLE, 1, 2).astype(np.int8)

    @property
    def part_a(self) -> np.ndarray:
        """The first (smaller) part value of each candidate, SI."""
        return self.table[self.first]

    @property
    def part_b(self) -> np.ndarray:
        """The second part value of each candidate, SI; NaN for a single part."""
        return np.where(self.second >= 0, self.table[np.maximum(self.second, 0)], np.nan)

    def parts_of(self, i: int) -> list[float]:
        """The part values of candidate ``i`` (SI)."""
        a = float(self.table[self.first[i]])
        return [a] if self.wiring[i] == SINGLE else [a, float(self.table[self.second[i]])]

    @classmethod
    def of(cls, kind: str, value, wiring, part_a, part_b) -> Combos:
        """Candidates given by their part values (``part_b`` NaN for a single part), in the order given."""
        a = np.asarray(part_a, dtype=float)
        b = np.asarray(part_b, dtype=float)
        table = distinct(np.concatenate([a, b[~np.isnan(b)]]))
        first = np.searchsorted(table, a).astype(np.int32)
        second = np.where(np.isnan(b), -1, np.searchsorted(table, np.nan_to_num(b))).astype(np.int32)
        return cls(kind, np.asarray(value, dtype=float), np.asarray(wiring, dtype=np.int8), table, first, second)


def _same_value_key(values: np.ndarray) -> np.ndarray:
    """Values rounded to SAME_VALUE_DIGITS significant figures, for de-duplication."""
    exponent = np.floor(np.log10(values))
    scale = 10.0 ** (SAME_VALUE_DIGITS - 1 - exponent)
    return np.round(values * scale) / scale


#: Candidates handled at once in the steps of :func:`build` that need temporary arrays.
BUILD_BLOCK = 1 << 20


def build(parts: np.ndarray, kind: str, max_parts: int, low: float, high: float) -> Combos:
    """All candidates from ``parts`` (SI values, each already inside [low, high]).

    Parameters
    ----------
    parts : ndarray
        Available part values (SI).
    kind : str
        ``resistance`` or ``capacitance``; decides which wiring adds.
    max_parts : int
        1 (single parts only) or 2 (also series and parallel pairs).
    low, high : float
        The position's range; pairs whose effective value leaves it are dropped.

    Memory stays near the result's own size: the pairs are counted, then written row by row into arrays of
    that size; the duplicates are found in blocks.
    """
    table = distinct(np.asarray(parts, dtype=float))
    n = len(table)
    itype = np.int16 if n < 2**15 else np.int32
    lo, hi = low * (1 - RANGE_SLACK), high * (1 + RANGE_SLACK)
    rules = ((SERIES, series_value), (PARALLEL, parallel_value)) if max_parts >= 2 else ()

    def row(rule, i: int) -> tuple[np.ndarray, np.ndarray]:
        combined = rule(table[i], table[i:], kind)
        inside = np.flatnonzero((combined >= lo) & (combined <= hi))
        return combined[inside], inside

    counts = [[len(row(rule, i)[1]) for i in range(n)] for _, rule in rules]
    total = n + sum(sum(c) for c in counts)
    value = np.empty(total)
    wiring = np.empty(total, dtype=np.int8)
    first = np.empty(total, dtype=itype)
    second = np.empty(total, dtype=itype)
    # singles first, then series, then parallel, each by ascending first and second part: the order of preference
    value[:n], wiring[:n], first[:n], second[:n] = table, SINGLE, np.arange(n), -1
    at = n
    for (code, rule), rule_counts in zip(rules, counts):
        for i in range(n):
            if not rule_counts[i]:
                continue
            combined, inside = row(rule, i)
            end = at + len(inside)
            value[at:end], wiring[at:end], first[at:end], second[at:end] = combined, code, i, inside + i
            at = end
    # Equal values (to SAME_VALUE_DIGITS figures) keep their first, most preferred, arrangement: a stable sort
    # by the rounded value keeps the order of preference within a run of equal values.
    key = np.empty(total)
    for b0 in range(0, total, BUILD_BLOCK):
        key[b0 : b0 + BUILD_BLOCK] = _same_value_key(value[b0 : b0 + BUILD_BLOCK])
    order = np.argsort(key, kind="stable")
    keep = np.empty(total, dtype=bool)
    for b0 in range(0, total, BUILD_BLOCK):
        b1 = min(total, b0 + BUILD_BLOCK)
        here = key[order[b0:b1]]
        before = key[order[b0 - 1]] if b0 else np.nan
        keep[b0:b1] = here != np.concatenate([[before], here[:-1]])
    del key
    order = order[keep]
    del keep
    return Combos(kind, value[order], wiring[order], table, first[order], second[order])


def fixed(value: float, kind: str) -> Combos:
    """A position held at exactly one value (standard or not)."""
    return Combos.of(kind, [value], [SINGLE], [value], [np.nan])


def contributor_move(combos: Combos) -> np.ndarray:
    """How far the smaller contributor of each pair moves the effective value (relative); inf for a single part.

    Adding parts (series R, parallel C): b/a for a ≥ b. Harmonic parts (parallel R, series C): the
    larger value contributes less, and removing it leaves the smaller one, a move of a/(a + b) for a ≤ b.
    """
    a = np.fmin(combos.part_a, combos.part_b)
    b = np.fmax(combos.part_a, combos.part_b)
    adds = (combos.wiring == SERIES) == (combos.kind == "resistance")
    with np.errstate(invalid="ignore", divide="ignore"):
        move = np.where(adds, a / b, a / (a + b))
    return np.where(combos.wiring == SINGLE, np.inf, move)


def subset(combos: Combos, mask: np.ndarray) -> tuple[Combos, np.ndarray]:
    """The candidates where ``mask`` holds, and their indices in ``combos``."""
    index = np.flatnonzero(mask)
    sub = Combos(
        combos.kind, combos.value[index], combos.wiring[index], combos.table, combos.first[index], combos.second[index]
    )
    return sub, index
