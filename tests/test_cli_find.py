"""``rcpick find`` end to end, through typer's CliRunner."""

import csv
import io
import math

import pytest


def test_tau_table(run):
    result = run("find", "--tau", "10ms")
    assert result.exit_code == 0, result.output
    assert "tau = 10.0 ms" in result.stdout
    assert "combinations" in result.stdout
    assert "Recommendation Build rank 1" in result.stdout and "95 % interval" in result.stdout


def test_json_schema(run_json):
    doc = run_json("find", "--tau", "4.7ms", "--top", "5", "--rank", "error")
    window = doc["target"].pop("window")
    assert doc["target"] == {
        "kind": "tau",
        "value": 4.7e-3,
        "unit": "s",
        "tau_s": 4.7e-3,
        "supply_v": None,
        "leak_a": None,
        "limit": None,
    }
    assert window["low"] == pytest.approx(4.7e-3 * 0.9) and window["high"] == pytest.approx(4.7e-3 * 1.1)
    assert doc["searched"]["r_combinations"] > 1000 and doc["searched"]["c_combinations"] > 1000
    assert [c["rank"] for c in doc["candidates"]] == [1, 2, 3, 4, 5]
    for cand in doc["candidates"]:
        r, c = cand["r"], cand["c"]
        assert r["arrangement"] in ("single", "series", "parallel")
        assert len(r["parts_ohm"]) == (1 if r["arrangement"] == "single" else 2)
        assert math.isclose(cand["tau_s"], r["ohm"] * c["farad"], rel_tol=1e-12)
        assert math.isclose(cand["error"], cand["value"] / 4.7e-3 - 1, abs_tol=1e-15)
        assert cand["parts"] == len(r["parts_ohm"]) + len(c["parts_farad"])
        sp = cand["spread"]
        assert sp["worst_min"] <= sp["p_low"] <= sp["p_median"] <= sp["p_high"] <= sp["worst_max"]
        assert 0.0 <= sp["yield_ci"][0] <= sp["yield"] <= sp["yield_ci"][1] <= 1.0
    errors = [abs(c["error"]) for c in doc["candidates"]]
    assert errors == sorted(errors)


def test_kuphaldt_delay_picks_10k(run_json):
    # Kuphaldt, Lessons in Electric Circuits Vol. I ch. 16: 15 V, 10 kΩ, 100 µF reaches 12.970 V at 2 s.
    doc = run_json(
        "find", "--delay", "2s", "--threshold", "12.970V", "--supply", "15V", "--fix-c", "100u", "--rank", "error"
    )
    best = doc["candidates"][0]
    assert best["r"]["ohm"] == 10e3 and best["r"]["arrangement"] == "single"
    assert abs(best["error"]) < 2e-4
    assert doc["target"]["kind"] == "delay"


def test_openstax_falling_delay_picks_1k(run_json):
    # OpenStax CP2e §21.6: 1.00 kΩ, 8.00 µF, 10.0 kV falls to 498 V in 24.0 ms.
    doc = run_json(
        "find",
        "--delay",
        "24ms",
        "--threshold",
        "498V",
        "--supply",
        "10kV",
        "--falling",
        "--fix-c",
        "8u",
        "--rank",
        "error",
    )
    assert doc["candidates"][0]["r"]["ohm"] == 1e3
    assert doc["target"]["falling"] is True


def test_cutoff_and_percent_threshold(run_json):
    doc = run_json("find", "--cutoff", "159.155Hz", "--fix-r", "10k", "--top", "1", "--rank", "error")
    assert doc["candidates"][0]["c"]["farad"] == 100e-9  # 10 kΩ, 100 nF → 159.155 Hz
    pct = run_json(
        "find", "--delay", "1ms", "--threshold", "63.212%", "--fix-r", "10k", "--top", "1", "--rank", "error"
    )
    frac = run_json(
        "find", "--delay", "1ms", "--threshold", "0.63212", "--fix-r", "10k", "--top", "1", "--rank", "error"
    )
    assert pct["candidates"] == frac["candidates"]
    assert pct["candidates"][0]["c"]["farad"] == 100e-9


def test_single_parts_only(run_json):
    doc = run_json("find", "--tau", "3.3ms", "--r-parts", "1", "--c-parts", "1", "--top", "20")
    assert all(c["parts"] == 2 for c in doc["candidates"])


def test_pairs_appear_when_they_help(run_json):
    doc = run_json("find", "--tau", "1.2345ms", "--top", "3", "--rank", "error")
    assert any(c["parts"] > 2 for c in doc["candidates"])
    assert abs(doc["candidates"][0]["error"]) < 1e-4


def test_csv_reads_back(run):
    result = run("find", "--cutoff", "1kHz", "--top", "4", "--format", "csv")
    assert result.exit_code == 0
    rows = list(csv.DictReader(io.StringIO(result.stdout)))
    assert len(rows) == 4
    assert {
        "rank",
        "r_wiring",
        "r_ohm",
        "c_wiring",
        "c_farad",
        "tau_s",
        "cutoff_hz",
        "error",
        "parts",
        "worst_min_hz",
        "worst_max_hz",
        "p_low_hz",
        "p_median_hz",
        "p_high_hz",
        "yield",
    } <= set(rows[0])
    for row in rows:
        assert float(row["tau_s"]) == pytest.approx(float(row["r_ohm"]) * float(row["c_farad"]))


# One test per kind of bad input: exit code 2, one line naming the option, no traceback.
BAD = {
    "unknown series": (["--tau", "1ms", "--r-series", "E25"], "--r-series", "E25"),
    "malformed value": (["--tau", "ten ms"], "--tau", "cannot read"),
    "wrong unit": (["--tau", "1kHz"], "--tau", "frequency"),
    "zero": (["--tau", "0s"], "--tau", "greater than 0"),
    "negative": (["--fix-c", "-1u", "--tau", "1ms"], "--fix-c", "greater than 0"),
    "nan": (["--cutoff", "nan"], "--cutoff", "cannot read"),
    "inf": (["--tau", "1e999"], "--tau", "finite"),
    "min above max": (["--tau", "1ms", "--c-min", "1u", "--c-max", "1n"], "--c-min", "above --c-max"),
    "threshold outside (0, 1)": (["--delay", "1ms", "--threshold", "1.5"], "--threshold", "between 0 and 1"),
    "threshold at supply": (
        ["--delay", "1ms", "--threshold", "6V", "--supply", "5V"],
        "--threshold",
        "6 V must lie between 0 and the supply",
    ),
    "no target": (["--r-series", "E96"], "target", "got none"),
    "two targets": (["--tau", "1ms", "--cutoff", "1kHz"], "--tau and --cutoff", "exactly one"),
    "fix with parts": (["--tau", "1ms", "--fix-r", "10k", "--r-parts", "1"], "--fix-r and --r-parts", "together"),
    "top 0": (["--tau", "1ms", "--top", "0"], "--top", "must be between 1 and 200"),
    "top abc": (["--tau", "1ms", "--top", "abc"], "--top", "'abc' is not a whole number (1…200)"),
    "samples in notation, too many": (["--tau", "1ms", "--samples", "2e8"], "--samples", "between 100 and"),
    "unknown option": (["--tau", "1ms", "--taux", "1"], "--taux: no such option", "did you mean --tau"),
    "missing value": (["--tau"], "--tau: needs a value", "see rcpick find --help"),
    "value for a switch": (["--tau", "1ms", "--falling=yes"], "--falling", "is a switch and takes no value"),
    "extra argument": (["--tau", "1ms", "10k"], "unexpected argument(s) '10k'", "rcpick find --help"),
    "unreachable": (["--tau", "1000s", "--rank", "error"], "within 50%", "widen"),
    "nothing inside the window": (["--tau", "1000s"], "inside the window", "--rank error"),
    "r-parts 3": (["--tau", "1ms", "--r-parts", "3"], "--r-parts", "1 or 2"),
    "threshold without delay": (["--tau", "1ms", "--threshold", "0.5"], "--threshold", "--delay"),
    "delay without threshold": (["--delay", "1ms"], "--delay", "--threshold"),
    "unknown format": (["--tau", "1ms", "--format", "xml"], "--format", "table, json, csv"),
}


@pytest.mark.parametrize("case", BAD, ids=list(BAD))
def test_bad_input(run, case):
    args, where, what = BAD[case]
    result = run("find", *args)
    assert result.exit_code == 2, result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    assert lines[0].startswith("rcpick: error: ")
    assert where in lines[0] and what in lines[0]
    assert "Traceback" not in result.output
    assert result.stdout == ""
