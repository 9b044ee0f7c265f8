"""A team's stock or approved-parts list: reading it, and the parts it offers a position.

A stock file (CSV or XLSX, first sheet) has one part per row, a header row
first. Required columns: ``kind`` (R or C) and ``value``; optional:
``tolerance``, ``tcr`` (R), ``dielectric`` (C), ``part_number``,
``unit_price``, ``on_hand``, ``package``, ``voltage`` (C rating). Header
names are read without case, a space read as ``_`` (``Part Number``); an
unknown name, or the same name twice, is an error naming the columns.
Every row is checked before anything is used; all problems are reported
together (up to five shown), each with its file, line and column.

Reading:

* CSV is UTF-8 (a byte-order mark is skipped) or UTF-16 with its BOM; other
  bytes are refused naming the byte offset (:mod:`rcpick.textfiles`). Lines
  whose first character (after blanks) is ``#`` are comments; blank lines are
  skipped. Line numbers count every line of the file, comments included, and
  a row is named by the line it starts on.
* XLSX: the first sheet, line = spreadsheet row. A cell shows what it holds,
  except a number cell whose number format contains ``%`` (``0%``, ``0.00%``):
  it holds a fraction and shows it ×100, so 0.01 reads as ``1%`` in any
  column (a ``%`` in a number format multiplies the shown value by 100:
  ECMA-376 Part 1, §18.8.31 numFmt, from memory; openpyxl hands the format
  string over as ``cell.number_format``). A ``%`` inside quotes, after a
  backslash (``0.0\\%`` shows the number as it is with a % sign), after
  ``_`` or ``*``, or in brackets
  (``[$…]``) is a literal and does not scale (ECMA-376 Part 1 number format
  codes; from memory). Rows whose first cell starts with ``#`` are comments.

Tolerance (``tolerance`` column), the rule :func:`rcpick.settings.tolerance`
applies to ``--r-tol``: a bare number is percent (``1`` and ``1%`` are both
±1 %, ``0.01`` is ±0.01 %), in a CSV and in an XLSX cell without a percent
format alike; ``-20%:+80%`` is a range below and above nominal; a letter is
IEC 60062's (below, and ``Z`` for −20 %/+80 %). A symmetric tolerance lies
between ±0.001 % and ±50 % (a wider one is almost always a slip, 50 for 5,
or a fraction in a cell that was not formatted as percent); a range, or the
letter ``Z``, may reach up to (not including) 100 % on each side.

Numbers, in ASCII digits: ``unit_price`` is a finite number ≥ 0 (``0.004``,
``1e-3``); ``on_hand`` a whole number ≥ 0 read as ``--boards`` reads counts
(``5000``, ``5e3``, ``5k``, at most 10¹⁸). ``nan``, ``inf`` and ``1e400`` are
refused in both.
"""

from __future__ import annotations

import bisect
import csv
import io
import math
import re
from collections.abc import Callable, Iterable, Iterator
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from rcpick import models, settings
from rcpick.errors import BadValue, RcpickError
from rcpick.notation import parse_count, parse_ppm_band, parse_quantity
from rcpick.textfiles import read_text

COLUMNS = (
    "kind",
    "value",
    "tolerance",
    "tcr",
    "dielectric",
    "part_number",
    "unit_price",
    "on_hand",
    "package",
    "voltage",
)
REQUIRED = ("kind", "value")
KINDS = {"r": "resistance", "resistor": "resistance", "c": "capacitance", "capacitor": "capacitance"}
#: IEC 60062:2016 tolerance letters, as percent. For small capacitors B, C, D can mean pF instead: not used here.
TOLERANCE_LETTERS = {"B": 0.1, "C": 0.25, "D": 0.5, "F": 1, "G": 2, "J": 5, "K": 10, "M": 20}
#: IEC 60062 letter Z: −20 % / +80 % (value from memory, as the docs table gives it): a range, so it may pass ±50 %.
Z_RANGE = (-0.20, 0.80)
MAX_PROBLEMS_SHOWN = 5
#: Distinct cell texts remembered per file when the same tolerance, TCR or price repeats down a column.
_MEMO_LIMIT = 4096


@dataclass(frozen=True, slots=True)
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
    #: kind → value → the lines of that value, in file order
    _index: dict = field(default_factory=dict, compare=False, repr=False)
    #: kind → its distinct values, ascending (for range look-ups by bisection)
    _sorted: dict = field(default_factory=dict, compare=False, repr=False)

    def __post_init__(self) -> None:
        for part in self.parts:
            self._index.setdefault(part.kind, {}).setdefault(part.value, []).append(part)
        for kind, by_value in self._index.items():
            self._sorted[kind] = sorted(by_value)

    def covers(self, kind: str) -> bool:
        return kind in self._index

    def lines(self, kind: str, value: float) -> list[StockPart]:
        """Every stocked line of one value, in file order."""
        return self._index.get(kind, {}).get(value, [])

    def values(self, kind: str, low: float, high: float, ask: Ask = Ask()) -> list[float]:
        """Distinct stocked values inside [low, high] (SI) with at least one line meeting ``ask``, ascending."""
        keys = self._sorted.get(kind)
        if not keys:
            return []
        lines = self._index[kind]
        start = bisect.bisect_left(keys, low * (1 - 1e-9))
        stop = bisect.bisect_right(keys, high * (1 + 1e-9))
        return [v for v in keys[start:stop] if any(ask.met_by(p) for p in lines[v])]

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


# --- reading the rows of a file -------------------------------------------------------


def _csv_rows(path: Path) -> Iterator[tuple[int, list[str]]]:
    """(line the row starts on, cells) for every row of a CSV, comment lines as empty rows."""
    text = read_text(path)
    record_start = [True]  # the next line the csv reader asks for begins a row

    def lines() -> Iterator[str]:
        for line in io.StringIO(text, newline=""):
            starts, record_start[0] = record_start[0], False
            # a comment only where a row would begin: a '#' inside a quoted cell spanning lines is data
            yield "\n" if starts and line.lstrip().startswith("#") else line

    reader = csv.reader(lines(), strict=True)
    last = 0
    try:
        for row in reader:
            start, last = last + 1, reader.line_num
            record_start[0] = True
            yield start, row
    except csv.Error as error:
        raise BadValue(f"{path} line {last + 1}: not valid CSV ({error})") from None


#: Parts of a number format that are shown as written, not read as codes: "text", \c, _c, *c, [..].
_FORMAT_LITERALS = re.compile(r'"[^"]*"?|\\.|[_*].|\[[^\]]*\]?')


def percent_format(number_format: str | None) -> bool:
    """Whether an XLSX number format shows numbers as percentages (a ``%`` that is not a literal)."""
    if not number_format:
        return False
    return "%" in _FORMAT_LITERALS.sub("", number_format)


def _cell_text(cell: Any) -> str:
    """An XLSX cell as the text it shows (a percent-formatted number ×100 with a % sign)."""
    value = cell.value
    if value is None:
        return ""
    if (
        isinstance(value, (int, float))
        and not isinstance(value, bool)
        and math.isfinite(value)
        and percent_format(cell.number_format)
    ):
        return f"{value * 100:.12g}%"
    return str(value)


def _xlsx_rows(path: Path) -> Iterator[tuple[int, list[str]]]:
    """(spreadsheet row, cells) for every row of the first sheet."""
    from openpyxl import load_workbook

    try:
        book = load_workbook(path, read_only=True, data_only=True)
    except Exception as error:  # openpyxl raises several kinds for a broken file
        raise BadValue(f"{path}: cannot read as XLSX ({error})") from None
    try:
        if not book.worksheets:
            raise BadValue(f"{path}: the workbook has no worksheet")
        for number, row in enumerate(book.worksheets[0].iter_rows(), start=1):
            cells = [_cell_text(c) for c in row]
            if cells and cells[0].lstrip().startswith("#"):
                cells = []
            yield number, cells
    except RcpickError:
        raise
    except Exception as error:  # a sheet broken inside the archive shows only while its rows are read
        raise BadValue(f"{path}: cannot read as XLSX ({error})") from None
    finally:
        book.close()


def _rows(path: Path) -> Iterator[tuple[int, list[str]]]:
    suffix = path.suffix.lower()
    if suffix == ".xlsx":
        return _xlsx_rows(path)
    if suffix == ".csv":
        return _csv_rows(path)
    raise BadValue(f"{path}: stock file must be .csv or .xlsx")


def _header(path: Path, line: int, row: list[str]) -> list[str]:
    """The column names of the header row (lower case, spaces as _), checked."""
    header = [h.strip().lower().replace(" ", "_") for h in row]
    unknown = [(i, h) for i, h in enumerate(header, start=1) if h and h not in COLUMNS]
    if unknown:
        listed = ", ".join(f"{h} (column {i})" for i, h in unknown)
        raise BadValue(f"{path} line {line}: unknown column(s) {listed}; accepted: {', '.join(COLUMNS)}")
    first: dict[str, int] = {}
    for i, h in enumerate(header, start=1):
        if h in first:
            raise BadValue(f"{path} line {line}: columns {first[h]} and {i} are both {h!r}; keep one of them")
        if h:
            first[h] = i
    missing = [c for c in REQUIRED if c not in first]
    if missing:
        raise BadValue(f"{path} line {line}: missing column(s) {', '.join(missing)}; required: {', '.join(REQUIRED)}")
    return header


def _table(path: Path) -> Iterator[tuple[int, dict[str, str], list[tuple[int, str]]]]:
    """(line, {column: text}, [(column number, text)] of cells under no heading) for each non-empty row below
    the header."""
    rows = _rows(path)
    header: list[str] | None = None
    named: list[tuple[int, str]] = []
    for number, row in rows:
        if not any(c.strip() for c in row):
            continue
        if header is None:
            header = _header(path, number, row)
            named = [(i, h) for i, h in enumerate(header) if h]
            continue
        width = len(row)
        cells = {h: row[i].strip() for i, h in named if i < width}
        stray = [
            (i + 1, text.strip()) for i, text in enumerate(row) if (i >= len(header) or not header[i]) and text.strip()
        ]
        yield number, cells, stray
    if header is None:
        raise BadValue(f"{path}: the file is empty; it needs a header row with at least kind and value")


# --- checking one row ----------------------------------------------------------------


def _tolerance(text: str) -> tuple[float, float]:
    """A tolerance cell: an IEC 60062 letter, or as ``--r-tol`` reads it (module docstring)."""
    letter = text.strip().upper()
    if letter in TOLERANCE_LETTERS:
        half = TOLERANCE_LETTERS[letter] / 100
        return -half, half
    if letter == "Z":
        return Z_RANGE
    return settings.tolerance(text)


_NUMBER = re.compile(r"[+-]?(?:\d+\.?\d*|\.\d+)(?:[eE][+-]?\d+)?", re.ASCII)


def _number(text: str, what: str) -> float:
    """A plain number in ASCII digits (no nan, inf, '1_000' or other scripts' digits, which float() takes)."""
    if not _NUMBER.fullmatch(text):
        raise ValueError(f"{text!r} is not {what}")
    value = float(text)
    if not math.isfinite(value):
        raise ValueError(f"{text!r} is too large; expected {what}")
    return value


def _non_negative_float(text: str) -> float:
    value = _number(text, "a number ≥ 0")
    if value < 0:
        raise ValueError(f"{text!r} must be a number ≥ 0")
    return value


def _non_negative_int(text: str) -> int:
    """A count as --boards reads it (20000, 2e4, 20k; at most 10¹⁸), and not below 0."""
    value = parse_count(text, what="a whole number ≥ 0")
    if value < 0:
        raise ValueError(f"{text!r} must be a whole number ≥ 0")
    return value


def _dielectric(text: str) -> str:
    return models.dielectric(text).code


def _voltage(text: str) -> float:
    return parse_quantity(text, "voltage")


#: Optional columns read the same on every row: (column, reader, kind it applies to or None for both)
_READERS: tuple[tuple[str, Callable[[str], Any], str | None], ...] = (
    ("tolerance", _tolerance, None),
    ("tcr", parse_ppm_band, "resistance"),
    ("dielectric", _dielectric, "capacitance"),
    ("unit_price", _non_negative_float, None),
    ("on_hand", _non_negative_int, None),
    ("voltage", _voltage, None),
)


class _RowReader:
    """Checks rows one by one, remembering the reading of texts that repeat down a column."""

    def __init__(self) -> None:
        self._memo: dict[tuple[str, str], tuple[bool, Any]] = {}
        self._packages: dict[str, str] = {}

    def _read(self, column: str, text: str, convert: Callable[[str], Any]) -> tuple[bool, Any]:
        key = (column, text)
        found = self._memo.get(key)
        if found is None:
            try:
                found = (True, convert(text))
            except (RcpickError, ValueError) as error:
                found = (False, error.message if isinstance(error, RcpickError) else str(error))
            if len(self._memo) < _MEMO_LIMIT:
                self._memo[key] = found
        return found

    def part(self, line: int, cells: dict[str, str], stray: Iterable[tuple[int, str]] = ()) -> StockPart:
        """One row as a part; raise :class:`BadValue` naming every bad column."""
        problems = [f"column {i}: {text!r} is under no heading" for i, text in stray]
        kind_text = cells.get("kind", "")
        kind = KINDS.get(kind_text.lower())
        if kind is None:
            problems.append(f"column kind: {kind_text!r} is not R or C" if kind_text else "column kind: empty")
        value = None
        value_text = cells.get("value", "")
        if not value_text:
            problems.append("column value: empty")
        elif kind:
            try:
                value = parse_quantity(value_text, kind)
            except RcpickError as error:
                problems.append(f"column value: {error.message}")
        if kind == "capacitance" and cells.get("tcr"):
            problems.append("column tcr: applies to R rows only (give a dielectric for C)")
        if kind == "resistance" and cells.get("dielectric"):
            problems.append("column dielectric: applies to C rows only")
        read: dict[str, Any] = {}
        for column, convert, only in _READERS:
            text = cells.get(column, "")
            if not text or (only is not None and kind != only):
                continue
            ok, result = self._read(column, text, convert)
            if ok:
                read[column] = result
            else:
                problems.append(f"column {column}: {result}")
        if problems or kind is None or value is None:  # kind or value missing always left a problem
            raise BadValue("; ".join(problems))
        package = cells.get("package", "")
        if len(self._packages) < _MEMO_LIMIT:  # one string for a package named on many rows
            package = self._packages.setdefault(package, package)
        return StockPart(
            kind,
            value,
            line,
            part_number=cells.get("part_number", ""),
            package=package,
            **read,
        )


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
    parts: list[StockPart] = []
    shown: list[str] = []
    bad = 0
    reader = _RowReader()
    for line, cells, stray in _table(path):
        try:
            parts.append(reader.part(line, cells, stray))
        except BadValue as error:
            bad += 1
            if len(shown) < MAX_PROBLEMS_SHOWN:
                shown.append(f"line {line}, {error.message}")
    if bad:
        more = f"; and {bad - len(shown)} more" if bad > len(shown) else ""
        raise BadValue(f"{path}: {bad} bad row(s): " + "; ".join(shown) + more)
    if not parts:
        raise BadValue(f"{path}: no part rows below the header")
    return Stock(str(path), tuple(parts))


def part_model(
    part: StockPart, default: models.PartModel, *, aging_hours: float | None, loss: float
) -> models.PartModel:
    """The spread model of a stocked part: its own columns where given, ``default``'s otherwise."""
    if part.kind == "resistance":
        drift = models.linear(*part.tcr) if part.tcr else default.drift
        tol = part.tolerance or default.tolerance
        return models.PartModel(
            tol,
            drift,
            label=f"{part.part_number or 'stock'} line {part.line}",
            name=default.name,  # the technology; a stocked TCR changes the drift, not the name
            part_number=part.part_number,
        )
    if part.dielectric:
        diel = models.dielectric(part.dielectric)
        aging = models.aging_change(diel.aging_per_decade, aging_hours) if aging_hours else (0.0, 0.0)
        return models.PartModel(
            part.tolerance or diel.tolerance,
            diel.drift,
            aging,
            loss,
            label=f"{part.part_number or 'stock'} line {part.line}",
            name=diel.code,
            part_number=part.part_number,
        )
    return models.PartModel(
        part.tolerance or default.tolerance,
        default.drift,
        default.aging,
        default.loss,
        label=f"{part.part_number or 'stock'} line {part.line}",
        name=default.name,
        part_number=part.part_number,
    )
