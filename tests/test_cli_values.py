"""``rcpick values`` end to end."""

import csv
import io


def test_range_inclusive(run_json):
    doc = run_json("values", "E24", "--from", "1k", "--to", "10k")
    assert doc["series"] == "E24"
    assert doc["values"][0] == 1e3 and doc["values"][-1] == 10e3 and len(doc["values"]) == 25


def test_capacitor_range_guessed_from_units(run_json):
    doc = run_json("values", "E6", "--from", "1n", "--to", "10nF")
    assert doc["values"] == [1e-9, 1.5e-9, 2.2e-9, 3.3e-9, 4.7e-9, 6.8e-9, 10e-9]


def test_around_gives_neighbours_by_ratio(run_json):
    doc = run_json("values", "E12", "--around", "3k")
    assert (doc["below"], doc["above"]) == (2700.0, 3300.0)
    assert doc["closest"] == 3300.0  # nearer by ratio (1.100 vs 1.111)
    assert doc["values"] == [2700.0, 3300.0]


def test_table_and_csv(run):
    result = run("values", "E96", "--around", "5k")
    assert result.exit_code == 0
    assert "4K99" in result.stdout and "5K11" in result.stdout and "%" in result.stdout
    out = run("values", "E3", "--from", "1", "--to", "100", "--format", "csv")
    rows = list(csv.DictReader(io.StringIO(out.stdout)))
    assert [r["rkm"] for r in rows] == ["1R", "2R2", "4R7", "10R", "22R", "47R", "100R"]


def test_bad_series_and_range(run):
    result = run("values", "E7")
    assert result.exit_code == 2 and "unknown series" in result.stderr
    result = run("values", "E24", "--from", "10k", "--to", "1k")
    assert result.exit_code == 2 and "--from" in result.stderr
