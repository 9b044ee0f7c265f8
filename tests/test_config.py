"""Project defaults: rcpick.toml / --config, precedence, errors, and ``rcpick config``."""

import json

import pytest


@pytest.fixture
def project(tmp_path, monkeypatch):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "rcpick.toml").write_text('temp = "-40:85"\ndielectric = "C0G"\nboards = 250\nr-series = "E96"\n')
    return tmp_path


def settings(run, *args):
    result = run("config", *args, "--format", "json")
    assert result.exit_code == 0, result.output
    return {row["key"]: (str(row["value"]), row["source"]) for row in json.loads(result.stdout)["settings"]}


def test_precedence_command_line_file_builtin(run, project):
    found = settings(run, "--temp", "0:50")
    assert found["temp"] == ("0:50", "command line")
    assert found["dielectric"] == ("C0G", str(project / "rcpick.toml"))
    assert found["boards"] == ("250", str(project / "rcpick.toml"))
    assert found["window"] == ("10%", "built-in")
    assert found["samples"] == ("20000", "built-in")


def test_file_defaults_reach_find(run_json, project):
    doc = run_json("find", "--tau", "1ms", "--top", "2")
    assert doc["analysis"]["settings"]["temp_c"] == [-40.0, 85.0]
    assert "C0G" in doc["analysis"]["settings"]["c_model"]
    overridden = run_json("find", "--tau", "1ms", "--top", "2", "--temp", "25", "--dielectric", "X7R")
    assert overridden["analysis"]["settings"]["temp_c"] == [25.0, 25.0]
    assert "X7R" in overridden["analysis"]["settings"]["c_model"]


def test_file_series_does_not_clash_with_fix(run_json, project):
    doc = run_json("find", "--tau", "1ms", "--fix-r", "10k", "--top", "1", "--rank", "error")
    assert doc["candidates"][0]["r"]["ohm"] == 10e3


def test_file_window_gives_way_to_a_typed_limit(run, run_json, project):
    (project / "rcpick.toml").write_text('window = "5%"\n')
    doc = run_json("find", "--tau", "1ms", "--limit", "upper", "--top", "2")
    assert doc["target"]["limit"] == "upper"
    clash = run("find", "--tau", "1ms", "--limit", "upper", "--window", "5%")
    assert clash.exit_code == 2 and "--limit and --window cannot be used together" in clash.stderr


def test_explicit_config_file_and_relative_stock(run_json, tmp_path, monkeypatch):
    (tmp_path / "team").mkdir()
    (tmp_path / "team" / "parts.csv").write_text("kind,value\nR,10k\nR,4k7\n")
    (tmp_path / "team" / "team.toml").write_text('stock = "parts.csv"\nrank = "error"\n')
    monkeypatch.chdir(tmp_path)
    doc = run_json("find", "--tau", "1ms", "--config", "team/team.toml", "--top", "3")
    assert doc["analysis"]["rank"] == "error"
    assert {v for c in doc["candidates"] for v in c["r"]["parts_ohm"]} <= {10e3, 4.7e3}


@pytest.mark.parametrize(
    ("text", "fragment"),
    [
        ('tmp = "0:70"\n', "unknown key 'tmp'; valid keys: supply limit r-series"),
        ('tau = "1ms"\n', "unknown key 'tau'"),
        ('temp = "70:0"\n', "key 'temp': minimum 70 °C is above maximum 0 °C"),
        ('samples = "many"\n', "key 'samples': 'many' is not a whole number"),
        ('window = "5%:10%"\n', "key 'window': window '5%:10%' excludes the target"),
        ('r-tol = "150%"\n', "key 'r-tol': tolerance '150%' is more than ±50%"),
        ('spares = "5000%"\n', "key 'spares': '5000%' must lie in 0%…1000%"),
        ('temp = "1e400"\n', "key 'temp': '1e400' is not a finite temperature range"),
        ('c-age = "nan"\n', "key 'c-age': cannot read 'nan'"),
        ('dielectric = "X9Z"\n', "key 'dielectric': unknown dielectric"),
        ('r-series = "E25"\n', "key 'r-series': unknown series"),
        ("top = 0\n", "key 'top': 0 must be between 1 and 200"),
        ("seed = -1\n", "key 'seed': -1 is not a whole number from 0 to 1e18"),
        ("temp = \n", "not valid TOML"),
    ],
)
def test_bad_file_names_key_and_valid(run, tmp_path, monkeypatch, text, fragment):
    monkeypatch.chdir(tmp_path)
    (tmp_path / "rcpick.toml").write_text(text)
    for args in (["find", "--tau", "1ms"], ["spread", "--r", "1k", "--c", "1u"], ["config"]):
        result = run(*args)
        assert result.exit_code == 2, result.output
        assert fragment in result.stderr and "rcpick.toml" in result.stderr
        assert len(result.stderr.strip().splitlines()) == 1


def test_missing_config_file(run, tmp_path):
    result = run("find", "--tau", "1ms", "--config", str(tmp_path / "none.toml"))
    assert result.exit_code == 2 and "none.toml: no such file" in result.stderr


def test_config_table(run, project):
    result = run("config")
    assert result.exit_code == 0
    assert "rcpick.toml" in result.stdout and "built-in" in result.stdout and "E96" in result.stdout


def test_config_takes_find_options_and_shows_what_was_derived(run):
    # the R tolerance follows the series asked for, and the samples follow --net
    found = settings(run, "--r-series", "E96", "--tau", "1ms")
    assert found["r-tol"] == ("±1 % (E96's usual)", "built-in")
    assert found["tau"] == ("1ms", "command line")
    c0g = settings(run, "--dielectric", "C0G")
    assert c0g["c-tol"] == ("±5 % (C0G's usual)", "built-in")
    assert c0g["c-max"][0] == "100 nF"  # the practical range of C0G parts (data/practical.toml)


def test_stock_lines_are_what_the_settings_say(run):
    # with a stock file, the tolerances come from its lines, and config says so
    found = settings(run, "--stock", "demo")
    assert found["r-tol"][0].startswith("stock lines' own")
    assert found["c-tol"][0].startswith("stock lines' own")
