"""The documentation's examples run and say what they claim, so README and docs cannot drift from the code."""

import doctest
import re
import shlex
import shutil
from pathlib import Path

import pytest

ROOT = Path(__file__).resolve().parents[1]
README = ROOT / "README.md"


def _examples():
    text = README.read_text(encoding="utf-8")
    commands = []
    for block in re.findall(r"```sh\n(.*?)```", text, re.S):
        for line in block.splitlines():
            for part in line.split("&&"):
                part = part.strip()
                if part.startswith("rcpick "):
                    commands.append(part)
    return commands


def test_readme_has_examples():
    assert len(_examples()) >= 8


@pytest.mark.parametrize("command", _examples())
def test_readme_example_runs(run, command, tmp_path, monkeypatch):
    shutil.copytree(ROOT / "docs" / "examples", tmp_path / "docs" / "examples")
    monkeypatch.chdir(tmp_path)  # examples may write files; they find the demo netlists here
    result = run(*shlex.split(command)[1:])
    assert result.exit_code == 0, result.output
    assert result.stdout.strip()


def test_api_page_examples_print_what_they_show():
    # every >>> line of docs/api.md runs and its printed output is compared line by line
    failed, attempted = doctest.testfile(
        str(ROOT / "docs" / "api.md"), module_relative=False, optionflags=doctest.NORMALIZE_WHITESPACE
    )
    assert failed == 0
    assert attempted >= 18
