"""Which view recovers planted communities better? Prints a table (and JSON).

LFR benchmark graphs (Lancichinetti, Fortunato & Radicchi 2008; networkx's generator)
at several mixing levels; for each, the NMI between the planted communities and the
groups of the local view (q > 1), of the far view (q < 1), and of networkx's Louvain
partition for scale. Run: ``.venv/bin/python benchmarks/bench_views.py [--seeds 3]``.
"""

from __future__ import annotations

import argparse
import json
import time

import networkx as nx
import numpy as np
from sklearn.metrics import normalized_mutual_info_score

from roles.analysis.modularity import modularity as modularity_of
from roles.config import Config
from roles.embedding.cluster import cluster
from roles.embedding.embed import embed_views
from roles.embedding.graph import to_csr
from roles.pipeline import choose_community_view


def lfr(n: int, mu: float, seed: int) -> tuple[nx.Graph, np.ndarray]:
    """networkx's LFR graph (tau1 2.5, tau2 1.5, average degree 10, maximum degree 50,
    communities 20-100); planted community per node (the smallest community id where
    the generator lists several). Also used by ``bench_defaults.py``."""
    for attempt in range(20):
        try:
            g = nx.LFR_benchmark_graph(
                n,
                2.5,
                1.5,
                mu,
                average_degree=10,
                max_degree=50,
                min_community=20,
                max_community=100,
                seed=seed + 1000 * attempt,
            )
            break
        except nx.ExceededMaxIterations:
            continue
    else:
        raise RuntimeError("LFR generation failed")
    g.remove_edges_from(nx.selfloop_edges(g))
    plain = nx.Graph()
    plain.add_nodes_from(g)
    plain.add_edges_from(g.edges())
    truth = np.asarray([min(g.nodes[v]["community"]) for v in plain])
    return plain, truth


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--n", type=int, default=1000)
    ap.add_argument("--seeds", type=int, default=3)
    ap.add_argument("--mu", type=float, nargs="*", default=[0.1, 0.2, 0.3, 0.4, 0.5])
    args = ap.parse_args()
    rows = []
    for mu in args.mu:
        scores: dict[str, list[float]] = {"local": [], "far": [], "chosen": [], "louvain": []}
        groups: dict[str, list[int]] = {"local": [], "far": []}
        t0 = time.perf_counter()
        for s in range(args.seeds):
            g, truth = lfr(args.n, mu, seed=s + 1)
            csr = to_csr(g)
            views = embed_views(csr, Config(seed=s + 1))
            modularity, nmi = {}, {}
            for name, emb in views.items():
                grouping = cluster(np.asarray(emb.vectors), seed=s)
                nmi[name] = normalized_mutual_info_score(truth, grouping.labels)
                scores[name].append(nmi[name])
                groups[name].append(grouping.n_groups)
                q = modularity_of(csr, grouping.labels) if grouping.n_groups else np.nan
                modularity[name] = q
            scores["chosen"].append(nmi[choose_community_view(modularity)])
            parts = nx.community.louvain_communities(g, seed=s)
            lab = {v: i for i, p in enumerate(parts) for v in p}
            scores["louvain"].append(normalized_mutual_info_score(truth, [lab[v] for v in g]))
        rows.append(
            {
                "mu": mu,
                **{f"nmi_{k}": round(float(np.mean(v)), 3) for k, v in scores.items()},
                **{f"groups_{k}": round(float(np.mean(v)), 1) for k, v in groups.items()},
                "seconds": round(time.perf_counter() - t0, 1),
            }
        )
    print(f"LFR n={args.n}, {args.seeds} seeds per row, default configuration")
    cols = [
        "mu",
        "nmi_local",
        "nmi_far",
        "nmi_chosen",
        "nmi_louvain",
        "groups_local",
        "groups_far",
        "seconds",
    ]
    print(" ".join(f"{c:>12}" for c in cols))
    for r in rows:
        print(" ".join(f"{r[c]:>12}" for c in cols))
    print(json.dumps(rows))


if __name__ == "__main__":
    main()
