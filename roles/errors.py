"""The project's error types.

Every problem the user can fix (a bad file, a bad option) is a :class:`RolesError`;
the command line turns it into one ``error:`` line and exit status 2.
"""

from __future__ import annotations

__all__ = ["RolesError", "InputError", "ConfigError", "Interrupted"]


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
