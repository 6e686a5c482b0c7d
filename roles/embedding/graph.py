"""A networkx graph as compact CSR arrays plus the index -> name map.

Rows are sorted by neighbour index so that the walk kernel can test adjacency by
binary search. Undirected graphs store each tie in both rows.
"""

from __future__ import annotations

from dataclasses import dataclass

import networkx as nx
import numpy as np

__all__ = ["CSRGraph", "to_csr"]


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


def to_csr(graph: nx.Graph, *, weight: str = "weight") -> CSRGraph:
    """Convert ``graph`` to :class:`CSRGraph`, keeping the graph's node order.

    Missing weights count as 1. Node names are converted with ``str``.
    """
    nodes = list(graph.nodes())
    index = {node: i for i, node in enumerate(nodes)}
    n = len(nodes)
    directed = graph.is_directed()
    src: list[int] = []
    dst: list[int] = []
    wts: list[float] = []
    for u, v, data in graph.edges(data=True):
        w = float(data.get(weight, 1.0))
        iu, iv = index[u], index[v]
        src.append(iu)
        dst.append(iv)
        wts.append(w)
        if not directed and iu != iv:
            src.append(iv)
            dst.append(iu)
            wts.append(w)
    s = np.asarray(src, dtype=np.int64)
    d = np.asarray(dst, dtype=np.int64)
    w_arr = np.asarray(wts, dtype=np.float32)
    order = np.lexsort((d, s))
    s, d, w_arr = s[order], d[order], w_arr[order]
    counts = np.bincount(s, minlength=n) if n else np.zeros(0, dtype=np.int64)
    indptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(counts, out=indptr[1:])
    return CSRGraph(
        names=tuple(str(x) for x in nodes),
        indptr=indptr,
        indices=d.astype(np.int32),
        weights=w_arr,
        directed=directed,
    )
