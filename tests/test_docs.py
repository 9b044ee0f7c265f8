"""The documentation's examples run and say what they claim, so README and docs cannot drift from the code."""

import doctest
import json
import math
import re
import shlex
import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
README = ROOT / "README.md"


def _examples():
    text = README.read_text(encoding="utf-8")
    commands = []
    for block in re.findall(r"```sh\n(.*?)```", text, re.S):
        for line in block.splitlines():
            for part in line.split("&&"):
                part = part.strip()
                if part.startswith("rcpick "):
                    commands.append(part)
    return commands


def _json(run, command):
    result = run(*shlex.split(command)[1:], "--format", "json")
    assert result.exit_code == 0, result.output
    return json.loads(result.stdout)


# What each README example claims, checked on its own output (the claim's words are in the README beside it).
def _e96(run, command, out):
    doc = _json(run, command)
    best = doc["candidates"][0]
    assert (best["r"]["text"], best["c"]["text"], best["error"]) == ("10K", "470n", 0.0)
    for seed in ("2", "3"):
        other = _json(run, f"{command} --seed {seed}")["candidates"][0]
        assert (other["r"]["text"], other["c"]["text"]) == ("10K", "470n")


def _cutoff(run, command, out):
    best = _json(run, command)["candidates"][0]
    assert best["r"]["ohm"] == 10e3 and abs(best["error"]) < 0.01


def _reset(run, command, out):
    doc = _json(run, command)
    assert doc["target"]["threshold"] == pytest.approx(2.0 / 3.3) and abs(doc["candidates"][0]["error"]) < 1e-3


def _schmitt(run, command, out):
    doc = _json(run, command)
    best = doc["candidates"][0]
    # 1.1 V → 2.2 V towards 3.3 V: τ·ln((3.3 − 1.1)/(3.3 − 2.2)) = τ·ln 2 (Kuphaldt Vol. I ch. 16)
    assert best["value"] == pytest.approx(best["tau_s"] * math.log(2), rel=1e-9)
    assert abs(best["error"]) < 1e-3


def _oscillator(run, command, out):
    doc = _json(run, command)
    if command.startswith("rcpick spread"):
        period = doc["period"]
        assert period["charge_s"] == pytest.approx(period["discharge_s"], rel=1e-9)  # ln 2 each side
        assert period["duty_cycle"] == pytest.approx(0.5) and abs(doc["error"]) < 0.01
    else:
        best = doc["candidates"][0]
        assert best["value"] == pytest.approx(best["tau_s"] * 2 * math.log(2), rel=1e-9) and abs(best["error"]) < 1e-3


def _bleeder(run, command, out):
    doc = _json(run, command)
    cands = doc["candidates"]
    meeting = [c for c in cands if c["spread"]["worst_max"] <= 3.0]
    assert meeting and cands[0] is meeting[0]
    assert cands[0]["r"]["ohm"] == max(c["r"]["ohm"] for c in meeting)
    assert cands[0]["stress"]["energy_j"] == pytest.approx(0.5 * 47e-6 * 400**2)
    assert "margin, %" in out and "Stress of rank 1" in out and "over" in out and "Safety:" in out


def _precise(run, command, out):
    for cand in _json(run, command)["candidates"]:
        assert cand["spread"]["worst_min"] >= 0.98e-3 and cand["spread"]["worst_max"] <= 1.02e-3


def _error(run, command, out):
    cands = _json(run, command)["candidates"]
    assert [(c["r"]["text"], c["c"]["text"]) for c in cands[:4]] == [
        ("1K", "1u"),
        ("10K", "100n"),
        ("100K", "10n"),
        ("1M", "1n"),
    ]
    assert all(c["error"] == 0.0 for c in cands[:4])


def _spread(run, command, out):
    doc = _json(run, command)
    assert doc["spread"]["yield"] > 0.99 and "Contributions" in out and "window low" in out


def _aged(run, command, out):
    doc = _json(run, command)
    shares = doc["contributions"]
    assert shares["ageing"] > 0.05 and shares["threshold"] > 0.05
    assert 0.3 < doc["spread"]["yield"] < 0.7
    assert abs(doc["error"]) < 0.01  # the design hits its target: the spread is what costs the yield


def _stock_find(run, command, out):
    assert "Wrote order.xlsx (shortlist, order, query)" in out
    import pandas as pd

    order = pd.read_excel("order.xlsx", sheet_name="order")
    assert order["part number"].str.startswith("DEMO-").all() and set(order["boards"]) == {250}
    assert "cost" in run(*shlex.split(command)[1:6]).stdout  # the table shows the cost per board


def _stock_spread(run, command, out):
    assert Path("spread.png").stat().st_size > 1000 and "DEMO-R0603-47K0-F" in out


def _net_reset(run, command, out):
    assert "reaches 2.000 V at 5.151 ms" in out and "First order" in out


def _net_two_stage(run, command, out):
    assert "Order 2" in out


def _net_find(run, command, out):
    doc = _json(run, command)
    assert all(abs(c["error"]) < 0.05 for c in doc["candidates"])


def _json_example(run, command, out):
    assert len(json.loads(out)["candidates"]) == 3


def _values_range(run, command, out):
    assert "1K5" in out and "9K1" in out and "25 value(s)" in out  # E24: 24 per decade, both ends included


def _values_around(run, command, out):
    assert "nearest by ratio: 4K99" in out


def _board(run, command, out):
    doc = _json(run, command)
    assert (doc["distinct_line_items"], doc["greedy_line_items"]) == (11, 14) and not doc["unmet"]
    assert all(t["spread"]["yield"] >= 0.99 for t in doc["timings"])
    assert any(item["have"] for item in doc["line_items"])
    assert "Line items 11" in out


def _quick(run, command, out):
    assert "Recommendation Build rank 1" in out


CLAIMS = {
    "rcpick find --tau 10ms": _quick,
    "rcpick find --tau 4.7ms --r-series E96 --r-parts 1 --c-parts 1": _e96,
    "rcpick find --cutoff 1.5kHz --fix-r 10k": _cutoff,
    "rcpick find --delay 50ms --threshold 2.0V --supply 3.3V": _reset,
    "rcpick find --delay 5ms --from 1.1V --threshold 2.2V --supply 3.3V --dielectric C0G": _schmitt,
    "rcpick find --period 1ms --thresholds 1.1V:2.2V --supply 3.3V --dielectric C0G": _oscillator,
    "rcpick spread --r 7k5+11k --c 39n --period 1ms --thresholds 1.1V:2.2V --supply 3.3V --dielectric C0G": _oscillator,
    "rcpick find --delay 3s --threshold 50V --supply 400V --falling --limit upper --fix-c 47u --r-max 10Meg": _bleeder,
    (
        "rcpick find --tau 1ms --dielectric C0G --c-tol 1% --r-tech thin-film --r-tol 0.1% --temp -40:85 --window 2%"
    ): _precise,
    "rcpick find --tau 1ms --rank error": _error,
    "rcpick spread --r 4k7+330 --c 47n//47n --tau 470us --dielectric C0G --temp -40:85": _spread,
    "rcpick spread --r 75k --c 1u --delay 70ms --threshold 2.0V --supply 3.3V --threshold-tol 5% --c-age 87600": _aged,
    "rcpick find --tau 4.7ms --stock demo --boards 250 --spares 5% --out order.xlsx --force": _stock_find,
    "rcpick spread --r 47k --c 100n --stock demo --tau 4.7ms --plot spread.png --force": _stock_spread,
    "rcpick net docs/examples/reset-divider.cir --node rst --threshold 2.0V": _net_reset,
    "rcpick net docs/examples/two-stage.cir": _net_two_stage,
    "rcpick find --net docs/examples/reset-divider.cir --vary R1,C1 --delay 8ms --threshold 2.0V --node rst "
    "--r-parts 1 --c-parts 1": _net_find,
    "rcpick board docs/examples/sensor-board.toml": _board,
    "rcpick find --tau 1ms --top 3 --format json": _json_example,
    "rcpick values E24 --from 1k --to 10k": _values_range,
    "rcpick values E96 --around 5k": _values_around,
}


def test_every_readme_example_has_its_claim_checked():
    assert set(_examples()) == set(CLAIMS)


@pytest.mark.parametrize("command", _examples())
def test_readme_example_says_what_it_claims(run, command, tmp_path, monkeypatch):
    shutil.copytree(ROOT / "docs" / "examples", tmp_path / "docs" / "examples")
    monkeypatch.chdir(tmp_path)  # examples may write files; they find the demo netlists here
    if "--plot" in command:
        pytest.importorskip("matplotlib")
    result = run(*shlex.split(command)[1:], env={"COLUMNS": "160"})
    assert result.exit_code == 0, result.output
    CLAIMS[command](run, command, result.output)


def test_api_page_examples_print_what_they_show():
    # every >>> line of docs/api.md runs and its printed output is compared line by line
    failed, attempted = doctest.testfile(
        str(ROOT / "docs" / "api.md"), module_relative=False, optionflags=doctest.NORMALIZE_WHITESPACE
    )
    assert failed == 0
    assert attempted >= 18
