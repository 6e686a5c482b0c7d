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
    "quoted",
    "parameter_message",
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


def quoted(value: Any, limit: int = 60) -> str:
    """A value as quoted in a message: its repr, cut when long, never failing.

    Examples
    --------
    >>> quoted("x" * 70)
    "'xxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxxx..."
    """
    try:
        text = repr(value)
    except RecursionError:  # a value nested too deeply to print
        text = "a value nested too deeply to show"
    return text if len(text) <= limit else text[:limit] + "..."


def parameter_message(name: str, owner: str, must: str, value: Any) -> str:
    """The one shape of every parameter error message (scikit-learn's).

    Parameters
    ----------
    name : str
        The parameter.
    owner : str
        Where it belongs: a configuration section (``[walks]``) or a function name.
    must : str
        What it must be, completing "must be ...".
    value : object
        The value given.

    Examples
    --------
    >>> parameter_message("samples", "betweenness", "a whole number of at least 2", 1)
    "The 'samples' parameter of betweenness must be a whole number of at least 2. Got 1 instead."
    """
    return f"The '{name}' parameter of {owner} must be {must}. Got {quoted(value)} instead."
