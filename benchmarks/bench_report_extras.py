"""Time the report's reader extras: final customers per single point of failure and the
whole-network figure.

    .venv/bin/python benchmarks/bench_report_extras.py
    .venv/bin/python benchmarks/bench_report_extras.py --sizes 1000 20000

Final customers (``roles/customers.py``): a directed supply network made from a
growing tree (networkx ``gn_graph``, each firm supplied by an older one) plus one
second supplier for every other firm, described for the 50 firms with the most
dependents, as ``roles.run`` does. Whole-network figure (``figures.network_map``):
connected caveman graphs (cliques of 10 in a ring) of 100 to 300 members, the sizes the
report draws (``context.NETWORK_FIGURE_MAX``). The machine is shared: CPU seconds of
this process are the steadier figure.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import networkx as nx
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parents[1]))

from roles.analysis.customers import final_customers  # noqa: E402
from roles.analysis.measures import dependents  # noqa: E402
from roles.report import figures  # noqa: E402


def _supply(n: int, seed: int = 1) -> nx.DiGraph:
    g = nx.gn_graph(n, seed=seed).reverse()
    rng = np.random.default_rng(seed)
    for v in range(2, n, 2):
        u = int(rng.integers(0, v))
        if u != v:
            g.add_edge(u, v)  # an older firm as second supplier: no cycles
    return g


def _timed(f):
    w, c = time.perf_counter(), time.process_time()
    out = f()
    return out, time.perf_counter() - w, time.process_time() - c


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[1000, 10000, 20000])
    args = ap.parse_args()
    print("| firms | ties | final customers of 50 firms: wall s | CPU s | reached (first) |")
    print("| ---: | ---: | ---: | ---: | ---: |")
    for n in args.sizes:
        g = _supply(n)
        dep = dependents(g)
        worst = sorted(g, key=lambda v: (-dep[v], v))[:50]
        out, wall, cpu = _timed(lambda g=g, worst=worst: final_customers(g, worst))
        first = len(out[0].reached)
        print(f"| {n:,} | {g.number_of_edges():,} | {wall:.2f} | {cpu:.2f} | {first:,} |")
    print()
    print("| members | ties | whole-network figure: wall s | CPU s | SVG kB |")
    print("| ---: | ---: | ---: | ---: | ---: |")
    for n in (100, 200, 300):
        g = nx.connected_caveman_graph(n // 10, 10)
        comm = [1 + i // 10 for i in g]
        fig, wall, cpu = _timed(
            lambda g=g, comm=comm: figures.network_map(
                len(g), list(g.edges()), comm, names=[str(v) for v in g], annotate=[0, 10]
            )
        )
        kb = len(fig.svg.encode()) / 1024
        print(f"| {n} | {g.number_of_edges():,} | {wall:.2f} | {cpu:.2f} | {kb:.0f} |")


if __name__ == "__main__":
    main()
