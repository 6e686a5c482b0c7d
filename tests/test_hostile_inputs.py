"""Inputs that must be refused clearly (issue 6), at the library level, and property tests:
arbitrary bytes and arbitrary small tables either load or raise RolesError, never anything
else. Each refusal checks the error type, the file and line it names, and that the
message says what to do."""

from __future__ import annotations

import csv
import io
import json
import math
import tempfile
import unicodedata
from pathlib import Path

import networkx as nx
import numpy as np
import pytest
from hypothesis import HealthCheck, given, settings
from hypothesis import strategies as st

import roles.io.load.files
from roles.config import load_config
from roles.errors import ConfigError, InputError, RolesError
from roles.io.load import load_edges, load_nodes
from roles.io.names import skeleton


def write(folder: Path, name: str, content: str | bytes) -> Path:
    path = folder / name
    if isinstance(content, str):
        path.write_text(content, encoding="utf-8", newline="")
    else:
        path.write_bytes(content)
    return path


def refused(path: Path, line: int | None = None, *words: str, **options) -> InputError:
    with pytest.raises(InputError) as info:
        load_edges(path, **options)
    err = info.value
    assert err.path == str(path)
    assert err.line == line
    message = str(err)
    assert message.startswith(str(path))  # the file is named first
    assert "\n" not in message  # one line on stderr
    for word in words:
        assert word.lower() in message.lower(), (word, message)
    return err


# ------------------------------------------------------------------ edge lists


@pytest.mark.parametrize(
    "content",
    [b"", b"   \n\n", b"\xef\xbb\xbf", b"\xef\xbb\xbf\r\n"],
    ids=["0b", "ws", "bom", "bomnl"],
)
def test_empty_file(tmp_path, content):
    refused(write(tmp_path, "e.csv", content), None, "empty")


def test_header_only(tmp_path):
    refused(write(tmp_path, "h.csv", "source,target,weight\n"), 1, "no ties", "add")


def test_header_only_after_blank_rows(tmp_path):
    refused(write(tmp_path, "h.csv", "source,target\n\n,\n"), 1, "no ties")


def test_missing_columns_names_found_columns_and_mapping(tmp_path):
    err = refused(
        write(tmp_path, "m.csv", "from,to,w\nAna,Ben,1\n"),
        1,
        "'source'",
        "'target'",
        "'from', 'to', 'w'",
        "--source-column",
        "--target-column",
    )
    assert "comma-separated" in str(err)


def test_missing_header_line(tmp_path):
    # The first data row taken for a header: the message suggests adding one.
    refused(write(tmp_path, "n.csv", "Ana,Ben,1\nBen,Cai,2\n"), 1, "'Ana', 'Ben', '1'", "header")


def test_named_weight_column_missing(tmp_path):
    refused(
        write(tmp_path, "w.csv", "source,target\nAna,Ben\n"), 1, "'strength'", weight="strength"
    )


def test_semicolon_file_wrong_column_names_mentions_delimiter(tmp_path):
    err = refused(write(tmp_path, "s.csv", "a;b\n1;2\n"), 1)
    assert "semicolon-separated" in str(err)


@pytest.mark.parametrize(
    ("weight", "words"),
    [
        ("heavy", ["'heavy'", "not a number"]),
        ("-1", ["negative", "0 or more"]),
        ("-0.5", ["negative"]),
        ("nan", ["NaN"]),
        ("NaN", ["NaN"]),
        ("inf", ["infinite"]),
        ("-inf", ["infinite"]),
        ("1e999", ["infinite"]),  # overflows to infinity in IEEE 754 doubles
        ("", ["empty", "fill in"]),
        ("2,5", ["decimals with a point"]),
        ("50%", ["not a number"]),
    ],
)
def test_bad_weights(tmp_path, weight, words):
    cell = f'"{weight}"' if "," in weight else weight
    path = write(tmp_path, "w.csv", f"source,target,weight\nAna,Ben,1\nBen,Cai,{cell}\n")
    refused(path, 3, *words)


# The largest finite float32 is (2 - 2**-23) * 2**127 = 3.4028235e38 and the smallest
# normal one 2**-126 = 1.1754944e-38 (IEEE 754-2008, binary32); ties are stored as float32.
@pytest.mark.parametrize(
    ("rows", "line", "words"),
    [
        ("Ana,Ben,1e39\n", 2, ["'1e39'", "more than 3.4e+38", "Divide all weights"]),
        ("Ana,Ben,1e-46\n", 2, ["'1e-46'", "smaller than 1.2e-38", "would become 0"]),
        ("Ana,Ben,1e-39\n", 2, ["smaller than 1.2e-38"]),  # float32 subnormal: imprecise
        ("Ana,Ben,3e38\nBen,Cai,1\nBen,Ana,3e38\n", 4, ["add up to '6e+38'"]),
    ],
    ids=["1e39", "1e-46", "subnormal", "duplicates"],
)
def test_weights_outside_float32_refused_with_line(tmp_path, rows, line, words):
    refused(write(tmp_path, "w.csv", "source,target,weight\n" + rows), line, *words)


def test_weights_at_the_float32_limits_accepted(tmp_path):
    from roles.embedding.graph import to_csr

    text = "source,target,weight\nAna,Ben,3.4028234e38\nBen,Cai,1.1754944e-38\n"
    csr = to_csr(load_edges(write(tmp_path, "w.csv", text)).graph)
    assert np.all(np.isfinite(csr.weights)) and np.all(csr.weights > 0)


def test_json_weight_outside_float32_refused(tmp_path):
    for literal, word in (("1e39", "more than"), ("1e-46", "smaller than")):
        text = '{"nodes": [{"id": "a"}, {"id": "b"}], "edges": [{"source": "a", "target": "b",'
        text += f' "weight": {literal}}}]}}'
        refused(write(tmp_path, "j.json", text), None, "'a' - 'b'", word)


def test_all_weights_zero(tmp_path):
    path = write(tmp_path, "z.csv", "source,target,weight\nAna,Ben,0\nBen,Cai,0.0\nCai,Cai,4\n")
    refused(path, None, "all 2 weights are 0", "drop the weight column")


def test_only_self_loops(tmp_path):
    refused(write(tmp_path, "l.csv", "source,target\nAna,Ana\nBen,Ben\n"), None, "self-loop")


@pytest.mark.parametrize(
    ("text", "line"),
    [
        ('source,target\nAna,Ben\n"Cai,Dov\nEve,Fay\n', 3),  # never closed
        ('source,target\nAna,Ben\nCai,"Dov"x\n', 3),  # text after the closing quote
        ('source,target\nAna,Ben\nCai,"Dov" \n', 3),
    ],
)
def test_broken_quoting(tmp_path, text, line):
    refused(write(tmp_path, "q.csv", text), line, "quoting is broken", '""')


def test_stray_quote_swallowing_lines_refused(tmp_path):
    # A quote left open and closed lines later turns several rows into one name.
    text = 'source,target\nAna,"Ben\nCai,Dov\nEve"\nFay,Gus\n'
    refused(write(tmp_path, "q.csv", text), 2, "line break", "quote mark")


def test_stray_quote_spanning_rows_cell_count(tmp_path):
    text = 'source,target\nAna,"Ben\nCai,Dov\nEve",Fay\n'
    refused(write(tmp_path, "q.csv", text), 2, "from line 2 to line 4", "left open")


def test_tab_inside_a_name(tmp_path):
    refused(write(tmp_path, "t.csv", 'source,target\nAna,Ben\n"Cai\tX",Dov\n'), 3, "a tab")


@pytest.mark.parametrize(("row", "line"), [(",Ben", 2), ("Ana,", 2), ("   ,Ben", 2), ('"",Ben', 2)])
def test_empty_node_names(tmp_path, row, line):
    refused(write(tmp_path, "e.csv", f"source,target\n{row}\nBen,Cai\n"), line, "empty", "fill")


def test_row_with_too_many_cells(tmp_path):
    path = write(tmp_path, "r.csv", "source,target\nAna,Ben\nSmith, Ana,Ben\n")
    refused(path, 3, "3 cells", "header has 2", "quote marks")


def test_row_with_too_few_cells(tmp_path):
    refused(write(tmp_path, "r.csv", "source,target,weight\nAna,Ben\n"), 2, "missing")


def test_header_repeats_a_column(tmp_path):
    refused(write(tmp_path, "r.csv", "source,target,source\na,b,c\n"), 1, "twice")


def test_header_unnamed_column(tmp_path):
    refused(write(tmp_path, "r.csv", "source,,target\na,b,c\n"), 1, "no name")


def test_source_and_target_same_column(tmp_path):
    refused(write(tmp_path, "r.csv", "who,x\na,b\n"), 1, "both", source="who", target="who")


def test_nul_bytes_binary(tmp_path):
    path = write(tmp_path, "b.csv", b"source,target\nAna,Ben\n\x00\x01\x02\xff\n")
    refused(path, 3, "NUL", "UTF-8")


def test_utf16_without_bom_has_nul(tmp_path):
    path = write(tmp_path, "b.csv", "source,target\nAna,Ben\n".encode("utf-16-le"))
    refused(path, 1, "UTF-16")


def test_undecodable_bytes(tmp_path):
    # Latin-1 'é' (0xE9) is not valid UTF-8 (RFC 3629).
    path = write(tmp_path, "b.csv", "source,target\nAna,Ben\nJos\xe9,Ben\n".encode("latin-1"))
    refused(path, 3, "not valid UTF-8", "CSV UTF-8")


def test_control_character(tmp_path):
    path = write(tmp_path, "c.csv", "source,target\nAna,Ben\nB\x1b[31mob,Ana\n")
    refused(path, 3, "U+001B")


@pytest.mark.parametrize(
    ("magic", "kind"),
    [
        (b"PK\x03\x04rest", "ZIP"),
        (b"\xd0\xcf\x11\xe0rest", "xls"),
        (b"%PDF-1.7", "PDF"),
        (b"\x1f\x8b\x08rest", "gzip"),
    ],
)
def test_spreadsheet_and_archive_files(tmp_path, magic, kind):
    refused(write(tmp_path, "x.csv", magic + bytes(range(256))), 1, kind, "export")


def test_random_binary_garbage(tmp_path):
    refused(write(tmp_path, "g.csv", bytes([0x9C, 0xFF, 0x10, 0x00, 0xAB] * 50)), 1, "NUL")


def test_missing_file_suggests_close_name(tmp_path):
    write(tmp_path, "edges.csv", "source,target\na,b\n")
    path = tmp_path / "egdes.csv"
    err = refused(path, None, "does not exist", "edges.csv")
    assert "Did you mean" in str(err)


def test_missing_file_in_missing_folder(tmp_path):
    refused(tmp_path / "nowhere" / "e.csv", None, "does not exist", "either")


def test_folder_instead_of_file(tmp_path):
    refused(tmp_path, None, "folder, not a file")


def test_not_a_regular_file():
    path = Path("/dev/null")
    if not path.exists():
        pytest.skip("no /dev/null here")
    refused(path, None, "not a regular file")


def test_csv_size_cap(tmp_path, monkeypatch):
    monkeypatch.setattr(roles.io.load.files, "MAX_TEXT_BYTES", 100)
    refused(write(tmp_path, "big.csv", "source,target\n" + "a,b\n" * 50), None, "MB")


# ------------------------------------------------------------------ GraphML

_GRAPHML_HEAD = '<graphml xmlns="http://graphml.graphdrawing.org/xmlns">'

BILLION_LAUGHS = """<?xml version="1.0"?>
<!DOCTYPE lolz [
 <!ENTITY lol "lol">
 <!ENTITY lol2 "&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;&lol;">
 <!ENTITY lol3 "&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;&lol2;">
 <!ENTITY lol4 "&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;&lol3;">
]>
<graphml xmlns="http://graphml.graphdrawing.org/xmlns"><graph edgedefault="undirected">
<node id="&lol4;"/><node id="b"/><edge source="&lol4;" target="b"/></graph></graphml>
"""

XXE = """<?xml version="1.0"?>
<!DOCTYPE g [<!ENTITY secret SYSTEM "file:///etc/passwd">]>
<graphml xmlns="http://graphml.graphdrawing.org/xmlns"><graph edgedefault="undirected">
<node id="&secret;"/><node id="b"/><edge source="&secret;" target="b"/></graph></graphml>
"""


@pytest.mark.parametrize("doc", [BILLION_LAUGHS, XXE], ids=["billion-laughs", "xxe"])
def test_graphml_entities_refused(tmp_path, doc):
    # Attacks documented by the defusedxml project (billion laughs, external entities).
    refused(write(tmp_path, "x.graphml", doc), None, "DTD", "DOCTYPE")


def test_graphml_not_well_formed(tmp_path):
    err = refused(write(tmp_path, "x.graphml", _GRAPHML_HEAD + "\n<graph><node id='a'>"), 2)
    assert "not well-formed" in str(err)


def test_graphml_without_graph(tmp_path):
    refused(write(tmp_path, "x.graphml", _GRAPHML_HEAD + "</graphml>"), None, "no <graph>")


def test_graphml_not_graphml_xml(tmp_path):
    refused(write(tmp_path, "x.xml", "<html><body>hi</body></html>"), None, "no <graph>")


def test_graphml_bad_weight(tmp_path):
    g = nx.Graph()
    g.add_edge("a", "b", weight=-2.0)
    path = tmp_path / "w.graphml"
    nx.write_graphml(g, path)
    refused(path, None, "negative", "'a' - 'b'")


def test_graphml_nan_weight(tmp_path):
    g = nx.Graph()
    g.add_edge("a", "b", weight=math.nan)
    path = tmp_path / "w.graphml"
    nx.write_graphml(g, path)
    refused(path, None, "NaN")


def test_graphml_undirected_read_directed(tmp_path):
    path = tmp_path / "u.graphml"
    nx.write_graphml(nx.path_graph(3), path)
    refused(path, None, "undirected", directed=True)


def test_graphml_no_edges(tmp_path):
    g = nx.Graph()
    g.add_nodes_from("abc")
    path = tmp_path / "n.graphml"
    nx.write_graphml(g, path)
    refused(path, None, "no ties")


def test_graphml_empty_node_id(tmp_path):
    doc = _GRAPHML_HEAD + '<graph edgedefault="undirected"><node id=""/><node id="b"/>'
    doc += '<edge source="" target="b"/></graph></graphml>'
    refused(write(tmp_path, "e.graphml", doc), None, "empty name")


def test_graphml_size_cap(tmp_path, monkeypatch):
    monkeypatch.setattr(roles.io.load.files, "MAX_GRAPHML_BYTES", 1000)
    path = tmp_path / "k.graphml"
    nx.write_graphml(nx.karate_club_graph(), path)
    refused(path, None, "MB", "CSV")


# ------------------------------------------------------------------ JSON


def test_json_invalid_names_line(tmp_path):
    refused(write(tmp_path, "j.json", '{"nodes": [\n{"id": 1},\n{"id": }\n]}'), 3, "not valid JSON")


@pytest.mark.parametrize(
    ("doc", "words"),
    [
        ([1, 2, 3], ["node-link"]),
        ({"graph": {}}, ["node-link"]),
        ({"nodes": {"a": 1}}, ["must be lists"]),
        ({"nodes": [{"name": "a"}]}, ["no 'id'"]),
        ({"nodes": [{"id": True}]}, ["text or whole numbers"]),
        ({"nodes": [{"id": 1.5}]}, ["text or whole numbers"]),
        ({"nodes": [{"id": "a"}, {"id": "a"}]}, ["repeats"]),
        ({"nodes": [{"id": 1}, {"id": "1"}]}, ["same name"]),
        ({"nodes": [{"id": "a"}], "edges": [{"source": "a"}]}, ["'source' and a 'target'"]),
        ({"nodes": [], "edges": [], "links": []}, ["both"]),
        ({"nodes": [{"id": "a"}, {"id": "b"}], "edges": []}, ["no ties"]),
        ({"nodes": [], "edges": []}, ["no nodes"]),
        ({"directed": "yes", "nodes": []}, ["true or false"]),
        (
            {"nodes": [{"id": "a"}], "edges": [{"source": "a", "target": "b", "weight": "x"}]},
            ["not a number"],
        ),
        (
            {"nodes": [{"id": "a\u0007"}], "edges": [{"source": "a\u0007", "target": "b"}]},
            ["U+0007"],
        ),
        ({"nodes": [{"id": "\ud800"}], "edges": [{"source": "\ud800", "target": "b"}]}, ["U+D800"]),
    ],
)
def test_json_not_a_valid_node_link_graph(tmp_path, doc, words):
    refused(write(tmp_path, "j.json", json.dumps(doc)), None, *words)


def test_json_nan_and_infinite_weight_literals(tmp_path):
    for literal, word in (("NaN", "NaN"), ("Infinity", "infinite"), ("-1", "negative")):
        text = '{"nodes": [{"id": "a"}, {"id": "b"}], "edges": [{"source": "a", "target": "b",'
        text += f' "weight": {literal}}}]}}'
        refused(write(tmp_path, "j.json", text), None, word)


def test_json_deep_nesting(tmp_path):
    refused(write(tmp_path, "j.json", "[" * 100000 + "]" * 100000), None)


def test_json_size_cap(tmp_path, monkeypatch):
    monkeypatch.setattr(roles.io.load.files, "MAX_JSON_BYTES", 10)
    refused(write(tmp_path, "j.json", json.dumps({"nodes": [], "edges": []})), None, "MB")


# ------------------------------------------------------------------ nodes files


@pytest.fixture
def net(tmp_path):
    return load_edges(write(tmp_path, "edges.csv", "source,target\nAna,Ben\nBen,Cai\n"))


def nodes_refused(path: Path, network, line: int | None, *words: str) -> InputError:
    with pytest.raises(InputError) as info:
        load_nodes(path, network)
    err = info.value
    assert err.path == str(path) and err.line == line
    for word in words:
        assert word.lower() in str(err).lower(), (word, str(err))
    return err


def test_nodes_without_node_column(tmp_path, net):
    path = write(tmp_path, "n.csv", "name,team\nAna,x\n")
    nodes_refused(path, net, 1, "no 'node' column", "'name', 'team'", "rename")


def test_nodes_missing_file(tmp_path, net):
    nodes_refused(tmp_path / "nodes.csv", net, None, "does not exist")


def test_nodes_folder(tmp_path, net):
    nodes_refused(tmp_path, net, None, "folder")


def test_nodes_duplicate_row_names_both_lines(tmp_path, net):
    path = write(tmp_path, "n.csv", "node,team\nAna,x\nBen,y\nAna,z\n")
    nodes_refused(path, net, 4, "'Ana'", "first at line 2", "one row per node")


def test_nodes_duplicate_after_trimming(tmp_path, net):
    nodes_refused(write(tmp_path, "n.csv", "node\nAna\n Ana \n"), net, 3, "listed again")


def test_nodes_empty_name(tmp_path, net):
    nodes_refused(write(tmp_path, "n.csv", "node,team\nAna,x\n,y\n"), net, 3, "empty")


def test_nodes_empty_and_header_only(tmp_path, net):
    nodes_refused(write(tmp_path, "n.csv", ""), net, None, "empty")
    nodes_refused(write(tmp_path, "h.csv", "node,team\n"), net, 1, "no rows")


def test_nodes_broken_quoting(tmp_path, net):
    nodes_refused(write(tmp_path, "n.csv", 'node,team\nAna,"x\n'), net, 2, "quoting")


def test_nodes_too_many_cells(tmp_path, net):
    nodes_refused(write(tmp_path, "n.csv", "node,team\nAna,x,y\n"), net, 2, "3 cells")


def test_nodes_file_in_json_refused(tmp_path, net):
    nodes_refused(write(tmp_path, "n.json", "{}"), net, None, "CSV or TSV")


def test_nodes_binary(tmp_path, net):
    nodes_refused(write(tmp_path, "n.csv", b"node\n\x00\x00"), net, 2, "NUL")


# ------------------------------------------------------------------ tiny graphs


def test_one_edge_two_nodes_loads(tmp_path):
    # The report, not the loader, explains why nothing can be grouped (issue 6).
    g = load_edges(write(tmp_path, "t.csv", "source,target\nAna,Ben\n")).graph
    assert (g.number_of_nodes(), g.number_of_edges()) == (2, 1)


# ------------------------------------------------------------------ configuration


def config_refused(tmp_path: Path, text: str | bytes, *words: str) -> ConfigError:
    path = write(tmp_path, "c.toml", text)
    with pytest.raises(ConfigError) as info:
        load_config(path)
    message = str(info.value)
    assert message.startswith(str(path))
    assert "\n" not in message
    for word in words:
        assert word in message, (word, message)
    return info.value


def test_config_broken_toml(tmp_path):
    config_refused(tmp_path, "[walks\nwalk_length = 3\n", "not valid TOML", "line 1")


def test_config_broken_toml_value(tmp_path):
    config_refused(tmp_path, "seed = \n", "not valid TOML")


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("sed = 3\n", ["'sed'", "Allowed keys", "seed"]),
        ("[walks]\nwalk_lenght = 30\n", ["'walk_lenght'", "[walks]", "walk_length"]),
        ("[views.lokal]\nq = 2\n", ["'lokal'", "local, far"]),
        ("[views.local]\nk = 2\n", ["'k'", "[views.local]"]),
        ("[cluster]\nmin_size = 3\n", ["'min_size'", "min_cluster_size"]),
    ],
)
def test_config_unknown_keys(tmp_path, text, words):
    config_refused(tmp_path, text, *words)


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ("[views.local]\nq = -1\n", ["'q'", "[views.local]", "from 0.25 to 4", "Got -1"]),
        ("[views.far]\np = 0\n", ["'p'", "Got 0"]),
        ("[views.far]\nq = inf\n", ["'q'", "Got inf"]),
        ("[views.far]\nq = nan\n", ["'q'", "Got nan"]),
        ("[walks]\nwalk_length = 1\n", ["'walk_length'", "from 2 to 10000", "Got 1"]),
        ("[walks]\nwalks_per_node = 0\n", ["'walks_per_node'", "Got 0"]),
        ("[embedding]\ndimensions = 5000\n", ["'dimensions'", "Got 5000"]),
        ("seed = -4\n", ["'seed'", "Got -4"]),
        ("[cluster]\nreduce_to = 1\n", ["'reduce_to'", "Got 1"]),
        ("[cluster]\nfit_limit = 50\n", ["'fit_limit'", "0 (fit every member)", "Got 50"]),
        ("[cluster]\nfit_limit = -1\n", ["'fit_limit'", "Got -1"]),
    ],
)
def test_config_out_of_range(tmp_path, text, words):
    config_refused(tmp_path, text, *words)


@pytest.mark.parametrize(
    ("text", "words"),
    [
        ('[walks]\nwalk_length = "40"\n', ["'walk_length'", "whole number", "Got '40'"]),
        ("[walks]\nwalk_length = 40.5\n", ["'walk_length'", "Got 40.5"]),
        ("[walks]\nwalk_length = true\n", ["'walk_length'", "Got True"]),
        ('[views.local]\nq = "two"\n', ["'q'", "Got 'two'"]),
        ("[views.local]\nq = true\n", ["'q'", "Got True"]),
        ("seed = 1.5\n", ["'seed'", "Got 1.5"]),
        ("walks = 3\n", ["[walks] must be a table", "Got 3"]),
        ("views = 3\n", ["[views] must be a table"]),
        ("[views]\nlocal = 2\n", ["[views.local] must be a table"]),
    ],
)
def test_config_wrong_type(tmp_path, text, words):
    config_refused(tmp_path, text, *words)


def test_config_missing_file(tmp_path):
    with pytest.raises(ConfigError, match="does not exist"):
        load_config(tmp_path / "nope.toml")


def test_config_folder(tmp_path):
    with pytest.raises(ConfigError, match="not a file"):
        load_config(tmp_path)


def test_config_not_utf8(tmp_path):
    config_refused(tmp_path, b"seed = 3 # \xe9\n", "not UTF-8")


@pytest.mark.parametrize(
    ("text", "words"),
    [
        # 100,000 nested arrays: tomllib recurses once per level (RecursionError).
        ("x = " + "[" * 100_000 + "]" * 100_000 + "\n", ["nested too deeply"]),
        ("seed = " + "{a = " * 50_000 + "1" + "}" * 50_000 + "\n", ["nested too deeply"]),
        # Parsed, but too deep to print in a message: the value is not shown.
        ("walks = " + "[" * 300 + "]" * 300 + "\n", ["[walks] must be a table"]),
        ("seed = '" + "x" * 100_000 + "'\n", ["'seed'", "..."]),
    ],
    ids=["deep-array", "deep-table", "deep-section", "long-value"],
)
def test_config_that_cannot_be_parsed_gives_one_line(tmp_path, text, words):
    err = config_refused(tmp_path, text, *words)
    assert len(str(err)) < 400  # the value is cut, not copied into the message


def test_config_too_large(tmp_path):
    config_refused(tmp_path, "# " + "x" * (1 << 20) + "\n", "1,048,579 bytes", "right file")


def test_config_path_too_long(tmp_path):
    for path in (tmp_path / ("c" * 256 + ".toml"), tmp_path.joinpath(*["d" * 250] * 17)):
        with pytest.raises(ConfigError, match="cannot be read .File name too long"):
            load_config(path)


def test_config_valid_file_accepted(tmp_path):
    path = write(tmp_path, "c.toml", "seed = 7\n[views.local]\nq = 4\n[walks]\nwalk_length = 20\n")
    cfg = load_config(path)
    assert (cfg.seed, cfg.local.q, cfg.far.q, cfg.walks.walk_length) == (7, 4.0, 0.5, 20)


# ------------------------------------------------------------------ properties

_SUFFIXES = [".csv", ".tsv", ".txt", ".graphml", ".json", ""]
_PROPERTY = settings(max_examples=150, deadline=None, suppress_health_check=[HealthCheck.too_slow])
_scratch = Path(tempfile.mkdtemp(prefix="roles-hypothesis-"))


def _check_loaded(net) -> None:
    """What every loaded network promises, whatever the input."""
    g = net.graph
    assert nx.number_of_selfloops(g) == 0
    assert g.number_of_edges() >= 1
    for n in g:
        assert isinstance(n, str) and n.strip()
    for _, _, w in g.edges(data="weight"):
        assert isinstance(w, float) and 0 < w < math.inf
    c = net.counts
    assert c["rows_read"] == (
        c["edges"]
        + c["duplicate_edges_merged"]
        + c["self_loops_dropped"]
        + c["zero_weight_edges_dropped"]
    )


@_PROPERTY
@given(data=st.binary(max_size=400), suffix=st.sampled_from(_SUFFIXES))
def test_arbitrary_bytes_load_or_raise_roles_error(data, suffix):
    path = _scratch / f"bytes{suffix}"
    path.write_bytes(data)
    try:
        net = load_edges(path)
    except RolesError:
        return
    _check_loaded(net)


_XMLISH = st.sampled_from(
    [
        "<graphml>",
        "</graphml>",
        _GRAPHML_HEAD,
        "<graph edgedefault='directed'>",
        "</graph>",
        "<node id='a'/>",
        "<node id='b'/>",
        "<edge source='a' target='b'/>",
        "<edge source='a'/>",
        "<key id='w' for='edge' attr.name='weight' attr.type='double'/>",
        "<data key='w'>2</data>",
        "<data key='w'>x</data>",
        "<edge source='b' target='a'>",
        "</edge>",
        "&amp;",
        "<!--c-->",
        "<?xml version='1.0'?>",
        "<hyperedge>",
        "<port name='p'/>",
        "<graph>",
    ]
)


@_PROPERTY
@given(parts=st.lists(_XMLISH, max_size=14))
def test_graphml_fragments_load_or_raise_roles_error(parts):
    path = _scratch / "frag.graphml"
    path.write_text("".join(parts), encoding="utf-8")
    try:
        net = load_edges(path)
    except RolesError:
        return
    _check_loaded(net)


_json_scalar = st.one_of(
    st.none(), st.booleans(), st.integers(-3, 3), st.floats(allow_nan=True), st.text(max_size=3)
)
_json_value = st.recursive(
    _json_scalar,
    lambda inner: (
        st.lists(inner, max_size=3)
        | st.dictionaries(
            st.sampled_from(
                [
                    "id",
                    "source",
                    "target",
                    "weight",
                    "nodes",
                    "edges",
                    "links",
                    "directed",
                    "key",
                    "x",
                ]
            ),
            inner,
            max_size=4,
        )
    ),
    max_leaves=12,
)


@_PROPERTY
@given(doc=_json_value)
def test_json_documents_load_or_raise_roles_error(doc):
    path = _scratch / "doc.json"
    path.write_text(json.dumps(doc), encoding="utf-8")
    try:
        net = load_edges(path)
    except RolesError:
        return
    _check_loaded(net)


_plain = st.sampled_from(["Ana", "Ben", "Cai", "Dov", "1", "2.5", "0", "NA", "null"])
_odd = st.one_of(
    st.sampled_from(["", " ", "-1", "nan", "inf", '"', "a,b", "x\ny", "\t", "1,5", "\x1b"]),
    st.text(alphabet='abAB é李;,"\t\n\r', max_size=5),
    st.text(max_size=4),
)
# Mostly plain cells, so that many tables load and the loaded ones get checked too.
_cell = st.integers(0, 9).flatmap(lambda i: _odd if i == 0 else _plain)
_table = st.lists(st.lists(_cell, min_size=1, max_size=4), min_size=0, max_size=5)
_header = st.sampled_from(
    [
        ["source", "target"],
        ["source", "target", "weight"],
        ["Source", "Target", "Weight", "x"],
        ["node", "team"],
        ["a"],
        [],
    ]
)


def _render(header: list[str], rows: list[list[str]], delimiter: str, quote: bool) -> str:
    if quote:
        buf = io.StringIO()
        csv.writer(buf, delimiter=delimiter, lineterminator="\n").writerows([header, *rows])
        return buf.getvalue()
    return "".join(delimiter.join(r) + "\n" for r in [header, *rows])


@_PROPERTY
@given(
    header=_header,
    rows=_table,
    delimiter=st.sampled_from([",", "\t", ";"]),
    quote=st.booleans(),
    directed=st.booleans(),
)
def test_small_tables_load_or_raise_roles_error(header, rows, delimiter, quote, directed):
    path = _scratch / "table.csv"
    path.write_text(_render(header, rows, delimiter, quote), encoding="utf-8", newline="")
    try:
        net = load_edges(path, directed=directed)
    except RolesError:
        net = None
    if net is not None:
        _check_loaded(net)
    edges_path = _scratch / "edges.csv"
    edges_path.write_text("source,target\nx,y\n", encoding="utf-8")
    base = load_edges(edges_path)
    try:
        table = load_nodes(path, base)
    except RolesError:
        return
    assert set(table.extra_nodes) == set(table.attributes) - {"x", "y"}


_name = st.text(
    alphabet=st.characters(
        blacklist_categories=("Cc", "Cs", "Zl", "Zp"), blacklist_characters="\ufffe\uffff"
    ),
    min_size=1,
    max_size=5,
).filter(lambda s: s.strip() == s and skeleton(s) != "")  # names made only of invisible
# characters are refused (test_load.py); the domain here is names the loader accepts


@_PROPERTY
@given(
    ties=st.lists(st.tuples(_name, _name, st.integers(0, 5)), min_size=1, max_size=12),
    directed=st.booleans(),
)
def test_valid_tables_match_an_independent_reading(ties, directed):
    written = ties
    # Oracle: the documented merge rule applied with plain Python dictionaries, on names
    # in Unicode Normalization Form C (the standard library's unicodedata).
    ties = [
        (unicodedata.normalize("NFC", a), unicodedata.normalize("NFC", b), w) for a, b, w in ties
    ]
    expected: dict[tuple[str, str], float] = {}
    for a, b, w in ties:
        if a == b:
            continue
        key = (a, b) if directed else tuple(sorted((a, b)))
        expected[key] = expected.get(key, 0.0) + w
    expected = {k: v for k, v in expected.items() if v > 0}
    path = _scratch / "valid.csv"
    rows = [["source", "target", "weight"]] + [[a, b, str(w)] for a, b, w in written]
    with open(path, "w", encoding="utf-8", newline="") as fh:
        csv.writer(fh).writerows(rows)
    if not expected:
        with pytest.raises(InputError):
            load_edges(path, directed=directed)
        return
    g = load_edges(path, directed=directed).graph
    got = {(u, v) if directed else tuple(sorted((u, v))): w for u, v, w in g.edges(data="weight")}
    assert got == expected
    assert set(g) == {n for a, b, _ in ties for n in (a, b)}


def test_input_path_too_long(tmp_path):
    for path in (tmp_path / ("e" * 256 + ".csv"), tmp_path.joinpath(*["d" * 250] * 17)):
        with pytest.raises(InputError, match="cannot be used .File name too long"):
            load_edges(path)


def test_run_refuses_a_blank_group_column_before_the_work():
    from roles.pipeline import run

    g = nx.karate_club_graph()  # Zachary (1977), bundled with networkx
    blank = {n: {"team": " "} for n in g}
    with pytest.raises(InputError, match="'team' is blank for every member"):
        run(g, attributes=blank, group_by="team")
