"""Burt's structural holes: constraint and effective size, over ties only."""

from __future__ import annotations

from collections.abc import Hashable

import networkx as nx
import numba
import numpy as np

from ._ties import _symmetric, _Ties, _ties

__all__ = ["structural_holes"]


@numba.njit(cache=True)
def _burt_kernel(indptr, indices, a, rowsum, rowmax):  # pragma: no cover - compiled
    """Constraint and effective size from symmetric mutual weights ``a`` (CSR, sorted).

    For each tie (i, j) the indirect terms sum over q in N(i) & N(j); the loop walks the
    shorter of the two neighbour lists (looking up the other by marker or binary
    search), so the cost is sum over ties of min(deg i, deg j) (times a log).
    """
    n = indptr.shape[0] - 1
    constraint = np.full(n, np.nan)
    esize = np.full(n, np.nan)
    stamp = np.full(n, -1, np.int64)
    p_i = np.zeros(n)
    for i in range(n):
        lo, hi = indptr[i], indptr[i + 1]
        if lo == hi:
            continue
        for t in range(lo, hi):
            stamp[indices[t]] = i
            p_i[indices[t]] = a[t] / rowsum[i]
        c = 0.0
        e = 0.0
        for t in range(lo, hi):
            j = indices[t]
            jlo, jhi = indptr[j], indptr[j + 1]
            s1 = 0.0  # sum_q p_iq p_qj
            s2 = 0.0  # sum_q p_iq a_jq
            if jhi - jlo <= hi - lo:
                for u in range(jlo, jhi):
                    q = indices[u]
                    if stamp[q] == i:
                        s1 += p_i[q] * a[u] / rowsum[q]
                        s2 += p_i[q] * a[u]
            else:
                for u in range(lo, hi):
                    q = indices[u]
                    pos = jlo + np.searchsorted(indices[jlo:jhi], q)
                    if pos < jhi and indices[pos] == q:
                        s1 += p_i[q] * a[pos] / rowsum[q]
                        s2 += p_i[q] * a[pos]
            c += (a[t] / rowsum[i] + s1) ** 2
            e += 1.0 - s2 / rowmax[j]
        constraint[i] = c
        esize[i] = e
    return constraint, esize


def _structural_holes(ties: _Ties) -> tuple[np.ndarray, np.ndarray]:
    n = ties.n
    if n == 0:
        return np.zeros(0), np.zeros(0)
    # Mutual weight a_ij = w_ij + w_ji (Burt 1992; networkx's mutual_weight). For an
    # undirected graph each tie is stored once, so W + W.T is the symmetric matrix.
    indptr, indices, a = _symmetric(ties)
    deg = np.diff(indptr)
    has = deg > 0
    rowsum = np.zeros(n)
    rowmax = np.zeros(n)
    if a.size:
        rowsum[has] = np.add.reduceat(a, indptr[:-1][has])
        rowmax[has] = np.maximum.reduceat(a, indptr[:-1][has])
    return _burt_kernel(indptr, indices, a, rowsum, rowmax)


def structural_holes(
    G: nx.Graph, *, weight: str | None = "weight"
) -> tuple[dict[Hashable, float], dict[Hashable, float]]:
    """Burt's constraint and effective size of every node.

    With ``a_ij = w_ij + w_ji`` (mutual tie weight), ``p_ij = a_ij / sum_k a_ik`` and
    ``m_jq = a_jq / max_k a_jk``, over the neighbours N(i) (in and out) [1]_:

    - constraint ``c_i = sum_{j in N(i)} (p_ij + sum_{q} p_iq p_qj) ** 2``;
    - effective size ``e_i = sum_{j in N(i)} (1 - sum_{q} p_iq m_jq)``,

    where q runs over the neighbours of i other than j. These are the formulas of
    :func:`networkx.constraint` and :func:`networkx.effective_size` (Borgatti's
    simplification ``n - 2t/n`` for unweighted undirected ties [2]_ is the same number),
    and the tests check the values against networkx.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network; directed ties are read as ties in either direction, as networkx
        does. Self-loops are ignored.
    weight : str or None, default "weight"
        Edge attribute holding tie strength (missing = 1); ``None`` counts ties.

    Returns
    -------
    constraint : dict
        Node -> constraint; NaN for nodes without ties (undefined).
    effective_size : dict
        Node -> effective size; NaN for nodes without ties.

    Raises
    ------
    InputError
        A weight is not a positive number.

    Notes
    -----
    Scaling: networkx builds the product of the adjacency matrix with itself (memory
    grows with the sum of squared degrees) and, for effective size, a dense n x n array
    (800 MB at 10,000 nodes). Here the same sums run only over ties, in a compiled loop
    that walks the shorter neighbour list of each tie: memory O(ties), time
    O(sum over ties of min(deg i, deg j)) - nothing is capped or left out.

    References
    ----------
    .. [1] R. S. Burt, *Structural Holes: The Social Structure of Competition*, Harvard
       University Press, 1992.
    .. [2] S. P. Borgatti, "Structural holes: unpacking Burt's redundancy measures",
       Connections 20(1):35-38, 1997.

    Examples
    --------
    >>> import networkx as nx
    >>> c, e = structural_holes(nx.star_graph(2))
    >>> c[0], e[0]
    (0.5, 2.0)
    """
    ties = _ties(G, weight)
    c, e = _structural_holes(ties)
    return dict(zip(ties.nodes, c.tolist(), strict=True)), dict(
        zip(ties.nodes, e.tolist(), strict=True)
    )
