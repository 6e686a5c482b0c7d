"""The project's error types.

Every problem the user can fix (a bad file, a bad option) is a :class:`RolesError`;
the command line turns it into one ``error:`` line and exit status 2.
"""

from __future__ import annotations

from typing import Any

__all__ = [
    "RolesError",
    "InputError",
    "ConfigError",
    "Interrupted",
    "parameter_message",
    "parameter_error",
    "shown",
]


class RolesError(Exception):
    """Base class of every error the project raises on purpose."""


class InputError(RolesError):
    """An input file cannot be read as a network or a node table.

    Parameters
    ----------
    message : str
        What is wrong and what to do about it.
    path : str, optional
        The file concerned.
    line : int, optional
        The 1-based line of the file, where there is one.
    """

    def __init__(self, message: str, *, path: str | None = None, line: int | None = None):
        self.path = path
        self.line = line
        where = ""
        if path is not None:
            where = f"{path}"
            if line is not None:
                where += f", line {line}"
            where += ": "
        super().__init__(where + message)


class ConfigError(RolesError):
    """A configuration value or option is missing, unknown, out of range or mistyped."""


class Interrupted(RolesError):
    """The run was stopped by the user (Ctrl-C) before its outputs were complete."""


def shown(value: Any, limit: int = 60) -> str:
    """A value as quoted in a message: cut when long, never failing."""
    try:
        text = repr(value)
    except RecursionError:  # a value nested too deeply to print
        text = "a value nested too deeply to show"
    return text if len(text) <= limit else text[:limit] + "..."


def parameter_message(name: str, must: str, got: Any, *, where: str | None = None) -> str:
    """The one shape of every parameter error, a configuration key's or a function's.

    Worded as scikit-learn words its own parameter checks.

    Examples
    --------
    >>> parameter_message("runs", "a whole number from 0 to 50", -1, where="[confidence]")
    "The 'runs' parameter of [confidence] must be a whole number from 0 to 50. Got -1 instead."
    >>> parameter_message("view", "'local' or 'far'", "near")
    "The 'view' parameter must be 'local' or 'far'. Got 'near' instead."
    """
    of = f" of {where}" if where else ""
    return f"The '{name}' parameter{of} must be {must}. Got {shown(got)} instead."


def parameter_error(name: str, must: str, got: Any, *, where: str | None = None) -> ValueError:
    """A :class:`ValueError` in the shape of :func:`parameter_message`, for a function's
    argument (a programming error, not the user's: the configuration raises
    :class:`ConfigError` with the same message)."""
    return ValueError(parameter_message(name, must, got, where=where))
