"""node2vec walks: the transition rule, directed dead ends, seeds, memory."""

from __future__ import annotations

import tracemalloc
from collections import Counter

import networkx as nx
import numpy as np
import pytest
from scipy.stats import chisquare

from roles.embedding.graph import to_csr
from roles.embedding.walks import (
    generate_walks,
    kernel,
    visit_counts,
    walk_lengths,
    walks_to_names,
)
from roles.errors import ConfigError, InputError

# Local and far views of the default configuration (roles.config), plus settings with
# p != 1: the return to t as the largest bias (drawn apart from the envelope, twice, with
# envelopes 1 and 1/q) and as the smallest.
VIEWS = [(1.0, 2.0), (1.0, 0.5), (0.5, 2.0), (0.25, 0.5), (4.0, 0.25)]


def _weighted_triangles(directed: bool = False) -> nx.Graph:
    """Six nodes, two triangles joined by a chord, unequal weights (made up for the test)."""
    graph = nx.DiGraph() if directed else nx.Graph()
    edges = [
        (0, 1, 1.0),
        (0, 2, 2.0),
        (1, 2, 1.0),  # triangle
        (2, 3, 1.0),
        (1, 3, 3.0),  # triangle 1-2-3
        (3, 4, 2.0),
        (4, 5, 1.0),
        (3, 5, 1.5),  # triangle
        (2, 4, 0.5),
    ]
    graph.add_weighted_edges_from(edges)
    if directed:  # ties back in some places only, so that t -> x and x -> t differ
        graph.add_weighted_edges_from(
            [(1, 0, 1.0), (3, 2, 2.0), (5, 4, 1.0), (4, 0, 1.0), (5, 1, 1.0)]
        )
    return graph


def _rule(graph: nx.Graph, t: int, v: int, p: float, q: float) -> dict[int, float]:
    """Next-step probabilities after t -> v (Grover & Leskovec 2016, Sec. 3.2.2)."""
    bias = {}
    for x in graph.successors(v) if graph.is_directed() else graph.neighbors(v):
        if x == t:
            a = 1.0 / p  # d_tx = 0
        elif graph.has_edge(t, x):
            a = 1.0  # d_tx = 1
        else:
            a = 1.0 / q  # d_tx = 2
        bias[x] = graph[v][x]["weight"] * a
    total = sum(bias.values())
    return {x: b / total for x, b in bias.items()}


def _second_order_counts(walks: np.ndarray) -> Counter:
    counts: Counter = Counter()
    for row in walks:
        row = row[row >= 0]
        for t, v, x in zip(row[:-2], row[1:-1], row[2:], strict=True):
            counts[(int(t), int(v), int(x))] += 1
    return counts


def _pooled_chisquare(graph: nx.Graph, counts: Counter, p: float, q: float) -> float:
    """One goodness-of-fit test over all (t, v) pairs; each pair adds deg(v) - 1 dof."""
    observed, expected = [], []
    pairs = {(t, v) for t, v, _ in counts}
    for t, v in sorted(pairs):
        probs = _rule(graph, t, v, p, q)
        n = sum(counts[(t, v, x)] for x in probs)
        assert n == sum(c for (a, b, _), c in counts.items() if (a, b) == (t, v))
        for x, pr in sorted(probs.items()):
            observed.append(counts[(t, v, x)])
            expected.append(n * pr)
    # ddof so that dof = sum over pairs of (categories - 1).
    result = chisquare(observed, expected, ddof=len(pairs) - 1)
    return float(result.pvalue)


@pytest.mark.parametrize("directed", [False, True])
@pytest.mark.parametrize("p,q", VIEWS)
def test_second_order_frequencies_follow_the_rule(p: float, q: float, directed: bool) -> None:
    graph = _weighted_triangles(directed)
    csr = to_csr(graph)
    assert list(graph.nodes()) == list(range(6))
    walks = generate_walks(csr, walks_per_node=300, walk_length=60, p=p, q=q, seed=11)
    counts = _second_order_counts(walks)
    assert sum(counts.values()) > 50_000
    # Chi-square goodness of fit against Grover & Leskovec 2016, Sec. 3.2.2;
    # 1e-3 is a common-practice significance level.
    assert _pooled_chisquare(graph, counts, p, q) > 1e-3
    # The same counts must reject a rule that ignores (p, q) or ignores the weights:
    # the test has the power to fail.
    assert _pooled_chisquare(graph, counts, 1.0, 1.0) < 1e-6
    unweighted = graph.copy()
    nx.set_edge_attributes(unweighted, 1.0, "weight")
    assert _pooled_chisquare(unweighted, counts, p, q) < 1e-6


def test_first_steps_follow_weights() -> None:
    graph = _weighted_triangles()
    csr = to_csr(graph)
    walks = generate_walks(csr, walks_per_node=4000, walk_length=2, p=0.5, q=2.0, seed=5)
    observed, expected, unweighted = [], [], []
    for s in graph.nodes():
        firsts = walks[walks[:, 0] == s, 1]
        assert firsts.size == 4000  # every node starts walks_per_node walks
        nbrs = sorted(graph.neighbors(s))
        counts = [int(np.count_nonzero(firsts == x)) for x in nbrs]
        assert sum(counts) == 4000  # first steps go to neighbours only
        w = np.array([graph[s][x]["weight"] for x in nbrs])
        observed += counts
        expected += list(4000 * w / w.sum())
        unweighted += [4000 / len(nbrs)] * len(nbrs)
    # First step proportional to tie weight (Grover & Leskovec 2016, Sec. 3.2): one
    # pooled chi-square test, one dof fewer per start node.
    assert chisquare(observed, expected, ddof=graph.number_of_nodes() - 1).pvalue > 1e-3
    # ... and the same counts reject draws that ignore the weights: the test can fail.
    assert chisquare(observed, unweighted, ddof=graph.number_of_nodes() - 1).pvalue < 1e-6


def test_directed_walks_follow_ties_and_stop_only_at_dead_ends() -> None:
    graph = nx.gnp_random_graph(80, 0.04, seed=3, directed=True)
    rng = np.random.default_rng(0)
    for u, v in graph.edges():
        graph[u][v]["weight"] = float(rng.uniform(0.2, 3.0))
    csr = to_csr(graph)
    walks = generate_walks(csr, walks_per_node=20, walk_length=15, p=0.5, q=2.0, seed=9)
    out_degree = dict(graph.out_degree())
    lengths = walk_lengths(walks)
    stopped_early = 0
    for row, k in zip(walks, lengths, strict=True):
        assert np.all(row[k:] == -1) and np.all(row[:k] >= 0)  # -1 only as trailing padding
        for a, b in zip(row[: k - 1], row[1:k], strict=True):
            assert graph.has_edge(int(a), int(b))  # never against a tie's direction
        if k < walks.shape[1]:
            stopped_early += 1
            assert out_degree[int(row[k - 1])] == 0  # stops only at a node with no way out
        for node in row[: k - 1]:
            assert out_degree[int(node)] > 0
    assert stopped_early > 0  # the graph has dead ends, so the check above was exercised


def test_isolated_node_walk_has_length_one() -> None:
    graph = nx.path_graph(3)
    graph.add_node("alone")
    csr = to_csr(graph)
    walks = generate_walks(csr, walks_per_node=3, walk_length=5, p=1.0, q=2.0, seed=1)
    lone = walks[walks[:, 0] == 3]
    assert lone.shape == (3, 5)
    assert np.all(lone[:, 1:] == -1)
    names = walks_to_names(walks, csr.names)
    assert ["alone"] in names
    assert all(len(w) == 5 for w in names if w[0] != "alone")


def test_same_seed_same_walks_other_seed_other_walks() -> None:
    csr = to_csr(nx.karate_club_graph())  # Zachary 1977, bundled with networkx
    kw = dict(walks_per_node=5, walk_length=20, p=0.5, q=2.0)
    a = generate_walks(csr, seed=42, **kw)
    b = generate_walks(csr, seed=42, **kw)
    c = generate_walks(csr, seed=43, **kw)
    assert a.tobytes() == b.tobytes()
    assert not np.array_equal(a, c)
    # Threads do not change the result: each walk has its own keyed random stream.
    assert np.array_equal(a, generate_walks(csr, seed=42, parallel=True, **kw))


def test_walks_do_not_depend_on_chunking() -> None:
    csr = to_csr(nx.karate_club_graph())
    starts = np.arange(34, dtype=np.int32).repeat(3)
    f4, i4, f8 = np.zeros(0, np.float32), np.zeros(0, np.int32), np.zeros(0, np.float64)
    args = (csr.indptr, csr.indices, csr.weights, f4, i4, f8, True, False)
    key = np.uint64(123456789)
    whole = np.empty((starts.size, 12), dtype=np.int32)
    kernel.walk_serial(*args, starts, 0, 2.0, 0.5, key, whole)
    head = np.empty((40, 12), dtype=np.int32)
    tail = np.empty((starts.size - 40, 12), dtype=np.int32)
    kernel.walk_serial(*args, starts[:40], 0, 2.0, 0.5, key, head)
    kernel.walk_serial(*args, starts[40:], 40, 2.0, 0.5, key, tail)
    assert np.array_equal(whole, np.vstack([head, tail]))


def test_alias_tables_reproduce_row_weights() -> None:
    # Vose (1991): column j keeps probability prob[j] and passes 1 - prob[j] to alias[j];
    # the implied distribution must equal the normalised weights.
    rng = np.random.default_rng(1)
    weights = rng.uniform(0.01, 5.0, 57).astype(np.float32)
    indptr = np.array([0, 1, 10, 10, 57], dtype=np.int64)
    prob = np.empty(57, np.float32)
    alias = np.empty(57, np.int32)
    totals = np.empty(4, np.float64)
    scratch = (np.empty(47, np.float64), np.empty(47, np.int32), np.empty(47, np.int32))
    kernel.build_alias(indptr, weights, prob, alias, totals, *scratch)
    for r in range(4):
        s, e = indptr[r], indptr[r + 1]
        d = e - s
        if d == 0:
            continue
        implied = np.zeros(d)
        for j in range(d):
            implied[j] += prob[s + j] / d
            implied[alias[s + j]] += (1.0 - prob[s + j]) / d
        expected = weights[s:e] / weights[s:e].sum()
        np.testing.assert_allclose(implied, expected, rtol=1e-5, atol=1e-7)
        assert totals[r] == pytest.approx(float(weights[s:e].sum(dtype=np.float64)))


def test_star_hub_memory_is_proportional_to_edges() -> None:
    # A 50,000-degree hub: a per-edge transition table would need sum(deg^2) ~ 2.5e9
    # entries; the walk stage must stay within a few arrays of the edge count.
    leaves = 50_000
    graph = nx.star_graph(leaves)
    for u, v in graph.edges():
        graph[u][v]["weight"] = 1.0 + (v % 7)  # unequal weights: alias tables are built
    csr = to_csr(graph)
    tracemalloc.start()
    try:
        walks = generate_walks(csr, walks_per_node=1, walk_length=6, p=0.5, q=2.0, seed=3)
        _, peak = tracemalloc.get_traced_memory()
    finally:
        tracemalloc.stop()
    assert peak >= walks.nbytes  # tracemalloc does see numpy's buffers
    # Budget: the output plus 64 bytes per stored tie and per node (alias tables are
    # 8 bytes per tie; scratch is 16 bytes per entry of the longest row).
    budget = walks.nbytes + 64 * (csr.n_arcs + csr.n_nodes)
    assert peak < budget, (peak, budget)
    sum_sq = int((csr.out_degree().astype(np.int64) ** 2).sum())
    assert budget < sum_sq  # the budget is far below any per-edge table
    hub_steps = walks[:, 1:][walks[:, :-1] != 0]
    assert np.all(hub_steps == 0)  # every move from a leaf goes to the hub


@pytest.mark.parametrize(
    "kw",
    [
        dict(p=0.0, q=1.0),
        dict(p=1.0, q=-2.0),
        dict(p=float("nan"), q=1.0),
        dict(p=1.0, q=1.0, walk_length=0),
        dict(p=1.0, q=1.0, walks_per_node=0),
    ],
)
def test_bad_parameters_are_refused(kw: dict) -> None:
    args = dict(walks_per_node=1, walk_length=3, seed=0) | kw
    # The configuration's message shape (roles/config.py, after scikit-learn's).
    shape = r"^The '\w+' parameter of generate_walks must be .+\. Got .+ instead\.$"
    with pytest.raises(ConfigError, match=shape):
        generate_walks(to_csr(nx.path_graph(3)), **args)


def test_visit_counts_refuses_an_index_beyond_the_nodes() -> None:
    shape = r"^The 'walks' parameter of visit_counts must be .+\. Got 'index 3' instead\.$"
    with pytest.raises(ValueError, match=shape):
        visit_counts(np.array([[0, 3]], dtype=np.int32), 3)


def test_non_positive_weight_is_refused() -> None:
    graph = nx.path_graph(3)
    graph[0][1]["weight"] = 0.0
    with pytest.raises(InputError, match="positive"):
        generate_walks(to_csr(graph), walks_per_node=1, walk_length=3, p=1, q=1, seed=0)
