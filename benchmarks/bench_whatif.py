"""Time the removal scenarios and robustness curves (roles/whatif.py).

    .venv/bin/python benchmarks/bench_whatif.py                   # 20k / 200k and 100k / 1M
    .venv/bin/python benchmarks/bench_whatif.py --sizes 20000 --directed

Graphs: preferential attachment (networkx ``barabasi_albert_graph``, 10 ties per new
member: 20k members / 200k ties, 100k / 1M), 20 random community labels. The directed
version points each tie from the older member to the newer one (supplier -> customer).
Each size runs in a fresh process so that its peak memory (``ru_maxrss``) is its own.

What is timed is what the pipeline adds: ``whatif.assess`` with the default scenarios
(up to 6 single removals and the best of up to 28 pairs, each with global efficiency
before and after) and both robustness curves (1 betweenness order + 10 random orders).
Its inputs - betweenness, dependents, bridge-like members - come from the role measures,
which the pipeline computes anyway; here degree stands in for betweenness (the order
changes which members are removed, not the cost) and dependents are computed untimed.
The first call compiles the numba kernels (cached on disk afterwards); the table shows
a second, warm call. The machine is shared: wall seconds include waiting for a core.
"""

from __future__ import annotations

import argparse
import json
import resource
import subprocess
import sys
import time
from pathlib import Path

ROOT = Path(__file__).resolve().parents[1]


def _one(n: int, directed: bool) -> dict:
    sys.path.insert(0, str(ROOT))
    import networkx as nx
    import numpy as np

    from roles.analysis import whatif
    from roles.analysis.measures import dependents

    g = nx.barabasi_albert_graph(n, 10, seed=1)
    if directed:
        d = nx.DiGraph()
        d.add_nodes_from(g)
        d.add_edges_from((min(u, v), max(u, v)) for u, v in g.edges())
        g = d
    rng = np.random.default_rng(1)
    community = {v: int(c) + 1 for v, c in zip(g, rng.integers(0, 20, n), strict=True)}
    degree = {v: float(k) for v, k in g.degree()}
    t = time.perf_counter()
    dep = dependents(g)
    dep_s = time.perf_counter() - t
    bridges = sorted(g, key=lambda v: -degree[v])[:10]
    out = {}
    for label in ("cold", "warm"):
        t, c = time.perf_counter(), time.process_time()
        w = whatif.assess(
            g, communities=community, betweenness=degree, dependents=dep, bridges=bridges
        )
        out[label] = (time.perf_counter() - t, time.process_time() - c)
    t = time.perf_counter()
    net = whatif._Network(g, community, seed=0, efficiency_work=whatif.EFFICIENCY_WORK)
    prep = time.perf_counter() - t
    t = time.perf_counter()
    whatif._robustness(net, degree, orders=whatif.RANDOM_ORDERS, seed=0, points=101)
    curves = time.perf_counter() - t
    t = time.perf_counter()
    _ = net.eff_before
    eff = time.perf_counter() - t
    rob = w.robustness
    return {
        "n": n,
        "ties": g.number_of_edges(),
        "directed": directed,
        "scenarios": len(w.scenarios),
        "pairs": w.scenarios[-1].pairs_tried,
        "sources": w.scenarios[0].efficiency_sources,
        "eff_error": max(s.efficiency_error for s in w.scenarios),
        "cold": out["cold"],
        "warm": out["warm"],
        "prep": prep,
        "curves": curves,
        "efficiency_once": eff,
        "dependents": dep_s,
        "R": (rob.betweenness_order.R, rob.random_order.R),
        "rss_gib": resource.getrusage(resource.RUSAGE_SELF).ru_maxrss / 2**20,
    }


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.split("\n\n")[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[20_000, 100_000])
    ap.add_argument("--directed", action="store_true")
    ap.add_argument("--one", type=int, help=argparse.SUPPRESS)
    args = ap.parse_args()
    if args.one:
        print(json.dumps(_one(args.one, args.directed)))
        return
    head = (
        f"{'members':>8} {'ties':>9} {'dir':>3} {'warm wall':>9} {'warm CPU':>8} "
        f"{'cold wall':>9} {'prep':>6} {'curves':>6} {'eff 1x':>6} {'sources':>7} "
        f"{'max SE':>7} {'R betw':>6} {'R rand':>6} {'peak GiB':>8}"
    )
    print(head)
    for n in args.sizes:
        cmd = [sys.executable, __file__, "--one", str(n)]
        cmd += ["--directed"] if args.directed else []
        r = json.loads(subprocess.run(cmd, capture_output=True, text=True, check=True).stdout)
        print(
            f"{r['n']:>8,} {r['ties']:>9,} {'y' if r['directed'] else 'n':>3} "
            f"{r['warm'][0]:>9.2f} {r['warm'][1]:>8.2f} {r['cold'][0]:>9.2f} "
            f"{r['prep']:>6.2f} {r['curves']:>6.2f} {r['efficiency_once']:>6.2f} "
            f"{r['sources']:>7,} {r['eff_error']:>7.4f} {r['R'][0]:>6.3f} {r['R'][1]:>6.3f} "
            f"{r['rss_gib']:>8.2f}"
        )


if __name__ == "__main__":
    main()
