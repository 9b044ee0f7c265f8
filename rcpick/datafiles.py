"""Locating and reading the files in ``data/``.

In a source checkout the files are in the top-level ``data/`` folder; in an
installed wheel they are in ``rcpick/data/`` (see ``pyproject.toml``).
"""

from __future__ import annotations

import functools
import tomllib
from pathlib import Path

_PACKAGE = Path(__file__).resolve().parent


def data_dir() -> Path:
    """Folder holding rcpick's data files (installed wheel first, then source checkout)."""
    for candidate in (_PACKAGE / "data", _PACKAGE.parent / "data"):
        if (candidate / "eseries.toml").is_file():
            return candidate
    raise FileNotFoundError(
        f"rcpick's data folder is missing (looked in {_PACKAGE / 'data'} and {_PACKAGE.parent / 'data'})"
    )


@functools.cache
def load_toml(name: str) -> dict:
    """Parse ``data/<name>`` (a TOML file) once and cache it."""
    with open(data_dir() / name, "rb") as handle:
        return tomllib.load(handle)
