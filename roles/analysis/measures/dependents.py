"""Dependents: how many nodes rely on a node as their single point of failure."""

from __future__ import annotations

from collections.abc import Hashable

import networkx as nx

from ...errors import InputError

__all__ = ["dependents"]


class _Origin:
    """The virtual supplier of every source; a private object no graph can contain."""

    def __repr__(self) -> str:
        return "<origin>"


def _origins(G: nx.DiGraph) -> list[Hashable]:
    """Nodes the virtual origin feeds: sources, and every node of a sourceless cycle."""
    sources = [v for v, d in G.in_degree() if d == 0]
    reached: set[Hashable] = set(sources)
    frontier = list(sources)
    while frontier:
        v = frontier.pop()
        for w in G.succ[v]:
            if w not in reached:
                reached.add(w)
                frontier.append(w)
    if len(reached) == len(G):
        return sources
    # Unreached nodes lie in or below strongly connected groups that no outside node
    # supplies; the members of those top groups are treated as sources.
    rest = G.subgraph(v for v in G if v not in reached)
    cond = nx.condensation(rest)
    tops = [c for c, d in cond.in_degree() if d == 0]
    return sources + [v for c in tops for v in cond.nodes[c]["members"]]


def _dependents_directed(G: nx.DiGraph) -> dict[Hashable, int]:
    origin = _Origin()
    D = nx.DiGraph()
    D.add_node(origin)
    D.add_nodes_from(G)
    D.add_edges_from((u, v) for u, v in G.edges() if u != v)
    D.add_edges_from((origin, v) for v in _origins(G))
    idom = nx.immediate_dominators(D, origin)
    children: dict[Hashable, list[Hashable]] = {v: [] for v in D}
    for v, d in idom.items():
        if v is not origin and d is not None:
            children[d].append(v)
    order: list[Hashable] = [origin]
    for v in order:  # breadth-first listing of the dominator tree
        order.extend(children[v])
    size = dict.fromkeys(D, 1)
    for v in reversed(order):
        d = idom.get(v)
        if v is not origin and d is not None:
            size[d] += size[v]
    return {v: size[v] - 1 for v in G}


def _dependents_undirected(G: nx.Graph) -> dict[Hashable, int]:
    # Iterative Hopcroft-Tarjan depth-first search with subtree sizes. Removing v splits
    # its component into the subtrees of the children c with low[c] >= disc[v] and,
    # unless v is the root, the rest (the part holding v's parent).
    disc: dict[Hashable, int] = {}
    low: dict[Hashable, int] = {}
    size: dict[Hashable, int] = {}
    cut_sum: dict[Hashable, int] = {}
    cut_max: dict[Hashable, int] = {}
    result = dict.fromkeys(G, 0)
    adj = G.adj
    clock = 0
    for root in G:
        if root in disc:
            continue
        disc[root] = low[root] = clock
        clock += 1
        members = [root]
        stack = [(root, None, iter(adj[root]))]
        while stack:
            v, parent, it = stack[-1]
            for w in it:
                if w == v:
                    continue
                if w not in disc:
                    disc[w] = low[w] = clock
                    clock += 1
                    members.append(w)
                    stack.append((w, v, iter(adj[w])))
                    break
                if w != parent and disc[w] < low[v]:
                    low[v] = disc[w]
            else:
                stack.pop()
                s = size[v] = size.get(v, 0) + 1
                if parent is not None:
                    size[parent] = size.get(parent, 0) + s
                    if low[v] < low[parent]:
                        low[parent] = low[v]
                    if low[v] >= disc[parent]:
                        cut_sum[parent] = cut_sum.get(parent, 0) + s
                        if s > cut_max.get(parent, 0):
                            cut_max[parent] = s
        total = size[root]
        for v in members:
            if v not in cut_sum:
                continue
            rest = 0 if v == root else total - 1 - cut_sum[v]
            result[v] = total - 1 - max(rest, cut_max[v])
    return result


def dependents(G: nx.Graph) -> dict[Hashable, int]:
    """How many other nodes depend on each node as a single point of failure.

    Directed graphs (ties point from supplier to customer): the number of nodes that
    lose every supply path from every source if the node fails - the nodes it
    dominates in the dominator tree rooted at a virtual origin that feeds every source
    (a node with no suppliers) [1]_ [2]_ [4]_.

    Undirected graphs: the number of other nodes of its connected component that end
    up outside the largest remaining piece of the component when it is removed: 0 for
    nodes that are not cut vertices [3]_.

    Parameters
    ----------
    G : networkx.Graph or networkx.DiGraph
        The network. Self-loops are ignored; weights play no part.

    Returns
    -------
    dict
        Node -> number of dependents (a whole number >= 0).

    Notes
    -----
    Nodes that no source reaches: a group of nodes that supply one another in a cycle
    with no outside supplier has no source above it. Each member of such a top group
    (a strongly connected component that nothing outside supplies) is fed by the
    virtual origin as if it were a source, so those nodes, and the nodes below them,
    get dependents like everyone else and nobody counts as their single point of
    failure within their own cycle. When every node is reachable from a node with no
    suppliers, this changes nothing.

    Cost: O(V + E) for undirected graphs (one depth-first search, no node removed);
    directed graphs use networkx's ``immediate_dominators`` (Cooper, Harvey & Kennedy
    2006), near-linear in practice.

    References
    ----------
    .. [1] T. Lengauer and R. E. Tarjan, "A fast algorithm for finding dominators in a
       flowgraph", ACM TOPLAS 1:121-141, 1979.
    .. [2] K. D. Cooper, T. J. Harvey and K. Kennedy, "A simple, fast dominance
       algorithm", Software Practice & Experience 4:1-10, 2001 (tech. report 2006).
    .. [3] J. Hopcroft and R. Tarjan, "Algorithm 447: efficient algorithms for graph
       manipulation", Communications of the ACM 16:372-378, 1973.
    .. [4] S. Allesina and A. Bodini, "Who dominates whom in the ecosystem? Energy flow
       bottlenecks and cascading extinctions", Journal of Theoretical Biology
       230:351-358, 2004.

    Examples
    --------
    >>> import networkx as nx
    >>> dependents(nx.DiGraph([("a", "b"), ("b", "c"), ("b", "d")]))
    {'a': 3, 'b': 2, 'c': 0, 'd': 0}
    >>> dependents(nx.path_graph(5))
    {0: 0, 1: 1, 2: 2, 3: 1, 4: 0}
    """
    if G.is_multigraph():
        raise InputError(
            "the network has parallel ties between the same pair of nodes; merge them "
            "into one tie before computing dependents."
        )
    if G.is_directed():
        return _dependents_directed(G)
    return _dependents_undirected(G)
