"""Time each role measure on synthetic networks of about 1k, 10k and 100k nodes.

    .venv/bin/python benchmarks/bench_measures.py            # 1k, 10k, 100k (~ minutes)
    .venv/bin/python benchmarks/bench_measures.py --sizes 1000 10000

Graphs: preferential attachment (networkx ``barabasi_albert_graph``), average degree
10 (1k, 10k) or 20 (100k: 1M ties), tie weights 1-5 at random, 20 random community
labels and 8 random formal groups. The directed version points each tie from the
older node to the newer one (supplier -> customer) and turns 5% of ties around, so
there are cycles. At 100k nodes betweenness runs with a handful of sources only, to
give the cost per source; the default sample there would be 50 sources. The unweighted
betweenness and the whole role table are timed on the small graph only (the table's
time is mostly its betweenness). Wall and CPU seconds are both shown: the machine is
shared, so CPU seconds are the steadier figure.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import time
from pathlib import Path

import networkx as nx
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from roles import formal, measures  # noqa: E402


def _graphs(n: int, seed: int = 1) -> tuple[nx.Graph, nx.DiGraph, dict, dict]:
    m = 5 if n <= 10_000 else 10
    G = nx.barabasi_albert_graph(n, m, seed=seed)
    rng = np.random.default_rng(seed)
    for (u, v), w in zip(G.edges(), rng.integers(1, 6, G.number_of_edges()), strict=True):
        G[u][v]["weight"] = float(w)
    D = nx.DiGraph()
    D.add_nodes_from(G)
    flip = rng.random(G.number_of_edges()) < 0.05
    for (u, v, w), f in zip(G.edges(data="weight"), flip, strict=True):
        a, b = (min(u, v), max(u, v)) if not f else (max(u, v), min(u, v))
        D.add_edge(a, b, weight=w)
    community = {v: int(c) for v, c in zip(G, rng.integers(0, 20, n), strict=True)}
    groups = {v: f"g{c}" for v, c in zip(G, rng.integers(0, 8, n), strict=True)}
    return G, D, community, groups


def _time(fn, *args, **kwargs) -> tuple[tuple[float, float], object]:
    """(wall seconds, CPU seconds of this process) and the result."""
    t, c = time.perf_counter(), time.process_time()
    out = fn(*args, **kwargs)
    return (time.perf_counter() - t, time.process_time() - c), out


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--sizes", type=int, nargs="+", default=[1000, 10_000, 100_000])
    args = parser.parse_args()

    # Compile the structural-holes kernel once, outside the timings.
    measures.structural_holes(nx.path_graph(3))

    rows: list[tuple[str, str, int, int, float, float, str]] = []

    def row(name: str, graph: nx.Graph, seconds: tuple[float, float], note: str = "") -> None:
        kind = "directed" if graph.is_directed() else "undirected"
        wall, cpu = seconds
        rows.append((name, kind, graph.number_of_nodes(), graph.number_of_edges(), wall, cpu, note))
        print(f"  {name:<28} {kind:<10} {wall:8.2f} s  {note}", file=sys.stderr, flush=True)

    for n in args.sizes:
        t, (G, D, community, groups) = _time(_graphs, n)
        print(f"n = {n}: graphs built in {t[0]:.1f} s", file=sys.stderr, flush=True)
        large = n > 20_000
        for H in (G, D):
            t, _ = _time(measures.participation_coefficient, H, community)
            row("participation", H, t)
            t, _ = _time(measures.within_module_z, H, community)
            row("within_z", H, t)
            t, _ = _time(measures.structural_holes, H)
            row("constraint + effective size", H, t)
            t, _ = _time(measures.dependents, H)
            row("dependents", H, t)
            t, _ = _time(formal.brokerage, H, groups)
            row("brokerage", H, t)
            t, _ = _time(formal.ei_index, H, groups)
            row("ei_index", H, t)
        samples = 6 if large else None
        t, (_, info) = _time(
            measures.betweenness, G, exact_limit=measures.EXACT_LIMIT, seed=0, samples=samples
        )
        note = f"{info.method}, k={info.k}"
        if info.method == "sampled":
            note += f", expected_error={info.expected_error:.2g}, bound={info.error_bound:.2g}"
        if large:
            default_k = max(50, math.ceil(measures.EXACT_LIMIT**2 / n))
            note += f"; {t[1] / info.k:.1f} CPU s/source, default k={default_k}"
        row("betweenness (weighted)", G, t, note)
        if n <= 2000:
            t, (_, info) = _time(
                measures.betweenness, G, exact_limit=measures.EXACT_LIMIT, seed=0, weight=None
            )
            row("betweenness (unweighted)", G, t, f"{info.method}, k={info.k}")
            t, _ = _time(measures.role_table, G, community)
            row("role_table (all measures)", G, t)

    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(f"\n{os.cpu_count()} cores, load average {load:.1f} at the end (machine shared)")
    print(
        f"{'measure':<28} {'graph':<10} {'nodes':>8} {'ties':>9} {'wall s':>8} {'CPU s':>8}  note"
    )
    for name, kind, nodes, ties, wall, cpu, note in rows:
        print(f"{name:<28} {kind:<10} {nodes:>8} {ties:>9} {wall:>8.2f} {cpu:>8.2f}  {note}")


if __name__ == "__main__":
    main()
