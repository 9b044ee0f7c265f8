"""The wheel carries data/ and the installed package finds it away from the source tree."""

import os
import subprocess
import sys
import zipfile
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(scope="module")
def wheel(tmp_path_factory):
    out = tmp_path_factory.mktemp("wheel")
    subprocess.run(
        [sys.executable, "-m", "pip", "wheel", "--no-deps", "-q", "-w", str(out), str(ROOT)],
        check=True,
        capture_output=True,
    )
    (path,) = out.glob("rcpick-*.whl")
    return path


def test_wheel_contains_data(wheel):
    names = set(zipfile.ZipFile(wheel).namelist())
    shipped = {p.name for p in (ROOT / "data").iterdir() if p.is_file()}
    assert shipped, "data/ is empty"
    for name in shipped:
        assert f"rcpick/data/{name}" in names
    assert "rcpick/py.typed" in names


def test_installed_wheel_finds_its_data(wheel, tmp_path):
    target = tmp_path / "site"
    subprocess.run(
        [sys.executable, "-m", "pip", "install", "--no-deps", "-q", "--target", str(target), str(wheel)],
        check=True,
        capture_output=True,
    )
    probe = (
        "import rcpick, rcpick.datafiles as d, rcpick.series as s;"
        "print(rcpick.__file__); print(d.data_dir()); print(len(s.get('E192').digits))"
    )
    env = dict(os.environ, PYTHONPATH=str(target))
    done = subprocess.run(
        [sys.executable, "-c", probe], cwd=tmp_path, env=env, capture_output=True, text=True, check=True
    )
    module, data, count = done.stdout.split()
    assert module.startswith(str(target)) and data == str(target / "rcpick" / "data") and count == "192"
