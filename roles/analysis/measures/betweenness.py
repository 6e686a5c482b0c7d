"""Shortest-path betweenness by Brandes' algorithm in compiled code, exact or sampled.

A breadth-first search per source when ties are counted in steps, Dijkstra's algorithm
with an indexed binary heap when ties have lengths (1 / weight); both hand their
shortest-path tree to one back-propagation step (:func:`_accumulate`). Above
:data:`EXACT_LIMIT` nodes the sources are a random sample
(:func:`betweenness_sources`), drawn in independent batches whose spread gives the
expected error (:class:`BetweennessInfo`).
"""

from __future__ import annotations

import math
import numbers
from collections.abc import Hashable
from dataclasses import dataclass

import networkx as nx
import numba
import numpy as np

from ...errors import parameter_message
from ._ties import _Ties, _ties

__all__ = ["EXACT_LIMIT", "BetweennessInfo", "betweenness", "betweenness_sources"]

#: Largest node count for exact betweenness. Compiled Brandes (this module) on
#: preferential attachment graphs, CPU seconds on the project's shared 2-core machine
#: (benchmarks/bench_measures.py): 5,000 nodes 4.6 s with weights (Dijkstra) and 1.8 s
#: counting steps at average degree 10, 5.8 s and 2.4 s at average degree 20; 10,000
#: nodes 19-24 s with weights; 20,000 nodes / 200k ties 106 s. Cost grows as nodes x
#: ties, so 5,000 is the largest size whose exact run stays within a few seconds (half
#: that on two threads). networkx needed 5.6 s for 1,000 nodes with weights; this 0.17 s.
EXACT_LIMIT = 5000

# Sampled betweenness never uses fewer sources than this by default: 1,000 sources cost
# about 50 CPU seconds (25 s on two threads) on 100k nodes / 1M ties, where the largest
# standard error is then 0.004 against a largest value of 0.033 (see `betweenness`).
_MIN_SAMPLES = 1000
_MAX_BATCHES = 10


@dataclass(frozen=True)
class BetweennessInfo:
    """How :func:`betweenness` computed its values.

    Attributes
    ----------
    method : str
        ``"exact"`` (every node a source) or ``"sampled"`` (random sources).
    nodes : int
        Node count of the graph.
    k : int
        Number of source nodes used (``nodes`` when exact).
    batches : int
        Independent batches the sources were drawn in (1 when exact).
    expected_error : float
        Sampled: the largest, over nodes, standard error of the estimate, in the same
        (normalised) units as betweenness, from the spread of the batch estimates
        (standard error of a mean of independent batches). 0 when exact.
    error_bound : float
        Sampled: distribution-free 95% half-width for any one node from Hoeffding's
        inequality, ``sqrt(ln(2 / 0.05) / (2 k))`` (each source contributes a value in
        [0, 1] to the normalised mean; Brandes & Pich 2007). 0 when exact.
    error_basis : str
        One sentence saying how the two error figures were derived.
    weighted : bool
        Whether shortest paths used distance = 1 / weight.
    exact_limit : int
        The node count up to which betweenness is exact.
    seed : int
        Seed of the source sample.
    """

    method: str
    nodes: int
    k: int
    batches: int
    expected_error: float
    error_bound: float
    error_basis: str
    weighted: bool
    exact_limit: int
    seed: int


def betweenness_sources(n_nodes: int, *, exact_limit: int = EXACT_LIMIT) -> int | None:
    """Number of sources :func:`betweenness` samples by default; None when exact.

    Exact (every node a source) up to ``exact_limit`` nodes; beyond,
    ``ceil(exact_limit**2 / n_nodes)`` sources, at least 1,000, and exact again when
    that would be every node. ``k`` sources cost about ``k (n + m)``, which at equal
    density is ``exact_limit**2 (1 + m / n)``: the cost of an exact run at the limit,
    so the cost does not jump there (see the ``samples`` parameter of
    :func:`betweenness` for measurements). The rule reads the node count only.

    Parameters
    ----------
    n_nodes : int
        Node count of the graph.
    exact_limit : int, default EXACT_LIMIT
        Largest node count for exact values.

    Returns
    -------
    int or None
        Source count, or None for exact values. ``betweenness(..., samples=k)`` and
        ``role_table(..., samples=k)`` with this ``k`` give their default results.

    Examples
    --------
    >>> betweenness_sources(5000), betweenness_sources(20000), betweenness_sources(100000)
    (None, 1250, 1000)
    """
    if n_nodes <= exact_limit:
        return None
    k = max(_MIN_SAMPLES, math.ceil(exact_limit**2 / max(n_nodes, 1)))
    return None if k >= n_nodes else k


# Paths whose lengths differ by less than this share of the shortest length count as
# equally short: 1/2 + 1/3 + 1/6 (0.9999999999999999 in floating point) and 1/2 + 1/2
# are then one length, as in exact arithmetic.
# Rounding of a sum of h floats is below h * 1.1e-16 relative, so 1e-12 absorbs it for
# paths up to thousands of steps, far below any difference real tie data can make.
_PATH_TOL = 1e-12

# Sources are summed in this many chunks per batch (fewer when there are fewer sources):
# each chunk is summed by one thread in source order, then chunks are added in order, so
# the result is the same for any thread count.
_CHUNKS = 32


@numba.njit(cache=True, inline="always")
def _heap_up(key, node, where, i):  # pragma: no cover - compiled
    k = key[i]
    v = node[i]
    while i > 0:
        parent = (i - 1) >> 1
        if key[parent] <= k:
            break
        key[i] = key[parent]
        node[i] = node[parent]
        where[node[i]] = i
        i = parent
    key[i] = k
    node[i] = v
    where[v] = i


@numba.njit(cache=True, inline="always")
def _heap_down(key, node, where, size, i):  # pragma: no cover - compiled
    k = key[i]
    v = node[i]
    while True:
        child = 2 * i + 1
        if child >= size:
            break
        if child + 1 < size and key[child + 1] < key[child]:
            child += 1
        if key[child] >= k:
            break
        key[i] = key[child]
        node[i] = node[child]
        where[node[i]] = i
        i = child
    key[i] = k
    node[i] = v
    where[v] = i


@numba.njit(cache=True)
def _accumulate(reached, tree, acc):  # pragma: no cover - compiled
    """Brandes' back-propagation of dependencies from one source; adds into ``acc``.

    ``tree`` is ``(sigma, delta, order, pred, pred_ptr)``: ``order[:reached]`` lists the
    nodes the source reaches, nearest first (the source itself at 0); the predecessors
    of ``order[i]`` are ``pred[pred_ptr[i]:pred_ptr[i + 1]]``, and ``sigma`` holds the
    shortest-path counts. Walking the nodes farthest first,
    ``delta(u) += sigma(u) / sigma(w) * (1 + delta(w))`` for each predecessor ``u`` of
    ``w`` (Brandes 2001, Theorem 6). ``sigma`` and ``delta`` of the reached nodes are 0
    again on exit.
    """
    sigma, delta, order, pred, pred_ptr = tree
    for i in range(reached - 1, 0, -1):
        w = order[i]
        coeff = (1.0 + delta[w]) / sigma[w]
        for p in range(pred_ptr[i], pred_ptr[i + 1]):
            u = pred[p]
            delta[u] += sigma[u] * coeff
        acc[w] += delta[w]
    for i in range(reached):
        w = order[i]
        sigma[w] = 0.0
        delta[w] = 0.0


@numba.njit(cache=True)
def _bfs_source(s, graph, symmetric, level, tree, acc):  # pragma: no cover - compiled
    """Brandes' accumulation from source ``s`` counting steps; adds into ``acc``.

    Breadth-first; when a node leaves the queue, its predecessors are its in-neighbours
    one step nearer the source. ``graph`` and ``tree`` as in :func:`_brandes` and
    :func:`_accumulate`. ``level`` is -1, ``sigma`` and ``delta`` 0 everywhere on entry
    and again on exit.
    """
    indptr, indices, _, rindptr, rindices, _ = graph
    sigma, delta, order, pred, pred_ptr = tree
    level[s] = 0
    order[0] = s
    seen = 1
    n_pred = 0
    head = 0
    while head < seen:
        v = order[head]
        pred_ptr[head] = n_pred
        head += 1
        up = level[v] - 1
        nxt = level[v] + 1
        sv = 1.0 if v == s else 0.0
        if not symmetric:
            for e in range(rindptr[v], rindptr[v + 1]):
                u = rindices[e]
                if level[u] == up:
                    sv += sigma[u]
                    pred[n_pred] = u
                    n_pred += 1
        for e in range(indptr[v], indptr[v + 1]):
            w = indices[e]
            if level[w] < 0:
                level[w] = nxt
                order[seen] = w
                seen += 1
            elif symmetric and level[w] == up:
                sv += sigma[w]
                pred[n_pred] = w
                n_pred += 1
        sigma[v] = sv
    pred_ptr[seen] = n_pred
    _accumulate(seen, tree, acc)
    for i in range(seen):
        level[order[i]] = -1


@numba.njit(cache=True)
def _dijkstra_source(
    s, graph, symmetric, tol, dist, state, heap, tree, acc
):  # pragma: no cover - compiled
    """Brandes' accumulation from source ``s`` along lengths; adds into ``acc``.

    Dijkstra with an indexed binary heap. When a node is settled its distance is final,
    and its predecessors are the settled in-neighbours ``u`` with
    ``dist[u] + l(u, v) <= dist[v] * (1 + tol)``. ``graph`` and ``tree`` as in
    :func:`_brandes` and :func:`_accumulate`; ``heap`` is ``(key, node, where)``. On
    entry and exit ``dist`` is inf, ``state`` 0 (1 = in the heap, 2 = settled),
    ``sigma`` and ``delta`` 0.
    """
    indptr, indices, length, rindptr, rindices, rlength = graph
    sigma, delta, order, pred, pred_ptr = tree
    hkey, hnode, where = heap
    dist[s] = 0.0
    state[s] = 1
    hkey[0] = 0.0
    hnode[0] = s
    where[s] = 0
    size = 1
    settled = 0
    n_pred = 0
    while size > 0:
        v = hnode[0]
        dv = hkey[0]
        size -= 1
        if size > 0:
            hkey[0] = hkey[size]
            hnode[0] = hnode[size]
            where[hnode[0]] = 0
            _heap_down(hkey, hnode, where, size, 0)
        state[v] = 2
        order[settled] = v
        pred_ptr[settled] = n_pred
        settled += 1
        limit = dv + tol * dv
        sv = 1.0 if v == s else 0.0
        if not symmetric:
            for e in range(rindptr[v], rindptr[v + 1]):
                u = rindices[e]
                if state[u] == 2 and dist[u] + rlength[e] <= limit:
                    sv += sigma[u]
                    pred[n_pred] = u
                    n_pred += 1
        for e in range(indptr[v], indptr[v + 1]):
            w = indices[e]
            if state[w] == 2:
                # Undirected: a settled neighbour is a predecessor if the tie is tight.
                if symmetric and dist[w] + length[e] <= limit:
                    sv += sigma[w]
                    pred[n_pred] = w
                    n_pred += 1
                continue
            d = dv + length[e]
            if d < dist[w]:
                dist[w] = d
                if state[w] == 0:
                    state[w] = 1
                    hkey[size] = d
                    hnode[size] = w
                    size += 1
                    _heap_up(hkey, hnode, where, size - 1)
                else:
                    hkey[where[w]] = d
                    _heap_up(hkey, hnode, where, where[w])
        sigma[v] = sv
    pred_ptr[settled] = n_pred
    _accumulate(settled, tree, acc)
    for i in range(settled):
        w = order[i]
        dist[w] = np.inf
        state[w] = 0


@numba.njit(cache=True, parallel=True)
def _brandes(graph, weighted, symmetric, tol, sources, chunk_ptr):  # pragma: no cover - compiled
    """Per-chunk sums of Brandes' dependencies ``delta_s(v)`` over the given sources.

    ``graph`` is ``(indptr, indices, length, rindptr, rindices, rlength)``
    (:func:`_adjacency`). Row ``c`` of the result sums the sources
    ``sources[chunk_ptr[c]:chunk_ptr[c + 1]]`` in that order; chunks run in parallel,
    each on one thread.
    """
    n = graph[0].shape[0] - 1
    most_pred = graph[4].shape[0]  # ties into nodes: the most predecessors of one source
    n_chunks = chunk_ptr.shape[0] - 1
    acc = np.zeros((n_chunks, n))
    for c in numba.prange(n_chunks):
        tree = (
            np.zeros(n),  # sigma
            np.zeros(n),  # delta
            np.empty(n, np.int32),  # order
            np.empty(most_pred, np.int32),  # pred
            np.empty(n + 1, np.int64),  # pred_ptr
        )
        if weighted:
            dist = np.full(n, np.inf)
            state = np.zeros(n, np.int8)
            heap = (np.empty(n), np.empty(n, np.int32), np.empty(n, np.int32))
            for j in range(chunk_ptr[c], chunk_ptr[c + 1]):
                _dijkstra_source(sources[j], graph, symmetric, tol, dist, state, heap, tree, acc[c])
        else:
            level = np.full(n, -1, np.int32)
            for j in range(chunk_ptr[c], chunk_ptr[c + 1]):
                _bfs_source(sources[j], graph, symmetric, level, tree, acc[c])
    return acc


def _adjacency(ties: _Ties, weighted: bool) -> tuple[np.ndarray, ...]:
    """Out- and in-neighbour CSR arrays with lengths 1 / weight (rows sorted).

    Returns ``(indptr, indices, length, rindptr, rindices, rlength)``; undirected ties
    appear in both rows, and the in-neighbour arrays are then the same arrays.
    """
    n = ties.n
    if ties.directed:
        src, dst, w = ties.src, ties.dst, ties.w
    else:
        src = np.concatenate([ties.src, ties.dst])
        dst = np.concatenate([ties.dst, ties.src])
        w = np.concatenate([ties.w, ties.w])
    # Same float as networkx's weight function 1.0 / weight, so lengths agree bit for bit.
    length = 1.0 / w if weighted else np.ones(0)

    def rows(a: np.ndarray, b: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
        order = np.lexsort((b, a))
        indptr = np.zeros(n + 1, dtype=np.int64)
        np.cumsum(np.bincount(a, minlength=n), out=indptr[1:])
        return indptr, b[order].astype(np.int32), length[order] if weighted else length

    out = rows(src, dst)
    back = rows(dst, src) if ties.directed else out
    return (*out, *back)


def _chunks(sizes: list[int]) -> np.ndarray:
    """Chunk boundaries over consecutive batches of sources, no chunk across batches."""
    per_batch = max(1, math.ceil(_CHUNKS / max(len(sizes), 1)))
    bounds = [0]
    start = 0
    for size in sizes:
        c = max(1, min(size, per_batch))
        bounds.extend(start + (size * (i + 1)) // c for i in range(c))
        start += size
    return np.asarray(bounds, dtype=np.int64)


def _estimates(
    adjacency: tuple[np.ndarray, ...], weighted: bool, drawn: list[np.ndarray]
) -> np.ndarray:
    """Normalised betweenness from each batch of sources, shape (batches, n).

    Scaled as networkx 3.6 scales ``k`` sources (``normalized=True``): a node that is
    itself a source is averaged over the other ``k - 1`` sources, any other node over
    all ``k``, both per ordered pair ``(s, t)`` with ``t`` not ``v`` (``n - 2``
    targets). Each is unbiased given whether the node was drawn; with ``k = n`` this
    is the exact ``1 / ((n - 1)(n - 2))``.
    """
    indptr, _, _, rindptr, _, _ = adjacency
    n = indptr.shape[0] - 1
    est = np.zeros((len(drawn), n))
    if n < 3:
        return est  # no pair (s, t) with a third node between: all zero, as networkx
    sizes = [len(d) for d in drawn]
    bounds = _chunks(sizes)
    sources = np.concatenate(drawn).astype(np.int32)
    symmetric = indptr is rindptr  # undirected: in-neighbours are the same arrays
    acc = _brandes(adjacency, weighted, symmetric, _PATH_TOL, sources, bounds)
    end = 0
    for b, (size, src) in enumerate(zip(sizes, drawn, strict=True)):
        end += size
        rows = (bounds[1:] > end - size) & (bounds[1:] <= end)
        est[b] = acc[rows].sum(axis=0)  # chunks in order: the same sum for any thread count
        est[b] /= size * (n - 2)
        est[b, src] *= size / (size - 1)
    return est


def _betweenness(
    ties: _Ties, *, exact_limit: int, seed: int, samples: int | None
) -> tuple[np.ndarray, BetweennessInfo]:
    n = ties.n
    weighted = bool(ties.w.size) and not bool(np.all(ties.w == ties.w[0]))
    if samples is not None and (
        isinstance(samples, bool)
        or not isinstance(samples, numbers.Integral)
        or (samples < min(n, 2))
    ):
        raise ValueError(
            parameter_message(
                "samples", "None or a whole number of at least 2", samples, where="betweenness"
            )
        )
    k = betweenness_sources(n, exact_limit=exact_limit) if samples is None else int(samples)
    adjacency = _adjacency(ties, weighted)
    if k is None or k >= n:
        values = _estimates(adjacency, weighted, [np.arange(n)])[0]
        return values, BetweennessInfo(
            method="exact",
            nodes=n,
            k=n,
            batches=1,
            expected_error=0.0,
            error_bound=0.0,
            error_basis="exact: every node was a source.",
            weighted=weighted,
            exact_limit=exact_limit,
            seed=seed,
        )
    batches = max(2, min(_MAX_BATCHES, k // 5))
    sizes = [k // batches + (1 if b < k % batches else 0) for b in range(batches)]
    rng = np.random.default_rng(seed)
    # Each batch draws its sources independently (distinct within the batch).
    est = _estimates(adjacency, weighted, [rng.choice(n, size=s, replace=False) for s in sizes])
    # Batches of unequal size: weight each batch estimate by its sources.
    wts = np.asarray(sizes, dtype=np.float64) / k
    mean = wts @ est
    se = np.sqrt(((est - mean) ** 2).T @ (wts**2) * batches / (batches - 1))
    bound = math.sqrt(math.log(2 / 0.05) / (2 * k))
    info = BetweennessInfo(
        method="sampled",
        nodes=n,
        k=k,
        batches=batches,
        expected_error=float(se.max()) if n else 0.0,
        error_bound=bound,
        error_basis=(
            f"{k} random sources in {batches} independent batches; expected_error is the "
            "largest per-node standard error of the mean of the batch estimates; "
            "error_bound is Hoeffding's 95% half-width for one node, sqrt(ln(40)/(2k))."
        ),
        weighted=weighted,
        exact_limit=exact_limit,
        seed=seed,
    )
    return mean, info


def betweenness(
    G: nx.Graph,
    *,
    exact_limit: int,
    seed: int,
    samples: int | None = None,
    weight: str | None = "weight",
) -> tuple[dict[Hashable, float], BetweennessInfo]:
    """Shortest-path betweenness of every node, normalised as networkx normalises it.

    ``b(v) = sum_{s != v != t} sigma_st(v) / sigma_st``, divided by ``(n-1)(n-2)`` for
    both directed and undirected graphs (networkx's ``normalized=True``) [1]_, computed
    with Brandes' algorithm [2]_ in compiled code: a breadth-first search per source when
    steps are counted, Dijkstra's algorithm with a binary heap when ties have lengths.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network. Self-loops are ignored (they lie on no shortest path).
    exact_limit : int
        Exact for graphs of at most this many nodes (see :data:`EXACT_LIMIT` for the
        measured cost); larger graphs use sampled sources.
    seed : int
        Seed of the source sample (unused when exact).
    samples : int, optional
        Number of source nodes when sampling; at least the node count gives exact
        values. Default (:func:`betweenness_sources`): ``exact_limit**2 / n``, at least
        1,000 and at most ``n``: ``k`` sources cost about ``k (n + m)``, which is then the
        cost of an exact run on ``exact_limit`` nodes of the same density; graphs of
        fewer than 1,000 nodes are therefore always exact. Measured
        (benchmarks/bench_measures.py, preferential attachment, weights 1-5, two numba
        threads on the project's shared 2-core machine, CPU seconds of both threads):
        20,000 nodes / 200k ties, 1,250 sources, 7.5 s (3.9 s wall clock; 6 ms a
        source, the exact run takes 106 s); 100,000 nodes / 1M ties, 1,000 sources,
        49 s (25 s wall clock), largest standard error 0.0039 against a largest value
        of 0.033 (250 sources: 0.0066). Counting steps costs 40% of that. Against the
        exact values, over three seeds: at 20,000 nodes the largest error was 1.1 - 1.5
        times ``expected_error``, the top tenth of nodes by betweenness was 75 - 78%
        the same, and the top hundredth had a median relative error of 10%; at 10,000
        nodes (2,500 sources) 0.9 - 1.5 times, 85% and 6 - 7%. Nodes with little
        betweenness are estimated with a large relative error.
    weight : str or None, default "weight"
        Tie strengths: shortest paths use **distance = 1 / weight** (a strong tie is a
        short step, as in Newman 2001 [3]_). When all weights are equal (or ``None``)
        paths are counted in steps (breadth-first search), which gives the same answer
        without floating-point ties.

    Returns
    -------
    values : dict
        Node -> normalised betweenness.
    info : BetweennessInfo
        Method, sample size and expected error.

    Raises
    ------
    InputError
        A weight is not a positive number.
    ValueError
        ``samples`` is not a whole number, or below 2 (and below the node count).

    Notes
    -----
    Equal lengths: two paths count as equally short when their lengths differ by less
    than 1e-12 of the length, so that 1/2 + 1/3 + 1/6 equals 1/2 + 1/2 as it does in
    exact arithmetic. networkx compares floating-point sums exactly, so where rounding
    splits such a tie the two disagree (on Zachary's karate club with its weights, by up
    to 0.0019); the tests check the values against networkx run on exact fractions
    (:class:`fractions.Fraction` distances), and against networkx on floats where no
    rounding tie arises. Counting steps, results agree with networkx to rounding.

    Sampling draws ``k`` sources in independent batches (up to 10, sources distinct
    within a batch) and scales each batch as networkx 3.6 scales ``k`` sources: a node
    that was itself drawn is averaged over the other ``k - 1`` sources, any other node
    over all ``k``, so each batch estimate is unbiased [4]_. The estimate is the mean of
    the batch estimates, and their spread gives ``info.expected_error``.

    Threads: sources are split into fixed chunks (32 per call, by source count only),
    each summed in order by one of numba's threads, and the chunks are then added in
    order, so the values are the same for any thread count.

    References
    ----------
    .. [1] L. C. Freeman, "A set of measures of centrality based on betweenness",
       Sociometry 40:35-41, 1977.
    .. [2] U. Brandes, "A faster algorithm for betweenness centrality", Journal of
       Mathematical Sociology 25:163-177, 2001.
    .. [3] M. E. J. Newman, "Scientific collaboration networks. II.", Physical Review E
       64:016132, 2001.
    .. [4] U. Brandes and C. Pich, "Centrality estimation in large networks",
       International Journal of Bifurcation and Chaos 17:2303-2318, 2007.

    Examples
    --------
    >>> import networkx as nx
    >>> values, info = betweenness(nx.path_graph(3), exact_limit=100, seed=0)
    >>> values, info.method
    ({0: 0.0, 1: 1.0, 2: 0.0}, 'exact')
    """
    ties = _ties(G, weight)
    values, info = _betweenness(ties, exact_limit=exact_limit, seed=seed, samples=samples)
    return dict(zip(ties.nodes, values.tolist(), strict=True)), info
