"""Searching parts inside a network: exact against enumeration, the CLI, and its errors."""

import numpy as np
import pytest

from rcpick import combos, netsearch, nodal, series
from rcpick.netlist import parse, read

LADDER = parse("V1 in 0 1\nR1 in a 1k\nC1 a 0 1u\nR2 a b 10k\nC2 b 0 100n\n")


def candidates(name, kind, low, high, parts):
    return combos.build(series.get(name).values(low, high), kind, parts, low, high)


@pytest.mark.parametrize(
    ("target", "c_range"),
    [
        (0.9e-3, (100e-9, 10e-6, 2)),
        (1.37e-3, (100e-9, 10e-6, 2)),
        (2.2e-3, (100e-9, 10e-6, 2)),
        (1.5e-3, (1e-6, 2.2e-6, 1)),
    ],
)
def test_tau_bisection_equals_enumeration(target, c_range):
    r = candidates("E12", "resistance", 100.0, 10e3, 2)
    c = candidates("E6", "capacitance", *c_range)
    varied = [netsearch.Varied("R1", r), netsearch.Varied("C1", c)]
    quantity = netsearch.Quantity("tau")
    found = netsearch.search(LADDER, varied, quantity, target, 8)
    # oracle: every combination evaluated (one batch of all networks), sorted by the documented key
    ii, jj = (a.ravel() for a in np.meshgrid(np.arange(len(r)), np.arange(len(c)), indexing="ij"))
    taus = nodal.dominant_tau(LADDER, {"R1": r.value[ii], "C1": c.value[jj]}, len(ii))
    values = sorted(
        ((round(abs(t / target - 1), 12), int(r.parts[i] + c.parts[j]), r.value[i], c.value[j]), i, j)
        for t, i, j in zip(taus.tolist(), ii.tolist(), jj.tolist())
    )
    assert [tuple(row) for row in found.index.tolist()] == [(i, j) for _, i, j in values[:8]]


def test_delay_search_value_is_the_network_delay(run_json):
    doc = run_json(
        "find",
        "--net",
        "docs/examples/reset-divider.cir",
        "--vary",
        "R1,C1",
        "--delay",
        "8ms",
        "--threshold",
        "2.0V",
        "--node",
        "rst",
        "--r-parts",
        "1",
        "--c-parts",
        "1",
        "--rank",
        "error",
        "--top",
        "3",
        "--samples",
        "300",
    )
    best = doc["candidates"][0]
    r1, c1 = best["elements"]["R1"]["ohm"], best["elements"]["C1"]["farad"]
    net = read("docs/examples/reset-divider.cir").with_values({"R1": r1, "C1": c1})
    resp = nodal.step_response(net)
    t = nodal.crossing_time(resp, "rst", np.array([2.0]), np.array([1.0]))[0]
    assert best["value"] == pytest.approx(t, rel=1e-9)
    assert abs(best["error"]) < 0.01
    sp = best["spread"]
    assert sp["worst_min"] <= sp["p_low"] <= sp["p_median"] <= sp["p_high"] <= sp["worst_max"]


def test_tau_search_in_a_first_order_network(run_json):
    # reset divider: tau = (R1 ∥ 220k)·C1
    doc = run_json(
        "find",
        "--net",
        "docs/examples/reset-divider.cir",
        "--vary",
        "R1,C1",
        "--tau",
        "5ms",
        "--rank",
        "error",
        "--top",
        "3",
        "--samples",
        "300",
    )
    for cand in doc["candidates"]:
        r1, c1 = cand["elements"]["R1"]["ohm"], cand["elements"]["C1"]["farad"]
        assert cand["value"] == pytest.approx(r1 * 220e3 / (r1 + 220e3) * c1, rel=1e-9)
    assert abs(doc["candidates"][0]["error"]) < 1e-4


@pytest.mark.parametrize("target_args", [["--tau", "5ms"], ["--delay", "8ms", "--threshold", "2.0V", "--node", "rst"]])
def test_one_varied_element(run_json, target_args):
    doc = run_json(
        "find",
        "--net",
        "docs/examples/reset-divider.cir",
        "--vary",
        "C1",
        *target_args,
        "--top",
        "4",
        "--samples",
        "200",
        "--rank",
        "error",
    )
    assert all(set(c["elements"]) == {"C1"} and "r" not in c for c in doc["candidates"])
    errors = [abs(c["error"]) for c in doc["candidates"]]
    assert errors == sorted(errors) and errors[0] < 0.01
    # with R1 = 47k fixed the dominant tau is (47k ∥ 220k)·C1
    if target_args[0] == "--tau":
        best = doc["candidates"][0]
        assert best["value"] == pytest.approx(47e3 * 220e3 / 267e3 * best["c"]["farad"], rel=1e-9)


def test_cutoff_at_a_node(run_json):
    doc = run_json(
        "find",
        "--net",
        "docs/examples/two-stage.cir",
        "--vary",
        "R2,C2",
        "--cutoff",
        "1kHz",
        "--node",
        "out",
        "--r-parts",
        "1",
        "--c-parts",
        "1",
        "--rank",
        "error",
        "--top",
        "2",
        "--samples",
        "200",
    )
    best = doc["candidates"][0]
    values = {"R2": np.array([best["elements"]["R2"]["ohm"]]), "C2": np.array([best["elements"]["C2"]["farad"]])}
    net = read("docs/examples/two-stage.cir")
    tau = nodal.dominant_tau(net, values, 1)
    fc = netsearch.corner_frequency(net, values, 1, "out", tau)[0]
    assert best["value"] == pytest.approx(fc, rel=1e-9)
    # at the corner the gain is 1/√2 of DC: check it directly
    st = nodal.structure(net)
    g, c, r, h = nodal.matrices(st, values, 1)
    x = np.linalg.solve(g[0] + 2j * np.pi * fc * c[0], r[0] - 2j * np.pi * fc * h[0])
    assert abs(x[st.row_of["out"]]) == pytest.approx(1 / np.sqrt(2), rel=1e-6)


def test_yield_ranking_keeps_single_parts(run_json):
    doc = run_json(
        "find",
        "--net",
        "docs/examples/debounce.cir",
        "--vary",
        "R1,C1",
        "--tau",
        "10ms",
        "--top",
        "12",
        "--samples",
        "300",
    )
    assert doc["analysis"]["rank"] == "yield"
    assert any(c["parts"] == 2 for c in doc["candidates"])


def test_export_of_a_network_search(run, tmp_path):
    from openpyxl import load_workbook

    path = tmp_path / "net.xlsx"
    result = run(
        "find",
        "--net",
        "docs/examples/reset-divider.cir",
        "--vary",
        "R1,C1",
        "--tau",
        "5ms",
        "--top",
        "3",
        "--samples",
        "300",
        "--out",
        str(path),
    )
    assert result.exit_code == 0, result.output
    book = load_workbook(path)
    assert book.sheetnames == ["shortlist", "order", "query"]
    headers = [c.value for c in book["shortlist"][1]]
    assert "R wiring" in headers and "C wiring" in headers and "yield (fraction)" in headers


BAD = {
    "vary a missing element": (["--vary", "R7"], "--vary", "no element 'R7'"),
    "vary a source": (["--vary", "V1"], "--vary", "is a source"),
    "vary two resistors": (["--vary", "R1,R2"], "--vary", "at most one R and one C"),
    "no vary": ([], "--net needs --vary", "R1,C1"),
    "fix with net": (["--vary", "R1", "--fix-c", "1u"], "--net and --fix-c", "together"),
    "node with tau": (["--vary", "R1", "--node", "rst"], "--node", "--tau"),
}


@pytest.mark.parametrize("case", BAD, ids=list(BAD))
def test_bad_network_search(run, case):
    args, where, what = BAD[case]
    result = run("find", "--net", "docs/examples/reset-divider.cir", "--tau", "5ms", *args)
    assert result.exit_code == 2, result.output
    line = result.stderr.strip()
    assert len(line.splitlines()) == 1 and where in line and what in line, line


def test_delay_needs_node(run):
    result = run(
        "find", "--net", "docs/examples/reset-divider.cir", "--vary", "R1,C1", "--delay", "5ms", "--threshold", "2V"
    )
    assert result.exit_code == 2 and "needs --node" in result.stderr


def test_vary_without_net(run):
    result = run("find", "--tau", "1ms", "--vary", "R1")
    assert result.exit_code == 2 and "--vary belongs to --net" in result.stderr
