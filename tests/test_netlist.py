"""Netlist reading: values, parameters, warnings, and every kind of bad netlist naming its line."""

import pytest

from rcpick.netlist import NetlistError, parse


def test_values_comments_and_parameters():
    net = parse(
        """* a title comment
V1 in 0 DC 5      ; an inline comment
R1 in a 1Meg 1% 100ppm
R2 a 0 4K7 thin-film
C1 a 0 100n X7R -20%:+80%
C2 a 0 22p C0G @1.5V
C3 a 0 1n -750ppm
I1 0 a 1m
.tran 1u 1m
.end
R9 ignored after end 1k
""",
        "t.cir",
    )
    assert [e.name for e in net.elements] == ["V1", "R1", "R2", "C1", "C2", "C3", "I1"]
    r1 = net.get("r1")
    assert r1.value == 1e6 and r1.params["tol"] == (-0.01, 0.01) and r1.params["tcr"] == pytest.approx((-1e-4, 1e-4))
    assert net.get("R2").value == 4.7e3 and net.get("R2").params["tech"] == "thin-film"
    assert net.get("C1").params == {"dielectric": "X7R", "tol": (-0.2, 0.8)}
    assert net.get("C2").params == {"dielectric": "C0G", "v0": 1.5}
    assert net.get("C3").params["tc"] == pytest.approx((-750e-6, 750e-6))
    assert net.get("I1").value == 1e-3 and net.get("V1").value == 5.0
    assert any("control line '.tran' ignored" in w for w in net.warnings)


def test_bare_m_and_likely_slips_are_warned():
    net = parse("V1 in 0 5\nR1 in a 1M\nC1 a 0 1m\nR2 a 0 2m\n")
    assert net.get("R1").value == 1e6  # rcpick notation: M is mega
    text = " ".join(net.warnings)
    assert "R1: '1M' reads as mega" in text and "SPICE reads M as milli" in text
    assert "R2: 0.002 Ω is below 1 Ω" in text
    assert "C1: 0.001 F is 1 mF or more" in text
    assert parse("V1 in 0 5\nR1 in a 1Meg\nC1 a 0 1u\n").warnings == ()


BAD = {
    "floating node": ("V1 in 0 5\nR1 in a 1k\nC1 a 0 1u\nR2 x y 1k\n", 4, "x, y float"),
    "loop of voltage sources": ("V1 a 0 5\nV2 a b 1\nV3 b 0 2\nR1 a b 1k\nC1 a 0 1u\n", 3, "loop of voltage sources"),
    "capacitor shorted by a source": ("V1 a 0 5\nC1 a 0 1u\nR1 a 0 1k\n", 2, "shorted by voltage sources"),
    "capacitor shorted through two sources": ("V1 a 0 5\nV2 b a 1\nC1 b 0 1u\nR1 b 0 1k\n", 3, "shorted"),
    "unknown element letter": ("V1 a 0 5\nL1 a b 1m\n", 2, "unknown element letter 'L'"),
    "duplicate name": (
        "V1 a 0 5\nR1 a b 1k\nr1 b 0 1k\nC1 b 0 1u\n",
        3,
        "duplicate element name 'r1' (first on line 2)",
    ),
    "missing ground": ("V1 a b 5\nR1 a b 1k\nC1 a b 1u\n", None, "no element connects to ground"),
    "both ends on one node": ("V1 a 0 5\nC1 a a 1u\n", 2, "both ends of the capacitor"),
    "short line": ("V1 a 0 5\nR1 a b\n", 2, "needs two nodes and a value"),
    "bad value": ("V1 a 0 5\nR1 a 0 10q\n", 2, "R1: cannot read '10q'"),
    "old key=value form": (
        "V1 a 0 5\nR1 a 0 1k tol=1%\n",
        2,
        "'tol=1%' is the old key=value form; write annotations as bare tokens, e.g. R1 vdd rst 47k 1% 100ppm",
    ),
    "unknown annotation": ("V1 a 0 5\nR1 a 0 1k red\n", 2, "R1: cannot read 'red'; expected a tolerance (1%)"),
    "bad dielectric": ("V1 a 0 5\nR1 a b 1k\nC1 b 0 1u X9Q\n", 3, "C1: cannot read 'X9Q'; expected a tolerance"),
    "two tolerances": ("V1 a 0 5\nR1 a b 1k 1% 5%\nC1 b 0 1u\n", 2, "'5%' gives a second tol"),
    "start voltage on a resistor": ("V1 a 0 5\nR1 a b 1k @2V\nC1 b 0 1u\n", 2, "R1: cannot read '@2V'"),
    "annotation on a source": ("V1 a 0 5 1%\nR1 a 0 1k\n", 1, "sources take no annotations"),
    "empty": ("* nothing\n", None, "no element lines"),
}


@pytest.mark.parametrize("case", BAD, ids=list(BAD))
def test_bad_netlists(case):
    text, line, fragment = BAD[case]
    with pytest.raises(NetlistError) as caught:
        parse(text, "bad.cir")
    message = str(caught.value)
    assert fragment in message
    assert message.startswith(f"bad.cir line {line}:" if line else "bad.cir:")


def test_cli_bad_netlist_is_one_line(run, tmp_path):
    path = tmp_path / "bad.cir"
    path.write_text("V1 a 0 5\nL1 a 0 1m\n")
    result = run("net", str(path))
    assert result.exit_code == 2
    assert (
        result.stderr.strip()
        == f"rcpick: error: {path} line 2: unknown element letter 'L' in 'L1'; accepted: R, C, V, I"
    )
    missing = run("net", str(tmp_path / "none.cir"))
    assert missing.exit_code == 2 and "none.cir: no such file" in missing.stderr


def test_text_encodings(tmp_path):
    from rcpick.netlist import read

    text = "V1 in 0 5\nR1 in a 10k 1%\nC1 a 0 100n X7R\n"
    (tmp_path / "bom.cir").write_bytes(b"\xef\xbb\xbf" + text.encode("utf-8"))
    (tmp_path / "utf16.cir").write_text(text, encoding="utf-16")
    for name in ("bom.cir", "utf16.cir"):
        assert [e.name for e in read(tmp_path / name).elements] == ["V1", "R1", "C1"]
    (tmp_path / "latin1.cir").write_bytes("* 1 \u00b5F\nV1 in 0 5\n".encode("latin-1"))
    with pytest.raises(NetlistError, match=r"latin1.cir: not UTF-8 text: byte 4 is 0xb5"):
        read(tmp_path / "latin1.cir")
