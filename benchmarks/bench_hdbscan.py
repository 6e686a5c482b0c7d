"""HDBSCAN's tree algorithms on node2vec vectors: wall seconds, groups and NMI by rows fitted.

The vectors are those of ``bench_cluster.py`` (planted-community graph, both views as
``roles.run`` computes them, cached in ``--cache``; computed there first if missing).
Each view is normalised and reduced as :func:`roles.embedding.cluster.cluster` does, then random
subsets of ``--rows`` rows are fitted with each of ``--algorithms`` (smallest group and
``min_samples`` as :func:`roles.embedding.cluster._fit_sampled` would scale them from 5), best wall
time of ``--repeats`` fits on one core. Columns: groups, noise share, NMI of the labels
against the first algorithm's, and NMI against the planted communities over the rows
not left as noise and over all rows (noise as one label).

Run: ``.venv/bin/python benchmarks/bench_hdbscan.py [--nodes 20000] [--rows 1000 12000
20000] [--algorithms boruvka_kdtree prims_balltree] [--vector-dims 64] [--cache /tmp]``.
"""

from __future__ import annotations

import argparse
import sys
import tempfile
import time
import warnings
from pathlib import Path

import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))
sys.path.insert(0, str(Path(__file__).resolve().parent.parent))

from bench_cluster import _vectors  # noqa: E402

from roles.config import ClusterConfig  # noqa: E402
from roles.embedding.cluster import MIN_GROUP, _reduce  # noqa: E402

ALGORITHMS = ("boruvka_kdtree", "prims_kdtree", "prims_balltree", "boruvka_balltree")


def main() -> None:
    import hdbscan
    from sklearn.metrics import normalized_mutual_info_score as nmi

    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--nodes", type=int, default=20000)
    ap.add_argument("--seed", type=int, default=1, help="seed of the generated graph")
    ap.add_argument("--rows", type=int, nargs="+", default=[1000, 3000, 6000, 10000, 12000, 20000])
    ap.add_argument("--algorithms", nargs="+", choices=ALGORITHMS, default=list(ALGORITHMS[:3]))
    ap.add_argument("--repeats", type=int, default=2)
    ap.add_argument("--vector-dims", type=int, default=0, help="skip-gram vector size (0: default)")
    ap.add_argument("--cache", default=tempfile.gettempdir(), help="folder of the vectors")
    args = ap.parse_args()
    vectors, truth, walks = _vectors(
        args.nodes, args.seed, Path(args.cache), None, dimensions=args.vector_dims or None
    )
    print(f"{args.nodes:,}-node planted graph, walks {walks}")
    print(
        "| view | rows | algorithm | wall s | groups | noise | NMI vs first "
        "| NMI planted (non-noise / all) |"
    )
    print("|---|---|---|---|---|---|---|---|")
    for view, v in vectors.items():
        x = _reduce(v, ClusterConfig().reduce_to, 0)
        for rows in args.rows:
            rows = min(rows, len(x))
            sample = np.sort(np.random.default_rng(0).choice(len(x), rows, replace=False))
            xs, ts = x[sample], truth[sample]
            size = max(2, round(MIN_GROUP * rows / len(x)))
            first = None
            for algorithm in args.algorithms:
                best = float("inf")
                for _ in range(args.repeats):
                    start = time.perf_counter()
                    with warnings.catch_warnings():
                        warnings.simplefilter("ignore")
                        labels = hdbscan.HDBSCAN(
                            min_cluster_size=size,
                            min_samples=min(size, 5),
                            algorithm=algorithm,
                            core_dist_n_jobs=1,
                        ).fit_predict(xs)
                    best = min(best, time.perf_counter() - start)
                first = labels if first is None else first
                kept = labels >= 0
                print(
                    f"| {view} | {rows:,} | {algorithm} | {best:.2f} | {labels.max() + 1} | "
                    f"{1 - kept.mean():.2f} | {nmi(first, labels):.3f} | "
                    f"{nmi(ts[kept], labels[kept]):.3f} / {nmi(ts, labels):.3f} |",
                    flush=True,
                )


if __name__ == "__main__":
    main()
