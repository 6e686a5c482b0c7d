"""Agreement of the two views."""

import numpy as np
import pytest
from sklearn.metrics import adjusted_rand_score, normalized_mutual_info_score

from roles.analysis.compare import (
    compare_views,
    nearest_neighbours,
    neighbour_count,
    neighbour_overlap,
)


def test_identical_views_overlap_fully():
    x = np.random.default_rng(0).normal(size=(50, 8))
    assert np.allclose(neighbour_overlap(x, x, k=5), 1.0)


def test_overlap_worked_by_hand():
    # Points on a line: 0, 1, 2, 10 in view A; 0, 1, 10, 2 (2 and 3 swapped) in view B.
    a = np.array([[0.0, 1.0], [1.0, 1.0], [2.0, 1.0], [10.0, 1.0]])
    b = np.array([[0.0, 1.0], [1.0, 1.0], [10.0, 1.0], [2.0, 1.0]])
    # Vectors are compared by direction (normalised), as cosine similarity does.
    # Directions of a: angles atan(1/x) -> 90, 45, 26.6, 5.7 degrees; nearest by angle:
    #   A: 0->1, 1->2, 2->1, 3->2.   B: 0->1, 1->3, 2->3, 3->1 (x=2 now sits at index 3).
    # With k=1 the Jaccard index is 1 where the single neighbours match, else 0.
    got = neighbour_overlap(a, b, k=1)
    assert got.tolist() == [1.0, 0.0, 0.0, 0.0]


def test_partition_scores_match_scikit_learn():
    rng = np.random.default_rng(4)
    x = rng.normal(size=(60, 4))
    la, lb = rng.integers(0, 3, 60), rng.integers(0, 4, 60)
    c = compare_views(x, x, la, lb, k=5)
    # Reference values: scikit-learn's own implementations.
    assert c.ari == adjusted_rand_score(la, lb)
    assert c.nmi == normalized_mutual_info_score(la, lb)
    assert c.contingency.sum() == 60 and c.contingency.shape == (3, 4)
    assert c.k == 5


def _overlap_by_sets(a, b, k):
    # Reference: the definition written out with Python sets and scikit-learn's
    # exact neighbour search on unit vectors (Jaccard 1912: |A & B| / |A | B|).
    from sklearn.neighbors import NearestNeighbors

    def lists(x):
        x = x / np.linalg.norm(x, axis=1, keepdims=True)
        idx = NearestNeighbors(n_neighbors=k + 1).fit(x).kneighbors(x, return_distance=False)
        return [[j for j in row if j != i][:k] for i, row in enumerate(idx)]

    la, lb = lists(a), lists(b)
    return np.array(
        [len(set(p) & set(q)) / len(set(p) | set(q)) for p, q in zip(la, lb, strict=True)]
    )


def test_overlap_matches_the_set_definition():
    rng = np.random.default_rng(11)
    a = rng.normal(size=(300, 6))
    b = a + rng.normal(scale=0.5, size=a.shape)  # related views: overlaps spread over [0, 1]
    got = neighbour_overlap(a, b, k=7)
    want = _overlap_by_sets(a, b, 7)
    assert np.array_equal(got, want)
    assert 0.0 < got.mean() < 1.0


def test_overlap_with_duplicate_points():
    # Repeated rows tie at distance zero and may push a row out of its own list; each
    # row still gets k neighbours other than itself, as in the set definition.
    rng = np.random.default_rng(5)
    base = rng.normal(size=(40, 4))
    a = np.vstack([base, base[:10], np.repeat(base[:1], 6, axis=0)])  # 7 copies of row 0
    b = np.vstack([base[::-1], base[:10], np.repeat(base[:1], 6, axis=0)])
    got = neighbour_overlap(a, b, k=4)
    assert np.array_equal(got, _overlap_by_sets(a, b, 4))
    assert np.all((got >= 0) & (got <= 1))


def test_precomputed_neighbours_give_the_same_comparison():
    rng = np.random.default_rng(11)
    a, b = rng.normal(size=(80, 6)), rng.normal(size=(80, 6))
    la, lb = rng.integers(0, 3, 80), rng.integers(0, 3, 80)
    k = neighbour_count(80)
    given = (nearest_neighbours(a, k), nearest_neighbours(b, k))
    with_lists = compare_views(a, b, la, lb, neighbours=given)
    searched = compare_views(a, b, la, lb)
    assert np.array_equal(with_lists.overlap, searched.overlap)
    assert with_lists.k == searched.k == 10
    # The lists are each row's nearest others by cosine, checked by a plain sort here.
    unit = a / np.linalg.norm(a, axis=1, keepdims=True)
    sim = unit @ unit.T
    np.fill_diagonal(sim, -np.inf)
    assert np.array_equal(
        np.sort(given[0], axis=1), np.sort(np.argsort(-sim, axis=1)[:, :k], axis=1)
    )
    with pytest.raises(ValueError):
        compare_views(a, b, la, lb, neighbours=(given[0][:, :5], given[1]))
