"""Work estimate and limits, the p/q range, and out-of-memory as one error line."""

from __future__ import annotations

import dataclasses

import networkx as nx
import numpy as np
import pytest
from _cli import roles as run_roles

import roles.cli
import roles.commands
from roles.config import P_Q_RANGE, Config, EmbeddingConfig, ViewConfig, WalkConfig
from roles.embedding.graph import to_csr
from roles.embedding.walks import generate_walks
from roles.errors import ConfigError
from roles.workload import (
    INSIST_OPTION,
    MAX_SKIPGRAM_WORK,
    check_workload,
    estimate,
    memory_limit,
)


@pytest.fixture
def edges300(tmp_path):
    # 300 members in 6 planted groups (Condon & Karp 2001, networkx's generator).
    g = nx.planted_partition_graph(6, 50, 0.2, 0.01, seed=2)
    path = tmp_path / "e.csv"
    path.write_text("source,target\n" + "\n".join(f"m{u},m{v}" for u, v in g.edges()) + "\n")
    return path


def _refused(tmp_path, config_text: str, *words: str, command: str = "report") -> str:
    (tmp_path / "c.toml").write_text(config_text)
    before = sorted(p.name for p in tmp_path.iterdir())
    done = run_roles(command, "e.csv", "--out", "out", "--config", "c.toml", cwd=tmp_path)
    assert done.returncode == 2, done.stderr
    lines = done.stderr.strip().splitlines()
    assert len(lines) == 1 and lines[0].startswith("error: "), done.stderr
    for word in words:
        assert word in lines[0], (word, lines[0])
    assert sorted(p.name for p in tmp_path.iterdir()) == before  # nothing written
    return lines[0]


# ------------------------------------------------------------------ the estimate


def test_estimate_counts_by_hand():
    cfg = Config(
        walks=WalkConfig(walks_per_node=3, walk_length=7),
        embedding=EmbeddingConfig(dimensions=8, window=2, epochs=4, negative=1),
    )
    w = estimate(5, cfg)
    # 5 members x 3 walks = 15 walks of 7 nodes: 6 moves each, 105 entries.
    assert w.walk_steps == 15 * 6
    assert w.tokens == 105
    assert w.walk_bytes == 2 * 105 * 4  # two views of int32 entries
    # Pairs: 105 tokens x (window + 1) x epochs; each updates 1 + negative vectors of 8.
    assert w.skipgram_work == 105 * 3 * 4 * 2 * 8


def test_issue_settings_are_over_the_limits():
    # The two settings of the issue report, each on 300 members.
    long_walks = Config(walks=WalkConfig(walks_per_node=1000, walk_length=10000))
    assert estimate(300, long_walks).walk_bytes == 2 * 300 * 1000 * 10000 * 4  # 22.4 GiB
    heavy = Config(embedding=EmbeddingConfig(dimensions=1024, epochs=100, window=100, negative=50))
    assert estimate(300, heavy).skipgram_work > MAX_SKIPGRAM_WORK
    for cfg in (long_walks, heavy):
        with pytest.raises(ConfigError, match=INSIST_OPTION):
            check_workload(300, cfg)
        assert check_workload(300, cfg, insist=True).tokens > 0


def test_defaults_pass_up_to_a_million_members():
    assert check_workload(1_000_000, _budgeted(1_000_000)).tokens > 0


def _budgeted(n: int) -> Config:
    from roles.embedding.budget import walk_budget

    return walk_budget(n, 10 * n, Config())[0]


def test_memory_message_names_the_walk_settings(monkeypatch):
    monkeypatch.setattr("roles.workload.memory_limit", lambda: 1_000_000)
    with pytest.raises(ConfigError) as info:
        check_workload(1000, Config())  # 3.2 MB of walks
    text = str(info.value)
    for word in ("walks_per_node", "walk_length", "[walks]", INSIST_OPTION):
        assert word in text
    assert memory_limit() > 0


@pytest.mark.parametrize(
    ("config_text", "words"),
    [
        (
            "[walks]\nwalks_per_node = 1000\nwalk_length = 10000\n",
            ["walks_per_node", "walk_length", INSIST_OPTION],
        ),
        (
            "[embedding]\ndimensions = 1024\nepochs = 100\nwindow = 100\nnegative = 50\n",
            ["skip-gram", "dimensions", "epochs", "window", "negative", INSIST_OPTION],
        ),
    ],
)
@pytest.mark.parametrize("command", ["report", "embed"])
def test_cli_refuses_past_the_limits(tmp_path, edges300, config_text, words, command):
    _refused(tmp_path, config_text, *words, command=command)


# ------------------------------------------------------------------ p and q


@pytest.mark.parametrize(
    "text",
    ["[views.far]\nq = 1e-9\n", "[views.local]\np = 1000\nq = 1e-9\n", "[views.far]\nq = 0.2\n"],
)
def test_cli_refuses_p_q_out_of_range(tmp_path, edges300, text):
    _refused(tmp_path, text, "from 0.25 to 4", "Got")


def test_p_q_bounds():
    low, high = P_Q_RANGE
    # The node2vec paper's search grid {0.25, 0.5, 1, 2, 4} (Grover & Leskovec 2016).
    assert (low, high) == (0.25, 4.0)
    assert ViewConfig(p=low, q=high).q == 4.0
    assert ViewConfig(p=high, q=low).q == 0.25
    for bad in (0.2499, 4.001, 1e-9, 1000.0):
        with pytest.raises(
            ConfigError,
            match=r"'q' parameter of \[views.far\] must be a number from 0.25 to 4 .*Got",
        ):
            ViewConfig(q=bad, name="far")
        with pytest.raises(ConfigError, match="from 0.25 to 4"):
            generate_walks(to_csr(nx.star_graph(3)), walks_per_node=1, walk_length=3,
                           p=1.0, q=bad, seed=0)  # fmt: skip


def test_worst_case_in_range_walks_finish():
    # A star: every walk from a leaf returns through the hub, the case where the
    # rejection sampler keeps the fewest proposals (1 in 16 at p = 4, q = 0.25).
    csr = to_csr(nx.star_graph(50))
    walks = generate_walks(csr, walks_per_node=20, walk_length=50, p=4.0, q=0.25, seed=3)
    assert walks.shape == (51 * 20, 50) and np.all(walks >= 0)


# ------------------------------------------------------------------ out of memory


def test_memory_error_is_one_line(tmp_path, edges300, monkeypatch, capsys):
    def boom(args):
        raise MemoryError()

    monkeypatch.setattr(roles.commands, "report", boom)
    status = roles.cli.main(["report", str(edges300), "--out", str(tmp_path / "out")])
    err = capsys.readouterr().err.strip().splitlines()
    assert status == 1
    assert len(err) == 1 and err[0].startswith("error: the run ran out of memory")
    assert not (tmp_path / "out").exists()


def test_cli_option_lifts_the_limit(monkeypatch):
    args = roles.cli.build_parser().parse_args(["report", "e.csv", "--out", "o", INSIST_OPTION])
    assert args.no_work_limit is True
    cfg = dataclasses.replace(Config(), walks=WalkConfig(walks_per_node=1000, walk_length=10000))
    roles.commands._check_workload(args, 300, cfg)  # no error: the user insisted
