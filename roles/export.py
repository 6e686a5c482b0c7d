"""Result -> files: nodes.csv, summary.json, graph.graphml, the report, the vectors.

Writers only read what the pipeline computed. CSV cells are made safe to open in a
spreadsheet by :func:`roles.output.write_csv`.
"""

from __future__ import annotations

import json
import math
from collections.abc import Mapping
from pathlib import Path
from typing import Any

import networkx as nx
import numpy as np

from .config import Config
from .graph import CSRGraph
from .output import write_csv
from .pipeline import Result

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


def _graphml(result: Result, path: Path) -> None:
    g = result.graph.copy()
    table = result.nodes.set_index("node")
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
) -> None:
    """Write every output of ``roles report`` into ``folder``."""
    from .report import render_report

    folder = Path(folder)
    table = result.nodes
    rows = [[json_ready(v) for v in row] for row in table.itertuples(index=False)]
    write_csv(folder / "nodes.csv", list(table.columns), rows)
    summary = dict(result.summary)
    summary["report"] = {
        "title": title,
        "kind": kind,
        "paper": paper,
        "min_group_size": min_group_size,
        "made": made,
        "pseudonymized": pseudonymized,
    }
    _write_json(folder / "summary.json", summary)
    _graphml(result, folder / "graph.graphml")
    render_report(
        result,
        folder,
        title=title,
        kind=kind,
        paper=paper,
        min_group_size=min_group_size,
        made=made,
        pseudonymized=pseudonymized,
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
    from .walks import walks_to_names

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
