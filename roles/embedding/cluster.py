"""Vectors -> groups: normalise, reduce with PCA, cluster with HDBSCAN, attach noise.

HDBSCAN (Campello, Moulavi & Sander 2013, as implemented by McInnes, Healy & Astels
2017) leaves loosely held points as noise. Every node still gets a group here: noise
points go to their most probable group by a vote of their nearest clustered
neighbours, and the strength of that attachment is kept in ``membership``.
"""

from __future__ import annotations

import warnings
from dataclasses import dataclass

import numpy as np

from .budget import LONG_WALKS_FROM

__all__ = [
    "Grouping",
    "cluster",
    "default_min_cluster_size",
    "default_min_samples",
    "fitted_rows",
    "ties_of",
    "Ties",
    "MIN_GROUP",
]


@dataclass(frozen=True, eq=False)
class Grouping:
    """One view's groups.

    Attributes
    ----------
    labels : ndarray of int, shape (n,)
        Group of each node, numbered from 0 by decreasing size. Every node has a group.
    membership : ndarray of float, shape (n,)
        How firmly the node belongs to its group, in [0, 1]: HDBSCAN's membership
        strength for clustered points; for points HDBSCAN called noise, the share of
        the neighbour vote for the group times one minus the GLOSH outlier score.
    was_noise : ndarray of bool, shape (n,)
        Whether HDBSCAN left the node as noise before it was attached.
    n_groups : int
        Number of groups (0 when the nodes could not be grouped at all).
    min_cluster_size : int
        The HDBSCAN ``min_cluster_size`` that was used.
    dimensions : int
        Dimensions after PCA.
    fitted : int
        Rows HDBSCAN was fitted on: all of them, or a random sample of
        :func:`fitted_rows` rows (0 when there were too few rows to group).
    """

    labels: np.ndarray
    membership: np.ndarray
    was_noise: np.ndarray
    n_groups: int
    min_cluster_size: int
    dimensions: int
    fitted: int = 0

    @property
    def noise_share(self) -> float:
        return float(self.was_noise.mean()) if len(self.was_noise) else 0.0


#: Smallest group HDBSCAN may report, at every network size.
MIN_GROUP = 5


def default_min_cluster_size(n: int) -> int:
    """Smallest group HDBSCAN may report: 5 members, whatever the size of the network.

    Teams do not grow with the organisation. An earlier rule, ``max(5, sqrt(n) / 2)``
    (common practice, not a published one), merged small communities of large networks:
    on planted-community graphs with communities of 20 or more, NMI against the planted
    communities (local / far view) was 0.81 / 0.77 at 20,000 nodes (smallest group 71),
    against 0.97 / 0.95 with 5; at 100,000 nodes 0.79 / 0.75 (158) against 0.93 / 0.87;
    on LFR graphs of 1,000 nodes 0.919 (16) against 0.946, in the same time
    (``benchmarks/RESULTS.md``, "Smallest group").
    """
    return MIN_GROUP


#: Rows for which HDBSCAN's ``min_samples`` is 3 instead of 5 (both bounds included);
#: from the size at which :mod:`roles.embedding.budget` lengthens the walks.
FINER_TREE_ROWS = (LONG_WALKS_FROM, 3000)


def default_min_samples(n: int) -> int:
    """HDBSCAN's ``min_samples`` for ``n`` rows: 3 from 300 to 3,000 rows, else 5.

    A smaller ``min_samples`` smooths the density less, so HDBSCAN's tree has more
    leaves for the modularity selection (:func:`_tree_selection`) to choose from. On
    LFR graphs of 1,000 members (graph seeds 1-3, mixing 0.4 / 0.5, mean NMI with the
    planted communities of the view the pipeline picks) 3 scored 0.696 / 0.275 against
    0.687 / 0.253 with 5 (walks of 80, window 10, as :mod:`roles.embedding.budget` sets them at
    that size). On Zachary's karate club (34 members) 3 splits a five-member sub-group
    off the instructor in 9 of seeds 0-9, so that he no longer leads the hub list;
    hence 5 below 300 members, where the groups of a department review are found with
    5 (``benchmarks/RESULTS.md``, "Groups from the network's evidence"). Above 3,000
    rows 3 was not measured, so 5 stays. The bounds are our choice, not a published
    rule.

    Examples
    --------
    >>> default_min_samples(34), default_min_samples(1000), default_min_samples(20000)
    (5, 3, 5)
    """
    low, high = FINER_TREE_ROWS
    return 3 if low <= n <= high else 5


#: A sampled fit keeps at least this many rows (and at least 60 % of them, ``fitted_rows``).
SAMPLE_FLOOR = 12_000


def fitted_rows(n: int, fit_limit: int | None) -> int:
    """Rows HDBSCAN is fitted on, of ``n``, when at most ``fit_limit`` are allowed.

    ``min(fit_limit, max(12000, ceil(0.6 n)))``, or every row when that is not fewer
    than ``n`` (or ``fit_limit`` is ``None``). With the default limit of 20,000 a
    network of up to 12,000 rows keeps the full fit, one of 20,000 rows is fitted on
    12,000 and one of 33,334 rows or more on 20,000. On planted-community graphs
    (``benchmarks/bench_cluster.py``, two sample seeds, NMI against the planted
    communities, local / far view) 12,000 of 20,000 rows scored 0.968-0.970 / 0.945-0.946
    against 0.971 / 0.946 for the full fit, in 4.5-6.0 s instead of 11-15 s per view;
    at 50,000 rows 12,000 (24 %) lost up to 0.013 (0.942 / 0.862 against 0.950 / 0.875
    for 20,000), hence the share of 60 %.
    """
    if fit_limit is None:
        return n
    rows = min(fit_limit, max(SAMPLE_FLOOR, -(-3 * n // 5)))  # ceil(0.6 n), exact
    return rows if rows < n else n


def _reduce(vectors: np.ndarray, dims: int, seed: int) -> np.ndarray:
    from sklearn.decomposition import PCA

    x = np.asarray(vectors, dtype=np.float64)
    norms = np.linalg.norm(x, axis=1, keepdims=True)
    x = x / np.where(norms > 0, norms, 1.0)
    target = min(dims, x.shape[1], max(1, x.shape[0] - 1))
    if target >= x.shape[1]:
        return x
    return PCA(n_components=target, random_state=seed).fit_transform(x)


def _attach(
    x: np.ndarray, hard: np.ndarray, outlier: np.ndarray, k: int = 10, *, strength: bool = True
) -> tuple[np.ndarray, np.ndarray]:
    """Group and strength of each noise point, from its nearest clustered points.

    The group is the distance-weighted vote of the ``k`` nearest points HDBSCAN did
    cluster; the strength is the winning vote share times ``1 - GLOSH outlier score``
    (Campello et al. 2015), so a point far from every group keeps a low figure.
    On LFR graphs this attached noise points far more accurately than
    ``hdbscan.all_points_membership_vectors`` (benchmarks/bench_views.py).
    """
    from sklearn.neighbors import KNeighborsClassifier

    core = hard >= 0
    noise = ~core
    knn = KNeighborsClassifier(n_neighbors=min(k, int(core.sum())), weights="distance")
    knn.fit(x[core], hard[core])
    proba = knn.predict_proba(x[noise])
    labels = knn.classes_[proba.argmax(axis=1)].astype(np.int64)
    if not strength:  # the vote share alone
        return labels, proba.max(axis=1)
    score = np.nan_to_num(np.asarray(outlier, dtype=np.float64)[noise], nan=1.0)
    return labels, proba.max(axis=1) * np.clip(1.0 - score, 0.0, 1.0)


def _renumber_by_size(labels: np.ndarray) -> np.ndarray:
    groups, inverse, counts = np.unique(labels, return_inverse=True, return_counts=True)
    # Largest first; ties broken by the smallest original label for repeatability.
    order = np.lexsort((groups, -counts))
    rank = np.empty(len(groups), dtype=np.int64)
    rank[order] = np.arange(len(groups))
    return rank[inverse.reshape(-1)]


#: Ties between rows: ``(rows, columns, weights)`` of the symmetric adjacency matrix,
#: every undirected tie once in each direction (:func:`ties_of`).
Ties = tuple[np.ndarray, np.ndarray, np.ndarray]


def ties_of(indptr: np.ndarray, indices: np.ndarray, weights: np.ndarray, rows: np.ndarray) -> Ties:
    """The ties among ``rows`` of an undirected CSR matrix, renumbered ``0..len(rows)-1``.

    ``indptr, indices, weights`` as :class:`roles.embedding.graph.CSRGraph` stores an undirected
    network (each tie in both rows). Ties to members outside ``rows`` are dropped.

    Examples
    --------
    >>> import numpy as np
    >>> u, v, w = ties_of(np.array([0, 1, 3, 4]), np.array([1, 0, 2, 1]),
    ...                   np.ones(4), np.array([1, 2]))
    >>> u.tolist(), v.tolist(), w.tolist()
    ([0, 1], [1, 0], [1.0, 1.0])
    """
    indptr = np.asarray(indptr, dtype=np.int64)
    n = indptr.shape[0] - 1
    position = np.full(n, -1, dtype=np.int64)
    position[np.asarray(rows, dtype=np.int64)] = np.arange(len(rows))
    src = np.repeat(np.arange(n, dtype=np.int64), np.diff(indptr))
    u, v = position[src], position[np.asarray(indices, dtype=np.int64)]
    keep = (u >= 0) & (v >= 0)
    w = np.asarray(weights, dtype=np.float64)[keep].copy()
    u, v = u[keep], v[keep]
    w[u == v] *= 2.0  # a self-loop counts twice on the diagonal, as in modularity.py
    return u, v, w


def _tree_selection(
    raw: np.ndarray, n: int, x: np.ndarray, outlier: np.ndarray, ties: Ties, seed: int
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Groups from HDBSCAN's condensed tree, chosen with the network's ties.

    HDBSCAN's own selection keeps the clusters of greatest density stability (excess of
    mass); on node2vec vectors of loosely knit communities it leaves most members as
    noise and merges communities (benchmarks/RESULTS.md, "Groups from the network's
    evidence"). Here the tree is read with the network:

    1. Every row goes to a leaf of the condensed tree: its own when it fell out of a
       leaf, else the leaf of most of its 10 nearest leaf members (distance-weighted,
       as :func:`_attach`).
    2. Members move between leaves while modularity rises (:func:`roles.embedding.refine.refine`).
    3. The set of tree clusters, none inside another and together covering every leaf,
       of highest modularity is kept. Modularity is a sum over groups of
       ``L_c / 2m - (D_c / 2m)^2`` (``L_c`` the tie weight inside group ``c``, both
       directions; ``D_c`` its members' total strength; Newman & Girvan 2004), so the
       best set follows bottom-up as HDBSCAN's own excess-of-mass selection does: a
       cluster is kept when its term is at least the best its children reach.

    Each step costs one look at every tie (times the depth of the tree for step 3).

    Returns
    -------
    labels : ndarray of int
        Group of each row, from 0 (all -1 when the tree never splits).
    strength : ndarray of float
        A member inside its group's tree cluster holds with HDBSCAN's strength, its
        lambda over the largest in the cluster (Campello et al. 2013); any other with
        its leaf vote share times one minus its GLOSH outlier score.
    noise : ndarray of bool
        Whether the row is outside its group's tree cluster (it fell out of the tree
        above it, or moved there in step 2).
    """
    from .refine import refine

    parent, child = raw["parent"].astype(np.int64), raw["child"].astype(np.int64)
    lam = np.nan_to_num(raw["lambda_val"].astype(np.float64), posinf=np.finfo(np.float64).max)
    root = int(parent.min())
    k = int(max(parent.max(), child.max())) - root + 1  # clusters, root included
    is_edge = child >= n
    up = np.zeros(k, dtype=np.int64)  # parent cluster of each cluster (root: itself)
    up[child[is_edge] - root] = parent[is_edge] - root
    has_child = np.zeros(k, dtype=bool)
    has_child[parent[is_edge] - root] = True
    point = ~is_edge
    home = np.zeros(n, dtype=np.int64)  # the cluster each row fell out of
    home[child[point]] = parent[point] - root
    point_lambda = np.zeros(n)
    point_lambda[child[point]] = lam[point]
    u, v, w = ties
    two_m = float(w.sum())
    if not has_child[0] or two_m <= 0:
        return np.full(n, -1, dtype=np.int64), np.zeros(n), np.ones(n, dtype=bool)
    if np.any(up[1:] >= np.arange(1, k)):  # hdbscan numbers clusters top-down
        raise AssertionError("condensed tree: a cluster numbered before its parent")
    depth = np.zeros(k, dtype=np.int64)
    for c in range(1, k):
        depth[c] = depth[up[c]] + 1
    # 1. Leaves.
    in_leaf = ~has_child[home]
    leaf = np.where(in_leaf, home, -1)
    share = np.ones(n)
    if (~in_leaf).any():
        leaf[~in_leaf], share[~in_leaf] = _attach(x, leaf, outlier, strength=False)
    # 2. Moves between leaves.
    leaf = refine(n, ties, leaf, seed=seed)
    # 3. Tie weight inside each cluster: each tie at the lowest cluster holding both
    # ends, summed up the tree; strengths likewise.
    a, b = leaf[u], leaf[v]
    for _ in range(2 * int(depth.max())):
        differ = a != b
        if not differ.any():
            break
        a = np.where(differ & (depth[a] >= depth[b]), up[a], a)
        b = np.where(differ & (depth[b] > depth[a]), up[b], b)
    inside = np.bincount(a, weights=w, minlength=k)
    total = np.bincount(leaf, weights=np.bincount(u, weights=w, minlength=n), minlength=k)
    for c in range(k - 1, 0, -1):
        inside[up[c]] += inside[c]
        total[up[c]] += total[c]
    term = inside / two_m - (total / two_m) ** 2
    keep = np.ones(k, dtype=bool)
    below = np.zeros(k)  # best sum over the children's subtrees
    for c in range(k - 1, 0, -1):
        if has_child[c]:
            keep[c] = term[c] >= below[c]
        below[up[c]] += max(term[c], below[c]) if has_child[c] else term[c]
    keep[0] = False
    chosen = np.full(k, -1, dtype=np.int64)  # the highest kept cluster at or above
    for c in range(1, k):
        chosen[c] = chosen[up[c]] if chosen[up[c]] >= 0 else (c if keep[c] else -1)
    group = chosen[leaf]
    # Inside its group's tree cluster: that cluster is the row's own or an ancestor.
    inside_tree = np.zeros(n, dtype=bool)
    above = home.copy()
    for _ in range(int(depth.max()) + 1):
        inside_tree |= above == group
        above = up[above]
    top = np.zeros(k)
    np.maximum.at(top, group[inside_tree], point_lambda[inside_tree])
    strength = np.where(
        inside_tree,
        np.minimum(point_lambda, top[group]) / np.maximum(top[group], 1e-300),
        share * np.clip(1.0 - np.nan_to_num(outlier, nan=1.0), 0.0, 1.0),
    )
    _, labels = np.unique(group, return_inverse=True)
    return labels.reshape(-1).astype(np.int64), np.clip(strength, 0.0, 1.0), ~inside_tree


def _fit(
    x: np.ndarray, size: int, ties: Ties | None = None, seed: int = 0
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """HDBSCAN labels (-1 = not yet attached), membership strengths, GLOSH outlier
    scores, and which rows HDBSCAN left as noise.

    With ``ties`` (among the rows of ``x``) the flat groups are read from the condensed
    tree with the network (:func:`_tree_selection`); without, they are HDBSCAN's own
    excess-of-mass selection. ``min_samples`` follows :func:`default_min_samples` either
    way (3 from 300 to 3,000 rows, else 5).

    Prim's algorithm on the exact mutual-reachability graph (``prims_balltree``), not
    hdbscan's default for low dimensions (an approximate Boruvka tree on a KD-tree):
    on 16-dimensional node2vec vectors of 1,000 to 20,000 rows it was faster at every
    size (20,000 rows: 7.4-7.6 s against 10.1-10.4 s; 12,000: 2.7-2.8 against 4.6-4.9)
    and found the same groups (NMI against the planted communities equal to the third
    decimal; benchmarks/RESULTS.md). It keeps O(n) memory: the distances of one row
    at a time.
    """
    import hdbscan

    clusterer = hdbscan.HDBSCAN(
        min_cluster_size=size,
        min_samples=min(size, default_min_samples(x.shape[0])),
        algorithm="prims_balltree",
        core_dist_n_jobs=1,
    )
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        hard = clusterer.fit_predict(x)
    outlier = np.asarray(clusterer.outlier_scores_, dtype=np.float64)
    if ties is not None:
        raw = clusterer.condensed_tree_._raw_tree
        labels, strength, noise = _tree_selection(raw, x.shape[0], x, outlier, ties, seed)
        return labels, strength, outlier, noise
    labels = np.asarray(hard, dtype=np.int64)
    return labels, np.asarray(clusterer.probabilities_, dtype=np.float64), outlier, labels < 0


def _ties_among(ties: Ties, rows: np.ndarray, n: int) -> Ties:
    """The ties of ``ties`` (over ``n`` rows) between members of ``rows``, renumbered."""
    position = np.full(n, -1, dtype=np.int64)
    position[rows] = np.arange(len(rows))
    u, v, w = ties
    pu, pv = position[u], position[v]
    keep = (pu >= 0) & (pv >= 0)
    return pu[keep], pv[keep], w[keep]


def _fit_sampled(
    x: np.ndarray, size: int, limit: int, seed: int, ties: Ties | None = None
) -> tuple[np.ndarray, np.ndarray, np.ndarray, np.ndarray]:
    """:func:`_fit` on ``limit`` random rows; every other row takes the verdict of its
    10 nearest sampled rows (distance-weighted vote over their labels, noise included;
    with ``ties``, noise when most of the vote comes from rows that were noise).

    The smallest group is scaled with the sample (``size * limit / n``), so groups of
    the same absolute size are sought as in a fit on every row.
    """
    from sklearn.neighbors import NearestNeighbors

    n = x.shape[0]
    rng = np.random.default_rng(seed)
    sample = np.sort(rng.choice(n, size=limit, replace=False))
    fit_size = max(2, round(size * limit / n))
    sample_ties = None if ties is None else _ties_among(ties, sample, n)
    hard_s, prob_s, out_s, noise_s = _fit(x[sample], fit_size, sample_ties, seed)
    hard = np.empty(n, dtype=np.int64)
    noise = np.empty(n, dtype=bool)
    noise[sample] = noise_s
    prob = np.empty(n)
    out = np.empty(n)
    hard[sample], prob[sample], out[sample] = hard_s, prob_s, out_s
    rest = np.setdiff1d(np.arange(n), sample, assume_unique=True)
    k = min(10, limit)
    dist, idx = NearestNeighbors(n_neighbors=k).fit(x[sample]).kneighbors(x[rest])
    # Weights 1/d as scikit-learn's weights="distance"; an exact copy takes its copy's vote.
    with np.errstate(divide="ignore"):
        w = 1.0 / dist
    exact = np.isinf(w)
    w = np.where(exact.any(axis=1, keepdims=True), exact.astype(np.float64), w)
    lab = hard_s[idx]
    classes = np.unique(hard_s)
    votes = np.stack([(w * (lab == c)).sum(axis=1) for c in classes], axis=1)
    total = w.sum(axis=1)
    win = votes.argmax(axis=1)
    hard[rest] = classes[win]
    share = votes[np.arange(len(rest)), win] / total
    same = lab == hard[rest][:, None]
    prob[rest] = (
        share * (w * same * prob_s[idx]).sum(axis=1) / np.maximum((w * same).sum(axis=1), 1e-300)
    )
    out[rest] = (w * out_s[idx]).sum(axis=1) / total
    prob[rest] = np.where(hard[rest] < 0, 0.0, prob[rest])
    if ties is None:
        noise[rest] = hard[rest] < 0
    else:
        noise[rest] = (w * noise_s[idx]).sum(axis=1) > 0.5 * total
    return hard, prob, out, noise


def _settle(
    labels: np.ndarray, membership: np.ndarray, was_noise: np.ndarray, ties: Ties, seed: int
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Let every member move to the group that raises modularity most, on all ties.

    After a sampled fit this is where the members outside the sample meet the network.
    A member that moves counts as noise of its new group and holds with the share of its
    tie weight that goes into that group.
    """
    from .refine import refine

    n = len(labels)
    moved_to = refine(n, ties, labels, seed=seed)
    moved = moved_to != labels
    if moved.any():
        u, v, w = ties
        strength = np.bincount(u, weights=w, minlength=n)
        same = np.bincount(u, weights=w * (moved_to[u] == moved_to[v]), minlength=n)
        membership = membership.copy()
        membership[moved] = same[moved] / np.maximum(strength[moved], 1e-300)
        was_noise = was_noise | moved
    _, dense = np.unique(moved_to, return_inverse=True)
    return dense.reshape(-1).astype(np.int64), membership, was_noise


def cluster(
    vectors: np.ndarray,
    *,
    min_cluster_size: int = 0,
    reduce_to: int = 16,
    seed: int = 0,
    fit_limit: int | None = None,
    ties: Ties | None = None,
) -> Grouping:
    """Group the rows of ``vectors`` with HDBSCAN and attach every noise point.

    Parameters
    ----------
    vectors : ndarray, shape (n, d)
        One row per node.
    min_cluster_size : int
        HDBSCAN's smallest cluster; 0 chooses :func:`default_min_cluster_size`.
    reduce_to : int
        Dimensions kept by PCA after L2 normalisation (HDBSCAN's tree speed-ups fade
        past about 50 dimensions).
    seed : int
        Seed of the PCA solver (and of the sample, with ``fit_limit``).
    fit_limit : int, optional
        Fit HDBSCAN on at most this many randomly chosen rows (the number is
        :func:`fitted_rows`), with the smallest group scaled to the sample; every other
        row takes the distance-weighted verdict of its 10 nearest sampled rows (a group,
        or noise to be attached as below). ``None`` (the default) fits every row.
        HDBSCAN's cost grows with about the square of the rows fitted at 16 dimensions
        (2.7 s for 12,000 rows, 7.5 s for 20,000 on one core; the Boruvka tree it used
        before took about 220 s for 100,000; benchmarks/RESULTS.md).
    ties : tuple of ndarray, optional
        The network's ties among the rows (:func:`ties_of`). With them the groups are
        read from HDBSCAN's condensed tree by modularity on the network
        (:func:`_tree_selection`) and every member may then move to the group that
        raises modularity most (:func:`roles.embedding.refine.refine`); without them, HDBSCAN's
        own selection and the noise attached by its nearest neighbours.

    Returns
    -------
    Grouping

    References
    ----------
    .. [1] R. J. G. B. Campello, D. Moulavi, J. Sander, "Density-based clustering
       based on hierarchical density estimates", PAKDD 2013. doi:10.1007/978-3-642-37456-2_14
    .. [2] L. McInnes, J. Healy, S. Astels, "hdbscan: Hierarchical density based
       clustering", JOSS 2(11), 2017. doi:10.21105/joss.00205
    """
    n = vectors.shape[0]
    size = min_cluster_size or default_min_cluster_size(n)
    none = Grouping(
        labels=np.zeros(n, dtype=np.int64),
        membership=np.zeros(n, dtype=np.float64),
        was_noise=np.ones(n, dtype=bool),
        n_groups=0,
        min_cluster_size=size,
        dimensions=0,
    )
    if n < 2 * size or n < 4:
        return none
    x = _reduce(vectors, reduce_to, seed)
    rows = fitted_rows(n, fit_limit)
    if 4 <= rows < n:
        hard, strength, outlier, was_noise = _fit_sampled(x, size, rows, seed, ties)
        fitted = rows
    else:
        hard, strength, outlier, was_noise = _fit(x, size, ties, seed)
        fitted = n
    found = int(hard.max()) + 1 if hard.size else 0
    if found == 0:
        return Grouping(none.labels, none.membership, none.was_noise, 0, size, x.shape[1], fitted)
    labels = hard.astype(np.int64).copy()
    membership = strength.copy()
    noise = hard < 0
    if noise.any():
        labels[noise], membership[noise] = _attach(x, hard, outlier)
    if ties is not None:
        labels, membership, was_noise = _settle(labels, membership, was_noise, ties, seed)
    labels = _renumber_by_size(labels)
    return Grouping(
        labels=labels,
        membership=np.clip(membership, 0.0, 1.0),
        was_noise=was_noise,
        n_groups=int(labels.max()) + 1,
        min_cluster_size=size,
        dimensions=int(x.shape[1]),
        fitted=fitted,
    )
