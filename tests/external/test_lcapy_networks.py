"""Natural time constants against lcapy's symbolic poles (lcapy, PyPI; a test extra).

lcapy solves the same netlists symbolically (Laplace domain); the poles of a
node's step response, except the step's own pole at s = 0, are the network's
natural frequencies s = −1/τ. rcpick's numbers must match to 1e-9 relative.
"""

import pytest

from rcpick import nodal
from rcpick.netlist import parse

NETWORKS = {
    # R from the source to a node, C to ground, C1 from the source to the node: tau = R(C + C1)
    "coupled": ("V1 in 0 5\nR1 in out 10k\nC1 out 0 100n\nC2 in out 22n\n", "out"),
    # a divider R1/R2 feeding C: tau = (R1 ∥ R2)·C
    "divider": ("V1 in 0 3.3\nR1 in out 10k\nR2 out 0 22k\nC1 out 0 1u\n", "out"),
    # a second-order ladder: two time constants
    "ladder": ("V1 in 0 1\nR1 in a 1k\nC1 a 0 1u\nR2 a b 10k\nC2 b 0 100n\n", "b"),
    # series capacitors and a load
    "series caps": ("V1 in 0 1\nR1 in a 4.7k\nC1 a m 470n\nC2 m 0 1u\nR2 m 0 100k\n", "a"),
}


def lcapy_taus(text: str, node: str) -> list[float]:
    from lcapy import Circuit, s

    parsed = parse(text)
    lines = []
    for line in text.strip().splitlines():
        name, a, b, _ = line.split()[:4]
        si = parsed.get(name).value
        lines.append(f"{name} {a} {b} step {si!r}" if name[0] == "V" else f"{name} {a} {b} {si!r}")
    circuit = Circuit("\n".join(lines))
    poles = circuit[node].V(s).poles()
    finite = [complex(p.sympy.evalf(40)) for p in poles]
    return sorted((-1.0 / p.real for p in finite if abs(p) > 0), reverse=True)


@pytest.mark.parametrize("name", NETWORKS)
def test_time_constants_match_lcapy(name):
    text, node = NETWORKS[name]
    ours = list(nodal.time_constants(parse(text))[0])
    theirs = lcapy_taus(text, node)
    assert len(ours) == len(theirs)
    assert ours == pytest.approx(theirs, rel=1e-9)


def test_coupled_closed_form_from_lcapy():
    # tau = R(C + C1) exactly, as lcapy's pole −1/(R(C + C1)) says.
    assert lcapy_taus(*NETWORKS["coupled"]) == pytest.approx([10e3 * 122e-9], rel=1e-12)
