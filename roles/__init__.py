"""roles: communities, bridges, hubs and single points of failure of a network.

The main entry point is :func:`run`, which takes a networkx graph and returns a
:class:`Result` (a node table as a pandas DataFrame and a summary dict).
"""

from ._version import __version__ as __version__
from .analysis.snapshots import compare_graphs
from .analysis.whatif import Removal, Robustness, robustness, what_if
from .config import Config, load_config
from .errors import ConfigError, InputError, RolesError
from .pipeline import Result, run

__all__ = [
    "run",
    "compare_graphs",
    "Result",
    "Config",
    "load_config",
    "RolesError",
    "InputError",
    "ConfigError",
    "what_if",
    "Removal",
    "robustness",
    "Robustness",
]
