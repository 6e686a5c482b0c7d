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

__all__ = ["Grouping", "cluster", "default_min_cluster_size", "fitted_rows", "MIN_GROUP"]


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
    x: np.ndarray, hard: np.ndarray, outlier: np.ndarray, k: int = 10
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
    score = np.nan_to_num(np.asarray(outlier, dtype=np.float64)[noise], nan=1.0)
    return labels, proba.max(axis=1) * np.clip(1.0 - score, 0.0, 1.0)


def _renumber_by_size(labels: np.ndarray) -> np.ndarray:
    groups, inverse, counts = np.unique(labels, return_inverse=True, return_counts=True)
    # Largest first; ties broken by the smallest original label for repeatability.
    order = np.lexsort((groups, -counts))
    rank = np.empty(len(groups), dtype=np.int64)
    rank[order] = np.arange(len(groups))
    return rank[inverse.reshape(-1)]


def _fit(x: np.ndarray, size: int) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """HDBSCAN labels (-1 = noise), membership strengths and GLOSH outlier scores.

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
        min_samples=min(size, 5),
        algorithm="prims_balltree",
        core_dist_n_jobs=1,
    )
    with warnings.catch_warnings():
        warnings.simplefilter("ignore")
        hard = clusterer.fit_predict(x)
    return (
        np.asarray(hard, dtype=np.int64),
        np.asarray(clusterer.probabilities_, dtype=np.float64),
        np.asarray(clusterer.outlier_scores_, dtype=np.float64),
    )


def _fit_sampled(
    x: np.ndarray, size: int, limit: int, seed: int
) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """:func:`_fit` on ``limit`` random rows; every other row takes the verdict of its
    10 nearest sampled rows (distance-weighted vote over their labels, noise included).

    The smallest group is scaled with the sample (``size * limit / n``), so groups of
    the same absolute size are sought as in a fit on every row.
    """
    from sklearn.neighbors import NearestNeighbors

    n = x.shape[0]
    rng = np.random.default_rng(seed)
    sample = np.sort(rng.choice(n, size=limit, replace=False))
    fit_size = max(2, round(size * limit / n))
    hard_s, prob_s, out_s = _fit(x[sample], fit_size)
    hard = np.empty(n, dtype=np.int64)
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
    return hard, prob, out


def cluster(
    vectors: np.ndarray,
    *,
    min_cluster_size: int = 0,
    reduce_to: int = 16,
    seed: int = 0,
    fit_limit: int | None = None,
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
        hard, strength, outlier = _fit_sampled(x, size, rows, seed)
        fitted = rows
    else:
        hard, strength, outlier = _fit(x, size)
        fitted = n
    found = int(hard.max()) + 1 if hard.size else 0
    if found == 0:
        return Grouping(none.labels, none.membership, none.was_noise, 0, size, x.shape[1], fitted)
    labels = hard.astype(np.int64).copy()
    membership = strength.copy()
    noise = hard < 0
    if noise.any():
        labels[noise], membership[noise] = _attach(x, hard, outlier)
    labels = _renumber_by_size(labels)
    return Grouping(
        labels=labels,
        membership=np.clip(membership, 0.0, 1.0),
        was_noise=noise,
        n_groups=int(labels.max()) + 1,
        min_cluster_size=size,
        dimensions=int(x.shape[1]),
        fitted=fitted,
    )
