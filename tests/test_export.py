"""Exports read back: XLSX sheets, types, formats and totals; CSV; overwrite refusal; atomic writes."""

import json
import math

import pandas as pd
import pytest
from openpyxl import load_workbook

from rcpick import export


@pytest.fixture
def demo_xlsx(run, tmp_path):
    path = tmp_path / "buy.xlsx"
    args = ["find", "--tau", "4.7ms", "--stock", "demo", "--top", "5", "--boards", "250", "--spares", "5%"]
    result = run(*args, "--order", "1,2", "--out", str(path))
    assert result.exit_code == 0, result.output
    doc = json.loads(run(*args, "--format", "json").stdout)
    return path, doc


def test_xlsx_sheets_types_and_formats(demo_xlsx):
    path, doc = demo_xlsx
    book = load_workbook(path)
    assert book.sheetnames == ["shortlist", "order", "query"]
    for sheet in book.worksheets:
        assert sheet.freeze_panes == "A2"
        assert sheet.column_dimensions["A"].width >= 10
    short = book["shortlist"]
    headers = [c.value for c in short[1]]
    assert {
        "rank",
        "R wiring",
        "C wiring",
        "R1 (Ω)",
        "R1 tol − (%)",
        "R1 TCR max (ppm/°C)",
        "C1 dielectric",
        "C1 part number",
        "tau (s)",
        "error (fraction)",
        "worst-case min (s)",
        "MC 99.865 % (s)",
        "yield (fraction)",
        "parts",
    } <= set(headers)
    tau = short.cell(row=2, column=headers.index("tau (s)") + 1)
    assert tau.data_type == "n" and tau.number_format == "##0.000E+0"
    assert short.cell(row=2, column=headers.index("yield (fraction)") + 1).number_format == "0.000%"
    assert short.max_row == 1 + len(doc["candidates"])


def test_xlsx_values_equal_the_json(demo_xlsx):
    path, doc = demo_xlsx
    frame = pd.read_excel(path, sheet_name="shortlist")
    for (_, row), cand in zip(frame.iterrows(), doc["candidates"]):
        assert row["R wiring"] == cand["r"]["text"] and row["C wiring"] == cand["c"]["text"]
        assert row["tau (s)"] == pytest.approx(cand["tau_s"], rel=1e-12)
        assert row["yield (fraction)"] == pytest.approx(cand["spread"]["yield"])
        assert row["worst-case max (s)"] == pytest.approx(cand["spread"]["worst_max"], rel=1e-12)


def test_order_sheet_totals(demo_xlsx):
    path, doc = demo_xlsx
    order = pd.read_excel(path, sheet_name="order", dtype={"package": str})
    picked = [c for c in doc["candidates"] if c["rank"] in (1, 2)]
    parts = [(d["value"], d["part_number"]) for c in picked for pos in ("r", "c") for d in c[pos]["parts_detail"]]
    assert order["qty per board"].sum() == len(parts)
    for _, row in order.iterrows():
        assert row["total qty"] == math.ceil(row["qty per board"] * 250 * 1.05 - 1e-9)
        assert row["extended price (total)"] == pytest.approx(row["total qty"] * row["unit price (each)"])
        assert row["shortfall"] == max(0, row["total qty"] - row["on hand"])
        assert row["part number"].startswith("DEMO-")
        assert row["package"] in ("0603", "0805", "1206")
    assert set(order["kind"]) <= {"R", "C"}


def test_query_sheet_carries_provenance(demo_xlsx):
    path, _ = demo_xlsx
    query = pd.read_excel(path, sheet_name="query").fillna("")
    settings = dict(zip(query["setting"], query["value"]))
    assert settings["rcpick version"]
    assert "--tau 4.7ms" in settings["command line"]
    assert str(settings["seed used"]) == "1"
    for key in ("r-series", "temp", "window", "dist", "samples", "dielectric", "boards", "spares", "stock"):
        assert key in settings, key
    sources = dict(zip(query["setting"], query["source"]))
    assert sources["boards"] == "command line" and sources["temp"] == "built-in"


def test_csv_shortlist_and_order(run, tmp_path):
    short = tmp_path / "short.csv"
    lines = tmp_path / "order.csv"
    assert run("find", "--cutoff", "1kHz", "--top", "4", "--out", str(short)).exit_code == 0
    assert (
        run(
            "find", "--cutoff", "1kHz", "--top", "4", "--out", str(lines), "--sheet", "order", "--boards", "10"
        ).exit_code
        == 0
    )
    frame = pd.read_csv(short)
    assert len(frame) == 4 and "nominal (Hz)" in frame.columns
    order = pd.read_csv(lines)
    assert set(order["boards"]) == {10} and (order["total qty"] == order["qty per board"] * 10).all()


def test_refuses_to_overwrite_without_force(run, tmp_path):
    path = tmp_path / "keep.xlsx"
    path.write_bytes(b"precious")
    result = run("find", "--tau", "1ms", "--out", str(path))
    assert result.exit_code == 2 and "exists; add --force" in result.stderr
    assert path.read_bytes() == b"precious"
    assert run("find", "--tau", "1ms", "--out", str(path), "--force").exit_code == 0
    assert load_workbook(path).sheetnames == ["shortlist", "order", "query"]


def test_atomic_write_leaves_nothing_broken(tmp_path):
    path = tmp_path / "out.xlsx"

    def failing(temp):
        temp.write_bytes(b"half a workbook")
        raise RuntimeError("disk pulled mid-write")

    with pytest.raises(RuntimeError):
        export.atomic_write(path, False, failing)
    assert not path.exists()
    assert list(tmp_path.iterdir()) == []
    path.write_bytes(b"old")
    with pytest.raises(RuntimeError):
        export.atomic_write(path, True, failing)
    assert path.read_bytes() == b"old"
    assert [p.name for p in tmp_path.iterdir()] == ["out.xlsx"]


BAD = {
    "order rank missing": (
        ["--top", "5", "--order", "7", "--out", "x.xlsx"],
        "--order",
        "rank 7 is not listed; 5 candidate(s)",
    ),
    "order without out": (["--order", "2"], "--order needs --out", "order sheet"),
    "boards zero": (["--boards", "0"], "--boards", "must be between 1 and"),
    "unwritable path": (["--out", "/nonexistent-folder/x.xlsx"], "--out", "does not exist"),
    "bad suffix": (["--out", "x.pdf"], "--out", ".xlsx or .csv"),
    "sheet with xlsx": (["--out", "x.xlsx", "--sheet", "order"], "--sheet", ".csv"),
    "unknown sheet": (["--out", "x.csv", "--sheet", "bom"], "--sheet", "shortlist, order"),
    "plot not png": (["--plot", "x.jpg"], "--plot", ".png"),
    "bad spares": (["--spares", "lots"], "--spares", "percentage"),
}


@pytest.mark.parametrize("case", BAD, ids=list(BAD))
def test_bad_export_input(run, case, tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    args, where, what = BAD[case]
    result = run("find", "--tau", "1ms", *args)
    assert result.exit_code == 2, result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and where in lines[0] and what in lines[0], lines
    assert not any(tmp_path.iterdir()), "nothing written"
    assert result.stdout == "", "the error comes before any output"


def test_spread_exports_its_design(run, tmp_path):
    path = tmp_path / "one.xlsx"
    result = run(
        "spread",
        "--r",
        "47k",
        "--c",
        "100n",
        "--stock",
        "demo",
        "--tau",
        "4.7ms",
        "--boards",
        "100",
        "--out",
        str(path),
    )
    assert result.exit_code == 0, result.output
    order = pd.read_excel(path, sheet_name="order")
    # the cheapest line that covers 100 boards: the 100n X7R line, not the C0G one (300 on hand, 19× the price)
    assert list(order["part number"]) == ["DEMO-R0603-47K0-F", "DEMO-C0603-100N-X7R"]
    assert list(order["total qty"]) == [100, 100]
    assert list(order["stock line"]) == [11, 22]
    query = pd.read_excel(path, sheet_name="query").fillna("")
    settings = dict(zip(query["setting"], query["value"]))
    # what the query sheet says about the parts is what was simulated: the stock lines
    assert settings["r-tol"].startswith("stock lines' own") and settings["c-tol"].startswith("stock lines' own")


def test_spread_header_names_the_stock_lines(run):
    result = run("spread", "--r", "47k", "--c", "100n", "--stock", "demo", "--tau", "4.7ms")
    assert result.exit_code == 0, result.output
    out = result.stdout
    assert "stock line 11 DEMO-R0603-47K0-F, -1/+1 %" in out and "stock line 22 DEMO-C0603-100N-X7R, -10/+10 %" in out
    assert "stock lines' own columns" in out
