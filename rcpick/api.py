"""rcpick's Python face: one call per command, each returning a result object.

>>> import rcpick
>>> result = rcpick.find(tau="10ms")          # doctest: +SKIP
>>> result.best.wiring                        # doctest: +SKIP
'10K | 1u'

Every keyword is a setting of :mod:`rcpick.settings` (the command's option
without dashes, in snake_case), given as text in rcpick's notation
(``"4k7"``, ``"10ms"``, ``"-5%:+10%"``) or as a number in SI units (ohms,
farads, seconds, volts; fractions for percentages). Bad input raises an
:class:`rcpick.RcpickError` naming the parameter. See docs/api.md.
"""

from __future__ import annotations

import math
from collections.abc import Callable
from pathlib import Path
from typing import Any

import numpy as np

from rcpick import assess, combos, ranking, search
from rcpick import stock as stocks
from rcpick import stress as stresses
from rcpick import variation as engine
from rcpick.errors import NotReached, RcpickError, Unreachable
from rcpick.notation import format_percent, format_si
from rcpick.results import Candidate, FindResult, NetworkResult, Position, Spread, SpreadResult, finite, part_of
from rcpick.specs import FindSpec, Layer, NetworkSpec, Plan, SpreadSpec, api_layer, file_layer

Value = str | float | int | None
Progress = Callable[[int], None] | None


def _layers(values: dict[str, Any], config: str | Path | None) -> list[Layer]:
    given = {k: v for k, v in values.items() if v is not None}
    layers = [api_layer(given)]
    if config is not None:
        layers.append(file_layer(Path(config)))
    return layers


def find(
    *,
    tau: Value = None,
    cutoff: Value = None,
    delay: Value = None,
    period: Value = None,
    threshold: Value = None,
    from_level: Value = None,
    thresholds: Any = None,
    supply: Value = None,
    falling: bool | None = None,
    leak: Value = None,
    limit: str | None = None,
    r_series: str | None = None,
    r_min: Value = None,
    r_max: Value = None,
    r_parts: int | None = None,
    fix_r: Value = None,
    c_series: str | None = None,
    c_min: Value = None,
    c_max: Value = None,
    c_parts: int | None = None,
    fix_c: Value = None,
    r_tol: Any = None,
    r_tcr: Any = None,
    r_tech: str | None = None,
    c_tol: Any = None,
    dielectric: str | None = None,
    c_tc: Any = None,
    c_bias_loss: Value = None,
    c_age: Value = None,
    temp: Any = None,
    window: Any = None,
    threshold_tol: Any = None,
    dist: str | None = None,
    samples: Value = None,
    seed: Value = None,
    lot_share: Value = None,
    rank: str | None = None,
    top: Value = None,
    min_yield: Value = None,
    r_power: Value = None,
    r_voltage: Value = None,
    c_voltage: Value = None,
    derate: Any = None,
    stock: str | Path | None = None,
    boards: Value = None,
    spares: Value = None,
    net: str | Path | None = None,
    vary: Any = None,
    node: str | None = None,
    config: str | Path | None = None,
    progress: Progress = None,
) -> FindResult:
    """Search standard parts for a timing target and rank the candidates by their spread.

    Give exactly one target: ``tau``, ``cutoff``, ``delay`` (with ``threshold``) or ``period`` (with
    ``thresholds``). ``config`` names a project file whose settings apply where a keyword is not given.
    Returns a :class:`rcpick.results.FindResult`.
    """
    values = {k: v for k, v in locals().items() if k not in ("config", "progress")}
    spec = FindSpec.build(*_layers(values, config))
    return run_find(spec, progress=progress)


def spread(
    *,
    r: Value,
    c: Value,
    tau: Value = None,
    cutoff: Value = None,
    delay: Value = None,
    period: Value = None,
    threshold: Value = None,
    from_level: Value = None,
    thresholds: Any = None,
    supply: Value = None,
    falling: bool | None = None,
    leak: Value = None,
    limit: str | None = None,
    r_tol: Any = None,
    r_tcr: Any = None,
    r_tech: str | None = None,
    c_tol: Any = None,
    dielectric: str | None = None,
    c_tc: Any = None,
    c_bias_loss: Value = None,
    c_age: Value = None,
    temp: Any = None,
    window: Any = None,
    threshold_tol: Any = None,
    dist: str | None = None,
    samples: Value = None,
    seed: Value = None,
    lot_share: Value = None,
    r_power: Value = None,
    r_voltage: Value = None,
    c_voltage: Value = None,
    derate: Any = None,
    stock: str | Path | None = None,
    boards: Value = None,
    spares: Value = None,
    config: str | Path | None = None,
    progress: Progress = None,
) -> SpreadResult:
    """Analyse one design (``r="4k7+330"``, ``c="47n//47n"``): worst case, Monte Carlo, yield, contributions.

    Without a target the spread is of tau, relative to the design's nominal value.
    Returns a :class:`rcpick.results.SpreadResult`.
    """
    values = {k: v for k, v in locals().items() if k not in ("config", "progress")}
    spec = SpreadSpec.build(*_layers(values, config))
    return run_spread(spec, progress=progress)


def network(file: str | Path, *, node: str | None = None, threshold: Value = None) -> NetworkResult:
    """Order, natural time constants and step response of the RC network in a netlist file."""
    spec = NetworkSpec.build(
        api_layer({k: v for k, v in dict(file=file, node=node, threshold=threshold).items() if v is not None})
    )
    return run_network(spec)


def board(
    file: str | Path,
    *,
    require: str | None = None,
    pool: Value = None,
    min_yield: Value = None,
    samples: Value = None,
    seed: Value = None,
    boards: Value = None,
    spares: Value = None,
    config: str | Path | None = None,
    progress: Progress = None,
):
    """Pick one design per timing of a board file jointly, so the timings share line items (docs/board.md).

    ``require``: ``"yield"`` (each design's yield at least its ``min_yield``) or ``"worst-case"``. ``min_yield``,
    ``samples``, ``seed``, ``boards`` and ``spares`` apply to every timing that does not set its own; ``config``
    names a project file under the board's ``[defaults]``. Returns a :class:`rcpick.boardplan.BoardResult`.
    """
    typed = {"board_file": str(file), "require": require, "pool": pool}
    passed = dict(min_yield=min_yield, samples=samples, seed=seed, boards=boards, spares=spares)
    return run_board(
        api_layer({k: v for k, v in typed.items() if v is not None}),
        api_layer({k: v for k, v in passed.items() if v is not None}),
        file_layer(Path(config)) if config is not None else None,
        progress=progress,
    )


def run_board(board_layer: Layer, passed: Layer, config: Layer | None, *, progress: Progress = None, query_extra=None):
    """Read a board file through its layers and plan it (what :func:`board` and ``rcpick board`` do)."""
    from rcpick.boardfile import read_board
    from rcpick.boardplan import plan_board

    path = board_layer.values.get("board_file")
    if path is None:
        from rcpick.errors import BadValue

        raise BadValue("give the board file", setting="board_file")
    found = read_board(path, passed=passed, board_layer=board_layer, config=config)
    return plan_board(found, progress=progress, query_extra=query_extra)


def read_stock(path: str | Path) -> stocks.Stock:
    """Read and check a stock file (CSV or XLSX; ``"demo"`` for the invented demo stock)."""
    try:
        return stocks.load(path)
    except RcpickError as error:
        raise error.about("stock") from None


# --- runs ---------------------------------------------------------------------------


def _families(plan: Plan) -> tuple[str, str]:
    return plan.r.model.name or "resistor", plan.models.dielectric.code


def _model_text(parts, letter: str) -> str:
    if parts.lines:
        return f"stock lines' own columns; where a line gives none: {parts.model.label}"
    return parts.model.label


def settings_dict(plan: Plan, spec) -> dict:
    cond = plan.conditions
    return {
        "r_model": _model_text(plan.r, "r"),
        "c_model": _model_text(plan.c, "c"),
        "temp_c": list(cond.temp_c),
        "window": [finite(w) for w in cond.window],
        "dist": cond.dist,
        "samples": cond.samples,
        "seed": cond.seed,
        "threshold_band": list(cond.level_band),
        "lot_share": cond.lot_share,
    }


def _pct(band: tuple[float, float]) -> str:
    lo, hi = band[0] * 100, band[1] * 100
    return f"±{hi:g} %" if abs(lo + hi) < 1e-12 else f"{lo:+g}/{hi:+g} %"


def resolved_settings(spec, plan: Plan | None) -> list[tuple[str, Any, str]]:
    """The query sheet's and ``rcpick config``'s rows: each setting as used, and where it came from."""
    rows = spec.provenance()
    if plan is None:
        return rows
    derived: dict[str, str] = {}
    r_model, c_model = plan.models.r, plan.models.c
    if not spec.is_given("r_tol"):
        series_name = getattr(spec, "r_series", None)
        derived["r_tol"] = f"{_pct(r_model.tolerance)} ({series_name or 'the series'}'s usual)"
    if not spec.is_given("c_tol"):
        derived["c_tol"] = f"{_pct(c_model.tolerance)} ({plan.models.dielectric.code}'s usual)"
    if not spec.is_given("dielectric"):
        derived["dielectric"] = plan.models.dielectric.code
    if not spec.is_given("r_tcr"):
        derived["r_tcr"] = f"{r_model.drift.text} (from r-tech)"
    if not spec.is_given("c_tc"):
        derived["c_tc"] = f"{c_model.drift.text} (from the dielectric)"
    if not spec.is_given("samples"):
        derived["samples"] = str(plan.conditions.samples)
    for letter in ("r", "c"):
        parts = getattr(plan, letter)
        unit = "Ω" if letter == "r" else "F"
        if hasattr(spec, f"{letter}_max") and not spec.is_given(f"{letter}_max"):
            derived[f"{letter}_max"] = format_si(parts.span[1], unit, 4, trim=True)
        if parts.lines:
            key = "r_tol" if letter == "r" else "c_tol"
            derived[key] = f"stock lines' own; {derived.get(key, '')} where a line gives none".strip()
    out = []
    from rcpick.settings import SETTINGS

    names = {SETTINGS[n].key: n for n in SETTINGS}
    for key, text, source in rows:
        name = names.get(key, key)
        if name in derived and source == "built-in":
            text = derived[name]
        out.append((key, text, source))
    return out


def run_find(
    spec: FindSpec, *, progress: Progress = None, query_extra: list[tuple[str, Any, str]] | None = None
) -> FindResult:
    """Run a find spec (what :func:`find` and ``rcpick find`` do)."""
    if spec.net is not None:
        from rcpick import netfind

        return netfind.run(spec, progress=progress, query_extra=query_extra or [])
    with spec.naming():
        plan = spec.plan()
        target, cond = plan.target, plan.conditions
        assert target is not None  # a complete find spec has a target
        notes: list[str] = []
        pool_info = None
        if spec.rank == "error":
            shortlist = search.best(plan.r.combos, plan.c.combos, target, spec.top)
        else:
            r_use, _ = assess.useful(plan.r)
            c_use, _ = assess.useful(plan.c)
            pool_window = pool_window_of(target, cond.window)
            pool = search.window_pool(r_use, c_use, target, pool_window)
            if target.limit is not None and len(pool.shortlist):
                pool = aimed_pool(pool, r_use, c_use, target, plan, cond)
            if len(pool.shortlist) == 0:
                followed = ""
                if not spec.is_given("c_max") and plan.c.span[1] < 10e-6:
                    followed = (
                        f" ({plan.models.dielectric.code} parts are practical up to "
                        f"{format_si(plan.c.span[1], 'F', 3, trim=True)}, so {{c_max}} follows)"
                    )
                raise Unreachable(
                    "no allowed combination has its nominal value inside the window "
                    f"{_window_text(target, cond.window)} within R {plan.r.description.split(',')[0]} and C "
                    f"{plan.c.description.split(',')[0]}{followed}; widen {{window}}, {{r_max}} or {{c_max}}, or "
                    "rank by error ({rank} error)"
                )
            shortlist = pool.shortlist
            pool_info = {
                "in_window": pool.in_window,
                "analysed": len(pool.shortlist),
                "capped": pool.capped,
                "cap": search.POOL_CAP,
                "pairs_dropped": (len(plan.r.combos) - len(r_use)) + (len(plan.c.combos) - len(c_use)),
            }
            if pool.capped:
                notes.append(
                    f"Analysed {len(pool.shortlist)} of {pool.in_window:,} combinations inside the window "
                    f"(cap {search.POOL_CAP}: an equal share per part count, smallest |error| first)."
                )
        designs = len(shortlist) if spec.rank in ("yield", "cost") else min(spec.top, len(shortlist))
        with _progress(progress, engine.evaluations(designs, cond.samples, cond.temp_c)) as step:
            assessed = assess.assess(
                shortlist,
                target,
                plan.r,
                plan.c,
                cond,
                spec.rank,
                spec.top,
                families=_families(plan),
                min_yield=spec.min_yield,
                ratings=spec.ratings(),
                progress=step,
            )
        candidates = candidates_of(assessed, plan)
        caution = stresses.safety_caution(target)
        if caution:
            plan.warnings.append(caution)
        if candidates and target.leak_a and candidates[0].r is not None and candidates[0].c is not None:
            plan.warnings.extend(leak_warnings(target, candidates[0].r.value, candidates[0].c.value, cond.window))
        if len(candidates) < spec.top and pool_info is not None:
            notes.append(
                f"{len(candidates)} listed: only {pool_info['analysed']} combinations have their nominal "
                f"value inside the window."
            )
        analysis = {
            "rank": spec.rank,
            "rule": ranking.rule_text(spec.rank, target.limit, target.kind == "delay" and target.falling),
            "pool": pool_info,
            "settings": settings_dict(plan, spec),
            "stock": plan.stock.path if plan.stock else None,
        }
        result = FindResult(
            spec=spec,
            target=target,
            candidates=candidates,
            window=assessed.window,
            searched={"r_combinations": len(plan.r.combos), "c_combinations": len(plan.c.combos)},
            descriptions={
                "r": plan.r.description,
                "c": plan.c.description,
                "r_model": _model_text(plan.r, "r"),
                "c_model": _model_text(plan.c, "c"),
            },
            analysis=analysis,
            warnings=[w for w in plan.warnings],
            notes=notes,
            recommendation=recommendation(candidates, target, spec.rank, assessed.window),
            rule=ranking.rule_text(spec.rank, target.limit, target.kind == "delay" and target.falling),
            settings=resolved_settings(spec, plan),
            query_extra=list(query_extra or []),
        )
    result.warnings = [_spell(w, spec) for w in result.warnings]
    return result


def never_text(target, r_ohm: float) -> str:
    """Why a node never reaches its level (leakage moving the final level past the threshold)."""
    if target.leak_a and target.scale_v is not None and target.kind == "delay":
        final = (0.0 if target.falling else target.scale_v) - target.leak_a * r_ohm
        level = (target.threshold or 0.0) * target.scale_v
        return (
            f"with {format_si(target.leak_a, 'A')} of leakage through {format_si(r_ohm, 'Ω', 4)} the node settles "
            f"at {format_si(final, 'V', 4)} and never reaches {format_si(level, 'V', 4)}; lower R or the leakage"
        )
    return "the node never reaches the level asked"


def leak_warnings(target, r_ohm: float, c_farad: float, window: tuple[float, float]) -> list[str]:
    """A warning when the leakage moves the nominal timing by more than the window allows."""
    if not target.leak_a:
        return []
    from dataclasses import replace

    with_leak = float(target.quantity(r_ohm, c_farad))
    without = float(replace(target, leak_a=0.0).quantity(r_ohm, c_farad))
    shift = with_leak / without - 1.0
    allowed = (
        min(abs(w) for w in window if w != 0 and math.isfinite(w))
        if any(w != 0 and math.isfinite(w) for w in window)
        else 0.0
    )
    if allowed and abs(shift) > allowed:
        return [
            f"the leakage of {format_si(target.leak_a, 'A')} moves this timing by {shift * 100:+.1f} % (the "
            f"window allows {allowed * 100:g} %): it matters as much as the parts; check the leakage figure"
        ]
    return []


def _spell(message: str, spec) -> str:
    """A warning's ``{setting}`` references spelled as the user wrote them."""
    from rcpick.errors import RcpickError as _E

    return _E(message, setting=None).text(spec.name_of)


def aimed_pool(pool: search.Pool, r_use, c_use, target, plan: Plan, cond) -> search.Pool:
    """For a limit: the designs whose nominal value lies just inside where their worst case meets the limit.

    A first pool (nominal within 50 % on the safe side) gives each design's worst case as a multiple of its
    nominal value; the designs that can meet the limit have a nominal value up to limit / that multiple.
    The pool is drawn again nearest the boundary every design meets (the designs between the boundaries, and
    10 % beyond on the safe side, are in its window), so the analysed designs straddle it.
    """
    first = assess.study(pool.shortlist, target, plan.r, plan.c, cond)
    lo, hi = engine.worst_case(first)
    nominal = first.nominal
    if target.limit == "upper":
        ratio = hi / nominal
    else:
        ratio = lo / nominal
    ratio = ratio[np.isfinite(ratio) & (ratio > 0)]
    if not len(ratio):
        return pool
    # nominal values at which the worst case just meets the limit, relative to the limit
    edge_low, edge_high = 1.0 / ratio.max() - 1.0, 1.0 / ratio.min() - 1.0
    if target.limit == "upper":  # every design at or below edge_low meets it; some between the edges do
        window, near = (edge_low - 0.1, edge_high), edge_low
    else:
        window, near = (edge_low, edge_high + 0.1), edge_high
    aimed = search.window_pool(r_use, c_use, target, window, near=near)
    return aimed if len(aimed.shortlist) else pool


def pool_window_of(target, window: tuple[float, float]) -> tuple[float, float]:
    """The nominal window the pool is drawn from: the window itself, or for a limit the 50 % below (upper) or
    above (lower) it."""
    low, high = window
    if math.isinf(low):
        return (-search.REACH_LIMIT, 0.0)
    if math.isinf(high):
        return (0.0, search.REACH_LIMIT)
    return window


def _window_text(target, window: tuple[float, float]) -> str:
    if target.limit == "upper":
        return "at or below the target"
    if target.limit == "lower":
        return "at or above the target"
    return f"{window[0] * 100:+g} %…{window[1] * 100:+g} %"


class _progress:
    """A progress callback passed through, or none."""

    def __init__(self, step: Progress, total: int):
        self.step = step
        self.total = total

    def __enter__(self) -> Progress:
        if self.step is not None and hasattr(self.step, "start"):
            self.step.start(self.total)
        return self.step

    def __exit__(self, *exc) -> None:
        return None


def _position(combos_: combos.Combos, index: int, models, parts_info) -> Position:
    values = combos_.parts_of(index)
    parts = tuple(
        part_of(combos_.kind, v, m, parts_info.lines.get(float(v)) if v in parts_info.by_value else None)
        for v, m in zip(values, models)
    )
    return Position(combos_.kind, float(combos_.value[index]), combos.ARRANGEMENTS[int(combos_.wiring[index])], parts)


def candidates_of(assessed: assess.Assessed, plan: Plan) -> list[Candidate]:
    """Result dataclasses of the assessed candidates, in their order."""
    sl = assessed.shortlist
    target = plan.target
    assert target is not None
    out = []
    for k in range(len(sl)):
        ri, ci = int(sl.r_index[k]), int(sl.c_index[k])
        r_pos = _position(sl.r, ri, assessed.r_models[k], plan.r)
        c_pos = _position(sl.c, ci, assessed.c_models[k], plan.c)
        value = float(target.quantity(r_pos.value, c_pos.value))
        sp = Spread(
            finite(assessed.worst_min[k]),
            finite(assessed.worst_max[k]),
            finite(assessed.p_low[k]),
            finite(assessed.p_median[k]),
            finite(assessed.p_high[k]),
            finite(assessed.sigma[k]),
            float(assessed.yield_[k]),
            (float(assessed.yield_low[k]), float(assessed.yield_high[k])),
            int(assessed.never[k]),
        )
        cost = None
        prices = [p.unit_price for p in r_pos.parts + c_pos.parts]
        if prices and all(p is not None for p in prices):
            cost = float(sum(prices))  # type: ignore[arg-type]
        flags = list(assessed.flags[k])
        found_stress = assessed.stress[k]
        if sp.never:
            flags.append(f"{sp.never:,} of {assessed.samples:,} simulated units never reach the level")
        out.append(
            Candidate(
                rank=k + 1,
                value=value,
                error=float(target.error(value)),
                parts=len(r_pos.parts) + len(c_pos.parts),
                spread=sp,
                r=r_pos,
                c=c_pos,
                tau_s=r_pos.value * c_pos.value,
                cost_per_board=cost,
                flags=tuple(flags),
                stress=found_stress,
            )
        )
    return out


def _relative_span(sp: Spread, target) -> str:
    if sp.worst_min is None or sp.worst_max is None:
        return "worst case never reaches the level"
    return (
        f"worst case {format_percent(sp.worst_min / target.value - 1, signed=True)}…"
        f"{format_percent(sp.worst_max / target.value - 1, signed=True)}"
    )


def recommendation(candidates: list[Candidate], target, rank: str, window: tuple[float, float]) -> str:
    """One line: which candidate to build and why, in plain words."""
    if not candidates:
        return "No candidate to recommend."
    best = candidates[0]
    sp = best.spread
    bits = [f"Build rank 1, {best.wiring}"]
    why = []
    if sp.yield_ is not None and sp.yield_ci is not None:
        why.append(
            f"yield {sp.yield_ * 100:.1f} % (95 % interval {sp.yield_ci[0] * 100:.1f}…{sp.yield_ci[1] * 100:.1f} %)"
        )
    why.append(f"{best.parts} parts")
    span = _relative_span(sp, target)
    inside = not any("worst case" in f for f in best.flags)
    if target.limit is not None:
        why.append(f"{span}, {'meeting' if inside else 'missing'} the {target.limit} limit")
    else:
        win = f"{window[0] / target.value * 100 - 100:+.0f}…{window[1] / target.value * 100 - 100:+.0f} %"
        why.append(f"{span}, {'inside' if inside else 'leaving'} the {win} window")
    if best.cost_per_board is not None:
        why.append(f"{best.cost_per_board:.4g} per board")
    fewer = [c for c in candidates[1:] if c.parts < best.parts]
    if rank == "yield" and fewer and sp.yield_ci is not None:
        why.append("its yield is above every design with fewer parts beyond the intervals")
    elif rank == "yield" and len(candidates) > 1 and sp.yield_ci is not None:
        tied = [c for c in candidates[1:] if c.spread.yield_ci and c.spread.yield_ci[1] >= sp.yield_ci[0]]
        if tied:
            why.append(f"{len(tied)} other(s) tie within the yield intervals and lose on the tie-breaks")
    others = [f for f in best.flags if "worst case" not in f]
    if others:
        why.append("note: " + "; ".join(others))
    return f"{bits[0]}: " + ", ".join(why) + "."


# --- one design ---------------------------------------------------------------------


def run_spread(
    spec: SpreadSpec, *, progress: Progress = None, query_extra: list[tuple[str, Any, str]] | None = None
) -> SpreadResult:
    """Run a spread spec (what :func:`spread` and ``rcpick spread`` do)."""
    from rcpick.specs import Parts, load_stock, stock_warnings

    with spec.naming():
        has_target = spec.has_target
        r_arr, r_parts = spec.r
        c_arr, c_parts = spec.c
        r_combo = _design_combo("resistance", r_arr, r_parts)
        c_combo = _design_combo("capacitance", c_arr, c_parts)
        nominal_tau = float(r_combo.value[0] * c_combo.value[0])
        target = spec.target() if has_target else _tau_target(nominal_tau)
        mdl = spec.models(target if has_target else None)
        stock = load_stock(spec.stock)
        from rcpick import specs as sp_mod

        r_info = Parts(
            r_combo,
            "",
            mdl.r,
            *sp_mod._stock_models(spec, stock, "resistance", r_parts, mdl.r, mdl),
            practical=sp_mod.practical_range("resistance", spec.r_tech),
            span=(r_parts[0], r_parts[0]),
        )
        c_info = Parts(
            c_combo,
            "",
            mdl.c,
            *sp_mod._stock_models(spec, stock, "capacitance", c_parts, mdl.c, mdl),
            practical=sp_mod.practical_range("capacitance", mdl.dielectric.code),
            span=(c_parts[0], c_parts[0]),
        )
        cond = spec.conditions()
        if target.kind in ("delay", "period"):
            engine.check_level_band(target, cond.level_band)
        warnings = list(mdl.warnings) + stock_warnings(stock, c_info.lines, cond.temp_c)
        shortlist = search.Shortlist(r_combo, c_combo, np.array([0]), np.array([0]))
        study = assess.study(shortlist, target, r_info, c_info, cond)
        worst_min, worst_max = (float(v[0]) for v in engine.worst_case(study))
        window_abs = assess.window_of(target, cond.window) if has_target else None
        nominal = float(study.nominal[0])
        if not math.isfinite(nominal):
            raise NotReached(never_text(target, r_combo.value[0]), setting="leak" if target.leak_a else "threshold")
        warnings += leak_warnings(target, float(r_combo.value[0]), float(c_combo.value[0]), cond.window)
        finite_lo = [
            v for v in (worst_min, window_abs[0] if window_abs else None) if v is not None and math.isfinite(v)
        ]
        finite_hi = [
            v for v in (worst_max, window_abs[1] if window_abs else None) if v is not None and math.isfinite(v)
        ]
        low_edge = min(finite_lo) if finite_lo else nominal * 0.5
        high_edge = max(finite_hi) if finite_hi else nominal * 1.5
        if not math.isfinite(worst_max):  # some units may never reach the level: show at least twice the nominal
            high_edge = max(high_edge, 2.0 * nominal)
        pad = (high_edge - low_edge) * 0.02 or abs(high_edge) * 1e-6
        with _progress(progress, engine.evaluations(1, cond.samples, cond.temp_c)) as step:
            mc = engine.monte_carlo(
                study,
                cond.samples,
                cond.seed,
                cond.dist,
                window_abs,
                lot_share=cond.lot_share,
                histogram_range=(low_edge - pad, high_edge + pad),
                bins=HISTOGRAM_BINS,
                progress=step,
            )
        shares = engine.contributions(study)[0]
        plan_like = Plan(target, r_info, c_info, cond, mdl, warnings, stock)
        flags = assess.practical_flags(shortlist, r_info, c_info, (mdl.r.name, mdl.dielectric.code))[0]
        inside = (
            window_abs is not None
            and worst_min >= window_abs[0] * (1 - 1e-12)
            and worst_max <= window_abs[1] * (1 + 1e-12)
        )
        if has_target and not inside:
            flags.append(
                "the worst case leaves the window" if target.limit is None else "the worst case does not meet the limit"
            )
        design_stress = assess.stress_of(study, r_info, c_info, spec.ratings())[0] if has_target else None
        caution = stresses.safety_caution(target) if has_target else None
        if caution:
            warnings.append(caution)
        r_pos = _position(r_combo, 0, study.r.models[0], r_info)
        c_pos = _position(c_combo, 0, study.c.models[0], c_info)
        yield_ = float(mc.yield_[0]) if mc.yield_ is not None else None
        ci = (
            (float(mc.yield_low[0]), float(mc.yield_high[0]))
            if mc.yield_low is not None and mc.yield_high is not None
            else None
        )
        design = Candidate(
            rank=1,
            value=nominal,
            error=(nominal / target.value - 1.0) if has_target else 0.0,
            parts=len(r_parts) + len(c_parts),
            spread=Spread(
                finite(worst_min),
                finite(worst_max),
                finite(mc.p_low[0]),
                finite(mc.p_median[0]),
                finite(mc.p_high[0]),
                finite(mc.sigma[0]),
                yield_,
                ci,
                int(mc.never[0]),
            ),
            r=r_pos,
            c=c_pos,
            tau_s=nominal_tau,
            flags=tuple(flags + stresses.flags(design_stress)),
            stress=design_stress,
        )
        assert mc.histogram is not None
        counts, edges = mc.histogram
        period_parts = None
        if target.kind == "period":
            charge, discharge = target.half_periods(nominal_tau, r_combo.value[0])
            period_parts = {
                "charge_s": float(charge),
                "discharge_s": float(discharge),
                "duty_cycle": float(charge / (charge + discharge)),
            }
        result = SpreadResult(
            spec=spec,
            target=target,
            has_target=has_target,
            design=design,
            window=window_abs,
            nominal=nominal,
            contributions=shares,
            histogram=(edges.tolist(), counts.tolist()),
            histogram_units=mc.histogram_units,
            temperatures_c=mc.temperatures_c.tolist(),
            reference_c=mc.reference_c,
            analysis={"settings": settings_dict(plan_like, spec), "stock": stock.path if stock else None},
            warnings=warnings,
            settings=resolved_settings(spec, plan_like),
            model_text={"r": _model_text(r_info, "r"), "c": _model_text(c_info, "c")},
            period_parts=period_parts,
            query_extra=list(query_extra or []),
        )
    result.warnings = [_spell(w, spec) for w in result.warnings]
    return result


HISTOGRAM_BINS = 24


def _tau_target(tau_s: float):
    from rcpick.target import for_tau

    return for_tau(tau_s)


def _design_combo(kind: str, arrangement: str, parts: list[float]) -> combos.Combos:
    code = combos.ARRANGEMENTS.index(arrangement)
    a = parts[0]
    b = parts[1] if len(parts) > 1 else float("nan")
    value = engine.combine(np.array([a]), np.array([b if len(parts) > 1 else 0.0]), np.array([code]), kind)
    return combos.Combos.of(kind, value, [code], [a], [b])


# --- networks -----------------------------------------------------------------------


def run_network(spec: NetworkSpec) -> NetworkResult:
    """Run a network spec (what :func:`network` and ``rcpick net`` do)."""
    from rcpick import netfind

    with spec.naming():
        return netfind.analyse(spec)
