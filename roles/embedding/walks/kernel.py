"""Compiled node2vec walk kernel: arrays in, arrays out.

Second-order walks are sampled exactly by rejection (Yang et al., SOSP 2019): a
candidate ``x`` is drawn from ``v``'s row in proportion to the tie weight ``w(v, x)``
and accepted with probability ``a(t, x) / max(1/p, 1, 1/q)``. The accepted candidate
is then distributed as ``w(v, x) * a(t, x)``, which is the node2vec rule (Grover &
Leskovec, KDD 2016, Sec. 3.2.2). Memory is O(E): one alias table per row, stored in two
arrays aligned with the CSR ``indices``, and no per-edge transition tables.

Two refinements keep the rejections few without changing the distribution. A candidate
whose uniform falls below ``min(a) / envelope`` is accepted without the adjacency test.
When ``1/p`` is the largest bias, the return to ``t`` is treated as KnightKing's
"outlier": the envelope is ``max(1, 1/q)`` and the return's mass above it,
``w(v, t) * (1/p - envelope)``, is drawn directly. Rows must not repeat a neighbour.

Random numbers come from SplitMix64 (Steele, Lea & Flood, OOPSLA 2014) keyed by the run
key and the walk number, so walk ``k`` is the same whatever the chunking or the thread
count.

References
----------
.. [1] A. Grover and J. Leskovec, "node2vec: Scalable feature learning for networks",
   KDD 2016. https://doi.org/10.1145/2939672.2939754
.. [2] K. Yang, M. Zhang, K. Chen, X. Ma, Y. Bai and Y. Jiang, "KnightKing: a fast
   distributed graph random walk engine", SOSP 2019. https://doi.org/10.1145/3341301.3359634
.. [3] M. D. Vose, "A linear algorithm for generating random numbers with a given
   distribution", IEEE Trans. Software Eng. 17(9), 1991. https://doi.org/10.1109/32.92917
.. [4] G. L. Steele, D. Lea and C. H. Flood, "Fast splittable pseudorandom number
   generators", OOPSLA 2014. https://doi.org/10.1145/2660193.2660195
.. [5] D. Lemire, "Fast random integer generation in an interval", ACM TOMACS 29(1),
   2019. https://doi.org/10.1145/3230636
"""

from __future__ import annotations

import numpy as np
from numba import njit, prange

__all__ = ["build_alias", "walk_serial", "walk_parallel", "row_lengths", "visit_counts"]

_GAMMA = np.uint64(0x9E3779B97F4A7C15)
_M1 = np.uint64(0xBF58476D1CE4E5B9)
_M2 = np.uint64(0x94D049BB133111EB)
_S30 = np.uint64(30)
_S27 = np.uint64(27)
_S31 = np.uint64(31)
_S32 = np.uint64(32)
_S11 = np.uint64(11)
_LOW32 = np.uint64(0xFFFFFFFF)
_TWO32 = np.uint64(1 << 32)
_INV32 = 1.0 / 4294967296.0
_INV53 = 1.0 / 9007199254740992.0


@njit(cache=True)
def _mix(z):  # pragma: no cover - compiled
    # SplitMix64 finaliser [4].
    z = (z ^ (z >> _S30)) * _M1
    z = (z ^ (z >> _S27)) * _M2
    return z ^ (z >> _S31)


@njit(cache=True)
def _next(state):  # pragma: no cover - compiled
    state = state + _GAMMA
    return state, _mix(state)


@njit(cache=True)
def _below(state, d):  # pragma: no cover - compiled
    """Uniform integer in [0, d) and 32 spare random bits (Lemire's method [5])."""
    state, z = _next(state)
    m = (z >> _S32) * d
    low = m & _LOW32
    if low < d:
        threshold = (_TWO32 - d) % d
        while low < threshold:
            state, z = _next(state)
            m = (z >> _S32) * d
            low = m & _LOW32
    return state, np.int64(m >> _S32), z & _LOW32


@njit(cache=True)
def _propose(state, prob, alias, uniform, start, degree):  # pragma: no cover - compiled
    """Draw an arc of a row in proportion to weight; also return a uniform in [0, 1)."""
    state, j, spare = _below(state, np.uint64(degree))
    if uniform:
        return state, start + j, spare * _INV32
    if spare * _INV32 >= prob[start + j]:
        j = alias[start + j]
    state, z = _next(state)
    return state, start + j, (z >> _S11) * _INV53


@njit(cache=True)
def _find(indices, lo, hi, x):  # pragma: no cover - compiled
    """Position of ``x`` in the sorted slice ``indices[lo:hi]``, or -1 (binary search)."""
    while lo < hi:
        mid = (lo + hi) >> 1
        y = indices[mid]
        if y < x:
            lo = mid + 1
        elif y > x:
            hi = mid
        else:
            return mid
    return -1


@njit(cache=True)
def _one_walk(
    indptr,
    indices,
    weights,
    prob,
    alias,
    row_weight,
    uniform,
    directed,
    node,
    inv_p,
    inv_q,
    key,
    walk_id,
    row,
):  # pragma: no cover - compiled
    length = row.shape[0]
    state = _mix(key ^ _mix(np.uint64(walk_id)))
    row[0] = node
    s = indptr[node]
    d = indptr[node + 1] - s
    if d == 0 or length == 1:
        for i in range(1, length):
            row[i] = -1
        return
    # First step: in proportion to weight.
    state, pos, u = _propose(state, prob, alias, uniform, s, d)
    row[1] = indices[pos]
    # When 1/p is the largest bias, the return to t is handled as an "outlier" [2]:
    # the envelope drops to max(1, 1/q) and the mass of the return above it is drawn
    # directly, so far fewer candidates are rejected. Otherwise the envelope is
    # max(1/p, 1, 1/q).
    outlier = inv_p > max(1.0, inv_q)
    if outlier:
        envelope = max(1.0, inv_q)
        floor = min(1.0, inv_q)
    else:
        envelope = max(inv_p, 1.0, inv_q)
        floor = min(inv_p, 1.0, inv_q)
    back_weight = 1.0 if uniform else np.float64(weights[pos])  # w(v, t) when undirected
    t = node
    v = indices[pos]
    for i in range(2, length):
        s = indptr[v]
        d = indptr[v + 1] - s
        if d == 0:  # directed dead end: the walk stops here
            for k in range(i, length):
                row[k] = -1
            return
        cut = 0.0
        if outlier:
            if directed:  # is there a tie v -> t to return along?
                back = _find(indices, s, s + d, t)
                back_weight = 0.0 if back < 0 else (1.0 if uniform else np.float64(weights[back]))
            extra = back_weight * (inv_p - envelope)
            total = (np.float64(d) if uniform else row_weight[v]) * envelope + extra
            cut = extra / total
        while True:
            if outlier:
                state, z = _next(state)
                if (z >> _S11) * _INV53 < cut:  # the return's mass above the envelope
                    x = t
                    break
            state, pos, u = _propose(state, prob, alias, uniform, s, d)
            x = indices[pos]
            bar = u * envelope
            if bar < floor:  # accepted whatever a(t, x) is: skip the adjacency test
                break
            if x == t:
                if outlier:  # a(t, t) = 1/p is at least the envelope here
                    break
                a = inv_p
            elif _find(indices, indptr[t], indptr[t + 1], x) >= 0:
                a = 1.0
            else:
                a = inv_q
            if bar < a:
                break
        if not uniform and not (outlier and x == t):
            back_weight = np.float64(weights[pos])
        row[i] = x
        t = v
        v = x


@njit(cache=True)
def walk_serial(
    indptr,
    indices,
    weights,
    prob,
    alias,
    row_weight,
    uniform,
    directed,
    starts,
    first_id,
    inv_p,
    inv_q,
    key,
    out,
):  # pragma: no cover - compiled
    """Fill ``out[k]`` with walk number ``first_id + k`` from ``starts[k]``; one thread.

    Parameters
    ----------
    indptr, indices, weights : int64, int32 and float32 arrays
        CSR rows, each sorted by neighbour index.
    prob, alias, row_weight : float32, int32 and float64 arrays
        Per-row alias tables aligned with ``indices`` and row weight totals, from
        :func:`build_alias` (all ignored when ``uniform``).
    uniform : bool
        All tie weights are equal: draw neighbours uniformly, no alias tables.
    directed : bool
        Rows hold out-ties only, so a tie back to ``t`` has to be looked up.
    starts : int32 array
        Start node of each walk.
    first_id : int
        Number of the first walk, for the per-walk random stream.
    inv_p, inv_q : float
        ``1/p`` and ``1/q``.
    key : uint64
        Run key, derived from the seed.
    out : int32 array, shape (len(starts), walk_length)
        Filled in place with node indices; ``-1`` after a dead end. Also returned.
    """
    for k in range(starts.shape[0]):
        _one_walk(
            indptr,
            indices,
            weights,
            prob,
            alias,
            row_weight,
            uniform,
            directed,
            starts[k],
            inv_p,
            inv_q,
            key,
            first_id + k,
            out[k],
        )
    return out


@njit(cache=True, parallel=True)
def walk_parallel(
    indptr,
    indices,
    weights,
    prob,
    alias,
    row_weight,
    uniform,
    directed,
    starts,
    first_id,
    inv_p,
    inv_q,
    key,
    out,
):  # pragma: no cover - compiled
    """As :func:`walk_serial`, walks spread over numba's threads; same output."""
    for k in prange(starts.shape[0]):
        _one_walk(
            indptr,
            indices,
            weights,
            prob,
            alias,
            row_weight,
            uniform,
            directed,
            starts[k],
            inv_p,
            inv_q,
            key,
            first_id + k,
            out[k],
        )
    return out


@njit(cache=True)
def build_alias(indptr, weights, prob, alias, row_weight, work, small, large):  # pragma: no cover
    """Fill per-row alias tables (Vose's method [3]) in place.

    Parameters
    ----------
    indptr : int64 array
        CSR row pointers.
    weights : float32 array
        Positive tie weights aligned with the CSR indices.
    prob, alias : float32 and int32 arrays, same length as ``weights``
        Output: column ``j`` of a row is kept with probability ``prob[j]``, otherwise
        replaced by column ``alias[j]`` (both relative to the row start).
    row_weight : float64 array, one entry per row
        Output: total weight of each row.
    work : float64 array; small, large : int32 arrays
        Scratch space, each at least as long as the longest row.
    """
    n = indptr.shape[0] - 1
    for r in range(n):
        s = indptr[r]
        d = indptr[r + 1] - s
        row_weight[r] = 0.0
        if d == 0:
            continue
        total = 0.0
        for j in range(d):
            total += weights[s + j]
        row_weight[r] = total
        ns = 0
        nl = 0
        for j in range(d):
            pj = weights[s + j] * d / total
            work[j] = pj
            alias[s + j] = j
            if pj < 1.0:
                small[ns] = j
                ns += 1
            else:
                large[nl] = j
                nl += 1
        while ns > 0 and nl > 0:
            ns -= 1
            lo = small[ns]
            g = large[nl - 1]
            alias[s + lo] = g
            work[g] = (work[g] + work[lo]) - 1.0
            if work[g] < 1.0:
                nl -= 1
                small[ns] = g
                ns += 1
        # Whatever is left has probability 1 (exactly, or up to rounding).
        for k in range(nl):
            work[large[k]] = 1.0
        for k in range(ns):
            work[small[k]] = 1.0
        for j in range(d):
            prob[s + j] = work[j]
    return prob, alias


@njit(cache=True)
def row_lengths(walks):  # pragma: no cover - compiled
    """Nodes in each walk: the entries before the first ``-1``."""
    n, length = walks.shape
    out = np.empty(n, dtype=np.int64)
    for k in range(n):
        m = 0
        while m < length and walks[k, m] >= 0:
            m += 1
        out[k] = m
    return out


@njit(cache=True)
def visit_counts(walks, lengths, n_nodes, min_length):  # pragma: no cover - compiled
    """How often each node occurs in walks of at least ``min_length`` nodes."""
    counts = np.zeros(n_nodes, dtype=np.int64)
    for k in range(walks.shape[0]):
        if lengths[k] >= min_length:
            for i in range(lengths[k]):
                counts[walks[k, i]] += 1
    return counts
