"""Groups chosen with the network's evidence: quality floors against Louvain and known
groups, over seeds 0-9.

The networks here are not the ones ``benchmarks/bench_groups.py`` reports on (LFR graph
seed 11 here, 1-3 there; planted partitions of graph seeds 100-102 here, 7 there), except
Zachary's karate club, the one small network with known groups bundled with networkx.
"""

from __future__ import annotations

import dataclasses
from collections import Counter

import networkx as nx
import numpy as np
import pytest
from sklearn.metrics import normalized_mutual_info_score as nmi

from roles import run
from roles.analysis.modularity import louvain
from roles.config import ConfidenceConfig, Config
from roles.embedding.cluster import cluster, ties_of
from roles.embedding.graph import to_csr
from roles.embedding.refine import refine
from roles.seeds import StageSeeds

SEEDS = range(10)


def _quick(seed: int, randomisations: int = 0) -> Config:
    return dataclasses.replace(
        Config(seed=seed), confidence=ConfidenceConfig(runs=0, randomisations=randomisations)
    )


def test_karate_factions_and_leaders_in_nine_of_ten_seeds(karate):
    # Zachary (1977): 'club' is each member's faction after the split; members 0 (the
    # instructor) and 33 (the administrator) led the two factions. Issue 18's target:
    # at least 9 of seeds 0-9 with 85 % agreement (29 of 34) and 0 and 33 leading the hubs.
    faction = {str(v): karate.nodes[v]["club"] for v in karate}
    good = 0
    for seed in SEEDS:
        result = run(karate, config=_quick(seed))
        agree = sum(
            Counter(faction[v] for v in part.node).most_common(1)[0][1]
            for _, part in result.nodes.groupby("community")
        )
        good += agree >= 29 and set(result.summary["hubs"][:2]) == {"0", "33"}
    assert good >= 9


@pytest.mark.parametrize(
    "size, p_in, p_out, graph_seed",
    [(10, 0.6, 0.05, 100), (15, 0.45, 0.05, 101), (20, 0.35, 0.05, 102)],
)
def test_small_planted_teams_are_found_as_well_as_louvain_finds_them(size, p_in, p_out, graph_seed):
    # Four planted teams of 10-20 (networkx.planted_partition_graph, 40-80 members). Whenever
    # the structure test calls the structure clear, groups must be found; their NMI with the
    # planted teams, averaged over seeds 0-9, at least that of the pipeline's own Louvain
    # check (roles.analysis.modularity.louvain with the same stage seed, which networkx's Louvain
    # matches: tests/test_modularity.py).
    g = nx.planted_partition_graph(4, size, p_in, p_out, seed=graph_seed)
    truth = np.array([g.nodes[v]["block"] for v in g])
    ours, theirs = [], []
    for seed in SEEDS:
        result = run(g, config=_quick(seed, randomisations=20))
        if result.summary["structure"]["clear"]:
            assert result.summary["grouped"], f"seed {seed}: clear structure, no groups"
        ours.append(nmi(truth, result.nodes["community"].to_numpy()))
        theirs.append(nmi(truth, louvain(to_csr(result.graph), seed=StageSeeds.of(seed).louvain)))
    assert np.mean(ours) >= np.mean(theirs) - 1e-9
    assert np.mean(ours) >= 0.85


def _lfr(mu: float, seed: int) -> tuple[nx.Graph, np.ndarray]:
    # Lancichinetti, Fortunato & Radicchi (2008), networkx's generator with issue 18's
    # parameters: n 1000, tau1 3, tau2 1.5, average degree 10, communities 30-100.
    g = nx.LFR_benchmark_graph(
        1000, 3, 1.5, mu, average_degree=10, max_degree=50, min_community=30,
        max_community=100, seed=seed,
    )  # fmt: skip
    g.remove_edges_from(nx.selfloop_edges(g))
    plain = nx.Graph()
    plain.add_nodes_from(g)
    plain.add_edges_from(g.edges())
    return plain, np.array([min(g.nodes[v]["community"]) for v in plain])


@pytest.mark.parametrize("mu", [0.4, 0.5])
def test_lfr_loosely_knit_communities_beyond_louvain(mu):
    # Issue 18's target at mixing 0.4 and 0.5: at least networkx Louvain's NMI on the same
    # graph (seed 11, never used by the benchmark) plus 0.05, mean of three runs of the
    # pipeline (seeds 0-2). Measured when written: 0.735 against Louvain's 0.633 at 0.4,
    # 0.337 against 0.244 at 0.5 (walks of 80 at window 10, min_samples 3).
    g, truth = _lfr(mu, 11)
    parts = nx.community.louvain_communities(g, seed=0)
    label = {v: i for i, p in enumerate(parts) for v in p}
    louvain_nmi = nmi(truth, [label[v] for v in g])
    ours = [nmi(truth, run(g, config=_quick(s)).nodes["community"].to_numpy()) for s in range(3)]
    assert np.mean(ours) >= louvain_nmi + 0.05


def test_refine_only_raises_modularity_and_never_merges():
    # Reference modularity: networkx.community.modularity (Newman & Girvan 2004).
    g = nx.planted_partition_graph(3, 12, 0.5, 0.1, seed=3)
    csr = to_csr(g)
    ties = ties_of(csr.indptr, csr.indices, csr.weights, np.arange(csr.n_nodes))
    start = np.random.default_rng(0).integers(0, 5, size=csr.n_nodes)
    moved = refine(csr.n_nodes, ties, start, seed=1)

    def q(labels: np.ndarray) -> float:
        parts = [set(np.flatnonzero(labels == c)) for c in np.unique(labels)]
        return nx.community.modularity(g, parts)

    assert q(moved) > q(start)
    assert set(moved.tolist()) <= set(start.tolist())
    assert np.array_equal(refine(csr.n_nodes, ties, moved, seed=2), moved)  # a fixed point


@pytest.mark.parametrize("coarse", [False, True])
def test_the_ties_decide_between_levels_of_the_tree(coarse):
    # Four blobs of 25 in the vectors, in two pairs (a two-level condensed tree). Ties drawn
    # within the four teams (p 0.4, else 0.02) or within the two pairs: the groups follow
    # the ties. HDBSCAN's own selection (no ties) gives the four blobs either way.
    rng = np.random.default_rng(0)
    team = np.repeat(np.arange(4), 25)
    centres = np.array([[4, 1], [4, -1], [-4, 1], [-4, -1]], float)
    x = np.hstack([centres[team], np.zeros((100, 6))]) + rng.normal(scale=0.25, size=(100, 8))
    blocks = team // 2 if coarse else team
    draw = np.random.default_rng(1).random((100, 100))
    g = nx.Graph()
    g.add_nodes_from(range(100))
    g.add_edges_from(
        (i, j)
        for i in range(100)
        for j in range(i + 1, 100)
        if draw[i, j] < (0.4 if blocks[i] == blocks[j] else 0.02)
    )
    csr = to_csr(g)
    ties = ties_of(csr.indptr, csr.indices, csr.weights, np.arange(100))
    assert cluster(x, seed=0).n_groups == 4
    grouping = cluster(x, seed=0, ties=ties)
    assert grouping.n_groups == (2 if coarse else 4)
    assert nmi(blocks, grouping.labels) > 0.99
    assert np.all((grouping.membership >= 0) & (grouping.membership <= 1))
