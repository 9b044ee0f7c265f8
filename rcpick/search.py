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


#: Most candidates given a Monte Carlo run when ranking by yield or spread (docs/model.md).
POOL_CAP = 60


def subset(combos: Combos, mask: np.ndarray) -> tuple[Combos, np.ndarray]:
    """The candidates where ``mask`` holds, and their indices in ``combos``."""
    index = np.flatnonzero(mask)
    sub = Combos(combos.kind, combos.value[index], combos.wiring[index], combos.part_a[index], combos.part_b[index])
    return sub, index


def count_in_window(r: Combos, c: Combos, tau_low: float, tau_high: float) -> int:
    """Exact number of (R, C) pairs with tau_low <= R·C <= tau_high (s)."""
    outer, inner = (c, r) if len(r) > len(c) else (r, c)
    lo = np.searchsorted(inner.value, tau_low / outer.value * (1 - 1e-12), side="left")
    hi = np.searchsorted(inner.value, tau_high / outer.value * (1 + 1e-12), side="right")
    return int(np.sum(hi - lo))


@dataclass(frozen=True)
class Pool:
    """Candidates whose nominal value lies inside the window, chosen for analysis."""

    shortlist: Shortlist
    in_window: int  # how many allowed combinations lie inside the window in all
    capped: bool


def window_pool(r: Combos, c: Combos, target: Target, window: tuple[float, float], cap: int = POOL_CAP) -> Pool:
    """Every candidate whose nominal value is inside the window, or ``cap`` of them.

    When more than ``cap`` lie inside, the cap is shared equally between part
    counts (2, 3 and 4 parts), each share taking its smallest-|error|
    candidates (unused share passes on), so single-part designs are never
    crowded out by pairs.

    Parameters
    ----------
    window : (low, high)
        Relative acceptance window around the target, e.g. (-0.1, 0.1).
    """
    tau_low, tau_high = sorted(target.tau_for_error(e) for e in window)
    total = count_in_window(r, c, tau_low, tau_high)
    groups: dict[int, list[tuple[np.ndarray, np.ndarray]]] = {2: [], 3: [], 4: []}
    for r_single in (True, False):
        for c_single in (True, False):
            r_sub, r_index = subset(r, (r.parts == 1) == r_single)
            c_sub, c_index = subset(c, (c.parts == 1) == c_single)
            if len(r_sub) == 0 or len(c_sub) == 0:
                continue
            try:
                found = best(r_sub, c_sub, target, top=min(cap, total) or 1)
            except Unreachable:
                continue
            tau = found.tau_s
            inside = (tau >= tau_low * (1 - 1e-12)) & (tau <= tau_high * (1 + 1e-12))
            parts = 2 + (not r_single) + (not c_single)
            groups[parts].append((r_index[found.r_index[inside]], c_index[found.c_index[inside]]))
    merged = {}
    for parts, found in groups.items():
        ri = np.concatenate([f[0] for f in found]) if found else np.empty(0, dtype=np.intp)
        ci = np.concatenate([f[1] for f in found]) if found else np.empty(0, dtype=np.intp)
        order = rank_order(np.abs(target.error(r.value[ri] * c.value[ci])), r.parts[ri] + c.parts[ci], r.value[ri], c.value[ci])
        merged[parts] = (ri[order], ci[order])
    chosen = _share(merged, cap)
    ri = np.concatenate([chosen[p][0] for p in sorted(chosen)]).astype(np.intp)
    ci = np.concatenate([chosen[p][1] for p in sorted(chosen)]).astype(np.intp)
    return Pool(Shortlist(r, c, ri, ci), total, total > len(ri))


def _share(groups: dict[int, tuple[np.ndarray, np.ndarray]], cap: int) -> dict[int, tuple[np.ndarray, np.ndarray]]:
    """Take up to ``cap`` items over the groups, an equal share each, unused share passing on."""
    take = {p: 0 for p in groups}
    left = cap
    open_groups = [p for p in groups if len(groups[p][0])]
    while left > 0 and open_groups:
        share = max(1, left // len(open_groups))
        for p in list(open_groups):
            extra = min(share, len(groups[p][0]) - take[p], left)
            take[p] += extra
            left -= extra
            if take[p] == len(groups[p][0]):
                open_groups.remove(p)
            if left == 0:
                break
    return {p: (groups[p][0][: take[p]], groups[p][1][: take[p]]) for p in groups}
