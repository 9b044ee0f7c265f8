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
    assert (
        demo.choose("capacitance", 100e-9, need=500, ask=stocks.Ask(dielectric="C0G")).part_number
        == "DEMO-C1206-100N-C0G"
    )  # the only C0G line, though it falls short: the most on hand of those asked
    assert demo.values("capacitance", 1e-9, 1e-6, stocks.Ask(dielectric="C0G")) == [1e-9, 4.7e-9, 10e-9, 100e-9]


def test_a_line_that_covers_the_order_beats_a_cheaper_one_that_does_not(tmp_path):
    path = write(
        tmp_path,
        "kind,value,tolerance,part_number,unit_price,on_hand\n"
        "C,100n,10%,CHEAP,0.001,100\nC,100n,10%,ENOUGH,0.002,5000\nC,100n,10%,UNCOUNTED,0.003,\n",
    )
    stock = stocks.load(path)
    assert stock.choose("capacitance", 100e-9, need=50).part_number == "CHEAP"
    assert stock.choose("capacitance", 100e-9, need=500).part_number == "ENOUGH"
    assert stock.choose("capacitance", 100e-9, need=50_000).part_number == "UNCOUNTED"  # no count: assumed to cover


def test_every_problem_is_reported_with_line_and_column(tmp_path):
    path = write(
        tmp_path,
        HEADER + "R,10k,1%,100ppm,,A,0.01,10,0603,\nX,10k,,,,,,,,\nR,10q,,,,,,,,\nC,100n,,,X9Z,,,,,\nC,1u,,,,,-1,,,\n",
    )
    with pytest.raises(BadValue) as caught:
        stocks.load(path)
    message = str(caught.value)
    assert str(path) in message and "4 bad row(s)" in message
    for fragment in (
        "line 3, column kind",
        "line 4, column value",
        "line 5, column dielectric",
        "line 6, column unit_price",
    ):
        assert fragment in message


def test_comment_lines_keep_line_numbers(tmp_path):
    path = write(tmp_path, "# a note\n" + HEADER + "R,10k,,,,,,,,\nR,abc,,,,,,,,\n")
    with pytest.raises(BadValue, match="line 4, column value"):
        stocks.load(path)


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ("kind,value,colour\nR,1k,red\n", "line 1: unknown column(s) colour"),
        ("kind,part_number\nR,X\n", "missing column(s) value"),
        ("", "empty"),
        (HEADER, "no part rows"),
        (HEADER + "C,100n,,100ppm,,,,,,\n", "column tcr: applies to R rows only"),
    ],
)
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
    assert values == {
        ("capacitance", 47e-9, (-0.10, 0.10)),
        ("resistance", 4.7e3, (-0.01, 0.01)),
        ("resistance", 1e4, (-0.05, 0.05)),
    }


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
    doc = run_json(
        "find",
        "--tau",
        "1ms",
        "--stock",
        "demo",
        "--r-parts",
        "1",
        "--c-parts",
        "1",
        "--rank",
        "error",
        "--top",
        "3",
        "--temp",
        "25",
        "--r-tol",
        "0.1%",
        "--dielectric",
        "C0G",
    )
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
    many = run_json(
        "find",
        "--tau",
        "1ms",
        "--stock",
        "demo",
        "--boards",
        "500",
        "--r-parts",
        "1",
        "--c-parts",
        "1",
        "--rank",
        "error",
        "--top",
        "10",
    )
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


# --- XLSX percent cells and the tolerance rule ---------------------------------------------


def xlsx(tmp_path, rows, formats=None, name="stock.xlsx"):
    """A one-sheet workbook of ``rows``; ``formats`` maps a cell ('C2') to its number format."""
    book = Workbook()
    sheet = book.active
    for row in rows:
        sheet.append(row)
    for ref, number_format in (formats or {}).items():
        sheet[ref].number_format = number_format
    path = tmp_path / name
    book.save(path)
    return path


def test_percent_formatted_xlsx_cells_hold_fractions_and_bare_numbers_are_percent(tmp_path):
    path = xlsx(
        tmp_path,
        [
            ["kind", "value", "tolerance", "part_number"],
            ["R", 10000, 0.01, "PCT-1"],  # shows 1 %
            ["R", 22000, 0.005, "PCT-HALF"],  # shows 0.50 %
            ["R", 33000, 1, "BARE-1"],  # a bare number: percent, as in a CSV
            ["R", 47000, 0.01, "BARE-0.01"],  # a bare 0.01 is 0.01 %
            ["R", 68000, 5, "LITERAL"],
        ],  # 0\% shows a literal sign: the number as it is
        formats={"C2": "0%", "C3": "0.00%", "C6": "0\\%"},
    )
    tolerance = {p.part_number: p.tolerance for p in stocks.load(path).parts}
    assert tolerance["PCT-1"] == pytest.approx((-0.01, 0.01), rel=1e-12)
    assert tolerance["PCT-HALF"] == pytest.approx((-0.005, 0.005), rel=1e-12)
    assert tolerance["BARE-1"] == pytest.approx((-0.01, 0.01), rel=1e-12)
    assert tolerance["BARE-0.01"] == pytest.approx((-1e-4, 1e-4), rel=1e-12)
    assert tolerance["LITERAL"] == pytest.approx((-0.05, 0.05), rel=1e-12)


@pytest.mark.parametrize(
    ("number_format", "percent"),
    [
        ("0%", True),
        ("0.00%", True),
        ("0.0%;[Red]-0.0%", True),
        ("General", False),
        ("0.00", False),
        ('0.0"%"', False),
        ("0.0\\%", False),
        ("[$%-409]0", False),
        ("0_%", False),
        (None, False),
    ],
)
def test_which_number_formats_scale_by_100(number_format, percent):
    assert stocks.percent_format(number_format) is percent


def test_percent_cell_reaches_the_spread_as_given(run_json, tmp_path):
    path = xlsx(tmp_path, [["kind", "value", "tolerance"], ["R", 10000, 0.01]], formats={"C2": "0%"})
    doc = run_json("find", "--tau", "1ms", "--stock", str(path), "--rank", "error", "--top", "1", "--samples", "200")
    assert doc["candidates"][0]["r"]["parts_detail"][0]["tolerance"] == pytest.approx([-0.01, 0.01], rel=1e-12)


@pytest.mark.parametrize(
    ("cell", "expected"),
    [
        ("M", (-0.20, 0.20)),
        ("Z", (-0.20, 0.80)),  # IEC 60062 Z: a range, allowed past ±50 %
        ("-20%:+80%", (-0.20, 0.80)),
        ("-50%:+99.9%", (-0.50, 0.999)),
        ("50%", (-0.50, 0.50)),
        ("0.001%", (-1e-5, 1e-5)),
    ],
)
def test_tolerances_accepted(tmp_path, cell, expected):
    path = write(tmp_path, f"kind,value,tolerance\nR,10k,{cell}\n")
    assert stocks.load(path).parts[0].tolerance == pytest.approx(expected, rel=1e-12)


@pytest.mark.parametrize(
    ("cell", "fragment"),
    [
        ("60%", "more than ±50%"),  # symmetric and wide: a slip, 60 for 6
        ("-20%:+100%", "less than 100 % on each side"),  # a range stops short of 100 %
        ("0.0005%", "greater than 0 %"),
        ("0", "greater than 0 %"),
        ("5%:10%", "from ≤ 0 % to ≥ 0 %"),
    ],
)
def test_tolerances_refused_name_file_line_and_column(tmp_path, cell, fragment):
    path = write(tmp_path, f"kind,value,tolerance\nR,1k,1%\nR,10k,{cell}\n")
    with pytest.raises(BadValue) as caught:
        stocks.load(path)
    message = str(caught.value)
    assert message.startswith(f"{path}: 1 bad row(s): line 3, column tolerance: ")
    assert fragment in message


def test_a_wide_percent_cell_is_refused(tmp_path):
    path = xlsx(tmp_path, [["kind", "value", "tolerance"], ["C", "1u", 0.6]], formats={"C2": "0%"})
    with pytest.raises(BadValue, match=r"line 2, column tolerance: tolerance '60%' is more than ±50%"):
        stocks.load(path)


# --- header -------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("header", "fragment"),
    [
        ("kind,value,value", "line 1: columns 2 and 3 are both 'value'"),
        ("Part Number,kind,value,part_number", "line 1: columns 1 and 4 are both 'part_number'"),
    ],
)
def test_a_column_given_twice_is_refused(tmp_path, header, fragment):
    with pytest.raises(BadValue) as caught:
        stocks.load(write(tmp_path, header + "\nR,1k,2k\n"))
    assert fragment in str(caught.value)


def test_a_column_given_twice_in_xlsx_is_refused(tmp_path):
    path = xlsx(tmp_path, [["kind", "value", "tolerance", "Tolerance"], ["R", "1k", "1%", "5%"]])
    with pytest.raises(BadValue, match=r"line 1: columns 3 and 4 are both 'tolerance'"):
        stocks.load(path)


def test_unknown_columns_are_named_with_their_position(tmp_path):
    with pytest.raises(BadValue, match=r"line 2: unknown column\(s\) colour \(column 3\), hue \(column 5\)"):
        stocks.load(write(tmp_path, "# note\nkind,value,colour,tolerance,hue\nR,1k,red,1%,warm\n"))


def test_a_cell_under_no_heading_is_a_problem(tmp_path):
    path = write(tmp_path, "kind,value,,tolerance\nR,1k,,1%\nR,2k,5%,1%\nR,3k,,1%,extra\n")
    with pytest.raises(BadValue) as caught:
        stocks.load(path)
    message = str(caught.value)
    assert "2 bad row(s)" in message
    assert "line 3, column 3: '5%' is under no heading" in message
    assert "line 4, column 5: 'extra' is under no heading" in message


# --- numbers ------------------------------------------------------------------------------


@pytest.mark.parametrize(
    ("column", "cell"),
    [
        ("on_hand", "inf"),
        ("on_hand", "1e400"),
        ("on_hand", "nan"),
        ("on_hand", "-inf"),
        ("on_hand", "2.5"),
        ("on_hand", "١٠"),
        ("on_hand", "１０"),
        ("on_hand", "-3"),
        ("on_hand", "1e19"),
        ("unit_price", "nan"),
        ("unit_price", "NaN"),
        ("unit_price", "inf"),
        ("unit_price", "1e400"),
        ("unit_price", "٠.٥"),
        ("unit_price", "-0.1"),
    ],
)
def test_counts_and_prices_must_be_finite_ascii_numbers(tmp_path, column, cell):
    path = write(tmp_path, f"kind,value,{column}\nR,1k,\nR,2k,{cell}\n")
    with pytest.raises(BadValue) as caught:
        stocks.load(path)
    message = str(caught.value)
    assert message.startswith(f"{path}: 1 bad row(s): line 3, column {column}: ")
    assert repr(cell) in message


def test_counts_and_prices_read(tmp_path):
    path = write(tmp_path, "kind,value,unit_price,on_hand\nR,1k,0.004,1e3\nR,2k,.5,+7\nR,3k,0,0\nR,4k,1e-3,20k\n")
    assert [(p.unit_price, p.on_hand) for p in stocks.load(path).parts] == [
        (0.004, 1000),
        (0.5, 7),
        (0.0, 0),
        (0.001, 20000),
    ]


def test_bad_on_hand_reaches_the_command_line_as_one_line(run, tmp_path):
    path = write(tmp_path, "kind,value,on_hand\nR,10k,inf\nC,100n,1e400\n")
    result = run("find", "--tau", "1ms", "--stock", str(path), "--samples", "100")
    assert result.exit_code == 2 and "Traceback" not in result.output
    lines = result.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("rcpick: error: --stock: ")
    assert "line 2, column on_hand" in lines[0] and "line 3, column on_hand" in lines[0]


# --- encodings and CSV structure ----------------------------------------------------------


def write_bytes(tmp_path, data, name="stock.csv"):
    path = tmp_path / name
    path.write_bytes(data)
    return path


def test_latin1_is_refused_naming_the_file_and_byte(tmp_path):
    path = write_bytes(tmp_path, "kind,value\nC,1µ\n".encode("latin-1"))
    with pytest.raises(BadValue) as caught:
        stocks.load(path)
    message = str(caught.value)
    # 'kind,value\n' is 11 bytes, 'C,1' 3 more: byte 14 is the Latin-1 µ (0xb5)
    assert message == f"{path}: not UTF-8 text: byte 14 is 0xb5 (line 2, column 4); save the file as UTF-8"


def test_random_bytes_are_refused_in_one_line(tmp_path):
    data = bytes([0x6B, 0x69, 0x6E, 0x64, 0x2C, 0xFF, 0xFE, 0x00, 0x80, 0x0A, 0xC3, 0x28])
    path = write_bytes(tmp_path, data)
    with pytest.raises(BadValue) as caught:
        stocks.load(path)
    message = str(caught.value)
    assert "\n" not in message and message.startswith(f"{path}: not UTF-8 text: byte 5 is 0xff")


def test_the_byte_offset_counts_a_bom(tmp_path):
    path = write_bytes(tmp_path, b"\xef\xbb\xbfkind,value\nR,1\xb5\n")
    with pytest.raises(BadValue, match=r"byte 17 is 0xb5 \(line 2, column 4\)"):
        stocks.load(path)


@pytest.mark.parametrize("codec", ["utf-8-sig", "utf-16", "utf-16-le", "utf-16-be"])
def test_bom_and_utf16_read(tmp_path, codec):
    def encoded(text):  # every file starts with its byte-order mark (utf-16-le/-be add none of their own)
        return (text if codec in ("utf-8-sig", "utf-16") else "\ufeff" + text).encode(codec)

    good = "# µ-parts of an invented board\nkind,value,package\nR,4k7,0603\nC,100n,µDFN\n"
    parts = stocks.load(write_bytes(tmp_path, encoded(good), "good.csv")).parts
    assert [(p.value, p.package, p.line) for p in parts] == [(4.7e3, "0603", 3), (100e-9, "µDFN", 4)]
    with pytest.raises(BadValue, match=r"1 bad row\(s\): line 5, column value"):  # line numbers survive decoding
        stocks.load(write_bytes(tmp_path, encoded(good + "R,oops,\n"), "bad.csv"))


def test_a_comment_with_a_quote_does_not_swallow_the_lines_below(tmp_path):
    path = write(tmp_path, '# sizes,"0603 and 0805 only\nkind,value\nR,1k\nR,2k2\n')
    assert [(p.value, p.line) for p in stocks.load(path).parts] == [(1e3, 3), (2.2e3, 4)]


def test_a_row_is_named_by_the_line_it_starts_on(tmp_path):
    path = write(tmp_path, 'kind,value,part_number\nR,1k,"A\nB"\nR,2q,C\nR,"3\nq",D\n')
    with pytest.raises(BadValue) as caught:
        stocks.load(path)
    message = str(caught.value)
    assert "line 4, column value: cannot read '2q'" in message and "line 5, column value" in message
    assert stocks.load(write(tmp_path, 'kind,value,part_number\nR,1k,"A\nB"\nR,2k,C\n', "ok.csv")).parts[1].line == 4


def test_an_unclosed_quote_is_refused_with_its_line(tmp_path):
    path = write(tmp_path, 'kind,value,part_number\nR,1k,A\nR,2k,"B\nR,3k,C\n')
    with pytest.raises(BadValue, match=r"stock.csv line 3: not valid CSV"):
        stocks.load(path)


def test_blank_lines_and_leading_comments_before_the_header(tmp_path):
    path = write(tmp_path, "\n# invented\n\nkind,value\n\nR,1k\n")
    assert [(p.value, p.line) for p in stocks.load(path).parts] == [(1e3, 6)]


def test_xlsx_rows_keep_spreadsheet_row_numbers(tmp_path):
    path = xlsx(
        tmp_path, [["# invented"], [None], ["kind", "value", "on_hand"], ["R", "1k", 5], [None], ["C", "100n", "many"]]
    )
    with pytest.raises(BadValue, match=r"stock.xlsx: 1 bad row\(s\): line 6, column on_hand: 'many'"):
        stocks.load(path)


def test_a_broken_xlsx_is_one_line(tmp_path):
    path = write(tmp_path, "kind,value\nR,1k\n", "stock.xlsx")
    with pytest.raises(BadValue, match=r"stock.xlsx: cannot read as XLSX"):
        stocks.load(path)


# --- lookups ------------------------------------------------------------------------------


def test_indexed_lookups_match_a_plain_scan(tmp_path):
    import random

    rng = random.Random(7)
    rows = ["kind,value,tolerance,dielectric,on_hand"]
    for _ in range(400):
        if rng.random() < 0.5:
            rows.append(f"R,{rng.randint(1, 999)}k,{rng.choice(['1%', '5%', '0.1%', ''])},,{rng.randint(0, 50)}")
        else:
            rows.append(
                f"C,{rng.randint(1, 999)}n,{rng.choice(['5%', '10%', ''])},"
                f"{rng.choice(['C0G', 'X7R', ''])},{rng.choice(['', str(rng.randint(0, 50))])}"
            )
    stock = stocks.load(write(tmp_path, "\n".join(rows) + "\n"))
    asks = [stocks.Ask(), stocks.Ask(tolerance=0.01), stocks.Ask(dielectric="C0G"), stocks.Ask(tolerance=0.001)]
    for _ in range(200):
        kind = rng.choice(["resistance", "capacitance"])
        scale = 1e3 if kind == "resistance" else 1e-9
        low, high = sorted(rng.uniform(0, 1100) * scale for _ in range(2))
        ask = rng.choice(asks)
        scan = sorted(
            {
                p.value
                for p in stock.parts
                if p.kind == kind and low * (1 - 1e-9) <= p.value <= high * (1 + 1e-9) and ask.met_by(p)
            }
        )
        assert stock.values(kind, low, high, ask) == scan
        if scan:
            value = rng.choice(scan)
            need = rng.randint(1, 60)
            chosen = stock.choose(kind, value, need, ask)
            usable = [p for p in stock.parts if p.kind == kind and p.value == value and ask.met_by(p)]
            assert chosen in usable
            if any(p.on_hand is None or p.on_hand >= need for p in usable):
                assert chosen.on_hand is None or chosen.on_hand >= need
    assert stock.values("resistance", 2e6, 1e7) == [] and stock.choose("resistance", 5.5, 1) is None
