"""Local moving on the network from a given grouping: each member joins the neighbouring
group that raises modularity most, until no member moves.

This is the first phase of the Louvain method (Blondel, Guillaume, Lambiotte &
Lefebvre 2008) started from the groups found in the vectors instead of from single
members, and without its merging phase: a group can lose members but two groups are
never merged (a group disappears only when its last member leaves). Each move raises the
modularity (Newman & Girvan 2004), so the moves end; one pass costs one look at every
tie.

References
----------
.. [1] V. D. Blondel, J.-L. Guillaume, R. Lambiotte and E. Lefebvre, "Fast unfolding of
   communities in large networks", Journal of Statistical Mechanics, P10008, 2008.
   doi:10.1088/1742-5468/2008/10/P10008
.. [2] M. E. J. Newman and M. Girvan, "Finding and evaluating community structure in
   networks", Physical Review E 69, 026113, 2004. doi:10.1103/PhysRevE.69.026113
"""

from __future__ import annotations

import numpy as np

from ..analysis.modularity import local_moves

__all__ = ["refine"]


def refine(
    n: int,
    ties: tuple[np.ndarray, np.ndarray, np.ndarray],
    labels: np.ndarray,
    *,
    seed: int = 0,
    max_passes: int = 100,
) -> np.ndarray:
    """Move members between groups while modularity rises; return the new labels.

    Parameters
    ----------
    n : int
        Number of members (rows of ``labels``).
    ties : tuple of ndarray
        ``(rows, columns, weights)`` of the symmetric adjacency matrix, each undirected
        tie once in each direction (:func:`roles.embedding.cluster.ties_of`).
    labels : ndarray of int, shape (n,)
        The starting groups, numbered from 0.
    seed : int
        Seed of the order in which members are visited.
    max_passes : int
        Most passes over all members.

    Returns
    -------
    ndarray of int64, shape (n,)
        The groups after the moves, with the starting numbers (a number whose group
        emptied is unused).

    Examples
    --------
    Two triangles joined by one tie; member 2 starts in the wrong group and moves back:

    >>> import numpy as np
    >>> u = np.array([0, 1, 0, 2, 1, 2, 3, 4, 3, 5, 4, 5, 2, 3])
    >>> v = np.array([1, 0, 2, 0, 2, 1, 4, 3, 5, 3, 5, 4, 3, 2])
    >>> refine(6, (u, v, np.ones(14)), np.array([0, 0, 1, 1, 1, 1])).tolist()
    [0, 0, 0, 1, 1, 1]
    """
    u, v, w = (np.asarray(a) for a in ties)
    comm = np.asarray(labels, dtype=np.int64).copy()
    if len(w) == 0 or float(np.sum(w)) <= 0:
        return comm
    order = np.argsort(u, kind="stable")
    indptr = np.zeros(n + 1, dtype=np.int64)
    np.cumsum(np.bincount(u, minlength=n), out=indptr[1:])
    visit = np.random.default_rng(seed).permutation(n).astype(np.int64)
    return local_moves(
        indptr,
        np.asarray(v, dtype=np.int64)[order],
        np.asarray(w, dtype=np.float64)[order],
        visit,
        comm,
        1.0,
        max_passes,
    )
