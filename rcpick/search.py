"""Exact search for the R·C combinations that best meet a target.

Why the answer is exact: for a fixed value on one side (say a capacitor C),
the target's quantity is monotone in R, so its error is monotone on each side
of the ideal partner. The N best partners of C are among the N nearest values
below and the N nearest above the ideal — found by one ``searchsorted`` into
the other side, which is sorted. The global N best are among the union of
every value's N best partners. Nothing is sampled and nothing is pruned by a
heuristic.

With a leakage current at the node the quantity depends on R and C
separately; for a fixed R it is still proportional to C, so the search
iterates over the resistances and bisects the capacitances (docs/search.md).

Ranking key (smallest first): |error| rounded to 1e-12, total part count,
effective R, effective C.
"""

from __future__ import annotations

import math
from dataclasses import dataclass

import numpy as np

from rcpick.combos import Combos, subset
from rcpick.errors import Unreachable
from rcpick.target import Target

#: Largest relative error a result may have before the target counts as unreachable.
REACH_LIMIT = 0.5
#: Decimal places of |error| that count in the ranking (ties beyond are broken by parts, R, C).
ERROR_DECIMALS = 12
#: Most candidates given a Monte Carlo run when ranking by yield, spread or cost (docs/model.md).
POOL_CAP = 60


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


def _abs_error(target: Target, r_ohm, c_farad) -> np.ndarray:
    err = np.abs(target.error(target.quantity(r_ohm, c_farad)))
    return np.where(np.isnan(err), np.inf, err)


def _keep_best(ri, ci, r: Combos, c: Combos, target: Target, top: int):
    """The ``top`` best of the given (ri, ci) pairs, in rank order."""
    abs_err = np.round(_abs_error(target, r.value[ri], c.value[ci]), ERROR_DECIMALS)
    if len(abs_err) > top:
        # Cheap cut before the full sort: nothing worse than the top-th error can rank.
        cut = np.partition(abs_err, top - 1)[top - 1]
        near = abs_err <= cut
        ri, ci, abs_err = ri[near], ci[near], abs_err[near]
    order = rank_order(abs_err, r.parts[ri] + c.parts[ci], r.value[ri], c.value[ci])[:top]
    return ri[order], ci[order]


def _outer_is_r(r: Combos, c: Combos, target: Target) -> bool:
    return bool(target.leak_a) or len(r) <= len(c)


def best(r: Combos, c: Combos, target: Target, top: int = 10, chunk: int = 4096) -> Shortlist:
    """The ``top`` best distinct (R, C) combinations for ``target``, best first.

    Parameters
    ----------
    r, c : Combos
        Candidate resistances (ohm) and capacitances (farad), each sorted.
    target : Target
        What to hit; gives the ideal partner of every value.
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
    outer_is_r = _outer_is_r(r, c, target)
    outer, inner = (r, c) if outer_is_r else (c, r)
    offsets = np.arange(-top, top)
    best_ri = np.empty(0, dtype=np.intp)
    best_ci = np.empty(0, dtype=np.intp)
    for start in range(0, len(outer), chunk):
        o_idx = np.arange(start, min(start + chunk, len(outer)))
        ideal = target.partner(outer.value[o_idx], target.value, outer_is_r)
        reach = np.isfinite(ideal)
        o_idx, ideal = o_idx[reach], ideal[reach]
        # a corner frequency falls as tau grows: the inner values still sort the quantity monotonically
        pos = np.searchsorted(inner.value, ideal)
        i_idx = pos[:, None] + offsets[None, :]
        valid = (i_idx >= 0) & (i_idx < len(inner))
        o_flat = np.broadcast_to(o_idx[:, None], i_idx.shape)[valid]
        i_flat = i_idx[valid]
        ri, ci = (o_flat, i_flat) if outer_is_r else (i_flat, o_flat)
        best_ri, best_ci = _keep_best(np.concatenate([best_ri, ri]), np.concatenate([best_ci, ci]), r, c, target, top)
    shortlist = Shortlist(r, c, best_ri, best_ci)
    if len(shortlist) == 0:
        raise Unreachable("no allowed combination reaches the target at all; widen {r_min}/{r_max} or {c_min}/{c_max}")
    first = target.error(target.quantity(shortlist.r_ohm[:1], shortlist.c_farad[:1]))[0]
    if not abs(first) <= REACH_LIMIT:
        raise Unreachable(
            f"no allowed combination comes within {REACH_LIMIT:.0%} of the target "
            f"(closest is {first:+.0%}); widen {{r_min}}/{{r_max}} or {{c_min}}/{{c_max}}"
        )
    return shortlist


def _inner_bounds(target: Target, outer: np.ndarray, q_low: float, q_high: float, outer_is_r: bool):
    """Inner values whose quantity with each outer value lies in [q_low, q_high] (an inner interval)."""
    with np.errstate(divide="ignore", invalid="ignore"):
        a = target.partner(outer, q_low, outer_is_r) if np.isfinite(q_low) and q_low > 0 else np.zeros(len(outer))
        b = target.partner(outer, q_high, outer_is_r) if np.isfinite(q_high) else np.full(len(outer), np.inf)
    if target.kind == "cutoff":  # a higher corner needs a smaller partner
        a = np.where(np.isfinite(q_low) & (q_low > 0), a, np.inf)
        b = np.where(np.isfinite(q_high), b, 0.0)
        a, b = b, a
    return np.nan_to_num(a, nan=np.inf), np.nan_to_num(b, nan=-np.inf)


def count_in_window(r: Combos, c: Combos, target: Target, q_low: float, q_high: float) -> int:
    """Exact number of (R, C) pairs whose quantity lies in [q_low, q_high] (target's unit)."""
    outer_is_r = _outer_is_r(r, c, target)
    outer, inner = (r, c) if outer_is_r else (c, r)
    lo_v, hi_v = _inner_bounds(target, outer.value, q_low, q_high, outer_is_r)
    lo = np.searchsorted(inner.value, lo_v * (1 - 1e-12), side="left")
    hi = np.searchsorted(inner.value, hi_v * (1 + 1e-12), side="right")
    return int(np.sum(np.maximum(hi - lo, 0)))


@dataclass(frozen=True)
class Pool:
    """Candidates whose nominal value is inside the window, chosen for analysis."""

    shortlist: Shortlist
    in_window: int  # how many allowed combinations lie inside the window in all
    capped: bool


def window_pool(
    r: Combos, c: Combos, target: Target, window: tuple[float, float], cap: int = POOL_CAP, near: float | None = None
) -> Pool:
    """Every candidate whose nominal value is inside the window, or ``cap`` of them.

    When more than ``cap`` lie inside, the cap is shared equally between part
    counts (2, 3 and 4 parts), each share taking its smallest-|error|
    candidates (unused share passes on), so single-part designs are never
    crowded out by pairs.

    Parameters
    ----------
    window : (low, high)
        Relative acceptance window around the target, e.g. (-0.1, 0.1); an end may be infinite.
    near : float, optional
        Relative value (like the window's ends) the candidates are searched nearest to; by default the target
        when it lies in the window, else the window's middle.
    """
    q_low, q_high = target.value * (1 + window[0]), target.value * (1 + window[1])
    total = count_in_window(r, c, target, q_low, q_high)
    # the candidates nearest the window are searched for around it: the target itself when it lies inside,
    # else (a window aimed off the target, for a limit) the window's middle
    around = target
    if near is not None or not q_low <= target.value <= q_high:
        from dataclasses import replace

        point = target.value * (1 + near) if near is not None else math.sqrt(q_low * q_high)
        around = replace(target, value=point)
    groups: dict[int, list[tuple[np.ndarray, np.ndarray]]] = {2: [], 3: [], 4: []}
    for r_single in (True, False):
        for c_single in (True, False):
            r_sub, r_index = subset(r, (r.parts == 1) == r_single)
            c_sub, c_index = subset(c, (c.parts == 1) == c_single)
            if len(r_sub) == 0 or len(c_sub) == 0 or total == 0:
                continue
            try:
                found = best(r_sub, c_sub, around, top=min(cap, total))
            except Unreachable:
                continue
            q = target.quantity(found.r_ohm, found.c_farad)
            inside = (q >= q_low * (1 - 1e-12)) & (q <= q_high * (1 + 1e-12))
            parts = 2 + (not r_single) + (not c_single)
            groups[parts].append((r_index[found.r_index[inside]], c_index[found.c_index[inside]]))
    merged = {}
    for parts, found_list in groups.items():
        ri = np.concatenate([f[0] for f in found_list]) if found_list else np.empty(0, dtype=np.intp)
        ci = np.concatenate([f[1] for f in found_list]) if found_list else np.empty(0, dtype=np.intp)
        order = rank_order(
            _abs_error(target, r.value[ri], c.value[ci]), r.parts[ri] + c.parts[ci], r.value[ri], c.value[ci]
        )
        merged[parts] = (ri[order], ci[order])
    chosen = share_cap(merged, cap)
    ri = np.concatenate([chosen[p][0] for p in sorted(chosen)]).astype(np.intp)
    ci = np.concatenate([chosen[p][1] for p in sorted(chosen)]).astype(np.intp)
    return Pool(Shortlist(r, c, ri, ci), total, total > len(ri))


def share_cap(groups: dict, cap: int) -> dict:
    """Take up to ``cap`` items over the groups (each a tuple of equal-length arrays, best first), an equal
    share each, an unused share passing on to the others."""
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
    return {p: tuple(a[: take[p]] for a in groups[p]) for p in groups}
