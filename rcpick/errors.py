"""Errors raised by rcpick.

Every error the user can cause is an :class:`RcpickError`. The core never
names a command-line option or a Python parameter: it names the *setting*
at fault (``setting="r_min"``) and may refer to other settings inside its
message as ``{r_max}``. The layer that knows how the user spelled them fills
the names in: the Python API as parameters (``r_min``), the command line as
options (``--r-min``), a project file as its keys (``rcpick.toml: key 'r-min'``).
Subclasses also inherit the matching builtin, so library callers can catch
``ValueError`` or ``LookupError`` as usual.
"""

from __future__ import annotations

import re
from collections.abc import Callable

Namer = Callable[[str], str]

_PLACEHOLDER = re.compile(r"\{([a-z][a-z0-9_]*)\}")


def parameter_name(setting: str) -> str:
    """The Python API's name for a setting: the setting itself (``r_min``)."""
    return setting


class RcpickError(Exception):
    """Base class of every error rcpick reports to the user.

    Parameters
    ----------
    message : str
        What was wrong and what is accepted; ``{name}`` refers to another setting.
    setting : str, optional
        The setting at fault (snake_case, e.g. ``"r_min"``).
    value : object, optional
        The offending value, kept for callers.
    """

    def __init__(self, message: str, *, setting: str | None = None, value: object = None):
        super().__init__(message)
        self.message = message
        self.setting = setting
        self.value = value
        #: Where the value came from when that is a file (``rcpick.toml``), set by the file reader.
        self.origin: str | None = None
        #: How the layer that reports the error spells setting names.
        self.namer: Namer = parameter_name

    def text(self, namer: Namer | None = None) -> str:
        """The message with setting names spelled by ``namer`` (default: this error's own)."""
        spell = namer or self.namer
        return _PLACEHOLDER.sub(lambda m: spell(m.group(1)), self.message)

    def where(self, namer: Namer | None = None) -> str | None:
        """The prefix naming the culprit: a file key, an option or a parameter."""
        if self.origin:
            return self.origin
        if self.setting:
            return (namer or self.namer)(self.setting)
        return None

    def render(self, namer: Namer | None = None) -> str:
        """One line: ``where: message``."""
        where = self.where(namer)
        body = self.text(namer)
        return f"{where}: {body}" if where else body

    def __str__(self) -> str:
        return self.render()

    def about(self, setting: str) -> RcpickError:
        """Return this error naming ``setting``, if it named none."""
        if self.setting is None:
            self.setting = setting
        return self


class BadValue(RcpickError, ValueError):
    """A value that cannot be read, has the wrong kind, or is out of range."""


class UnknownName(RcpickError, LookupError):
    """A name (series, dielectric, technology ...) that rcpick does not know."""


class ClashingOptions(RcpickError, ValueError):
    """Two settings that cannot be used together, or a required one missing."""


class Unreachable(RcpickError, ValueError):
    """No allowed combination of parts meets the request."""


class NotReached(RcpickError, ValueError):
    """A level that the node never reaches: the asked crossing does not exist."""
