"""Project defaults from ``rcpick.toml`` (or ``--config FILE``), and ``rcpick config``.

A flat TOML table whose keys are option names without the dashes::

    r-series = "E96"
    temp = "-40:85"
    dielectric = "C0G"
    stock = "parts/approved.csv"
    boards = 250
    spares = "5%"

Command-line options win over the file, the file over the built-in defaults.
Every key and value is checked when the file is read; a bad one is an error
naming the file, the key and what is valid.
"""

from __future__ import annotations

import inspect
import tomllib
from collections.abc import Callable
from pathlib import Path

import typer

from rcpick import models, series
from rcpick.errors import BadValue, RcpickError
from rcpick.notation import (parse_band, parse_percent, parse_ppm_band, parse_quantity,
                             parse_temperature_range)

FILE_NAME = "rcpick.toml"


def _choice(*allowed: str) -> Callable[[str], None]:
    def check(value: str) -> None:
        if value not in allowed:
            raise BadValue(f"{value!r} is not one of {', '.join(allowed)}")
    return check


def _int_range(low: int, high: int) -> Callable[[int], None]:
    def check(value: int) -> None:
        if not low <= value <= high:
            raise BadValue(f"{value!r} must be between {low} and {high}")
    return check


def _exists(value: str) -> None:
    if value != "demo" and not Path(value).is_file():
        raise BadValue(f"no file {value!r}")


#: key → (built-in default as shown, value type, check). Keys are the long option names without dashes.
SETTINGS: dict[str, tuple[str, type, Callable]] = {
    "r-series": ("E24", str, series.get),
    "r-min": ("1k", str, lambda v: parse_quantity(v, "resistance")),
    "r-max": ("1Meg", str, lambda v: parse_quantity(v, "resistance")),
    "r-parts": ("2", int, _int_range(1, 2)),
    "c-series": ("E12", str, series.get),
    "c-min": ("100p", str, lambda v: parse_quantity(v, "capacitance")),
    "c-max": ("10u", str, lambda v: parse_quantity(v, "capacitance")),
    "c-parts": ("2", int, _int_range(1, 2)),
    "r-tol": ("the R series' usual (E24 5 %)", str, parse_band),
    "r-tcr": ("from --r-tech", str, parse_ppm_band),
    "r-tech": ("thick-film", str, models.resistor_technology),
    "c-tol": ("the dielectric's usual", str, parse_band),
    "dielectric": ("X7R", str, models.dielectric),
    "c-tc": ("from --dielectric", str, parse_ppm_band),
    "c-bias-loss": ("0 %", str, parse_percent),
    "c-age": ("none (reference age, 1000 h)", str, lambda v: float(v.removesuffix("h"))),
    "temp": ("0:70", str, parse_temperature_range),
    "window": ("10%", str, parse_band),
    "threshold-tol": ("none", str, parse_band),
    "dist": ("uniform", str, _choice("uniform", "normal")),
    "samples": ("20000", int, _int_range(100, 10_000_000)),
    "seed": ("1", int, _int_range(0, 2**63 - 1)),
    "rank": ("yield", str, _choice("yield", "error", "spread")),
    "top": ("10", int, _int_range(1, 200)),
    "stock": ("none (E-series)", str, _exists),
    "boards": ("1", int, _int_range(1, 10_000_000)),
    "spares": ("0%", str, parse_percent),
}


def param_name(key: str) -> str:
    return key.replace("-", "_")


def read(path: Path) -> dict[str, object]:
    """Checked settings of a config file, as {parameter name: value}."""
    try:
        with open(path, "rb") as handle:
            raw = tomllib.load(handle)
    except OSError as error:
        raise BadValue(f"{path}: cannot read ({error.strerror})", option="--config") from None
    except tomllib.TOMLDecodeError as error:
        raise BadValue(f"{path}: not valid TOML ({error})", option="--config") from None
    out = {}
    for key, value in raw.items():
        if key not in SETTINGS:
            raise BadValue(f"{path}: unknown key {key!r}; valid keys: {', '.join(SETTINGS)}", option="--config")
        _, kind, check = SETTINGS[key]
        if kind is str and isinstance(value, (int, float)) and not isinstance(value, bool):
            value = str(value)
        if not isinstance(value, kind) or isinstance(value, bool):
            raise BadValue(f"{path}: key {key!r} must be a {'string' if kind is str else 'whole number'}, "
                           f"got {value!r}", option="--config")
        if key == "stock" and not Path(value).is_absolute() and value != "demo":
            value = str((path.parent / value).resolve())
        try:
            check(value)
        except (RcpickError, ValueError) as error:
            message = error.message if isinstance(error, RcpickError) else str(error)
            raise BadValue(f"{path}: key {key!r}: {message}", option="--config") from None
        out[param_name(key)] = value
    return out


def load_callback(ctx: typer.Context, value: Path | None) -> Path | None:
    """Eager ``--config`` callback: read the file (or ./rcpick.toml) into the command's defaults."""
    path = value if value is not None else (Path.cwd() / FILE_NAME)
    if value is None and not path.is_file():
        return None
    try:
        settings = read(path)
    except RcpickError as error:
        typer.echo(f"rcpick: error: {error}", err=True)
        raise typer.Exit(2) from None
    names = {p.name for p in ctx.command.params}
    ctx.default_map = {**(ctx.default_map or {}), **{k: v for k, v in settings.items() if k in names}}
    ctx.meta["rcpick.config"] = str(path)
    return path


CONFIG_OPTION = typer.Option(None, "--config", metavar="FILE", is_eager=True, callback=load_callback,
                             help=f"Project defaults file [default: ./{FILE_NAME} when present]. Options on the command line win.")


def source_of(ctx: typer.Context, name: str) -> str:
    """Where a parameter's value came from: ``command line``, the config file's path, or ``built-in``."""
    source = ctx.get_parameter_source(name)
    kind = getattr(source, "name", "")
    if kind == "COMMANDLINE":
        return "command line"
    if kind == "DEFAULT_MAP":
        return ctx.meta.get("rcpick.config", "config file")
    return "built-in"


def from_command_line(ctx: typer.Context, name: str) -> bool:
    return source_of(ctx, name) == "command line"


def provenance(ctx: typer.Context, values: dict[str, object]) -> list[tuple[str, object, str]]:
    """(key, effective value, source) for every setting this command has."""
    rows = []
    for key, (builtin, _, _) in SETTINGS.items():
        name = param_name(key)
        if name not in values:
            continue
        source = source_of(ctx, name)
        value = values[name]
        rows.append((key, builtin if value is None and source == "built-in" else value, source))
    return rows


def signature_like(func: Callable, keep: set[str]) -> inspect.Signature:
    """``func``'s signature cut to the parameters in ``keep``, with a leading typer Context."""
    params = [p for name, p in inspect.signature(func).parameters.items() if name in keep]
    ctx = inspect.Parameter("ctx", inspect.Parameter.POSITIONAL_OR_KEYWORD, annotation=typer.Context)
    return inspect.Signature([ctx, *params])
