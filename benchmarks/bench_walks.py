"""Walk kernel steps per second and skip-gram tokens per second. Prints a table and JSON.

Walks: second-order node2vec steps per CPU-second (per core) on a Barabasi-Albert graph of
about 200,000 ties (networkx ``barabasi_albert_graph(20000, 10)``), unweighted and with
random weights, for several (p, q), on one thread and on numba's threads.

Skip-gram: gensim tokens per second for the two ways :func:`roles.embedding.embed.embed_walks` can
feed gensim ("iterable": Python lists of prebuilt token strings; "corpus_file": a
temporary text file read by gensim's compiled reader), each alone and as two processes
side by side, which is how :func:`roles.embedding.embed.embed_views` runs the two views.

Views: both views through :func:`roles.embedding.embed.embed_views`, in one process and in two.

Run: ``.venv/bin/python benchmarks/bench_walks.py [--quick] [--only walks|skipgram|views]``.
The machine this runs on may be shared: rates are given per CPU-second as well as per
wall-clock second, with the load average at the time.
"""

from __future__ import annotations

import argparse
import json
import multiprocessing
import os
import platform
import resource
import tempfile
import time
from concurrent.futures import ProcessPoolExecutor

import networkx as nx
import numba
import numpy as np

from roles.config import Config, EmbeddingConfig, WalkConfig
from roles.embedding.embed import FEEDS, _write_corpus, embed_views, embed_walks
from roles.embedding.graph import CSRGraph, to_csr
from roles.embedding.walks import generate_walks, walk_lengths

WALK_SETTINGS = [(0.5, 2.0), (2.0, 0.5), (4.0, 0.25), (0.25, 4.0), (1.0, 2.0), (1.0, 0.5)]


def _graph(n: int, m: int, weighted: bool, seed: int = 1) -> CSRGraph:
    graph = nx.barabasi_albert_graph(n, m, seed=seed)
    if weighted:
        rng = np.random.default_rng(seed)
        for u, v in graph.edges():
            graph[u][v]["weight"] = float(rng.uniform(0.5, 3.0))
    return to_csr(graph)


def _time_walks(csr: CSRGraph, p: float, q: float, parallel: bool, r: int, length: int):
    wall, cpu = time.perf_counter(), time.process_time()
    walks = generate_walks(
        csr, walks_per_node=r, walk_length=length, p=p, q=q, seed=3, parallel=parallel
    )
    wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
    steps = int((walk_lengths(walks) - 1).sum())
    return steps, wall, cpu


def bench_walks(n: int, m: int, r: int, length: int) -> list[dict]:
    rows = []
    threads = numba.get_num_threads()
    for weighted in (False, True):
        csr = _graph(n, m, weighted)
        for parallel in (False, True):  # first call loads the compiled kernel
            generate_walks(
                csr, walks_per_node=1, walk_length=3, p=0.5, q=2, seed=0, parallel=parallel
            )
        for p, q in WALK_SETTINGS:
            for parallel in (False, True):
                steps, wall, cpu = _time_walks(csr, p, q, parallel, r, length)
                rows.append(
                    {
                        "graph": f"BA n={n} m={m}" + (" weighted" if weighted else ""),
                        "ties": csr.n_arcs // 2,
                        "p": p,
                        "q": q,
                        "threads": threads if parallel else 1,
                        "steps": steps,
                        "wall_s": round(wall, 3),
                        "cpu_s": round(cpu, 3),
                        "steps_per_cpu_s": round(steps / cpu),
                        "steps_per_s_wall": round(steps / wall),
                    }
                )
    return rows


def _train(args: tuple) -> tuple[float, float, int]:
    """Wall seconds, CPU seconds of the whole process (all its threads), tokens."""
    walks, n_nodes, feed, cfg = args
    wall, cpu = time.perf_counter(), time.process_time()
    embed_walks(walks, n_nodes, feed=feed, seed=1, **cfg)
    wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
    return wall, cpu, int((walks >= 0).sum())


def _write_seconds(walks: np.ndarray, n_nodes: int) -> float:
    """Time to write the corpus file alone (part of the corpus_file figures)."""
    fd, path = tempfile.mkstemp(suffix=".txt")
    os.close(fd)
    try:
        start = time.perf_counter()
        _write_corpus(path, walks, walk_lengths(walks), n_nodes)
        return time.perf_counter() - start
    finally:
        os.unlink(path)


def bench_skipgram(n: int, m: int, r: int, length: int, repeat: int) -> list[dict]:
    csr = _graph(n, m, False)
    walks = {
        view: generate_walks(csr, walks_per_node=r, walk_length=length, p=1.0, q=q, seed=s)
        for view, q, s in (("local", 2.0, 1), ("far", 0.5, 2))
    }
    defaults = EmbeddingConfig()
    cfg = dict(
        dimensions=defaults.dimensions,
        window=defaults.window,
        epochs=defaults.epochs,
        negative=defaults.negative,
    )
    rows = []
    context = multiprocessing.get_context("spawn")
    for feed in FEEDS:  # warm up: imports gensim and its compiled trainers
        _train((walks["local"][:10], n, feed, cfg))
    for feed in FEEDS:
        # Best of `repeat`: the machine is shared, the fastest run is the least disturbed.
        wall, cpu, tokens = min(_train((walks["local"], n, feed, cfg)) for _ in range(repeat))
        rows.append(
            {
                "feed": feed,
                "processes": 1,
                "tokens": tokens,
                "wall_s": round(wall, 3),
                "cpu_s": round(cpu, 3),
                "tokens_per_cpu_s": round(tokens / cpu),
                "tokens_per_s_wall": round(tokens / wall),
                "load_avg_1min": round(os.getloadavg()[0], 2),
            }
        )
        best = None
        with ProcessPoolExecutor(max_workers=2, mp_context=context) as pool:
            list(pool.map(_train, [(walks["local"][:10], n, feed, cfg)] * 2))  # warm up
            for _ in range(repeat):
                start = time.perf_counter()
                results = list(pool.map(_train, [(walks[v], n, feed, cfg) for v in walks]))
                wall = time.perf_counter() - start
                if best is None or wall < best[0]:
                    best = (wall, results)
        assert best is not None
        wall, results = best
        tokens = sum(t for _, _, t in results)
        cpu = sum(c for _, c, _ in results)
        rows.append(
            {
                "feed": feed,
                "processes": 2,
                "tokens": tokens,
                "wall_s": round(wall, 3),
                "cpu_s": round(cpu, 3),
                "tokens_per_cpu_s": round(tokens / cpu),
                "tokens_per_s_wall": round(tokens / wall),
                "load_avg_1min": round(os.getloadavg()[0], 2),
            }
        )
    return rows


def bench_views(n: int, m: int, r: int, length: int) -> list[dict]:
    """embed_views, default settings but ``r`` walks per node: one process or two."""
    csr = _graph(n, m, False)
    config = Config(walks=WalkConfig(walks_per_node=r, walk_length=length))
    rows = []
    for processes in (1, 2):
        before = resource.getrusage(resource.RUSAGE_CHILDREN)
        wall, cpu = time.perf_counter(), time.process_time()
        views = embed_views(csr, config, processes=processes)
        wall, cpu = time.perf_counter() - wall, time.process_time() - cpu
        after = resource.getrusage(resource.RUSAGE_CHILDREN)
        cpu += (after.ru_utime + after.ru_stime) - (before.ru_utime + before.ru_stime)
        rows.append(
            {
                "nodes": n,
                "ties": csr.n_arcs // 2,
                "walks_per_node": r,
                "walk_length": length,
                "processes": processes,
                "wall_s": round(wall, 3),
                "cpu_s": round(cpu, 3),
                "tokens": sum(e.n_steps + e.n_walks for e in views.values()),
                "load_avg_1min": round(os.getloadavg()[0], 2),
            }
        )
    return rows


def bench_spawn() -> tuple[float, float]:
    """Wall and CPU seconds to start two fresh processes that import the stage's code."""
    context = multiprocessing.get_context("spawn")
    before = resource.getrusage(resource.RUSAGE_CHILDREN)
    start = time.perf_counter()
    with ProcessPoolExecutor(max_workers=2, mp_context=context) as pool:
        list(pool.map(_import_stack, range(2)))
    wall = time.perf_counter() - start
    after = resource.getrusage(resource.RUSAGE_CHILDREN)  # children ended with the pool
    cpu = (after.ru_utime + after.ru_stime) - (before.ru_utime + before.ru_stime)
    return wall, cpu


def _import_stack(_: int) -> int:
    import gensim.models  # noqa: F401

    # Loads the compiled kernel from numba's disk cache.
    generate_walks(to_csr(nx.path_graph(3)), walks_per_node=1, walk_length=3, p=2, q=2, seed=0)
    return 0


def _table(rows: list[dict]) -> str:
    keys = list(rows[0])
    widths = {
        k: max(len(k), *(len(f"{r[k]:,}" if isinstance(r[k], int) else str(r[k])) for r in rows))
        for k in keys
    }

    def cell(v: object, k: str) -> str:
        text = f"{v:,}" if isinstance(v, int) and not isinstance(v, bool) else str(v)
        return text.rjust(widths[k])

    lines = ["  ".join(k.rjust(widths[k]) for k in keys)]
    lines += ["  ".join(cell(r[k], k) for k in keys) for r in rows]
    return "\n".join(lines)


def main() -> None:
    parser = argparse.ArgumentParser(description=__doc__.splitlines()[0])
    parser.add_argument("--quick", action="store_true", help="smaller runs, for a smoke test")
    parser.add_argument("--only", choices=["walks", "skipgram", "views"], help="run one part")
    parser.add_argument("--repeat", type=int, default=2, help="skip-gram runs, best kept")
    args = parser.parse_args()
    if args.quick:
        walk_sizes, sg_sizes = (2000, 10, 2, 40), (2000, 10, 2, 40)
    else:
        walk_sizes, sg_sizes = (20000, 10, 10, 80), (20000, 10, 2, 40)
    machine = {
        "machine": platform.machine(),
        "processor": platform.processor() or "unknown",
        "cpu_count": os.cpu_count(),
        "python": platform.python_version(),
        "numba": numba.__version__,
        "numba_threads": numba.get_num_threads(),
        "load_avg_1min_at_start": round(os.getloadavg()[0], 2),
    }
    report: dict = {"machine": machine}
    print(f"machine: {machine}")
    if args.only in (None, "walks"):
        report["walks"] = bench_walks(*walk_sizes)
        print(
            "\nsecond-order walk steps (target >= 2,000,000 steps/s/core with p, q != 1;"
            "\nper core = per CPU-second of this process, which a shared machine does not"
            " inflate)"
        )
        print(_table(report["walks"]))
    if args.only in (None, "skipgram"):
        spawn_wall, spawn_cpu = bench_spawn()
        report["spawn_wall_s"], report["spawn_cpu_s"] = round(spawn_wall, 3), round(spawn_cpu, 3)
        print(
            "\nstarting two spawned worker processes (imports, cached kernel): "
            f"{spawn_wall:.2f} s wall, {spawn_cpu:.2f} CPU-s in all"
        )
        report["skipgram"] = bench_skipgram(*sg_sizes, repeat=args.repeat)
        csr = _graph(sg_sizes[0], sg_sizes[1], False)
        walks = generate_walks(
            csr, walks_per_node=sg_sizes[2], walk_length=sg_sizes[3], p=1, q=2, seed=1
        )
        report["corpus_file_write_seconds"] = round(_write_seconds(walks, csr.n_nodes), 3)
        print(
            "\nskip-gram training (gensim Word2Vec sg=1, workers=1 per process; CPU time"
            "\nsums all threads of the training processes)"
        )
        print(_table(report["skipgram"]))
        print(
            f"(corpus_file figures include writing the file: "
            f"{report['corpus_file_write_seconds']:.2f} s for {int((walks >= 0).sum()):,} tokens)"
        )
    if args.only in (None, "views"):
        report["views"] = bench_views(*sg_sizes)
        print(
            "\nboth views (roles.embedding.embed.embed_views): one process, "
            "or far view in a second one"
        )
        print(_table(report["views"]))
    print("\n" + json.dumps(report, indent=1))


if __name__ == "__main__":
    main()
