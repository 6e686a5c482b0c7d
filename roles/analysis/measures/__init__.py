"""Role measures of a network and a partition of its nodes into communities.

Every function here takes a networkx graph and, where it needs one, a
``dict node -> community label``, and returns plain values keyed by node. The role
table (:func:`role_table`) gathers them, assigns the published role regions
(Guimera & Amaral 2005) and a plain-language role label of our own.

One module per measure family:

- :mod:`.cartography`: participation coefficient, within-community z, role regions;
- :mod:`.betweenness`: compiled Brandes betweenness, exact or sampled;
- :mod:`.holes`: Burt's constraint and effective size;
- :mod:`.dependents`: single points of failure;
- :mod:`.table`: the role table, its labels and the ranked lists;
- ``_ties``: the graph's ties as index arrays, shared by the others (private).

Conventions shared by all measures
----------------------------------
- Tie weights (edge attribute ``weight``, missing = 1) are tie *strengths*: bigger
  means closer. They must be positive and finite; anything else raises
  :class:`~roles.errors.InputError`.
- Self-loops say nothing about a node's position among others and are ignored.
- Multigraphs are refused: merge parallel ties (sum their weights) first.
- Directed ties point from supplier to customer.
"""

from __future__ import annotations

from .betweenness import EXACT_LIMIT, BetweennessInfo, betweenness, betweenness_sources
from .cartography import (
    BRIDGE_P,
    HUB_P,
    HUB_Z,
    NON_HUB_P,
    ROLE_REGIONS,
    participation_coefficient,
    role_region,
    within_module_z,
)
from .dependents import dependents
from .holes import structural_holes
from .table import (
    BRIDGE_SHARE,
    high_betweenness,
    rank_bridges,
    rank_hubs,
    rank_traffic,
    role_table,
)

__all__ = [
    "BetweennessInfo",
    "EXACT_LIMIT",
    "HUB_Z",
    "BRIDGE_P",
    "BRIDGE_SHARE",
    "NON_HUB_P",
    "HUB_P",
    "ROLE_REGIONS",
    "participation_coefficient",
    "within_module_z",
    "role_region",
    "betweenness",
    "betweenness_sources",
    "structural_holes",
    "dependents",
    "role_table",
    "rank_bridges",
    "rank_hubs",
    "rank_traffic",
    "high_betweenness",
]
