"""Stock files: reading, checking with line numbers, and searching only stocked values."""

import pytest
from openpyxl import Workbook

from rcpick import stock as stocks
from rcpick.errors import BadValue

HEADER = "kind,value,tolerance,tcr,dielectric,part_number,unit_price,on_hand,package,voltage\n"


def write(tmp_path, text, name="stock.csv"):
    path = tmp_path / name
    path.write_text(text, encoding="utf-8")
    return path


def test_demo_stock_loads_and_chooses_a_line_by_need_price_and_ask():
    demo = stocks.load("demo")
    assert demo.covers("resistance") and demo.covers("capacitance")
    # 4k7 is stocked at 1 % (0.004 each, 5000 on hand) and at 0.1 % (0.031 each, 800 on hand):
    # the cheapest line that covers the need wins
    assert demo.choose("resistance", 4.7e3, need=10).part_number == "DEMO-R0603-4K70-F"
    # asking for 0.1 % leaves only the tight line
    tight = demo.choose("resistance", 4.7e3, need=10, ask=stocks.Ask(tolerance=0.001))
    assert tight.part_number == "DEMO-R0603-4K70-B" and tight.tcr == pytest.approx((-25e-6, 25e-6))
    # 100n: X7R (20,000 on hand, 0.005) and C0G (300 on hand, 0.094); 500 boards need 500 parts
    assert demo.choose("capacitance", 100e-9, need=500).part_number == "DEMO-C0603-100N-X7R"
    assert demo.choose("capacitance", 100e-9, need=500, ask=stocks.Ask(dielectric="C0G")).part_number == \
        "DEMO-C1206-100N-C0G"  # the only C0G line, though it falls short: the most on hand of those asked
    assert demo.values("capacitance", 1e-9, 1e-6, stocks.Ask(dielectric="C0G")) == [1e-9, 4.7e-9, 10e-9, 100e-9]


def test_a_line_that_covers_the_order_beats_a_cheaper_one_that_does_not(tmp_path):
    path = write(tmp_path, "kind,value,tolerance,part_number,unit_price,on_hand\n"
                 "C,100n,10%,CHEAP,0.001,100\nC,100n,10%,ENOUGH,0.002,5000\nC,100n,10%,UNCOUNTED,0.003,\n")
    stock = stocks.load(path)
    assert stock.choose("capacitance", 100e-9, need=50).part_number == "CHEAP"
    assert stock.choose("capacitance", 100e-9, need=500).part_number == "ENOUGH"
    assert stock.choose("capacitance", 100e-9, need=50_000).part_number == "UNCOUNTED"  # no count: assumed to cover


def test_every_problem_is_reported_with_line_and_column(tmp_path):
    path = write(tmp_path, HEADER + "R,10k,1%,100ppm,,A,0.01,10,0603,\n"
                 "X,10k,,,,,,,,\n"
                 "R,10q,,,,,,,,\n"
                 "C,100n,,,X9Z,,,,,\n"
                 "C,1u,,,,,-1,,,\n")
    with pytest.raises(BadValue) as caught:
        stocks.load(path)
    message = str(caught.value)
    assert str(path) in message and "4 bad row(s)" in message
    for fragment in ("line 3, column kind", "line 4, column value", "line 5, column dielectric", "line 6, column unit_price"):
        assert fragment in message


def test_comment_lines_keep_line_numbers(tmp_path):
    path = write(tmp_path, "# a note\n" + HEADER + "R,10k,,,,,,,,\nR,abc,,,,,,,,\n")
    with pytest.raises(BadValue, match="line 4, column value"):
        stocks.load(path)


@pytest.mark.parametrize(("text", "fragment"), [
    ("kind,value,colour\nR,1k,red\n", "line 1: unknown column(s) colour"),
    ("kind,part_number\nR,X\n", "missing column(s) value"),
    ("", "empty"),
    (HEADER, "no part rows"),
    (HEADER + "C,100n,,100ppm,,,,,,\n", "column tcr: applies to R rows only"),
])
def test_malformed_files(tmp_path, text, fragment):
    with pytest.raises(BadValue, match=fragment.replace("(", r"\(").replace(")", r"\)")):
        stocks.load(write(tmp_path, text))


def test_xlsx_stock(tmp_path):
    book = Workbook()
    sheet = book.active
    sheet.append(["Kind", "Value", "Tolerance", "Dielectric", "Part Number"])
    sheet.append(["C", "47n", "K", "X7R", "P-1"])
    sheet.append(["R", "4K7", "F", None, "P-2"])
    sheet.append(["R", 10000, "J", None, "P-3"])  # a number cell reads as ohms
    path = tmp_path / "stock.xlsx"
    book.save(path)
    stock = stocks.load(path)
    values = {(p.kind, p.value, p.tolerance) for p in stock.parts}
    # IEC 60062 tolerance letters: K ±10 %, F ±1 %, J ±5 %
    assert values == {("capacitance", 47e-9, (-0.10, 0.10)), ("resistance", 4.7e3, (-0.01, 0.01)),
                      ("resistance", 1e4, (-0.05, 0.05))}


def test_find_searches_only_stocked_values(run_json):
    demo = stocks.load("demo")
    doc = run_json("find", "--tau", "2.2ms", "--stock", "demo", "--top", "20", "--rank", "error")
    r_values = {p.value for p in demo.parts if p.kind == "resistance"}
    c_values = {p.value for p in demo.parts if p.kind == "capacitance"}
    for cand in doc["candidates"]:
        assert set(cand["r"]["parts_ohm"]) <= r_values
        assert set(cand["c"]["parts_farad"]) <= c_values
        for detail in cand["r"]["parts_detail"] + cand["c"]["parts_detail"]:
            assert detail["part_number"].startswith("DEMO-")
    assert doc["analysis"]["stock"].endswith("demo-stock.csv")


def test_stock_tolerance_feeds_the_spread(run_json):
    # 10 kΩ 0.1 % 25 ppm/°C with 100 nF C0G 5 % from the demo stock, asked for by tolerance and dielectric
    doc = run_json("find", "--tau", "1ms", "--stock", "demo", "--r-parts", "1", "--c-parts", "1", "--rank", "error",
                   "--top", "3", "--temp", "25", "--r-tol", "0.1%", "--dielectric", "C0G")
    best = doc["candidates"][0]
    assert (best["r"]["ohm"], best["c"]["farad"]) == (10e3, 100e-9)
    # only the 0.1 % resistor lines were asked for: 10K and 4K7
    assert {c["r"]["ohm"] for c in doc["candidates"]} <= {10e3, 4.7e3}
    assert best["r"]["parts_detail"][0]["part_number"] == "DEMO-R0603-10K0-B"
    assert best["c"]["parts_detail"][0]["part_number"] == "DEMO-C1206-100N-C0G"
    assert best["spread"]["worst_max"] == pytest.approx(1e-3 * 1.001 * 1.05, rel=1e-12)
    # the table says which stock line each part came from (JSON: parts_detail[].stock.line)
    assert best["r"]["parts_detail"][0]["stock"]["line"] == 8


def test_boards_decide_the_line(run_json):
    few = run_json("spread", "--r", "10k", "--c", "100n", "--stock", "demo", "--tau", "1ms", "--dielectric", "C0G")
    assert few["design"]["c"]["parts_detail"][0]["part_number"] == "DEMO-C1206-100N-C0G"
    many = run_json("find", "--tau", "1ms", "--stock", "demo", "--boards", "500", "--r-parts", "1", "--c-parts", "1",
                    "--rank", "error", "--top", "10")
    lines = {d["part_number"] for c in many["candidates"] for d in c["c"]["parts_detail"] if d["value"] == 100e-9}
    assert lines == {"DEMO-C0603-100N-X7R"}  # the line with 20,000 on hand, not the one 200 short
    assert all(c["cost_per_board"] is not None for c in many["candidates"])


def test_stock_covering_only_capacitors_keeps_the_resistor_series(run_json, tmp_path):
    path = write(tmp_path, "kind,value\nC,100n\nC,220n\n")
    doc = run_json("find", "--tau", "1ms", "--stock", str(path), "--rank", "error", "--top", "3")
    assert {v for c in doc["candidates"] for v in c["c"]["parts_farad"]} <= {100e-9, 220e-9}
    assert doc["candidates"][0]["r"]["ohm"] == 10e3


def test_no_usable_row_for_a_position(run, tmp_path):
    path = write(tmp_path, "kind,value\nR,10\nR,22\nC,100n\n")
    result = run("find", "--tau", "1ms", "--stock", str(path))
    assert result.exit_code == 2
    assert "--stock" in result.stderr and "no usable R row" in result.stderr


def test_bad_stock_file_exits_2(run, tmp_path):
    path = write(tmp_path, "kind,value\nR,ten\n")
    result = run("find", "--tau", "1ms", "--stock", str(path))
    assert result.exit_code == 2 and "line 2, column value" in result.stderr
    assert len(result.stderr.strip().splitlines()) == 1
