"""How many members each bridge-like rule names, against planted communities.

For each network, with its planted communities given (no embedding, no clustering):
members named by the earlier rule (top 10% by betweenness and participation above
0.30), by the current rule (top 10% by betweenness, equal values kept together, and at
least one tie outside the community), and how many of the members that hold a tie
between two communities each rule finds. Ring of cliques (networkx) and LFR graphs
(Lancichinetti, Fortunato & Radicchi 2008; networkx's generator, mixing 0.1 and 0.3).
Run: ``.venv/bin/python benchmarks/bench_bridges.py [--seeds 3]``.
"""

from __future__ import annotations

import argparse
import math

import networkx as nx
import numpy as np

from roles.analysis.measures import BRIDGE_P, BRIDGE_SHARE, role_table


def old_rule(table) -> set:
    b = table.betweenness.to_numpy()
    cut = np.sort(b)[::-1][max(1, math.ceil(BRIDGE_SHARE * len(b))) - 1]
    keep = (b >= cut) & (b > 0) & (table.participation.to_numpy() > BRIDGE_P)
    return set(table.index[keep])


def row(name: str, G: nx.Graph, comm: dict) -> str:
    table = role_table(G, comm)
    new = set(table.index[table.role.isin(["bridge-like", "connector hub"])])
    old = old_rule(table)
    holders = {v for u, w in G.edges() if comm[u] != comm[w] for v in (u, w)}
    return (
        f"| {name} | {G.number_of_nodes()} | {len(holders)} | {len(old)} | {len(old & holders)} "
        f"| {len(new)} | {len(new & holders)} |"
    )


def lfr(n: int, mu: float, seed: int) -> tuple[nx.Graph, dict]:
    g = nx.LFR_benchmark_graph(
        n,
        2.5,
        1.5,
        mu,
        average_degree=10,
        max_degree=50,
        min_community=20,
        max_community=100,
        seed=seed,
    )
    g.remove_edges_from(nx.selfloop_edges(g))
    comm = {v: min(g.nodes[v]["community"]) for v in g}
    plain = nx.Graph(g.edges())
    plain.add_nodes_from(g)
    return plain, comm


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--seeds", type=int, default=3)
    args = ap.parse_args()
    print(
        "| network | members | members with a tie between communities | old rule | "
        "of them holders | current rule | of them holders |"
    )
    print("| --- | ---: | ---: | ---: | ---: | ---: | ---: |")
    for k, size in ((4, 5), (6, 6), (10, 8), (20, 10)):
        G = nx.ring_of_cliques(k, size)
        print(row(f"ring of cliques {k} x {size}", G, {v: v // size for v in G}))
    for mu in (0.1, 0.3):
        for seed in range(args.seeds):
            try:
                G, comm = lfr(500, mu, seed + 1)
            except nx.ExceededMaxIterations:
                continue
            print(row(f"LFR 500, mixing {mu}, seed {seed + 1}", G, comm))


if __name__ == "__main__":
    main()
