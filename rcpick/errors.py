"""Errors raised by rcpick's core.

Every error the user can cause is an :class:`RcpickError`; the command line
catches that one class and prints it as a single line (exit code 2).
Subclasses also inherit the matching builtin, so library callers can catch
``ValueError`` or ``LookupError`` as usual.
"""

from __future__ import annotations


class RcpickError(Exception):
    """Base class of every error rcpick reports to the user.

    Parameters
    ----------
    message : str
        What was wrong and what is accepted.
    option : str, optional
        The command-line option (or file position) at fault, e.g. ``"--tau"``.
    value : object, optional
        The offending value, kept for callers.
    """

    def __init__(self, message: str, *, option: str | None = None, value: object = None):
        super().__init__(message)
        self.message = message
        self.option = option
        self.value = value

    def __str__(self) -> str:
        return f"{self.option}: {self.message}" if self.option else self.message

    def for_option(self, option: str) -> "RcpickError":
        """Return this error with ``option`` filled in, if it had none."""
        if self.option is None:
            self.option = option
        return self


class BadValue(RcpickError, ValueError):
    """A value that cannot be read, has the wrong kind, or is out of range."""


class UnknownName(RcpickError, LookupError):
    """A name (series, dielectric, technology ...) that rcpick does not know."""


class ClashingOptions(RcpickError, ValueError):
    """Two options that cannot be used together, or a required one missing."""


class Unreachable(RcpickError, ValueError):
    """No allowed combination of parts comes near the target."""
