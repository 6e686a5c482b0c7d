"""Time each role measure on synthetic networks of about 1k, 10k, 20k and 100k nodes.

    .venv/bin/python benchmarks/bench_measures.py            # 1k ... 100k (~ minutes)
    .venv/bin/python benchmarks/bench_measures.py --sizes 1000 10000 --only betweenness
    .venv/bin/python benchmarks/bench_measures.py --sizes 20000 --only betweenness --accuracy

Graphs: preferential attachment (networkx ``barabasi_albert_graph``), average degree
10 (1k, 10k) or 20 (20k: 200k ties; 100k: 1M ties), tie weights 1-5 at random, 20
random community labels and 8 random formal groups. The directed version points each
tie from the older node to the newer one (supplier -> customer) and turns 5% of ties
around, so there are cycles. Betweenness runs at its defaults (exact up to
``EXACT_LIMIT`` nodes, the default sample beyond), weighted (distance = 1 / weight) and
counting steps, with numba's default thread count unless ``--threads`` says otherwise;
``--accuracy`` also computes the exact values of sampled sizes up to 20k (about 100 CPU
seconds at 20k) and prints how far the default sample is from them, for three seeds.
Wall and CPU seconds are both shown: the machine is shared, so CPU seconds (all threads
of this process) are the steadier figure.
"""

from __future__ import annotations

import argparse
import math
import os
import sys
import time
from pathlib import Path

import networkx as nx
import numba
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from roles.analysis import formal, measures  # noqa: E402


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


def _accuracy(G: nx.Graph, rows: list[str]) -> None:
    """Default sample against the exact values: error, stated error and top-node overlap."""
    exact, _ = measures.betweenness(G, exact_limit=G.number_of_nodes(), seed=0)
    nodes = list(G)
    b = np.array([exact[v] for v in nodes])
    top10 = max(1, math.ceil(0.1 * len(nodes)))
    top1 = max(1, math.ceil(0.01 * len(nodes)))
    order = np.argsort(-b, kind="stable")
    for seed in range(3):
        values, info = measures.betweenness(G, exact_limit=measures.EXACT_LIMIT, seed=seed)
        est = np.array([values[v] for v in nodes])
        err = np.abs(est - b)
        mine = np.argsort(-est, kind="stable")
        overlap = len(set(order[:top10]) & set(mine[:top10])) / top10
        high = order[:top1]
        rel = float(np.median(err[high] / b[high]))
        rows.append(
            f"{G.number_of_nodes():>8} {info.k:>6} {seed:>4} {info.expected_error:>10.2e} "
            f"{err.max():>10.2e} {err.max() / info.expected_error:>7.2f} {b.max():>8.4f} "
            f"{overlap:>8.2f} {rel:>8.3f}"
        )
        print("  accuracy: " + rows[-1], file=sys.stderr, flush=True)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.split("\n")[0])
    parser.add_argument("--sizes", type=int, nargs="+", default=[1000, 10_000, 20_000, 100_000])
    parser.add_argument("--only", choices=["all", "betweenness"], default="all")
    parser.add_argument("--threads", type=int, default=None, help="numba threads")
    parser.add_argument("--accuracy", action="store_true", help="sampled vs exact (slow)")
    args = parser.parse_args()
    if args.threads:
        numba.set_num_threads(args.threads)

    # Compile (or load from cache) the kernels once, outside the timings.
    measures.structural_holes(nx.path_graph(3))
    warm = nx.path_graph(4)
    measures.betweenness(warm, exact_limit=10, seed=0)
    warm[0][1]["weight"] = 2.0
    measures.betweenness(warm, exact_limit=10, seed=0)
    measures.betweenness(nx.DiGraph(warm), exact_limit=10, seed=0)
    measures.betweenness(nx.path_graph(4, create_using=nx.DiGraph), exact_limit=10, seed=0)

    rows: list[tuple[str, str, int, int, float, float, str]] = []
    accuracy: list[str] = []

    def row(name: str, graph: nx.Graph, seconds: tuple[float, float], note: str = "") -> None:
        kind = "directed" if graph.is_directed() else "undirected"
        wall, cpu = seconds
        rows.append((name, kind, graph.number_of_nodes(), graph.number_of_edges(), wall, cpu, note))
        print(f"  {name:<28} {kind:<10} {wall:8.2f} s  {note}", file=sys.stderr, flush=True)

    for n in args.sizes:
        t, (G, D, community, groups) = _time(_graphs, n)
        print(f"n = {n}: graphs built in {t[0]:.1f} s", file=sys.stderr, flush=True)
        for H in (G, D) if args.only == "all" else ():
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
        for H, weight, name in (
            (G, "weight", "betweenness (weighted)"),
            (G, None, "betweenness (unweighted)"),
            (D, "weight", "betweenness (weighted)"),
        ):
            t, (_, info) = _time(
                measures.betweenness, H, exact_limit=measures.EXACT_LIMIT, seed=0, weight=weight
            )
            note = f"{info.method}, k={info.k}, {1000 * t[1] / info.k:.2f} CPU ms/source"
            if info.method == "sampled":
                note += f", expected_error={info.expected_error:.2g}"
            row(name, H, t, note)
        if args.only == "all" and n <= 20_000:
            t, _ = _time(measures.role_table, G, community)
            row("role_table (all measures)", G, t)
        if args.accuracy and measures.EXACT_LIMIT < n <= 20_000:  # exact at 100k: hours
            _accuracy(G, accuracy)

    load = os.getloadavg()[0] if hasattr(os, "getloadavg") else float("nan")
    print(
        f"\n{os.cpu_count()} cores, {numba.get_num_threads()} numba threads, "
        f"load average {load:.1f} at the end (machine shared)"
    )
    print(
        f"{'measure':<28} {'graph':<10} {'nodes':>8} {'ties':>9} {'wall s':>8} {'CPU s':>8}  note"
    )
    for name, kind, nodes, ties, wall, cpu, note in rows:
        print(f"{name:<28} {kind:<10} {nodes:>8} {ties:>9} {wall:>8.2f} {cpu:>8.2f}  {note}")
    if accuracy:
        print("\nbetweenness, default sample against exact (weighted, undirected)")
        print(
            f"{'nodes':>8} {'k':>6} {'seed':>4} {'stated SE':>10} {'max err':>10} "
            f"{'err/SE':>7} {'max b':>8} {'top10%':>8} {'rel top1%':>8}"
        )
        print("\n".join(accuracy))


if __name__ == "__main__":
    main()
