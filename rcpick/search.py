"""Exact search for the R·C combinations that best meet a target.

Why the answer is exact: for a fixed value on one side (say a capacitor C),
the error of R·C against the target is monotone in R on each side of the
ideal value tau/C. So the N best partners of C are among the N nearest
values below and the N nearest above the ideal — found by one
``searchsorted`` into the other side, which is sorted. The global N best are
among the union of every value's N best partners. Nothing is sampled and
nothing is pruned by a heuristic.

Ranking key (smallest first): |error| rounded to 1e-12, total part count,
effective R, effective C.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from rcpick.combos import Combos
from rcpick.errors import Unreachable
from rcpick.target import Target

#: Largest relative error a result may have before the target counts as unreachable.
REACH_LIMIT = 0.5
#: Decimal places of |error| that count in the ranking (ties beyond are broken by parts, R, C).
ERROR_DECIMALS = 12


@dataclass(frozen=True)
class Shortlist:
    """The chosen combinations, best first.

    Attributes
    ----------
    r, c : Combos
        The searched candidate sets.
    r_index, c_index : ndarray of int
        Index of each result's R and C in ``r`` and ``c``.
    """

    r: Combos
    c: Combos
    r_index: np.ndarray
    c_index: np.ndarray

    def __len__(self) -> int:
        return len(self.r_index)

    @property
    def r_ohm(self) -> np.ndarray:
        return self.r.value[self.r_index]

    @property
    def c_farad(self) -> np.ndarray:
        return self.c.value[self.c_index]

    @property
    def tau_s(self) -> np.ndarray:
        return self.r_ohm * self.c_farad

    @property
    def parts(self) -> np.ndarray:
        return self.r.parts[self.r_index] + self.c.parts[self.c_index]


def rank_order(abs_error: np.ndarray, parts: np.ndarray, r_ohm: np.ndarray, c_farad: np.ndarray) -> np.ndarray:
    """Indices that sort candidates by the ranking key (see module docstring)."""
    return np.lexsort((c_farad, r_ohm, parts, np.round(abs_error, ERROR_DECIMALS)))


def _keep_best(ri, ci, r: Combos, c: Combos, target: Target, top: int):
    """The ``top`` best of the given (ri, ci) pairs, in rank order."""
    tau = r.value[ri] * c.value[ci]
    abs_err = np.abs(target.error(tau))
    if len(abs_err) > top:
        # Cheap cut before the full sort: nothing worse than the top-th error can rank.
        cut = np.partition(np.round(abs_err, ERROR_DECIMALS), top - 1)[top - 1]
        near = np.round(abs_err, ERROR_DECIMALS) <= cut
        ri, ci, abs_err = ri[near], ci[near], abs_err[near]
    order = rank_order(abs_err, r.parts[ri] + c.parts[ci], r.value[ri], c.value[ci])[:top]
    return ri[order], ci[order]


def best(r: Combos, c: Combos, target: Target, top: int = 10, chunk: int = 4096) -> Shortlist:
    """The ``top`` best distinct (R, C) combinations for ``target``, best first.

    Parameters
    ----------
    r, c : Combos
        Candidate resistances (ohm) and capacitances (farad), each sorted.
    target : Target
        What to hit; its ``tau_s`` gives the ideal partner of every value.
    top : int
        How many results (>= 1).
    chunk : int
        Outer values handled at once; bounds memory at about chunk × 2·top.

    Raises
    ------
    Unreachable
        When even the best combination misses the target by more than 50 %.
    """
    if top < 1:
        raise ValueError("top must be at least 1")
    swap = len(r) > len(c)
    outer, inner = (c, r) if swap else (r, c)
    offsets = np.arange(-top, top)
    best_ri = np.empty(0, dtype=np.intp)
    best_ci = np.empty(0, dtype=np.intp)
    for start in range(0, len(outer), chunk):
        o_idx = np.arange(start, min(start + chunk, len(outer)))
        ideal = target.tau_s / outer.value[o_idx]
        pos = np.searchsorted(inner.value, ideal)
        i_idx = pos[:, None] + offsets[None, :]
        valid = (i_idx >= 0) & (i_idx < len(inner))
        o_flat = np.broadcast_to(o_idx[:, None], i_idx.shape)[valid]
        i_flat = i_idx[valid]
        ri, ci = (i_flat, o_flat) if swap else (o_flat, i_flat)
        best_ri, best_ci = _keep_best(
            np.concatenate([best_ri, ri]), np.concatenate([best_ci, ci]), r, c, target, top)
    shortlist = Shortlist(r, c, best_ri, best_ci)
    if len(shortlist) == 0:
        raise Unreachable("no candidates to search (empty range)")
    worst_needed = float(np.abs(target.error(shortlist.tau_s[:1]))[0])
    if worst_needed > REACH_LIMIT:
        raise Unreachable(
            f"no allowed combination comes within {REACH_LIMIT:.0%} of the target "
            f"(closest is {target.error(shortlist.tau_s[:1])[0]:+.0%}); widen --r-min/--r-max or --c-min/--c-max")
    return shortlist
