"""A whole board at once: one design per timing, chosen jointly so the timings share line items.

For each timing a *pool* of designs is analysed once (worst case and Monte Carlo, as ``find`` does), from
three sources (docs/board.md):

* ``find``: the designs ``find`` itself would analyse for that timing (``--pool`` of them, an equal share per
  part count, smallest |error| first), in ``find``'s ranking order;
* ``shared``: up to ``--pool`` designs made only of values that another timing's ``find`` designs, or the
  board's ``have`` parts, use (the same rule within those values);
* ``have``: every design of the two above with a value the board already has, again with that part's own
  model (a design may take the 1 % part already on the board instead of a new 5 % one).

A design is an *option* when it meets its timing's requirement: yield at or above ``min-yield``, or with
``require = "worst-case"`` a worst case wholly inside its window or limit; a design over a derated part
rating is never one. :mod:`rcpick.consolidate` then picks one option per timing: fewest new line items,
then fewest parts, then the largest smallest margin, then each timing's own ranking. The choice is optimal
within the pools. A timing without an option is reported with its closest design and left out of the choice.

Netlist timings (``net``/``vary``) take ``find --net``'s pool only; their fixed parts are line items too.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field, replace
from pathlib import Path
from typing import Any

import numpy as np

from rcpick import assess, combos, search
from rcpick import stress as stresses
from rcpick.boardfile import Board, HavePart, Timing
from rcpick.consolidate import Choice, Option, greedy, round_margin, score, solve
from rcpick.errors import NotReached, RcpickError, Unreachable
from rcpick.results import Candidate, Part, target_dict
from rcpick.specs import Parts, Plan

#: Version of the board JSON document (docs/json.md).
BOARD_SCHEMA = 1
#: Sources of a pool's designs, in the order the solver's tie-break ranks them.
SOURCES = ("find", "shared", "have")


# --- line items -------------------------------------------------------------------------


@dataclass(frozen=True)
class BoardPart:
    """A part as the bill of materials sees it: the part, and the ratings its timing asks of it (W, V)."""

    part: Part
    power_w: float | None = None  # resistors: the power rating asked for (r-power), else None
    voltage_v: float | None = None  # the voltage rating asked for (r-voltage, c-voltage, a stock line's)

    @property
    def rkm(self) -> str:
        return self.part.rkm

    @property
    def kind(self) -> str:
        return self.part.kind


def item_key(item: BoardPart | Part) -> tuple:
    """What makes two parts the same line item: kind, value, tolerance, TCR, technology, dielectric, part number,
    and the ratings asked of them (a 10 W bleeder resistor is not the 0.1 W part of the same value)."""
    bp = item if isinstance(item, BoardPart) else BoardPart(item)
    part = bp.part
    tol = tuple(round(float(t), 9) for t in part.tolerance)
    tcr = tuple(round(float(t), 3) for t in part.tcr_ppm_per_c) if part.tcr_ppm_per_c else None
    return (
        part.kind,
        float(f"{part.value:.6g}"),
        tol,
        tcr,
        part.technology,
        part.dielectric,
        part.part_number or "",
        bp.power_w,
        bp.voltage_v,
    )


def model_text(item: BoardPart | Part) -> str:
    """A part's model in a few words: ``±5 % thick-film ±100 ppm/°C``, ``X7R ±10 % 50 V``, with its part number."""
    bp = item if isinstance(item, BoardPart) else BoardPart(item)
    part = bp.part
    low, high = part.tolerance
    tol = f"±{high * 100:g} %" if abs(low + high) < 1e-12 else f"{low * 100:+g}/{high * 100:+g} %"
    if part.kind == "resistance":
        text = f"{tol} {part.technology or 'resistor'}"
        if part.tcr_ppm_per_c:
            a, b = part.tcr_ppm_per_c
            text += f" ±{b:g} ppm/°C" if abs(a + b) < 1e-9 else f" {a:+g}…{b:+g} ppm/°C"
    else:
        text = f"{part.dielectric or 'capacitor'} {tol}"
    if bp.power_w is not None:
        text += f" {bp.power_w:g} W"
    if bp.voltage_v is not None:
        text += f" {bp.voltage_v:g} V"
    if part.part_number:
        text += f" ({part.part_number})"
    return text


def design_parts(candidate: Candidate) -> list[Part]:
    """Every part a candidate design is built from."""
    positions = list(candidate.elements.values()) if candidate.elements else [candidate.r, candidate.c]
    return [p for pos in positions if pos is not None for p in pos.parts]


def rated(parts: list[Part], spec) -> list[BoardPart]:
    """The parts with the ratings their timing asks of them (given settings only; a stock line's voltage)."""
    out = []
    for p in parts:
        if p.kind == "resistance":
            out.append(BoardPart(p, spec.r_power, spec.r_voltage))
        else:
            out.append(BoardPart(p, None, spec.c_voltage if spec.c_voltage is not None else p.voltage_v))
    return out


# --- one timing's pool ---------------------------------------------------------------------


@dataclass
class PoolDesign:
    """One analysed design of a timing's pool."""

    candidate: Candidate
    source: str
    parts: list[BoardPart]  # every part the design puts on the board (a netlist's fixed parts included)
    meets: bool
    margin: float  # relative to the target; −∞ when the node never reaches the level
    why_not: str | None = None


@dataclass
class Pool:
    """A timing's pool, its window and what was said about it."""

    timing: Timing
    target: Any
    window: tuple[float, float]  # absolute, target's unit
    designs: list[PoolDesign] = field(default_factory=list, repr=False)
    warnings: list[str] = field(default_factory=list)
    unreachable: str | None = None  # why nothing could be searched (no design's nominal inside the window)
    sizes: dict[str, int] = field(default_factory=dict)


def _with_have(parts: Parts, have: list[HavePart], fixed: bool) -> Parts:
    """A position's candidates with the board's values of its kind added (within its range), unless it is fixed."""
    if fixed or not have:
        return parts
    low, high = parts.span
    extra = [h.part.value for h in have if low * (1 - 1e-9) <= h.part.value <= high * (1 + 1e-9)]
    if not extra:
        return parts
    found = parts.combos
    singles = found.value[found.parts == 1]
    values = combos.distinct(np.concatenate([singles, np.array(extra)]))
    max_parts = int(found.parts.max()) if len(found) else 1
    return replace(parts, combos=combos.build(values, found.kind, max_parts, low, high))


def _have_parts(parts: Parts, have: list[HavePart]) -> Parts:
    """A position whose board values carry the model (and stock line) of the part already on the board; of two
    board parts with one value, the tighter tolerance."""
    by_value = dict(parts.by_value)
    lines = dict(parts.lines)
    ranked = sorted(have, key=lambda h: h.part.tolerance[1] - h.part.tolerance[0], reverse=True)
    for h in ranked:  # the tightest last, so it wins
        by_value[float(h.part.value)] = h.model
        if h.line is not None:
            lines[float(h.part.value)] = h.line
        else:
            lines.pop(float(h.part.value), None)
    return replace(parts, by_value=by_value, lines=lines)


def _margin(candidate: Candidate, window: tuple[float, float], target_value: float, require: str) -> float:
    sp = candidate.spread
    low, high = (sp.worst_min, sp.worst_max) if require == "worst-case" else (sp.p_low, sp.p_high)
    if low is None or high is None:
        return -math.inf
    sides = []
    if math.isfinite(window[0]):
        sides.append(low - window[0])
    if math.isfinite(window[1]):
        sides.append(window[1] - high)
    return min(sides) / target_value if sides else 0.0


def _judge(candidate: Candidate, window, target, require: str, min_yield: float) -> tuple[bool, float, str | None]:
    margin = _margin(candidate, window, target.value, require)
    stress = candidate.stress
    if stress is not None and not stress.get("within_ratings", True):
        detail = "; ".join(assess.stress_flags(stress)) or "over a derated part rating"
        return False, margin, f"over a derated part rating: {detail}"
    if require == "worst-case":
        sp = candidate.spread
        if sp.worst_min is None or sp.worst_max is None:
            return False, margin, "some units never reach the level"
        inside = sp.worst_min >= window[0] * (1 - 1e-12) and sp.worst_max <= window[1] * (1 + 1e-12)
        return inside, margin, None if inside else "its worst case leaves the window"
    y = candidate.spread.yield_ or 0.0
    ok = y >= min_yield
    return ok, margin, None if ok else f"yield {y * 100:.1f} % is below {min_yield * 100:g} %"


def _first_pool(timing: Timing, plan: Plan, have: list[HavePart], cap: int):
    """The ``find`` designs of a plain timing: (r candidates, c candidates, target, conditions, shortlist)."""
    from rcpick.api import aimed_pool, pool_window_of

    spec = timing.spec
    r = _with_have(plan.r, [h for h in have if h.letter == "R"], spec.fix_r is not None)
    c = _with_have(plan.c, [h for h in have if h.letter == "C"], spec.fix_c is not None)
    plan = replace(plan, r=r, c=c)
    target, cond = plan.target, plan.conditions
    assert target is not None  # a timing has a target
    r_use, _ = assess.useful(plan.r)
    c_use, _ = assess.useful(plan.c)
    pool = search.window_pool(r_use, c_use, target, pool_window_of(target, cond.window), cap=cap)
    if target.limit is not None and len(pool.shortlist):
        pool = aimed_pool(pool, r_use, c_use, target, plan, cond)
    if not len(pool.shortlist):
        from rcpick.api import _window_text

        raise Unreachable(
            f"no allowed combination has its nominal value inside the window {_window_text(target, cond.window)} "
            f"within R {plan.r.description} and C {plan.c.description}; widen {{window}} or allow more "
            "values: the ranges ({r_min}…{r_max}, {c_min}…{c_max}), the series or the part counts"
        )
    return plan, r_use, c_use, pool.shortlist


def _shared_shortlist(
    r_use: combos.Combos, c_use: combos.Combos, target, window, values: dict[str, set[float]], cap: int
) -> search.Shortlist | None:
    """Up to ``cap`` designs made only of the board's shared values (indices into ``r_use``/``c_use``), as
    :func:`rcpick.search.window_pool` picks them (an equal share per part count, smallest |error| first)."""
    from rcpick.api import pool_window_of

    def keep(found: combos.Combos) -> np.ndarray:
        known = values.get(found.kind, set())
        a = np.array([float(f"{v:.6g}") in known for v in found.part_a], dtype=bool)
        b = np.array([math.isnan(v) or float(f"{v:.6g}") in known for v in found.part_b], dtype=bool)
        return a & b

    r_sub, r_index = combos.subset(r_use, keep(r_use))
    c_sub, c_index = combos.subset(c_use, keep(c_use))
    if not len(r_sub) or not len(c_sub):
        return None
    found = search.window_pool(r_sub, c_sub, target, pool_window_of(target, window), cap=cap).shortlist
    if not len(found):
        return None
    return search.Shortlist(r_use, c_use, r_index[found.r_index], c_index[found.c_index])


def _assess(shortlist: search.Shortlist, plan: Plan, timing: Timing, progress) -> tuple[list[Candidate], tuple]:
    from rcpick.api import _families, _progress, candidates_of
    from rcpick.variation import evaluations

    spec = timing.spec
    cond = plan.conditions
    assert plan.target is not None
    with _progress(progress, evaluations(len(shortlist), cond.samples, cond.temp_c)) as step:
        found = assess.assess(
            shortlist,
            plan.target,
            plan.r,
            plan.c,
            cond,
            spec.rank,
            len(shortlist),
            families=_families(plan),
            min_yield=spec.min_yield,
            ratings=spec.ratings(),
            progress=step,
        )
    return candidates_of(found, plan), found.window


def _key_set(shortlist: search.Shortlist) -> set[tuple[int, int]]:
    return {(int(a), int(b)) for a, b in zip(shortlist.r_index, shortlist.c_index)}


def _take(shortlist: search.Shortlist, rows: list[int]) -> search.Shortlist:
    index = np.array(rows, dtype=np.intp)
    return search.Shortlist(shortlist.r, shortlist.c, shortlist.r_index[index], shortlist.c_index[index])


def _net_pool(timing: Timing, require: str, progress) -> Pool:
    """A netlist timing: ``find --net``'s pool, with the netlist's fixed parts on every design."""
    from rcpick import netfind
    from rcpick.netlist import read
    from rcpick.results import part_of

    spec = timing.spec
    found = netfind.run(spec, progress=progress)
    net = read(spec.net)  # type: ignore[arg-type]
    varied = set(found.network["vary"]) if found.network else set()
    mdl = spec.models(None, spec.r_series)
    fixed = []
    for e in net.elements:
        if e.letter in "RC" and e.name not in varied:
            kind = "resistance" if e.letter == "R" else "capacitance"
            model = netfind.element_model(e, e.value, mdl.r, mdl.c, mdl)
            fixed.append(part_of(kind, e.value, model))
    pool = Pool(timing, found.target, found.window, warnings=list(found.warnings))
    for cand in found.candidates:
        meets, margin, why = _judge(cand, found.window, found.target, require, spec.min_yield)
        pool.designs.append(PoolDesign(cand, "find", rated(design_parts(cand) + fixed, spec), meets, margin, why))
    pool.sizes = {"find": len(found.candidates), "shared": 0, "have": 0, "find_analysed": len(found.candidates)}
    return pool


def _values_of(shortlist: search.Shortlist) -> dict[str, set[float]]:
    out: dict[str, set[float]] = {"resistance": set(), "capacitance": set()}
    for i in range(len(shortlist)):
        for v in shortlist.r.parts_of(int(shortlist.r_index[i])):
            out["resistance"].add(float(f"{v:.6g}"))
        for v in shortlist.c.parts_of(int(shortlist.c_index[i])):
            out["capacitance"].add(float(f"{v:.6g}"))
    return out


def build_pools(board: Board, progress=None) -> list[Pool]:
    """Every timing's pool, each design analysed once. An error about one timing names it."""
    try:
        return _build_pools(board, progress)
    except RcpickError as error:
        timing = getattr(error, "timing", None)
        if timing is not None and error.origin is None:
            error.origin = f"{board.path}: timing {timing!r}"
        raise


def _about(timing: Timing):
    """A context naming ``timing`` on an error raised inside it (with its settings spelled as the file's keys)."""
    import contextlib

    @contextlib.contextmanager
    def named():
        try:
            with timing.spec.naming():
                yield
        except RcpickError as error:
            if not hasattr(error, "timing"):
                error.timing = timing.name  # type: ignore[attr-defined]
            raise

    return named()


def _build_pools(board: Board, progress=None) -> list[Pool]:
    have = list(board.have)
    firsts: dict[int, tuple] = {}
    pools: dict[int, Pool] = {}
    used: dict[int, dict[str, set[float]]] = {}
    for k, timing in enumerate(board.timings):
        spec = timing.spec
        if spec.net is not None:
            continue
        with _about(timing):
            plan = spec.plan()
            try:
                first = _first_pool(timing, plan, have, search.POOL_CAP)
            except (Unreachable, NotReached) as error:
                pools[k] = _unreachable_pool(timing, plan, error, board.require)
                continue
        firsts[k] = first
        used[k] = _values_of(first[3])
    for k, timing in enumerate(board.timings):
        if timing.spec.net is not None:
            with _about(timing):
                try:
                    pools[k] = _net_pool(timing, board.require, progress)
                except (Unreachable, NotReached) as error:
                    pools[k] = Pool(timing, None, (math.nan, math.nan), unreachable=error.text(timing.spec.name_of))
            continue
        if k in pools:
            continue
        # the values the board has, or another timing's find designs use
        shared: dict[str, set[float]] = {"resistance": set(), "capacitance": set()}
        for h in have:
            shared[h.part.kind].add(float(f"{h.part.value:.6g}"))
        for other, values in used.items():
            if other != k:
                for kind in shared:
                    shared[kind] |= values[kind]
        plan, r_use, c_use, first = firsts[k]
        with _about(timing):
            pools[k] = _plain_pool(timing, plan, r_use, c_use, first, shared, have, board, progress)
    return [pools[k] for k in range(len(board.timings))]


def _unreachable_pool(timing: Timing, plan: Plan, error: RcpickError, require: str) -> Pool:
    """A timing no design can be found for: its closest design by nominal error, analysed."""
    target = plan.target
    assert target is not None
    pool = Pool(timing, target, assess.window_of(target, plan.conditions.window), unreachable=None)
    pool.unreachable = error.text(timing.spec.name_of)
    try:
        nearest = search.best(plan.r.combos, plan.c.combos, target, 1)
    except RcpickError:
        return pool
    cands, window = _assess(nearest, plan, timing, None)
    pool.window = window
    for cand in cands:
        margin = _margin(cand, window, target.value, require)
        parts = rated(design_parts(cand), timing.spec)
        pool.designs.append(PoolDesign(cand, "find", parts, False, margin, pool.unreachable))
    return pool


def _plain_pool(timing, plan, r_use, c_use, first, values, have, board: Board, progress) -> Pool:
    """A plain timing's pool: find's best ``pool`` designs (in find's order, and find's first that meets the
    requirement), ``pool`` designs of shared values, and those designs again with the board's own parts."""
    spec = timing.spec
    target = plan.target
    cands, window = _assess(first, plan, timing, progress)
    pool = Pool(timing, target, window, warnings=list(plan.warnings))
    caution = stresses.safety_caution(target)
    if caution:
        pool.warnings.append(caution)
    judged = [_judge(c, window, target, board.require, spec.min_yield) for c in cands]
    offered = list(range(min(board.pool, len(cands))))
    first_meeting = next((i for i, j in enumerate(judged) if j[0]), None)
    if first_meeting is not None and first_meeting not in offered:
        offered.append(first_meeting)  # find's own choice is always offered: it is the per-timing baseline
    entries: list[tuple[Candidate, str]] = [(cands[i], "find") for i in offered]
    # designs of shared values that find's pool does not hold: as many more are asked for as it holds
    seen_keys = _key_set(first)
    shared = _shared_shortlist(r_use, c_use, target, plan.conditions.window, values, board.pool + len(first))
    shared_rows: list[int] = []
    if shared is not None:
        shared_rows = [
            i
            for i, key in enumerate(zip(shared.r_index, shared.c_index))
            if (int(key[0]), int(key[1])) not in seen_keys
        ][: board.pool]
    if shared is not None and shared_rows:
        shared = _take(shared, shared_rows)
        entries += [(cand, "shared") for cand in _assess(shared, plan, timing, progress)[0]]
    pool.sizes = {"find": len(offered), "shared": len(shared_rows), "have": 0, "find_analysed": len(cands)}
    # the offered designs again with the board's own parts where a value is already on the board
    if have:
        r_values = {float(f"{h.part.value:.6g}") for h in have if h.letter == "R"}
        c_values = {float(f"{h.part.value:.6g}") for h in have if h.letter == "C"}
        order = _order_of(first, cands)
        both = _take(first, [order[i] for i in offered])
        if shared is not None and shared_rows:
            both = _merge(both, shared)
        rows = []
        for i in range(len(both)):
            rv = {float(f"{v:.6g}") for v in both.r.parts_of(int(both.r_index[i]))}
            cv = {float(f"{v:.6g}") for v in both.c.parts_of(int(both.c_index[i]))}
            if rv & r_values or cv & c_values:
                rows.append(i)
        if rows:
            have_plan = replace(
                plan,
                r=_have_parts(plan.r, [h for h in have if h.letter == "R"]),
                c=_have_parts(plan.c, [h for h in have if h.letter == "C"]),
            )
            entries += [(cand, "have") for cand in _assess(_take(both, rows), have_plan, timing, progress)[0]]
            pool.sizes["have"] = len(rows)
    known: set[tuple] = set()
    for cand, source in entries:
        parts = rated(design_parts(cand), spec)
        ident = (cand.wiring, tuple(sorted(item_key(p) for p in parts)))
        if ident in known:
            continue
        known.add(ident)
        meets, margin, why = _judge(cand, window, target, board.require, spec.min_yield)
        pool.designs.append(PoolDesign(cand, source, parts, meets, margin, why))
    return pool


def _order_of(shortlist: search.Shortlist, cands: list[Candidate]) -> list[int]:
    """For each ranked candidate, its row in the (unranked) shortlist it was assessed from."""
    rows = {}
    for i in range(len(shortlist)):
        r_vals = tuple(shortlist.r.parts_of(int(shortlist.r_index[i])))
        c_vals = tuple(shortlist.c.parts_of(int(shortlist.c_index[i])))
        key = (
            int(shortlist.r.wiring[shortlist.r_index[i]]),
            tuple(float(f"{v:.6g}") for v in r_vals),
            int(shortlist.c.wiring[shortlist.c_index[i]]),
            tuple(float(f"{v:.6g}") for v in c_vals),
        )
        rows[key] = i
    out = []
    arrangement = {"single": 0, "series": 1, "parallel": 2}
    for cand in cands:
        assert cand.r is not None and cand.c is not None
        key = (
            arrangement[cand.r.arrangement],
            tuple(float(f"{p.value:.6g}") for p in cand.r.parts),
            arrangement[cand.c.arrangement],
            tuple(float(f"{p.value:.6g}") for p in cand.c.parts),
        )
        out.append(rows[key])
    return out


def _merge(a: search.Shortlist, b: search.Shortlist) -> search.Shortlist:
    return search.Shortlist(a.r, a.c, np.concatenate([a.r_index, b.r_index]), np.concatenate([a.c_index, b.c_index]))


# --- the plan -------------------------------------------------------------------------------


@dataclass
class BoardTiming:
    """One timing of a planned board."""

    name: str
    count: int
    target: Any
    window: tuple[float, float]
    pool: Pool
    design: PoolDesign | None  # the joint choice
    greedy: PoolDesign | None  # the timing's own first choice
    closest: PoolDesign | None  # when unmet: the pool design nearest to meeting it

    @property
    def met(self) -> bool:
        return self.design is not None

    def __repr__(self) -> str:
        shown = self.design or self.closest
        wiring = shown.candidate.wiring if shown else None
        return f"BoardTiming({self.name!r}, count={self.count}, met={self.met}, design={wiring!r})"


@dataclass
class LineItem:
    """One line of the board's bill of materials for its timings."""

    part: Part
    per_board: int
    used_by: dict[str, int]  # timing name → parts of this item it uses (× its count)
    have: bool  # already on the board
    power_w: float | None = None  # the power rating asked for, W
    voltage_v: float | None = None  # the voltage rating asked for, V

    @property
    def rated(self) -> BoardPart:
        return BoardPart(self.part, self.power_w, self.voltage_v)

    @property
    def kind_letter(self) -> str:
        return "R" if self.part.kind == "resistance" else "C"


@dataclass(eq=False)
class BoardResult:
    """The result of :func:`rcpick.board`: one design per timing, the line items, and the saving."""

    board: Board
    timings: list[BoardTiming]
    line_items: list[LineItem]
    choice: Choice | None
    greedy_items: int
    greedy_new_items: int
    greedy_parts: int
    warnings: list[str]
    query_extra: list[tuple[str, Any, str]] = field(default_factory=list)

    @property
    def distinct_line_items(self) -> int:
        return len(self.line_items)

    @property
    def new_line_items(self) -> int:
        return sum(1 for item in self.line_items if not item.have)

    @property
    def parts_per_board(self) -> int:
        return sum(item.per_board for item in self.line_items)

    @property
    def unmet(self) -> list[BoardTiming]:
        return [t for t in self.timings if not t.met]

    @property
    def smallest_margin(self) -> float | None:
        margins = [t.design.margin for t in self.timings if t.design is not None]
        return min(margins) if margins else None

    def to_dict(self) -> dict:
        """The JSON document of ``rcpick board --format json`` (docs/json.md)."""
        require = self.board.require
        timings = []
        for t in self.timings:
            entry: dict[str, Any] = {
                "name": t.name,
                "count": t.count,
                "target": target_dict(t.target, t.window) if t.target is not None else None,
                "met": t.met,
                "min_yield": t.pool.timing.spec.min_yield if require == "yield" else None,
            }
            if t.design is not None:
                entry.update(_design_dict(t.design, t.count))
            else:
                entry["design"] = None
                entry["why"] = t.pool.unreachable or (t.closest.why_not if t.closest else "no design in the pool")
                entry["closest"] = _design_dict(t.closest, t.count) if t.closest is not None else None
            entry["greedy"] = _design_dict(t.greedy, t.count) if t.greedy is not None else None
            entry["pool"] = {
                "analysed": len(t.pool.designs),
                "meeting": sum(1 for d in t.pool.designs if d.meets),
                "by_source": dict(t.pool.sizes),
            }
            entry["warnings"] = list(t.pool.warnings)
            timings.append(entry)
        return {
            "schema": BOARD_SCHEMA,
            "board": {"file": self.board.path, "name": self.board.name},
            "require": require,
            "pool": self.board.pool,
            "timings": timings,
            "line_items": [
                {
                    "kind": item.kind_letter,
                    "value": item.part.rkm,
                    "value_si": item.part.value,
                    "model": model_text(item.rated),
                    "power_rating_w": item.power_w,
                    "voltage_rating_v": item.voltage_v,
                    "part": item.part.to_dict(),
                    "per_board": item.per_board,
                    "used_by": list(item.used_by),
                    "per_timing": dict(item.used_by),
                    "have": item.have,
                }
                for item in self.line_items
            ],
            "distinct_line_items": self.distinct_line_items,
            "new_line_items": self.new_line_items,
            "greedy_line_items": self.greedy_items,
            "greedy_new_line_items": self.greedy_new_items,
            "parts_per_board": self.parts_per_board,
            "greedy_parts_per_board": self.greedy_parts,
            "smallest_margin": self.smallest_margin,
            "unmet": [t.name for t in self.unmet],
            "solver": {
                "method": "scipy.optimize.milp (HiGHS), one stage per objective (docs/board.md)",
                "stages": list(self.choice.stages) if self.choice else [],
                "optimal_within_pools": self.choice is not None and self.choice.proven,
                "proven": self.choice.proven if self.choice is not None else None,
            },
            "boards": self.board.defaults.boards,
            "spares": self.board.defaults.spares,
            "warnings": list(self.warnings),
        }

    def order_rows(self, boards: int | None = None, spares: float | None = None) -> list[dict]:
        """The consolidated order: one row per line item, quantities for ``boards`` with ``spares``."""
        from rcpick import export

        n_boards = self.board.defaults.boards if boards is None else boards
        extra = self.board.defaults.spares if spares is None else spares
        rows = []
        stocked = any(item.part.stock_line is not None for item in self.line_items)
        for item in self.line_items:
            part = item.part
            tcr = part.tcr_ppm_per_c
            row: dict[str, Any] = {
                "kind": item.kind_letter,
                "value": part.rkm,
                "value (Ω or F)": part.value,
                "tol − (%)": part.tolerance[0] * 100,
                "tol + (%)": part.tolerance[1] * 100,
                "TCR min (ppm/°C)": tcr[0] if tcr else None,
                "TCR max (ppm/°C)": tcr[1] if tcr else None,
                "dielectric": part.dielectric,
                "model": model_text(item.rated),
                "power rating (W)": item.power_w,
                "voltage rating (V)": item.voltage_v,
                "part number": part.part_number,
                "already on the board": "yes" if item.have else "no",
                "qty per board": item.per_board,
                "used by": ", ".join(f"{n} ({q})" for n, q in item.used_by.items()),
                "boards": n_boards,
                "spares (%)": extra * 100,
            }
            total = export.order_total(item.per_board, n_boards, extra)
            row["total qty"] = total
            if stocked:
                price = part.unit_price
                row["stock line"] = part.stock_line
                row["package"] = part.package or None
                row["unit price (each)"] = price
                row["extended price (total)"] = price * total if price is not None else None
                row["on hand"] = part.on_hand
                row["shortfall"] = max(0, total - part.on_hand) if part.on_hand is not None else None
            rows.append(row)
        return rows

    #: The order sheet's columns, for a sheet with no line (every timing unmet).
    ORDER_COLUMNS = (
        "kind", "value", "value (Ω or F)", "tol − (%)", "tol + (%)", "TCR min (ppm/°C)", "TCR max (ppm/°C)",
        "dielectric", "model", "power rating (W)", "voltage rating (V)", "part number", "already on the board",
        "qty per board", "used by", "boards", "spares (%)", "total qty",
    )  # fmt: skip

    def timing_rows(self) -> list[dict]:
        """One row per timing: target, design, spread against its window, parts, margin."""
        rows = []
        for t in self.timings:
            chosen = t.design or t.closest
            row: dict[str, Any] = {
                "timing": t.name,
                "count": t.count,
                "target": t.target.describe() if t.target is not None else None,
                "met": "yes" if t.met else "no",
                "design": chosen.candidate.wiring if chosen else None,
                "source": chosen.source if chosen else None,
            }
            unit = t.target.unit if t.target is not None else ""
            sp = chosen.candidate.spread if chosen else None
            row[f"nominal ({unit})"] = chosen.candidate.value if chosen else None
            row[f"window low ({unit})"] = t.window[0] if math.isfinite(t.window[0]) else None
            row[f"window high ({unit})"] = t.window[1] if math.isfinite(t.window[1]) else None
            row[f"worst-case min ({unit})"] = sp.worst_min if sp else None
            row[f"worst-case max ({unit})"] = sp.worst_max if sp else None
            row[f"MC 0.135 % ({unit})"] = sp.p_low if sp else None
            row[f"MC 99.865 % ({unit})"] = sp.p_high if sp else None
            row["yield (fraction)"] = sp.yield_ if sp else None
            ci = sp.yield_ci if sp and sp.yield_ci else (None, None)
            row["yield 95 % low (fraction)"], row["yield 95 % high (fraction)"] = ci
            row["margin (fraction)"] = chosen.margin if chosen and math.isfinite(chosen.margin) else None
            row["parts per timing"] = chosen.candidate.parts if chosen else None
            row["parts on the board"] = len(chosen.parts) * t.count if chosen else None
            row["greedy design"] = t.greedy.candidate.wiring if t.greedy else None
            row["notes"] = None if t.met else (t.pool.unreachable or (t.closest.why_not if t.closest else None))
            rows.append(row)
        return rows

    def save(
        self,
        path: str | Path,
        *,
        boards: int | str | None = None,
        spares: float | str | None = None,
        sheet: str | None = None,
        force: bool = False,
    ) -> Path:
        """Write ``.xlsx`` (sheets timings, order, query) or ``.csv`` (one sheet: ``sheet``, default timings).

        ``boards`` and ``spares`` default to the board's own; an existing file is replaced only with ``force``.
        """
        from rcpick import export
        from rcpick.errors import BadValue
        from rcpick.settings import SETTINGS

        target = Path(path)
        if sheet is not None and sheet not in ("timings", "order"):
            raise BadValue(f"unknown sheet {sheet!r}; accepted: timings, order", setting="sheet")
        n_boards = SETTINGS["boards"].read(boards) if boards is not None else None
        extra = SETTINGS["spares"].read(spares) if spares is not None else None
        export.check_target(target, force, sheet)  # .xlsx or .csv, writable, a sheet only for a .csv
        order = self.order_rows(n_boards, extra)
        query = self.query_rows()
        if n_boards is not None or extra is not None:
            query.append(("order quantities", f"boards {n_boards}, spares {extra}", "save()"))
        sheets = {
            "timings": self.timing_rows(),
            "order": order,
            "query": export.query_rows(query),
        }
        if not order:  # every timing unmet: the order sheet keeps its header and says why it is empty
            sheets["order"] = [dict.fromkeys(self.ORDER_COLUMNS, None) | {"kind": "(no timing met: nothing to order)"}]
        if target.suffix.lower() == ".xlsx":
            export.write_xlsx(target, sheets, force)
        else:
            export.write_csv(target, sheets[sheet or "timings"], force)
        return target

    def query_rows(self) -> list[tuple[str, Any, str]]:
        from rcpick.results import stamp_rows

        d = self.board.defaults
        rows = stamp_rows()
        rows += list(self.query_extra)
        rows += [
            ("require", self.board.require, "board"),
            ("pool", self.board.pool, "board"),
            ("boards", d.boards, d.source_of("boards")),
            ("spares", f"{d.spares * 100:g}%", d.source_of("spares")),
        ]
        for t in self.timings:  # every setting of every timing, with where it came from
            for key, value, source in t.pool.timing.spec.provenance():
                rows.append((f"{t.name}: {key}", value, source))
            rows.append((f"{t.name}: seed used", t.pool.timing.spec.seed, "rcpick"))
        rows.append(("board file", self.board.text, self.board.path))
        return rows

    def __repr__(self) -> str:
        lines = [
            f"rcpick.board: {len(self.timings)} timing(s), {self.distinct_line_items} line item(s) "
            f"(each timing's own choice: {self.greedy_items}), {self.parts_per_board} parts per board"
        ]
        for t in self.timings:
            chosen = t.design or t.closest
            text = chosen.candidate.wiring if chosen else "–"
            lines.append(f"  {t.name:<24} {text:<28} {'met' if t.met else 'NOT MET'}")
        return "\n".join(lines)


def _design_dict(design: PoolDesign, count: int) -> dict:
    cand = design.candidate.to_dict()
    out: dict[str, Any] = {
        "design": {k: cand[k] for k in ("r", "c", "elements") if k in cand},
        "wiring": design.candidate.wiring,
        "value": cand["value"],
        "error": cand["error"],
        "spread": cand["spread"],
        "parts": design.candidate.parts,
        "parts_on_board": len(design.parts) * count,
        "margin": design.margin if math.isfinite(design.margin) else None,
        "source": design.source,
        "flags": cand["flags"],
    }
    if "stress" in cand:
        out["stress"] = cand["stress"]
    return out


def _spell(message: str) -> str:
    """A warning's ``{setting}`` references spelled as a board file's keys (``'dielectric'``)."""
    from rcpick.errors import RcpickError
    from rcpick.settings import key_name

    return RcpickError(message).text(lambda name: repr(key_name(name)))


def plan_board(board: Board, *, progress=None, query_extra: list | None = None) -> BoardResult:
    """Analyse every timing's pool once, then choose one design per timing jointly (module docstring)."""
    pools = build_pools(board, progress)
    keys: dict[tuple, int] = {}
    parts_of_key: dict[int, BoardPart] = {}

    def key_id(part: BoardPart) -> int:
        key = item_key(part)
        if key not in keys:
            keys[key] = len(keys)
            parts_of_key[keys[key]] = part
        return keys[key]

    free = frozenset(key_id(BoardPart(h.part, None, h.part.voltage_v)) for h in board.have)
    solvable: list[int] = []
    options: list[list[Option]] = []
    meeting: list[list[PoolDesign]] = []
    for k, pool in enumerate(pools):
        good = [d for d in pool.designs if d.meets]
        if not good:
            continue
        solvable.append(k)
        meeting.append(good)
        count = pool.timing.count
        order_of = {id(d): n for n, d in enumerate(pool.designs)}
        options.append(
            [
                Option(
                    frozenset(key_id(p) for p in d.parts),
                    len(d.parts) * count,
                    round_margin(d.margin),
                    order_of[id(d)],
                )
                for d in good
            ]
        )
    if options and progress is not None and hasattr(progress, "stage"):
        progress.stage(f"Choosing one design for each of {len(options)} timings jointly (integer program)…")
    choice = solve(options, free) if options else None
    greedy_picks = greedy(options) if options else ()
    g_score = score(options, greedy_picks, free) if options else (0, 0, 0.0, 0)
    greedy_all = set().union(*(options[t][d].items for t, d in enumerate(greedy_picks))) if options else set()
    timings = []
    chosen: dict[int, PoolDesign] = {}
    greedy_of: dict[int, PoolDesign] = {}
    for n, k in enumerate(solvable):
        if choice is not None:
            chosen[k] = meeting[n][choice.picks[n]]
        greedy_of[k] = meeting[n][greedy_picks[n]]
    for k, pool in enumerate(pools):
        closest = None
        if k not in chosen and pool.designs:
            closest = max(pool.designs, key=lambda d: (d.margin, d.candidate.spread.yield_ or 0.0))
        timings.append(
            BoardTiming(
                pool.timing.name,
                pool.timing.count,
                pool.target,
                pool.window,
                pool,
                chosen.get(k),
                greedy_of.get(k),
                closest,
            )
        )
    items: dict[int, LineItem] = {}
    for bt in timings:
        if bt.design is None:
            continue
        for part in bt.design.parts:
            ident = key_id(part)
            item = items.get(ident)
            if item is None:
                bp = parts_of_key[ident]
                item = items[ident] = LineItem(bp.part, 0, {}, ident in free, bp.power_w, bp.voltage_v)
            item.per_board += bt.count
            item.used_by[bt.name] = item.used_by.get(bt.name, 0) + bt.count
    ordered = sorted(items.values(), key=lambda i: (i.part.kind != "resistance", i.part.value, model_text(i.rated)))
    warnings: list[str] = list(board.warnings)
    cautioned = False
    for bt in timings:
        for w in bt.pool.warnings:
            text = f"{bt.name}: {_spell(w)}"
            if w.startswith("Safety:"):
                if cautioned:  # the full caution once; later discharges point to it
                    start = bt.target.start_level * bt.target.scale_v
                    text = f"{bt.name}: Safety: a discharge from {start:.4g} V as well; the caution above applies."
                cautioned = True
            if text not in warnings:
                warnings.append(text)
    return BoardResult(
        board,
        timings,
        ordered,
        choice,
        len(greedy_all),
        g_score[0],
        g_score[1],
        warnings,
        query_extra=list(query_extra or []),
    )
