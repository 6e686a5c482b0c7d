"""Role measures checked against outside references.

References used below:
- bctpy (Brain Connectivity Toolbox for Python; Rubinov & Sporns, NeuroImage 2010):
  ``participation_coef`` and ``module_degree_zscore``.
- networkx: ``betweenness_centrality`` (with weights also on exact ``Fraction``
  distances, so equal path lengths are equal), ``constraint``, ``effective_size``.
- Brute-force removal counts (remove the node, search again) for dependents.
- Zachary's karate club (Zachary 1977), bundled with networkx.
- Region bounds: Guimera & Amaral, Nature 433:895 (2005).
"""

from __future__ import annotations

import math
import random
from fractions import Fraction

import bct
import networkx as nx
import numba
import numpy as np
import pytest

from roles.analysis.measures import (
    EXACT_LIMIT,
    HUB_P,
    HUB_Z,
    NON_HUB_P,
    ROLE_REGIONS,
    betweenness,
    betweenness_sources,
    dependents,
    high_betweenness,
    participation_coefficient,
    rank_bridges,
    rank_hubs,
    rank_traffic,
    role_region,
    role_table,
    structural_holes,
    within_module_z,
)
from roles.analysis.measures._ties import _ties
from roles.analysis.measures.betweenness import _adjacency, _estimates
from roles.errors import InputError
from roles.report import figures

SEEDS = [0, 1, 2, 3, 4]


def _les_mis():
    # Knuth (1993) co-appearance network, weighted; partition fixed by networkx's
    # deterministic greedy modularity communities.
    G = nx.les_miserables_graph()
    parts = nx.community.greedy_modularity_communities(G, weight="weight")
    return G, {v: i for i, part in enumerate(parts) for v in part}


def _random_weighted_digraph(seed: int, n: int = 60, m: int = 220) -> nx.DiGraph:
    rng = np.random.default_rng(seed)
    G = nx.gnm_random_graph(n, m, directed=True, seed=seed)
    for u, v in G.edges():
        G[u][v]["weight"] = float(rng.integers(1, 6))
    return G


def _as_array(values: dict, nodes: list) -> np.ndarray:
    return np.array([values[v] for v in nodes])


# ------------------------------------------------------------------- P and z vs bctpy


@pytest.mark.filterwarnings("ignore:invalid value encountered:RuntimeWarning")  # bctpy's 0/0
@pytest.mark.parametrize("weight", ["weight", None])
def test_participation_and_z_match_bctpy_undirected(weight):
    G, comm = _les_mis()
    nodes = list(G)
    W = nx.to_numpy_array(G, nodelist=nodes, weight=weight)
    ci = np.array([comm[v] for v in nodes])
    # Expected values: bctpy participation_coef / module_degree_zscore (flag 0).
    np.testing.assert_allclose(
        _as_array(participation_coefficient(G, comm, weight=weight), nodes),
        bct.participation_coef(W, ci),
        atol=1e-12,
    )
    np.testing.assert_allclose(
        _as_array(within_module_z(G, comm, weight=weight), nodes),
        bct.module_degree_zscore(W, ci, flag=0),
        atol=1e-12,
    )


@pytest.mark.parametrize("seed", SEEDS[:3])
def test_participation_and_z_match_bctpy_directed_total_degree(seed):
    G = _random_weighted_digraph(seed)
    nodes = list(G)
    comm = {v: v % 4 for v in nodes}
    W = nx.to_numpy_array(G, nodelist=nodes, weight="weight")
    ci = np.array([comm[v] for v in nodes])
    # Our directed convention is total degree (in + out): bctpy on W + W.T, and
    # module_degree_zscore flag=3 ("directed graph in and out degree").
    np.testing.assert_allclose(
        _as_array(participation_coefficient(G, comm), nodes),
        bct.participation_coef(W + W.T, ci),
        atol=1e-12,
    )
    np.testing.assert_allclose(
        _as_array(within_module_z(G, comm), nodes),
        bct.module_degree_zscore(W, ci, flag=3),
        atol=1e-12,
    )


def test_participation_hand_values():
    # From the definition P = 1 - sum_s (k_is / k_i)^2 (Guimera & Amaral 2005):
    # the centre of a star with two leaves in each of two other communities has
    # P = 1 - (2/4)^2 - (2/4)^2 = 0.5; a leaf has P = 0.
    G = nx.star_graph(4)
    comm = {0: "c", 1: "a", 2: "a", 3: "b", 4: "b"}
    P = participation_coefficient(G, comm)
    assert P[0] == pytest.approx(0.5)
    assert P[1] == 0.0
    # An isolated node has P = 0 (bctpy's convention for nodes without ties).
    G.add_node(9)
    comm[9] = "a"
    assert participation_coefficient(G, comm)[9] == 0.0


def test_missing_community_and_bad_weight_are_refused():
    G = nx.path_graph(3)
    with pytest.raises(InputError, match="no community"):
        participation_coefficient(G, {0: 0, 1: 0})
    G[0][1]["weight"] = -2.0
    with pytest.raises(InputError, match="positive"):
        within_module_z(G, dict.fromkeys(G, 0))


# ------------------------------------------------------------------------ regions


@pytest.mark.parametrize(
    ("z", "P", "region"),
    [
        # Bounds of Guimera & Amaral (2005); ours are inclusive upper bounds.
        (2.4999, 0.0, "R1"),
        (2.4999, 0.05, "R1"),
        (2.4999, 0.0501, "R2"),
        (-1.0, 0.62, "R2"),
        (0.0, 0.6201, "R3"),
        (0.0, 0.80, "R3"),
        (0.0, 0.8001, "R4"),
        (2.5, 0.0, "R5"),
        (2.5, 0.30, "R5"),
        (2.5, 0.3001, "R6"),
        (7.0, 0.75, "R6"),
        (2.5, 0.7501, "R7"),
        (2.5, 1.0, "R7"),
    ],
)
def test_role_region_boundaries(z, P, region):
    assert role_region(z, P) == region


def test_role_region_tolerates_rounding_at_a_bound():
    # 1 - 0.95 is 0.05000000000000004 in floating point; still on the bound.
    assert role_region(0.0, 1 - 0.95) == "R1"
    # Message shape of the configuration's errors (scikit-learn's).
    with pytest.raises(
        ValueError, match=r"^The 'z' parameter of role_region must be a finite number\. Got nan"
    ):
        role_region(float("nan"), 0.1)
    with pytest.raises(ValueError, match=r"^The 'P' parameter of role_region .* Got inf instead"):
        role_region(0.0, math.inf)


def test_region_table_is_the_one_role_region_reads_and_the_role_map_draws():
    # Published bounds (Guimera & Amaral 2005): non-hubs split at P = 0.05, 0.62, 0.80,
    # hubs at 0.30, 0.75, hubs from z = 2.5.
    assert (HUB_Z, NON_HUB_P, HUB_P) == (2.5, (0.05, 0.62, 0.80), (0.30, 0.75))
    assert [code for code, _, _ in ROLE_REGIONS] == [f"R{i}" for i in range(1, 8)]
    for code, (z0, _), (p0, p1) in ROLE_REGIONS:
        z = 3.0 if z0 == HUB_Z else 0.0
        assert role_region(z, (p0 + p1) / 2) == code  # the middle of each region
        assert role_region(z, p1) == code  # upper bounds belong to the region
    drawn = [(z, p) for _, z, p in figures.ROLE_REGIONS]
    assert drawn == [(z, p) for _, z, p in ROLE_REGIONS]


# -------------------------------------------------------------------- betweenness


def _exact_distance(weight: str = "weight"):
    # networkx run on exact rationals: distance = 1 / weight as a Fraction, so equal
    # path lengths compare equal (the meaning of shortest paths, without rounding).
    return lambda u, v, d: Fraction(1) / Fraction(d.get(weight, 1))


def _float_distance(u, v, d):
    return 1.0 / d["weight"]


def _assert_same(values: dict, expected: dict, tol: float = 1e-12) -> None:
    assert values.keys() == expected.keys()
    for v in expected:
        assert values[v] == pytest.approx(float(expected[v]), abs=tol), v


def _with_weights(G: nx.Graph, seed: int, high: int = 5) -> nx.Graph:
    rng = np.random.default_rng(seed)
    for u, v in G.edges():
        G[u][v]["weight"] = int(rng.integers(1, high + 1))
    return G


@pytest.mark.parametrize("directed", [False, True])
def test_betweenness_exact_matches_networkx(directed):
    G = nx.gnm_random_graph(80, 240, directed=directed, seed=7)
    values, info = betweenness(G, exact_limit=EXACT_LIMIT, seed=0)
    expected = nx.betweenness_centrality(G)  # reference: networkx, normalized=True
    assert info.method == "exact" and info.k == 80 and info.expected_error == 0.0
    assert not info.weighted
    _assert_same(values, expected)


@pytest.mark.parametrize("weight", ["weight", None])
def test_betweenness_karate_matches_networkx(weight):
    # Zachary's karate club with its recorded tie strengths (1-7), bundled with networkx.
    G = nx.karate_club_graph()
    values, info = betweenness(G, exact_limit=EXACT_LIMIT, seed=0, weight=weight)
    assert info.weighted == (weight is not None)
    # Reference: networkx; with weights on exact fractions (distance = 1 / weight).
    if weight is None:
        expected = nx.betweenness_centrality(G)
    else:
        expected = nx.betweenness_centrality(G, weight=_exact_distance())
    _assert_same(values, expected)


def test_betweenness_les_miserables_weighted_matches_networkx():
    G, _ = _les_mis()
    values, info = betweenness(G, exact_limit=EXACT_LIMIT, seed=0)
    assert info.weighted
    # Reference: networkx with distance = 1 / weight, on floats and on exact fractions
    # (they agree on this graph: no tie of path lengths is split by rounding).
    _assert_same(values, nx.betweenness_centrality(G, weight=_float_distance))
    _assert_same(values, nx.betweenness_centrality(G, weight=_exact_distance()))
    # With weight=None the step-count betweenness of networkx comes back.
    unweighted, info = betweenness(G, exact_limit=EXACT_LIMIT, seed=0, weight=None)
    assert not info.weighted
    _assert_same(unweighted, nx.betweenness_centrality(G))


@pytest.mark.parametrize("seed", SEEDS[:3])
@pytest.mark.parametrize("weight", ["weight", None])
def test_betweenness_random_directed_matches_networkx(seed, weight):
    G = _with_weights(nx.gnm_random_graph(70, 260, directed=True, seed=seed), seed)
    G.add_edge(3, 3, weight=1)  # a self-loop lies on no shortest path
    G.add_node("alone")
    values, _ = betweenness(G, exact_limit=EXACT_LIMIT, seed=0, weight=weight)
    # Reference: networkx (successors only: directed paths), exact fractions with weights.
    nx_weight = None if weight is None else _exact_distance()
    _assert_same(values, nx.betweenness_centrality(G, weight=nx_weight))


@pytest.mark.parametrize("seed", SEEDS[:3])
def test_betweenness_random_undirected_weighted_matches_networkx(seed):
    # Weights 1-5 make many path lengths equal in exact arithmetic and unequal after
    # rounding; networkx on fractions is the reference.
    G = _with_weights(nx.gnm_random_graph(70, 200, seed=seed), seed)
    values, _ = betweenness(G, exact_limit=EXACT_LIMIT, seed=0)
    _assert_same(values, nx.betweenness_centrality(G, weight=_exact_distance()))


def test_betweenness_equal_length_paths_split_by_rounding():
    # Ring s-a-b-t-c-s with strengths 2, 3, 6, 2, 2: lengths 1/2, 1/3, 1/6, 1/2, 1/2.
    # From s to t both ways are 1 long (1/2 + 1/3 + 1/6 = 1/2 + 1/2), so c carries half
    # of the pair (s, t) and nothing else (by hand: every other pair has one shortest
    # way round): b(c) = 2 * 1/2 / ((n - 1)(n - 2)) = 1 / 12 for n = 5.
    G = nx.Graph()
    G.add_weighted_edges_from(
        [("s", "a", 2), ("a", "b", 3), ("b", "t", 6), ("t", "c", 2), ("c", "s", 2)]
    )
    assert 1 / 2 + 1 / 3 + 1 / 6 != 1 / 2 + 1 / 2  # floating point splits the tie
    values, _ = betweenness(G, exact_limit=EXACT_LIMIT, seed=0)
    assert values["c"] == pytest.approx(1 / 12, abs=1e-15)
    _assert_same(values, nx.betweenness_centrality(G, weight=_exact_distance()))


def test_betweenness_equal_length_paths_in_exact_floats_match_networkx():
    # Strengths 1, 2 and 4 give lengths 1, 1/2 and 1/4, whose sums are exact in binary
    # floating point: many equally short paths on a grid, and networkx on floats agrees.
    G = nx.convert_node_labels_to_integers(nx.grid_2d_graph(6, 6))
    rng = np.random.default_rng(4)
    for u, v in G.edges():
        G[u][v]["weight"] = float(rng.choice([1, 2, 4]))
    values, _ = betweenness(G, exact_limit=EXACT_LIMIT, seed=0)
    _assert_same(values, nx.betweenness_centrality(G, weight=_float_distance))
    # Counting steps on the grid (C(10, 5) = 252 shortest paths corner to corner).
    steps, _ = betweenness(G, exact_limit=EXACT_LIMIT, seed=0, weight=None)
    _assert_same(steps, nx.betweenness_centrality(G))


def test_betweenness_cycle_hand_value():
    # A 4-cycle: opposite nodes are joined by two shortest paths, each through one
    # of the other two nodes, so each node carries half of one pair, counted in both
    # directions: b = 2 * 1/2 / (3 * 2) = 1/6 (Freeman's definition, by hand).
    values, _ = betweenness(nx.cycle_graph(4), exact_limit=EXACT_LIMIT, seed=0)
    assert values == pytest.approx(dict.fromkeys(range(4), 1 / 6), abs=1e-15)


def test_betweenness_tiny_graphs():
    # Fewer than three nodes: no node lies between two others (networkx gives 0).
    assert betweenness(nx.Graph(), exact_limit=10, seed=0)[0] == {}
    assert betweenness(nx.path_graph(2), exact_limit=10, seed=0)[0] == {0: 0.0, 1: 0.0}
    star = nx.star_graph(3)  # centre on all 3 pairs of leaves: b = 6 / (3 * 2) = 1
    assert betweenness(star, exact_limit=10, seed=0)[0] == {0: 1.0, 1: 0.0, 2: 0.0, 3: 0.0}


@pytest.mark.parametrize("directed", [False, True])
def test_betweenness_sample_scaling_matches_networkx(directed):
    # Same sources as networkx draws for k=30, seed=11 (random.Random(11).sample over the
    # node list, networkx 3.6): the scaled sums must equal networkx's k-sample estimate.
    G = _with_weights(nx.gnm_random_graph(90, 300, directed=directed, seed=2), 2)
    drawn = random.Random(11).sample(list(G), 30)
    reference = nx.betweenness_centrality(G, k=30, seed=11)
    ties = _ties(G, None)
    est = _estimates(_adjacency(ties, False), False, [np.asarray(drawn)])[0]
    _assert_same(dict(zip(ties.nodes, est.tolist(), strict=True)), reference)


def test_betweenness_same_values_for_any_thread_count():
    if numba.config.NUMBA_NUM_THREADS < 2:
        pytest.skip("numba has a single thread here")
    G = _with_weights(nx.barabasi_albert_graph(300, 3, seed=1), 1)
    before = numba.get_num_threads()
    try:
        numba.set_num_threads(1)
        one = betweenness(G, exact_limit=100, seed=5, samples=120)
        numba.set_num_threads(2)
        two = betweenness(G, exact_limit=100, seed=5, samples=120)
    finally:
        numba.set_num_threads(before)
    assert one == two  # bit for bit, info included


def test_betweenness_default_sample_size():
    G = nx.barabasi_albert_graph(1200, 2, seed=3)
    # Default sources: exact_limit**2 / n, at least 1,000, at most n (our rule).
    _, info = betweenness(G, exact_limit=500, seed=0, weight=None)
    assert (info.method, info.k, info.batches) == ("sampled", 1000, 10)
    _, info = betweenness(G, exact_limit=1150, seed=0, weight=None)
    assert (info.method, info.k) == ("sampled", math.ceil(1150**2 / 1200))
    _, info = betweenness(nx.path_graph(900), exact_limit=500, seed=0)
    assert info.method == "exact"  # 1,000 sources would be more than the nodes
    with pytest.raises(
        ValueError,
        match=r"^The 'samples' parameter of betweenness must be None or a whole number of at "
        r"least 2\. Got 1 instead\.$",
    ):
        betweenness(G, exact_limit=10, seed=0, samples=1)
    with pytest.raises(ValueError, match=r"'samples' parameter .* Got 2\.5 instead"):
        betweenness(G, exact_limit=10, seed=0, samples=2.5)


def test_betweenness_sources_is_the_default_of_betweenness_and_role_table():
    # Our rule: exact up to exact_limit, then exact_limit**2 / n sources, at least 1,000.
    assert betweenness_sources(EXACT_LIMIT) is None
    assert betweenness_sources(20_000) == math.ceil(EXACT_LIMIT**2 / 20_000) == 1250
    assert betweenness_sources(1_000_000) == 1000
    assert betweenness_sources(900, exact_limit=500) is None  # 1,000 sources > 900 nodes
    G = nx.barabasi_albert_graph(1200, 2, seed=3)
    comm = {v: v % 7 for v in G}
    k = betweenness_sources(len(G), exact_limit=500)
    assert k == 1000
    default = role_table(G, comm, exact_limit=500, seed=4)
    given = role_table(G, comm, exact_limit=500, seed=4, samples=k)
    assert default.equals(given)
    assert default.attrs["betweenness"] == given.attrs["betweenness"]
    assert given.attrs["betweenness"].k == 1000
    exact = role_table(G, comm, exact_limit=500, seed=4, samples=len(G))
    assert exact.attrs["betweenness"].method == "exact"
    small = nx.karate_club_graph()
    none = role_table(small, dict.fromkeys(small, 0), samples=betweenness_sources(len(small)))
    assert none.equals(role_table(small, dict.fromkeys(small, 0)))


def test_betweenness_sampled_estimate_within_its_stated_error():
    G = nx.barabasi_albert_graph(400, 3, seed=5)
    exact = nx.betweenness_centrality(G)  # reference: networkx exact
    values, info = betweenness(G, exact_limit=100, seed=3, samples=200)
    assert info.method == "sampled" and info.k == 200 and info.batches == 10
    assert info.expected_error > 0
    assert info.error_bound == pytest.approx(math.sqrt(math.log(40) / 400))
    err = np.array([values[v] - exact[v] for v in G])
    # Hoeffding's 95% half-width is a bound for each node; allow the few % of nodes
    # that may exceed it, and no node beyond four times the batch standard error.
    assert np.mean(np.abs(err) > info.error_bound) <= 0.05
    assert np.abs(err).max() <= 4 * info.expected_error
    # Same seed, same estimate.
    again, _ = betweenness(G, exact_limit=100, seed=3, samples=200)
    assert again == values


# --------------------------------------------------------------- structural holes


@pytest.mark.parametrize(
    ("graph", "weight"),
    [
        ("les_mis", "weight"),
        ("les_mis", None),
        ("digraph", "weight"),
        ("digraph", None),
        ("karate", None),
    ],
)
def test_structural_holes_match_networkx(graph, weight):
    if graph == "les_mis":
        G, _ = _les_mis()
    elif graph == "digraph":
        G = _random_weighted_digraph(11)
    else:
        G = nx.karate_club_graph()
    G.add_node("alone")
    constraint, esize = structural_holes(G, weight=weight)
    # Reference: networkx constraint (all nodes) and effective_size computed node by
    # node (nodes=list(G)). networkx 3.6's all-nodes effective_size normalises by the
    # column maximum instead of the row maximum for weighted or directed graphs
    # (networkx pull request #8906), so its per-node path is the reference here.
    nx_c = nx.constraint(G, weight=weight)
    nx_e = nx.effective_size(G, nodes=list(G), weight=weight)
    if G.is_directed():
        # The per-node path calls a node with in-ties only "isolated" (it looks at
        # successors; networkx issue #2661). Mutual weights do not depend on direction,
        # so such nodes are checked on the reversed graph.
        back = nx.effective_size(G.reverse(), nodes=list(G), weight=weight)
        nx_e = {v: back[v] if math.isnan(nx_e[v]) else nx_e[v] for v in G}
    for v in G:
        if v == "alone":
            assert math.isnan(constraint[v]) and math.isnan(esize[v])
            continue
        assert constraint[v] == pytest.approx(nx_c[v], abs=1e-12)
        assert esize[v] == pytest.approx(nx_e[v], abs=1e-12)


def test_structural_holes_of_a_hub_with_many_leaves():
    # Burt (1992): a star centre with n unconnected contacts has effective size n and
    # constraint n * (1/n)^2 = 1/n; each leaf has constraint 1 and effective size 1.
    G = nx.star_graph(500)
    constraint, esize = structural_holes(G)
    assert constraint[0] == pytest.approx(1 / 500)
    assert esize[0] == pytest.approx(500)
    assert constraint[1] == pytest.approx(1.0) and esize[1] == pytest.approx(1.0)


# --------------------------------------------------------------------- dependents


def _brute_directed(G: nx.DiGraph) -> dict:
    # Origins: every node of a strongly connected group that nothing outside supplies
    # (for acyclic parts these are the nodes without suppliers).
    cond = nx.condensation(G)
    origins = {v for c in cond if cond.in_degree(c) == 0 for v in cond.nodes[c]["members"]}

    def reached(H, starts):
        seen = set()
        for s in starts:
            if s in H and s not in seen:
                seen |= {s} | nx.descendants(H, s)
        return seen

    before = reached(G, origins)
    out = {}
    for v in G:
        H = G.copy()
        H.remove_node(v)
        out[v] = len(before - {v} - reached(H, origins - {v}))
    return out


def _brute_undirected(G: nx.Graph) -> dict:
    out = {}
    for v in G:
        comp = nx.node_connected_component(G, v)
        H = G.subgraph(comp - {v})
        largest = max((len(c) for c in nx.connected_components(H)), default=0)
        out[v] = len(comp) - 1 - largest
    return out


@pytest.mark.parametrize("seed", SEEDS)
def test_dependents_directed_acyclic_matches_removal(seed):
    # Supply web without cycles: ties from lower to higher index, so every node is
    # reachable from a node without suppliers (the definition of issue 4 applies).
    rng = np.random.default_rng(seed)
    G = nx.DiGraph()
    G.add_nodes_from(range(50))
    for v in range(1, 50):
        for u in rng.choice(v, size=min(v, int(rng.integers(1, 3))), replace=False):
            G.add_edge(int(u), v)
    assert dependents(G) == _brute_directed(G)


@pytest.mark.parametrize("seed", SEEDS)
def test_dependents_directed_with_cycles_matches_removal(seed):
    G = nx.gnm_random_graph(45, 70, directed=True, seed=seed)
    G.add_edges_from([(100, 101), (101, 102), (102, 100), (102, 103)])  # sourceless cycle
    result = dependents(G)
    assert result == _brute_directed(G)
    assert result[102] == 1  # 103 hangs below the cycle by 102 alone


@pytest.mark.parametrize("seed", SEEDS)
def test_dependents_undirected_matches_removal(seed):
    G = nx.gnm_random_graph(60, 75, seed=seed)  # sparse: many cut vertices
    G.add_edge(200, 200)  # a self-loop changes nothing
    assert dependents(G) == _brute_undirected(G)


def test_dependents_small_worked_examples():
    # Path 0-1-2-3-4: removing 2 leaves two pieces of 2, so 2 nodes fall outside the
    # largest; removing 1 cuts off node 0.
    assert dependents(nx.path_graph(5)) == {0: 0, 1: 1, 2: 2, 3: 1, 4: 0}
    # Supplier s feeds a and b; both feed c: s dominates all three, a and b nobody.
    G = nx.DiGraph([("s", "a"), ("s", "b"), ("a", "c"), ("b", "c")])
    assert dependents(G) == {"s": 3, "a": 0, "b": 0, "c": 0}


# --------------------------------------------------------------------- role table


@pytest.mark.parametrize("weight", ["weight", None])
def test_karate_faction_leaders_lead_the_hub_list(weight):
    # Zachary (1977): members 0 and 33 led the two factions recorded in `club`.
    G = nx.karate_club_graph()
    club = {v: G.nodes[v]["club"] for v in G}
    table = role_table(G, club, weight=weight)
    assert list(table.columns) == [
        "betweenness",
        "participation",
        "within_z",
        "constraint",
        "effective_size",
        "dependents",
        "region",
        "role",
    ]
    assert set(rank_hubs(table)[:2]) == {0, 33}
    assert table.attrs["betweenness"].method == "exact"


def test_bridge_needs_ties_outside_its_community():
    # Two five-cliques joined through node 10; node 4 (clique A) carries every path
    # to the other side but all its ties stay inside community A (P = 0).
    G = nx.complete_graph(5)
    G.add_edges_from(nx.complete_graph(range(5, 10)).edges())
    G.add_edges_from([(4, 10), (10, 5)])
    comm = {v: "A" if v < 5 or v == 10 else "B" for v in G}
    table = role_table(G, comm)
    b = nx.betweenness_centrality(G)  # reference for "high betweenness": networkx
    assert b[4] >= b[5] > 0
    assert table.loc[4, "participation"] == 0.0
    assert table.loc[4, "role"] != "bridge-like"
    # 10 (ties 1 A + 1 B, P = 0.5) and 5 (4 B + 1 A, P = 1 - 0.8^2 - 0.2^2 = 0.32)
    # pass the P > 0.30 test and are in the top decile of betweenness.
    assert rank_bridges(table) == [10, 5]
    assert rank_bridges(table, top=1) == [10]


def test_role_labels_for_nodes_without_ties_and_single_tie_nodes():
    G = nx.path_graph(3)
    G.add_node(9)
    G.add_edge(7, 7)  # a self-loop is not a tie to anyone
    table = role_table(G, dict.fromkeys(G, 0))
    # One name for nodes without ties, the one the report and nodes.csv use.
    assert table.loc[9, "role"] == "no ties"
    assert table.loc[7, "role"] == "no ties"
    assert table.loc[0, "role"] == "peripheral"
    assert table.loc[1, "dependents"] == 1


@pytest.mark.parametrize("share", [0, 0.0, 1.5, -0.1, float("nan"), True, "0.1", None])
def test_shares_outside_0_1_are_refused_in_the_config_message_shape(share):
    # A share of nodes must lie in (0, 1]; 1.5 used to fail with an IndexError and 0
    # used to keep the top node silently.
    G = nx.karate_club_graph()
    table = role_table(G, dict.fromkeys(G, 0))
    shape = r"^The 'share' parameter of {} must be a number greater than 0 and at most 1\. Got "
    with pytest.raises(ValueError, match=shape.format("high_betweenness")):
        high_betweenness(dict(table["betweenness"]), share)
    with pytest.raises(ValueError, match=shape.format("rank_traffic")):
        rank_traffic(table, share)
    with pytest.raises(ValueError, match=r"^The 'bridge_share' parameter of role_table"):
        role_table(G, dict.fromkeys(G, 0), bridge_share=share)


def test_share_of_one_keeps_every_node_with_betweenness():
    b = {"a": 0.5, "b": 0.1, "c": 0.0}
    assert high_betweenness(b, 1.0) == {"a": True, "b": True, "c": False}  # 0 never counts


@pytest.mark.parametrize("top", [-1, 1.5, True])
def test_rank_top_must_be_a_whole_number(top):
    G = nx.karate_club_graph()
    table = role_table(G, dict.fromkeys(G, 0))
    with pytest.raises(ValueError, match=r"^The 'top' parameter of rank_hubs must be None or a"):
        rank_hubs(table, top)
    with pytest.raises(ValueError, match=r"^The 'top' parameter of rank_bridges"):
        rank_bridges(table, top)
    assert rank_hubs(table, 0) == []
