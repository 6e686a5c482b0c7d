"""Result -> files: nodes.csv, nodes.xlsx, summary.json, graph.graphml, the report, the vectors.

Writers only read what the pipeline computed. CSV cells are made safe to open in a
spreadsheet by :func:`roles.io.output.write_csv`. graph.graphml and nodes.csv are written a
block of elements or rows at a time, so that a network of a million ties needs no copy of
the graph, no XML tree and no list of all rows in memory.
"""

from __future__ import annotations

import itertools
import json
import math
import re
import shutil
import tempfile
from collections.abc import Iterator, Mapping
from pathlib import Path
from typing import Any
from xml.sax.saxutils import escape as xml_escape

import networkx as nx
import numpy as np
import pandas as pd

from ..config import Config
from ..embedding.graph import CSRGraph
from ..errors import RolesError
from ..results import Result
from .output import write_csv
from .spreadsheet import community_rows, write_nodes_xlsx

__all__ = ["write_report_outputs", "write_embed_outputs", "json_ready"]


def json_ready(value: Any) -> Any:
    """Plain JSON types: numpy scalars unwrapped, NaN and infinities as null."""
    if isinstance(value, Mapping):
        return {str(k): json_ready(v) for k, v in value.items()}
    if isinstance(value, (list, tuple)):
        return [json_ready(v) for v in value]
    if isinstance(value, np.ndarray):
        return json_ready(value.tolist())
    if isinstance(value, np.generic):
        value = value.item()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    return value


def _write_json(path: Path, data: Mapping[str, Any]) -> None:
    path.write_text(
        json.dumps(json_ready(data), indent=2, ensure_ascii=False) + "\n", encoding="utf-8"
    )


_GRAPHML_HEAD = (
    "<?xml version='1.0' encoding='utf-8'?>\n"
    '<graphml xmlns="http://graphml.graphdrawing.org/xmlns" '
    'xmlns:xsi="http://www.w3.org/2001/XMLSchema-instance" '
    'xsi:schemaLocation="http://graphml.graphdrawing.org/xmlns '
    'http://graphml.graphdrawing.org/xmlns/1.0/graphml.xsd">\n'
)

# GraphML attr.type of each Python or numpy type, as networkx's writer names them
# (networkx.readwrite.graphml.GraphML.construct_types: Python int is "long", float
# "double"; numpy floats "float", numpy integers "int").
_XML_TYPE: dict[type, str] = {
    bool: "boolean",
    int: "long",
    float: "double",
    str: "string",
    **{t: "float" for t in (np.float64, np.float32, np.float16)},
    **{
        t: "int"
        for t in (np.int8, np.int16, np.int32, np.int64, np.uint8, np.uint16, np.uint32)
        + (np.uint64, np.intc, np.intp)
    },
}
# Types whose str() never needs XML escaping.
_PLAIN = frozenset(t for t, name in _XML_TYPE.items() if name != "string")

# XML 1.0 section 2.2 (Char): tab, newline, carriage return, U+0020-U+D7FF,
# U+E000-U+FFFD, U+10000-U+10FFFF. Anything else cannot appear in a document, not even
# as a character reference, so it is written as U+FFFD REPLACEMENT CHARACTER.
_NOT_XML_CHAR = "[^\t\n\r\x20-\ud7ff\ue000-\ufffd\U00010000-\U0010ffff]"
_NOT_XML = re.compile(_NOT_XML_CHAR)
_TEXT_WORK = re.compile("[&<>\r]|" + _NOT_XML_CHAR)
_ATTR_WORK = re.compile('[&<>"\r\n\t]|' + _NOT_XML_CHAR)
# Carriage returns are written as references: a raw one would be read back as a newline
# (XML 1.0 section 2.11, end-of-line handling). In attribute values, newlines and tabs
# too (section 3.3.3, attribute-value normalisation), as xml.etree.ElementTree does.
_TEXT_REFS = {"\r": "&#13;"}
_ATTR_REFS = {'"': "&quot;", "\r": "&#13;", "\n": "&#10;", "\t": "&#09;"}

_CHUNK = 4096  # elements per write
_SEEN = 1 << 16  # remembered texts per edge attribute and type


def _xml_text(text: str) -> str:
    """Character data: &, <, > escaped, characters XML cannot hold replaced."""
    if _TEXT_WORK.search(text) is None:
        return text
    return xml_escape(_NOT_XML.sub("\ufffd", text), _TEXT_REFS)


def _xml_attr(text: str) -> str:
    """An attribute value for double quotes: as :func:`_xml_text`, quotes and whitespace
    as references."""
    if _ATTR_WORK.search(text) is None:
        return text
    return xml_escape(_NOT_XML.sub("\ufffd", text), _ATTR_REFS)


def _typed(value: Any) -> tuple[str, str]:
    """GraphML type and escaped text of one attribute value (networkx's ``str(value)``).

    numpy scalars networkx knows keep their own text (``float32(0.1)`` is ``0.1``); other
    numpy scalars are unwrapped; values of other types are written as their text.
    """
    kind = _XML_TYPE.get(type(value))
    if kind is not None:
        return kind, (str(value) if kind != "string" else _xml_text(value))
    if isinstance(value, np.generic):
        return _typed(value.item())
    for base in (bool, int, float):
        if isinstance(value, base):
            return _XML_TYPE[base], _xml_text(str(value))
    return "string", _xml_text(str(value))


def _table_cell(value: Any) -> tuple[str, str] | None:
    """A node-table value as the report has always written it: numpy scalars unwrapped,
    NaN and infinities left out (None), other objects as their text."""
    if isinstance(value, np.generic):
        value = value.item()
    if isinstance(value, float) and not math.isfinite(value):
        return None
    if not isinstance(value, (int, float, str, bool)):
        value = str(value)
    return _typed(value)


class _Keys:
    """GraphML ``<key>`` declarations, numbered d0, d1, ... in order of first use."""

    def __init__(self, node_default: Mapping[Any, Any], edge_default: Mapping[Any, Any]):
        self.ids: dict[tuple[str, str, str], str] = {}
        self.lines: list[str] = []
        self._defaults = {"node": node_default, "edge": edge_default}

    def get(self, scope: str, key: Any, kind: str) -> str:
        name = str(key)
        found = self.ids.get((scope, name, kind))
        if found is not None:
            return found
        kid = f"d{len(self.ids)}"
        self.ids[scope, name, kind] = kid
        head = f'  <key id="{kid}" for="{scope}" attr.name="{_xml_attr(name)}" attr.type="{kind}"'
        default = self._defaults.get(scope, {}).get(key)
        if default is None:
            self.lines.append(head + " />\n")
        else:
            text = _xml_text(str(default))
            inner = f"    <default>{text}</default>\n" if text else "    <default />\n"
            self.lines.append(f"{head}>\n{inner}  </key>\n")
        return kid


def _column_cells(values: Any, rows: np.ndarray) -> tuple[list[str | None], str | list[str]]:
    """Text of one node-table column at ``rows`` (None: left out) and its GraphML type(s).

    numpy numeric columns are converted in bulk; they give what :func:`_table_cell` gives
    each value (Python int/float/bool text).
    """
    if isinstance(values, np.ndarray) and values.dtype.kind in "fiub":
        part = values[rows]
        if values.dtype.kind == "f":
            part = part.astype(np.float64, copy=False)
            texts: list[str | None] = list(map(repr, part.tolist()))
            for i in np.flatnonzero(~np.isfinite(part)).tolist():
                texts[i] = None
            return texts, "double"
        if values.dtype.kind == "b":
            return list(map(str, part.tolist())), "boolean"
        return list(map(str, part.tolist())), "long"
    texts = []
    kinds: list[str] = []
    for i in rows.tolist():
        cell = _table_cell(values[i])
        if cell is None:
            texts.append(None)
            kinds.append("")
        else:
            kinds.append(cell[0])
            texts.append(cell[1])
    return texts, kinds


def _node_lines(
    graph: nx.Graph, table: pd.DataFrame, ids: Mapping[Any, str], keys: _Keys
) -> Iterator[str]:
    """``<node>`` elements: the graph's own node attributes, then the table's columns
    (a table value replaces an attribute of the same name; a left-out value does not)."""
    items = list(graph.nodes(data=True))
    nodes = table["node"].tolist()
    columns = [c for c in table.columns if c != "node"]
    data = []
    for c in columns:
        s = table[c]
        bulk = isinstance(s.dtype, np.dtype) and s.dtype.kind in "fiub"
        data.append(s.to_numpy() if bulk else list(s))
    if nodes == [n for n, _ in items]:
        order = np.arange(len(items))
    else:  # rows by name (the last row of a repeated name), -1 for nodes without a row
        where = {n: i for i, n in enumerate(nodes)}
        order = np.array([where.get(n, -1) for n, _ in items], dtype=np.int64)
    opening: dict[tuple[Any, str], str] = {}  # (attribute, type) -> '<data key="dN"'
    for start in range(0, len(items), _CHUNK):
        stop = min(start + _CHUNK, len(items))
        rows = order[start:stop]
        has_row = rows >= 0
        cells = list(zip(columns, (_column_cells(v, rows[has_row]) for v in data), strict=True))
        lines: list[str] = []
        k = -1
        for (node, own), present in zip(items[start:stop], has_row.tolist(), strict=True):
            found: list[tuple[Any, str, str]] = []  # (attribute, GraphML type, text)
            if present:
                k += 1
                for c, (texts, kinds) in cells:
                    text = texts[k]
                    if text is not None:
                        found.append((c, kinds if isinstance(kinds, str) else kinds[k], text))
            if own:
                merged = {a: _typed(v) for a, v in own.items()}
                merged.update((c, (kind, text)) for c, kind, text in found)
                found = [(a, kind, text) for a, (kind, text) in merged.items()]
            parts = []
            for a, kind, text in found:
                tag = opening.get((a, kind))
                if tag is None:
                    tag = opening[a, kind] = f'      <data key="{keys.get("node", a, kind)}"'
                parts.append(f"{tag}>{text}</data>\n" if text else f"{tag} />\n")
            if parts:
                lines.append(f'    <node id="{ids[node]}">\n{"".join(parts)}    </node>\n')
            else:
                lines.append(f'    <node id="{ids[node]}" />\n')
        yield "".join(lines)


def _edge_data(data: Mapping[Any, Any], opening: dict[tuple[Any, type], Any], keys: _Keys) -> str:
    """The ``<data>`` lines of one edge.

    ``opening`` caches, per (name, type): the tag, and for numbers the text of values
    seen before (weights repeat; ``str`` of a float is the costly step). Equal numbers
    of one type have equal text, except 0.0 and -0.0, so zeros are not remembered.
    """
    parts = []
    for a, value in data.items():
        t = type(value)
        hit = opening.get((a, t))
        if hit is None:
            kind = _typed(value)[0]
            tag = f'      <data key="{keys.get("edge", a, kind)}"'
            hit = opening[a, t] = (tag, {} if t in _PLAIN else None)
        seen: dict[Any, str] | None = hit[1]
        if seen is None:
            text = _typed(value)[1]
        elif value in seen:
            text = seen[value]
        else:
            text = str(value)
            if value and len(seen) < _SEEN:
                seen[value] = text
        parts.append(f"{hit[0]}>{text}</data>\n" if text else f"{hit[0]} />\n")
    return "".join(parts)


def _edge_lines(graph: nx.Graph, ids: Mapping[Any, str], keys: _Keys) -> Iterator[str]:
    """``<edge>`` elements in ``graph.edges`` order; multigraph edges carry their key as id."""
    opening: dict[tuple[Any, type], Any] = {}
    lines: list[str] = []
    if graph.is_multigraph():
        for u, v, key, d in graph.edges(keys=True, data=True):
            head = f'    <edge source="{ids[u]}" target="{ids[v]}" id="{_xml_attr(str(key))}"'
            if d:
                lines.append(f"{head}>\n{_edge_data(d, opening, keys)}    </edge>\n")
            else:
                lines.append(f"{head} />\n")
            if len(lines) >= _CHUNK:
                yield "".join(lines)
                lines.clear()
    else:
        for u, v, d in graph.edges(data=True):
            if d:
                lines.append(
                    f'    <edge source="{ids[u]}" target="{ids[v]}">\n'
                    f"{_edge_data(d, opening, keys)}    </edge>\n"
                )
            else:
                lines.append(f'    <edge source="{ids[u]}" target="{ids[v]}" />\n')
            if len(lines) >= _CHUNK:
                yield "".join(lines)
                lines.clear()
    yield "".join(lines)


def _node_ids(graph: nx.Graph) -> dict[Any, str]:
    """Node -> escaped GraphML id (its name as text); distinct names must stay distinct."""
    ids: dict[Any, str] = {}
    owner: dict[str, Any] = {}
    for node in graph:
        text = str(node)
        if _ATTR_WORK.search(text) is not None:
            text = _xml_attr(text)
        other = owner.setdefault(text, node)
        if other is not node:
            raise RolesError(
                f"the nodes {other!r} and {node!r} would get the same id in graph.graphml "
                "(GraphML ids are text, and XML cannot hold control characters, which are "
                "written as U+FFFD). Give them names that differ in printable characters."
            )
        ids[node] = text
    return ids


def _write_graphml(graph: nx.Graph, table: pd.DataFrame, path: Path) -> None:
    """Write ``graph`` with the node table's columns as node attributes, as GraphML.

    The document holds what ``networkx.write_graphml`` writes for a copy of ``graph``
    whose nodes carry the table's columns (numpy scalars unwrapped, NaN and infinities
    left out), in the same layout, key numbering and element order. It is written
    element by element, never held in memory as a tree or a string: the body first, into
    an unnamed temporary file beside ``path`` (key declarations must come first, and
    they are known only at the end), then the keys and the body into ``path``.

    Unlike networkx's writer, characters that XML 1.0 forbids (most C0 controls, lone
    surrogates, U+FFFE, U+FFFF) are written as U+FFFD instead of making the document
    unreadable, and a carriage return in a value is written as ``&#13;`` so that it
    reads back as itself rather than as a newline.

    Raises
    ------
    RolesError
        When two nodes would get the same id (their names differ only in characters
        XML cannot hold, or one is the number and the other the text ``"1"``).
    """
    path = Path(path)
    ids = _node_ids(graph)
    info = dict(graph.graph)
    keys = _Keys(info.pop("node_default", {}) or {}, info.pop("edge_default", {}) or {})
    graph_id = info.pop("id", None)
    edgedefault = "directed" if graph.is_directed() else "undirected"
    head = f'  <graph edgedefault="{edgedefault}"'
    if graph_id is not None:
        head += f' id="{_xml_attr(str(graph_id))}"'
    # Graph attributes take the first key ids but are written after the edges (networkx).
    graph_data = []
    for a, value in info.items():
        kind, text = _typed(value)
        tag = f'    <data key="{keys.get("graph", a, kind)}"'
        graph_data.append(f"{tag}>{text}</data>\n" if text else f"{tag} />\n")
    with tempfile.TemporaryFile("w+", encoding="utf-8", newline="", dir=path.parent) as body:
        empty = True
        for chunk in itertools.chain(
            _node_lines(graph, table, ids, keys), _edge_lines(graph, ids, keys)
        ):
            if chunk:
                body.write(chunk)
                empty = False
        with open(path, "w", encoding="utf-8", newline="") as out:
            out.write(_GRAPHML_HEAD)
            out.writelines(reversed(keys.lines))
            if empty and not graph_data:
                out.write(head + " />\n")
            else:
                out.write(head + ">\n")
                body.seek(0)
                shutil.copyfileobj(body, out, 1 << 20)
                out.writelines(graph_data)
                out.write("  </graph>\n")
            out.write("</graphml>\n")


def _csv_rows(table: pd.DataFrame) -> Iterator[tuple[Any, ...]]:
    """nodes.csv rows: each cell what :func:`json_ready` makes of it, built a column at a
    time (numpy columns in bulk) and a block of rows at a time.

    The cells stay Python values (never pre-formatted text), so
    :func:`roles.io.output.write_csv` makes them safe exactly as before.
    """
    columns = []
    for c in table.columns:
        s = table[c]
        bulk = isinstance(s.dtype, np.dtype) and s.dtype.kind in "fiub"
        columns.append(s.to_numpy() if bulk else list(s))
    for start in range(0, len(table), _CHUNK):
        stop = start + _CHUNK
        block: list[list[Any]] = []
        for values in columns:
            if isinstance(values, np.ndarray):
                part = values[start:stop]
                if part.dtype.kind == "f":
                    cells = part.astype(np.float64, copy=False).tolist()
                    for i in np.flatnonzero(~np.isfinite(part)).tolist():
                        cells[i] = None
                else:
                    cells = part.tolist()
            else:
                cells = [v if type(v) is str else json_ready(v) for v in values[start:stop]]
            block.append(cells)
        yield from zip(*block, strict=True)


def write_report_outputs(
    result: Result,
    folder: Path,
    *,
    title: str,
    kind: str,
    paper: str,
    min_group_size: int,
    made: str,
    pseudonymized: bool = False,
    pdf: bool = True,
) -> None:
    """Write every output of ``roles report`` into ``folder`` (``report.pdf`` only
    when ``pdf``)."""
    from ..report.render import render_report

    folder = Path(folder)
    if result.formal is not None and result.formal.attribute:
        import dataclasses

        from .privacy import hide_small_group_values

        nodes = hide_small_group_values(result.nodes, result.formal.attribute, min_group_size)
        if nodes is not result.nodes:
            result = dataclasses.replace(result, nodes=nodes)
    table = result.nodes
    write_csv(folder / "nodes.csv", list(table.columns), _csv_rows(table))
    write_nodes_xlsx(
        folder / "nodes.xlsx", list(table.columns), _csv_rows(table), community_rows(result)
    )
    summary = dict(result.summary)
    if isinstance(summary.get("formal"), Mapping):
        from .privacy import suppress_small_groups

        summary["formal"] = suppress_small_groups(summary["formal"], min_group_size)
    summary["report"] = {
        "title": title,
        "kind": kind,
        "paper": paper,
        "min_group_size": min_group_size,
        "made": made,
        "pseudonymized": pseudonymized,
    }
    _write_json(folder / "summary.json", summary)
    _write_graphml(result.graph, result.nodes, folder / "graph.graphml")
    render_report(
        result,
        folder,
        title=title,
        kind=kind,
        paper=paper,
        min_group_size=min_group_size,
        made=made,
        pseudonymized=pseudonymized,
        pdf=pdf,
    )


def write_embed_outputs(
    csr: CSRGraph,
    views: Mapping[str, Any],
    folder: Path,
    *,
    config: Config,
    source: Mapping[str, Any],
    keep_walks: bool,
) -> None:
    """Write ``local.csv``, ``far.csv``, ``summary.json`` (and the walks) into ``folder``."""
    from ..embedding.walks import walks_to_names

    folder = Path(folder)
    info: dict[str, Any] = {}
    for name, emb in views.items():
        vectors = np.asarray(emb.vectors)
        header = ["node"] + [f"d{i + 1}" for i in range(vectors.shape[1])]
        rows = [[csr.names[i], *(float(x) for x in vectors[i])] for i in range(csr.n_nodes)]
        write_csv(folder / f"{name}.csv", header, rows)
        if keep_walks:
            with open(folder / f"{name}.walks.tsv", "w", encoding="utf-8", newline="\n") as fh:
                for walk in walks_to_names(emb.walks, csr.names):
                    fh.write("\t".join(walk) + "\n")
        info[name] = {
            "p": emb.p,
            "q": emb.q,
            "walks": emb.n_walks,
            "steps": emb.n_steps,
            "walks_ended_early": emb.n_stopped,
            "untrained_nodes": emb.n_untrained,
        }
    first = next(iter(views.values()))
    _write_json(
        folder / "summary.json",
        {
            "nodes": csr.n_nodes,
            "ties": csr.n_arcs if csr.directed else csr.n_arcs // 2,
            "isolated": {
                "count": first.n_isolated,
                "treatment": "a node without ties gets walks of length one, shares no walk "
                "with another node and so gets a vector of zeros (it stays in the files)",
            },
            "parameters": {**config.as_dict(), "directed": csr.directed},
            "views": info,
            "input": dict(source),
        },
    )
