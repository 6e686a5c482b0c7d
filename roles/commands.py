"""The jobs behind the command line: files in, one finished output folder out.

Nothing is written until every output is complete (see :mod:`roles.io.output`).
"""

from __future__ import annotations

import argparse
import logging
from datetime import UTC, datetime
from pathlib import Path
from typing import Any

import networkx as nx

from .config import Config, load_config
from .errors import InputError
from .io.load import LoadedNetwork, check_group_column, load_edges, load_nodes
from .io.names import shown_name
from .io.output import OutputFolder
from .io.privacy import WITHHELD, PseudonymKey, check_key_path, codes_for, write_key
from .progress import StageBar
from .report.pdfengine import check_pdf_engine

__all__ = ["report", "embed", "compare"]

log = logging.getLogger("roles")

#: What ``roles report`` writes, checked against the output folder before the work.
REPORT_FILES = (
    "report.pdf",
    "report.html",
    "nodes.csv",
    "nodes.xlsx",
    "summary.json",
    "graph.graphml",
)
COMPARE_FILES = ("report.pdf", "report.html", "changes.json", "old", "new")


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
    info = {
        "file": Path(net.path).name,
        "sha256": net.sha256,
        "format": net.format,
        "counts": dict(net.counts),
    }
    if net.lookalikes:
        info["lookalike_example"] = [shown_name(n) for n in net.lookalikes[0]]
    return info


_PREFIX = {"organisation": "P", "supply": "F"}


def _key_inputs(args: argparse.Namespace, inputs: list[Path]) -> list[Path]:
    """Every file the run reads, which the key file must never overwrite."""
    extra = [getattr(args, "config", None), getattr(args, "remove_file", None)]
    return inputs + [Path(p) for p in extra if p]


def _key(args: argparse.Namespace, inputs: list[Path]) -> PseudonymKey | None:
    """The pseudonym key (read back from ``--key-file`` when it exists), checked before
    any analysis; ``None`` without ``--pseudonymize``."""
    if not args.pseudonymize:
        return None
    if not args.key_file:
        return PseudonymKey.new()  # codes of this run only: the key is not kept
    return check_key_path(Path(args.key_file), _key_inputs(args, inputs), Path(args.out))


def _coded(
    graph: nx.Graph,
    attributes: dict[str, Any] | None,
    source: dict[str, Any],
    key: PseudonymKey,
    prefix: str,
) -> tuple[nx.Graph, dict[str, Any] | None, dict[str, Any], dict[str, str]]:
    """Graph, attributes and source record with every name replaced by its code."""
    from .io.privacy import pseudonymize, pseudonymize_attributes

    graph, codes = pseudonymize(graph, key, prefix)
    if attributes is not None:
        attributes, codes, _ = pseudonymize_attributes(attributes, codes, key, prefix)
    source = {**source, "file": WITHHELD}
    if "nodes_file" in source:
        source["nodes_file"] = WITHHELD
    source.pop("lookalike_example", None)  # names, which the codes replace
    source.pop("nodes_lookalike_example", None)
    return graph, attributes, source, codes


def _removed_members(args: argparse.Namespace, graph: nx.Graph) -> list[Any]:
    """The members of ``--remove`` and ``--remove-file``, checked against the network."""
    from .analysis.whatif import check_members
    from .io.namelist import read_names

    names = list(getattr(args, "remove", None) or [])
    option = "--remove"
    if getattr(args, "remove_file", None):
        names += read_names(args.remove_file)
        option = "--remove/--remove-file" if args.remove else "--remove-file"
    return check_members(graph, names, option=option) if names else []


def _check_workload(
    args: argparse.Namespace, n_nodes: int, config: Config, *, edges: int | None = None
) -> None:
    """Refuse a run past the work limits before it allocates anything
    (:mod:`roles.workload`); with ``edges``, for the walks the report's budget leaves."""
    from .workload import check_workload

    if edges is not None:
        from .embedding.budget import walk_budget

        config = walk_budget(n_nodes, edges, config)[0]
    check_workload(n_nodes, config, insist=bool(getattr(args, "no_work_limit", False)))


def _before_work(
    args: argparse.Namespace, inputs: list[Path], *, command: str, expected: tuple[str, ...]
) -> tuple[OutputFolder, PseudonymKey | None]:
    """The checks of ``report`` and ``compare`` that come before any analysis: the PDF
    engine, the output folder (see :mod:`roles.io.output`) and the key file."""
    if not args.no_pdf:
        check_pdf_engine()  # stop now rather than after the analysis
    out = OutputFolder(
        args.out,
        inputs=inputs + ([Path(args.config)] if args.config else []),
        command=command,
        expected=expected,
    )
    return out, _key(args, inputs)


def report(args: argparse.Namespace) -> None:
    """``roles report``: load, analyse, write report.pdf/html, nodes.csv, summary.json,
    graph.graphml."""
    from .io.export import write_report_outputs
    from .pipeline import run

    config = load_config(args.config).with_seed(args.seed)
    if args.min_group_size < 1:
        raise InputError(f"--min-group-size must be 1 or more. Got {args.min_group_size}.")
    inputs = [Path(args.edges)] + ([Path(args.nodes)] if args.nodes else [])
    out, key = _before_work(args, inputs, command="report", expected=REPORT_FILES)
    net = _load(args)
    graph = net.graph
    attributes = None
    source = _source_info(net)
    table = load_nodes(args.nodes, net) if args.nodes else None
    if args.group_by:
        check_group_column(table, args.group_by)  # before the analysis, not after it
    if table is not None:
        graph = graph.copy()
        graph.add_nodes_from(table.extra_nodes)
        attributes = table.attributes
        source["nodes_file"] = Path(args.nodes).name
        source["nodes_only_in_nodes_file"] = len(table.extra_nodes)
        source["nodes_missing_from_nodes_file"] = len(table.missing_nodes)
        source["nodes_lookalike_names"] = table.counts["lookalike_names"]
        if table.lookalikes:
            source["nodes_lookalike_example"] = [shown_name(n) for n in table.lookalikes[0]]
    remove = _removed_members(args, graph)  # unknown names stop the run before any work
    _check_workload(args, graph.number_of_nodes(), config, edges=graph.number_of_edges())
    codes: dict[str, str] = {}
    if key is not None:
        graph, attributes, source, codes = _coded(
            graph, attributes, source, key, _PREFIX.get(args.kind, "M")
        )
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
            # Inside the block: a key that cannot be written leaves no report behind.
            write_key(Path(args.key_file), key, codes)
    if bar:
        bar.close()
    log.info("wrote %s", Path(args.out) / ("report.html" if args.no_pdf else "report.pdf"))


def embed(args: argparse.Namespace) -> None:
    """``roles embed``: the two views' vectors (and walks) only."""
    from .embedding.embed import embed_views
    from .embedding.graph import to_csr
    from .io.export import write_embed_outputs

    config = load_config(args.config).with_seed(args.seed)
    walks = [f"{view}.walks.tsv" for view in ("local", "far")] if args.keep_walks else []
    out = OutputFolder(
        args.out,
        inputs=[Path(args.edges)] + ([Path(args.config)] if args.config else []),
        command="embed",
        expected=["local.csv", "far.csv", "summary.json", *walks],
    )
    inputs = [Path(args.edges)]
    key = _key(args, inputs)
    net = _load(args)
    if net.graph.number_of_edges() == 0:
        raise InputError("the network has no ties; nothing to embed.", path=str(args.edges))
    _check_workload(args, net.graph.number_of_nodes(), config)
    graph, source = net.graph, _source_info(net)
    codes: dict[str, str] = {}
    if key is not None:
        graph, _, source, codes = _coded(graph, None, source, key, "M")
    csr = to_csr(graph)
    if not args.quiet:
        log.info("… walks and embedding")
    views = embed_views(csr, config, keep_walks=args.keep_walks)
    with out as folder:
        write_embed_outputs(
            csr, views, folder, config=config, source=source, keep_walks=args.keep_walks
        )
        if key is not None and args.key_file:
            write_key(Path(args.key_file), key, codes)
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
    from .analysis.snapshots import compare_results
    from .io.export import _write_json, write_report_outputs
    from .pipeline import run
    from .report.changes import build_change_context, render_changes

    config = load_config(args.config).with_seed(args.seed)
    if args.min_group_size < 1:
        raise InputError(f"--min-group-size must be 1 or more. Got {args.min_group_size}.")
    nodes = list(args.nodes or [])
    if len(nodes) > 2:
        raise InputError(
            "--nodes takes one file for both snapshots, or two (the first for OLD, the "
            f"second for NEW). Got {len(nodes)}."
        )
    node_files = nodes * 2 if len(nodes) == 1 else nodes or [None, None]
    inputs = [Path(args.old), Path(args.new)] + [Path(n) for n in nodes]
    out, key = _before_work(args, inputs, command="compare", expected=COMPARE_FILES)
    snaps = [_snapshot(e, n, args) for e, n in zip((args.old, args.new), node_files, strict=True)]
    union = nx.Graph()
    for g, _, _ in snaps:
        union.add_nodes_from(g)
    # One removal scenario for both snapshots; a name must be in at least one of them.
    remove = [str(v) for v in _removed_members(args, union)]
    for g, _, _ in snaps:
        _check_workload(args, g.number_of_nodes(), config, edges=g.number_of_edges())
    codes: dict[str, str] = {}
    if key is not None:
        # One key and one set of codes for both snapshots: a member keeps its code.
        prefix = _PREFIX.get(args.kind, "M")
        union_codes = codes_for((str(n) for n in union), key, prefix)
        key = PseudonymKey(key.secret, {**key.known, **{c: n for n, c in union_codes.items()}})
        coded = [_coded(g, attrs, src, key, prefix) for g, attrs, src in snaps]
        snaps = [(g, attrs, src) for g, attrs, src, _ in coded]
        codes = {n: c for *_, part in coded for n, c in part.items()}
        remove = [codes[n] for n in remove]
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
            inputs=(names[0], names[1]),
            pseudonymized=bool(args.pseudonymize),
        )
        render_changes(folder, context, pdf=not args.no_pdf)
        if key is not None and args.key_file:
            write_key(Path(args.key_file), key, codes)
    if bar:
        bar.close()
    log.info("wrote %s", Path(args.out) / ("report.html" if args.no_pdf else "report.pdf"))
