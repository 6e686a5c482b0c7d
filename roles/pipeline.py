"""run(): wires the stages, splits the seed, times each stage.

The stages only read what earlier stages returned; the report reads the
:class:`Result` and never recomputes anything.
"""

from __future__ import annotations

import platform
import time
from collections.abc import Callable, Iterator, Mapping, Sequence
from contextlib import contextmanager
from typing import Any

import networkx as nx
import numpy as np
import pandas as pd

from .analysis.compare import compare_views, neighbour_count
from .analysis.modularity import louvain, modularity
from .config import Config
from .embedding.cluster import Grouping
from .embedding.graph import CSRGraph, to_csr
from .errors import InputError
from .plan import ViewWork, budget, network_ties, view_grouper
from .results import Budgets, Findings, FormalGroups, ModularityCheck, Result, RunRecord
from .seeds import StageSeeds

__all__ = ["Result", "run", "choose_community_view"]

#: Directed walks shorter than this share of the walk length (on average) are too
#: short to group anyone; the views then walk the ties in both directions.
SHORT_WALKS = 0.5

#: The view whose groups become the communities when both views score the same.
COMMUNITY_VIEW = "local"


def choose_community_view(modularity: Mapping[str, float]) -> str:
    """The view whose groups have the higher modularity on this network.

    Neither view wins everywhere. With the groups chosen with the network's ties
    (:func:`roles.embedding.cluster.cluster`) and the training of networks of 300 to
    2,727 members raised (:mod:`roles.embedding.budget`), mean NMI on LFR graphs of 1,000
    members, mixing 0.1-0.5 (benchmarks/bench_groups.py, graphs 1-3, 2026-12-04
    evening): local 0.999 / 0.991 / 0.957 / 0.698 / 0.275, far 0.999 / 0.990 / 0.956 /
    0.685 / 0.274, the view of higher modularity 0.999 / 0.990 / 0.958 / 0.696 / 0.275:
    ahead of both at mixing 0.3, within 0.002 of the better view elsewhere. Modularity
    (Newman 2006) measured on the network itself decides per run; a view that found no
    groups never wins.
    """
    scores = {v: (m if np.isfinite(m) else -np.inf) for v, m in modularity.items()}
    best = max(scores.values())
    if scores.get(COMMUNITY_VIEW, -np.inf) == best:
        return COMMUNITY_VIEW
    return max(scores, key=lambda v: scores[v])


Progress = Callable[[str], None]


class _Timer:
    def __init__(self, progress: Progress | None) -> None:
        self.timings: dict[str, float] = {}
        self._progress = progress

    @contextmanager
    def stage(self, name: str) -> Iterator[None]:
        if self._progress:
            self._progress(name)
        start = time.perf_counter()
        try:
            yield
        finally:
            self.timings[name] = round(time.perf_counter() - start, 3)


def _versions() -> dict[str, str]:
    from importlib.metadata import PackageNotFoundError, version

    from ._version import __version__

    # The running code's own version (the distribution, roles-network-report, reads it
    # from the same place), then the libraries that shape the results.
    out = {"python": platform.python_version(), "roles": __version__}
    for pkg in (
        "numpy",
        "networkx",
        "gensim",
        "scikit-learn",
        "hdbscan",
        "numba",
        "pandas",
        "jinja2",
        "weasyprint",
        "matplotlib",
    ):
        try:
            out[pkg] = version(pkg)
        except PackageNotFoundError:
            out[pkg] = "not installed"
    return out


def _neighbour_lists(work: Mapping[str, ViewWork]) -> tuple[np.ndarray, np.ndarray]:
    local, far = work["local"].neighbours, work["far"].neighbours
    assert local is not None and far is not None  # searched whenever k > 0
    return local, far


def _trial_steps(csr: Any, config: Config, seed: int) -> float:
    """Fewest steps, on average over one walk per member, of either view's walks."""
    from .embedding.walks import generate_walks, walk_lengths

    steps = []
    for i, view in enumerate(config.views.values()):
        walks = generate_walks(
            csr,
            walks_per_node=1,
            walk_length=config.walks.walk_length,
            p=view.p,
            q=view.q,
            seed=int(np.random.SeedSequence([seed, i]).generate_state(1)[0]),
        )
        steps.append(float(np.maximum(walk_lengths(walks) - 1, 0).mean()))
    return min(steps)


def _check_inputs(
    graph: nx.Graph, attributes: Mapping[str, Mapping[str, str]] | None, group_by: str | None
) -> None:
    """Refuse, before any work, a network with nothing to group or a missing group column."""
    if graph.number_of_nodes() == 0:
        raise InputError("the network has no nodes; give an edge list with at least one tie.")
    if graph.number_of_edges() == 0:
        raise InputError(
            "the network has no ties between different members; nothing can be grouped. "
            "Check that the edge list has rows below its header."
        )
    if group_by is not None:
        columns = {c for attrs in (attributes or {}).values() for c in attrs}
        if group_by not in columns:
            known = ", ".join(sorted(columns)) or "none: give a nodes file with --nodes"
            raise InputError(
                f"there is no attribute column {group_by!r} to group by. "
                f"Columns of the nodes file: {known}."
            )
        if not any(str(a.get(group_by, "")).strip() for a in (attributes or {}).values()):
            raise InputError(
                f"the column {group_by!r} is blank for every member, so there are no formal "
                "groups to compare with the communities. Fill it in, or choose another column."
            )


def _walked_ties(
    csr: CSRGraph, tie_csr: CSRGraph, config: Config, seed: int
) -> tuple[CSRGraph, str]:
    """The ties the views walk, and how the report describes them.

    Walks in a supply network run downstream and stop at the last tier, which leaves too
    little context to group anyone: then the views walk the ties both ways (dependents
    still follow the direction). One trial walk per member and view tells, before any
    training is spent.
    """
    if not csr.directed:
        return csr, "ties"
    steps = _trial_steps(csr, config, seed)
    if steps >= SHORT_WALKS * (config.walks.walk_length - 1):
        return csr, "ties followed in their direction"
    return tie_csr, (
        f"ties in both directions: walks that followed the direction ended "
        f"after {steps:.1f} of {config.walks.walk_length - 1} steps on average "
        "(one trial walk per member and view)"
    )


def run(
    graph: nx.Graph,
    *,
    config: Config | None = None,
    attributes: Mapping[str, Mapping[str, str]] | None = None,
    group_by: str | None = None,
    source: Mapping[str, Any] | None = None,
    progress: Progress | None = None,
    remove: Sequence[Any] | None = None,
) -> Result:
    """Analyse ``graph``: two node2vec views, their groups, roles and agreement.

    Parameters
    ----------
    graph : networkx.Graph or networkx.DiGraph
        Node names are used as given (converted with ``str``). Edge attribute
        ``weight`` is the tie strength (missing means 1). Directed graphs are read
        as supplier -> customer for the dependents figure.
    config : Config, optional
        Parameters; the defaults of :class:`~roles.config.Config` when omitted.
    attributes : mapping, optional
        Node name -> {column: value}, copied into the node table.
    group_by : str, optional
        An attribute column holding formal groups (departments, tiers) to compare
        with the communities found.
    source : mapping, optional
        What the graph was read from (``file``, ``sha256``, ``format``, ``counts``),
        echoed in the summary.
    progress : callable, optional
        Called with each stage's name as it starts.
    remove : sequence, optional
        Members to remove together in the one removal scenario; without it, the
        default scenarios of :func:`roles.analysis.whatif.assess`.

    Returns
    -------
    Result

    Examples
    --------
    >>> import networkx as nx
    >>> from roles import run
    >>> result = run(nx.karate_club_graph())   # doctest: +SKIP
    >>> result.summary["communities"]           # doctest: +SKIP
    2
    """
    from .analysis.findings import roles_withheld, single_points
    from .analysis.measures import rank_bridges, rank_hubs, rank_traffic, role_table
    from .embedding.embed import embed_views_then

    config = config or Config()
    _check_inputs(graph, attributes, group_by)
    if not all(isinstance(node, str) for node in graph):
        graph = nx.relabel_nodes(graph, {n: str(n) for n in graph}, copy=True)
    if remove:
        from .analysis.whatif import check_members

        remove = check_members(graph, [str(v) for v in remove])  # before any work
    seeds = StageSeeds.of(config.seed)
    timer = _Timer(progress)
    names = [str(n) for n in graph.nodes()]
    n = len(names)

    with timer.stage("graph"):
        csr = to_csr(graph)
        degree = csr.out_degree() + (np.bincount(csr.indices, minlength=n) if csr.directed else 0)
        connected = np.asarray(degree > 0)
        isolated = [names[i] for i in np.flatnonzero(~connected)]

    idx = np.flatnonzero(connected)
    spend = budget(n, len(idx), graph.number_of_edges(), config)
    config = spend.config
    k = neighbour_count(len(idx)) if len(idx) >= 3 else 0
    # Modularity reads ties as undirected (Newman 2006), as the walks do when they go
    # both ways.
    tie_csr = csr if not csr.directed else to_csr(graph.to_undirected(as_view=True))
    with timer.stage("walks, embedding and clustering"):
        walk_csr, walk_basis = _walked_ties(csr, tie_csr, config, seeds.trial_walks)
        # The groups are chosen with the ties the walks followed, read as undirected
        # (roles.embedding.cluster); the confidence re-runs do the same.
        group_view = view_grouper(config, idx, k, network_ties(walk_csr, idx))
        views = embed_views_then(walk_csr, config, group_view, seeds=seeds.view_walks)
    vectors = {view: np.asarray(e.vectors) for view, (e, _) in views.items()}
    work: dict[str, ViewWork] = {view: w for view, (_, w) in views.items()}
    groupings: dict[str, Grouping] = {view: w.grouping for view, w in work.items()}

    # Group labels per node: 1-based by size; 0 for members with no ties.
    def full(labels: np.ndarray) -> np.ndarray:
        out = np.zeros(n, dtype=np.int64)
        out[idx] = labels + 1
        return out

    view_labels = {view: full(g.labels) for view, g in groupings.items()}
    view_modularity = {
        view: modularity(tie_csr, labels) if groupings[view].n_groups > 0 else float("nan")
        for view, labels in view_labels.items()
    }
    community_view = choose_community_view(view_modularity)
    membership = np.zeros(n)
    membership[idx] = groupings[community_view].membership
    communities = view_labels[community_view]
    community_of = dict(zip(names, communities.tolist(), strict=True))

    with timer.stage("roles and measures"):
        table = role_table(graph, community_of, seed=seeds.roles, samples=spend.betweenness_sources)

    with timer.stage("comparison"):
        comparison = None
        overlap = np.full(n, np.nan)
        if k:
            comparison = compare_views(
                vectors["local"][idx],
                vectors["far"][idx],
                groupings["local"].labels,
                groupings["far"].labels,
                k=k,
                neighbours=_neighbour_lists(work),
            )
            overlap[idx] = comparison.overlap

    confidence = None
    if spend.reruns > 0 or spend.randomisations > 0:
        from .analysis.confidence import assess

        with timer.stage("confidence"):
            confidence = assess(
                graph,
                walk_csr,
                config,
                community_of,
                community_view,
                view_labels["local"],
                view_labels["far"],
                runs=spend.reruns,
                randomisations=spend.randomisations,
                seed=seeds.confidence,
            )

    with timer.stage("modularity check"):
        louvain_labels = louvain(tie_csr, seed=seeds.louvain)
        from sklearn.metrics import normalized_mutual_info_score

        louvain_nmi = float(normalized_mutual_info_score(louvain_labels[idx], communities[idx]))
        q_found = modularity(tie_csr, communities)
        q_louvain = modularity(tie_csr, louvain_labels)
        louvain_groups = len(np.unique(louvain_labels[idx]))

    nodes = pd.DataFrame({"node": names})
    nodes["community"] = communities
    nodes["local_group"] = view_labels["local"]
    nodes["far_group"] = view_labels["far"]
    nodes["membership"] = np.round(membership, 4)
    for col in (
        "role",
        "betweenness",
        "participation",
        "within_z",
        "constraint",
        "effective_size",
        "dependents",
        "region",
    ):
        # An object Index, not the list: pandas would copy a list of names into a
        # fixed-width array as wide as the longest name for every column.
        nodes[col] = table.loc[pd.Index(names, dtype=object), col].to_numpy()
    nodes.loc[~connected, "role"] = "no ties"
    nodes["view_agreement"] = np.round(overlap, 4)
    if confidence is not None:
        nodes["confidence"] = np.round(confidence.node_confidence, 4)
    nodes["degree"] = degree
    if attributes:
        cols: list[str] = []
        for attrs in attributes.values():
            cols.extend(c for c in attrs if c not in cols)
        for col in cols:
            if col in nodes.columns:
                continue
            nodes[col] = [attributes.get(name, {}).get(col, "") for name in names]

    formal = None
    if group_by:
        from .analysis.formal import brokerage, crosstab, ei_index, ei_test, formal_nmi

        # Members with no value in the column belong to no formal group.
        groups = {
            name: str(value)
            for name, value in zip(names, nodes[group_by], strict=True)
            if str(value).strip() != ""
        }
        tied = {k: c for k, c in community_of.items() if c > 0}  # members with ties
        with timer.stage("formal groups"):
            brk = brokerage(graph, groups)
            for col in brk.columns:
                nodes[col] = brk.loc[pd.Index(names, dtype=object), col].to_numpy()
            formal = FormalGroups(
                attribute=group_by,
                nmi=formal_nmi(groups, tied),
                ei_index=ei_index(graph, groups),
                # 999 label permutations, fewer on large networks (at least 99, the
                # fewest that can reach p = 0.01): about 2e7 tie visits in all.
                ei_test=ei_test(
                    graph,
                    groups,
                    permutations=min(999, max(99, 20_000_000 // max(graph.number_of_edges(), 1))),
                    seed=config.seed,
                ),
                crosstab=crosstab(groups, tied),
            )

    grouped = groupings[community_view].n_groups > 0
    withheld = roles_withheld(grouped, confidence.structure if confidence is not None else None)
    bridges = [] if withheld else rank_bridges(table)
    hubs = [] if withheld else rank_hubs(table)
    if withheld:
        # Hub-like and bridge-like are read against the communities: not findings here.
        nodes.loc[nodes.role.isin(["hub-like", "bridge-like", "connector hub"]), "role"] = "member"
    traffic = rank_traffic(table)
    with timer.stage("what if"):
        from .analysis.whatif import assess as what_if

        scenarios = what_if(
            graph,
            communities=community_of if groupings[community_view].n_groups > 0 else None,
            betweenness=dict(zip(names, nodes["betweenness"], strict=True)),
            dependents=dict(zip(names, nodes["dependents"], strict=True)),
            bridges=bridges,
            remove=remove,
            seed=seeds.what_if,
        )
    spof = single_points(graph, nodes)
    customers = None
    if graph.is_directed():
        from .analysis.customers import final_customers

        customers = final_customers(graph, [d.node for d in spof])
    findings = Findings(
        nodes=n,
        edges=graph.number_of_edges(),
        directed=graph.is_directed(),
        isolated=isolated,
        communities=int(communities.max()),
        grouped=grouped,
        community_view=community_view,
        walks_over=walk_basis,
        view_modularity=view_modularity,
        bridges=[str(b) for b in bridges],
        hubs=[str(h) for h in hubs],
        roles_withheld=withheld,
        traffic=[str(v) for v in traffic],
        single_points=spof,
        modularity=ModularityCheck(
            communities=q_found,
            louvain=q_louvain,
            louvain_groups=louvain_groups,
            nmi_with_louvain=louvain_nmi,
        ),
        betweenness=table.attrs.get("betweenness"),
    )
    record = RunRecord(
        config=config,
        input=dict(source or {}),
        versions=_versions(),
        timings=timer.timings,
        view_timings={view: w.seconds for view, w in work.items()},
    )
    return Result(
        nodes=nodes,
        graph=graph,
        vectors=vectors,
        groupings=groupings,
        comparison=comparison,
        findings=findings,
        budgets=Budgets(
            confidence=spend.confidence_note, walk=spend.walk_note, cluster=spend.cluster_note
        ),
        record=record,
        what_if=scenarios,
        confidence=confidence,
        formal=formal,
        final_customers=customers,
    )
