"""A networkx graph as compact CSR arrays plus the index -> name map.

Rows are sorted by neighbour index so that the walk kernel can test adjacency by
binary search. Undirected graphs store each tie in both rows. :func:`csr_arrays` is the
package's one converter of ties to compressed sparse rows.
"""

from __future__ import annotations

import itertools
from dataclasses import dataclass

import networkx as nx
import numpy as np
from numba import njit

__all__ = ["CSRGraph", "csr_arrays", "edge_arrays", "from_ties", "to_csr"]


@dataclass(frozen=True, eq=False)
class CSRGraph:
    """Compressed sparse row adjacency.

    Attributes
    ----------
    names : tuple of str
        ``names[i]`` is the node name of index ``i``.
    indptr : ndarray of int64, shape (n + 1,)
        Row ``i`` holds ``indices[indptr[i]:indptr[i + 1]]``.
    indices : ndarray of int32
        Neighbour (out-neighbour, when directed) indices, sorted within each row.
    weights : ndarray of float32
        Tie weights, aligned with ``indices``.
    directed : bool
        Whether rows hold out-neighbours only.
    """

    names: tuple[str, ...]
    indptr: np.ndarray
    indices: np.ndarray
    weights: np.ndarray
    directed: bool

    @property
    def n_nodes(self) -> int:
        return len(self.names)

    @property
    def n_arcs(self) -> int:
        """Stored entries: ties counted twice when undirected."""
        return int(self.indices.shape[0])

    def out_degree(self) -> np.ndarray:
        return np.diff(self.indptr)


def edge_arrays(
    graph: nx.Graph, *, weight: str | None = None
) -> tuple[np.ndarray, np.ndarray, np.ndarray | None]:
    """The ties of ``graph`` as node-index arrays, in ``graph.edges()`` order.

    Nodes are numbered as in ``list(graph.nodes())``; each tie appears once, as the
    graph reports it (an undirected tie in one direction only; self-loops kept).

    Parameters
    ----------
    graph : networkx.Graph or networkx.DiGraph
    weight : str or None
        Edge attribute to return as float64 weights (missing counts 1); ``None``
        returns no weights.

    Returns
    -------
    src, dst : ndarray of int64
    weights : ndarray of float64, or None

    Examples
    --------
    >>> src, dst, w = edge_arrays(nx.Graph([("a", "b"), ("b", "c")]), weight="weight")
    >>> src.tolist(), dst.tolist(), w.tolist()
    ([0, 1], [1, 2], [1.0, 1.0])
    """
    index = {node: i for i, node in enumerate(graph.nodes())}
    if weight is None:
        flat = np.fromiter(
            itertools.chain.from_iterable((index[a], index[b]) for a, b in graph.edges()),
            dtype=np.int64,
            count=2 * graph.number_of_edges(),
        )
        return flat[0::2], flat[1::2], None
    src: list[int] = []
    dst: list[int] = []
    wts: list[float] = []
    for a, b, x in graph.edges(data=weight, default=1.0):
        src.append(index[a])
        dst.append(index[b])
        wts.append(float(x))
    return (
        np.asarray(src, dtype=np.int64),
        np.asarray(dst, dtype=np.int64),
        np.asarray(wts, dtype=np.float64),
    )


@njit(cache=True, nogil=True)
def _csr_kernel(src, dst, n, both_ways):  # pragma: no cover - compiled
    m = src.shape[0]
    indptr = np.zeros(n + 1, dtype=np.int64)
    for e in range(m):
        indptr[src[e] + 1] += 1
        if both_ways and src[e] != dst[e]:
            indptr[dst[e] + 1] += 1
    for i in range(n):
        indptr[i + 1] += indptr[i]
    # One key per stored arc, neighbour first and tie number second, so a counting sort
    # by row and one sort within each row give rows sorted by neighbour, repeated ties
    # in file order.
    fill = indptr[:-1].copy()
    key = np.empty(indptr[n], dtype=np.int64)
    for e in range(m):
        key[fill[src[e]]] = dst[e] * m + e
        fill[src[e]] += 1
        if both_ways and src[e] != dst[e]:
            key[fill[dst[e]]] = src[e] * m + e
            fill[dst[e]] += 1
    for i in range(n):
        key[indptr[i] : indptr[i + 1]] = np.sort(key[indptr[i] : indptr[i + 1]])
    step = max(m, 1)
    return indptr, (key // step).astype(np.int32), key % step


def csr_arrays(
    src: np.ndarray,
    dst: np.ndarray,
    n_nodes: int,
    *,
    weights: np.ndarray | None = None,
    directed: bool = True,
) -> tuple[np.ndarray, np.ndarray, np.ndarray | None]:
    """Row pointers, neighbours and weights of the ties ``src[e] -> dst[e]``.

    The one converter of ties to compressed sparse rows: :func:`to_csr` and the
    analyses that work on index arrays (the structure test's randomised networks, the
    removal scenarios) all call it.

    Parameters
    ----------
    src, dst : array of int
        Node indices in ``0 .. n_nodes - 1``, one entry per tie.
    n_nodes : int
    weights : array of float, optional
        One per tie; returned in the stored order.
    directed : bool
        When False each tie is stored in both rows (a self-loop once).

    Returns
    -------
    indptr : ndarray of int64, shape (n_nodes + 1,)
    indices : ndarray of int32
        Sorted within each row; repeated ties keep their order in ``src``.
    weights : ndarray, or None when no weights were given

    Examples
    --------
    >>> indptr, indices, _ = csr_arrays(np.array([0, 1]), np.array([1, 2]), 3, directed=False)
    >>> indptr.tolist(), indices.tolist()
    ([0, 1, 3, 4], [1, 0, 2, 1])
    """
    indptr, indices, tie = _csr_kernel(
        np.ascontiguousarray(src, dtype=np.int64),
        np.ascontiguousarray(dst, dtype=np.int64),
        np.int64(n_nodes),
        not directed,
    )
    return indptr, indices, None if weights is None else np.asarray(weights)[tie]


def from_ties(
    names: tuple[str, ...],
    src: np.ndarray,
    dst: np.ndarray,
    *,
    weights: np.ndarray | None = None,
    directed: bool = False,
) -> CSRGraph:
    """The :class:`CSRGraph` of the ties ``src[e] - dst[e]`` between ``names``.

    Weights are stored as float32; without them every tie counts 1.
    """
    indptr, indices, w = csr_arrays(
        src,
        dst,
        len(names),
        weights=None if weights is None else np.asarray(weights, dtype=np.float32),
        directed=directed,
    )
    if w is None:
        w = np.ones(indices.shape[0], dtype=np.float32)
    return CSRGraph(names=names, indptr=indptr, indices=indices, weights=w, directed=directed)


def to_csr(graph: nx.Graph, *, weight: str = "weight") -> CSRGraph:
    """Convert ``graph`` to :class:`CSRGraph`, keeping the graph's node order.

    Missing weights count as 1. Node names are converted with ``str``.
    """
    src, dst, w = edge_arrays(graph, weight=weight)
    return from_ties(
        tuple(str(x) for x in graph.nodes()),
        src,
        dst,
        weights=w,
        directed=graph.is_directed(),
    )
