"""Reading a small netlist of SPICE-style element lines, and checking it.

Lines: ``R1 a b 10k``, ``C1 b 0 100n``, ``V1 in 0 5`` (an ideal step source,
0 → value at t = 0), ``I1 a b 1m`` (current flows from a through the source
to b, as in SPICE); ``*`` starts a comment line, ``;`` a comment to the end of
a line; node ``0`` is ground. Values use rcpick's notation, where ``M`` is
mega (as in ``2M2``); ``Meg``/``MEG`` are mega too. In SPICE files ``M`` means
milli: a value written with a bare ``M`` gets a warning saying how it was read,
and so does a resistor below 1 Ω or a capacitor of 1 mF or more (likely a
slip between milli and mega).

After the value an element may carry parameters for the spread:
``tol=1%`` (or ``-20%:+80%``), ``tcr=100ppm`` (R), ``tech=thin-film`` (R),
``tc=30ppm`` (C, a custom linear coefficient) and a dielectric code for C
(``X7R`` or ``dielectric=X7R``).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path

from rcpick import models
from rcpick.errors import BadValue, RcpickError
from rcpick.notation import parse_band, parse_ppm_band, parse_quantity

KINDS = {"R": "resistance", "C": "capacitance", "V": "voltage", "I": "current"}
GROUND = "0"


@dataclass(frozen=True)
class Element:
    """One element line."""

    name: str
    letter: str  # R, C, V or I
    a: str
    b: str
    value: float  # SI
    line: int
    params: dict = field(default_factory=dict)  # tol (band), tcr (band), tech, tc (band), dielectric (code)


@dataclass(frozen=True)
class Netlist:
    """A checked netlist: elements in file order, and warnings about how values were read."""

    path: str
    elements: tuple[Element, ...]
    warnings: tuple[str, ...] = ()

    def of(self, letter: str) -> list[Element]:
        return [e for e in self.elements if e.letter == letter]

    def get(self, name: str) -> Element | None:
        return next((e for e in self.elements if e.name.upper() == name.upper()), None)

    @property
    def nodes(self) -> list[str]:
        """Every node name, ground first, then in order of appearance."""
        seen = {GROUND: None}
        for e in self.elements:
            seen.setdefault(e.a, None)
            seen.setdefault(e.b, None)
        return list(seen)

    def with_values(self, values: dict[str, float]) -> "Netlist":
        """The same netlist with some element values replaced (name → SI value)."""
        upper = {k.upper(): v for k, v in values.items()}
        elements = tuple(Element(e.name, e.letter, e.a, e.b, upper.get(e.name.upper(), e.value), e.line, e.params)
                         for e in self.elements)
        return Netlist(self.path, elements, self.warnings)


class NetlistError(BadValue):
    """A netlist that cannot be analysed; the message names the file and line."""


def _fail(path: str, line: int | None, message: str) -> NetlistError:
    where = f"{path} line {line}" if line else path
    return NetlistError(f"{where}: {message}")


def _value_warnings(name: str, letter: str, text: str, value: float) -> list[str]:
    out = []
    if re.search(r"\dM(?![eE][gG])[A-Za-zΩ]*$", text) or re.fullmatch(r"\d*M\d+", text):
        unit = {"R": "Ω", "C": "F", "V": "V", "I": "A"}[letter]
        out.append(f"{name}: {text!r} reads as mega ({value:g} {unit}) in rcpick's notation; SPICE reads M as milli "
                   f"— write Meg or m to be explicit")
    if letter == "R" and value < 1.0:
        out.append(f"{name}: {value:g} Ω is below 1 Ω; if you meant mega write Meg (1Meg = 1 MΩ)")
    if letter == "C" and value >= 1e-3:
        out.append(f"{name}: {value:g} F is 1 mF or more; check the prefix (m is milli, M and Meg are mega)")
    return out


def _params(path: str, line: int, letter: str, tokens: list[str]) -> dict:
    out: dict = {}
    for token in tokens:
        key, _, text = token.partition("=")
        key = key.lower()
        try:
            if not _:
                if letter != "C":
                    raise BadValue(f"unknown parameter {token!r}; accepted: tol=, tcr=, tech= for R")
                out["dielectric"] = models.dielectric(token).code
            elif key == "tol":
                low, high = parse_band(text)
                if not (-1 < low <= 0 <= high < 1) or high <= low:
                    raise BadValue(f"tolerance {text!r} must be greater than 0 % and less than 100 %")
                out["tol"] = (low, high)
            elif key == "tcr" and letter == "R":
                out["tcr"] = parse_ppm_band(text)
            elif key == "tech" and letter == "R":
                models.resistor_technology(text)
                out["tech"] = text
            elif key == "tc" and letter == "C":
                out["tc"] = parse_ppm_band(text)
            elif key == "dielectric" and letter == "C":
                out["dielectric"] = models.dielectric(text).code
            else:
                accepted = "tol=, tcr=, tech=" if letter == "R" else "tol=, tc=, dielectric= or a dielectric code"
                raise BadValue(f"unknown parameter {token!r} for {letter}; accepted: {accepted}")
        except RcpickError as error:
            raise _fail(path, line, error.message) from None
    if letter in "VI" and out:
        raise _fail(path, line, "sources take no spread parameters")
    return out


def parse(text: str, path: str = "<netlist>") -> Netlist:
    """Read and check a netlist (see the module docstring for the format)."""
    elements: list[Element] = []
    warnings: list[str] = []
    names: dict[str, int] = {}
    for number, raw in enumerate(text.splitlines(), start=1):
        line = raw.split(";", 1)[0].strip()
        if not line or line.startswith("*"):
            continue
        if line.startswith("."):
            if line.lower().startswith(".end"):
                break
            warnings.append(f"line {number}: control line {line.split()[0]!r} ignored")
            continue
        tokens = line.split()
        name = tokens[0]
        letter = name[0].upper()
        if letter not in KINDS:
            raise _fail(path, number, f"unknown element letter {name[0]!r} in {name!r}; accepted: R, C, V, I")
        if name.upper() in names:
            raise _fail(path, number, f"duplicate element name {name!r} (first on line {names[name.upper()]})")
        names[name.upper()] = number
        if letter in "VI" and len(tokens) >= 5 and tokens[3].upper() == "DC":
            tokens = tokens[:3] + tokens[4:]
        if len(tokens) < 4:
            raise _fail(path, number, f"{name} needs two nodes and a value, e.g. {letter}1 a b "
                                      f"{ {'R': '10k', 'C': '100n', 'V': '5', 'I': '1m'}[letter]}")
        a, b, value_text = tokens[1], tokens[2], tokens[3]
        try:
            value = parse_quantity(value_text, KINDS[letter], positive=letter in "RC")
        except RcpickError as error:
            raise _fail(path, number, f"{name}: {error.message}") from None
        warnings += _value_warnings(name, letter, value_text, value)
        if a == b:
            what = {"R": "resistor", "C": "capacitor", "V": "voltage source", "I": "current source"}[letter]
            raise _fail(path, number, f"{name}: both ends of the {what} are on node {a!r}")
        elements.append(Element(name, letter, a, b, value, number, _params(path, number, letter, tokens[4:])))
    net = Netlist(path, tuple(elements), tuple(warnings))
    check(net)
    return net


def read(path: str | Path) -> Netlist:
    path = Path(path)
    try:
        text = path.read_text(encoding="utf-8")
    except OSError as error:
        raise NetlistError(f"{path}: cannot read ({error.strerror})") from None
    return parse(text, str(path))


class _Union:
    def __init__(self):
        self.parent: dict[str, str] = {}

    def find(self, x: str) -> str:
        self.parent.setdefault(x, x)
        while self.parent[x] != x:
            self.parent[x] = self.parent[self.parent[x]]
            x = self.parent[x]
        return x

    def join(self, x: str, y: str) -> bool:
        rx, ry = self.find(x), self.find(y)
        if rx == ry:
            return False
        self.parent[rx] = ry
        return True


def supernodes(net: Netlist) -> _Union:
    """Nodes joined by voltage sources (a zeroed source is a short)."""
    union = _Union()
    for node in net.nodes:
        union.find(node)
    for e in net.of("V"):
        union.join(e.a, e.b)
    return union


def check(net: Netlist) -> None:
    """Reject what cannot be analysed, naming the line: no ground, a floating node, a loop of voltage
    sources, a capacitor shorted by sources."""
    path = net.path
    if not net.elements:
        raise _fail(path, None, "no element lines")
    if not any(GROUND in (e.a, e.b) for e in net.elements):
        raise _fail(path, None, "no element connects to ground (node 0)")
    union = _Union()
    for e in net.of("V"):
        if not union.join(e.a, e.b):
            raise _fail(path, e.line, f"{e.name} closes a loop of voltage sources")
    for e in net.of("C"):
        if union.find(e.a) == union.find(e.b):
            raise _fail(path, e.line, f"{e.name} is shorted by voltage sources (both ends tied by sources)")
    everything = _Union()
    for e in net.elements:
        everything.join(e.a, e.b)
    ground = everything.find(GROUND)
    for e in net.elements:
        if everything.find(e.a) != ground:
            floating = sorted({n for n in net.nodes if everything.find(n) == everything.find(e.a)})
            raise _fail(path, e.line, f"node(s) {', '.join(floating)} float: not connected to ground by any element")
