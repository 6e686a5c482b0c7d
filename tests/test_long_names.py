"""Very long member names: shortened in the printed report, whole in the data files.

How long such a run takes against short names is measured in
benchmarks/bench_long_names.py, not here.
"""

from __future__ import annotations

import csv
import dataclasses
import json
import sys

import networkx as nx
import pandas as pd
import pytest
from _cli import roles as run_roles

from roles.report.figures import _label
from roles.report.names import NAME_LIMIT, printed_names, short_name


def test_short_name_keeps_start_and_end():
    name = "A" * 50 + "middle" + "Z" * 50
    short = short_name(name)
    assert len(short) == NAME_LIMIT
    assert short.startswith("A" * 40) and short.endswith("Z" * 12) and "…" in short
    assert short_name("x" * NAME_LIMIT) == "x" * NAME_LIMIT  # at the limit: whole


def test_figure_labels_of_a_huge_name_are_short():
    assert len(_label("N" * 1_000_000, 22)) == 22
    assert _label("N" * 1_000_000, 22) == "N" * 20 + "…" + "N"  # 20 of the start first


@dataclasses.dataclass(frozen=True)
class _Result:
    """The fields of roles.pipeline.Result that printed_names reads."""

    nodes: pd.DataFrame
    graph: nx.Graph
    summary: dict
    extras: dict


def _result(names: list[str]) -> _Result:
    nodes = pd.DataFrame({"node": names, "community": [1] * len(names)})
    summary = {"hubs": [{"node": names[0]}], "count": len(names)}
    return _Result(nodes, nx.path_graph(names), summary, {"top": names[:1]})


def test_printed_names_are_distinct_and_everywhere():
    # Two long names that differ only in the middle shorten alike: the second gets (2).
    a = "B" * 100 + "1" + "C" * 100
    b = "B" * 100 + "2" + "C" * 100
    result = _result([a, b, "short"])
    printed = printed_names(result)
    shown = list(printed.nodes.node)
    assert shown[2] == "short"
    assert shown[0] == short_name(a) and shown[1] == short_name(b) + " (2)"
    assert sorted(printed.graph.nodes()) == sorted(shown)
    assert printed.summary["hubs"][0]["node"] == shown[0]
    assert printed.extras["top"] == [shown[0]]
    assert list(result.nodes.node) == [a, b, "short"]  # the original is left whole
    same = _result(["x", "y"])
    assert printed_names(same) is same


@pytest.mark.slow
def test_million_character_name_report(tmp_path):
    # 300 members in 6 planted groups (networkx's planted partition generator), member 0
    # named with 1,000,000 characters and tied to every third member.
    g = nx.planted_partition_graph(6, 50, 0.2, 0.01, seed=2)
    ties = set(g.edges()) | {(0, v) for v in range(1, 300, 3)}
    long = "N" * 1_000_000
    h = nx.Graph()
    h.add_edges_from(
        (long if u == 0 else f"m{u}", long if v == 0 else f"m{v}") for u, v in ties if u != v
    )
    (tmp_path / "e.json").write_text(json.dumps(nx.node_link_data(h, edges="links")))
    done = run_roles("report", "e.json", "--out", "out", "--quiet", cwd=tmp_path)
    assert done.returncode == 0, done.stderr
    out = tmp_path / "out"
    html = (out / "report.html").read_text(encoding="utf-8")
    assert short_name(long) in html  # 47 N, an ellipsis, 12 N
    assert "N" * (NAME_LIMIT + 1) not in html
    csv.field_size_limit(sys.maxsize)
    with open(out / "nodes.csv", encoding="utf-8-sig", newline="") as fh:
        assert long in {row["node"] for row in csv.DictReader(fh)}
    assert long in (out / "summary.json").read_text(encoding="utf-8")
