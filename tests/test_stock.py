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


def test_demo_stock_loads_and_chooses_the_tightest_part():
    demo = stocks.load("demo")
    assert demo.covers("resistance") and demo.covers("capacitance")
    chosen = demo.by_value("resistance", 1e3, 1e6)
    assert chosen[4.7e3].part_number == "DEMO-R0603-4K70-B"  # 0.1 % beats 1 %
    assert chosen[4.7e3].tolerance == pytest.approx((-0.001, 0.001))
    assert chosen[4.7e3].tcr == pytest.approx((-25e-6, 25e-6))
    assert demo.find("capacitance", 100e-9).dielectric == "C0G"


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
    # 10 kΩ 0.1 % 25 ppm/°C with 100 nF C0G 5 % from the demo stock, fixed by the search to one design
    doc = run_json("find", "--tau", "1ms", "--stock", "demo", "--r-parts", "1", "--c-parts", "1", "--rank", "error",
                   "--top", "3", "--temp", "25")
    (best,) = [c for c in doc["candidates"] if c["r"]["ohm"] == 10e3]
    assert best["c"]["farad"] == 100e-9
    assert best["r"]["parts_detail"][0]["part_number"] == "DEMO-R0603-10K0-B"
    assert best["spread"]["worst_max"] == pytest.approx(1e-3 * 1.001 * 1.05, rel=1e-12)


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
