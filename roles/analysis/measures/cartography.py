"""Guimerà-Amaral cartography: participation, within-community z and the role regions.

A node's role in its community is read from two numbers: the within-community degree
z-score (how much more tied it is inside its community than the other members) and the
participation coefficient (how evenly its ties spread over communities). Seven regions
of that plane (R1-R7) carry the published role names [1]_; their bounds are written
here once and read by the report's role map.

References
----------
.. [1] R. Guimera and L. A. N. Amaral, "Functional cartography of complex metabolic
   networks", Nature 433:895-900, 2005. doi:10.1038/nature03288
"""

from __future__ import annotations

import math
from collections.abc import Hashable, Mapping
from typing import Any

import networkx as nx
import numpy as np

from ...errors import parameter_message
from ._ties import _by_community, _codes, _Ties, _ties

__all__ = [
    "HUB_Z",
    "BRIDGE_P",
    "NON_HUB_P",
    "HUB_P",
    "ROLE_REGIONS",
    "participation_coefficient",
    "within_module_z",
    "role_region",
]


#: Hub threshold on the within-community degree z-score (Guimera & Amaral 2005).
HUB_Z = 2.5

#: Upper participation bounds of the non-hub regions R1, R2, R3 (Guimera & Amaral
#: 2005); R4 lies above the last. Each bound belongs to the region below it.
NON_HUB_P = (0.05, 0.62, 0.80)

#: Upper participation bounds of the hub regions R5, R6; R7 lies above the last.
HUB_P = (0.30, 0.75)

#: Participation coefficient above which a node's ties count as spread over several
#: communities (the published boundary between hubs whose ties stay home and connector
#: hubs, 0.30). Kept for the role map and the report's wording; the bridge-like rule
#: itself asks only for one tie outside the node's community (see :func:`role_table`).
BRIDGE_P = HUB_P[0]


def _spans(upper: tuple[float, ...]) -> list[tuple[float, float]]:
    edges = (0.0, *upper, 1.0)
    return list(zip(edges[:-1], edges[1:], strict=True))


#: The seven regions as ``(code, z range, P range)``, R1 first, for drawing them.
ROLE_REGIONS: tuple[tuple[str, tuple[float, float], tuple[float, float]], ...] = tuple(
    (f"R{i}", z, p)
    for i, (z, p) in enumerate(
        [((-math.inf, HUB_Z), p) for p in _spans(NON_HUB_P)]
        + [((HUB_Z, math.inf), p) for p in _spans(HUB_P)],
        start=1,
    )
)

# Comparisons against the published region bounds allow for rounding in P.
_TOL = 1e-9


def _participation(ties: _Ties, codes: np.ndarray) -> np.ndarray:
    if ties.n == 0:
        return np.zeros(0)
    node, _, k_is = _by_community(ties, codes)
    k = np.bincount(node, weights=k_is, minlength=ties.n)
    sq = np.bincount(node, weights=k_is * k_is, minlength=ties.n)
    out = np.zeros(ties.n)
    has = k > 0
    out[has] = 1.0 - sq[has] / k[has] ** 2
    return np.clip(out, 0.0, 1.0)


def _within_z(ties: _Ties, codes: np.ndarray) -> np.ndarray:
    if ties.n == 0:
        return np.zeros(0)
    node, comm, k_is = _by_community(ties, codes)
    home = comm == codes[node]
    within = np.bincount(node[home], weights=k_is[home], minlength=ties.n)
    size = np.bincount(codes).astype(np.float64)
    mean = np.bincount(codes, weights=within) / size
    dev = within - mean[codes]
    std = np.sqrt(np.bincount(codes, weights=dev * dev) / size)
    s = std[codes]
    z = np.zeros(ties.n)
    ok = s > 1e-12 * np.maximum(1.0, np.abs(mean[codes]))
    z[ok] = dev[ok] / s[ok]
    return z


# ------------------------------------------------------------------ Guimera & Amaral


def participation_coefficient(
    G: nx.Graph, community: Mapping[Any, Hashable], *, weight: str | None = "weight"
) -> dict[Hashable, float]:
    """Participation coefficient of every node.

    ``P_i = 1 - sum_s (k_is / k_i) ** 2``, where ``k_is`` is the weight of node i's ties
    into community s and ``k_i`` the weight of all its ties [1]_. P is 0 when all of a
    node's ties stay inside one community and approaches 1 when they are spread evenly
    over many communities.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network. Self-loops are ignored.
    community : mapping
        Community label of every node of ``G``.
    weight : str or None, default "weight"
        Edge attribute holding tie strength (missing = 1). With weights, ``k`` is the
        node's *strength* (sum of tie weights), as in the Brain Connectivity Toolbox
        [2]_; ``None`` counts ties (the original degree-based definition).

    Returns
    -------
    dict
        Node -> P in [0, 1]; 0 for nodes without ties.

    Raises
    ------
    InputError
        A node has no community label, or a weight is not a positive number.

    Notes
    -----
    Directed graphs: ``k`` is the *total* degree (in + out, so a reciprocated pair
    counts twice), i.e. the measure of the undirected matrix ``W + W.T``; this is
    bctpy's ``participation_coef(W + W.T, ci)`` and matches the in-and-out convention of
    its ``module_degree_zscore(W, ci, flag=3)``.

    References
    ----------
    .. [1] R. Guimera and L. A. N. Amaral, "Functional cartography of complex
       metabolic networks", Nature 433:895-900, 2005. doi:10.1038/nature03288
    .. [2] M. Rubinov and O. Sporns, "Complex network measures of brain connectivity:
       uses and interpretations", NeuroImage 52:1059-1069, 2010.

    Examples
    --------
    >>> import networkx as nx
    >>> G = nx.path_graph(3)
    >>> participation_coefficient(G, {0: "a", 1: "a", 2: "b"})
    {0: 0.0, 1: 0.5, 2: 0.0}
    """
    ties = _ties(G, weight)
    p = _participation(ties, _codes(ties, community))
    return dict(zip(ties.nodes, p.tolist(), strict=True))


def within_module_z(
    G: nx.Graph, community: Mapping[Any, Hashable], *, weight: str | None = "weight"
) -> dict[Hashable, float]:
    """Within-community degree z-score of every node.

    ``z_i = (k_i,s_i - mean_s) / std_s``: the weight of node i's ties inside its own
    community s_i, compared with the other members of s_i (mean and population
    standard deviation over the members) [1]_.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network. Self-loops are ignored.
    community : mapping
        Community label of every node of ``G``.
    weight : str or None, default "weight"
        Edge attribute holding tie strength (missing = 1); strengths as in [2]_,
        ``None`` counts ties.

    Returns
    -------
    dict
        Node -> z. Communities whose members all have the same within-community
        degree (including one-member communities) give 0, as bctpy does.

    Raises
    ------
    InputError
        A node has no community label, or a weight is not a positive number.

    Notes
    -----
    Directed graphs use the total (in + out) within-community degree, bctpy's
    ``module_degree_zscore(W, ci, flag=3)``.

    References
    ----------
    .. [1] R. Guimera and L. A. N. Amaral, "Functional cartography of complex
       metabolic networks", Nature 433:895-900, 2005. doi:10.1038/nature03288
    .. [2] M. Rubinov and O. Sporns, "Complex network measures of brain connectivity:
       uses and interpretations", NeuroImage 52:1059-1069, 2010.

    Examples
    --------
    >>> import networkx as nx
    >>> z = within_module_z(nx.star_graph(3), dict.fromkeys(range(4), "a"))
    >>> round(z[0], 3), round(z[1], 3)
    (1.732, -0.577)
    """
    ties = _ties(G, weight)
    z = _within_z(ties, _codes(ties, community))
    return dict(zip(ties.nodes, z.tolist(), strict=True))


def role_region(z: float, P: float) -> str:
    """Role region R1-R7 of a node from its z-score and participation coefficient.

    Regions of Guimera & Amaral [1]_, with **inclusive upper bounds** (and a tolerance
    of 1e-9 for rounding in P):

    ========  ===========================  ===========================
    region    condition                    their name
    ========  ===========================  ===========================
    R1        z < 2.5,  P <= 0.05          ultra-peripheral
    R2        z < 2.5,  0.05 < P <= 0.62   peripheral
    R3        z < 2.5,  0.62 < P <= 0.80   non-hub connector
    R4        z < 2.5,  P > 0.80           non-hub kinless
    R5        z >= 2.5, P <= 0.30          provincial hub
    R6        z >= 2.5, 0.30 < P <= 0.75   connector hub
    R7        z >= 2.5, P > 0.75           kinless hub
    ========  ===========================  ===========================

    Parameters
    ----------
    z : float
        Within-community degree z-score (:func:`within_module_z`).
    P : float
        Participation coefficient (:func:`participation_coefficient`).

    Returns
    -------
    str
        ``"R1"`` ... ``"R7"``.

    Raises
    ------
    ValueError
        ``z`` or ``P`` is not a finite number.

    References
    ----------
    .. [1] R. Guimera and L. A. N. Amaral, "Functional cartography of complex
       metabolic networks", Nature 433:895-900, 2005. doi:10.1038/nature03288

    Examples
    --------
    >>> role_region(2.5, 0.30), role_region(2.49, 0.05)
    ('R5', 'R1')
    """
    for name, value in (("z", z), ("P", P)):
        if not math.isfinite(float(value)):
            raise ValueError(parameter_message(name, "a finite number", value, where="role_region"))
    z, P = float(z), float(P)
    upper: tuple[float, ...]
    if z >= HUB_Z - _TOL:
        first, upper = 5, HUB_P
    else:
        first, upper = 1, NON_HUB_P
    for i, bound in enumerate(upper):
        if bound + _TOL >= P:
            return f"R{first + i}"
    return f"R{first + len(upper)}"
