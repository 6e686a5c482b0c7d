"""What if members were gone: removal scenarios and robustness curves.

A *removal scenario* takes members out of the network together and counts what
follows from the recorded ties alone: who is cut off, which ties go, which communities
lose their links or fall apart, and how much the network's global efficiency drops.
A *robustness curve* removes every member, one after another, and follows the share of
members left in the largest connected piece.

Everything here is a pure function of the graph and the members named; the wording
of the report lives in :mod:`roles.report`.
"""

from __future__ import annotations

import difflib
import itertools
from collections.abc import Hashable, Iterable, Mapping, Sequence
from dataclasses import dataclass, field
from typing import Any

import networkx as nx
import numba
import numpy as np

from ..embedding.graph import csr_arrays, edge_arrays
from ..errors import InputError

__all__ = [
    "Removal",
    "CommunityTies",
    "Robustness",
    "RobustnessCurve",
    "WhatIf",
    "EFFICIENCY_WORK",
    "check_members",
    "what_if",
    "what_if_many",
    "cut_off_each",
    "robustness",
    "default_removals",
    "assess",
]

#: Arc visits one global-efficiency computation may spend. Efficiency is exact (one
#: breadth-first search from every member) while members x stored arcs stays within
#: this budget: 1,000 members with 25,000 ties, 5,000 with 5,000. Beyond it, this many
#: arc visits' worth of sources (at least :data:`MIN_SOURCES`) are drawn at random.
#: The compiled search visits roughly 1-3e8 arcs a second on the project's shared
#: 2-core machine (benchmarks/bench_whatif.py), so one computation costs well under a
#: second and a report's ten or so cost a few seconds at 20,000 members / 200k ties.
EFFICIENCY_WORK = 50_000_000

#: Fewest sampled sources for estimated efficiency. The estimate is the mean of the
#: sampled sources' own efficiencies, so its standard error is their spread / sqrt(k);
#: it is recorded beside the estimate.
MIN_SOURCES = 100

#: Random removal orders averaged for the random-order robustness curve.
RANDOM_ORDERS = 10

#: Points of a stored robustness curve (fewer when the network has fewer members).
CURVE_POINTS = 101

#: Default scenarios: this many single points of failure and bridge-like members one
#: at a time.
TOP_SINGLE = 3

#: Default pair scenario: pairs are drawn from this many top members of each list
#: (single points of failure, bridge-like members, betweenness), at most
#: :data:`PAIR_POOL` members in all.
PAIR_TOP = 4
PAIR_POOL = 8


# --------------------------------------------------------------------- results


@dataclass(frozen=True)
class CommunityTies:
    """Ties between two communities before and after a removal.

    Attributes
    ----------
    communities : tuple of int
        The two community labels, smaller first.
    before, after : int
        Ties between them (either direction) before and after the removal.
    """

    communities: tuple[int, int]
    before: int
    after: int


@dataclass(frozen=True)
class Removal:
    """What follows from removing a set of members together.

    Attributes
    ----------
    removed : tuple of str
        The members removed, sorted.
    cut_off : tuple of str
        Members cut off, sorted. Undirected: members of the removed members'
        connected components that end up outside the largest remaining piece of their
        component. Directed (supplier -> customer): members that some source (a member
        without suppliers) reached before and no remaining source reaches after.
    ties_lost : int
        Ties with at least one removed end.
    ties_lost_between_communities : int
        Of those, ties between two different communities (members without ties or
        without a community, label 0, are not counted).
    community_ties : tuple of CommunityTies
        The pairs of communities whose ties between them fall to zero or by more than
        half.
    communities_split : tuple of int
        Communities whose remaining members form more separate pieces (counting only
        ties inside the community) than all their members did before.
    efficiency_before, efficiency_after : float
        Global efficiency (Latora & Marchiori 2001) of the network and of what remains,
        unweighted, following directed ties in their direction.
    efficiency_sources : int
        Sources the efficiency was computed from: every member when exact, else the
        sample size.
    efficiency_error : float
        Standard error of ``efficiency_after - efficiency_before`` from the sampled
        sources; 0 when exact.
    efficiency_exact : bool
        Whether every member was a source (no sampling).
    final_customers_cut_off : tuple of str or None
        Directed only: the members of ``cut_off`` without customers of their own.
    why : str
        Why this scenario was chosen: ``asked``, ``single point of failure``,
        ``bridge-like``, ``single point of failure, bridge-like`` or ``pair``.
    pairs_tried : int
        For ``why == 'pair'``: how many pairs were compared; 0 otherwise.
    """

    removed: tuple[str, ...]
    cut_off: tuple[str, ...]
    ties_lost: int
    ties_lost_between_communities: int
    community_ties: tuple[CommunityTies, ...]
    communities_split: tuple[int, ...]
    efficiency_before: float
    efficiency_after: float
    efficiency_sources: int
    efficiency_error: float
    efficiency_exact: bool
    final_customers_cut_off: tuple[str, ...] | None = None
    why: str = "asked"
    pairs_tried: int = 0

    def as_summary(self) -> dict[str, Any]:
        """The scenario as plain JSON values (an entry of summary.json ``what_if``)."""
        out: dict[str, Any] = {
            "removed": list(self.removed),
            "why": self.why,
            "cut_off": list(self.cut_off),
            "ties_lost": self.ties_lost,
            "ties_lost_between_communities": self.ties_lost_between_communities,
            "community_ties": [
                {"communities": list(c.communities), "before": c.before, "after": c.after}
                for c in self.community_ties
            ],
            "communities_split": list(self.communities_split),
            "efficiency_before": round(self.efficiency_before, 6),
            "efficiency_after": round(self.efficiency_after, 6),
            "efficiency_sources": self.efficiency_sources,
            "efficiency_error": round(self.efficiency_error, 6),
            "efficiency_exact": self.efficiency_exact,
        }
        if self.final_customers_cut_off is not None:
            out["final_customers_cut_off"] = list(self.final_customers_cut_off)
        if self.why == "pair":
            out["pairs_tried"] = self.pairs_tried
        return out


@dataclass(frozen=True, eq=False)
class RobustnessCurve:
    """The share of members in the largest connected piece as members are removed.

    Attributes
    ----------
    removed : ndarray of float
        Share of members removed at each stored point, from 0 to 1.
    largest : ndarray of float
        Share of all members in the largest connected piece at that point.
    R : float
        Robustness index of Schneider et al. (2011): the mean of the largest piece's
        share over the removal of the first 1, 2, ..., N members.
    """

    removed: np.ndarray
    largest: np.ndarray
    R: float

    def as_summary(self) -> dict[str, Any]:
        return {
            "removed": [round(float(x), 4) for x in self.removed],
            "curve": [round(float(x), 4) for x in self.largest],
            "R": round(self.R, 4),
        }


@dataclass(frozen=True, eq=False)
class Robustness:
    """Robustness curves for removal by betweenness and in random order.

    Attributes
    ----------
    betweenness_order, random_order : RobustnessCurve
    random_orders : int
        How many random orders ``random_order`` averages.
    """

    betweenness_order: RobustnessCurve
    random_order: RobustnessCurve
    random_orders: int

    def as_summary(self) -> dict[str, Any]:
        return {
            "betweenness_order": self.betweenness_order.as_summary(),
            "random_order": {
                **self.random_order.as_summary(),
                "orders": self.random_orders,
            },
        }


@dataclass(frozen=True, eq=False)
class WhatIf:
    """The scenarios and robustness curves of one run.

    Attributes
    ----------
    scenarios : tuple of Removal
    robustness : Robustness
    asked : bool
        Whether the scenario was named by the user (``--remove``) rather than chosen.
    """

    scenarios: tuple[Removal, ...]
    robustness: Robustness
    asked: bool = False
    notes: tuple[str, ...] = field(default_factory=tuple)


# ------------------------------------------------------------------- kernels


@numba.njit(cache=True)
def _pieces(indptr, indices, alive, group):  # pragma: no cover - compiled
    """Connected pieces of the alive nodes, following arcs between equal ``group``."""
    n = alive.shape[0]
    label = np.full(n, -1, dtype=np.int64)
    queue = np.empty(n, dtype=np.int64)
    count = 0
    for s in range(n):
        if not alive[s] or label[s] >= 0:
            continue
        label[s] = count
        head = 0
        tail = 1
        queue[0] = s
        while head < tail:
            v = queue[head]
            head += 1
            for a in range(indptr[v], indptr[v + 1]):
                w = indices[a]
                if alive[w] and label[w] < 0 and group[w] == group[v]:
                    label[w] = count
                    queue[tail] = w
                    tail += 1
        count += 1
    return label, count


@numba.njit(cache=True)
def _reach(indptr, indices, alive, sources):  # pragma: no cover - compiled
    """Alive nodes reachable from the alive ``sources`` along out-arcs."""
    n = alive.shape[0]
    seen = np.zeros(n, dtype=np.bool_)
    queue = np.empty(n, dtype=np.int64)
    tail = 0
    for s in sources:
        if alive[s] and not seen[s]:
            seen[s] = True
            queue[tail] = s
            tail += 1
    head = 0
    while head < tail:
        v = queue[head]
        head += 1
        for a in range(indptr[v], indptr[v + 1]):
            w = indices[a]
            if alive[w] and not seen[w]:
                seen[w] = True
                queue[tail] = w
                tail += 1
    return seen


@numba.njit(cache=True)
def _inverse_distance_sums(indptr, indices, alive, sources):  # pragma: no cover - compiled
    """For each alive source, the sum of 1/d over the alive nodes it reaches (d >= 1)."""
    n = alive.shape[0]
    dist = np.full(n, -1, dtype=np.int64)
    queue = np.empty(n, dtype=np.int64)
    out = np.zeros(sources.shape[0])
    for k in range(sources.shape[0]):
        s = sources[k]
        if not alive[s]:
            continue
        dist[s] = 0
        queue[0] = s
        head = 0
        tail = 1
        total = 0.0
        while head < tail:
            v = queue[head]
            head += 1
            d = dist[v] + 1
            for a in range(indptr[v], indptr[v + 1]):
                w = indices[a]
                if alive[w] and dist[w] < 0:
                    dist[w] = d
                    total += 1.0 / d
                    queue[tail] = w
                    tail += 1
        out[k] = total
        for i in range(tail):  # reset only what this search touched
            dist[queue[i]] = -1
    return out


@numba.njit(cache=True)
def _find(parent, v):  # pragma: no cover - compiled
    root = v
    while parent[root] != root:
        root = parent[root]
    while parent[v] != root:  # path compression
        nxt = parent[v]
        parent[v] = root
        v = nxt
    return root


@numba.njit(cache=True)
def _largest_by_removals(indptr, indices, order):  # pragma: no cover - compiled
    """``out[t]``: largest connected piece after removing ``order[:t]``, t = 0..n.

    Members are added back in reverse order and joined with a union-find by size
    (Newman & Ziff 2000), so the whole curve costs about one pass over the ties.
    """
    n = order.shape[0]
    parent = np.arange(n)
    size = np.ones(n, dtype=np.int64)
    present = np.zeros(n, dtype=np.bool_)
    out = np.zeros(n + 1, dtype=np.int64)
    best = 0
    for t in range(n - 1, -1, -1):
        v = order[t]
        present[v] = True
        if best < 1:
            best = 1
        for a in range(indptr[v], indptr[v + 1]):
            w = indices[a]
            if not present[w]:
                continue
            rv = _find(parent, v)
            rw = _find(parent, w)
            if rv == rw:
                continue
            if size[rv] < size[rw]:
                rv, rw = rw, rv
            parent[rw] = rv
            size[rv] += size[rw]
            if size[rv] > best:
                best = size[rv]
        out[t] = best
    return out


# ----------------------------------------------------------------- the network


class _Network:
    """The graph as index arrays, with what every scenario compares against."""

    def __init__(
        self,
        graph: nx.Graph,
        communities: Mapping[Any, int] | None,
        *,
        seed: int,
        efficiency_work: int,
    ) -> None:
        if graph.is_multigraph():
            raise InputError(
                "the network has parallel ties between the same pair of members; merge "
                "them into one tie before removal scenarios."
            )
        self.nodes = list(graph.nodes())
        self.names = [str(v) for v in self.nodes]
        self.index = {v: i for i, v in enumerate(self.nodes)}
        n = self.n = len(self.nodes)
        self.directed = graph.is_directed()
        self.src, self.dst, _ = edge_arrays(graph)
        proper = self.src != self.dst  # self-loops reach nobody new
        s, d = self.src[proper], self.dst[proper]
        self.sym = csr_arrays(s, d, n, directed=False)[:2]
        self.out = csr_arrays(s, d, n)[:2] if self.directed else self.sym
        if self.directed:
            self.sources = np.flatnonzero(np.bincount(d, minlength=n) == 0)
            self.sinks = np.bincount(s, minlength=n) == 0
        self.community = np.zeros(n, dtype=np.int64)
        if communities is not None:
            for v, c in communities.items():
                if v in self.index:
                    self.community[self.index[v]] = int(c)
        cu, cv = self.community[self.src], self.community[self.dst]
        self.between = (cu != cv) & (cu > 0) & (cv > 0)
        lo, hi = np.minimum(cu, cv), np.maximum(cu, cv)
        self.pair_key = lo * (int(self.community.max()) + 1) + hi
        self.width = int(self.community.max()) + 1
        self.pair_before = np.bincount(self.pair_key[self.between])

        everyone = np.ones(n, dtype=np.bool_)
        self.alive_all = everyone
        zero = np.zeros(n, dtype=np.int64)
        self.component, _ = _pieces(*self.sym, everyone, zero)
        self.reached = (
            _reach(*self.out, everyone, self.sources) if self.directed else np.zeros(0, bool)
        )
        self.in_community, _ = _pieces(*self.sym, everyone, self.community)

        # Efficiency: every member as a source while cheap enough, else a fixed sample
        # (the same sources before and after, so the difference is estimated well).
        arcs = max(int(self.out[1].shape[0]), 1)
        k = max(MIN_SOURCES, efficiency_work // arcs)
        if k >= n:
            self.eff_sources = np.arange(n, dtype=np.int64)
        else:
            rng = np.random.default_rng(seed)
            self.eff_sources = np.sort(rng.choice(n, size=k, replace=False)).astype(np.int64)
        self.exact = self.eff_sources.shape[0] == n
        self._eff_before: np.ndarray | None = None

    @property
    def eff_before(self) -> np.ndarray:
        if self._eff_before is None:
            self._eff_before = _inverse_distance_sums(*self.out, self.alive_all, self.eff_sources)
        return self._eff_before

    # ------------------------------------------------------------------ pieces

    def _cut_off(self, alive: np.ndarray, removed: np.ndarray) -> np.ndarray:
        if self.directed:
            after = _reach(*self.out, alive, self.sources)
            return np.flatnonzero(self.reached & ~after & alive)
        label, _ = _pieces(*self.sym, alive, np.zeros(self.n, dtype=np.int64))
        affected = np.unique(self.component[removed])
        members = np.flatnonzero(np.isin(self.component, affected) & alive)
        piece = label[members]
        sizes = np.bincount(piece)
        comp = self.component[members]
        cut: list[np.ndarray] = []
        for c in affected:
            mine = comp == c
            if not mine.any():
                continue
            own = np.unique(piece[mine])
            biggest = own[sizes[own] == sizes[own].max()]
            if biggest.shape[0] > 1:
                # Equal largest pieces: the one holding the first name stays.
                keep = min(biggest, key=lambda p: min(self.names[i] for i in members[piece == p]))
            else:
                keep = biggest[0]
            cut.append(members[mine & (piece != keep)])
        return np.concatenate(cut) if cut else np.zeros(0, dtype=np.int64)

    def cut_off_count(self, removed: Sequence[int]) -> int:
        r = np.asarray(removed, dtype=np.int64)
        alive = np.ones(self.n, dtype=np.bool_)
        alive[r] = False
        return int(self._cut_off(alive, r).shape[0])

    # -------------------------------------------------------------- efficiency

    def _efficiency(self, sums: np.ndarray, alive: np.ndarray) -> tuple[float, np.ndarray]:
        m = int(alive.sum())
        used = alive[self.eff_sources]
        if m < 2 or not used.any():
            return 0.0, np.zeros(int(used.sum()))
        per_source = sums[used] / (m - 1)
        return float(per_source.mean()), per_source

    # -------------------------------------------------------------- scenario

    def scenario(self, removed: Sequence[int], *, why: str = "asked", pairs: int = 0) -> Removal:
        r = np.unique(np.asarray(removed, dtype=np.int64))
        alive = np.ones(self.n, dtype=np.bool_)
        alive[r] = False
        cut = self._cut_off(alive, r)
        names = self.names

        lost = ~alive[self.src] | ~alive[self.dst]
        lost_between = lost & self.between
        lost_pairs = np.bincount(self.pair_key[lost_between], minlength=self.pair_before.shape[0])
        falls = np.flatnonzero((lost_pairs > 0) & (2 * lost_pairs > self.pair_before))
        community_ties = tuple(
            CommunityTies(
                (int(k // self.width), int(k % self.width)),
                int(self.pair_before[k]),
                int(self.pair_before[k] - lost_pairs[k]),
            )
            for k in falls
        )

        split: list[int] = []
        touched = np.unique(self.community[r])
        touched = touched[touched > 0]
        if touched.shape[0]:
            label, _ = _pieces(*self.sym, alive, self.community)
            for c in touched:
                inside = self.community == c
                before = np.unique(self.in_community[inside]).shape[0]
                rest = label[inside & alive]
                after = np.unique(rest).shape[0]
                if after > 1 and after > before:
                    split.append(int(c))

        e0, base = self._efficiency(self.eff_before, self.alive_all)
        sums = _inverse_distance_sums(*self.out, alive, self.eff_sources)
        e1, per_after = self._efficiency(sums, alive)
        error = 0.0
        k = per_after.shape[0]
        if not self.exact and k > 1:
            diff = per_after - base[alive[self.eff_sources]]
            error = float(diff.std(ddof=1) / np.sqrt(k))

        final = None
        if self.directed:
            final = tuple(sorted(names[i] for i in cut if self.sinks[i]))
        return Removal(
            removed=tuple(sorted(names[i] for i in r)),
            cut_off=tuple(sorted(names[i] for i in cut)),
            ties_lost=int(lost.sum()),
            ties_lost_between_communities=int(lost_between.sum()),
            community_ties=community_ties,
            communities_split=tuple(split),
            efficiency_before=e0,
            efficiency_after=e1,
            efficiency_sources=int(self.eff_sources.shape[0]),
            efficiency_error=error,
            efficiency_exact=self.exact,
            final_customers_cut_off=final,
            why=why,
            pairs_tried=pairs,
        )

    # ------------------------------------------------------------ robustness

    def curve(self, order: np.ndarray) -> np.ndarray:
        """Largest piece (members) after removing ``order[:t]``, t = 0..n."""
        return _largest_by_removals(*self.sym, order.astype(np.int64))


# ------------------------------------------------------------------ public API


def check_members(graph: nx.Graph, names: Iterable[str], *, option: str = "--remove") -> list:
    """The graph's nodes named by ``names``, or an error naming the unknown ones.

    Parameters
    ----------
    graph : networkx.Graph
    names : iterable of str
        Member names as the user wrote them; matched to nodes by ``str(node)``.
    option : str
        How the names were given, for the message.

    Returns
    -------
    list
        The nodes, in the order given, each once.

    Raises
    ------
    InputError
        When a name is not a member: the message names it and the closest known names.
    """
    known = {str(v): v for v in graph}
    out: list = []
    for name in names:
        if name in known:
            if known[name] not in out:
                out.append(known[name])
            continue
        close = difflib.get_close_matches(name, list(known), n=3, cutoff=0.6)
        if len(close) > 1:
            hint = "The closest names in the network are " + ", ".join(map(repr, close)) + "."
        elif close:
            hint = f"The closest name in the network is {close[0]!r}."
        else:
            hint = "No name in the network is close to it."
        raise InputError(
            f"{option}: there is no member named {name!r} in the network. {hint} Names must "
            "match the edge list exactly, capitals and spaces included."
        )
    return out


def what_if_many(
    graph: nx.Graph,
    removals: Sequence[Sequence[Hashable]],
    *,
    communities: Mapping[Any, int] | None = None,
    seed: int = 0,
    efficiency_work: int = EFFICIENCY_WORK,
) -> list[Removal]:
    """:func:`what_if` for several scenarios on one graph, sharing the preparation."""
    net = _Network(graph, communities, seed=seed, efficiency_work=efficiency_work)
    out = []
    for nodes in removals:
        members = check_members(graph, [str(v) for v in nodes], option="remove")
        out.append(net.scenario([net.index[v] for v in members]))
    return out


def cut_off_each(graph: nx.Graph, members: Sequence[Hashable]) -> dict[str, tuple[str, ...]]:
    """Who each member's removal alone would cut off, by the rule of :func:`what_if`.

    Parameters
    ----------
    graph : networkx.Graph or networkx.DiGraph
        Directed ties point from supplier to customer.
    members : sequence
        Members to remove one at a time (matched by ``str(node)``).

    Returns
    -------
    dict
        ``str(member)`` -> the names cut off by its removal, sorted.

    Raises
    ------
    InputError
        When a name is not a member of the graph.

    Examples
    --------
    >>> import networkx as nx
    >>> cut_off_each(nx.krackhardt_kite_graph(), [7, 8])
    {'7': ('8', '9'), '8': ('9',)}
    """
    net = _Network(graph, None, seed=0, efficiency_work=0)
    checked = check_members(graph, [str(v) for v in members], option="member")
    out: dict[str, tuple[str, ...]] = {}
    for v in checked:
        alive = np.ones(net.n, dtype=np.bool_)
        r = np.asarray([net.index[v]], dtype=np.int64)
        alive[r] = False
        out[str(v)] = tuple(sorted(net.names[i] for i in net._cut_off(alive, r)))
    return out


def what_if(
    graph: nx.Graph,
    remove: Sequence[Hashable],
    *,
    communities: Mapping[Any, int] | None = None,
    seed: int = 0,
    efficiency_work: int = EFFICIENCY_WORK,
) -> Removal:
    """What follows from removing the members ``remove`` together.

    Parameters
    ----------
    graph : networkx.Graph or networkx.DiGraph
        Directed ties point from supplier to customer. Weights play no part.
    remove : sequence
        The members removed together (matched by ``str(node)``).
    communities : mapping, optional
        Node -> community label (> 0; 0 means none). Without it, no community counts.
    seed : int
        Chooses the sampled sources when efficiency is estimated.
    efficiency_work : int
        Arc visits allowed for one exact efficiency computation (see
        :data:`EFFICIENCY_WORK`).

    Returns
    -------
    Removal

    Raises
    ------
    InputError
        When a name is not a member of the graph.

    Notes
    -----
    Undirected: a member is cut off when it ends up outside the largest remaining
    piece of its connected component (with one member removed, these are exactly the
    member's ``dependents``); of two equally large pieces the one holding the first
    name in sorted order stays. Directed: a member is cut off when a source (a member
    without suppliers, in the whole network) reached it before and no remaining source
    does after; members that no source ever reached (a cycle of firms supplying one
    another) are never cut off. Self-loops are ignored (a member with only a tie to
    itself has no supplier).

    Global efficiency [1]_ is the mean of 1/d over ordered pairs of distinct members,
    1/d = 0 when no path leads from one to the other, taken over the members that
    remain. It is exact while the work stays within ``efficiency_work`` and estimated
    from a fixed random sample of sources beyond it.

    References
    ----------
    .. [1] V. Latora and M. Marchiori, "Efficient behavior of small-world networks",
       Physical Review Letters 87:198701, 2001. doi:10.1103/PhysRevLett.87.198701

    Examples
    --------
    >>> import networkx as nx
    >>> r = what_if(nx.path_graph(["a", "b", "c", "d", "e"]), ["b"])
    >>> r.cut_off, r.ties_lost
    (('a',), 2)
    >>> r = what_if(nx.DiGraph([("s", "m"), ("m", "c"), ("s", "c2")]), ["m"])
    >>> r.cut_off, r.final_customers_cut_off
    (('c',), ('c',))
    """
    return what_if_many(
        graph, [remove], communities=communities, seed=seed, efficiency_work=efficiency_work
    )[0]


def _sampled(sizes: np.ndarray, n: int, points: int) -> RobustnessCurve:
    """Store ``points`` evenly spaced points of a full curve of largest-piece sizes."""
    share = sizes / n if n else sizes.astype(float)
    # Schneider et al. (2011): R = (1/N) * sum over Q = 1..N of s(Q).
    R = float(share[1:].sum() / n) if n else 0.0
    m = min(points, n + 1)
    steps = np.unique(np.round(np.linspace(0, n, m)).astype(np.int64))
    return RobustnessCurve(removed=steps / max(n, 1), largest=share[steps], R=R)


def robustness(
    graph: nx.Graph,
    betweenness: Mapping[Any, float],
    *,
    orders: int = RANDOM_ORDERS,
    seed: int = 0,
    points: int = CURVE_POINTS,
) -> Robustness:
    """Robustness curves: members removed by betweenness and in random order.

    Parameters
    ----------
    graph : networkx.Graph or networkx.DiGraph
        Directed ties count both ways here (weakly connected pieces).
    betweenness : mapping
        Node -> betweenness, used as the removal order (highest first, the values
        computed once on the whole network, ties broken by name). Missing nodes
        count 0.
    orders : int
        Random orders averaged.
    seed : int
        Seed of the random orders.
    points : int
        Points stored per curve (all ``N + 1`` steps when the network is smaller).

    Returns
    -------
    Robustness

    Notes
    -----
    The attack (betweenness) and failure (random) curves of Albert, Jeong & Barabasi
    [1]_, with the robustness index R of Schneider et al. [2]_, computed by adding the
    members back in reverse order with a union-find [3]_: O(N + E) per order, up to the
    inverse Ackermann factor.

    References
    ----------
    .. [1] R. Albert, H. Jeong and A.-L. Barabasi, "Error and attack tolerance of
       complex networks", Nature 406:378-382, 2000. doi:10.1038/35019019
    .. [2] C. M. Schneider, A. A. Moreira, J. S. Andrade, S. Havlin and H. J. Herrmann,
       "Mitigation of malicious attacks on networks", PNAS 108:3838-3841, 2011.
       doi:10.1073/pnas.1009440108
    .. [3] M. E. J. Newman and R. M. Ziff, "Efficient Monte Carlo algorithm and
       high-precision results for percolation", Physical Review Letters 85:4104-4107,
       2000. doi:10.1103/PhysRevLett.85.4104

    Examples
    --------
    >>> import networkx as nx
    >>> g = nx.star_graph(4)
    >>> r = robustness(g, nx.betweenness_centrality(g))
    >>> r.betweenness_order.largest[:3].tolist(), round(r.betweenness_order.R, 2)
    ([1.0, 0.2, 0.2], 0.16)
    """
    net = _Network(graph, None, seed=seed, efficiency_work=0)
    return _robustness(net, betweenness, orders=orders, seed=seed, points=points)


def _robustness(
    net: _Network, betweenness: Mapping[Any, float], *, orders: int, seed: int, points: int
) -> Robustness:
    n = net.n
    score = np.array([float(betweenness.get(v, 0.0)) for v in net.nodes])
    by_name = np.argsort(np.array(net.names, dtype=object), kind="stable")
    # Highest betweenness first; lexsort's last key is the primary one.
    rank_name = np.empty(n, dtype=np.int64)
    rank_name[by_name] = np.arange(n)
    attack = np.lexsort((rank_name, -score))
    attack_curve = _sampled(net.curve(attack), n, points)
    rng = np.random.default_rng(seed)
    total = np.zeros(n + 1)
    for _ in range(orders):
        total += net.curve(rng.permutation(n))
    random_curve = _sampled(total / max(orders, 1), n, points)
    return Robustness(attack_curve, random_curve, orders)


def default_removals(
    single_points: Sequence[Hashable],
    bridges: Sequence[Hashable],
    by_betweenness: Sequence[Hashable],
) -> tuple[list[tuple[list[Hashable], str]], list[Hashable]]:
    """The default one-at-a-time scenarios and the pool the pair is drawn from.

    Parameters
    ----------
    single_points : sequence
        Members with dependents, most first.
    bridges : sequence
        Bridge-like members, most bridge-like first.
    by_betweenness : sequence
        Members by betweenness, highest first.

    Returns
    -------
    singles : list of (members, why)
        Up to :data:`TOP_SINGLE` single points of failure and as many bridge-like
        members, each once.
    pool : list
        Up to :data:`PAIR_POOL` members for the pair scenario.
    """
    why: dict[Hashable, list[str]] = {}
    for v in single_points[:TOP_SINGLE]:
        why.setdefault(v, []).append("single point of failure")
    for v in bridges[:TOP_SINGLE]:
        why.setdefault(v, []).append("bridge-like")
    singles = [([v], ", ".join(w)) for v, w in why.items()]
    pool: list[Hashable] = []
    for v in itertools.chain(
        single_points[:PAIR_TOP], bridges[:PAIR_TOP], by_betweenness[:PAIR_TOP]
    ):
        if v not in pool and len(pool) < PAIR_POOL:
            pool.append(v)
    return singles, pool


def assess(
    graph: nx.Graph,
    *,
    communities: Mapping[Any, int] | None,
    betweenness: Mapping[Any, float],
    dependents: Mapping[Any, int],
    bridges: Sequence[Hashable],
    remove: Sequence[Hashable] | None = None,
    seed: int = 0,
    efficiency_work: int = EFFICIENCY_WORK,
) -> WhatIf:
    """The run's removal scenarios and robustness curves.

    With ``remove``, one scenario: those members removed together. Without it, the
    default scenarios (:func:`default_removals`) and the pair of the pool whose joint
    removal cuts off the most members (ties: the first pair in pool order).

    Parameters
    ----------
    graph : networkx.Graph or networkx.DiGraph
    communities : mapping or None
        Node -> community label (0: none).
    betweenness, dependents : mapping
        Node -> value, from the role measures.
    bridges : sequence
        Bridge-like members, most bridge-like first.
    remove : sequence, optional
        Members to remove together (checked with :func:`check_members`).
    seed : int
        Seed of the random orders and of sampled efficiency sources.

    Returns
    -------
    WhatIf
    """
    net = _Network(graph, communities, seed=seed, efficiency_work=efficiency_work)
    idx = net.index
    scenarios: list[Removal] = []
    if remove:
        members = check_members(graph, [str(v) for v in remove])
        scenarios.append(net.scenario([idx[v] for v in members]))
    else:
        single = sorted(
            (v for v in graph if dependents.get(v, 0) > 0),
            key=lambda v: (-dependents[v], str(v)),
        )
        central = (v for v in graph if float(betweenness.get(v, 0.0)) > 0)
        top_between = sorted(central, key=lambda v: (-float(betweenness[v]), str(v)))
        singles, pool = default_removals(single, list(bridges), top_between[:PAIR_TOP])
        for members, why in singles:
            scenarios.append(net.scenario([idx[v] for v in members], why=why))
        pairs = list(itertools.combinations(pool, 2))
        if pairs:
            counts = [net.cut_off_count([idx[a], idx[b]]) for a, b in pairs]
            best = pairs[int(np.argmax(counts))]
            scenarios.append(net.scenario([idx[v] for v in best], why="pair", pairs=len(pairs)))
    curves = _robustness(net, betweenness, orders=RANDOM_ORDERS, seed=seed, points=CURVE_POINTS)
    return WhatIf(scenarios=tuple(scenarios), robustness=curves, asked=bool(remove))
