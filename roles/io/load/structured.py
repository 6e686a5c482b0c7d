"""GraphML and node-link JSON: parsed safely, then read as ties with attributes.

GraphML is parsed with defusedxml and any DTD is refused, so no entity can be expanded
and no external resource fetched (the "billion laughs" and XXE attacks need a DTD).
JSON is networkx's node-link form (``nodes`` with ``id``, and ``edges`` or ``links``).
Both give node names and ties that :func:`_from_parsed` checks and turns into a graph.
"""

from __future__ import annotations

import json
import math
from collections.abc import Iterator
from typing import Any

import defusedxml
import defusedxml.ElementTree as _SafeET
import networkx as nx
from networkx.readwrite.graphml import GraphMLReader

from ...errors import InputError
from ..names import nfc_changes, shown_name, skeleton
from .files import _decode, _refuse_binary_signature, _show
from .ties import (
    _INVISIBLE_NAME,
    _WEIGHT_MAX,
    _WEIGHT_MIN,
    _build_graph,
    _name_problem,
    _too_large,
    _weight_problem,
    _weight_range_problem,
)

__all__: list[str] = []


class _SafeGraphMLReader(GraphMLReader):
    """networkx's GraphML reader on an XML tree parsed by defusedxml, with no DTD allowed."""

    def __call__(self, path: Any = None, string: Any = None) -> Iterator[nx.Graph]:
        self.xml = _SafeET.fromstring(
            string, forbid_dtd=True, forbid_entities=True, forbid_external=True
        )
        keys, defaults = self.find_graphml_keys(self.xml)
        for g in self.xml.findall(f"{{{self.NS_GRAPHML}}}graph"):
            yield self.make_graph(g, keys, defaults)


_Parsed = tuple[list[str], list[tuple[str, str, dict[str, Any]]], bool]


def _parse_graphml(data: bytes, path: str) -> _Parsed:
    """Node names, ties with their attributes, and whether the file declares direction."""
    if not data.strip():
        raise InputError("the file is empty. Give a GraphML file with nodes and edges.", path=path)
    _refuse_binary_signature(data, path)
    try:
        graphs = list(_SafeGraphMLReader(node_type=str)(string=data))
    except defusedxml.DTDForbidden:
        raise InputError(
            "the GraphML file declares a DTD (<!DOCTYPE ...>), which is not read because "
            "it can expand entities or fetch outside files. Delete the DOCTYPE line.",
            path=path,
        ) from None
    except defusedxml.DefusedXmlException:
        raise InputError(
            "the GraphML file declares entities or external references, which are not "
            "read for safety. Remove them.",
            path=path,
        ) from None
    except _SafeET.ParseError as exc:
        line = getattr(exc, "position", (None,))[0]
        raise InputError(
            f"the file is not well-formed XML ({exc}). Export the GraphML again.",
            path=path,
            line=line,
        ) from None
    except Exception as exc:  # networkx raises several types on malformed GraphML
        raise InputError(
            f"the file is XML but not GraphML that can be read ({type(exc).__name__}: "
            f"{_show(str(exc), 200)}). Export it again as GraphML, or as a CSV edge list.",
            path=path,
        ) from None
    if not graphs:
        raise InputError(
            "the file holds no <graph> element in the GraphML namespace. Export it again as "
            "GraphML, or as a CSV edge list.",
            path=path,
        )
    if len(graphs) > 1:
        raise InputError(
            f"the file holds {len(graphs)} graphs; keep only the one to analyse.", path=path
        )
    g = graphs[0]
    names = [str(n) for n in g.nodes()]
    ties = [(str(u), str(v), d) for u, v, d in g.edges(data=True)]
    return names, ties, g.is_directed()


def _json_id(value: Any, where: str, path: str) -> str:
    if isinstance(value, str):
        return value
    if isinstance(value, int) and not isinstance(value, bool):
        return str(value)
    raise InputError(
        f"{where} is {_show(json.dumps(value)[:80])}; node ids must be text or whole numbers.",
        path=path,
    )


def _parse_json(data: bytes, path: str) -> _Parsed:
    """networkx node-link JSON: ``nodes`` with ``id``, and ``edges`` (or older ``links``)."""
    text = _decode(data, path)
    if not text.strip():
        raise InputError("the file is empty. Give a node-link JSON file.", path=path)
    try:
        doc = json.loads(text)
    except json.JSONDecodeError as exc:
        raise InputError(
            f"the file is not valid JSON ({exc.msg}, column {exc.colno}).",
            path=path,
            line=exc.lineno,
        ) from None
    except (ValueError, RecursionError) as exc:
        raise InputError(f"the JSON cannot be read ({_show(str(exc), 200)}).", path=path) from None
    if not isinstance(doc, dict) or "nodes" not in doc:
        raise InputError(
            "the JSON is not a node-link graph: expected an object with 'nodes' and "
            "'edges' (or 'links') lists, as networkx.node_link_data writes.",
            path=path,
        )
    if "edges" in doc and "links" in doc:
        raise InputError("the JSON has both 'edges' and 'links'; keep one.", path=path)
    key = "links" if "links" in doc else "edges"
    nodes, links = doc["nodes"], doc.get(key, [])
    if not isinstance(nodes, list) or not isinstance(links, list):
        raise InputError(f"'nodes' and '{key}' must be lists.", path=path)
    directed = doc.get("directed", False)
    if not isinstance(directed, bool):
        raise InputError("'directed' must be true or false.", path=path)
    seen: dict[str, Any] = {}
    for i, node in enumerate(nodes):
        if not isinstance(node, dict) or "id" not in node:
            raise InputError(f"nodes[{i}] has no 'id'. Every node needs an id.", path=path)
        name = _json_id(node["id"], f"the id of nodes[{i}]", path)
        if name in seen:
            if seen[name] == node["id"]:
                raise InputError(
                    f"nodes[{i}] repeats the id {_show(name)}. List each node once.", path=path
                )
            raise InputError(
                f"nodes[{i}] has the id {_show(json.dumps(node['id']))}, the same name as "
                f"{_show(json.dumps(seen[name]))} once written as text. Give the nodes "
                "different ids.",
                path=path,
            )
        seen[name] = node["id"]
    names = dict.fromkeys(seen)
    ties: list[tuple[str, str, dict[str, Any]]] = []
    for i, link in enumerate(links):
        if not isinstance(link, dict) or "source" not in link or "target" not in link:
            raise InputError(f"{key}[{i}] needs a 'source' and a 'target'.", path=path)
        u = _json_id(link["source"], f"the source of {key}[{i}]", path)
        v = _json_id(link["target"], f"the target of {key}[{i}]", path)
        names[u] = None
        names[v] = None
        ties.append((u, v, link))
    return list(names), ties, directed


def _number(value: Any) -> float:
    """A weight value as float; NaN when it is not a number."""
    if isinstance(value, bool):
        return math.nan
    if isinstance(value, (int, float, str)):
        try:
            return float(value)
        except OverflowError:
            return math.inf
        except ValueError:
            return math.nan
    return math.nan


def _from_parsed(
    parsed: _Parsed, path: str, *, directed: bool, weight: str | None
) -> tuple[nx.Graph, dict[str, int], str | None]:
    names, ties, declared_directed = parsed
    if not declared_directed and directed:
        raise InputError(
            "the file declares an undirected network, but a directed reading was asked "
            "for. Drop the directed option, or export the network as directed.",
            path=path,
        )
    if not names:
        raise InputError("the file holds no nodes. Give a network with ties.", path=path)
    if not ties:
        raise InputError("the file holds nodes but no ties. Give at least one tie.", path=path)
    for n in names:
        if not n.strip():
            raise InputError("a node has an empty name. Give every node a name.", path=path)
        if not skeleton(n):
            raise InputError(_INVISIBLE_NAME.format(shown_name(n)), path=path)
        problem = _name_problem(n)
        if problem:
            raise InputError(
                f"the node name {_show(n)} contains {problem}. Names must be on one line "
                "and free of tabs and control characters.",
                path=path,
            )
    changed = nfc_changes(names)
    if changed:
        names = list(dict.fromkeys(changed.get(n, n) for n in names))
        ties = [(changed.get(a, a), changed.get(b, b), d) for a, b, d in ties]
    has_weight = bool(weight) and any(weight in d for _, _, d in ties)
    if weight and weight != "weight" and not has_weight:
        raise InputError(
            f"no tie has the attribute {weight!r}. Name the tie attribute that holds the weights.",
            path=path,
        )
    edges: dict[tuple[str, str], float] = {}
    rows = loops = merged = 0
    for a, b, d in ties:
        rows += 1
        w = 1.0
        if has_weight:
            if weight not in d:
                raise InputError(
                    f"the tie {_show(a)} - {_show(b)} has no {weight!r} while other ties "
                    "have one. Give every tie a weight, or none.",
                    path=path,
                )
            raw = d[weight]
            w = _number(raw)
            shown = raw if isinstance(raw, str) else json.dumps(raw, default=str)
            if not 0.0 <= w < math.inf:
                problem = _weight_problem(shown, str(weight))
                raise InputError(f"tie {_show(a)} - {_show(b)}: {problem}", path=path)
            if not (w == 0.0 or _WEIGHT_MIN <= w <= _WEIGHT_MAX):
                problem = _weight_range_problem(repr(w), str(weight)) or ""
                raise InputError(f"tie {_show(a)} - {_show(b)}: {problem}", path=path)
        if a == b:
            loops += 1
            continue
        key = (a, b) if directed or a < b else (b, a)
        old = edges.get(key)
        if old is None:
            edges[key] = w
        else:
            edges[key] = old + w
            merged += 1
            if old + w > _WEIGHT_MAX:
                problem = _too_large(f"{old + w:.4g}", str(weight), True)
                raise InputError(f"tie {_show(a)} - {_show(b)}: {problem}", path=path)
    counts = {
        "rows_read": rows,
        "blank_rows_skipped": 0,
        "self_loops_dropped": loops,
        "duplicate_edges_merged": merged,
        "names_trimmed": 0,
        "columns_ignored": 0,
        "names_normalised": len(changed),
    }
    graph = _build_graph(names, edges, directed, counts, path)
    return graph, counts, (weight if has_weight else None)
