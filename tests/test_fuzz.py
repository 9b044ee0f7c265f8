"""Seeded fuzz of the command line, and every malformed input file in tests/fixtures.

Argument lists are drawn from a fixed seed (the same lists every run) over every
command: real option names (read from the settings registry, so a new option is
fuzzed too) with good values and bad ones (garbage, huge, tiny and non-finite
numbers, digits of other scripts, empty text), unknown options, missing values
and stray words. Whatever is typed, rcpick must answer in one of two ways:

* exit 0, with no ``nan`` or ``inf`` anywhere in its output and, for
  ``--format json``, strictly valid JSON (no NaN or Infinity);
* exit 2, with exactly one line on stderr starting ``rcpick: error: ``.

Never a traceback, never another exit code. Failures are collected and listed
together, each with the argument list that reproduces it.
"""

from __future__ import annotations

import json
import random
import re
import time
import traceback
from pathlib import Path

import pytest
from typer.testing import CliRunner

from rcpick.cli import app
from rcpick.specs import FindSpec, NetworkSpec, SpreadSpec

ROOT = Path(__file__).resolve().parents[1]
FIXTURES = "tests/fixtures"  # relative: the tests run from the project root (tests/conftest.py)
SEED = 60062
CASES = 1500
NETLISTS = sorted(p.relative_to(ROOT).as_posix() for p in (ROOT / "docs" / "examples").glob("*.cir"))


def _nodes(path: str) -> list[str]:
    """The node names of a netlist (second and third field of its element lines)."""
    lines = (ROOT / path).read_text(encoding="utf-8").splitlines()
    return sorted({n for line in lines if line[:1].isalpha() for n in line.split()[1:3]})


NODES = {path: _nodes(path) for path in NETLISTS}

# --- values ----------------------------------------------------------------------------

#: Bad (or at least odd) text for any option: each must be refused in one line, or read sensibly.
GARBAGE = [
    "",
    " ",
    "abc",
    "1e400",
    "-1e400",
    "5e-324",
    "1e-400",
    "2e308",
    "nan",
    "NaN",
    "-nan",
    "inf",
    "-inf",
    "Infinity",
    "∞",
    "٣",
    "١٠k",
    "１０",
    "１０k",
    "٣ms",
    "１０%",
    "0",
    "-0",
    "-1",
    "1e30",
    "1e-30",
    "10kk",
    "k",
    "%",
    "1%%",
    ":",
    "::",
    "1:2:3",
    "1/0",
    "0x10",
    "1_000",
    "1,5k",
    "10 k",
    "9" * 400,
    "1" + "0" * 400,
    "é",
    "µ",
    "💥",
    "--",
    "-",
    "+",
    "1e",
    ".",
    "0.",
    "1e+",
    "true",
    "None",
    "null",
    "[1, 2]",
    "{}",
    "'",
    '"',
    "\t",
    "10k\n",
    "E24;rm",
    "%s",
]

#: Realistic values per option; options without an entry get GENERIC ones.
GOOD = {
    "--tau": ["1ms", "10ms", "470us", "2.2s", "100ns", "0.001"],
    "--cutoff": ["1kHz", "1.5kHz", "50Hz", "10kHz"],
    "--delay": ["200ms", "10ms", "3s", "50ms"],
    "--period": ["1ms", "20ms", "100us"],
    "--threshold": ["70%", "0.5", "2.0V", "50%", "0.9"],
    "--from": ["0.1", "10%", "1V", "0"],
    "--thresholds": ["33%:67%", "1.1V:2.2V", "0.2:0.8"],
    "--supply": ["3.3V", "5", "400V", "12V"],
    "--leak": ["1uA", "-1uA", "10nA"],
    "--limit": ["upper", "lower"],
    "--window": ["10%", "-5%:+10%", "2%", "1%", "-1%:+1%"],
    "--r-series": ["E6", "E12", "E24", "E96", "E192", "e24"],
    "--r-min": ["1k", "100", "10k", "4K7"],
    "--r-max": ["1Meg", "100k", "10Meg", "1M"],
    "--r-parts": ["1", "2"],
    "--fix-r": ["10k", "4k7", "12.3k"],
    "--c-series": ["E3", "E6", "E12", "E24"],
    "--c-min": ["100p", "1n", "10n"],
    "--c-max": ["10u", "1u", "100n"],
    "--c-parts": ["1", "2"],
    "--fix-c": ["100n", "1u", "47n"],
    "--r-tol": ["1%", "0.1%", "-2%:+1%", "5%"],
    "--r-tcr": ["100ppm", "25ppm", "-250ppm:-50ppm"],
    "--r-tech": ["thick-film", "thin-film", "metal-film", "carbon-film"],
    "--c-tol": ["5%", "10%", "-20%:+80%"],
    "--dielectric": ["C0G", "NP0", "X7R", "X5R", "Y5V", "U2J", "PP", "PET", "ELECTROLYTIC"],
    "--c-tc": ["30ppm", "-870ppm:-630ppm"],
    "--c-bias-loss": ["30%", "0", "0.1"],
    "--c-age": ["87600", "1000h", "10"],
    "--temp": ["0:70", "-40:85", "25", "-55:125"],
    "--threshold-tol": ["3%", "1%"],
    "--dist": ["uniform", "normal"],
    "--samples": ["100", "200", "1e2", "2e2"],  # kept small: every case must stay cheap
    "--seed": ["1", "42", "0", "123456789"],
    "--lot-share": ["1", "0", "0.5", "50%"],
    "--rank": ["yield", "error", "spread", "cost"],
    "--top": ["1", "2", "3"],
    "--min-yield": ["95%", "0.9", "50%"],
    "--r-power": ["0.25W", "250mW", "1/4W"],
    "--r-voltage": ["200V", "50V"],
    "--c-voltage": ["50V", "16V"],
    "--derate": ["50%:80%", "60%"],
    "--stock": [
        "demo",
        f"{FIXTURES}/stock-bom.csv",
        f"{FIXTURES}/stock-utf16.csv",
        f"{FIXTURES}/stock-percent.xlsx",
        f"{FIXTURES}/stock-comment-quote.csv",
    ],
    "--boards": ["1", "500", "1e3"],
    "--spares": ["5%", "0", "10%"],
    "--net": NETLISTS,
    "--vary": ["R1", "C1"],
    "--node": ["out", "key", "rst", "node", "mid"],
    "--r": ["10k", "4k7+330", "10k//10k", "100k"],
    "--c": ["100n", "47n//47n", "47n+47n", "1u"],
    "--format": ["table", "json", "csv", "JSON"],
    "--config": [f"{FIXTURES}/config-bom.toml", f"{FIXTURES}/config-utf16.toml"],
    "--sheet": ["shortlist", "order"],
    "--order": ["1", "1,2"],
}
#: Values that are valid but at the edge of what an option takes (limits, tiny or huge, degenerate ranges).
EDGE = {
    "--tau": ["1ps", "1e6", "1ks"],
    "--cutoff": ["1nHz", "1THz", "0.001Hz"],
    "--delay": ["1ps", "1e5"],
    "--period": ["1ps", "1e5"],
    "--threshold": ["99.9999%", "0.0000001", "0.5mV", "0.001", "0.999"],
    "--from": ["49.9999999%", "99%", "0.999999"],
    "--thresholds": ["0.0001%:99.9999%", "49.99999%:50%"],
    "--supply": ["1e-3V", "1MV", "1uV"],
    "--leak": ["1fA", "1kA", "-1kA", "0"],
    "--window": ["-99.99%:+1000%", "0.001%", "-0.0001%:+0.0001%", "0%:1%"],
    "--r-min": ["1e-6", "1u"],
    "--r-max": ["1e15", "1P"],
    "--c-min": ["1e-18", "1a"],
    "--c-max": ["1e3", "1k"],
    "--fix-r": ["1e-6", "1e15"],
    "--fix-c": ["1e-15", "1e3"],
    "--r-tol": ["0.001%", "50%", "-99.9%:+99.9%"],
    "--c-tol": ["-99%:+99%", "50%", "0.001%"],
    "--r-tcr": ["100000ppm", "0ppm", "-100000ppm:100000ppm"],
    "--c-tc": ["0ppm", "100000ppm"],
    "--c-bias-loss": ["90%", "89.99%"],
    "--c-age": ["1", "1e7", "1h"],
    "--temp": ["-273.15:-273.15", "-273:1000", "1000", "-273.15"],
    "--threshold-tol": ["0.001%", "49%", "-1%:+50%"],
    "--samples": ["100"],
    "--seed": ["1e18", "999999999999999999"],
    "--lot-share": ["0.0001", "99.99%"],
    "--top": ["200", "1"],
    "--min-yield": ["0.0001%", "100%"],
    "--r-power": ["1uW", "1e6"],
    "--r-voltage": ["1uV", "1MV"],
    "--c-voltage": ["1uV", "1MV"],
    "--derate": ["1%:1%", "100%:100%", "0.0001%"],
    "--boards": ["1e7", "10000000"],
    "--spares": ["1000%", "0%", "0.0001%"],
    "--r": ["1e-6", "1e15", "1e15+1e15", "1u//1u"],
    "--c": ["1e-18", "1e3", "1e3//1e3", "1a+1a"],
}
GENERIC = ["1", "10k", "1ms", "5%"]
#: Files that exist but are the wrong thing, or do not exist.
BAD_FILES = ["nope.csv", "docs", "docs/examples", "pyproject.toml", "docs/examples/debounce.cir", f"{FIXTURES}/"]
STOCK_FIXTURES = sorted(f"{FIXTURES}/{p.name}" for p in (ROOT / FIXTURES).glob("stock-*"))
NET_FIXTURES = sorted(f"{FIXTURES}/{p.name}" for p in (ROOT / FIXTURES).glob("net-*"))
CONFIG_FIXTURES = sorted(f"{FIXTURES}/{p.name}" for p in (ROOT / FIXTURES).glob("config-*"))
UNKNOWN_OPTIONS = ["--bogus", "--tau-x", "-x", "--r_min", "--Tau", "--", "-", "--samples=", "--top=0", "--format=json"]
TARGETS = [["--tau"], ["--cutoff"], ["--delay", "--threshold"], ["--period", "--thresholds"]]
JSON_AS_ASKED = {"json"}
COMMANDS = {"find", "spread", "net", "values", "config"}

# --- options of each command ------------------------------------------------------------


def _options(spec) -> tuple[list[str], list[str]]:
    """(options taking a value, switches) of a spec, from the settings registry."""
    declared = spec.declared()
    return [s.flag_name for s in declared if not s.flag], [s.flag_name for s in declared if s.flag]


FIND_VALUES, FIND_SWITCHES = _options(FindSpec)
SPREAD_VALUES, SPREAD_SWITCHES = _options(SpreadSpec)
NET_VALUES = [s.flag_name for s in NetworkSpec.declared() if s.name != "file" and not s.flag]
FIND_VALUES += ["--format", "--out", "--sheet", "--order", "--plot", "--config"]
SPREAD_VALUES = [o for o in SPREAD_VALUES if o not in ("--r", "--c")] + [
    "--format",
    "--out",
    "--sheet",
    "--plot",
    "--config",
]
FIND_SWITCHES += ["--force"]
SPREAD_SWITCHES += ["--force"]
CONFIG_VALUES = [o for o in FIND_VALUES if o not in ("--out", "--sheet", "--order", "--plot")]
#: How often an option, once drawn, is kept: a network search is slow, files cost time to write, and options
#: that only make sense beside another (a target's parts, --sheet with --out) would otherwise make most runs
#: errors. Options not listed are always kept.
RARE = {
    "--net": 0.04,
    "--out": 0.25,
    "--plot": 0.15,
    "--format": 0.2,
    "--sheet": 0.2,
    "--order": 0.2,
    "--threshold": 0.2,
    "--from": 0.2,
    "--thresholds": 0.2,
    "--node": 0.2,
    "--vary": 0.2,
    "--leak": 0.3,
    "--tau": 0.1,
    "--cutoff": 0.1,
    "--delay": 0.1,
    "--period": 0.1,
}


class Draw:
    """Draws argument lists from one seeded generator."""

    def __init__(self, seed: int, tmp: Path):
        self.rng = random.Random(seed)
        self.tmp = tmp
        self.case = 0

    def chance(self, p: float) -> bool:
        return self.rng.random() < p

    def pick(self, items):
        return self.rng.choice(items)

    def file_value(self, option: str) -> str:
        r = self.rng.random()
        if option == "--stock":
            pool = GOOD["--stock"] if r < 0.6 else STOCK_FIXTURES if r < 0.9 else BAD_FILES + GARBAGE[:6]
        elif option == "--config":
            pool = GOOD["--config"] if r < 0.3 else CONFIG_FIXTURES if r < 0.85 else BAD_FILES + GARBAGE[:6]
        elif option == "--net":
            pool = NETLISTS if r < 0.7 else NET_FIXTURES if r < 0.9 else BAD_FILES
        elif option == "--out":
            good = [str(self.tmp / f"case{self.case}.xlsx"), str(self.tmp / f"case{self.case}.csv")]
            pool = (
                good
                if r < 0.6
                else [str(self.tmp / "missing" / "x.xlsx"), str(self.tmp / "x.txt"), "", "docs", str(self.tmp)]
            )
        else:  # --plot
            pool = (
                [str(self.tmp / f"case{self.case}.png")]
                if r < 0.6
                else [str(self.tmp / "x.jpg"), "", str(self.tmp / "missing" / "x.png")]
            )
        return self.pick(pool)

    def value(self, option: str, bad: float = 0.2) -> str:
        if option in ("--stock", "--config", "--net", "--out", "--plot"):
            return self.file_value(option)
        if self.chance(bad):
            return self.pick(GARBAGE + [v.upper() for v in GOOD.get(option, GENERIC)])
        if option in EDGE and self.chance(0.2):
            return self.pick(EDGE[option])
        return self.pick(GOOD.get(option, GENERIC))

    def options(self, names: list[str], switches: list[str], count: int, bad: float = 0.2) -> list[str]:
        args: list[str] = []
        for _ in range(count):
            name = self.pick(names)
            if name in RARE and not self.chance(RARE[name]):
                continue
            args += [name, self.value(name, bad)]
        if switches and self.chance(0.1):
            args.append(self.pick(switches))
        return args

    def target(self) -> list[str]:
        r = self.rng.random()
        chosen = [] if r < 0.08 else self.pick(TARGETS) + (self.pick(TARGETS) if r > 0.94 else [])
        args: list[str] = []
        for name in chosen:
            args += [name, self.value(name, bad=0.15)]
        in_volts = any(a.upper().endswith("V") for a in args)
        if ("--threshold" in chosen or "--thresholds" in chosen) and self.chance(0.85 if in_volts else 0.15):
            args += ["--supply", self.value("--supply", bad=0.15)]
        return args

    def output_format(self, allowed: list[str]) -> list[str]:
        r = self.rng.random()
        if r < 0.45:
            return ["--format", "json"]
        if r < 0.75:
            return []
        if r < 0.95:
            return ["--format", self.pick(allowed)]
        return ["--format", self.pick(GARBAGE)]

    def mutate(self, args: list[str]) -> list[str]:
        """Now and then: an unknown option, a missing value, a stray word, a repeated option, help."""
        r = self.rng.random()
        if r < 0.05:
            args.insert(self.rng.randrange(len(args) + 1), self.pick(UNKNOWN_OPTIONS))
        elif r < 0.09 and args:
            args.append(self.pick([a for a in args if a.startswith("--")] or ["--tau"]))  # a value missing at the end
        elif r < 0.12:
            args.insert(self.rng.randrange(len(args) + 1), self.pick(["extra", "1ms", "E24", "-1"]))
        elif r < 0.15 and len(args) >= 2:
            i = self.rng.randrange(len(args) - 1)
            args += args[i : i + 2]
        elif r < 0.155:
            args.append(self.pick(["--help", "-h"]))
        elif r < 0.2:  # one option written --name=value, as many people type it
            pairs = [i for i in range(1, len(args) - 1) if args[i].startswith("--") and not args[i + 1].startswith("-")]
            if pairs:
                i = self.pick(pairs)
                args[i : i + 2] = [f"{args[i]}={args[i + 1]}"]
        return args

    def find(self) -> list[str]:
        args = ["find", "--samples", "100", "--top", self.pick(["1", "2", "3"])]  # cheap; a later value may override
        args += self.target()
        args += self.options(FIND_VALUES, FIND_SWITCHES, self.rng.randrange(0, 5))
        if "--net" in args:
            args += ["--vary", self.pick(["R1", "C1"])]
        return args + self.output_format(["table", "json", "csv"])

    def spread(self) -> list[str]:
        args = ["spread", "--samples", self.pick(["100", "200"])]
        for position in ("--r", "--c"):
            if not self.chance(0.03):
                args += [position, self.value(position, bad=0.1)]
        if self.chance(0.6):
            args += self.target()
        args += self.options(SPREAD_VALUES, SPREAD_SWITCHES, self.rng.randrange(0, 5))
        return args + self.output_format(["table", "json"])

    def net(self) -> list[str]:
        r = self.rng.random()
        file = self.pick(NETLISTS if r < 0.6 else NET_FIXTURES if r < 0.85 else BAD_FILES + ["", "٣.cir"])
        args = ["net"] + ([file] if not self.chance(0.03) else [])
        if self.chance(0.5):
            r = self.rng.random()
            nodes = NODES.get(file) if r < 0.7 else None
            args += ["--node", self.pick(nodes or (GOOD["--node"] + ["in", "0", "vdd", "sw"] if r < 0.9 else GARBAGE))]
        if self.chance(0.4):
            args += [
                "--threshold",
                self.pick(["2.0V", "50%", "0.7", "-1V", "1V", "10V"] if self.chance(0.7) else GARBAGE),
            ]
        args += self.options(NET_VALUES, [], self.rng.randrange(0, 2))
        return args + self.output_format(["table", "json"])

    def values(self) -> list[str]:
        series = ["E3", "E6", "E12", "E24", "E48", "E96", "E192"]
        args = ["values", self.pick(series) if self.chance(0.8) else self.pick(GARBAGE + ["E5", "e24", "E٢٤"])]
        quantities = ["1k", "10k", "4K7", "1n", "100n", "1u", "1Meg", "2u2", "100", "10p"]
        if self.chance(0.5):
            args += ["--around", self.pick(quantities) if self.chance(0.7) else self.pick(GARBAGE)]
        else:
            for option in ("--from", "--to"):
                if self.chance(0.6):
                    args += [option, self.pick(quantities) if self.chance(0.7) else self.pick(GARBAGE)]
        if self.chance(0.3):
            args += ["--part", self.pick(["resistor", "capacitor"] if self.chance(0.7) else GARBAGE)]
        return args + self.output_format(["table", "json", "csv"])

    def config(self) -> list[str]:
        args = ["config"]
        if self.chance(0.3):
            args += self.target()
        args += self.options(CONFIG_VALUES, FIND_SWITCHES[:-1], self.rng.randrange(0, 5))
        return args + self.output_format(["table", "json"])

    def next(self) -> list[str]:
        self.case += 1
        command = self.pick(
            [self.find, self.find, self.find, self.spread, self.spread, self.net, self.values, self.config]
        )
        return self.mutate(command())


# --- checking one run --------------------------------------------------------------------

NON_FINITE = re.compile(r"\b(nan|inf)\b", re.IGNORECASE)


def _reject_constant(name: str):
    raise ValueError(f"{name} is not JSON")


def asked_format(args: list[str]) -> str | None:
    """The --format a run was given (the last one, as the option parser keeps), None when help was asked."""
    if any(a in ("--help", "-h", "--version") for a in args):
        return None
    chosen = None
    for i, arg in enumerate(args):
        if arg == "--format" and i + 1 < len(args):
            chosen = args[i + 1].strip().lower()
        elif arg.startswith("--format="):
            chosen = arg.removeprefix("--format=").strip().lower()
    return chosen


def problems_of(args: list[str], result) -> list[str]:
    """What is wrong with one run (empty when it answered as it must)."""
    found = []
    stdout, stderr = result.stdout, result.stderr
    if result.exception is not None and not isinstance(result.exception, SystemExit):
        tb = "".join(traceback.format_exception(*result.exc_info)).strip().splitlines()
        found.append(f"raised {type(result.exception).__name__}: {result.exception} [{tb[-3:] if tb else ''}]")
    if result.exit_code not in (0, 2):
        found.append(f"exit code {result.exit_code}")
    if "Traceback" in stdout + stderr:
        found.append("a traceback in the output")
    if result.exit_code == 2:
        lines = stderr.splitlines()
        if len(lines) != 1 or not lines[0].startswith("rcpick: error: "):
            found.append(f"exit 2 without exactly one 'rcpick: error: ' line on stderr: {stderr[:300]!r}")
    if result.exit_code == 0:
        word = NON_FINITE.search(stdout)
        if word:
            around = stdout[max(0, word.start() - 60) : word.end() + 60]
            found.append(f"{word.group(0)!r} in stdout: …{around!r}…")
        if asked_format(args) in JSON_AS_ASKED:
            try:
                json.loads(stdout, parse_constant=_reject_constant)
            except ValueError as error:
                found.append(f"stdout is not strict JSON ({error}): {stdout[:200]!r}")
    return found


def shown(args: list[str], tmp: Path) -> str:
    """An argument list as a reader can paste it (the temporary folder named <tmp>)."""
    return "[" + ", ".join(repr(a.replace(str(tmp), "<tmp>")) for a in args) + "]"


def _top_level(folder: Path) -> set[str]:
    """The names in ``folder``: where a run given a bare file name (--out x.xlsx) would write."""
    return {p.name for p in folder.iterdir()}


# --- the tests ---------------------------------------------------------------------------


def test_draws_are_deterministic_and_cover_every_command(tmp_path):
    first, again = Draw(SEED, tmp_path), Draw(SEED, tmp_path)
    cases = [first.next() for _ in range(CASES)]
    assert cases == [again.next() for _ in range(CASES)]
    assert len(cases) >= 1000 and len({tuple(c) for c in cases}) > 0.9 * len(cases)
    assert {c for args in cases for c in args if c in COMMANDS} == COMMANDS
    assert min(sum(1 for args in cases if name in args) for name in COMMANDS) >= 100


def test_problems_of_catches_what_it_must():
    """The checks themselves can fail: fed bad runs, each says so."""

    class Run:
        def __init__(self, code, out="", err="", exception=None):
            self.exit_code, self.stdout, self.stderr, self.exception = code, out, err, exception
            self.exc_info = None

    assert problems_of(["values", "E3"], Run(0, "1\n2.2\n4.7\n")) == []
    assert problems_of(["x"], Run(2, err="rcpick: error: bad\n")) == []
    assert problems_of(["x"], Run(1))
    assert problems_of(["x"], Run(2, err="rcpick: error: one\nrcpick: error: two\n"))
    assert problems_of(["x"], Run(2, err="Error: something\n"))
    assert problems_of(["x"], Run(0, out="worst case: nan ms"))
    assert problems_of(["x"], Run(0, out="yield INF"))
    assert not problems_of(["x"], Run(0, out="information, infinite, nano"))
    assert problems_of(["x", "--format", "json"], Run(0, out='{"a": NaN}'))
    assert problems_of(["x", "--format", "json"], Run(0, out='{"a": Infinity}'))
    assert problems_of(["x", "--format", "json"], Run(0, out="Table"))
    assert problems_of(["x", "--format=json"], Run(0, out="Table"))
    assert not problems_of(["x", "--format", "json", "--help"], Run(0, out="Usage"))
    assert not problems_of(["x", "--format", "json"], Run(0, out='{"a": 1.5}'))


def test_fuzz_every_command(tmp_path, capsys):
    runner = CliRunner()
    draw = Draw(SEED, tmp_path)
    before = _top_level(ROOT)
    failures, codes = [], {0: 0, 2: 0}
    start = time.perf_counter()
    for _ in range(CASES):
        args = draw.next()
        result = runner.invoke(app, args)
        codes[result.exit_code] = codes.get(result.exit_code, 0) + 1
        for problem in problems_of(args, result):
            failures.append(f"{shown(args, tmp_path)}: {problem}")
    elapsed = time.perf_counter() - start
    with capsys.disabled():
        print(
            f"\nfuzz: {CASES} argument lists in {elapsed:.1f} s; exit codes {dict(sorted(codes.items()))}; "
            f"{len(failures)} failure(s)"
        )
    assert _top_level(ROOT) == before, "a run wrote into the project folder"
    assert not failures, f"{len(failures)} failing argument list(s):\n" + "\n".join(failures)


# --- malformed files, one by one ------------------------------------------------------------

#: (fixture, exit code) — every fixture in tests/fixtures is listed here (checked below).
FILES = {
    # stock lists
    "stock-bom.csv": 0,
    "stock-utf16.csv": 0,
    "stock-comment-quote.csv": 0,
    "stock-percent.xlsx": 0,
    "stock-latin1.csv": 2,
    "stock-random.csv": 2,
    "stock-dup-column.csv": 2,
    "stock-dup-column.xlsx": 2,
    "stock-huge-onhand.csv": 2,
    "stock-huge-onhand.xlsx": 2,
    "stock-notanumber-price.csv": 2,
    "stock-empty.csv": 2,
    "stock-empty.xlsx": 2,
    "stock-header-only.csv": 2,
    "stock-header-only.xlsx": 2,
    "stock-unknown-column.csv": 2,
    "stock-unknown-column.xlsx": 2,
    "stock-wide-tolerance.csv": 2,
    "stock-percent-wide.xlsx": 2,
    "stock-unclosed-quote.csv": 2,
    "stock-stray-cell.csv": 2,
    "stock-foreign-digits.csv": 2,
    "stock-not-zip.xlsx": 2,
    # netlists
    "net-bom.cir": 0,
    "net-utf16.cir": 0,
    "net-latin1.cir": 2,
    "net-random.cir": 2,
    "net-keyvalue.cir": 2,
    "net-unknown-letter.cir": 2,
    "net-floating.cir": 2,
    "net-empty.cir": 2,
    "net-huge-value.cir": 2,
    "net-notanumber-value.cir": 2,
    "net-foreign-digits.cir": 2,
    # project files
    "config-bom.toml": 0,
    "config-utf16.toml": 0,
    "config-latin1.toml": 2,
    "config-random.toml": 2,
    "config-unknown-key.toml": 2,
    "config-r-tol.toml": 2,
    "config-window.toml": 2,
    "config-spares.toml": 2,
    "config-temp.toml": 2,
    "config-c-age.toml": 2,
    "config-c-age-literal.toml": 2,
    "config-top-infinite.toml": 2,
    "config-samples-huge.toml": 2,
    "config-syntax.toml": 2,
    "config-bool.toml": 2,
    "config-target.toml": 2,
    "config-stock-missing.toml": 2,
    "config-stock-bad.toml": 2,
}
#: The file an error must name when it is not the fixture itself (a project file naming a stock file).
NAMED = {"config-stock-missing.toml": "no-such-stock.csv", "config-stock-bad.toml": "stock-dup-column.csv"}


def commands_for(name: str) -> list[list[str]]:
    path = f"{FIXTURES}/{name}"
    if name.startswith("stock-"):
        return [
            ["find", "--tau", "1ms", "--stock", path, "--samples", "100", "--top", "2", "--format", "json"],
            ["spread", "--r", "10k", "--c", "100n", "--stock", path, "--samples", "100", "--format", "json"],
        ]
    if name.startswith("net-"):
        return [["net", path, "--format", "json"]]
    return [
        ["config", "--config", path, "--format", "json"],
        ["find", "--tau", "1ms", "--config", path, "--samples", "100", "--top", "2", "--format", "json"],
    ]


def test_every_fixture_is_listed():
    on_disk = {p.name for p in (ROOT / FIXTURES).iterdir() if p.suffix in (".csv", ".xlsx", ".cir", ".toml")}
    assert on_disk == set(FILES)


@pytest.mark.parametrize("name", sorted(FILES))
def test_fixture(run, name):
    for args in commands_for(name):
        result = run(*args)
        assert problems_of(args, result) == [], args
        assert result.exit_code == FILES[name], (args, result.stderr)
        if FILES[name] == 2:
            line = result.stderr.strip()
            assert "\n" not in line and line.startswith("rcpick: error: ")
            assert NAMED.get(name, f"{FIXTURES}/{name}") in line, line
