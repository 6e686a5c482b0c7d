"""Inputs that must be accepted (issue 6): edge lists in several shapes, GraphML, JSON,
nodes files. Expected graphs come from networkx's own readers and bundled datasets where
one exists, otherwise from the merge rule documented in roles.io.load, worked by hand."""

from __future__ import annotations

import codecs
import hashlib
import json
from pathlib import Path

import networkx as nx
import pytest

from roles.errors import InputError
from roles.io.load import LoadedNetwork, load_edges, load_nodes


def write(folder: Path, name: str, content: str | bytes) -> Path:
    path = folder / name
    if isinstance(content, str):
        path.write_text(content, encoding="utf-8", newline="")
    else:
        path.write_bytes(content)
    return path


def edge_set(g: nx.Graph) -> dict[tuple[str, str], float]:
    if g.is_directed():
        return {(u, v): d["weight"] for u, v, d in g.edges(data=True)}
    return {tuple(sorted((u, v))): d["weight"] for u, v, d in g.edges(data=True)}


KARATE = nx.karate_club_graph()  # Zachary (1977): 34 members, 78 ties, bundled with networkx


def karate_csv(delimiter: str = ",") -> str:
    lines = [delimiter.join(["source", "target", "weight"])]
    lines += [
        delimiter.join([str(u), str(v), str(d["weight"])]) for u, v, d in KARATE.edges(data=True)
    ]
    return "\n".join(lines) + "\n"


def reference(text: str, delimiter: str) -> nx.Graph:
    # networkx's own edge-list parser, as an outside reading of the same rows.
    rows = text.splitlines()[1:]
    return nx.parse_edgelist(rows, delimiter=delimiter, nodetype=str, data=[("weight", float)])


# ---------------------------------------------------------------- CSV and TSV


@pytest.mark.parametrize(
    ("name", "delimiter", "fmt"),
    [
        ("k.csv", ",", "csv"),
        ("k.tsv", "\t", "tsv"),
        ("k.csv", ";", "csv"),
        ("k.txt", "\t", "tsv"),
        ("k.tsv", ",", "csv"),
        ("k", "|", "csv"),
    ],
)
def test_delimiter_detected_and_graph_matches_networkx(tmp_path, name, delimiter, fmt):
    text = karate_csv(delimiter)
    net = load_edges(write(tmp_path, name, text))
    assert isinstance(net, LoadedNetwork)
    assert net.format == fmt
    ref = reference(text, delimiter)
    assert edge_set(net.graph) == edge_set(ref)
    # Zachary (1977) via networkx: 34 members and 78 ties.
    assert net.graph.number_of_nodes() == 34
    assert net.graph.number_of_edges() == 78
    assert net.counts["rows_read"] == 78
    assert net.counts["edges"] == 78
    assert all(isinstance(n, str) for n in net.graph)


def test_sha256_and_path_recorded(tmp_path):
    path = write(tmp_path, "k.csv", karate_csv())
    net = load_edges(path)
    assert net.sha256 == hashlib.sha256(path.read_bytes()).hexdigest()  # hashlib, directly
    assert net.path == str(path)


@pytest.mark.parametrize(
    "bom", [codecs.BOM_UTF8, codecs.BOM_UTF16_LE, codecs.BOM_UTF16_BE], ids=["utf8", "le", "be"]
)
def test_byte_order_mark(tmp_path, bom):
    text = "source,target,weight\nZoé,Åsa,2\nÅsa,Ngozi,1\n"
    codec = {
        codecs.BOM_UTF8: "utf-8",
        codecs.BOM_UTF16_LE: "utf-16-le",
        codecs.BOM_UTF16_BE: "utf-16-be",
    }[bom]
    net = load_edges(write(tmp_path, "b.csv", bom + text.encode(codec)))
    assert set(net.graph) == {"Zoé", "Åsa", "Ngozi"}  # no '\ufeffsource' header trouble
    assert net.graph["Zoé"]["Åsa"]["weight"] == 2.0


def test_self_loops_dropped_and_counted_node_kept(tmp_path):
    net = load_edges(write(tmp_path, "s.csv", "source,target\nAna,Ana\nAna,Ben\nCai,Cai\n"))
    assert nx.number_of_selfloops(net.graph) == 0
    assert net.counts["self_loops_dropped"] == 2
    # Cai appears only in a self-loop: kept as a node without ties (documented rule).
    assert "Cai" in net.graph and net.graph.degree("Cai") == 0


def test_duplicates_merged_by_summing_undirected(tmp_path):
    text = "source,target,weight\nAna,Ben,2\nBen,Ana,1.5\nAna,Ben,0.5\nBen,Cai,1\n"
    net = load_edges(write(tmp_path, "d.csv", text))
    # Hand-worked with the documented rule: a,b and b,a are one tie; weights summed.
    assert net.graph["Ana"]["Ben"]["weight"] == pytest.approx(2 + 1.5 + 0.5)
    assert net.counts["duplicate_edges_merged"] == 2
    assert net.graph.number_of_edges() == 2


def test_duplicates_directed_keep_both_directions(tmp_path):
    text = "source,target,weight\nAna,Ben,2\nBen,Ana,1.5\nAna,Ben,0.5\n"
    net = load_edges(write(tmp_path, "d.csv", text), directed=True)
    assert isinstance(net.graph, nx.DiGraph)
    assert net.graph["Ana"]["Ben"]["weight"] == pytest.approx(2.5)
    assert net.graph["Ben"]["Ana"]["weight"] == pytest.approx(1.5)
    assert net.counts["duplicate_edges_merged"] == 1


@pytest.mark.parametrize("name", ["NA", "null", "None", "N/A", "nan", "NaN", "-", "0", "#N/A"])
def test_missing_value_lookalikes_are_names(tmp_path, name):
    # pandas.read_csv would read these as blanks (its default na_values); we keep them.
    net = load_edges(write(tmp_path, "n.csv", f"source,target\n{name},Ben\nBen,Cai\n"))
    assert name in net.graph
    assert net.graph.has_edge(name, "Ben")


def test_unicode_names(tmp_path):
    names = ["李雷", "Ŝtefan", "Zoë", "محمد", "😀 team", "Ωmega", "e\u0301"]  # any script, emoji
    rows = "\n".join(f'"{a}","{b}",1' for a, b in zip(names[:-1], names[1:], strict=True))
    net = load_edges(write(tmp_path, "u.csv", "source,target,weight\n" + rows + "\n"))
    # First-appearance order, text unchanged but for NFC: e + U+0301 is U+00E9
    # (UnicodeData.txt, the canonical decomposition of U+00E9 is 0065 0301).
    assert list(net.graph) == names[:-1] + ["\u00e9"]
    assert net.counts["names_normalised"] == 1


def test_quoted_names_with_delimiters_and_quotes(tmp_path):
    text = 'source,target\n"Smith, Ana","O""Neil"\n"=1+1",@x\n'
    net = load_edges(write(tmp_path, "q.csv", text))
    # RFC 4180 quoting, as Python's csv module reads it.
    assert net.graph.has_edge("Smith, Ana", 'O"Neil')
    assert net.graph.has_edge("=1+1", "@x")  # a name is a name; output.safe_cell guards it


def test_missing_weight_column_means_weight_one(tmp_path):
    net = load_edges(write(tmp_path, "w.csv", "source,target\nAna,Ben\nBen,Cai\nAna,Ben\n"))
    assert net.weight_column is None
    assert net.graph["Ana"]["Ben"]["weight"] == 2.0  # two rows of weight 1, summed
    assert net.graph["Ben"]["Cai"]["weight"] == 1.0


def test_weight_none_ignores_weight_column(tmp_path):
    net = load_edges(write(tmp_path, "w.csv", "source,target,weight\nAna,Ben,7\n"), weight=None)
    assert net.graph["Ana"]["Ben"]["weight"] == 1.0


def test_columns_mapped_and_case_insensitive(tmp_path):
    text = "From,To,Strength,Note\nAna,Ben,3,x\nBen,Cai,1,y\n"
    net = load_edges(write(tmp_path, "m.csv", text), source="from", target="to", weight="strength")
    assert net.graph["Ana"]["Ben"]["weight"] == 3.0
    assert net.weight_column == "Strength"
    assert net.counts["columns_ignored"] == 1
    gephi = load_edges(write(tmp_path, "g.csv", "Source,Target,Weight\nAna,Ben,2\n"))
    assert gephi.graph["Ana"]["Ben"]["weight"] == 2.0


def test_zero_weight_ties_dropped_nodes_kept(tmp_path):
    net = load_edges(write(tmp_path, "z.csv", "source,target,weight\nAna,Ben,0\nBen,Cai,1\n"))
    assert not net.graph.has_edge("Ana", "Ben")
    assert "Ana" in net.graph
    assert net.counts["zero_weight_edges_dropped"] == 1


def test_spaces_trimmed_and_counted_blank_rows_skipped(tmp_path):
    text = "source , target\n\nAna ,Ben\n Ben,Cai\n,\n\n"
    net = load_edges(write(tmp_path, "t.csv", text))
    assert set(net.graph) == {"Ana", "Ben", "Cai"}
    assert net.counts["names_trimmed"] == 2
    assert net.counts["blank_rows_skipped"] == 3


def test_trailing_empty_cells_as_spreadsheets_export(tmp_path):
    net = load_edges(write(tmp_path, "e.csv", "source,target,weight,,\r\nAna,Ben,1,,\r\n"))
    assert net.graph["Ana"]["Ben"]["weight"] == 1.0


def test_several_components(tmp_path):
    net = load_edges(write(tmp_path, "c.csv", "source,target\na,b\nc,d\ne,f\n"))
    assert nx.number_connected_components(net.graph) == 3  # networkx


def test_counts_add_up(tmp_path):
    text = "source,target,weight\na,b,1\nb,a,1\na,a,1\nc,d,0\nd,e,2\n"
    c = load_edges(write(tmp_path, "a.csv", text)).counts
    assert c["rows_read"] == (
        c["edges"]
        + c["duplicate_edges_merged"]
        + c["self_loops_dropped"]
        + c["zero_weight_edges_dropped"]
    )
    assert (c["edges"], c["duplicate_edges_merged"], c["self_loops_dropped"]) == (2, 1, 1)


def test_crlf_and_multiline_quoted_other_column(tmp_path):
    text = 'source,target,note\r\nAna,Ben,"two\r\nlines"\r\nBen,Cai,x\r\n'
    net = load_edges(write(tmp_path, "l.csv", text))
    assert net.graph.number_of_edges() == 2


# ---------------------------------------------------------------- GraphML and JSON


def test_graphml_karate_written_by_networkx(tmp_path):
    path = tmp_path / "karate.graphml"
    nx.write_graphml(KARATE, path)
    net = load_edges(path)
    assert net.format == "graphml"
    ref = nx.relabel_nodes(KARATE, str)
    assert edge_set(net.graph) == {k: float(v) for k, v in edge_set(ref).items()}


def test_graphml_detected_by_content(tmp_path):
    path = tmp_path / "karate.export"
    nx.write_graphml(KARATE, path)
    assert load_edges(path).format == "graphml"


def test_graphml_directed_file_read_undirected_merges(tmp_path):
    g = nx.DiGraph()
    g.add_edge("a", "b", weight=2.0)
    g.add_edge("b", "a", weight=1.0)
    g.add_edge("b", "c", weight=1.0)
    path = tmp_path / "d.graphml"
    nx.write_graphml(g, path)
    directed = load_edges(path, directed=True)
    assert edge_set(directed.graph) == {("a", "b"): 2.0, ("b", "a"): 1.0, ("b", "c"): 1.0}
    undirected = load_edges(path)
    assert edge_set(undirected.graph) == {("a", "b"): 3.0, ("b", "c"): 1.0}
    assert undirected.counts["duplicate_edges_merged"] == 1


def test_graphml_multigraph_parallel_edges_merged(tmp_path):
    g = nx.MultiGraph()
    g.add_edge("a", "b", weight=1.0)
    g.add_edge("a", "b", weight=2.5)
    path = tmp_path / "m.graphml"
    nx.write_graphml(g, path)
    net = load_edges(path)
    assert net.graph["a"]["b"]["weight"] == 3.5
    assert net.counts["duplicate_edges_merged"] == 1


@pytest.mark.parametrize("edges_key", ["edges", "links"])
def test_node_link_json_les_miserables(tmp_path, edges_key):
    # Knuth (1993) co-appearances, bundled with networkx: 77 characters, weighted ties.
    lm = nx.les_miserables_graph()
    data = nx.node_link_data(lm, edges=edges_key)
    path = write(tmp_path, "lm.json", json.dumps(data))
    net = load_edges(path)
    assert net.format == "json"
    assert net.graph.number_of_nodes() == 77
    assert edge_set(net.graph) == {k: float(v) for k, v in edge_set(lm).items()}


def test_node_link_json_integer_ids_become_text(tmp_path):
    data = nx.node_link_data(KARATE, edges="edges")
    net = load_edges(write(tmp_path, "k.json", json.dumps(data)))
    assert set(net.graph) == {str(n) for n in KARATE}
    assert net.graph.number_of_edges() == 78  # Zachary (1977)


def test_node_link_json_isolated_node_kept(tmp_path):
    g = nx.Graph([("a", "b")])
    g.add_node("alone")
    net = load_edges(write(tmp_path, "i.json", json.dumps(nx.node_link_data(g, edges="edges"))))
    assert "alone" in net.graph and net.graph.degree("alone") == 0


# ---------------------------------------------------------------- nodes files


@pytest.fixture
def small(tmp_path) -> LoadedNetwork:
    return load_edges(write(tmp_path, "e.csv", "source,target\nAna,Ben\nBen,Cai\nCai,Dov\n"))


def test_nodes_file_extra_and_missing(tmp_path, small):
    text = "node,department,site\nAna,Sales,NA\nBen,,Oslo\nEve,Legal,Rome\nCai,IT,None\n"
    table = load_nodes(write(tmp_path, "n.csv", text), small)
    assert table.columns == ["department", "site"]
    assert table.extra_nodes == ["Eve"]  # in the nodes file only: the caller adds it
    assert table.missing_nodes == ["Dov"]  # in the edges only
    assert table.attributes["Ana"] == {"department": "Sales", "site": "NA"}  # 'NA' is text
    assert table.attributes["Cai"]["site"] == "None"
    assert table.attributes["Ben"]["department"] == ""
    assert table.counts["extra_nodes"] == 1 and table.counts["missing_nodes"] == 1


def test_nodes_file_tsv_bom_case_and_trim(tmp_path, small):
    text = "\ufeffNode\tteam\n Ana \tx\nBen\ty\n"
    table = load_nodes(write(tmp_path, "n.tsv", text), small)
    assert set(table.attributes) == {"Ana", "Ben"}
    assert table.counts["names_trimmed"] == 1


def test_nodes_file_short_rows_filled(tmp_path, small):
    table = load_nodes(write(tmp_path, "n.csv", "node,team,site\nAna,x\nBen,y,z\n"), small)
    assert table.attributes["Ana"] == {"team": "x", "site": ""}
    assert table.counts["short_rows_filled"] == 1


def test_nodes_file_only_node_column(tmp_path, small):
    table = load_nodes(write(tmp_path, "n.csv", "node\nAna\nZed\n"), small)
    assert table.columns == []
    assert table.extra_nodes == ["Zed"]


# ------------------------------------------------------------------ Unicode forms of names
# Canonical equivalence from UnicodeData.txt: U+00EB (e with diaeresis) = 0065 0308,
# U+00C5 (A with ring) = 0041 030A; so "Zoë" typed composed and exported decomposed is
# one name in NFC (Unicode Standard Annex #15).
ZOE_NFC, ZOE_NFD = "Zo\u00eb", "Zoe\u0308"


def test_nfc_and_nfd_forms_are_one_member(tmp_path):
    text = f"source,target,weight\n{ZOE_NFC},Ana,1\n{ZOE_NFD},Ana,2\n{ZOE_NFD},{ZOE_NFC},5\n"
    net = load_edges(write(tmp_path, "z.csv", text))
    assert sorted(net.graph) == ["Ana", ZOE_NFC]
    assert net.graph[ZOE_NFC]["Ana"]["weight"] == 3.0  # the two rows' weights added
    c = net.counts
    assert c["names_normalised"] == 1
    assert (c["duplicate_edges_merged"], c["self_loops_dropped"]) == (1, 1)
    assert c["lookalike_names"] == 0 and net.lookalikes == ()


@pytest.mark.parametrize(("edges_form", "nodes_form"), [(ZOE_NFD, ZOE_NFC), (ZOE_NFC, ZOE_NFD)])
def test_nodes_file_in_another_form_makes_no_phantom(tmp_path, edges_form, nodes_form):
    net = load_edges(write(tmp_path, "e.csv", f"source,target\n{edges_form},Ana\n"))
    table = load_nodes(write(tmp_path, "n.csv", f"node,team\n{nodes_form},x\nAna,y\n"), net)
    assert table.extra_nodes == [] and table.missing_nodes == []
    assert table.attributes[ZOE_NFC] == {"team": "x"}
    assert table.counts["names_normalised"] == (nodes_form == ZOE_NFD)


def test_nodes_file_listing_both_forms_is_a_repeat(tmp_path):
    net = load_edges(write(tmp_path, "e.csv", f"source,target\n{ZOE_NFC},Ana\n"))
    path = write(tmp_path, "n.csv", f"node\n{ZOE_NFC}\n{ZOE_NFD}\n")
    with pytest.raises(InputError, match="listed again .first at line 2"):
        load_nodes(path, net)


@pytest.mark.parametrize("kind", ["json", "graphml"])
def test_nfd_names_in_json_and_graphml(tmp_path, kind):
    g = nx.Graph([(ZOE_NFD, "Ana"), (ZOE_NFC, "Ben")])
    if kind == "json":
        path = tmp_path / "g.json"
        path.write_text(json.dumps(nx.node_link_data(g, edges="edges")))
    else:
        path = tmp_path / "g.graphml"
        nx.write_graphml(g, path)
    net = load_edges(path)
    assert sorted(net.graph) == ["Ana", "Ben", ZOE_NFC]
    assert net.counts["names_normalised"] == 1


@pytest.mark.parametrize(
    "other",
    [
        "Ana\u200b",  # zero-width space (U+200B, category Cf)
        "A\u00adna",  # soft hyphen
        "\u200eAna",  # left-to-right mark
        "\uff21na",  # full-width A: NFKC maps U+FF21 to A (UnicodeData.txt <wide> 0041)
    ],
)
def test_lookalike_names_are_counted_and_kept_apart(tmp_path, other):
    net = load_edges(write(tmp_path, "l.csv", f"source,target\nAna,Ben\n{other},Cai\n"))
    assert net.graph.number_of_nodes() == 4  # not merged: the character may be meant
    assert net.counts["lookalike_names"] == 2
    assert net.lookalikes == (("Ana", other),)


def test_lookalike_between_nodes_file_and_network(tmp_path):
    net = load_edges(write(tmp_path, "e.csv", "source,target\nAna,Ben\n"))
    table = load_nodes(write(tmp_path, "n.csv", "node,team\nAna\u200b,x\nBen,y\n"), net)
    assert table.extra_nodes == ["Ana\u200b"] and table.missing_nodes == ["Ana"]
    assert table.counts["lookalike_names"] == 1
    assert table.lookalikes == (("Ana\u200b", "Ana"),)


def test_name_longer_than_the_csv_field_limit(tmp_path):
    # Python's csv module refuses fields over csv.field_size_limit(), 131,072 by default
    # (Python documentation, csv.field_size_limit).
    long = "x" * 131_073
    for where, text in (
        (3, f"source,target\nAna,Ben\n{long},Ana\n"),
        (3, f'source,target\nAna,Ben\n"{long}",Ana\n'),
    ):
        with pytest.raises(InputError) as info:
            load_edges(write(tmp_path, "long.csv", text))
        assert info.value.line == where
        assert "longer than 131,072 characters" in str(info.value)
        assert "name too long" in str(info.value)
    path = write(tmp_path, "n.csv", f"node,team\nAna,x\n{long},y\n")
    net = load_edges(write(tmp_path, "e.csv", "source,target\nAna,Ben\n"))
    with pytest.raises(InputError, match="name too long") as info:
        load_nodes(path, net)
    assert info.value.line == 3


@pytest.mark.parametrize("name", ["\u200b", "\u200d\u200d", "\u00ad", "\ufe0f"])
def test_name_of_invisible_characters_only_is_refused(tmp_path, name):
    path = write(tmp_path, "i.csv", f"source,target\nAna,Ben\nBen,{name}\n")
    with pytest.raises(InputError, match="print as nothing") as info:
        load_edges(path)
    assert info.value.line == 3
    nodes = write(tmp_path, "n.csv", f"node\nAna\n{name}\n")
    net = load_edges(write(tmp_path, "e.csv", "source,target\nAna,Ben\n"))
    with pytest.raises(InputError, match="print as nothing") as info:
        load_nodes(nodes, net)
    assert info.value.line == 3
    doc = {"nodes": [{"id": "a"}, {"id": name}], "edges": [{"source": "a", "target": name}]}
    with pytest.raises(InputError, match="print as nothing"):
        load_edges(write(tmp_path, "j.json", json.dumps(doc)))
