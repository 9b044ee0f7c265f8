"""Shared helpers for the command-line tests."""

import json
from pathlib import Path

import pytest
from typer.testing import CliRunner

from rcpick.cli import app

ROOT = Path(__file__).resolve().parents[1]


@pytest.fixture(autouse=True)
def _at_project_root(monkeypatch):
    """Tests name demo files (docs/examples/…) from the project root, wherever pytest was started."""
    monkeypatch.chdir(ROOT)


@pytest.fixture
def run():
    """Run ``rcpick`` with arguments in-process; returns the click Result."""
    runner = CliRunner()

    def invoke(*args: str, **kwargs):
        return runner.invoke(app, list(args), **kwargs)

    return invoke


@pytest.fixture
def run_json(run):
    """Run ``rcpick ... --format json`` and parse stdout, asserting exit code 0."""

    def invoke(*args: str):
        result = run(*args, "--format", "json")
        assert result.exit_code == 0, result.output
        return json.loads(result.stdout)

    return invoke
