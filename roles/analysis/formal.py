"""Formal groups (departments, tiers, regions) against the network.

Given a ``dict node -> group`` read from the nodes file, these functions compare the
groups with the communities found (crosstab, NMI), say how inward- or outward-looking
each group is (E-I index) and count each node's brokerage roles between groups.

Nodes absent from ``groups`` have no group: ties and paths that touch them are left
out of the E-I index and of the brokerage counts.
"""

from __future__ import annotations

from collections import Counter
from collections.abc import Hashable, Mapping
from typing import Any

import networkx as nx
import numpy as np
import pandas as pd
from sklearn.metrics import normalized_mutual_info_score

from ..errors import InputError

__all__ = [
    "BROKERAGE_ROLES",
    "EI_ALPHA",
    "EI_MIN_GAP",
    "crosstab",
    "formal_nmi",
    "ei_index",
    "ei_expected",
    "ei_test",
    "brokerage",
]

#: A group's E-I index differs clearly from what its size predicts when the two-sided
#: permutation p-value is at most this (our choice, strict because a report tests
#: several groups at once) ...
EI_ALPHA = 0.01

#: ... and the observed value lies at least this far from the expected one (our
#: choice: smaller gaps make no difference a reader could act on).
EI_MIN_GAP = 0.1

#: Column order of :func:`brokerage` (Gould & Fernandez 1989).
BROKERAGE_ROLES = ("coordinator", "itinerant", "representative", "gatekeeper", "liaison")


def _common(groups: Mapping[Any, Hashable], communities: Mapping[Any, Hashable]) -> list[Hashable]:
    nodes = [v for v in groups if v in communities]
    if not nodes:
        raise InputError(
            "no node has both a formal group and a community; check that the nodes "
            "file names the same nodes as the network."
        )
    return nodes


def crosstab(groups: Mapping[Any, Hashable], communities: Mapping[Any, Hashable]) -> pd.DataFrame:
    """How many members of each formal group fall in each community.

    Parameters
    ----------
    groups : mapping
        Node -> formal group.
    communities : mapping
        Node -> community.

    Returns
    -------
    pandas.DataFrame
        Rows are groups (index name ``group``), columns communities (name
        ``community``), integer counts; labels sorted. Only nodes present in both
        mappings are counted.

    Raises
    ------
    InputError
        No node is in both mappings.

    Examples
    --------
    >>> crosstab({"a": "x", "b": "x", "c": "y"}, {"a": 0, "b": 1, "c": 1}).values.tolist()
    [[1, 1], [0, 1]]
    """
    nodes = _common(groups, communities)
    return pd.crosstab(
        pd.Series([groups[v] for v in nodes], name="group"),
        pd.Series([communities[v] for v in nodes], name="community"),
    )


def formal_nmi(groups: Mapping[Any, Hashable], communities: Mapping[Any, Hashable]) -> float:
    """Normalised mutual information between formal groups and communities.

    scikit-learn's ``normalized_mutual_info_score`` (arithmetic-mean normalisation):
    1 when the communities reproduce the groups exactly (whatever their labels), 0 when
    they are independent of them.

    Parameters
    ----------
    groups : mapping
        Node -> formal group.
    communities : mapping
        Node -> community.

    Returns
    -------
    float
        NMI over the nodes present in both mappings.

    Raises
    ------
    InputError
        No node is in both mappings.

    References
    ----------
    .. [1] A. Strehl and J. Ghosh, "Cluster ensembles - a knowledge reuse framework for
       combining multiple partitions", Journal of Machine Learning Research 3:583-617,
       2002.

    Examples
    --------
    >>> formal_nmi({"a": "x", "b": "x", "c": "y"}, {"a": 5, "b": 5, "c": 7})
    1.0
    """
    nodes = _common(groups, communities)
    return float(
        normalized_mutual_info_score(
            [str(groups[v]) for v in nodes], [str(communities[v]) for v in nodes]
        )
    )


def _pairs(G: nx.Graph):
    """Each tie once, as (u, v) with u != v; a reciprocated directed pair is one tie."""
    if not G.is_directed():
        yield from ((u, v) for u, v in G.edges() if u != v)
        return
    order = {v: i for i, v in enumerate(G)}
    for u, v in G.edges():
        if u != v and not (order[u] > order[v] and G.has_edge(v, u)):
            yield u, v


def ei_index(G: nx.Graph, groups: Mapping[Any, Hashable]) -> dict[Hashable, float]:
    """Krackhardt & Stern's E-I index of every formal group.

    ``(E - I) / (E + I)``, where I counts ties with both ends in the group and E ties
    with exactly one end in it [1]_: -1 for a group whose ties all stay inside, +1 for
    one whose ties all go outside.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network. Each tie counts once whatever its direction: a directed pair
        u -> v, v -> u is one tie. Weights are not used; self-loops are ignored.
    groups : mapping
        Node -> formal group. Ties to nodes without a group are left out.

    Returns
    -------
    dict
        Group -> E-I index, for every group named in ``groups``; NaN for a group
        without ties.

    References
    ----------
    .. [1] D. Krackhardt and R. N. Stern, "Informal networks and organizational
       crises: an experimental simulation", Social Psychology Quarterly 51:123-140,
       1988.

    Examples
    --------
    >>> import networkx as nx
    >>> ei_index(nx.path_graph(3), {0: "x", 1: "x", 2: "y"})
    {'x': 0.0, 'y': 1.0}
    """
    internal: Counter[Hashable] = Counter()
    external: Counter[Hashable] = Counter()
    for u, v in _pairs(G):
        if u not in groups or v not in groups:
            continue
        gu, gv = groups[u], groups[v]
        if gu == gv:
            internal[gu] += 1
        else:
            external[gu] += 1
            external[gv] += 1
    out: dict[Hashable, float] = {}
    for g in dict.fromkeys(groups.values()):
        e, i = external[g], internal[g]
        out[g] = (e - i) / (e + i) if e + i else float("nan")
    return out


def ei_expected(groups: Mapping[Any, Hashable]) -> dict[Hashable, float]:
    """E-I index each group would have if ties ignored the groups.

    With ties placed at random between distinct members that have a group, and each
    tie counted once, a tie falls inside a group of n among N members with probability
    n(n - 1) / (N(N - 1)) and across its boundary with probability 2n(N - n) / (N(N -
    1)), so the expected E-I index is ``(2(N - n) - (n - 1)) / (2(N - n) + (n - 1))``.
    For large groups this is ``(2 - 3s) / (2 - s)`` with s = n / N: a group holding half
    of the members expects E-I = 1/3, one holding two thirds expects 0, whatever its
    members do. Krackhardt & Stern [1]_ compared the observed value with this baseline
    by permuting group labels (:func:`ei_test`).

    Parameters
    ----------
    groups : mapping
        Node -> formal group.

    Returns
    -------
    dict
        Group -> expected E-I index; NaN when only one member has a group.

    References
    ----------
    .. [1] D. Krackhardt and R. N. Stern, "Informal networks and organizational
       crises: an experimental simulation", Social Psychology Quarterly 51:123-140,
       1988.

    Examples
    --------
    >>> ei_expected({1: "x", 2: "x", 3: "y", 4: "y"})
    {'x': 0.6, 'y': 0.6}
    """
    sizes = Counter(groups.values())
    N = sum(sizes.values())
    out: dict[Hashable, float] = {}
    for g, n in sizes.items():
        across, inside = 2 * (N - n), n - 1
        out[g] = (across - inside) / (across + inside) if across + inside else float("nan")
    return out


def ei_test(
    G: nx.Graph,
    groups: Mapping[Any, Hashable],
    *,
    permutations: int = 999,
    seed: int = 0,
) -> pd.DataFrame:
    """Each group's E-I index against its value when group labels are shuffled.

    The labels of the members with a group are permuted over those members
    ``permutations`` times (the ties stay as they are), as Krackhardt & Stern did [1]_;
    each group's E-I index is recomputed every time.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network; ties counted as in :func:`ei_index`.
    groups : mapping
        Node -> formal group.
    permutations : int, default 999
        Label permutations.
    seed : int, default 0
        Seeds the permutations.

    Returns
    -------
    pandas.DataFrame
        Indexed by group (order of first appearance in ``groups``), columns

        - ``ei``: the observed E-I index (:func:`ei_index`);
        - ``expected``: :func:`ei_expected`, from group sizes alone;
        - ``permuted``: mean E-I index over the permutations;
        - ``p_value``: two-sided, (1 + #permutations at least as far from the
          permuted mean as observed) / (1 + permutations);
        - ``verdict``: ``"more inward"`` or ``"more outward"`` when
          ``p_value <= EI_ALPHA`` and the observed value is at least ``EI_MIN_GAP``
          from ``expected``; ``"as sizes predict"`` otherwise; ``"no inside ties"`` for
          a group with ties but none inside it (E-I = +1: often so by construction,
          as for supply tiers whose ties run only from one tier to the next, so it is
          not read as outward-looking); ``"no ties"`` for a group without ties.

    References
    ----------
    .. [1] D. Krackhardt and R. N. Stern, "Informal networks and organizational
       crises: an experimental simulation", Social Psychology Quarterly 51:123-140,
       1988.

    Examples
    --------
    >>> import networkx as nx
    >>> G = nx.complete_bipartite_graph(3, 3)
    >>> ei_test(G, {v: v // 3 for v in G}, permutations=9).verdict.tolist()
    ['no inside ties', 'no inside ties']
    >>> G = nx.disjoint_union(nx.complete_graph(6), nx.complete_graph(6))
    >>> G.add_edge(0, 6)
    >>> ei_test(G, {v: v // 6 for v in G}).verdict.tolist()
    ['more inward', 'more inward']
    """
    observed = ei_index(G, groups)
    expected = ei_expected(groups)
    labels = list(observed)
    code = {g: i for i, g in enumerate(labels)}
    members = [v for v in G if v in groups]
    index = {v: i for i, v in enumerate(members)}
    pairs = [(index[u], index[v]) for u, v in _pairs(G) if u in index and v in index]
    u = np.fromiter((a for a, _ in pairs), dtype=np.int64, count=len(pairs))
    w = np.fromiter((b for _, b in pairs), dtype=np.int64, count=len(pairs))
    k = len(labels)

    def ei_of(c: np.ndarray) -> np.ndarray:
        cu, cw = c[u], c[w]
        same = cu == cw
        inside = np.bincount(cu[same], minlength=k).astype(np.float64)
        outside = np.bincount(cu[~same], minlength=k) + np.bincount(cw[~same], minlength=k)
        total = inside + outside
        with np.errstate(invalid="ignore", divide="ignore"):
            return (outside - inside) / total

    c0 = np.fromiter((code[groups[v]] for v in members), dtype=np.int64, count=len(members))
    rng = np.random.default_rng(seed)
    sims = np.array([ei_of(rng.permutation(c0)) for _ in range(permutations)]).reshape(
        permutations, k
    )
    obs = np.array([observed[g] for g in labels], dtype=np.float64)
    exp = np.array([expected[g] for g in labels], dtype=np.float64)
    with np.errstate(invalid="ignore"):
        mean = np.nanmean(sims, axis=0) if permutations else np.full(k, np.nan)
        far = np.abs(sims - mean) >= np.abs(obs - mean) - 1e-12
    p = (1 + far.sum(axis=0)) / (1 + permutations)
    same = c0[u] == c0[w]
    inside = np.bincount(c0[u][same], minlength=k)
    verdict = []
    for i in range(k):
        if not np.isfinite(obs[i]):
            verdict.append("no ties")
        elif inside[i] == 0:
            verdict.append("no inside ties")
        elif p[i] <= EI_ALPHA and abs(obs[i] - exp[i]) >= EI_MIN_GAP:
            verdict.append("more inward" if obs[i] < exp[i] else "more outward")
        else:
            verdict.append("as sizes predict")
    return pd.DataFrame(
        {"ei": obs, "expected": exp, "permuted": mean, "p_value": p, "verdict": verdict},
        index=pd.Index(labels, name="group", tupleize_cols=False),
    )


def brokerage(G: nx.Graph, groups: Mapping[Any, Hashable]) -> pd.DataFrame:
    """Gould & Fernandez brokerage counts of every node.

    Node v brokers on every path a -> v -> b with a != b and no tie a -> b [1]_. By the
    groups of a, v and b the path makes v a

    - *coordinator*: a, v and b in the same group;
    - *itinerant*: a and b in the same group, v in another;
    - *representative*: a and v in the same group, b in another;
    - *gatekeeper*: v and b in the same group, a in another;
    - *liaison*: a, v and b in three different groups.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network. For an undirected graph each tie counts in both directions, so
        a - v - b is the two paths a -> v -> b and b -> v -> a (and representative
        and gatekeeper counts are equal). Self-loops are ignored.
    groups : mapping
        Node -> formal group. Paths through or to a node without a group are not
        counted; such a node gets zeros.

    Returns
    -------
    pandas.DataFrame
        Indexed by node (graph order), integer columns ``coordinator, itinerant,
        representative, gatekeeper, liaison``.

    Notes
    -----
    The counts are exact; nothing is capped or sampled. For each tie a -> v the paths
    a -> v -> b are counted by group from v's out-neighbour counts, minus the
    out-neighbours of v that a already reaches directly; that overlap is found by
    walking the shorter of the two out-neighbour lists. The cost is the sum over ties
    of min(out-degree a, out-degree v), at most O(E ** 1.5) (the bound of Chiba &
    Nishizeki 1985 for this kind of sum), instead of in-degree x out-degree per node.

    References
    ----------
    .. [1] R. V. Gould and R. M. Fernandez, "Structures of mediation: a formal approach
       to brokerage in transaction networks", Sociological Methodology 19:89-126, 1989.

    Examples
    --------
    >>> import networkx as nx
    >>> G = nx.DiGraph([("a", "v"), ("v", "b")])
    >>> brokerage(G, {"a": "x", "v": "y", "b": "z"}).loc["v"].tolist()
    [0, 0, 0, 0, 1]
    """
    nodes = list(G)
    if G.is_directed():
        succ = {v: set(G.succ[v]) - {v} for v in nodes}
        pred = {v: set(G.pred[v]) - {v} for v in nodes}
    else:
        succ = {v: set(G.adj[v]) - {v} for v in nodes}
        pred = succ
    counts = np.zeros((len(nodes), len(BROKERAGE_ROLES)), dtype=np.int64)
    for row, v in enumerate(nodes):
        if v not in groups:
            continue
        gv = groups[v]
        out_v = {b for b in succ[v] if b in groups}
        if not out_v:
            continue
        by_group = Counter(groups[b] for b in out_v)
        n_out = len(out_v)
        coord = itin = rep = gate = liaison = 0
        for a in pred[v]:
            if a not in groups:
                continue
            ga = groups[a]
            # b must differ from a and must not be tied from a already.
            dropped_total = dropped_v = dropped_a = 0
            if a in out_v:
                dropped_total, dropped_a = 1, 1
                dropped_v = int(ga == gv)
            out_a = succ[a]
            small, large = (out_v, out_a) if len(out_v) <= len(out_a) else (out_a, out_v)
            for b in small:
                if b in large:
                    dropped_total += 1
                    gb = groups[b]
                    if gb == gv:
                        dropped_v += 1
                    if gb == ga:
                        dropped_a += 1
            total = n_out - dropped_total
            to_v = by_group[gv] - dropped_v
            if ga == gv:
                coord += to_v
                rep += total - to_v
            else:
                to_a = by_group[ga] - dropped_a
                itin += to_a
                gate += to_v
                liaison += total - to_a - to_v
        counts[row] = (coord, itin, rep, gate, liaison)
    return pd.DataFrame(
        counts,
        index=pd.Index(nodes, name="node", tupleize_cols=False),
        columns=list(BROKERAGE_ROLES),
    )
