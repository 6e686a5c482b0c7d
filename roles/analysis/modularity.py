"""Modularity of a partition, and the Louvain partition as a reference, on CSR arrays.

Modularity (Newman & Girvan 2004; weighted form, Newman 2004) of a partition of an
undirected network with tie weights :math:`A_{ij}` and strengths
:math:`k_i = \\sum_j A_{ij}`, :math:`2m = \\sum_i k_i`:

.. math:: Q = \\frac{1}{2m} \\sum_{ij} \\Big[A_{ij} - \\gamma \\frac{k_i k_j}{2m}\\Big]
          \\delta(c_i, c_j)

The Louvain method (Blondel, Guillaume, Lambiotte & Lefebvre 2008) climbs it: move
single nodes to the neighbouring community with the largest gain until no move helps,
merge each community into one node, repeat until a level gains no more than a small
threshold. Compiled with numba; it follows the same steps as networkx's
``louvain_communities`` (one random node order per level, passes until no node moves,
stop when a level gains at most ``threshold``), and measures the same modularity as
``networkx.community.modularity``, but runs in seconds on a million ties where the
pure-Python version takes about a minute (``benchmarks/bench_modularity.py``).

Directed networks are read as undirected here (as the walks read them when they go
both ways): pass :func:`roles.embedding.graph.to_csr` of ``graph.to_undirected(as_view=True)``.

References
----------
.. [1] M. E. J. Newman and M. Girvan, "Finding and evaluating community structure in
   networks", Physical Review E 69, 026113, 2004. doi:10.1103/PhysRevE.69.026113
.. [2] M. E. J. Newman, "Analysis of weighted networks", Physical Review E 70, 056131,
   2004. doi:10.1103/PhysRevE.70.056131
.. [3] V. D. Blondel, J.-L. Guillaume, R. Lambiotte and E. Lefebvre, "Fast unfolding of
   communities in large networks", Journal of Statistical Mechanics, P10008, 2008.
   doi:10.1088/1742-5468/2008/10/P10008
"""

from __future__ import annotations

import numba
import numpy as np

from ..embedding.graph import CSRGraph
from ..errors import parameter_error

__all__ = ["modularity", "louvain"]


def _symmetric_arrays(csr: CSRGraph) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Row pointers, columns and float64 weights of the symmetric adjacency matrix.

    :func:`roles.embedding.graph.to_csr` stores an undirected tie in both rows and a self-loop
    once; the matrix convention of the formula counts a self-loop twice on the
    diagonal (so that a row sums to the node's strength, as networkx's degree does).
    """
    if csr.directed:
        raise parameter_error(
            "csr", "an undirected CSRGraph (see the module notes)", "a directed one"
        )
    indptr = np.asarray(csr.indptr, dtype=np.int64)
    indices = np.asarray(csr.indices, dtype=np.int64)
    weights = np.asarray(csr.weights, dtype=np.float64).copy()
    rows = np.repeat(np.arange(csr.n_nodes, dtype=np.int64), np.diff(indptr))
    weights[rows == indices] *= 2.0
    return indptr, indices, weights


def modularity(csr: CSRGraph, labels: np.ndarray, *, resolution: float = 1.0) -> float:
    """Weighted modularity of the partition ``labels`` (one integer per node).

    Equal to ``networkx.community.modularity(G, parts, weight="weight")`` for the graph
    ``csr`` was made from. Nodes without ties add nothing. 0 for a network without ties.
    """
    indptr, indices, weights = _symmetric_arrays(csr)
    labels = np.asarray(labels)
    if labels.shape != (csr.n_nodes,):
        raise parameter_error(
            "labels", f"one entry per node ({csr.n_nodes})", f"{len(labels)} entries"
        )
    _, codes = np.unique(labels, return_inverse=True)
    codes = codes.reshape(-1)
    rows = np.repeat(np.arange(csr.n_nodes, dtype=np.int64), np.diff(indptr))
    two_m = float(weights.sum())
    if two_m <= 0:
        return 0.0
    same = codes[rows] == codes[indices]
    inside = float(weights[same].sum())
    strength = np.bincount(rows, weights=weights, minlength=csr.n_nodes)
    total = np.bincount(codes, weights=strength)
    return inside / two_m - resolution * float(((total / two_m) ** 2).sum())


@numba.njit(cache=True, nogil=True)
def local_moves(indptr, indices, weights, order, comm, resolution, max_passes):  # pragma: no cover
    """Local moving (the first phase of Louvain): each node, in ``order``, joins the
    neighbouring community with the highest modularity gain, until a pass moves nobody
    or ``max_passes`` passes. ``comm`` (labels from 0) is changed in place and returned.
    Shared by :func:`louvain` (from single nodes) and :func:`roles.embedding.refine.refine`."""
    n = indptr.shape[0] - 1
    strength = np.zeros(n)
    for i in range(n):
        for e in range(indptr[i], indptr[i + 1]):
            strength[i] += weights[e]
    two_m = strength.sum()
    m = two_m / 2.0
    n_comm = comm.max() + 1
    total = np.zeros(n_comm)  # sum of strengths per community
    for i in range(n):
        total[comm[i]] += strength[i]
    to_comm = np.zeros(n_comm)  # weight from the current node to each community
    touched = np.empty(n_comm, dtype=np.int64)
    for _ in range(max_passes):
        moves = 0
        for i in order:
            own = comm[i]
            k = strength[i]
            n_touched = 0
            for e in range(indptr[i], indptr[i + 1]):
                j = indices[e]
                if j == i:
                    continue
                c = comm[j]
                if to_comm[c] == 0.0:
                    touched[n_touched] = c
                    n_touched += 1
                to_comm[c] += weights[e]
            total[own] -= k
            # Gain of joining c, from an isolated start (Blondel et al. 2008, eq. 2,
            # as networkx writes it): w(i, c) / m - gamma * total(c) * k / (2 m^2).
            best = own
            best_gain = to_comm[own] / m - resolution * total[own] * k / (2.0 * m * m)
            for t in range(n_touched):
                c = touched[t]
                gain = to_comm[c] / m - resolution * total[c] * k / (2.0 * m * m)
                if gain > best_gain:
                    best_gain = gain
                    best = c
            total[best] += k
            if best != own:
                comm[i] = best
                moves += 1
            for t in range(n_touched):
                to_comm[touched[t]] = 0.0
        if moves == 0:
            break
    return comm


@numba.njit(cache=True, nogil=True)
def _move_nodes(indptr, indices, weights, order, resolution):  # pragma: no cover - compiled
    """Local moving of one level from single nodes; each node's community (not
    renumbered). Each move raises Q, so 10,000 passes are never reached."""
    n = indptr.shape[0] - 1
    return local_moves(indptr, indices, weights, order, np.arange(n), resolution, 10_000)


@numba.njit(cache=True, nogil=True)
def _aggregate(indptr, indices, weights, codes, n_comm):  # pragma: no cover - compiled
    """The network of communities: one node per community, weights summed (the
    diagonal holds each community's internal weight, both directions)."""
    n = indptr.shape[0] - 1
    # Members of each community, by counting sort.
    start = np.zeros(n_comm + 1, dtype=np.int64)
    for i in range(n):
        start[codes[i] + 1] += 1
    for c in range(n_comm):
        start[c + 1] += start[c]
    members = np.empty(n, dtype=np.int64)
    fill = start[:-1].copy()
    for i in range(n):
        members[fill[codes[i]]] = i
        fill[codes[i]] += 1
    acc = np.zeros(n_comm)
    touched = np.empty(n_comm, dtype=np.int64)
    out_ptr = np.zeros(n_comm + 1, dtype=np.int64)
    out_idx = np.empty(indices.shape[0], dtype=np.int64)
    out_w = np.empty(indices.shape[0])
    pos = 0
    for c in range(n_comm):
        n_touched = 0
        for a in range(start[c], start[c + 1]):
            i = members[a]
            for e in range(indptr[i], indptr[i + 1]):
                d = codes[indices[e]]
                if acc[d] == 0.0:
                    touched[n_touched] = d
                    n_touched += 1
                acc[d] += weights[e]
        row = np.sort(touched[:n_touched])
        for t in range(n_touched):
            d = row[t]
            out_idx[pos] = d
            out_w[pos] = acc[d]
            acc[d] = 0.0
            pos += 1
        out_ptr[c + 1] = pos
    return out_ptr, out_idx[:pos].copy(), out_w[:pos].copy()


def _q(indptr: np.ndarray, indices: np.ndarray, weights: np.ndarray, codes, resolution) -> float:
    rows = np.repeat(np.arange(len(indptr) - 1, dtype=np.int64), np.diff(indptr))
    two_m = float(weights.sum())
    inside = float(weights[codes[rows] == codes[indices]].sum())
    strength = np.bincount(rows, weights=weights, minlength=len(indptr) - 1)
    total = np.bincount(codes, weights=strength)
    return inside / two_m - resolution * float(((total / two_m) ** 2).sum())


def louvain(
    csr: CSRGraph,
    *,
    seed: int,
    resolution: float = 1.0,
    threshold: float = 1e-7,
) -> np.ndarray:
    """Louvain communities: one label per node (0, 1, ..., numbered by first member).

    Parameters
    ----------
    csr : CSRGraph
        An undirected network (see the module notes for directed ones).
    seed : int
        Seed of the node orders (one random order per level).
    resolution : float
        :math:`\\gamma` of the modularity; 1 is the classical modularity.
    threshold : float
        Stop when a level raises the modularity by no more than this (networkx's
        default, 1e-7).

    Returns
    -------
    ndarray of int64, shape (n_nodes,)
        Each node without ties is a community of its own.
    """
    indptr, indices, weights = _symmetric_arrays(csr)
    n = csr.n_nodes
    labels = np.arange(n, dtype=np.int64)
    if n == 0 or weights.sum() <= 0:
        return labels
    rng = np.random.default_rng(seed)
    q = _q(indptr, indices, weights, np.arange(n), resolution)
    while True:
        size = len(indptr) - 1
        comm = _move_nodes(indptr, indices, weights, rng.permutation(size), resolution)
        _, codes = np.unique(comm, return_inverse=True)
        codes = codes.reshape(-1).astype(np.int64)
        n_comm = int(codes.max()) + 1
        labels = codes[labels]  # a level's moves only ever raise Q: keep them
        new_q = _q(indptr, indices, weights, codes, resolution)
        if n_comm == size or new_q - q <= threshold:
            break
        q = new_q
        indptr, indices, weights = _aggregate(indptr, indices, weights, codes, n_comm)
    # Number communities by their first member, so the labels do not depend on the
    # internal order of the levels.
    _, first = np.unique(labels, return_index=True)
    rank = np.empty(len(first), dtype=np.int64)
    rank[np.argsort(first, kind="stable")] = np.arange(len(first))
    _, inverse = np.unique(labels, return_inverse=True)
    return rank[inverse.reshape(-1)]
