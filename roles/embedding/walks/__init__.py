"""node2vec walks: the driver around the compiled kernel in :mod:`roles.embedding.walks.kernel`.

The driver checks the parameters, builds the per-row sampling tables once, chooses the
start nodes and the random key from the seed, and calls the kernel. Names appear only
in :func:`walks_to_names`, at the end.
"""

from __future__ import annotations

import math

import numpy as np

from ...config import P_Q_RANGE
from ...errors import ConfigError, InputError, parameter_message
from ..graph import CSRGraph
from . import kernel as _kernel

__all__ = ["generate_walks", "walks_to_names", "walk_lengths", "visit_counts"]


def _check_bias(name: str, value: float) -> float:
    """p or q within :data:`roles.config.P_Q_RANGE`, where the sampler's cost is bounded."""
    low, high = P_Q_RANGE
    ok = not isinstance(value, bool) and isinstance(value, (int, float, np.floating, np.integer))
    if not ok or not (math.isfinite(float(value)) and low <= float(value) <= high):
        must = f"a number from {low:g} to {high:g}"
        raise ConfigError(parameter_message(name, must, value, where="generate_walks"))
    return float(value)


def _check_count(name: str, value: int, low: int) -> int:
    if isinstance(value, bool) or not isinstance(value, (int, np.integer)) or value < low:
        must = f"a whole number of at least {low}"
        raise ConfigError(parameter_message(name, must, value, where="generate_walks"))
    return int(value)


def _sampling_tables(csr: CSRGraph) -> tuple[bool, np.ndarray, np.ndarray, np.ndarray]:
    """Alias tables and row totals; none (uniform draws) when all weights are equal."""
    w = csr.weights
    if w.size and not (np.all(np.isfinite(w)) and float(w.min()) > 0.0):
        raise InputError(
            "tie weights must be positive numbers; found a zero, negative or missing "
            "weight. Remove those ties or give them a positive weight."
        )
    if w.size == 0 or bool(np.all(w == w[0])):
        none_f = np.zeros(0, dtype=np.float32)
        return True, none_f, np.zeros(0, dtype=np.int32), np.zeros(0, dtype=np.float64)
    longest = int(np.diff(csr.indptr).max())
    prob = np.empty(w.size, dtype=np.float32)
    alias = np.empty(w.size, dtype=np.int32)
    row_weight = np.empty(csr.n_nodes, dtype=np.float64)
    work = np.empty(longest, dtype=np.float64)
    small = np.empty(longest, dtype=np.int32)
    large = np.empty(longest, dtype=np.int32)
    _kernel.build_alias(
        csr.indptr, w.astype(np.float32, copy=False), prob, alias, row_weight, work, small, large
    )
    return False, prob, alias, row_weight


def generate_walks(
    csr: CSRGraph,
    *,
    walks_per_node: int,
    walk_length: int,
    p: float,
    q: float,
    seed: int,
    parallel: bool = False,
) -> np.ndarray:
    """Sample node2vec second-order random walks.

    Having moved ``t -> v``, the next node ``x`` is drawn with probability proportional
    to ``w(v, x) * a(t, x)``: ``a = 1/p`` if ``x == t``, ``1`` if there is a tie
    ``t -> x``, ``1/q`` otherwise [1]_. The first step is proportional to ``w``.
    Sampling is exact, by rejection against ``max(1/p, 1, 1/q)`` [2]_, in O(E) memory.

    Parameters
    ----------
    csr : CSRGraph
        The network; rows sorted by neighbour index.
    walks_per_node : int
        Walks started at each node.
    walk_length : int
        Nodes per walk, the start node included.
    p, q : float
        Return and in-out parameters, each from 0.25 to 4
        (:data:`roles.config.P_Q_RANGE`): at worst one proposal in 16 is accepted.
    seed : int
        Any non-negative integer; the same seed gives the same walks.
    parallel : bool, default False
        Spread walks over numba's threads. The output is identical either way: each
        walk has its own random stream keyed by ``(seed, walk number)``.

    Returns
    -------
    ndarray of int32, shape (n_nodes * walks_per_node, walk_length)
        Row ``k`` starts at a node of round ``k // n_nodes``; every round visits each
        node once as a start, in a seeded random order. After a directed walk reaches
        a node without out-ties, and after the start of an isolated node, the row holds
        ``-1``.

    Raises
    ------
    ConfigError
        When ``p``, ``q``, ``walks_per_node`` or ``walk_length`` is out of range.
    InputError
        When a tie weight is zero, negative or not a number.

    Notes
    -----
    On directed networks the walk follows ties in their direction, and "adjacent to
    ``t``" means a tie ``t -> x``: the distance from ``t`` to ``x`` is one.

    References
    ----------
    .. [1] A. Grover and J. Leskovec, "node2vec: Scalable feature learning for
       networks", KDD 2016, Sec. 3.2.2. https://doi.org/10.1145/2939672.2939754
    .. [2] K. Yang et al., "KnightKing: a fast distributed graph random walk engine",
       SOSP 2019. https://doi.org/10.1145/3341301.3359634

    Examples
    --------
    >>> import networkx as nx
    >>> from roles.embedding.graph import to_csr
    >>> walks = generate_walks(to_csr(nx.cycle_graph(4)), walks_per_node=2,
    ...                        walk_length=5, p=1.0, q=2.0, seed=1)
    >>> walks.shape
    (8, 5)
    """
    inv_p = 1.0 / _check_bias("p", p)
    inv_q = 1.0 / _check_bias("q", q)
    r = _check_count("walks_per_node", walks_per_node, 1)
    length = _check_count("walk_length", walk_length, 1)
    seed = _check_count("seed", seed, 0)
    n = csr.n_nodes
    uniform, prob, alias, row_weight = _sampling_tables(csr)
    sequence = np.random.SeedSequence(seed)
    key = sequence.generate_state(1, dtype=np.uint64)[0]
    order_rng = np.random.default_rng(sequence.spawn(1)[0])
    starts = np.empty(n * r, dtype=np.int32)
    for round_ in range(r):
        starts[round_ * n : (round_ + 1) * n] = order_rng.permutation(n)
    out = np.empty((n * r, length), dtype=np.int32)
    if out.size == 0:
        return out
    walk = _kernel.walk_parallel if parallel else _kernel.walk_serial
    walk(
        csr.indptr.astype(np.int64, copy=False),
        csr.indices.astype(np.int32, copy=False),
        csr.weights.astype(np.float32, copy=False),
        prob,
        alias,
        row_weight,
        uniform,
        bool(csr.directed),
        starts,
        0,
        inv_p,
        inv_q,
        np.uint64(key),
        out,
    )
    return out


def walk_lengths(walks: np.ndarray) -> np.ndarray:
    """Number of nodes in each walk (the entries before the first ``-1``), int64."""
    return _kernel.row_lengths(np.ascontiguousarray(walks, dtype=np.int32))


def visit_counts(walks: np.ndarray, n_nodes: int, *, min_length: int = 1) -> np.ndarray:
    """Occurrences of each node in the walks that have at least ``min_length`` nodes."""
    walks = np.ascontiguousarray(walks, dtype=np.int32)
    if walks.size and int(walks.max()) >= n_nodes:
        must = f"node indices below n_nodes ({n_nodes})"
        raise ValueError(
            parameter_message("walks", must, f"index {int(walks.max())}", where="visit_counts")
        )
    return _kernel.visit_counts(walks, _kernel.row_lengths(walks), n_nodes, min_length)


def walks_to_names(walks: np.ndarray, names: tuple[str, ...] | list[str]) -> list[list[str]]:
    """Turn index walks into lists of node names, dropping the ``-1`` padding."""
    lookup = np.asarray(names, dtype=object)
    lengths = walk_lengths(walks)
    return [lookup[row[:k]].tolist() for row, k in zip(walks, lengths, strict=True)]
