"""How far the groups can be trusted: a structure test and a seed-stability check.

Two questions a reader of the report asks before acting on a group:

1. **Does the network have community structure at all?** Even random graphs show high
   modularity by chance [1]_. :func:`structure_test` compares the best modularity an
   optimiser (Louvain [2]_, compiled in :mod:`roles.analysis.modularity`) finds on the network
   with the best the same optimiser finds on degree-preserving randomisations of it
   (double edge swaps [3]_, compiled in :mod:`roles.analysis.swaps`), as Guimera, Sales-Pardo &
   Amaral do [1]_, and asks whether the network holds clearly more modular partitions
   than the randomised networks do.
2. **Would the groups come back with another seed?** :func:`stability` re-runs the
   embedding and the clustering with other seeds and measures, for every node, how much
   of its set of co-members returns (Jaccard index [4]_), and for every community the
   Jaccard index of its best match in each re-run (cluster-wise stability [5]_).

:func:`assess` runs both for the pipeline and returns a :class:`Confidence`.

References
----------
.. [1] R. Guimera, M. Sales-Pardo, L. A. N. Amaral, "Modularity from fluctuations in
   random graphs and complex networks", Physical Review E 70, 025101, 2004.
   doi:10.1103/PhysRevE.70.025101
.. [2] V. D. Blondel, J.-L. Guillaume, R. Lambiotte, E. Lefebvre, "Fast unfolding of
   communities in large networks", J. Stat. Mech. P10008, 2008.
   doi:10.1088/1742-5468/2008/10/P10008
.. [3] R. Milo, N. Kashtan, S. Itzkovitz, M. E. J. Newman, U. Alon, "On the uniform
   generation of random graphs with prescribed degree sequences", arXiv:cond-mat/0312028,
   2003.
.. [4] P. Jaccard, "The distribution of the flora in the alpine zone", New Phytologist
   11(2), 1912. doi:10.1111/j.1469-8137.1912.tb05611.x
.. [5] C. Hennig, "Cluster-wise assessment of cluster stability", Computational
   Statistics & Data Analysis 52(1), 258-271, 2007. doi:10.1016/j.csda.2006.11.025
"""

from __future__ import annotations

import dataclasses
import functools
import math
import multiprocessing
import os
import time
from collections.abc import Iterable, Iterator, Mapping, Sequence
from concurrent.futures import ThreadPoolExecutor
from dataclasses import dataclass
from typing import Any

import networkx as nx
import numpy as np

from ..config import Config
from ..embedding.graph import CSRGraph, edge_arrays
from ..embedding.graph import from_ties as _csr  # the unweighted undirected CSRGraph of u-v
from ..errors import parameter_error
from ..plan import rerun_groups
from ..seeds import seed_list
from ..workers import worker_pool
from .modularity import louvain, modularity
from .swaps import Swapped, double_edge_swap

__all__ = [
    "StructureTest",
    "CommunityStability",
    "Stability",
    "Confidence",
    "structure_test",
    "stability",
    "assess",
    "structure_budget",
    "Z_MIN",
    "NULL_QUANTILE",
    "STABLE_JACCARD",
    "PATTERN_JACCARD",
]

#: The network's best modularity must lie this many null standard deviations above the
#: randomised networks' mean. Common practice: about 1 in 740 one-sided under a normal
#: null, and well clear of the few-randomisation noise in the standard deviation.
Z_MIN = 3.0

#: ... and above this quantile of the randomised networks' best modularity (a rank
#: condition that holds even when the randomised figures are skewed).
NULL_QUANTILE = 0.95

#: Cluster-wise stability guidance of Hennig (2007), as worded in the documentation of
#: his ``fpc::clusterboot``: mean best-match Jaccard >= 0.75 "valid, stable"; 0.6 to
#: 0.75 "indicating patterns" with doubtful membership; below 0.6 "should not be trusted".
STABLE_JACCARD = 0.75
PATTERN_JACCARD = 0.6

# Budget of the structure test (see structure_budget and benchmarks/bench_confidence.py).
_FULL_SWAPS_EDGES = 10_000
_SWAPS_PER_EDGE = 10.0
_SWAPS_PER_EDGE_LARGE = 3.0

# Below this many walk steps per re-run, starting worker processes (about 2 s each,
# mostly imports) costs more than it saves; see benchmarks/bench_confidence.py.
_PARALLEL_MIN_TOKENS = 500_000

_VIEWS = ("local", "far")

_STRUCTURE_RULE = (
    f"clear when the best modularity Louvain finds in the network is at least {Z_MIN:g} "
    "standard deviations above the mean of the best modularity it finds in "
    "degree-preserving randomisations of the network, and higher than "
    f"{NULL_QUANTILE:.0%} of those randomisations"
)

_VIEWS_RULE = (
    "the two views differ beyond seed-to-seed variation when, in every run, the "
    "agreement (ARI) between the local and far groupings is lower than every agreement "
    "of a view with itself across seeds"
)


def _num(x: float, digits: int = 4) -> float | None:
    """Round for JSON; ``None`` for NaN and infinities (JSON has neither)."""
    x = float(x)
    return round(x, digits) if math.isfinite(x) else None


def _spread(values: Sequence[float]) -> dict[str, Any]:
    a = np.asarray(values, dtype=np.float64)
    if a.size == 0:
        return {"mean": None, "sd": None, "min": None, "max": None, "values": []}
    return {
        "mean": _num(a.mean()),
        "sd": _num(a.std(ddof=1)) if a.size > 1 else None,
        "min": _num(a.min()),
        "max": _num(a.max()),
        "values": [_num(v) for v in a],
    }


# --------------------------------------------------------------------------------------
# Structure test
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, eq=False)
class StructureTest:
    """Modularity of the network and its communities against randomised networks.

    Attributes
    ----------
    clear : bool
        Whether the network shows clear community structure (see :attr:`rule`). False
        also when it could not be tested (see :attr:`tested`).
    tested : bool
        Whether a verdict could be reached: at least 2 randomisations of a network with
        4 or more members with ties and 2 or more ties. When False, say "not tested",
        not "no clear structure".
    rule : str
        The verdict rule in words.
    modularity_communities : float
        Modularity of the report's communities.
    modularity_best : float
        Modularity of the Louvain partition of the network.
    null : tuple of float
        Modularity of the Louvain partition of each randomised network.
    null_mean, null_sd, null_quantile : float
        Mean, standard deviation (ddof=1) and :data:`NULL_QUANTILE` quantile of ``null``.
    z : float
        ``(modularity_best - null_mean) / null_sd``.
    p_value : float
        Empirical p-value of ``modularity_best``: (1 + #null >= it) / (1 + randomisations).
    randomisations, randomisations_requested : int
        Randomised networks made, and asked for (fewer on large networks: ``budget``).
    swaps_per_edge : float
        Double edge swaps asked for per tie in each randomisation.
    swaps_short : int
        Randomisations that stopped before all swaps were made (too few possible swaps:
        the degrees nearly fix the network).
    nodes, edges : int
        Size of the network tested (undirected, no self-loops, no isolated nodes).
    budget : str
        What was done, in words, and why when less than asked.
    seconds : float
        Time taken.
    """

    clear: bool
    tested: bool
    rule: str
    modularity_communities: float
    modularity_best: float
    null: tuple[float, ...]
    null_mean: float
    null_sd: float
    null_quantile: float
    z: float
    p_value: float
    randomisations: int
    randomisations_requested: int
    swaps_per_edge: float
    swaps_short: int
    nodes: int
    edges: int
    budget: str
    seconds: float

    def as_dict(self) -> dict[str, Any]:
        """The figures for ``summary.json['structure']``."""
        return {
            "clear": bool(self.clear),
            "tested": bool(self.tested),
            "rule": self.rule,
            "modularity": {
                "communities": _num(self.modularity_communities),
                "best_found": _num(self.modularity_best),
                "weighted": False,
                "optimiser": "Louvain, compiled (roles.analysis.modularity.louvain, resolution 1)",
            },
            "randomised": {
                "mean": _num(self.null_mean),
                "sd": _num(self.null_sd),
                f"quantile_{round(NULL_QUANTILE * 100)}": _num(self.null_quantile),
                "values": [_num(v) for v in self.null],
                "method": (
                    "degree-preserving double edge swaps, compiled "
                    "(roles.analysis.swaps.double_edge_swap)"
                ),
                "swaps_per_edge": self.swaps_per_edge,
                "short_of_swaps": self.swaps_short,
            },
            "z": _num(self.z, 2),
            "p_value": _num(self.p_value),
            "randomisations": self.randomisations,
            "randomisations_requested": self.randomisations_requested,
            "network_tested": {
                "nodes": self.nodes,
                "edges": self.edges,
                "as": "undirected, unweighted, without self-loops and isolated nodes",
            },
            "budget": self.budget,
            "seconds": round(self.seconds, 3),
        }


def structure_budget(edges: int, randomisations: int) -> tuple[int, float, str]:
    """Swaps per tie the structure test spends on ``edges`` ties, and its note.

    Swaps: 10 per tie up to 10,000 ties, 3 per tie beyond. Every randomisation asked
    for is made: how many a network's size affords is decided with the run's other size
    limits (:func:`roles.plan.budget`: no structure test beyond 1,000,000 ties unless
    ``scale_down = false``).

    The best modularity found in randomised networks settles after one to two swaps per
    tie (planted-partition networks of 10,000 and 200,000 ties: the same mean from 1 to
    20 swaps per tie, within its standard deviation of 0.0004 to 0.004). With the
    compiled swaps and Louvain, one randomisation at 3 swaps per tie costs about 0.2 CPU
    seconds at 200,000 ties and 1.6 at 1,000,000 (swaps 0.8 s, Louvain 0.75 s), and the
    whole test with 20 randomisations on two threads takes 0.1 s wall at 10,000 ties,
    2.4 s at 200,000 and 19 s (36 CPU seconds) at 1,000,000; networkx's swaps and
    Louvain took 0.9 and 10 CPU seconds per randomisation at 10,000 and 200,000 ties
    (``benchmarks/bench_confidence.py``). The empirical p-value's floor is
    ``1 / (randomisations + 1)``.

    Returns
    -------
    (randomisations, swaps_per_edge, note)
    """
    if randomisations < 0:
        raise parameter_error("randomisations", "a whole number of at least 0", randomisations)
    spe = _SWAPS_PER_EDGE if edges <= _FULL_SWAPS_EDGES else _SWAPS_PER_EDGE_LARGE
    return randomisations, spe, f"{randomisations} randomised networks, {spe:g} swaps per tie"


def _test_arrays(graph: nx.Graph) -> tuple[list, np.ndarray, np.ndarray]:
    """The simple undirected graph of the ties: its nodes and its ties as index arrays.

    Direction, weights, repeated ties, self-loops and nodes without ties are dropped.
    Nodes keep the graph's order; ties come sorted, ``u < v``.
    """
    nodes = list(graph.nodes())
    a, b, _ = edge_arrays(graph)
    keep = a != b
    lo, hi = np.minimum(a[keep], b[keep]), np.maximum(a[keep], b[keep])
    n = len(nodes)
    key = np.unique(lo * n + hi)
    lo, hi = key // n, key % n
    tied = np.zeros(n, dtype=bool)
    tied[lo] = True
    tied[hi] = True
    new = np.cumsum(tied) - 1
    return [nodes[i] for i in np.flatnonzero(tied)], new[lo], new[hi]


def _best_modularity(csr: CSRGraph, seed: int) -> float:
    """Modularity of the Louvain partition (compiled, :mod:`roles.analysis.modularity`)."""
    return modularity(csr, louvain(csr, seed=seed))


def _randomised(
    u: np.ndarray, v: np.ndarray, n: int, swaps_per_edge: float, seed: int
) -> tuple[Swapped, bool]:
    """A degree-preserving randomisation of the ties and whether every swap was made."""
    nswap = max(1, int(round(swaps_per_edge * len(u))))
    r = double_edge_swap(u, v, n_nodes=n, nswap=nswap, max_tries=50 * nswap + 100, seed=seed)
    return r, r.swaps == nswap


def _null_one(
    names: tuple[str, ...], u: np.ndarray, v: np.ndarray, job: tuple[float, int, int]
) -> tuple[float, bool]:
    swaps_per_edge, swap_seed, louvain_seed = job
    r, complete = _randomised(u, v, len(names), swaps_per_edge, swap_seed)
    return _best_modularity(_csr(names, r.u, r.v), louvain_seed), complete


def _threads(requested: int | None, jobs: int) -> int:
    """Threads for the randomisations: as asked, else 2 on a machine with 2+ cores."""
    if requested is None:
        requested = 2 if (os.cpu_count() or 1) > 1 else 1
    return max(1, min(int(requested), jobs))


def _processes(requested: int | None, worth_it: bool, jobs: int) -> int:
    """Worker processes to use: 2 when asked for or worth it, never inside a daemon."""
    if multiprocessing.current_process().daemon or jobs < 2:
        return 1
    if requested is None:
        return 2 if worth_it and (os.cpu_count() or 1) > 1 else 1
    return max(1, min(int(requested), jobs))


def structure_test(
    graph: nx.Graph,
    labels: Mapping[Any, int],
    *,
    randomisations: int = 20,
    seed: int = 0,
    swaps_per_edge: float | None = None,
    threads: int | None = None,
) -> StructureTest:
    """Test whether ``graph`` has community structure beyond what its degrees produce.

    Parameters
    ----------
    graph : networkx.Graph or networkx.DiGraph
        The network. Tested as a simple undirected, unweighted graph: direction and
        weights are dropped, as are self-loops and nodes without ties (see Notes).
    labels : mapping
        Node -> community of the report. Every node with a tie needs one.
    randomisations : int, default 20
        Degree-preserving randomisations asked for; large networks get fewer
        (:func:`structure_budget`).
    seed : int
        Seeds the swaps and Louvain runs (through ``numpy.random.SeedSequence``).
    swaps_per_edge : float, optional
        Double edge swaps per tie; by default chosen by :func:`structure_budget`.
    threads : int, optional
        Randomisations made at once, in threads of this process (the compiled swaps and
        Louvain release the GIL). By default 2 on a machine with two or more cores, else
        1. The figures do not depend on it: each randomisation has its own seeds.

    Returns
    -------
    StructureTest

    Notes
    -----
    Guimera, Sales-Pardo & Amaral [1]_ show that the modularity [2]_ that an optimiser
    finds in a random graph can be high, so a high figure alone says little. They
    compare the network's modularity with that of random networks with the same degrees.
    Here both the network and each randomised copy are partitioned by the same
    optimiser (the Louvain method [3]_, compiled: :func:`roles.analysis.modularity.louvain`, with
    a fixed seed), so the comparison asks "does the optimiser find more than it would in
    a network without structure?". Randomised networks are made by double edge swaps
    [4]_ (:func:`roles.analysis.swaps.double_edge_swap`, compiled, the move of networkx's
    ``double_edge_swap``: two ties a-b, c-d become a-c, b-d when neither exists), which
    keep every node's degree. On small test networks (LFR, Erdos-Renyi and
    Barabasi-Albert graphs of 250 to 300 nodes, 40 randomisations each) the randomised
    networks' best modularity has the same mean and spread as with networkx's swaps and
    Louvain (``benchmarks/bench_confidence.py``).

    The verdict (:data:`Z_MIN`, :data:`NULL_QUANTILE`): clear when ``z >= 3`` and the
    network's best modularity is above the 95% quantile of the randomised networks'
    (a rank condition that does not rely on the randomised figures being normal). The
    report's own communities are deliberately not held to the randomised networks' best
    modularity: that is a maximum over all partitions, and a correct but coarse
    partition can lie below it. The planted partition of networkx's LFR example graph
    (n=250, mu=0.1, seed=10) has modularity 0.37 against 0.42 for the best partitions
    of its randomisations, because one community holds 157 of the 250 nodes. Whether
    the communities themselves hold up is measured by :func:`stability`.

    Modularity is unweighted because swaps move ties, and there is no single right way
    to carry weights along; the question here is whether the pattern of ties has
    groups. Direction is dropped as in the pipeline's own modularity figure. Memory is
    O(E): the network's ties, and one randomised copy (ties, hash table, CSR arrays,
    Louvain's arrays) per thread at a time, about 120 MiB per thread at a million ties.

    References
    ----------
    .. [1] R. Guimera, M. Sales-Pardo, L. A. N. Amaral, "Modularity from fluctuations in
       random graphs and complex networks", Phys. Rev. E 70, 025101, 2004.
       doi:10.1103/PhysRevE.70.025101
    .. [2] M. E. J. Newman, M. Girvan, "Finding and evaluating community structure in
       networks", Phys. Rev. E 69, 026113, 2004. doi:10.1103/PhysRevE.69.026113
    .. [3] V. D. Blondel, J.-L. Guillaume, R. Lambiotte, E. Lefebvre, "Fast unfolding of
       communities in large networks", J. Stat. Mech. P10008, 2008.
    .. [4] R. Milo, N. Kashtan, S. Itzkovitz, M. E. J. Newman, U. Alon, "On the uniform
       generation of random graphs with prescribed degree sequences",
       arXiv:cond-mat/0312028, 2003.

    Examples
    --------
    >>> import networkx as nx
    >>> g = nx.ring_of_cliques(6, 6)
    >>> labels = {v: v // 6 for v in g}
    >>> structure_test(g, labels, randomisations=5, seed=1).clear
    True
    """
    start = time.perf_counter()
    nodes, u, v = _test_arrays(graph)
    n, m = len(nodes), len(u)
    used, spe, note = structure_budget(m, randomisations)
    if swaps_per_edge is not None:
        if not swaps_per_edge > 0:
            raise parameter_error("swaps_per_edge", "a number greater than 0", swaps_per_edge)
        spe = float(swaps_per_edge)
        note = f"{used} randomised networks, {spe:g} swaps per tie"
    missing = [x for x in nodes if x not in labels]
    if missing:
        raise parameter_error(
            "labels", f"a community for every node ({len(missing)} missing)", missing[0]
        )

    nan = float("nan")
    if n < 4 or m < 2:
        return StructureTest(
            clear=False,
            tested=False,
            rule=_STRUCTURE_RULE,
            modularity_communities=nan,
            modularity_best=nan,
            null=(),
            null_mean=nan,
            null_sd=nan,
            null_quantile=nan,
            z=nan,
            p_value=nan,
            randomisations=0,
            randomisations_requested=randomisations,
            swaps_per_edge=spe,
            swaps_short=0,
            nodes=n,
            edges=m,
            budget="not tested: fewer than 4 members with ties or fewer than 2 ties",
            seconds=time.perf_counter() - start,
        )

    codes: dict[Any, int] = {}
    ours = np.fromiter((codes.setdefault(labels[x], len(codes)) for x in nodes), np.int64, n)
    names = tuple(str(x) for x in nodes)
    base = _csr(names, u, v)
    q_ours = modularity(base, ours)
    seeds = np.random.SeedSequence(seed).spawn(used + 1)
    q_best = _best_modularity(base, int(seeds[0].generate_state(1)[0]))
    del base
    jobs: list[tuple[float, int, int]] = []
    for child in seeds[1:]:
        swap_seed, louvain_seed = (int(x) for x in child.generate_state(2))
        jobs.append((spe, swap_seed, louvain_seed))
    workers = _threads(threads, len(jobs))
    if workers > 1:
        # The compiled swaps and Louvain release the GIL: threads share the ties
        # without copying them or starting processes.
        with ThreadPoolExecutor(max_workers=workers) as pool:
            results = list(pool.map(functools.partial(_null_one, names, u, v), jobs))
        note += f", {workers} at a time"
    else:
        results = [_null_one(names, u, v, job) for job in jobs]
    null = [q for q, _ in results]
    short = sum(not complete for _, complete in results)

    a = np.asarray(null)
    mean = float(a.mean()) if a.size else nan
    sd = float(a.std(ddof=1)) if a.size > 1 else nan
    quant = float(np.quantile(a, NULL_QUANTILE)) if a.size else nan

    def zscore(q: float) -> float:
        if not math.isfinite(sd):
            return nan
        if sd == 0.0:
            # Every randomisation gave the same figure (the degrees fix the network).
            return math.copysign(math.inf, q - mean) if q != mean else 0.0
        return (q - mean) / sd

    z = zscore(q_best)
    p = (1 + int(np.count_nonzero(a >= q_best))) / (1 + a.size) if a.size else nan
    clear = bool(a.size >= 2 and z >= Z_MIN and q_best > quant)
    if a.size < 2:
        note += "; fewer than 2 randomised networks: no verdict possible"
    if short:
        note += f"; {short} randomisations ran out of possible swaps"
    return StructureTest(
        clear=clear,
        tested=bool(a.size >= 2),
        rule=_STRUCTURE_RULE,
        modularity_communities=q_ours,
        modularity_best=q_best,
        null=tuple(null),
        null_mean=mean,
        null_sd=sd,
        null_quantile=quant,
        z=z,
        p_value=p,
        randomisations=int(a.size),
        randomisations_requested=randomisations,
        swaps_per_edge=spe,
        swaps_short=short,
        nodes=n,
        edges=m,
        budget=note,
        seconds=time.perf_counter() - start,
    )


# --------------------------------------------------------------------------------------
# Seed stability
# --------------------------------------------------------------------------------------


@dataclass(frozen=True)
class CommunityStability:
    """How well one community came back in the re-runs.

    Attributes
    ----------
    label : int
        The community's label in the reference run.
    size : int
        Members.
    jaccard : float
        Mean over re-runs of the Jaccard index between the community and its best match
        (the re-run group sharing the largest Jaccard index with it): Hennig's
        cluster-wise stability.
    jaccard_min : float
        The lowest of those best-match figures.
    confidence : float
        Mean confidence of its members.
    verdict : str
        ``"stable"`` (jaccard >= 0.75), ``"pattern"`` (0.6 to 0.75: the group recurs but
        its exact membership is doubtful) or ``"unstable"`` (below 0.6), after Hennig
        (2007); ``"not re-run"`` when no re-run was made.
    """

    label: int
    size: int
    jaccard: float
    jaccard_min: float
    confidence: float
    verdict: str

    def as_dict(self) -> dict[str, Any]:
        return {
            "size": self.size,
            "jaccard": _num(self.jaccard),
            "jaccard_min": _num(self.jaccard_min),
            "confidence": _num(self.confidence),
            "verdict": self.verdict,
        }


@dataclass(frozen=True, eq=False)
class Stability:
    """What survived re-running the embedding and clustering with other seeds.

    Attributes
    ----------
    view : str
        The view whose groups were checked (the report's community view).
    confidence : ndarray of float, shape (n_nodes,)
        Per node, in [0, 1]: mean over re-runs of the Jaccard index between its
        co-members in the reference grouping and its co-members in the re-run (itself
        excluded; 1 when it has none in either). NaN for nodes without ties, which are
        not grouped.
    communities : dict
        Reference label -> :class:`CommunityStability`.
    runs, runs_requested : int
        Re-runs made and asked for (fewer on large networks: ``budget``).
    seeds : tuple of int
        The ``Config.seed`` of each re-run.
    cross_view_ari, cross_view_nmi : tuple of float
        Agreement between the local and far groupings within each re-run: the
        seed-to-seed spread of the view agreement the report shows.
    reference_ari, reference_nmi : float
        The same agreement in the reference run (NaN when the other view's reference
        labels were not given).
    within_view_ari : dict
        View -> ARI between its reference grouping and each re-run's grouping.
    views_differ : bool or None
        Whether the views disagree beyond seed-to-seed variation (see
        :attr:`views_rule`); None when it could not be judged.
    views_rule : str
        That rule in words.
    budget : str
        What was done, in words, and why when less than asked.
    seconds : float
        Time taken.
    """

    view: str
    confidence: np.ndarray
    communities: dict[int, CommunityStability]
    runs: int
    runs_requested: int
    seeds: tuple[int, ...]
    cross_view_ari: tuple[float, ...]
    cross_view_nmi: tuple[float, ...]
    reference_ari: float
    reference_nmi: float
    within_view_ari: dict[str, tuple[float, ...]]
    views_differ: bool | None
    views_rule: str
    budget: str
    seconds: float

    @property
    def median_confidence(self) -> float:
        c = self.confidence[np.isfinite(self.confidence)]
        return float(np.median(c)) if c.size else float("nan")

    def as_dict(self) -> dict[str, Any]:
        """The figures for ``summary.json['stability']``."""
        c = self.confidence[np.isfinite(self.confidence)]
        return {
            "view": self.view,
            "runs": self.runs,
            "runs_requested": self.runs_requested,
            "seeds": list(self.seeds),
            "confidence": {
                "measure": (
                    "per member: mean over re-runs of the Jaccard index of its co-members "
                    "in the reported communities and in the re-run"
                ),
                "median": _num(self.median_confidence),
                "mean": _num(c.mean()) if c.size else None,
                "share_below_0.5": _num(np.mean(c < 0.5)) if c.size else None,
            },
            "communities": {str(k): v.as_dict() for k, v in sorted(self.communities.items())},
            "unstable_communities": [
                int(k) for k, v in sorted(self.communities.items()) if v.verdict == "unstable"
            ],
            "community_rule": (
                "mean best-match Jaccard index over re-runs (Hennig 2007): stable >= "
                f"{STABLE_JACCARD}, pattern >= {PATTERN_JACCARD}, unstable below"
            ),
            "views": {
                "reference": {"ari": _num(self.reference_ari), "nmi": _num(self.reference_nmi)},
                "across_seeds": {
                    "ari": _spread(self.cross_view_ari),
                    "nmi": _spread(self.cross_view_nmi),
                },
                "within_view_ari": {v: _spread(a) for v, a in self.within_view_ari.items()},
                "differ": self.views_differ,
                "rule": self.views_rule,
            },
            "budget": self.budget,
            "seconds": round(self.seconds, 3),
        }


def _connected(csr: CSRGraph) -> np.ndarray:
    """Nodes with at least one tie, as the pipeline counts them."""
    degree = csr.out_degree()
    if csr.directed:
        degree = degree + np.bincount(csr.indices, minlength=csr.n_nodes)
    return np.asarray(degree > 0)


def _rerun(
    csr: CSRGraph, config: Config, idx: np.ndarray, processes: int | None = None
) -> dict[str, np.ndarray]:
    """Both views' group labels over ``idx``, made exactly as the pipeline makes them
    (:func:`roles.plan.rerun_groups`)."""
    return rerun_groups(csr, config, idx, processes)


def _reruns(
    csr: CSRGraph, config: Config, idx: np.ndarray, seeds: Iterable[int], workers: int
) -> Iterator[dict[str, np.ndarray]]:
    """Each re-run's labels, in seed order."""
    configs = [dataclasses.replace(config, seed=s) for s in seeds]
    if workers <= 1:
        for cfg in configs:
            yield _rerun(csr, cfg, idx)
        return
    with worker_pool(workers) as pool:
        futures = [pool.submit(_rerun, csr, cfg, idx, 1) for cfg in configs]
        for future in futures:
            yield future.result()


def _jaccard_parts(ref: np.ndarray, run: np.ndarray) -> tuple[np.ndarray, np.ndarray, np.ndarray]:
    """Per node co-member Jaccard; per reference group (dense 0..k-1) best-match Jaccard.

    Returns (node_jaccard, best_match, group_index_of_each_node).
    """
    _, ref_i = np.unique(ref, return_inverse=True)
    _, run_i = np.unique(run, return_inverse=True)
    size_ref = np.bincount(ref_i)
    size_run = np.bincount(run_i)
    width = int(run_i.max()) + 1
    code = ref_i.astype(np.int64) * width + run_i
    cells, inverse, both = np.unique(code, return_inverse=True, return_counts=True)
    # Per node: co-members shared / co-members in either grouping, the node left out.
    shared = both[inverse] - 1
    union = size_ref[ref_i] + size_run[run_i] - both[inverse] - 1
    node = np.where(union > 0, shared / np.maximum(union, 1), 1.0)
    # Per reference group: Jaccard of each overlapping re-run group; keep the best.
    cell_ref, cell_run = cells // width, cells % width
    cell_jac = both / (size_ref[cell_ref] + size_run[cell_run] - both)
    best = np.zeros(size_ref.size)
    np.maximum.at(best, cell_ref, cell_jac)
    return node, best, ref_i


def _verdict(jaccard: float) -> str:
    if not math.isfinite(jaccard):
        return "not re-run"
    if jaccard >= STABLE_JACCARD:
        return "stable"
    if jaccard >= PATTERN_JACCARD:
        return "pattern"
    return "unstable"


def stability(
    csr: CSRGraph,
    config: Config,
    *,
    runs: int = 5,
    view: str,
    reference_labels: np.ndarray,
    seed: int,
    other_labels: np.ndarray | None = None,
    processes: int | None = None,
) -> Stability:
    """Re-run the embedding and clustering with other seeds and measure what returns.

    Parameters
    ----------
    csr : CSRGraph
        The network, as the main run saw it.
    config : Config
        The main run's configuration. Re-run ``k`` uses
        ``dataclasses.replace(config, seed=s_k)``, with ``s_k`` drawn from
        ``numpy.random.SeedSequence(seed)``, and is made exactly as the pipeline makes
        its groups (:func:`roles.embedding.embed.embed_views_then`, each view grouped by
        :func:`roles.embedding.cluster.cluster` on the members with ties, with the run's
        ``fit_limit``, seeded by :func:`roles.seeds.StageSeeds`).
    runs : int, default 5
        Re-runs with other seeds (the pipeline spends fewer on large networks:
        :func:`roles.plan.budget`).
    view : {"local", "far"}
        The view whose groups are checked.
    reference_labels : ndarray of int, shape (n_nodes,)
        The main run's groups of ``view``, in ``csr`` node order (labels of nodes
        without ties are ignored).
    seed : int
        Seed of the re-run seeds.
    other_labels : ndarray of int, shape (n_nodes,), optional
        The main run's groups of the other view; gives the reference view agreement and
        the other view's seed-to-seed agreement.
    processes : int, optional
        Re-runs made at once, in separate processes (each then embeds its two views one
        after the other). By default 2 when there are two or more re-runs of at least
        500,000 walk steps each, on a machine with two or more cores; otherwise the
        re-runs run one after the other and each embeds and groups its two views side
        by side when its walks are large enough (:func:`roles.embedding.embed.embed_views_then`).
        The figures do not depend on it.

    Returns
    -------
    Stability

    Notes
    -----
    A node's confidence is the mean over re-runs of the Jaccard index [1]_ between the
    set of its co-members in the reference grouping and in the re-run (the node itself
    left out; 1 when both sets are empty). It is computed from the sparse contingency
    table of the two groupings, in O(n) memory: the overlap of node i's two sets is the
    number of nodes sharing both its groups. A community's stability is the mean over
    re-runs of the Jaccard index between it and its best-matching re-run group, the
    cluster-wise stability of Hennig [2]_, read with his guidance: >= 0.75 stable,
    0.6 to 0.75 a recurring pattern with doubtful membership, below 0.6 not to be
    trusted (wording of the ``fpc::clusterboot`` documentation).

    Memory beyond the re-runs themselves is O(n). Worker processes are started with
    "spawn": a script calling this at import level must put the call under
    ``if __name__ == "__main__":``.

    References
    ----------
    .. [1] P. Jaccard, "The distribution of the flora in the alpine zone", New
       Phytologist 11(2), 1912. doi:10.1111/j.1469-8137.1912.tb05611.x
    .. [2] C. Hennig, "Cluster-wise assessment of cluster stability", Computational
       Statistics & Data Analysis 52(1), 258-271, 2007. doi:10.1016/j.csda.2006.11.025
    .. [3] L. Hubert, P. Arabie, "Comparing partitions", Journal of Classification 2,
       1985. doi:10.1007/BF01908075
    """
    from sklearn.metrics import adjusted_rand_score, normalized_mutual_info_score

    start = time.perf_counter()
    if view not in _VIEWS:
        raise parameter_error("view", "'local' or 'far'", view)
    n = csr.n_nodes
    reference_labels = np.asarray(reference_labels)
    if reference_labels.shape != (n,):
        raise parameter_error(
            "reference_labels", f"an array of shape ({n},)", reference_labels.shape
        )
    if other_labels is not None:
        other_labels = np.asarray(other_labels)
        if other_labels.shape != (n,):
            raise parameter_error("other_labels", f"an array of shape ({n},)", other_labels.shape)
    if runs < 0:
        raise parameter_error("runs", "a whole number of at least 0", runs)
    idx = np.flatnonzero(_connected(csr))
    # How many re-runs a network's size affords is the run recipe's (roles.plan.budget).
    note = f"{runs} re-runs with other seeds, one after the other"
    other = "far" if view == "local" else "local"
    ref = {view: reference_labels[idx]}
    if other_labels is not None:
        ref[other] = other_labels[idx]

    seeds = seed_list(seed, runs, avoid=config.seed)
    node_sum = np.zeros(len(idx))
    best_runs: list[np.ndarray] = []
    cross_ari: list[float] = []
    cross_nmi: list[float] = []
    within: dict[str, list[float]] = {v: [] for v in ref}
    tokens = csr.n_nodes * config.walks.walks_per_node * config.walks.walk_length
    workers = _processes(processes, tokens >= _PARALLEL_MIN_TOKENS, len(seeds))
    if workers > 1:
        note = note.replace("one after the other", f"{workers} at a time")
    for labels in _reruns(csr, config, idx, seeds, workers):
        node, best, _ = _jaccard_parts(ref[view], labels[view])
        node_sum += node
        best_runs.append(best)
        cross_ari.append(float(adjusted_rand_score(labels["local"], labels["far"])))
        cross_nmi.append(float(normalized_mutual_info_score(labels["local"], labels["far"])))
        for v, r in ref.items():
            within[v].append(float(adjusted_rand_score(r, labels[v])))

    confidence = np.full(n, np.nan)
    group_values, ref_i = np.unique(ref[view], return_inverse=True)
    if seeds:
        confidence[idx] = node_sum / len(seeds)
    node_conf = confidence[idx]
    best_all = np.vstack(best_runs) if best_runs else np.full((0, len(group_values)), np.nan)
    communities: dict[int, CommunityStability] = {}
    sizes = np.bincount(ref_i, minlength=len(group_values))
    conf_sum = np.bincount(ref_i, weights=np.nan_to_num(node_conf), minlength=len(group_values))
    for k, label in enumerate(group_values.tolist()):
        jac = float(best_all[:, k].mean()) if best_runs else float("nan")
        communities[int(label)] = CommunityStability(
            label=int(label),
            size=int(sizes[k]),
            jaccard=jac,
            jaccard_min=float(best_all[:, k].min()) if best_runs else float("nan"),
            confidence=float(conf_sum[k] / sizes[k]) if seeds else float("nan"),
            verdict=_verdict(jac),
        )

    nan = float("nan")
    ref_ari = ref_nmi = nan
    if other in ref:
        ref_ari = float(adjusted_rand_score(ref["local"], ref["far"]))
        ref_nmi = float(normalized_mutual_info_score(ref["local"], ref["far"]))
    differ: bool | None = None
    if seeds:
        crossing = cross_ari + ([ref_ari] if math.isfinite(ref_ari) else [])
        selfsame = [a for values in within.values() for a in values]
        differ = bool(max(crossing) < min(selfsame))
    return Stability(
        view=view,
        confidence=confidence,
        communities=communities,
        runs=len(seeds),
        runs_requested=runs,
        seeds=tuple(seeds),
        cross_view_ari=tuple(cross_ari),
        cross_view_nmi=tuple(cross_nmi),
        reference_ari=ref_ari,
        reference_nmi=ref_nmi,
        within_view_ari={v: tuple(a) for v, a in within.items()},
        views_differ=differ,
        views_rule=_VIEWS_RULE,
        budget=note,
        seconds=time.perf_counter() - start,
    )


# --------------------------------------------------------------------------------------
# Both, for the pipeline
# --------------------------------------------------------------------------------------


@dataclass(frozen=True, eq=False)
class Confidence:
    """The structure test and the seed stability of one run, for the report.

    Attributes
    ----------
    names : tuple of str
        Node names, in the graph's node order.
    node_confidence : ndarray of float, shape (n_nodes,)
        Per node, aligned with ``names``: see :attr:`Stability.confidence` (NaN for
        members without ties).
    community_stability : dict
        Community label -> :class:`CommunityStability`.
    structure : StructureTest
    stability : Stability
    """

    names: tuple[str, ...]
    node_confidence: np.ndarray
    community_stability: dict[int, CommunityStability]
    structure: StructureTest
    stability: Stability

    @property
    def views_differ(self) -> bool | None:
        """Whether the two views disagree by more than seed-to-seed variation."""
        return self.stability.views_differ

    def as_summary(self) -> dict[str, Any]:
        """``{"structure": ..., "stability": ...}`` for ``summary.json``."""
        return {"structure": self.structure.as_dict(), "stability": self.stability.as_dict()}


def assess(
    graph: nx.Graph,
    csr: CSRGraph,
    config: Config,
    communities: Mapping[Any, int],
    community_view: str,
    local_labels: np.ndarray,
    far_labels: np.ndarray,
    *,
    runs: int = 5,
    randomisations: int = 20,
    seed: int = 0,
) -> Confidence:
    """Structure test and seed stability of a pipeline run.

    Parameters
    ----------
    graph : networkx.Graph or networkx.DiGraph
        The analysed network.
    csr : CSRGraph
        ``to_csr(graph)``: same node order as ``list(graph.nodes())``.
    config : Config
        The run's configuration (its seed made the reference groups).
    communities : mapping
        Node -> community label of the report (every node).
    community_view : {"local", "far"}
        The view whose groups became the communities.
    local_labels, far_labels : ndarray of int, shape (n_nodes,)
        Each view's group labels per node, in graph node order.
    runs : int, default 5
        Re-runs of embedding and clustering (:func:`stability`).
    randomisations : int, default 20
        Degree-preserving randomisations (:func:`structure_test`).
    seed : int
        Seeds both checks (through ``numpy.random.SeedSequence``).

    Returns
    -------
    Confidence

    References
    ----------
    .. [1] R. Guimera, M. Sales-Pardo, L. A. N. Amaral, Phys. Rev. E 70, 025101, 2004.
    .. [2] C. Hennig, Computational Statistics & Data Analysis 52(1), 258-271, 2007.
    """
    names = tuple(str(v) for v in graph.nodes())
    if tuple(csr.names) != names:
        raise parameter_error("csr", "to_csr(graph), in the graph's node order", csr.names[:3])
    if community_view not in _VIEWS:
        raise parameter_error("community_view", "'local' or 'far'", community_view)
    reference = np.asarray([communities[v] for v in graph.nodes()], dtype=np.int64)
    other = np.asarray(far_labels if community_view == "local" else local_labels)
    structure_seed, stability_seed = seed_list(seed, 2)
    test = structure_test(graph, communities, randomisations=randomisations, seed=structure_seed)
    stab = stability(
        csr,
        config,
        runs=runs,
        view=community_view,
        reference_labels=reference,
        seed=stability_seed,
        other_labels=other,
    )
    return Confidence(
        names=names,
        node_confidence=stab.confidence,
        community_stability=stab.communities,
        structure=test,
        stability=stab,
    )
