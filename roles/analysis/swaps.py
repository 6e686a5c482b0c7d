"""Degree-preserving randomisation of a simple undirected network by double edge swaps.

One move (Milo et al. 2003 [1]_, the move of networkx's ``double_edge_swap``): pick two
ties uniformly at random, each in a random orientation, ``a-b`` and ``c-d``, and rewire
them to ``a-c`` and ``b-d``, unless that would make a self-loop or a tie that already
exists. Every node keeps its degree. Picking each tie and orientation with probability
``1 / (2m)`` is what networkx does by drawing a node in proportion to its degree and then
one of its neighbours uniformly.

The chain is symmetric (each swap and its reverse are made by the same number, four, of
ordered picks) and rejected moves leave the network as it is, so its stationary
distribution is uniform over the simple networks with the given degrees that swaps can
reach, which for simple undirected networks is all of them (Taylor 1981 [2]_).

Compiled with numba: the ties are two integer arrays, and whether a tie exists is looked
up in an open-addressing hash table (linear probing, deletion by backward shift, Knuth
[3]_, 6.4 Algorithm R) of ``int64`` keys ``min * n + max``, filled at most half.

References
----------
.. [1] R. Milo, N. Kashtan, S. Itzkovitz, M. E. J. Newman and U. Alon, "On the uniform
   generation of random graphs with prescribed degree sequences", arXiv:cond-mat/0312028,
   2003.
.. [2] R. Taylor, "Constrained switchings in graphs", Combinatorial Mathematics VIII,
   Springer LNM vol. 884, 314-336, 1981. doi:10.1007/BFb0091828
.. [3] D. E. Knuth, The Art of Computer Programming, Vol. 3: Sorting and Searching, 2nd
   ed., Addison-Wesley, 1998.
.. [4] G. L. Steele, D. Lea and C. H. Flood, "Fast splittable pseudorandom number
   generators", OOPSLA 2014. doi:10.1145/2660193.2660195
.. [5] D. Lemire, "Fast random integer generation in an interval", ACM TOMACS 29(1),
   2019. doi:10.1145/3230636
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np
from numba import njit

__all__ = ["Swapped", "double_edge_swap"]

# The walk kernel's generator (SplitMix64 [4], Lemire's bounded integers [5]); the
# lowest of its spare bits picks a tie's orientation.
from ..embedding.walks.kernel import _below, _mix  # noqa: E402

_ONE = np.uint64(1)
_EMPTY = -1


@njit(cache=True, nogil=True)
def _key(a, b, n):  # pragma: no cover - compiled
    return a * n + b if a < b else b * n + a


@njit(cache=True, nogil=True)
def _home(key, mask):  # pragma: no cover - compiled
    return np.int64(_mix(np.uint64(key)) & np.uint64(mask))


@njit(cache=True, nogil=True)
def _slot(table, key, mask):  # pragma: no cover - compiled
    """The slot holding ``key``, or the empty slot where it would go."""
    i = _home(key, mask)
    while table[i] != key and table[i] != _EMPTY:
        i = (i + 1) & mask
    return i


@njit(cache=True, nogil=True)
def _remove(table, key, mask):  # pragma: no cover - compiled
    """Delete ``key`` (present) and close the gap by backward shift (Knuth's Algorithm R)."""
    i = _slot(table, key, mask)
    table[i] = _EMPTY
    j = i
    while True:
        j = (j + 1) & mask
        k = table[j]
        if k == _EMPTY:
            return
        h = _home(k, mask)
        # k may fill the hole at i unless its home lies cyclically in (i, j].
        if (i < j and (h <= i or h > j)) or (j < i and h <= i and h > j):
            table[i] = k
            table[j] = _EMPTY
            i = j


@njit(cache=True, nogil=True)
def _swap_kernel(u, v, n, nswap, max_tries, seed):  # pragma: no cover - compiled
    """Swap in place; returns (swaps made, tries, -1) or (0, 0, e) for a repeated tie e."""
    m = u.shape[0]
    size = 2
    while size < 2 * m:
        size *= 2
    mask = size - 1
    table = np.full(size, _EMPTY, dtype=np.int64)
    for e in range(m):
        k = _key(u[e], v[e], n)
        i = _slot(table, k, mask)
        if table[i] == k:
            return 0, 0, e
        table[i] = k
    state = np.uint64(seed)
    dm = np.uint64(m)
    swaps = 0
    tries = 0
    while swaps < nswap and tries < max_tries:
        state, i, bits = _below(state, dm)
        a, b = (v[i], u[i]) if bits & _ONE else (u[i], v[i])
        state, j, bits = _below(state, dm)
        c, d = (v[j], u[j]) if bits & _ONE else (u[j], v[j])
        # networkx skips these picks without counting a try: a-c or b-d would be a
        # self-loop. At most half of all picks are such (sum of (degree / 2m)^2 <= 1/2
        # for each end), so the loop ends.
        if a == c or b == d:
            continue
        tries += 1
        k1 = _key(a, c, n)
        i1 = _slot(table, k1, mask)
        if table[i1] == k1:
            continue
        k2 = _key(b, d, n)
        i2 = _slot(table, k2, mask)
        if table[i2] == k2:
            continue
        _remove(table, _key(a, b, n), mask)
        _remove(table, _key(c, d, n), mask)
        table[_slot(table, k1, mask)] = k1  # slots moved with the removals: look again
        table[_slot(table, k2, mask)] = k2
        u[i], v[i] = a, c
        u[j], v[j] = b, d
        swaps += 1
    return swaps, tries, -1


@dataclass(frozen=True, eq=False)
class Swapped:
    """A randomised copy of a network's ties.

    Attributes
    ----------
    u, v : ndarray of int64, shape (m,)
        The ties after the swaps (tie ``e`` joins ``u[e]`` and ``v[e]``; not ordered).
    swaps : int
        Swaps made; fewer than asked for when ``max_tries`` ran out first.
    tries : int
        Picks tested against the existing ties (picks that would make a self-loop are
        not counted, as in networkx).
    """

    u: np.ndarray
    v: np.ndarray
    swaps: int
    tries: int


def double_edge_swap(
    u: np.ndarray,
    v: np.ndarray,
    *,
    n_nodes: int,
    nswap: int,
    max_tries: int,
    seed: int,
) -> Swapped:
    """Make up to ``nswap`` degree-preserving double edge swaps (Milo et al. 2003).

    Parameters
    ----------
    u, v : array of int, shape (m,)
        The ties of a simple undirected network on nodes ``0 .. n_nodes - 1``: no
        self-loops, each tie once (in either orientation). Not modified.
    n_nodes : int
        Number of nodes.
    nswap : int
        Swaps wanted.
    max_tries : int
        Stop after this many tried picks even when fewer swaps were made (networkx
        raises an error instead; here the swaps made so far stand and
        :attr:`Swapped.swaps` says how many).
    seed : int
        Seed of the random picks (SplitMix64 [4]_); the same seed and ties give the same
        result.

    Returns
    -------
    Swapped

    Raises
    ------
    ValueError
        For a self-loop, a repeated tie, a node outside ``0 .. n_nodes - 1``, or fewer
        than 2 ties.

    Examples
    --------
    >>> import numpy as np
    >>> r = double_edge_swap(np.array([0, 2]), np.array([1, 3]), n_nodes=4, nswap=1,
    ...                      max_tries=100, seed=1)
    >>> r.swaps, sorted(np.bincount(np.r_[r.u, r.v]).tolist())
    (1, [1, 1, 1, 1])
    """
    a = np.array(u, dtype=np.int64).reshape(-1)
    b = np.array(v, dtype=np.int64).reshape(-1)
    if a.shape != b.shape:
        raise ValueError(f"u and v must have the same length; got {a.size} and {b.size}")
    if a.size < 2:
        raise ValueError(f"double edge swaps need at least 2 ties; got {a.size}")
    if a.size >= 2**32:
        raise ValueError("more than 2**32 ties are not supported")
    if min(int(a.min()), int(b.min())) < 0 or max(int(a.max()), int(b.max())) >= n_nodes:
        raise ValueError(f"node indices must lie in 0 .. {n_nodes - 1}")
    if np.any(a == b):
        raise ValueError(f"self-loop at tie {int(np.flatnonzero(a == b)[0])}")
    if nswap < 0 or max_tries < 0:
        raise ValueError(f"nswap and max_tries must be >= 0; got {nswap} and {max_tries}")
    swaps, tries, repeated = _swap_kernel(
        a, b, np.int64(n_nodes), np.int64(nswap), np.int64(max_tries), np.uint64(seed)
    )
    if repeated >= 0:
        raise ValueError(f"tie {int(repeated)} repeats an earlier tie")
    return Swapped(u=a, v=b, swaps=int(swaps), tries=int(tries))
