"""A board file: every RC timing of one board, read and checked before anything is searched.

The file is TOML (docs/board.md)::

    name = "invented sensor hub"      # optional, for the outputs
    require = "yield"                 # or "worst-case"; --require wins
    pool = 10                         # designs per timing and source; --pool wins
    have = ["10K", "100n X7R 10%"]    # parts already on the board, or a stock file: have = "bom.csv"

    [defaults]                        # any key rcpick.toml takes
    temp = "-40:85"

    [[timing]]                        # one table per timing
    name = "power-on reset"
    count = 1                         # how many of it the board carries
    delay = "20ms"
    threshold = "2V"
    supply = "3.3V"

A timing takes one target (``tau``, ``cutoff``, ``delay`` with ``threshold``,
``supply``, ``falling``, ``from``, or ``period`` with ``thresholds``), may
override any default, and may sit in a netlist (``net``, ``vary``, ``node``).
Each timing's settings are layered, first given wins: its own table, the
command line (or the API's keywords), the board's ``[defaults]``, the project
file (``rcpick.toml``), the built-in defaults. File names (``net``, ``stock``,
``have``) are read relative to the board file's folder.
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path
from typing import Any

from rcpick import settings
from rcpick import stock as stocks
from rcpick.errors import BadValue, RcpickError
from rcpick.models import PartModel, annotated
from rcpick.notation import format_si, parse_quantity
from rcpick.results import Part, part_of
from rcpick.specs import FindSpec, Layer, Spec, _field, file_key_namer, file_value, read_toml

#: Keys of a board file's top level.
BOARD_KEYS = ("name", "require", "pool", "have", "defaults", "timing")
#: Keys only a timing table has.
TIMING_KEYS = ("name", "count")
#: Settings a timing may give beyond those rcpick.toml takes: its target and its netlist.
TIMING_SETTINGS = ("tau", "cutoff", "delay", "period", "threshold", "from_level", "thresholds", "falling", "leak")
NETWORK_SETTINGS = ("net", "vary", "node")
#: How many of one timing a board may carry.
MAX_COUNT = 1000
#: Above this many timings the default pool shrinks to AUTO_POOL_DESIGNS / timings (a given pool is kept).
AUTO_POOL_TIMINGS = 10
AUTO_POOL_DESIGNS = 100
#: Rankings a board's pools may use: both give every pool design a Monte Carlo run.
BOARD_RANKS = ("yield", "cost")


@dataclass(frozen=True)
class Timing:
    """One timing of a board: its name, how many the board carries, and its find request."""

    name: str
    count: int
    spec: FindSpec


@dataclass(frozen=True)
class HavePart:
    """A part already on the board (its line item costs nothing extra)."""

    text: str  # as written in the file, or the stock file's line
    part: Part
    model: PartModel
    line: stocks.StockPart | None = None

    @property
    def letter(self) -> str:
        return "R" if self.part.kind == "resistance" else "C"


@dataclass(frozen=True)
class BoardSpec(Spec):
    """A request of ``rcpick board`` / :func:`rcpick.board`: the file and the board-wide settings."""

    board_file: str | None = _field("board_file")
    require: str = _field("require")
    pool: int = _field("pool")


#: Settings the command line passes to every timing (between the timing's own table and [defaults]).
PASSED = ("min_yield", "samples", "seed", "boards", "spares")


@dataclass(frozen=True)
class Board:
    """A board file read and checked: its timings' specs, the parts it already has."""

    path: str
    text: str
    name: str | None
    require: str
    pool: int
    timings: tuple[Timing, ...]
    have: tuple[HavePart, ...]
    defaults: FindSpec  # [defaults] over the project file (no target): boards, spares and the have parts' models
    warnings: list[str] = field(default_factory=list)


def read_board(
    path: str | Path,
    *,
    passed: Layer | None = None,
    board_layer: Layer | None = None,
    config: Layer | None = None,
) -> Board:
    """Read and check a board file.

    ``passed``: the settings typed on the command line or given to the API for every timing (:data:`PASSED`);
    ``board_layer``: the typed board-wide settings (``require``, ``pool``); ``config``: the project file's layer.
    """
    from rcpick.textfiles import read_text

    path = Path(path)
    if path.is_dir():
        raise BadValue(f"{path} is a folder; give the board file (TOML) inside it", setting="board_file")
    if not path.is_file():
        raise BadValue(f"{path}: no such board file", setting="board_file")
    text = read_text(path)
    raw = read_toml(path)
    base = path.parent
    unknown = [k for k in raw if k not in BOARD_KEYS]
    if unknown:
        raise BadValue(f"{path}: unknown key {unknown[0]!r}; a board file has {', '.join(BOARD_KEYS)}")
    top = {k: raw[k] for k in ("require", "pool") if k in raw}
    file_top = Layer(top, str(path), file_key_namer(str(path)), in_file=True)
    board = BoardSpec.build(*(layer for layer in (board_layer, file_top) if layer is not None))
    tables_found = raw.get("timing")
    if not board.is_given("pool") and isinstance(tables_found, list) and len(tables_found) > AUTO_POOL_TIMINGS:
        # a large board: smaller pools keep the joint choice quick to prove (docs/board.md)
        object.__setattr__(board, "pool", max(settings.MIN_POOL, AUTO_POOL_DESIGNS // len(tables_found)))
    defaults_table = raw.get("defaults", {})
    if not isinstance(defaults_table, dict):
        raise BadValue(f"{path}: [defaults] must be a table of settings")
    defaults = _defaults_layer(path, defaults_table, base)
    default_spec = FindSpec.build(passed, defaults, config, partial=True)
    tables = raw.get("timing")
    if not isinstance(tables, list) or not tables or not all(isinstance(t, dict) for t in tables):
        raise BadValue(f"{path}: no timing: give one [[timing]] table per timing (name and a target)")
    timings = []
    seen: set[str] = set()
    for k, table in enumerate(tables, start=1):
        rank = table.get("rank") or defaults_table.get("rank") or "yield"
        fixed = Layer({"top": min(board.pool, settings.MAX_TOP), "rank": rank}, "board", key_namer)
        timing = _timing(path, k, table, base, [fixed, passed, defaults, config])
        if timing.name in seen:
            raise BadValue(f"{path}: timing {k}: the name {timing.name!r} is used twice; each timing needs its own")
        seen.add(timing.name)
        timings.append(timing)
    have = _have(path, raw.get("have"), base, default_spec)
    warnings = [
        f"have {h.text!r} reads as a {format_si(h.part.value, 'Ω', 3, trim=True)} resistor; a capacitor is "
        f'written "C {h.text}"'
        for h in have
        if h.letter == "R" and h.part.value < 1.0 and h.line is None
    ]
    name = raw.get("name")
    if name is not None and not isinstance(name, str):
        raise BadValue(f"{path}: key 'name' must be text, got {name!r}")
    return Board(str(path), text, name, board.require, board.pool, tuple(timings), have, default_spec, warnings)


def _defaults_layer(path: Path, table: dict, base: Path) -> Layer:
    from rcpick.specs import file_layer

    for key in ("top", "rank"):
        _refuse_ranking_key(f"{path}: [defaults]", key, table)
    from dataclasses import replace

    try:
        return replace(file_layer(path, table, base=base), source=f"{path}: [defaults]", namer=key_namer)
    except RcpickError as error:
        if "unknown key" in error.message:
            error.message = error.message.replace(f"{path}: unknown key", f"{path}: [defaults] has an unknown key", 1)
        if error.origin and error.origin.startswith(f"{path}: key"):
            error.origin = error.origin.replace(f"{path}: key", f"{path}: [defaults] key", 1)
        raise


def _refuse_ranking_key(where: str, key: str, table: dict) -> None:
    if key not in table:
        return
    if key == "top":
        raise BadValue(f"{where}: key 'top' does not apply to a board: it picks one design per timing (see 'pool')")
    if str(table[key]).strip().lower() not in BOARD_RANKS:
        raise BadValue(
            f"{where}: key 'rank' must be yield or cost on a board (every design of a pool gets a Monte Carlo run)"
        )


def _timing(path: Path, k: int, table: dict, base: Path, below: list[Layer | None]) -> Timing:
    """One [[timing]] table as a find request over the layers ``below`` it (the board's, the command line's,
    [defaults], the project file's)."""
    name = table.get("name")
    if not isinstance(name, str) or not name.strip():
        raise BadValue(f'{path}: timing {k} needs a name (name = "power-on reset")')
    name = name.strip()
    where = f"{path}: timing {name!r}"
    count = table.get("count", 1)
    if isinstance(count, bool) or not isinstance(count, int) or not 1 <= count <= MAX_COUNT:
        raise BadValue(f"{where}: key 'count' must be a whole number from 1 to {MAX_COUNT}, got {count!r}")
    for key in ("top", "rank"):
        _refuse_ranking_key(where, key, table)
    values: dict[str, Any] = {}
    allowed = TIMING_SETTINGS + NETWORK_SETTINGS
    for key, value in table.items():
        if key in TIMING_KEYS:
            continue
        setting = settings.BY_KEY.get(key)
        if setting is None or not (setting.in_files or setting.name in allowed):
            valid = " ".join(
                list(TIMING_KEYS) + [s.key for s in settings.SETTINGS.values() if s.in_files or s.name in allowed]
            )
            raise BadValue(f"{where}: unknown key {key!r}; valid keys: {valid}")
        if setting.name == "vary" and isinstance(value, list):
            value = ",".join(str(v) for v in value)
        at = f"{where}: key {key!r}"
        text = file_value(at, setting, value, base)
        try:
            setting.read(text)
        except RcpickError as error:
            error.origin = at
            raise
        values[setting.name] = text
    if not any(n in values for n in ("tau", "cutoff", "delay", "period")):
        raise BadValue(f"{where} has no target: give one of tau, cutoff, delay or period")

    own = Layer(values, where, key_namer, in_file=True)
    try:
        spec = FindSpec.build(below[0], own, *below[1:])
    except RcpickError as error:  # a clash between keys: named by the timing, the keys as the file writes them
        if error.origin is None:
            error.origin = where
            error.setting = None
        raise
    return Timing(name, count, spec)


def key_namer(setting: str) -> str:
    """A setting as a board file's key, quoted (``'r-max'``)."""
    return repr(settings.key_name(setting))


# --- parts already on the board -------------------------------------------------------------

_CAPACITANCE = re.compile(r"[pnuµ]|F$")


def _have(path: Path, raw: Any, base: Path, spec: FindSpec) -> tuple[HavePart, ...]:
    if raw is None:
        return ()
    mdl = spec.models(None, spec.r_series)
    if isinstance(raw, str):
        file = raw if Path(raw).is_absolute() or raw == stocks.DEMO else str((base / raw).resolve())
        try:
            stock = stocks.load(file)
        except RcpickError as error:
            error.origin = error.origin or f"{path}: key 'have'"
            raise
        out = []
        for line in stock.parts:
            default = mdl.r if line.kind == "resistance" else mdl.c
            model = stocks.part_model(line, default, aging_hours=mdl.aging_hours, loss=mdl.loss)
            out.append(
                HavePart(f"{stock.path} line {line.line}", part_of(line.kind, line.value, model, line), model, line)
            )
        return tuple(out)
    if not isinstance(raw, list) or not all(isinstance(v, str) for v in raw):
        raise BadValue(f'{path}: key \'have\' must be a list of parts (["10K", "100n X7R 10%"]) or a stock file name')
    return tuple(have_part(text, mdl, where=f"{path}: have") for text in raw)


def have_part(text: str, mdl, *, where: str = "have") -> HavePart:
    """One ``have`` entry: ``"10K"``, ``"4k7 1% 50ppm thin-film"``, ``"100n X7R 10%"``, ``"C 1m"``.

    The value's form tells its kind (``p``, ``n``, ``u``, ``µ`` or a closing ``F`` make a capacitor, anything
    else a resistor); a leading ``R`` or ``C`` says it outright. Annotations are those of a netlist line
    (docs/networks.md); what they leave out is the board's ``[defaults]`` model.
    """
    from rcpick.netlist import read_annotations

    tokens = text.split()
    if not tokens:
        raise BadValue(f'{where}: an empty entry; write a part such as "10K" or "100n X7R 10%"')
    letter = None
    if tokens[0] in ("R", "C") and len(tokens) > 1:
        letter, tokens = tokens[0], tokens[1:]
    value_text, notes = tokens[0], tokens[1:]
    if letter is None:
        letter = "C" if _CAPACITANCE.search(value_text) else "R"
    kind = "resistance" if letter == "R" else "capacitance"
    label = f"{where} {text!r}"
    try:
        value = parse_quantity(value_text, kind)
        params = read_annotations(letter, notes, label)
    except RcpickError as error:
        message = error.message if error.message.startswith(label) else f"{label}: {error.message}"
        raise BadValue(message) from None
    if "v0" in params:
        raise BadValue(f"{label}: a start voltage belongs to a netlist, not to a part on the board")
    model = annotated(letter, params, label, mdl.r, mdl.c, aging_hours=mdl.aging_hours, loss=mdl.loss)
    return HavePart(text, part_of(kind, value, model), model)
