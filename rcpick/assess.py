"""Spread of searched candidates, and their order: joins the search to the spread engine and the ranking.

Builds one :class:`~rcpick.variation.Study` for many candidates (each part with
the model of its stock line, or the position's model), runs the worst case and
the Monte Carlo, scores each candidate and orders them (:mod:`rcpick.ranking`).
"""

from __future__ import annotations

import math
from collections.abc import Callable
from dataclasses import dataclass

import numpy as np

from rcpick import ranking, variation
from rcpick.combos import Combos, contributor_move, subset
from rcpick.models import PartModel
from rcpick.search import Shortlist
from rcpick.specs import Conditions, Parts
from rcpick.target import Target


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
    yield_low: np.ndarray
    yield_high: np.ndarray
    never: np.ndarray
    window: tuple[float, float]  # absolute, target's unit; an end is ±inf for a limit
    analysed: int  # candidates given a Monte Carlo run
    r_models: list[list[PartModel]]
    c_models: list[list[PartModel]]
    flags: list[list[str]]
    samples: int
    stress: list[dict | None]


def window_of(target: Target, window: tuple[float, float]) -> tuple[float, float]:
    """Absolute acceptance window (target's unit) from a relative one (an infinite end stays infinite)."""
    return target.value * (1 + window[0]), target.value * (1 + window[1])


def _position(combos: Combos, index: np.ndarray, parts: Parts) -> variation.Position:
    values = [combos.parts_of(int(i)) for i in index]
    models = [[parts.model_of(v) for v in vs] + [parts.model] * (2 - len(vs)) for vs in values]
    return variation.Position.of(combos.kind, values, combos.wiring[index], models)


def study(shortlist: Shortlist, target: Target, r: Parts, c: Parts, cond: Conditions) -> variation.Study:
    """The spread study of every candidate in ``shortlist``."""
    return variation.Study(
        _position(shortlist.r, shortlist.r_index, r),
        _position(shortlist.c, shortlist.c_index, c),
        cond.temp_c,
        target,
        cond.level_band,
    )


def useful(parts: Parts, combos: Combos | None = None) -> tuple[Combos, np.ndarray]:
    """The candidates of a position whose pairs do something a single part cannot: the smaller
    contributor moves the value by more than the parts' tolerance (docs/model.md)."""
    found = parts.combos if combos is None else combos
    move = contributor_move(found)
    default = _half(parts.model)
    if not parts.by_value:
        return subset(found, move > default)
    stocked = {v: _half(m) for v, m in parts.by_value.items()}
    tol_a = np.array([stocked.get(float(v), default) for v in found.part_a])
    tol_b = np.array([stocked.get(float(v), default) if not math.isnan(v) else 0.0 for v in found.part_b])
    return subset(found, move > np.maximum(tol_a, tol_b))


def _half(model: PartModel) -> float:
    return max(-model.tolerance[0], model.tolerance[1])


def _take(shortlist: Shortlist, order) -> Shortlist:
    order = np.asarray(order, dtype=np.intp)
    return Shortlist(shortlist.r, shortlist.c, shortlist.r_index[order], shortlist.c_index[order])


def practical_flags(shortlist: Shortlist, r: Parts, c: Parts, kinds: tuple[str, str]) -> list[list[str]]:
    """Per candidate, what lies outside its family's practical range (data/practical.toml)."""
    from rcpick.notation import format_rkm

    out = []
    for ri, ci in zip(shortlist.r_index, shortlist.c_index):
        flags = []
        for combos, i, parts, family in ((shortlist.r, ri, r, kinds[0]), (shortlist.c, ci, c, kinds[1])):
            low, high = parts.practical
            odd = [v for v in combos.parts_of(int(i)) if not low * (1 - 1e-9) <= v <= high * (1 + 1e-9)]
            if odd:
                kind = combos.kind
                text = ", ".join(format_rkm(v, kind) for v in odd)
                out_range = f"{format_rkm(low, kind)}…{format_rkm(high, kind)}"
                verb = "is" if len(odd) == 1 else "are"
                flags.append(f"{text} {verb} outside the practical range of {family} parts ({out_range})")
        out.append(flags)
    return out


def assess(
    shortlist: Shortlist,
    target: Target,
    r: Parts,
    c: Parts,
    cond: Conditions,
    rank: str,
    top: int,
    *,
    families: tuple[str, str],
    min_yield: float = 0.0,
    ratings=None,
    progress: Callable[[int], None] | None = None,
) -> Assessed:
    """Spread of the candidates, ranked, cut to ``top``.

    ``rank`` is ``error`` (the shortlist's own order, already by |error|; Monte Carlo for the listed
    candidates only), ``spread`` (narrowest worst-case span first; Monte Carlo for the ``top`` kept),
    ``yield`` or ``cost`` (Monte Carlo for every candidate). With ``ratings`` (a :class:`rcpick.stress.Ratings`)
    and a known supply, each candidate's part stress is computed; one over a derated rating ranks after those
    within, and under a limit the least-stressed qualifying designs come first.
    """
    window = window_of(target, cond.window)
    if rank == "error":
        shortlist = _take(shortlist, np.arange(min(top, len(shortlist))))
    elif rank == "spread":
        lo, hi = variation.worst_case(study(shortlist, target, r, c, cond))
        nominal = target.quantity(shortlist.r_ohm, shortlist.c_farad)
        abs_err = np.round(np.abs(target.error(nominal)), ranking.ERROR_DECIMALS)
        keys = np.lexsort(
            (shortlist.c_farad, shortlist.r_ohm, abs_err, shortlist.parts, np.round((hi - lo) / nominal, 9))
        )
        shortlist = _take(shortlist, keys[:top])
    the_study = study(shortlist, target, r, c, cond)
    lo, hi = variation.worst_case(the_study)
    mc = variation.monte_carlo(
        the_study, cond.samples, cond.seed, cond.dist, window, lot_share=cond.lot_share, progress=progress
    )
    assert mc.yield_ is not None and mc.yield_low is not None and mc.yield_high is not None
    nominal = the_study.nominal
    flags = practical_flags(shortlist, r, c, families)
    sound = np.array([not f for f in flags], dtype=bool)
    for k, note in enumerate(leakage_notes(target, shortlist.r_ohm, shortlist.c_farad, window)):
        if note:  # impedance so high that usual leakage matters: ranked after the practical designs
            flags[k].append(note)
            sound[k] = False
    stress_share = np.full(len(shortlist), np.nan)
    stresses: list[dict | None] = [None] * len(shortlist)
    if ratings is not None:
        stresses = stress_of(the_study, r, c, ratings)
        for k, found in enumerate(stresses):
            if found is not None:
                sound[k] &= found["within_ratings"]
                stress_share[k] = found["peak_power_w"]
                flags[k] += stress_flags(found)
    inside = (lo >= window[0] * (1 - 1e-12)) & (hi <= window[1] * (1 + 1e-12))
    for k in range(len(shortlist)):
        if not inside[k]:
            flags[k].append(
                "the worst case leaves the window" if target.limit is None else "the worst case does not meet the limit"
            )
    middle = math.sqrt(r.span[0] * r.span[1])
    scores = ranking.Scores(
        mc.yield_,
        mc.yield_low,
        mc.yield_high,
        shortlist.parts,
        (hi - lo) / nominal,
        inside,
        np.abs(target.error(nominal)),
        np.abs(np.log(shortlist.r_ohm / middle)),
        shortlist.r_ohm,
        shortlist.c_farad,
        sound,
        stress_share,
        cost_per_board(the_study, r, c),
    )
    if rank == "error":
        order = list(range(len(shortlist)))
    else:
        order = ranking.order(
            scores, rank, limit=target.limit, min_yield=min_yield, discharge=target.kind == "delay" and target.falling
        )[:top]
    pick = np.array(order, dtype=np.intp)
    return Assessed(
        _take(shortlist, pick),
        lo[pick],
        hi[pick],
        mc.p_low[pick],
        mc.p_median[pick],
        mc.p_high[pick],
        mc.sigma[pick],
        mc.yield_[pick],
        mc.yield_low[pick],
        mc.yield_high[pick],
        mc.never[pick],
        window,
        len(the_study.r),
        [the_study.r.models[i] for i in pick],
        [the_study.c.models[i] for i in pick],
        [flags[i] for i in pick],
        cond.samples,
        [stresses[i] for i in pick],
    )


def cost_per_board(the_study: variation.Study, r: Parts, c: Parts) -> np.ndarray:
    """Sum of the stocked unit prices of each design's parts (NaN when a part has no price)."""
    out = np.full(len(the_study.r), np.nan)
    for m in range(len(the_study.r)):
        total = 0.0
        for pos, parts in ((the_study.r, r), (the_study.c, c)):
            count = 1 if pos.wiring[m] == 0 else 2
            for k in range(count):
                line = parts.lines.get(float(pos.parts[m, k]))
                if line is None or line.unit_price is None:
                    total = math.nan
                    break
                total += line.unit_price
        out[m] = total
    return out


def stress_of(the_study: variation.Study, r: Parts, c: Parts, ratings) -> list[dict | None]:
    """Per design: the ``stress`` member (rcpick.stress), or None without a supply."""
    from rcpick import stress as stresses
    from rcpick.combos import ARRANGEMENTS

    out = []
    c_eff = the_study.c.nominal
    for m in range(len(the_study.r)):
        pieces = []
        for pos in (the_study.r, the_study.c):
            count = 1 if pos.wiring[m] == 0 else 2
            pieces.append(([float(v) for v in pos.parts[m, :count]], ARRANGEMENTS[int(pos.wiring[m])]))
        (r_parts, r_arr), (c_parts, c_arr) = pieces
        lines = [c.lines.get(v).voltage if c.lines.get(v) is not None else None for v in c_parts]  # type: ignore[union-attr]
        out.append(
            stresses.of_design(the_study.target, r_parts, r_arr, c_parts, c_arr, float(c_eff[m]), ratings, lines)
        )
    return out


def stress_flags(found: dict) -> list[str]:
    from rcpick import stress as stresses

    return stresses.flags(found)


def leakage_notes(target: Target, r_ohm: np.ndarray, c_farad: np.ndarray, window: tuple[float, float]) -> list[str]:
    """Per design: a note when leakage of a usual size would move the timing (data/practical.toml [leakage]).

    With a supply and a delay or period, the charging current at the threshold is compared through the timing
    itself: a note when a leakage of the usual input limit would move it by more than a quarter of the window
    (or of the margin to a limit). Without a supply, a note above the resistance where leakage starts to matter.
    Not given when a leakage is modelled already (``leak``).
    """
    from dataclasses import replace

    from rcpick.datafiles import load_toml
    from rcpick.notation import format_si

    figures = load_toml("practical.toml")["leakage"]
    current, resistance = float(figures["input_current_a"]), float(figures["resistance_ohm"])
    out = [""] * len(r_ohm)
    if target.leak_a:
        return out
    if target.scale_v is None or target.kind not in ("delay", "period"):
        for k, r in enumerate(r_ohm):
            if r > resistance:
                out[k] = (
                    f"{format_si(r, 'Ω', 3, trim=True)} is above {format_si(resistance, 'Ω', 3, trim=True)}: "
                    f"input and board leakage start to move the timing (model it with a supply and a leakage)"
                )
        return out
    sides = [abs(target.value - w) / target.value for w in window if np.isfinite(w)]
    allowed = 0.25 * (min(sides) if sides else 0.1)
    leaky = replace(target, leak_a=current)
    base = target.quantity(r_ohm, c_farad)
    moved = leaky.quantity(r_ohm, c_farad)
    for k in range(len(r_ohm)):
        shift = moved[k] / base[k] - 1.0
        if not np.isfinite(shift) or abs(shift) > allowed:
            if target.kind == "delay" or target.thresholds is None:
                level = target.threshold or 0.0
            else:
                level = target.thresholds[1]
            final = 0.0 if (target.kind == "delay" and target.falling) else 1.0
            charging = abs(final - level) * target.scale_v / r_ohm[k]
            what = (
                "would stop the node short of it" if not np.isfinite(shift) else f"would move it {shift * 100:+.1f} %"
            )
            out[k] = (
                f"only {format_si(charging, 'A', 2)} flows at the threshold: a {format_si(current, 'A', 2)} "
                f"input leakage (a usual limit) {what}"
            )
    return out
