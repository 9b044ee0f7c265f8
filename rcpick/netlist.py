"""Reading a small netlist of SPICE-style element lines, and checking it.

Lines: ``R1 a b 10k``, ``C1 b 0 100n``, ``V1 in 0 5`` (an ideal step source,
0 → value at t = 0), ``I1 a b 1m`` (current flows from a through the source
to b, as in SPICE); ``*`` starts a comment line, ``;`` a comment to the end of
a line; node ``0`` is ground. Values use rcpick's notation, where ``M`` is
mega (as in ``2M2``); ``Meg``/``MEG`` are mega too. In SPICE files ``M`` means
milli: a value written with a bare ``M`` gets a warning saying how it was read,
and so does a resistor below 1 Ω or a capacitor of 1 mF or more (likely a
slip between milli and mega).

After the value an R or C line may carry annotations for the spread, each a
bare token that its unit or form identifies (docs/networks.md):
``R1 vdd rst 47k 1% 100ppm thin-film`` (tolerance, TCR, technology) and
``C1 rst 0 100n 10% X7R`` or ``C1 rst 0 100n -750ppm`` (tolerance, a
dielectric code or a custom linear coefficient). ``@2.5V`` on a capacitor
line is its voltage at t = 0 (first node minus second).
"""

from __future__ import annotations

import re
from dataclasses import dataclass, field
from pathlib import Path

from rcpick import models
from rcpick.errors import BadValue, RcpickError, UnknownName
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
    params: dict = field(default_factory=dict)  # tol (band), tcr (band), tech, tc (band), dielectric (code), v0 (V)


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

    def with_values(self, values: dict[str, float]) -> Netlist:
        """The same netlist with some element values replaced (name → SI value)."""
        upper = {k.upper(): v for k, v in values.items()}
        elements = tuple(
            Element(e.name, e.letter, e.a, e.b, upper.get(e.name.upper(), e.value), e.line, e.params)
            for e in self.elements
        )
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
        out.append(
            f"{name}: {text!r} reads as mega ({value:g} {unit}) in rcpick's notation; SPICE reads M as milli "
            f"— write Meg or m to be explicit"
        )
    if letter == "R" and value < 1.0:
        out.append(f"{name}: {value:g} Ω is below 1 Ω; if you meant mega write Meg (1Meg = 1 MΩ)")
    if letter == "C" and value >= 1e-3:
        out.append(f"{name}: {value:g} F is 1 mF or more; check the prefix (m is milli, M and Meg are mega)")
    return out


_ANNOTATIONS = {
    "R": "a tolerance (1%), a TCR (100ppm) or a technology (thin-film)",
    "C": "a tolerance (10%), a dielectric code (X7R), a coefficient (-750ppm) or a start voltage (@2.5V)",
}


def read_annotations(letter: str, tokens: list[str], name: str) -> dict:
    """The annotations after a part's value (bare tokens known by their unit or form), for a netlist line or a
    board's ``have`` entry; an error names ``name``."""
    out: dict = {}

    def once(key: str, value, token: str) -> None:
        if key in out:
            raise BadValue(f"{name}: {token!r} gives a second {key}")
        out[key] = value

    for token in tokens:
        try:
            if "=" in token:
                example = "R1 vdd rst 47k 1% 100ppm" if letter == "R" else "C1 rst 0 100n 10% X7R"
                raise BadValue(
                    f"{name}: {token!r} is the old key=value form; write annotations as bare tokens, e.g. {example}"
                )
            if letter in "VI":
                raise BadValue(f"{name}: sources take no annotations, got {token!r}")
            if token.endswith("%"):
                low, high = parse_band(token)
                if not (-1 < low <= 0 <= high < 1) or high <= low:
                    raise BadValue(f"{name}: tolerance {token!r} must be greater than 0 % and less than 100 %")
                once("tol", (low, high), token)
            elif "ppm" in token.lower():
                once("tcr" if letter == "R" else "tc", parse_ppm_band(token), token)
            elif token.startswith("@") and letter == "C":
                once("v0", parse_quantity(token[1:], "voltage", positive=False), token)
            elif letter == "R":
                once("tech", models.technology_key(token), token)
            else:
                once("dielectric", models.dielectric(token).code, token)
        except RcpickError as error:
            message = error.message if error.message.startswith(f"{name}:") else f"{name}: {error.message}"
            if isinstance(error, UnknownName):
                message = f"{name}: cannot read {token!r}; expected {_ANNOTATIONS[letter]}"
            raise BadValue(message) from None
    return out


def _params(path: str, line: int, letter: str, tokens: list[str], name: str) -> dict:
    """A netlist line's annotations (:func:`read_annotations`); an error names the file and line."""
    try:
        return read_annotations(letter, tokens, name)
    except RcpickError as error:
        raise _fail(path, line, error.message) from None


def parse(text: str, path: str = "<netlist>") -> Netlist:
    """Read and check a netlist (see the module docstring for the format)."""
    elements: list[Element] = []
    warnings: list[str] = []
    names: dict[str, int] = {}
    text = text.removeprefix("\ufeff")
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
            raise _fail(
                path,
                number,
                f"{name} needs two nodes and a value, e.g. {letter}1 a b "
                f"{ {'R': '10k', 'C': '100n', 'V': '5', 'I': '1m'}[letter] }",
            )
        a, b, value_text = tokens[1], tokens[2], tokens[3]
        try:
            value = parse_quantity(value_text, KINDS[letter], positive=letter in "RC")
        except RcpickError as error:
            raise _fail(path, number, f"{name}: {error.message}") from None
        warnings += _value_warnings(name, letter, value_text, value)
        if a == b:
            what = {"R": "resistor", "C": "capacitor", "V": "voltage source", "I": "current source"}[letter]
            raise _fail(path, number, f"{name}: both ends of the {what} are on node {a!r}")
        elements.append(Element(name, letter, a, b, value, number, _params(path, number, letter, tokens[4:], name)))
    net = Netlist(path, tuple(elements), tuple(warnings))
    check(net)
    return net


#: Largest netlist analysed: each unit of a Monte Carlo solves it, so memory and time grow with its size.
MAX_ELEMENTS = 400


def read(path: str | Path) -> Netlist:
    """Read and check a netlist file (UTF-8, or UTF-16 / UTF-8 with a byte-order mark)."""
    from rcpick.textfiles import read_text

    try:
        text = read_text(path)
    except BadValue as error:
        raise NetlistError(error.message) from None
    return parse(text, str(path))


class Union:
    """Disjoint sets of names (union-find), for supernodes and connectivity checks."""

    def __init__(self) -> None:
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


def supernodes(net: Netlist) -> Union:
    """Nodes joined by voltage sources (a zeroed source is a short)."""
    union = Union()
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
    if len(net.elements) > MAX_ELEMENTS:
        raise _fail(
            path,
            None,
            f"{len(net.elements):,} elements is more than the {MAX_ELEMENTS} rcpick analyses "
            f"(every Monte Carlo unit solves the whole network)",
        )
    if not any(GROUND in (e.a, e.b) for e in net.elements):
        raise _fail(path, None, "no element connects to ground (node 0)")
    union = Union()
    for e in net.of("V"):
        if not union.join(e.a, e.b):
            raise _fail(path, e.line, f"{e.name} closes a loop of voltage sources")
    for e in net.of("C"):
        if union.find(e.a) == union.find(e.b):
            raise _fail(path, e.line, f"{e.name} is shorted by voltage sources (both ends tied by sources)")
    everything = Union()
    for e in net.elements:
        everything.join(e.a, e.b)
    ground = everything.find(GROUND)
    for e in net.elements:
        if everything.find(e.a) != ground:
            floating = sorted({n for n in net.nodes if everything.find(n) == everything.find(e.a)})
            raise _fail(path, e.line, f"node(s) {', '.join(floating)} float: not connected to ground by any element")
