"""The run recipe: stage seeds, size limits, and the work each view's process does.

:func:`roles.pipeline.run` and the confidence re-runs (:mod:`roles.analysis.confidence`)
both follow it, so a re-run differs from the run only in its seed:

- :class:`~roles.seeds.StageSeeds`: every stage's seed, drawn once from the one user
  seed (in :mod:`roles.seeds`, which every stage may import).
- :func:`budget`: one table of size limits (walk budget, re-runs, randomisations,
  sampled fits, betweenness sources) giving one frozen :class:`Budget` with the notes
  the report prints.
- :func:`view_grouper`: what each view's process does after its embedding (group the
  members with the network's ties, find nearest neighbours); :func:`rerun_groups` is a
  whole re-run of the views with another seed.
"""

from __future__ import annotations

import functools
import time
from collections.abc import Callable, Mapping
from dataclasses import dataclass
from typing import Any

import numpy as np

from .analysis.compare import nearest_neighbours
from .analysis.measures import betweenness_sources
from .config import Config
from .embedding.budget import walk_budget
from .embedding.cluster import Grouping, Ties, cluster, fitted_rows, ties_of
from .embedding.embed import embed_views_then
from .embedding.graph import CSRGraph
from .report.notes import confidence_cut_note, sampled_fit_note
from .seeds import StageSeeds, seed_list

__all__ = [
    "StageSeeds",
    "seed_list",
    "Budget",
    "budget",
    "ViewWork",
    "view_grouper",
    "network_ties",
    "rerun_groups",
    "RERUNS_FULL_NODES",
    "RERUNS_ONE_NODES",
    "STRUCTURE_MAX_TIES",
]

VIEWS = ("local", "far")

# --------------------------------------------------------------------------------------
# Size limits
# --------------------------------------------------------------------------------------

#: Above these sizes the confidence checks are cut back unless [confidence]
#: scale_down = false: one re-run costs as much as the whole embedding (about 16 s at
#: 10,000 members, 24 s at 20,000); the structure test with all 20 randomisations takes
#: 19 s wall at 1,000,000 ties on two threads (compiled swaps and Louvain,
#: benchmarks/bench_confidence.py).
RERUNS_FULL_NODES = 5_000
RERUNS_ONE_NODES = 10_000
STRUCTURE_MAX_TIES = 1_000_000


@dataclass(frozen=True)
class Budget:
    """What one run spends, chosen by the network's size before any work.

    Attributes
    ----------
    config : Config
        The configuration with the walk budget applied (:func:`walk_budget`): epochs
        raised on a small network, window and walks cut on a large one, never a key the
        user set.
    reruns, randomisations : int
        Confidence re-runs with other seeds and structure-test randomisations.
    fitted_rows : int
        Members HDBSCAN is fitted on in each view (all members with ties, or a sample:
        :func:`roles.embedding.cluster.fitted_rows`).
    betweenness_sources : int or None
        Sources of the sampled betweenness, ``None`` for exact betweenness
        (:func:`roles.analysis.measures.betweenness_sources`; the report states the
        estimate's error).
    walk_note, confidence_note, cluster_note : str or None
        What was cut back or raised, for the report; ``None`` when nothing was.
    """

    config: Config
    reruns: int
    randomisations: int
    fitted_rows: int
    betweenness_sources: int | None
    walk_note: str | None
    confidence_note: str | None
    cluster_note: str | None


def _confidence_limits(
    n_tied: int, n_ties: int, runs: int, randomisations: int, scale_down: bool
) -> tuple[int, int, str | None]:
    """Re-runs and randomisations to spend, and a note when fewer than asked."""
    if not scale_down:
        return runs, randomisations, None
    notes = []
    used_runs = runs
    if n_tied > RERUNS_ONE_NODES:
        used_runs = 0
    elif n_tied > RERUNS_FULL_NODES:
        used_runs = min(runs, 1)
    if used_runs < runs:
        notes.append(
            f"{used_runs} of {runs} re-runs with other seeds ({n_tied:,} members with ties; "
            f"all re-runs up to {RERUNS_FULL_NODES:,}, one up to {RERUNS_ONE_NODES:,}, none "
            "beyond)"
        )
    used_rand = randomisations if n_ties <= STRUCTURE_MAX_TIES else 0
    if used_rand < randomisations:
        notes.append(
            f"no structure test ({n_ties:,} ties; it runs up to {STRUCTURE_MAX_TIES:,} ties)"
        )
    if not notes:
        return runs, randomisations, None
    return used_runs, used_rand, confidence_cut_note(notes)


def budget(n_nodes: int, n_tied: int, n_ties: int, config: Config) -> Budget:
    """The size limits of one run, in one place: walk budget, re-runs, randomisations,
    sampled fit and betweenness sources.

    Parameters
    ----------
    n_nodes : int
        Members of the network.
    n_tied : int
        Members with at least one tie (the ones walked, grouped and re-run).
    n_ties : int
        Ties, each counted once.
    config : Config
        The user's configuration; ``confidence.scale_down = false`` spends the full
        confidence budget.

    Returns
    -------
    Budget

    Examples
    --------
    >>> b = budget(50_000, 50_000, 400_000, Config())
    >>> b.reruns, b.randomisations, b.fitted_rows, b.betweenness_sources
    (0, 20, 20000, 1000)
    """
    walked, walk_note = walk_budget(n_nodes, n_ties, config)  # the user's keys are kept
    reruns, randomisations, confidence_note = _confidence_limits(
        n_tied,
        n_ties,
        config.confidence.runs,
        config.confidence.randomisations,
        config.confidence.scale_down,
    )
    rows = fitted_rows(n_tied, config.cluster.fit_limit or None)
    return Budget(
        config=walked,
        reruns=reruns,
        randomisations=randomisations,
        fitted_rows=rows,
        betweenness_sources=betweenness_sources(n_nodes),
        walk_note=walk_note,
        confidence_note=confidence_note,
        cluster_note=sampled_fit_note(rows, n_tied) if 0 < rows < n_tied else None,
    )


# --------------------------------------------------------------------------------------
# The work of each view
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, eq=False)
class ViewWork:
    """What the process of one view hands back besides its vectors."""

    grouping: Grouping
    neighbours: np.ndarray | None
    seconds: dict[str, float]


def _group_view(
    view: str,
    embedding: Any,
    *,
    idx: np.ndarray,
    seeds: Mapping[str, int],
    min_cluster_size: int,
    reduce_to: int,
    fit_limit: int | None,
    k: int,
    ties: Ties | None = None,
) -> ViewWork:
    """Group one view's connected members and find their nearest neighbours.

    Runs in the process that computed the view (:func:`roles.embedding.embed.embed_views_then`).
    """
    x = np.asarray(embedding.vectors)[idx]
    seconds = {}
    start = time.perf_counter()
    grouping = cluster(
        x,
        min_cluster_size=min_cluster_size,
        reduce_to=reduce_to,
        seed=seeds[view],
        fit_limit=fit_limit,
        ties=ties,
    )
    seconds["clustering"] = round(time.perf_counter() - start, 3)
    start = time.perf_counter()
    neighbours = nearest_neighbours(x, k) if k else None
    seconds["neighbours"] = round(time.perf_counter() - start, 3)
    return ViewWork(grouping, neighbours, seconds)


def network_ties(csr: CSRGraph, idx: np.ndarray) -> Ties:
    """The ties among the members ``idx``, read as undirected (as modularity reads them),
    in the form :func:`roles.embedding.cluster.cluster` takes them.

    A directed network's tie in either direction counts once (the larger weight when
    both directions are given).
    """
    if not csr.directed:
        return ties_of(csr.indptr, csr.indices, csr.weights, idx)
    import scipy.sparse as sp

    a = sp.csr_matrix((csr.weights, csr.indices, csr.indptr), shape=(csr.n_nodes,) * 2)
    both = a.maximum(a.T).tocsr()
    both.sort_indices()
    return ties_of(both.indptr, both.indices, both.data, idx)


def view_grouper(
    config: Config, idx: np.ndarray, k: int, ties: Ties | None = None
) -> Callable[[str, Any], ViewWork]:
    """The work each view's process does after its embedding: group the members ``idx``
    with ``config.cluster``, the network's ``ties`` among them (:func:`network_ties`)
    and the clustering seeds of ``config.seed`` (:class:`StageSeeds`), then (when ``k``
    > 0) find each member's ``k`` nearest neighbours.
    """
    return functools.partial(
        _group_view,
        idx=idx,
        seeds=StageSeeds.of(config.seed).view_groups,
        min_cluster_size=config.cluster.min_cluster_size,
        reduce_to=config.cluster.reduce_to,
        fit_limit=config.cluster.fit_limit or None,
        k=k,
        ties=ties,
    )


def rerun_groups(
    csr: CSRGraph, config: Config, idx: np.ndarray, processes: int | None = None
) -> dict[str, np.ndarray]:
    """Both views' group labels over ``idx``, made exactly as the run makes them
    (walks, skip-gram and grouping seeded by ``config.seed``)."""
    group = view_grouper(config, idx, 0, network_ties(csr, idx))
    seeds = StageSeeds.of(config.seed).view_walks
    done = embed_views_then(csr, config, group, seeds=seeds, processes=processes)
    return {view: done[view][1].grouping.labels for view in VIEWS}
