"""Error messages name the right setting and show what was typed.

Each case here was once wrong: a bound that disagreed with the parser, a
prefix left out, a plural spelt by rule, a level blamed on the wrong option or
shown as a fraction when it was typed in volts, a file key without its colon,
and a search that evaluated its pools before refusing their total size.
"""

from __future__ import annotations

import pytest

from rcpick import netsearch, series, settings
from rcpick import target as targets
from rcpick.combos import build
from rcpick.errors import BadValue
from rcpick.netfind import pooled
from rcpick.netlist import read


def one_line_error(result) -> str:
    assert result.exit_code == 2, result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1, result.stderr
    return lines[0]


def test_seed_bound_is_the_count_parsers_bound(run):
    ok = run("spread", "--r", "10k", "--c", "100n", "--tau", "1ms", "--samples", "200", "--seed", "1e18")
    assert ok.exit_code == 0, ok.output
    line = one_line_error(run("spread", "--r", "10k", "--c", "100n", "--tau", "1ms", "--seed", "1000000000000000001"))
    assert "--seed" in line and "0 to 1e18" in line


@pytest.mark.parametrize(("text", "watts"), [("1MW", 1e6), ("2kW", 2e3), ("250mW", 0.25), ("1/4W", 0.25)])
def test_power_prefixes(text, watts):
    assert settings.SETTINGS["r_power"].parse(text) == pytest.approx(watts)


def test_frequency_plural():
    with pytest.raises(BadValue, match="outside the frequencies rcpick handles"):
        settings.SETTINGS["cutoff"].parse("1e15Hz")


def test_threshold_at_zero_blames_the_threshold():
    with pytest.raises(BadValue) as caught:
        targets.for_delay(1e-3, 0.0)
    assert caught.value.setting == "threshold"


def test_threshold_above_supply_is_shown_in_volts(run):
    line = one_line_error(run("find", "--delay", "1ms", "--threshold", "6V", "--supply", "5V"))
    assert line.startswith("rcpick: error: --threshold:") and "6 V" in line and "the supply" in line


def test_start_on_the_wrong_side_blames_the_start(run):
    line = one_line_error(
        run("find", "--delay", "1ms", "--threshold", "2V", "--from", "3V", "--supply", "5V"),
    )
    assert "--from" in line and "start 3 V, threshold 2 V" in line


def test_never_reached_keeps_the_typed_threshold(run):
    line = one_line_error(run("net", "docs/examples/reset-divider.cir", "--node", "rst", "--threshold", "3.2999V"))
    assert "never reaches 3.2999 V" in line


def test_file_key_has_its_colon(run, tmp_path):
    config = tmp_path / "rcpick.toml"
    config.write_text('temp = "70:0"\n', encoding="utf-8")
    line = one_line_error(run("find", "--tau", "1ms", "--config", str(config)))
    assert f"{config}: key 'temp':" in line


def test_enumeration_cap_is_checked_before_any_pool(monkeypatch):
    """A delay search too large to enumerate is refused before the first pool is searched."""
    net = read("docs/examples/reset-divider.cir")
    r = build(series.get("E96").values(1e3, 1e6), "resistance", 2, 1e3, 1e6)
    c = build(series.get("E24").values(1e-9, 1e-6), "capacitance", 2, 1e-9, 1e-6)
    varied = [netsearch.Varied("R1", r), netsearch.Varied("C1", c)]
    assert len(r) * len(c) > netsearch.ENUMERATION_CAP
    calls = []
    monkeypatch.setattr(netsearch, "search", lambda *a, **k: calls.append(a))
    with pytest.raises(BadValue, match="exceeds"):
        pooled(net, varied, netsearch.Quantity("delay", "rst", 2.0, True), 5e-3, 10)
    assert calls == []
