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
from dataclasses import dataclass, field
from pathlib import Path

from rcpick import models
from rcpick.errors import BadValue, RcpickError
from rcpick.notation import parse_band, parse_ppm_band, parse_quantity

COLUMNS = ("kind", "value", "tolerance", "tcr", "dielectric", "part_number", "unit_price", "on_hand", "package", "voltage")
REQUIRED = ("kind", "value")
KINDS = {"r": "resistance", "resistor": "resistance", "c": "capacitance", "capacitor": "capacitance"}
#: IEC 60062:2016 tolerance letters, as percent. For small capacitors B, C, D can mean pF instead: not used here.
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
class Ask:
    """What the engineer asked of a position's parts; stock lines that do not meet it are not used.

    ``tolerance`` is the widest side allowed (a fraction), ``tcr`` the largest coefficient bound in size
    (1/°C), ``dielectric`` the code asked; None where nothing was asked.
    """

    tolerance: float | None = None
    tcr: float | None = None
    dielectric: str | None = None

    def met_by(self, part: StockPart) -> bool:
        if self.tolerance is not None and part.tolerance is not None:
            if max(-part.tolerance[0], part.tolerance[1]) > self.tolerance * (1 + 1e-9):
                return False
        if self.tcr is not None and part.tcr is not None:
            if max(abs(part.tcr[0]), abs(part.tcr[1])) > self.tcr * (1 + 1e-9):
                return False
        if self.dielectric is not None and part.dielectric is not None and part.dielectric != self.dielectric:
            return False
        return True


@dataclass(frozen=True)
class Stock:
    """The parts of one stock file, indexed by kind and value once."""

    path: str
    parts: tuple[StockPart, ...]
    _index: dict = field(default_factory=dict, compare=False, repr=False)

    def __post_init__(self) -> None:
        for part in self.parts:
            self._index.setdefault(part.kind, {}).setdefault(part.value, []).append(part)

    def covers(self, kind: str) -> bool:
        return kind in self._index

    def lines(self, kind: str, value: float) -> list[StockPart]:
        """Every stocked line of one value, in file order."""
        return self._index.get(kind, {}).get(value, [])

    def values(self, kind: str, low: float, high: float, ask: Ask = Ask()) -> list[float]:
        """Distinct stocked values inside [low, high] (SI) with at least one line meeting ``ask``, ascending."""
        return sorted(v for v, lines in self._index.get(kind, {}).items()
                      if low * (1 - 1e-9) <= v <= high * (1 + 1e-9) and any(ask.met_by(p) for p in lines))

    def choose(self, kind: str, value: float, need: int = 1, ask: Ask = Ask()) -> StockPart | None:
        """The line a part of ``value`` is taken from (docs/purchasing.md).

        Among the lines meeting ``ask``, those with ``need`` or more on hand (or no count given) come first,
        the cheapest of them (a line without a price after priced ones), then the tightest tolerance, then the
        first in the file. When no line covers the need, the one with the most on hand.
        """
        usable = [p for p in self.lines(kind, value) if ask.met_by(p)]
        if not usable:
            return None
        covering = [p for p in usable if p.on_hand is None or p.on_hand >= need]
        if covering:
            return min(covering, key=lambda p: (p.unit_price if p.unit_price is not None else math.inf,) + p.choice_key)
        return max(usable, key=lambda p: (p.on_hand or 0, -(p.unit_price or 0.0), -p.line))


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
    value = field("value", lambda t: parse_quantity(t, kind)) if kind else None
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
