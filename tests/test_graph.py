"""The one ties -> CSR converter (roles.embedding.graph) against networkx and scipy.

Expected arrays come from ``networkx.to_scipy_sparse_array`` (scipy's CSR of the
adjacency matrix, rows sorted with ``sort_indices``) on graphs bundled with networkx
(Zachary's karate club, Les Miserables co-appearances) and on seeded random graphs;
the self-loop and repeated-tie rules are the ones DEVELOPERS.md states for ``to_csr``,
worked by hand.
"""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest

from roles.embedding.graph import csr_arrays, edge_arrays, from_ties, to_csr


def _scipy_csr(graph: nx.Graph, weight: str | None = "weight"):
    a = nx.to_scipy_sparse_array(graph, nodelist=list(graph), weight=weight, format="csr")
    a.sort_indices()
    return a


GRAPHS = {
    "karate": nx.karate_club_graph(),  # Zachary 1977, weighted, bundled with networkx
    "les miserables": nx.les_miserables_graph(),  # weighted, bundled with networkx
    "directed": nx.gnp_random_graph(200, 0.03, seed=4, directed=True),
    "undirected": nx.gnp_random_graph(200, 0.03, seed=5),
}


@pytest.mark.parametrize("name", sorted(GRAPHS))
def test_to_csr_matches_scipy(name):
    graph = GRAPHS[name]
    csr = to_csr(graph)
    want = _scipy_csr(graph)
    assert csr.directed == graph.is_directed()
    assert csr.names == tuple(str(v) for v in graph)
    assert np.array_equal(csr.indptr, want.indptr)
    assert np.array_equal(csr.indices, want.indices)
    assert np.array_equal(csr.weights, want.data.astype(np.float32))
    assert (csr.indptr.dtype, csr.indices.dtype, csr.weights.dtype) == (
        np.int64,
        np.int32,
        np.float32,
    )


def test_self_loop_stored_once_in_an_undirected_graph():
    # By hand: 0-0, 0-1, 2-2 -> row 0 holds 0 and 1, row 1 holds 0, row 2 holds 2.
    csr = to_csr(nx.Graph([(0, 0), (0, 1), (2, 2)]))
    assert csr.indptr.tolist() == [0, 2, 3, 4]
    assert csr.indices.tolist() == [0, 1, 0, 2]


def test_repeated_ties_keep_their_order():
    # By hand: two ties 0-1 (weights 2 then 3) and 1-2; rows sorted by neighbour, the
    # repeated tie in the order given, in both rows.
    graph = nx.MultiGraph([(0, 1, {"weight": 2}), (0, 1, {"weight": 3}), (1, 2)])
    csr = to_csr(graph)
    assert csr.indptr.tolist() == [0, 2, 5, 6]
    assert csr.indices.tolist() == [1, 1, 0, 0, 2, 1]
    assert csr.weights.tolist() == [2.0, 3.0, 2.0, 3.0, 1.0, 1.0]


def test_edge_arrays_follow_networkx_order():
    graph = GRAPHS["les miserables"]
    src, dst, w = edge_arrays(graph, weight="weight")
    index = {v: i for i, v in enumerate(graph)}
    edges = list(graph.edges(data="weight"))
    assert src.tolist() == [index[a] for a, _, _ in edges]
    assert dst.tolist() == [index[b] for _, b, _ in edges]
    assert w is not None and w.tolist() == [float(x) for _, _, x in edges]
    assert edge_arrays(nx.empty_graph(3))[0].shape == (0,)


def test_csr_arrays_directed_and_weights():
    src, dst = np.array([2, 0, 2, 1]), np.array([0, 1, 1, 2])
    indptr, indices, w = csr_arrays(src, dst, 3, weights=np.array([10.0, 11.0, 12.0, 13.0]))
    want = nx.to_scipy_sparse_array(
        nx.DiGraph(list(zip(src.tolist(), dst.tolist(), strict=True))),
        nodelist=[0, 1, 2],
        format="csr",
    )
    want.sort_indices()
    assert np.array_equal(indptr, want.indptr) and np.array_equal(indices, want.indices)
    assert w is not None and w.tolist() == [11.0, 13.0, 10.0, 12.0]  # by hand: rows 0, 1, 2


def test_from_ties_without_weights_counts_each_tie_once():
    csr = from_ties(("a", "b", "c"), np.array([0, 1]), np.array([1, 2]))
    assert not csr.directed and csr.weights.tolist() == [1.0] * 4
    assert np.array_equal(csr.indices, _scipy_csr(nx.path_graph(3)).indices)
