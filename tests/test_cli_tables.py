"""Tables fit the terminal: at 80, 100 and 120 columns no part value, rank or yield is ever cut."""

import json
import re

import pytest

QUERIES = {
    "tau": ["find", "--tau", "10ms", "--samples", "2000"],
    "delay in volts": ["find", "--delay", "200ms", "--threshold", "1.1V", "--supply", "1.8V", "--samples", "2000"],
    "stock with prices": ["find", "--tau", "4.7ms", "--stock", "demo", "--samples", "2000"],
    "network": [
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
        "--samples",
        "300",
    ],
}


def _yield_text(spread):
    low, high = spread["yield_ci"]
    return f"{spread['yield'] * 100:.1f} ({low * 100:.1f}–{high * 100:.1f})"


@pytest.mark.parametrize("width", [80, 100, 120])
@pytest.mark.parametrize("case", QUERIES, ids=list(QUERIES))
def test_nothing_essential_is_cut(run, case, width):
    args = QUERIES[case]
    doc = json.loads(run(*args, "--format", "json").stdout)
    result = run(*args, env={"COLUMNS": str(width)})
    assert result.exit_code == 0, result.output
    lines = result.stdout.splitlines()
    assert all(len(line) <= width for line in lines), max(lines, key=len)
    rule = next(i for i, line in enumerate(lines) if line.startswith("───"))
    rows = []
    for line in lines[rule + 1 :]:
        if not re.match(r"^\s*\d+  \S", line):
            break
        rows.append(line)
    assert not any(len(text) > 1 and text.endswith("…") for row in rows for text in row.split())  # none cut
    assert len(rows) == len(doc["candidates"])
    for row, cand in zip(rows, doc["candidates"]):
        assert row.split()[0] == str(cand["rank"])
        texts = (
            [cand["elements"][n]["text"] for n in doc["network"]["vary"]]
            if "network" in doc
            else [cand["r"]["text"], cand["c"]["text"]]
        )
        for text in texts:
            assert f" {text} " in f" {row} ", (text, row)
        assert _yield_text(cand["spread"]) in row
        assert row.rstrip().endswith(str(cand["parts"])) or f" {cand['parts']} " in row


def test_narrow_table_says_what_it_left_out(run):
    result = run("find", "--tau", "10ms", "--samples", "2000", env={"COLUMNS": "80"})
    assert "Not shown at this width: R eff, C eff" in result.stdout
    wide = run("find", "--tau", "10ms", "--samples", "2000", env={"COLUMNS": "160"})
    assert "Not shown" not in wide.stdout and "R eff" in wide.stdout


@pytest.mark.parametrize("width", [80, 100])
def test_footer_wraps_at_the_width(run, width):
    result = run("find", "--tau", "10ms", "--samples", "2000", env={"COLUMNS": str(width)})
    assert max(len(line) for line in result.stdout.splitlines()) <= width
    assert any(line.startswith("Recommendation") for line in result.stdout.splitlines())


def test_spread_fits(run):
    for width in (80, 100):
        result = run(
            "spread",
            "--r",
            "4k7+330",
            "--c",
            "47n//47n",
            "--tau",
            "470us",
            "--dielectric",
            "C0G",
            env={"COLUMNS": str(width)},
        )
        assert result.exit_code == 0
        assert max(len(line) for line in result.stdout.splitlines()) <= width


def test_help_keeps_square_brackets_and_shows_no_placeholder_for_switches(run):
    result = run("find", "--help", env={"COLUMNS": "120"})
    assert "pip install 'rcpick[plot]'" in result.stdout
    assert "<bool>" not in result.stdout
    assert "Project defaults file. Default: ./rcpick.toml when present" in " ".join(result.stdout.split())
