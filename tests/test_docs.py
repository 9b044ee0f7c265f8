"""Every ``rcpick`` example in README.md runs and exits 0, so the README cannot drift from the code."""

import re
import shlex
import shutil
from pathlib import Path

import pytest

README = Path(__file__).resolve().parents[1] / "README.md"


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
    shutil.copytree(README.parent / "docs" / "examples", tmp_path / "docs" / "examples")
    monkeypatch.chdir(tmp_path)  # examples may write files; they find the demo netlists here
    result = run(*shlex.split(command)[1:])
    assert result.exit_code == 0, result.output
    assert result.stdout.strip()
