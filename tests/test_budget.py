"""Walk budget: large networks get a narrower window and shorter walks; networks of 300 to
2,727 members longer walks and a wider window; small ones more epochs."""

import dataclasses

import pytest

from roles.config import Config, EmbeddingConfig, WalkConfig, config_from_mapping
from roles.embedding.budget import (
    LONG_WALK_LENGTH,
    MAX_EPOCHS,
    MAX_PAIRS_PER_VIEW,
    MIN_TOKENS_PER_VIEW,
    MIN_WALK_LENGTH,
    MIN_WALKS_PER_NODE,
    MIN_WINDOW,
    WIDE_WINDOW,
    skipgram_pairs,
    training_floor,
    walk_budget,
)


def _pairs(n: int, config: Config) -> int:
    # Cost model written out independently: one token per node visited, each token
    # trained against window + 1 context words on average (word2vec's reduced window,
    # Mikolov et al. 2013, as gensim implements it), once per epoch.
    w, e = config.walks, config.embedding
    return n * w.walks_per_node * w.walk_length * (e.window + 1) * e.epochs


def test_cost_model():
    config = Config(walks=WalkConfig(10, 40), embedding=EmbeddingConfig(window=2, epochs=1))
    assert skipgram_pairs(20000, config) == 20000 * 10 * 40 * 3  # = 24,000,000
    assert skipgram_pairs(20000, config) == _pairs(20000, config)


def _config(window: int = 2) -> Config:
    return Config(embedding=EmbeddingConfig(window=window))


@pytest.mark.parametrize("n, m", [(2728, 27280), (10000, 100000), (20000, 200000)])
def test_networks_that_cannot_afford_longer_walks_keep_the_configuration(n, m):
    # 2,728 x 10 walks x 80 nodes x (10 + 1) = 24,006,400 pairs > 24,000,000 (the cap).
    config = _config()
    assert _pairs(n, config) <= MAX_PAIRS_PER_VIEW  # precondition of this case
    got, note = walk_budget(n, m, config)
    assert got is config
    assert note is None


@pytest.mark.parametrize("n, m", [(30000, 300000), (100000, 1000000), (1000000, 5000000)])
@pytest.mark.parametrize("window", [2, 5])
def test_large_networks_are_scaled_down_with_a_note(n, m, window):
    config = _config(window)
    assert _pairs(n, config) > MAX_PAIRS_PER_VIEW  # precondition of this case
    got, note = walk_budget(n, m, config)
    w = got.walks
    assert w.walks_per_node >= MIN_WALKS_PER_NODE
    assert w.walk_length >= MIN_WALK_LENGTH
    at_floor = (w.walks_per_node, w.walk_length) == (MIN_WALKS_PER_NODE, MIN_WALK_LENGTH)
    assert _pairs(n, got) <= MAX_PAIRS_PER_VIEW or at_floor
    assert _pairs(n, got) < _pairs(n, config)
    assert note is not None
    # The note gives the sizes and the old and new walk length in figures a reader can check.
    for figure in (f"{n:,}", f"{m:,}", str(w.walk_length), "40"):
        assert figure in note


def test_walks_are_shortened_before_they_are_thinned():
    got, _ = walk_budget(100000, 1000000, _config())
    assert got.walks.walk_length < 40
    assert got.walks.walks_per_node == 10


def test_only_the_walk_settings_and_the_window_change():
    config = Config(seed=7, embedding=EmbeddingConfig(dimensions=32, window=3))
    got, _ = walk_budget(100000, 1000000, config)
    assert got.walks != config.walks
    assert got.embedding.window == MIN_WINDOW
    same = dataclasses.replace(got, walks=config.walks, embedding=config.embedding)
    assert same == config


def test_the_window_narrows_before_the_walks_shorten():
    # 15,000 nodes at 10 walks of 40: window 5 is 36M pairs, window 3 is 24M (the cap).
    got, note = walk_budget(15000, 150000, _config(window=5))
    assert got.walks == WalkConfig(10, 40)
    assert got.embedding.window == 3
    assert _pairs(15000, got) <= MAX_PAIRS_PER_VIEW
    assert "up to 3" in note and "up to 5" in note
    # One step wider would break the cap.
    wider = dataclasses.replace(got, embedding=EmbeddingConfig(window=4))
    assert _pairs(15000, wider) > MAX_PAIRS_PER_VIEW


def test_networks_that_afford_it_get_longer_walks_and_a_wider_window():
    # From 300 up to 2,727 members (2,727 x 10 x 80 x 11 = 23,997,600 pairs, within the
    # cap): walks of 80 at window 10, the setting of Kojaku et al., Nat. Commun. 15, 9446
    # (2024). Below 300 the defaults stay (the demos: 198 and 270 members).
    for n in (300, 1000, 2727):
        got, note = walk_budget(n, 10 * n, Config())
        assert (got.walks.walk_length, got.embedding.window) == (LONG_WALK_LENGTH, WIDE_WINDOW)
        assert got.walks.walks_per_node == Config().walks.walks_per_node
        assert _pairs(n, got) // got.embedding.epochs <= MAX_PAIRS_PER_VIEW  # one epoch
        assert "80 members instead of 40" in note and "up to 10" in note
    for n in (34, 198, 270, 299, 2728, 10000):
        got, _ = walk_budget(n, 10 * n, Config())
        assert got.walks == Config().walks and got.embedding.window == Config().embedding.window


def test_walks_set_by_the_user_are_not_lengthened():
    config = config_from_mapping({"walks": {"walks_per_node": 10, "walk_length": 40}})
    got, note = walk_budget(1000, 10000, config)
    assert got.walks == config.walks and got.embedding.epochs == 1
    assert got.embedding.window == WIDE_WINDOW  # the window was not given: it widens
    assert "walk visited" not in note


# Training floor: tokens per view = n * walks_per_node * walk_length * epochs; the
# expected epochs are worked by hand from MIN_TOKENS_PER_VIEW = 150,000 (our own rule,
# roles/budget.py) and the defaults of 10 walks of 40 members below 300 members (80
# from 300): 150,000 / (34 x 400) = 11.03 -> 12 epochs for the karate club.
@pytest.mark.parametrize(
    "n, epochs",
    [(15, 25), (34, 12), (80, 5), (200, 2), (299, 2), (300, 1), (1000, 1), (10, 30), (3, 30)],
)
def test_small_networks_train_longer(n, epochs):
    got, note = walk_budget(n, 3 * n, Config())
    steps = n * 10 * (80 if n >= 300 else 40)  # walk steps per epoch
    assert got.embedding.epochs == epochs == min(MAX_EPOCHS, -(-150_000 // steps))
    if epochs > 1:
        assert steps * epochs >= MIN_TOKENS_PER_VIEW or epochs == MAX_EPOCHS
        assert steps * (epochs - 1) < MIN_TOKENS_PER_VIEW  # no more than needed
        assert f"{epochs} times instead of once" in note
        assert got.walks == Config().walks and got.embedding.window == 5
    else:
        assert note is None or "times instead of once" not in note


def test_epochs_set_by_the_user_are_kept():
    config = config_from_mapping({"embedding": {"epochs": 2}})
    assert config.epochs_given
    got, note = walk_budget(34, 78, config)
    assert got is config and note is None


def test_a_raised_budget_is_stable():
    once, _ = training_floor(34, Config())
    twice, note = training_floor(34, once)
    assert twice is once and note is None


def test_a_narrow_window_is_never_widened():
    config = _config(window=1)
    got, _ = walk_budget(100000, 1000000, config)
    assert got.embedding.window == 1
    assert got.walks.walk_length < 40


def test_budget_uses_the_allowance():
    # Between the cap and the floor, one node more per walk would break the cap.
    n = 25000
    config = _config()
    got, _ = walk_budget(n, 10 * n, config)
    w = got.walks
    assert MIN_WALK_LENGTH < w.walk_length < 40
    longer = dataclasses.replace(got, walks=WalkConfig(w.walks_per_node, w.walk_length + 1))
    assert _pairs(n, got) <= MAX_PAIRS_PER_VIEW < _pairs(n, longer)


def test_scaled_budget_is_stable():
    # Applying the budget to its own output changes nothing more and adds no note.
    once, _ = walk_budget(100000, 1000000, _config())
    twice, note = walk_budget(100000, 1000000, once)
    assert twice.walks == once.walks
    assert note is None


def test_bigger_networks_never_get_longer_walks():
    sizes = [2728, 10000, 20000, 25000, 50000, 100000, 300000, 1000000]
    budgets = [walk_budget(n, 10 * n, _config())[0].walks for n in sizes]
    per_node = [w.walks_per_node * w.walk_length for w in budgets]
    assert per_node == sorted(per_node, reverse=True)


def test_a_small_configured_budget_is_never_raised():
    config = Config(walks=WalkConfig(walks_per_node=2, walk_length=10))
    got, note = walk_budget(10**6, 10**7, config)
    assert got.walks == config.walks
    assert got.embedding.window == MIN_WINDOW  # only the window narrows
    assert "walk visited" not in note


def test_walk_keys_set_by_the_user_are_left_alone():
    config = config_from_mapping({"walks": {"walks_per_node": 10, "walk_length": 40}})
    assert config.walks_given and not config.window_given
    got, note = walk_budget(100000, 1000000, config)
    assert got.walks == config.walks
    assert got.embedding.window == MIN_WINDOW  # the window was not given: it narrows
    assert "walk visited" not in note


def test_a_window_set_by_the_user_is_left_alone():
    config = config_from_mapping({"embedding": {"window": 5}})
    assert config.window_given and not config.walks_given
    got, note = walk_budget(100000, 1000000, config)
    assert got.embedding.window == 5
    assert got.walks.walk_length == MIN_WALK_LENGTH
    assert "either side" not in note


def test_settings_all_given_are_left_alone():
    config = config_from_mapping(
        {"walks": {"walks_per_node": 10, "walk_length": 40}, "embedding": {"window": 5}}
    )
    got, note = walk_budget(100000, 1000000, config)
    assert got is config
    assert note is None
