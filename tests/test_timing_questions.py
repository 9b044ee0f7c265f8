"""Limits, delays between two levels, oscillator periods, leakage and part stress: the timing questions boards ask."""

import math

import pytest

import rcpick
from rcpick.errors import BadValue, ClashingOptions, NotReached

BLEEDER = [
    "find",
    "--delay",
    "3s",
    "--threshold",
    "50V",
    "--supply",
    "400V",
    "--falling",
    "--limit",
    "upper",
    "--fix-c",
    "47u",
    "--r-max",
    "10Meg",
    "--samples",
    "4000",
]


def test_bleeder_limit_every_worst_case_meets_it_and_rank_one_is_the_largest_resistance(run_json):
    doc = run_json(*BLEEDER)
    assert doc["target"]["limit"] == "upper"
    cands = doc["candidates"]
    assert cands and all(
        c["spread"]["worst_max"] <= 3.0 * (1 + 1e-12)
        for c in cands
        if not c["flags"] or "the worst case does not meet the limit" not in c["flags"]
    )
    meeting = [c for c in cands if c["spread"]["worst_max"] <= 3.0]
    assert meeting[0] is cands[0]
    # rank 1 is the largest total resistance whose worst case meets the limit (the least power)
    assert cands[0]["r"]["ohm"] == max(c["r"]["ohm"] for c in meeting)
    # stress per part and the stored energy are reported; the 0603 thick-film default ratings are far exceeded
    stress = cands[0]["stress"]
    assert stress["energy_j"] == pytest.approx(0.5 * 47e-6 * 400.0**2)
    assert sum(stress["r_power_w"]) == pytest.approx(400.0**2 / cands[0]["r"]["ohm"], rel=1e-9)
    assert stress["within_ratings"] is False
    assert any("over 50% of its 0.1 W rating" in f for f in cands[0]["flags"])


def test_bleeder_limit_table_shows_margin_stress_and_safety(run):
    result = run(*BLEEDER, env={"COLUMNS": "160"})
    assert result.exit_code == 0, result.output
    out = result.stdout
    assert "margin, %" in out and "ratings" in out and " over" in out
    assert "Stress of rank 1 (at the first instant)" in out and "stored energy" in out
    assert "Safety: this discharge starts at 400 V" in out and "IEC 60204-1" in out
    assert "modelled as aluminium electrolytic" in out  # the bank's dielectric, said


def test_a_lower_limit_prefers_designs_that_meet_it():
    result = rcpick.find(
        delay="50ms", threshold="2.0V", supply="3.3V", limit="lower", dielectric="C0G", r_tol="1%", samples=2000, top=5
    )
    best = result.best
    assert best.spread.worst_min >= 50e-3
    assert best.spread.yield_ == 1.0
    assert result.to_dict()["target"]["window"] == {"low": pytest.approx(50e-3), "high": None}


def test_ratings_within_when_given():
    result = rcpick.spread(
        r="330k+330k",
        c="10u",
        delay="15s",
        threshold="50V",
        supply="400V",
        falling=True,
        dielectric="PP",
        r_power="0.5W",
        r_voltage="350V",
        c_voltage="630V",
        limit="upper",
    )
    stress = result.design.stress
    # two in series share 400 V: 200 V each, (200 V)²/330 kΩ = 0.121 W each (P = V²/R, OpenStax CP2e §21.1)
    assert stress["r_voltage_v"] == pytest.approx([200.0, 200.0])
    assert stress["r_power_w"] == pytest.approx([200.0**2 / 330e3] * 2)
    assert stress["within_ratings"] is True
    assert stress["single_fault_voltage_v"] == 400.0  # one shorted: the other sees it all
    # series capacitors share in inverse proportion to capacitance
    pair = rcpick.spread(r="100k", c="10u+22u", tau="680ms", supply="100V", c_voltage="63V")
    assert pair.design.stress["c_voltage_v"] == pytest.approx([100 * 22 / 32, 100 * 10 / 32])
    assert pair.design.stress["within_ratings"] is False  # 68.75 V is over 80 % of 63 V


def test_period_half_periods_and_duty():
    result = rcpick.spread(r="10k", c="100n", period="1.5ms", thresholds="1V:3V", supply="5V", temp=25)
    p = result.to_dict()["period"]
    tau = 1e-3
    assert p["charge_s"] == pytest.approx(tau * math.log(4 / 2))  # ln((Vs − VL)/(Vs − VH))
    assert p["discharge_s"] == pytest.approx(tau * math.log(3 / 1))  # ln(VH/VL)
    assert p["duty_cycle"] == pytest.approx(math.log(2) / (math.log(2) + math.log(3)))
    assert result.nominal == pytest.approx(p["charge_s"] + p["discharge_s"])


def test_threshold_tolerance_spreads_both_thresholds_of_a_period():
    base = dict(r="10k", c="100n", period="1.386ms", thresholds="33.333%:66.667%", temp=25, samples=5000)
    plain = rcpick.spread(**base)
    wide = rcpick.spread(**base, threshold_tol="3%")
    assert wide.spread.worst_max > plain.spread.worst_max and wide.spread.worst_min < plain.spread.worst_min
    assert wide.contributions["threshold"] > 0 == plain.contributions["threshold"]


@pytest.mark.parametrize(
    ("keywords", "error", "fragment"),
    [
        (dict(delay="1ms", threshold="1V", from_level="2V", supply="3.3V"), BadValue, "start below its threshold"),
        (dict(delay="1ms", threshold="2V", from_level="1V", supply="3.3V", falling=True), BadValue, "start above"),
        (dict(period="1ms", thresholds="2V:1V", supply="3.3V"), BadValue, "low level of '2V:1V' must be below"),
        (dict(period="1ms"), ClashingOptions, "period needs thresholds"),
        (dict(tau="1ms", limit="upper", window="5%"), ClashingOptions, "limit and window cannot be used together"),
        (dict(delay="1ms", threshold="1V", leak="1uA"), ClashingOptions, "leak needs supply"),
        (dict(tau="1ms", leak="1uA", supply="3V"), ClashingOptions, "leak applies to delay and period"),
        (dict(tau="1ms", thresholds="1V:2V"), ClashingOptions, "thresholds belongs to period"),
    ],
)
def test_impossible_requests_are_refused(keywords, error, fragment):
    with pytest.raises(error, match=fragment):
        rcpick.find(**keywords)


def test_leakage_that_keeps_the_node_from_its_threshold():
    with pytest.raises(NotReached, match="settles at 1.300 V and never reaches 1.650 V"):
        rcpick.spread(r="1Meg", c="100n", delay="80ms", threshold="1.65V", supply="3.3V", leak="2uA")
    warned = rcpick.spread(r="1Meg", c="100n", delay="80ms", threshold="1.65V", supply="3.3V", leak="1uA", temp=25)
    assert any("leakage of 1.00 µA moves this timing by +82" in w for w in warned.warnings)


def test_leakage_search_names_the_c_each_r_needs():
    # with leakage the delay depends on R and C separately; the search still finds exact hits
    result = rcpick.find(delay="10ms", threshold="2V", supply="3.3V", leak="5uA", rank="error", top=3)
    for cand in result.candidates:
        assert abs(cand.error) < 0.02
    assert result.to_dict()["target"]["tau_s"] is None


def test_net_start_voltage_discharge():
    # a 47 µF bank charged to 400 V through a 10 kΩ bleeder: t = RC·ln(400/50) (Kuphaldt, time between two levels)
    import pathlib
    import tempfile

    with tempfile.TemporaryDirectory() as folder:
        path = pathlib.Path(folder) / "bank.cir"
        path.write_text("V1 in 0 0\nR1 bank 0 10k\nC1 bank 0 47u @400V\n")
        result = rcpick.network(str(path), node="bank", threshold="50V")
        assert result.step["v0"] == pytest.approx(400.0)
        assert result.step["t_threshold_s"] == pytest.approx(10e3 * 47e-6 * math.log(8), rel=1e-9)
