"""What one run found, as frozen values: the report and the writers read these.

:func:`roles.pipeline.run` builds a :class:`Result`; ``summary.json`` is built from it
by :func:`roles.io.summary.summary_of` (``Result.summary``), and the report reads the
attributes, never that dict.
"""

from __future__ import annotations

from collections.abc import Hashable
from dataclasses import dataclass, field
from functools import cached_property
from typing import TYPE_CHECKING, Any

if TYPE_CHECKING:  # the types only: the stages never import this module's users
    import networkx as nx
    import numpy as np
    import pandas as pd

    from .analysis.compare import Comparison
    from .analysis.confidence import Confidence
    from .analysis.customers import FinalCustomers
    from .analysis.findings import SinglePoint, Withheld
    from .analysis.measures import BetweennessInfo
    from .analysis.whatif import WhatIf
    from .config import Config
    from .embedding.cluster import Grouping

__all__ = ["Budgets", "Findings", "FormalGroups", "ModularityCheck", "Result", "RunRecord"]


@dataclass(frozen=True)
class ModularityCheck:
    """The communities found against a Louvain partition of the same ties.

    Attributes
    ----------
    communities : float
        Modularity (Newman 2006) of the communities found.
    louvain : float
        Modularity of the Louvain partition (Blondel et al. 2008).
    louvain_groups : int
        Groups in the Louvain partition, among the members with ties.
    nmi_with_louvain : float
        Normalised mutual information of the two partitions, members with ties.
    """

    communities: float
    louvain: float
    louvain_groups: int
    nmi_with_louvain: float


@dataclass(frozen=True)
class Findings:
    """The network's counts, its communities and the members the report names.

    Attributes
    ----------
    nodes, edges : int
        Members and ties of the analysed graph.
    directed : bool
        Whether ties have a direction (supplier -> customer).
    isolated : list of str
        Members with no ties, in the graph's order.
    communities : int
        Communities found (groups of the chosen view).
    grouped : bool
        Whether the chosen view found any groups.
    community_view : str
        The view whose groups are the communities (``"local"`` or ``"far"``).
    walks_over : str
        Which ties the walks followed, in words.
    view_modularity : dict
        View -> modularity of its groups (NaN when it found none), unrounded.
    bridges, hubs, traffic : list of str
        The members ranked bridge-like, hub-like and by betweenness (empty bridges and
        hubs when roles are withheld).
    roles_withheld : Withheld or None
        Why hub-like and bridge-like are not reported
        (:func:`roles.analysis.findings.roles_withheld`).
    single_points : list of SinglePoint
        :func:`roles.analysis.findings.single_points`.
    modularity : ModularityCheck
    betweenness : BetweennessInfo or None
        How betweenness was computed.
    """

    nodes: int
    edges: int
    directed: bool
    isolated: list[str]
    communities: int
    grouped: bool
    community_view: str
    walks_over: str
    view_modularity: dict[str, float]
    bridges: list[str]
    hubs: list[str]
    roles_withheld: Withheld | None
    traffic: list[str]
    single_points: list[SinglePoint]
    modularity: ModularityCheck
    betweenness: BetweennessInfo | None = None


@dataclass(frozen=True)
class Budgets:
    """Notes, in the report's words, when a stage spent less than asked (None otherwise).

    Attributes
    ----------
    confidence : str or None
        Fewer re-runs or randomisations than configured.
    walk : str or None
        Fewer walks than configured.
    cluster : str or None
        The groups were fitted on a sample of the members.
    """

    confidence: str | None = None
    walk: str | None = None
    cluster: str | None = None


@dataclass(frozen=True, eq=False)
class FormalGroups:
    """The communities found against formal groups (departments, tiers).

    Attributes
    ----------
    attribute : str
        The nodes-file column holding the groups.
    nmi : float
        :func:`roles.analysis.formal.formal_nmi`.
    ei_index : dict
        :func:`roles.analysis.formal.ei_index`.
    ei_test : pandas.DataFrame
        :func:`roles.analysis.formal.ei_test` (expected, p_value, verdict per group).
    crosstab : pandas.DataFrame
        :func:`roles.analysis.formal.crosstab` (formal group x community).
    """

    attribute: str
    nmi: float
    ei_index: dict[Hashable, float]
    ei_test: pd.DataFrame
    crosstab: pd.DataFrame


@dataclass(frozen=True)
class RunRecord:
    """How the run was made: parameters, input, versions and timings.

    Attributes
    ----------
    config : Config
        The configuration as used (after the walk budget).
    input : dict
        What the graph was read from (``file``, ``sha256``...).
    versions : dict
        Package -> version.
    timings : dict
        Stage -> seconds.
    view_timings : dict
        View -> {step: seconds} in that view's process.
    """

    config: Config
    input: dict[str, Any]
    versions: dict[str, str]
    timings: dict[str, float]
    view_timings: dict[str, dict[str, float]] = field(default_factory=dict)


@dataclass(frozen=True, eq=False)
class Result:
    """Everything one run found; the report and the writers only read it.

    Attributes
    ----------
    nodes : pandas.DataFrame
        One row per node (see the README for the columns), most bridge-like not implied:
        rows follow the graph's node order.
    graph : networkx.Graph
        The analysed graph (after loading fixes), node names as given.
    vectors : dict
        View name -> ndarray (n, d) of node vectors, rows in ``nodes`` order.
    groupings : dict
        View name -> :class:`~roles.embedding.cluster.Grouping` over the connected nodes.
    comparison : Comparison or None
        Agreement of the two views (None with fewer than three members with ties).
    findings : Findings
    budgets : Budgets
    record : RunRecord
    what_if : WhatIf or None
        The removal scenarios and the robustness curves.
    confidence : Confidence or None
        The structure test and seed stability, when they ran.
    formal : FormalGroups or None
        With ``group_by``.
    final_customers : list of FinalCustomers or None
        Directed networks: for each single point of failure, the final customers it
        feeds.
    """

    nodes: pd.DataFrame
    graph: nx.Graph
    vectors: dict[str, np.ndarray]
    groupings: dict[str, Grouping]
    comparison: Comparison | None
    findings: Findings
    budgets: Budgets
    record: RunRecord
    what_if: WhatIf | None = None
    confidence: Confidence | None = None
    formal: FormalGroups | None = None
    final_customers: list[FinalCustomers] | None = None

    @cached_property
    def summary(self) -> dict[str, Any]:
        """The content of ``summary.json`` (:func:`roles.io.summary.summary_of`)."""
        from .io.summary import summary_of

        return summary_of(self)
