"""Spread of searched candidates, and ranking by yield, spread or error.

Joins the search (``Shortlist`` of R and C candidates) to the spread engine:
builds one :class:`~rcpick.spread.Study` for many candidates, runs the worst
case and the Monte Carlo, and orders the candidates.
"""

from __future__ import annotations

from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from rcpick import spread
from rcpick.combos import Combos
from rcpick.models import PartModel
from rcpick.search import ERROR_DECIMALS, Shortlist
from rcpick.target import Target

RANKINGS = ("yield", "error", "spread")
#: Yields closer than this count as equal when ranking (0.1 %).
YIELD_DECIMALS = 3


@dataclass(frozen=True)
class Conditions:
    """How parts vary and where the design must work."""

    r_model: PartModel
    c_model: PartModel
    temp_c: tuple[float, float]
    window: tuple[float, float]  # relative to the target, e.g. (-0.1, 0.1)
    threshold_band: tuple[float, float] = (0.0, 0.0)
    dist: str = "uniform"
    samples: int = 20000
    seed: int | None = 1
    r_models: dict[float, PartModel] | None = None  # per part value (stocked parts); others use r_model
    c_models: dict[float, PartModel] | None = None


@dataclass(frozen=True)
class Assessed:
    """Candidates with their spread, in rank order (arrays of shape (N,), target's unit)."""

    shortlist: Shortlist
    worst_min: np.ndarray
    worst_max: np.ndarray
    p_low: np.ndarray
    p_median: np.ndarray
    p_high: np.ndarray
    sigma: np.ndarray
    yield_: np.ndarray
    window: tuple[float, float]  # absolute, target's unit
    analysed: int  # candidates given a Monte Carlo run
    r_models: list  # per candidate: the PartModel of each R part
    c_models: list


def _position(combos: Combos, index: np.ndarray, model: PartModel, by_value: dict[float, PartModel] | None) -> spread.Position:
    parts = [combos.parts_of(int(i)) for i in index]
    if by_value:
        models = [[by_value.get(v, model) for v in values] + [model] * (2 - len(values)) for values in parts]
        return spread.Position.of(combos.kind, parts, combos.wiring[index], models)
    return spread.Position.of(combos.kind, parts, combos.wiring[index], model)


def study(shortlist: Shortlist, target: Target, cond: Conditions) -> spread.Study:
    """The spread study of every candidate in ``shortlist``."""
    threshold = None
    if target.kind == "delay":
        threshold = spread.Threshold(target.threshold, target.falling, cond.threshold_band)
        threshold.check()
    return spread.Study(_position(shortlist.r, shortlist.r_index, cond.r_model, cond.r_models),
                        _position(shortlist.c, shortlist.c_index, cond.c_model, cond.c_models), cond.temp_c, target,
                        threshold)


def window_of(target: Target, window: tuple[float, float]) -> tuple[float, float]:
    """Absolute acceptance window (target's unit) from a relative one."""
    return target.value * (1 + window[0]), target.value * (1 + window[1])


def _take(shortlist: Shortlist, order: np.ndarray) -> Shortlist:
    return Shortlist(shortlist.r, shortlist.c, shortlist.r_index[order], shortlist.c_index[order])


def assess(shortlist: Shortlist, target: Target, cond: Conditions, rank: str, top: int,
           progress: Callable[[int], None] | None = None) -> Assessed:
    """Spread of the candidates, ranked, cut to ``top``.

    ``rank`` is ``error`` (the shortlist's own order, already by |error|),
    ``spread`` (narrowest worst-case span first; Monte Carlo only for the
    ``top`` kept) or ``yield`` (Monte Carlo for every candidate, highest yield
    to 0.1 % first). Ties: fewer parts, then smaller |error|, then lower R, C.
    """
    window = window_of(target, cond.window)
    abs_err = np.round(np.abs(target.error(shortlist.tau_s)), ERROR_DECIMALS)
    if rank == "error":
        shortlist = _take(shortlist, np.arange(min(top, len(shortlist))))
    elif rank == "spread":
        lo, hi = spread.worst_case(study(shortlist, target, cond))
        order = np.lexsort((shortlist.c_farad, shortlist.r_ohm, abs_err, shortlist.parts,
                            np.round((hi - lo) / target.value, 9)))
        shortlist = _take(shortlist, order[:top])
    elif rank != "yield":
        raise ValueError(f"rank must be one of {RANKINGS}")
    the_study = study(shortlist, target, cond)
    lo, hi = spread.worst_case(the_study)
    mc = spread.monte_carlo(the_study, cond.samples, cond.seed, cond.dist, window=window, progress=progress)
    order = np.arange(len(shortlist))
    if rank == "yield":
        abs_err = np.round(np.abs(target.error(shortlist.tau_s)), ERROR_DECIMALS)
        order = np.lexsort((shortlist.c_farad, shortlist.r_ohm, abs_err, shortlist.parts,
                            -np.round(mc.yield_, YIELD_DECIMALS)))[:top]
    return Assessed(_take(shortlist, order), lo[order], hi[order], mc.p_low[order], mc.p_median[order],
                    mc.p_high[order], mc.sigma[order], mc.yield_[order], window, len(the_study.r),
                    [the_study.r.models[i] for i in order], [the_study.c.models[i] for i in order])


def evaluations(count: int, cond: Conditions) -> int:
    """Unit-evaluations a Monte Carlo of ``count`` candidates will make (for progress bars)."""
    return count * cond.samples * len(spread.temperature_grid(cond.temp_c))

