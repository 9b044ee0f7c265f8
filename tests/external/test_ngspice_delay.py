"""rcpick's nominal delays against ngspice transient runs (Debian package ngspice, 39.x).

For a rising and a falling ``--delay`` query, the best candidate and the best
pair arrangements are simulated; the simulated threshold crossing must agree
with rcpick's nominal delay within 0.5 %.
"""

import pytest

from tests.external.spice import rc_step_netlist, run_measure


def _pick(doc):
    """Rank 1 plus the best candidates that use a series and a parallel pair."""
    cands = doc["candidates"]
    chosen = [cands[0]]
    for wiring in ("series", "parallel"):
        for cand in cands:
            if wiring in (cand["r"]["arrangement"], cand["c"]["arrangement"]) and cand not in chosen:
                chosen.append(cand)
                break
    assert any(c["parts"] > 2 for c in chosen), "the check must include a pair arrangement"
    return chosen


def test_rising_delay_matches_ngspice(run_json, tmp_path):
    doc = run_json(
        "find", "--delay", "3.7ms", "--threshold", "2.0V", "--supply", "3.3V", "--top", "40", "--rank", "error"
    )
    for cand in _pick(doc):
        netlist = rc_step_netlist(
            cand["r"], cand["c"], 0.0, 3.3, 3 * cand["value"], ".meas tran tcross WHEN v(out)=2.0 RISE=1"
        )
        simulated = run_measure(netlist, tmp_path, "tcross")
        assert simulated == pytest.approx(cand["value"], rel=5e-3), cand


def test_falling_delay_matches_ngspice(run_json, tmp_path):
    doc = run_json(
        "find",
        "--delay",
        "1.5s",
        "--threshold",
        "50V",
        "--supply",
        "400V",
        "--falling",
        "--c-min",
        "10u",
        "--c-max",
        "100u",
        "--r-max",
        "1Meg",
        "--top",
        "40",
        "--rank",
        "error",
    )
    for cand in _pick(doc):
        netlist = rc_step_netlist(
            cand["r"], cand["c"], 400.0, 0.0, 3 * cand["value"], ".meas tran tcross WHEN v(out)=50 FALL=1"
        )
        simulated = run_measure(netlist, tmp_path, "tcross")
        assert simulated == pytest.approx(cand["value"], rel=5e-3), cand
