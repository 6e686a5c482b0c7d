"""Skip-gram vectors of walks and the two node2vec views."""

from __future__ import annotations

import dataclasses
import hashlib
import os
import subprocess
import sys
from pathlib import Path

import networkx as nx
import numpy as np
import pytest

from roles.config import Config, EmbeddingConfig, WalkConfig
from roles.embedding.embed import (
    FEEDS,
    Embedding,
    embed_views,
    embed_views_then,
    embed_walks,
    untrained_nodes,
)
from roles.embedding.graph import to_csr
from roles.embedding.walks import generate_walks

SMALL = dict(dimensions=16, window=3, epochs=2, negative=5)


def _two_cliques() -> nx.Graph:
    """Two disconnected cliques: even node numbers (8 nodes) and odd ones (7 nodes)."""
    graph = nx.Graph()
    graph.add_nodes_from(range(15))
    for part in (range(0, 15, 2), range(1, 15, 2)):
        graph.add_edges_from((a, b) for a in part for b in part if a < b)
    return graph


def _cosine(v: np.ndarray) -> np.ndarray:
    unit = v / np.linalg.norm(v, axis=1, keepdims=True)
    return unit @ unit.T


@pytest.mark.parametrize("feed", FEEDS)
def test_rows_follow_node_index(feed: str) -> None:
    graph = _two_cliques()
    csr = to_csr(graph)
    walks = generate_walks(csr, walks_per_node=20, walk_length=20, p=1.0, q=1.0, seed=1)
    vectors = embed_walks(walks, csr.n_nodes, seed=3, feed=feed, **SMALL)
    assert vectors.shape == (15, 16) and vectors.dtype == np.float32
    # Walks never cross between components, so skip-gram (Mikolov et al. 2013) puts
    # co-walking nodes closer: every node is nearer to all of its own clique than to any
    # node of the other.
    # Rows in gensim's frequency order instead of index order would break this, as the
    # cliques interleave in index order and differ in degree.
    sim = _cosine(vectors)
    side = np.arange(15) % 2
    for i in range(15):
        same = side == side[i]
        same[i] = False
        assert sim[i, same].min() > sim[i, side != side[i]].max()


def test_isolated_nodes_get_zero_rows() -> None:
    graph = nx.cycle_graph(6)
    graph.add_nodes_from(["loner-a", "loner-b"])
    csr = to_csr(graph)
    walks = generate_walks(csr, walks_per_node=5, walk_length=10, p=1.0, q=2.0, seed=2)
    mask = untrained_nodes(walks, csr.n_nodes)
    assert mask.tolist() == [False] * 6 + [True, True]
    vectors = embed_walks(walks, csr.n_nodes, seed=1, **SMALL)
    assert np.all(vectors[6:] == 0.0)
    assert np.all(np.linalg.norm(vectors[:6], axis=1) > 0)
    # A node absent from the walks altogether also gets a row, a zero one.
    vectors = embed_walks(walks, csr.n_nodes + 1, seed=1, **SMALL)
    assert vectors.shape[0] == 9 and np.all(vectors[8] == 0.0)


@pytest.mark.parametrize("feed", FEEDS)
def test_same_seed_same_bytes_other_seed_other_vectors(feed: str) -> None:
    csr = to_csr(nx.karate_club_graph())  # Zachary 1977, bundled with networkx
    walks = generate_walks(csr, walks_per_node=5, walk_length=20, p=1.0, q=0.5, seed=4)
    a = embed_walks(walks, csr.n_nodes, seed=7, feed=feed, **SMALL)
    b = embed_walks(walks, csr.n_nodes, seed=7, feed=feed, **SMALL)
    c = embed_walks(walks, csr.n_nodes, seed=8, feed=feed, **SMALL)
    assert a.tobytes() == b.tobytes()
    assert not np.allclose(a, c)


_CHILD = """
import hashlib, sys
import networkx as nx
from roles.config import Config, EmbeddingConfig, WalkConfig
from roles.embedding.embed import embed_views
from roles.embedding.graph import to_csr
config = Config(seed=5, walks=WalkConfig(4, 15), embedding=EmbeddingConfig(8, 3, 1, 5))
views = embed_views(to_csr(nx.karate_club_graph()), config, processes=1)
for name in ("local", "far"):
    print(name, hashlib.sha256(views[name].vectors.tobytes()).hexdigest())
"""


def _config(seed: int = 5) -> Config:
    return Config(
        seed=seed,
        walks=WalkConfig(walks_per_node=4, walk_length=15),
        embedding=EmbeddingConfig(dimensions=8, window=3, epochs=1, negative=5),
    )


def test_identical_across_processes_and_hash_seeds() -> None:
    root = Path(__file__).resolve().parents[1]
    env = dict(os.environ)
    env["PYTHONPATH"] = os.pathsep.join([str(root), env.get("PYTHONPATH", "")])
    children = []
    for hash_seed in ("1", "987"):
        env_i = dict(env, PYTHONHASHSEED=hash_seed)
        children.append(
            subprocess.Popen(
                [sys.executable, "-c", _CHILD], env=env_i, stdout=subprocess.PIPE, text=True
            )
        )
    outputs = [child.communicate(timeout=120)[0] for child in children]
    assert all(child.returncode == 0 for child in children)
    views = embed_views(to_csr(nx.karate_club_graph()), _config(), processes=1)
    here = "".join(
        f"{name} {hashlib.sha256(views[name].vectors.tobytes()).hexdigest()}\n"
        for name in ("local", "far")
    )
    assert outputs[0] == outputs[1] == here


def test_views_in_two_processes_match_one_process() -> None:
    graph = nx.karate_club_graph()
    graph.add_node("nobody")
    csr = to_csr(graph)
    config = _config()
    together = embed_views(csr, config, processes=2, keep_walks=True)
    apart = embed_views(csr, config, processes=1)
    assert set(together) == {"local", "far"}
    for name, view in config.views.items():
        e = together[name]
        assert isinstance(e, Embedding)
        assert e.vectors.tobytes() == apart[name].vectors.tobytes()
        assert (e.view, e.p, e.q) == (name, view.p, view.q)
        assert e.names == csr.names and e.vectors.shape == (35, 8)
        assert e.n_walks == 35 * 4 and e.walk_length == 15
        assert e.n_isolated == 1 and e.n_untrained == 1 and e.untrained[34]
        # 34 connected nodes make 14 moves per walk; the isolated node's walks stop at once.
        assert e.n_steps == 34 * 4 * 14 and e.n_stopped == 4
        assert e.walks is not None and e.walks.shape == (140, 15)
        assert apart[name].walks is None
    assert together["local"].walk_seed != together["far"].walk_seed
    assert not np.allclose(together["local"].vectors, together["far"].vectors)
    other = embed_views(csr, dataclasses.replace(config, seed=6), processes=1)
    assert not np.allclose(other["local"].vectors, apart["local"].vectors)


def _where_and_what(view: str, embedding: Embedding) -> tuple[int, str, str]:
    # Module level, so a spawned process can unpickle it.
    return os.getpid(), view, hashlib.sha256(embedding.vectors.tobytes()).hexdigest()


def test_follow_up_runs_beside_each_view() -> None:
    csr = to_csr(nx.karate_club_graph())
    config = _config()
    together = embed_views_then(csr, config, _where_and_what, processes=2)
    apart = embed_views_then(csr, config, _where_and_what, processes=1)
    plain = embed_views(csr, config, processes=1)
    for name in ("local", "far"):
        for embedding, (_pid, view, digest) in (together[name], apart[name]):
            assert view == name
            assert digest == hashlib.sha256(plain[name].vectors.tobytes()).hexdigest()
            assert embedding.vectors.tobytes() == plain[name].vectors.tobytes()
        assert apart[name][1][0] == os.getpid()
    # With two processes each view and its follow-up ran in a worker process of its own,
    # so that this process only waits (and acts on Ctrl-C at once).
    assert os.getpid() not in {together["local"][1][0], together["far"][1][0]}
    assert together["local"][1][0] != together["far"][1][0]
    assert embed_views_then(csr, config, None, processes=1)["far"][1] is None
