"""Compiled Louvain and modularity (roles.analysis.modularity) against networkx's.

Planted-community graphs from ``bench_pipeline.py`` (mixing 0.2, average degree 20):
wall seconds, communities found, modularity and NMI against the planted communities,
for ``roles.analysis.modularity.louvain`` and ``networkx.community.louvain_communities`` (same
seed), and the time of one modularity evaluation each way. The first call of the
compiled code (loading numba's cache) is timed apart.

Run: ``.venv/bin/python benchmarks/bench_modularity.py [--sizes 1000 20000 100000]``.
"""

from __future__ import annotations

import argparse
import sys
import time
from pathlib import Path

import networkx as nx
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))


def _timed(fn, *args, **kwargs):
    start = time.perf_counter()
    out = fn(*args, **kwargs)
    return out, time.perf_counter() - start


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[1000, 20000, 100000])
    ap.add_argument("--seed", type=int, default=1)
    args = ap.parse_args()

    from bench_pipeline import make_graph
    from sklearn.metrics import normalized_mutual_info_score

    from roles.analysis.modularity import louvain, modularity
    from roles.embedding.graph import to_csr

    _, first = _timed(louvain, to_csr(nx.karate_club_graph()), seed=0)
    print(f"first call (numba cache load or compile): {first:.2f} s\n")
    print(
        "| nodes | ties | method | Louvain s | communities | modularity | NMI planted "
        "| one modularity s |"
    )
    print("|---|---|---|---|---|---|---|---|")
    for n in args.sizes:
        graph, truth = make_graph("planted", n, args.seed)
        csr = to_csr(graph)
        nodes = list(graph.nodes())
        ours, t_ours = _timed(louvain, csr, seed=args.seed)
        q_ours, tq_ours = _timed(modularity, csr, ours)
        parts, t_nx = _timed(nx.community.louvain_communities, graph, seed=args.seed)
        q_nx, tq_nx = _timed(nx.community.modularity, graph, parts)
        theirs = np.empty(n, dtype=np.int64)
        where = {v: i for i, v in enumerate(nodes)}
        for c, part in enumerate(parts):
            theirs[[where[v] for v in part]] = c
        m = graph.number_of_edges()
        for name, labels, t, q, tq in (
            ("roles.analysis.modularity", ours, t_ours, q_ours, tq_ours),
            ("networkx", theirs, t_nx, q_nx, tq_nx),
        ):
            nmi = normalized_mutual_info_score(truth, labels)
            print(
                f"| {n:,} | {m:,} | {name} | {t:.2f} | {len(np.unique(labels))} | {q:.4f} "
                f"| {nmi:.3f} | {tq:.3f} |",
                flush=True,
            )


if __name__ == "__main__":
    main()
