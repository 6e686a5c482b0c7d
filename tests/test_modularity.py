"""Modularity and the compiled Louvain method, checked against networkx."""

from __future__ import annotations

import networkx as nx
import numpy as np
import pytest
from sklearn.metrics import normalized_mutual_info_score

from roles.analysis.modularity import louvain, modularity
from roles.embedding.graph import to_csr


def _parts(graph: nx.Graph, labels: np.ndarray) -> list[set]:
    parts: dict[int, set] = {}
    for node, label in zip(graph.nodes(), labels.tolist(), strict=True):
        parts.setdefault(label, set()).add(node)
    return list(parts.values())


def _nx_q(graph: nx.Graph, labels: np.ndarray, resolution: float = 1.0) -> float:
    return nx.community.modularity(
        graph, _parts(graph, labels), weight="weight", resolution=resolution
    )


@pytest.mark.parametrize("seed", range(5))
def test_modularity_matches_networkx_on_random_partitions(seed):
    # networkx's modularity (Newman 2004, weighted) is the reference.
    graph = nx.karate_club_graph()  # weighted: interaction counts (Zachary 1977)
    labels = np.random.default_rng(seed).integers(0, 2 + seed, graph.number_of_nodes())
    for resolution in (0.5, 1.0, 2.0):
        got = modularity(to_csr(graph), labels, resolution=resolution)
        assert got == pytest.approx(_nx_q(graph, labels, resolution), abs=1e-6)


def test_modularity_of_the_two_karate_factions():
    # Zachary's observed split as networkx records it ("club"), unweighted; networkx's
    # modularity is the reference. Worked from the formula on the same data: 0.3582.
    graph = nx.Graph(nx.karate_club_graph().edges())
    club = nx.get_node_attributes(nx.karate_club_graph(), "club")
    labels = np.array([club[n] == "Officer" for n in graph], dtype=int)
    got = modularity(to_csr(graph), labels)
    assert got == pytest.approx(_nx_q(graph, labels), abs=1e-12)
    assert got == pytest.approx(0.3582, abs=5e-5)


def test_modularity_with_self_loops_and_isolated_nodes():
    graph = nx.Graph()
    graph.add_weighted_edges_from([(0, 1, 2.0), (1, 2, 1.0), (2, 3, 3.0), (3, 3, 1.5)])
    graph.add_edge(4, 4, weight=1.0)  # only a self-loop
    graph.add_node(5)  # no ties at all
    labels = np.array([0, 0, 1, 1, 2, 1])
    assert modularity(to_csr(graph), labels) == pytest.approx(_nx_q(graph, labels), abs=1e-6)


def test_modularity_refuses_directed_arrays_and_short_labels():
    csr = to_csr(nx.DiGraph([(0, 1), (1, 2)]))
    with pytest.raises(ValueError, match="undirected"):
        modularity(csr, np.zeros(3))
    with pytest.raises(ValueError, match="one entry per node"):
        modularity(to_csr(nx.path_graph(3)), np.zeros(2))


def test_louvain_on_karate_is_near_the_optimum():
    # The best partition of the unweighted karate club has Q = 0.4198 (Brandes et al.
    # 2008, "On modularity clustering", from memory): no order may beat it, and Louvain
    # reaches or nearly reaches it (networkx's best over these seeds: 0.4188).
    graph = nx.Graph(nx.karate_club_graph().edges())
    csr = to_csr(graph)
    found = [modularity(csr, louvain(csr, seed=s)) for s in range(10)]
    assert 0.4188 - 1e-4 <= max(found) <= 0.41979 + 1e-5
    assert min(found) > 0.40
    reference = [
        nx.community.modularity(graph, nx.community.louvain_communities(graph, seed=s))
        for s in range(10)
    ]
    assert np.mean(found) == pytest.approx(np.mean(reference), abs=0.005)


def test_louvain_finds_the_cliques_of_a_ring():
    # 8 cliques of 6 in a ring: each clique alone scores 0.1016 and two merged 0.1797 <
    # 2 x 0.1016 (worked by hand from the formula), so the cliques are the optimum.
    graph = nx.ring_of_cliques(8, 6)
    labels = louvain(to_csr(graph), seed=3)
    clique = np.arange(48) // 6
    assert normalized_mutual_info_score(clique, labels) == pytest.approx(1.0)


def test_louvain_matches_networkx_on_lfr(lfr):
    # LFR benchmark (Lancichinetti, Fortunato & Radicchi 2008), mixing 0.1 (conftest).
    graph, truth = lfr
    csr = to_csr(graph)
    ours = louvain(csr, seed=1)
    theirs = nx.community.louvain_communities(graph, seed=1)
    q_theirs = nx.community.modularity(graph, theirs)
    assert modularity(csr, ours) == pytest.approx(q_theirs, abs=0.01)
    planted = [truth[n] for n in graph]
    assert normalized_mutual_info_score(planted, ours) >= 0.95


def test_louvain_labels_are_repeatable_and_cover_every_node():
    graph = nx.karate_club_graph()
    graph.add_nodes_from(["alone", "apart"])
    csr = to_csr(graph)
    a, b = louvain(csr, seed=7), louvain(csr, seed=7)
    assert np.array_equal(a, b)
    assert a.shape == (36,)
    # Numbered by first member; the two members without ties are groups of their own.
    assert a[0] == 0
    assert len({a[34], a[35]}) == 2 and np.sum(a == a[34]) == 1 and np.sum(a == a[35]) == 1
    assert louvain(to_csr(nx.empty_graph(4)), seed=0).tolist() == [0, 1, 2, 3]
