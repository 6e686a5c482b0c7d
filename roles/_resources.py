"""Find the data folders shipped with the package (templates, demo scenarios).

Installed from a wheel, ``templates/`` and ``examples/`` are the packages
``roles.templates`` and ``roles.scenarios``; in a source checkout they sit beside
``roles/``.
"""

from __future__ import annotations

from importlib import resources
from pathlib import Path

__all__ = ["data_dir"]

_SOURCE = Path(__file__).resolve().parent.parent


def data_dir(package: str, folder: str) -> Path:
    """The folder of ``package`` (installed) or ``folder`` (source tree)."""
    try:
        path = Path(str(resources.files(package)))
        if path.is_dir():
            return path
    except (ModuleNotFoundError, TypeError):
        pass
    return _SOURCE / folder
