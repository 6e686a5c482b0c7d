"""The jobs behind the command line: files in, one finished output folder out.

Nothing is written until every output is complete (see :mod:`roles.output`).
"""

from __future__ import annotations

import argparse
import logging
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

import networkx as nx

from .config import load_config
from .errors import InputError
from .load import LoadedNetwork, load_edges, load_nodes
from .output import OutputFolder
from .pdfengine import check_pdf_engine
from .progress import StageBar

__all__ = ["report", "embed", "compare", "pseudonymize"]

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


def _removed_members(args: argparse.Namespace, graph: nx.Graph) -> list[Any]:
    """The members of ``--remove`` and ``--remove-file``, checked against the network."""
    from .namelist import read_names
    from .whatif import check_members

    names = list(getattr(args, "remove", None) or [])
    option = "--remove"
    if getattr(args, "remove_file", None):
        names += read_names(args.remove_file)
        option = "--remove/--remove-file" if args.remove else "--remove-file"
    return check_members(graph, names, option=option) if names else []


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
    if not args.no_pdf:
        check_pdf_engine()  # stop now rather than after the analysis
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
    remove = _removed_members(args, graph)  # unknown names stop the run before any work
    key = None
    if args.pseudonymize:
        prefix = {"organisation": "P", "supply": "F"}.get(args.kind, "M")
        graph, key = pseudonymize(graph, prefix)
        if attributes is not None:
            back = {v: k for k, v in key.items()}
            attributes = {back[n]: a for n, a in attributes.items() if n in back}
        source["file"] = "(name withheld)"
        if remove:
            codes = {name: code for code, name in key.items()}
            remove = [codes[str(v)] for v in remove]
    bar = StageBar() if not args.quiet else None
    result = run(
        graph,
        config=config,
        attributes=attributes,
        group_by=args.group_by,
        source=source,
        progress=bar,
        remove=remove,
    )
    if bar:
        bar("writing the report")
    made = datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")
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
            pdf=not args.no_pdf,
        )
    if key is not None and args.key_file:
        from .output import write_csv

        write_csv(Path(args.key_file), ["code", "name"], sorted(key.items()))
    if bar:
        bar.close()
    log.info("wrote %s", Path(args.out) / ("report.html" if args.no_pdf else "report.pdf"))


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
    csr = to_csr(net.graph)
    if not args.quiet:
        log.info("… walks and embedding")
    views = embed_views(csr, config, keep_walks=args.keep_walks)
    with out as folder:
        write_embed_outputs(
            csr, views, folder, config=config, source=_source_info(net), keep_walks=args.keep_walks
        )
    log.info("wrote %s", Path(args.out))


def _snapshot(
    edges: str, nodes: str | None, args: argparse.Namespace
) -> tuple[nx.Graph, dict[str, Any] | None, dict[str, Any]]:
    """One snapshot of ``roles compare``: its graph, attributes and source record."""
    net = load_edges(
        edges,
        directed=args.directed,
        source=args.source_column,
        target=args.target_column,
        weight=args.weight_column or None,
    )
    graph, attributes, source = net.graph, None, _source_info(net)
    if nodes:
        table = load_nodes(nodes, net)
        graph = graph.copy()
        graph.add_nodes_from(table.extra_nodes)
        attributes = dict(table.attributes)
        source["nodes_file"] = Path(nodes).name
    return graph, attributes, source


def compare(args: argparse.Namespace) -> None:
    """``roles compare``: analyse two snapshots alike and report what changed."""
    from .export import _write_json, write_report_outputs
    from .pipeline import run
    from .report.changes import build_change_context, render_changes
    from .snapshots import compare_results

    config = load_config(args.config).with_seed(args.seed)
    if args.min_group_size < 1:
        raise InputError(f"--min-group-size must be 1 or more. Got {args.min_group_size}.")
    nodes = list(args.nodes or [])
    if len(nodes) > 2:
        raise InputError(
            "--nodes takes one file for both snapshots, or two (the first for OLD, the "
            f"second for NEW). Got {len(nodes)}."
        )
    if args.key_file and not args.pseudonymize:
        raise InputError(
            "--key-file only makes sense with --pseudonymize; add it or drop --key-file."
        )
    if not args.no_pdf:
        check_pdf_engine()  # stop now rather than after the analysis
    node_files = nodes * 2 if len(nodes) == 1 else nodes or [None, None]
    inputs = [Path(args.old), Path(args.new)] + [Path(n) for n in nodes]
    out = OutputFolder(args.out, inputs=inputs)
    if args.key_file:
        _check_key_file(Path(args.key_file), inputs, Path(args.out))
    snaps = [_snapshot(e, n, args) for e, n in zip((args.old, args.new), node_files, strict=True)]
    union = nx.Graph()
    for g, _, _ in snaps:
        union.add_nodes_from(g)
    # One removal scenario for both snapshots; a name must be in at least one of them.
    remove = [str(v) for v in _removed_members(args, union)]
    key = None
    if args.pseudonymize:
        # One key for both snapshots, so that a member keeps its code across them.
        prefix = {"organisation": "P", "supply": "F"}.get(args.kind, "M")
        _, key = pseudonymize(union, prefix)
        codes = {name: code for code, name in key.items()}
        remove = [codes[n] for n in remove]
        snaps = [
            (
                nx.relabel_nodes(g, codes, copy=True),
                {codes[n]: a for n, a in attrs.items() if n in codes} if attrs else None,
                {
                    **src,
                    "file": "(name withheld)",
                    **({"nodes_file": "(name withheld)"} if "nodes_file" in src else {}),
                },
            )
            for g, attrs, src in snaps
        ]
    bar = StageBar() if not args.quiet else None
    results = []
    for label, (graph, attributes, source) in zip(("before", "after"), snaps, strict=True):
        if bar:
            bar(f"analysing the snapshot {label}")
        results.append(
            run(
                graph,
                config=config,
                attributes=attributes,
                group_by=args.group_by,
                source=source,
                remove=[n for n in remove if n in graph],
            )
        )
    old, new = results
    changes = compare_results(old, new)
    title = args.title or "What changed"
    made = datetime.now(UTC).strftime("%Y-%m-%d %H:%M UTC")
    if bar:
        bar("writing the reports")
    with out as folder:
        for sub, result, label in (("old", old, "before"), ("new", new, "after")):
            (folder / sub).mkdir()
            write_report_outputs(
                result,
                folder / sub,
                title=f"{title}: {label}",
                kind=args.kind,
                paper=args.paper,
                min_group_size=args.min_group_size,
                made=made,
                pseudonymized=bool(args.pseudonymize),
                pdf=not args.no_pdf,
            )
        names = tuple(str(s[2]["file"]) for s in snaps)
        record = changes.as_dict()
        record["input"] = {
            "old": {"file": names[0], "sha256": snaps[0][2]["sha256"]},
            "new": {"file": names[1], "sha256": snaps[1][2]["sha256"]},
        }
        record["parameters"] = new.summary["parameters"]
        _write_json(folder / "changes.json", record)
        context = build_change_context(
            changes,
            old,
            new,
            title=title,
            kind=args.kind,
            paper=args.paper,
            min_group_size=args.min_group_size,
            made=made,
            group_by=args.group_by,
            inputs=(names[0], names[1]),
            pseudonymized=bool(args.pseudonymize),
        )
        render_changes(folder, context, pdf=not args.no_pdf)
    if key is not None and args.key_file:
        from .output import write_csv

        write_csv(Path(args.key_file), ["code", "name"], sorted(key.items()))
    if bar:
        bar.close()
    log.info("wrote %s", Path(args.out) / ("report.html" if args.no_pdf else "report.pdf"))
