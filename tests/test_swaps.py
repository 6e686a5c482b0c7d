"""Degree-preserving double edge swaps (roles.analysis.swaps) against exact and networkx references.

Sources of the expected answers:
- The move is that of Milo et al. (arXiv:cond-mat/0312028, 2003) as networkx's
  ``double_edge_swap`` makes it: two ties a-b, c-d (uniform, random orientation) become
  a-c, b-d unless that makes a self-loop or an existing tie.
- Degrees and simplicity are checked against networkx (``degree``); the CSR layout of
  the swapped ties against scipy's CSR of networkx's adjacency matrix.
- Distributions: the simple graphs with a given degree sequence are enumerated by brute
  force over edge subsets (and, for the 2-regular case, counted by hand), and the exact
  distribution of the swap chain is computed by enumerating every pick of two oriented
  ties (the chain's definition above), independently of the compiled code. Counted in
  tries, the chain is symmetric, so its stationary distribution is uniform (Milo et al.
  2003; Taylor 1981 for connectedness); stopped after a number of *made* swaps, as
  networkx stops, it is not quite uniform, and networkx's own output is compared with
  the same exact figures.
"""

from __future__ import annotations

import itertools
from collections import Counter

import networkx as nx
import numpy as np
import pytest
from scipy.stats import chisquare

from roles.analysis.swaps import double_edge_swap
from roles.embedding.graph import csr_arrays


def _ties(g: nx.Graph) -> tuple[np.ndarray, np.ndarray, int]:
    g = nx.convert_node_labels_to_integers(g)
    e = np.asarray(list(g.edges()), dtype=np.int64).reshape(-1, 2)
    return e[:, 0], e[:, 1], g.number_of_nodes()


def _as_set(u: np.ndarray, v: np.ndarray) -> frozenset[tuple[int, int]]:
    return frozenset(zip(np.minimum(u, v).tolist(), np.maximum(u, v).tolist(), strict=True))


GRAPHS = {
    "karate": nx.karate_club_graph(),  # networkx's bundled Zachary (1977) network
    "scale-free": nx.barabasi_albert_graph(500, 3, seed=2),
    "sparse random": nx.gnm_random_graph(400, 1200, seed=3),
    # Half of all possible ties present: most picks hit an existing tie, so the hash
    # table's lookups and deletions are exercised on long probe runs.
    "dense": nx.gnm_random_graph(60, 885, seed=4),
    "star and ring": nx.compose(nx.star_graph(40), nx.cycle_graph(41)),
}


@pytest.mark.parametrize("name", list(GRAPHS))
def test_degrees_kept_and_graph_stays_simple(name):
    u, v, n = _ties(GRAPHS[name])
    r = double_edge_swap(u, v, n_nodes=n, nswap=10 * len(u), max_tries=10**7, seed=1)
    # Degrees exactly as before (networkx's degree of the input graph).
    want = np.bincount(np.r_[u, v], minlength=n)
    assert np.array_equal(np.bincount(np.r_[r.u, r.v], minlength=n), want)
    assert not np.any(r.u == r.v)  # no self-loops
    assert len(_as_set(r.u, r.v)) == len(u)  # no tie twice
    assert r.swaps <= r.tries


def test_input_arrays_are_left_alone():
    u, v, n = _ties(GRAPHS["karate"])
    u0, v0 = u.copy(), v.copy()
    double_edge_swap(u, v, n_nodes=n, nswap=100, max_tries=10_000, seed=0)
    assert np.array_equal(u, u0) and np.array_equal(v, v0)


def test_graph_actually_changes():
    # After 10 swaps per tie a sparse random graph keeps few of its ties: under the
    # uniform distribution a tie u-v is present with probability about
    # k_u k_v / 2m (configuration model, Newman 2010, eq. 13.40), here about 0.6%.
    u, v, n = _ties(GRAPHS["sparse random"])
    r = double_edge_swap(u, v, n_nodes=n, nswap=10 * len(u), max_tries=10**7, seed=5)
    assert r.swaps == 10 * len(u)
    kept = len(_as_set(u, v) & _as_set(r.u, r.v)) / len(u)
    assert kept < 0.05


def test_same_seed_same_result_other_seed_other_result():
    u, v, n = _ties(GRAPHS["scale-free"])
    a = double_edge_swap(u, v, n_nodes=n, nswap=3000, max_tries=10**6, seed=7)
    b = double_edge_swap(u, v, n_nodes=n, nswap=3000, max_tries=10**6, seed=7)
    c = double_edge_swap(u, v, n_nodes=n, nswap=3000, max_tries=10**6, seed=8)
    assert np.array_equal(a.u, b.u) and np.array_equal(a.v, b.v) and a.tries == b.tries
    assert _as_set(a.u, a.v) != _as_set(c.u, c.v)


def test_complete_graph_allows_no_swap():
    # K_n is the only simple graph with its degrees: every try meets an existing tie.
    u, v, n = _ties(nx.complete_graph(7))
    r = double_edge_swap(u, v, n_nodes=n, nswap=50, max_tries=400, seed=0)
    assert r.swaps == 0 and r.tries == 400
    assert _as_set(r.u, r.v) == _as_set(u, v)


def test_bad_ties_are_refused():
    with pytest.raises(ValueError, match="self-loop"):
        double_edge_swap([0, 1], [1, 1], n_nodes=3, nswap=1, max_tries=10, seed=0)
    with pytest.raises(ValueError, match="repeats"):
        double_edge_swap([0, 2, 1], [1, 3, 0], n_nodes=4, nswap=1, max_tries=10, seed=0)
    with pytest.raises(ValueError, match="0 .. 3"):
        double_edge_swap([0, 2], [1, 4], n_nodes=4, nswap=1, max_tries=10, seed=0)
    with pytest.raises(ValueError, match="at least 2"):
        double_edge_swap([0], [1], n_nodes=2, nswap=1, max_tries=10, seed=0)


def test_csr_of_swapped_ties_matches_scipy():
    g = GRAPHS["scale-free"]
    u, v, n = _ties(g)
    r = double_edge_swap(u, v, n_nodes=n, nswap=2000, max_tries=10**6, seed=3)
    indptr, indices, _ = csr_arrays(r.u, r.v, n, directed=False)
    h = nx.Graph()
    h.add_nodes_from(range(n))
    h.add_edges_from(zip(r.u.tolist(), r.v.tolist(), strict=True))
    want = nx.to_scipy_sparse_array(h, nodelist=range(n), format="csr")  # networkx + scipy
    want.sort_indices()
    assert np.array_equal(indptr, want.indptr) and np.array_equal(indices, want.indices)
    assert indptr.dtype == np.int64 and indices.dtype == np.int32


# --------------------------------------------------------------------------------------
# Distributions on tiny degree sequences, against exact figures
# --------------------------------------------------------------------------------------


def _realisations(degrees: tuple[int, ...]) -> list[frozenset[tuple[int, int]]]:
    """Every simple graph on nodes 0..n-1 with these degrees (brute force)."""
    n, m = len(degrees), sum(degrees) // 2
    out = []
    for ties in itertools.combinations(itertools.combinations(range(n), 2), m):
        if tuple(np.bincount(np.ravel(ties), minlength=n)) == degrees:
            out.append(frozenset(ties))
    return out


def _exact_chain(states: list[frozenset]) -> tuple[np.ndarray, np.ndarray]:
    """Per-swap and per-try transition matrices of the double edge swap chain.

    Every ordered pick of two oriented ties (a, b), (c, d) is enumerated: picks with
    a == c or b == d are skipped (no try, as in networkx), picks whose a-c or b-d exists
    are tries that change nothing, the others swap.
    """
    index = {s: i for i, s in enumerate(states)}
    k = len(states)
    moves = np.zeros((k, k))
    tries = np.zeros(k)
    for s in states:
        oriented = [*s, *((b, a) for a, b in s)]
        for (a, b), (c, d) in itertools.product(oriented, repeat=2):
            if a == c or b == d:
                continue
            tries[index[s]] += 1
            ac, bd = (min(a, c), max(a, c)), (min(b, d), max(b, d))
            if ac in s or bd in s:
                continue
            t = (s - {(min(a, b), max(a, b)), (min(c, d), max(c, d))}) | {ac, bd}
            moves[index[s], index[t]] += 1
    per_swap = moves / moves.sum(axis=1, keepdims=True)
    per_try = moves / tries[:, None]
    per_try[np.arange(k), np.arange(k)] += 1 - moves.sum(axis=1) / tries
    return per_swap, per_try


def _histogram(samples: list[frozenset], states: list[frozenset]) -> np.ndarray:
    counts = Counter(samples)
    assert set(counts) <= set(states)  # every sample has the degrees and is simple
    return np.array([counts[s] for s in states], dtype=float)


def test_two_regular_six_nodes_uniform_when_counted_in_tries():
    # By hand: a 2-regular graph on 6 labelled nodes is a hexagon (6!/(2*6) = 60 of
    # them) or two triangles (C(6,3)/2 = 10): 70 graphs, each 1/70 under the uniform
    # distribution, two triangles with probability 10/70 = 1/7.
    states = _realisations((2,) * 6)
    assert len(states) == 70
    triangles = [s for s in states if not nx.is_connected(nx.Graph(list(s)))]
    assert len(triangles) == 10
    _, per_try = _exact_chain(states)
    start = frozenset({(0, 1), (1, 2), (2, 3), (3, 4), (4, 5), (0, 5)})  # a hexagon
    tries = 300  # stop on tries, not on swaps made: the symmetric (uniform) chain
    exact = np.linalg.matrix_power(per_try, tries)[states.index(start)]
    assert np.allclose(exact, 1 / 70, atol=1e-9)  # mixed: the reference is uniform
    u = np.array([a for a, _ in sorted(start)])
    v = np.array([b for _, b in sorted(start)])
    runs = 14_000
    samples = []
    for seed in range(runs):
        r = double_edge_swap(u, v, n_nodes=6, nswap=10**6, max_tries=tries, seed=seed)
        samples.append(_as_set(r.u, r.v))
    observed = _histogram(samples, states)
    assert chisquare(observed, runs * exact).pvalue > 1e-3
    share = observed[[states.index(s) for s in triangles]].sum() / runs
    assert share == pytest.approx(1 / 7, abs=4 * np.sqrt((1 / 7) * (6 / 7) / runs))


def test_stopped_after_made_swaps_matches_exact_chain_and_networkx():
    # Stopped after nswap swaps made (networkx's rule), the chain samples graphs in
    # proportion to how many swaps they allow, not uniformly. Degree sequence
    # (3, 3, 2, 2, 1, 1): 17 simple graphs (brute force).
    degrees = (3, 3, 2, 2, 1, 1)
    states = _realisations(degrees)
    assert len(states) == 17
    per_swap, _ = _exact_chain(states)
    start = states[0]
    nswap = 12
    exact = np.linalg.matrix_power(per_swap, nswap)[states.index(start)]
    assert np.abs(exact - 1 / 17).max() > 0.01  # visibly not uniform: the test can tell
    u = np.array([a for a, _ in sorted(start)])
    v = np.array([b for _, b in sorted(start)])
    runs = 8_000
    ours = []
    for seed in range(runs):
        r = double_edge_swap(u, v, n_nodes=6, nswap=nswap, max_tries=10**6, seed=seed)
        assert r.swaps == nswap
        ours.append(_as_set(r.u, r.v))
    observed = _histogram(ours, states)
    assert chisquare(observed, runs * exact).pvalue > 1e-3
    # networkx's double_edge_swap, same start and swaps, against the same figures.
    nx_runs = 1_500
    theirs = []
    for seed in range(nx_runs):
        g = nx.Graph(sorted(start))
        nx.double_edge_swap(g, nswap=nswap, max_tries=10**6, seed=seed)
        theirs.append(frozenset(tuple(sorted(e)) for e in g.edges()))
    assert chisquare(_histogram(theirs, states), nx_runs * exact).pvalue > 1e-3
    # The tie between the two degree-3 members: its frequency in ours, in networkx's
    # and in the exact distribution.
    tie = (0, 1)
    p = sum(w for s, w in zip(states, exact, strict=True) if tie in s)
    f_ours = np.mean([tie in s for s in ours])
    f_nx = np.mean([tie in s for s in theirs])
    assert f_ours == pytest.approx(p, abs=4 * np.sqrt(p * (1 - p) / runs))
    assert f_nx == pytest.approx(p, abs=4 * np.sqrt(p * (1 - p) / nx_runs))
