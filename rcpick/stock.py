"""A team's stock or approved-parts list: reading it, and the parts it offers a position.

A stock file (CSV or XLSX) has one part per row. Required columns: ``kind``
(R or C) and ``value``; optional: ``tolerance``, ``tcr`` (R), ``dielectric``
(C), ``part_number``, ``unit_price``, ``on_hand``, ``package``, ``voltage``
(C rating). Every row is checked before anything is used; all problems are
reported together with their line and column.
"""

from __future__ import annotations

import csv
import math
from dataclasses import dataclass
from pathlib import Path

from rcpick import models
from rcpick.errors import BadValue, RcpickError
from rcpick.notation import parse_band, parse_ppm_band, parse_quantity

COLUMNS = ("kind", "value", "tolerance", "tcr", "dielectric", "part_number", "unit_price", "on_hand", "package", "voltage")
REQUIRED = ("kind", "value")
KINDS = {"r": "resistance", "resistor": "resistance", "c": "capacitance", "capacitor": "capacitance"}
#: IEC 60062 tolerance letters, as percent (facts.md §2). For small capacitors B, C, D can mean pF instead: not used here.
TOLERANCE_LETTERS = {"B": 0.1, "C": 0.25, "D": 0.5, "F": 1, "G": 2, "J": 5, "K": 10, "M": 20}
MAX_PROBLEMS_SHOWN = 5


@dataclass(frozen=True)
class StockPart:
    """One stocked part (SI values; None where the file left the column empty)."""

    kind: str
    value: float
    line: int
    tolerance: tuple[float, float] | None = None
    tcr: tuple[float, float] | None = None
    dielectric: str | None = None
    part_number: str = ""
    unit_price: float | None = None
    on_hand: int | None = None
    package: str = ""
    voltage: float | None = None

    @property
    def choice_key(self) -> tuple:
        """Order among parts of the same value: tightest tolerance, smallest TCR bound, lowest price, first line."""
        tol = (self.tolerance[1] - self.tolerance[0]) if self.tolerance else math.inf
        tcr = max(abs(self.tcr[0]), abs(self.tcr[1])) if self.tcr else math.inf
        price = self.unit_price if self.unit_price is not None else math.inf
        return tol, tcr, price, self.line


@dataclass(frozen=True)
class Stock:
    """The parts of one stock file."""

    path: str
    parts: tuple[StockPart, ...]

    def covers(self, kind: str) -> bool:
        return any(p.kind == kind for p in self.parts)

    def by_value(self, kind: str, low: float, high: float) -> dict[float, StockPart]:
        """One part per distinct value inside [low, high] (SI): the first by :attr:`StockPart.choice_key`."""
        chosen: dict[float, StockPart] = {}
        for part in sorted((p for p in self.parts if p.kind == kind), key=lambda p: p.choice_key):
            if low * (1 - 1e-9) <= part.value <= high * (1 + 1e-9):
                chosen.setdefault(part.value, part)
        return chosen

    def find(self, kind: str, value: float) -> StockPart | None:
        """The stocked part used for ``value`` (the same choice as :meth:`by_value`)."""
        matching = [p for p in self.parts if p.kind == kind and p.value == value]
        return min(matching, key=lambda p: p.choice_key) if matching else None


def _read_rows(path: Path) -> list[tuple[int, dict[str, str]]]:
    """(line number, {column: text}) for each non-empty row; header names lower-cased."""
    if path.suffix.lower() == ".xlsx":
        from openpyxl import load_workbook

        try:
            book = load_workbook(path, read_only=True, data_only=True)
        except Exception as error:  # openpyxl raises several kinds for a broken file
            raise BadValue(f"{path}: cannot read as XLSX ({error})") from None
        sheet = book.worksheets[0]
        numbered = [(n, ["" if c is None else str(c) for c in row])
                    for n, row in enumerate(sheet.iter_rows(values_only=True), start=1)]
        book.close()
    elif path.suffix.lower() == ".csv":
        with open(path, newline="", encoding="utf-8-sig") as handle:
            reader = csv.reader(handle)
            numbered = [(reader.line_num, row) for row in reader]
    else:
        raise BadValue(f"{path}: stock file must be .csv or .xlsx")
    # Lines starting with '#' are comments (for example the demo file's note).
    numbered = [(n, row) for n, row in numbered if not (row and row[0].lstrip().startswith("#"))]
    if not numbered:
        raise BadValue(f"{path}: the file is empty; it needs a header row with at least kind and value")
    header_line, header_row = numbered[0]
    rows = [header_row]
    header = [h.strip().lower().replace(" ", "_") for h in rows[0]]
    unknown = [h for h in header if h and h not in COLUMNS]
    if unknown:
        raise BadValue(f"{path} line {header_line}: unknown column(s) {', '.join(unknown)}; accepted: {', '.join(COLUMNS)}")
    missing = [c for c in REQUIRED if c not in header]
    if missing:
        raise BadValue(f"{path} line {header_line}: missing column(s) {', '.join(missing)}; required: {', '.join(REQUIRED)}")
    out = []
    for number, row in numbered[1:]:
        cells = {h: (row[i].strip() if i < len(row) else "") for i, h in enumerate(header) if h}
        if any(cells.values()):
            out.append((number, cells))
    return out


def _tolerance(text: str) -> tuple[float, float]:
    letter = text.strip().upper()
    if letter in TOLERANCE_LETTERS:
        half = TOLERANCE_LETTERS[letter] / 100
        return -half, half
    if letter == "Z":
        return -0.20, 0.80
    low, high = parse_band(text)
    if not (-1 < low <= 0 <= high < 1) or high - low <= 0:
        raise BadValue(f"tolerance {text!r} must be greater than 0 % and less than 100 %")
    return low, high


def _part(line: int, cells: dict[str, str]) -> StockPart:
    problems = []

    def field(column, convert):
        text = cells.get(column, "")
        if not text:
            return None
        try:
            return convert(text)
        except (RcpickError, ValueError) as error:
            message = error.message if isinstance(error, RcpickError) else str(error)
            problems.append(f"column {column}: {message}")
            return None

    kind = KINDS.get(cells.get("kind", "").lower())
    if kind is None:
        problems.append(f"column kind: {cells.get('kind', '')!r} is not R or C")
    value = field("value", lambda t: parse_quantity(t, kind, option=None)) if kind else None
    if kind and value is None and not any("column value" in p for p in problems):
        problems.append("column value: empty")
    if kind == "capacitance" and cells.get("tcr"):
        problems.append("column tcr: applies to R rows only (give a dielectric for C)")
    if kind == "resistance" and cells.get("dielectric"):
        problems.append("column dielectric: applies to C rows only")
    part = dict(
        tolerance=field("tolerance", _tolerance),
        tcr=field("tcr", parse_ppm_band) if kind == "resistance" else None,
        dielectric=field("dielectric", lambda t: models.dielectric(t).code) if kind == "capacitance" else None,
        unit_price=field("unit_price", _non_negative_float),
        on_hand=field("on_hand", _non_negative_int),
        voltage=field("voltage", lambda t: parse_quantity(t, "voltage")),
    )
    if problems:
        raise BadValue("; ".join(problems))
    return StockPart(kind, value, line, part_number=cells.get("part_number", ""), package=cells.get("package", ""), **part)


def _non_negative_float(text: str) -> float:
    value = float(text)
    if not (value >= 0 and math.isfinite(value)):
        raise ValueError(f"{text!r} must be a number ≥ 0")
    return value


def _non_negative_int(text: str) -> int:
    value = float(text)
    if not (value >= 0 and value == int(value)):
        raise ValueError(f"{text!r} must be a whole number ≥ 0")
    return int(value)


DEMO = "demo"


def load(path: str | Path) -> Stock:
    """Read and check a stock file; raise :class:`BadValue` naming every bad line and column.

    ``demo`` names the invented demo stock shipped with rcpick (data/demo-stock.csv).
    """
    if str(path) == DEMO:
        from rcpick.datafiles import data_dir

        path = data_dir() / "demo-stock.csv"
    path = Path(path)
    if not path.is_file():
        raise BadValue(f"{path}: no such file")
    parts, problems = [], []
    for line, cells in _read_rows(path):
        try:
            parts.append(_part(line, cells))
        except BadValue as error:
            problems.append(f"line {line}, {error.message}")
    if problems:
        shown = problems[:MAX_PROBLEMS_SHOWN]
        more = f"; and {len(problems) - len(shown)} more" if len(problems) > len(shown) else ""
        raise BadValue(f"{path}: {len(problems)} bad row(s): " + "; ".join(shown) + more)
    if not parts:
        raise BadValue(f"{path}: no part rows below the header")
    return Stock(str(path), tuple(parts))


def part_model(part: StockPart, default: models.PartModel, *, aging_hours: float | None, loss: float) -> models.PartModel:
    """The spread model of a stocked part: its own columns where given, ``default``'s otherwise."""
    if part.kind == "resistance":
        drift = models.linear(*part.tcr) if part.tcr else default.drift
        tol = part.tolerance or default.tolerance
        return models.PartModel(tol, drift, label=f"{part.part_number or 'stock'} line {part.line}",
                                name=default.name if not part.tcr else "stock TCR", part_number=part.part_number)
    if part.dielectric:
        diel = models.dielectric(part.dielectric)
        aging = models.aging_change(diel.aging_per_decade, aging_hours) if aging_hours else (0.0, 0.0)
        return models.PartModel(part.tolerance or diel.tolerance, diel.drift, aging, loss,
                                label=f"{part.part_number or 'stock'} line {part.line}", name=diel.code,
                                part_number=part.part_number)
    return models.PartModel(part.tolerance or default.tolerance, default.drift, default.aging, default.loss,
                            label=f"{part.part_number or 'stock'} line {part.line}", name=default.name,
                            part_number=part.part_number)
