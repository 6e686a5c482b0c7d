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
    # Lancichinetti, Fortunato & Radicchi (2008), networkx's generator with the
    # parameters of networkx's own documentation example, at mixing 0.1.
    g = nx.LFR_benchmark_graph(250, 3, 1.5, 0.1, average_degree=5, min_community=20, seed=10)
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
