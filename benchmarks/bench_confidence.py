"""What the confidence stage costs per network size, and evidence for its budget rules.

Prints four tables:

1. Best modularity found in randomised networks against swaps per tie (planted-partition
   networks): where it settles, which is why large networks get 3 swaps per tie instead
   of 10.
2. The compiled swaps and Louvain against networkx's ``double_edge_swap`` and
   ``louvain_communities`` on small graphs: mean and spread of the randomised networks'
   best modularity each way (they should agree), and the seconds per randomisation.
3. Structure test cost per network size: the test graph's arrays, one randomisation
   (swaps at 3 and 10 per tie, Louvain), Louvain on the network, the null's spread, the
   whole test under the budget rule (``roles.analysis.confidence.structure_budget``) on one
   thread and on two, and all 20 randomisations on two threads; with ``--networkx-upto``
   also one randomisation made the networkx way, for comparison.
4. Stability cost per network size: one re-run of embedding and clustering (both views)
   with each view grouped in the process that embedded it (``embed_views_then``, as
   :func:`roles.analysis.confidence.stability` does) against grouping both views afterwards in
   the parent (``embed_views`` then ``cluster``), checked to give the same labels; and
   three re-runs as :func:`roles.analysis.confidence.stability` makes them.

Wall seconds depend on what else the machine runs; CPU seconds include this process's
threads and its finished worker processes. Networks are the planted partitions of
``bench_pipeline.py`` (LFR-like power-law degrees and community sizes, mixing 0.2,
average degree 20). Run:
``.venv/bin/python benchmarks/bench_confidence.py [--sizes 1000 20000 100000]``.
"""

from __future__ import annotations

import argparse
import resource
import sys
import time
from pathlib import Path

import networkx as nx
import numpy as np

sys.path.insert(0, str(Path(__file__).resolve().parent))

from bench_pipeline import planted_partition  # noqa: E402

from roles.analysis import confidence  # noqa: E402
from roles.config import Config  # noqa: E402
from roles.embedding.budget import walk_budget  # noqa: E402
from roles.embedding.graph import to_csr  # noqa: E402


def _cpu() -> float:
    """CPU seconds of this process (all threads) and of its finished worker processes."""
    own = resource.getrusage(resource.RUSAGE_SELF)
    kids = resource.getrusage(resource.RUSAGE_CHILDREN)
    return own.ru_utime + own.ru_stime + kids.ru_utime + kids.ru_stime


def clock() -> tuple[float, float]:
    return time.perf_counter(), _cpu()


def since(t: tuple[float, float]) -> tuple[float, float]:
    """(wall seconds, CPU seconds) since ``t``."""
    return time.perf_counter() - t[0], _cpu() - t[1]


def _ties(g: nx.Graph) -> tuple[tuple[str, ...], np.ndarray, np.ndarray]:
    nodes, u, v = confidence._test_arrays(g)
    return tuple(str(x) for x in nodes), u, v


def _null_q(names, u, v, spe: float, seed: int) -> float:
    r, _ = confidence._randomised(u, v, len(names), spe, seed)
    return confidence._best_modularity(confidence._csr(names, r.u, r.v), seed)


def _networkx_null_q(g: nx.Graph, spe: float, seed: int) -> float:
    r = nx.Graph(g)
    nswap = int(round(spe * r.number_of_edges()))
    nx.double_edge_swap(r, nswap=nswap, max_tries=50 * nswap + 100, seed=seed)
    parts = nx.community.louvain_communities(r, weight=None, seed=seed)
    return float(nx.community.modularity(r, parts, weight=None))


def swaps_table(sizes: list[int]) -> None:
    print("\n1. Best modularity (Louvain) of randomised planted-partition networks against")
    print("   swaps per tie, 4 randomisations per row; 'kept': share of the original ties")
    print(f"{'nodes':>7} {'ties':>8} {'swaps/tie':>10} {'mean Q':>8} {'sd':>7} {'kept':>7}")
    for n in sizes:
        g, _ = planted_partition(n, seed=1)
        names, u, v = _ties(g)
        before = set(zip(u.tolist(), v.tolist(), strict=True))
        for spe in (0.5, 1, 2, 3, 5, 10, 20):
            qs = []
            for r in range(4):
                sw, _ = confidence._randomised(u, v, len(names), spe, 100 + r)
                qs.append(confidence._best_modularity(confidence._csr(names, sw.u, sw.v), r))
            lo, hi = np.minimum(sw.u, sw.v).tolist(), np.maximum(sw.u, sw.v).tolist()
            kept = len(before & set(zip(lo, hi, strict=True))) / len(u)
            print(f"{n:>7} {len(u):>8} {spe:>10g} {np.mean(qs):>8.4f} "
                  f"{np.std(qs, ddof=1):>7.4f} {kept:>7.4f}")  # fmt: skip


def _small_graphs() -> dict[str, nx.Graph]:
    # The LFR graph of tests/test_confidence.py (Lancichinetti, Fortunato & Radicchi
    # 2008), an Erdos-Renyi graph of mean degree 6 and a Barabasi-Albert graph.
    lfr = nx.LFR_benchmark_graph(250, 3, 1.5, 0.1, average_degree=10, max_degree=30,
                                 min_community=20, max_community=50, seed=1)  # fmt: skip
    lfr = nx.Graph((u, v) for u, v in lfr.edges() if u != v)
    return {
        "LFR 250": lfr,
        "Erdos-Renyi 250": nx.gnp_random_graph(250, 6 / 249, seed=1),
        "Barabasi 300": nx.barabasi_albert_graph(300, 3, seed=1),
    }


def agreement_table(randomisations: int) -> None:
    from scipy.stats import ttest_ind

    print(f"\n2. Randomised networks' best modularity, {randomisations} randomisations of 10 "
          "swaps per tie each way (compiled: roles.analysis.swaps + "
          "roles.analysis.modularity; networkx: "
          "double_edge_swap + louvain_communities)")  # fmt: skip
    print(f"{'graph':>16} {'ties':>6} {'compiled mean':>14} {'sd':>7} {'networkx mean':>14} "
          f"{'sd':>7} {'Welch p':>8} {'compiled s':>11} {'networkx s':>11}")  # fmt: skip
    for name, g in _small_graphs().items():
        names, u, v = _ties(g)
        t = clock()
        ours = [_null_q(names, u, v, 10.0, 1000 + r) for r in range(randomisations)]
        t_ours = since(t)[1] / randomisations
        h = nx.convert_node_labels_to_integers(g)
        t = clock()
        theirs = [_networkx_null_q(h, 10.0, 1000 + r) for r in range(randomisations)]
        t_nx = since(t)[1] / randomisations
        p = ttest_ind(ours, theirs, equal_var=False).pvalue
        print(f"{name:>16} {len(u):>6} {np.mean(ours):>14.4f} {np.std(ours, ddof=1):>7.4f} "
              f"{np.mean(theirs):>14.4f} {np.std(theirs, ddof=1):>7.4f} {p:>8.3f} "
              f"{t_ours:>11.4f} {t_nx:>11.4f}")  # fmt: skip


def structure_table(sizes: list[int], networkx_upto: int) -> None:
    print("\n3. Structure test per network size (planted partition, average degree 20); "
          "seconds, CPU unless marked wall")  # fmt: skip
    print(f"{'nodes':>7} {'ties':>8} {'arrays':>7} {'swaps 3':>8} {'swaps 10':>9} "
          f"{'louvain':>8} {'null louv':>10} {'nx rand':>8} {'null sd':>8} {'budget':>7} "
          f"{'1 thr wall':>11} {'2 thr wall':>11} {'2 thr cpu':>10} {'all 20 wall':>12} "
          f"{'20 cpu':>7}")  # fmt: skip
    for n in sizes:
        g, truth = planted_partition(n, seed=1)
        labels = dict(zip(g.nodes(), truth.tolist(), strict=True))
        t = clock()
        names, u, v = _ties(g)
        arrays = since(t)[1]
        base = confidence._csr(names, u, v)
        t = clock()
        confidence._best_modularity(base, 1)
        lv = since(t)[1]
        t = clock()
        confidence._randomised(u, v, len(names), 10.0, 1)
        s10 = since(t)[1]
        t = clock()
        r3, _ = confidence._randomised(u, v, len(names), 3.0, 2)
        s3 = since(t)[1]
        null_csr = confidence._csr(names, r3.u, r3.v)
        t = clock()
        confidence._best_modularity(null_csr, 1)
        lvn = since(t)[1]
        nx_one = "-"
        if len(u) <= networkx_upto:
            t = clock()
            _networkx_null_q(nx.Graph(g.edges()), confidence.structure_budget(len(u), 1)[1], 1)
            nx_one = f"{since(t)[1]:.2f}"
        t = clock()
        one = confidence.structure_test(g, labels, randomisations=20, seed=1, threads=1)
        wall1 = since(t)[0]
        t = clock()
        two = confidence.structure_test(g, labels, randomisations=20, seed=1, threads=2)
        wall2, cpu2 = since(t)
        assert one.null == two.null  # threads change the time, not the figures
        full = confidence._FULL_TEST_EDGES
        confidence._FULL_TEST_EDGES = 10**12  # every randomisation asked for
        try:
            t = clock()
            confidence.structure_test(g, labels, randomisations=20, seed=1, threads=2)
            wall20, cpu20 = since(t)
        finally:
            confidence._FULL_TEST_EDGES = full
        budget = f"{two.randomisations}x{two.swaps_per_edge:g}"
        print(f"{n:>7} {len(u):>8} {arrays:>7.2f} {s3:>8.2f} {s10:>9.2f} {lv:>8.2f} "
              f"{lvn:>10.2f} {nx_one:>8} {two.null_sd:>8.4f} {budget:>7} {wall1:>11.1f} "
              f"{wall2:>11.1f} {cpu2:>10.1f} {wall20:>12.1f} {cpu20:>7.1f}")  # fmt: skip


def _rerun_grouping_after(csr, config: Config, idx: np.ndarray) -> dict[str, np.ndarray]:
    """A re-run with both views grouped in the parent after embedding (the old way)."""
    from roles.embedding.cluster import cluster
    from roles.embedding.embed import embed_views
    from roles.seeds import StageSeeds

    seeds = StageSeeds.of(config.seed).view_groups
    embeddings = embed_views(csr, config)
    return {
        view: cluster(
            np.asarray(embeddings[view].vectors)[idx],
            min_cluster_size=config.cluster.min_cluster_size,
            reduce_to=config.cluster.reduce_to,
            seed=seeds[view],
            fit_limit=config.cluster.fit_limit or None,
        ).labels
        for view in ("local", "far")
    }


def stability_table(sizes: list[int]) -> None:
    print("\n4. Stability re-runs (both views embedded and clustered), walk budget of the "
          "pipeline; wall seconds")  # fmt: skip
    print(f"{'nodes':>7} {'ties':>8} {'grouped after':>14} {'grouped in view':>16} "
          f"{'same labels':>12} {'3 re-runs':>10} {'processes':>10} {'kept of 5':>10}")  # fmt: skip
    for n in sizes:
        g, _ = planted_partition(n, seed=1)
        g = nx.relabel_nodes(g, str)
        config, _ = walk_budget(n, g.number_of_edges(), Config(seed=2))
        csr = to_csr(g)
        idx = np.flatnonzero(confidence._connected(csr))
        confidence._rerun(csr, config, idx)  # warm: imports, compiled kernels
        t = clock()
        after = _rerun_grouping_after(csr, config, idx)
        w_after = since(t)[0]
        t = clock()
        inside = confidence._rerun(csr, config, idx)
        w_inside = since(t)[0]
        same = all(np.array_equal(after[v], inside[v]) for v in after)
        labels = np.zeros(csr.n_nodes, dtype=np.int64)
        labels[idx] = inside["far"]
        t = clock()
        st = confidence.stability(csr, config, runs=3, view="far", reference_labels=labels,
                                  seed=1)  # fmt: skip
        wall = since(t)[0]
        workers = "2" if "at a time" in st.budget else "1"
        kept = confidence.stability_budget(len(idx), 5)[0]
        print(f"{n:>7} {g.number_of_edges():>8} {w_after:>14.1f} {w_inside:>16.1f} "
              f"{str(same):>12} {wall:>10.1f} {workers:>10} {kept:>10}")  # fmt: skip


def main() -> None:
    ap = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    ap.add_argument("--sizes", type=int, nargs="*", default=[1000, 20000, 100000])
    ap.add_argument("--swap-sizes", type=int, nargs="*", default=[1000, 20000])
    ap.add_argument("--stability-sizes", type=int, nargs="*", default=[1000, 5000, 10000])
    ap.add_argument("--agreement-randomisations", type=int, default=40)
    ap.add_argument("--networkx-upto", type=int, default=200_000,
                    help="also time one networkx randomisation up to this many ties")  # fmt: skip
    ap.add_argument("--skip", nargs="*", default=[],
                    choices=["swaps", "agreement", "structure", "stability"])  # fmt: skip
    args = ap.parse_args()
    g = nx.ring_of_cliques(4, 5)  # load the compiled kernels before timing anything
    confidence.structure_test(g, {v: v // 5 for v in g}, randomisations=2, threads=1)
    if "swaps" not in args.skip:
        swaps_table(args.swap_sizes)
    if "agreement" not in args.skip:
        agreement_table(args.agreement_randomisations)
    if "structure" not in args.skip:
        structure_table(args.sizes, args.networkx_upto)
    if "stability" not in args.skip:
        stability_table(args.stability_sizes)


if __name__ == "__main__":
    main()
