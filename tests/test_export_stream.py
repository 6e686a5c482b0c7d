"""The streamed graph.graphml and the column-wise nodes.csv rows (roles/export.py).

Reference for GraphML: what ``networkx.write_graphml`` (networkx's xml.etree writer)
writes for a copy of the graph carrying the node table's columns, which is how the report
wrote graph.graphml up to commit 2e17776 (``_reference`` below is that code). Files are
compared byte for byte and as read back by ``networkx.read_graphml``. Reference for
nodes.csv: the same file written from ``itertuples`` rows through ``json_ready``, and the
cell rules of ``roles.io.output.safe_cell`` (OWASP "CSV Injection").
"""

from __future__ import annotations

import csv
import math
import xml.etree.ElementTree as ET
from pathlib import Path

import networkx as nx
import numpy as np
import pandas as pd
import pytest

from roles.errors import RolesError
from roles.io import export
from roles.io.export import _csv_rows, _write_graphml, json_ready
from roles.io.output import write_csv

NS = "{http://graphml.graphdrawing.org/xmlns}"


def _reference(graph: nx.Graph, nodes: pd.DataFrame, path: Path) -> None:
    """graph.graphml as roles.io.export._graphml wrote it up to commit 2e17776."""
    g = graph.copy()
    table = nodes.set_index("node")
    for col in table.columns:
        values = {}
        for node, v in table[col].items():
            if isinstance(v, np.generic):
                v = v.item()
            if isinstance(v, float) and not math.isfinite(v):
                continue
            values[node] = v if isinstance(v, (int, float, str, bool)) else str(v)
        nx.set_node_attributes(g, values, name=col)
    nx.write_graphml(g, path, encoding="utf-8")


def _typed(data: dict) -> dict:
    # floats by repr: NaN then equals NaN, and -0.0 differs from 0.0
    return {k: (type(v).__name__, repr(v) if isinstance(v, float) else v) for k, v in data.items()}


def _contents(g: nx.Graph) -> tuple:
    """Everything read_graphml gives back, with the Python type of every value."""
    if g.is_multigraph():
        edges = {(u, v, k): _typed(d) for u, v, k, d in g.edges(keys=True, data=True)}
    else:
        edges = {(u, v): _typed(d) for u, v, d in g.edges(data=True)}
    return (
        type(g).__name__,
        {k: v for k, v in g.graph.items()},
        [(n, _typed(d)) for n, d in g.nodes(data=True)],
        edges,
    )


def _both(tmp_path: Path, graph: nx.Graph, nodes: pd.DataFrame) -> tuple[Path, Path]:
    ours, theirs = tmp_path / "ours.graphml", tmp_path / "nx.graphml"
    _write_graphml(graph, nodes, ours)
    _reference(graph, nodes, theirs)
    return ours, theirs


def _assert_same(tmp_path: Path, graph: nx.Graph, nodes: pd.DataFrame) -> nx.Graph:
    ours, theirs = _both(tmp_path, graph, nodes)
    back = nx.read_graphml(ours)
    assert _contents(back) == _contents(nx.read_graphml(theirs))
    assert ours.read_bytes() == theirs.read_bytes()  # same layout and key numbering too
    return back


def _awkward(karate_result) -> tuple[nx.Graph, pd.DataFrame]:
    """karate with awkward (XML-legal) names, mixed-type and empty columns, edge extras."""
    hostile = {
        "0": 'Ana <"boss"> & co',
        "1": "Ben's\ttab",
        "2": "Zoë Ñandú 東京 🙂",
        "3": "line\nbreak",
        "4": "=1+2",
        "5": " spaced ",
        "6": "&amp;",
    }
    graph = nx.relabel_nodes(karate_result.graph, hostile)  # copies; keeps 'club', weights
    nodes = karate_result.nodes.copy()
    nodes["node"] = [hostile.get(n, n) for n in nodes["node"]]
    n = len(nodes)
    nodes["dept"] = ""  # an attribute column nobody filled (pipeline fills with "")
    nodes["team"] = [i if i % 3 else f"t<{i}>" for i in range(n)]  # ints and text
    nodes["lead"] = np.arange(n) % 5 == 0  # bool column
    nodes["score32"] = np.linspace(0.1, 0.9, n).astype(np.float32)
    nodes["boxed"] = pd.Series([np.int64(i) if i % 2 else np.float32(0.1) for i in range(n)])
    nodes["none_yet"] = np.nan  # all NaN: no key at all
    for i, (_, _, d) in enumerate(graph.edges(data=True)):
        if i % 4 == 0:
            d["weight"] = float(d["weight"]) + 0.5  # int and float weights: two keys
        if i % 7 == 0:
            d["since"] = f"20{i:02d} & later"
        if i % 11 == 0:
            d["w32"] = np.float32(1 / 3)
    return graph, nodes


def test_karate_result_same_as_networkx(tmp_path, karate_result):
    back = _assert_same(tmp_path, karate_result.graph, karate_result.nodes)
    # Zachary (1977) via networkx: 34 members, 78 ties, 'club' kept from the graph.
    assert back.number_of_nodes() == 34 and back.number_of_edges() == 78
    assert back.nodes["0"]["club"] == "Mr. Hi"
    assert back.edges["0", "1"]["weight"] == 4  # karate_club_graph's weight of tie 0-1
    assert back.graph["name"] == "Zachary's Karate Club"
    row = karate_result.nodes.set_index("node").loc["33"]
    assert back.nodes["33"]["degree"] == int(row["degree"])
    assert back.nodes["33"]["membership"] == float(row["membership"])
    assert back.nodes["33"]["role"] == row["role"]


@pytest.mark.parametrize("own", [True, False], ids=["graph attributes", "table only"])
@pytest.mark.parametrize("directed", [False, True])
def test_awkward_names_and_attributes_same_as_networkx(tmp_path, karate_result, directed, own):
    graph, nodes = _awkward(karate_result)
    if directed:
        graph = graph.to_directed()
    if not own:  # nodes carry no attributes of their own ('club' dropped)
        for _, d in graph.nodes(data=True):
            d.clear()
    back = _assert_same(tmp_path, graph, nodes)
    assert back.is_directed() is directed
    root = ET.parse(tmp_path / "ours.graphml").getroot()
    assert root.find(f"{NS}graph").get("edgedefault") == ("directed" if directed else "undirected")
    keys = {(k.get("for"), k.get("attr.name"), k.get("attr.type")) for k in root.iter(f"{NS}key")}
    # networkx's type names: Python int "long", float "double", numpy float32 "float".
    assert ("edge", "weight", "long") in keys and ("edge", "weight", "double") in keys
    assert ("edge", "w32", "float") in keys and ("node", "lead", "boolean") in keys
    assert ("node", "team", "long") in keys and ("node", "team", "string") in keys
    assert ("node", "score32", "double") in keys  # unwrapped: a Python float
    assert not any(name == "none_yet" for _, name, _ in keys)
    boss = back.nodes['Ana <"boss"> & co']
    assert boss["dept"] == "" and boss["team"] == "t<0>" and boss["lead"] is True
    assert "Zoë Ñandú 東京 🙂" in back and "line\nbreak" in back and "Ben's\ttab" in back
    assert back.nodes["Zoë Ñandú 東京 🙂"]["boxed"] == pytest.approx(float(np.float32(0.1)))
    assert back.nodes["Ben's\ttab"]["boxed"] == 1 and back.nodes["=1+2"]["team"] == 4
    since = [d["since"] for _, _, d in back.edges(data=True) if "since" in d]
    assert since and all(s.endswith(" & later") for s in since)


def test_edge_values_repeat_and_signed_zero(tmp_path):
    # Repeated values, 0.0 next to -0.0 (equal, but written "0.0" and "-0.0" by
    # networkx), NaN (networkx writes "nan"), numpy scalars, and an empty text.
    g = nx.DiGraph()
    values = [1.0, 2.5, 1.0, 0.0, -0.0, 0.0, -0.0, math.nan, 2.5, np.float32(0.1)]
    values += [np.float32(-0.0), np.int64(3), np.int64(3), 7, 7, True, False, True, "", "x&y"]
    for i, w in enumerate(values):
        g.add_edge(f"m{i}", f"m{i + 1}", weight=w)
    nodes = pd.DataFrame({"node": list(g)})
    ours, _ = _both(tmp_path, g, nodes)
    _assert_same(tmp_path, g, nodes)
    texts = [d.text for d in ET.parse(ours).getroot().iter(f"{NS}data")]
    assert texts[3:8] == ["0.0", "-0.0", "0.0", "-0.0", "nan"]  # str() of each value
    assert texts[10] == "-0.0" and texts[-2] is None


def test_numpy_scalars_networkx_cannot_write_are_unwrapped(tmp_path):
    g = nx.Graph()
    g.add_edge("a", "b", flag=np.bool_(True), label=np.str_("x<y"))
    nodes = pd.DataFrame({"node": ["a", "b"]})
    ours, theirs = tmp_path / "ours.graphml", tmp_path / "nx.graphml"
    with pytest.raises(nx.NetworkXError):  # networkx's writer has no GraphML type for them
        _reference(g, nodes, theirs)
    _write_graphml(g, nodes, ours)
    assert nx.read_graphml(ours).edges["a", "b"] == {"flag": True, "label": "x<y"}


def test_nan_and_infinities_left_out(tmp_path, karate_result):
    graph = karate_result.graph.copy()
    nodes = karate_result.nodes.copy()
    nodes["betweenness"] = nodes["betweenness"].astype(float)
    nodes.loc[0, "betweenness"] = np.nan
    nodes.loc[1, "betweenness"] = np.inf
    nodes.loc[2, "betweenness"] = -np.inf
    nodes["club"] = ["X"] * len(nodes)
    nodes.loc[3, "club"] = np.nan  # left out: member 3 keeps the graph's own 'club'
    back = _assert_same(tmp_path, graph, nodes)
    for name in ("0", "1", "2"):
        assert "betweenness" not in back.nodes[name]
    assert back.nodes["4"]["betweenness"] == float(nodes.loc[4, "betweenness"])
    assert back.nodes["3"]["club"] == "Mr. Hi"  # networkx karate: member 3 is in Mr. Hi's club
    assert back.nodes["5"]["club"] == "X"


def test_table_order_and_missing_rows(tmp_path, karate_result):
    graph = karate_result.graph.copy()
    graph.add_node("newcomer")  # no table row, no attributes: <node id="newcomer" />
    nodes = karate_result.nodes.sample(frac=1.0, random_state=3).reset_index(drop=True)
    nodes = nodes[nodes["node"] != "7"]  # member 7 keeps only its graph attributes
    back = _assert_same(tmp_path, graph, nodes)
    assert back.nodes["newcomer"] == {}
    assert back.nodes["7"] == {"club": "Mr. Hi"}  # networkx karate: member 7, Mr. Hi


def test_small_chunks_same_file(tmp_path, karate_result, monkeypatch):
    monkeypatch.setattr(export, "_CHUNK", 5)  # 34 nodes, 78 ties: many partial chunks
    graph, nodes = _awkward(karate_result)
    _assert_same(tmp_path, graph, nodes)


def test_multigraph_edges_keep_their_keys(tmp_path):
    g = nx.MultiDiGraph()
    g.add_edge("a", "b", key="k&1", weight=1.0)
    g.add_edge("a", "b", key=7, weight=2.0)
    g.add_edge("b", "c")
    g.graph["edge_default"] = {"weight": 1.0}
    g.graph["id"] = "net<1>"
    nodes = pd.DataFrame({"node": ["a", "b", "c"], "degree": [2, 3, 1]})
    back = _assert_same(tmp_path, g, nodes)
    # read_graphml makes edge ids that look like integers into ints (edge_key_type=int)
    assert set(back.edges(keys=True)) == {("a", "b", "k&1"), ("a", "b", 7), ("b", "c", 0)}


def test_graph_without_edges_and_empty_graph(tmp_path):
    g = nx.Graph()
    g.add_nodes_from(["solo", "pair"])
    nodes = pd.DataFrame({"node": ["solo", "pair"], "role": ["no ties", "no ties"]})
    back = _assert_same(tmp_path, g, nodes)
    assert back.nodes["solo"]["role"] == "no ties"
    _assert_same(tmp_path, nx.DiGraph(), pd.DataFrame({"node": []}))


# ------------------------------------------------------------ characters XML cannot hold


def test_control_characters_replaced_not_fatal(tmp_path):
    g = nx.Graph()
    g.add_edge("bell\x07", "nul\x00here", kind="esc\x1b[31m")
    g.add_edge("nul\x00here", "lone\ud800", kind="\ufffe")
    nodes = pd.DataFrame(
        {"node": ["bell\x07", "nul\x00here", "lone\ud800"], "note": ["a\x0cb", "ok", "\x01"]}
    )
    ours, theirs = _both(tmp_path, g, nodes)
    # networkx writes these characters as they are (or as references), which XML 1.0
    # (section 2.2, Char) forbids: its file cannot be read back.
    with pytest.raises(ET.ParseError):
        ET.parse(theirs)
    back = nx.read_graphml(ours)
    assert set(back) == {"bell\ufffd", "nul\ufffdhere", "lone\ufffd"}
    assert back.nodes["bell\ufffd"]["note"] == "a\ufffdb"
    assert back.nodes["lone\ufffd"]["note"] == "\ufffd"
    assert back.edges["bell\ufffd", "nul\ufffdhere"]["kind"] == "esc\ufffd[31m"
    assert back.edges["nul\ufffdhere", "lone\ufffd"]["kind"] == "\ufffd"


def test_carriage_return_reads_back(tmp_path):
    g = nx.Graph()
    g.add_edge("cr\rname", "b", note="x\ry")
    nodes = pd.DataFrame({"node": ["cr\rname", "b"], "note": ["one\r\ntwo", "plain"]})
    ours, theirs = _both(tmp_path, g, nodes)
    back, ref = nx.read_graphml(ours), nx.read_graphml(theirs)
    assert back.nodes["cr\rname"]["note"] == "one\r\ntwo"
    assert back.edges["cr\rname", "b"]["note"] == "x\ry"
    # networkx leaves a raw CR in character data, which XML end-of-line handling
    # (section 2.11) reads as a newline; in attributes (ids) both keep it.
    assert ref.nodes["cr\rname"]["note"] == "one\ntwo"


@pytest.mark.parametrize("names", [["a\x01", "a\x02"], [1, "1"]])
def test_names_that_would_collide_are_refused(tmp_path, names):
    g = nx.Graph()
    g.add_edge(*names)
    nodes = pd.DataFrame({"node": pd.Series(names, dtype=object)})
    with pytest.raises(RolesError, match="same id"):
        _write_graphml(g, nodes, tmp_path / "g.graphml")


# ---------------------------------------------------------------------------- nodes.csv


def _old_csv(nodes: pd.DataFrame, path: Path) -> None:
    """nodes.csv as written up to commit 2e17776."""
    rows = [[json_ready(v) for v in row] for row in nodes.itertuples(index=False)]
    write_csv(path, list(nodes.columns), rows)


def _csv_pair(tmp_path: Path, nodes: pd.DataFrame) -> tuple[bytes, bytes]:
    write_csv(tmp_path / "new.csv", list(nodes.columns), _csv_rows(nodes))
    _old_csv(nodes, tmp_path / "old.csv")
    return (tmp_path / "new.csv").read_bytes(), (tmp_path / "old.csv").read_bytes()


def test_csv_rows_same_file_as_before(tmp_path, karate_result, monkeypatch):
    new, old = _csv_pair(tmp_path, karate_result.nodes)
    assert new == old
    monkeypatch.setattr(export, "_CHUNK", 4)
    new, old = _csv_pair(tmp_path, karate_result.nodes)
    assert new == old


def test_csv_cells_still_neutralised(tmp_path, monkeypatch):
    monkeypatch.setattr(export, "_CHUNK", 2)
    nodes = pd.DataFrame(
        {
            "node": ["=HYPERLINK(1)", "+1", "-2", "@x", "\tt", "plain"],
            "score": [-2.5, np.nan, np.inf, -np.inf, 0.1, -0.0],
            "s32": np.array([0.1, -1, 2, 3, 4, 5], dtype=np.float32),
            "dependents": np.array([-3, 0, 1, 2, 3, 2**40], dtype=np.int64),
            "lead": [True, False, True, False, True, False],
            "mixed": pd.Series([None, 1, "-x", np.float64(2.5), [1, 2], np.nan], dtype=object),
        }
    )
    new, old = _csv_pair(tmp_path, nodes)
    assert new == old
    with open(tmp_path / "new.csv", encoding="utf-8", newline="") as fh:
        rows = list(csv.reader(fh))
    # safe_cell's rules (roles/output.py, after OWASP "CSV Injection"): text starting with
    # = + - @ or a tab gets an apostrophe; finite numbers stay numbers; NaN and, through
    # json_ready, infinities are empty cells.
    assert [r[0] for r in rows[1:]] == ["'=HYPERLINK(1)", "'+1", "'-2", "'@x", "'\tt", "plain"]
    assert [r[1] for r in rows[1:]] == ["-2.5", "", "", "", "0.1", "-0.0"]
    assert rows[1][2] == repr(float(np.float32(0.1)))  # json_ready unwraps to a Python float
    assert [r[3] for r in rows[1:]] == ["-3", "0", "1", "2", "3", str(2**40)]
    assert [r[4] for r in rows[1:3]] == ["True", "False"]
    assert [r[5] for r in rows[1:]] == ["", "1", "'-x", "2.5", "[1, 2]", ""]
