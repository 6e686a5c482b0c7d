"""Clustering stage: HDBSCAN on reduced vectors, every point attached to a group."""

import numpy as np
import pytest
from sklearn.datasets import make_blobs
from sklearn.metrics import adjusted_rand_score

from roles.embedding.cluster import cluster, default_min_cluster_size, default_min_samples


def test_well_separated_blobs_are_recovered():
    # Truth: the generating blob of each point (scikit-learn make_blobs).
    x, truth = make_blobs(n_samples=300, centers=4, n_features=32, cluster_std=0.6, random_state=3)
    g = cluster(x, seed=0)
    assert g.n_groups == 4
    assert adjusted_rand_score(truth, g.labels) > 0.95


def test_every_point_gets_a_group_and_a_bounded_membership():
    x, _ = make_blobs(n_samples=200, centers=3, n_features=16, cluster_std=2.5, random_state=1)
    x = np.vstack([x, np.random.default_rng(0).uniform(-15, 15, size=(40, 16))])
    g = cluster(x, seed=0)
    assert g.labels.shape == (240,)
    assert g.labels.min() >= 0 and g.labels.max() == g.n_groups - 1
    assert np.all((g.membership >= 0) & (g.membership <= 1))
    assert g.was_noise.any(), "uniform noise points should have been flagged as noise"
    # Attached noise points hold more loosely than core points.
    assert g.membership[g.was_noise].mean() < g.membership[~g.was_noise].mean()


def test_groups_are_numbered_by_decreasing_size():
    x, _ = make_blobs(n_samples=[150, 60, 30], n_features=8, cluster_std=0.5, random_state=2)
    g = cluster(x, seed=0)
    sizes = np.bincount(g.labels)
    assert list(sizes) == sorted(sizes, reverse=True)


def test_too_few_points_form_no_group():
    g = cluster(np.random.default_rng(0).normal(size=(6, 8)), seed=0)
    assert g.n_groups == 0
    assert np.all(g.labels == 0) and np.all(g.membership == 0)


@pytest.mark.parametrize("n", [34, 200, 20000, 100000])
def test_default_min_cluster_size(n):
    # Our own rule, from our benchmarks (benchmarks/RESULTS.md): 5 at every size.
    assert default_min_cluster_size(n) == 5


def test_renumbering_matches_the_rule():
    # Rule of _renumber_by_size: largest group first, ties by smaller original label.
    from roles.embedding.cluster import _renumber_by_size

    labels = np.array([7, 3, 3, 7, 9, 9, 9, 1])
    # Sizes: 9 -> 3, 3 -> 2, 7 -> 2, 1 -> 1; so 9->0, 3->1 (tie with 7, smaller), 7->2, 1->3.
    assert _renumber_by_size(labels).tolist() == [2, 1, 1, 2, 0, 0, 0, 3]


def test_fit_limit_at_or_above_n_changes_nothing():
    x, _ = make_blobs(n_samples=400, centers=3, n_features=16, cluster_std=1.5, random_state=4)
    full = cluster(x, seed=1)
    same = cluster(x, seed=1, fit_limit=400)
    assert np.array_equal(full.labels, same.labels)
    assert np.array_equal(full.membership, same.membership)
    assert full.fitted == same.fitted == 400


def test_fitted_rows_follows_its_rule():
    # Rule of roles.embedding.cluster.fitted_rows: min(limit, max(12000, ceil(0.6 n))), or all rows
    # when that is not fewer than n; figures worked by hand from the rule.
    from roles.embedding.cluster import fitted_rows

    assert fitted_rows(20_000, None) == 20_000
    assert fitted_rows(12_000, 20_000) == 12_000  # floor reaches n: full fit
    assert fitted_rows(12_001, 20_000) == 12_000
    assert fitted_rows(20_000, 20_000) == 12_000  # 0.6 * 20,000
    assert fitted_rows(25_001, 20_000) == 15_001  # ceil(15,000.6)
    assert fitted_rows(33_334, 20_000) == 20_000  # ceil(20,000.4) capped by the limit
    assert fitted_rows(100_000, 20_000) == 20_000
    assert fitted_rows(3_000, 1_000) == 1_000  # a limit below the floor is kept
    assert fitted_rows(500, 250) == 250


def test_sampled_fit_recovers_separated_blobs():
    # Truth: the generating blob (scikit-learn make_blobs); the fit sees a third of them.
    x, truth = make_blobs(n_samples=3000, centers=5, n_features=32, cluster_std=0.8, random_state=6)
    g = cluster(x, seed=2, fit_limit=1000)
    assert g.fitted == 1000
    assert g.n_groups == 5
    assert adjusted_rand_score(truth, g.labels) > 0.95
    assert g.labels.shape == (3000,) and g.labels.min() >= 0
    assert np.all((g.membership >= 0) & (g.membership <= 1))
    again = cluster(x, seed=2, fit_limit=1000)
    assert np.array_equal(g.labels, again.labels)  # same seed, same sample, same groups


@pytest.mark.parametrize(
    "n, expected", [(34, 5), (299, 5), (300, 3), (1000, 3), (3000, 3), (3001, 5), (20000, 5)]
)
def test_min_samples_is_three_only_from_300_to_3000_rows(n, expected):
    # Our rule (roles/cluster.py, measured in benchmarks/RESULTS.md): 5 keeps the karate
    # club's leaders at the top of the hub list; 3 finds loosely knit LFR communities.
    assert default_min_samples(n) == expected
