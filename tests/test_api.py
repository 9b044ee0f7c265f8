"""The Python API: one call per command, results equal to the command line's JSON, errors naming parameters."""

import math

import numpy as np
import pytest

import rcpick
from rcpick.errors import BadValue, ClashingOptions

QUERIES = {
    "tau": (dict(tau="4.7ms", top=5, samples=2000), ["find", "--tau", "4.7ms", "--top", "5", "--samples", "2000"]),
    "delay from a level, falling": (
        dict(
            delay="20ms",
            threshold="1V",
            from_level="3V",
            supply="3.3V",
            falling=True,
            top=4,
            samples=1000,
            rank="error",
        ),
        [
            "find",
            "--delay",
            "20ms",
            "--threshold",
            "1V",
            "--from",
            "3V",
            "--supply",
            "3.3V",
            "--falling",
            "--top",
            "4",
            "--samples",
            "1000",
            "--rank",
            "error",
        ],
    ),
    "stock": (
        dict(tau="4.7ms", stock="demo", top=3, boards=250, spares="5%"),
        ["find", "--tau", "4.7ms", "--stock", "demo", "--top", "3", "--boards", "250", "--spares", "5%"],
    ),
    "network": (
        dict(
            net="docs/examples/reset-divider.cir",
            vary="R1,C1",
            delay="8ms",
            threshold="2.0V",
            node="rst",
            r_parts=1,
            c_parts=1,
            top=3,
            samples=300,
        ),
        [
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
            "--top",
            "3",
            "--samples",
            "300",
        ],
    ),
    "period": (
        dict(period="1ms", thresholds="1.1V:2.2V", supply="3.3V", dielectric="C0G", top=3, samples=1000),
        [
            "find",
            "--period",
            "1ms",
            "--thresholds",
            "1.1V:2.2V",
            "--supply",
            "3.3V",
            "--dielectric",
            "C0G",
            "--top",
            "3",
            "--samples",
            "1000",
        ],
    ),
}


@pytest.mark.parametrize("case", QUERIES, ids=list(QUERIES))
def test_to_dict_is_the_commands_json(run_json, case):
    keywords, argv = QUERIES[case]
    assert rcpick.find(**keywords).to_dict() == run_json(*argv)


def test_spread_to_dict_is_the_commands_json(run_json):
    result = rcpick.spread(r="4k7+330", c="47n//47n", tau="470us", dielectric="C0G", temp="-40:85", samples=2000)
    assert result.to_dict() == run_json(
        "spread",
        "--r",
        "4k7+330",
        "--c",
        "47n//47n",
        "--tau",
        "470us",
        "--dielectric",
        "C0G",
        "--temp",
        "-40:85",
        "--samples",
        "2000",
    )


def test_network_to_dict_is_the_commands_json(run_json):
    result = rcpick.network("docs/examples/coupled.cir", node="node", threshold="70%")
    assert result.to_dict() == run_json("net", "docs/examples/coupled.cir", "--node", "node", "--threshold", "70%")
    assert result.order == 1 and result.step["t_threshold_s"] > 0


def test_numbers_in_si_units_or_notation_alike():
    text = rcpick.find(
        tau="10ms", r_min="4k7", r_max="47k", c_tol="5%", temp="-40:85", window="-5%:+10%", top=3, samples=1000
    )
    numbers = rcpick.find(
        tau=10e-3, r_min=4.7e3, r_max=47e3, c_tol=0.05, temp=(-40, 85), window=(-0.05, 0.10), top=3, samples=1000
    )
    assert text.to_dict() == numbers.to_dict()


def test_frame_in_si_units():
    frame = rcpick.find(cutoff="1kHz", top=4, samples=500).to_frame()
    assert len(frame) == 4
    for column in (
        "rank",
        "r_ohm",
        "c_farad",
        "tau_s",
        "cutoff_hz",
        "error",
        "yield",
        "yield_low",
        "yield_high",
        "worst_min_hz",
        "parts",
    ):
        assert column in frame.columns, column
    assert np.allclose(frame["tau_s"], frame["r_ohm"] * frame["c_farad"], rtol=1e-12)
    assert np.allclose(frame["cutoff_hz"], 1 / (2 * math.pi * frame["tau_s"]), rtol=1e-12)


def test_result_reads_well_in_a_notebook():
    result = rcpick.find(tau="1ms", top=2, samples=500)
    text = repr(result)
    assert text.startswith("rcpick.find: tau = 1.00 ms") and "Build rank 1" in text and " 1. " in text
    assert "<table" in result._repr_html_()
    design = rcpick.spread(r="10k", c="100n", tau="1ms", samples=500)
    assert "worst case" in repr(design)


def test_save_and_plot(tmp_path):
    import pandas as pd

    result = rcpick.find(tau="4.7ms", stock="demo", top=3, samples=500)
    path = result.save(tmp_path / "order.xlsx", boards=250, spares="5%")
    order = pd.read_excel(path, sheet_name="order")
    assert set(order["boards"]) == {250}
    query = pd.read_excel(path, sheet_name="query").fillna("")
    rows = dict(zip(query["setting"], zip(query["value"], query["source"])))
    assert rows["boards"] == ("250", "save()") and rows["tau"] == ("4.7ms", "API")
    with pytest.raises(BadValue, match="exists; add force"):
        result.save(path)
    pytest.importorskip("matplotlib")
    assert result.plot(tmp_path / "shortlist.png").stat().st_size > 1000


def test_read_stock():
    demo = rcpick.read_stock("demo")
    assert demo.covers("resistance") and len(demo.parts) > 10
    with pytest.raises(BadValue, match="stock: .*no such file"):
        rcpick.read_stock("/nonexistent/parts.csv")


@pytest.mark.parametrize(
    ("keywords", "error", "fragment"),
    [
        (dict(tau="1kHz"), BadValue, "tau: '1kHz' is a frequency, not a time"),
        (dict(tau="1ms", r_min="1M", r_max="1k"), BadValue, "r_min: 1 MΩ is above r_max 1 kΩ"),
        (dict(tau="1ms", cutoff="1kHz"), ClashingOptions, "give exactly one target (tau, cutoff, delay, period)"),
        (dict(tau="1ms", fix_r="10k", r_parts=1), ClashingOptions, "fix_r and r_parts cannot be used together"),
        (dict(delay="1ms"), ClashingOptions, "delay needs threshold"),
        (dict(tau="1ms", top=0), BadValue, "top: 0 must be between 1 and 200"),
        (dict(tau="1ms", samples="lots"), BadValue, "samples: 'lots' is not a whole number"),
        (dict(tau="1000s", rank="error"), rcpick.Unreachable, "widen r_min/r_max or c_min/c_max"),
    ],
)
def test_errors_name_the_parameter(keywords, error, fragment):
    with pytest.raises(error) as caught:
        rcpick.find(**keywords)
    assert fragment in str(caught.value)
    assert "--" not in str(caught.value)  # the API never speaks of command-line options


def test_the_api_takes_every_setting_of_its_spec():
    import inspect

    from rcpick.specs import FindSpec, SpreadSpec

    for function, spec in ((rcpick.find, FindSpec), (rcpick.spread, SpreadSpec)):
        params = set(inspect.signature(function).parameters) - {"config", "progress"}
        assert params == set(spec.names()), function.__name__


def test_one_r_and_one_c_in_a_netlist_repeat_plain_find_and_spread(tmp_path):
    # one spread engine: the same part law, draws and pooling whether the R and C stand alone or in a netlist
    net = tmp_path / "rc.cir"
    net.write_text("V1 in 0 1\nR1 in out 10k\nC1 out 0 100n\n")
    common = dict(
        r_min="10k",
        r_max="10k",
        c_min="100n",
        c_max="100n",
        r_parts=1,
        c_parts=1,
        samples=20000,
        seed=3,
        temp="-20:60",
        window="5%",
        dielectric="X7R",
        top=1,
    )
    plain = rcpick.find(tau="1ms", **common)
    netted = rcpick.find(tau="1ms", net=str(net), vary="R1,C1", **common)
    alone = rcpick.spread(
        r="10k", c="100n", tau="1ms", samples=20000, seed=3, temp="-20:60", window="5%", dielectric="X7R"
    )
    a, b = plain.best.spread, netted.best.spread
    assert a.yield_ == b.yield_ == alone.spread.yield_
    for name in ("worst_min", "worst_max", "p_low", "p_median", "p_high", "sigma"):
        assert getattr(b, name) == pytest.approx(getattr(a, name), rel=1e-9), name
        assert getattr(alone.spread, name) == pytest.approx(getattr(a, name), rel=1e-9), name
