"""Role measures of a network and a partition of its nodes into communities.

Every function here takes a networkx graph and, where it needs one, a
``dict node -> community label``, and returns plain values keyed by node. The role
table (:func:`role_table`) gathers them, assigns the published role regions
(Guimera & Amaral 2005) and a plain-language role label of our own.

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

import math
import numbers
from collections.abc import Hashable, Mapping
from dataclasses import dataclass
from typing import Any

import networkx as nx
import numba
import numpy as np
import pandas as pd

from ..errors import InputError

__all__ = [
    "BetweennessInfo",
    "EXACT_LIMIT",
    "HUB_Z",
    "BRIDGE_P",
    "BRIDGE_SHARE",
    "participation_coefficient",
    "within_module_z",
    "role_region",
    "betweenness",
    "structural_holes",
    "dependents",
    "role_table",
    "rank_bridges",
    "rank_hubs",
    "rank_traffic",
    "high_betweenness",
]

#: Largest node count for exact betweenness. Compiled Brandes (this module) on
#: preferential attachment graphs, CPU seconds on the project's shared 2-core machine
#: (benchmarks/bench_measures.py): 5,000 nodes 4.6 s with weights (Dijkstra) and 1.8 s
#: counting steps at average degree 10, 5.8 s and 2.4 s at average degree 20; 10,000
#: nodes 19-24 s with weights; 20,000 nodes / 200k ties 106 s. Cost grows as nodes x
#: ties, so 5,000 is the largest size whose exact run stays within a few seconds (half
#: that on two threads). networkx needed 5.6 s for 1,000 nodes with weights; this 0.17 s.
EXACT_LIMIT = 5000

#: Hub threshold on the within-community degree z-score (Guimera & Amaral 2005).
HUB_Z = 2.5

#: Participation coefficient above which a node's ties count as spread over several
#: communities (the published boundary between hubs whose ties stay home and connector
#: hubs, 0.30). Kept for the role map and the report's wording; the bridge-like rule
#: itself asks only for one tie outside the node's community (see :func:`role_table`).
BRIDGE_P = 0.30

#: A bridge-like node must be among this share of nodes with the most betweenness
#: (our choice; the top decile is common practice for "high" centrality). Nodes whose
#: betweenness equals the value at the cut (to a relative 1e-9) are all included.
BRIDGE_SHARE = 0.10

# Betweenness values within this relative distance count as equal: sums of the same
# path counts taken in another order differ in the last bits.
_EQUAL = 1e-9

# Comparisons against the published region bounds allow for rounding in P.
_TOL = 1e-9

# Sampled betweenness never uses fewer sources than this by default: 1,000 sources cost
# about 50 CPU seconds (25 s on two threads) on 100k nodes / 1M ties, where the largest
# standard error is then 0.004 against a largest value of 0.033 (see `betweenness`).
_MIN_SAMPLES = 1000
_MAX_BATCHES = 10


# --------------------------------------------------------------------------- inputs


@dataclass(frozen=True)
class _Ties:
    """The graph's ties as index arrays (self-loops removed)."""

    nodes: list[Hashable]
    src: np.ndarray  # int64
    dst: np.ndarray  # int64
    w: np.ndarray  # float64, positive
    directed: bool

    @property
    def n(self) -> int:
        return len(self.nodes)


def _ties(G: nx.Graph, weight: str | None) -> _Ties:
    if G.is_multigraph():
        raise InputError(
            "the network has parallel ties between the same pair of nodes; merge them "
            "into one tie (summing their weights) before computing role measures."
        )
    nodes = list(G)
    index = {v: i for i, v in enumerate(nodes)}
    src: list[int] = []
    dst: list[int] = []
    wts: list[object] = []
    if weight is None:
        for u, v in G.edges():
            if u != v:
                src.append(index[u])
                dst.append(index[v])
        w = np.ones(len(src), dtype=np.float64)
    else:
        for u, v, x in G.edges(data=weight, default=1.0):
            if u != v:
                src.append(index[u])
                dst.append(index[v])
                wts.append(x)
        try:
            w = np.asarray(wts, dtype=np.float64)
        except (TypeError, ValueError):
            bad = next(x for x in wts if not isinstance(x, numbers.Real))
            raise InputError(
                f"tie weights must be positive numbers; found {bad!r} in the "
                f"'{weight}' attribute. Fix or remove that weight."
            ) from None
        if w.size and not (np.all(np.isfinite(w)) and float(w.min()) > 0.0):
            i = int(np.flatnonzero(~(np.isfinite(w) & (w > 0)))[0])
            raise InputError(
                f"tie weights must be positive numbers (bigger = closer tie); the tie "
                f"{nodes[src[i]]!r} - {nodes[dst[i]]!r} has weight {wts[i]!r}. "
                "Give it a positive weight or remove the tie."
            )
    return _Ties(
        nodes=nodes,
        src=np.asarray(src, dtype=np.int64),
        dst=np.asarray(dst, dtype=np.int64),
        w=w,
        directed=G.is_directed(),
    )


def _codes(ties: _Ties, community: Mapping[Any, Hashable]) -> np.ndarray:
    missing = [v for v in ties.nodes if v not in community]
    if missing:
        raise InputError(
            f"{len(missing)} node(s) have no community label (the first is "
            f"{missing[0]!r}); give every node of the network a community."
        )
    label_code: dict[Hashable, int] = {}
    return np.fromiter(
        (label_code.setdefault(community[v], len(label_code)) for v in ties.nodes),
        dtype=np.int64,
        count=ties.n,
    )


def _symmetric(ties: _Ties) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """CSR arrays (indptr, indices, data) of ``W + W.T``, indices sorted in each row.

    Each tie counts for both of its ends, whatever its direction; a reciprocated
    directed pair sums into one entry per row.
    """
    rows = np.concatenate([ties.src, ties.dst])
    cols = np.concatenate([ties.dst, ties.src])
    vals = np.concatenate([ties.w, ties.w])
    order = np.lexsort((cols, rows))
    rows, cols, vals = rows[order], cols[order], vals[order]
    if rows.size:
        first = np.ones(rows.size, dtype=bool)
        first[1:] = (rows[1:] != rows[:-1]) | (cols[1:] != cols[:-1])
        starts = np.flatnonzero(first)
        rows, cols, vals = rows[starts], cols[starts], np.add.reduceat(vals, starts)
    indptr = np.zeros(ties.n + 1, dtype=np.int64)
    np.cumsum(np.bincount(rows, minlength=ties.n), out=indptr[1:])
    return indptr, cols.astype(np.int64), vals


def _by_community(ties: _Ties, codes: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Tie weight between each node and each community it touches.

    Returns ``(node, community, weight)`` arrays, one entry per touched pair, built from
    ``W + W.T`` (for a directed graph: total degree, in + out).
    """
    rows = np.concatenate([ties.src, ties.dst])
    comm = np.concatenate([codes[ties.dst], codes[ties.src]])
    vals = np.concatenate([ties.w, ties.w])
    n_comm = int(codes.max()) + 1 if codes.size else 1
    pair, inverse = np.unique(rows * n_comm + comm, return_inverse=True)
    total = np.bincount(inverse.ravel(), weights=vals, minlength=pair.size)
    return pair // n_comm, pair % n_comm, total


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
    z, P = float(z), float(P)
    if not (math.isfinite(z) and math.isfinite(P)):
        raise ValueError(f"role_region needs finite z and P; got z={z!r}, P={P!r}.")
    if z >= HUB_Z - _TOL:
        if P <= 0.30 + _TOL:
            return "R5"
        if P <= 0.75 + _TOL:
            return "R6"
        return "R7"
    if P <= 0.05 + _TOL:
        return "R1"
    if P <= 0.62 + _TOL:
        return "R2"
    if P <= 0.80 + _TOL:
        return "R3"
    return "R4"


# ---------------------------------------------------------------------- betweenness


@dataclass(frozen=True)
class BetweennessInfo:
    """How :func:`betweenness` computed its values.

    Attributes
    ----------
    method : str
        ``"exact"`` (every node a source) or ``"sampled"`` (random sources).
    nodes : int
        Node count of the graph.
    k : int
        Number of source nodes used (``nodes`` when exact).
    batches : int
        Independent batches the sources were drawn in (1 when exact).
    expected_error : float
        Sampled: the largest, over nodes, standard error of the estimate, in the same
        (normalised) units as betweenness, from the spread of the batch estimates
        (standard error of a mean of independent batches). 0 when exact.
    error_bound : float
        Sampled: distribution-free 95% half-width for any one node from Hoeffding's
        inequality, ``sqrt(ln(2 / 0.05) / (2 k))`` (each source contributes a value in
        [0, 1] to the normalised mean; Brandes & Pich 2007). 0 when exact.
    error_basis : str
        One sentence saying how the two error figures were derived.
    weighted : bool
        Whether shortest paths used distance = 1 / weight.
    exact_limit : int
        The node count up to which betweenness is exact.
    seed : int
        Seed of the source sample.
    """

    method: str
    nodes: int
    k: int
    batches: int
    expected_error: float
    error_bound: float
    error_basis: str
    weighted: bool
    exact_limit: int
    seed: int


def _default_samples(n: int, exact_limit: int) -> int:
    # k * (n + m) = exact_limit**2 * (1 + m / n) at equal density: the sample costs about
    # what an exact run at the limit costs, and k = n just above the limit, so the cost
    # does not jump there (see the `samples` parameter for measurements).
    return min(n, max(_MIN_SAMPLES, math.ceil(exact_limit**2 / max(n, 1))))


# Paths whose lengths differ by less than this share of the shortest length count as
# equally short: 1/2 + 1/3 + 1/6 (0.9999999999999999 in floating point) and 1/2 + 1/2
# are then one length, as in exact arithmetic.
# Rounding of a sum of h floats is below h * 1.1e-16 relative, so 1e-12 absorbs it for
# paths up to thousands of steps, far below any difference real tie data can make.
_PATH_TOL = 1e-12

# Sources are summed in this many chunks per batch (fewer when there are fewer sources):
# each chunk is summed by one thread in source order, then chunks are added in order, so
# the result is the same for any thread count.
_CHUNKS = 32


@numba.njit(cache=True, inline="always")
def _heap_up(key, node, where, i):  # pragma: no cover - compiled
    k = key[i]
    v = node[i]
    while i > 0:
        parent = (i - 1) >> 1
        if key[parent] <= k:
            break
        key[i] = key[parent]
        node[i] = node[parent]
        where[node[i]] = i
        i = parent
    key[i] = k
    node[i] = v
    where[v] = i


@numba.njit(cache=True, inline="always")
def _heap_down(key, node, where, size, i):  # pragma: no cover - compiled
    k = key[i]
    v = node[i]
    while True:
        child = 2 * i + 1
        if child >= size:
            break
        if child + 1 < size and key[child + 1] < key[child]:
            child += 1
        if key[child] >= k:
            break
        key[i] = key[child]
        node[i] = node[child]
        where[node[i]] = i
        i = child
    key[i] = k
    node[i] = v
    where[v] = i


@numba.njit(cache=True)
def _bfs_source(
    s,
    indptr,
    indices,
    rindptr,
    rindices,
    symmetric,
    level,
    sigma,
    delta,
    order,
    pred,
    pred_ptr,
    acc,
):  # pragma: no cover - compiled
    """Brandes' accumulation from source ``s`` counting steps; adds into ``acc``.

    Breadth-first; when a node leaves the queue, its predecessors are its in-neighbours
    one step nearer the source. ``level`` is -1, ``sigma`` and ``delta`` 0 everywhere on
    entry and again on exit.
    """
    level[s] = 0
    order[0] = s
    seen = 1
    n_pred = 0
    head = 0
    while head < seen:
        v = order[head]
        pred_ptr[head] = n_pred
        head += 1
        up = level[v] - 1
        nxt = level[v] + 1
        sv = 1.0 if v == s else 0.0
        if not symmetric:
            for e in range(rindptr[v], rindptr[v + 1]):
                u = rindices[e]
                if level[u] == up:
                    sv += sigma[u]
                    pred[n_pred] = u
                    n_pred += 1
        for e in range(indptr[v], indptr[v + 1]):
            w = indices[e]
            if level[w] < 0:
                level[w] = nxt
                order[seen] = w
                seen += 1
            elif symmetric and level[w] == up:
                sv += sigma[w]
                pred[n_pred] = w
                n_pred += 1
        sigma[v] = sv
    pred_ptr[seen] = n_pred
    for i in range(seen - 1, 0, -1):
        w = order[i]
        coeff = (1.0 + delta[w]) / sigma[w]
        for p in range(pred_ptr[i], pred_ptr[i + 1]):
            u = pred[p]
            delta[u] += sigma[u] * coeff
        acc[w] += delta[w]
    for i in range(seen):
        w = order[i]
        level[w] = -1
        sigma[w] = 0.0
        delta[w] = 0.0


@numba.njit(cache=True)
def _dijkstra_source(
    s,
    indptr,
    indices,
    length,
    rindptr,
    rindices,
    rlength,
    symmetric,
    tol,
    dist,
    state,
    sigma,
    delta,
    order,
    pred,
    pred_ptr,
    hkey,
    hnode,
    where,
    acc,
):  # pragma: no cover - compiled
    """Brandes' accumulation from source ``s`` along lengths; adds into ``acc``.

    Dijkstra with an indexed binary heap. When a node is settled its distance is final,
    and its predecessors are the settled in-neighbours ``u`` with
    ``dist[u] + l(u, v) <= dist[v] * (1 + tol)``. On entry and exit ``dist`` is inf,
    ``state`` 0 (1 = in the heap, 2 = settled), ``sigma`` and ``delta`` 0.
    """
    dist[s] = 0.0
    state[s] = 1
    hkey[0] = 0.0
    hnode[0] = s
    where[s] = 0
    size = 1
    settled = 0
    n_pred = 0
    while size > 0:
        v = hnode[0]
        dv = hkey[0]
        size -= 1
        if size > 0:
            hkey[0] = hkey[size]
            hnode[0] = hnode[size]
            where[hnode[0]] = 0
            _heap_down(hkey, hnode, where, size, 0)
        state[v] = 2
        order[settled] = v
        pred_ptr[settled] = n_pred
        settled += 1
        limit = dv + tol * dv
        sv = 1.0 if v == s else 0.0
        if not symmetric:
            for e in range(rindptr[v], rindptr[v + 1]):
                u = rindices[e]
                if state[u] == 2 and dist[u] + rlength[e] <= limit:
                    sv += sigma[u]
                    pred[n_pred] = u
                    n_pred += 1
        for e in range(indptr[v], indptr[v + 1]):
            w = indices[e]
            if state[w] == 2:
                # Undirected: a settled neighbour is a predecessor if the tie is tight.
                if symmetric and dist[w] + length[e] <= limit:
                    sv += sigma[w]
                    pred[n_pred] = w
                    n_pred += 1
                continue
            d = dv + length[e]
            if d < dist[w]:
                dist[w] = d
                if state[w] == 0:
                    state[w] = 1
                    hkey[size] = d
                    hnode[size] = w
                    size += 1
                    _heap_up(hkey, hnode, where, size - 1)
                else:
                    hkey[where[w]] = d
                    _heap_up(hkey, hnode, where, where[w])
        sigma[v] = sv
    pred_ptr[settled] = n_pred
    for i in range(settled - 1, 0, -1):
        w = order[i]
        coeff = (1.0 + delta[w]) / sigma[w]
        for p in range(pred_ptr[i], pred_ptr[i + 1]):
            u = pred[p]
            delta[u] += sigma[u] * coeff
        acc[w] += delta[w]
    for i in range(settled):
        w = order[i]
        dist[w] = np.inf
        state[w] = 0
        sigma[w] = 0.0
        delta[w] = 0.0


@numba.njit(cache=True, parallel=True)
def _brandes(
    indptr,
    indices,
    length,
    rindptr,
    rindices,
    rlength,
    weighted,
    symmetric,
    tol,
    sources,
    chunk_ptr,
):  # pragma: no cover - compiled
    """Per-chunk sums of Brandes' dependencies ``delta_s(v)`` over the given sources.

    Row ``c`` of the result sums the sources ``sources[chunk_ptr[c]:chunk_ptr[c + 1]]``
    in that order; chunks run in parallel, each on one thread.
    """
    n = indptr.shape[0] - 1
    n_chunks = chunk_ptr.shape[0] - 1
    acc = np.zeros((n_chunks, n))
    for c in numba.prange(n_chunks):
        sigma = np.zeros(n)
        delta = np.zeros(n)
        order = np.empty(n, np.int32)
        pred = np.empty(rindices.shape[0], np.int32)
        pred_ptr = np.empty(n + 1, np.int64)
        if weighted:
            dist = np.full(n, np.inf)
            state = np.zeros(n, np.int8)
            hkey = np.empty(n)
            hnode = np.empty(n, np.int32)
            where = np.empty(n, np.int32)
            for j in range(chunk_ptr[c], chunk_ptr[c + 1]):
                _dijkstra_source(
                    sources[j],
                    indptr,
                    indices,
                    length,
                    rindptr,
                    rindices,
                    rlength,
                    symmetric,
                    tol,
                    dist,
                    state,
                    sigma,
                    delta,
                    order,
                    pred,
                    pred_ptr,
                    hkey,
                    hnode,
                    where,
                    acc[c],
                )
        else:
            level = np.full(n, -1, np.int32)
            for j in range(chunk_ptr[c], chunk_ptr[c + 1]):
                _bfs_source(
                    sources[j],
                    indptr,
                    indices,
                    rindptr,
                    rindices,
                    symmetric,
                    level,
                    sigma,
                    delta,
                    order,
                    pred,
                    pred_ptr,
                    acc[c],
                )
    return acc


def _adjacency(ties: _Ties, weighted: bool) -> tuple[np.ndarray, ...]:
    """Out- and in-neighbour CSR arrays with lengths 1 / weight (rows sorted).

    Returns ``(indptr, indices, length, rindptr, rindices, rlength)``; undirected ties
    appear in both rows, and the in-neighbour arrays are then the same arrays.
    """
    n = ties.n
    if ties.directed:
        src, dst, w = ties.src, ties.dst, ties.w
    else:
        src = np.concatenate([ties.src, ties.dst])
        dst = np.concatenate([ties.dst, ties.src])
        w = np.concatenate([ties.w, ties.w])
    # Same float as networkx's weight function 1.0 / weight, so lengths agree bit for bit.
    length = 1.0 / w if weighted else np.ones(0)

    def rows(a: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        order = np.lexsort((b, a))
        indptr = np.zeros(n + 1, dtype=np.int64)
        np.cumsum(np.bincount(a, minlength=n), out=indptr[1:])
        return indptr, b[order].astype(np.int32), length[order] if weighted else length

    out = rows(src, dst)
    back = rows(dst, src) if ties.directed else out
    return (*out, *back)


def _chunks(sizes: list[int]) -> np.ndarray:
    """Chunk boundaries over consecutive batches of sources, no chunk across batches."""
    per_batch = max(1, math.ceil(_CHUNKS / max(len(sizes), 1)))
    bounds = [0]
    start = 0
    for size in sizes:
        c = max(1, min(size, per_batch))
        bounds.extend(start + (size * (i + 1)) // c for i in range(c))
        start += size
    return np.asarray(bounds, dtype=np.int64)


def _estimates(
    adjacency: tuple[np.ndarray, ...], weighted: bool, drawn: list[np.ndarray]
) -> np.ndarray:
    """Normalised betweenness from each batch of sources, shape (batches, n).

    Scaled as networkx 3.6 scales ``k`` sources (``normalized=True``): a node that is
    itself a source is averaged over the other ``k - 1`` sources, any other node over
    all ``k``, both per ordered pair ``(s, t)`` with ``t`` not ``v`` (``n - 2``
    targets). Each is unbiased given whether the node was drawn; with ``k = n`` this
    is the exact ``1 / ((n - 1)(n - 2))``.
    """
    indptr, indices, length, rindptr, rindices, rlength = adjacency
    n = indptr.shape[0] - 1
    est = np.zeros((len(drawn), n))
    if n < 3:
        return est  # no pair (s, t) with a third node between: all zero, as networkx
    sizes = [len(d) for d in drawn]
    bounds = _chunks(sizes)
    sources = np.concatenate(drawn).astype(np.int32)
    symmetric = indptr is rindptr  # undirected: in-neighbours are the same arrays
    acc = _brandes(
        indptr,
        indices,
        length,
        rindptr,
        rindices,
        rlength,
        weighted,
        symmetric,
        _PATH_TOL,
        sources,
        bounds,
    )
    end = 0
    for b, (size, src) in enumerate(zip(sizes, drawn, strict=True)):
        end += size
        rows = (bounds[1:] > end - size) & (bounds[1:] <= end)
        est[b] = acc[rows].sum(axis=0)  # chunks in order: the same sum for any thread count
        est[b] /= size * (n - 2)
        est[b, src] *= size / (size - 1)
    return est


def _betweenness(
    ties: _Ties, *, exact_limit: int, seed: int, samples: int | None
) -> tuple[np.ndarray, BetweennessInfo]:
    n = ties.n
    weighted = bool(ties.w.size) and not bool(np.all(ties.w == ties.w[0]))
    k = n if samples is None and n <= exact_limit else samples
    if k is None:
        k = _default_samples(n, exact_limit)
    if k < n and k < 2:
        raise ValueError(f"betweenness needs at least 2 sampled sources; got samples={k}.")
    adjacency = _adjacency(ties, weighted)
    if k >= n:
        values = _estimates(adjacency, weighted, [np.arange(n)])[0]
        return values, BetweennessInfo(
            method="exact",
            nodes=n,
            k=n,
            batches=1,
            expected_error=0.0,
            error_bound=0.0,
            error_basis="exact: every node was a source.",
            weighted=weighted,
            exact_limit=exact_limit,
            seed=seed,
        )
    batches = max(2, min(_MAX_BATCHES, k // 5))
    sizes = [k // batches + (1 if b < k % batches else 0) for b in range(batches)]
    rng = np.random.default_rng(seed)
    # Each batch draws its sources independently (distinct within the batch).
    est = _estimates(adjacency, weighted, [rng.choice(n, size=s, replace=False) for s in sizes])
    # Batches of unequal size: weight each batch estimate by its sources.
    wts = np.asarray(sizes, dtype=np.float64) / k
    mean = wts @ est
    se = np.sqrt(((est - mean) ** 2).T @ (wts**2) * batches / (batches - 1))
    bound = math.sqrt(math.log(2 / 0.05) / (2 * k))
    info = BetweennessInfo(
        method="sampled",
        nodes=n,
        k=k,
        batches=batches,
        expected_error=float(se.max()) if n else 0.0,
        error_bound=bound,
        error_basis=(
            f"{k} random sources in {batches} independent batches; expected_error is the "
            "largest per-node standard error of the mean of the batch estimates; "
            "error_bound is Hoeffding's 95% half-width for one node, sqrt(ln(40)/(2k))."
        ),
        weighted=weighted,
        exact_limit=exact_limit,
        seed=seed,
    )
    return mean, info


def betweenness(
    G: nx.Graph,
    *,
    exact_limit: int,
    seed: int,
    samples: int | None = None,
    weight: str | None = "weight",
) -> tuple[dict[Hashable, float], BetweennessInfo]:
    """Shortest-path betweenness of every node, normalised as networkx normalises it.

    ``b(v) = sum_{s != v != t} sigma_st(v) / sigma_st``, divided by ``(n-1)(n-2)`` for
    both directed and undirected graphs (networkx's ``normalized=True``) [1]_, computed
    with Brandes' algorithm [2]_ in compiled code: a breadth-first search per source when
    steps are counted, Dijkstra's algorithm with a binary heap when ties have lengths.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network. Self-loops are ignored (they lie on no shortest path).
    exact_limit : int
        Exact for graphs of at most this many nodes (see :data:`EXACT_LIMIT` for the
        measured cost); larger graphs use sampled sources.
    seed : int
        Seed of the source sample (unused when exact).
    samples : int, optional
        Number of source nodes when sampling. Default: ``exact_limit**2 / n``, at least
        1,000 and at most ``n``: ``k`` sources cost about ``k (n + m)``, which is then the
        cost of an exact run on ``exact_limit`` nodes of the same density; graphs of
        fewer than 1,000 nodes are therefore always exact. Measured
        (benchmarks/bench_measures.py, preferential attachment, weights 1-5, two numba
        threads on the project's shared 2-core machine, CPU seconds of both threads):
        20,000 nodes / 200k ties, 1,250 sources, 7.5 s (3.9 s wall clock; 6 ms a
        source, the exact run takes 106 s); 100,000 nodes / 1M ties, 1,000 sources,
        49 s (25 s wall clock), largest standard error 0.0039 against a largest value
        of 0.033 (250 sources: 0.0066). Counting steps costs 40% of that. Against the
        exact values, over three seeds: at 20,000 nodes the largest error was 1.1 - 1.5
        times ``expected_error``, the top tenth of nodes by betweenness was 75 - 78%
        the same, and the top hundredth had a median relative error of 10%; at 10,000
        nodes (2,500 sources) 0.9 - 1.5 times, 85% and 6 - 7%. Nodes with little
        betweenness are estimated with a large relative error.
    weight : str or None, default "weight"
        Tie strengths: shortest paths use **distance = 1 / weight** (a strong tie is a
        short step, as in Newman 2001 [3]_). When all weights are equal (or ``None``)
        paths are counted in steps (breadth-first search), which gives the same answer
        without floating-point ties.

    Returns
    -------
    values : dict
        Node -> normalised betweenness.
    info : BetweennessInfo
        Method, sample size and expected error.

    Raises
    ------
    InputError
        A weight is not a positive number.
    ValueError
        ``samples`` is below 2 (and below the node count).

    Notes
    -----
    Equal lengths: two paths count as equally short when their lengths differ by less
    than 1e-12 of the length, so that 1/2 + 1/3 + 1/6 equals 1/2 + 1/2 as it does in
    exact arithmetic. networkx compares floating-point sums exactly, so where rounding
    splits such a tie the two disagree (on Zachary's karate club with its weights, by up
    to 0.0019); the tests check the values against networkx run on exact fractions
    (:class:`fractions.Fraction` distances), and against networkx on floats where no
    rounding tie arises. Counting steps, results agree with networkx to rounding.

    Sampling draws ``k`` sources in independent batches (up to 10, sources distinct
    within a batch) and scales each batch as networkx 3.6 scales ``k`` sources: a node
    that was itself drawn is averaged over the other ``k - 1`` sources, any other node
    over all ``k``, so each batch estimate is unbiased [4]_. The estimate is the mean of
    the batch estimates, and their spread gives ``info.expected_error``.

    Threads: sources are split into fixed chunks (32 per call, by source count only),
    each summed in order by one of numba's threads, and the chunks are then added in
    order, so the values are the same for any thread count.

    References
    ----------
    .. [1] L. C. Freeman, "A set of measures of centrality based on betweenness",
       Sociometry 40:35-41, 1977.
    .. [2] U. Brandes, "A faster algorithm for betweenness centrality", Journal of
       Mathematical Sociology 25:163-177, 2001.
    .. [3] M. E. J. Newman, "Scientific collaboration networks. II.", Physical Review E
       64:016132, 2001.
    .. [4] U. Brandes and C. Pich, "Centrality estimation in large networks",
       International Journal of Bifurcation and Chaos 17:2303-2318, 2007.

    Examples
    --------
    >>> import networkx as nx
    >>> values, info = betweenness(nx.path_graph(3), exact_limit=100, seed=0)
    >>> values, info.method
    ({0: 0.0, 1: 1.0, 2: 0.0}, 'exact')
    """
    ties = _ties(G, weight)
    values, info = _betweenness(ties, exact_limit=exact_limit, seed=seed, samples=samples)
    return dict(zip(ties.nodes, values.tolist(), strict=True)), info


# ----------------------------------------------------------------- structural holes


@numba.njit(cache=True)
def _burt_kernel(indptr, indices, a, rowsum, rowmax):  # pragma: no cover - compiled
    """Constraint and effective size from symmetric mutual weights ``a`` (CSR, sorted).

    For each tie (i, j) the indirect terms sum over q in N(i) & N(j); the loop walks the
    shorter of the two neighbour lists (looking up the other by marker or binary
    search), so the cost is sum over ties of min(deg i, deg j) (times a log).
    """
    n = indptr.shape[0] - 1
    constraint = np.full(n, np.nan)
    esize = np.full(n, np.nan)
    stamp = np.full(n, -1, np.int64)
    p_i = np.zeros(n)
    for i in range(n):
        lo, hi = indptr[i], indptr[i + 1]
        if lo == hi:
            continue
        for t in range(lo, hi):
            stamp[indices[t]] = i
            p_i[indices[t]] = a[t] / rowsum[i]
        c = 0.0
        e = 0.0
        for t in range(lo, hi):
            j = indices[t]
            jlo, jhi = indptr[j], indptr[j + 1]
            s1 = 0.0  # sum_q p_iq p_qj
            s2 = 0.0  # sum_q p_iq a_jq
            if jhi - jlo <= hi - lo:
                for u in range(jlo, jhi):
                    q = indices[u]
                    if stamp[q] == i:
                        s1 += p_i[q] * a[u] / rowsum[q]
                        s2 += p_i[q] * a[u]
            else:
                for u in range(lo, hi):
                    q = indices[u]
                    pos = jlo + np.searchsorted(indices[jlo:jhi], q)
                    if pos < jhi and indices[pos] == q:
                        s1 += p_i[q] * a[pos] / rowsum[q]
                        s2 += p_i[q] * a[pos]
            c += (a[t] / rowsum[i] + s1) ** 2
            e += 1.0 - s2 / rowmax[j]
        constraint[i] = c
        esize[i] = e
    return constraint, esize


def _structural_holes(ties: _Ties) -> tuple[np.ndarray, np.ndarray]:
    n = ties.n
    if n == 0:
        return np.zeros(0), np.zeros(0)
    # Mutual weight a_ij = w_ij + w_ji (Burt 1992; networkx's mutual_weight). For an
    # undirected graph each tie is stored once, so W + W.T is the symmetric matrix.
    indptr, indices, a = _symmetric(ties)
    deg = np.diff(indptr)
    has = deg > 0
    rowsum = np.zeros(n)
    rowmax = np.zeros(n)
    if a.size:
        rowsum[has] = np.add.reduceat(a, indptr[:-1][has])
        rowmax[has] = np.maximum.reduceat(a, indptr[:-1][has])
    return _burt_kernel(indptr, indices, a, rowsum, rowmax)


def structural_holes(
    G: nx.Graph, *, weight: str | None = "weight"
) -> tuple[dict[Hashable, float], dict[Hashable, float]]:
    """Burt's constraint and effective size of every node.

    With ``a_ij = w_ij + w_ji`` (mutual tie weight), ``p_ij = a_ij / sum_k a_ik`` and
    ``m_jq = a_jq / max_k a_jk``, over the neighbours N(i) (in and out) [1]_:

    - constraint ``c_i = sum_{j in N(i)} (p_ij + sum_{q} p_iq p_qj) ** 2``;
    - effective size ``e_i = sum_{j in N(i)} (1 - sum_{q} p_iq m_jq)``,

    where q runs over the neighbours of i other than j. These are the formulas of
    :func:`networkx.constraint` and :func:`networkx.effective_size` (Borgatti's
    simplification ``n - 2t/n`` for unweighted undirected ties [2]_ is the same number),
    and the tests check the values against networkx.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network; directed ties are read as ties in either direction, as networkx
        does. Self-loops are ignored.
    weight : str or None, default "weight"
        Edge attribute holding tie strength (missing = 1); ``None`` counts ties.

    Returns
    -------
    constraint : dict
        Node -> constraint; NaN for nodes without ties (undefined).
    effective_size : dict
        Node -> effective size; NaN for nodes without ties.

    Raises
    ------
    InputError
        A weight is not a positive number.

    Notes
    -----
    Scaling: networkx builds the product of the adjacency matrix with itself (memory
    grows with the sum of squared degrees) and, for effective size, a dense n x n array
    (800 MB at 10,000 nodes). Here the same sums run only over ties, in a compiled loop
    that walks the shorter neighbour list of each tie: memory O(ties), time
    O(sum over ties of min(deg i, deg j)) - nothing is capped or left out.

    References
    ----------
    .. [1] R. S. Burt, *Structural Holes: The Social Structure of Competition*, Harvard
       University Press, 1992.
    .. [2] S. P. Borgatti, "Structural holes: unpacking Burt's redundancy measures",
       Connections 20(1):35-38, 1997.

    Examples
    --------
    >>> import networkx as nx
    >>> c, e = structural_holes(nx.star_graph(2))
    >>> c[0], e[0]
    (0.5, 2.0)
    """
    ties = _ties(G, weight)
    c, e = _structural_holes(ties)
    return dict(zip(ties.nodes, c.tolist(), strict=True)), dict(
        zip(ties.nodes, e.tolist(), strict=True)
    )


# ----------------------------------------------------------------------- dependents


class _Origin:
    """The virtual supplier of every source; a private object no graph can contain."""

    def __repr__(self) -> str:
        return "<origin>"


def _origins(G: nx.DiGraph) -> list[Hashable]:
    """Nodes the virtual origin feeds: sources, and every node of a sourceless cycle."""
    sources = [v for v, d in G.in_degree() if d == 0]
    reached: set[Hashable] = set(sources)
    frontier = list(sources)
    while frontier:
        v = frontier.pop()
        for w in G.succ[v]:
            if w not in reached:
                reached.add(w)
                frontier.append(w)
    if len(reached) == len(G):
        return sources
    # Unreached nodes lie in or below strongly connected groups that no outside node
    # supplies; the members of those top groups are treated as sources.
    rest = G.subgraph(v for v in G if v not in reached)
    cond = nx.condensation(rest)
    tops = [c for c, d in cond.in_degree() if d == 0]
    return sources + [v for c in tops for v in cond.nodes[c]["members"]]


def _dependents_directed(G: nx.DiGraph) -> dict[Hashable, int]:
    origin = _Origin()
    D = nx.DiGraph()
    D.add_node(origin)
    D.add_nodes_from(G)
    D.add_edges_from((u, v) for u, v in G.edges() if u != v)
    D.add_edges_from((origin, v) for v in _origins(G))
    idom = nx.immediate_dominators(D, origin)
    children: dict[Hashable, list[Hashable]] = {v: [] for v in D}
    for v, d in idom.items():
        if v is not origin and d is not None:
            children[d].append(v)
    order: list[Hashable] = [origin]
    for v in order:  # breadth-first listing of the dominator tree
        order.extend(children[v])
    size = dict.fromkeys(D, 1)
    for v in reversed(order):
        d = idom.get(v)
        if v is not origin and d is not None:
            size[d] += size[v]
    return {v: size[v] - 1 for v in G}


def _dependents_undirected(G: nx.Graph) -> dict[Hashable, int]:
    # Iterative Hopcroft-Tarjan depth-first search with subtree sizes. Removing v splits
    # its component into the subtrees of the children c with low[c] >= disc[v] and,
    # unless v is the root, the rest (the part holding v's parent).
    disc: dict[Hashable, int] = {}
    low: dict[Hashable, int] = {}
    size: dict[Hashable, int] = {}
    cut_sum: dict[Hashable, int] = {}
    cut_max: dict[Hashable, int] = {}
    result = dict.fromkeys(G, 0)
    adj = G.adj
    clock = 0
    for root in G:
        if root in disc:
            continue
        disc[root] = low[root] = clock
        clock += 1
        members = [root]
        stack = [(root, None, iter(adj[root]))]
        while stack:
            v, parent, it = stack[-1]
            for w in it:
                if w == v:
                    continue
                if w not in disc:
                    disc[w] = low[w] = clock
                    clock += 1
                    members.append(w)
                    stack.append((w, v, iter(adj[w])))
                    break
                if w != parent and disc[w] < low[v]:
                    low[v] = disc[w]
            else:
                stack.pop()
                s = size[v] = size.get(v, 0) + 1
                if parent is not None:
                    size[parent] = size.get(parent, 0) + s
                    if low[v] < low[parent]:
                        low[parent] = low[v]
                    if low[v] >= disc[parent]:
                        cut_sum[parent] = cut_sum.get(parent, 0) + s
                        if s > cut_max.get(parent, 0):
                            cut_max[parent] = s
        total = size[root]
        for v in members:
            if v not in cut_sum:
                continue
            rest = 0 if v == root else total - 1 - cut_sum[v]
            result[v] = total - 1 - max(rest, cut_max[v])
    return result


def dependents(G: nx.Graph) -> dict[Hashable, int]:
    """How many other nodes depend on each node as a single point of failure.

    Directed graphs (ties point from supplier to customer): the number of nodes that
    lose every supply path from every source if the node fails - the nodes it
    dominates in the dominator tree rooted at a virtual origin that feeds every source
    (a node with no suppliers) [1]_ [2]_ [4]_.

    Undirected graphs: the number of other nodes of its connected component that end
    up outside the largest remaining piece of the component when it is removed: 0 for
    nodes that are not cut vertices [3]_.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network. Self-loops are ignored; weights play no part.

    Returns
    -------
    dict
        Node -> number of dependents (a whole number >= 0).

    Notes
    -----
    Nodes that no source reaches: a group of nodes that supply one another in a cycle
    with no outside supplier has no source above it. Each member of such a top group
    (a strongly connected component that nothing outside supplies) is fed by the
    virtual origin as if it were a source, so those nodes, and the nodes below them,
    get dependents like everyone else and nobody counts as their single point of
    failure within their own cycle. When every node is reachable from a node with no
    suppliers, this changes nothing.

    Cost: O(V + E) for undirected graphs (one depth-first search, no node removed);
    directed graphs use networkx's ``immediate_dominators`` (Cooper, Harvey & Kennedy
    2006), near-linear in practice.

    References
    ----------
    .. [1] T. Lengauer and R. E. Tarjan, "A fast algorithm for finding dominators in a
       flowgraph", ACM TOPLAS 1:121-141, 1979.
    .. [2] K. D. Cooper, T. J. Harvey and K. Kennedy, "A simple, fast dominance
       algorithm", Software Practice & Experience 4:1-10, 2001 (tech. report 2006).
    .. [3] J. Hopcroft and R. Tarjan, "Algorithm 447: efficient algorithms for graph
       manipulation", Communications of the ACM 16:372-378, 1973.
    .. [4] S. Allesina and A. Bodini, "Who dominates whom in the ecosystem? Energy flow
       bottlenecks and cascading extinctions", Journal of Theoretical Biology
       230:351-358, 2004.

    Examples
    --------
    >>> import networkx as nx
    >>> dependents(nx.DiGraph([("a", "b"), ("b", "c"), ("b", "d")]))
    {'a': 3, 'b': 2, 'c': 0, 'd': 0}
    >>> dependents(nx.path_graph(5))
    {0: 0, 1: 1, 2: 2, 3: 1, 4: 0}
    """
    if G.is_multigraph():
        raise InputError(
            "the network has parallel ties between the same pair of nodes; merge them "
            "into one tie before computing dependents."
        )
    if G.is_directed():
        return _dependents_directed(G)
    return _dependents_undirected(G)


# ----------------------------------------------------------------------- role table

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

    Returns
    -------
    pandas.DataFrame
        Indexed by node (graph order), columns ``betweenness, participation,
        within_z, constraint, effective_size, dependents, region, role``.
        ``table.attrs["betweenness"]`` holds the :class:`BetweennessInfo`.

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
    ties = _ties(G, weight)
    codes = _codes(ties, community)
    P = _participation(ties, codes)
    z = _within_z(ties, codes)
    b, info = _betweenness(ties, exact_limit=exact_limit, seed=seed, samples=None)
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

    Examples
    --------
    >>> high_betweenness({"a": 0.5, "b": 0.5, "c": 0.1, "d": 0.0}, share=0.25)
    {'a': True, 'b': True, 'c': False, 'd': False}
    """
    nodes = list(betweenness)
    b = np.fromiter((float(betweenness[v]) for v in nodes), dtype=np.float64, count=len(nodes))
    return dict(zip(nodes, _high(b, share).tolist(), strict=True))


def _ranked(table: pd.DataFrame, roles: tuple[str, ...], keys: list[str], top: int | None):
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
    """
    return _ranked(table, _BRIDGE_ROLES, ["betweenness", "participation"], top)


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
    """
    return _ranked(table, _HUB_ROLES, ["within_z", "betweenness"], top)


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

    References
    ----------
    .. [1] L. C. Freeman, "A set of measures of centrality based on betweenness",
       Sociometry 40:35-41, 1977.
    """
    b = table["betweenness"].to_numpy(dtype=np.float64)
    picked = table[_high(b, share)]
    order = picked.sort_values("betweenness", ascending=False, kind="mergesort")
    return list(order.index)
