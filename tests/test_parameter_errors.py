"""Every parameter error has one shape, the configuration's (worded as scikit-learn words
its own): "The 'name' parameter [of section] must be .... Got ... instead."."""

from __future__ import annotations

import re
from collections.abc import Callable
from typing import Any

import networkx as nx
import numpy as np
import pytest

from roles.analysis import confidence
from roles.analysis.compare import compare_views
from roles.analysis.measures import betweenness, role_region
from roles.analysis.modularity import modularity
from roles.config import Config, ConfigError, WalkConfig
from roles.embedding.embed import embed_walks
from roles.embedding.graph import to_csr
from roles.embedding.walks import generate_walks

SHAPE = re.compile(r"^The '\w+' parameter( of [\[\]\w.]+)? must be .+\. Got .+ instead\.$", re.S)

_CSR = to_csr(nx.karate_club_graph())
_LABELS = np.zeros(34, dtype=np.int64)

CASES: list[tuple[str, Callable[[], Any], type[Exception]]] = [
    ("config key", lambda: WalkConfig(walks_per_node=0), ConfigError),
    ("randomisations", lambda: confidence.structure_budget(100, -1), ValueError),
    (
        "view",
        lambda: confidence.stability(
            _CSR, Config(), runs=1, view="near", reference_labels=_LABELS, seed=0
        ),
        ValueError,
    ),
    (
        "runs",
        lambda: confidence.stability(
            _CSR, Config(), runs=-1, view="local", reference_labels=_LABELS, seed=0
        ),
        ValueError,
    ),
    ("labels", lambda: modularity(_CSR, np.zeros(3)), ValueError),
    (
        "walk bias",
        lambda: generate_walks(_CSR, walks_per_node=1, walk_length=5, p=9.0, q=1.0, seed=0),
        ConfigError,
    ),
    ("region", lambda: role_region(float("nan"), 0.5), ValueError),
    (
        "samples",
        lambda: betweenness(nx.karate_club_graph(), exact_limit=10, seed=0, samples=1),
        ValueError,
    ),
    (
        "feed",
        lambda: embed_walks(
            np.zeros((2, 3), dtype=np.int32),
            3,
            dimensions=4,
            window=2,
            epochs=1,
            negative=5,
            seed=0,
            feed="post",
        ),  # fmt: skip
        ValueError,
    ),
    (
        "neighbours",
        lambda: compare_views(
            np.zeros((5, 2)),
            np.zeros((5, 2)),
            np.zeros(5, int),
            np.zeros(5, int),
            k=2,
            neighbours=(np.zeros((1, 1), int), np.zeros((1, 1), int)),
        ),  # fmt: skip
        ValueError,
    ),
]


@pytest.mark.parametrize(("what", "call", "error"), CASES, ids=[c[0] for c in CASES])
def test_one_shape(what: str, call: Callable[[], Any], error: type[Exception]) -> None:
    with pytest.raises(error) as caught:
        call()
    assert SHAPE.match(str(caught.value)), str(caught.value)
