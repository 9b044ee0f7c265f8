"""``rcpick spread`` and the spread options of ``find``, end to end."""

import pytest


def test_spread_table(run):
    result = run(
        "spread", "--r", "4k7+330", "--c", "47n//47n", "--tau", "480us", "--dielectric", "C0G", "--temp", "-40:85"
    )
    assert result.exit_code == 0, result.output
    out = result.stdout
    for text in (
        "worst-case min",
        "MC 99.865 %",
        "yield",
        "Contributions",
        "R tolerance",
        "◄ window low",
        "◄ worst-case max",
        "4K7 + 330R",
        "47n ∥ 47n",
    ):
        assert text in out, text


def test_spread_json_without_target(run_json):
    doc = run_json(
        "spread",
        "--r",
        "10k",
        "--c",
        "100n",
        "--dielectric",
        "C0G",
        "--r-tcr",
        "100ppm",
        "--r-tol",
        "1%",
        "--temp",
        "-40:85",
    )
    assert doc["unit"] == "s" and doc["quantity"] == "tau" and doc["target"] is None
    assert doc["nominal"] == pytest.approx(1e-3)
    sp = doc["spread"]
    assert sp["yield"] is None
    # the exact worst case of the example (RIAC extreme-value definition)
    assert sp["worst_max"] == pytest.approx(1e-3 * 1.01 * 1.05 * (1 + 100e-6 * 65) * (1 + 30e-6 * 65), rel=1e-12)
    assert set(doc["contributions"]) == {
        "R tolerance",
        "R temperature",
        "C tolerance",
        "C temperature",
        "bias loss",
        "ageing",
        "threshold",
    }
    assert sum(doc["contributions"].values()) == pytest.approx(1.0)
    assert sum(doc["histogram"]["counts"]) == 20000 * len(doc["temperatures_c"])


def test_spread_repeats_find_for_the_same_design(run_json):
    common = ["--dielectric", "X7R", "--temp", "-20:60", "--samples", "3000", "--seed", "9"]
    found = run_json("find", "--cutoff", "2kHz", "--top", "1", "--rank", "error", *common)
    best = found["candidates"][0]
    sep = {"series": "+", "parallel": "//", "single": ""}
    r = sep[best["r"]["arrangement"]].join(repr(v) for v in best["r"]["parts_ohm"])
    c = sep[best["c"]["arrangement"]].join(repr(v) for v in best["c"]["parts_farad"])
    alone = run_json("spread", "--r", r, "--c", c, "--cutoff", "2kHz", *common)
    ci, best_ci = alone["spread"].pop("yield_ci"), best["spread"].pop("yield_ci")
    assert alone["spread"] == pytest.approx(best["spread"], rel=1e-12)
    assert ci == pytest.approx(best_ci, rel=1e-12)


def test_find_ranks_by_yield_by_default(run_json):
    doc = run_json("find", "--tau", "2.2ms", "--dielectric", "C0G", "--top", "8")
    assert doc["analysis"]["rank"] == "yield"
    # documented rule: no row ranks above a row with fewer parts unless its yield interval lies wholly above
    cands = doc["candidates"]
    for i, upper in enumerate(cands):
        for lower in cands[i + 1 :]:
            if upper["parts"] > lower["parts"]:
                assert upper["spread"]["yield_ci"][0] > lower["spread"]["yield_ci"][1]
    assert doc["analysis"]["pool"]["capped"] is True
    parts_seen = {c["parts"] for c in doc["candidates"]}
    assert parts_seen, "candidates listed"


def test_single_parts_not_crowded_out(run_json):
    # With single parts much better centred than nothing else, they must reach the analysed pool.
    doc = run_json("find", "--tau", "1ms", "--dielectric", "C0G", "--top", "200", "--window", "3%")
    assert any(c["parts"] == 2 for c in doc["candidates"])


def test_rank_spread_orders_by_worst_case_span(run_json):
    doc = run_json("find", "--tau", "3.3ms", "--rank", "spread", "--top", "6", "--dielectric", "X7R")
    spans = [round((c["spread"]["worst_max"] - c["spread"]["worst_min"]) / 3.3e-3, 9) for c in doc["candidates"]]
    assert spans == sorted(spans)


def test_warnings_in_output(run):
    result = run("find", "--tau", "1ms", "--dielectric", "X5R", "--temp", "0:100", "--top", "2")
    assert result.exit_code == 0
    assert "leaves X5R's rated range" in result.stdout
    result = run("spread", "--r", "10k", "--c", "100u", "--dielectric", "electrolytic")
    assert "poor timing parts" in result.stdout
    result = run("spread", "--r", "10k", "--c", "100n", "--dielectric", "Y5V", "--format", "json")
    assert "poor timing parts" in result.stdout


def test_threshold_tol_widens_the_delay(run_json):
    base = [
        "spread",
        "--r",
        "10k",
        "--c",
        "1u",
        "--delay",
        "7ms",
        "--threshold",
        "2.0V",
        "--supply",
        "3.3V",
        "--dielectric",
        "C0G",
        "--temp",
        "25",
    ]
    plain = run_json(*base)
    wide = run_json(*base, "--threshold-tol", "5%")
    assert wide["spread"]["worst_max"] > plain["spread"]["worst_max"]
    assert wide["contributions"]["threshold"] > 0 and plain["contributions"]["threshold"] == 0


BAD = {
    "tolerance zero": (["--r-tol", "0%"], "--r-tol", "greater than 0"),
    "tolerance 100": (["--c-tol", "100%"], "--c-tol", "more than ±50%"),
    "tolerance range 100": (["--c-tol", "-20%:+100%"], "--c-tol", "less than 100 %"),
    "temp backwards": (["--temp", "70:0"], "--temp", "above maximum"),
    "temp below absolute zero": (["--temp", "-300:25"], "--temp", "absolute zero"),
    "unknown dielectric": (["--dielectric", "X9Q"], "--dielectric", "class 1 EIA codes"),
    "unknown technology": (["--r-tech", "wirewound"], "--r-tech", "thick-film"),
    "samples too few": (["--samples", "10"], "--samples", "between 100"),
    "samples absurd": (["--samples", "1000000000"], "--samples", "between 100 and 10,000,000"),
    "samples unreadable": (["--samples", "lots"], "--samples", "not a whole number"),
    "window excludes target": (["--window", "+2%:+5%"], "--window", "excludes the target"),
    "tcr and tech": (["--r-tcr", "50ppm", "--r-tech", "thin-film"], "--r-tcr and --r-tech", "together"),
    "bad distribution": (["--dist", "cauchy"], "--dist", "uniform, normal"),
    "threshold tol without delay": (["--threshold-tol", "2%"], "--threshold-tol", "--delay"),
}


@pytest.mark.parametrize("command", ["find", "spread"])
@pytest.mark.parametrize("case", BAD, ids=list(BAD))
def test_bad_spread_input(run, command, case):
    args, where, what = BAD[case]
    base = ["find", "--tau", "1ms"] if command == "find" else ["spread", "--r", "10k", "--c", "100n", "--tau", "1ms"]
    result = run(*base, *args)
    assert result.exit_code == 2, result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("rcpick: error: ")
    assert where in lines[0] and what in lines[0], lines[0]


def test_bad_design_text(run):
    result = run("spread", "--r", "10k+1k+1k", "--c", "100n")
    assert result.exit_code == 2 and "--r" in result.stderr
    result = run("spread", "--r", "10k", "--c", "100nF//abc")
    assert result.exit_code == 2 and "--c" in result.stderr


def test_threshold_band_must_stay_inside_the_step(run):
    for base in (["find"], ["spread", "--r", "10k", "--c", "100n"]):
        result = run(*base, "--delay", "1ms", "--threshold", "0.99", "--threshold-tol", "5%")
        assert result.exit_code == 2
        assert result.stderr.startswith("rcpick: error: --threshold-tol:") and "narrow it" in result.stderr
