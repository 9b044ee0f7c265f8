"""What rcpick's functions return: candidates and designs as plain dataclasses.

Every result has ``to_dict()`` (exactly the JSON document the command prints
with ``--format json``, schema in docs/json.md), and the search results
``to_frame()`` (a pandas DataFrame, one row per candidate, SI units in the
column names), ``save()`` (XLSX or CSV shortlist, order and query sheets) and
``plot()`` (PNG). Numbers that were not computed (a level never reached, an
unknown price) are ``None``, never NaN or infinity.
"""

from __future__ import annotations

import math
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from rcpick.notation import format_ppm, format_rkm, format_si

SCHEMA_VERSION = 2


def finite(value: float | None) -> float | None:
    """A float for output: None when missing or not finite."""
    if value is None:
        return None
    value = float(value)
    return value if math.isfinite(value) else None


@dataclass(frozen=True)
class Part:
    """One physical part: value, model, and the stock line it comes from (if any)."""

    kind: str
    value: float
    tolerance: tuple[float, float]
    tcr_ppm_per_c: tuple[float, float] | None = None
    technology: str | None = None
    dielectric: str | None = None
    part_number: str | None = None
    stock_line: int | None = None
    package: str | None = None
    unit_price: float | None = None
    on_hand: int | None = None
    voltage_v: float | None = None

    @property
    def rkm(self) -> str:
        return format_rkm(self.value, self.kind)

    def to_dict(self) -> dict:
        out: dict[str, Any] = {"value": self.value, "rkm": self.rkm, "tolerance": list(self.tolerance)}
        if self.kind == "resistance":
            out["tcr_ppm_per_c"] = list(self.tcr_ppm_per_c) if self.tcr_ppm_per_c else None
            out["technology"] = self.technology
        else:
            out["dielectric"] = self.dielectric
        out["part_number"] = self.part_number
        out["stock"] = (
            None
            if self.stock_line is None
            else {
                "line": self.stock_line,
                "package": self.package or None,
                "unit_price": self.unit_price,
                "on_hand": self.on_hand,
                "voltage_v": self.voltage_v,
            }
        )
        return out


def part_of(kind: str, value: float, model, line=None) -> Part:
    """A :class:`Part` from a value, its :class:`~rcpick.models.PartModel` and its stock line."""
    tcr = None
    if kind == "resistance" and model.drift.shared:
        tcr = (format_ppm(model.drift.cold[0]), format_ppm(model.drift.cold[1]))
    return Part(
        kind,
        float(value),
        tuple(model.tolerance),
        tcr,
        technology=model.name if kind == "resistance" else None,
        dielectric=model.name if kind == "capacitance" else None,
        part_number=model.part_number or None,
        stock_line=line.line if line is not None else None,
        package=line.package if line is not None else None,
        unit_price=line.unit_price if line is not None else None,
        on_hand=line.on_hand if line is not None else None,
        voltage_v=line.voltage if line is not None else None,
    )


ARRANGEMENTS = ("single", "series", "parallel")


@dataclass(frozen=True)
class Position:
    """One position of a design (R or C, or a varied network element): one part or a wired pair."""

    kind: str
    value: float
    arrangement: str
    parts: tuple[Part, ...]

    @property
    def text(self) -> str:
        """RKM text with its wiring: ``4K7``, ``4K7 + 330R``, ``10K ∥ 10K``."""
        joiner = {"series": " + ", "parallel": " ∥ "}.get(self.arrangement, "")
        return joiner.join(p.rkm for p in self.parts)

    @property
    def unit_key(self) -> str:
        return "ohm" if self.kind == "resistance" else "farad"

    def to_dict(self) -> dict:
        key = self.unit_key
        return {
            key: self.value,
            "arrangement": self.arrangement,
            f"parts_{key}": [p.value for p in self.parts],
            "text": self.text,
            "parts_detail": [p.to_dict() for p in self.parts],
        }


@dataclass(frozen=True)
class Spread:
    """The spread of one design, in the target's unit; yields are fractions."""

    worst_min: float | None
    worst_max: float | None
    p_low: float | None
    p_median: float | None
    p_high: float | None
    sigma: float | None
    yield_: float | None = None
    yield_ci: tuple[float, float] | None = None
    never: int = 0

    def to_dict(self) -> dict:
        return {
            "worst_min": self.worst_min,
            "worst_max": self.worst_max,
            "p_low": self.p_low,
            "p_median": self.p_median,
            "p_high": self.p_high,
            "sigma": self.sigma,
            "yield": self.yield_,
            "yield_ci": list(self.yield_ci) if self.yield_ci is not None else None,
            "never": self.never,
        }


@dataclass(frozen=True)
class Candidate:
    """One listed design of a search."""

    rank: int
    value: float
    error: float
    parts: int
    spread: Spread
    r: Position | None = None
    c: Position | None = None
    tau_s: float | None = None
    elements: dict[str, Position] = field(default_factory=dict)
    cost_per_board: float | None = None
    flags: tuple[str, ...] = ()
    stress: dict | None = None

    def to_dict(self) -> dict:
        out: dict[str, Any] = {"rank": self.rank}
        if self.tau_s is not None:
            out["tau_s"] = self.tau_s
        out.update(value=finite(self.value), error=finite(self.error), parts=self.parts)
        if self.elements:
            out["elements"] = {name: pos.to_dict() for name, pos in self.elements.items()}
        if self.r is not None:
            out["r"] = self.r.to_dict()
        if self.c is not None:
            out["c"] = self.c.to_dict()
        out["spread"] = self.spread.to_dict()
        out["cost_per_board"] = finite(self.cost_per_board)
        if self.stress is not None:
            out["stress"] = self.stress
        out["flags"] = list(self.flags)
        return out

    @property
    def wiring(self) -> str:
        """``R | C`` text of the design (``10K | 1u``), or the varied elements of a network."""
        if self.elements:
            return " | ".join(f"{name} {pos.text}" for name, pos in self.elements.items())
        return " | ".join(p.text for p in (self.r, self.c) if p is not None)


def target_dict(target, window: tuple[float, float] | None) -> dict:
    """The ``target`` member of the JSON documents."""
    out: dict[str, Any] = {"kind": target.kind, "value": target.value, "unit": target.unit, "tau_s": target.tau_s}
    if target.kind == "delay" and target.threshold is not None:
        out.update(threshold=target.threshold, start=target.start_level, falling=target.falling)
    if target.kind == "period" and target.thresholds is not None:
        out["thresholds"] = list(target.thresholds)
    out["supply_v"] = target.scale_v
    out["leak_a"] = target.leak_a or None
    out["limit"] = target.limit
    if window is not None:
        out["window"] = {"low": finite(window[0]), "high": finite(window[1])}
    return out


def flat_rows(document: dict) -> list[dict]:
    """One flat row per candidate, numbers in SI units with the unit in the column name (CSV, DataFrame)."""
    unit = document["target"]["unit"].lower()
    kind = document["target"]["kind"]
    rows = []
    for cand in document["candidates"]:
        row: dict[str, Any] = {"rank": cand["rank"]}
        for pos, sym, key in (("r", "r", "ohm"), ("c", "c", "farad")):
            p = cand.get(pos)
            if p is None:
                continue
            row[f"{sym}_wiring"] = p["text"]
            row[f"{sym}_arrangement"] = p["arrangement"]
            row[f"{sym}_{key}"] = p[key]
            parts = p[f"parts_{key}"]
            row[f"{sym}1_{key}"] = parts[0]
            row[f"{sym}2_{key}"] = parts[1] if len(parts) > 1 else None
        if "tau_s" in cand:
            row["tau_s"] = cand["tau_s"]
        if kind != "tau" or "tau_s" not in cand:
            row[f"{kind}_{unit}"] = cand["value"]
        row["error"] = cand["error"]
        sp = cand["spread"]
        for name in ("worst_min", "worst_max", "p_low", "p_median", "p_high", "sigma"):
            row[f"{name}_{unit}"] = sp[name]
        row["yield"] = sp["yield"]
        ci = sp.get("yield_ci") or [None, None]
        row["yield_low"], row["yield_high"] = ci
        row["parts"] = cand["parts"]
        row["cost_per_board"] = cand.get("cost_per_board")
        numbers = [d.get("part_number") for pos in ("r", "c") if cand.get(pos) for d in cand[pos]["parts_detail"]]
        if any(numbers):
            row["part_numbers"] = " ".join(n or "-" for n in numbers)
        rows.append(row)
    return rows


def stamp_rows() -> list[tuple[str, Any, str]]:
    """The first rows of every query sheet: the rcpick version and the date (UTC) the result was written."""
    import datetime

    from rcpick import __version__

    return [
        ("rcpick version", __version__, "rcpick"),
        ("date", datetime.datetime.now(datetime.UTC).isoformat(timespec="seconds"), "rcpick"),
    ]


class _Saves:
    """Export and pictures shared by the search results."""

    spec: Any
    query_extra: list[tuple[str, Any, str]]

    def to_dict(self) -> dict:  # pragma: no cover - defined by the subclasses
        raise NotImplementedError

    def to_frame(self):
        """A pandas DataFrame: one row per candidate, SI units in the column names (``tau_s``, ``r_ohm`` …)."""
        import pandas as pd

        return pd.DataFrame(flat_rows(self.to_dict()))

    def query_rows(self) -> list[tuple[str, Any, str]]:
        rows = stamp_rows() + [("seed used", self.spec.seed, "rcpick")]
        rows += list(self.query_extra)
        rows += self.settings_rows()
        return rows

    def settings_rows(self) -> list[tuple[str, Any, str]]:  # pragma: no cover - defined by the subclasses
        raise NotImplementedError

    def _order_rows(self, boards, spares, n_boards: int, extra: float) -> list[tuple[str, Any, str]]:
        """The query rows, with the order quantities as used (given to save(), else the request's)."""
        rows = []
        for key, value, source in self.query_rows():
            if key == "boards" and boards is not None:
                value, source = n_boards, "save()"
            if key == "spares" and spares is not None:
                value, source = f"{extra * 100:g}%", "save()"
            rows.append((key, value, source))
        return rows

    def save(
        self,
        path: str | Path,
        *,
        boards: int | None = None,
        spares: float | str | None = None,
        order: tuple[int, ...] | list[int] | None = None,
        sheet: str | None = None,
        force: bool = False,
    ) -> Path:
        """Write the shortlist: ``.xlsx`` (sheets shortlist, order, query) or ``.csv`` (one sheet: ``sheet``).

        ``boards`` and ``spares`` default to the request's own; ``order`` lists the ranks whose parts go on the
        order sheet (default: rank 1). An existing file is replaced only with ``force``.
        """
        from rcpick import export
        from rcpick.settings import SETTINGS

        doc = self.to_dict()
        count = len(doc["candidates"])
        n_boards = SETTINGS["boards"].read(boards) if boards is not None else self.spec.boards
        extra = SETTINGS["spares"].read(spares) if spares is not None else self.spec.spares
        picks = export.check_ranks(list(order) if order else [1], count)
        sheets = {
            "shortlist": export.shortlist_rows(doc),
            "order": export.order_rows(doc, picks, n_boards, extra),
            "query": export.query_rows(self._order_rows(boards, spares, n_boards, extra)),
        }
        target = Path(path)
        export.check_target(target, force, sheet)
        if target.suffix.lower() == ".xlsx":
            export.write_xlsx(target, sheets, force)
        else:
            export.write_csv(target, sheets[sheet or "shortlist"], force)
        return target

    def plot(self, path: str | Path, *, force: bool = False) -> Path:
        """Draw a PNG of the result (needs matplotlib: ``pip install 'rcpick[plot]'``)."""
        from rcpick import plot

        self._draw(plot, Path(path), force)
        return Path(path)

    def _draw(self, plot, path: Path, force: bool) -> None:  # pragma: no cover - defined by the subclasses
        raise NotImplementedError

    def _repr_html_(self) -> str:
        frame = self.to_frame()
        return f"<p>{self._headline()}</p>" + frame.to_html(index=False, na_rep="")

    def __repr__(self) -> str:
        lines = [self._headline()]
        doc = self.to_dict()
        for cand in doc["candidates"][:10]:
            sp = cand["spread"]
            y = f"{sp['yield'] * 100:.1f} %" if sp.get("yield") is not None else "–"
            wiring = " | ".join(cand[p]["text"] for p in ("r", "c") if p in cand) or " | ".join(
                f"{n} {e['text']}" for n, e in cand.get("elements", {}).items()
            )
            lines.append(f"  {cand['rank']:>2}. {wiring:<28} error {cand['error'] * 100:+.3f} %  yield {y}")
        if len(doc["candidates"]) > 10:
            lines.append(f"  … {len(doc['candidates']) - 10} more (to_frame() lists them all)")
        return "\n".join(lines)

    def _headline(self) -> str:  # pragma: no cover - defined by the subclasses
        raise NotImplementedError


@dataclass(eq=False, repr=False)
class FindResult(_Saves):
    """The result of :func:`rcpick.find`: candidates best first, and how they were found."""

    spec: Any
    target: Any
    candidates: list[Candidate]
    window: tuple[float, float]
    searched: dict[str, int]
    descriptions: dict[str, str]
    analysis: dict
    warnings: list[str]
    notes: list[str]
    recommendation: str
    rule: str
    settings: list[tuple[str, Any, str]]
    network: dict | None = None
    query_extra: list[tuple[str, Any, str]] = field(default_factory=list)

    def to_dict(self) -> dict:
        doc: dict[str, Any] = {"schema": SCHEMA_VERSION, "target": target_dict(self.target, self.window)}
        if self.network is not None:
            doc["network"] = self.network
        doc["searched"] = dict(self.searched)
        doc["analysis"] = self.analysis
        doc["warnings"] = list(self.warnings)
        doc["recommendation"] = self.recommendation
        doc["candidates"] = [c.to_dict() for c in self.candidates]
        return doc

    @property
    def best(self) -> Candidate:
        """Rank 1."""
        return self.candidates[0]

    def settings_rows(self) -> list[tuple[str, Any, str]]:
        return list(self.settings)

    def _draw(self, plot, path: Path, force: bool) -> None:
        plot.shortlist_png(self.to_dict(), path, force)

    def _headline(self) -> str:
        return f"rcpick.find: {self.target.describe()}; {len(self.candidates)} candidate(s). {self.recommendation}"


@dataclass(eq=False, repr=False)
class SpreadResult(_Saves):
    """The result of :func:`rcpick.spread`: one design's worst case, Monte Carlo, yield and contributions."""

    spec: Any
    target: Any
    has_target: bool
    design: Candidate
    window: tuple[float, float] | None
    nominal: float
    contributions: dict[str, float | None]
    histogram: tuple[list[float], list[int]]
    histogram_units: int
    temperatures_c: list[float]
    reference_c: float
    analysis: dict
    warnings: list[str]
    settings: list[tuple[str, Any, str]]
    model_text: dict[str, str]
    period_parts: dict | None = None
    query_extra: list[tuple[str, Any, str]] = field(default_factory=list)

    @property
    def spread(self) -> Spread:
        return self.design.spread

    def to_dict(self) -> dict:
        d = self.design
        doc: dict[str, Any] = {
            "schema": SCHEMA_VERSION,
            "design": {"r": d.r.to_dict() if d.r else None, "c": d.c.to_dict() if d.c else None},
            "target": target_dict(self.target, self.window) if self.has_target else None,
            "quantity": self.target.kind if self.has_target else "tau",
            "unit": self.target.unit,
            "nominal": finite(self.nominal),
            "tau_s": d.tau_s,
        }
        if self.has_target:
            doc["error"] = finite(d.error)
        if self.period_parts is not None:
            doc["period"] = self.period_parts
        doc.update(
            {
                "spread": d.spread.to_dict(),
                "contributions": self.contributions,
                "histogram": {
                    "edges": self.histogram[0],
                    "counts": self.histogram[1],
                    "units": self.histogram_units,
                },
                "temperatures_c": self.temperatures_c,
                "reference_c": self.reference_c,
                "analysis": self.analysis,
                "warnings": list(self.warnings),
            }
        )
        if d.stress is not None:
            doc["stress"] = d.stress
        return doc

    def as_shortlist(self) -> dict:
        """The design as a one-candidate shortlist document, for export."""
        doc = self.to_dict()
        cand = self.design.to_dict()
        target = doc["target"] or {"kind": "tau", "value": doc["nominal"], "unit": "s", "tau_s": doc["tau_s"]}
        return {"target": target, "unit": doc["unit"], "candidates": [cand]}

    def to_frame(self):
        import pandas as pd

        return pd.DataFrame(flat_rows(self.as_shortlist()))

    def save(
        self,
        path: str | Path,
        *,
        boards: int | None = None,
        spares: float | str | None = None,
        order=None,
        sheet: str | None = None,
        force: bool = False,
    ) -> Path:
        """Write the design: ``.xlsx`` (shortlist, order and query sheets) or ``.csv`` (one sheet)."""
        from rcpick import export
        from rcpick.settings import SETTINGS

        doc = self.as_shortlist()
        n_boards = SETTINGS["boards"].read(boards) if boards is not None else self.spec.boards
        extra = SETTINGS["spares"].read(spares) if spares is not None else self.spec.spares
        sheets = {
            "shortlist": export.shortlist_rows(doc),
            "order": export.order_rows(doc, [1], n_boards, extra),
            "query": export.query_rows(self._order_rows(boards, spares, n_boards, extra)),
        }
        target = Path(path)
        export.check_target(target, force, sheet)
        if target.suffix.lower() == ".xlsx":
            export.write_xlsx(target, sheets, force)
        else:
            export.write_csv(target, sheets[sheet or "shortlist"], force)
        return target

    def settings_rows(self) -> list[tuple[str, Any, str]]:
        return list(self.settings)

    def _draw(self, plot, path: Path, force: bool) -> None:
        plot.spread_png(self.to_dict(), path, force)

    def _headline(self) -> str:
        sp = self.design.spread
        y = f", yield {sp.yield_ * 100:.1f} %" if sp.yield_ is not None else ""
        return (
            f"rcpick.spread: R = {self.design.r.text if self.design.r else '?'}, C = "
            f"{self.design.c.text if self.design.c else '?'}; nominal "
            f"{format_si(self.nominal, self.target.unit, 4)}{y}"
        )

    def _repr_html_(self) -> str:
        return f"<pre>{self.__repr__()}</pre>"

    def __repr__(self) -> str:
        sp = self.design.spread
        unit = self.target.unit
        rows = [self._headline()]
        for name, value in (
            ("worst case", (sp.worst_min, sp.worst_max)),
            ("MC 0.135 %…99.865 %", (sp.p_low, sp.p_high)),
        ):
            lo, hi = value
            rows.append(
                f"  {name:<20} {format_si(lo, unit, 4) if lo is not None else '–'} … "
                f"{format_si(hi, unit, 4) if hi is not None else '–'}"
            )
        return "\n".join(rows)


@dataclass(eq=False, repr=False)
class NetworkResult:
    """The result of :func:`rcpick.nodal`: order, time constants and step response of a netlist."""

    document: dict
    unreached: str | None = None  # the asked crossing does not exist: what the node does instead

    def to_dict(self) -> dict:
        return self.document

    @property
    def order(self) -> int:
        return int(self.document["order"])

    @property
    def time_constants_s(self) -> list[float]:
        return list(self.document["time_constants_s"])

    @property
    def step(self) -> dict | None:
        return self.document.get("step")

    def __repr__(self) -> str:
        taus = ", ".join(format_si(t, "s", 4) for t in self.time_constants_s) or "none"
        line = f"rcpick.network: {self.document['netlist']}: order {self.order}, time constants {taus}"
        step = self.step
        if step and step.get("t_threshold_s") is not None:
            line += (
                f"; {step['node']} reaches {format_si(step['threshold_v'], 'V', 4)} at "
                f"{format_si(step['t_threshold_s'], 's', 4)}"
            )
        return line

    def _repr_html_(self) -> str:
        return f"<pre>{self.__repr__()}</pre>"
