"""HDBSCAN on every row against HDBSCAN on a sample (``cluster(..., fit_limit=N)``).

For planted-community graphs (the generator of ``bench_pipeline.py``, mixing 0.2,
average degree 20) this script computes both views once, as ``roles.run`` would (walk
budget applied), caches the vectors, then groups each view with HDBSCAN fitted on all
rows and on random samples of several sizes, and prints wall seconds, groups, noise share
and NMI (scikit-learn) against the planted communities. The sample seed varies, so the
spread of a sampled fit shows too.

Run: ``.venv/bin/python benchmarks/bench_cluster.py [--sizes 50000 100000]
[--limits 0 20000 30000] [--repeats 2] [--windows 0 5] [--negatives 5 3]
[--vector-dims 64 16] [--min-sizes 0 10] [--dims 16 8] [--selection hdbscan network]
[--json FILE]``. ``--selection network`` groups as ``roles.run`` does, with the graph's
ties (``cluster(..., ties=...)``); ``hdbscan``, HDBSCAN's own selection. Limit ``0``:
every row; window ``0``: the one ``roles.embedding.budget.walk_budget`` picks; ``--negatives``:
skip-gram negative samples; ``--vector-dims``: skip-gram vector size, ``0`` the
default's; ``--dims``: dimensions kept by PCA. Cached vectors are named after the
graph, window, negatives and vector size. Each new set of vectors prints the wall time
of both views (walks and skip-gram, two processes) when it is computed.
"""

from __future__ import annotations

import argparse
import dataclasses
import json
import sys
import tempfile
import time
from pathlib import Path
from typing import Any

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))


def _vectors(
    n: int,
    seed: int,
    cache: Path,
    window: int | None,
    negative: int = 5,
    dimensions: int | None = None,
) -> tuple[dict[str, np.ndarray], np.ndarray, str]:
    from roles.config import EmbeddingConfig

    neg = "" if negative == 5 else f"-neg{negative}"
    dims = dimensions or EmbeddingConfig().dimensions
    path = cache / f"roles-bench-cluster-{n}-{seed}-w{window or 'budget'}{neg}-d{dims}.npz"
    if path.exists():
        data = np.load(path)
        return {"local": data["local"], "far": data["far"]}, data["truth"], str(data["walks"])
    import networkx as nx
    from bench_pipeline import make_graph

    from roles.config import Config
    from roles.embedding.budget import walk_budget
    from roles.embedding.embed import embed_views
    from roles.embedding.graph import to_csr

    graph, truth = make_graph("planted", n, seed)
    graph = nx.relabel_nodes(graph, {v: str(v) for v in graph}, copy=True)
    config = Config()
    config = dataclasses.replace(
        config,
        embedding=dataclasses.replace(config.embedding, negative=negative, dimensions=dims),
    )
    if window:  # kept by the budget, as a window the user set
        embedding = dataclasses.replace(config.embedding, window=window)
        config = dataclasses.replace(config, embedding=embedding, window_given=True)
    config, _ = walk_budget(graph.number_of_nodes(), graph.number_of_edges(), config)
    start = time.perf_counter()
    embeddings = embed_views(to_csr(graph), config)
    walks = (
        f"{config.walks.walks_per_node}x{config.walks.walk_length}, "
        f"window {config.embedding.window}, {dims} dimensions"
        + (f", negative {negative}" if neg else "")
    )
    print(f"vectors {n:,} nodes, {walks}: {time.perf_counter() - start:.1f} s", flush=True)
    vectors = {v: np.asarray(e.vectors) for v, e in embeddings.items()}
    np.savez(path, truth=np.asarray(truth), walks=walks, **vectors)
    return vectors, np.asarray(truth), walks


def _ties(n: int, seed: int) -> Any:
    """The planted graph's ties, in the form ``roles.embedding.cluster.cluster`` takes them."""
    from bench_pipeline import make_graph

    from roles.embedding.cluster import ties_of
    from roles.embedding.graph import to_csr

    graph, _ = make_graph("planted", n, seed)
    csr = to_csr(graph)
    return ties_of(csr.indptr, csr.indices, csr.weights, np.arange(csr.n_nodes))


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="+", default=[50000, 100000])
    ap.add_argument("--limits", type=int, nargs="+", default=[0, 20000, 30000])
    ap.add_argument("--repeats", type=int, default=2, help="sample seeds per sampled fit")
    ap.add_argument("--seed", type=int, default=1, help="seed of the generated graphs")
    ap.add_argument("--cache", default=tempfile.gettempdir(), help="folder for the vectors")
    ap.add_argument(
        "--windows", type=int, nargs="+", default=[0], help="skip-gram windows (0: the budget's)"
    )
    ap.add_argument("--negatives", type=int, nargs="+", default=[5], help="negative samples")
    ap.add_argument(
        "--vector-dims", type=int, nargs="+", default=[0], help="skip-gram vector size (0: default)"
    )
    ap.add_argument(
        "--min-sizes", type=int, nargs="+", default=[0], help="HDBSCAN smallest group (0: default)"
    )
    ap.add_argument(
        "--dims", type=int, nargs="+", default=[16], help="dimensions kept by PCA before HDBSCAN"
    )
    ap.add_argument("--json", metavar="FILE")
    ap.add_argument("--selection", nargs="+", choices=["hdbscan", "network"], default=["network"])
    args = ap.parse_args()

    from sklearn.metrics import normalized_mutual_info_score

    from roles.embedding.cluster import cluster

    rows: list[dict[str, Any]] = []
    print(
        "| nodes | walks | view | dims | fit on | smallest group | sample seed | wall s | groups "
        "| noise | NMI |"
    )
    print("|---|---|---|---|---|---|---|---|---|---|---|")
    cases = (
        (n, w, k, v)
        for n in args.sizes
        for w in args.windows
        for k in args.negatives
        for v in args.vector_dims
    )
    for n, window, negative, vdims in cases:
        vectors, truth, walks = _vectors(
            n, args.seed, Path(args.cache), window, negative, vdims or None
        )
        ties = _ties(n, args.seed) if "network" in args.selection else None
        for view in ("local", "far"):
            settings = [
                (d, lim, m, sel)
                for d in args.dims
                for lim in args.limits
                for m in args.min_sizes
                for sel in args.selection
            ]
            for dims, limit, size, selection in settings:
                repeats = 1 if limit == 0 or limit >= n else args.repeats
                for r in range(repeats):
                    start = time.perf_counter()
                    g = cluster(
                        vectors[view],
                        min_cluster_size=size,
                        reduce_to=dims,
                        seed=r,
                        fit_limit=limit or None,
                        ties=ties if selection == "network" else None,
                    )
                    wall = time.perf_counter() - start
                    nmi = float(normalized_mutual_info_score(truth, g.labels))
                    row = {
                        "nodes": n,
                        "walks": walks,
                        "view": view,
                        "selection": selection,
                        "dims": g.dimensions,
                        "fit_limit": limit or None,
                        "min_cluster_size": g.min_cluster_size,
                        "sample_seed": r if limit else None,
                        "wall_s": round(wall, 1),
                        "groups": g.n_groups,
                        "noise": round(g.noise_share, 3),
                        "nmi": round(nmi, 3),
                    }
                    rows.append(row)
                    print(
                        f"| {n:,} | {walks} | {view} ({selection}) | {g.dimensions} | "
                        f"{f'{limit:,}' if limit else 'all'} | "
                        f"{g.min_cluster_size} | {r if limit else '-'} | {wall:.1f} | "
                        f"{g.n_groups} | {g.noise_share:.2f} | {nmi:.3f} |",
                        flush=True,
                    )
    if args.json:
        Path(args.json).write_text(json.dumps(rows, indent=2) + "\n", encoding="utf-8")


if __name__ == "__main__":
    main()
