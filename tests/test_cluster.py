"""Clustering stage: HDBSCAN on reduced vectors, every point attached to a group."""

import numpy as np
import pytest
from sklearn.datasets import make_blobs
from sklearn.metrics import adjusted_rand_score

from roles.cluster import cluster, default_min_cluster_size


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


@pytest.mark.parametrize("n, expected", [(34, 5), (200, 7), (20000, 71), (100000, 158)])
def test_default_min_cluster_size(n, expected):
    # Our own rule (common practice, not a published one): max(5, round(sqrt(n) / 2)).
    assert default_min_cluster_size(n) == expected
