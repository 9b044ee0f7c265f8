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
heavy = sorted(name for name in ("pandas", "openpyxl", "matplotlib") if name in sys.modules)
print("HEAVY=" + ",".join(heavy), file=sys.stderr)
"""


def _heavy_modules_loaded(*args):
    done = subprocess.run([sys.executable, "-c", CHECK_IMPORTS.format(args=list(args))],
                          capture_output=True, text=True, check=True)
    line = [l for l in done.stderr.splitlines() if l.startswith("HEAVY=")][-1]
    return line.removeprefix("HEAVY="), done.stdout


def test_help_does_not_import_pandas():
    heavy, out = _heavy_modules_loaded("--help")
    assert heavy == ""
    assert "find" in out and "values" in out


def test_find_without_export_does_not_import_pandas():
    heavy, out = _heavy_modules_loaded("find", "--tau", "10ms")
    assert heavy == ""
    assert "combinations" in out


def test_python_dash_m_and_exit_code():
    done = subprocess.run([sys.executable, "-m", "rcpick", "find", "--tau", "1ms", "--top", "2", "--format", "json"],
                          capture_output=True, text=True)
    assert done.returncode == 0, done.stderr
    assert len(json.loads(done.stdout)["candidates"]) == 2
    bad = subprocess.run([sys.executable, "-m", "rcpick", "find", "--tau", "1kHz"], capture_output=True, text=True)
    assert bad.returncode == 2
    assert bad.stderr.strip() == "rcpick: error: --tau: '1kHz' is a frequency, not a time; expected a time such as 10ms, 2.5s, 1e-3"


def test_help_carries_examples_and_caution():
    done = subprocess.run([sys.executable, "-m", "rcpick", "find", "--help"], capture_output=True, text=True,
                          env={"COLUMNS": "120", "PATH": "", "TERM": "dumb"})
    assert done.returncode == 0
    assert "rcpick find --tau 10ms" in done.stdout
    assert "verify on hardware" in done.stdout
