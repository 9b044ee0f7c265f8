"""Shared helpers for the command-line tests."""

import json

import pytest
from typer.testing import CliRunner

from rcpick.cli import app


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
