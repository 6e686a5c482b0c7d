"""Shared fixtures: small reference graphs and one pipeline run per graph per session."""

from __future__ import annotations

import networkx as nx
import pytest


@pytest.fixture(scope="session")
def karate() -> nx.Graph:
    # Zachary (1977), bundled with networkx; 'club' holds the faction after the split.
    return nx.karate_club_graph()


@pytest.fixture(scope="session")
def lfr() -> tuple[nx.Graph, dict]:
    # Lancichinetti, Fortunato & Radicchi (2008), networkx's generator at mixing 0.1.
    # Exponents tau1 = 2.5, tau2 = 1.5 as in networkx's documentation example; community
    # sizes 20-100 as the LFR paper's "big communities" set (from memory); average
    # degree 10. Sparser graphs are hard for every method: networkx's Louvain reaches
    # only NMI 0.54 on the 250-node, degree-5 graph of that documentation example.
    g = nx.LFR_benchmark_graph(
        500,
        2.5,
        1.5,
        0.1,
        average_degree=10,
        max_degree=50,
        min_community=20,
        max_community=100,
        seed=1,
    )
    g.remove_edges_from(nx.selfloop_edges(g))
    truth = {}
    for node in g:
        truth[node] = min(g.nodes[node]["community"])
    plain = nx.Graph()
    plain.add_nodes_from(g)
    plain.add_edges_from(g.edges())
    return plain, truth


@pytest.fixture(scope="session")
def karate_result(karate):
    from roles import run

    return run(karate)
