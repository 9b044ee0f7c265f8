"""Networks: ``rcpick net`` (analysis of a netlist) and ``rcpick find --net`` (standard values inside one).

The spread of a network design uses the same part-value law and the same
draws as a lone R and C (:func:`rcpick.variation.relative_factor`,
:mod:`rcpick.sampling`): the varied resistor's parts draw from the streams
``R1``/``R2``, the varied capacitor's from ``C1``/``C2``, exactly as in a
plain search, and every other element from a stream of its own name. So a
netlist holding one R and one C repeats plain ``find`` and ``spread`` for the
same seed and settings. The pool, the ranking and the JSON are shared too.
"""

from __future__ import annotations

import itertools
import math
from dataclasses import dataclass, replace
from typing import Any

import numpy as np

from rcpick import assess, models, netsearch, nodal, ranking, search, variation
from rcpick import stock as stocks
from rcpick.combos import ARRANGEMENTS, SERIES, SINGLE, parallel_value, series_value, subset
from rcpick.errors import BadValue, ClashingOptions, Unreachable
from rcpick.models import ROOM_C, PartModel
from rcpick.netlist import Netlist, read
from rcpick.notation import format_si
from rcpick.results import Candidate, FindResult, NetworkResult, Position, Spread, finite, part_of
from rcpick.sampling import Sampler
from rcpick.specs import Conditions, FindSpec, NetworkSpec, Parts, load_stock, position_parts

#: Candidates given a spread analysis when ranking a network search by yield, spread or cost.
NET_POOL = 12
#: Worst case: with at most this many parts every corner of their bands is tried; above, all-low and all-high.
CORNER_PARTS = 6
#: Temperatures per side of 25 °C at which every corner of a node's delay or corner is evaluated.
GRID_POINTS = 17
#: Time points over which a node's range of values is found (for "never reaches" messages).
RANGE_POINTS = 400


# --- rcpick net ---------------------------------------------------------------------


def node_range(resp: nodal.Response, node: str, horizon: float) -> tuple[float, float]:
    """Lowest and highest voltage of ``node`` from t = 0 to ``horizon`` and at the end (V)."""
    t = np.concatenate([[0.0], np.geomspace(horizon * 1e-7, horizon, RANGE_POINTS), [np.inf]])
    v = resp.node(node, t)[0]
    return float(v.min()), float(v.max())


def analyse(spec: NetworkSpec) -> NetworkResult:
    """The order, time constants, first-order equivalent and step response of a netlist (docs/json.md)."""
    net = read(spec.file)
    taus = nodal.time_constants(net)[0]
    doc: dict[str, Any] = {
        "netlist": net.path,
        "capacitors": len(net.of("C")),
        "order": int(len(taus)),
        "time_constants_s": [float(t) for t in taus],
        "warnings": list(net.warnings),
    }
    first = nodal.first_order(net) if len(taus) == 1 else None
    if first is not None:
        doc.update(c_eq_farad=first.c_eq_farad, r_th_ohm=first.r_th_ohm, port=list(first.port))
    unreached = None
    if spec.node is not None:
        node = spec.node
        if node not in net.nodes:
            raise BadValue(f"no node {node!r} in {net.path}; nodes: {', '.join(net.nodes)}", setting="node")
        resp = nodal.step_response(net)
        v0, v_final = float(resp.initial(node)[0]), float(resp.final(node)[0])
        horizon = 30 * (float(taus[0]) if len(taus) else 1.0)
        low, high = node_range(resp, node, horizon)
        step: dict[str, Any] = {
            "node": node,
            "v0": v0,
            "v_final": v_final,
            "v_min": low,
            "v_max": high,
            "threshold_v": None,
            "t_threshold_s": None,
        }
        if spec.threshold is not None:
            level = (
                spec.threshold.value
                if spec.threshold.volts
                else float(nodal.fractional_level(spec.threshold.value, v0, v_final))
            )
            if not math.isfinite(level):
                raise BadValue(
                    f"node {node} starts and ends at {format_si(v0, 'V', 4)}: a fraction of its swing "
                    f"means nothing; give the threshold in volts",
                    setting="threshold",
                )
            t = float(nodal.crossing_time(resp, node, np.array([level]), np.array([horizon]))[0])
            step["threshold_v"] = level
            if math.isnan(t):

                def volts(x: float) -> str:
                    return format_si(x, "V", 6, trim=True)

                unreached = f"node {node} never reaches {volts(level)}: it goes from {volts(v0)} to {volts(v_final)}"
                if low < min(v0, v_final) - 1e-9 or high > max(v0, v_final) + 1e-9:
                    unreached += f", passing between {volts(low)} and {volts(high)}"
                doc["warnings"].append(unreached)
            else:
                step["t_threshold_s"] = t
        doc["step"] = step
    return NetworkResult(doc, unreached=unreached)


# --- parts of a network design --------------------------------------------------------


@dataclass(frozen=True)
class NetPart:
    """One physical part of a network design: its element, value, model and draw stream."""

    element: str
    kind: str
    value: float
    model: PartModel
    stream: str
    line: stocks.StockPart | None = None


@dataclass(frozen=True)
class NetDesign:
    """Every R and C of a netlist for one candidate: parts per element, and how each element's parts are wired."""

    parts: dict[str, list[NetPart]]
    wiring: dict[str, int]

    def flat(self) -> list[NetPart]:
        return [p for ps in self.parts.values() for p in ps]

    def lots(self) -> dict[int, str | None]:
        """Per part (by position in :meth:`flat`): the stream of its lot's first part, or None when alone."""
        groups: dict[tuple, list[int]] = {}
        flat = self.flat()
        for i, p in enumerate(flat):
            groups.setdefault((p.kind, p.value, p.model), []).append(i)
        out: dict[int, str | None] = {}
        for members in groups.values():
            for i in members:
                out[i] = flat[members[0]].stream if len(members) > 1 else None
        return out

    def element_values(self, factors: list[np.ndarray]) -> dict[str, np.ndarray]:
        """Element values from each part's values (``factors`` in :meth:`flat` order, absolute values)."""
        out, k = {}, 0
        for name, ps in self.parts.items():
            vals = factors[k : k + len(ps)]
            k += len(ps)
            if len(vals) == 1:
                out[name] = vals[0]
            else:
                rule = series_value if self.wiring[name] == SERIES else parallel_value
                out[name] = rule(vals[0], vals[1], ps[0].kind)
        return out


def element_model(element, value: float, base_r: PartModel, base_c: PartModel, mdl) -> PartModel:
    """A netlist element's model: its own annotations, then the request's defaults."""
    return models.annotated(
        element.letter, element.params, element.name, base_r, base_c, aging_hours=mdl.aging_hours, loss=mdl.loss
    )


def design_of(net: Netlist, chosen: dict[str, tuple[Any, int, Parts]], mdl) -> NetDesign:
    """Parts of one candidate: every R and C of the netlist, the varied ones as their candidate's parts.

    ``chosen`` maps a varied element's name to (its Combos, the candidate index, its Parts).
    """
    parts: dict[str, list[NetPart]] = {}
    wiring: dict[str, int] = {}
    for e in net.elements:
        if e.letter not in "RC":
            continue
        kind = "resistance" if e.letter == "R" else "capacitance"
        if e.name in chosen:
            combos_, i, info = chosen[e.name]
            slot = e.letter
            values = combos_.parts_of(i)
            own = element_model(e, values[0], mdl.r, mdl.c, mdl)
            parts[e.name] = [
                NetPart(
                    e.name,
                    kind,
                    v,
                    info.by_value.get(float(v), own) if info.by_value else own,
                    f"{slot}{k + 1}",
                    info.lines.get(float(v)),
                )
                for k, v in enumerate(values)
            ]
            wiring[e.name] = int(combos_.wiring[i])
        else:
            parts[e.name] = [
                NetPart(e.name, kind, e.value, element_model(e, e.value, mdl.r, mdl.c, mdl), f"net:{e.name}")
            ]
            wiring[e.name] = SINGLE
    return NetDesign(parts, wiring)


# --- spread of a network design ---------------------------------------------------------


def _level_scale(quantity: netsearch.Quantity, deviation):
    if deviation is None or quantity.kind != "delay":
        return None
    return 1.0 + np.asarray(deviation)


def worst_case(net: Netlist, design: NetDesign, quantity: netsearch.Quantity, cond: Conditions) -> tuple[float, float]:
    """Worst case of a network design.

    The dominant time constant grows with every R and C, so its extremes are the all-low and all-high corners,
    refined over temperature exactly as for a lone R and C (:func:`rcpick.variation.extremes_over_temperature`).
    A node's delay or corner frequency is not monotone in general: every corner of the parts' bands (all-low and
    all-high beyond CORNER_PARTS parts) at GRID_POINTS temperatures per side of 25 °C.
    """
    flat = design.flat()
    if quantity.kind == "tau" or len(flat) > CORNER_PARTS:
        corners = np.array([[False] * len(flat), [True] * len(flat)])
    else:
        corners = np.array(list(itertools.product([False, True], repeat=len(flat))))
    lo_band, hi_band = cond.level_band
    levels = [lo_band, hi_band] if (lo_band, hi_band) != (0.0, 0.0) and quantity.kind == "delay" else [0.0]

    def evaluate(x: np.ndarray, corner_rows: np.ndarray, level: float) -> np.ndarray:
        """Quantity at offsets x (P,) for the given corners: shape (corners, P)."""
        factors = []
        for k, part in enumerate(flat):
            up = variation.model_limit_factor(part.model, x, True)
            down = variation.model_limit_factor(part.model, x, False)
            factors.append(part.value * np.where(corner_rows[:, k][:, None], up[None, :], down[None, :]).ravel())
        values = design.element_values(factors)
        n = len(corner_rows) * len(x)
        scale = None if level == 0.0 else np.full(n, 1.0 + level)
        return quantity.evaluate(net, values, n, scale).reshape(len(corner_rows), len(x))

    lows: list[float] = []
    highs: list[float] = []
    for a, b in variation._sides(cond.temp_c):
        if quantity.kind != "tau":
            # a node's delay or corner: every corner on a fine grid of temperatures, in one batch (a method,
            # not a proof; the Monte Carlo extremes are folded in by the caller)
            grid = np.linspace(a, b, GRID_POINTS if b > a else 1)
            for level in levels:
                table = evaluate(grid, corners, level)
                lows.append(float(table.min()))
                highs.append(float(table.max()))
            continue
        # the dominant time constant grows with every part: all-low and all-high, refined over temperature
        # exactly as for a lone R and C (so one R and one C repeat it)
        for upper in (False, True):
            row = corners[1:2] if upper else corners[0:1]

            def func(x, up, row=row):
                return evaluate(x[0], row, 0.0)[0][None, :]

            lo, hi = variation.extremes_over_temperature(func, 1, (a + ROOM_C, b + ROOM_C))
            (highs if upper else lows).append(float(hi[0] if upper else lo[0]))
    return min(lows), max(highs)


def monte_carlo(
    net: Netlist,
    designs: list[NetDesign],
    quantity: netsearch.Quantity,
    cond: Conditions,
    window: tuple[float, float],
    progress=None,
) -> dict[str, np.ndarray]:
    """Monte Carlo of network designs with the shared law and draws; per design arrays as variation.unit_summary."""
    sampler = Sampler(cond.seed, cond.dist, cond.lot_share)
    temps = variation.temperature_grid(cond.temp_c)
    x = temps - ROOM_C
    ref = int(np.argmin(np.abs(x)))
    samples = cond.samples
    band = cond.level_band
    out: dict[str, list[float]] = {}
    for design in designs:
        flat = design.flat()
        lots = design.lots()
        lows, highs, refs = (np.empty((1, samples)) for _ in range(3))
        start = 0
        for index, n in sampler.chunks(samples):
            chunk = sampler.chunk(index, n)
            factors = [
                p.value * variation.relative_factor(p.model, chunk, p.stream, lots[i], x) for i, p in enumerate(flat)
            ]
            values = {name: v.ravel() for name, v in design.element_values(factors).items()}
            scale = None
            if band != (0.0, 0.0) and quantity.kind == "delay":
                mid, half = (band[0] + band[1]) / 2, (band[1] - band[0]) / 2
                dev = mid + half * chunk.band("level1", "level")
                scale = np.broadcast_to(1.0 + dev, (len(x), n)).ravel()
            q = quantity.evaluate(net, values, len(x) * n, scale).reshape(len(x), n)
            q = np.where(np.isnan(q), np.inf, q)
            lows[0, start : start + n] = q.min(axis=0)
            highs[0, start : start + n] = q.max(axis=0)
            refs[0, start : start + n] = q[ref]
            start += n
            if progress is not None:
                progress(n * len(x))
        for name, value in variation.unit_summary(lows, highs, refs, window).items():
            out.setdefault(name, []).append(float(value[0]))
    arrays = {k: np.array(v) for k, v in out.items()}
    arrays["yield"] = arrays["passed"] / samples
    arrays["yield_low"], arrays["yield_high"] = variation.wilson_interval(arrays["passed"], samples)
    return arrays


# --- rcpick find --net --------------------------------------------------------------


def _quantity(spec: FindSpec, net: Netlist, target) -> netsearch.Quantity:
    kind = target.kind
    if spec.supply is not None or spec.falling or spec.from_level is not None or spec.leak is not None:
        raise ClashingOptions(
            "{supply}, {falling}, {from_level} and {leak} do not apply with {net}: the netlist's "
            "sources and capacitor start voltages set the step",
            setting="net",
        )
    if kind == "period":
        raise ClashingOptions("{period} is not searched inside a network; give a lone R and C", setting="period")
    if kind == "tau":
        if spec.node is not None:
            raise ClashingOptions(
                "{node} applies to {cutoff} and {delay} with {net}; {tau} is the network's dominant time constant",
                setting="node",
            )
        return netsearch.Quantity("tau")
    if spec.node is None:
        raise ClashingOptions(
            f"{{{kind}}} with {{net}} needs {{node}} (the node whose response is timed)", setting=kind
        )
    if spec.node not in net.nodes:
        raise BadValue(f"no node {spec.node!r} in {net.path}; nodes: {', '.join(net.nodes)}", setting="node")
    if kind == "cutoff":
        return netsearch.Quantity("cutoff", spec.node)
    assert spec.threshold is not None
    return netsearch.Quantity("delay", spec.node, spec.threshold.value, spec.threshold.volts)


def _varied(spec: FindSpec, net: Netlist) -> list[str]:
    assert spec.vary is not None
    found = []
    for name in spec.vary:
        element = net.get(name)
        if element is None:
            listed = ", ".join(e.name for e in net.elements if e.letter in "RC")
            raise BadValue(f"no element {name!r} in {net.path}; its R and C elements: {listed}", setting="vary")
        if element.letter not in "RC":
            raise BadValue(f"{element.name} is a source; only R and C elements can be varied", setting="vary")
        found.append(element)
    letters = [e.letter for e in found]
    if not 1 <= len(found) <= 2 or len(set(letters)) != len(letters):
        raise BadValue(
            f"give one or two elements, at most one R and one C, got {','.join(spec.vary)!r}", setting="vary"
        )
    return [e.name for e in found]


def _target_of(spec: FindSpec):
    from rcpick.target import Target

    kind = spec._kind()
    value = getattr(spec, kind)
    unit = "Hz" if kind == "cutoff" else "s"
    return Target(kind, value, unit, limit=spec.limit)


def pooled(net: Netlist, varied: list[netsearch.Varied], quantity, value: float, size: int) -> netsearch.NetShortlist:
    """The best candidates by |error| with an equal share for each mix of single parts and pairs
    (:func:`rcpick.search.share_cap`, as for a lone R and C)."""
    netsearch.check_enumeration(varied, quantity)  # before any pool is evaluated
    groups: dict[tuple, tuple] = {}
    for singles in itertools.product([True, False], repeat=len(varied)):
        subsets, maps = [], []
        for v, single in zip(varied, singles):
            sub, index = subset(v.combos, (v.combos.parts == 1) == single)
            subsets.append(netsearch.Varied(v.name, sub))
            maps.append(index)
        if any(len(s.combos) == 0 for s in subsets):
            continue
        try:
            part = netsearch.search(net, subsets, quantity, value, size)
        except Unreachable:
            continue
        index = np.column_stack([maps[k][part.index[:, k]] for k in range(len(varied))])
        groups[singles] = (index, part.value, part.error)
    if not groups:
        return netsearch.search(net, varied, quantity, value, size)
    chosen = search.share_cap(groups, size)
    index = np.concatenate([g[0] for g in chosen.values()])
    return netsearch.NetShortlist(
        tuple(varied),
        index,
        np.concatenate([g[1] for g in chosen.values()]),
        np.concatenate([g[2] for g in chosen.values()]),
    )


def run(spec: FindSpec, *, progress=None, query_extra: list | None = None) -> FindResult:
    """``find --net``: search the varied elements, spread the candidates with the shared engine, rank."""
    from rcpick.api import _spell, recommendation, resolved_settings, settings_dict
    from rcpick.specs import Plan

    with spec.naming():
        net = read(spec.net)  # type: ignore[arg-type]
        names = _varied(spec, net)
        target = _target_of(spec)
        quantity = _quantity(spec, net, target)
        mdl = spec.models(None, spec.r_series)
        stock = load_stock(spec.stock)
        infos = {"R": position_parts(spec, "r", mdl, stock), "C": position_parts(spec, "c", mdl, stock)}
        cond = spec.conditions(network=True)
        if spec.rank != "error":
            infos = {k: replace(v, combos=assess.useful(v)[0]) for k, v in infos.items()}
        varied = [netsearch.Varied(n, infos[n[0].upper()].combos) for n in names]
        if spec.rank == "error":
            shortlist = netsearch.search(net, varied, quantity, target.value, spec.top)
            rows = list(range(min(spec.top, len(shortlist.value))))
        else:
            shortlist = pooled(net, varied, quantity, target.value, max(spec.top, NET_POOL))
            rows = list(range(len(shortlist.value)))
        window = assess.window_of(target, cond.window)
        designs = []
        for i in rows:
            chosen = {
                v.name: (v.combos, int(shortlist.index[i, k]), infos[v.name[0].upper()])
                for k, v in enumerate(shortlist.varied)
            }
            designs.append(design_of(net, chosen, mdl))
        mc = monte_carlo(net, designs, quantity, cond, window, progress)
        worst = [worst_case(net, d, quantity, cond) for d in designs]
        w_lo = np.minimum(np.array([w[0] for w in worst]), mc["p_low"])
        w_hi = np.maximum(np.array([w[1] for w in worst]), mc["p_high"])
        value = shortlist.value[rows]
        error = shortlist.error[rows]
        parts = shortlist.parts[rows]
        flags: list[list[str]] = []
        for d in designs:
            f = []
            for name in names:
                info = infos[name[0].upper()]
                low, high = info.practical
                odd = [p for p in d.parts[name] if not low * (1 - 1e-9) <= p.value <= high * (1 + 1e-9)]
                if odd:
                    f.append(
                        f"{', '.join(_value_text(p) for p in odd)} is outside the practical range of its part family"
                    )
            flags.append(f)
        inside = (w_lo >= window[0] * (1 - 1e-12)) & (w_hi <= window[1] * (1 + 1e-12))
        for k in range(len(rows)):
            if not inside[k]:
                flags[k].append(
                    "the worst case leaves the window"
                    if target.limit is None
                    else "the worst case does not meet the limit"
                )
        r_values = np.array([_varied_value(d, names, "R") for d in designs])
        c_values = np.array([_varied_value(d, names, "C") for d in designs])
        middle = math.sqrt(infos["R"].span[0] * infos["R"].span[1])
        with np.errstate(divide="ignore", invalid="ignore"):
            off = np.where(r_values > 0, np.abs(np.log(np.where(r_values > 0, r_values, 1.0) / middle)), 0.0)
        scores = ranking.Scores(
            mc["yield"],
            mc["yield_low"],
            mc["yield_high"],
            parts,
            (w_hi - w_lo) / value,
            inside,
            np.abs(error),
            off,
            r_values,
            c_values,
            np.array([not f for f in flags], dtype=bool),
            np.full(len(rows), np.nan),
            np.array([_cost(d, names) for d in designs]),
        )
        order = (
            list(range(len(rows)))
            if spec.rank == "error"
            else ranking.order(scores, spec.rank, limit=target.limit, min_yield=spec.min_yield)[: spec.top]
        )
        candidates = []
        for rank_no, k in enumerate(order, start=1):
            d = designs[k]
            elements = {}
            for name in names:
                ps = d.parts[name]
                kind = ps[0].kind
                eff = float(_element_value([p.value for p in ps], d.wiring[name], kind))
                elements[name] = Position(
                    kind, eff, ARRANGEMENTS[d.wiring[name]], tuple(part_of(kind, p.value, p.model, p.line) for p in ps)
                )
            r_pos = next((p for n, p in elements.items() if n[0].upper() == "R"), None)
            c_pos = next((p for n, p in elements.items() if n[0].upper() == "C"), None)
            sp = Spread(
                finite(w_lo[k]),
                finite(w_hi[k]),
                finite(mc["p_low"][k]),
                finite(mc["p_median"][k]),
                finite(mc["p_high"][k]),
                finite(mc["sigma"][k]),
                float(mc["yield"][k]),
                (float(mc["yield_low"][k]), float(mc["yield_high"][k])),
                int(mc["never"][k]),
            )
            candidates.append(
                Candidate(
                    rank=rank_no,
                    value=float(value[k]),
                    error=float(error[k]),
                    parts=int(parts[k]),
                    spread=sp,
                    r=r_pos,
                    c=c_pos,
                    tau_s=float(value[k]) if quantity.kind == "tau" else None,
                    elements=elements,
                    cost_per_board=finite(_cost(d, names)),
                    flags=tuple(flags[k]),
                )
            )
        plan = Plan(target, infos["R"], infos["C"], cond, mdl, list(mdl.warnings), stock)
        settings = settings_dict(plan, spec)
        settings["r_model"] = f"each R's own netlist annotations, else: {settings['r_model']}"
        settings["c_model"] = f"each C's own netlist annotations, else: {settings['c_model']}"
        net_doc = {
            "netlist": net.path,
            "vary": names,
            "node": spec.node,
            "quantity": quantity.kind,
            "level": quantity.level,
            "level_is_volts": quantity.level_is_volts,
        }
        notes = []
        if len(candidates) < spec.top and spec.rank != "error":
            notes.append(
                f"{len(candidates)} listed: the pool analysed holds the {len(rows)} designs nearest the "
                f"target (an equal share per mix of single parts and pairs); use --top with --rank error "
                f"for more nominal candidates."
            )
        from rcpick.textfiles import read_text

        extra = list(query_extra or []) + [("netlist", read_text(net.path), net.path)]
        result = FindResult(
            spec=spec,
            target=target,
            candidates=candidates,
            window=window,
            searched={f"{v.name}_combinations": len(v.combos) for v in varied},
            descriptions={
                "r": infos["R"].description,
                "c": infos["C"].description,
                "r_model": settings["r_model"],
                "c_model": settings["c_model"],
            },
            analysis={
                "rank": spec.rank,
                "rule": ranking.rule_text(spec.rank, target.limit, target.kind == "delay" and target.falling),
                "analysed": len(rows),
                "settings": settings,
                "stock": stock.path if stock else None,
            },
            warnings=list(net.warnings) + list(mdl.warnings),
            notes=notes,
            recommendation=recommendation(candidates, target, spec.rank, window),
            rule=ranking.rule_text(spec.rank, target.limit, target.kind == "delay" and target.falling),
            settings=resolved_settings(spec, plan),
            network=net_doc,
            query_extra=extra,
        )
    result.warnings = [_spell(w, spec) for w in result.warnings]
    return result


def _element_value(values: list[float], wiring: int, kind: str) -> float:
    if len(values) == 1:
        return values[0]
    rule = series_value if wiring == SERIES else parallel_value
    return float(rule(np.array(values[0]), np.array(values[1]), kind))


def _varied_value(design: NetDesign, names: list[str], letter: str) -> float:
    for name in names:
        if name[0].upper() == letter:
            ps = design.parts[name]
            return _element_value([p.value for p in ps], design.wiring[name], ps[0].kind)
    return 0.0


def _cost(design: NetDesign, names: list[str]) -> float:
    prices = [p.line.unit_price if p.line is not None else None for n in names for p in design.parts[n]]
    return float(sum(prices)) if prices and all(p is not None for p in prices) else math.nan  # type: ignore[arg-type]


def _value_text(part: NetPart) -> str:
    return format_si(part.value, "Ω" if part.kind == "resistance" else "F", 3, trim=True)
