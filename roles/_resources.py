"""Find the data folders shipped with the package (templates, demo scenarios).

Installed from a wheel, ``templates/`` and ``examples/`` are the packages
``roles.templates`` and ``roles.scenarios`` (folders without ``__init__.py``); in a
source checkout they sit beside ``roles/``.
"""

from __future__ import annotations

import importlib.util
from pathlib import Path

__all__ = ["data_dir"]

_SOURCE = Path(__file__).resolve().parent.parent


def data_dir(package: str, folder: str) -> Path:
    """The folder of ``package`` when installed, else ``folder`` of the source tree."""
    try:
        spec = importlib.util.find_spec(package)
    except ModuleNotFoundError:
        spec = None
    if spec is not None and spec.submodule_search_locations:
        for location in spec.submodule_search_locations:
            path = Path(location)
            if path.is_dir():
                return path
    return _SOURCE / folder
