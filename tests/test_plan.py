"""The run recipe (roles.plan, roles.seeds): stage seeds and the one table of size limits."""

from __future__ import annotations

import dataclasses

import numpy as np
import pytest

from roles.config import ConfidenceConfig, Config
from roles.embedding.cluster import fitted_rows
from roles.plan import RERUNS_FULL_NODES, RERUNS_ONE_NODES, STRUCTURE_MAX_TIES, budget
from roles.seeds import StageSeeds, seed_list


def test_stage_seeds_are_numpy_seed_sequence_children() -> None:
    # Expected values computed with numpy's SeedSequence directly (its documented
    # spawn/generate_state), not with the code under test.
    for seed in (0, 1, 20261202):
        children = np.random.SeedSequence(seed).spawn(9)
        words = [int(c.generate_state(1)[0]) for c in children]
        pairs = [tuple(int(x) for x in c.generate_state(2)) for c in children[:2]]
        s = StageSeeds.of(seed)
        assert s.view_walks == {"local": pairs[0], "far": pairs[1]}
        assert s.view_groups == {"local": words[2], "far": words[3]}
        assert (s.roles, s.louvain, s.confidence, s.trial_walks, s.what_if) == tuple(words[4:])
        # A child's stream does not depend on how many siblings were spawned.
        assert int(np.random.SeedSequence(seed).spawn(4)[3].generate_state(1)[0]) == s.far_groups


def test_stage_seeds_are_frozen_and_distinct() -> None:
    s = StageSeeds.of(3)
    with pytest.raises(dataclasses.FrozenInstanceError):
        s.louvain = 1  # type: ignore[misc]
    flat = [*s.local_walks, *s.far_walks, s.local_groups, s.far_groups, s.roles, s.louvain,
            s.confidence, s.trial_walks, s.what_if]  # fmt: skip
    assert len(set(flat)) == len(flat)


def test_seed_list_skips_the_seed_to_avoid() -> None:
    values = seed_list(5, 3)
    assert seed_list(5, 3, avoid=values[1]) == [values[0], values[2], seed_list(5, 4)[3]]


@pytest.mark.parametrize(
    ("tied", "runs"),
    [
        (RERUNS_FULL_NODES, 3),
        (RERUNS_FULL_NODES + 1, 1),
        (RERUNS_ONE_NODES, 1),
        (RERUNS_ONE_NODES + 1, 0),
    ],
)
def test_reruns_follow_the_size_table(tied: int, runs: int) -> None:
    b = budget(tied, tied, 3 * tied, Config())
    assert b.reruns == runs
    assert (b.confidence_note is None) == (runs == Config().confidence.runs)


def test_structure_test_stops_beyond_its_tie_limit_unless_asked() -> None:
    assert budget(1000, 1000, STRUCTURE_MAX_TIES, Config()).randomisations == 20
    over = budget(1000, 1000, STRUCTURE_MAX_TIES + 1, Config())
    assert over.randomisations == 0 and "no structure test" in (over.confidence_note or "")
    full = Config(confidence=ConfidenceConfig(scale_down=False))
    b = budget(50_000, 50_000, 2 * STRUCTURE_MAX_TIES, full)
    assert (b.reruns, b.randomisations, b.confidence_note) == (3, 20, None)


def test_sampled_fit_is_in_the_budget_with_its_note() -> None:
    small = budget(5000, 5000, 20_000, Config())
    assert small.fitted_rows == 5000 and small.cluster_note is None
    large = budget(40_000, 39_000, 200_000, Config())
    assert large.fitted_rows == fitted_rows(39_000, 20_000) == 20_000
    assert "20,000 randomly chosen members of the 39,000" in (large.cluster_note or "")


def test_walk_budget_passes_through() -> None:
    # A large network's walks are cut (roles.embedding.budget), a small one's epochs
    # raised; the budget carries the changed configuration and its note.
    big = budget(2_000_000, 2_000_000, 10_000_000, Config())
    assert big.config.walks.walk_length < Config().walks.walk_length and big.walk_note
    tiny = budget(34, 34, 78, Config())
    assert tiny.config.embedding.epochs > Config().embedding.epochs and tiny.walk_note


def test_betweenness_sources_are_in_the_table() -> None:
    # Exact up to 5,000 members (EXACT_LIMIT); beyond, ceil(5000**2 / n) sources, at
    # least 1,000 (roles.analysis.measures.betweenness_sources, measured in
    # benchmarks/bench_measures.py).
    assert budget(5000, 5000, 20_000, Config()).betweenness_sources is None
    assert budget(20_000, 20_000, 200_000, Config()).betweenness_sources == 1250
    assert budget(100_000, 100_000, 10**6, Config()).betweenness_sources == 1000
