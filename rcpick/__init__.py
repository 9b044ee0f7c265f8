"""rcpick: pick standard resistor and capacitor values that hit an RC timing target.

The Python API (docs/api.md)::

    import rcpick
    result = rcpick.find(tau="10ms")
    result.to_frame()          # one row per candidate, SI units in the column names
    result.save("order.xlsx", boards=250, spares="5%")

The functions are imported on first use, so ``import rcpick`` (and the
command line's ``--help``) stays light.
"""

from __future__ import annotations

from typing import TYPE_CHECKING, Any

__version__ = "0.2.0"

__all__ = [
    "find",
    "spread",
    "network",
    "board",
    "read_stock",
    "series_values",
    "FindResult",
    "SpreadResult",
    "NetworkResult",
    "BoardResult",
    "Candidate",
    "Position",
    "Part",
    "Spread",
    "FindSpec",
    "SpreadSpec",
    "NetworkSpec",
    "RcpickError",
    "BadValue",
    "UnknownName",
    "ClashingOptions",
    "Unreachable",
    "NotReached",
    "__version__",
]

_WHERE = {
    "find": "rcpick.api",
    "spread": "rcpick.api",
    "network": "rcpick.api",
    "board": "rcpick.api",
    "BoardResult": "rcpick.boardplan",
    "read_stock": "rcpick.api",
    "series_values": "rcpick.series",
    "FindResult": "rcpick.results",
    "SpreadResult": "rcpick.results",
    "NetworkResult": "rcpick.results",
    "Candidate": "rcpick.results",
    "Position": "rcpick.results",
    "Part": "rcpick.results",
    "Spread": "rcpick.results",
    "FindSpec": "rcpick.specs",
    "SpreadSpec": "rcpick.specs",
    "NetworkSpec": "rcpick.specs",
    "RcpickError": "rcpick.errors",
    "BadValue": "rcpick.errors",
    "UnknownName": "rcpick.errors",
    "ClashingOptions": "rcpick.errors",
    "Unreachable": "rcpick.errors",
    "NotReached": "rcpick.errors",
}

if TYPE_CHECKING:  # pragma: no cover - for type checkers and editors
    from rcpick.api import board, find, network, read_stock, spread
    from rcpick.boardplan import BoardResult
    from rcpick.errors import BadValue, ClashingOptions, NotReached, RcpickError, UnknownName, Unreachable
    from rcpick.results import Candidate, FindResult, NetworkResult, Part, Position, Spread, SpreadResult
    from rcpick.series import series_values
    from rcpick.specs import FindSpec, NetworkSpec, SpreadSpec


def __getattr__(name: str) -> Any:
    if name in _WHERE:
        import importlib

        value = getattr(importlib.import_module(_WHERE[name]), name)
        globals()[name] = value
        return value
    raise AttributeError(f"module 'rcpick' has no attribute {name!r}")


def __dir__() -> list[str]:
    return sorted(__all__)
