"""Two views -> agreement figures.

Between the groupings: adjusted Rand index (Hubert & Arabie 1985), normalised mutual
information (scikit-learn's arithmetic-mean normalisation) and the contingency table.
Per node: the Jaccard index (Jaccard 1912) of its k nearest neighbours in each view.
"""

from __future__ import annotations

from dataclasses import dataclass

import numpy as np

from ..errors import parameter_error

__all__ = [
    "Comparison",
    "compare_views",
    "nearest_neighbours",
    "neighbour_overlap",
    "neighbour_count",
]


@dataclass(frozen=True, eq=False)
class Comparison:
    """How far the local and far views agree.

    Attributes
    ----------
    ari, nmi : float
        Agreement of the two groupings (1 = identical up to renaming).
    contingency : ndarray of int, shape (local groups, far groups)
        ``contingency[i, j]`` nodes are in local group i and far group j.
    overlap : ndarray of float, shape (n,)
        Per node, Jaccard overlap of its k nearest neighbours in the two views.
    k : int
        Neighbours compared per node.
    """

    ari: float
    nmi: float
    contingency: np.ndarray
    overlap: np.ndarray
    k: int


def neighbour_count(n: int, k: int = 10) -> int:
    """Neighbours compared per node among ``n`` nodes: ``k``, at most ``n - 1``."""
    return max(1, min(k, n - 1)) if n > 1 else 0


def nearest_neighbours(vectors: np.ndarray, k: int) -> np.ndarray:
    """Indices of each row's ``k`` nearest other rows by cosine similarity, nearest first.

    Exact search (scikit-learn's brute force at these dimensions). Each view's search
    can run in the process that computed the view; :func:`compare_views` takes the
    results.
    """
    from sklearn.neighbors import NearestNeighbors

    x = np.asarray(vectors, dtype=np.float64)
    norms = np.linalg.norm(x, axis=1, keepdims=True)
    x = x / np.where(norms > 0, norms, 1.0)
    # Euclidean distance on unit vectors orders neighbours as cosine similarity does.
    nn = NearestNeighbors(n_neighbors=k + 1).fit(x)
    idx = nn.kneighbors(x, return_distance=False)
    # Drop the point itself, keeping the order of the others; when duplicates pushed it
    # out of its own list, the first k neighbours remain.
    other = idx != np.arange(x.shape[0])[:, None]
    first = np.argsort(~other, axis=1, kind="stable")[:, :k]
    return np.take_along_axis(idx, first, axis=1).astype(np.int64, copy=False)


def _jaccard_rows(a: np.ndarray, b: np.ndarray) -> np.ndarray:
    """|A ∩ B| / |A ∪ B| of the sets of entries of each row pair (rows of equal width)."""
    a, b = np.sort(a, axis=1), np.sort(b, axis=1)
    # First occurrence of each value in a sorted row: the row's set.
    a_first = np.ones(a.shape, dtype=bool)
    a_first[:, 1:] = a[:, 1:] != a[:, :-1]
    b_first = np.ones(b.shape, dtype=bool)
    b_first[:, 1:] = b[:, 1:] != b[:, :-1]
    out = np.empty(a.shape[0])
    step = max(1, 2_000_000 // max(1, a.shape[1] * b.shape[1]))  # bounded scratch memory
    for lo in range(0, a.shape[0], step):
        sa, sb = a[lo : lo + step], b[lo : lo + step]
        found = (sa[:, :, None] == sb[:, None, :]).any(axis=2) & a_first[lo : lo + step]
        inter = found.sum(axis=1)
        union = a_first[lo : lo + step].sum(axis=1) + b_first[lo : lo + step].sum(axis=1) - inter
        out[lo : lo + step] = inter / union
    return out


def neighbour_overlap(a: np.ndarray, b: np.ndarray, *, k: int = 10) -> np.ndarray:
    """Jaccard overlap |A ∩ B| / |A ∪ B| of each row's k nearest neighbours in two views.

    References
    ----------
    .. [1] P. Jaccard, "The distribution of the flora in the alpine zone",
       New Phytologist 11(2), 1912. doi:10.1111/j.1469-8137.1912.tb05611.x
    """
    n = a.shape[0]
    if n < 2:
        return np.ones(n)
    k = neighbour_count(n, k)
    return _jaccard_rows(nearest_neighbours(a, k), nearest_neighbours(b, k))


def compare_views(
    local_vectors: np.ndarray,
    far_vectors: np.ndarray,
    local_labels: np.ndarray,
    far_labels: np.ndarray,
    *,
    k: int = 10,
    neighbours: tuple[np.ndarray, np.ndarray] | None = None,
) -> Comparison:
    """Agreement of the two views, as groupings and node by node.

    ``neighbours``, when given, holds each view's :func:`nearest_neighbours` of the
    rows (``neighbour_count(n, k)`` columns), so the searches are not repeated here.

    References
    ----------
    .. [1] L. Hubert, P. Arabie, "Comparing partitions", Journal of Classification 2,
       1985. doi:10.1007/BF01908075
    """
    from sklearn.metrics import adjusted_rand_score, normalized_mutual_info_score
    from sklearn.metrics.cluster import contingency_matrix

    n = len(local_labels)
    k_used = neighbour_count(n, k)
    if neighbours is not None:
        a, b = neighbours
        if a.shape != (n, k_used) or b.shape != (n, k_used):
            raise parameter_error("neighbours", f"two arrays of shape {(n, k_used)}", a.shape)
        overlap = _jaccard_rows(a, b)
    else:
        overlap = neighbour_overlap(local_vectors, far_vectors, k=k)
    return Comparison(
        ari=float(adjusted_rand_score(local_labels, far_labels)),
        nmi=float(normalized_mutual_info_score(local_labels, far_labels)),
        contingency=np.asarray(contingency_matrix(local_labels, far_labels)),
        overlap=overlap,
        k=k_used,
    )
