"""The role table: every measure of every node, its role region and a role label.

The plain-language labels (hub-like, bridge-like, connector hub, ...) are our own; the
published role region (R1-R7) is kept beside each label. The ``rank_*`` functions and
:func:`high_betweenness` read the table back for the report's lists.
"""

from __future__ import annotations

import math
import numbers
from collections.abc import Hashable, Mapping
from typing import Any

import networkx as nx
import numpy as np
import pandas as pd

from ...errors import parameter_message
from ._ties import _by_community, _codes, _symmetric, _Ties, _ties
from .betweenness import EXACT_LIMIT, _betweenness
from .cartography import _TOL, HUB_Z, _participation, _within_z, role_region
from .dependents import dependents
from .holes import _structural_holes

__all__ = [
    "BRIDGE_SHARE",
    "role_table",
    "high_betweenness",
    "rank_bridges",
    "rank_hubs",
    "rank_traffic",
]

#: A bridge-like node must be among this share of nodes with the most betweenness
#: (our choice; the top decile is common practice for "high" centrality). Nodes whose
#: betweenness equals the value at the cut (to a relative 1e-9) are all included.
BRIDGE_SHARE = 0.10

# Betweenness values within this relative distance count as equal: sums of the same
# path counts taken in another order differ in the last bits.
_EQUAL = 1e-9

_HUB_ROLES = ("hub-like", "connector hub")
_BRIDGE_ROLES = ("bridge-like", "connector hub")


def _label(hub: bool, bridge: bool, neighbours: int) -> str:
    if neighbours == 0:
        return "no ties"
    if hub and bridge:
        return "connector hub"
    if hub:
        return "hub-like"
    if bridge:
        return "bridge-like"
    if neighbours == 1:
        return "peripheral"
    return "member"


def role_table(
    G: nx.Graph,
    community: Mapping[Any, Hashable],
    *,
    exact_limit: int = EXACT_LIMIT,
    seed: int = 0,
    weight: str | None = "weight",
    bridge_share: float = BRIDGE_SHARE,
    samples: int | None = None,
) -> pd.DataFrame:
    """All role measures of every node, its role region and a plain-language role.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network.
    community : mapping
        Community label of every node.
    exact_limit : int, default EXACT_LIMIT
        Passed to :func:`betweenness`.
    seed : int, default 0
        Seed of the betweenness source sample (large graphs only).
    weight : str or None, default "weight"
        Tie strength attribute, used by every measure (see each function).
    bridge_share : float, default 0.10
        Share of nodes, by betweenness, that count as carrying much traffic.
    samples : int, optional
        Betweenness sources (:func:`betweenness`); by default
        :func:`betweenness_sources` of the node count and ``exact_limit``, so passing
        that number changes nothing. At least the node count gives exact values.

    Returns
    -------
    pandas.DataFrame
        Indexed by node (graph order), columns ``betweenness, participation,
        within_z, constraint, effective_size, dependents, region, role``.
        ``table.attrs["betweenness"]`` holds the :class:`BetweennessInfo`.

    Raises
    ------
    InputError
        A node has no community label, a weight is not a positive number, or the
        network has parallel ties.
    ValueError
        ``bridge_share`` is not in (0, 1], or ``samples`` is not a whole number of at
        least 2.

    Notes
    -----
    ``role`` is decided by two tests:

    - *hub*: within-community z-score >= 2.5 (Guimera & Amaral 2005);
    - *bridge*: betweenness among the top ``bridge_share`` of nodes
      (:func:`high_betweenness`: every node equal to the value at the cut included, zero
      never counts) **and** at least one tie to another community (P > 0). Betweenness
      (Freeman 1977) counts the shortest paths through the node; a node of the top
      share that also touches another community is one through which traffic between
      communities can run, however few its outside ties: in a ring of cliques each
      member holding the one tie to the next clique has P = 0.28 (clique size 6) and
      the highest betweenness. A node whose ties all stay inside its community has
      P = 0 and is never bridge-like, however central.

    Labels: ``"connector hub"`` (both tests), ``"hub-like"`` (hub only),
    ``"bridge-like"`` (bridge only), ``"peripheral"`` (neither, and a single
    neighbour), ``"member"`` (neither, otherwise), ``"no ties"`` (no ties). The
    published region (R1-R7) is kept beside the label in ``region``.

    References
    ----------
    .. [1] R. Guimera and L. A. N. Amaral, "Functional cartography of complex
       metabolic networks", Nature 433:895-900, 2005.
    .. [2] L. C. Freeman, "A set of measures of centrality based on betweenness",
       Sociometry 40:35-41, 1977.
    """
    _check_share("role_table", "bridge_share", bridge_share)
    ties = _ties(G, weight)
    codes = _codes(ties, community)
    P = _participation(ties, codes)
    z = _within_z(ties, codes)
    b, info = _betweenness(ties, exact_limit=exact_limit, seed=seed, samples=samples)
    c, e = _structural_holes(ties)
    dep = dependents(G)
    neighbours = np.diff(_symmetric(ties)[0])
    high = _high(b, bridge_share)
    outside = _outside_ties(ties, codes) > 0
    region = [role_region(zi, pi) for zi, pi in zip(z, P, strict=True)]
    role = [
        _label(bool(z[i] >= HUB_Z - _TOL), bool(high[i] and outside[i]), int(k))
        for i, k in enumerate(neighbours)
    ]
    table = pd.DataFrame(
        {
            "betweenness": b,
            "participation": P,
            "within_z": z,
            "constraint": c,
            "effective_size": e,
            "dependents": np.array([dep[v] for v in ties.nodes], dtype=np.int64),
            "region": region,
            "role": role,
        },
        index=pd.Index(ties.nodes, name="node", tupleize_cols=False),
    )
    table.attrs["betweenness"] = info
    return table


def _check_share(owner: str, name: str, share: Any) -> None:
    ok = isinstance(share, numbers.Real) and not isinstance(share, bool)
    if not (ok and 0.0 < float(share) <= 1.0):
        raise ValueError(
            parameter_message(name, "a number greater than 0 and at most 1", share, where=owner)
        )


def _high(b: np.ndarray, share: float) -> np.ndarray:
    if b.size == 0:
        return np.zeros(0, dtype=bool)
    rank = max(1, math.ceil(share * b.size))
    cut = float(np.sort(b)[::-1][rank - 1])
    return (b >= cut - _EQUAL * abs(cut)) & (b > 0)


def _outside_ties(ties: _Ties, codes: np.ndarray) -> np.ndarray:
    """Weight of each node's ties to members of other communities."""
    if ties.n == 0:
        return np.zeros(0)
    node, comm, k_is = _by_community(ties, codes)
    away = comm != codes[node]
    return np.bincount(node[away], weights=k_is[away], minlength=ties.n)


def high_betweenness(
    betweenness: Mapping[Any, float], share: float = BRIDGE_SHARE
) -> dict[Hashable, bool]:
    """Whether each node is among the ``share`` of nodes with the most betweenness.

    The cut is the betweenness of the node ranked ``ceil(share * n)``; every node whose
    value equals it (to a relative 1e-9) is included too, so nodes with equal scores are
    treated alike, and a betweenness of 0 never counts. The top decile is common
    practice for "high" centrality, not a published threshold.

    Parameters
    ----------
    betweenness : mapping
        Node -> betweenness (:func:`betweenness`).
    share : float, default BRIDGE_SHARE
        Share of nodes to keep before ties at the cut are added.

    Returns
    -------
    dict
        Node -> bool.

    Raises
    ------
    ValueError
        ``share`` is not in (0, 1].

    Examples
    --------
    >>> high_betweenness({"a": 0.5, "b": 0.5, "c": 0.1, "d": 0.0}, share=0.25)
    {'a': True, 'b': True, 'c': False, 'd': False}
    """
    _check_share("high_betweenness", "share", share)
    nodes = list(betweenness)
    b = np.fromiter((float(betweenness[v]) for v in nodes), dtype=np.float64, count=len(nodes))
    return dict(zip(nodes, _high(b, share).tolist(), strict=True))


def _ranked(
    owner: str, table: pd.DataFrame, roles: tuple[str, ...], keys: list[str], top: int | None
) -> list[Hashable]:
    if top is not None and (
        isinstance(top, bool) or not isinstance(top, numbers.Integral) or top < 0
    ):
        raise ValueError(parameter_message("top", "None or a whole number >= 0", top, where=owner))
    picked = table[table["role"].isin(roles)]
    # Stable sort on the keys, most first; graph order breaks exact ties.
    order = picked.sort_values(keys, ascending=False, kind="mergesort")
    names = list(order.index)
    return names if top is None else names[:top]


def rank_bridges(table: pd.DataFrame, top: int | None = None) -> list[Hashable]:
    """Nodes labelled bridge-like (or connector hub), most bridge-like first.

    Ordered by betweenness, then participation coefficient, both descending; nodes
    equal on both keep the table's (graph) order.

    Parameters
    ----------
    table : pandas.DataFrame
        A :func:`role_table`.
    top : int, optional
        Keep only the first ``top`` names.

    Returns
    -------
    list
        Node names.

    Raises
    ------
    ValueError
        ``top`` is not None or a whole number >= 0.
    """
    return _ranked("rank_bridges", table, _BRIDGE_ROLES, ["betweenness", "participation"], top)


def rank_hubs(table: pd.DataFrame, top: int | None = None) -> list[Hashable]:
    """Nodes labelled hub-like (or connector hub), most hub-like first.

    Ordered by within-community z-score, then betweenness, both descending; nodes
    equal on both keep the table's (graph) order.

    Parameters
    ----------
    table : pandas.DataFrame
        A :func:`role_table`.
    top : int, optional
        Keep only the first ``top`` names.

    Returns
    -------
    list
        Node names.

    Raises
    ------
    ValueError
        ``top`` is not None or a whole number >= 0.
    """
    return _ranked("rank_hubs", table, _HUB_ROLES, ["within_z", "betweenness"], top)


def rank_traffic(table: pd.DataFrame, share: float = BRIDGE_SHARE) -> list[Hashable]:
    """Nodes that carry an outsized share of shortest paths, most first.

    The nodes of :func:`high_betweenness` (top ``share`` by betweenness, equal values at
    the cut included, zero never), ordered by betweenness descending; equal values keep
    the table's (graph) order. Unlike the role labels, this list does not depend on the
    communities.

    Parameters
    ----------
    table : pandas.DataFrame
        A :func:`role_table` (only its ``betweenness`` column is read).
    share : float, default BRIDGE_SHARE
        Share of nodes to keep before ties at the cut are added.

    Returns
    -------
    list
        Node names.

    Raises
    ------
    ValueError
        ``share`` is not in (0, 1].

    References
    ----------
    .. [1] L. C. Freeman, "A set of measures of centrality based on betweenness",
       Sociometry 40:35-41, 1977.
    """
    _check_share("rank_traffic", "share", share)
    b = table["betweenness"].to_numpy(dtype=np.float64)
    picked = table[_high(b, share)]
    order = picked.sort_values("betweenness", ascending=False, kind="mergesort")
    return list(order.index)
