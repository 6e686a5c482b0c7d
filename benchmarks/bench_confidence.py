"""What the confidence stage costs per network size, and evidence for its budget rules.

Prints three tables:

1. Best modularity found in randomised networks against swaps per tie (an LFR graph,
   Lancichinetti, Fortunato & Radicchi 2008): where it settles, which is why large
   networks get 3 swaps per tie instead of 10.
2. Structure test cost per network size: one randomisation (swaps + Louvain), the
   Louvain run on the network itself, the null's spread, and the whole test under the
   budget rule (``roles.confidence.structure_budget``).
3. Stability cost per network size: one re-run of embedding and clustering (both views),
   the figure the re-run budget (``roles.confidence.stability_budget``) multiplies, and
   three re-runs as :func:`roles.confidence.stability` makes them.

CPU seconds include worker processes; wall seconds depend on what else the machine runs.

Networks of tables 2 and 3 are stochastic block models (networkx, sparse generator):
blocks of 50 members, mean degree about 10, a fifth of each member's ties leaving its
block. Run: ``.venv/bin/python benchmarks/bench_confidence.py [--sizes 1000 5000 20000]``.
"""

from __future__ import annotations

import argparse
import resource
import time

import networkx as nx
import numpy as np

from roles import confidence
from roles.config import Config
from roles.graph import to_csr


def block_graph(n: int, seed: int) -> nx.Graph:
    blocks = [50] * (n // 50)
    k, mix = 10.0, 0.2
    p_in = k * (1 - mix) / 49
    p_out = k * mix / (n - 50)
    probs = [[p_in if i == j else p_out for j in range(len(blocks))] for i in range(len(blocks))]
    g = nx.stochastic_block_model(blocks, probs, seed=seed, sparse=True)
    return nx.Graph(g.edges())


def _cpu() -> float:
    """CPU seconds of this process and of its finished worker processes."""
    own = resource.getrusage(resource.RUSAGE_SELF)
    kids = resource.getrusage(resource.RUSAGE_CHILDREN)
    return own.ru_utime + own.ru_stime + kids.ru_utime + kids.ru_stime


def clock() -> tuple[float, float]:
    return time.perf_counter(), _cpu()


def since(t: tuple[float, float]) -> tuple[float, float]:
    """(wall seconds, CPU seconds including worker processes) since ``t``."""
    return time.perf_counter() - t[0], _cpu() - t[1]


def swaps_table() -> None:
    g = nx.LFR_benchmark_graph(1000, 2.5, 1.5, 0.1, average_degree=10, max_degree=50,
                               min_community=20, max_community=100, seed=2)  # fmt: skip
    g = nx.Graph(g.edges())
    g.remove_edges_from(nx.selfloop_edges(g))
    print(f"\n1. Best modularity (Louvain) of randomised copies of an LFR graph "
          f"(n=1000, mu=0.1, {g.number_of_edges()} ties), 3 randomisations per row")  # fmt: skip
    print(f"{'swaps/tie':>10} {'mean Q':>8} {'sd':>7}")
    for spe in (0, 0.5, 1, 2, 3, 5, 10):
        qs = []
        for r in range(3):
            h = confidence._randomised(g, spe, seed=r)[0] if spe else g
            qs.append(confidence._best_modularity(h, seed=r))
        print(f"{spe:>10g} {np.mean(qs):>8.4f} {np.std(qs, ddof=1):>7.4f}")


def structure_table(sizes: list[int]) -> None:
    print("\n2. Structure test per network size (stochastic block model, blocks of 50)")
    head = (f"{'nodes':>7} {'ties':>8} {'swap10 s':>9} {'swap3 s':>8} {'louvain s':>10} "
            f"{'null louvain s':>15} {'null sd':>8} {'budget R x swaps':>17} "
            f"{'test wall s':>12} {'test cpu s':>11}")  # fmt: skip
    print(head)
    for n in sizes:
        g = block_graph(n, seed=1)
        m = g.number_of_edges()
        t = clock()
        confidence._randomised(g, 10.0, seed=1)
        s10 = since(t)[1]
        t = clock()
        r3 = confidence._randomised(g, 3.0, seed=2)[0]
        s3 = since(t)[1]
        t = clock()
        confidence._best_modularity(g, seed=1)
        lv = since(t)[1]
        t = clock()
        confidence._best_modularity(r3, seed=1)
        lvn = since(t)[1]
        labels = {v: v // 50 for v in g}
        t = clock()
        test = confidence.structure_test(g, labels, randomisations=20, seed=1)
        wall, cpu = since(t)
        budget = f"{test.randomisations} x {test.swaps_per_edge:g}"
        if "at a time" in test.budget:
            budget += " (2p)"
        print(f"{n:>7} {m:>8} {s10:>9.2f} {s3:>8.2f} {lv:>10.2f} {lvn:>15.2f} "
              f"{test.null_sd:>8.4f} {budget:>17} {wall:>12.1f} {cpu:>11.1f}")  # fmt: skip


def stability_table(sizes: list[int]) -> None:
    print("\n3. Stability re-runs (both views embedded and clustered), default settings")
    print(f"{'nodes':>7} {'ties':>8} {'1 re-run cpu s':>15} {'3 re-runs wall s':>17} "
          f"{'3 re-runs cpu s':>16} {'processes':>10} {'re-runs of 5 kept':>18}")  # fmt: skip
    for n in sizes:
        g = nx.relabel_nodes(block_graph(n, seed=1), str)
        csr = to_csr(g)
        idx = np.flatnonzero(confidence._connected(csr))
        confidence._rerun(csr, Config(seed=1), idx, 1)  # warm: imports, compiled kernel
        t = clock()
        ref = confidence._rerun(csr, Config(seed=2), idx, 1)
        one = since(t)[1]
        labels = np.zeros(csr.n_nodes, dtype=np.int64)
        labels[idx] = ref["far"]
        t = clock()
        st = confidence.stability(csr, Config(seed=2), runs=3, view="far",
                                  reference_labels=labels, seed=1)  # fmt: skip
        wall, cpu = since(t)
        workers = "2" if "at a time" in st.budget else "1"
        kept = confidence.stability_budget(len(idx), 5)[0]
        print(f"{n:>7} {g.number_of_edges():>8} {one:>15.1f} {wall:>17.1f} {cpu:>16.1f} "
              f"{workers:>10} {kept:>18}")  # fmt: skip


def main() -> None:
    ap = argparse.ArgumentParser()
    ap.add_argument("--sizes", type=int, nargs="*", default=[1000, 5000, 20000])
    ap.add_argument("--skip", nargs="*", default=[], choices=["swaps", "structure", "stability"])
    args = ap.parse_args()
    if "swaps" not in args.skip:
        swaps_table()
    if "structure" not in args.skip:
        structure_table(args.sizes)
    if "stability" not in args.skip:
        stability_table(args.sizes)


if __name__ == "__main__":
    main()
