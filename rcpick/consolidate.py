"""The joint choice of one design per timing: fewest new line items, then fewest parts, then the largest
smallest margin (docs/board.md).

Input: for each timing, its *options* (the designs of its pool that meet its requirement), each with the
line items it uses (integer ids), its parts on the board and its margin; and the set of line items already on
the board. The choice is an integer program solved by HiGHS through :func:`scipy.optimize.milp`, in stages,
each keeping the optimum of those before it (lexicographic optimisation):

* ``x[t, d]``: timing ``t`` takes option ``d``; ``Σ_d x[t, d] = 1`` for each timing;
* binary ``y[l]``: line item ``l`` is on the board; ``Σ_{d ∋ l} x[t, d] ≤ y[l]`` for each timing and item
  (``x`` need not be integral: see :class:`_Program`);
* stage 1: minimise ``Σ y[l]`` over the items not already on the board;
* stage 2: with that count held, minimise ``Σ parts[t, d] · x[t, d]``;
* stage 3: with both held, the largest smallest margin, by rounds: leave out every option whose margin is at
  or below the current choice's smallest margin and look for any choice that still holds both optima; each
  one found raises the smallest margin, and when none is left the last one found has the largest;
* last, ties: each timing takes its earliest-ranked option that changes none of the three objectives
  (:func:`_prefer_ranked`, a local rule: ties are broken, not optimised).

Each solver call has a time limit; a stage stopped by it keeps the best choice found and the result says it
is not proven. Nothing here reads files or prints. The brute-force enumeration in tests/test_board.py checks
the optimum.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

#: Margins are compared to this many decimals (0.01 % of the target): closer ones tie.
MARGIN_DECIMALS = 4


@dataclass(frozen=True)
class Option:
    """One design a timing may take, as the solver sees it."""

    items: frozenset[int]  # line-item ids the design uses
    parts: int  # parts it puts on the board (its parts × the timing's count)
    margin: float  # relative distance of its spread from its window's nearer end (rounded)
    order: int  # its place in the timing's own ranking (0 = that timing's rank 1)


@dataclass(frozen=True)
class Choice:
    """The chosen option of each timing and what it scores."""

    picks: tuple[int, ...]  # index into each timing's options
    new_items: int
    parts: int
    smallest_margin: float
    order_sum: int
    stages: tuple[str, ...]  # what each stage found
    proven: bool = True  # every stage's optimum was proven (no time limit reached)


def score(options: list[list[Option]], picks: tuple[int, ...], free: frozenset[int]) -> tuple[int, int, float, int]:
    """(new line items, parts, −smallest margin, order sum) of a choice: smaller is better, compared in order
    (the order sum only breaks ties; it is not optimised)."""
    chosen = [options[t][d] for t, d in enumerate(picks)]
    items = set().union(*(o.items for o in chosen)) if chosen else set()
    margin = min((o.margin for o in chosen), default=0.0)
    return (len(items - free), sum(o.parts for o in chosen), -margin, sum(o.order for o in chosen))


def greedy(options: list[list[Option]]) -> tuple[int, ...]:
    """Each timing's own first choice (its rank 1 among the options), ignoring the others."""
    return tuple(min(range(len(opts)), key=lambda d: opts[d].order) for opts in options)


def solve(options: list[list[Option]], free: frozenset[int] = frozenset(), *, time_limit: float = 60.0) -> Choice:
    """The optimal choice (module docstring). Every timing must have at least one option.

    ``time_limit`` (s) bounds each solver call; when one stops there, the best choice found is returned with
    ``proven`` False.
    """
    if any(not opts for opts in options):
        raise ValueError("every timing needs at least one option")
    if not options:
        return Choice((), 0, 0, 0.0, 0, ())
    kept = [undominated(opts, free) for opts in options]
    inner, messages, proven = _stages([[opts[d] for d in keep] for opts, keep in zip(options, kept)], free, time_limit)
    picks = _prefer_ranked(options, tuple(keep[d] for keep, d in zip(kept, inner)), free)
    s = score(options, picks, free)
    return Choice(picks, s[0], s[1], -s[2], s[3], tuple(messages), proven)


def undominated(opts: list[Option], free: frozenset[int] = frozenset()) -> list[int]:
    """Indices of the options no other option of the same timing dominates.

    ``a`` dominates ``b`` when it needs no new line item that ``b`` does not, has no more parts and no smaller
    margin (and, of two equal ones, comes first in the ranking): swapping ``b`` for ``a`` in any choice
    worsens no objective, so the optimum is found among the undominated options alone.
    """
    keep = []
    for i, b in enumerate(opts):
        b_new = b.items - free
        dominated = False
        for j, a in enumerate(opts):
            if j == i or not ((a.items - free) <= b_new and a.parts <= b.parts and a.margin >= b.margin):
                continue
            same = (a.items - free) == b_new and a.parts == b.parts and a.margin == b.margin
            if not same or a.order < b.order:
                dominated = True
                break
        if not dominated:
            keep.append(i)
    return keep


def _stages(options: list[list[Option]], free: frozenset[int], time_limit: float):
    """The three stages (module docstring): the picks, each stage's report, whether every stage was proven."""
    program = _Program(options, free, time_limit)
    found = program.minimise(program.cost(items=1.0), [])
    if found.y is None:
        raise RuntimeError(f"the solver found no choice: {found.message}")
    messages = [f"line items: {found.message}"]
    proven = found.proven
    best_items = found.value
    found = program.minimise(program.cost(parts=1.0), [(program.cost(items=1.0), best_items + 0.5)])
    messages.append(f"parts: {found.message}")
    proven &= found.proven
    best_parts = found.value
    if found.y is None:
        raise RuntimeError(f"the solver found no choice: {found.message}")
    picks = program.picks(found.y, lambda o: (o.parts, -o.margin, o.order))
    # stage 3: raise the smallest margin while both optima hold. Leave out every option at or below the
    # current smallest margin and ask for any choice that still meets both; each one found raises it, and
    # when none is left the last one found has the largest.
    rounds = 0
    while True:
        floor = min(options[t][d].margin for t, d in enumerate(picks))
        kept = [[d for d, o in enumerate(opts) if o.margin > floor] for opts in options]
        if any(not keep for keep in kept):
            break
        narrowed = _Program([[opts[d] for d in keep] for opts, keep in zip(options, kept)], free, time_limit)
        held = [(narrowed.cost(items=1.0), best_items + 0.5), (narrowed.cost(parts=1.0), best_parts + 0.5)]
        found = narrowed.minimise(narrowed.cost(), held)
        rounds += 1
        if found.infeasible:
            break
        proven &= found.proven
        if found.y is None:  # stopped by the time limit without a choice
            break
        inner = narrowed.picks(found.y, lambda o: (o.parts, -o.margin, o.order))
        picks = tuple(keep[d] for keep, d in zip(kept, inner))
    messages.append(f"margin: {rounds} round(s) of raising the smallest margin")
    return picks, messages, proven


@dataclass(frozen=True)
class _Found:
    value: float
    y: np.ndarray | None  # the items on the board (0/1), None when no choice was found
    message: str
    proven: bool
    infeasible: bool = False


class _Program:
    """The integer program over one set of options.

    Columns: ``x`` (one per option, continuous in [0, 1]) and ``y`` (one per new line item, binary). Rows:
    ``Σ_d x[t, d] = 1`` per timing; ``Σ_{d ∋ l} x[t, d] − y[l] ≤ 0`` per timing and item. Only ``y`` need be
    integral: with the items on the board fixed, every option whose items are all there is open to its timing,
    and the best of them is a vertex, so the optimum over fractional ``x`` is that of whole choices; the
    choice is read back as each timing's best open option (:meth:`picks`).
    """

    def __init__(self, options: list[list[Option]], free: frozenset[int], time_limit: float):
        from scipy.sparse import coo_matrix

        self.options, self.free, self.time_limit = options, free, time_limit
        self.starts = np.cumsum([0] + [len(o) for o in options])
        n_x = int(self.starts[-1])
        self.items = sorted(set().union(*(o.items for opts in options for o in opts)) - free)
        item_col = {item: n_x + k for k, item in enumerate(self.items)}
        self.n_x, self.n = n_x, n_x + len(self.items)
        self.parts = np.array([o.parts for opts in options for o in opts], dtype=float)
        rows: list[int] = []
        cols: list[int] = []
        vals: list[float] = []
        hi: list[float] = []
        lo: list[float] = []
        for t, opts in enumerate(options):
            first = int(self.starts[t])
            r = len(hi)
            for d in range(len(opts)):
                rows.append(r)
                cols.append(first + d)
                vals.append(1.0)
            lo.append(1.0)
            hi.append(1.0)
            uses: dict[int, list[int]] = {}
            for d, o in enumerate(opts):
                for item in o.items:
                    if item in item_col:
                        uses.setdefault(item, []).append(first + d)
            for item, users in uses.items():
                r = len(hi)
                for col in users:
                    rows.append(r)
                    cols.append(col)
                    vals.append(1.0)
                rows.append(r)
                cols.append(item_col[item])
                vals.append(-1.0)
                lo.append(-np.inf)
                hi.append(0.0)
        self.matrix = coo_matrix((vals, (rows, cols)), shape=(len(hi), self.n)).tocsr()
        self.lo, self.hi = np.array(lo), np.array(hi)

    def cost(self, items: float = 0.0, parts: float = 0.0) -> np.ndarray:
        c = np.zeros(self.n)
        c[self.n_x :] = items
        c[: self.n_x] = parts * self.parts
        return c

    def minimise(self, c: np.ndarray, held: list[tuple[np.ndarray, float]]) -> _Found:
        """Minimise ``c · (x, y)`` with each ``held`` row ``h · (x, y) ≤ bound`` added."""
        from scipy.optimize import Bounds, LinearConstraint, milp
        from scipy.sparse import csr_matrix, vstack

        matrix, lo, hi = self.matrix, self.lo, self.hi
        if held:
            matrix = vstack([matrix, csr_matrix(np.array([h[0] for h in held]))]).tocsr()
            lo = np.concatenate([lo, np.full(len(held), -np.inf)])
            hi = np.concatenate([hi, np.array([h[1] for h in held])])
        integrality = np.zeros(self.n)
        integrality[self.n_x :] = 1
        found = milp(
            c,
            constraints=LinearConstraint(matrix, lo, hi),
            integrality=integrality,
            bounds=Bounds(np.zeros(self.n), np.ones(self.n)),
            # HiGHS's presolve (scipy 1.17) has called a feasible stage of this program infeasible
            # (tests/test_board.py::test_solver_regression_presolve); without it the answers hold
            options={"time_limit": self.time_limit, "presolve": False},
        )
        if found.status == 2:
            return _Found(np.inf, None, str(found.message), True, infeasible=True)
        if found.x is None or found.status not in (0, 1):  # 1: stopped at the time limit with a choice in hand
            return _Found(np.inf, None, str(found.message), False)
        y = np.round(found.x[self.n_x :])
        return _Found(float(c @ found.x), y, str(found.message), found.status == 0)

    def picks(self, y: np.ndarray, key) -> tuple[int, ...]:
        """Each timing's option, read from the items on the board: the best by ``key`` of those it can build."""
        on = {item for item, flag in zip(self.items, y) if flag > 0.5} | set(self.free)
        out = []
        for opts in self.options:
            open_ = [d for d, o in enumerate(opts) if o.items <= on]
            if not open_:
                raise RuntimeError("the solver's choice leaves a timing without a design; please report this")
            out.append(min(open_, key=lambda d: key(opts[d])))
        return tuple(out)


def _prefer_ranked(options: list[list[Option]], picks: tuple[int, ...], free: frozenset[int]) -> tuple[int, ...]:
    """Among equally good choices, each timing's earlier-ranked option: one timing at a time, an option that
    leaves the first three objectives as they are and comes earlier in that timing's ranking replaces the
    chosen one, until none does."""
    best = score(options, picks, free)[:3]
    current = list(picks)
    changed = True
    while changed:
        changed = False
        for t, opts in enumerate(options):
            for d in sorted(range(len(opts)), key=lambda d: opts[d].order):
                if opts[d].order >= opts[current[t]].order:
                    break
                trial = current.copy()
                trial[t] = d
                if score(options, tuple(trial), free)[:3] == best:
                    current = trial
                    changed = True
                    break
    return tuple(current)


def round_margin(value: float) -> float:
    """A margin as the solver compares it (to :data:`MARGIN_DECIMALS` decimals; −∞ stays −10)."""
    if not np.isfinite(value):
        return -10.0
    return round(float(value), MARGIN_DECIMALS)
