"""The jobs behind the command line: files in, one finished output folder out.

Nothing is written until every output is complete (see :mod:`roles.output`).
"""

from __future__ import annotations

import argparse
import logging
from datetime import datetime, timezone
from pathlib import Path
from typing import Any

import networkx as nx

from .config import Config, load_config
from .errors import InputError
from .load import LoadedNetwork, load_edges, load_nodes
from .output import OutputFolder
from .progress import StageBar

__all__ = ["report", "embed", "pseudonymize"]

log = logging.getLogger("roles")


def _load(args: argparse.Namespace) -> LoadedNetwork:
    weight = args.weight_column or None
    return load_edges(
        args.edges,
        directed=args.directed,
        source=args.source_column,
        target=args.target_column,
        weight=weight,
    )


def _source_info(net: LoadedNetwork) -> dict[str, Any]:
    return {
        "file": Path(net.path).name,
        "sha256": net.sha256,
        "format": net.format,
        "counts": dict(net.counts),
    }


def pseudonymize(graph: nx.Graph, prefix: str = "M") -> tuple[nx.Graph, dict[str, str]]:
    """Replace every node name by a code (``M001``...) in sorted-name order.

    The same names give the same codes on every run; the key (code -> name) is
    returned so the caller can write it only when asked to.
    """
    names = sorted(str(n) for n in graph)
    width = max(3, len(str(len(names))))
    codes = {name: f"{prefix}{i + 1:0{width}d}" for i, name in enumerate(names)}
    return nx.relabel_nodes(graph, codes, copy=True), {c: n for n, c in codes.items()}


def _check_key_file(key: Path, inputs: list[Path], out: Path) -> None:
    real = key.resolve()
    if any(real == p.resolve() for p in inputs):
        raise InputError(
            f"--key-file {str(key)!r} is one of the input files; choose a new "
            "file name for the key."
        )
    if real.is_dir():
        raise InputError(f"--key-file {str(key)!r} is a folder; give a file name.")
    if out.resolve() in real.parents:
        raise InputError(
            f"--key-file {str(key)!r} lies inside the output folder; keep the "
            "key apart from the report (for example in another folder)."
        )


def _check_workload(
    args: argparse.Namespace, n_nodes: int, config: Config, *, edges: int | None = None
) -> None:
    """Refuse a run past the work limits before it allocates anything
    (:mod:`roles.workload`); with ``edges``, for the walks the report's budget leaves."""
    from .workload import check_workload

    if edges is not None:
        from .budget import walk_budget

        config = walk_budget(n_nodes, edges, config)[0]
    check_workload(n_nodes, config, insist=bool(getattr(args, "no_work_limit", False)))


def report(args: argparse.Namespace) -> None:
    """``roles report``: load, analyse, write report.pdf/html, nodes.csv, summary.json,
    graph.graphml."""
    from .export import write_report_outputs
    from .pipeline import run

    config = load_config(args.config).with_seed(args.seed)
    if args.min_group_size < 1:
        raise InputError(f"--min-group-size must be 1 or more. Got {args.min_group_size}.")
    if args.key_file and not args.pseudonymize:
        raise InputError(
            "--key-file only makes sense with --pseudonymize; add it or drop --key-file."
        )
    inputs = [Path(args.edges)] + ([Path(args.nodes)] if args.nodes else [])
    out = OutputFolder(args.out, inputs=inputs)  # refuses a bad target before the work
    if args.key_file:
        _check_key_file(Path(args.key_file), inputs, Path(args.out))
    net = _load(args)
    graph = net.graph
    attributes = None
    source = _source_info(net)
    if args.nodes:
        table = load_nodes(args.nodes, net)
        graph = graph.copy()
        graph.add_nodes_from(table.extra_nodes)
        attributes = table.attributes
        source["nodes_file"] = Path(args.nodes).name
        source["nodes_only_in_nodes_file"] = len(table.extra_nodes)
        source["nodes_missing_from_nodes_file"] = len(table.missing_nodes)
    _check_workload(args, graph.number_of_nodes(), config, edges=graph.number_of_edges())
    key = None
    if args.pseudonymize:
        prefix = {"organisation": "P", "supply": "F"}.get(args.kind, "M")
        graph, key = pseudonymize(graph, prefix)
        if attributes is not None:
            back = {v: k for k, v in key.items()}
            attributes = {back[n]: a for n, a in attributes.items() if n in back}
        source["file"] = "(name withheld)"
    bar = StageBar() if not args.quiet else None
    result = run(
        graph,
        config=config,
        attributes=attributes,
        group_by=args.group_by,
        source=source,
        progress=bar,
    )
    if bar:
        bar("writing the report")
    made = datetime.now(timezone.utc).strftime("%Y-%m-%d %H:%M UTC")
    with out as folder:
        write_report_outputs(
            result,
            folder,
            title=args.title or "Network report",
            kind=args.kind,
            paper=args.paper,
            min_group_size=args.min_group_size,
            made=made,
            pseudonymized=bool(args.pseudonymize),
        )
    if key is not None and args.key_file:
        from .output import write_csv

        write_csv(Path(args.key_file), ["code", "name"], sorted(key.items()))
    if bar:
        bar.close()
    log.info("wrote %s", Path(args.out) / "report.pdf")


def embed(args: argparse.Namespace) -> None:
    """``roles embed``: the two views' vectors (and walks) only."""
    from .embed import embed_views
    from .export import write_embed_outputs
    from .graph import to_csr

    config = load_config(args.config).with_seed(args.seed)
    out = OutputFolder(args.out, inputs=[Path(args.edges)])
    net = _load(args)
    if net.graph.number_of_edges() == 0:
        raise InputError("the network has no ties; nothing to embed.", path=str(args.edges))
    _check_workload(args, net.graph.number_of_nodes(), config)
    csr = to_csr(net.graph)
    if not args.quiet:
        log.info("… walks and embedding")
    views = embed_views(csr, config, keep_walks=args.keep_walks)
    with out as folder:
        write_embed_outputs(
            csr, views, folder, config=config, source=_source_info(net), keep_walks=args.keep_walks
        )
    log.info("wrote %s", Path(args.out))
