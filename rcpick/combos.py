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

from dataclasses import dataclass

import numpy as np

from rcpick.series import RANGE_SLACK

SINGLE, SERIES, PARALLEL = 0, 1, 2
ARRANGEMENTS = ("single", "series", "parallel")
KINDS = ("resistance", "capacitance")

#: Significant figures to which two effective values count as the same.
SAME_VALUE_DIGITS = 12


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
    part_a, part_b : ndarray
        The part values (SI); ``part_b`` is NaN for a single part.
    """

    kind: str
    value: np.ndarray
    wiring: np.ndarray
    part_a: np.ndarray
    part_b: np.ndarray

    def __len__(self) -> int:
        return len(self.value)

    @property
    def parts(self) -> np.ndarray:
        """Number of physical parts of each candidate (1 or 2)."""
        return np.where(self.wiring == SINGLE, 1, 2)

    def parts_of(self, i: int) -> list[float]:
        """The part values of candidate ``i`` (SI)."""
        return [float(self.part_a[i])] if self.wiring[i] == SINGLE else [float(self.part_a[i]), float(self.part_b[i])]


def _same_value_key(values: np.ndarray) -> np.ndarray:
    """Values rounded to SAME_VALUE_DIGITS significant figures, for de-duplication."""
    exponent = np.floor(np.log10(values))
    scale = 10.0 ** (SAME_VALUE_DIGITS - 1 - exponent)
    return np.round(values * scale) / scale


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
    """
    parts = np.unique(np.asarray(parts, dtype=float))
    values = [parts]
    wiring = [np.full(len(parts), SINGLE, dtype=np.int8)]
    first = [parts]
    second = [np.full(len(parts), np.nan)]
    if max_parts >= 2 and len(parts):
        ia, ib = np.triu_indices(len(parts))
        a, b = parts[ia], parts[ib]
        for code, combined in ((SERIES, series_value(a, b, kind)), (PARALLEL, parallel_value(a, b, kind))):
            inside = (combined >= low * (1 - RANGE_SLACK)) & (combined <= high * (1 + RANGE_SLACK))
            values.append(combined[inside])
            wiring.append(np.full(int(inside.sum()), code, dtype=np.int8))
            first.append(a[inside])
            second.append(b[inside])
    value = np.concatenate(values)
    wire = np.concatenate(wiring)
    part_a = np.concatenate(first)
    part_b = np.concatenate(second)
    # The pieces were concatenated singles first, then series, then parallel,
    # each in ascending first part; a stable sort by value keeps that order
    # within a run of equal values, so the first of each run is the one to keep.
    key = _same_value_key(value)
    order = np.argsort(key, kind="stable")
    key = key[order]
    keep = np.ones(len(order), dtype=bool)
    keep[1:] = key[1:] != key[:-1]
    order = order[keep]
    return Combos(kind, value[order], wire[order], part_a[order], part_b[order])


def fixed(value: float, kind: str) -> Combos:
    """A position held at exactly one value (standard or not)."""
    return Combos(kind, np.array([value]), np.array([SINGLE], dtype=np.int8), np.array([value]), np.array([np.nan]))


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
    sub = Combos(combos.kind, combos.value[index], combos.wiring[index], combos.part_a[index], combos.part_b[index])
    return sub, index
