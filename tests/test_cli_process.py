"""The real console entry points, in subprocesses: start-up imports and ``python -m rcpick``."""

import json
import subprocess
import sys

CHECK_IMPORTS = """
import sys
from rcpick.cli import main
sys.argv = ["rcpick", *{args!r}]
try:
    main()
except SystemExit as stop:
    code = stop.code
heavy = sorted(name for name in ("pandas", "openpyxl", "matplotlib", "scipy", "pydantic", "numpy", "rcpick.variation",
                                  "rcpick.search", "rcpick.specs", "rcpick.api") if name in sys.modules)
print("HEAVY=" + ",".join(heavy), file=sys.stderr)
"""


def _heavy_modules_loaded(*args):
    done = subprocess.run(
        [sys.executable, "-c", CHECK_IMPORTS.format(args=list(args))], capture_output=True, text=True, check=True
    )
    line = [text for text in done.stderr.splitlines() if text.startswith("HEAVY=")][-1]
    return line.removeprefix("HEAVY="), done.stdout


def test_help_imports_no_command():
    heavy, out = _heavy_modules_loaded("--help")
    assert heavy == ""  # not even numpy: the commands are listed from their summaries
    assert "find" in out and "values" in out


def test_values_does_not_import_what_find_needs():
    heavy, out = _heavy_modules_loaded("values", "E24", "--from", "1k", "--to", "2k")
    assert heavy == "numpy"
    assert "1K5" in out


def test_find_without_export_imports_neither_pandas_nor_typers_adapters():
    heavy, out = _heavy_modules_loaded("find", "--tau", "10ms")
    assert heavy == "numpy,rcpick.api,rcpick.search,rcpick.specs,rcpick.variation"  # no pandas, scipy or pydantic
    assert "combinations" in out


def test_python_dash_m_and_exit_code():
    done = subprocess.run(
        [sys.executable, "-m", "rcpick", "find", "--tau", "1ms", "--top", "2", "--format", "json"],
        capture_output=True,
        text=True,
    )
    assert done.returncode == 0, done.stderr
    assert len(json.loads(done.stdout)["candidates"]) == 2
    bad = subprocess.run([sys.executable, "-m", "rcpick", "find", "--tau", "1kHz"], capture_output=True, text=True)
    assert bad.returncode == 2
    assert (
        bad.stderr.strip()
        == "rcpick: error: --tau: '1kHz' is a frequency, not a time; expected a time such as 10ms, 2.5s, 1e-3"
    )


def test_help_carries_examples_and_caution():
    done = subprocess.run(
        [sys.executable, "-m", "rcpick", "find", "--help"],
        capture_output=True,
        text=True,
        env={"COLUMNS": "120", "PATH": "", "TERM": "dumb"},
    )
    assert done.returncode == 0
    assert "rcpick find --tau 10ms" in done.stdout
    assert "verify on hardware" in done.stdout
